"""The Monte Carlo on the sample ship: zero uncertainty, seeds, convergence, the surrogate
against brute force, rank correlation, the plan's API, and the flush command."""

from __future__ import annotations

import json

import numpy as np
import pytest
from scipy.stats import spearmanr

from planner.flushing import ConsumptionSchedule, flush, schedule_at
from planner.ship.ship_file import load_ship
from planner.uncertainty import UncertaintySpec, analyse, start_quantiles, uncertainty_json
from planner.uncertainty.sensitivity import ranks, spearman
from planner.uncertainty.surrogate import Case, run_case
from tests.helpers.cli import changeover as run
from tests.helpers.flushing import HFO_EQ, MGO_EQ, series
from tests.helpers.paths import ROOT

SHIP = ROOT / "areas_sample" / "ship.toml"
LIMIT, TARGET = 0.10, 0.09


@pytest.fixture(scope="module")
def ship():
    return load_ship(SHIP)


@pytest.fixture(scope="module")
def sched(ship):
    return schedule_at(ship)


@pytest.fixture(scope="module")
def main(ship, sched):
    return analyse(ship, "main", "vlsfo", "mgo", sched, limit_pct=LIMIT, target_pct=TARGET,
                   samples=4000, seed=11)


@pytest.mark.parametrize("circuit", ["main", "boiler"])
def test_zero_uncertainty_is_the_deterministic_flush(ship, sched, circuit):
    _, s = flush(ship, circuit, "vlsfo", "mgo", sched, limit_pct=LIMIT, target_pct=TARGET)
    u = analyse(ship, circuit, "vlsfo", "mgo", sched, limit_pct=LIMIT, target_pct=TARGET,
                spec=UncertaintySpec.zero(), samples=500, seed=1)
    assert u.simulations == 1
    assert np.all(np.abs(u.time_to_target_h - s.time_to_target_h) < 1e-12)
    assert np.all(np.abs(u.time_to_limit_h - s.time_to_limit_h) < 1e-12)
    for q in u.time_quantiles().values():
        assert q == pytest.approx(s.time_to_target_h, abs=1e-12)
    assert u.lead_at_confidence_h == pytest.approx(s.time_to_target_h, abs=1e-12)
    assert u.extra_compliant_t == 0.0
    assert u.p_compliant(s.time_to_limit_h + 1e-9) == 1.0
    assert u.p_compliant(s.time_to_limit_h - 1e-6) == 0.0
    assert u.driver is None and u.warnings == ()


def test_same_seed_same_numbers(ship, sched, main):
    again = analyse(ship, "main", "vlsfo", "mgo", sched, limit_pct=LIMIT, target_pct=TARGET,
                    samples=4000, seed=11)
    np.testing.assert_array_equal(again.time_to_target_h, main.time_to_target_h)
    np.testing.assert_array_equal(again.lead_h, main.lead_h)
    assert uncertainty_json(again) == uncertainty_json(main)
    other = analyse(ship, "main", "vlsfo", "mgo", sched, limit_pct=LIMIT, target_pct=TARGET,
                    samples=4000, seed=12)
    assert not np.array_equal(other.time_to_target_h, main.time_to_target_h)


def test_one_input_at_zero_leaves_the_others_samples(ship, sched, main):
    spec = UncertaintySpec(boundary_time_min=0.0)
    u = analyse(ship, "main", "vlsfo", "mgo", sched, limit_pct=LIMIT, target_pct=TARGET,
                spec=spec, samples=4000, seed=11)
    np.testing.assert_array_equal(u.time_to_target_h, main.time_to_target_h)
    assert np.all(u.early_h == 0.0)


def test_quantile_estimates_converge_as_samples_grow():
    # one volume, normal ±20 %: P90 known in closed form, the [LEVENSPIEL-1999] washout time
    # of the normal quantile of V (see tests/planner/uncertainty/test_closed_forms.py)
    system = series([0.5], "s", fuels=(HFO_EQ, MGO_EQ))
    sched = ConsumptionSchedule.constant({"me": 1.2}, basis="mass")
    spec = UncertaintySpec(volumes_pct=20.0, tanks_pct=0, consumption_pct=0, mixing_stagnant=0,
                           mixing_bypass=0, boundary_time_min=0, sulphur_sd_default=0)
    q = 1.2 * 1000 / 900
    from statistics import NormalDist

    p90 = (0.5 * (1 + 0.2 / 1.959964 * NormalDist().inv_cdf(0.9)) / q) * np.log(0.45 / 0.04)
    errors = {}
    for n in (250, 2500, 25000):
        errs = [analyse(system, "main", "A", "B", sched, limit_pct=LIMIT, target_pct=TARGET,
                        spec=spec, samples=n, seed=s, checks=0).time_quantiles()[0.9] - p90
                for s in range(8)]
        errors[n] = float(np.sqrt(np.mean(np.square(errs))))
    assert errors[2500] < 0.6 * errors[250]
    assert errors[25000] < 0.6 * errors[2500]
    assert errors[25000] < 2e-3  # h


def test_surrogate_against_brute_force(ship, sched, main):
    """Twelve samples simulated one by one, all their inputs at once (measured: under 4 s
    on a 93 min flush with the defaults; the bound here is 10 s)."""
    u = main
    sur_u = np.column_stack([u.samples.log_factor(*k) for k in (
        ("supply_line", "volume"), ("mixing_tank", "volume"), ("heaters", "volume"))])
    assert sur_u.shape == (4000, 3)
    fuels_s = u.samples.sulphur([ship.fuels["mgo"], ship.fuels["vlsfo"]])
    idx = np.flatnonzero(np.isfinite(u.time_to_target_h))[:12]
    nodes = [d.node for d in u.samples.defs if d.kind == "volume"]
    for i in idx:
        factors = {n: float(np.exp(u.samples.log_factor(n, "volume")[i])) for n in nodes}
        case = Case(factors, float(u.samples.values["consumption"][i]))
        curve = run_case(ship, "main", "vlsfo_service", "mgo_service", sched, 8.0, case)
        exact = curve.time_to_h(fuels_s[i:i + 1], TARGET, True)[0]
        assert abs(exact - u.time_to_target_h[i]) * 3600 < 10.0
    assert u.check.max_error_s < 10.0


def test_rank_correlation_matches_scipy():
    rng = np.random.default_rng(0)
    x = rng.normal(size=300)
    y = np.where(rng.random(300) < 0.05, np.inf, x**3 + rng.normal(size=300))
    y[:10] = 1.0  # ties
    # [SCIPY-2020] scipy.stats.spearmanr as the reference library
    assert spearman(x, y) == pytest.approx(spearmanr(x, y).statistic, abs=1e-12)
    np.testing.assert_array_equal(ranks(np.array([3.0, 1.0, 3.0, np.inf])), [2.5, 1, 2.5, 4])
    assert spearman(x, np.ones(300)) == 0.0


def test_results_hang_together(main):
    u = main
    q = u.time_quantiles()
    assert q[0.5] <= q[0.9]
    assert u.deterministic.time_to_target_h == pytest.approx(q[0.5], rel=0.05)
    ql = u.time_quantiles("limit")
    assert ql[0.5] < q[0.5] and ql[0.99] is not None
    leads = np.linspace(1.0, 3.0, 9)
    p = u.p_compliant(leads)
    assert np.all(np.diff(p) >= 0) and p[-1] > 0.999  # mgo above 0.10 % in a few
    assert u.p_compliant(u.lead_limit_at_confidence_h + 1e-9) >= 0.99
    # the 0.08 % MGO against a 0.09 % target: its test uncertainty makes 99 % unreachable
    assert u.lead_at_confidence_h is None and u.p_reached < 0.99
    assert u.driver == "sulphur mgo"
    assert any("beyond the target" in w for w in u.warnings)
    swings = {s.key: s for s in u.sensitivity.swings}
    assert swings["sulphur:mgo"].lead_high_h is None
    assert swings["consumption"].lead_high_h < swings["consumption"].lead_low_h
    assert swings["boundary"].swing_h == pytest.approx(0.5, abs=1e-9)  # ± 15 min


def test_extra_compliant_fuel_is_the_lead_gap_at_the_steady_burn(ship, sched):
    u = analyse(ship, "main", "vlsfo", "mgo", sched, limit_pct=LIMIT, target_pct=TARGET,
                spec=UncertaintySpec(sulphur_sd_default=0.002), samples=3000, seed=2,
                confidence=0.95)
    assert u.lead_at_confidence_h > u.lead_p50_h
    mgo = ship.fuels["mgo"]
    rate = sum(sched.rates_t_h[c][0] for c in ship.circuits["main"].consumers) * 42.7 / mgo.q_net
    assert u.compliant_rate_t_h == pytest.approx(rate)
    assert u.extra_compliant_t == pytest.approx((u.lead_at_confidence_h - u.lead_p50_h) * rate)
    lo, hi = u.lead_at_confidence_interval_h
    assert lo <= u.lead_at_confidence_h <= hi


def test_start_quantiles_for_the_plan(ship, sched):
    spec = UncertaintySpec(sulphur_sd_default=0.002)
    r = start_quantiles(ship, "main", "vlsfo", "mgo", sched, LIMIT, TARGET, 0.95, 2000, 4, spec)
    p50, conf, driver, *_ = r
    assert p50 < conf and driver == r.analysis.driver
    assert r.lead_conf_limit_h < conf
    calls = []

    def by_lead(lead_h):
        calls.append(lead_h)
        return sched

    r2 = start_quantiles(ship, "main", "vlsfo", "mgo", by_lead, LIMIT, TARGET, 0.95, 2000, 4,
                         spec)
    assert calls[0] == 0.0 and len(calls) >= 2
    assert r2.lead_conf_h == pytest.approx(r.lead_conf_h)




def test_flush_command_json_and_chart(tmp_path):
    png = tmp_path / "sens.png"
    r = run("flush", str(SHIP), "--json", "--confidence", "0.9", "--samples", "1000",
            "--seed", "3", "--sensitivity-chart", str(png))
    assert r.returncode == 0, r.stderr
    doc = json.loads(r.stdout)
    for c in doc["circuits"]:
        assert {"name", "time_to_limit_h", "curve"} <= set(c)
        u = c["uncertainty"]
        assert u["confidence"] == 0.9 and u["samples"] == 1000 and u["seed"] == 3
        assert set(u["time_to_target_h"]) == {"p50", "p90", "p99"}
        for key in ("lead_p50_h", "lead_at_confidence_h", "time_to_target_at_confidence_h",
                    "extra_compliant_t", "driver", "swings", "rank_correlation", "check",
                    "inputs", "p_compliant_at_boundary", "lead_limit_at_confidence_h"):
            assert key in u
        assert u["extra_compliant_t"] >= 0.0
    assert png.read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"


def test_flush_command_unchanged_without_confidence():
    r = run("flush", str(SHIP), "--json", "--circuit", "boiler")
    assert r.returncode == 0, r.stderr
    assert "uncertainty" not in json.loads(r.stdout)["circuits"][0]


def test_flush_command_text_and_refusals():
    r = run("flush", str(SHIP), "--circuit", "boiler", "--confidence", "0.95", "--samples",
            "500")
    assert r.returncode == 0, r.stderr
    assert "Uncertainty at confidence 95 %" in r.stdout and "Main driver" in r.stdout
    bad = run("flush", str(SHIP), "--confidence", "1.5")
    assert bad.returncode == 2 and "--confidence" in bad.stderr and bad.stdout == ""
