"""The voyage changeover plan: fuel per stretch, every changeover, and their checks.

Steps (DEVELOPERS.md, "How the plan is made"):

1. the route check gives the limit on every stretch (:mod:`geo.compliance`);
2. each stretch gets the highest-sulphur fuel on board that meets its limit
   by its delivery-note sulphur (with the optional fuel-choice margin,
   :mod:`planner.voyage.fuel_choice`); neighbouring stretches on the same fuel
   form one *run* (:mod:`planner.voyage.runs`);
3. between runs, each circuit changes over: latest start before a step down,
   commenced at the exit after a step up (:mod:`planner.voyage.changeovers`),
   flushing to the sulphur target (``sulphur_target_fraction`` × limit, or
   halfway between the fuel's sulphur and the limit when the fuel is above
   that);
4. a switch back and forth that cannot finish before the next step down's
   start, or would leave the ship on regular fuel for less than the minimum
   time, is dropped: the ship stays on the compliant fuel, and the plan says
   why and what it costs (:mod:`planner.voyage.stay`); a voyage that departs
   inside an area must be on compliant fuel before departure (each circuit
   from the fuel the voyage file says it is on, flushed at the consumption
   alongside, :mod:`planner.voyage.port`), and the plan says so; a plan with
   no changeover says why (:mod:`planner.voyage.explain`);
5. quantities and SO₂ are computed (:mod:`planner.voyage.quantities`), and
   quantities, caution zones, the inlet viscosity path and early starts are
   checked (:mod:`planner.voyage.checks`).

The plan is built whole, once: its checks are pure functions of its parts, so
nothing is added to it afterwards. Every flush goes through one
:class:`~planner.voyage.flush_cache.FlushCache`, kept with the plan for the
confidence study; the changes are searched without the inlets' viscosity paths,
which are followed only for the changes the plan keeps. Moments are epoch
seconds (``*_epoch_s``: seconds since 1970-01-01 UTC).
"""

from __future__ import annotations

from collections.abc import Callable, Mapping, Sequence
from dataclasses import dataclass, field, replace
from datetime import datetime
from typing import TypeVar

from geo.compliance import RouteCheck
from geo.errors import InputError
from geo.limits import global_cap_changes_utc, global_cap_pct
from geo.schedule import to_epoch
from planner.common.timefmt import format_utc
from planner.flushing import FlushError, expected_for
from planner.fuels import Fuel
from planner.ship.scrubbers import Scrubber
from planner.ship.system import FuelSystem
from planner.voyage.changeovers import TargetUnreachable
from planner.voyage.checks import PlanWarning, passed_over_warnings, plan_warnings
from planner.voyage.explain import no_changeover_reason
from planner.voyage.flush_cache import FlushCache
from planner.voyage.fuel_choice import (
    FuelChoice,
    choose_fuels,
    fuel_choice_target_pct,
    regular_fuel,
)
from planner.voyage.port import port_state
from planner.voyage.quantities import Quantities, plan_quantities
from planner.voyage.runs import (
    Change,
    Run,
    change_between,
    changes_between,
    flushing_target_pct,
    make_runs,
    merge_same_fuel,
    with_thermal,
)
from planner.voyage.scrubber_events import (
    ScrubberEvent,
    ScrubberOutage,
    ScrubberSpan,
    ZonePassage,
)
from planner.voyage.scrubbing import (
    Availability,
    availability,
    load_range_warnings,
    served_circuits,
)
from planner.voyage.scrubbing_choice import served_choices, served_event, valve_fuels
from planner.voyage.scrubbing_spans import spans_and_events
from planner.voyage.stay import needless_switch_back
from planner.voyage.timeline import Timeline
from planner.voyage.voyage_file import Voyage

T = TypeVar("T")

__all__ = ["Plan", "Scrubbed", "flushing_target_pct", "fuels_on_board", "plan_voyage"]


@dataclass(frozen=True, eq=False)
class Scrubbed:
    """The plan of the circuits one scrubber serves whole.

    Parameters
    ----------
    scrubber : Scrubber
        The scrubber.
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
    circuits: tuple[str, ...]
    pieces: tuple[Availability, ...]
    choices: tuple[FuelChoice, ...]
    runs: tuple[Run, ...]
    changes: tuple[Change, ...]
    notes: tuple[str, ...] = ()
    warnings: tuple[PlanWarning, ...] = ()
    spans: tuple[ScrubberSpan, ...] = ()
    events: tuple[ScrubberEvent, ...] = ()


@dataclass(frozen=True, eq=False)
class Plan:
    """Everything the plan found; the reports print it.

    Parameters
    ----------
    voyage : Voyage
        The voyage file as loaded.
    system : FuelSystem
        The ship as she sails it (the voyage's fuels and tank soundings applied).
    check : RouteCheck
        The route check with the voyage's schedule.
    timeline : Timeline
        Speed and consumption against time.
    choices : tuple of FuelChoice
        The fuel chosen for every stretch of the route check, in route order.
    runs : tuple of Run
        The fuel actually burnt, run by run (after the stay-compliant rule).
    changes : tuple of Change
        Every changeover, in time order (a before-departure one first).
    quantities : Quantities
        Fuel needed and on board, SO₂ per stretch.
    notes : tuple of str
        Why the ship stays on compliant fuel between areas, in order; a flushing target
        moved off the fraction; why there is no changeover.
    warnings : tuple of PlanWarning
        The departure warning (if any), then the checks' warnings in print order.
    flushes : FlushCache or None
        The flushes the plan simulated, remembered for the confidence study.
    no_changeover_reason : str or None
        Why the plan has no changeover (None when it has one).
    scrubber_spans : tuple of ScrubberSpan
        Where served circuits burn fuel above the limit on a scrubber, in time order.
    scrubber_events : tuple of ScrubberEvent
        Every scrubber start, stop, mode change and outage, in time order.
    scrubbed : mapping of str to Scrubbed
        Each scrubber's circuits' own plan, by scrubber name (empty: no scrubber serves a
        circuit whole; :attr:`runs` then is the whole ship's, else the other circuits').
    """

    voyage: Voyage
    system: FuelSystem
    check: RouteCheck
    timeline: Timeline
    choices: tuple[FuelChoice, ...]
    runs: tuple[Run, ...]
    changes: tuple[Change, ...]
    quantities: Quantities
    notes: tuple[str, ...] = ()
    warnings: tuple[PlanWarning, ...] = ()
    flushes: FlushCache | None = None
    no_changeover_reason: str | None = None
    scrubber_spans: tuple[ScrubberSpan, ...] = ()
    scrubber_events: tuple[ScrubberEvent, ...] = ()
    scrubbed: Mapping[str, Scrubbed] = field(default_factory=dict)


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


def plan_voyage(voyage: Voyage, system: FuelSystem, check: RouteCheck,
                flushes: FlushCache | None = None, passages: Sequence[ZonePassage] = (),
                outages: Sequence[ScrubberOutage] = ()) -> Plan:
    """The whole plan (see the module notes).

    Parameters
    ----------
    voyage : Voyage
        The voyage file as loaded.
    system : FuelSystem
        The ship as she sails it (:func:`planner.voyage.onboard.ship_for_voyage`).
    check : RouteCheck
        The route check, with a schedule.
    flushes : FlushCache, optional
        Where the flushes are remembered (default: a new cache, kept with the plan).
    passages : sequence of ZonePassage, optional
        The route's passages through washwater discharge zones (for the scrubbers).
    outages : sequence of ScrubberOutage, optional
        The scrubbers' planned outages (the voyage file's).

    Raises
    ------
    InputError
        For a stretch no fuel meets, or a changeover that cannot be simulated.
    ValueError
        If the route check has no schedule.
    """
    if check.schedule is None:
        raise ValueError("planning needs a schedule (departure and speeds)")
    flushes = flushes if flushes is not None else FlushCache()
    timeline = Timeline(check.schedule, system, port_state(voyage, system))
    choices = choose_fuels(check.stretches, fuels_on_board(voyage, system),
                           voyage.fuel_choice_margin, voyage.file)
    served = served_circuits(system)
    plain = None if not served else tuple(
        c for c in system.circuits if not any(c in g for g in served.values()))
    runs, changes, notes = _group_plan(flushes, system, timeline, voyage,
                                       make_runs(choices, timeline), plain)
    regular = regular_fuel(choices)
    first = runs[0]
    inside = bool(check.stretches[0].areas)
    if inside:  # departs inside an area: the fuel she burns outside, even if never again
        regular = _outside_fuel(voyage, system, timeline.utc(first.from_epoch_s), regular)
    warnings: list[PlanWarning] = []
    departure, warning = _at_departure(flushes, voyage, system, timeline, first, regular,
                                       inside, plain)
    changes[:0] = departure
    if warning is not None:
        warnings.append(warning)
    elif inside and changes and plain is None:
        notes.append(f"The voyage departs inside {', '.join(check.stretches[0].areas)} with "
                     f"every circuit already on {first.fuel.name} ([port] departure_fuel): no "
                     "changeover alongside.")
    changes = [_with_event(check, ch) for ch in changes]
    scrubbed = [_scrubbed(flushes, voyage, system, timeline, check, choices, name, circuits,
                          passages, outages) for name, circuits in served.items()]
    for s in scrubbed:
        notes += s.notes
        warnings += s.warnings
    changes = _merged(system, [changes] + [s.changes for s in scrubbed])
    notes += _target_notes(voyage, changes)
    reason = None
    if not changes:
        reason = no_changeover_reason(check, runs, departs_compliant=inside)
        notes.append(reason)
    changes = [with_thermal(flushes, system, ch) for ch in changes]
    first_fuels = None if not served else {
        **{c: runs[0].fuel for c in plain or ()},
        **{c: s.runs[0].fuel for s in scrubbed for c in s.circuits}}
    quantities = plan_quantities(voyage, timeline, choices, runs, changes, flushes, first_fuels)
    warnings += passed_over_warnings(timeline, choices, voyage.fuel_choice_margin)
    warnings += plan_warnings(voyage, timeline, changes, quantities, flushes)
    warnings += load_range_warnings(system)
    spans = tuple(sorted((x for s in scrubbed for x in s.spans), key=lambda x: x.from_epoch_s))
    events = tuple(sorted((e for s in scrubbed for e in s.events), key=lambda e: e.epoch_s))
    return Plan(voyage, system, check, timeline, tuple(choices), tuple(runs), tuple(changes),
                quantities, tuple(notes), tuple(warnings), flushes, reason, spans, events,
                {s.scrubber.name: s for s in scrubbed})


def _group_plan(flushes: FlushCache, system: FuelSystem, timeline: Timeline, voyage: Voyage,
                runs: list[Run], circuits: tuple[str, ...] | None
                ) -> tuple[list[Run], list[Change], list[str]]:
    """The runs and changes of ``circuits`` (None: every circuit) after the stay-compliant
    rule, and its notes; no circuit: the runs as given, no change."""
    notes: list[str] = []
    if circuits is not None and not circuits:
        return runs, [], notes
    while True:
        changes = _simulated(voyage, changes_between, flushes, system, timeline, voyage, runs,
                             circuits)
        stay = needless_switch_back(changes, timeline, voyage.min_time_on_regular_h)
        if stay is None:
            return runs, changes, notes
        k, why = stay
        keep = runs[k]
        runs[k + 1] = replace(runs[k + 1], fuel=keep.fuel,
                              reasons=runs[k + 1].reasons + (why,))
        notes.append(why)
        runs = merge_same_fuel(runs)


def _scrubbed(flushes: FlushCache, voyage: Voyage, system: FuelSystem, timeline: Timeline,
              check: RouteCheck, plain: list[FuelChoice], name: str, circuits: tuple[str, ...],
              passages: Sequence[ZonePassage], outages: Sequence[ScrubberOutage]) -> Scrubbed:
    """The plan of one scrubber's circuits (:mod:`planner.voyage.scrubbing_choice`)."""
    scrubber = system.scrubbers[name]
    pieces = availability(scrubber, timeline, check.stretches, passages, outages)
    fuels = valve_fuels(system, circuits, fuels_on_board(voyage, system))
    choices = served_choices(check, timeline, scrubber, pieces, fuels, voyage.fuel_choice_margin,
                             voyage.file)
    runs, changes, notes = _group_plan(flushes, system, timeline, voyage,
                                       make_runs(choices, timeline), circuits)
    head = f"Scrubber {name} (circuit {', '.join(circuits)}): "
    notes = [head + n for n in notes]
    changes = [served_event(ch, check, timeline, scrubber, pieces, passages, outages)
               for ch in changes]
    first = runs[0]
    inside = bool(check.stretches[0].areas)
    departure, warning = _at_departure(flushes, voyage, system, timeline, first,
                                       regular_fuel(choices), inside and first.fuel.sulphur_pct
                                       <= check.stretches[0].limit_pct, circuits)
    changes = [_with_event(check, ch) for ch in departure + changes]
    spans, events = spans_and_events(scrubber, circuits, runs, changes, plain, pieces, timeline,
                                     outages)
    return Scrubbed(scrubber, circuits, tuple(pieces), tuple(choices), tuple(runs),
                    tuple(changes), tuple(notes), (warning,) if warning else (), tuple(spans),
                    tuple(events))


def _merged(system: FuelSystem, groups: list[list[Change]]) -> list[Change]:
    """The changes of every group of circuits in time order (stable: a group's own order
    kept), a change of one group joined to another group's at the same boundary (same
    moment, direction, area, event, limit and target)."""
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


def _with_event(check: RouteCheck, ch: Change) -> Change:
    """``ch`` with what its boundary is (:attr:`Change.event`): a departure, an area's
    coming into or going out of force while inside it, a change of the global cap, else a
    crossing."""
    if ch.event:
        return ch
    if ch.before_departure or ch.area == "departure":
        return replace(ch, event="departure")
    for f in check.force_events:
        if abs(to_epoch(f.time_utc) - ch.boundary_epoch_s) < 1.0 and f.area == ch.area:
            return replace(ch, event=f.event)
    if any(abs(to_epoch(m) - ch.boundary_epoch_s) < 1.0 for m in global_cap_changes_utc()):
        return replace(ch, event="cap_change")
    return replace(ch, event="enter" if ch.direction == "to_compliant" else "exit")


def _target_notes(voyage: Voyage, changes: list[Change]) -> list[str]:
    """A note for each changeover whose flushing target is not the voyage's fraction."""
    out = []
    for ch in changes:
        plain = ch.limit_pct * voyage.sulphur_target_fraction
        if ch.direction == "to_compliant" and abs(ch.target_pct - plain) > 1e-12:
            fuel = ch.circuits[0].to_fuel if ch.circuits else "the compliant fuel"
            share = voyage.sulphur_target_fraction * 100
            out.append(f"Flushing target for {ch.area}: {ch.target_pct:.3f} %, halfway between "
                       f"{fuel}'s own sulphur and the {ch.limit_pct:.2f} % limit ({share:g} % "
                       "of the limit is below the fuel).")
    return out


def _at_departure(flushes: FlushCache, voyage: Voyage, system: FuelSystem, timeline: Timeline,
                  first: Run, regular: Fuel, inside: bool,
                  only: tuple[str, ...] | None = None
                  ) -> tuple[list[Change], PlanWarning | None]:
    """The changes at departure, from the fuel each circuit is on (``[port] departure_fuel``,
    default ``regular``) to the first run's: a change to a lower-sulphur fuel made alongside,
    before departure; a change to a higher-sulphur fuel commenced at departure. Every
    circuit, or those of ``only``.

    Returns the changes (to compliant first) and the departure warning, if any.
    """
    port = timeline.port
    given = port.departure_fuel if port is not None else {}
    on = {c: voyage.fuel(given.get(c, regular.name))
          for c in (system.circuits if only is None else only)}
    out: list[Change] = []
    warning = None
    t0 = first.from_epoch_s
    for fuel in dict.fromkeys(f.name for f in on.values()):  # one change per fuel left
        circuits = tuple(c for c, f in on.items() if f.name == fuel)
        if on[circuits[0]].sulphur_pct > first.fuel.sulphur_pct:
            out.append(_departure_change(flushes, voyage, system, timeline, first,
                                         on[circuits[0]], circuits))
    if out and inside:
        start = min(c.start_epoch_s for ch in out for c in ch.circuits)
        load = port.describe_departure() if port is not None else ""
        warning = PlanWarning("departs_inside", (
            f"The voyage departs inside {out[0].area}: every consumer must be on "
            f"{first.fuel.name} before departure at {format_utc(timeline.utc(t0))}; start "
            f"the changeover alongside by {format_utc(timeline.utc(start))} (planned at "
            f"the consumption alongside: {load})."))
    for fuel in dict.fromkeys(f.name for f in on.values()):  # commenced at departure
        circuits = tuple(c for c, f in on.items() if f.name == fuel)
        if on[circuits[0]].sulphur_pct < first.fuel.sulphur_pct:
            pre = Run(first.from_m, first.from_m, t0, t0, on[circuits[0]], first.limit_pct, ())
            back = _simulated(voyage, change_between, flushes, system, timeline, voyage, pre, first,
                              t0, 0.0, False, circuits)
            out.append(replace(back, area="departure"))
    return out, warning


def _departure_change(flushes: FlushCache, voyage: Voyage, system: FuelSystem,
                      timeline: Timeline, first: Run, regular: Fuel,
                      circuits: tuple[str, ...]) -> Change:
    """The change of ``circuits`` to the first run's fuel, made alongside, from ``regular``."""
    t0 = first.from_epoch_s
    port = timeline.port
    for c in circuits:
        cons = system.circuits[c].consumers
        if port is not None and sum(port.departure_iso_t_h[n] for n in cons) <= 0.0:
            raise InputError(voyage.file, "port.departure_load_pct", port.describe_departure(),
                             f"a consumer of circuit {c} ({', '.join(cons)}) burning fuel "
                             f"alongside: it must be flushed to {first.fuel.name} before "
                             "departure")
    pre = Run(first.from_m, first.from_m, t0, t0, regular, 4.5, ())
    dep = _simulated(voyage, change_between, flushes, system, timeline, voyage, pre, first, t0, 0.0,
                     True, circuits)
    return replace(dep, area=first.areas[0] if first.areas else dep.area)


def _outside_fuel(voyage: Voyage, system: FuelSystem, when: datetime, regular: Fuel) -> Fuel:
    """The fuel the ship burns outside any area at ``when`` (UTC): the highest-sulphur fuel
    on board within the global cap's target (or ``regular`` if none is higher)."""
    cap = fuel_choice_target_pct(global_cap_pct(when), voyage.fuel_choice_margin)
    ok = [f for f in fuels_on_board(voyage, system) if f.sulphur_pct <= cap + 1e-12]
    return max(ok + [regular], key=lambda f: f.sulphur_pct)


def _simulated(voyage: Voyage, fn: Callable[..., T], *args: object) -> T:
    """``fn(*args)``, with a flushing simulation that cannot run (a tank runs dry, a pump below
    the consumption) reported as bad input naming the voyage file."""
    try:
        return fn(*args)
    except FlushError as exc:
        raise InputError(voyage.file, "changeover simulation", str(exc), expected_for(
                         exc, "tanks that hold enough fuel, and pumps that cover the "
                         "consumption, for every changeover")) from None
    except TargetUnreachable as exc:
        raise InputError(voyage.file, "margins.sulphur_target_fraction", str(exc),
                         "a sulphur target above the compliant fuel's own sulphur") from None
