"""A lower speed inside the areas that makes the compliant fuel on board suffice.

On the timeline's consumption model ([PROPELLER-LAW], common practice): the
main engine's power grows with the cube of speed, so its fuel per nautical mile
(rate / speed) grows with speed² (times the SFOC at that load, from the ship
file's curve); generators and boilers burn per hour, so their fuel per mile
grows as 1/speed. Sailing the pieces of the route inside the areas that burn
the fuel at ``min(planned, v)`` changes the voyage's need by

    Δ(v) = Σ_pieces d·[Σ_c rate_c(min(s, v)) / min(s, v) − Σ_c rate_c(s) / s] · 42.7 / Q_net

(``d`` nm sailed at the planned ``s`` kn; ``rate_c`` each consumer's ISO rate at that
speed, :meth:`planner.ship.consumers.MainEngine.iso_demand_t_h`). The highest ``v``
with ``need + Δ(v) ≤ on board`` is found by a scan down from the highest planned speed,
then bisection to 10⁻⁹ kn. A speed below the main engine's lowest load is refused: the
lowest load of its SFOC curve (below it the ship file holds no consumption), or
:data:`DEFAULT_MIN_LOAD_PCT` without a curve. Everything else (the changeovers, the
flush before each entry, the hours alongside) is left as planned: the figure is a first
answer for the master, not a new plan.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import TYPE_CHECKING

from geo.ellipsoid import NM_M
from planner.fuels import ISO_REFERENCE_Q_NET_MJ_KG
from planner.ship.consumers import MainEngine
from planner.voyage.shortfall import FuelShortage, fuel_periods

if TYPE_CHECKING:
    from planner.voyage.plan import Plan

DEFAULT_MIN_LOAD_PCT = 25.0
"""The lowest main-engine load the advice goes down to without an SFOC curve [% MCR]
(common practice: long running below about a quarter of MCR is avoided without the
maker's low-load measures)."""

SCAN_STEPS = 400
"""Speeds tried from the planned speed down to the lowest, before the bisection [-]."""


@dataclass(frozen=True)
class Piece:
    """A piece of the route inside an area, sailed at one speed, burning the short fuel.

    Parameters
    ----------
    distance_nm : float [nm]
        Its length.
    speed_kn : float [kn]
        The planned speed on it.
    consumers : tuple of str
        The consumers drawing the fuel on it.
    areas : tuple of str
        The areas it lies in.
    """

    distance_nm: float
    speed_kn: float
    consumers: tuple[str, ...]
    areas: tuple[str, ...]

    def __post_init__(self) -> None:
        if not (self.distance_nm > 0.0 and self.speed_kn > 0.0):
            raise ValueError("Piece needs a length and a speed above 0")


@dataclass(frozen=True)
class ReducedSpeed:
    """The speed cap inside the areas that makes the fuel suffice, or why there is none.

    Parameters
    ----------
    fuel : str
        The short fuel.
    areas : tuple of str
        The areas the cap applies in.
    planned_kn : float [kn]
        The highest planned speed there.
    min_kn : float [kn]
        The lowest speed advised (the main engine's lowest load).
    min_load_pct : float [% MCR]
        That load.
    speed_kn : float or None [kn]
        The highest speed that suffices, exactly (None: refused).
    advised_kn : float or None [kn]
        ``speed_kn`` rounded down to 0.1 kn (not below ``min_kn``).
    need_t : float [t]
        The voyage's need at ``advised_kn`` (at the best speed tried when refused).
    delay_h : float [h]
        How much later the ship arrives at ``advised_kn``.
    refused : str
        Why no speed is advised ("" when one is).
    """

    fuel: str
    areas: tuple[str, ...]
    planned_kn: float
    min_kn: float
    min_load_pct: float
    speed_kn: float | None
    advised_kn: float | None
    need_t: float
    delay_h: float
    refused: str = ""


def min_load_pct(engine: MainEngine) -> float:
    """The lowest load the advice goes to [% MCR]: the SFOC curve's first load, else
    :data:`DEFAULT_MIN_LOAD_PCT`.

    Parameters
    ----------
    engine : MainEngine
        The main engine.
    """
    return engine.sfoc_curve[0][0] if engine.sfoc_curve else DEFAULT_MIN_LOAD_PCT


def pieces(plan: Plan, shortage: FuelShortage) -> list[Piece]:
    """The pieces inside an area sailed at a speed above 0 with the valve of some circuit
    on the short fuel, in route order (split at the schedule's knots and the stretches).

    Parameters
    ----------
    plan : Plan
        The built plan.
    shortage : FuelShortage
        The short fuel.
    """
    tl = plan.timeline
    sched = tl.schedule
    periods = fuel_periods(plan, shortage.fuel)
    out = []
    for c in plan.choices:
        st = c.stretch
        if not st.areas:
            continue
        for k in range(len(sched.knot_m) - 1):
            d0, d1 = float(sched.knot_m[k]), float(sched.knot_m[k + 1])
            t0, t1 = float(sched.knot_epoch_s[k]), float(sched.knot_epoch_s[k + 1])
            a, b = max(d0, st.from_m), min(d1, st.to_m)
            if b - a <= 1e-6 or d1 <= d0:
                continue
            speed = (d1 - d0) / NM_M / ((t1 - t0) / 3600.0)
            mid = t0 + (0.5 * (a + b) - d0) / (d1 - d0) * (t1 - t0)
            cons = tuple(n for circuit, p0, p1, _, _ in periods if p0 <= mid < p1
                         for n in tl.system.circuits[circuit].consumers)
            if cons:
                out.append(Piece((b - a) / NM_M, speed, cons, tuple(st.areas)))
    return out


def _rate_iso_t_h(plan: Plan, consumers: tuple[str, ...], speed_kn: float) -> float:
    """The consumers' ISO rate at a speed [t/h], as the timeline computes it."""
    total = 0.0
    for n in consumers:
        c = plan.system.consumers[n]
        total += c.iso_demand_t_h(speed_kn=speed_kn) if isinstance(c, MainEngine) else \
            c.iso_demand_t_h()
    return total


def piece_mass_t(plan: Plan, piece: Piece, speed_kn: float, q_net_mj_kg: float) -> float:
    """The fuel a piece draws at a speed [t]: rate × distance / speed × 42.7 / Q_net.

    Parameters
    ----------
    plan : Plan
        The built plan (the ship's consumers).
    piece : Piece
        The piece.
    speed_kn : float [kn]
        The speed sailed.
    q_net_mj_kg : float [MJ/kg]
        The fuel's net specific energy.
    """
    rate = _rate_iso_t_h(plan, piece.consumers, speed_kn)
    return rate * piece.distance_nm / speed_kn * ISO_REFERENCE_Q_NET_MJ_KG / q_net_mj_kg


def need_at_t(plan: Plan, shortage: FuelShortage, parts: list[Piece], cap_kn: float) -> float:
    """The voyage's need of the fuel with every piece sailed at ``min(planned, cap_kn)`` [t].

    Parameters
    ----------
    plan : Plan
        The built plan.
    shortage : FuelShortage
        The short fuel (its planned need).
    parts : list of Piece
        :func:`pieces`.
    cap_kn : float [kn]
        The speed cap.
    """
    q = plan.system.fuels[shortage.fuel].q_net
    delta = sum(piece_mass_t(plan, p, min(p.speed_kn, cap_kn), q) - piece_mass_t(
        plan, p, p.speed_kn, q) for p in parts)
    return shortage.needed_t + delta


def delay_h(parts: list[Piece], cap_kn: float) -> float:
    """How much longer the pieces take at ``min(planned, cap_kn)`` [h].

    Parameters
    ----------
    parts : list of Piece
        :func:`pieces`.
    cap_kn : float [kn]
        The speed cap.
    """
    return sum(p.distance_nm / min(p.speed_kn, cap_kn) - p.distance_nm / p.speed_kn
               for p in parts)


def reduced_speed(plan: Plan, shortage: FuelShortage) -> ReducedSpeed | None:
    """The speed cap inside the areas that makes the fuel on board suffice (see the module
    notes); None when the fuel is not burnt under way inside an area.

    Parameters
    ----------
    plan : Plan
        The built plan.
    shortage : FuelShortage
        The short fuel.
    """
    parts = pieces(plan, shortage)
    if not parts:
        return None
    areas = tuple(dict.fromkeys(a for p in parts for a in p.areas))
    top = max(p.speed_kn for p in parts)
    engines = [plan.system.consumers[n] for p in parts for n in p.consumers]
    engines = [e for e in dict.fromkeys(engines) if isinstance(e, MainEngine)]
    held = shortage.on_board_t
    if not engines:
        return ReducedSpeed(shortage.fuel, areas, top, top, 0.0, None, None,
                            shortage.needed_t, 0.0, "slowing down saves none of it: inside "
                            "the areas only consumers burning per hour draw it")
    lows = [(e.speed_at_load(min_load_pct(e)), min_load_pct(e)) for e in engines]
    low_kn, low_pct = max(lows)
    if low_kn >= top:
        return ReducedSpeed(shortage.fuel, areas, top, low_kn, low_pct, None, None,
                            shortage.needed_t, 0.0, f"the planned {top:.1f} kn is already at "
                            f"the main engine's lowest load ({low_pct:g} % MCR)")
    step = (top - low_kn) / SCAN_STEPS
    above = top
    best = (shortage.needed_t, top)
    for i in range(1, SCAN_STEPS + 1):
        v = top - i * step
        need = need_at_t(plan, shortage, parts, v)
        best = min(best, (need, v))
        if need <= held:
            lo, hi = v, above
            while hi - lo > 1e-9:
                mid = 0.5 * (lo + hi)
                if need_at_t(plan, shortage, parts, mid) <= held:
                    lo = mid
                else:
                    hi = mid
            advised = max(math.floor(lo * 10.0 + 1e-9) / 10.0, low_kn)
            if need_at_t(plan, shortage, parts, advised) > held:  # need not monotonic
                advised = lo
            return ReducedSpeed(shortage.fuel, areas, top, low_kn, low_pct, lo, advised,
                                need_at_t(plan, shortage, parts, advised),
                                delay_h(parts, advised))
        above = v
    need, v = best
    return ReducedSpeed(shortage.fuel, areas, top, low_kn, low_pct, None, None, need,
                        delay_h(parts, v), f"even at {v:.1f} kn inside {', '.join(areas)} the "
                        f"voyage needs {need:.1f} t of {shortage.fuel}, {need - held:.1f} t more "
                        f"than on board; below {low_kn:.1f} kn (the main engine's lowest load, "
                        f"{low_pct:g} % MCR) is not advised")
