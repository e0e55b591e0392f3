"""The Monte Carlo against distributions known in closed form, and the exact volume scaling.

One well-stirred volume V fed at q: t = (V/q)·ln[(S₀ − S_in)/(S_lim − S_in)], the CSTR
washout solution ([LEVENSPIEL-1999] [D]). Equal fuel densities on a mass basis
keep q constant, so t is linear in V and monotone in S_in: its quantiles are those of the
normal inputs mapped through it.
"""

from __future__ import annotations

import math
from statistics import NormalDist

import numpy as np
import pytest

from planner.flushing import ConsumptionSchedule, flush, make_switch, schedule_at, simulate
from planner.ship.ship_file import load_ship
from planner.uncertainty import UncertaintySpec, analyse
from planner.uncertainty.inputs import Z95
from planner.uncertainty.model import BlendCurve, scale_all
from tests.helpers.flushing import HFO_EQ, MGO_EQ, series

V, RATE, RHO = 0.5, 1.2, 900.0
Q = RATE * 1000.0 / RHO
S0, S_IN, TARGET, LIMIT = 0.50, 0.05, 0.09, 0.10
SECOND = 1.0 / 3600.0
N = 20_000


def washout_time(v, s_in=S_IN, level=TARGET):
    # [LEVENSPIEL-1999] CSTR washout [D]: t = (V/q)·ln[(S0 − S_in)/(S_lim − S_in)]
    return (v / Q) * np.log((S0 - s_in) / (level - s_in))


def one_volume(**spec):
    system = series([V], "s", fuels=(HFO_EQ, MGO_EQ))
    sched = ConsumptionSchedule.constant({"me": RATE}, basis="mass")
    base = dict(volumes_pct=0.0, tanks_pct=0.0, consumption_pct=0.0, mixing_stagnant=0.0,
                mixing_bypass=0.0, boundary_time_min=0.0, sulphur_sd_default=0.0)
    base.update(spec)
    return system, sched, UncertaintySpec(**base)


def quantile_se(sd, p, n):
    """Standard error of a sample quantile of a normal variable (asymptotic)."""
    return sd * math.sqrt(p * (1 - p) / n) / NormalDist().pdf(NormalDist().inv_cdf(p))


def test_normal_volume_gives_the_normal_quantiles_of_the_washout_time():
    system, sched, spec = one_volume(volumes_pct=20.0)
    u = analyse(system, "main", "A", "B", sched, limit_pct=LIMIT, target_pct=TARGET, spec=spec,
                samples=N, seed=3)
    sd_v = V * 0.20 / Z95
    x = u.samples.values["volume:v0"]
    # each sample: the surrogate is exact along one axis for a single volume (t ∝ V)
    np.testing.assert_allclose(u.time_to_target_h, washout_time(V * x), atol=SECOND)
    sd_t = washout_time(sd_v)
    for p, got in u.time_quantiles().items():
        expected = washout_time(V + sd_v * NormalDist().inv_cdf(p))
        assert abs(got - expected) < 4 * quantile_se(sd_t, p, N) + SECOND
    assert u.check.max_error_s < 1.0


def test_normal_sulphur_of_the_new_fuel_maps_through_the_logarithm():
    sd = 0.005
    system, sched, spec = one_volume(sulphur_sd_default=0.0)
    spec = UncertaintySpec(**{**spec.__dict__, "sulphur_sd_by_fuel": {"mgo": sd}})
    u = analyse(system, "main", "A", "B", sched, limit_pct=LIMIT, target_pct=TARGET, spec=spec,
                samples=N, seed=5)
    s_in = u.samples.values["sulphur:mgo"]
    finite = s_in < TARGET
    np.testing.assert_allclose(u.time_to_target_h[finite], washout_time(V, s_in[finite]),
                               atol=SECOND)
    for p in (0.5, 0.9, 0.99):
        z = NormalDist().inv_cdf(p)
        expected = washout_time(V, S_IN + sd * z)
        dt_ds = (V / Q) * ((TARGET - S0) / ((S0 - S_IN - sd * z) * (TARGET - S_IN - sd * z)))
        se = abs(dt_ds) * quantile_se(sd, p, N)
        assert abs(u.time_quantiles()[p] - expected) < 4 * se + SECOND


def test_boundary_time_adds_a_normal_offset_to_the_lead():
    system, sched, spec = one_volume(boundary_time_min=20.0)
    u = analyse(system, "main", "A", "B", sched, limit_pct=LIMIT, target_pct=TARGET, spec=spec,
                samples=N, seed=7, confidence=0.95)
    t = washout_time(V)
    sd = 20.0 / 60.0 / Z95
    assert abs(u.lead_at_confidence_h - (t + sd * NormalDist().inv_cdf(0.95))) < \
        4 * quantile_se(sd, 0.95, N) + SECOND
    assert np.all(np.abs(u.time_to_target_h - t) < SECOND)  # the flush itself unchanged


def test_bypass_as_an_effective_volume_is_conservative_by_the_closed_form_bound():
    # Cholette-Cloutier bypass b ([LEVENSPIEL-1999] compartment models [M]), worked here
    # [D]: outlet = b·u + (1 − b)·x, τ = V / ((1 − b)·q); the time to a level F of the new
    # fuel is τ·ln((1 − b)/(1 − F)). The effective volume V/(1 − b) gives τ·ln(1/(1 − F)):
    # later by exactly τ·ln(1/(1 − b)), never earlier.
    b = 0.2
    system, sched, spec = one_volume(mixing_bypass=b)
    u = analyse(system, "main", "A", "B", sched, limit_pct=LIMIT, target_pct=TARGET, spec=spec,
                samples=200, seed=1)
    swing = next(s for s in u.sensitivity.swings if s.key == "bypass:v0")
    tau = V / ((1 - b) * Q)
    f = (S0 - TARGET) / (S0 - S_IN)
    true = tau * math.log((1 - b) / (1 - f))
    assert swing.lead_high_h == pytest.approx(tau * math.log(1 / (1 - f)), abs=SECOND)
    assert swing.lead_high_h - true == pytest.approx(tau * math.log(1 / (1 - b)), abs=SECOND)


@pytest.fixture(scope="module")
def sample_ship():
    return load_ship("areas_sample/ship.toml")


@pytest.mark.parametrize(("lam", "mu"), [(1.7, 0.8), (0.6, 1.3)])
def test_times_scale_exactly_with_volume_over_flow(sample_ship, lam, mu):
    """The fast path's identity: every volume × λ and every flow (consumption and pump
    rates) × μ stretch the time axis by κ = λ/μ. With the simulator's output step and
    longest step scaled by κ as well it takes the same steps, so the times agree to
    round-off; with its default steps, to its tolerance."""
    sched = schedule_at(sample_ship, circuits=["main"])
    sw = make_switch(sample_ship, "main", "vlsfo", "mgo")
    base = simulate(sample_ship, sw, sched, 3.0)
    system2, sched2 = scale_all(sample_ship, sched, lam, mu)
    kappa = lam / mu
    scaled = simulate(system2, sw, sched2, 3.0 * kappa, output_step_s=10.0 * kappa,
                      max_step_h=2.0 * kappa)
    loose = simulate(system2, sw, sched2, 3.0 * kappa)
    for level in (0.10, 0.09, 0.2):
        t = base.time_to_h("main", level)
        assert scaled.time_to_h("main", level) == pytest.approx(kappa * t, rel=1e-9)
        assert abs(loose.time_to_h("main", level) - kappa * t) < 2 * SECOND * kappa


def test_blend_curve_gives_the_flush_times_to_round_off(sample_ship):
    sched = schedule_at(sample_ship)
    for circuit in ("main", "boiler"):
        # 6 h at least: the level 0.085 % below the target is read too (a flush ends at it)
        r, s = flush(sample_ship, circuit, "vlsfo", "mgo", sched, limit_pct=LIMIT,
                     target_pct=TARGET, horizon_h=6.0)
        bc = BlendCurve.from_result(r, circuit, s.from_tank, s.to_tank)
        nominal = np.array([[f.sulphur_pct for f in bc.fuels]])
        assert bc.time_to_h(nominal, TARGET, True)[0] == pytest.approx(s.time_to_target_h,
                                                                     abs=1e-12)
        assert bc.time_to_h(nominal, LIMIT, True)[0] == pytest.approx(s.time_to_limit_h,
                                                                    abs=1e-12)
        # any other sulphur: the flushing model's own crossing on the same trace
        for level in (0.3, 0.12, 0.085):
            worst = max(c.time_at_or_below_h(level) for c in r.circuit_inlets(circuit))
            assert bc.time_to_h(nominal, level, True)[0] == pytest.approx(worst, abs=1e-12)
