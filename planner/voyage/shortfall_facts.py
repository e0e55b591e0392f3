"""The facts of a fuel oil non-availability report, from the plan and the voyage file.

Regulation 18.2 ([MARPOL-VI]) and the report template of the 2019 guidelines
([MEPC-320]; items from memory) ask for: the ship; the voyage plan (ports,
departure, the control areas and when the ship enters them); the compliant fuel
needed against what is on board and where it runs out; the attempts to buy
compliant fuel under the voyage plan (ports, suppliers, dates, quantities,
answers: the voyage file's ``[[purchase_attempt]]``); the expected next port with
compliant fuel (``[[bunker_port]]``); the actions taken or possible (the shortfall
plan, :mod:`planner.voyage.shortfall_report`). What only the master knows (the
suppliers' reasons when not typed, the notifications sent, the signature) is left
to the printed form. Pure: the journal's part is added by the command.

Times are ISO 8601 UTC with ship's time beside them; positions decimal degrees.
"""

from __future__ import annotations

from typing import TYPE_CHECKING

from geo.ellipsoid import NM_M
from geo.schedule import to_epoch
from planner.common.timefmt import format_offset, iso_utc

if TYPE_CHECKING:
    from planner.voyage.plan import Plan


def _ship_time(plan: Plan, epoch_s: float) -> str:
    utc = plan.timeline.utc(epoch_s)
    tz = plan.voyage.ship_tz_at(utc)
    return utc.astimezone(tz).strftime("%Y-%m-%dT%H:%M") + format_offset(tz)


def area_entries(plan: Plan) -> list[dict]:
    """Each entry into a control area along the route, in route order: area, limit,
    distance, time (UTC and ship's time) and position.

    Parameters
    ----------
    plan : Plan
        The built plan.
    """
    out = []
    before: tuple[str, ...] = ()
    for st in plan.check.stretches:
        for area in st.areas:
            if area in before:
                continue
            t = to_epoch(st.from_utc) if st.from_utc is not None else plan.timeline.start_epoch_s
            lat, lon, _ = plan.timeline.position(t)
            out.append({"area": area, "limit_pct": st.limit_pct, "distance_nm": st.from_m / NM_M,
                        "utc": iso_utc(plan.timeline.utc(t)), "ship_time": _ship_time(plan, t),
                        "lat": lat, "lon": lon})
        before = st.areas
    return out


def next_bunker_port(shortfall: dict | None) -> dict | None:
    """The expected next port with compliant fuel: the first ``[[bunker_port]]`` on the way
    (by distance) that offers the short fuel, else the first whose fuels are not stated
    (``"confirmed": false``); None when there is none.

    Parameters
    ----------
    shortfall : dict or None
        The plan document's ``"shortfall"``.
    """
    if not shortfall:
        return None
    for want in (True, None):
        for f in shortfall["fuels"]:
            ports = sorted(f["bunker_ports"], key=lambda b: b["distance_nm"])
            for b in ports:
                if b["offered"] is want:
                    return {"name": b["name"], "fuel": f["fuel"], "eta_utc": b["eta_utc"],
                            "eta_ship_time": b["eta_ship_time"],
                            "distance_nm": b["distance_nm"], "confirmed": want is True}
    return None


def nonavailability_facts(plan: Plan, doc: dict) -> dict:
    """The report's facts (see the module notes).

    Parameters
    ----------
    plan : Plan
        The built plan.
    doc : dict
        Its document (:func:`planner.voyage.report.plan_json`).

    Returns
    -------
    dict
        ``ship``, ``voyage_plan``, ``fuel``, ``shortfall`` (the plan's, or None),
        ``purchase_attempts``, ``next_port`` and ``actions`` (sentences).
    """
    wps = plan.check.path.route.waypoints
    v = doc["voyage"]
    tl = plan.timeline
    shortfall = doc.get("shortfall")
    attempts = [{"port": a.port, "supplier": a.supplier, "date": a.on.isoformat(),
                 "fuel": a.fuel, "quantity_t": a.quantity_t, "answer": a.answer or None}
                for a in plan.voyage.bunkering.attempts]
    actions = [line for f in (shortfall or {}).get("fuels", []) for line in f["advice"]]
    return {
        "ship": {"name": v["ship"], "imo": v["imo"], "flag": None},
        "voyage_plan": {
            "voyage": v["name"], "file": v["file"],
            "departure_port": wps[0].name or None, "arrival_port": wps[-1].name or None,
            "depart_utc": v["depart_utc"], "depart_ship_time": _ship_time(plan, tl.start_epoch_s),
            "arrive_utc": v["arrive_utc"], "arrive_ship_time": _ship_time(plan, tl.end_epoch_s),
            "distance_nm": v["distance_nm"], "area_entries": area_entries(plan),
            "ports_of_call": [p.name for p in plan.voyage.bunkering.ports],
        },
        "fuel": {"compliant_needed_t": doc["compliant_fuel_needed_t"],
                 "compliant_on_board_t": doc["compliant_fuel_on_board_t"],
                 "totals": doc["fuel_totals"]},
        "shortfall": shortfall,
        "purchase_attempts": attempts,
        "next_port": next_bunker_port(shortfall),
        "actions": actions,
    }
