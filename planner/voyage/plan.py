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
   checked (:mod:`planner.voyage.checks`);
6. with a scrubber serving circuits whole (:mod:`planner.voyage.scrubbing`, its
   rules), steps 2 to 4 run for the other circuits (:attr:`Plan.runs`) and, on
   their own fuel choice (the scrubber's ``max_sulphur_pct`` where it is
   available), for the served circuits (:mod:`planner.voyage.scrubbing_plan`);
   every change is put in one time order, and the spans and events say where
   the plan relies on the scrubber (:mod:`planner.voyage.scrubbing_spans`). With
   none, the plan is as without scrubbers, byte for byte.

The plan is built whole, once: its checks are pure functions of its parts, so
nothing is added to it afterwards. Every flush goes through one
:class:`~planner.voyage.flush_cache.FlushCache`, kept with the plan for the
confidence study; the changes are searched without the inlets' viscosity paths,
which are followed only for the changes the plan keeps. Moments are epoch
seconds (``*_epoch_s``: seconds since 1970-01-01 UTC).
"""

from __future__ import annotations

from collections.abc import Iterable, Sequence
from dataclasses import dataclass, replace
from datetime import datetime

from geo.compliance import RouteCheck
from geo.limits import global_cap_changes_utc, global_cap_pct
from geo.schedule import to_epoch
from planner.fuels import Fuel
from planner.ship.system import FuelSystem
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
from planner.voyage.quantities import Quantities, plan_quantities, valve_periods
from planner.voyage.runs import (
    Change,
    Run,
    at_departure,
    flushing_target_pct,
    make_runs,
    with_thermal,
)
from planner.voyage.scrubber_events import (
    MODE_CHANGE,
    ScrubberEvent,
    ScrubberOutage,
    ScrubberSpan,
    ZonePassage,
)
from planner.voyage.scrubbing import joint_outages, load_range_warnings, served_groups
from planner.voyage.scrubbing_choice import valve_fuels
from planner.voyage.scrubbing_plan import Scrubbed, fuels_on_board, merged, scrubbed_plan
from planner.voyage.scrubbing_spans import span_so2
from planner.voyage.stay import group_plan
from planner.voyage.timeline import Timeline
from planner.voyage.voyage_file import Voyage

__all__ = ["Plan", "Scrubbed", "flushing_target_pct", "fuels_on_board", "plan_voyage"]


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
    scrubbed : tuple of Scrubbed
        The own plan of each scrubber's circuits (those whose valves select the same fuels
        together), in the ship file's order (empty: no scrubber serves a circuit whole;
        :attr:`runs` then is the whole ship's, else the other circuits').
    scrubber_so2_kg : tuple of (float, float) [kg]
        For each of :attr:`scrubber_spans`, the served circuits' SO₂ formed and after
        cleaning at most (:func:`planner.voyage.scrubbing_spans.span_so2`).
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
    scrubbed: tuple[Scrubbed, ...] = ()
    scrubber_so2_kg: tuple[tuple[float, float], ...] = ()

    @property
    def first_fuels(self) -> dict[str, Fuel] | None:
        """Each circuit's fuel at departure when a scrubber's circuits have their own runs
        (None: every circuit starts on ``runs[0].fuel``), for
        :func:`planner.voyage.quantities.valve_periods`."""
        return _first_fuels(self.system, self.runs, self.scrubbed)


def _first_fuels(system: FuelSystem, runs: Sequence[Run],
                 scrubbed: Sequence[Scrubbed]) -> dict[str, Fuel] | None:
    if not scrubbed:
        return None
    own = {c: s.runs[0].fuel for s in scrubbed for c in s.circuits}
    return {c: own.get(c, runs[0].fuel) for c in system.circuits}


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
    served = served_groups(system)
    plain = None if not served else tuple(
        c for c in system.circuits if not any(c in g for _, _, g in served))
    runs, changes, notes = group_plan(flushes, system, timeline, voyage,
                                       make_runs(choices, timeline), plain)
    regular = regular_fuel(choices)
    first = runs[0]
    inside = bool(check.stretches[0].areas)
    if inside:  # departs inside an area: the fuel she burns outside, even if never again
        regular = _outside_fuel(voyage, system, timeline.utc(first.from_epoch_s), regular)
    warnings: list[PlanWarning] = []
    departure, warning = at_departure(flushes, voyage, system, timeline, first, regular,
                                       inside, plain)
    changes[:0] = departure
    if warning is not None:
        warnings.append(warning)
    elif inside and changes and plain is None:
        notes.append(f"The voyage departs inside {', '.join(check.stretches[0].areas)} with "
                     f"every circuit already on {first.fuel.name} ([port] departure_fuel): no "
                     "changeover alongside.")
    changes = [_with_event(check, ch) for ch in changes]
    scrubbed = [scrubbed_plan(flushes, voyage, system, timeline, check, scrubber,
                              names, group, passages, joint_outages(outages, names, scrubber),
                              regular)
                for names, scrubber, circuits in served
                for group in _by_valve_fuels(voyage, system, circuits)]
    for s in scrubbed:
        notes += s.notes
        warnings += s.warnings
    changes = merged(system, [changes] + [[_with_event(check, ch) for ch in s.changes]
                              for s in scrubbed])
    notes += _target_notes(voyage, changes)
    reason = None
    if not changes:
        reason = no_changeover_reason(check, runs, departs_compliant=inside)
        notes.append(reason)
    changes = [with_thermal(flushes, system, ch) for ch in changes]
    first_fuels = _first_fuels(system, runs, scrubbed) if served else None
    quantities = plan_quantities(voyage, timeline, choices, runs, changes, flushes, first_fuels)
    warnings += passed_over_warnings(timeline, choices, voyage.fuel_choice_margin)
    warnings += plan_warnings(voyage, timeline, changes, quantities, flushes)
    warnings += load_range_warnings(system)
    spans = tuple(sorted((x for s in scrubbed for x in s.spans), key=lambda x: x.from_epoch_s))
    events = tuple(sorted(_one_mode_change(e for s in scrubbed for e in s.events),
                          key=lambda e: e.epoch_s))
    periods = [(p[0], p[1:]) for p in valve_periods(voyage, timeline, runs, changes,
                                                    first_fuels)] if spans else []
    so2 = tuple(span_so2(timeline, flushes, periods, x) for x in spans)
    return Plan(voyage, system, check, timeline, tuple(choices), tuple(runs), tuple(changes),
                quantities, tuple(notes), tuple(warnings), flushes, reason, spans, events,
                tuple(scrubbed), so2)


def _one_mode_change(events: Iterable[ScrubberEvent]) -> list[ScrubberEvent]:
    """``events`` with a scrubber's mode change listed once when two groups of its circuits
    both meet it (same moment to 1 s, same mode)."""
    out: list[ScrubberEvent] = []
    for e in events:
        if e.kind == MODE_CHANGE and any(
                (o.scrubber, o.kind, o.mode) == (e.scrubber, e.kind, e.mode)
                and abs(o.epoch_s - e.epoch_s) < 1.0 for o in out):
            continue
        out.append(e)
    return out


def _by_valve_fuels(voyage: Voyage, system: FuelSystem,
                    circuits: tuple[str, ...]) -> list[tuple[str, ...]]:
    """``circuits`` in groups whose changeover valves select the same fuels (one fuel choice
    each), in the ship file's order."""
    fuels = fuels_on_board(voyage, system)
    out: dict[tuple[str, ...], list[str]] = {}
    for c in circuits:
        out.setdefault(tuple(f.name for f in valve_fuels(system, (c,), fuels)), []).append(c)
    return [tuple(g) for g in out.values()]


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


def _outside_fuel(voyage: Voyage, system: FuelSystem, when: datetime, regular: Fuel) -> Fuel:
    """The fuel the ship burns outside any area at ``when`` (UTC): the highest-sulphur fuel
    on board within the global cap's target (or ``regular`` if none is higher)."""
    cap = fuel_choice_target_pct(global_cap_pct(when), voyage.fuel_choice_margin)
    ok = [f for f in fuels_on_board(voyage, system) if f.sulphur_pct <= cap + 1e-12]
    return max(ok + [regular], key=lambda f: f.sulphur_pct)
