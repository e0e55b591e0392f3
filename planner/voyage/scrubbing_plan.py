"""The plan of the circuits a scrubber serves whole, beside the whole ship's.

:func:`scrubbed_plan` gives one scrubber's circuits their own fuel choice
(:mod:`planner.voyage.scrubbing_choice`), then the very steps of the whole
ship's plan on it (:func:`planner.voyage.stay.group_plan`: the changes between
runs, latest start, time margin, flushing targets and the stay-compliant rule;
:func:`planner.voyage.runs.at_departure`), names each change's boundary
(:func:`planner.voyage.scrubbing_choice.served_event`) and finds the spans and
events (:mod:`planner.voyage.scrubbing_spans`). :func:`merged` puts every group's
changes in one time order, joining changes of different groups made at the same
boundary into one (a scrubber out of service at an area's entry: every circuit
changes there together). Moments are epoch seconds (``*_epoch_s``: seconds since
1970-01-01 UTC).
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass, replace

from geo.compliance import RouteCheck
from planner.common.timefmt import format_utc
from planner.fuels import Fuel
from planner.ship.scrubbers import Scrubber
from planner.ship.system import FuelSystem
from planner.voyage.flush_cache import FlushCache
from planner.voyage.fuel_choice import FuelChoice, choose_fuels, regular_fuel
from planner.voyage.runs import Change, Run, at_departure, make_runs
from planner.voyage.scrubber_events import (
    ScrubberEvent,
    ScrubberOutage,
    ScrubberSpan,
    ZonePassage,
)
from planner.voyage.scrubbing import Availability, availability
from planner.voyage.scrubbing_choice import served_choices, served_event, valve_fuels
from planner.voyage.scrubbing_spans import spans_and_events
from planner.voyage.stay import group_plan
from planner.voyage.timeline import Timeline
from planner.voyage.voyage_file import Voyage
from planner.voyage.warning import PlanWarning


def fuels_on_board(voyage: Voyage, system: FuelSystem) -> list[Fuel]:
    """The voyage's fuels that some tank holds, in the voyage file's order.

    Parameters
    ----------
    voyage : Voyage
        The voyage (its delivery-note fuels).
    system : FuelSystem
        The ship as she sails it (the tank contents).
    """
    held = {f for t in system.tanks.values() for f, v in t.content_m3.items() if v > 0}
    return [f for f in voyage.fuels if f.name in held]


@dataclass(frozen=True, eq=False)
class Scrubbed:
    """The plan of the circuits one scrubber serves whole.

    Parameters
    ----------
    scrubber : Scrubber
        The scrubber relied on (two or more of the ship file's as one, named ``"a + b"``,
        when they serve the circuits' consumers together).
    names : tuple of str
        The ship file's scrubbers it stands for.
    circuits : tuple of str
        The circuits it serves whole, in the ship file's order.
    pieces : tuple of Availability
        Its availability along the route (:func:`planner.voyage.scrubbing.availability`).
    choices : tuple of FuelChoice
        The circuits' fuel on every piece.
    runs : tuple of Run
        The circuits' runs (after the stay-compliant rule; ``limit_pct`` is the limit the
        fuel was chosen against: the scrubber's where it is available).
    changes : tuple of Change
        The circuits' changes, in time order (also in :attr:`Plan.changes`).
    notes, warnings
        What the circuits' plan adds to the plan's.
    spans, events
        Where the plan relies on the scrubber, and when the crew acts on it.
    """

    scrubber: Scrubber
    names: tuple[str, ...]
    circuits: tuple[str, ...]
    pieces: tuple[Availability, ...]
    choices: tuple[FuelChoice, ...]
    runs: tuple[Run, ...]
    changes: tuple[Change, ...]
    notes: tuple[str, ...] = ()
    warnings: tuple[PlanWarning, ...] = ()
    spans: tuple[ScrubberSpan, ...] = ()
    events: tuple[ScrubberEvent, ...] = ()


def scrubbed_plan(flushes: FlushCache, voyage: Voyage, system: FuelSystem, timeline: Timeline,
                  check: RouteCheck, scrubber: Scrubber,
                  names: tuple[str, ...], circuits: tuple[str, ...],
                  passages: Sequence[ZonePassage],
                  outages: Sequence[ScrubberOutage], plain_regular: Fuel) -> Scrubbed:
    """The plan of the circuits ``scrubber`` serves whole (see the module notes).

    Parameters
    ----------
    flushes : FlushCache
        The plan's flushes.
    voyage : Voyage
        The voyage file as loaded.
    system : FuelSystem
        The ship as she sails it.
    timeline : Timeline
        The voyage's timeline.
    check : RouteCheck
        The route check.
    scrubber : Scrubber
        The scrubber relied on (:func:`planner.voyage.scrubbing.joint_scrubber`).
    names : tuple of str
        The ship file's scrubbers it stands for (one, or those serving the circuits
        together).
    circuits : tuple of str
        The circuits it serves whole.
    passages : sequence of ZonePassage
        The route's passages through washwater discharge zones.
    outages : sequence of ScrubberOutage
        The outages of ``scrubber`` (:func:`planner.voyage.scrubbing.joint_outages`).
    plain_regular : Fuel
        The fuel the other circuits are on at departure by default: the served circuits'
        too when the scrubber cannot work at departure (she came in on compliant fuel),
        else the highest-sulphur fuel chosen for them (``[port] departure_fuel`` rules).
    """
    ranges = [system.scrubbers[n] for n in names if n in system.scrubbers] or None
    pieces = availability(scrubber, timeline, check.stretches, passages, outages, ranges)
    fuels = valve_fuels(system, circuits, fuels_on_board(voyage, system))
    choices = served_choices(check, timeline, scrubber, pieces, fuels, voyage.fuel_choice_margin,
                             voyage.file)
    runs, changes, notes = group_plan(flushes, system, timeline, voyage,
                                       make_runs(choices, timeline), circuits)
    head = f"Scrubber {scrubber.name} (circuit {', '.join(circuits)}): "
    notes = [head + n for n in notes]
    changes = [served_event(ch, check, timeline, scrubber, pieces, passages, outages)
               for ch in changes]
    regular = regular_fuel(choices)
    if pieces[0].mode is None and plain_regular in fuels:
        regular = plain_regular
    departure, warning = at_departure(flushes, voyage, system, timeline, runs[0], regular,
                                      False, circuits)
    departure, warning = _departs_unavailable(timeline, scrubber, circuits, pieces[0],
                                              runs[0], departure)
    changes = departure + changes
    # the fallback: the circuits' own fuel choice without the scrubber (fuels on their valves)
    fallback = choose_fuels(check.stretches, fuels, voyage.fuel_choice_margin, voyage.file)
    spans, events = spans_and_events(scrubber, circuits, runs, changes, fallback, pieces,
                                     timeline, outages)
    return Scrubbed(scrubber, names, circuits, tuple(pieces), tuple(choices), tuple(runs),
                    tuple(changes), tuple(notes), (warning,) if warning else (), tuple(spans),
                    tuple(events))


def _departs_unavailable(timeline: Timeline, scrubber: Scrubber, circuits: tuple[str, ...],
                        first: Availability, run: Run, departure: list[Change]
                        ) -> tuple[list[Change], PlanWarning | None]:
    """The departure changes named for where the scrubber cannot work at departure (the
    discharge zone, else the area), and the warning that the circuits must change over
    alongside (None when no change is made alongside)."""
    before = [ch for ch in departure if ch.before_departure]
    if not before or first.mode is not None:
        return departure, None
    where = first.zones[0] if first.zones else before[0].area
    departure = [replace(ch, area=where) if ch.before_departure else ch for ch in departure]
    start = min(p.start_epoch_s for ch in before for p in ch.circuits)
    t0 = timeline.start_epoch_s
    return departure, PlanWarning("departs_inside", (
        f"The voyage departs inside {where}, where scrubber {scrubber.name} cannot work "
        f"({first.why}): circuit {', '.join(circuits)} must be on {run.fuel.name} before "
        f"departure at {format_utc(timeline.utc(t0))}; start the changeover alongside by "
        f"{format_utc(timeline.utc(start))}."))


def merged(system: FuelSystem, groups: list[list[Change]]) -> list[Change]:
    """The changes of every group of circuits in time order (stable: each group's own order
    kept), a change of one group joined to another group's at the same boundary (same
    moment, direction, area, event, limit and target).

    Parameters
    ----------
    system : FuelSystem
        The ship (her circuits' order).
    groups : list of list of Change
        Each group's changes, the whole ship's (or the unserved circuits') first.
    """
    out: list[tuple[int, Change]] = []
    order = list(system.circuits)
    for g, changes in enumerate(groups):
        for ch in changes:
            same = next((i for i, (h, x) in enumerate(out) if h != g and _same(x, ch)), None)
            if same is None:
                out.append((g, ch))
                continue
            x = out[same][1]
            parts = tuple(sorted(x.circuits + ch.circuits, key=lambda p: order.index(p.circuit)))
            out[same] = (g, replace(x, circuits=parts))
    return [ch for _, ch in sorted(out, key=lambda gc: gc[1].boundary_epoch_s)]


def _same(a: Change, b: Change) -> bool:
    return (abs(a.boundary_epoch_s - b.boundary_epoch_s) < 1.0 and a.direction == b.direction
            and (a.area, a.event, a.before_departure) == (b.area, b.event, b.before_departure)
            and abs(a.limit_pct - b.limit_pct) < 1e-12 and abs(a.target_pct - b.target_pct) < 1e-12)


def not_relied_reasons(system: FuelSystem, scrubbed: Sequence[Scrubbed]) -> dict[str, str | None]:
    """Why the plan relies on each of the ship file's scrubbers nowhere on the voyage, in
    words (None: it relies on it somewhere, or the scrubber could work somewhere and the
    circuits' own fuel choice needs it nowhere, or it serves no circuit whole: the ship
    file's loader warns of that).

    Parameters
    ----------
    system : FuelSystem
        The ship (her scrubbers, in the ship file's order).
    scrubbed : sequence of Scrubbed
        The plan's groups of served circuits (:attr:`planner.voyage.plan.Plan.scrubbed`).

    Returns
    -------
    dict of str to str or None
        By the ship file's scrubber name, in its order.
    """
    out: dict[str, str | None] = {}
    for name in system.scrubbers:
        groups = [g for g in scrubbed if name in g.names]
        if not groups or any(g.spans for g in groups):
            out[name] = None
            continue
        texts = [t for t in dict.fromkeys(_nowhere(g) for g in groups) if t]
        out[name] = "; ".join(texts) or None
    return out


def _nowhere(g: Scrubbed) -> str:
    """Why scrubber group ``g`` can work nowhere on the route ("" when it can somewhere)."""
    pieces = g.pieces
    if not pieces or any(p.mode is not None for p in pieces):
        return ""
    s = g.scrubber
    served = f"circuit {', '.join(g.circuits)} stays on compliant fuel"
    if all(p.out_of_range for p in pieces):
        return (f"the engines it serves run outside its load range {s.min_load_pct:g}-"
                f"{s.max_load_pct:g} % MCR on every leg sailed ({pieces[0].why}), so "
                f"{served}; check min_load_pct and max_load_pct in the ship file (per cent "
                "of MCR, such as 110)")
    kinds = [k for k, hit in (
        ("out of service", any(p.out_of_service for p in pieces)),
        (f"outside its load range {s.min_load_pct:g}-{s.max_load_pct:g} % MCR",
         any(p.out_of_range for p in pieces)),
        ("in washwater discharge zones where it cannot work",
         any(not p.out_of_service and not p.out_of_range for p in pieces))) if hit]
    return f"it can work nowhere on the route ({', or '.join(kinds)}), so {served}"
