"""For the voyage plan: the lead to place a changeover start at a stated confidence.

The plan puts the valve switch at ``boundary − margin − lead``. Here ``lead``
is the time from the switch to the target (all inlets at or below it) at the
chosen confidence, **including** the boundary-time uncertainty (the ship may
reach the boundary earlier than planned); the P50 lead is the median of the
same quantity.
"""

from __future__ import annotations

from collections.abc import Callable
from typing import NamedTuple

from planner.flushing import CircuitSummary, ConsumptionSchedule, flush
from planner.ship.system import FuelSystem
from planner.uncertainty.inputs import UncertaintySpec
from planner.uncertainty.montecarlo import (
    DEFAULT_SAMPLES,
    DEFAULT_SEED,
    CircuitUncertainty,
    analyse,
)
from planner.uncertainty.surrogate import Simulator

ScheduleSource = ConsumptionSchedule | Callable[[float], ConsumptionSchedule]


class StartQuantiles(NamedTuple):
    """What the plan needs (a tuple, so ``p50, conf, driver, *_ = start_quantiles(...)``).

    lead_p50_h : float or None
        Median lead, h (None: the target is not reached in half the samples).
    lead_conf_h : float or None
        Lead at ``confidence`` to be at or below the **target** at the boundary, h
        (None: not reached with that confidence, e.g. the new fuel's sulphur may
        itself be above the target; see ``analysis.warnings``).
    driver : str or None
        The input that moves the start most (largest |rank correlation|).
    lead_conf_limit_h : float or None
        Lead at ``confidence`` to be at or below the **limit** at the boundary, h.
    extra_compliant_t : float or None
        Compliant fuel the confidence costs against the P50 start, t.
    deterministic_h : float or None
        The plain flush's time to target, h (what the plan uses without uncertainty).
    confidence : float
    analysis : CircuitUncertainty
        Everything else (distributions, sensitivity, check, warnings).
    """

    lead_p50_h: float | None
    lead_conf_h: float | None
    driver: str | None
    lead_conf_limit_h: float | None
    extra_compliant_t: float | None
    deterministic_h: float | None
    confidence: float
    analysis: CircuitUncertainty


def _pack(a: CircuitUncertainty) -> StartQuantiles:
    """The plan's figures of one analysis."""
    return StartQuantiles(a.lead_p50_h, a.lead_at_confidence_h, a.driver,
                          a.lead_limit_at_confidence_h, a.extra_compliant_t,
                          a.deterministic.time_to_target_h, a.confidence, a)


def start_quantiles(system: FuelSystem, circuit: str, from_: str, to: str,
                    schedule: ScheduleSource, limit_pct: float, target_pct: float,
                    confidence: float = 0.99, samples: int = DEFAULT_SAMPLES,
                    seed: int | None = DEFAULT_SEED, spec: UncertaintySpec | None = None, *,
                    progress: Callable[[int, int], None] | None = None,
                    max_iterations: int = 3, tolerance_h: float = 1.0 / 60.0,
                    deterministic: CircuitSummary | None = None,
                    simulator: Simulator | None = None) -> StartQuantiles:
    """Lead quantiles of ``circuit``'s changeover from ``from_`` to ``to``.

    With a callable ``schedule``, the lead is found by fixed point: the
    deterministic lead with ``schedule(0.0)`` first, then the analysis is run
    with ``schedule(lead)`` and the lead at confidence fed back, until it moves
    by less than ``tolerance_h`` or after ``max_iterations`` analyses; the P50
    lead comes from the last analysis (the schedule of the confidence start).

    Parameters
    ----------
    system : FuelSystem
    circuit : str
    from_, to : str
        Tank or fuel names.
    schedule : ConsumptionSchedule or callable
        The consumption [t/h] from the switch, or a callable giving it for a
        switch ``lead_h`` [h] before the boundary (the consumption depends on
        where the start falls).
    limit_pct : float [% m/m]
        Sulphur limit.
    target_pct : float [% m/m]
        Planning target.
    confidence : float, default 0.99 [-]
    samples : int, default 10 000 [-]
    seed : int or None, default 0
    spec : UncertaintySpec, optional
        Default: the built-in defaults (see
        :func:`planner.uncertainty.load_uncertainty` for the ship file's table).
    progress : callable (done, total), optional
        Called after each simulation.
    max_iterations : int, default 3 [-]
        Most analyses of the fixed point.
    tolerance_h : float, default 1/60 [h]
        The fixed point stops when the lead moves by less.
    deterministic : CircuitSummary, optional
        With a fixed ``schedule``: the plain flush's summary, if already computed.
    simulator : Simulator, optional
        What runs the Monte Carlo's simulations (default :func:`planner.flushing.simulate`).

    Returns
    -------
    StartQuantiles
        Leads [h] before the planned boundary, the main driver, the extra
        compliant fuel [t] and the analysis.
    """
    spec = spec or UncertaintySpec()
    a_tank, b_tank = system.tank_for(circuit, from_), system.tank_for(circuit, to)

    def run(sched: ConsumptionSchedule,
            known: CircuitSummary | None = None) -> CircuitUncertainty:
        return analyse(system, circuit, a_tank, b_tank, sched, limit_pct=limit_pct,
                       target_pct=target_pct, spec=spec, confidence=confidence,
                       samples=samples, seed=seed, progress=progress, simulator=simulator,
                       deterministic=known)

    if isinstance(schedule, ConsumptionSchedule):
        return _pack(run(schedule, deterministic))
    _, det = flush(system, circuit, a_tank, b_tank, schedule(0.0), limit_pct=limit_pct,
                   target_pct=target_pct)
    lead = det.time_to_target_h if det.time_to_target_h is not None else det.horizon_h
    result = None
    for _ in range(max(1, max_iterations)):
        result = run(schedule(lead))
        new = result.lead_at_confidence_h
        if new is None:
            new = result.lead_limit_at_confidence_h
        if new is None or abs(new - lead) < tolerance_h:
            break
        lead = new
    return _pack(result)  # type: ignore[arg-type]
