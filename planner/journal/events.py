"""What a changeover's planned boundary is, in words: a crossing, a moment on the clock.

The plan JSON (docs/json-contract.md) names each changeover's ``boundary_event``:

==================  ======================================================================
``enter``/``exit``  the ship crosses the area's boundary (a place on the route)
``comes_into_force``  the area comes into force while the ship is already inside it
``ceases``          the area ceases to be in force while the ship is inside it
``departure``       made alongside before departure (or commenced at departure)
``cap_change``      the global sulphur cap changes while under way
``zone_enter``/     a served circuit's change at a washwater discharge zone its scrubber
``zone_exit``       cannot work in (a place: the zone's boundary)
``scrubber_out_of_service``/``scrubber_in_service``  a served circuit's change for a planned
                    scrubber outage and back (moments on the clock)
``load_out_of_range``/``load_in_range``  a served circuit's change at the start of a leg on
                    which a served engine's load leaves or re-enters the scrubber's load
                    range (a place: where the leg begins)
==================  ======================================================================

Only ``enter`` and ``exit`` are crossings of an area; the zone and load events are places
too; the others are deadlines on the clock, and the position the plan gives for them is
where the ship then is, not a boundary. A plan made
before ``boundary_event`` existed is read as ``enter`` (to compliant) or ``exit`` (back).
Plain text, no terminal or PDF markup.
"""

from __future__ import annotations

from planner.journal.entries import BOUNDARY_EVENTS, Planned

__all__ = ["BOUNDARY_EVENTS", "alongside", "boundary_phrase", "event_of", "goal_text",
           "late_check", "moment_word"]

_MOMENT = {
    "enter": "entry",
    "exit": "exit",
    "comes_into_force": "the area came into force",
    "ceases": "the area ceased",
    "departure": "departure",
    "cap_change": "the sulphur cap changed",
    "zone_enter": "entry into the discharge zone",
    "zone_exit": "exit from the discharge zone",
    "scrubber_out_of_service": "the scrubber went out of service",
    "scrubber_in_service": "the scrubber was back in service",
    "load_out_of_range": "the leg's start",
    "load_in_range": "the leg's start",
}
"""The boundary after ``before``/``after`` in a heading (``completed 12 min after entry``)."""


def event_of(p: Planned | None, direction: str) -> str:
    """The planned boundary's event: the plan's, else ``enter``/``exit`` by ``direction``."""
    if p is not None and p.event:
        return p.event
    return "enter" if direction == "to_compliant" else "exit"


def moment_word(event: str) -> str:
    """``entry``, ``the area came into force``, ``departure``...: the boundary as a noun
    phrase after ``before`` or ``after``."""
    return _MOMENT.get(event, "the boundary")


def alongside(event: str, before: bool) -> str:
    """``alongside `` for a step made before departure (said in its heading), else ``""``."""
    return "alongside " if event == "departure" and before else ""


def boundary_phrase(event: str, area: str | None, when: str, where: str) -> str:
    """The planned boundary in full, for the record: ``planned boundary entry 2027-05-31
    11:46Z at 39°..S``; ``Tarrow Approaches ECA came into force at 2027-06-12 00:00Z (a
    moment on the clock, not a boundary crossing; the ship then at 37°..S ..)``."""
    name = area or "the area"
    at = f"; the ship then at {where}" if where else ""
    if event == "comes_into_force":
        return f"{name} came into force at {when} (a moment on the clock, not a boundary " \
               f"crossing{at})"
    if event == "ceases":
        return f"{name} ceased to be in force at {when} (a moment on the clock, not a " \
               f"boundary crossing{at})"
    if event == "departure":
        return f"planned departure {when}{' from ' + where if where else ''}"
    if event == "cap_change":
        return f"the global sulphur cap changed at {when} (a moment on the clock{at})"
    if event in _SCRUBBER_CLOCK:
        return f"{_SCRUBBER_CLOCK[event]} at {when} (a moment on the clock{at})"
    if event in _SCRUBBER_PLACE:
        return f"planned {_SCRUBBER_PLACE[event]} {when}{' at ' + where if where else ''}"
    word = "entry" if event == "enter" else "exit"
    return f"planned boundary {word} {when}{' at ' + where if where else ''}"


_SCRUBBER_CLOCK = {"scrubber_out_of_service": "the scrubber planned out of service",
                   "scrubber_in_service": "the scrubber planned back in service"}
_SCRUBBER_PLACE = {
    "zone_enter": "entry into a washwater discharge zone the scrubber cannot work in",
    "zone_exit": "exit from the washwater discharge zone",
    "load_out_of_range": "start of a leg with a served engine's load outside the scrubber's "
                         "load range",
    "load_in_range": "start of a leg with the served engines' load back in the scrubber's "
                     "load range",
}
_SCRUBBER_GOAL = {
    "zone_enter": "to compliant fuel before entering {area} (a washwater discharge zone the "
                  "scrubber cannot work in)",
    "scrubber_out_of_service": "to compliant fuel before the scrubber's planned outage ({area})",
    "load_out_of_range": "to compliant fuel before the leg with the load outside the scrubber's "
                         "range ({area})",
    "zone_exit": "back to the high-sulphur fuel after leaving {area} (washwater discharge zone)",
    "scrubber_in_service": "back to the high-sulphur fuel after the scrubber's return to "
                           "service ({area})",
    "load_in_range": "back to the high-sulphur fuel from the leg with the load back in the "
                     "scrubber's range ({area})",
}
"""The served circuits' own boundaries: clock moments, places, and what a change is for."""


def goal_text(event: str, direction: str, area: str) -> str:
    """What a changeover is for, in a heading: ``to compliant fuel before entering X``,
    ``to compliant fuel before X came into force``, ``to compliant fuel alongside before
    departure, inside X``, ``back to regular fuel after leaving X`` / ``after X ceased``."""
    if event in _SCRUBBER_GOAL:
        return _SCRUBBER_GOAL[event].format(area=area)
    if direction == "to_compliant":
        if event == "comes_into_force":
            return f"to compliant fuel before {area} came into force (the ship inside it)"
        if event == "departure":
            return ("to compliant fuel alongside before departure" if area == "departure"
                    else f"to compliant fuel alongside before departure, inside {area}")
        if event == "cap_change":
            return f"to compliant fuel before the sulphur cap changed ({area})"
        return f"to compliant fuel before entering {area}"
    if event == "ceases":
        return f"back to regular fuel after {area} ceased to be in force (the ship inside it)"
    if event == "departure":  # a plan names the area of a switch back at departure so
        return "back to regular fuel at departure" + (
            "" if area == "departure" else f", {area}")
    if event == "cap_change":
        return f"back to regular fuel after the sulphur cap changed ({area})"
    return f"back to regular fuel after leaving {area}"


def late_check(event: str, kind_completes: bool) -> str:
    """What to check when a step is on the wrong side of its boundary."""
    if kind_completes:
        return {"comes_into_force": "check the fuel at the inlets when the area came into "
                                    "force",
                "departure": "the ship left before the changeover was complete: check "
                             "where it was then",
                "cap_change": "check the fuel at the inlets when the sulphur cap changed",
                "zone_enter": "check where the ship entered the discharge zone",
                "scrubber_out_of_service": "check the fuel at the inlets when the scrubber "
                                           "went out of service",
                "load_out_of_range": "check where the leg with the load out of range began",
                }.get(event, "check where the ship crossed into the area")
    return {"ceases": "check the time the area ceased to be in force",
            "departure": "check the time of departure",
            "cap_change": "check the time the sulphur cap changed",
            "zone_exit": "check where the ship left the discharge zone",
            "scrubber_in_service": "check the time the scrubber was back in service",
            "load_in_range": "check where the leg with the load back in range began",
            }.get(event, "check where the ship left the area")
