"""The topologies T1-T6 from the ship-file fixtures: hand mass balances and conservation.

Hand balances use the models of [LEVENSPIEL-1999]: plug flow as a pure delay V/q [P],
the well-stirred washout [D], sulphur mixing by mass [D].
"""

import math

import numpy as np
import pytest
from scipy.optimize import brentq

from planner.flushing import ConsumptionSchedule, flush, make_switch, schedule_at, simulate
from planner.ship.ship_file import load_ship
from tests.helpers.flushing import SHIPS, fuel

M_T_H = 1.3
HOUR_S = 3600.0


def mass(rate=M_T_H, **others):
    return ConsumptionSchedule.constant({"main_engine": rate, **others}, basis="mass")


def equal_densities(system):
    # volume and mass fractions coincide: closed forms apply directly
    return system.with_fuels({"hfo": fuel("hfo", 0.50, 900.0), "mgo": fuel("mgo", 0.05, 900.0)})


@pytest.mark.parametrize("path", sorted(SHIPS.glob("t*.toml")), ids=lambda p: p.stem)
def test_every_topology_conserves_sulphur(path):
    system = load_ship(path)
    rates = {c: 1.0 if c == "main_engine" else 0.1 for c in system.consumers}
    for circuit in system.circuits:
        tanks = system.circuits[circuit].tanks
        for a, b in ((tanks[0], tanks[1]), (tanks[1], tanks[0])):  # both directions
            sw = make_switch(system, circuit, a, b)
            r = simulate(system, sw, ConsumptionSchedule.constant(rates, "mass"), 8.0)
            held0, held1, burnt = r.sulphur_balance_t()
            # conservation ([LEVENSPIEL-1999] mass balance [D]): held at start = held at end
            # + burnt
            assert abs(held0 - held1 - burnt) <= 1e-9 * held0
            np.testing.assert_allclose(
                r.inventory_initial_m3, r.inventory_final_m3 + r.burnt_m3, rtol=1e-12, atol=1e-12
            )
            for c in r.inlets.values():
                s = c.sulphur_pct
                assert s.min() >= 0.05 - 1e-12 and s.max() <= 0.50 + 1e-12


def test_t4_return_to_a_named_tank_contaminates_it_as_a_hand_balance_predicts():
    # The excess of a 3.0 m³/h supply pump is hard-piped to the MGO service tank.
    # Switching back from MGO to HFO, the MGO tank receives first the MGO held in
    # the return line and upstream of the branch, then HFO: its sulphur rises.
    system = load_ship(SHIPS / "t4_return_named.toml")
    horizon = 8.0
    r = simulate(system, make_switch(system, "main", "mgo", "hfo"), mass(), horizon)
    supply, v_supply, v_return = 3.0, 0.05, 0.03
    hfo, mgo = system.fuels["hfo"], system.fuels["mgo"]
    burnt_m3 = r.inlets["main_engine"].burnt_m3[:, -1].sum()
    returned = supply * r.time_h[-1] - burnt_m3  # hand balance of the return flow
    q0 = M_T_H * 1000.0 / mgo.density_kg_m3  # the engine still burns MGO until the
    t_front = v_supply / supply  # HFO front reaches the branch at V/Q ([LEVENSPIEL-1999] [P])
    old = v_return + (supply - q0) * t_front
    new = returned - old
    tank = r.tanks["mgo_service"]
    mgo0 = system.tanks["mgo_service"].volume_m3
    assert tank.volume_m3[-1] == pytest.approx(mgo0 + returned, rel=1e-12)
    np.testing.assert_allclose(tank.content_m3[:, -1], [new, mgo0 + old], rtol=1e-9)
    # sulphur by mass ([LEVENSPIEL-1999] mass balance [D]): S = Σ m·S / Σ m
    m_h, m_m = new * hfo.density_kg_m3, (mgo0 + old) * mgo.density_kg_m3
    s_hand = (m_h * hfo.sulphur_pct + m_m * mgo.sulphur_pct) / (m_h + m_m)
    assert tank.sulphur_pct[-1] == pytest.approx(s_hand, rel=1e-9)
    assert tank.sulphur_pct[-1] > 0.10  # the compliant tank is no longer compliant
    # the HFO service tank only feeds: drawn at the pump rate
    assert r.tanks["hfo_service"].volume_m3[-1] == pytest.approx(50.0 - supply * horizon)


def test_t4_return_that_follows_the_valve_leaves_the_other_tank_alone():
    system = load_ship(SHIPS / "t4_return_in_use.toml")
    r = simulate(system, make_switch(system, "main", "mgo", "hfo"), mass(), 6.0)
    assert r.tanks["mgo_service"].volume_m3[-1] == pytest.approx(100.0)
    np.testing.assert_allclose(r.tanks["mgo_service"].fractions[:, -1], [0.0, 1.0])
    hfo_tank = r.tanks["hfo_service"]
    burnt = r.inlets["main_engine"].burnt_m3[:, -1].sum()
    assert hfo_tank.volume_m3[-1] == pytest.approx(50.0 - burnt, rel=1e-12)
    # it took back the MGO held in the return line and upstream of the branch
    # (plug flow: V_return + (Q − q)·V_supply/Q), and has since fed part of it out again
    taken = 0.03 + (3.0 - M_T_H * 1000 / 845) * 0.05 / 3.0
    assert 0.5 * taken < hfo_tank.content_m3[1, -1] < taken


def test_t6_tank_flushing_matches_the_closed_form():
    system = equal_densities(load_ship(SHIPS / "t6_tank_flushing.toml"))
    r = simulate(system, make_switch(system, "main", "hfo_settling", "mgo_storage"), mass(), 40.0)
    fill, v_fill, v_tank, v_supply, v_mix = 4.0, 0.05, 50.0, 0.04, 0.5
    q = M_T_H * 1000.0 / 900.0
    t_fill = v_fill / fill  # plug flow ([LEVENSPIEL-1999] [P]): MGO reaches the service tank
    a, b = fill / v_tank, q / v_mix
    t0 = t_fill + v_supply / q  # ... and, through the supply pipe, the mixing tank
    c = r.inlets["main_engine"]
    s = np.maximum(c.time_h - t0, 0.0)
    # [D] the service tank washes out at the fill rate ([LEVENSPIEL-1999] CSTR
    # washout), the mixing tank follows that exponential input:
    # y = S_n + (S_o − S_n)·(b·e^(−a·s) − a·e^(−b·s))/(b − a)
    expected = 0.05 + 0.45 * (b * np.exp(-a * s) - a * np.exp(-b * s)) / (b - a)
    np.testing.assert_allclose(c.sulphur_pct, expected, atol=1e-4)

    def closed(t):
        return 0.05 + 0.45 * (b * math.exp(-a * (t - t0)) - a * math.exp(-b * (t - t0))) / (b - a)

    t_lim = brentq(lambda t: closed(t) - 0.10, t0 + 1e-9, 40.0, xtol=1e-12)
    assert abs(c.time_at_or_below_h(0.10) - t_lim) < 10.0 / HOUR_S  # a 27 h flush
    # the settling tank takes the overflow (fill − q) of the service tank's blend
    settling = r.tanks["hfo_settling"]
    t = settling.time_h[-1]
    assert settling.volume_m3[-1] == pytest.approx(40.0 + (fill - q) * t, rel=1e-12)
    new = (fill - q) * ((t - t_fill) - (1.0 - math.exp(-a * (t - t_fill))) / a)
    assert settling.content_m3[1, -1] == pytest.approx(new, rel=1e-6)
    assert r.tanks["hfo_service"].volume_m3[-1] == pytest.approx(50.0, rel=1e-12)


def test_t5_two_circuits_and_two_branches():
    system = equal_densities(load_ship(SHIPS / "t5_two_circuits.toml"))
    schedule = mass(dg1=0.1, boiler=0.3)
    both = [make_switch(system, "main", "hfo", "mgo"), make_switch(system, "boiler", "hfo", "mgo")]
    r = simulate(system, both, schedule, 6.0)
    assert set(r.inlets) == {"main_engine", "dg1", "boiler"}
    q_e, q_g, q_b = (x * 1000 / 900.0 for x in (M_T_H, 0.1, 0.3))
    washout = math.log(0.45 / 0.05)
    # [LEVENSPIEL-1999]: supply pipe (delay V/q [P]), mixing tank (CSTR washout at the
    # total flow [D]), then each branch's own pipe (its delay at its own flow [P])
    mixing = 0.04 / (q_e + q_g) + (0.5 / (q_e + q_g)) * washout
    t_eng, t_gen = mixing + 0.03 / q_e, mixing + 0.02 / q_g
    assert abs(r.inlets["main_engine"].time_at_or_below_h(0.10) - t_eng) < 1.0 / HOUR_S
    assert abs(r.inlets["dg1"].time_at_or_below_h(0.10) - t_gen) < 1.0 / HOUR_S
    assert r.time_to_h("main", 0.10) == r.inlets["dg1"].time_at_or_below_h(0.10)
    # the boiler circuit: its own pipe then burner heater, a delayed exponential
    t_boiler = 0.02 / q_b + (0.03 / q_b) * washout
    assert abs(r.time_to_h("boiler", 0.10) - t_boiler) < 1.0 / HOUR_S
    # both circuits draw the same tanks: the MGO tank falls by everything burnt
    burnt = sum(c.burnt_m3[:, -1].sum() for c in r.inlets.values())
    assert r.tanks["hfo_service"].volume_m3[-1] == pytest.approx(50.0)  # idle after the switch
    assert r.tanks["mgo_service"].volume_m3[-1] == pytest.approx(100.0 - burnt, rel=1e-12)


def test_sample_ship_flushes_in_believable_times():
    system = load_ship("areas_sample/ship.toml")
    times = []
    for load in (25.0, 50.0, 75.0, 100.0):
        schedule = schedule_at(system, load_pct=load, circuits=["main"])
        _, summary = flush(
            system, "main", "vlsfo", "mgo", schedule, limit_pct=0.10, target_pct=0.09
        )
        times.append(summary.time_to_target_h)
        assert summary.direction == "to_compliant"
        assert summary.time_to_limit_h < summary.time_to_target_h
    assert all(b < a for a, b in zip(times, times[1:], strict=False))
    assert 0.5 < times[-1] < times[0] < 8.0  # hours: common practice is about 1-4 h


def test_switching_back_to_regular_fuel():
    system = load_ship("areas_sample/ship.toml")
    schedule = schedule_at(system, load_pct=85.0, circuits=["main"])
    _, s = flush(system, "main", "mgo", "vlsfo", schedule, limit_pct=0.10, target_pct=0.44)
    assert s.direction == "to_regular"
    assert 0.0 < s.time_to_limit_h < s.time_to_target_h
