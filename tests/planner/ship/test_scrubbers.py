"""The scrubber and scrubber-plan data types refuse what cannot be."""

from __future__ import annotations

import pytest

from planner.ship.scrubbers import Scrubber
from planner.voyage.scrubber_events import ScrubberEvent, ScrubberSpan


def test_hybrid_and_single_mode() -> None:
    h = Scrubber("egcs", ("main_engine", "dg1"), ("open", "closed"), 3.5)
    assert h.hybrid and h.mode_word == "hybrid" and h.allows("closed")
    o = Scrubber("egcs", ("main_engine",), ("open",), 3.5)
    assert not o.hybrid and o.mode_word == "open" and not o.allows("closed")


@pytest.mark.parametrize("kwargs, words", [
    ({"consumers": ()}, "consumers"),
    ({"consumers": ("me", "me")}, "twice"),
    ({"modes": ()}, "modes"),
    ({"modes": ("closed", "open")}, "in that order"),
    ({"modes": ("scrubbing",)}, "modes"),
    ({"max_sulphur_pct": 5.0}, "max_sulphur_pct"),
    ({"max_sulphur_pct": float("nan")}, "finite"),
    ({"min_load_pct": 60.0, "max_load_pct": 50.0}, "load range"),
])
def test_refused(kwargs: dict, words: str) -> None:
    base = {"name": "egcs", "consumers": ("me",), "modes": ("open",), "max_sulphur_pct": 3.5}
    with pytest.raises(ValueError, match=words):
        Scrubber(**{**base, **kwargs})


def test_event_mode_rules() -> None:
    ScrubberEvent("egcs", "start", "open", 0.0, 0.0)
    ScrubberEvent("egcs", "stop", None, 0.0, 0.0)
    with pytest.raises(ValueError, match="needs a mode"):
        ScrubberEvent("egcs", "mode_change", None, 0.0, 0.0)
    with pytest.raises(ValueError, match="carries no mode"):
        ScrubberEvent("egcs", "stop", "open", 0.0, 0.0)
    with pytest.raises(ValueError, match="kind"):
        ScrubberEvent("egcs", "trip", None, 0.0, 0.0)


def test_span_checks() -> None:
    s = ScrubberSpan("egcs", ("main",), "hsfo", "mgo", 0.1, "closed", 0.0, 1000.0, 0.0, 7200.0)
    assert s.duration_h == 2.0
    with pytest.raises(ValueError, match="end before"):
        ScrubberSpan("egcs", ("main",), "hsfo", "mgo", 0.1, "open", 10.0, 0.0, 0.0, 1.0)
    with pytest.raises(ValueError, match="mode"):
        ScrubberSpan("egcs", ("main",), "hsfo", "mgo", 0.1, "hybrid", 0.0, 1.0, 0.0, 1.0)


def test_outage_and_passage() -> None:
    from planner.voyage.scrubber_events import ScrubberOutage, ZonePassage
    o = ScrubberOutage("egcs", 100.0, 200.0)
    assert o.covers(100.0) and o.covers(199.9) and not o.covers(200.0) and not o.covers(99.0)
    assert ScrubberOutage("egcs", 100.0).covers(1e12)
    with pytest.raises(ValueError, match="end after"):
        ScrubberOutage("egcs", 100.0, 100.0)
    assert ZonePassage("z", ("closed",), 0.0, 5.0).allows == ("closed",)
    with pytest.raises(ValueError, match="subset"):
        ZonePassage("z", ("hybrid",), 0.0, 5.0)
