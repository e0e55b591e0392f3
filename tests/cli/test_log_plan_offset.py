"""An entry whose time is taken from the plan takes the plan's ship's time offset then.

The scrubber sample voyage (``areas_sample/egcs_voyage.toml``, fictional) departs on
ship's time +12:00 and puts the clocks back to -11:00 at 2027-06-01 12:00Z after crossing
180° (its ``[[voyage.zone_change]]``). The plan's scrubber event 6 (the stop, 06:25:30Z on
2027-06-02) is ``2027-06-01T19:25-11:00`` in its ``ship_time``, and changeover 7 starts at
03:35:39Z, ``2027-06-01T16:35-11:00``. A journal set up at +12:00 must record those entries
at -11:00, the offset in force at that moment of the plan, not at its own last offset;
``--tz`` or an offset written on ``--at`` still rules. The times are taken to the nearest
minute (README, "Recording changeovers"): 06:25:30Z is written 06:26Z.
"""

from __future__ import annotations

import json
import shutil
from pathlib import Path

import pytest

from tests.cli.test_log import one_line_exit_2, run
from tests.cli.test_scrubber_load_journal import run as run_in
from tests.helpers.paths import ROOT

WEST_MIN = -11 * 60   # the sample voyage's ship's time after the date line, minutes
EAST_MIN = 12 * 60    # before it


@pytest.fixture(scope="module")
def plan(tmp_path_factory) -> Path:
    d = tmp_path_factory.mktemp("plan_offset")
    shutil.copytree(ROOT / "areas_sample", d, dirs_exist_ok=True)
    r = run_in(d, "plan", "egcs_voyage.toml", "--json")
    assert r.returncode == 0, r.stderr
    path = d / "plan.json"
    path.write_text(r.stdout, encoding="utf-8")
    doc = json.loads(r.stdout)
    [stop] = [e for e in doc["scrubber_events"] if e["number"] == 6]
    assert (stop["event"], stop["ship_time"]) == ("stop", "2027-06-01T19:25-11:00")
    [start] = [c for c in doc["changeovers"] if c["number"] == 7 and c["circuit"] == "main"]
    assert start["start_ship_time"] == "2027-06-01T16:35-11:00"
    return path


@pytest.fixture()
def journal(tmp_path) -> Path:
    j = tmp_path / "gannet.db"
    r = run(j, "init", "--ship-file", str(ROOT / "areas_sample" / "ship_egcs.toml"),
            "--tz", "+12:00", "--journal", str(j))
    assert r.returncode == 0, r.stderr
    return j


def ok(journal: Path, *args: str) -> str:
    r = run(journal, *args, "--confirm")
    assert r.returncode == 0, r.stderr
    return r.stdout


def last_record(journal: Path) -> dict:
    r = run(journal, "show", "--json")
    assert r.returncode == 0, r.stderr
    return json.loads(r.stdout)["entries"][-1]["entry"]["record"]


def test_a_scrubber_event_from_the_plan_takes_the_plans_offset(journal, plan):
    out = ok(journal, "scrubber", "stop", "--from-plan", str(plan), "--event", "6",
             "--as-planned")
    assert "2027-06-02 06:26Z (ship's time 2027-06-01 19:26 (-11:00))" in out
    r = last_record(journal)
    assert (r["time_utc"], r["ship_offset_min"]) == ("2027-06-02T06:26:00Z", WEST_MIN)
    # the next event of the plan before the date line is back at +12:00, whatever the last was
    ok(journal, "scrubber", "start", "--from-plan", str(plan), "--event", "1", "--as-planned")
    assert last_record(journal)["ship_offset_min"] == EAST_MIN


def test_a_changeover_step_from_the_plan_takes_the_plans_offset(journal, plan):
    out = ok(journal, "start", "--from-plan", str(plan), "--changeover", "7", "--circuit",
             "main", "--as-planned", "--fuel", "mgo", "--from-fuel", "vlsfo")
    assert "(ship's time 2027-06-01 16:36 (-11:00))" in out
    assert last_record(journal)["ship_offset_min"] == WEST_MIN
    ok(journal, "complete", "--from-plan", str(plan), "--changeover", "7", "--circuit", "main",
       "--as-planned", "--tank", "mgo_service=20@30")
    r = last_record(journal)
    assert (r["time_utc"], r["ship_offset_min"]) == ("2027-06-02T06:26:00Z", WEST_MIN)


def test_tz_or_an_offset_on_at_still_rules(journal, plan):
    ok(journal, "scrubber", "stop", "--from-plan", str(plan), "--event", "6", "--as-planned",
       "--tz", "+12:00")
    assert last_record(journal)["ship_offset_min"] == EAST_MIN
    ok(journal, "scrubber", "stop", "--from-plan", str(plan), "--event", "6",
       "--at", "2027-06-02T07:00+12:00", "--pos", "-38.6, -169.25")
    r = last_record(journal)
    assert (r["time_utc"], r["ship_offset_min"]) == ("2027-06-01T19:00:00Z", EAST_MIN)
    # a time typed in UTC is not the plan's: the journal's last offset, as before
    ok(journal, "start", "--from-plan", str(plan), "--changeover", "7", "--circuit", "main",
       "--at", "2027-06-02T03:40Z", "--pos", "-38.65, -169.97", "--fuel", "mgo")
    assert last_record(journal)["ship_offset_min"] == EAST_MIN


def _edited(plan: Path, tmp_path: Path, change) -> Path:
    doc = json.loads(plan.read_text(encoding="utf-8"))
    change(doc)
    out = tmp_path / "edited.json"
    out.write_text(json.dumps(doc), encoding="utf-8")
    return out


def test_a_plan_without_ship_time_leaves_the_journals_offset(journal, plan, tmp_path):
    def strip(doc: dict) -> None:
        for e in doc["scrubber_events"]:
            del e["ship_time"]
        for c in doc["changeovers"]:
            del c["start_ship_time"]
    old = _edited(plan, tmp_path, strip)
    ok(journal, "scrubber", "stop", "--from-plan", str(old), "--event", "6", "--as-planned")
    assert last_record(journal)["ship_offset_min"] == EAST_MIN
    ok(journal, "start", "--from-plan", str(old), "--changeover", "7", "--circuit", "main",
       "--as-planned", "--fuel", "mgo")
    assert last_record(journal)["ship_offset_min"] == EAST_MIN


@pytest.mark.parametrize("bad", ["2027-06-01T19:25", "19:25-11:00 tomorrow",
                                 "2027-06-01T19:25-11:10", "2027-06-01T19:25+15:00", 5])
def test_a_plans_bad_ship_time_is_one_line(journal, plan, tmp_path, bad):
    def spoil(doc: dict) -> None:
        for e in doc["scrubber_events"]:
            e["ship_time"] = bad
        for c in doc["changeovers"]:
            c["start_ship_time"] = bad
    spoilt = _edited(plan, tmp_path, spoil)
    before = journal.read_bytes()
    one_line_exit_2(run(journal, "scrubber", "stop", "--from-plan", str(spoilt), "--event", "6",
                        "--as-planned", "--confirm"), "scrubber_events[5].ship_time")
    one_line_exit_2(run(journal, "start", "--from-plan", str(spoilt), "--changeover", "7",
                        "--circuit", "main", "--as-planned", "--fuel", "mgo", "--confirm"),
                    ".start_ship_time")
    assert journal.read_bytes() == before
