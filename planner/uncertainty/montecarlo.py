"""Monte Carlo of a circuit's changeover: the time to target, its quantiles, the start lead.

:func:`analyse` draws the uncertain inputs (:mod:`planner.uncertainty.sampling`),
gets each sample's time to target and to the limit from a few simulations
(:mod:`planner.uncertainty.surrogate`, where what is exact and what is
approximated is set out), adds the boundary-time offset, and reports:

- the distribution of the time to target (and to the limit) after the switch;
- the **lead**: time from the valve switch to the target plus how much
  earlier than planned the boundary may be reached; starting ``L`` before the
  planned boundary is in time with probability P(lead ≤ L). The lead at the
  chosen confidence is the latest start; the probability that the inlet is
  compliant (at or below the limit) at the boundary for a given start is
  :meth:`CircuitUncertainty.p_compliant`;
- the extra compliant fuel that the confidence costs against the P50 plan:
  (lead at confidence − P50 lead) × the circuit's steady burn of compliant
  fuel after the flush (nominal consumption);
- the sensitivity (:mod:`planner.uncertainty.sensitivity`);
- a check: a few samples (the one at the confidence quantile, the P50 one,
  and the farthest from nominal) simulated exactly, against the surrogate.

Quantiles are the samples' (linear interpolation); their Monte Carlo 95 %
interval is the distribution-free one from the binomial order statistics.
"""

from __future__ import annotations

import math
from collections.abc import Callable
from dataclasses import dataclass

import numpy as np

from planner.common.defaults import MAX_CONFIDENCE, MIN_CONFIDENCE
from planner.flushing import CircuitSummary, ConsumptionSchedule, flush, make_switch
from planner.flushing.network import compile_network
from planner.fuels import ISO_REFERENCE_Q_NET_MJ_KG
from planner.ship.system import FuelSystem
from planner.uncertainty.inputs import Z95, UncertaintySpec
from planner.uncertainty.model import circuit_nodes
from planner.uncertainty.sampling import Samples, draw, input_defs
from planner.uncertainty.sensitivity import Sensitivity, sensitivity
from planner.uncertainty.surrogate import (
    Case,
    Simulator,
    Surrogate,
    axes_for,
    build_surrogate,
    run_cases,
)

QUANTILES = (0.50, 0.90, 0.99)
DEFAULT_SAMPLES = 10_000
DEFAULT_SEED = 0
DEFAULT_CHECKS = 3
MIN_HORIZON_H, MAX_HORIZON_H = 8.0, 48.0
_NOT_REACHED = 1e300


def quantile(x: np.ndarray, p: float) -> float | None:
    """The ``p`` [-] quantile of samples ``x`` (linear interpolation), in the unit of ``x``.

    None when it is not reached: the quantile falls on, or interpolates
    towards, a sample that never reaches the level by the horizon (inf or NaN).
    The same rule as ``numpy.quantile``'s default ("linear", [HYNDMAN-FAN-1996]
    definition 7): position ``h = (n − 1)·p`` in the sorted samples, the value
    ``x[⌊h⌋] + (h − ⌊h⌋)·(x[⌈h⌉] − x[⌊h⌋])``; a not-reached neighbour with a
    weight above zero makes the quantile not reached, never a huge number.
    """
    s = np.sort(np.where(np.isfinite(x), x, np.inf))
    if s.size == 0:
        return None
    h = (s.size - 1) * float(p)
    lo = int(math.floor(h))
    hi = min(lo + 1, s.size - 1)
    frac = h - lo
    if not math.isfinite(s[lo]) or (frac > 0.0 and not math.isfinite(s[hi])):
        return None
    return float(s[lo] + frac * (s[hi] - s[lo])) if frac > 0.0 else float(s[lo])


def quantile_interval(x: np.ndarray, p: float) -> tuple[float | None, float | None]:
    """Distribution-free 95 % interval of the ``p`` [-] quantile's Monte Carlo estimate.

    The order statistics at ranks n·p ∓ 1.96·√(n·p·(1 − p)) (the normal
    approximation of the binomial count below the quantile, [CONOVER-1999] [M]),
    in the unit of ``x``; None for an end among the samples not reached.
    """
    n = len(x)
    s = np.sort(np.where(np.isfinite(x), x, _NOT_REACHED))
    half = Z95 * math.sqrt(n * p * (1.0 - p))
    lo, hi = int(max(0, math.floor(n * p - half) - 1)), int(min(n - 1, math.ceil(n * p + half)))
    return tuple(None if v >= 1e299 else float(v) for v in (s[lo], s[hi]))  # type: ignore


@dataclass(frozen=True)
class SurrogateCheck:
    """Samples simulated exactly: their index, the exact and the surrogate time to target, h."""

    index: tuple[int, ...]
    exact_h: tuple[float, ...]
    surrogate_h: tuple[float, ...]

    @property
    def max_error_s(self) -> float | None:
        """Largest |exact − surrogate| over the checked samples, s (None: none checked)."""
        if not self.index:
            return None
        return max(abs(a - b) for a, b in zip(self.exact_h, self.surrogate_h, strict=True)) * 3600


@dataclass(frozen=True, eq=False)
class CircuitUncertainty:
    """The Monte Carlo of one circuit's changeover (see the module docstring).

    Arrays (n,): ``time_to_target_h``, ``time_to_limit_h`` after the switch
    (inf: not reached by ``horizon_h``), ``early_h`` (boundary reached this much
    earlier than planned). ``deterministic`` is the plain flush's summary.
    """

    deterministic: CircuitSummary
    spec: UncertaintySpec
    confidence: float
    samples: Samples
    time_to_target_h: np.ndarray
    time_to_limit_h: np.ndarray
    horizon_h: float
    compliant_rate_t_h: float
    sensitivity: Sensitivity
    check: SurrogateCheck
    simulations: int
    warnings: tuple[str, ...]

    @property
    def circuit(self) -> str:
        """The circuit analysed."""
        return self.deterministic.circuit

    @property
    def early_h(self) -> np.ndarray:
        """How much earlier than planned the boundary is reached, per sample, h."""
        return self.samples.early_h

    @property
    def lead_h(self) -> np.ndarray:
        """Lead needed before the planned boundary to be on target there, per sample, h."""
        return self.time_to_target_h + self.early_h

    @property
    def lead_limit_h(self) -> np.ndarray:
        """Lead needed to be at or below the limit at the boundary, per sample, h."""
        return self.time_to_limit_h + self.early_h

    def time_quantiles(self, level: str = "target") -> dict[float, float | None]:
        """P50, P90, P99 of the time to ``"target"`` or ``"limit"`` after the switch, h."""
        x = self.time_to_target_h if level == "target" else self.time_to_limit_h
        return {p: quantile(x, p) for p in QUANTILES}

    @property
    def time_at_confidence_h(self) -> float | None:
        """Time to target after the switch at the confidence, h."""
        return quantile(self.time_to_target_h, self.confidence)

    @property
    def lead_p50_h(self) -> float | None:
        """Median lead to be on target at the boundary, h."""
        return quantile(self.lead_h, 0.5)

    @property
    def lead_at_confidence_h(self) -> float | None:
        """The latest start, h before the planned boundary, to be on target there with
        probability ``confidence``."""
        return quantile(self.lead_h, self.confidence)

    @property
    def lead_limit_at_confidence_h(self) -> float | None:
        """As :attr:`lead_at_confidence_h`, for being at or below the limit."""
        return quantile(self.lead_limit_h, self.confidence)

    @property
    def lead_at_confidence_interval_h(self) -> tuple[float | None, float | None]:
        """95 % Monte Carlo interval of :attr:`lead_at_confidence_h`, h."""
        return quantile_interval(self.lead_h, self.confidence)

    @property
    def extra_compliant_t(self) -> float | None:
        """Compliant fuel the confidence costs against the P50 plan, t."""
        a, b = self.lead_at_confidence_h, self.lead_p50_h
        if a is None or b is None:
            return None
        return max(0.0, a - b) * self.compliant_rate_t_h

    @property
    def p_reached(self) -> float:
        """Fraction of samples reaching the target by the horizon."""
        return float(np.mean(np.isfinite(self.time_to_target_h)))

    def p_compliant(self, lead_h: float | np.ndarray) -> float | np.ndarray:
        """Probability [-] that every inlet is at or below the limit at the boundary when the
        valve is switched ``lead_h`` [h] before the planned boundary."""
        lead = np.asarray(lead_h, dtype=float)
        p = np.mean(self.lead_limit_h[:, None] <= lead.reshape(-1)[None, :], axis=0)
        return float(p[0]) if lead.ndim == 0 else p

    @property
    def driver(self) -> str | None:
        """Label of the input that moves the start most (largest |rank correlation|)."""
        return self.sensitivity.driver_label


def _compliant_rate(system: FuelSystem, s: CircuitSummary, schedule: ConsumptionSchedule,
                    at_h: float) -> float:
    """Burn of compliant fuel, t/h, once the circuit runs on the to-tank's content."""
    content = system.tanks[s.to_tank].content_m3
    fuels = [system.fuels[f] for f in content]
    mass = np.array([v * f.density_kg_m3 for v, f in zip(content.values(), fuels, strict=True)])
    w = mass / mass.sum()
    seg = schedule.segment_index(at_h)
    rate = sum(schedule.rates_t_h[c][seg] for c in system.circuits[s.circuit].consumers)
    if schedule.basis == "energy":
        rate *= ISO_REFERENCE_Q_NET_MJ_KG / float(w @ np.array([f.q_net for f in fuels]))
    return float(rate * sum(wi for wi, f in zip(w, fuels, strict=True)
                            if f.sulphur_pct <= s.limit_pct))


def _check_indices(lead: np.ndarray, u: np.ndarray, confidence: float, count: int) -> list[int]:
    finite = np.flatnonzero(np.isfinite(lead))
    if count <= 0 or finite.size == 0:
        return []
    picks: list[int] = []
    for p in (confidence, 0.5):
        q = np.quantile(lead[finite], p)
        picks.append(int(finite[np.argmin(np.abs(lead[finite] - q))]))
    far = finite[np.argsort(-np.abs(u[finite]).sum(axis=1), kind="stable")]
    for i in far:
        if len(picks) >= count:
            break
        if int(i) not in picks:
            picks.append(int(i))
    return list(dict.fromkeys(picks))[:count]


def _warnings(sur: Surrogate, s: CircuitSummary, theta: np.ndarray,
              t_target: np.ndarray) -> list[str]:
    """Samples whose new fuel never reaches the target, and samples late past the horizon
    (``theta`` (n,) [-]: each sample's share of the new fuel at the target)."""
    out = []
    never = float(np.mean(~np.isfinite(theta)))
    if never > 0.0:
        out.append(f"in {never:.1%} of samples the new fuel's own sulphur is beyond the target "
                   f"{s.target_pct:.3f} % (delivery-note value and its test uncertainty): the "
                   "target is never reached in those")
    late = float(np.mean(np.isfinite(theta) & ~np.isfinite(t_target)))
    if late > 0.0:
        out.append(f"{late:.1%} of samples do not reach the target by the analysis horizon "
                   f"{sur.horizon_h:.1f} h")
    return out


def analyse(system: FuelSystem, circuit: str, from_tank: str, to_tank: str,
            schedule: ConsumptionSchedule, *, limit_pct: float, target_pct: float,
            spec: UncertaintySpec | None = None, confidence: float = 0.99,
            samples: int = DEFAULT_SAMPLES, seed: int | None = DEFAULT_SEED,
            checks: int = DEFAULT_CHECKS, deterministic: CircuitSummary | None = None,
            progress: Callable[[int, int], None] | None = None,
            simulator: Simulator | None = None) -> CircuitUncertainty:
    """The Monte Carlo of one circuit's changeover.

    Parameters
    ----------
    system : FuelSystem
    circuit : str
    from_tank, to_tank : str
        Tank or fuel names.
    schedule : ConsumptionSchedule
        Nominal rates [t/h] from the switch.
    limit_pct : float [% m/m]
        Sulphur limit.
    target_pct : float [% m/m]
        Planning target.
    spec : UncertaintySpec, optional
        The uncertain inputs (default: the built-in defaults).
    confidence : float, default 0.99 [-]
        From 0.5 to below 1.
    samples : int, default 10 000 [-]
        Draws from ``numpy.random.default_rng(seed)``.
    seed : int or None, default 0
    checks : int, default 3 [-]
        Samples simulated exactly to check the surrogate.
    deterministic : CircuitSummary, optional
        The plain flush's summary, if already computed (else it is).
    progress : callable (done, total), optional
        Called after each simulation.
    simulator : Simulator, optional
        What runs the surrogate's and the check's simulations (default
        :func:`planner.flushing.simulate`; the plan passes its remembering one).

    Returns
    -------
    CircuitUncertainty
        Per sample the times to target and limit [h after the switch] and the
        boundary offset [h]; quantiles, leads, sensitivity and the check.

    Raises
    ------
    FlushError
        When the system cannot run the changeover.
    UncertaintyError
        When the circuit's inlet is not a blend of the two tanks' contents.
    """
    if not MIN_CONFIDENCE <= confidence <= MAX_CONFIDENCE:
        raise ValueError(f"confidence must be from {MIN_CONFIDENCE} to {MAX_CONFIDENCE}, "
                         f"got {confidence!r}")
    spec = spec or UncertaintySpec()
    from_tank, to_tank = system.tank_for(circuit, from_tank), system.tank_for(circuit, to_tank)
    if deterministic is None:
        _, deterministic = flush(system, circuit, from_tank, to_tank, schedule,
                                 limit_pct=limit_pct, target_pct=target_pct)
    s = deterministic
    down = s.direction == "to_compliant"
    t_det = s.time_to_target_h if s.time_to_target_h is not None else s.horizon_h
    horizon = min(MAX_HORIZON_H, max(MIN_HORIZON_H, 4.0 * t_det))
    nodes = circuit_nodes(system, circuit, to_tank)
    fuels = compile_network(system, [make_switch(system, circuit, from_tank, to_tank)]).fuels
    defs = input_defs(nodes, fuels, spec)
    n_axes = len(axes_for(defs))
    total = 1 + 2 * n_axes + (checks if n_axes else 0)
    sur = build_surrogate(system, circuit, from_tank, to_tank, schedule, defs, horizon,
                          min(horizon, 1.5 * t_det), progress=progress, total=total,
                          simulator=simulator)
    smp = draw(defs, samples, seed)
    u = sur.u(smp)
    sulphur = smp.sulphur(sur.nominal.fuels)
    theta = sur.nominal.levels(sulphur, target_pct, down)
    t_target = sur.time_h(theta, u)
    t_limit = sur.time_h(sur.nominal.levels(sulphur, limit_pct, down), u)
    lead = t_target + smp.early_h
    sens = sensitivity(sur, smp, lead, target_pct, down)
    idx = _check_indices(lead, u, confidence, checks) if sur.axes else []
    check = _surrogate_check(system, circuit, from_tank, to_tank, schedule, sur, smp, u, idx,
                             t_target, target_pct, down, progress, simulator)
    return CircuitUncertainty(
        deterministic=s, spec=spec, confidence=float(confidence), samples=smp,
        time_to_target_h=t_target, time_to_limit_h=t_limit, horizon_h=sur.horizon_h,
        compliant_rate_t_h=_compliant_rate(system, s, schedule, t_det),
        sensitivity=sens, check=check, simulations=sur.simulations + len(idx),
        warnings=tuple(_warnings(sur, s, theta, t_target)))


def _surrogate_check(system: FuelSystem, circuit: str, from_tank: str, to_tank: str,
                     schedule: ConsumptionSchedule, sur: Surrogate, smp: Samples,
                     u: np.ndarray, idx: list[int], t_target: np.ndarray, target_pct: float,
                     down: bool, progress: Callable[[int, int], None] | None,
                     simulator: Simulator | None = None) -> SurrogateCheck:
    """Simulate the samples ``idx`` exactly (all their inputs at once) against the surrogate.

    ``u`` (n, A) are the samples' ln-factors [-], ``t_target`` (n,) their surrogate times
    to ``target_pct`` [% m/m], h.
    """
    cases = [Case({a.node: float(np.exp(u[i, j])) for j, a in enumerate(sur.axes)
                   if a.kind != "consumption"},
                  float(smp.values["consumption"][i])) for i in idx]
    done = sur.simulations
    curves, _ = run_cases(system, circuit, from_tank, to_tank, schedule, sur.horizon_h,
                          sur.horizon_h, cases, progress, done, done + len(cases),
                          simulator=simulator)
    sulphur = smp.sulphur(sur.nominal.fuels)
    exact = [float(c.time_to_h(sulphur[i:i + 1], target_pct, down)[0])
             for c, i in zip(curves, idx, strict=True)]
    return SurrogateCheck(tuple(idx), tuple(exact), tuple(float(t_target[i]) for i in idx))
