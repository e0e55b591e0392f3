"""The voyage changeover plan: fuel per stretch, every changeover, and their checks.

Steps (DESIGN.md data flow):

1. the route check gives the limit on every stretch (:mod:`geo.compliance`);
2. each stretch gets the highest-sulphur fuel on board that meets its limit
   with the sulphur margin (:mod:`planner.voyage.fuel_choice`); neighbouring
   stretches on the same fuel form one *run*;
3. between runs, each circuit changes over: latest start before a step down,
   commenced at the exit after a step up (:mod:`planner.voyage.changeovers`);
4. a switch back and forth that cannot finish before the next step down's
   start is dropped: the ship stays on the compliant fuel, and the plan says
   why; a voyage that departs inside an area must be on compliant fuel before
   departure, and the plan says so;
5. quantities, SO₂, caution zones and the inlet viscosity path are checked
   (:mod:`planner.voyage.checks`).
"""

from __future__ import annotations

from dataclasses import dataclass, field, replace

from geo.compliance import RouteCheck
from planner.common.timefmt import format_utc
from planner.fuels import Fuel
from planner.ship.system import FuelSystem
from planner.voyage.changeovers import (
    CircuitChange,
    TargetUnreachable,
    plan_to_compliant,
    plan_to_regular,
)
from planner.voyage.fuel_choice import FuelChoice, choose_fuels
from planner.voyage.timeline import Timeline
from planner.voyage.voyage_file import Voyage


@dataclass(frozen=True)
class Run:
    """Consecutive stretches burning one fuel. Distances m, times epoch s."""

    from_m: float
    to_m: float
    from_s: float
    to_s: float
    fuel: Fuel
    limit_pct: float
    areas: tuple[str, ...]
    reasons: tuple[str, ...] = ()


@dataclass(frozen=True, eq=False)
class Change:
    """One changeover of the whole ship at one boundary: every circuit's part in it."""

    area: str
    direction: str
    boundary_m: float
    boundary_s: float
    limit_pct: float
    target_pct: float
    circuits: tuple[CircuitChange, ...]
    before_departure: bool = False


@dataclass(frozen=True, eq=False)
class Plan:
    """Everything the plan found; the reports print it."""

    voyage: Voyage
    system: FuelSystem
    check: RouteCheck
    timeline: Timeline
    choices: tuple[FuelChoice, ...]
    runs: tuple[Run, ...]
    changes: tuple[Change, ...]
    notes: list[str] = field(default_factory=list)
    warnings: list[str] = field(default_factory=list)


def fuels_on_board(voyage: Voyage, system: FuelSystem) -> list[Fuel]:
    """The voyage's fuels that some tank holds."""
    held = {f for t in system.tanks.values() for f, v in t.content_m3.items() if v > 0}
    return [f for f in voyage.fuels if f.name in held]


def make_runs(choices: list[FuelChoice], timeline: Timeline) -> list[Run]:
    """Merge neighbouring stretches that burn the same fuel."""
    runs: list[Run] = []
    sched = timeline.schedule
    for c in choices:
        st = c.stretch
        t0, t1 = (float(x) for x in sched.epoch_at([st.from_m, st.to_m]))
        if runs and runs[-1].fuel.name == c.fuel.name:
            last = runs[-1]
            runs[-1] = Run(last.from_m, st.to_m, last.from_s, t1, c.fuel,
                           min(last.limit_pct, st.limit_pct), tuple(dict.fromkeys(
                               last.areas + st.areas)), last.reasons + (c.reason,))
        else:
            runs.append(Run(st.from_m, st.to_m, t0, t1, c.fuel, st.limit_pct, st.areas,
                            (c.reason,)))
    return runs


def _area_of(run_in: Run, run_out: Run, direction: str) -> str:
    """The area entered (first of the run entered) or left (last of the run left)."""
    if direction == "to_compliant":
        return run_in.areas[0] if run_in.areas else "global cap"
    return run_out.areas[-1] if run_out.areas else "global cap"


def _change(system: FuelSystem, timeline: Timeline, voyage: Voyage, before: Run, after: Run,
            boundary_s: float, boundary_m: float, before_departure: bool = False) -> Change:
    down = after.fuel.sulphur_pct < before.fuel.sulphur_pct
    direction = "to_compliant" if down else "to_regular"
    limit = after.limit_pct if down else before.limit_pct
    target = limit * voyage.sulphur_target_fraction
    parts = []
    for name in system.circuits:
        a = system.tank_for(name, before.fuel.name)
        b = system.tank_for(name, after.fuel.name)
        if down:
            parts.append(plan_to_compliant(system, timeline, name, a, b, boundary_s,
                                           voyage.time_margin_h, limit, target))
        else:
            parts.append(plan_to_regular(system, timeline, name, a, b, boundary_s, limit))
    return Change(_area_of(after, before, direction), direction, boundary_m, boundary_s, limit,
                  target, tuple(parts), before_departure)


def _changes(system, timeline, voyage, runs: list[Run]) -> list[Change]:
    return [_change(system, timeline, voyage, a, b, b.from_s, b.from_m)
            for a, b in zip(runs[:-1], runs[1:], strict=True)]


def plan_voyage(voyage: Voyage, system: FuelSystem, check: RouteCheck) -> Plan:
    """The whole plan (see the module notes). Raises InputError for a stretch no fuel meets."""
    if check.schedule is None:
        raise ValueError("planning needs a schedule (departure and speeds)")
    timeline = Timeline(check.schedule, system)
    choices = choose_fuels(check.stretches, fuels_on_board(voyage, system),
                           voyage.sulphur_target_fraction, voyage.file)
    runs = make_runs(choices, timeline)
    notes: list[str] = []
    while True:
        changes = _simulated(voyage, _changes, system, timeline, voyage, runs)
        stay = _first_needless_switch_back(changes)
        if stay is None:
            break
        k, why = stay
        keep = runs[k]
        runs[k + 1] = replace(runs[k + 1], fuel=keep.fuel,
                              reasons=runs[k + 1].reasons + (why,))
        notes.append(why)
        runs = _merge_same_fuel(runs)
    regular = max((c.fuel for c in choices), key=lambda f: f.sulphur_pct)
    first = runs[0]
    if first.areas:  # departs inside an area: the fuel she burns outside, even if never again
        regular = _outside_fuel(voyage, system, timeline.utc(first.from_s), regular)
    warnings: list[str] = []
    if first.fuel.sulphur_pct < regular.sulphur_pct:
        pre = Run(first.from_m, first.from_m, first.from_s, first.from_s, regular, 4.5, ())
        dep = _simulated(voyage, _change, system, timeline, voyage, pre, first, first.from_s,
                         0.0, True)
        dep = replace(dep, area=first.areas[0] if first.areas else dep.area)
        changes.insert(0, dep)
        start = min(c.start_s for c in dep.circuits)
        warnings.append(
            f"The voyage departs inside {dep.area}: every consumer must be on "
            f"{first.fuel.name} before departure at {format_utc(timeline.utc(first.from_s))}; "
            f"start the changeover alongside by {format_utc(timeline.utc(start))} (planned at "
            "sea consumption: alongside it burns less, so start earlier still).")
    plan = Plan(voyage, system, check, timeline, tuple(choices), tuple(runs), tuple(changes),
                notes, warnings)
    from planner.voyage.checks import run_checks

    run_checks(plan)
    return plan


def _outside_fuel(voyage: Voyage, system: FuelSystem, when, regular: Fuel) -> Fuel:
    """The fuel the ship burns outside any area at ``when``: the highest-sulphur fuel on
    board within the global cap's target (or ``regular`` if none is higher)."""
    from geo.limits import global_cap_pct

    cap = global_cap_pct(when) * voyage.sulphur_target_fraction
    ok = [f for f in fuels_on_board(voyage, system) if f.sulphur_pct <= cap + 1e-12]
    return max(ok + [regular], key=lambda f: f.sulphur_pct)


def _simulated(voyage: Voyage, fn, *args):
    """``fn(*args)``, with a flushing simulation that cannot run (a tank runs dry, a pump
    below the consumption) reported as bad input naming the voyage file."""
    from geo.errors import InputError
    from planner.flushing import FlushError

    try:
        return fn(*args)
    except FlushError as exc:
        raise InputError(voyage.file, "changeover simulation", str(exc),
                         "tanks that hold enough fuel, and pumps that cover the consumption, "
                         "for every changeover") from None
    except TargetUnreachable as exc:
        raise InputError(voyage.file, "margins.sulphur_target_fraction", str(exc),
                         "a sulphur target above the compliant fuel's own sulphur") from None


def _merge_same_fuel(runs: list[Run]) -> list[Run]:
    out: list[Run] = []
    for r in runs:
        if out and out[-1].fuel.name == r.fuel.name:
            last = out[-1]
            out[-1] = Run(last.from_m, r.to_m, last.from_s, r.to_s, r.fuel,
                          min(last.limit_pct, r.limit_pct),
                          tuple(dict.fromkeys(last.areas + r.areas)), last.reasons + r.reasons)
        else:
            out.append(r)
    return out


def _first_needless_switch_back(changes: list[Change]) -> tuple[int, str] | None:
    """A switch back whose next step down must start before it completes: ``(run index of
    the compliant run before it, why)``."""
    for k in range(len(changes) - 1):
        back, fwd = changes[k], changes[k + 1]
        if back.direction != "to_regular" or fwd.direction != "to_compliant":
            continue
        done = [c.done_s for c in back.circuits]
        next_start = min(c.start_s for c in fwd.circuits)
        if any(d is None for d in done) or max(done) > next_start:
            fuel = back.circuits[0].from_fuel
            end = max((d for d in done if d is not None), default=None)
            why = (f"Stay on {fuel} from the exit of {back.area} to {fwd.area}: switching back "
                   f"would complete at {format_utc(_utc(end))} but the next changeover must "
                   f"start by {format_utc(_utc(next_start))}.")
            return k, why
    return None


def _utc(s: float | None):
    from geo.schedule import from_epoch

    return None if s is None else from_epoch(s)
