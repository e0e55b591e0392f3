"""A scrubber's load range applied leg by leg (planner/voyage/scrubber_load.py, scrubbing.py).

``scrub_far.toml`` (fictional, T1S ship: a hybrid scrubber on the main engine, whose
circuit can burn 2.60 % hsfo) on a route made here: due east along 50°N at 12 kn, with a
slow leg at 8 kn from 3.7°E to 3.9°E inside West Far ECA (0.10 %, 3°E-4°E). Hand figures:
the main engine's load by the propeller law, ref_load × (v / v_ref)³ with 85 % MCR at
14 kn from the ship file ([PROPELLER-LAW], common practice): 15.86 % at 8 kn, 53.53 % at
12 kn; the CSTR washout of the 1.0 m³ volume ([LEVENSPIEL-1999] [D]); the parallel arc on
the ellipsoid ([WGS84] [D]). The rule is a ship's officer's (README, "Scrubbers in the
plan"): outside its load range, ends included, the scrubber is not relied on.
"""

from __future__ import annotations

from dataclasses import replace
from datetime import timedelta
from functools import lru_cache

import pytest

from planner.ship.consumers import Boiler, Generator, MainEngine
from planner.ship.scrubbers import Scrubber
from tests.helpers.plan import REF_LOAD_PCT, REF_SPEED_KN, VOYAGES, hours, parallel_m, utc
from tests.planner.voyage.test_scrubbing import FLUSH_HSFO_H, TIME_TOL_S

SLOW = (3.7, 3.9)  # °E: the 8 kn leg
LOAD_8 = REF_LOAD_PCT * (8.0 / REF_SPEED_KN) ** 3  # [PROPELLER-LAW]: 15.86 % MCR
LOAD_12 = REF_LOAD_PCT * (12.0 / REF_SPEED_KN) ** 3  # 53.53 % MCR


@lru_cache(maxsize=1)
def _inputs():
    from geo.area_files import load_areas
    from geo.compliance import check_route
    from geo.path import route_path
    from geo.route import Route, Waypoint
    from geo.schedule import make_schedule
    from planner.voyage.onboard import ship_for_voyage
    from planner.voyage.voyage_file import load_voyage

    voyage = load_voyage(VOYAGES / "scrub_far.toml")
    route = Route("slow leg (fictional)", (
        Waypoint("West Point", 50.0, 2.0), Waypoint("Slow", 50.0, SLOW[0], speed_kn=12.0),
        Waypoint("Fast", 50.0, SLOW[1], speed_kn=8.0),
        Waypoint("Far East Point", 50.0, 8.5, speed_kn=12.0)))
    path = route_path(route)
    schedule = make_schedule(path, voyage.depart_utc, voyage.speed_kn)
    check = check_route(path, load_areas(voyage.area_paths), schedule, voyage.depart_utc.date())
    return voyage, ship_for_voyage(voyage), check


def _system(**load):
    _, system, _ = _inputs()
    return replace(system, scrubbers={"egcs": replace(system.scrubbers["egcs"], **load)})


@lru_cache(maxsize=4)
def plan_of(min_load_pct: float = 0.0, max_load_pct: float = 110.0):
    from planner.voyage.plan import plan_voyage
    from planner.voyage.report import plan_json

    voyage, _, check = _inputs()
    plan = plan_voyage(voyage, _system(min_load_pct=min_load_pct, max_load_pct=max_load_pct),
                       check)
    return plan, plan_json(plan)


def pieces(**load):
    from planner.voyage.scrubbing import availability
    from planner.voyage.timeline import Timeline

    system = _system(**load)
    _, _, check = _inputs()
    return availability(system.scrubbers["egcs"], Timeline(check.schedule, system),
                        check.stretches, (), ())


def at(doc, lon: float):
    """When the ship is at ``lon`` (closed form: 12 kn, then 8 kn on the slow leg)."""
    d = parallel_m(2.0, lon)
    h = hours(min(d, parallel_m(2.0, SLOW[0])), 12.0)
    if lon > SLOW[0]:
        h += hours(parallel_m(SLOW[0], min(lon, SLOW[1])), 8.0)
    if lon > SLOW[1]:
        h += hours(parallel_m(SLOW[1], lon), 12.0)
    return utc(doc["voyage"]["depart_utc"]) + timedelta(hours=h)


def main_rows(doc):
    return [r for r in doc["changeovers"] if r["circuit"] == "main"]


def test_a_slow_leg_below_the_minimum_makes_the_circuit_change_over():
    plan, doc = plan_of(min_load_pct=25.0)
    down, back = main_rows(doc)
    assert (down["boundary_event"], down["area"], down["from_fuel"], down["to_fuel"]) == (
        "load_out_of_range", "West Far ECA", "hsfo", "mgo")
    assert (back["boundary_event"], back["from_fuel"], back["to_fuel"]) == (
        "load_in_range", "mgo", "hsfo")
    # against the real limit: compliant the voyage's 1 h before the slow leg, CSTR washout
    assert down["boundary_nm"] * 1852.0 == pytest.approx(parallel_m(2.0, SLOW[0]), abs=1.0)
    assert (down["limit_pct"], down["target_pct"]) == (0.10, pytest.approx(0.09))
    assert abs((utc(down["compliant_utc"]) - (at(doc, SLOW[0]) - timedelta(hours=1)))
               .total_seconds()) < TIME_TOL_S
    assert down["duration_h"] * 3600.0 == pytest.approx(FLUSH_HSFO_H * 3600.0, abs=TIME_TOL_S)
    assert abs((utc(back["start_utc"]) - at(doc, SLOW[1])).total_seconds()) < TIME_TOL_S
    # the fuel chosen on the slow leg is the plain choice there: mgo within 0.10 %
    slow = [c for c in plan.scrubbed[0].choices if parallel_m(2.0, SLOW[0]) <
            0.5 * (c.stretch.from_m + c.stretch.to_m) < parallel_m(2.0, SLOW[1])]
    assert [c.fuel.name for c in slow] == ["mgo"]
    assert f"{LOAD_8:.1f} % MCR at 8.0 kn, below scrubber egcs's 25 % minimum" in \
        slow[0].reason
    # the events: stop ahead of the leg with why, start again after it
    ev = doc["scrubber_events"]
    assert [e["event"] for e in ev] == ["start", "stop", "start"]
    assert ev[1]["utc"] == down["compliant_utc"]
    assert f"main_engine load {LOAD_8:.1f} % MCR at 8.0 kn, below scrubber egcs's 25 % " \
        "minimum" in ev[1]["reason"]
    assert ev[2]["utc"] == back["start_utc"] and "load within" in ev[2]["reason"]
    # no span on the slow leg; the main circuit burns hsfo, mgo, hsfo
    assert all(s["to_nm"] * 1852.0 <= parallel_m(2.0, SLOW[0]) + 1.0
               or s["from_nm"] * 1852.0 >= parallel_m(2.0, SLOW[1]) - 1.0
               for s in doc["scrubber_spans"])
    assert [n.fuel for n in plan.quantities.needs if n.circuit == "main"] == \
        ["hsfo", "mgo", "hsfo"]
    assert doc["scrubbers"][0]["load_range_applied"] is True
    assert not [w for w in plan.warnings if w.kind == "scrubber_load_range"]


def test_a_load_inside_the_range_keeps_the_scrubber():
    _, doc = plan_of(min_load_pct=15.0, max_load_pct=100.0)
    assert main_rows(doc) == []
    assert [e["event"] for e in doc["scrubber_events"]] == ["start"]
    assert {s["fuel"] for s in doc["scrubber_spans"]} == {"hsfo"}


@pytest.mark.parametrize("load,slow_out,fast_out", [
    ({"min_load_pct": LOAD_8}, False, False),  # exactly the minimum: in range
    ({"min_load_pct": LOAD_8 + 0.01}, True, False),
    ({"max_load_pct": LOAD_12}, False, False),  # exactly the maximum: in range
    ({"max_load_pct": LOAD_12 - 0.01}, False, True),
], ids=["at_min", "above_min", "at_max", "below_max"])
def test_the_ends_of_the_range_are_inside_it(load, slow_out, fast_out):
    """README: the range's ends included."""
    ps = pieces(**load)
    slow_m = parallel_m(2.0, 0.5 * (SLOW[0] + SLOW[1]))
    for p in ps:
        on_slow = p.from_m <= slow_m < p.to_m
        assert p.out_of_range is (slow_out if on_slow else fast_out), p
        assert (p.mode is None) is p.out_of_range
    if fast_out:
        assert f"{LOAD_12:.1f} % MCR at 12.0 kn, above scrubber egcs's" in ps[0].why


def test_a_generator_by_its_rating_and_what_is_not_checked():
    from types import SimpleNamespace

    from planner.voyage.scrubber_load import engine_load_pct, load_why, unchecked

    me = MainEngine(name="me", mcr_kw=9000.0, sfoc_g_kwh=171.0, ref_speed_kn=14.0,
                    ref_load_pct=85.0)
    ship = SimpleNamespace(consumers={
        "me": me, "dg1": Generator(name="dg1", power_kw=450.0, sfoc_g_kwh=204.0,
                                   rated_kw=750.0),
        "dg2": Generator(name="dg2", power_kw=450.0, sfoc_g_kwh=204.0),
        "boiler": Boiler(name="boiler", fuel_t_h=0.3)})
    assert engine_load_pct(ship, "dg1", 12.0) == pytest.approx(60.0)  # 450 / 750 kW
    assert engine_load_pct(ship, "dg2", 12.0) is None
    s = Scrubber("egcs", ("me", "dg1", "dg2", "boiler"), ("open",), 3.5, 20.0, 50.0)
    why = load_why([s], ship, 12.0)
    assert "dg1 load 60.0 % of its rating, above scrubber egcs's 50 % maximum" in why
    assert "me load 53.5 % MCR at 12.0 kn" in why  # 53.53 % [PROPELLER-LAW]
    assert load_why([s], ship, 10.0).count(";") == 0  # 30.98 % MCR: only dg1 is out
    assert [u.split()[0] for u in unchecked(s, ship)] == ["dg2", "boiler"]
    assert unchecked(replace(s, min_load_pct=0.0, max_load_pct=110.0), ship) == []


def test_the_warning_is_only_for_what_the_plan_cannot_check():
    from planner.voyage.scrubbing import load_range_warnings

    _, system, _ = _inputs()
    s = replace(system.scrubbers["egcs"], min_load_pct=25.0)
    assert load_range_warnings(replace(system, scrubbers={"egcs": s})) == []
    both = replace(s, consumers=("main_engine", "boiler"))
    (w,) = load_range_warnings(replace(system, scrubbers={"egcs": both}))
    assert w.kind == "scrubber_load_range"
    assert "not to boiler (a boiler: no load in % MCR)" in w.text
