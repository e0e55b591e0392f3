"""The plan's events along the route, numbered as the plan numbers its changeovers.

Every boundary crossing is an event; a crossing where a changeover is made
carries that changeover's number (the one in the plan's tables, the PDF and
``log start --changeover N``), and a crossing with none is listed unnumbered
with why. A changeover tied to no crossing (one before departure, or one at an
area coming into force, or ceasing to apply, while the ship is inside it) is an
event of its own at its boundary, named so. The map, the chart and the GPX
waypoints all take their labels from :func:`plan_events`, so they agree.
Pure data (no matplotlib).
"""

from __future__ import annotations

from dataclasses import dataclass

MATCH_NM = 0.01
"""A changeover's boundary is a crossing when their distances agree to 0.01 nm."""


@dataclass(frozen=True)
class PlanEvent:
    """One event: ``number`` (the changeover's, or None), ``kind`` (``enter``, ``exit``,
    ``before departure``, ``comes into force`` or ``ceases to apply``), the area, the
    moment (ISO 8601 UTC or None), the position [° WGS84], the distance from departure
    [nm] and a short note."""

    number: int | None
    kind: str
    area: str
    time_utc: str | None
    lat: float
    lon: float
    distance_nm: float
    note: str

    def __post_init__(self) -> None:
        if not -90.0 <= self.lat <= 90.0:
            raise ValueError(f"event latitude {self.lat} outside -90..90")

    @property
    def label(self) -> str:
        """The number as drawn (empty for an unnumbered crossing)."""
        return "" if self.number is None else str(self.number)

    def text(self) -> str:
        """``3 enter Corran Sea ECA: change to mgo`` (the legend and chart line)."""
        head = f"{self.label} " if self.label else ""
        return f"{head}{self.kind} {self.area}: {self.note}"


def _note(r: dict) -> str:
    if r.get("direction") == "to_compliant":
        return f"on {r.get('to_fuel')} before the boundary"
    return f"back to {r.get('to_fuel')} from the exit"


def plan_events(crossings: list[dict], changeovers: list[dict]) -> list[PlanEvent]:
    """Every crossing (``route --json`` rows: area, event, lat, lon, distance_nm,
    time_utc) with the number of the changeover made there, and any changeover tied to no
    crossing; in order along the route."""
    firsts: dict[int, dict] = {}
    for r in changeovers:
        firsts.setdefault(r["number"], r)
    used: set[int] = set()
    out = []
    for c in crossings:
        hit = next((r for n, r in firsts.items() if n not in used and r["area"] == c["area"]
                    and r.get("boundary_nm") is not None
                    and abs(r["boundary_nm"] - c["distance_nm"]) <= MATCH_NM), None)
        if hit is not None:
            used.add(hit["number"])
        if hit:
            note = _note(hit)
        elif not c.get("in_force", True):
            note = "not in force then: no changeover here"
        elif c["event"] == "enter":
            note = "no changeover here (the fuel in use already meets the limit after it)"
        else:
            note = "no changeover here (stay on compliant fuel to the next area)"
        out.append(PlanEvent(hit["number"] if hit else None, c["event"], c["area"],
                             c["time_utc"], c["lat"], c["lon"], c["distance_nm"], note))
    for n, r in firsts.items():
        if n in used or r.get("boundary_lat") is None:
            continue
        kind = ("before departure" if r.get("before_departure") else
                "comes into force" if r["direction"] == "to_compliant" else "ceases to apply")
        out.append(PlanEvent(n, kind, r["area"], r.get("boundary_utc"), r["boundary_lat"],
                             r["boundary_lon"], r.get("boundary_nm") or 0.0, _note(r)))
    return sorted(out, key=lambda e: (e.distance_nm, e.number or 0))
