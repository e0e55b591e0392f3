"""The shortfall plan: when compliant fuel is short, where it runs out and what can be done.

For each compliant fuel the voyage needs more of than the tanks hold
(:mod:`planner.voyage.shortfall`): where it runs out, what cannot be sailed
compliant, and the alternatives in order — (a) a lower speed inside the areas
(:mod:`planner.voyage.shortfall_speed`), (b) bunkering at a port on the way
(:mod:`planner.voyage.shortfall_bunker`), (c) when neither works, the plain
statement that the ship must notify its Administration and the competent
authority of the next port of destination, with the record of its attempts to
buy compliant fuel (regulation 18.2, [MARPOL-VI]; report template [MEPC-320],
from memory). Advisory: the master decides.

:func:`shortfall_json` is the plan document's ``"shortfall"`` key (None when no
compliant fuel is short); the terminal block, the plan and the non-availability
report print its ``advice`` sentences.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import TYPE_CHECKING

from geo.ellipsoid import NM_M
from geo.position import format_position
from planner.common.timefmt import format_offset, format_utc, iso_utc
from planner.voyage.shortfall import FuelShortage, fuel_shortages
from planner.voyage.shortfall_bunker import BunkerOption, bunker_options, check_ports
from planner.voyage.shortfall_speed import ReducedSpeed, reduced_speed

if TYPE_CHECKING:
    from planner.voyage.plan import Plan

ADVISORY = ("Advisory: the master decides. Notifying the Administration and the competent "
            "authority of the next port of destination is the ship's duty (MARPOL Annex VI "
            "regulation 18.2).")
"""Printed with every shortfall plan."""


@dataclass(frozen=True)
class ShortfallPlan:
    """One short fuel with its alternatives.

    Parameters
    ----------
    shortage : FuelShortage
        Where it runs out and what cannot be sailed compliant.
    reduced : ReducedSpeed or None
        The lower speed inside the areas (None: the fuel is not burnt under way inside one).
    bunkering : tuple of BunkerOption
        Each bunker port on the way, in the voyage file's order.
    """

    shortage: FuelShortage
    reduced: ReducedSpeed | None
    bunkering: tuple[BunkerOption, ...]

    @property
    def must_notify(self) -> bool:
        """Neither a lower speed nor a bunker port makes the fuel suffice."""
        slower = self.reduced is not None and self.reduced.advised_kn is not None
        return not slower and not any(b.covers for b in self.bunkering)


def plan_shortfall(plan: Plan) -> list[ShortfallPlan]:
    """The shortfall plan of every short compliant fuel (empty: there is enough). The
    voyage file's bunker ports are checked against the route either way.

    Parameters
    ----------
    plan : Plan
        The built plan.

    Raises
    ------
    InputError
        For a ``[[bunker_port]]`` not on the route.
    """
    check_ports(plan)
    return [ShortfallPlan(s, reduced_speed(plan, s), tuple(bunker_options(plan, s)))
            for s in fuel_shortages(plan)]


def _ship_time(plan: Plan, epoch_s: float) -> str:
    utc = plan.timeline.utc(epoch_s)
    tz = plan.voyage.ship_tz_at(utc)
    return utc.astimezone(tz).strftime("%Y-%m-%dT%H:%M") + format_offset(tz)


def _when(plan: Plan, epoch_s: float) -> str:
    """``2030-03-10 18:42Z (19:42 ship's time, +01:00)``."""
    utc = plan.timeline.utc(epoch_s)
    tz = plan.voyage.ship_tz_at(utc)
    return (f"{format_utc(utc)} ({utc.astimezone(tz).strftime('%Y-%m-%d %H:%M')} ship's time, "
            f"{format_offset(tz)})")


def advice(plan: Plan, sp: ShortfallPlan) -> list[str]:
    """The shortfall plan in sentences: where it runs out, what is not compliant, then the
    alternatives (a), (b) and (c).

    Parameters
    ----------
    plan : Plan
        The built plan.
    sp : ShortfallPlan
        One short fuel.
    """
    s = sp.shortage
    ro = s.run_out
    where = {"at_sea": "", "before_departure": " alongside before departure",
             "after_arrival": " alongside after arrival"}[ro.where]
    out = [f"{s.fuel} runs out{where} at {_when(plan, ro.epoch_s)}, "
           f"{ro.distance_m / NM_M:,.1f} nm from departure at "
           f"{format_position(ro.lat, ro.lon)}: the voyage needs {s.needed_t:.1f} t, the "
           f"tanks hold {s.on_board_t:.1f} t, {s.short_t:.1f} t ({s.short_m3:.1f} m³ at "
           "15 °C) short."]
    for st in s.stretches:
        out.append(f"Not compliant without it: {', '.join(st.areas)} ({st.limit_pct:.2f} % "
                   f"limit) from {st.from_m / NM_M:,.1f} to {st.to_m / NM_M:,.1f} nm, "
                   f"{format_utc(plan.timeline.utc(st.from_epoch_s))} to "
                   f"{format_utc(plan.timeline.utc(st.to_epoch_s))}.")
    if s.alongside_h > 0:
        out.append(f"Not compliant without it: {s.alongside_h:.1f} h alongside after arrival "
                   "inside the area.")
    r = sp.reduced
    if r is None:
        out.append(f"(a) A lower speed does not apply: {s.fuel} is not burnt under way "
                   "inside an area.")
    elif r.advised_kn is not None:
        out.append(f"(a) Reduce to {r.advised_kn:.1f} kn inside {', '.join(r.areas)} (planned "
                   f"up to {r.planned_kn:.1f} kn): arrives {r.delay_h:.1f} h later, and the "
                   f"voyage then needs {r.need_t:.1f} t of {s.fuel} (on board "
                   f"{s.on_board_t:.1f} t).")
    else:
        out.append(f"(a) A lower speed is not enough: {r.refused}.")
    if not sp.bunkering:
        out.append("(b) No bunker port on the way is given ([[bunker_port]] in the voyage "
                   "file).")
    for b in sp.bunkering:
        offer = {True: "", False: "", None: f" (ask whether it sells {s.fuel})"}[b.offered]
        head = (f"(b) Bunker at {b.port.name} ({b.distance_m / NM_M:,.1f} nm, "
                f"{'ETA' if b.port.eta_utc is not None else 'due'} "
                f"{format_utc(plan.timeline.utc(b.epoch_s))}): ")
        if b.covers:
            out.append(head + f"take at least {b.take_t:.1f} t ({b.take_m3:.1f} m³ at 15 °C) "
                       f"of {s.fuel} plus the ship's reserve; that covers the rest of the "
                       f"voyage{offer}.")
        else:
            out.append(head + f"does not cover the rest of the voyage: {b.why}"
                       + (f"; taking {b.take_t:.1f} t there covers the voyage from the port on"
                          if not b.before_run_out and b.take_t > 0 else "") + ".")
    if sp.must_notify:
        out.append(f"(c) Neither a lower speed nor a bunker port on the way makes {s.fuel} "
                   "suffice: the ship must notify its Administration and the competent "
                   "authority of the next port of destination (MARPOL Annex VI regulation "
                   "18.2) and keep the record of its attempts to buy compliant fuel (changeover "
                   "nonavailability prints the report).")
    return out


def _speed_json(r: ReducedSpeed | None) -> dict | None:
    if r is None:
        return None
    return {"areas": list(r.areas), "planned_kn": r.planned_kn, "min_kn": r.min_kn,
            "min_load_pct": r.min_load_pct, "speed_kn": r.speed_kn, "advised_kn": r.advised_kn,
            "need_t": r.need_t, "delay_h": r.delay_h, "refused": r.refused or None}


def _bunker_json(plan: Plan, b: BunkerOption) -> dict:
    return {"name": b.port.name, "distance_nm": b.distance_m / NM_M,
            "eta_utc": iso_utc(plan.timeline.utc(b.epoch_s)),
            "eta_ship_time": _ship_time(plan, b.epoch_s), "eta_given": b.port.eta_utc is not None,
            "fuels_offered": list(b.port.fuels) if b.port.fuels is not None else None,
            "offered": b.offered, "before_run_out": b.before_run_out, "take_t": b.take_t,
            "take_m3_15c": b.take_m3, "room_m3_15c": b.room_m3, "covers": b.covers,
            "why": b.why or None}


def fuel_json(plan: Plan, sp: ShortfallPlan) -> dict:
    """One short fuel as plain data (times ISO 8601 UTC and ship's time, nm, t, m³ at 15 °C).

    Parameters
    ----------
    plan : Plan
        The built plan.
    sp : ShortfallPlan
        The short fuel.
    """
    s = sp.shortage
    ro = s.run_out
    utc = plan.timeline.utc
    return {
        "fuel": s.fuel, "needed_t": s.needed_t, "on_board_t": s.on_board_t,
        "short_t": s.short_t, "short_m3_15c": s.short_m3,
        "runs_out": {"utc": iso_utc(utc(ro.epoch_s)), "ship_time": _ship_time(plan, ro.epoch_s),
                     "distance_nm": ro.distance_m / NM_M, "lat": ro.lat, "lon": ro.lon,
                     "where": ro.where},
        "not_compliant": [{"areas": list(st.areas), "limit_pct": st.limit_pct,
                           "from_nm": st.from_m / NM_M, "to_nm": st.to_m / NM_M,
                           "from_utc": iso_utc(utc(st.from_epoch_s)),
                           "to_utc": iso_utc(utc(st.to_epoch_s)),
                           "from_ship_time": _ship_time(plan, st.from_epoch_s),
                           "to_ship_time": _ship_time(plan, st.to_epoch_s)}
                          for st in s.stretches],
        "not_compliant_alongside_h": s.alongside_h,
        "reduced_speed": _speed_json(sp.reduced),
        "bunker_ports": [_bunker_json(plan, b) for b in sp.bunkering],
        "must_notify": sp.must_notify,
        "advice": advice(plan, sp),
    }


def shortfall_json(plan: Plan) -> dict | None:
    """The plan document's ``"shortfall"``: None when no compliant fuel is short.

    Parameters
    ----------
    plan : Plan
        The built plan.

    Returns
    -------
    dict or None
        ``{"fuels": [...], "must_notify": b, "advisory": s}`` (:func:`fuel_json` per fuel).
    """
    plans = plan_shortfall(plan)
    if not plans:
        return None
    return {"fuels": [fuel_json(plan, sp) for sp in plans],
            "must_notify": any(sp.must_notify for sp in plans), "advisory": ADVISORY}
