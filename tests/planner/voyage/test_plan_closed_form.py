"""The voyage plan against closed forms: one stirred volume, constant speed on a parallel.

Fixtures (fictional, ``tests/data/voyages``): ``ship_t1.toml`` has one well-stirred
volume V = 1.0 m³ between the changeover valve and the only consumer, a main engine
with a flat SFOC; both fuels are 880 kg/m³ with Q_net set to 40.0 MJ/kg, so the
volumetric flow is the same for any blend. The routes sail due east along 50°N and
the area boundary is the meridian 5°E.

Outside sources (see ``tests.helpers.plan``): the CSTR washout ([LEVENSPIEL-1999] [D]),
the parallel arc N·cos φ·Δλ on the ellipsoid ([WGS84] [D]), GeographicLib's RhumbSolve
for the rhumb direct problem ([KARNEY-RHUMB] [P, reference library]), the propeller law
([PROPELLER-LAW], common practice) and the 42.7 MJ/kg reference energy of SFOC
([ISO-3046] [M]: from memory; the planner uses the same constant, so only the
42.7/Q_net scaling is checked).
"""

from __future__ import annotations

import numpy as np
import pytest

from tests.helpers.geo import rhumbsolve_direct
from tests.helpers.plan import (
    LAT,
    NM_M,
    RHO,
    S_HFO,
    S_MGO,
    V_M3,
    flow_m3_h,
    hours,
    lon_back,
    mass_rate_t_h,
    parallel_m,
    plan_doc,
    seconds,
    utc,
    washout_log,
)

TIME_TOL_S = 3.0  # "a few seconds"
POS_TOL_M = 3.0  # "a few metres"


def metres_east(lon_a: float, lon_b: float) -> float:
    """Signed parallel arc from lon_b to lon_a at LAT, m (closed form)."""
    return np.sign(lon_a - lon_b) * parallel_m(lon_b, lon_a)


@pytest.fixture(scope="module")
def closed():
    return plan_doc("closed_form")


@pytest.fixture(scope="module")
def speed_change():
    return plan_doc("speed_change")


def test_closed_form_boundary_time_and_position(closed):
    plan, doc = closed
    (row,) = doc["changeovers"]
    assert (row["area"], row["circuit"], row["direction"]) == ("Meridian Five ECA", "main",
                                                               "to_compliant")
    assert (row["from_fuel"], row["to_fuel"]) == ("hfo", "mgo")
    # the boundary is the meridian 5°E on the parallel 50°N (the fixture's geometry)
    assert row["boundary_lat"] == pytest.approx(LAT, abs=1e-9)
    assert row["boundary_lon"] == pytest.approx(5.0, abs=1e-9)
    # time: departure + parallel arc 2°E-5°E (N·cos φ·Δλ, [WGS84] [D]) / 12 kn
    depart = utc(doc["voyage"]["depart_utc"]).timestamp()
    boundary = depart + 3600.0 * hours(parallel_m(2.0, 5.0), 12.0)
    assert plan.changes[0].boundary_epoch_s == pytest.approx(boundary, abs=0.05)
    assert abs(seconds(row["boundary_utc"], utc(doc["voyage"]["depart_utc"]))
               - (boundary - depart)) <= 1.0  # the JSON is to the second
    arrive = depart + 3600.0 * hours(parallel_m(2.0, 6.0), 12.0)
    assert abs(utc(doc["voyage"]["arrive_utc"]).timestamp() - arrive) <= 1.0
    assert doc["voyage"]["distance_nm"] == pytest.approx(parallel_m(2.0, 6.0) / NM_M, rel=1e-9)


def test_closed_form_start_time(closed):
    plan, doc = closed
    (row,) = doc["changeovers"]
    part = plan.changes[0].circuits[0]
    boundary = plan.changes[0].boundary_epoch_s
    # [LEVENSPIEL-1999] CSTR washout [D]: t = (V/q)·ln((S0 − S1)/(St − S1)),
    # target St = 0.8 × 0.10 % (the voyage's sulphur_target_fraction), margin 1.5 h
    target = 0.8 * 0.10
    assert row["target_pct"] == pytest.approx(target)
    q = flow_m3_h(12.0)  # propeller law at 12 kn from 85 % MCR at 14 kn, × 42.7/40, / 880
    flush_h = V_M3 / q * washout_log(target)
    start = boundary - 3600.0 * (flush_h + 1.5)
    assert part.start_epoch_s == pytest.approx(start, abs=TIME_TOL_S)
    assert abs(seconds(row["start_utc"], plan.timeline.utc(start))) <= TIME_TOL_S + 0.5
    assert row["duration_h"] * 3600.0 == pytest.approx(flush_h * 3600.0, abs=TIME_TOL_S)
    # compliant exactly the margin before the boundary
    assert row["margin_h"] == pytest.approx(1.5, abs=TIME_TOL_S / 3600.0)
    assert abs(seconds(row["boundary_utc"], row["compliant_utc"]) - 5400.0) <= TIME_TOL_S
    assert row["start_ship_time"].endswith("+01:00")  # the voyage's ship_time


def test_closed_form_inlet_curve_is_the_washout(closed):
    plan, _ = closed
    part = plan.changes[0].circuits[0]
    curve = np.array(part.study.worst_curve())
    # [LEVENSPIEL-1999] CSTR washout [D]: S(t) = S1 + (S0 − S1)·exp(−q·t/V)
    expected = S_MGO + (S_HFO - S_MGO) * np.exp(-flow_m3_h(12.0) * curve[:, 0] / V_M3)
    assert np.abs(curve[:, 1] - expected).max() < 1e-6
    assert curve[-1, 0] >= part.duration_h


def test_closed_form_start_position(closed):
    plan, doc = closed
    (row,) = doc["changeovers"]
    part = plan.changes[0].circuits[0]
    back_m = 12.0 * NM_M * (plan.changes[0].boundary_epoch_s - part.start_epoch_s) / 3600.0
    assert row["start_lat"] == pytest.approx(LAT, abs=1e-9)  # still on the parallel
    # parallel-arc closed form ([WGS84] [D]): Δλ = d / (N cos φ)
    assert abs(metres_east(row["start_lon"], lon_back(5.0, back_m))) <= POS_TOL_M
    # the whole chain from the closed-form start time: within the time tolerance at 12 kn
    boundary = plan.changes[0].boundary_epoch_s
    flush_h = V_M3 / flow_m3_h(12.0) * washout_log(0.08)
    ideal = lon_back(5.0, 12.0 * NM_M * (flush_h + 1.5))
    assert abs(metres_east(row["start_lon"], ideal)) <= POS_TOL_M + 12.0 * NM_M / 3600 * 3.0
    assert boundary > part.start_epoch_s
    # compliant point: 1.5 h × 12 kn west of the boundary
    assert abs(metres_east(row["compliant_lon"], lon_back(5.0, 1.5 * 12.0 * NM_M))) <= 10.0


@pytest.mark.requires_rhumbsolve
def test_closed_form_start_position_by_rhumbsolve(closed):
    plan, doc = closed
    (row,) = doc["changeovers"]
    part = plan.changes[0].circuits[0]
    back_m = 12.0 * NM_M * (plan.changes[0].boundary_epoch_s - part.start_epoch_s) / 3600.0
    # [KARNEY-RHUMB] RhumbSolve: the rhumb direct problem from the boundary, due west
    lat, lon = rhumbsolve_direct(row["boundary_lat"], row["boundary_lon"], 270.0, back_m)
    assert row["start_lat"] == pytest.approx(float(lat[0]), abs=1e-9)
    assert abs(metres_east(row["start_lon"], float(lon[0]))) <= POS_TOL_M


def test_closed_form_fuel_quantities(closed):
    plan, doc = closed
    part = plan.changes[0].circuits[0]
    depart = plan.timeline.start_epoch_s
    arrive = plan.timeline.end_epoch_s
    # mass = P·SFOC × 42.7/Q_net ([ISO-3046] [M]) over the time on each fuel (valve switch
    # to arrival)
    rate = mass_rate_t_h(12.0)
    assert doc["compliant_fuel_needed_t"] == pytest.approx(
        rate * (arrive - part.start_epoch_s) / 3600.0, rel=1e-6)
    assert doc["fuel_totals"]["hfo"]["needed_t"] == pytest.approx(
        rate * (part.start_epoch_s - depart) / 3600.0, rel=1e-6)
    assert doc["fuel_totals"]["mgo"]["needed_m3_15c"] == pytest.approx(
        doc["fuel_totals"]["mgo"]["needed_t"] * 1000.0 / RHO)
    # 100 m³ sounded at 15 °C: [TABLE-54B] gives VCF = 1 at 15 °C, so 100 × 0.880 t
    assert doc["compliant_fuel_on_board_t"] == pytest.approx(88.0, rel=1e-12)
    assert not any("Short of" in w for w in doc["warnings"])


def test_closed_form_sulphur_inside_the_area_is_the_washout_integral(closed):
    # Inside the area (boundary to arrival) the inlet is still a blend: the CSTR washout
    # S(t) = S₁ + (S₀ − S₁)·exp(−(t − t_s)/τ), τ = V/q ([LEVENSPIEL-1999] [D]), burnt at the
    # constant mass rate ṁ (propeller law at 12 kn). Integrated by hand from a = t_b − t_s to
    # a + L (L: boundary to arrival):
    #   m_S = ṁ/100 · [S₁·L + (S₀ − S₁)·τ·(e^(−a/τ) − e^(−(a+L)/τ))],
    # and SO₂ = m_S × 64.066/32.06 ([IUPAC-2021] [D]). On pure mgo it would be ṁ·L·S₁/100.
    plan, doc = closed
    part = plan.changes[0].circuits[0]
    tau = V_M3 / flow_m3_h(12.0)
    a = (plan.changes[0].boundary_epoch_s - part.start_epoch_s) / 3600.0
    length = (plan.timeline.end_epoch_s - plan.changes[0].boundary_epoch_s) / 3600.0
    rate = mass_rate_t_h(12.0)
    sulphur_kg = 1000.0 * rate / 100.0 * (
        S_MGO * length + (S_HFO - S_MGO) * tau * (np.exp(-a / tau) - np.exp(-(a + length) / tau)))
    pure_kg = 1000.0 * rate / 100.0 * S_MGO * length
    assert sulphur_kg / pure_kg - 1.0 > 0.03  # the blend adds about 4 % here
    # tolerance: the flow is read on the simulation's output times (10 s apart), so the
    # arrival's stop (between two of them) costs at most 5 s of flow: 4e-4 of 3.2 h
    area = doc["so2"]["areas"]["Meridian Five ECA"]
    assert area["sulphur_kg"] == pytest.approx(sulphur_kg, rel=5e-4)
    assert area["so2_kg"] == pytest.approx(sulphur_kg * 64.066 / 32.06, rel=5e-4)
    # the fuel rows carry their circuit (the ship has one)
    assert {r["circuit"] for r in doc["fuel_needed"]} == {"main"}


# --- a speed change during the flush --------------------------------------------------

def _speed_change_figures(plan):
    """Closed form for speed_change.toml: 14 kn from 2°E to 4.6°E, then 10 kn; boundary 5°E;
    margin 0.5 h; target 0.8 × 0.10 %. The washout integral with the piecewise flow:
    q1·τ1 + q2·τ2 = V·ln((S0 − S1)/(St − S1)), τ1 before the change, τ2 after it."""
    depart = plan.timeline.start_epoch_s
    change = depart + 3600.0 * hours(parallel_m(2.0, 4.6), 14.0)
    boundary = change + 3600.0 * hours(parallel_m(4.6, 5.0), 10.0)
    due = boundary - 0.5 * 3600.0
    q1, q2 = flow_m3_h(14.0), flow_m3_h(10.0)
    need = V_M3 * washout_log(0.08)
    tau2 = (due - change) / 3600.0
    tau1 = (need - q2 * tau2) / q1
    return dict(change=change, boundary=boundary, due=due, q1=q1, q2=q2, need=need,
                tau1=tau1, start=change - 3600.0 * tau1)


def test_speed_change_start_satisfies_the_piecewise_washout(speed_change):
    plan, doc = speed_change
    f = _speed_change_figures(plan)
    (row,) = doc["changeovers"]
    part = plan.changes[0].circuits[0]
    assert plan.changes[0].boundary_epoch_s == pytest.approx(f["boundary"], abs=0.05)
    assert f["tau1"] > 0  # the constructed flush really spans the speed change
    assert part.start_epoch_s < f["change"] < part.done_epoch_s
    assert part.start_epoch_s == pytest.approx(f["start"], abs=TIME_TOL_S)
    assert part.done_epoch_s == pytest.approx(f["due"], abs=TIME_TOL_S)
    assert row["margin_h"] == pytest.approx(0.5, abs=TIME_TOL_S / 3600.0)
    # the throughput from start to compliant is exactly the washout volume V·ln(...)
    through = f["q1"] * (f["change"] - part.start_epoch_s) / 3600 + f["q2"] * (part.done_epoch_s
                                                                        - f["change"]) / 3600
    assert through == pytest.approx(f["need"], rel=1e-3)
    # start position: on the first leg, 14 kn × (change − start) west of 4.6°E
    back_m = 14.0 * NM_M * (f["change"] - part.start_epoch_s) / 3600.0
    assert abs(metres_east(row["start_lon"], lon_back(4.6, back_m))) <= POS_TOL_M


def test_speed_change_inlet_curve_is_the_piecewise_washout(speed_change):
    plan, _ = speed_change
    f = _speed_change_figures(plan)
    part = plan.changes[0].circuits[0]
    c = np.array(part.study.worst_curve())
    t_change = (f["change"] - part.start_epoch_s) / 3600.0
    through = np.where(c[:, 0] < t_change, f["q1"] * c[:, 0],
                       f["q1"] * t_change + f["q2"] * (c[:, 0] - t_change))
    expected = S_MGO + (S_HFO - S_MGO) * np.exp(-through / V_M3)
    # until the arrival: alongside the main engine is stopped and the inlet holds still
    sailing = c[:, 0] <= (plan.timeline.end_epoch_s - part.start_epoch_s) / 3600.0
    assert sailing.sum() > 10
    assert np.abs(c[sailing, 1] - expected[sailing]).max() < 1e-6
    assert np.ptp(c[~sailing, 1]) < 1e-9 if (~sailing).any() else True


def test_speed_change_differs_from_constant_speed(speed_change):
    plan, _ = speed_change
    f = _speed_change_figures(plan)
    part = plan.changes[0].circuits[0]
    # at the boundary's speed (10 kn) throughout the flush would take V·L/q2
    const_10 = f["due"] - 3600.0 * f["need"] / f["q2"]
    # at the first leg's speed (14 kn) throughout: V·L/q1
    const_14 = f["due"] - 3600.0 * f["need"] / f["q1"]
    assert part.start_epoch_s - const_10 > 3600.0
    assert const_14 - part.start_epoch_s > 1800.0
