"""parse_moment: a time at the edge of Python's calendar (year 1 east of UTC, year 9999
west of it) cannot be turned into UTC; it is one InputError line, never an OverflowError.
Hand check: 0001-01-01T00:00+05:00 is 0000-12-31T19:00Z, before datetime.min."""

from __future__ import annotations

from datetime import UTC, datetime

import pytest

from geo.errors import InputError
from planner.common.timefmt import parse_moment


@pytest.mark.parametrize("text", ["0001-01-01T00:00+05:00", "9999-12-31T23:30-01:00"])
def test_a_time_outside_the_calendar_in_utc_is_one_line(text):
    with pytest.raises(InputError) as info:
        parse_moment(text, file="voyage.toml", place="depart")
    msg = str(info.value)
    assert "\n" not in msg and "voyage.toml" in msg and text in msg
    assert "year between 2 and 9998" in msg


def test_the_edges_that_fit_still_parse():
    assert parse_moment("0001-01-01T00:00Z") == datetime(1, 1, 1, tzinfo=UTC)
    assert parse_moment("9999-12-31T23:00+01:00") == datetime(9999, 12, 31, 22, tzinfo=UTC)
