"""Sample quantiles with samples that never reach the level (inf): never a huge number.

Expected values against ``numpy.quantile`` on the finite samples ([HYNDMAN-FAN-1996]
definition 7, numpy's default, a reference library) and by hand: h = (n − 1)·p.
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from planner.uncertainty.montecarlo import quantile

INF = math.inf


def test_quantile_interpolating_towards_a_sample_not_reached_is_not_reached():
    # 10 samples, one not reached: h = 9·p lies between the 9th (8.0) and the not-reached
    # 10th for p > 8/9; interpolating towards a 1e300 marker gave 8 + 0.09·1e300 ≈ 9e298 at
    # p = 8/9 + 0.01, a "time" that passed a 1e299 test (hand calculation).
    x = np.array([0.0, 1, 2, 3, 4, 5, 6, 7, 8, INF])
    assert quantile(x, 0.95) is None
    assert quantile(x, 8.0 / 9.0 + 0.01) is None     # h = 8.09: weight 0.09 on the inf sample
    assert quantile(x, 1.0) is None


def test_quantile_just_at_the_last_reached_sample_is_that_sample():
    x = np.array([0.0, 1, 2, 3, 4, 5, 6, 7, 8, INF])
    assert quantile(x, 8.0 / 9.0) == pytest.approx(8.0)   # h = 8 exactly, hand calculation


@pytest.mark.parametrize("p", [0.0, 0.1, 0.5, 0.73, 0.88])
def test_quantile_below_the_not_reached_samples_matches_numpy(p):
    rng = np.random.default_rng(3)
    finite = np.sort(rng.normal(5.0, 1.0, 99))
    x = np.concatenate([finite, [INF]])
    rng.shuffle(x)
    # numpy's "linear" quantile of the whole set equals the same of the finite samples with
    # the largest replaced by anything ≥ it, as long as h < 98 (hand reasoning: only order
    # statistics 0..98 enter)
    expected = float(np.quantile(np.concatenate([finite, [finite[-1] + 1.0]]), p))
    assert quantile(x, p) == pytest.approx(expected, rel=1e-12)


def test_quantile_of_no_reached_sample_and_nan_are_not_reached():
    assert quantile(np.array([INF, INF]), 0.5) is None
    assert quantile(np.array([1.0, np.nan]), 0.5) is None
    assert quantile(np.array([]), 0.5) is None
    assert quantile(np.array([2.0, 4.0]), 0.5) == pytest.approx(3.0)
