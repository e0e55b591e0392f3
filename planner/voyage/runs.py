"""The plan's building blocks: runs of one fuel and the changes of fuel between them.

A *run* is a stretch of the voyage on which the ship burns one fuel
(neighbouring stretches of the route check on the same fuel, merged); a
*change* is the whole ship's changeover at the boundary between two runs,
one :class:`planner.voyage.changeovers.CircuitChange` per circuit.

Moments are epoch seconds (``*_epoch_s``: seconds since 1970-01-01 UTC),
distances metres along the route from departure.
"""

from __future__ import annotations

from dataclasses import dataclass

from planner.fuels import Fuel
from planner.voyage.changeovers import CircuitChange
from planner.voyage.fuel_choice import FuelChoice
from planner.voyage.timeline import Timeline


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
        global cap changes under way). Empty: not yet known (``enter`` / ``exit`` by
        direction).
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
        return self.boundary_event in ("comes_into_force", "ceases", "departure", "cap_change")


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
