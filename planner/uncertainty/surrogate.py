"""A surrogate of the flushing model: few simulations give the time to target of many samples.

What is exact and what is approximated:

- **exact** (to round-off, :class:`~planner.uncertainty.model.BlendCurve`):
  the time to any sulphur level for any sulphur of the fuels, from one
  simulation; and the boundary-time offset, which simply adds;
- **exact** (in the model): a common factor κ on every volume over every flow
  stretches the time axis by κ (:func:`~planner.uncertainty.model.scale_all`);
- **exact along each axis at its fit points**: each uncertain node (its
  effective volume), tank sounding and the consumption factor is an axis
  ``u = ln(factor)``; the model is simulated at the nominal and at two points
  per axis (the 95 % ends of the factor, combined with the mixing ends for a
  stirred volume): 1 + 2·A simulations, each giving the whole blend curve;
- **approximated**: between and beyond those points, and across axes. For each
  sample, at the sample's own level θ*, ``ln T = ln T₀ + Σⱼ Pⱼ(uⱼ) − (κ/2)·
  Σⱼ≠ₖ αⱼαₖuⱼuₖ`` with Pⱼ(u) = αⱼu + βⱼu² the quadratic through the axis's three
  points (``Pⱼ(0) = 0`` exactly). The cross terms between volume axes take the
  form they have when times add up (delays and time constants in series,
  ``ln Σ τⱼ·e^{uⱼ}``: −αⱼαₖ), with κ set so that the surrogate keeps the exact
  scaling (all volumes × λ ⇒ ln T + ln λ, no curvature along that direction);
  cross terms with the consumption axis (its pump rates stay) are left out.
  Measured on the sample ship's main circuit (default inputs, 100 samples
  simulated one by one): rms 1.4 s, at most 13 s (relative 1e-3) on flushes of
  1.2-3.8 h; without the cross terms the largest error was 17 s on 40 samples
  where it is now 3 s. The tests and every run's check (a few samples
  simulated exactly) measure the error.
"""

from __future__ import annotations

from collections.abc import Callable, Sequence
from dataclasses import dataclass

import numpy as np

from planner.flushing import (
    ConsumptionSchedule,
    FlushError,
    FlushResult,
    Switch,
    make_switch,
    simulate,
)
from planner.ship.system import FuelSystem
from planner.uncertainty.model import BlendCurve, perturbed, scaled_schedule
from planner.uncertainty.sampling import InputDef, Samples, fit_points

Progress = Callable[[int, int], None]
Simulator = Callable[[FuelSystem, Switch, ConsumptionSchedule, float], FlushResult]
"""``(system, switch, schedule, horizon_h) -> FlushResult``: :func:`planner.flushing.simulate`
with its default options, or a caller's remembering stand-in for it (the voyage plan's
:class:`planner.voyage.flush_cache.FlushCache`)."""


@dataclass(frozen=True)
class Axis:
    """One simulated axis: ``kind`` ``"volume"``, ``"tank"`` or ``"consumption"``, its node
    (None for consumption), and the ln-factor fit points ``lo < 0 < hi`` [-]."""

    kind: str
    node: str | None
    lo: float
    hi: float


def axes_for(defs: Sequence[InputDef]) -> tuple[Axis, ...]:
    """The simulated axes of a circuit's uncertain inputs.

    Parameters
    ----------
    defs : sequence of InputDef
        The circuit's inputs (:func:`~planner.uncertainty.sampling.input_defs`).

    Returns
    -------
    tuple of Axis
        One per pipe or stirred volume whose volume or mixing is uncertain,
        per uncertain tank sounding, and the consumption if uncertain; the fit
        points from :func:`~planner.uncertainty.sampling.fit_points` [-].
    """
    by_key = {d.key: d for d in defs}
    out = []
    for d in defs:
        if d.kind == "volume":
            st, by = by_key.get(f"stagnant:{d.node}"), by_key.get(f"bypass:{d.node}")
            if d.uncertain or (st and st.uncertain) or (by and by.uncertain):
                out.append(Axis("volume", d.node, *fit_points(d, st, by)))
        elif d.kind in ("tank", "consumption") and d.uncertain:
            out.append(Axis(d.kind, d.node, *fit_points(d)))
    return tuple(out)


@dataclass(frozen=True)
class Case:
    """What one simulation runs: volume or tank factors by node [-], the consumption factor [-]."""

    factors: dict[str, float]
    consumption: float = 1.0


def case_for(axis: Axis, u: float) -> Case:
    """The case at ln-factor ``u`` [-] along one axis, every other input nominal."""
    if axis.kind == "consumption":
        return Case({}, float(np.exp(u)))
    return Case({axis.node: float(np.exp(u))})


def run_case(system: FuelSystem, circuit: str, from_tank: str, to_tank: str,
             schedule: ConsumptionSchedule, horizon_h: float, case: Case, *,
             simulator: Simulator | None = None) -> BlendCurve:
    """Simulate one case of a changeover and return its blend curve.

    Parameters
    ----------
    system : FuelSystem
    circuit, from_tank, to_tank : str
        The changeover (tank names).
    schedule : ConsumptionSchedule
        Nominal rates [t/h]; times the case's consumption factor.
    horizon_h : float [h]
        Simulated time after the switch.
    case : Case
        Node factors [-] and consumption factor [-].
    simulator : Simulator, optional
        What runs the simulation (default :func:`planner.flushing.simulate`).

    Returns
    -------
    BlendCurve
        θ(t) at each distinct inlet (exact for every sulphur level, to round-off).

    Raises
    ------
    FlushError
        When the perturbed system cannot run the changeover that long.
    """
    sys_ = perturbed(system, case.factors) if case.factors else system
    sw = make_switch(sys_, circuit, from_tank, to_tank)
    result = (simulator or simulate)(sys_, sw, scaled_schedule(schedule, case.consumption),
                                     horizon_h)
    return BlendCurve.from_result(result, circuit, from_tank, to_tank)


def run_cases(system: FuelSystem, circuit: str, from_tank: str, to_tank: str,
              schedule: ConsumptionSchedule, horizon_h: float, min_horizon_h: float,
              cases: Sequence[Case], progress: Progress | None = None,
              done: int = 0, total: int | None = None, *,
              simulator: Simulator | None = None) -> tuple[list[BlendCurve], float]:
    """Simulate every case to one horizon, halved while a case cannot run that long.

    Parameters
    ----------
    system : FuelSystem
    circuit, from_tank, to_tank : str
        The changeover (tank names).
    schedule : ConsumptionSchedule
        Nominal rates [t/h].
    horizon_h : float [h]
        First horizon tried.
    min_horizon_h : float [h]
        Shortest horizon: below it the FlushError (a tank running dry) passes on.
    cases : sequence of Case
    progress : callable (done, total), optional
        Called after each simulation.
    done, total : int [-]
        Simulations done before these, and in all (default: ``done + len(cases)``).
    simulator : Simulator, optional
        What runs each simulation (default :func:`planner.flushing.simulate`).

    Returns
    -------
    curves : list of BlendCurve
        One per case.
    horizon_h : float [h]
        The horizon they share.
    """
    total = total if total is not None else done + len(cases)
    while True:
        try:
            curves = []
            for i, case in enumerate(cases):
                curves.append(run_case(system, circuit, from_tank, to_tank, schedule, horizon_h,
                                       case, simulator=simulator))
                if progress:
                    progress(done + i + 1, total)
            return curves, horizon_h
        except FlushError:
            if horizon_h / 2.0 < min_horizon_h:
                raise
            horizon_h /= 2.0


@dataclass(frozen=True, eq=False)
class Surrogate:
    """The nominal blend curve and, per axis, the curves at its two fit points."""

    nominal: BlendCurve
    axes: tuple[Axis, ...]
    lo: tuple[BlendCurve, ...]
    hi: tuple[BlendCurve, ...]
    horizon_h: float
    complete: bool = True  # every node that reaches the inlets is an axis

    @property
    def simulations(self) -> int:
        """Number of simulations it took: the nominal and two per axis."""
        return 1 + 2 * len(self.axes)

    def u(self, samples: Samples) -> np.ndarray:
        """The samples' ln-factors on every axis (n, A) [-]."""
        cols = [samples.log_factor(a.node, a.kind) for a in self.axes]
        return np.column_stack(cols) if cols else np.zeros((samples.n, 0))

    def time_h(self, theta_level: np.ndarray, u: np.ndarray) -> np.ndarray:
        """Time to each sample's level θ* (n,) [-] for its ln-factors ``u`` (n, A) [-], h.

        ``ln T = ln T₀ + Σⱼ Pⱼ(uⱼ) − (κ/2)·Σⱼ≠ₖ αⱼαₖuⱼuₖ`` (the module docstring);
        inf when the level is not reached by the horizon at the nominal or at
        a fit point the sample needs. The samples are taken in the order of their
        levels (each curve's search is then about four times faster) and given
        back in theirs; every sample's time is computed alone, element by element.
        """
        lv = np.asarray(theta_level, dtype=float)
        if lv.ndim != 1 or lv.size < 2:
            return self._time_h(lv, u)
        order = np.argsort(lv)
        out = np.empty(lv.shape)
        out[order] = self._time_h(lv[order], np.asarray(u)[order])
        return out

    def _time_h(self, lv: np.ndarray, u: np.ndarray) -> np.ndarray:
        """:meth:`time_h` of levels ``lv`` (n,) [-] and ln-factors ``u`` (n, A) [-], h."""
        t0 = self.nominal.time_at_h(lv)
        total = np.zeros(lv.shape)
        bad = ~np.isfinite(t0)
        lin = np.zeros(lv.shape)  # Σ αⱼuⱼ over the volume axes
        sq = np.zeros(lv.shape)  # Σ (αⱼuⱼ)²
        curv = np.zeros(lv.shape)  # Σ 2βⱼ
        a_sum = np.zeros(lv.shape)
        a_sq = np.zeros(lv.shape)
        with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
            for j, ax in enumerate(self.axes):
                t_lo, t_hi = self.lo[j].time_at_h(lv), self.hi[j].time_at_h(lv)
                d_lo, d_hi = np.log(t_lo / t0), np.log(t_hi / t0)
                a, b = ax.lo, ax.hi
                alpha, beta = _quadratic(d_lo, d_hi, a, b)
                ok = np.isfinite(alpha) & np.isfinite(beta)
                alpha, beta = np.where(ok, alpha, 0.0), np.where(ok, beta, 0.0)
                x = u[:, j]
                bad |= (x != 0.0) & ~ok
                total += np.where(x != 0.0, (alpha + beta * x) * x, 0.0)
                if ax.kind != "consumption":
                    lin += alpha * x
                    sq += (alpha * x) ** 2
                    curv += 2.0 * beta
                    a_sum += alpha
                    a_sq += alpha**2
            kappa = self._kappa(curv, a_sum, a_sq)
            total -= 0.5 * kappa * (lin**2 - sq)
            t = np.where(t0 > 0.0, t0 * np.exp(total), 0.0)
        return np.where(bad & (t0 > 0.0), np.inf, t)

    def _kappa(self, curv: np.ndarray, a_sum: np.ndarray, a_sq: np.ndarray) -> np.ndarray:
        """Weight of the cross terms ``−κ·αⱼ·αₖ·uⱼ·uₖ`` between volume axes.

        When every volume and tank that reaches the inlets is an axis, the exact
        scaling (all volumes times λ: ln T + ln λ) fixes it: the curvature of ln T
        along the all-volumes direction is 0, so κ = Σ 2βⱼ / ((Σαⱼ)² − Σαⱼ²).
        Otherwise κ = 1, the value for times that add up (delays and time
        constants in series: ln Σ τⱼ·e^{uⱼ}).
        """
        den = a_sum**2 - a_sq
        if not self.complete:
            return np.ones(curv.shape)
        with np.errstate(divide="ignore", invalid="ignore"):
            k = curv / den
        return np.where(np.isfinite(k) & (den > 1e-6), k, 0.0)


def _quadratic(
    d_lo: np.ndarray, d_hi: np.ndarray, a: float, b: float
) -> tuple[np.ndarray, np.ndarray]:
    """(α, β) of P(u) = αu + βu² through (a, d_lo), (0, 0), (b, d_hi)."""
    beta = (d_lo / a - d_hi / b) / (a - b)
    return d_lo / a - beta * a, beta


def build_surrogate(system: FuelSystem, circuit: str, from_tank: str, to_tank: str,
                    schedule: ConsumptionSchedule, defs: Sequence[InputDef], horizon_h: float,
                    min_horizon_h: float, *, progress: Progress | None = None,
                    total: int | None = None, simulator: Simulator | None = None) -> Surrogate:
    """Simulate the nominal and the fit points of every axis (1 + 2·A simulations).

    Parameters
    ----------
    system : FuelSystem
    circuit, from_tank, to_tank : str
        The changeover (tank names).
    schedule : ConsumptionSchedule
        Nominal rates [t/h].
    defs : sequence of InputDef
        The circuit's uncertain inputs.
    horizon_h, min_horizon_h : float [h]
        First and shortest horizon (:func:`run_cases`).
    progress : callable (done, total), optional
        Called after each simulation.
    total : int, optional [-]
        Simulations in the whole analysis, for ``progress``.
    simulator : Simulator, optional
        What runs each simulation (default :func:`planner.flushing.simulate`).

    Returns
    -------
    Surrogate
        ``complete`` when every volume and tank that reaches the inlets is an
        axis (the exact volume scaling then fixes the cross terms).
    """
    axes = axes_for(defs)
    cases = [Case({})]
    for ax in axes:
        cases += [case_for(ax, ax.lo), case_for(ax, ax.hi)]
    curves, horizon = run_cases(system, circuit, from_tank, to_tank, schedule, horizon_h,
                                min_horizon_h, cases, progress, 0, total, simulator=simulator)
    nodes = {d.node for d in defs if d.kind in ("volume", "tank")}
    complete = nodes <= {a.node for a in axes}
    return Surrogate(curves[0], axes, tuple(curves[1::2]), tuple(curves[2::2]), horizon,
                     complete)
