"""The journal and the printed record with boundaries that are moments on the clock
(issue 10 item 5): an area coming into force while the ship is inside it, a changeover
made alongside before departure.

The plan is the second sample voyage (``areas_sample/skarvik_to_tarrow.toml``, fictional:
it departs inside the Skarvik Basin ECA, and the Tarrow Approaches ECA comes into force
at 2027-06-12 00:00Z while the ship is inside it). Every expected time and position is
taken from that plan's JSON (docs/json-contract.md), not written here; the minutes are
the hand subtraction of the two UTC times, rounded to the whole minute as the record
prints them. The record PDF is read back with pdftotext.
"""

from __future__ import annotations

import json
import re
import shutil
import sqlite3
import subprocess
import sys
from datetime import datetime
from pathlib import Path

import pytest

from geo.position import format_position
from tests.cli.test_log import one_line_exit_2, run
from tests.helpers.paths import ROOT

SAMPLE = ROOT / "areas_sample"


def _ok(journal: Path, *args: str) -> str:
    r = run(journal, *args)
    assert r.returncode == 0, r.stderr
    return r.stdout


def _utc(text: str) -> datetime:
    return datetime.fromisoformat(text.replace("Z", "+00:00"))


def _minutes(a: str, b: str) -> int:
    return round((_utc(b) - _utc(a)).total_seconds() / 60.0)


def _span(m: int) -> str:
    return f"{m // 60} h {m % 60:02d} min" if m >= 60 else f"{m} min"


def _pdf_text(pdf: Path) -> str:
    text = subprocess.run(["pdftotext", str(pdf), "-"], capture_output=True, text=True,
                          check=True).stdout
    return re.sub(r"\s+", " ", text)


@pytest.fixture(scope="module")
def voyage(tmp_path_factory) -> dict:
    d = tmp_path_factory.mktemp("force")
    r = subprocess.run([sys.executable, "-m", "planner", "plan",
                        str(SAMPLE / "skarvik_to_tarrow.toml"), "--json"], cwd=ROOT,
                       capture_output=True, text=True, timeout=120)
    assert r.returncode == 0, r.stderr
    plan = d / "plan.json"
    plan.write_text(r.stdout, encoding="utf-8")
    doc = json.loads(r.stdout)
    shutil.copy(SAMPLE / "ship.toml", d / "ship.toml")
    r = run(None, "init", "--ship-file", str(d / "ship.toml"), "--tz", "-11:00")
    assert r.returncode == 0, r.stderr
    j = d / "kestrel_bay_journal.sqlite"
    rows = {(c["number"], c["circuit"]): c for c in doc["changeovers"]}
    force = next(c for c in doc["changeovers"] if c["boundary_event"] == "comes_into_force")
    depart = next(c for c in doc["changeovers"] if c["boundary_event"] == "departure")
    out = {"plan": plan, "doc": doc, "journal": j, "force": force, "depart": depart,
           "rows": rows, "dir": d}
    p = str(plan)
    n, c = str(force["number"]), force["circuit"]
    out["start"] = _ok(j, "start", "--from-plan", p, "--changeover", n, "--circuit", c,
                       "--as-planned", "--fuel", "mgo", "--from-fuel", "vlsfo")
    out["done"] = _ok(j, "complete", "--from-plan", p, "--changeover", n, "--circuit", c,
                      "--as-planned", "--tank", "mgo_service=21.5@34")
    return out


def test_the_sample_plan_has_the_events(voyage):
    doc = voyage["doc"]
    # areas_sample/skarvik_to_tarrow.toml: Tarrow Approaches ECA comes into force while inside
    (ev,) = [f for f in doc["force_events"] if f["event"] == "comes_into_force"]
    assert ev["area"] == voyage["force"]["area"] == "Tarrow Approaches ECA"
    assert voyage["force"]["boundary_utc"] == ev["time_utc"] == "2027-06-12T00:00:00Z"
    assert voyage["force"]["clock_deadline"] is True


def test_completion_is_said_against_the_area_coming_into_force(voyage):
    f = voyage["force"]
    m = _minutes(f["compliant_utc"], f["boundary_utc"])
    done = voyage["done"]
    assert (f"changeover to compliant fuel completed {_span(m)} before the area came into "
            "force") in done
    when = _utc(f["boundary_utc"]).strftime("%Y-%m-%d %H:%M") + "Z"
    where = format_position(f["boundary_lat"], f["boundary_lon"])
    assert f"Tarrow Approaches ECA came into force at {when}" in done
    assert f"the ship then at {where}" in done
    # the completion's own position is the plan's (compliant_lat/lon), not the boundary's
    assert format_position(f["compliant_lat"], f["compliant_lon"]) in done
    assert "before entry" not in done and "boundary entry" not in done
    assert "sooner than" not in done       # an as-planned completion is not "too soon"


def test_show_json_keeps_the_event(voyage):
    doc = json.loads(_ok(voyage["journal"], "show", "--json"))
    planned = [e["entry"]["record"]["planned"] for e in doc["entries"]
               if e["entry"]["kind"] == "changeover_completed"]
    assert planned[-1]["event"] == "comes_into_force"
    assert planned[-1]["clock_deadline"] is True


def test_printed_record_follows_the_facts(voyage, tmp_path):
    j = tmp_path / "j.sqlite"
    shutil.copy(voyage["journal"], j)
    f, dep = voyage["force"], voyage["depart"]
    p = str(voyage["plan"])
    # a completion 12 min after the area came into force (another circuit of changeover 3)
    other = next(c for (n, c) in voyage["rows"] if n == f["number"] and c != f["circuit"])
    late = voyage["rows"][(f["number"], other)]
    _ok(j, "start", "--from-plan", p, "--changeover", str(f["number"]), "--circuit", other,
        "--as-planned", "--fuel", "mgo")
    _ok(j, "complete", "--from-plan", p, "--changeover", str(f["number"]), "--circuit", other,
        "--at", "2027-06-12T00:12Z", "--as-planned", "--tank", "mgo_service=20@34")
    # changeover made alongside, completed as planned before departure
    _ok(j, "start", "--from-plan", p, "--changeover", str(dep["number"]), "--circuit",
        dep["circuit"], "--as-planned", "--fuel", "mgo")
    _ok(j, "complete", "--from-plan", p, "--changeover", str(dep["number"]), "--circuit",
        dep["circuit"], "--as-planned", "--tank", "mgo_service=25@34")
    pdf = tmp_path / "record.pdf"
    _ok(j, "print", "--pdf", str(pdf))
    text = _pdf_text(pdf)
    m = _minutes(f["compliant_utc"], f["boundary_utc"])
    assert f"Completed {_span(m)} before the area came into force" in text
    assert "Tarrow Approaches ECA came into force at 2027-06-12 00:00Z" in text
    assert f"the ship then at {format_position(f['boundary_lat'], f['boundary_lon'])}" in text
    assert _minutes(late["boundary_utc"], "2027-06-12T00:12:00Z") == 12
    assert "Completed 12 min after the area came into force" in text
    assert "completed 12 min after the area came into force (2027-06-12 00:00Z planned): " \
           "check the fuel at the inlets when the area came into force" in text
    md = _minutes(dep["compliant_utc"], dep["boundary_utc"])
    # the step cell wraps beside the date cell: pdftotext may put the date inside it
    assert re.search(r"Completed alongside " + _span(md).replace(" min", r" (\S+ )?min")
                     + " before departure", text), text
    when = _utc(dep["boundary_utc"]).strftime("%Y-%m-%d %H:%M") + "Z"
    assert f"Planned departure {when} from " in text
    assert f"completed alongside {_span(md)} before it" in text
    assert "to compliant fuel alongside before departure, inside Skarvik Basin ECA" in text
    assert "before Tarrow Approaches ECA came into force" in text
    assert "before entry" not in text.replace(
        "completed before entry into an emission control area", "")  # the subtitle's rule
    assert "before entering Tarrow" not in text


def test_a_bad_boundary_event_is_one_line(voyage, tmp_path):
    doc = json.loads(voyage["plan"].read_text())
    doc["changeovers"][0]["boundary_event"] = "arrival"
    bad = tmp_path / "bad.json"
    bad.write_text(json.dumps(doc))
    j = tmp_path / "j.sqlite"
    shutil.copy(voyage["journal"], j)
    before = j.read_bytes()
    one_line_exit_2(run(j, "start", "--from-plan", str(bad), "--changeover", "1",
                        "--as-planned", "--fuel", "mgo"),
                    "changeovers[0].boundary_event: 'arrival': expected one of enter")
    assert j.read_bytes() == before


def test_an_old_journal_still_reads_and_prints(tmp_path):
    j = tmp_path / "old.db"
    shutil.copy(ROOT / "tests" / "data" / "journal" / "schema2_journal.sqlite", j)
    assert sqlite3.connect(j).execute("PRAGMA user_version").fetchone()[0] == 2
    assert "chain intact" in _ok(j, "verify", "--hash",
                                 json.loads(_ok(j, "show", "--json"))["entries"][-1]["hash"])
    _ok(j, "print", "--pdf", str(tmp_path / "r.pdf"))
    text = _pdf_text(tmp_path / "r.pdf")
    assert "Fuel changeover record" in text
