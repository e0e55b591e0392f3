"""The route check's terminal tables, made from the ``changeover route --json`` document.

Crossings (area, enter or exit, position, leg, distance, UTC and ship's time,
in force, limit after), the areas coming into force or ceasing while the ship
is inside them (``force_events``), the limit on every stretch, and the time
inside each area. Every value is an atom of :mod:`planner.cli.text_table`, so no layout
cuts it; free text (area names) may wrap.
"""

from __future__ import annotations

from datetime import UTC, datetime

from planner.cli.plan_tables import DASH, position, utc_full
from planner.cli.text_table import TextTable, atom, table


def ship_time(iso: str | None, offset: str | None) -> str:
    """``2027-05-30 19:20`` in ship's time at ``offset`` (``+12:00``), or a dash."""
    from planner.common.timefmt import parse_offset

    if not iso or not offset:
        return DASH
    t = datetime.fromisoformat(iso.replace("Z", "+00:00")).astimezone(UTC)
    return atom(t.astimezone(parse_offset(offset)).strftime("%Y-%m-%d %H:%M"))


def crossings_table(doc: dict) -> TextTable:
    """The boundary crossings, in order along the route."""
    off = doc.get("ship_utc_offset")
    rows = [[c["area"], c["event"], position(c["lat"], c["lon"]), str(c["leg"]),
             f"{c['distance_nm']:,.2f}", utc_full(c["time_utc"]), ship_time(c["time_utc"], off),
             "yes" if c["in_force"] else "no", f"{c['limit_after_pct']:.2f}"]
            for c in doc["crossings"]]
    return table("Boundary crossings", [
        ("Area", "w"), ("Event", "l"), ("Position", "l"), ("Leg", "r"), ("Distance nm", "r"),
        ("UTC", "l"), (f"Ship's time {off}" if off else "Ship's time", "l"), ("In force", "l"),
        ("Then limit % m/m", "r")], rows,
        "" if rows else "The route crosses no area boundary.")


def stretches_table(doc: dict) -> TextTable:
    """The sulphur limit on every stretch of the route."""
    rows = [[f"{s['from_nm']:,.2f}", f"{s['to_nm']:,.2f}", f"{s['to_nm'] - s['from_nm']:,.2f}",
             f"{s['limit_pct']:.2f}", ", ".join(s["areas"]) or "global cap",
             utc_full(s["from_utc"]), utc_full(s["to_utc"])] for s in doc["stretches"]]
    return table("Sulphur limit along the route", [
        ("From nm", "r"), ("To nm", "r"), ("Length nm", "r"), ("Limit % m/m", "r"),
        ("Under", "w"), ("From UTC", "l"), ("To UTC", "l")], rows)


def inside_table(doc: dict) -> TextTable:
    """Distance and time inside each area."""
    rows = [[a["name"], f"{a['limit_pct']:.2f}", f"{a['inside_nm']:,.2f}",
             DASH if a["inside_h"] is None else f"{a['inside_h']:,.2f}"] for a in doc["areas"]]
    return table("Time inside each area", [
        ("Area", "w"), ("Limit % m/m", "r"), ("Inside nm", "r"), ("Inside h", "r")], rows)


def force_events_table(doc: dict) -> TextTable | None:
    """Each area coming into force (or ceasing to apply) while the ship is inside it: its
    moment in UTC and ship's time and the ship's position then (none: no table)."""
    rows = doc.get("force_events") or []
    if not rows:
        return None
    off = doc.get("ship_utc_offset")
    kinds = {"comes_into_force": "comes into force", "ceases": "ceases to apply"}
    return table("Coming into force / ceasing while inside", [
        ("Area", "w"), ("Event", "w"), ("UTC", "l"),
        (f"Ship's time {off}" if off else "Ship's time", "l"), ("Ship's position then", "l"),
        ("Leg", "r"), ("Distance nm", "r"), ("Then limit % m/m", "r")],
        [[f["area"], kinds.get(f["event"], f["event"]), utc_full(f["time_utc"]),
          ship_time(f["time_utc"], off), position(f["lat"], f["lon"]), str(f["leg"]),
          f"{f['distance_nm']:,.2f}", f"{f['limit_after_pct']:.2f}"] for f in rows],
        "A moment on the clock, not a boundary crossing: every consumer must be on compliant "
        "fuel by then wherever the ship is (the plan makes the changeover for it).")


def route_tables(doc: dict) -> list[TextTable]:
    """Every table the route check prints, in order."""
    force = force_events_table(doc)
    return [crossings_table(doc), *([force] if force else []), stretches_table(doc),
            inside_table(doc)]
