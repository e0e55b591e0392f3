"""Bunkering the short fuel at a port on the way (the voyage file's ``[[bunker_port]]``).

At a port reached at ``t`` the tanks still hold ``on board − drawn(t)`` of the
fuel (never below 0) and the rest of the voyage draws ``need − drawn(t)``
(:class:`planner.voyage.shortfall.BurnCurve`). So the least to take there is

- before the fuel runs out: the shortfall itself, ``need − on board``;
- after it has run out: everything the rest of the voyage draws; the stretch
  between the run-out point and the port is still not compliant.

The take must fit the free room of the tanks that hold the fuel (capacity
less content at the port, m³ at 15 °C), and the port must offer the fuel (by
name or grade; not stated: to be asked). Advisory: the ship adds its own
reserve. Moments are epoch seconds (``*_epoch_s``), distances metres (``*_m``).
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import TYPE_CHECKING

from geo.ellipsoid import NM_M
from geo.errors import InputError
from geo.schedule import to_epoch
from planner.voyage.bunkering_file import BunkerPort
from planner.voyage.shortfall import FuelShortage

if TYPE_CHECKING:
    from geo.path import RoutePath
    from planner.voyage.plan import Plan


@dataclass(frozen=True)
class BunkerOption:
    """What bunkering the short fuel at one port would give.

    Parameters
    ----------
    port : BunkerPort
        The port as the voyage file gives it.
    distance_m : float [m]
        Where it lies along the route.
    epoch_s : float [s]
        When the ship is there (its ``eta``, else the schedule's), seconds since 1970 UTC.
    offered : bool or None
        Whether it offers the fuel (None: not stated).
    before_run_out : bool
        Whether the ship is there before the fuel runs out.
    take_t, take_m3 : float [t], [m3]
        The least to take there (m³ at 15 °C).
    room_m3 : float [m3]
        Free room of the tanks holding the fuel at the port (at 15 °C).
    covers : bool
        Whether that take keeps the rest of the voyage compliant.
    why : str
        What stands in the way ("" when it covers).
    """

    port: BunkerPort
    distance_m: float
    epoch_s: float
    offered: bool | None
    before_run_out: bool
    take_t: float
    take_m3: float
    room_m3: float
    covers: bool
    why: str = ""


def port_distance_m(port: BunkerPort, path: RoutePath, file: str) -> float:
    """Where a bunker port lies along the route [m].

    Parameters
    ----------
    port : BunkerPort
        The port (a waypoint number or name, or a distance).
    path : RoutePath
        The route's legs.
    file : str
        The voyage file, for messages.

    Raises
    ------
    InputError
        For a waypoint not on the route or a distance beyond its end.
    """
    names = [w.name for w in path.route.waypoints]
    n = len(names)
    if port.distance_nm is not None:
        if port.distance_nm > path.length_nm + 1e-6:
            raise InputError(file, f"{port.place}.distance_nm", port.distance_nm,
                             f"a distance along the route, 0 to {path.length_nm:.1f} nm")
        return port.distance_nm * NM_M
    if isinstance(port.waypoint, int):
        if port.waypoint > n:
            raise InputError(file, f"{port.place}.waypoint", port.waypoint,
                             f"a waypoint number of the route, 1 to {n}")
        i = port.waypoint - 1
    else:
        want = str(port.waypoint).strip().lower()
        hits = [i for i, w in enumerate(names) if w.strip().lower() == want]
        if not hits:
            shown = ", ".join(w for w in names if w.strip()) or "none named"
            raise InputError(file, f"{port.place}.waypoint", port.waypoint,
                             f"a waypoint name of the route ({shown}) or its number")
        i = hits[0]
    return float(path.start_m[i]) if i < path.n_legs else path.length_m


def room_m3(plan: Plan, fuel: str) -> float:
    """The capacity of the tanks that hold ``fuel`` at departure [m3], at 15 °C.

    Parameters
    ----------
    plan : Plan
        The built plan (the ship as she sails it).
    fuel : str
        The fuel's name.
    """
    return sum(t.capacity_m3 for t in plan.system.tanks.values() if fuel in t.content_m3)


def bunker_options(plan: Plan, shortage: FuelShortage) -> list[BunkerOption]:
    """Each ``[[bunker_port]]`` of the voyage file as a way to cover the shortage, in the
    file's order (see the module notes).

    Parameters
    ----------
    plan : Plan
        The built plan.
    shortage : FuelShortage
        The short fuel.
    """
    fuel = plan.system.fuels[shortage.fuel]
    sched = plan.timeline.schedule
    capacity = room_m3(plan, shortage.fuel)
    out = []
    for port in plan.voyage.bunkering.ports:
        d = port_distance_m(port, plan.check.path, plan.voyage.file)
        t = to_epoch(port.eta_utc) if port.eta_utc is not None else float(
            sched.epoch_at([d])[0])
        drawn = shortage.curve.drawn_by(t)
        left_t = max(0.0, shortage.on_board_t - drawn)
        before = bool(t <= shortage.run_out.epoch_s)
        take = max(0.0, shortage.needed_t - drawn - left_t)
        take_m3 = take * 1000.0 / fuel.density_kg_m3
        room = max(0.0, capacity - left_t * 1000.0 / fuel.density_kg_m3)
        offered = port.offers(fuel.name, fuel.grade)
        why = []
        if offered is False:
            why.append(f"it does not offer {fuel.name} ({fuel.grade})")
        if not before:
            why.append(f"the ship is there after {fuel.name} has run out")
        if take <= 1e-9:
            why.append(f"it comes after the last need of {fuel.name}")
        if take_m3 > room + 1e-9:
            why.append(f"the tanks holding {fuel.name} have room for {room:.1f} m³ at 15 °C "
                       f"there, not {take_m3:.1f} m³")
        out.append(BunkerOption(port, float(d), float(t), offered, before, float(take),
                                float(take_m3), float(room), not why,
                                "; ".join(why)))
    return out


def check_ports(plan: Plan) -> None:
    """Refuse a ``[[bunker_port]]`` that is not on the route, whether or not fuel is short.

    Parameters
    ----------
    plan : Plan
        The built plan.

    Raises
    ------
    InputError
        As :func:`port_distance_m`.
    """
    for port in plan.voyage.bunkering.ports:
        port_distance_m(port, plan.check.path, plan.voyage.file)
