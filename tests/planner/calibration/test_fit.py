"""The fit recovers a known ship from a synthetic trend, and refuses what a trend cannot tell.

Synthetic trends (``tests/helpers/trends.py``): the true system is the sample
ship; its blend at the inlet by the flushing simulation, turned into viscosity
at a falling temperature by the published rules applied forwards ([ASTM-D341]
for each fuel, [MAPLES-2000] Refutas for the blend), with 1 % reading noise, a
gap of 12 minutes and a spike. The ship file given to the fit has every
pipe and the mixing tank 30 % too large, and the small loop volumes (heaters,
filter) 8 % too large: within the ship file's own ±10 %, which is the spread
their kept values carry into the intervals. The fitted volumes must come back
with the truth inside their 95 % intervals ([BATES-WATTS-1988] covariance from
the Jacobian, [SCIPY-LSQ] fit).
"""

from __future__ import annotations

from datetime import UTC, datetime, timedelta

import numpy as np
import pytest

from planner.calibration import (
    CalibrationError,
    Changeover,
    Trend,
    calibrate,
    parameters,
    prior_sd,
    time_to_target,
)
from planner.flushing import schedule_at
from planner.ship.ship_file import load_ship
from planner.uncertainty import load_uncertainty
from planner.uncertainty.model import perturbed
from tests.helpers.paths import ROOT
from tests.helpers.trends import SWITCH_UTC, inlet_trend

TRUE = load_ship(ROOT / "areas_sample" / "ship.toml")
MAIN = [n for n in TRUE.circuits["main"].volume_names if n in TRUE.volumes]
ERROR = {n: 1.08 if n in ("heaters", "filter") else 1.3 for n in MAIN}
SHIP_FILE = perturbed(TRUE, ERROR)  # what the drawings say
SPEC = load_uncertainty(ROOT / "areas_sample" / "ship.toml")
CHANGE = Changeover("main", "vlsfo_service", "mgo_service", "main_engine", schedule_at(SHIP_FILE))


def _trend(end_h: float = 3.0, seed: int = 1, step_min: float = 1.0, **kw) -> Trend:
    t, temp, nu = inlet_trend(TRUE, end_h=end_h, seed=seed, step_min=step_min, **kw)
    keep = t >= 0.0
    return Trend("synthetic.csv", SWITCH_UTC + timedelta(days=seed), t[keep], temp[keep],
                 nu[keep])


@pytest.fixture(scope="module")
def one_trend():
    tr = _trend()
    return tr, _fit([tr])


def _fit(trends, names=None, explicit=False, circuit="main", changes=None):
    params = parameters(SHIP_FILE, circuit, names)
    every = parameters(SHIP_FILE, circuit, None)
    return calibrate(SHIP_FILE, changes or [CHANGE] * len(trends), trends, params, explicit,
                     prior_sd(SHIP_FILE, SPEC, every + params))


def test_true_volumes_inside_the_reported_intervals(one_trend):
    tr, cal = one_trend
    assert [f.parameter.name for f in cal.fitted] == ["pipes", "mixing_tank"]
    for f in cal.fitted:
        true = sum(TRUE.volumes[n].volume_m3 for n in f.parameter.nodes)
        assert f.low < true < f.high, (f.parameter.name, f.low, true, f.high)
        assert f.parameter.ship_value == pytest.approx(1.3 * true)
        # and the ship file's value is far outside: the trend did move the fit
        assert not f.low < f.parameter.ship_value < f.high
    # the small, fast loop volumes move the curve by less than the noise: kept and said so
    assert {p.name for p, _ in cal.kept} == {"heaters", "filter"}
    assert all("cannot tell" in why for _, why in cal.kept)
    # the spike (a reading ×6) is left out; the gap (0.8-1.0 h) is simply absent
    (s,) = cal.series
    assert s.spike.sum() == 1 and abs(tr.time_h[s.spike][0] - 0.5) < 0.01
    assert not np.any((tr.time_h > 0.81) & (tr.time_h < 0.99))
    # residuals at the reading noise (1 % in viscosity ≈ 0.4-0.6 % of the blend here)
    assert 0.5 * cal.noise_sd < cal.residual_sd < 1.5 * cal.noise_sd


def test_time_to_target_fitted_against_ship_file(one_trend):
    _, cal = one_trend
    ttt = time_to_target(SHIP_FILE, cal, CHANGE, 0.10, 0.09)
    from planner.flushing import flush

    _, true = flush(TRUE, "main", "vlsfo_service", "mgo_service", schedule_at(TRUE),
                    limit_pct=0.10, target_pct=0.09)
    assert ttt.ship_h > ttt.fitted_h  # the ship file's volumes are too large: later
    assert ttt.fitted_low_h < true.time_to_target_h < ttt.fitted_high_h


def test_several_trends_fit_together_and_narrow_the_interval(one_trend):
    _, cal1 = one_trend
    trends = [_trend(seed=1), _trend(seed=2, end_h=2.5, spike_at_h=None)]
    cal2 = _fit(trends)
    assert len(cal2.series) == 2
    for f1, f2 in zip(cal1.fitted, cal2.fitted, strict=True):
        true = sum(TRUE.volumes[n].volume_m3 for n in f2.parameter.nodes)
        assert f2.low < true < f2.high
        assert f2.sd_log < f1.sd_log  # more readings, a tighter fit


def test_a_trend_that_ends_before_the_blend_moves_is_refused():
    tr = _trend(end_h=0.05, step_min=0.25, spike_at_h=None, gap_h=None)
    with pytest.raises(CalibrationError, match="too little information: the trend ends 3 min"):
        _fit([tr])


def test_a_named_parameter_the_trend_cannot_tell_is_refused():
    with pytest.raises(CalibrationError, match="too little information for filter"):
        _fit([_trend(end_h=1.5)], ["mixing_tank", "filter"], explicit=True)


def test_consumption_and_every_volume_together_cannot_be_told_apart():
    # boiler circuit: one pipe and one stirred volume fed at the consumption only, so all
    # volumes ×λ and the consumption ×λ give the same curve (time scales by V/q): JᵀJ singular
    change = Changeover("boiler", "vlsfo_service", "mgo_service", "aux_boiler",
                        schedule_at(SHIP_FILE))
    t, temp, nu = inlet_trend(TRUE, circuit="boiler", inlet="aux_boiler", end_h=1.5)
    keep = t >= 0
    tr = Trend("b.csv", datetime(2027, 1, 1, tzinfo=UTC), t[keep], temp[keep], nu[keep])
    with pytest.raises(CalibrationError, match="too little information for"):
        _fit([tr], ["pipes", "burner_heater", "consumption"], True, "boiler", [change])


def test_parameter_names_are_checked():
    with pytest.raises(ValueError, match="not a parameter"):
        parameters(SHIP_FILE, "main", ["pumps"])
    with pytest.raises(ValueError, match="beside 'pipes'"):
        parameters(SHIP_FILE, "main", ["pipes", "supply_line"])


def test_a_logged_load_is_followed():
    # the engine slows from 85 % to 40 % MCR 30 min after the switch: the flush slows with
    # the consumption. With the load logged the truth is found; assuming the reference load
    # throughout, the fit must stretch the volumes instead (truth outside its intervals)
    from planner.calibration.model import logged_schedule

    t = np.arange(0.0, 3.0, 1 / 60)
    load = np.where(t < 0.5, 85.0, 40.0)
    sched = logged_schedule(TRUE, "main", t, load)
    assert sched.times_h[:4] == pytest.approx([0.0, 1 / 6, 2 / 6, 3 / 6])
    tt, temp, nu = inlet_trend(TRUE, end_h=3.0, schedule=sched, start_h=0.0)
    tr = Trend("load.csv", SWITCH_UTC, tt, temp, nu)
    with_load = Changeover("main", "vlsfo_service", "mgo_service", "main_engine",
                           logged_schedule(SHIP_FILE, "main", t, load))
    good = _fit([tr], changes=[with_load])
    mix = next(f for f in good.fitted if f.parameter.name == "mixing_tank")
    pipes = next(f for f in good.fitted if f.parameter.name == "pipes")
    assert mix.low < 0.5 < mix.high
    assert pipes.low < sum(TRUE.volumes[n].volume_m3 for n in pipes.parameter.nodes) < pipes.high
    try:  # the wrong consumption: refused (a parameter undetermined) or the truth outside
        bad = _fit([tr])
    except CalibrationError:
        return
    mix = next(f for f in bad.fitted if f.parameter.name == "mixing_tank")
    assert not mix.low < 0.5 < mix.high
