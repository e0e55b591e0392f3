"""Where and when the scrubber-trip leads are sampled, and the time out of compliance.

The pieces of :mod:`planner.voyage.scrubber_trip` that read the voyage, not the flush:
the moments sampled on a span (:func:`sample_moments`, the rule is in that module's
notes), the timeline's load changes (:func:`load_changes_epoch_s`), the control-area
boundaries the ship passes on the scrubber (:func:`span_boundaries`) and the time
out of compliance after a failure (:func:`out_of_compliance_h`).

Moments are epoch seconds (``*_epoch_s``: seconds since 1970-01-01 UTC),
distances metres along the route from departure.
"""

from __future__ import annotations

from collections.abc import Sequence

from geo.compliance import RouteCheck
from geo.schedule import to_epoch
from planner.voyage.scrubber_events import ScrubberSpan
from planner.voyage.timeline import Timeline

_SAME_S = 0.5  # moments closer than this are one sample, s
_SAME_RATE = 1e-9  # rates closer than this (relative) are one load: a leg's round-off
_AT_M = 1.0  # a crossing this close to the span's start is at its start, m
_UNDER_WAY_FIRST_S = 15.0  # the first sample after a valve switch into the span's fuel, s

START, END, STEP, BOUNDARY, LOAD_CHANGE, ENDS_AT_CHANGE, ENDS_AT_LIMIT, UNDER_WAY = (
    "start", "end", "step", "boundary", "load_change", "ends_at_load_change",
    "ends_at_limit_change", "changeover_under_way")
SAMPLE_KINDS = (START, END, BOUNDARY, LOAD_CHANGE, ENDS_AT_CHANGE, ENDS_AT_LIMIT, UNDER_WAY,
                STEP)
"""Why a moment is sampled, in priority order (a moment sampled for two reasons keeps the
first)."""
ENTER, INSIDE_AT_START, COMES_INTO_FORCE = "enter", "inside_at_start", "comes_into_force"
BOUNDARY_EVENTS = (ENTER, INSIDE_AT_START, COMES_INTO_FORCE)
"""What a boundary row is: an entry crossed on the scrubber, a span starting inside an area,
an area coming into force while the ship is inside it on the scrubber."""
BOUNDARY_WORDS = {ENTER: "entered on the scrubber",
                  INSIDE_AT_START: "on the scrubber from here, inside the area",
                  COMES_INTO_FORCE: "comes into force while on the scrubber"}
"""What happens at a boundary row's moment, in words (after the area's name)."""


def out_of_compliance_h(check: RouteCheck, timeline: Timeline, fuel_sulphur_pct: float,
                        from_epoch_s: float, to_epoch_s: float) -> float:
    """How long between two moments the limit in force is below a fuel's sulphur, h.

    Parameters
    ----------
    check : RouteCheck
        The route check with the schedule (the limit on every stretch).
    timeline : Timeline
        The voyage (its schedule: where the ship is at each moment).
    fuel_sulphur_pct : float [% m/m]
        The fuel still being burnt.
    from_epoch_s, to_epoch_s : float [s]
        The failure and the moment every inlet is at the target, seconds since
        1970-01-01 UTC.

    Returns
    -------
    float [h]
        The measure of the moments in between at which the ship is on a stretch whose
        limit is below ``fuel_sulphur_pct`` (before departure and after arrival: where
        she lies).
    """
    if to_epoch_s <= from_epoch_s:
        return 0.0
    sched = timeline.schedule
    cuts = [float(t) for t in sched.epoch_at([st.from_m for st in check.stretches[1:]])]
    cuts += [float(t) for t in sched.knot_epoch_s]
    edges = sorted({from_epoch_s, to_epoch_s, *(t for t in cuts
                                                  if from_epoch_s < t < to_epoch_s)})
    total = 0.0
    for a, b in zip(edges[:-1], edges[1:], strict=True):
        d = float(sched.distance_at_epoch([0.5 * (a + b)])[0])
        if check.limit_at(d) < fuel_sulphur_pct - 1e-12:
            total += b - a
    return total / 3600.0


def load_changes_epoch_s(timeline: Timeline, consumers: Sequence[str]) -> list[float]:
    """The moments the rate of any of ``consumers`` changes, seconds since 1970-01-01 UTC.

    Parameters
    ----------
    timeline : Timeline
        The voyage's consumption against time (speed changes, stops, departure, arrival).
    consumers : sequence of str
        The consumers whose rates count (a circuit's); a change smaller than a part in
        10⁹ is the round-off of a leg's speed, not a load change.
    """
    out = []
    for b in timeline.breaks_epoch_s():
        b = float(b)
        before, after = (timeline.rates_iso_t_h(t, consumers) for t in (b - 1.0, b))
        if any(abs(after[n] - before[n]) > _SAME_RATE * max(abs(before[n]), abs(after[n]))
               for n in consumers):
            out.append(b)
    return out


def limit_changes_epoch_s(check: RouteCheck, timeline: Timeline) -> list[float]:
    """The moments the limit in force changes along the route (the ship reaching the start
    of a stretch whose limit differs from the one before), seconds since 1970-01-01 UTC.

    Parameters
    ----------
    check : RouteCheck
        The route check (its stretches).
    timeline : Timeline
        The voyage (its schedule).
    """
    st = check.stretches
    at = [s.from_m for a, s in zip(st[:-1], st[1:], strict=True) if s.limit_pct != a.limit_pct]
    return [float(t) for t in timeline.schedule.epoch_at(at)] if at else []


def span_boundaries(check: RouteCheck, span: ScrubberSpan) -> list[tuple[str, str, float]]:
    """``(area, event, epoch_s)`` of every control-area boundary passed on the span, by moment.

    An entry crossed from the span's start (within 1 m) to before its end; each area in force
    where the span starts, if it starts inside it (not at its entry); each area coming into
    force while the ship is inside it on the span.

    Parameters
    ----------
    check : RouteCheck
        The route check with the schedule.
    span : ScrubberSpan
        The span.
    """
    out: list[tuple[str, str, float]] = []
    for tc in check.crossings:
        c = tc.crossing
        if (c.event == "enter" and tc.in_force and tc.time_utc is not None
                and span.from_m - _AT_M <= c.distance_m
                and (c.distance_m < span.to_m - _AT_M or c.distance_m <= span.from_m + _AT_M)):
            t = min(max(to_epoch(tc.time_utc), span.from_epoch_s), span.to_epoch_s)
            out.append((c.area, ENTER, t))
    entered = {a for a, _, t in out if t - span.from_epoch_s < _SAME_S}
    at_start = next((st for st in check.stretches if st.from_m <= span.from_m < st.to_m),
                    check.stretches[-1])
    for area in at_start.areas:
        if area not in entered:
            out.append((area, INSIDE_AT_START, span.from_epoch_s))
    for f in check.force_events:
        t = to_epoch(f.time_utc)
        if f.event == COMES_INTO_FORCE and span.from_epoch_s <= t <= span.to_epoch_s:
            out.append((f.area, COMES_INTO_FORCE, t))
    return sorted(out, key=lambda x: x[2])


def sample_moments(span: ScrubberSpan, step_h: float, boundaries: Sequence[float],
                   load_changes: Sequence[float]) -> list[tuple[float, str]]:
    """The moments sampled on a span (but the flush-ends-at-a-load-change ones), with why.

    Parameters
    ----------
    span : ScrubberSpan
        The span.
    step_h : float [h]
        Spacing of the regular samples from the span's start.
    boundaries, load_changes : sequence of float [s]
        Area boundaries and load changes, seconds since 1970-01-01 UTC (those off the span
        are left out).

    Returns
    -------
    list of (float, str)
        ``(epoch_s, kind)`` with the start, the end, the boundaries, the load changes and
        every ``step_h``, by priority (:data:`SAMPLE_KINDS`) then moment.
    """
    a, b = span.from_epoch_s, span.to_epoch_s
    out = [(a, START), (b, END)]
    out += [(t, BOUNDARY) for t in boundaries if a <= t <= b]
    out += [(t, LOAD_CHANGE) for t in load_changes if a < t < b]
    n = int((b - a) / (step_h * 3600.0))
    out += [(a + k * step_h * 3600.0, STEP) for k in range(1, n + 1)
            if a + k * step_h * 3600.0 < b]
    return out


def under_way_moments(switch_epoch_s: float, span: ScrubberSpan, step_h: float) -> list[float]:
    """Moments after a valve switch into the span's fuel, closer together than the steps.

    A failure at the switch finds the circuit full of the fuel left (nothing to flush); one a
    minute later already has the span's fuel on its way to the inlets, so the lead rises
    steeply in the first minutes (:mod:`planner.voyage.scrubber_trip_partial`). Sampled at
    15 s, 30 s, 1, 2, 4 ... min after the switch, before the first regular step.

    Parameters
    ----------
    switch_epoch_s : float [s]
        The valve switch into the span's fuel, seconds since 1970-01-01 UTC.
    span : ScrubberSpan
        The span (moments off it are left out).
    step_h : float [h]
        Spacing of the regular samples.
    """
    out, dt = [], _UNDER_WAY_FIRST_S
    while dt < step_h * 3600.0:
        t = switch_epoch_s + dt
        if span.from_epoch_s < t < span.to_epoch_s:
            out.append(t)
        dt *= 2.0
    return out
