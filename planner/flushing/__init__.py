"""Flushing: sulphur at each consumer inlet after the changeover valve is switched.

Public API (each module states its method and sources: [LEVENSPIEL-1999]
for the well-stirred and plug-flow models, [HIGHAM-2005] for the matrix
exponential):

- :func:`simulate` (:mod:`~planner.flushing.simulate`): the simulation itself;
- :class:`Switch`, :func:`make_switch` (:mod:`~planner.flushing.network`): which
  valve goes from which tank to which;
- :class:`ConsumptionSchedule`, :func:`schedule_at`
  (:mod:`~planner.flushing.schedule`): consumption against time;
- :class:`FlushResult`, :class:`InletCurve`, :class:`TankCurve`
  (:mod:`~planner.flushing.result`): curves, crossing times, masses;
- :func:`flush`, :func:`summarize`, :class:`CircuitSummary`, :class:`NeverReached`,
  :func:`expected_for`
  (:mod:`~planner.flushing.summary`): the headline figures per circuit;
- :class:`Until` (:mod:`~planner.flushing.until`): when a flush is over.
"""

from planner.flushing.network import Switch, make_switch
from planner.flushing.result import FlushResult, InletCurve, TankCurve
from planner.flushing.schedule import ConsumptionSchedule, schedule_at
from planner.flushing.simulate import FlushError, simulate
from planner.flushing.summary import (
    CircuitSummary,
    NeverReached,
    expected_for,
    flush,
    summarize,
)
from planner.flushing.until import Until

__all__ = [
    "CircuitSummary",
    "ConsumptionSchedule",
    "FlushError",
    "FlushResult",
    "InletCurve",
    "NeverReached",
    "expected_for",
    "Switch",
    "TankCurve",
    "Until",
    "flush",
    "make_switch",
    "schedule_at",
    "simulate",
    "summarize",
]
