"""Flushing simulation against closed-form solutions (each source named beside its check).

The models are those of [LEVENSPIEL-1999]: the well-stirred (CSTR) washout and
its time to a level [D], N stirred volumes in series (the Erlang step response)
[P], plug flow as a pure delay V/q [P]; sulphur mixes by mass [D]. The energy
basis counts rates at the ISO reference net specific energy ([ISO-3046] [M]).
"""

import math

import numpy as np
import pytest
from scipy.optimize import brentq

from planner.flushing import ConsumptionSchedule, Switch, simulate
from planner.fuels import ISO_REFERENCE_Q_NET_MJ_KG
from tests.helpers.flushing import HFO, HFO_EQ, MGO, MGO_EQ, loop_system, series

SECOND_H = 1.0 / 3600.0
M_T_H = 1.2  # engine consumption, t/h
EQ = {"fuels": (HFO_EQ, MGO_EQ)}
AB = Switch("main", "A", "B")


def mass_schedule(rate_t_h=M_T_H):
    return ConsumptionSchedule.constant({"me": rate_t_h}, basis="mass")


def washout(t_h, s0, s_in, v_m3, q_m3h):
    # [LEVENSPIEL-1999] CSTR washout [D]: S = S_in + (S0 − S_in)·exp(−q·t/V)
    return s_in + (s0 - s_in) * np.exp(-q_m3h * t_h / v_m3)


# [LEVENSPIEL-1999] time to a level of the CSTR washout [D],
# t = (V/q)·ln[(S0 − S_in)/(S_lim − S_in)]: 0.5 m³ at 1.2 t/h of 900 kg/m³ (q = 4/3 m³/h),
# 0.50 → 0.05 % S. Columns: level % m/m, time h (worked here from the formula).
WASHOUT_TIMES = [
    (0.10, 0.375 * math.log(9.0)),  # 0.8240 h
    (0.09, 0.375 * math.log(11.25)),  # 0.9076 h
]


def test_single_stirred_volume_is_the_washout_solution():
    v, rho = 0.5, 900.0
    q = M_T_H * 1000.0 / rho
    r = simulate(series([v], "s", **EQ), AB, mass_schedule(), 6.0)
    c = r.inlets["me"]
    np.testing.assert_allclose(c.sulphur_pct, washout(c.time_h, 0.50, 0.05, v, q), atol=1e-12)
    for level, expected in WASHOUT_TIMES:  # [LEVENSPIEL-1999] [D], to better than 1 s
        assert expected == pytest.approx((v / q) * math.log(0.45 / (level - 0.05)), rel=1e-12)
        assert abs(c.time_at_or_below_h(level) - expected) < SECOND_H


@pytest.mark.parametrize("n", [2, 4, 8])  # volumes in series, 0.8 m³ in all
def test_stirred_volumes_in_series_follow_the_erlang_step_response(n):
    total, rho = 0.8, 900.0
    q = M_T_H * 1000.0 / rho
    tau = total / (n * q)
    r = simulate(series([total / n] * n, "s" * n, **EQ), AB, mass_schedule(), 8.0)
    c = r.inlets["me"]

    def fraction_new(t):
        # [LEVENSPIEL-1999] tanks in series, the Erlang step response [P]
        # F(t) = 1 − exp(−t/τi)·Σ_{k<N} (t/τi)^k / k!
        x = np.asarray(t) / tau
        return 1.0 - np.exp(-x) * sum(x**k / math.factorial(k) for k in range(n))

    np.testing.assert_allclose(c.fractions[1], fraction_new(c.time_h), atol=1e-10)
    expected = brentq(lambda t: 0.50 - 0.45 * fraction_new(t) - 0.10, 1e-6, 8.0, xtol=1e-12)
    assert abs(c.time_at_or_below_h(0.10) - expected) < SECOND_H


def test_plug_flow_is_a_pure_delay_on_a_mass_basis():
    v = 0.2
    r = simulate(series([v], "p"), AB, mass_schedule(), 1.0)
    c = r.inlets["me"]
    # [LEVENSPIEL-1999] plug flow is a pure delay V/q [P]; q is the old fuel's (991 kg/m³)
    delay = v / (M_T_H * 1000.0 / HFO.density_kg_m3)
    assert c.time_at_or_below_h(0.10) == pytest.approx(delay, abs=1e-12)
    before, after = c.time_h < delay - 1e-9, c.time_h > delay + 1e-9
    np.testing.assert_array_equal(c.sulphur_pct[before], 0.50)
    np.testing.assert_allclose(c.sulphur_pct[after], 0.05, atol=1e-15)


def test_plug_flow_delay_tracks_throughput_when_the_flow_changes():
    v, t1 = 0.2, 0.05
    schedule = ConsumptionSchedule.steps([0.0, t1], [{"me": M_T_H}, {"me": 2 * M_T_H}], "mass")
    c = simulate(series([v], "p"), AB, schedule, 1.0).inlets["me"]
    q1 = M_T_H * 1000.0 / HFO.density_kg_m3
    # [LEVENSPIEL-1999] plug flow [P] with time-varying flow: the front leaves when the
    # throughput since the switch reaches V: q1·t1 + 2·q1·(t − t1) = V
    assert c.time_at_or_below_h(0.10) == pytest.approx(t1 + (v - q1 * t1) / (2 * q1), abs=1e-12)


# Four pipes in series, m³: one pure delay Σ V·ρ_old / m ([LEVENSPIEL-1999] plug flow [P]).
# Regression cases: a front reaching a pipe outlet at a step end used to be carried
# through the downstream pipes by that same step's throughput, so it crossed them inside
# later steps and was smeared (the first is the case hypothesis found in
# test_more_volume_never_shortens_the_flush). Columns: volumes, delay h at 1 t/h of 991 kg/m³.
PIPES_IN_SERIES = [
    ([0.5, 0.0625, 0.03125, 0.5], 1.09375 * 0.991),
    ([0.625, 0.0625, 0.03125, 0.5], 1.21875 * 0.991),
]


@pytest.mark.parametrize(("vols", "delay"), PIPES_IN_SERIES)
def test_pipes_in_series_are_one_pure_delay(vols, delay):
    rate = 1.0
    c = simulate(series(vols, "pppp"), AB, mass_schedule(rate), 24.0).inlets["me"]
    # [LEVENSPIEL-1999] plug flow is a pure delay [P]; pipes in series add their
    # volumes, at the old fuel's flow (991 kg/m³) until the front arrives
    assert delay == pytest.approx(sum(vols) * HFO.density_kg_m3 / (rate * 1000.0), rel=1e-12)
    assert abs(c.time_at_or_below_h(0.10) - delay) < SECOND_H
    assert abs(c.time_at_or_below_h(0.10, settled=False) - delay) < SECOND_H
    before, after = c.time_h < delay - 1e-9, c.time_h > delay + 1e-9
    np.testing.assert_array_equal(c.sulphur_pct[before], 0.50)
    np.testing.assert_allclose(c.sulphur_pct[after], 0.05, atol=1e-12)


@pytest.mark.parametrize("order", ["ps", "sp"])
def test_pipe_and_stirred_volume_give_a_delayed_exponential(order):
    vp, vs, rho = 0.1, 0.5, 900.0
    q = M_T_H * 1000.0 / rho
    vols = [vp, vs] if order == "ps" else [vs, vp]
    delay = vp / q  # [LEVENSPIEL-1999]: plug flow delay [P], then the CSTR washout [D]
    t_lim = delay + (vs / q) * math.log(0.45 / 0.05)
    c = simulate(series(vols, order, **EQ), AB, mass_schedule(), 6.0).inlets["me"]
    assert abs(c.time_at_or_below_h(0.10) - t_lim) < SECOND_H
    # the curve: exact when the pipe comes first (its inlet is the valve's step);
    # a stirred volume's outflow travels as quadratic parcels, converging with tolerance
    tight = simulate(series(vols, order, **EQ), AB, mass_schedule(), 6.0, tolerance=1e-6)
    expected = np.where(
        c.time_h < delay, 0.50, washout(np.maximum(c.time_h - delay, 0.0), 0.5, 0.05, vs, q)
    )
    np.testing.assert_allclose(c.sulphur_pct, expected, atol=1e-9 if order == "ps" else 1e-3)
    np.testing.assert_allclose(tight.inlets["me"].sulphur_pct, expected, atol=1e-6)


def test_loop_with_large_circulation_acts_as_one_stirred_volume():
    mixing, loop = 0.5, [0.05, 0.1, 0.05]
    q = M_T_H * 1000.0 / 900.0
    # [LEVENSPIEL-1999] [D]: one stirred volume of mixing tank + loop at flow q
    single = ((mixing + sum(loop)) / q) * math.log(0.45 / 0.05)
    errors = []
    for ratio in (3.0, 10.0, 30.0, 100.0):
        system = loop_system(mixing, loop, "psp", ratio * q, **EQ)
        t = simulate(system, AB, mass_schedule(), 8.0).inlets["me"].time_at_or_below_h(0.10)
        errors.append(abs(t - single) / single)
    assert all(b < a for a, b in zip(errors, errors[1:], strict=False))
    assert errors[-1] < 0.005


def _closed_form_mass_basis(v, rate_kg_h, kappa_old, kappa_new, phi):
    # [D] derived here from the [LEVENSPIEL-1999] CSTR balance: one stirred volume,
    # new-fuel volume fraction φ, draw
    # q = R / (κo(1 − φ) + κn·φ) m³/h for a fixed rate R (kg/h) per κ (kg/m³):
    # dφ/dt = q(1 − φ)/V  ⇒  t(φ) = (V/R)·[−κn·ln(1 − φ) − (κn − κo)·φ]
    return (v / rate_kg_h) * (-kappa_new * math.log(1.0 - phi) - (kappa_new - kappa_old) * phi)


def _phi_at_limit(limit):
    # sulphur on a mass basis ([LEVENSPIEL-1999] mass balance [D]):
    # φρn(Sn − L) + (1 − φ)ρo(So − L) = 0
    a = HFO.density_kg_m3 * (HFO.sulphur_pct - limit)
    return a / (a - MGO.density_kg_m3 * (MGO.sulphur_pct - limit))


def test_mass_basis_gives_the_difference_the_densities_predict():
    v, limit = 0.5, 0.10
    c = simulate(series([v], "s"), AB, mass_schedule(), 6.0).inlets["me"]
    t_sim = c.time_at_or_below_h(limit)
    rho_o, rho_n = HFO.density_kg_m3, MGO.density_kg_m3
    t_mass = _closed_form_mass_basis(v, M_T_H * 1000.0, rho_o, rho_n, _phi_at_limit(limit))
    assert abs(t_sim - t_mass) < SECOND_H
    # a volume-basis rule (sulphur linear in volume, constant draw at the old
    # fuel's density; the [LEVENSPIEL-1999] washout time) is off by what the densities predict
    t_volume = (v / (M_T_H * 1000.0 / rho_o)) * math.log(0.45 / (limit - 0.05))
    assert abs((t_volume - t_sim) - (t_volume - t_mass)) < SECOND_H
    assert t_volume - t_sim > 60 * SECOND_H


def test_energy_basis_scales_the_draw_by_net_specific_energy():
    v, limit = 0.5, 0.10
    schedule = ConsumptionSchedule.constant({"me": M_T_H}, basis="energy")
    c = simulate(series([v], "s"), AB, schedule, 6.0).inlets["me"]
    # [ISO-3046] [M]: mass = m_ISO·42.7/Q_net, so per m³ of fuel κ = ρ·Q_net/42.7
    k_o = HFO.density_kg_m3 * HFO.q_net / ISO_REFERENCE_Q_NET_MJ_KG
    k_n = MGO.density_kg_m3 * MGO.q_net / ISO_REFERENCE_Q_NET_MJ_KG
    expected = _closed_form_mass_basis(v, M_T_H * 1000.0, k_o, k_n, _phi_at_limit(limit))
    assert abs(c.time_at_or_below_h(limit) - expected) < SECOND_H
    # and the masses burnt follow: the old fuel's mass rate is m_ISO·42.7/Q_net
    first = c.burnt_t[:, 1].sum() / c.time_h[1]
    assert first == pytest.approx(M_T_H * ISO_REFERENCE_Q_NET_MJ_KG / HFO.q_net, rel=1e-3)


def test_consumption_step_mid_flush():
    v, t1 = 0.5, 0.3
    q1, q2 = M_T_H * 1000.0 / 900.0, 0.5 * M_T_H * 1000.0 / 900.0
    schedule = ConsumptionSchedule.steps([0.0, t1], [{"me": M_T_H}, {"me": 0.5 * M_T_H}], "mass")
    c = simulate(series([v], "s", **EQ), AB, schedule, 6.0).inlets["me"]
    # [LEVENSPIEL-1999] washout [D] with the throughput q1·t1 + q2·(t − t1) in place of q·t
    through = np.where(c.time_h < t1, q1 * c.time_h, q1 * t1 + q2 * (c.time_h - t1))
    np.testing.assert_allclose(c.sulphur_pct, 0.05 + 0.45 * np.exp(-through / v), atol=1e-12)
    expected = t1 + (v * math.log(0.45 / 0.05) - q1 * t1) / q2
    assert abs(c.time_at_or_below_h(0.10) - expected) < SECOND_H
