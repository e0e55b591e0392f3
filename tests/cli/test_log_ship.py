"""``changeover log`` with the ship file and the checks at entry (issue 11 items 4-7).

- ``log init --ship-file``: particulars, tanks with capacities, circuits and fuels from the
  sample ship file (``areas_sample/ship.toml``, the fictional MV Kestrel Bay);
- ``log fuel``: the bunker delivery note items of MARPOL Annex VI regulation 18 and
  Appendix V [MARPOL-VI] (from memory), shown and printed (read back with pdftotext);
- ``--circuit`` repeated or ``all``: one entry per circuit, in one transaction;
- checks at entry: a sounding above the tank's capacity is refused; a completion sooner
  than the modelled flush, an area not in the linked plan and a time more than an hour
  ahead need ``--confirm``, and the warning stays in the entry.
"""

from __future__ import annotations

import json
import re
import shutil
import subprocess
from datetime import UTC, datetime, timedelta
from pathlib import Path

import pytest

from tests.cli.test_log import one_line_exit_2, run
from tests.helpers.paths import ROOT

SHIP = ROOT / "areas_sample" / "ship.toml"


def plan_file(folder: Path) -> Path:
    """A plan in the JSON contract's shape: changeover 1 for two circuits, to the Corran Sea
    ECA; the main circuit's modelled flush is 04:47:34Z to 06:20:31Z = 1 h 32 min 57 s."""
    rows = [{"number": 1, "area": "Corran Sea ECA", "circuit": c, "direction": "to_compliant",
             "start_utc": start, "start_lat": -39.8238, "start_lon": 169.2340,
             "compliant_utc": "2027-05-30T06:20:31Z", "boundary_utc": "2027-05-30T07:20:31Z",
             "boundary_lat": -39.9, "boundary_lon": 170.0, "margin_h": 1.0}
            for c, start in (("main", "2027-05-30T04:47:34Z"),
                             ("boiler", "2027-05-30T05:57:05Z"))]
    path = folder / "plan.json"
    path.write_text(json.dumps({"changeovers": rows}), encoding="utf-8")
    return path


@pytest.fixture()
def kestrel(tmp_path) -> dict:
    ship = tmp_path / "ship.toml"
    shutil.copy(SHIP, ship)
    r = run(None, "init", "--ship-file", str(ship), "--tz", "+12:00")
    assert r.returncode == 0, r.stderr
    return {"journal": tmp_path / "kestrel_bay_journal.sqlite", "ship": ship,
            "plan": plan_file(tmp_path), "init": r.stdout, "dir": tmp_path}


def ok(journal: Path, *args: str, confirm: bool = True) -> str:
    r = run(journal, *args, confirm=confirm)
    assert r.returncode == 0, r.stderr
    return r.stdout


def test_init_takes_the_ship_file(kestrel):
    out = kestrel["init"]
    # the values of areas_sample/ship.toml, as written there
    for needle in ("ship MV Kestrel Bay, IMO 9999993", "read from the ship file ship.toml",
                   "tank known: mgo_service (capacity 30 m³)",
                   "tank known: mgo_storage (capacity 120 m³)",
                   "tank known: vlsfo_service (capacity 45 m³)", "circuits: main, boiler",
                   "fuel: mgo (DMA), 0.08 % m/m S", "fuel: vlsfo (RMG 380), 0.45 % m/m S"):
        assert needle in out, needle
    assert kestrel["journal"].exists()  # named by the ship file's [ship] journal key
    doc = json.loads(ok(kestrel["journal"], "show", "--json"))
    assert [e["entry"]["kind"] for e in doc["entries"]] == ["setup", "fuel", "fuel"]
    assert doc["ship"] == {"name": "MV Kestrel Bay", "imo": "9999993"}


@pytest.mark.parametrize(("target", "needle"), [
    ("none.toml", "expected an existing ship file"),
    (".", "expected a ship file (TOML), not a folder"),
])
def test_init_refuses_a_bad_ship_file_and_writes_nothing(tmp_path, target, needle):
    r = run(tmp_path / "j.db", "init", "--ship-file", str(tmp_path / target), "--tz", "Z")
    one_line_exit_2(r, needle)
    assert list(tmp_path.iterdir()) == []


def test_a_sounding_above_capacity_is_refused(kestrel):
    j = kestrel["journal"]
    before = j.read_bytes()
    r = run(j, "tanks", "--fuel", "mgo", "--tank", "mgo_service=30.5@30", "--at",
            "2027-05-30T04:00Z")
    one_line_exit_2(r, "--tank: mgo_service: '30.5 m³': expected at most the tank's capacity, "
                       "30 m³ (from the ship file)")
    assert j.read_bytes() == before
    assert "30.000 m³" in ok(j, "tanks", "--fuel", "mgo", "--tank", "mgo_service=30@30",
                             "--at", "2027-05-30T04:00Z")


def test_fuel_records_the_delivery_note_items(kestrel, tmp_path):
    j = kestrel["journal"]
    out = ok(j, "fuel", "lsmgo", "--grade", "DMA", "--sulphur", "0.09", "--density", "852.4",
             "--bdn", "AP-2027-0528-07", "--port", "Port Aldmere", "--bunkered", "2027-05-28",
             "--supplier", "Aldmere Marine Fuels Ltd", "--product", "Marine gas oil",
             "--quantity", "212.5", "--declaration", "--sample-seal", "MS-448812")
    items = ("bunkered at Port Aldmere on 2027-05-28", "supplier Aldmere Marine Fuels Ltd",
             "product Marine gas oil", "quantity 212.500 t", "supplier's declaration signed",
             "MARPOL sample seal MS-448812")
    for needle in items:
        assert needle in out, needle
    ok(j, "start", "--voyage", "KB27-06", "--at", "2027-05-30T04:45Z", "--pos",
       "39 49.4 S 169 14.0 E", "--area", "Corran Sea ECA", "--circuit", "main", "--fuel",
       "lsmgo", "--from-fuel", "vlsfo")
    pdf = tmp_path / "record.pdf"
    ok(j, "print", "--pdf", str(pdf))
    flat = re.sub(r"\s+", " ", subprocess.run(["pdftotext", str(pdf), "-"], check=True,
                                              capture_output=True, text=True).stdout)
    assert "lsmgo, delivery note AP-2027-0528-07: " + "; ".join(items) + "." in flat
    one_line_exit_2(run(j, "fuel", "x", "--sulphur", "0.09", "--density", "852", "--bdn", "B",
                        "--bunkered", "28/05/2027"), "--bunkered: '28/05/2027': expected a date")


def test_one_command_for_several_circuits(kestrel, tmp_path):
    j, plan = kestrel["journal"], kestrel["plan"]
    out = ok(j, "start", "--voyage", "KB27-06", "--from-plan", str(plan), "--changeover", "1",
             "--circuit", "all", "--as-planned", "--fuel", "mgo", "--from-fuel", "vlsfo")
    assert "entry 4 written" in out and "entry 5 written" in out
    doc = json.loads(ok(j, "show", "--json", "--kind", "start"))
    recs = [e["entry"]["record"] for e in doc["entries"]]
    assert [r["circuit"] for r in recs] == ["main", "boiler"]
    # each takes its own circuit's planned start (04:47:34Z and 05:57:05Z, to the minute)
    assert [r["time_utc"] for r in recs] == ["2027-05-30T04:48:00Z", "2027-05-30T05:57:00Z"]
    ok(j, "complete", "--at", "2027-05-30T06:25Z", "--pos", "39 53.0 S 169 58.0 E",
       "--circuit", "main", "--circuit", "boiler", "--tank", "mgo_service=24.6@30")
    listing = ok(j, "show")
    assert listing.count("circuit main") == 2 and listing.count("circuit boiler") == 2
    doc = json.loads(ok(j, "show", "--json", "--kind", "complete"))
    assert [e["entry"]["record"]["details"]["follows"] for e in doc["entries"]] == [4, 5]
    one_line_exit_2(run(j, "complete", "--at", "2027-05-30T06:30Z", "--pos", "1 1",
                        "--circuit", "aux", "--area", "Corran Sea ECA", "--fuel", "mgo",
                        "--tank", "mgo_service=20@30"),
                    "--circuit: 'aux': expected one of the ship's circuits: main, boiler")


def test_warnings_at_entry_need_confirm_and_are_kept(kestrel, tmp_path):
    j, plan = kestrel["journal"], kestrel["plan"]
    ok(j, "start", "--voyage", "KB27-06", "--from-plan", str(plan), "--changeover", "1",
       "--circuit", "main", "--at", "2027-05-30T04:45Z", "--pos", "39 49.4 S 169 14.0 E",
       "--fuel", "mgo", "--from-fuel", "vlsfo")
    done = ["complete", "--from-plan", str(plan), "--changeover", "1", "--circuit", "main",
            "--at", "2027-05-30T05:30Z", "--pos", "39 52.0 S 169 40.0 E",
            "--tank", "mgo_service=24.6@30"]
    before = j.read_bytes()
    # 05:30Z - 04:45Z = 45 min; the plan models 04:47:34Z to 06:20:31Z = 1 h 33 min (to
    # the minute)
    one_line_exit_2(run(j, *done, confirm=False),
                    "completed 45 min after its start (entry 4), sooner than the "
                    "1 h 33 min the plan (plan.json) models until compliant")
    assert j.read_bytes() == before
    out = ok(j, *done, confirm=True)
    assert "warning confirmed (--confirm): completed 45 min after its start" in out
    doc = json.loads(ok(j, "show", "--json", "--kind", "complete"))
    kept = doc["entries"][0]["entry"]["record"]["confirmed"]
    assert any(w.startswith("completed 45 min") for w in kept)
    pdf = tmp_path / "r.pdf"
    ok(j, "print", "--pdf", str(pdf))
    flat = re.sub(r"\s+", " ", subprocess.run(["pdftotext", str(pdf), "-"], check=True,
                                              capture_output=True, text=True).stdout)
    assert "entry 5, confirmed when written: completed 45 min after its start" in flat
    # an area the linked plan does not name
    one_line_exit_2(run(j, "start", "--from-plan", str(plan), "--changeover", "1",
                        "--circuit", "boiler", "--area", "Coran Sea ECA", "--as-planned",
                        "--fuel", "mgo", confirm=False),
                    "the area 'Coran Sea ECA' is not in the linked plan (Corran Sea ECA)")


@pytest.mark.parametrize(("ahead_min", "refused"), [(90, True), (30, False)])
def test_a_time_more_than_an_hour_ahead_needs_confirm(kestrel, ahead_min, refused):
    j = kestrel["journal"]
    at = (datetime.now(UTC) + timedelta(minutes=ahead_min)).strftime("%Y-%m-%dT%H:%MZ")
    r = run(j, "note", "bunkering planned", "--at", at, confirm=False)
    if refused:
        one_line_exit_2(r, f"--confirm: 'the time {at[:10]} {at[11:16]}Z is 1 h ")
        assert re.search(r"is 1 h (29|30) min after now", r.stderr)
    else:
        assert r.returncode == 0, r.stderr
