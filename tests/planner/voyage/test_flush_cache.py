"""The plan's flush cache: a hit is the uncached result, and every input that matters misses.

Runs on the sample ship (``areas_sample/ship.toml``, fictional), boiler circuit (one
consumer), VLSFO to MGO. Reference: the uncached calls themselves
(:func:`planner.flushing.study.study`, :func:`planner.flushing.flush`,
:func:`planner.flushing.simulate`), compared bit for bit. The premises of the key (the
simulation is causal, and reads only its circuit's consumers) are tested here too, so a
change of the simulator that broke them fails these tests rather than the plans.
"""

from __future__ import annotations

import numpy as np
import pytest

from planner.common.defaults import SERVICE_ENDURANCE_H
from planner.flushing import ConsumptionSchedule, Switch, flush, schedule_at, simulate
from planner.flushing.study import study
from planner.ship.ship_file import load_ship
from planner.uncertainty.model import perturbed
from planner.voyage.flush_cache import FlushCache, schedule_window, system_fingerprint
from planner.voyage.report import plan_json
from planner.voyage.run import build_plan
from tests.helpers.paths import ROOT
from tests.helpers.plan import VOYAGES

SHIP = ROOT / "areas_sample" / "ship.toml"
LIMIT, TARGET = 0.10, 0.09
CIRCUIT, FROM, TO = "boiler", "vlsfo_service", "mgo_service"


@pytest.fixture(scope="module")
def ship():
    return load_ship(SHIP)


def steps(ship, times_h=(0.0,), **changes) -> ConsumptionSchedule:
    """The ship's reference-load rates [t/h] in every segment, with ``name=(r0, r1, …)``
    per consumer where given."""
    base = schedule_at(ship).rates_t_h
    n = len(times_h)
    rates = {k: changes.get(k, (v[0],) * n) for k, v in base.items()}
    return ConsumptionSchedule(tuple(times_h), rates)


def same_result(a, b) -> bool:
    """Two flush results equal bit for bit (times, every inlet trace and curve, tanks)."""
    if not np.array_equal(a.time_h, b.time_h) or a.inlets.keys() != b.inlets.keys():
        return False
    for k, ca in a.inlets.items():
        cb = b.inlets[k]
        for f in ("trace_time_h", "trace_fractions", "fractions", "burnt_m3"):
            if not np.array_equal(getattr(ca, f), getattr(cb, f)):
                return False
    if dict(a.tank_dry_h) != dict(b.tank_dry_h) or a.end != b.end:
        return False
    return all(np.array_equal(t.fractions, b.tanks[k].fractions) for k, t in a.tanks.items())


def test_a_hit_is_the_uncached_study(ship):
    cache = FlushCache()
    s = steps(ship)
    got = cache.study(ship, CIRCUIT, FROM, TO, s, LIMIT, TARGET)
    ref = study(ship, CIRCUIT, FROM, TO, s, LIMIT, TARGET, dry_within_h=SERVICE_ENDURANCE_H)
    assert got.summary == ref.summary
    assert same_result(got.result, ref.result)
    assert got.lead_h == ref.lead_h and got.paths.keys() == ref.paths.keys()
    for k, p in ref.paths.items():
        assert np.array_equal(got.paths[k].viscosity_cst, p.viscosity_cst)
        assert np.array_equal(got.paths[k].temperature_c, p.temperature_c)
    assert cache.study(ship, CIRCUIT, FROM, TO, steps(ship), LIMIT, TARGET) is got
    assert cache.counts()["flush"] == (1, 1) and cache.counts()["thermal"] == (1, 1)
    bare = cache.study(ship, CIRCUIT, FROM, TO, s, LIMIT, TARGET, thermal=False)
    assert bare.paths == {} and bare.summary is got.summary
    assert cache.counts()["flush"] == (2, 1)


CHANGES = {
    "tank content": lambda ship: dict(system=ship.with_tank_content(TO, {"mgo": 20.0})),
    "fuel sulphur": lambda ship: dict(system=ship.with_fuels(
        {"mgo": _with(ship.fuels["mgo"], sulphur_pct=0.06)})),
    "target": lambda ship: dict(target=0.085),
    "limit": lambda ship: dict(limit=0.095),
    "tanks": lambda ship: dict(from_=TO, to=FROM, target=0.40),
    "circuit's consumption": lambda ship: dict(schedule=steps(ship, aux_boiler=(0.33,))),
    # a later start: a change of consumption inside the simulated time
    "start moment": lambda ship: dict(schedule=steps(ship, (0.0, 0.2), aux_boiler=(0.3, 0.2))),
    "mass basis": lambda ship: dict(schedule=ConsumptionSchedule(
        (0.0,), steps(ship).rates_t_h, "mass")),
}


def _with(fuel, **values):
    from dataclasses import replace
    return replace(fuel, **values)


@pytest.mark.parametrize("what", list(CHANGES))
def test_any_input_that_matters_misses(ship, what):
    cache = FlushCache()
    first = cache.study(ship, CIRCUIT, FROM, TO, steps(ship), LIMIT, TARGET, thermal=False)
    args = dict(system=ship, from_=FROM, to=TO, schedule=steps(ship), limit=LIMIT,
                target=TARGET) | CHANGES[what](ship)
    got = cache.study(args["system"], CIRCUIT, args["from_"], args["to"], args["schedule"],
                      args["limit"], args["target"], thermal=False)
    assert cache.counts()["flush"] == (0, 2)
    assert got is not first
    result, summary = flush(args["system"], CIRCUIT, args["from_"], args["to"],
                            args["schedule"], limit_pct=args["limit"], target_pct=args["target"],
                            dry_within_h=SERVICE_ENDURANCE_H)
    assert got.summary == summary and same_result(got.result, result)


def test_the_same_change_of_consumption_later_misses(ship):
    """Two starts an hour apart on one timeline: the same speed change, at another time."""
    cache = FlushCache()
    early = steps(ship, (0.0, 0.2), aux_boiler=(0.3, 0.2))
    later = steps(ship, (0.0, 0.25), aux_boiler=(0.3, 0.2))
    first = cache.study(ship, CIRCUIT, FROM, TO, early, LIMIT, TARGET, thermal=False)
    got = cache.study(ship, CIRCUIT, FROM, TO, later, LIMIT, TARGET, thermal=False)
    assert got is not first and cache.counts()["flush"] == (0, 2)
    result, summary = flush(ship, CIRCUIT, FROM, TO, later, limit_pct=LIMIT, target_pct=TARGET,
                            dry_within_h=SERVICE_ENDURANCE_H)
    assert got.summary == summary and same_result(got.result, result)
    assert summary.time_to_target_h != first.summary.time_to_target_h


def test_what_the_simulation_does_not_read_hits(ship):
    """A segment after the simulated end, another circuit's consumption and an equal system
    loaded again: hits, and the uncached flush of each is the same bit for bit."""
    cache = FlushCache()
    first = cache.study(ship, CIRCUIT, FROM, TO, steps(ship), LIMIT, TARGET, thermal=False)
    # the flush ends once settled, but the tanks' levels are followed for the service
    # tank's endurance (a tank running dry later is the ordinary transfer routine)
    assert first.summary.horizon_h < 1.0 and first.result.end == "settled"
    assert first.result.schedule_read_h == SERVICE_ENDURANCE_H
    later = steps(ship, (0.0, SERVICE_ENDURANCE_H + 0.5), aux_boiler=(0.3, 0.1),
                  main_engine=(1.3, 0.2))
    other = steps(ship, main_engine=(0.4,), dg1=(0.0,))
    for system, sched in ((ship, later), (ship, other), (load_ship(SHIP), steps(ship))):
        assert cache.study(system, CIRCUIT, FROM, TO, sched, LIMIT, TARGET,
                           thermal=False) is first
        result, summary = flush(system, CIRCUIT, FROM, TO, sched, limit_pct=LIMIT,
                                target_pct=TARGET, dry_within_h=SERVICE_ENDURANCE_H)
        assert summary == first.summary and same_result(result, first.result)
    assert cache.counts()["flush"] == (3, 1)


def test_a_change_after_the_flush_that_moves_a_tank_dry_time_misses(ship):
    """The boiler's draw raised 5 h after the switch: the flush is the same, but the
    service tank runs dry sooner, so the cache must not hand back the first result."""
    cache = FlushCache()
    first = cache.study(ship, CIRCUIT, FROM, TO, steps(ship), LIMIT, TARGET, thermal=False)
    more = steps(ship, (0.0, 5.0), aux_boiler=(0.3, 30.0))
    got = cache.study(ship, CIRCUIT, FROM, TO, more, LIMIT, TARGET, thermal=False)
    assert got is not first and cache.counts()["flush"] == (0, 2)
    assert got.summary == first.summary
    assert got.result.tank_dry_h["mgo_service"] < 5.0 + 26.0 / (30.0 / 0.85) + 1e-6


def test_the_window_keeps_a_segment_at_the_end(ship):
    at_end = steps(ship, (0.0, 6.0), aux_boiler=(0.3, 0.1))
    assert schedule_window(at_end, ["aux_boiler"], 6.0) != \
        schedule_window(steps(ship), ["aux_boiler"], 6.0)
    assert schedule_window(steps(ship, aux_boiler=(-0.0,)), ["aux_boiler"], 6.0) != \
        schedule_window(steps(ship, aux_boiler=(0.0,)), ["aux_boiler"], 6.0)


def test_simulate_is_remembered_by_system_horizon_and_window(ship):
    cache, sw, s = FlushCache(), Switch(CIRCUIT, FROM, TO), steps(ship)
    first = cache.simulate(ship, sw, s, 2.0)
    assert same_result(first, simulate(ship, sw, s, 2.0))
    assert cache.simulate(ship, sw, steps(ship, (0.0, 3.0), aux_boiler=(0.3, 0.1)), 2.0) is first
    bigger = perturbed(ship, {"burner_heater": 1.05})
    for system, horizon in ((bigger, 2.0), (ship, 2.5)):
        got = cache.simulate(system, sw, s, horizon)
        assert got is not first and same_result(got, simulate(system, sw, s, horizon))
    assert cache.counts()["simulate"] == (1, 3)


def test_fingerprint_sees_every_part(ship):
    fp = system_fingerprint(ship)
    assert system_fingerprint(load_ship(SHIP)) == fp
    for changed in (ship.with_tank_content(TO, {"mgo": 25.0}),
                    ship.with_fuels({"mgo": _with(ship.fuels["mgo"], density_kg_m3=851.0)}),
                    perturbed(ship, {"filter": 1.0 + 1e-15})):
        assert system_fingerprint(changed) != fp


def test_bad_input_is_refused_as_uncached(ship):
    from planner.ship.system import FuelSystemError
    with pytest.raises(FuelSystemError):
        flush(ship, "nowhere", FROM, TO, steps(ship), limit_pct=LIMIT, target_pct=TARGET)
    with pytest.raises(FuelSystemError):
        FlushCache().study(ship, "nowhere", FROM, TO, steps(ship), LIMIT, TARGET)


def test_disabled_cache_computes_every_call(ship):
    cache = FlushCache(enabled=False)
    a = cache.study(ship, CIRCUIT, FROM, TO, steps(ship), LIMIT, TARGET, thermal=False)
    b = cache.study(ship, CIRCUIT, FROM, TO, steps(ship), LIMIT, TARGET, thermal=False)
    assert a is not b and a.summary == b.summary
    assert cache.counts()["flush"] == (0, 2)


@pytest.mark.parametrize("name", ["close_areas", "speed_change", "depart_inside"])
def test_plan_is_the_same_with_and_without_the_cache(name):
    cached = build_plan(VOYAGES / f"{name}.toml")
    plain = build_plan(VOYAGES / f"{name}.toml", flushes=FlushCache(enabled=False))
    assert plan_json(cached) == plan_json(plain)
    hits, misses = cached.flushes.counts()["flush"]
    assert hits > 0 and hits + misses == plain.flushes.counts()["flush"][1]


def test_constant_speed_fixed_point_simulates_once():
    """At constant speed the flush from the due time and from the start see the same
    consumption: the fixed point's second evaluation, its check and the final run hit.
    (A voyage whose arrival lies beyond every flush's window: at arrival the consumption
    steps to the port state's, which the flushes would see at different offsets.)"""
    plan = build_plan(VOYAGES / "short_fuel.toml")
    compliant = [c for c in plan.changes if c.direction == "to_compliant"]
    regular = [c for c in plan.changes if c.direction == "to_regular"]
    assert plan.flushes.counts()["flush"][1] == len(compliant) + len(regular)
