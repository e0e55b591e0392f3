"""``changeover log scrubber``: the scrubber's name is checked against the ship file's.

A journal set up with ``log init --ship-file`` from the scrubber sample ship
(``areas_sample/ship_egcs.toml``, the fictional MV Gannet Shoal, whose one scrubber is
``egcs``) knows its scrubbers as it knows its circuits: a scrubber entry (or a correction)
naming another is refused with one line, exit 2, the journal's bytes unchanged. A journal
set up without a ship file, or from a ship file without scrubbers, or before the journal
took the scrubbers' names (its set-up entry then has no ``scrubbers`` key), takes any name
as before.
"""

from __future__ import annotations

import json
from pathlib import Path

import pytest

from planner.journal.codec import encode
from planner.journal.details import SetupDetails
from tests.cli.test_log import one_line_exit_2, run
from tests.helpers.paths import ROOT

SHIP = ROOT / "areas_sample" / "ship_egcs.toml"
READING = ("scrubber", "ratio-reading", "--so2-ppm", "18.2", "--co2-pct", "5.1",
           "--limit-pct", "0.10", "--pos", "-39.85, 169.6", "--at", "2026-12-01T10:00Z",
           "--confirm")


def ok(journal: Path, *args: str) -> str:
    r = run(journal, *args)
    assert r.returncode == 0, r.stderr
    return r.stdout


@pytest.fixture()
def gannet(tmp_path) -> Path:
    j = tmp_path / "gannet.db"
    ok(j, "init", "--ship-file", str(SHIP), "--tz", "+12:00", "--journal", str(j))
    return j


def test_a_scrubber_the_ship_file_lacks_is_refused_and_nothing_written(gannet):
    before = gannet.read_bytes()
    r = run(gannet, *READING, "--scrubber", "egsc")
    one_line_exit_2(r, "--scrubber: 'egsc': expected one of the ship's scrubbers: egcs")
    assert gannet.read_bytes() == before
    for event in (("start", "--mode", "open"), ("stop",), ("failure",)):
        r = run(gannet, "scrubber", *event, "--scrubber", "EGCS 1", "--pos", "-39.85, 169.6",
                "--at", "2026-12-01T10:00Z", "--confirm")
        one_line_exit_2(r, "expected one of the ship's scrubbers: egcs")
    assert gannet.read_bytes() == before


def test_the_ship_files_scrubber_is_taken_and_a_correction_to_a_wrong_one_refused(gannet):
    out = ok(gannet, *READING, "--scrubber", "egcs")
    assert "SO₂/CO₂ reading: egcs" in out
    seq = json.loads(ok(gannet, "show", "--json"))["entries"][-1]["seq"]
    before = gannet.read_bytes()
    r = run(gannet, "correct", str(seq), "--scrubber", "egsc", "--reason", "typo")
    one_line_exit_2(r, "expected one of the ship's scrubbers: egcs")
    assert gannet.read_bytes() == before


def test_the_set_up_entry_keeps_the_scrubbers(tmp_path):
    j = tmp_path / "j.db"
    out = ok(j, "init", "--ship-file", str(SHIP), "--tz", "+12:00", "--journal", str(j))
    assert "  scrubbers: egcs" in out.splitlines()
    doc = json.loads(ok(j, "show", "--json"))
    setup = doc["entries"][0]["entry"]["record"]["details"]
    assert setup["scrubbers"] == ["egcs"] and setup["circuits"] == ["main", "boiler"]


@pytest.mark.parametrize("init", [
    ("--ship", "MV Aurora Tern", "--imo", "1234567"),          # no ship file
    ("--ship-file", str(ROOT / "areas_sample" / "ship.toml")),  # a ship file, no scrubbers
])
def test_a_journal_that_knows_no_scrubber_takes_any_name(tmp_path, init):
    j = tmp_path / "j.db"
    ok(j, "init", *init, "--tz", "+12:00", "--journal", str(j))
    assert "SO₂/CO₂ reading: EGCS 1" in ok(j, *READING, "--scrubber", "EGCS 1")


def test_an_older_set_up_without_scrubbers_reads_and_encodes_as_written():
    old = SetupDetails("MV Gannet Shoal", "9998884", ("hsfo_service",), circuits=("main",),
                       source="ship_egcs.toml")
    assert "scrubbers" not in encode(old)  # stored as before the field existed: same hash
    new = SetupDetails("MV Gannet Shoal", "9998884", ("hsfo_service",), circuits=("main",),
                       source="ship_egcs.toml", scrubbers=("egcs",))
    assert encode(new)["scrubbers"] == ["egcs"]
    with pytest.raises(ValueError, match="scrubbers"):
        SetupDetails("x", None, scrubbers=["egcs"])  # type: ignore[arg-type]


def test_scrubbers_the_plan_relies_on_together_are_taken_by_their_joint_name(tmp_path):
    """A plan relying on two scrubbers serving one circuit names its events ``"a + b"``
    (planner.voyage.scrubbing.joint_scrubber); each part must be a scrubber of the ship."""
    text = SHIP.read_text(encoding="utf-8")
    one = 'consumers = ["main_engine", "dg1", "dg2"]\nmode = "hybrid"'
    assert text.count(one) == 1
    ship = tmp_path / "two.toml"
    ship.write_text(text.replace(one, 'consumers = ["main_engine"]\nmode = "hybrid"') +
                    '\n[scrubbers.egcs2]\nconsumers = ["dg1", "dg2"]\nmode = "hybrid"\n'
                    'max_sulphur_pct = 3.50\n', encoding="utf-8")
    j = tmp_path / "j.db"
    assert "  scrubbers: egcs, egcs2" in ok(j, "init", "--ship-file", str(ship), "--tz",
                                             "+12:00", "--journal", str(j)).splitlines()
    plan = tmp_path / "plan.json"
    plan.write_text(json.dumps({"scrubber_events": [{
        "number": 1, "scrubber": "egcs + egcs2", "event": "start", "mode": "open",
        "utc": "2027-05-29T21:20:33Z", "ship_time": "2027-05-30T09:20+12:00", "lat": -39.7,
        "lon": 167.0, "distance_nm": 60.0, "reason": "at the valve switch to hsfo"}]}),
        encoding="utf-8")
    out = ok(j, "scrubber", "start", "--from-plan", str(plan), "--event", "1", "--as-planned",
             "--confirm")
    assert "scrubber started: egcs + egcs2" in out
    for wrong in ("egcs + egsc2", "egcs +", "egcs2 + dg1"):
        one_line_exit_2(run(j, *READING, "--scrubber", wrong),
                        "expected one of the ship's scrubbers: egcs, egcs2")
