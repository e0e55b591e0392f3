"""How sure the plan is: each changeover's start at a chosen confidence.

For every changeover to compliant fuel and every circuit, the Monte Carlo
study of :mod:`planner.uncertainty` gives the lead (valve switch to the
sulphur target, plus how much earlier than planned the boundary may be
reached) at P50 and at the chosen confidence; the start is then
``boundary − time margin − lead``. The consumption is the voyage timeline's
from the deterministic start. When the fuel itself may lie above the target
(its delivery-note sulphur is uncertain too), the lead to the limit is used
instead, and the plan says so. A boundary that is a moment on the clock (an
area coming into force while the ship is inside it, a departure:
:attr:`planner.voyage.runs.Change.clock_deadline`) gets no arrival-time
uncertainty (``boundary_time_min`` is 0 for it): the ship's speed does not move
it.
"""

from __future__ import annotations

from collections.abc import Callable
from typing import TYPE_CHECKING

from planner.common.timefmt import iso_utc
from planner.voyage.changeovers import CircuitChange
from planner.voyage.flush_cache import FlushCache
from planner.voyage.plan import Plan
from planner.voyage.runs import Change

if TYPE_CHECKING:
    from planner.uncertainty import StartQuantiles, UncertaintySpec


def add_uncertainty(plan: Plan, doc: dict, confidence: float, samples: int, seed: int,
                    progress: Callable[[str], object] | None = None) -> None:
    """Add the confidence starts to the plan document (in place).

    Adds to each row of a changeover to compliant fuel ``start_p50_utc`` and
    ``start_confidence_utc`` (ISO 8601 UTC), ``lead_p50_h`` and
    ``lead_confidence_h`` (h), ``confidence_basis``, ``extra_compliant_t`` (t)
    and ``main_driver``; and the document's ``uncertainty`` table.

    Parameters
    ----------
    plan : Plan
        The plan the document was made from.
    doc : dict
        Its :func:`planner.voyage.report.plan_json` document (changed in place).
    confidence : float [-]
        The confidence of the starts, e.g. 0.99.
    samples : int [-]
        Monte Carlo samples per changeover and circuit.
    seed : int [-]
        The random seed (same seed, same numbers).
    progress : callable, optional
        Called with a line of text before each study.
    """
    from planner.uncertainty import load_uncertainty

    v = plan.voyage
    flushes = plan.flushes if plan.flushes is not None else FlushCache()
    spec = load_uncertainty(v.ship_file, plan.system, voyage_file=v.file)
    drivers: dict[str, int] = {}
    rows = iter(doc["changeovers"])
    for ch in plan.changes:
        for part in ch.circuits:
            row = next(rows)
            if ch.direction != "to_compliant":
                continue
            if progress:
                progress(f"uncertainty: changeover {row['number']}, circuit {part.circuit}")
            q = _quantiles(plan, flushes, ch, part, confidence, samples, seed, spec)
            lead, basis = q.lead_conf_h, "target"
            if lead is None:
                lead, basis = q.lead_conf_limit_h, "limit"
                doc["warnings"].append(
                    f"Changeover {row['number']} ({ch.area}), circuit {part.circuit}: at "
                    f"{confidence:.0%} confidence the inlet may never reach the target "
                    f"{ch.target_pct:.3f} % (the fuel's own sulphur is uncertain); the start is "
                    f"set for the {ch.limit_pct:.2f} % limit instead.")
            due = ch.boundary_epoch_s - v.time_margin_h * 3600.0
            row["start_p50_utc"] = iso_utc(plan.timeline.utc(due - q.lead_p50_h * 3600.0))
            row["start_confidence_utc"] = (None if lead is None else
                                           iso_utc(plan.timeline.utc(due - lead * 3600.0)))
            row["lead_p50_h"] = q.lead_p50_h
            row["lead_confidence_h"] = lead
            row["confidence_basis"] = basis
            row["extra_compliant_t"] = q.extra_compliant_t
            row["main_driver"] = q.driver
            if q.driver:
                drivers[q.driver] = drivers.get(q.driver, 0) + 1
    main = max(drivers, key=drivers.get) if drivers else None
    doc["uncertainty"] = {"confidence": confidence, "samples": samples, "seed": seed,
                          "main_driver": main}


def _quantiles(plan: Plan, flushes: FlushCache, ch: Change, part: CircuitChange,
               confidence: float, samples: int, seed: int,
               spec: UncertaintySpec) -> StartQuantiles:
    """The Monte Carlo of one circuit's changeover to compliant fuel, from its planned start
    (the plain flush and every simulation through the plan's ``flushes``)."""
    from dataclasses import replace

    from planner.uncertainty import start_quantiles

    if ch.clock_deadline:
        spec = replace(spec, boundary_time_min=0.0)
    sched = plan.timeline.consumption_from(part.start_epoch_s, 96.0)
    det = flushes.study(plan.system, part.circuit, part.from_tank, part.to_tank, sched,
                        ch.limit_pct, ch.target_pct, thermal=False).summary
    return start_quantiles(plan.system, part.circuit, part.from_tank, part.to_tank, sched,
                           ch.limit_pct, ch.target_pct, confidence=confidence, samples=samples,
                           seed=seed, spec=spec, deterministic=det, simulator=flushes.simulate)
