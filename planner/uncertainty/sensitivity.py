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

Vectorised: the lead's ranks are found once for every input, ties are found
on the sorted samples (no second sort), and the swings' ends are evaluated by
the surrogate in one batch (each end's sulphur level θ* on its own row, as
before, so every figure is the one the sample-by-sample evaluation gives).

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
    n = len(x)
    order = np.argsort(x)  # any order among ties: their ranks are averaged below
    r = np.empty(n)
    r[order] = np.arange(1, n + 1)
    xs = x[order]
    new = np.empty(n, dtype=bool)
    new[:1] = True
    np.not_equal(xs[1:], xs[:-1], out=new[1:])
    if n and np.isnan(xs[-1]):  # NaNs sort last and count as one value, as np.unique has it
        new[1:] &= ~(np.isnan(xs[1:]) & np.isnan(xs[:-1]))
    if new.all():
        return r
    first = np.flatnonzero(new)
    last = np.append(first[1:], n) - 1
    mean = (first + last + 2) / 2.0  # mean of the ranks first + 1 … last + 1 (exact)
    r[order] = mean[np.cumsum(new) - 1]
    return r


def _centred_ranks(x: np.ndarray) -> np.ndarray:
    """:func:`ranks` of ``x`` less their mean."""
    r = ranks(x)
    return r - r.mean()


def _correlation(rx: np.ndarray, ry: np.ndarray) -> float:
    """Pearson's correlation [-] of centred ranks; 0 when either is constant."""
    den = float(np.sqrt((rx @ rx) * (ry @ ry)))
    return float(rx @ ry / den) if den > 0.0 else 0.0


def spearman(x: np.ndarray, y: np.ndarray) -> float:
    """Spearman's rank correlation [-] of ``x`` and ``y``; 0 when either is constant."""
    return _correlation(_centred_ranks(x), _centred_ranks(y))


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
    uncertain = [d for d in samples.defs if d.uncertain]
    leads = iter(swing_leads(surrogate, samples.defs, level_pct, down))
    swings = []
    for d in uncertain:
        low, high = _h(next(leads)), _h(next(leads))
        exact = _exact(surrogate, d, d.low) and _exact(surrogate, d, d.high)
        swings.append(Swing(d.key, d.label, d.unit, d.low, d.high, low, high, exact))
    swings.sort(key=lambda s: -(np.inf if s.swing_h is None else s.swing_h))
    ry = _centred_ranks(lead)
    rho = {d.key: _correlation(_centred_ranks(samples.values[d.key]), ry) for d in uncertain}
    return Sensitivity(tuple(swings), rho, {d.key: d.label for d in samples.defs})


def swing_leads(surrogate: Surrogate, defs: tuple[InputDef, ...], level_pct: float,
                down: bool) -> np.ndarray:
    """The lead [h] with one uncertain input at its low and then its high end, the others
    nominal, for each uncertain input of ``defs`` in order: ``[low₁, high₁, low₂, …]``.

    One batch through the surrogate; each end's level θ* comes from its own one-row
    sulphur sample, so each lead is the one :func:`lead_of` gives for that end alone.

    Parameters
    ----------
    surrogate : Surrogate
    defs : tuple of InputDef
        The inputs.
    level_pct : float [% m/m]
        The level the leads are to.
    down : bool
        True going to compliant fuel (at or below the level).
    """
    ends = [one_at_a_time(defs, d.key, v) for d in defs if d.uncertain for v in (d.low, d.high)]
    if not ends:
        return np.zeros(0)
    fuels = surrogate.nominal.fuels
    theta = np.concatenate([surrogate.nominal.levels(e.sulphur(fuels), level_pct, down)
                            for e in ends])
    batch = Samples(defs, {d.key: np.concatenate([e.values[d.key] for e in ends])
                           for d in defs}, len(ends), None)
    return surrogate.time_h(theta, surrogate.u(batch)) + batch.early_h
