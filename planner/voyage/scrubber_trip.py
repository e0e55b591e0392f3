"""If the scrubber trips now: how long until the consumers are compliant on fuel alone.

For every moment along a :class:`~planner.voyage.scrubber_events.ScrubberSpan`
(served circuits burning fuel above the limit in force, made good by a
scrubber), the *lead*: the valve of each circuit on the span is switched at the
failure, from the span's fuel to its fallback fuel (the fuel the circuit would
burn there without the scrubber), and the flush is simulated with the
consumption the timeline gives from that moment on, until every inlet of the
circuit is at the plan's flushing target
(:func:`planner.voyage.plan.flushing_target_pct` of the span's limit and the
fallback fuel). It is the same flush the plan runs for a changeover
(:func:`planner.voyage.changeovers.plan_to_compliant`, [LEVENSPIEL-1999]
washout and plug flow), through the plan's
:class:`~planner.voyage.flush_cache.FlushCache`, so flushes that see the same
consumption are simulated once.

Two figures per failure moment and circuit:

- ``time_to_compliant_h``: the lead, valve switch to every inlet at the target;
- ``out_of_compliance_h``: of that time, how long the limit in force where the
  ship then is lies below the fuel still being burnt (its delivery-note
  sulphur, the conservative level: the inlet blend lies between it and the
  fallback fuel). A failure before an area entry counts only from the entry,
  ``max(0, lead − time to the boundary)``; one shortly before an exit only
  until the exit (when the fuel is within the limit outside).

Where the moments are (:func:`sample_moments`). The flush reads only the
consumption of the circuit's consumers from the failure on, and that is a
piecewise-constant rate changing at the timeline's load changes (a speed change,
a stop, departure, arrival). A failure at ``t`` sees the same consumption as one
at ``t'`` whenever no load change lies in ``[t, t + D]``: the lead ``D`` is then
the same (and the cache returns it without simulating when no load change lies
within the 8 h the flush also reads for its check of the tanks). It bends only (i) at a
load change itself and (ii) where the flush would end exactly at a load change
(``t + D(t) = b``). For a circuit whose volumes all carry one flow (a chain to
one consumer) the state of the flush depends on the volume passed through only,
so ``D`` is exactly piecewise linear with its kinks at (i) and (ii): we sample
both exactly (the second solved by bisection, ``t + D(t)`` never decreases with
``t``, as in :mod:`planner.voyage.changeovers`), the span's start and end, every
area boundary inside it, and every ``step_h`` (default 15 min) for the chart
and for circuits with branches. The time out of compliance has one more kind of
kink, where the flush would end exactly as the limit in force changes (an entry
ahead, an exit): those failures are found the same way. Straight lines between
the samples are then the figures themselves for a one-flow chain, and a close
chord otherwise.

A failure while the circuit's changeover into the span's fuel is still under way (the span
starts at that valve switch, leaving a washwater zone or an area) does not find the circuit
full of it: at the switch the inlets are still on the fuel left. Given the plan's
changeovers (``changes``), the lead is then counted from the state the changeover has
reached (:mod:`planner.voyage.scrubber_trip_partial`: the trip flush and the changeover's
own flush added, the models being linear), and the first minutes after the switch, where it
rises steeply, are sampled closer (:func:`~planner.voyage.scrubber_trip_moments.under_way_moments`);
the time out of compliance still counts the span's fuel at its delivery-note sulphur.

A failure the flush cannot follow (the fallback tank runs dry, a pump cannot
cover the consumption: :class:`~planner.flushing.FlushError`) or that never
reaches the target within the horizon (nothing is burnt, e.g. alongside with
the engine stopped) gives ``None`` with the reason in ``problem``.

Moments are epoch seconds (``*_epoch_s``: seconds since 1970-01-01 UTC),
distances metres along the route from departure. Advisory figures.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass
from typing import TYPE_CHECKING

from geo.compliance import RouteCheck
from planner.flushing import FlushError
from planner.ship.components import FuelSystemError
from planner.ship.system import FuelSystem
from planner.voyage.flush_cache import FlushCache
from planner.voyage.plan import flushing_target_pct
from planner.voyage.scrubber_events import ScrubberSpan
from planner.voyage.scrubber_trip_moments import (
    BOUNDARY,
    BOUNDARY_EVENTS,
    ENDS_AT_CHANGE,
    ENDS_AT_LIMIT,
    SAMPLE_KINDS,
    UNDER_WAY,
    limit_changes_epoch_s,
    load_changes_epoch_s,
    out_of_compliance_h,
    sample_moments,
    span_boundaries,
    under_way_moments,
)
from planner.voyage.scrubber_trip_partial import change_under_way, partial_time_to_target_h
from planner.voyage.timeline import Timeline

if TYPE_CHECKING:
    from planner.voyage.changeovers import CircuitChange
    from planner.voyage.plan import Plan

DEFAULT_STEP_H = 0.25
"""Spacing of the regular samples along a span, h (15 min: a watch officer's reading)."""
HORIZON_H = 96.0
"""The consumption a flush is given from the failure, h (the plan's changeover horizon)."""
_TOL_S = 1.0  # the moment a flush ends at a load change, found to this, s
_SAME_S = 0.5  # moments closer than this are one sample, s


@dataclass(frozen=True)
class TripLead:
    """The lead of one circuit if the scrubber fails at one moment.

    Parameters
    ----------
    span : int
        Index of the span in :attr:`TripLeads.spans`.
    circuit : str
        The circuit changed over at the failure.
    kind : str
        Why the moment is sampled (one of :data:`SAMPLE_KINDS`).
    fail_epoch_s : float [s]
        The failure (the valve switch), seconds since 1970-01-01 UTC.
    distance_m : float [m]
        Where the ship then is, along the route.
    lat, lon : float [deg]
        Where, WGS84.
    target_pct : float [% m/m]
        The sulphur every inlet must reach.
    time_to_compliant_h : float or None [h]
        Failure to every inlet at the target; None if never (see ``problem``).
    out_of_compliance_h : float or None [h]
        Of that, the time the limit in force is below the fuel still burnt.
    problem : str
        Why there is no lead ("" when there is one).
    """

    span: int
    circuit: str
    kind: str
    fail_epoch_s: float
    distance_m: float
    lat: float
    lon: float
    target_pct: float
    time_to_compliant_h: float | None
    out_of_compliance_h: float | None
    problem: str = ""

    def __post_init__(self) -> None:
        if self.kind not in SAMPLE_KINDS:
            raise ValueError(f"trip lead kind must be one of {SAMPLE_KINDS}, got {self.kind!r}")
        for key in ("fail_epoch_s", "distance_m", "lat", "lon", "target_pct"):
            if not math.isfinite(getattr(self, key)):
                raise ValueError(f"trip lead: {key} must be finite")
        d, out = self.time_to_compliant_h, self.out_of_compliance_h
        if (d is None) != bool(self.problem):
            raise ValueError("trip lead: a lead without a time needs its problem, and only then")
        if d is not None and not (math.isfinite(d) and d >= 0.0):
            raise ValueError(f"trip lead: time_to_compliant_h must be >= 0, got {d}")
        if out is not None and (d is None or not 0.0 <= out <= d + 1e-9):
            raise ValueError(f"trip lead: out_of_compliance_h {out} outside [0, {d}]")

    @property
    def compliant_epoch_s(self) -> float | None:
        """Every inlet at the target, seconds since 1970-01-01 UTC (None if never)."""
        if self.time_to_compliant_h is None:
            return None
        return self.fail_epoch_s + self.time_to_compliant_h * 3600.0


@dataclass(frozen=True)
class TripBoundary:
    """One control-area boundary the ship passes on the scrubber, and the lead there.

    Parameters
    ----------
    area : str
        The area.
    event : str
        One of :data:`BOUNDARY_EVENTS`.
    lead : TripLead
        The lead of one circuit for a failure at the boundary.
    """

    area: str
    event: str
    lead: TripLead

    def __post_init__(self) -> None:
        if self.event not in BOUNDARY_EVENTS:
            raise ValueError(f"boundary event must be one of {BOUNDARY_EVENTS}, "
                             f"got {self.event!r}")


@dataclass(frozen=True)
class TripLeads:
    """The leads along every span and at the boundaries.

    Parameters
    ----------
    spans : tuple of ScrubberSpan
        The spans, in the order given.
    samples : tuple of TripLead
        By span, circuit (the span's order), then moment.
    boundaries : tuple of TripBoundary
        By moment, then circuit.
    step_h : float [h]
        Spacing of the regular samples.
    """

    spans: tuple[ScrubberSpan, ...]
    samples: tuple[TripLead, ...]
    boundaries: tuple[TripBoundary, ...]
    step_h: float

    def series(self, span: int, circuit: str) -> tuple[TripLead, ...]:
        """The samples of one span and circuit, in time order."""
        return tuple(s for s in self.samples if s.span == span and s.circuit == circuit)


class _Circuit:
    """The leads of one circuit on one span, each moment computed once."""

    def __init__(self, system: FuelSystem, timeline: Timeline, check: RouteCheck,
                 flushes: FlushCache, span: ScrubberSpan, index: int, circuit: str,
                 target_pct: float, changes: Sequence[CircuitChange] = ()) -> None:
        self.system, self.timeline, self.check, self.flushes = system, timeline, check, flushes
        self.changes = tuple(changes)
        self.span, self.index, self.circuit, self.target_pct = span, index, circuit, target_pct
        self.fuel_sulphur_pct = system.fuels[span.fuel].sulphur_pct
        self.leads: dict[float, TripLead] = {}
        self.durations: dict[float, tuple[float | None, str]] = {}
        try:
            self.tanks: tuple[str, str] | None = (system.tank_for(circuit, span.fuel),
                                                  system.tank_for(circuit, span.fallback_fuel))
            self.no_tanks = ""
        except FuelSystemError as exc:
            self.tanks, self.no_tanks = None, str(exc)

    def _duration_h(self, t: float) -> tuple[float | None, str]:
        """The lead [h] of a failure at ``t`` [s] (or None and why), computed once."""
        if t not in self.durations:
            self.durations[t] = self._flush_h(t)
        return self.durations[t]

    def _flush_h(self, t: float) -> tuple[float | None, str]:
        if self.tanks is None:
            return None, self.no_tanks
        sched = self.timeline.consumption_from(t, HORIZON_H)
        try:
            st = self.flushes.study(self.system, self.circuit, *self.tanks, sched,
                                    self.span.limit_pct, self.target_pct, thermal=False)
        except FlushError as exc:
            return None, str(exc)
        d = st.summary.time_to_target_h
        if d is None:
            return None, (f"the inlets do not reach {self.target_pct:.3f} % within "
                          f"{HORIZON_H:g} h at the consumption from then on")
        under_way = change_under_way(self.changes, self.circuit, self.span.fuel, t)
        if under_way is not None and under_way.to_tank == self.tanks[0]:
            got = partial_time_to_target_h(st.result, under_way, self.circuit, t,
                                           self.target_pct)
            d = d if got is None else got
        return d, ""

    def lead(self, t: float, kind: str) -> TripLead:
        """The lead for a failure at ``t`` [s], sampled for ``kind`` (kept if known)."""
        for known, got in self.leads.items():
            if abs(known - t) < _SAME_S:
                if SAMPLE_KINDS.index(kind) < SAMPLE_KINDS.index(got.kind):
                    got = TripLead(**{**got.__dict__, "kind": kind})
                    self.leads[known] = got
                return got
        d, problem = self._duration_h(t)
        out = None if d is None else out_of_compliance_h(
            self.check, self.timeline, self.fuel_sulphur_pct, t, t + d * 3600.0)
        lat, lon, dist = self.timeline.position(t)
        got = TripLead(self.index, self.circuit, kind, t, dist, lat, lon, self.target_pct, d,
                       out, problem)
        self.leads[t] = got
        return got

    def ends_at(self, b: float) -> float | None:
        """The failure moment on the span whose flush ends at ``b`` [s] (to 1 s), or None."""
        def late(t: float) -> bool:  # t + D(t) > b; never done counts as late
            d = self._duration_h(t)[0]
            return d is None or t + d * 3600.0 > b

        known = sorted(self.leads)
        lo = hi = None
        for a, c in zip(known[:-1], known[1:], strict=True):
            if not late(a) and late(c):
                lo, hi = a, c
                break
        if lo is None or hi is None:
            return None
        while hi - lo > _TOL_S:
            mid = 0.5 * (lo + hi)
            lo, hi = (lo, mid) if late(mid) else (mid, hi)
        return lo


def trip_leads(system: FuelSystem, timeline: Timeline, check: RouteCheck,
               flushes: FlushCache | None, spans: Sequence[ScrubberSpan],
               voyage_target_fraction: float, step_h: float = DEFAULT_STEP_H,
               changes: Sequence[CircuitChange] = ()) -> TripLeads:
    """The lead of every circuit along every span, and at the boundaries (module notes).

    Parameters
    ----------
    system : FuelSystem
        The ship as she sails the voyage (:attr:`Plan.system`).
    timeline : Timeline
        The voyage's consumption against time.
    check : RouteCheck
        The route check with the schedule (limits, crossings, areas coming into force).
    flushes : FlushCache or None
        The plan's cache (None: a cache for this call).
    spans : sequence of ScrubberSpan
        Where the plan relies on a scrubber.
    voyage_target_fraction : float [-]
        The voyage's sulphur target fraction (``margins.sulphur_target_fraction``).
    step_h : float, default :data:`DEFAULT_STEP_H` [h]
        Spacing of the regular samples.
    changes : sequence of CircuitChange, default ()
        The plan's circuit changeovers: a failure while a circuit's changeover into the
        span's fuel is still under way starts from the state it has reached
        (:mod:`planner.voyage.scrubber_trip_partial`); without them, from the circuit full
        of the span's fuel.

    Returns
    -------
    TripLeads

    Raises
    ------
    ValueError
        For a step that is not a positive number, or a span's fuel unknown to the ship.
    """
    if not (isinstance(step_h, int | float) and math.isfinite(step_h) and step_h > 0.0):
        raise ValueError(f"step_h must be a positive number of hours, got {step_h!r}")
    flushes = flushes if flushes is not None else FlushCache()
    samples: list[TripLead] = []
    rows: list[TripBoundary] = []
    for i, span in enumerate(spans):
        for name in (span.fuel, span.fallback_fuel):
            if name not in system.fuels:
                raise ValueError(f"scrubber span of {span.scrubber!r}: fuel {name!r} is not "
                                 f"one of the ship's {sorted(system.fuels)}")
        target = flushing_target_pct(span.limit_pct, voyage_target_fraction,
                                     system.fuels[span.fallback_fuel])
        bounds = span_boundaries(check, span)
        limits = limit_changes_epoch_s(check, timeline)
        for circuit in span.circuits:
            c = _Circuit(system, timeline, check, flushes, span, i, circuit, target, changes)
            consumers = system.circuits[circuit].consumers if circuit in system.circuits else ()
            loads = load_changes_epoch_s(timeline, consumers)
            for t, kind in sample_moments(span, step_h, [b[2] for b in bounds], loads):
                c.lead(t, kind)
            under_way = change_under_way(changes, circuit, span.fuel, span.from_epoch_s)
            if under_way is not None:
                for t in under_way_moments(under_way.start_epoch_s, span, step_h):
                    c.lead(t, UNDER_WAY)
            for kind, moments in ((ENDS_AT_CHANGE, loads), (ENDS_AT_LIMIT, limits)):
                for b in moments:
                    t = c.ends_at(b) if b > span.from_epoch_s else None
                    if t is not None:
                        c.lead(t, kind)
            samples += [c.leads[t] for t in sorted(c.leads)]
            rows += [TripBoundary(area, event, c.lead(t, BOUNDARY))
                     for area, event, t in bounds]

    def order(r: TripBoundary) -> tuple[float, int]:
        return r.lead.fail_epoch_s, spans[r.lead.span].circuits.index(r.lead.circuit)

    return TripLeads(tuple(spans), tuple(samples), tuple(sorted(rows, key=order)), float(step_h))


def plan_trip_leads(plan: Plan, spans: Sequence[ScrubberSpan] | None = None,
                    step_h: float = DEFAULT_STEP_H) -> TripLeads:
    """:func:`trip_leads` of a plan: its system, timeline, route check and flushes.

    Parameters
    ----------
    plan : Plan
        The voyage plan.
    spans : sequence of ScrubberSpan, optional
        The spans (default: :attr:`Plan.scrubber_spans`).
    step_h : float, default :data:`DEFAULT_STEP_H` [h]
        Spacing of the regular samples.
    """
    return trip_leads(plan.system, plan.timeline, plan.check, plan.flushes,
                      plan.scrubber_spans if spans is None else spans,
                      plan.voyage.sulphur_target_fraction, step_h,
                      [part for change in plan.changes for part in change.circuits])
