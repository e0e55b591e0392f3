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

from collections.abc import Callable
from dataclasses import dataclass, replace
from datetime import datetime
from typing import TypeVar

from geo.compliance import RouteCheck
from geo.errors import InputError
from geo.limits import global_cap_changes_utc, global_cap_pct
from geo.schedule import to_epoch
from planner.common.timefmt import format_utc
from planner.flushing import FlushError, expected_for
from planner.fuels import Fuel
from planner.ship.system import FuelSystem
from planner.voyage.changeovers import TargetUnreachable, plan_to_compliant, plan_to_regular
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
from planner.voyage.runs import Change, Run, make_runs, merge_same_fuel
from planner.voyage.scrubber_events import ScrubberEvent, ScrubberSpan
from planner.voyage.stay import needless_switch_back
from planner.voyage.timeline import Timeline
from planner.voyage.voyage_file import Voyage

T = TypeVar("T")


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


def _area_of(run_in: Run, run_out: Run, direction: str) -> str:
    """The area entered (first of the run entered) or left (last of the run left)."""
    if direction == "to_compliant":
        return run_in.areas[0] if run_in.areas else "global cap"
    return run_out.areas[-1] if run_out.areas else "global cap"


def flushing_target_pct(limit_pct: float, fraction: float, fuel: Fuel) -> float:
    """The sulphur the inlets are flushed to, % m/m: ``fraction`` × limit, or halfway
    between the fuel's own sulphur and the limit when the fuel is at or above that (a
    0.47 % fuel under the 0.50 % cap: 0.485 %).

    Parameters
    ----------
    limit_pct : float [% m/m]
        The limit on the compliant side.
    fraction : float [-]
        The voyage's sulphur target fraction.
    fuel : Fuel
        The compliant fuel.
    """
    target = limit_pct * fraction
    if fuel.sulphur_pct < target:
        return target
    return 0.5 * (fuel.sulphur_pct + limit_pct)


def _change(flushes: FlushCache, system: FuelSystem, timeline: Timeline, voyage: Voyage,
            before: Run, after: Run, boundary_epoch_s: float, boundary_m: float,
            before_departure: bool = False,
            circuits: tuple[str, ...] | None = None) -> Change:
    """The change between two runs, every circuit (or those named), without the thermal
    paths."""
    down = after.fuel.sulphur_pct < before.fuel.sulphur_pct
    direction = "to_compliant" if down else "to_regular"
    limit = after.limit_pct if down else before.limit_pct
    target = flushing_target_pct(limit, voyage.sulphur_target_fraction, after.fuel)
    parts = []
    for name in (circuits if circuits is not None else tuple(system.circuits)):
        a = system.tank_for(name, before.fuel.name)
        b = system.tank_for(name, after.fuel.name)
        if down:
            parts.append(plan_to_compliant(system, timeline, name, a, b, boundary_epoch_s,
                                           voyage.time_margin_h, limit, target, flushes,
                                           thermal=False))
        else:
            parts.append(plan_to_regular(system, timeline, name, a, b, boundary_epoch_s, limit,
                                         flushes, thermal=False))
    return Change(_area_of(after, before, direction), direction, boundary_m, boundary_epoch_s,
                  limit, target, tuple(parts), before_departure)


def _changes(flushes: FlushCache, system: FuelSystem, timeline: Timeline, voyage: Voyage,
             runs: list[Run]) -> list[Change]:
    return [_change(flushes, system, timeline, voyage, a, b, b.from_epoch_s, b.from_m)
            for a, b in zip(runs[:-1], runs[1:], strict=True)]


def _with_thermal(flushes: FlushCache, system: FuelSystem, ch: Change) -> Change:
    """``ch`` with every circuit's inlet viscosity paths."""
    parts = tuple(replace(p, study=flushes.with_thermal(system, p.study)) for p in ch.circuits)
    return replace(ch, circuits=parts)


def plan_voyage(voyage: Voyage, system: FuelSystem, check: RouteCheck,
                flushes: FlushCache | None = None) -> Plan:
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
    runs = make_runs(choices, timeline)
    notes: list[str] = []
    while True:
        changes = _simulated(voyage, _changes, flushes, system, timeline, voyage, runs)
        stay = needless_switch_back(changes, timeline, voyage.min_time_on_regular_h)
        if stay is None:
            break
        k, why = stay
        keep = runs[k]
        runs[k + 1] = replace(runs[k + 1], fuel=keep.fuel,
                              reasons=runs[k + 1].reasons + (why,))
        notes.append(why)
        runs = merge_same_fuel(runs)
    regular = regular_fuel(choices)
    first = runs[0]
    inside = bool(check.stretches[0].areas)
    if inside:  # departs inside an area: the fuel she burns outside, even if never again
        regular = _outside_fuel(voyage, system, timeline.utc(first.from_epoch_s), regular)
    warnings: list[PlanWarning] = []
    departure, warning = _at_departure(flushes, voyage, system, timeline, first, regular,
                                       inside)
    changes[:0] = departure
    if warning is not None:
        warnings.append(warning)
    elif inside and changes:
        notes.append(f"The voyage departs inside {', '.join(check.stretches[0].areas)} with "
                     f"every circuit already on {first.fuel.name} ([port] departure_fuel): no "
                     "changeover alongside.")
    notes += _target_notes(voyage, changes)
    reason = None
    if not changes:
        reason = no_changeover_reason(check, runs, departs_compliant=inside)
        notes.append(reason)
    changes = [_with_thermal(flushes, system, _with_event(check, ch)) for ch in changes]
    quantities = plan_quantities(voyage, timeline, choices, runs, changes, flushes)
    warnings += passed_over_warnings(timeline, choices, voyage.fuel_choice_margin)
    warnings += plan_warnings(voyage, timeline, changes, quantities, flushes)
    return Plan(voyage, system, check, timeline, tuple(choices), tuple(runs), tuple(changes),
                quantities, tuple(notes), tuple(warnings), flushes, reason)


def _with_event(check: RouteCheck, ch: Change) -> Change:
    """``ch`` with what its boundary is (:attr:`Change.event`): a departure, an area's
    coming into or going out of force while inside it, a change of the global cap, else a
    crossing."""
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
                  first: Run, regular: Fuel, inside: bool
                  ) -> tuple[list[Change], PlanWarning | None]:
    """The changes at departure, from the fuel each circuit is on (``[port] departure_fuel``,
    default ``regular``) to the first run's: a change to a lower-sulphur fuel made alongside,
    before departure; a change to a higher-sulphur fuel commenced at departure.

    Returns the changes (to compliant first) and the departure warning, if any.
    """
    port = timeline.port
    given = port.departure_fuel if port is not None else {}
    on = {c: voyage.fuel(given.get(c, regular.name)) for c in system.circuits}
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
            back = _simulated(voyage, _change, flushes, system, timeline, voyage, pre, first,
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
    dep = _simulated(voyage, _change, flushes, system, timeline, voyage, pre, first, t0, 0.0,
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
