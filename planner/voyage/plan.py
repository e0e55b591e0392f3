"""The voyage changeover plan: fuel per stretch, every changeover, and their checks.

Steps (DEVELOPERS.md, "How the plan is made"):

1. the route check gives the limit on every stretch (:mod:`geo.compliance`);
2. each stretch gets the highest-sulphur fuel on board that meets its limit
   with the sulphur margin (:mod:`planner.voyage.fuel_choice`); neighbouring
   stretches on the same fuel form one *run* (:mod:`planner.voyage.runs`);
3. between runs, each circuit changes over: latest start before a step down,
   commenced at the exit after a step up (:mod:`planner.voyage.changeovers`);
4. a switch back and forth that cannot finish before the next step down's
   start is dropped: the ship stays on the compliant fuel, and the plan says
   why; a voyage that departs inside an area must be on compliant fuel before
   departure, and the plan says so;
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
from geo.limits import global_cap_pct
from geo.schedule import from_epoch
from planner.common.timefmt import format_utc
from planner.flushing import FlushError
from planner.fuels import Fuel
from planner.ship.system import FuelSystem
from planner.voyage.changeovers import TargetUnreachable, plan_to_compliant, plan_to_regular
from planner.voyage.checks import PlanWarning, plan_warnings
from planner.voyage.flush_cache import FlushCache
from planner.voyage.fuel_choice import FuelChoice, choose_fuels, regular_fuel
from planner.voyage.quantities import Quantities, plan_quantities
from planner.voyage.runs import Change, Run, make_runs, merge_same_fuel
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
        Why the ship stays on compliant fuel between areas, in order.
    warnings : tuple of PlanWarning
        The departure warning (if any), then the checks' warnings in print order.
    flushes : FlushCache or None
        The flushes the plan simulated, remembered for the confidence study.
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


def _change(flushes: FlushCache, system: FuelSystem, timeline: Timeline, voyage: Voyage,
            before: Run, after: Run, boundary_epoch_s: float, boundary_m: float,
            before_departure: bool = False) -> Change:
    """The change between two runs, every circuit, without the thermal paths."""
    down = after.fuel.sulphur_pct < before.fuel.sulphur_pct
    direction = "to_compliant" if down else "to_regular"
    limit = after.limit_pct if down else before.limit_pct
    target = limit * voyage.sulphur_target_fraction
    parts = []
    for name in system.circuits:
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
    timeline = Timeline(check.schedule, system)
    choices = choose_fuels(check.stretches, fuels_on_board(voyage, system),
                           voyage.sulphur_target_fraction, voyage.file)
    runs = make_runs(choices, timeline)
    notes: list[str] = []
    while True:
        changes = _simulated(voyage, _changes, flushes, system, timeline, voyage, runs)
        stay = _first_needless_switch_back(changes)
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
    if first.areas:  # departs inside an area: the fuel she burns outside, even if never again
        regular = _outside_fuel(voyage, system, timeline.utc(first.from_epoch_s), regular)
    warnings: list[PlanWarning] = []
    if first.fuel.sulphur_pct < regular.sulphur_pct:
        dep = _departure_change(flushes, voyage, system, timeline, first, regular)
        changes.insert(0, dep)
        start = min(c.start_epoch_s for c in dep.circuits)
        warnings.append(PlanWarning("departs_inside", (
            f"The voyage departs inside {dep.area}: every consumer must be on "
            f"{first.fuel.name} before departure at "
            f"{format_utc(timeline.utc(first.from_epoch_s))}; start the changeover alongside by "
            f"{format_utc(timeline.utc(start))} (planned at sea consumption: alongside it burns "
            "less, so start earlier still).")))
    changes = [_with_thermal(flushes, system, ch) for ch in changes]
    quantities = plan_quantities(voyage, timeline, choices, runs, changes)
    warnings += plan_warnings(voyage, timeline, changes, quantities, flushes)
    return Plan(voyage, system, check, timeline, tuple(choices), tuple(runs), tuple(changes),
                quantities, tuple(notes), tuple(warnings), flushes)


def _departure_change(flushes: FlushCache, voyage: Voyage, system: FuelSystem,
                      timeline: Timeline, first: Run, regular: Fuel) -> Change:
    """The change to the first run's fuel, made alongside, from ``regular``."""
    t0 = first.from_epoch_s
    pre = Run(first.from_m, first.from_m, t0, t0, regular, 4.5, ())
    dep = _simulated(voyage, _change, flushes, system, timeline, voyage, pre, first, t0, 0.0,
                     True)
    return replace(dep, area=first.areas[0] if first.areas else dep.area)


def _outside_fuel(voyage: Voyage, system: FuelSystem, when: datetime, regular: Fuel) -> Fuel:
    """The fuel the ship burns outside any area at ``when`` (UTC): the highest-sulphur fuel
    on board within the global cap's target (or ``regular`` if none is higher)."""
    cap = global_cap_pct(when) * voyage.sulphur_target_fraction
    ok = [f for f in fuels_on_board(voyage, system) if f.sulphur_pct <= cap + 1e-12]
    return max(ok + [regular], key=lambda f: f.sulphur_pct)


def _simulated(voyage: Voyage, fn: Callable[..., T], *args: object) -> T:
    """``fn(*args)``, with a flushing simulation that cannot run (a tank runs dry, a pump below
    the consumption) reported as bad input naming the voyage file."""
    try:
        return fn(*args)
    except FlushError as exc:
        raise InputError(voyage.file, "changeover simulation", str(exc),
                         "tanks that hold enough fuel, and pumps that cover the consumption, "
                         "for every changeover") from None
    except TargetUnreachable as exc:
        raise InputError(voyage.file, "margins.sulphur_target_fraction", str(exc),
                         "a sulphur target above the compliant fuel's own sulphur") from None


def _first_needless_switch_back(changes: list[Change]) -> tuple[int, str] | None:
    """A switch back whose next step down must start before it completes: ``(run index of
    the compliant run before it, why)``."""
    for k in range(len(changes) - 1):
        back, fwd = changes[k], changes[k + 1]
        if back.direction != "to_regular" or fwd.direction != "to_compliant":
            continue
        done = [c.done_epoch_s for c in back.circuits]
        next_start = min(c.start_epoch_s for c in fwd.circuits)
        if any(d is None for d in done) or max(done) > next_start:
            fuel = back.circuits[0].from_fuel
            end = max((d for d in done if d is not None), default=None)
            why = (f"Stay on {fuel} from the exit of {back.area} to {fwd.area}: switching back "
                   f"would complete at {format_utc(_utc(end))} but the next changeover must "
                   f"start by {format_utc(_utc(next_start))}.")
            return k, why
    return None


def _utc(epoch_s: float | None) -> datetime | None:
    return None if epoch_s is None else from_epoch(epoch_s)
