"""The calibrated ship file loads back with the fitted values, and its Monte Carlo narrows.

The written file goes through the ship loader and the ``[uncertainty]`` reader
the planner uses; the Monte Carlo (``planner.uncertainty.analyse``) of the
calibrated file must give a narrower spread of the time to target than the ship
file's default ±10 % on every volume (the fit's spread, from the Jacobian
[BATES-WATTS-1988], replaces it for the fitted volumes).
"""

from __future__ import annotations

from dataclasses import replace
from datetime import UTC, datetime

import numpy as np
import pytest

from planner.calibration import calibrated_text
from planner.flushing import schedule_at
from planner.ship.ship_file import load_ship
from planner.uncertainty import analyse, load_uncertainty
from tests.helpers.paths import ROOT
from tests.planner.calibration.test_fit import SPEC, _fit, _trend

SAMPLE = ROOT / "areas_sample" / "ship.toml"


@pytest.fixture(scope="module")
def written(tmp_path_factory):
    cal = _fit([_trend()])
    # the sample ship's own text, calibrated (the fit was against SHIP_FILE's values: the
    # sample text is the same layout, so the factors apply to its volumes alike)
    sample = load_ship(SAMPLE)
    text = calibrated_text(SAMPLE.read_text(encoding="utf-8"), "new.toml", sample, SPEC, cal,
                           ["synthetic.csv"], datetime(2027, 6, 1, tzinfo=UTC))
    path = tmp_path_factory.mktemp("cal") / "new.toml"
    path.write_text(text, encoding="utf-8")
    return cal, sample, path, text


def test_the_written_file_loads_back_with_the_fitted_volumes(written):
    cal, sample, path, text = written
    new = load_ship(path)
    for f in cal.fitted:
        for n in f.parameter.nodes:
            assert new.volumes[n].volume_m3 == pytest.approx(
                sample.volumes[n].volume_m3 * f.factor, rel=1e-5)
    assert new.volumes["heaters"].volume_m3 == sample.volumes["heaters"].volume_m3
    assert text.startswith("# Calibrated by `changeover calibrate` on 2027-06-01")
    assert "synthetic.csv" in text.splitlines()[0]
    assert "# before calibration: volume_m3 = 0.5" in text
    spec = load_uncertainty(path, new)
    mix = next(f for f in cal.fitted if f.parameter.name == "mixing_tank")
    assert spec.volume_pct("mixing_tank") == pytest.approx(100 * 1.96 * mix.sd_log, abs=0.06)
    assert spec.volume_pct("heaters") == 10.0  # not fitted: the default stays


def _spread(system, spec):
    # sulphur held exact, so every sample reaches the target and the spread is the flushing's
    spec = replace(spec, sulphur_sd_default=0.0)
    u = analyse(system, "main", "vlsfo_service", "mgo_service", schedule_at(system),
                limit_pct=0.10, target_pct=0.09, spec=spec, samples=2000, seed=0)
    t = u.time_to_target_h
    p2, p50, p97 = np.percentile(t, [2.5, 50, 97.5])
    return (p97 - p2) / p50


def test_the_confidence_spread_narrows_with_the_calibrated_file(written):
    _, sample, path, _ = written
    before = _spread(sample, load_uncertainty(SAMPLE, sample))
    after = _spread(load_ship(path), load_uncertainty(path, load_ship(path)))
    # default ±10 % on the mixing tank, which sets the flush, against the fit's ±1-3 %;
    # the mixing parts (uniform to 10 %) and consumption (±5 %) stay in both
    assert np.isfinite(before) and after < 0.8 * before, (before, after)
