"""Scrubber entries' details: the ratio and the limit worked out, checked on every read,
and every stored value a reader could have edited refused.

Reference: Table 1 of [MEPC-340] as printed there (ratio limits to one decimal, from
memory); ratios worked out by hand beside each case.
"""

from __future__ import annotations

import math
from datetime import UTC, datetime

import pytest

from planner.journal.codec import DecodeError, decode_entry, encode
from planner.journal.describe_kinds import ratio_shown, reading_text
from planner.journal.details_kinds import RATIO_LIMITS, ScrubberDetails, ratio_limit_for
from planner.journal.entries import SCRUBBER, Entry, Person, Position, Record

T = datetime(2026, 5, 31, 1, 0, tzinfo=UTC)


@pytest.mark.parametrize(("sulphur_pct", "ratio", "source"), [
    (0.10, 4.3, "[MEPC-340] Table 1, from memory"),
    (0.50, 21.7, "[MEPC-340] Table 1, from memory"),
    (1.00, 43.3, "[MEPC-340] Table 1, from memory"),
    (1.50, 65.0, "[MEPC-340] Table 1, from memory"),
    (3.50, 151.7, "[MEPC-340] Table 1, from memory"),
    (4.50, 195.0, "[MEPC-340] Table 1, from memory"),
])
def test_ratio_limits_are_table_1(sulphur_pct, ratio, source):
    assert ratio_limit_for(sulphur_pct) == ratio, source
    assert RATIO_LIMITS[sulphur_pct] == ratio


@pytest.mark.parametrize(("so2", "co2", "pct", "ratio", "over"), [
    (25.0, 5.0, 0.10, 5.0, True),        # 25 / 5 = 5.00 > 4.3
    (21.5, 5.0, 0.10, 4.3, False),       # 21.5 / 5 = 4.30: at the limit is within it
    (100.0, 4.0, 0.50, 25.0, True),      # 100 / 4 = 25.0 > 21.7
    (0.0, 3.0, 0.10, 0.0, False),
])
def test_the_ratio_and_the_flag_are_worked_out(so2, co2, pct, ratio, over):
    d = ScrubberDetails.make("EGCS 1", "ratio_reading", None, so2, co2, limit_sulphur_pct=pct)
    assert d.ratio == pytest.approx(ratio, rel=1e-12) and d.over_limit is over
    assert d.ratio_limit == RATIO_LIMITS[pct]


def test_an_over_limit_ratio_is_never_printed_as_the_limit():
    assert ratio_shown(4.3004, 4.3) == "4.3004"
    assert ratio_shown(4.2996, 4.3) == "4.30"          # within: two decimals suffice
    d = ScrubberDetails.make("EGCS 1", "ratio_reading", None, 21.502, 5.0, 4.3)
    assert d.over_limit and "ratio 4.3004 ppm/% v/v" in reading_text(d)
    assert "OVER THE LIMIT" in reading_text(d)


def _entry(details: ScrubberDetails) -> Entry:
    return Entry(SCRUBBER, Person("2nd Engineer", "T. Okafor"), T,
                 Record(T, 720, Position(-39.3, 175.9), None, "V26-05", None, (), details))


def test_round_trip_and_edited_values_refused():
    d = ScrubberDetails.make("EGCS 1", "ratio_reading", "open", 25.0, 5.0,
                             limit_sulphur_pct=0.10, remarks="after the washwater pump")
    doc = encode(_entry(d))
    assert decode_entry(doc) == _entry(d)
    for key, value, needle in (
            ("ratio", 4.0, "ratio must be so2_ppm / co2_pct"),
            ("over_limit", False, "over_limit must be True"),
            ("ratio_limit", 21.7, "ratio_limit must be 4.3"),
            ("so2_ppm", -1.0, "so2_ppm must be from 0"),
            ("co2_pct", None, "both SO₂"),
            ("mode", "semi", "mode must be open or closed"),
            ("event", "explode", "event must be one of"),
            ("limit_sulphur_pct", 0.2, "sulphur limit must be one of"),
            ("plan_event", 2, "needs both its file and its number")):
        bad = {**doc, "record": {**doc["record"], "details": {**doc["record"]["details"],
                                                              key: value}}}
        with pytest.raises(DecodeError, match=needle):
            decode_entry(bad)


@pytest.mark.parametrize(("kwargs", "needle"), [
    ({"event": "start"}, "needs the washwater mode"),
    ({"event": "mode_change"}, "needs the washwater mode"),
    ({"event": "ratio_reading"}, "needs SO₂"),
    ({"event": "stop", "so2_ppm": math.nan, "co2_pct": 5.0}, "finite number"),
    ({"event": "stop", "so2_ppm": 3.0, "co2_pct": 0.0}, "co2_pct must be from 0.1"),
    ({"event": "stop", "scrubber": " "}, "scrubber must be non-empty"),
    ({"event": "stop", "ratio_limit": 4.3}, "needs a reading"),
])
def test_bad_details_refused(kwargs, needle):
    args = {"scrubber": "EGCS 1", **kwargs}
    with pytest.raises(ValueError, match=needle):
        ScrubberDetails.make(**args)


def test_a_scrubber_event_needs_its_position():
    d = ScrubberDetails.make("EGCS 1", "failure")
    with pytest.raises(ValueError, match="needs the position"):
        Entry(SCRUBBER, Person("C/E", "R. H."), T, Record(T, 0, None, None, None, None, (), d))
