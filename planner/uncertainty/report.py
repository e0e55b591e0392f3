"""The ``"uncertainty"`` key of a circuit in ``changeover flush --json`` (plain data)."""

from __future__ import annotations

import math

from planner.common.defaults import DEFAULT_MARGIN_H
from planner.uncertainty.montecarlo import QUANTILES, CircuitUncertainty

METHOD = (
    "Monte Carlo over the flushing model: sulphur levels and boundary time exact on each "
    "simulated blend curve; volumes, mixing and consumption by a surrogate from 1 + 2 per "
    "uncertain node simulations (quadratic in log time along each axis, cross terms fixed by "
    "the exact volume scaling); see 'check' for samples simulated exactly"
)


def _f(x: float | None) -> float | None:
    """``x`` as a float for JSON, None when missing or not finite."""
    return None if x is None or not math.isfinite(x) else float(x)


def _q(d: dict) -> dict:
    """Quantiles keyed ``p50``, ``p90``, ``p99``."""
    return {f"p{round(p * 100)}": _f(v) for p, v in d.items()}


def leads_to_show(u: CircuitUncertainty, margin_h: float) -> list[float]:
    """Start leads [h] at which the command states the probability of compliance.

    The plain flush's time to target, that plus the planning margin
    ``margin_h`` [h], and the lead at confidence (those that exist).
    """
    det = u.deterministic.time_to_target_h
    out = [] if det is None else [det, det + margin_h]
    if u.lead_at_confidence_h is not None:
        out.append(u.lead_at_confidence_h)
    return out


def uncertainty_json(u: CircuitUncertainty, margin_h: float = DEFAULT_MARGIN_H) -> dict:
    """The document of one circuit's Monte Carlo (keys are added to, never renamed).

    Times and leads in h, masses in t, rates in t/h, probabilities [-];
    ``margin_h`` [h] is the planning margin for ``p_compliant_at_boundary``.
    """
    lo, hi = u.lead_at_confidence_interval_h
    sens = u.sensitivity
    return {
        "confidence": u.confidence,
        "samples": u.samples.n,
        "seed": u.samples.seed,
        "simulations": u.simulations,
        "horizon_h": u.horizon_h,
        "deterministic_time_to_target_h": _f(u.deterministic.time_to_target_h),
        "time_to_target_h": _q(u.time_quantiles("target")),
        "time_to_limit_h": _q(u.time_quantiles("limit")),
        "time_to_target_at_confidence_h": _f(u.time_at_confidence_h),
        "lead_p50_h": _f(u.lead_p50_h),
        "lead_at_confidence_h": _f(u.lead_at_confidence_h),
        "lead_at_confidence_interval_h": [_f(lo), _f(hi)],
        "lead_limit_at_confidence_h": _f(u.lead_limit_at_confidence_h),
        "extra_compliant_t": _f(u.extra_compliant_t),
        "compliant_rate_t_h": u.compliant_rate_t_h,
        "p_reached_target": u.p_reached,
        "p_compliant_at_boundary": [{"lead_h": float(x), "p": float(u.p_compliant(x))}
                                    for x in leads_to_show(u, margin_h)],
        "driver": sens.driver_label,
        "driver_key": sens.driver,
        "swings": [{"key": s.key, "input": s.label, "unit": s.unit, "low": s.low,
                    "high": s.high, "lead_low_h": _f(s.lead_low_h),
                    "lead_high_h": _f(s.lead_high_h), "swing_h": _f(s.swing_h),
                    "exact": s.exact} for s in sens.swings],
        "rank_correlation": dict(sens.rank_correlation),
        "check": {"samples": list(u.check.index), "exact_h": list(u.check.exact_h),
                  "surrogate_h": list(u.check.surrogate_h),
                  "max_error_s": _f(u.check.max_error_s)},
        "inputs": u.spec.describe(),
        "warnings": list(u.warnings),
        "quantiles": [float(p) for p in QUANTILES],
        "method": METHOD,
    }
