"""The plan's building blocks: runs of one fuel and the changes of fuel between them.

A *run* is a stretch of the voyage on which the ship burns one fuel
(neighbouring stretches of the route check on the same fuel, merged); a
*change* is the whole ship's changeover at the boundary between two runs,
one :class:`planner.voyage.changeovers.CircuitChange` per circuit.

Moments are epoch seconds (``*_epoch_s``: seconds since 1970-01-01 UTC),
distances metres along the route from departure.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass, replace
from typing import TypeVar

from geo.errors import InputError
from planner.common.timefmt import format_utc
from planner.flushing import FlushError, expected_for
from planner.fuels import Fuel
from planner.ship.system import FuelSystem
from planner.voyage.changeovers import (
    CircuitChange,
    TargetUnreachable,
    plan_to_compliant,
    plan_to_regular,
)
from planner.voyage.flush_cache import FlushCache
from planner.voyage.fuel_choice import FuelChoice
from planner.voyage.timeline import Timeline
from planner.voyage.voyage_file import Voyage
from planner.voyage.warning import PlanWarning

T = TypeVar("T")

SCRUBBER_OUT = "scrubber_out_of_service"
"""A served circuit's change to compliant fuel for a planned scrubber outage: compliant by
its moment (:mod:`planner.voyage.scrubbing`)."""
SCRUBBER_BACK = "scrubber_in_service"
"""A served circuit's change back to high-sulphur fuel when a scrubber's outage ends:
commenced at its moment."""
ZONE_ENTER = "zone_enter"
"""A served circuit's change to compliant fuel before entering a washwater discharge zone the
scrubber cannot work in (a place the ship reaches, like an area's entry)."""
ZONE_EXIT = "zone_exit"
"""A served circuit's change back to high-sulphur fuel on leaving such a zone."""
LOAD_OUT = "load_out_of_range"
"""A served circuit's change to compliant fuel before a leg on which a served engine's load
is outside the scrubber's load range (a place, like an area's entry)."""
LOAD_IN = "load_in_range"
"""A served circuit's change back to high-sulphur fuel where the load is back in range."""
SCRUBBER_EVENTS = (ZONE_ENTER, ZONE_EXIT, SCRUBBER_OUT, SCRUBBER_BACK, LOAD_OUT, LOAD_IN)
"""The boundary events of served circuits' changes only (:mod:`planner.voyage.scrubbing_choice`)."""
CLOCK_EVENTS = ("comes_into_force", "ceases", "departure", "cap_change", SCRUBBER_OUT,
                SCRUBBER_BACK)
"""The boundary events that are a moment on the clock, not a place the ship reaches."""


@dataclass(frozen=True)
class Run:
    """Consecutive stretches burning one fuel.

    Parameters
    ----------
    from_m, to_m : float [m]
        Where the run begins and ends, along the route from departure.
    from_epoch_s, to_epoch_s : float [s]
        When it begins and ends, seconds since 1970-01-01 UTC.
    fuel : Fuel
        The fuel burnt on the run.
    limit_pct : float [% m/m]
        The lowest sulphur limit in force on any of its stretches.
    areas : tuple of str
        The control areas it passes, in route order (empty: global cap only).
    reasons : tuple of str
        Why it burns ``fuel``: the choice of each stretch, then any plan note.
    """

    from_m: float
    to_m: float
    from_epoch_s: float
    to_epoch_s: float
    fuel: Fuel
    limit_pct: float
    areas: tuple[str, ...]
    reasons: tuple[str, ...] = ()


@dataclass(frozen=True, eq=False)
class Change:
    """One changeover of the whole ship at one boundary: every circuit's part in it.

    Parameters
    ----------
    area : str
        The area entered (``to_compliant``) or left (``to_regular``).
    direction : str
        ``"to_compliant"`` (a step down in limit) or ``"to_regular"`` (a step up).
    boundary_m : float [m]
        The boundary along the route from departure (0 before departure).
    boundary_epoch_s : float [s]
        When the ship reaches it, seconds since 1970-01-01 UTC.
    limit_pct : float [% m/m]
        The sulphur limit on the compliant side of the boundary.
    target_pct : float [% m/m]
        The planning target, ``limit_pct`` × the voyage's sulphur target fraction.
    circuits : tuple of CircuitChange
        Each circuit's changeover, in the ship file's circuit order.
    before_departure : bool
        The voyage departs inside the area: the change is made alongside.
    event : str
        What the boundary is: ``"enter"`` or ``"exit"`` (a boundary crossing),
        ``"comes_into_force"`` or ``"ceases"`` (the area's date, while the ship is inside
        it: a clock deadline, :class:`geo.compliance.ForceEvent`), ``"departure"`` (made
        alongside before departure, or commenced at departure) or ``"cap_change"`` (the
        global cap changes under way), ``"scrubber_out_of_service"`` (a served circuit
        compliant by a scrubber's planned outage) or ``"scrubber_in_service"`` (back to
        high-sulphur fuel when it ends), ``"zone_enter"`` / ``"zone_exit"`` (a served
        circuit's change at a washwater discharge zone the scrubber cannot work in, the zone
        as ``area``), ``"load_out_of_range"`` / ``"load_in_range"`` (a served circuit's
        change at the start of a leg on which a served engine's load leaves or re-enters
        the scrubber's load range). Empty: not yet known (``enter`` / ``exit`` by direction).
    """

    area: str
    direction: str
    boundary_m: float
    boundary_epoch_s: float
    limit_pct: float
    target_pct: float
    circuits: tuple[CircuitChange, ...]
    before_departure: bool = False
    event: str = ""

    @property
    def boundary_event(self) -> str:
        """:attr:`event`, or ``"enter"`` / ``"exit"`` by direction when not set."""
        if self.event:
            return self.event
        return "enter" if self.direction == "to_compliant" else "exit"

    @property
    def clock_deadline(self) -> bool:
        """The boundary is a moment on the clock, not a place the ship reaches (an area's
        date, a departure or a change of the global cap): no arrival-time uncertainty."""
        return self.boundary_event in CLOCK_EVENTS


def _joined(first: Run, second: Run, reasons: tuple[str, ...]) -> Run:
    """``first`` continued to the end of ``second`` (same fuel)."""
    return Run(first.from_m, second.to_m, first.from_epoch_s, second.to_epoch_s, second.fuel,
               min(first.limit_pct, second.limit_pct),
               tuple(dict.fromkeys(first.areas + second.areas)), first.reasons + reasons)


def make_runs(choices: list[FuelChoice], timeline: Timeline) -> list[Run]:
    """Merge neighbouring stretches that burn the same fuel.

    Parameters
    ----------
    choices : list of FuelChoice
        The fuel of every stretch of the route check, in route order.
    timeline : Timeline
        The voyage's timeline (gives each stretch's moments).

    Returns
    -------
    list of Run
        The runs in route order; neighbours differ in fuel.
    """
    runs: list[Run] = []
    sched = timeline.schedule
    for c in choices:
        st = c.stretch
        t0, t1 = (float(x) for x in sched.epoch_at([st.from_m, st.to_m]))
        here = Run(st.from_m, st.to_m, t0, t1, c.fuel, st.limit_pct, st.areas, (c.reason,))
        if runs and runs[-1].fuel.name == c.fuel.name:
            runs[-1] = _joined(runs[-1], here, here.reasons)
        else:
            runs.append(here)
    return runs


def merge_same_fuel(runs: list[Run]) -> list[Run]:
    """Runs with neighbours on the same fuel joined (after a run's fuel was changed).

    Parameters
    ----------
    runs : list of Run
        Runs in route order.

    Returns
    -------
    list of Run
        The same voyage with no two neighbours on one fuel.
    """
    out: list[Run] = []
    for r in runs:
        if out and out[-1].fuel.name == r.fuel.name:
            out[-1] = _joined(out[-1], r, r.reasons)
        else:
            out.append(r)
    return out


def area_of(run_in: Run, run_out: Run, direction: str) -> str:
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


def change_between(flushes: FlushCache, system: FuelSystem, timeline: Timeline,
                   voyage: Voyage, before: Run, after: Run, boundary_epoch_s: float,
                   boundary_m: float, before_departure: bool = False,
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
    return Change(area_of(after, before, direction), direction, boundary_m, boundary_epoch_s,
                  limit, target, tuple(parts), before_departure)


def changes_between(flushes: FlushCache, system: FuelSystem, timeline: Timeline,
                    voyage: Voyage, runs: list[Run],
                    circuits: tuple[str, ...] | None = None) -> list[Change]:
    """The change at every boundary between ``runs``, every circuit (or those named), without
    the thermal paths; change k lies between runs k and k + 1."""
    return [change_between(flushes, system, timeline, voyage, a, b, b.from_epoch_s, b.from_m,
                           False, circuits)
            for a, b in zip(runs[:-1], runs[1:], strict=True)]


def with_thermal(flushes: FlushCache, system: FuelSystem, ch: Change) -> Change:
    """``ch`` with every circuit's inlet viscosity paths."""
    parts = tuple(replace(p, study=flushes.with_thermal(system, p.study)) for p in ch.circuits)
    return replace(ch, circuits=parts)


def at_departure(flushes: FlushCache, voyage: Voyage, system: FuelSystem, timeline: Timeline,
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
            out.append(departure_change(flushes, voyage, system, timeline, first,
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
            back = simulated(voyage, change_between, flushes, system, timeline, voyage, pre, first,
                              t0, 0.0, False, circuits)
            out.append(replace(back, area="departure"))
    return out, warning


def departure_change(flushes: FlushCache, voyage: Voyage, system: FuelSystem,
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
    dep = simulated(voyage, change_between, flushes, system, timeline, voyage, pre, first, t0, 0.0,
                     True, circuits)
    return replace(dep, area=first.areas[0] if first.areas else dep.area)


def simulated(voyage: Voyage, fn: Callable[..., T], *args: object) -> T:
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
