"""A planned boundary in words (planner.journal.events, describe): crossings and moments
on the clock. The minutes are the hand subtraction of the two UTC times written beside
each case; the boundary kinds are those of the plan JSON (docs/json-contract.md)."""

from __future__ import annotations

from datetime import UTC, datetime, timedelta

import pytest

from planner.journal.canonical import canonical_json
from planner.journal.codec import decode_entry, encode
from planner.journal.describe import boundary_text, relation_text, step_heading, warnings
from planner.journal.details import ChangeoverDetails, FuelSpec, FuelUse, TankReading
from planner.journal.entries import (
    BACK_COMMENCED,
    COMPLETED,
    Entry,
    Person,
    Planned,
    Position,
    Record,
)

BOUNDARY = datetime(2027, 6, 12, 0, 0, tzinfo=UTC)
MGO = FuelSpec("mgo", "DMA", 0.08, 850.0, "B-1")


def _record(kind: str, minutes_after: int, event: str | None) -> Record:
    direction = "to_compliant" if kind == COMPLETED else "to_regular"
    p = Planned("plan.json", 3, direction, "Tarrow Approaches ECA", "main", None, None,
                BOUNDARY, Position(-37.675, -159.191), 1.0, None, event,
                event not in (None, "enter", "exit"))
    tank = TankReading.measure("mgo_service", "mgo", 20.0, 30.0, 850.0)
    return Record(BOUNDARY + timedelta(minutes=minutes_after), -660, Position(-37.7, -159.5),
                  "Tarrow Approaches ECA", None, "main", (FuelUse("to", MGO),),
                  ChangeoverDetails((tank,), "", None), p)


@pytest.mark.parametrize(("kind", "after", "event", "text"), [
    # 23:00Z completion, 00:00Z boundary: 60 min before
    (COMPLETED, -60, "comes_into_force", "completed 1 h 00 min before the area came into force"),
    (COMPLETED, 12, "comes_into_force", "completed 12 min after the area came into force"),
    (COMPLETED, -60, "departure", "completed alongside 1 h 00 min before departure"),
    (COMPLETED, -60, None, "completed 1 h 00 min before entry"),       # an older plan
    (COMPLETED, -60, "enter", "completed 1 h 00 min before entry"),
    (BACK_COMMENCED, 20, "ceases", "commenced 20 min after the area ceased"),
    (BACK_COMMENCED, 16, "exit", "commenced 16 min after exit"),
    (BACK_COMMENCED, 0, "cap_change", "commenced as the sulphur cap changed"),
])
def test_relation_follows_the_event(kind, after, event, text):
    r = _record(kind, after, event)
    assert relation_text(kind, r) == text
    assert step_heading(kind, r) == text[0].upper() + text[1:]


def test_an_in_force_moment_is_never_called_an_entry():
    r = _record(COMPLETED, -60, "comes_into_force")
    b = boundary_text(COMPLETED, r)
    assert b.startswith("Tarrow Approaches ECA came into force at 2027-06-12 00:00Z (a moment "
                        "on the clock, not a boundary crossing; the ship then at 37°40.5'S")
    assert "entry" not in b and "entry" not in step_heading(COMPLETED, r)


def test_wrong_side_warnings_name_the_moment():
    assert warnings(COMPLETED, _record(COMPLETED, 12, "comes_into_force")) == [
        "completed 12 min after the area came into force (2027-06-12 00:00Z planned): check "
        "the fuel at the inlets when the area came into force"]
    assert warnings(BACK_COMMENCED, _record(BACK_COMMENCED, -5, "ceases")) == [
        "commenced 5 min before the area ceased (2027-06-12 00:00Z planned): check the time "
        "the area ceased to be in force"]
    assert warnings(COMPLETED, _record(COMPLETED, -60, "comes_into_force")) == []


def test_the_new_keys_are_stored_only_when_set():
    who, t = Person("CE", "X"), datetime(2027, 6, 1, tzinfo=UTC)
    old = Entry(COMPLETED, who, t, _record(COMPLETED, -60, None))
    doc = encode(old)
    assert "event" not in doc["record"]["planned"]
    assert "clock_deadline" not in doc["record"]["planned"]   # older entries hash as written
    new = Entry(COMPLETED, who, t, _record(COMPLETED, -60, "comes_into_force"))
    back = decode_entry(encode(new))
    assert back == new and back.record.planned.clock_deadline is True
    assert canonical_json(encode(back)) == canonical_json(encode(new))


def test_an_unknown_event_is_refused():
    with pytest.raises(ValueError, match="Planned.event"):
        Planned("p", 1, "to_compliant", "A", None, None, None, None, None, None, None,
                "arrival")


def test_a_switch_back_at_departure_reads_as_such():
    """The plan names a switch back commenced at departure with area "departure"."""
    from planner.journal.events import goal_text

    assert goal_text("departure", "to_regular", "departure") == \
        "back to regular fuel at departure"
    assert goal_text("comes_into_force", "to_compliant", "Tarrow Approaches ECA") == \
        "to compliant fuel before Tarrow Approaches ECA came into force (the ship inside it)"
    r = _record(BACK_COMMENCED, 0, "departure")
    assert relation_text(BACK_COMMENCED, r) == "commenced at departure"


@pytest.mark.parametrize(("event", "direction", "goal"), [
    ("load_out_of_range", "to_compliant",
     "to compliant fuel before the leg with the load outside the scrubber's range (global cap)"),
    ("load_in_range", "to_regular",
     "back to the high-sulphur fuel from the leg with the load back in the scrubber's range "
     "(global cap)"),
    ("zone_enter", "to_compliant",
     "to compliant fuel before entering global cap (a washwater discharge zone the scrubber "
     "cannot work in)"),
    ("scrubber_out_of_service", "to_compliant",
     "to compliant fuel before the scrubber's planned outage (global cap)"),
])
def test_a_served_circuits_boundary_is_not_called_an_area_entry(event, direction, goal):
    """A served circuit's own boundary (a zone, an outage, a leg whose engine load leaves the
    scrubber's range) is said as what it is, never as entering or leaving an area."""
    from planner.journal.events import boundary_phrase, goal_text, late_check, moment_word

    assert goal_text(event, direction, "global cap") == goal
    phrase = boundary_phrase(event, "global cap", "2027-06-01 19:37Z", "38°48.0'S 172°00.0'W")
    assert "boundary entry" not in phrase and "boundary exit" not in phrase
    assert moment_word(event) != "the boundary"
    check = late_check(event, direction == "to_compliant")
    assert "crossed into the area" not in check and "left the area" not in check
