"""The plan's events along the route, numbered as the plan numbers its changeovers, and
the words every display uses for them.

Every boundary crossing is an event; a crossing where a changeover is made
carries that changeover's number (the one in the plan's tables, the PDF and
``log start --changeover N``), and a crossing with none is listed unnumbered
with why. An area coming into force (or ceasing to apply) while the ship is
inside it is an event of its own at the moment and position of the document's
``force_events`` row, numbered when a changeover is made for it. A changeover
tied to neither (one before departure, one at a change of the global cap) is an
event of its own at its boundary. What each event is comes from the
changeover row's ``boundary_event``, never guessed. The map, the chart and the
GPX waypoints all take their labels from :func:`plan_events`, and the terminal
table, the plan PDF and the watch sheets their phrases from :func:`what_text`
and :func:`moment_words`, so they agree. Pure data (no matplotlib).
"""

from __future__ import annotations

from dataclasses import dataclass

MATCH_NM = 0.01
"""A changeover's boundary is a crossing when their distances agree to 0.01 nm."""

MATCH_S = 1.0
"""A changeover is for a force event when their moments agree to 1 s."""

KINDS = {"enter": "enter", "exit": "exit", "comes_into_force": "comes into force",
         "ceases": "ceases to apply", "departure": "before departure",
         "cap_change": "global cap changes", "scrubber_out_of_service": "scrubber outage",
         "scrubber_in_service": "scrubber back in service", "zone_enter": "zone enter",
         "zone_exit": "zone exit", "load_out_of_range": "load out of scrubber range",
         "load_in_range": "load back in scrubber range"}
"""The short name of each ``boundary_event`` (the map's, chart's and GPX's)."""

ZONE_EVENTS = ("enter", "exit", "zone_enter", "zone_exit", "load_out_of_range", "load_in_range")
"""A changeover's boundary that is a place but no crossing of the route check's areas when
no crossing matches it: a washwater discharge zone's, or the start of a leg whose load is
outside or back inside a scrubber's load range (the served circuits')."""

SCRUBBER_KINDS = {"start": "scrubber start", "stop": "scrubber stop",
                  "mode_change": "scrubber mode change",
                  "out_of_service": "scrubber out of service"}
"""The short name of each scrubber event kind (:mod:`planner.voyage.scrubber_events`)."""

SCRUBBER_PREFIX = "S"
"""Scrubber events are numbered apart and drawn ``S1``, ``S2`` ... (changeovers: 1, 2 ...)."""


def scrubber_label(number: int) -> str:
    """``S3`` for scrubber event 3."""
    return f"{SCRUBBER_PREFIX}{number}"


CLOCK_EVENTS = ("comes_into_force", "ceases", "departure", "cap_change",
                "scrubber_out_of_service", "scrubber_in_service")
"""Events that are a moment on the clock, not a place the ship reaches."""


def boundary_event(r: dict) -> str:
    """A changeover row's ``boundary_event`` (``enter`` / ``exit`` by direction in an older
    document without it)."""
    ev = r.get("boundary_event")
    if ev in KINDS:
        return ev
    if r.get("before_departure"):
        return "departure"
    return "enter" if r.get("direction") == "to_compliant" else "exit"


def _limit(r: dict) -> str:
    if r.get("direction") != "to_compliant" or r.get("limit_pct") is None:
        return ""
    out = f" (limit {r['limit_pct']:.2f} % m/m"
    return out + (f", target {r['target_pct']:.3f} % m/m)" if r.get("target_pct") else ")")


def what_text(r: dict, at: str) -> str:
    """What a changeover is, in words, after its area's name: ``at`` is its boundary's
    moment as the display shows it (``00:00Z``, ``2027-06-12 00:00Z``)."""
    ev = boundary_event(r)
    down = r.get("direction") == "to_compliant"
    limit = _limit(r)
    if ev == "enter":
        return f", enter: change to compliant fuel before the boundary{limit}"
    if ev == "exit":
        return ", exit: change back to regular fuel at or after the boundary, never before"
    if ev == "comes_into_force":
        return (f" comes into force at {at} while the ship is inside it: compliant by {at} "
                f"wherever the ship is{limit}")
    if ev == "ceases":
        return (f" ceases to apply at {at} while the ship is inside it: change back to "
                f"regular fuel at or after {at}, never before")
    if ev == "zone_enter":
        return (", enter (a washwater discharge zone the scrubber cannot work in): change the "
                f"served circuits to compliant fuel before the boundary{limit}")
    if ev == "zone_exit":
        return (", exit (a washwater discharge zone): change the served circuits back to the "
                "high-sulphur fuel at or after the boundary, never before")
    if ev == "load_out_of_range":
        return (", a leg on which a served engine's load is outside the scrubber's load range "
                "(see the scrubber events): change the served circuits to compliant fuel "
                f"before the leg{limit}")
    if ev == "load_in_range":
        return (", the served engines' load back within the scrubber's load range: change the "
                "served circuits back to the high-sulphur fuel at or after the leg's start, "
                "never before")
    if ev == "scrubber_out_of_service":
        return (f", scrubber out of service at {at}: the served circuits compliant by {at} "
                f"wherever the ship is{limit}")
    if ev == "scrubber_in_service":
        return (f", scrubber back in service at {at}: change back to the high-sulphur fuel "
                f"at or after {at}, never before")
    if ev == "departure":
        if down:
            return (f", departure (alongside): the voyage departs inside the area: be "
                    f"compliant before departure at {at}{limit}")
        return f", departure: change to regular fuel from departure at {at}"
    if down:
        return (f", global cap changes at {at}: compliant by {at} wherever the ship "
                f"is{limit}")
    return f", global cap changes at {at}: change back at or after {at}, never before"


def moment_words(r: dict) -> tuple[str, str]:
    """``(label, at)`` for the line giving the boundary's moment and position:
    ``("Boundary", "at")`` for a crossing, ``("Comes into force", "the ship then at")`` for
    an area's date, ``("Departure", "alongside at")`` ..."""
    ev = boundary_event(r)
    return {"enter": ("Boundary", "at"), "exit": ("Boundary", "at"),
            "zone_enter": ("Boundary", "at"), "zone_exit": ("Boundary", "at"),
            "load_out_of_range": ("Leg begins", "at"), "load_in_range": ("Leg begins", "at"),
            "comes_into_force": ("Comes into force", "the ship then at"),
            "ceases": ("Ceases to apply", "the ship then at"),
            "departure": ("Departure", "alongside at"),
            "cap_change": ("Global cap changes", "the ship then at"),
            "scrubber_out_of_service": ("Scrubber out of service", "the ship then at"),
            "scrubber_in_service": ("Scrubber back in service", "the ship then at")}[ev]


@dataclass(frozen=True)
class PlanEvent:
    """One event: ``number`` (the changeover's, or None; a scrubber event's own number),
    ``kind`` (a value of :data:`KINDS` or :data:`SCRUBBER_KINDS`), the area (the
    scrubber's name for a scrubber event), the moment (ISO 8601 UTC or None), the
    position [° WGS84], the distance from departure [nm] and a short note."""

    number: int | None
    kind: str
    area: str
    time_utc: str | None
    lat: float
    lon: float
    distance_nm: float
    note: str
    zone: bool = False
    """An entry or exit that is no crossing of the route check's areas (a washwater
    discharge zone's boundary, where a scrubber's circuits change over)."""

    def __post_init__(self) -> None:
        if not -90.0 <= self.lat <= 90.0:
            raise ValueError(f"event latitude {self.lat} outside -90..90")
        if self.kind not in KINDS.values() and self.kind not in SCRUBBER_KINDS.values():
            raise ValueError(f"event kind {self.kind!r} not one of "
                             f"{sorted(KINDS.values()) + sorted(SCRUBBER_KINDS.values())}")

    @property
    def is_scrubber(self) -> bool:
        """A scrubber event (numbered apart: ``S1``; ``area`` holds the scrubber's name)."""
        return self.kind in SCRUBBER_KINDS.values()

    @property
    def label(self) -> str:
        """The number as drawn (empty for an unnumbered crossing; ``S1`` for a scrubber
        event)."""
        if self.number is None:
            return ""
        return scrubber_label(self.number) if self.is_scrubber else str(self.number)

    @property
    def is_crossing(self) -> bool:
        """A boundary crossing (enter or exit), not a moment on the clock."""
        return self.kind in ("enter", "exit")

    @property
    def when(self) -> str:
        """``2027-06-12 00:00Z`` (to the minute), or empty without a time."""
        if not self.time_utc:
            return ""
        return self.time_utc[:10] + " " + self.time_utc[11:16] + "Z"

    def text(self) -> str:
        """``3 enter Corran Sea ECA: change to mgo`` (the legend and chart line); a moment
        on the clock with its time: ``3 comes into force Tarrow ECA 2027-06-12 00:00Z``."""
        head = f"{self.label} " if self.label else ""
        at = "" if self.is_crossing or self.zone or not self.when else f" {self.when}"
        return f"{head}{self.kind} {self.area}{at}: {self.note}"


def _note(r: dict) -> str:
    ev = boundary_event(r)
    if r.get("direction") == "to_compliant":
        if ev in ("comes_into_force", "cap_change", "scrubber_out_of_service"):
            return f"on {r.get('to_fuel')} by then, wherever the ship is"
        if ev == "departure":
            return f"on {r.get('to_fuel')} before departure"
        if ev == "zone_enter":
            return f"on {r.get('to_fuel')} before the zone (the scrubber cannot work in it)"
        if ev == "load_out_of_range":
            return f"on {r.get('to_fuel')} before the leg (load outside the scrubber's range)"
        return f"on {r.get('to_fuel')} before the boundary"
    if ev in ("ceases", "cap_change", "scrubber_in_service"):
        return f"back to {r.get('to_fuel')} from then"
    if ev == "departure":
        return f"to {r.get('to_fuel')} from departure"
    if ev == "zone_exit":
        return f"back to {r.get('to_fuel')} from the zone's exit"
    if ev == "load_in_range":
        return f"back to {r.get('to_fuel')} from the leg's start (load back in range)"
    return f"back to {r.get('to_fuel')} from the exit"


def _take(firsts: dict[int, dict], used: set[int], ok) -> dict | None:
    hit = next((r for n, r in firsts.items() if n not in used and ok(r)), None)
    if hit is not None:
        used.add(hit["number"])
    return hit


def _seconds(iso: str | None) -> float | None:
    from datetime import datetime

    if not iso:
        return None
    return datetime.fromisoformat(iso.replace("Z", "+00:00")).timestamp()


def plan_events(crossings: list[dict], changeovers: list[dict],
                force_events: list[dict] | None = None) -> list[PlanEvent]:
    """Every crossing (``route --json`` rows: area, event, lat, lon, distance_nm,
    time_utc) and every force event (``force_events`` rows: area, event, time_utc, lat,
    lon, distance_nm) with the number of the changeover made for it, and any changeover
    tied to neither (an entry or exit of no crossing: a washwater discharge zone's, marked
    ``zone``); in order along the route."""
    firsts: dict[int, dict] = {}
    for r in changeovers:
        firsts.setdefault(r["number"], r)
    used: set[int] = set()
    out = []
    for c in crossings:
        hit = _take(firsts, used, lambda r, c=c: boundary_event(r) == c["event"]
                    and r["area"] == c["area"] and r.get("boundary_nm") is not None
                    and abs(r["boundary_nm"] - c["distance_nm"]) <= MATCH_NM)
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
    for f in force_events or []:
        t = _seconds(f["time_utc"])
        hit = _take(firsts, used, lambda r, f=f, t=t: boundary_event(r) == f["event"]
                    and r["area"] == f["area"] and t is not None
                    and abs((_seconds(r.get("boundary_utc")) or 0.0) - t) <= MATCH_S)
        note = _note(hit) if hit else (
            "no changeover for it (the fuel in use already meets the limit)"
            if f["event"] == "comes_into_force" else "no changeover for it")
        out.append(PlanEvent(hit["number"] if hit else None, KINDS[f["event"]], f["area"],
                             f["time_utc"], f["lat"], f["lon"], f["distance_nm"], note))
    for n, r in firsts.items():
        if n in used or r.get("boundary_lat") is None:
            continue
        ev = boundary_event(r)
        out.append(PlanEvent(n, KINDS[ev], r["area"], r.get("boundary_utc"),
                             r["boundary_lat"], r["boundary_lon"], r.get("boundary_nm") or 0.0,
                             _note(r), zone=ev in ZONE_EVENTS))
    return sorted(out, key=lambda e: (e.distance_nm, e.time_utc or "", e.number or 0))
