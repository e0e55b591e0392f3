"""The words and numbering of the plan's events (planner/charts/plan_events.py), from the
rows' ``boundary_event`` and the document's ``force_events`` alone.

Hand-written rows (fictional) for the kinds the sample voyages do not meet: an area that
ceases to apply while the ship is inside it (``effective_until``), a change of the global
cap, and a force event with no changeover. The rule checked is MARPOL Annex VI
regulation 14 ([MARPOL-VI] [P]): a limit applies from (or to) the area's date wherever
the ship then is, so such a moment is never described as a boundary or an entry.
"""

from __future__ import annotations

import pytest

from planner.charts.plan_events import moment_words, plan_events, what_text


def row(number: int, event: str, direction: str, **kw) -> dict:
    base = {"number": number, "area": "Test ECA", "circuit": "main", "direction": direction,
            "from_fuel": "mgo" if direction == "to_regular" else "hfo",
            "to_fuel": "hfo" if direction == "to_regular" else "mgo", "limit_pct": 0.1,
            "target_pct": 0.09 if direction == "to_compliant" else None,
            "boundary_event": event, "boundary_utc": "2030-07-01T00:00:00Z",
            "boundary_lat": 10.0, "boundary_lon": 5.0, "boundary_nm": 120.0}
    return base | kw


@pytest.mark.parametrize(("event", "direction", "words", "label"), [
    ("enter", "to_compliant", ", enter: change to compliant fuel before the boundary "
     "(limit 0.10 % m/m, target 0.090 % m/m)", ("Boundary", "at")),
    ("exit", "to_regular", ", exit: change back to regular fuel at or after the boundary, "
     "never before", ("Boundary", "at")),
    ("comes_into_force", "to_compliant", " comes into force at 00:00Z while the ship is "
     "inside it: compliant by 00:00Z wherever the ship is (limit 0.10 % m/m, target 0.090 % "
     "m/m)", ("Comes into force", "the ship then at")),
    ("ceases", "to_regular", " ceases to apply at 00:00Z while the ship is inside it: change "
     "back to regular fuel at or after 00:00Z, never before",
     ("Ceases to apply", "the ship then at")),
    ("departure", "to_compliant", ", departure (alongside): the voyage departs inside the "
     "area: be compliant before departure at 00:00Z (limit 0.10 % m/m, target 0.090 % m/m)",
     ("Departure", "alongside at")),
    ("cap_change", "to_compliant", ", global cap changes at 00:00Z: compliant by 00:00Z "
     "wherever the ship is (limit 0.10 % m/m, target 0.090 % m/m)",
     ("Global cap changes", "the ship then at")),
])
def test_each_event_has_its_own_words(event, direction, words, label):
    r = row(1, event, direction)
    assert what_text(r, "00:00Z") == words
    assert moment_words(r) == label


def test_an_older_document_without_boundary_event_reads_by_direction():
    r = row(1, "enter", "to_compliant")
    del r["boundary_event"]
    assert what_text(r, "x").startswith(", enter:")
    r = row(1, "enter", "to_regular", before_departure=True)
    del r["boundary_event"]
    assert moment_words(r) == ("Departure", "alongside at")


def test_force_events_come_from_the_document_numbered_or_not():
    """An area ceasing at 2030-07-01 00:00Z (its changeover back, number 2) and another
    coming into force later with no changeover (the ship already on compliant fuel):
    both are events at the force_events rows' positions; only the first is numbered. A
    crossing at the same distance as a clock event is not taken for it."""
    crossings = [{"area": "Test ECA", "event": "enter", "lat": 10.0, "lon": 4.0,
                  "distance_nm": 60.0, "time_utc": "2030-06-30T19:00:00Z", "in_force": True}]
    force = [{"area": "Test ECA", "event": "ceases", "time_utc": "2030-07-01T00:00:00Z",
              "lat": 10.0, "lon": 5.0, "distance_nm": 120.0, "leg": 1, "limit_after_pct": 0.5},
             {"area": "Other ECA", "event": "comes_into_force",
              "time_utc": "2030-07-02T00:00:00Z", "lat": 10.0, "lon": 9.0,
              "distance_nm": 408.0, "leg": 1, "limit_after_pct": 0.1}]
    changes = [row(1, "enter", "to_compliant", boundary_nm=60.0,
                   boundary_utc="2030-06-30T19:00:00Z"),
               row(2, "ceases", "to_regular")]
    events = plan_events(crossings, changes, force)
    assert [(e.number, e.kind, e.area) for e in events] == [
        (1, "enter", "Test ECA"), (2, "ceases to apply", "Test ECA"),
        (None, "comes into force", "Other ECA")]
    ceases, other = events[1], events[2]
    assert (ceases.lat, ceases.lon, ceases.time_utc) == (10.0, 5.0, "2030-07-01T00:00:00Z")
    assert ceases.text() == ("2 ceases to apply Test ECA 2030-07-01 00:00Z: back to hfo from "
                             "then")
    assert other.note.startswith("no changeover for it")
    assert not ceases.is_crossing and events[0].is_crossing
