"""The scrubber-trip tables and JSON: never a cut value, 80 columns, the keys.

The hand-made span of ``tests.helpers.trip`` (sample voyage, fictional). Every boundary
row's time (UTC, to the minute), ship's time and position (degrees and minutes to 0.1')
of the JSON must appear whole on one line of the text, written out by the independent
formatters of ``tests/helpers/terminal.py``; no line is wider than the width or ends in
spaces.
"""

from __future__ import annotations

import json

import pytest

from tests.helpers.terminal import moment, position, utc_full
from tests.helpers.trip import sample_trip

BOUNDARY_KEYS = {"area", "circuit", "utc", "ship_time", "lat", "lon", "distance_nm",
                 "time_to_compliant_h", "out_of_compliance_h"}


def test_json_keys_and_round_trip():
    _, span, leads, doc = sample_trip()
    back = json.loads(json.dumps(doc))
    assert back == doc
    trip = doc["scrubber_trip"]
    assert set(trip) >= {"boundaries", "samples", "spans", "step_h"}
    assert len(trip["boundaries"]) == 2  # the entry, for main and boiler
    for r in trip["boundaries"]:
        assert set(r) >= BOUNDARY_KEYS
        assert r["area"] == "Meridian Reach ECA" and r["event"] == "enter"
        assert r["out_of_compliance_h"] == pytest.approx(r["time_to_compliant_h"], abs=1e-6)
    assert len(trip["samples"]) == len(leads.samples)
    assert {s["kind"] for s in trip["samples"]} >= {"start", "end", "boundary", "step"}
    assert trip["spans"][0]["circuits"] == list(span.circuits)


@pytest.mark.parametrize("width", [80, 120, 160])
def test_tables_fit_and_never_cut(width):
    from planner.cli.trip_print import trip_lines

    _, _, _, doc = sample_trip()
    lines = trip_lines(doc, width)
    text = "\n".join(lines)
    for line in lines:
        assert line == line.rstrip()
        assert len(line) <= width, line
        assert "…" not in line
    for r in doc["scrubber_trip"]["boundaries"]:
        assert any(utc_full(r["utc"]) in line for line in lines)
        ship = moment(r["ship_time"])
        assert any(f"{ship.strftime('%Y-%m-%d %H:%M')} ({r['ship_time'][-6:]})" in line
                   for line in lines)
        assert any(position(r["lat"], r["lon"]) in line for line in lines)
        h = r["time_to_compliant_h"]
        assert any(f"{h:.2f} h ({h * 60:.0f} min)" in line for line in lines)
    assert "Advisory only" in text


def test_no_boundary_says_so():
    from planner.cli.trip_print import trip_lines

    doc = {"scrubber_trip": {"step_h": 0.25, "spans": [], "boundaries": [], "samples": []}}
    text = "\n".join(trip_lines(doc, 80))
    assert "No control-area boundary is passed on a scrubber." in text


def test_readme_example_is_the_egcs_sample_at_100_columns():
    """README's "If the scrubber fails" example is what ``changeover plan
    areas_sample/egcs_voyage.toml`` prints at 100 columns (the scrubber sample, fictional),
    up to the "..." where it stops."""
    from planner.cli.trip_print import trip_lines
    from planner.voyage.report import plan_json
    from planner.voyage.run import build_plan
    from planner.voyage.scrubber_trip import plan_trip_leads
    from planner.voyage.scrubber_trip_json import trip_json
    from tests.helpers.paths import ROOT

    readme = (ROOT / "README.md").read_text(encoding="utf-8")
    marker = "$ changeover plan areas_sample/egcs_voyage.toml      # at 100 columns\n...\n"
    assert marker in readme
    excerpt = readme.split(marker, 1)[1].split("\n...", 1)[0]
    assert excerpt.startswith("If the scrubber fails at a boundary")
    plan = build_plan(ROOT / "areas_sample" / "egcs_voyage.toml")
    doc = plan_json(plan)
    doc.update(trip_json(plan, plan_trip_leads(plan)))
    assert excerpt in "\n".join(trip_lines(doc, 100))
    assert all(len(line) <= 100 for line in excerpt.splitlines())
