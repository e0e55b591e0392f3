"""Where the plan relies on a scrubber (spans) and when the crew acts on it (events).

A *span* is a part of the voyage on which a scrubber's circuits burn a fuel
above the limit in force (:class:`ScrubberSpan`), cut where the washwater mode,
the limit or the fallback fuel changes. The scrubber is relied on

- from the **start** of the change to the high-sulphur fuel (the valve switch:
  the scrubber must be in operation before that fuel reaches the inlets), or from
  departure when the circuits already burn it;
- to the **stop**: every served inlet compliant again (the change away from the
  fuel done, at its target), or the arrival;

with a **mode change** wherever the mode changes on the way (closed loop
established at the entry of a zone that forbids open-loop discharge, back to
open at its exit), and **out of service** at each planned outage's moment. A stop
ahead of a leg where a served engine's load is outside the scrubber's range says so
(which engine, at what load, against which end), and the start after it where the
load is back within the range. The
*fallback fuel* of a span is the plain fuel choice there (the fuel the circuits
would burn without the scrubber, to change to if it fails). Events are in time
order; positions are where the ship then is on the timeline.

SO₂ on a span (:func:`span_so2`): *formed* is integrated from the blend that
reaches each served inlet (:mod:`planner.voyage.so2`); *after cleaning, at most*
is what the same mass of fuel at the limit in force would form. The scrubber's
SO₂/CO₂ ratio limits are the fuel-sulphur limits' equivalents ([MEPC-340]
Table 1 [P]: 4.3 for 0.10 %, 21.7 for 0.50 %); counting them mass for mass is an
approximation (the CO₂ per tonne of the fuels differs by a few per cent, common
practice), and the real emission is what the continuous monitoring records.

Moments are epoch seconds (``*_epoch_s``: seconds since 1970-01-01 UTC),
distances metres along the route from departure.
"""

from __future__ import annotations

from collections.abc import Sequence

from geo.ellipsoid import NM_M
from planner.fuels import so2_formed_kg, so2_from_fuel_kg
from planner.ship.scrubbers import Scrubber
from planner.voyage.flush_cache import FlushCache
from planner.voyage.fuel_choice import FuelChoice
from planner.voyage.runs import LOAD_IN, LOAD_OUT, Change, Run
from planner.voyage.scrubber_events import (
    MODE_CHANGE,
    OUT_OF_SERVICE,
    START,
    STOP,
    ScrubberEvent,
    ScrubberOutage,
    ScrubberSpan,
)
from planner.voyage.scrubbing import Availability, piece_at, real_stretch_at
from planner.voyage.so2 import Period, stretch_burnt_t, sulphur_burnt_t
from planner.voyage.timeline import Timeline

_ORDER = {STOP: 0, OUT_OF_SERVICE: 1, START: 2, MODE_CHANGE: 3}


def _on_intervals(runs: Sequence[Run], changes: Sequence[Change], choices: Sequence[FuelChoice],
                  timeline: Timeline) -> list[tuple[float, float, Run, Change | None,
                                                    Change | None]]:
    """``(on, off, run, change in, change out)`` for each run burning fuel above the limit
    somewhere: on at the change into it (its earliest valve switch) or departure, off when
    the change out of it is done (its latest inlet) or at arrival."""
    out = []
    for run in runs:
        limits = [c.stretch.limit_pct for c in choices
                  if c.stretch.to_m > run.from_m + 1e-3 and c.stretch.from_m < run.to_m - 1e-3]
        if not limits or run.fuel.sulphur_pct <= min(limits) + 1e-12:
            continue
        into = [ch for ch in changes if ch.circuits and ch.circuits[0].to_fuel == run.fuel.name
                and abs(ch.boundary_epoch_s - run.from_epoch_s) < 1.0]
        away = [ch for ch in changes if ch.circuits and ch.circuits[0].from_fuel == run.fuel.name
                and abs(ch.boundary_epoch_s - run.to_epoch_s) < 1.0 and not ch.before_departure]
        on = (max(timeline.start_epoch_s, min(p.start_epoch_s for p in into[0].circuits))
              if into else run.from_epoch_s)
        done = [p.done_epoch_s for p in away[0].circuits] if away else []
        off = (max(d for d in done if d is not None) if done and None not in done
               else timeline.end_epoch_s if not away else away[0].boundary_epoch_s)
        out.append((on, max(on, off), run, into[0] if into else None, away[0] if away else None))
    return out


def _pieces_in(on: float, off: float, pieces: Sequence[Availability],
               timeline: Timeline) -> list[tuple[float, float, Availability]]:
    """The availability pieces met between the moments ``on`` and ``off``, clipped."""
    sched = timeline.schedule
    out = []
    for p in pieces:
        t0, t1 = (float(x) for x in sched.epoch_at([p.from_m, p.to_m]))
        a, b = max(on, t0), min(off, t1)
        if b > a or (not out and b >= a and on == off):
            out.append((a, b, p))
    return out


def spans_and_events(scrubber: Scrubber, circuits: tuple[str, ...], runs: Sequence[Run],
                     changes: Sequence[Change], plain: Sequence[FuelChoice],
                     pieces: Sequence[Availability],
                     timeline: Timeline, outages: Sequence[ScrubberOutage]
                     ) -> tuple[list[ScrubberSpan], list[ScrubberEvent]]:
    """The spans and events of one scrubber (see the module notes).

    Parameters
    ----------
    scrubber : Scrubber
        The scrubber.
    circuits : tuple of str
        The circuits it serves whole.
    runs : sequence of Run
        Their runs (after the stay-compliant rule).
    changes : sequence of Change
        Their changes, in time order.
    plain : sequence of FuelChoice
        The circuits' fuel choice without the scrubber on the route check's stretches (the
        fallback fuel; the limit in force).
    pieces : sequence of Availability
        The scrubber's availability along the route.
    timeline : Timeline
        The voyage's timeline.
    outages : sequence of ScrubberOutage
        The voyage file's outages.
    """
    stretches = [c.stretch for c in plain]
    spans: list[ScrubberSpan] = []
    events: list[ScrubberEvent] = []
    names = ", ".join(circuits)
    for on, off, run, into, away in _on_intervals(runs, changes, plain, timeline):
        mine: list[ScrubberSpan] = []
        last_mode, last_zones, gap = scrubber.modes[0], (), False
        for a, b, p in _pieces_in(on, off, pieces, timeline):
            st = real_stretch_at(stretches, p.from_m)
            if run.fuel.sulphur_pct <= st.limit_pct + 1e-12:
                gap = True  # the fuel meets the limit here: nothing relies on the scrubber
                continue
            fallback = next(c.fuel.name for c in plain if c.stretch is st)
            mode = p.mode or last_mode
            left, last_mode, last_zones = last_zones, mode, p.zones
            areas = tuple(dict.fromkeys(st.areas + p.zones))
            fm, tm = timeline.position(a)[2], timeline.position(b)[2]
            prev = mine[-1] if mine and not gap else None
            gap = False
            if prev is not None and (prev.mode, prev.limit_pct, prev.fallback_fuel) == \
                    (mode, st.limit_pct, fallback):
                mine[-1] = ScrubberSpan(scrubber.name, circuits, run.fuel.name, fallback,
                                        prev.limit_pct, mode, prev.from_m, tm, prev.from_epoch_s,
                                        b, tuple(dict.fromkeys(prev.areas + areas)))
            else:
                mine.append(ScrubberSpan(scrubber.name, circuits, run.fuel.name, fallback,
                                         st.limit_pct, mode, fm, tm, a, b, areas))
            if prev is not None and prev.mode != mode:
                events.append(ScrubberEvent(scrubber.name, MODE_CHANGE, mode, a, fm,
                                            _mode_reason(p, left, mode)))
        if not mine:
            continue
        spans += mine
        first = mine[0]
        start_why = (f"before {run.fuel.name} ({run.fuel.sulphur_pct:.2f} %) reaches the inlets "
                     f"of {names}: in operation at the valve switch from "
                     f"{into.circuits[0].from_fuel}" if into is not None and
                     first.from_epoch_s <= on + 1.0 else
                     f"circuit {names} on {run.fuel.name} ({run.fuel.sulphur_pct:.2f} %) above "
                     f"the {first.limit_pct:.2f} % limit from here" if first.from_epoch_s > on + 1.0
                     else
                     f"circuit {names} on {run.fuel.name} ({run.fuel.sulphur_pct:.2f} %) from "
                     "departure")
        if into is not None and into.event == LOAD_IN:
            start_why += (f"; the served engines' load within scrubber {scrubber.name}'s range "
                          f"from {into.boundary_m / NM_M:,.1f} nm")
        events.append(ScrubberEvent(scrubber.name, START, first.mode, first.from_epoch_s,
                                    first.from_m, start_why))
        if away is not None:
            to = away.circuits[0].to_fuel
            stop_why = (f"every inlet of {names} at the {away.target_pct:.3f} % target on {to} "
                        f"(limit {away.limit_pct:.2f} % at {away.area})")
            if away.event == LOAD_OUT:
                beyond = piece_at(pieces, away.boundary_m + 1.0)
                stop_why += (f"; scrubber {scrubber.name} not available from "
                             f"{away.boundary_m / NM_M:,.1f} nm: {beyond.why}")
            events.append(ScrubberEvent(scrubber.name, STOP, None, mine[-1].to_epoch_s,
                                        mine[-1].to_m, stop_why))
    for o in (o for o in outages if o.scrubber == scrubber.name):
        if o.from_epoch_s > timeline.end_epoch_s or (o.until_epoch_s is not None
                                                     and o.until_epoch_s <= timeline.start_epoch_s):
            continue
        t = max(o.from_epoch_s, timeline.start_epoch_s)
        why = "out of service (voyage file)" + (f": {o.reason}" if o.reason else "")
        if o.until_epoch_s is not None:
            why += f"; back in service {timeline.utc(o.until_epoch_s):%Y-%m-%d %H:%MZ}"
        events.append(ScrubberEvent(scrubber.name, OUT_OF_SERVICE, None, t,
                                    timeline.position(t)[2], why))
    events.sort(key=lambda e: (e.epoch_s, _ORDER[e.kind]))
    return spans, events


def _mode_reason(p: Availability, left: tuple[str, ...], new: str) -> str:
    """Why the mode changes here (``left``: the zones of the piece before), in words."""
    entered = [z for z in p.zones if z not in left]
    gone = [z for z in left if z not in p.zones]
    if entered:
        allows = "only closed-loop" if new == "closed" else "open-loop"
        return (f"{new} loop established at the entry of {', '.join(entered)} (it allows "
                f"{allows} discharge)")
    where = f"leaving {', '.join(gone)}" if gone else "here"
    return f"{new} loop again on {where} ({p.why})"


def span_so2(timeline: Timeline, flushes: FlushCache, periods: Sequence[tuple[str, Period]],
             span: ScrubberSpan) -> tuple[float, float]:
    """SO₂ of the served circuits on a span, kg: ``(formed, after cleaning at most)`` (see
    the module notes).

    Parameters
    ----------
    timeline : Timeline
        The voyage's timeline.
    flushes : FlushCache
        The plan's flushes (the inlet blends).
    periods : sequence of (str, Period)
        Every circuit's valve periods (:func:`planner.voyage.quantities.valve_periods`).
    span : ScrubberSpan
        The span.
    """
    mine = [(c, p) for c, p in periods if c in span.circuits]
    burnt = stretch_burnt_t(timeline, flushes, mine, span.from_epoch_s, span.to_epoch_s)
    formed = float(so2_formed_kg(sulphur_burnt_t(burnt, dict(timeline.system.fuels)) * 1000.0))
    at_limit = float(so2_from_fuel_kg(sum(burnt.values()) * 1000.0, span.limit_pct))
    return formed, min(formed, at_limit)
