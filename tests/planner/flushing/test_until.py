"""When a flush ends: at the target for good, a tank running dry afterwards is a time and not a
refusal, and a new fuel over the limit is said to be so.

Sources: the well-stirred washout ``t = (V/q)·ln((S₀ − S₁)/(L − S₁))`` and the plain mass
balance of a tank drawn at a constant rate, ``t_dry = V_tank / q`` ([LEVENSPIEL-1999] [D]),
worked out beside each check; for the stop being final, the same simulator run to a fixed
6 h horizon (the behaviour before the stop rule) on every test ship.
"""

from __future__ import annotations

import math

import pytest

from planner.flushing import (
    ConsumptionSchedule,
    FlushError,
    NeverReached,
    Switch,
    flush,
    schedule_at,
    simulate,
    summarize,
)
from planner.flushing.study import default_tanks
from planner.ship.ship_file import load_ship
from planner.ship.system import Circuit, Flow, FuelSystem, Link, ShipIdentity, Stirred, Tank
from tests.helpers.flushing import ENGINE, HFO_EQ, MGO_EQ, SHIPS, fuel
from tests.helpers.paths import ROOT

LIMIT, TARGET = 0.10, 0.09
MIX_M3, RATE_T_H = 0.48, 2.52  # equal densities (900 kg/m³): q = 2.52 t/h / 0.9 = 2.8 m³/h
Q_M3H = RATE_T_H * 1000.0 / 900.0


def one_mix(service_m3: float, new=MGO_EQ) -> FuelSystem:
    """HFO tank A, a service tank B of ``service_m3`` of ``new``, one mixing volume, one engine."""
    links = (Link("valve", "mix", Flow.consumption()), Link("mix", "me"))
    return FuelSystem(
        ShipIdentity("until test (fictional)"), {"hfo": HFO_EQ, new.name: new},
        {"A": Tank("A", 600.0, {"hfo": 500.0}), "B": Tank("B", 30.0, {new.name: service_m3})},
        {"mix": Stirred("mix", MIX_M3)}, {"me": ENGINE},
        {"main": Circuit("main", ("A", "B"), ("me",), links)})


SCHEDULE = ConsumptionSchedule.constant({"me": RATE_T_H}, basis="mass")


def test_a_small_service_tank_is_flushed_and_its_dry_time_given():
    """9 m³ of gas oil holds the 25-minute flush; it runs dry at 3.2 h, after it."""
    system = one_mix(9.0)
    result, s = flush(system, "main", "A", "B", SCHEDULE, limit_pct=LIMIT, target_pct=TARGET)
    washout_h = MIX_M3 / Q_M3H * math.log((0.50 - 0.05) / (TARGET - 0.05))  # 0.4149 h
    assert s.time_to_target_h == pytest.approx(washout_h, abs=1.0 / 3600.0)
    assert 24.0 < s.time_to_target_h * 60.0 < 25.5
    assert result.end == "settled" and result.time_h[-1] < 1.5
    assert result.tank_dry_h["B"] == pytest.approx(9.0 / Q_M3H, rel=1e-9)  # 3.214 h
    # the behaviour this replaces: a fixed 6 h run refuses the same flush
    with pytest.raises(FlushError, match="runs dry at t = 3.214 h"):
        simulate(system, Switch("main", "A", "B"), SCHEDULE, 6.0)


def test_a_tank_dry_before_the_target_is_still_refused():
    system = one_mix(0.9)  # 0.32 h of fuel, the flush needs 0.41 h
    with pytest.raises(FlushError, match="runs dry at t = 0.321 h, before every inlet"):
        flush(system, "main", "A", "B", SCHEDULE, limit_pct=LIMIT, target_pct=TARGET)


def test_a_fuel_over_the_limit_can_never_reach_it():
    lsfo = fuel("lsfo", 0.38, 900.0)
    with pytest.raises(NeverReached) as err:
        flush(one_mix(26.0, lsfo), "main", "A", "B", SCHEDULE, limit_pct=LIMIT,
              target_pct=TARGET)
    text = str(err.value)
    assert "'lsfo'" in text and "0.38 %" in text and "0.10 %" in text and "never" in text
    assert "dry" not in text and "\n" not in text


def test_a_fuel_between_target_and_limit_stops_at_the_limit():
    """0.095 % S: the 0.09 % target is out of reach, the 0.10 % limit is not."""
    system = one_mix(26.0, fuel("ulsfo", 0.095, 900.0))
    result, s = flush(system, "main", "A", "B", SCHEDULE, limit_pct=LIMIT, target_pct=TARGET)
    assert s.time_to_target_h is None
    washout_h = MIX_M3 / Q_M3H * math.log((0.50 - 0.095) / (LIMIT - 0.095))
    assert s.time_to_limit_h == pytest.approx(washout_h, abs=1.0 / 3600.0)
    assert result.end == "settled" and result.time_h[-1] < 4.0 * washout_h


SHIP_FILES = sorted(SHIPS.glob("t*.toml")) + [ROOT / "areas_sample" / "ship.toml"]


@pytest.mark.parametrize("path", SHIP_FILES, ids=lambda p: p.stem)
@pytest.mark.parametrize("load_pct", [25.0, 85.0])
def test_the_stop_is_final_on_every_test_ship(path, load_pct):
    """The times of a flush that stops once settled are those of a fixed run to 6 h (or an
    hour past the flush's end, for the ship whose flush takes a day), both ways."""
    system = load_ship(path)
    sched = schedule_at(system, load_pct=load_pct)
    for circuit in system.circuits:
        a, b = default_tanks(system, circuit)
        s_a = system.fuels[next(iter(system.tanks[a].content_m3))].sulphur_pct
        s_b = system.fuels[next(iter(system.tanks[b].content_m3))].sulphur_pct
        for x, y, target in ((a, b, TARGET), (b, a, s_a - 0.05 * (s_a - s_b))):
            result, s = flush(system, circuit, x, y, sched, limit_pct=LIMIT, target_pct=target)
            assert result.end in ("settled", "tank_dry")
            horizon_h = max(6.0, float(result.time_h[-1]) + 1.0)
            fixed = simulate(system, Switch(circuit, x, y), sched, horizon_h)
            ref = summarize(system, fixed, circuit, LIMIT, target)
            assert s.time_to_target_h == pytest.approx(ref.time_to_target_h, abs=1e-9)
            assert s.time_to_limit_h == pytest.approx(ref.time_to_limit_h, abs=1e-9)
            assert s.burnt_t == pytest.approx(ref.burnt_t, abs=1e-9)


def test_the_parcel_bound_is_above_every_profile_value():
    """``w·m + |w·g| + max(w·k, −w·k/2)`` against the profiles sampled densely (the shifted
    Legendre polynomials P₁ = 2s − 1 and P₂ = 6s² − 6s + 1 on [0, 1], closed form)."""
    import numpy as np

    from planner.flushing.pipes import PipeSet, profile

    rng = np.random.default_rng(7)
    pipes = PipeSet(np.array([1.0, 2.0]), np.array([[0.3, 0.7], [0.9, 0.1]]))
    for _ in range(6):
        pipes.push(np.array([0.3, 0.5]), rng.normal(0.0, 0.3, (2, 3, 2)), True)
        pipes.advance(np.array([0.3, 0.5]))
    w = np.array([1.5, -0.5])
    s = np.linspace(0.0, 1.0, 2001)
    lo, hi = pipes._lo, pipes._hi
    for p in range(2):
        inside = (pipes.start[lo:hi, p] < pipes.volume_m3[p]) & (
            pipes.start[lo:hi, p] + pipes.length[lo:hi, p] > 0.0)
        coef = pipes.coef[lo:hi, p][inside]
        values = profile(np.repeat(coef[:, None], s.size, axis=1), np.tile(s, (len(coef), 1)))
        exact = float((values @ w).max())
        mask = np.array([q == p for q in range(2)])
        bound = pipes.max_linear(w, mask)
        assert exact <= bound + 1e-12
        assert bound - exact <= 3.0 * float(np.abs(coef @ w).sum(axis=1).max())
