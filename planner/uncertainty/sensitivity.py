"""Which input moves the changeover start most: one-at-a-time swings and rank correlations.

- **Swing**: every input at its nominal value but one, set to the low and then
  the high end of its 95 % range (the ends of a uniform mixing range); the
  lead needed (time to target, plus the boundary offset) at each. Exact for
  sulphur, the boundary time, and any input whose end is a fit point of the
  surrogate (pipes, tanks, consumption; stirred volumes without mixing
  uncertainty); interpolated by the surrogate otherwise (``exact`` False).
- **Rank correlation**: Spearman's ρ of each input's samples with the samples
  of the lead (the Pearson correlation of their ranks, ties given their mean
  rank; samples that never reach the target rank highest), computed with numpy
  (checked against ``scipy.stats.spearmanr`` in the tests, [SCIPY-2020]).

The **main driver** is the input with the largest |ρ|: it accounts for each
input's actual spread, where a swing shows only its ends.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from planner.uncertainty.sampling import InputDef, Samples, one_at_a_time
from planner.uncertainty.surrogate import Surrogate


def ranks(x: np.ndarray) -> np.ndarray:
    """Ranks 1..n [-] of ``x``, ties given the mean of their ranks (inf ranks highest).

    Examples
    --------
    >>> ranks(np.array([3.0, 1.0, 3.0, np.inf])).tolist()
    [2.5, 1.0, 2.5, 4.0]
    """
    x = np.asarray(x, dtype=float)
    order = np.argsort(x, kind="mergesort")
    r = np.empty(len(x))
    r[order] = np.arange(1, len(x) + 1)
    _, inverse, counts = np.unique(x, return_inverse=True, return_counts=True)
    if len(counts) == len(x):
        return r
    sums = np.bincount(inverse, weights=r)
    return (sums / counts)[inverse]


def spearman(x: np.ndarray, y: np.ndarray) -> float:
    """Spearman's rank correlation [-] of ``x`` and ``y``; 0 when either is constant."""
    rx, ry = ranks(x), ranks(y)
    rx, ry = rx - rx.mean(), ry - ry.mean()
    den = float(np.sqrt((rx @ rx) * (ry @ ry)))
    return float(rx @ ry / den) if den > 0.0 else 0.0


@dataclass(frozen=True)
class Swing:
    """The lead needed with one input at each end of its range (h; None: not reached)."""

    key: str
    label: str
    unit: str
    low: float
    high: float
    lead_low_h: float | None
    lead_high_h: float | None
    exact: bool

    @property
    def swing_h(self) -> float | None:
        """|lead at high − lead at low|, h (None when either end is not reached)."""
        if self.lead_low_h is None or self.lead_high_h is None:
            return None
        return abs(self.lead_high_h - self.lead_low_h)


@dataclass(frozen=True)
class Sensitivity:
    """Swings (largest first; unreached ends first of all) and rank correlations by input."""

    swings: tuple[Swing, ...]
    rank_correlation: dict[str, float]
    labels: dict[str, str]

    @property
    def driver(self) -> str | None:
        """Key of the input with the largest |ρ| (None if nothing varies)."""
        if not self.rank_correlation:
            return None
        key = max(self.rank_correlation, key=lambda k: abs(self.rank_correlation[k]))
        return key if self.rank_correlation[key] != 0.0 else None

    @property
    def driver_label(self) -> str | None:
        """Label of :attr:`driver` (e.g. ``"sulphur mgo"``)."""
        return None if self.driver is None else self.labels[self.driver]


def time_of(surrogate: Surrogate, samples: Samples, level_pct: float, down: bool) -> np.ndarray:
    """Time from the switch to ``level_pct`` [% m/m] of each sample, h (inf: not reached).

    At or below the level when ``down`` (to compliant fuel), else at or above.
    """
    fuels = surrogate.nominal.fuels
    theta = surrogate.nominal.levels(samples.sulphur(fuels), level_pct, down)
    return surrogate.time_h(theta, surrogate.u(samples))


def lead_of(surrogate: Surrogate, samples: Samples, level_pct: float, down: bool) -> np.ndarray:
    """Lead needed (time to ``level_pct`` [% m/m] plus the boundary offset) of each sample, h."""
    return time_of(surrogate, samples, level_pct, down) + samples.early_h


def _exact(surrogate: Surrogate, d: InputDef, value: float) -> bool:
    """Whether the surrogate is exact with ``d`` alone at ``value``: a fit point of its axis."""
    if d.kind in ("sulphur", "boundary"):
        return True
    if d.kind in ("stagnant", "bypass"):
        return False
    node = d.node if d.kind != "consumption" else None
    for ax in surrogate.axes:
        if ax.node == node and ax.kind == ("volume" if d.kind == "volume" else d.kind):
            u = float(np.log(max(value, 1e-12)))
            return bool(np.isclose(u, ax.lo, atol=1e-12) or np.isclose(u, ax.hi, atol=1e-12))
    return False


def _h(x: float) -> float | None:
    """``x`` as a float, None when it is not finite (not reached)."""
    return float(x) if np.isfinite(x) else None


def sensitivity(surrogate: Surrogate, samples: Samples, lead: np.ndarray, level_pct: float,
                down: bool) -> Sensitivity:
    """Swings of every uncertain input and the rank correlation of its samples with ``lead``.

    Parameters
    ----------
    surrogate : Surrogate
    samples : Samples
    lead : ndarray (n,) [h]
        Each sample's lead (inf: not reached).
    level_pct : float [% m/m]
        The level the swings' leads are to (the target).
    down : bool
        True going to compliant fuel (at or below the level).

    Returns
    -------
    Sensitivity
        Swings [h], largest first; Spearman's ρ [-] by input key.
    """
    swings = []
    for d in samples.defs:
        if not d.uncertain:
            continue
        ends = []
        for value in (d.low, d.high):
            one = one_at_a_time(samples.defs, d.key, value)
            ends.append(_h(lead_of(surrogate, one, level_pct, down)[0]))
        exact = _exact(surrogate, d, d.low) and _exact(surrogate, d, d.high)
        swings.append(Swing(d.key, d.label, d.unit, d.low, d.high, ends[0], ends[1], exact))
    swings.sort(key=lambda s: -(np.inf if s.swing_h is None else s.swing_h))
    rho = {d.key: spearman(samples.values[d.key], lead) for d in samples.defs if d.uncertain}
    return Sensitivity(tuple(swings), rho, {d.key: d.label for d in samples.defs})
