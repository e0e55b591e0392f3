"""``--csv FOLDER`` on plan, route, flush and procedure: one table per file, units in the
headers, values as in the ``--json`` document, no cell a spreadsheet would run as a formula.

Read back with Python's csv module (RFC 4180 dialect); the formula rule is the common
practice against CSV injection (a cell starting with =, +, -, @ gets an apostrophe,
plain numbers stay numbers); bad input is one line, exit 2, nothing written.
"""

from __future__ import annotations

import csv
import json
import re
import shutil
from pathlib import Path

from tests.helpers.cli import changeover as run
from tests.helpers.paths import ROOT
from tests.helpers.terminal import position

SAMPLE = ROOT / "areas_sample"
ROUTE = ["route", "areas_sample/aldmere_to_skarvik.csv", "--depart", "2027-05-30T06:00+12:00"]
UNIT = re.compile(r"\((h|nm|t|kg|°|° '|kn|m³|m³/h|min|cSt|% m/m|% MCR|m³ at 15 °C|number|"
                  r"UTC, ISO 8601|ship's time, ISO 8601|fraction|t, by fuel|\+12:00|"
                  r"h after the switch)\)$")
WORDS = {"Area", "Circuit", "Direction", "From fuel", "To fuel", "Fuel", "Under", "Event",
         "In force", "Clock deadline", "Main driver", "Volume", "Kind", "Fed from",
         "Scrubber event", "Scrubber", "Mode", "Action", "Reason", "Circuits", "Fallback fuel",
         "Areas"}




def read(path: Path) -> list[dict]:
    with path.open(newline="", encoding="utf-8") as f:
        rows = list(csv.DictReader(f))
    with path.open(encoding="utf-8") as f:
        header = next(csv.reader(f))
    for h in header:  # every column names its unit, or is a word column
        assert h in WORDS or h.startswith("SO₂") or UNIT.search(h), (path.name, h)
    return rows


def test_plan_csv_matches_the_json(tmp_path):
    out = tmp_path / "plan_csv"
    r = run("plan", "areas_sample/voyage.toml", "--csv", str(out))
    assert r.returncode == 0, r.stderr
    doc = json.loads(run("plan", "areas_sample/voyage.toml", "--json").stdout)
    assert sorted(p.name for p in out.iterdir()) == [
        "changeovers.csv", "fuel_totals.csv", "so2.csv", "stretches.csv"]
    rows = read(out / "changeovers.csv")
    assert len(rows) == len(doc["changeovers"])
    for row, ch in zip(rows, doc["changeovers"], strict=True):
        assert int(row["Changeover (number)"]) == ch["number"]
        assert row["Start (UTC, ISO 8601)"] == ch["start_utc"]
        assert row["Boundary (UTC, ISO 8601)"] == ch["boundary_utc"]
        assert abs(float(row["Start latitude (°)"]) - ch["start_lat"]) < 5e-7
        assert row["Start position (° ')"] == position(ch["start_lat"], ch["start_lon"])
        assert abs(float(row["Takes (h)"]) - ch["duration_h"]) < 5e-4
    totals = read(out / "fuel_totals.csv")
    assert {t["Fuel"] for t in totals} == set(doc["fuel_totals"])
    assert f"wrote {out / 'changeovers.csv'}" in r.stdout


def test_route_csv_neutralises_formula_cells(tmp_path):
    areas = tmp_path / "areas"
    shutil.copytree(SAMPLE, areas, ignore=shutil.ignore_patterns("cautions", "*.toml", "*.csv"))
    f = areas / "corran_sea.geojson"
    f.write_text(f.read_text(encoding="utf-8").replace('"Corran Sea ECA"', '"=HYPERLINK(1)"'),
                 encoding="utf-8")
    out = tmp_path / "route_csv"
    r = run(*ROUTE, "--areas", str(areas), "--csv", str(out))
    assert r.returncode == 0, r.stderr
    rows = read(out / "crossings.csv")
    assert rows[0]["Area"] == "'=HYPERLINK(1)"
    assert rows[0]["Longitude (°)"] == "170.000000"
    lat = [float(x["Latitude (°)"]) for x in rows]  # southern: negative numbers, not quoted
    assert all(x < 0 for x in lat)
    assert read(out / "areas.csv")[0]["Inside (nm)"]


def test_flush_csv_back_on_regular(tmp_path):
    out = tmp_path / "flush_csv"
    r = run("flush", "areas_sample/voyage.toml", "--from", "mgo", "--to", "vlsfo", "--table",
            "--csv", str(out))
    assert r.returncode == 0, r.stderr
    rows = read(out / "circuits.csv")
    assert [x["Direction"] for x in rows] == ["to_regular", "to_regular"]
    for x in rows:
        assert float(x["Back on regular (h after the switch)"]) > 0
        assert x["Target reached (h after the switch)"] == ""
    assert read(out / "load_table.csv")


def test_procedure_csv(tmp_path):
    out = tmp_path / "proc_csv"
    r = run("procedure", "areas_sample/ship.toml", "--csv", str(out))
    assert r.returncode == 0, r.stderr
    doc = json.loads(run("procedure", "areas_sample/ship.toml", "--json").stdout)
    rows = read(out / "durations.csv")
    assert len(rows) == sum(len(c["rows"]) for c in doc["circuits"])
    assert len(read(out / "volumes.csv")) == sum(len(c["volumes"]) for c in doc["circuits"])


def test_csv_onto_a_file_is_bad_input_nothing_written(tmp_path):
    target = tmp_path / "a_file"
    target.write_text("x")
    pdf = tmp_path / "plan.pdf"
    r = run("plan", "areas_sample/voyage.toml", "--csv", str(target), "--pdf", str(pdf))
    assert r.returncode == 2
    lines = r.stderr.strip().splitlines()
    assert len(lines) == 1 and "--csv" in lines[0] and "folder" in lines[0]
    assert not pdf.exists() and target.read_text() == "x"


def test_plan_csv_scrubber_events(tmp_path):
    """The scrubber sample (areas_sample/egcs_voyage.toml, fictional): a scrubber_events
    and a scrubber_spans table, one row per row of the ``--json`` document, the events
    labelled S1, S2 ... in their order, positions in degrees and in degrees and minutes."""
    out = tmp_path / "egcs_csv"
    r = run("plan", "areas_sample/egcs_voyage.toml", "--csv", str(out))
    assert r.returncode == 0, r.stderr
    doc = json.loads(run("plan", "areas_sample/egcs_voyage.toml", "--json").stdout)
    events = read(out / "scrubber_events.csv")
    assert len(events) == len(doc["scrubber_events"]) >= 4
    for row, e in zip(events, doc["scrubber_events"], strict=True):
        assert row["Scrubber event"] == f"S{e['number']}"
        assert (row["Scrubber"], row["Kind"], row["Mode"]) == (e["scrubber"], e["event"],
                                                              e["mode"] or "")
        assert row["Time (UTC, ISO 8601)"] == e["utc"]
        assert row["Time (ship's time, ISO 8601)"] == e["ship_time"]
        assert abs(float(row["Latitude (°)"]) - e["lat"]) < 5e-7
        assert row["Position (° ')"] == position(e["lat"], e["lon"])
        assert row["Reason"] == e["reason"] and row["Action"]
    spans = read(out / "scrubber_spans.csv")
    assert len(spans) == len(doc["scrubber_spans"])
    for row, s in zip(spans, doc["scrubber_spans"], strict=True):
        assert row["Mode"] == s["mode"] and row["Fallback fuel"] == s["fallback_fuel"]
        assert abs(float(row["Duration (h)"]) - s["duration_h"]) < 5e-4
    assert f"wrote {out / 'scrubber_events.csv'}" in r.stdout


def test_scrubber_csv_neutralises_formula_cells():
    """A reason or a scrubber name that a spreadsheet would read as a formula is written as
    text (common practice: a leading apostrophe)."""
    from planner.cli.csv_tables import scrubber_csv
    from planner.common.csv_cells import csv_text

    e = {"number": 1, "scrubber": "=EGCS", "event": "start", "mode": "open",
         "utc": "2027-05-30T00:00:00Z", "ship_time": "2027-05-30T12:00+12:00", "lat": -39.5,
         "lon": 170.0, "distance_nm": 1.0, "reason": "+1 cmd"}
    [t] = scrubber_csv({"scrubber_events": [e]})
    text = csv_text(t.header, t.rows)
    assert "'=EGCS" in text and "'+1 cmd" in text
    assert scrubber_csv({}) == [] == scrubber_csv({"scrubber_events": [], "scrubbers": []})
