"""Item: an area that comes into force while the ship is inside it is its own event.

Fixtures (fictional, ``tests/data/voyages``): ``future_inside`` crosses 5°E at 23:40Z on
2030-06-30, inside the Future Five ECA (in force from 2030-07-01, 00:00 UTC by the
planner's stated convention) when it takes effect; ``future_after`` crosses 5°E after
the date. The clock time and the place follow by hand: 10 h × 12 kn = 120 nm east of
the departure at 2°E along 50°N (the parallel arc on the ellipsoid, [WGS84] [D]).
The limit applies from the date in force ([MARPOL-VI] regulation 14 [P]), wherever the
ship then is: a deadline on the clock, with no arrival-time uncertainty.
"""

from __future__ import annotations

import math
import shutil

import pytest

from planner.voyage.confidence import add_uncertainty
from planner.voyage.report import plan_json
from planner.voyage.run import build_plan
from tests.helpers.plan import NM_M, VOYAGES, parallel_m, plan_doc

Z99 = 2.3263478740408408  # standard normal quantile at 0.99 (tables; scipy.stats.norm.ppf)


def test_the_route_check_has_the_event_and_keeps_the_crossing():
    plan, doc = plan_doc("future_inside")
    (ev,) = doc["force_events"]
    assert (ev["area"], ev["event"], ev["time_utc"]) == (
        "Future Five ECA", "comes_into_force", "2030-07-01T00:00:00Z")
    assert ev["distance_nm"] == pytest.approx(120.0, abs=1e-6)
    lon = 2.0 + math.degrees(120.0 * NM_M / (parallel_m(0.0, 1.0) / math.radians(1.0)))
    assert ev["lon"] == pytest.approx(lon, abs=1e-7) and ev["lat"] == pytest.approx(50.0)
    assert ev["leg"] == 1 and ev["limit_after_pct"] == 0.1
    # the boundary crossing before the date stays a crossing, not in force
    (cr,) = plan.check.crossings
    assert (cr.crossing.event, cr.in_force) == ("enter", False)


def test_the_changeover_is_for_the_event_not_an_entry():
    _, doc = plan_doc("future_inside")
    (row,) = doc["changeovers"]
    assert row["boundary_event"] == "comes_into_force" and row["clock_deadline"] is True
    assert row["boundary_utc"] == "2030-07-01T00:00:00Z"
    _, after = plan_doc("future_after")
    (row,) = after["changeovers"]
    assert row["boundary_event"] == "enter" and row["clock_deadline"] is False
    assert after["force_events"] == []  # outside the area at midnight


def test_route_json_and_geojson_carry_the_event():
    from planner.voyage.report import plan_geojson

    plan, _ = plan_doc("future_inside")
    kinds = [f["properties"]["kind"] for f in plan_geojson(plan)["features"]]
    assert kinds.count("force_event") == 1


def _spread_only_in_timing(tmp_path, name: str):
    """The voyage with every spread zero but ±15 min on the boundary time."""
    for f in VOYAGES.iterdir():
        if f.suffix in (".csv", ".geojson") or f.name.startswith("ship_"):
            shutil.copy(f, tmp_path / f.name)
    text = (VOYAGES / f"{name}.toml").read_text() + (
        "\n[uncertainty]\nvolumes_pct = 0.0\ntanks_pct = 0.0\nconsumption_pct = 0.0\n"
        "mixing_stagnant = 0.0\nmixing_bypass = 0.0\nsulphur_sd_pct = 0.0\n"
        "boundary_time_min = 15.0\n")
    p = tmp_path / f"{name}.toml"
    p.write_text(text)
    plan = build_plan(p)
    doc = plan_json(plan)
    add_uncertainty(plan, doc, 0.99, 2000, 0)
    return doc["changeovers"][0]


def test_no_arrival_time_uncertainty_on_a_clock_deadline(tmp_path):
    # only the boundary timing is uncertain (± 15 min, a 95 % range: sd = 15/1.96 min).
    # Crossing a boundary: the lead at 99 % is the P50 lead + z₀.₉₉·sd (normal quantile);
    # an area's date: no spread at all, the lead is the flush itself.
    row = _spread_only_in_timing(tmp_path, "future_inside")
    assert row["lead_confidence_h"] == pytest.approx(row["lead_p50_h"], abs=1e-9)
    (tmp_path / "b").mkdir()
    cross = _spread_only_in_timing(tmp_path / "b", "future_after")
    sd_h = 15.0 / 1.96 / 60.0
    assert cross["lead_confidence_h"] - cross["lead_p50_h"] == pytest.approx(Z99 * sd_h,
                                                                             rel=0.1)


def _copy(tmp_path):
    for f in VOYAGES.iterdir():
        if f.suffix in (".csv", ".geojson") or f.name.startswith("ship_"):
            shutil.copy(f, tmp_path / f.name)


def test_an_area_ceasing_while_inside_is_its_own_event(tmp_path):
    # closed_form's area (5°E-10°E, in force from 2020) made to cease at the end of
    # 2030-03-10 (effective_until = 2030-03-10: in force to 24:00 UTC); the ship enters at
    # 5°E on 2030-03-10 and is still inside at midnight: the switch back is commenced at
    # 00:00 UTC on 2030-03-11, on the clock, where she then is
    _copy(tmp_path)
    area = (VOYAGES / "meridian_5e.geojson").read_text()
    assert '"effective_from": "2020-01-01"' in area
    (tmp_path / "meridian_5e.geojson").write_text(area.replace(
        '"effective_from": "2020-01-01"',
        '"effective_from": "2020-01-01", "effective_until": "2030-03-10"'))
    route = "name,lat,lon,leg,speed_kn\nWest Point,50.0,2.0,,\nDeep Point,50.0,9.0,rhumb,12.0\n"
    (tmp_path / "parallel_east.csv").write_text(route)
    text = (VOYAGES / "closed_form.toml").read_text().replace(
        'depart = "2030-03-10T06:00Z"', 'depart = "2030-03-10T14:00Z"')
    (tmp_path / "v.toml").write_text(text)
    _, doc = plan_doc(tmp_path / "v.toml")
    (ev,) = doc["force_events"]
    assert (ev["event"], ev["time_utc"]) == ("ceases", "2030-03-11T00:00:00Z")
    # 10 h × 12 kn = 120 nm from 2°E
    assert ev["distance_nm"] == pytest.approx(120.0, abs=1e-6)
    assert ev["limit_after_pct"] == 0.5
    back = [r for r in doc["changeovers"] if r["direction"] == "to_regular"]
    assert [(r["boundary_event"], r["start_utc"]) for r in back] == [
        ("ceases", "2030-03-11T00:00:00Z")]


def test_a_circuit_on_compliant_fuel_at_departure_outside_switches_back_at_departure(tmp_path):
    # closed_form departs outside the area with [port] departure_fuel = { main = "mgo" }:
    # the switch back is commenced at departure and completes, at 12 kn, after the CSTR
    # washout to 5 % of the step: (V/q)·ln(1/0.05) ([LEVENSPIEL-1999] [D]; the planner's
    # stated completion level SWITCH_BACK_COMPLETE)
    from planner.voyage.changeovers import SWITCH_BACK_COMPLETE
    from tests.helpers.plan import V_M3, flow_m3_h

    _copy(tmp_path)
    text = (VOYAGES / "closed_form.toml").read_text() + (
        '\n[port]\ndeparture_fuel = { main = "mgo" }\n')
    (tmp_path / "v.toml").write_text(text)
    _, doc = plan_doc(tmp_path / "v.toml")
    first = doc["changeovers"][0]
    assert (first["direction"], first["boundary_event"], first["from_fuel"]) == (
        "to_regular", "departure", "mgo")
    assert first["start_utc"] == doc["voyage"]["depart_utc"]
    back_h = V_M3 / flow_m3_h(12.0) * math.log(1.0 / SWITCH_BACK_COMPLETE)
    assert first["duration_h"] == pytest.approx(back_h, abs=3.0 / 3600.0)
