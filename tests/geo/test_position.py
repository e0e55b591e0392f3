"""Parsing and formatting of positions (geo.position).

Check values are worked by hand: 12.3' = 0.205°, 30' = 0.5°, 15" = 0.25' [D].
"""

from __future__ import annotations

import math

import pytest
from hypothesis import given
from hypothesis import strategies as st

from geo.errors import InputError
from geo.position import (
    LAT_EXPECTED,
    LON_EXPECTED,
    format_lat,
    format_lon,
    format_position,
    parse_lat,
    parse_lon,
)


@pytest.mark.parametrize(
    ("text", "expected"),
    [
        ("54°12.3'N", 54.205),
        ("54°12.3′N", 54.205),  # prime
        ("54º12.3’N", 54.205),  # masculine ordinal and right single quote, as typed
        ("54 12.3 N", 54.205),
        ("54 12.3N", 54.205),
        ("N54°12.3'", 54.205),
        ("N 54 12.3", 54.205),
        ("54°12.3'S", -54.205),
        ("54°12.3's", -54.205),
        ("-54°12.3'", -54.205),
        ("54°N", 54.0),
        ("54.5°S", -54.5),
        ("54 N", 54.0),
        ("54°30'00\"N", 54.5),
        ("54°30′00″N", 54.5),
        ("54°30'00''N", 54.5),  # two apostrophes for seconds
        ("54 30 36 N", 54.51),
        ("54.205", 54.205),
        ("-3.5", -3.5),
        ("−3.5", -3.5),  # U+2212 minus sign
        ("+12", 12.0),
        ("  7.25  ", 7.25),
        ("90°00.0'N", 90.0),
        ("0", 0.0),
        ("54.", 54.0),
        ("54°12.3", 54.205),  # no marks after the minutes, no hemisphere: north
    ],
)
def test_parse_lat_forms(text: str, expected: float) -> None:
    assert parse_lat(text) == pytest.approx(expected, abs=1e-12)


@pytest.mark.parametrize(
    ("text", "expected"),
    [
        ("054°12.30'W", -54.205),
        ("003°30.0'W", -3.5),
        ("12°30'15\"E", 12.0 + 30 / 60 + 15 / 3600),
        ("W003°30.0'", -3.5),
        ("003 30.0 E", 3.5),
        ("180°00.0'W", -180.0),
        ("-3.5", -3.5),
        ("190.5", 190.5),  # plain numbers may run past 180 (sailings take the shorter way)
        ("-720", -720.0),
    ],
)
def test_parse_lon_forms(text: str, expected: float) -> None:
    assert parse_lon(text) == pytest.approx(expected, abs=1e-12)


def test_numbers_pass_through() -> None:
    assert parse_lat(54) == 54.0
    assert parse_lat(-12.5) == -12.5
    assert parse_lon(370.0) == 370.0
    assert isinstance(parse_lat(1), float)


@pytest.mark.parametrize(
    ("value", "reason"),
    [
        ("54°12.3'E", "N or S, not E"),  # wrong axis
        ("54°60.0'N", "minutes below 60"),
        ("54°59'60\"N", "seconds below 60"),
        ("-54°12.3'N", "not both"),
        ("+54°12.3'N", "not both"),
        ("N54°12.3'S", "not two"),
        ("91.0", "within ±90°"),
        ("90°00.1'N", "at most 90°"),
        ("54.5°12'N", "whole degrees"),
        ("54°12.5'30\"N", "whole minutes"),
        (91, "within ±90°"),
        (math.nan, "finite"),
        (math.inf, "finite"),
    ],
)
def test_parse_lat_refusals(value: object, reason: str) -> None:
    with pytest.raises(InputError) as info:
        parse_lat(value, file="r.csv", place="line 3, column lat")
    err = info.value
    assert err.file == "r.csv" and err.place == "line 3, column lat"
    assert err.value == value or (isinstance(value, float) and math.isnan(value))
    assert err.expected.startswith(LAT_EXPECTED)
    assert reason in err.expected
    assert str(err).startswith("r.csv: line 3, column lat: ")
    assert "\n" not in str(err)


@pytest.mark.parametrize(
    "value",
    [
        "",
        "   ",
        "abc",
        "54,205",
        "5412.3N x",
        "1e3",
        "nan",
        "inf",
        "N",
        "54°12.3'Q",
        "54-12.3N",
        None,
        True,
        [54, 12],
        "54°°12'N",
        ".5",
    ],
)
def test_parse_lat_rejects_junk(value: object) -> None:
    with pytest.raises(InputError) as info:
        parse_lat(value)
    assert info.value.expected.startswith(LAT_EXPECTED)


def test_missing_value_is_reported_as_missing() -> None:
    with pytest.raises(InputError, match="missing: expected a latitude"):
        parse_lat(None, file="f", place="p")


@pytest.mark.parametrize(
    ("value", "reason"),
    [
        ("54°12.3'N", "E or W, not N"),
        ("180°00.1'E", "at most 180°"),
        ("181°00.0'W", "at most 180°"),
        ("181 W", "at most 180°"),
        ("-3°30.0'W", "not both"),
        ("003°75.0'W", "minutes below 60"),
        (math.inf, "finite"),
    ],
)
def test_parse_lon_refusals(value: object, reason: str) -> None:
    with pytest.raises(InputError) as info:
        parse_lon(value, file="r.gpx", place="rtept 2")
    assert info.value.expected.startswith(LON_EXPECTED)
    assert reason in info.value.expected


def test_format_examples() -> None:
    assert format_lat(54.205) == "54°12.3'N"
    assert format_lat(-54.205) == "54°12.3'S"
    assert format_lon(-3.5) == "003°30.0'W"
    assert format_lon(12.5) == "012°30.0'E"
    assert format_lat(5.0 + 3 / 60) == "05°03.0'N"  # minutes zero-padded too
    assert format_position(54.205, -3.5) == "54°12.3'N 003°30.0'W"
    assert format_position(54.205, -3.5, decimals=2) == "54°12.30'N 003°30.00'W"
    assert format_lat(54.205, 0) == "54°12'N"
    assert format_lat(0.0) == "00°00.0'N"
    assert format_lat(-0.0) == "00°00.0'N"
    assert format_lon(-0.00001) == "000°00.0'E"  # rounds to zero: no west of nothing


def test_rounding_carries_into_degrees() -> None:
    assert format_lat(54 + 59.96 / 60) == "55°00.0'N"
    assert format_lat(-(54 + 59.96 / 60)) == "55°00.0'S"
    assert format_lat(54 + 59.94 / 60) == "54°59.9'N"
    assert format_lon(3 + 59.999 / 60, decimals=2) == "004°00.00'E"
    assert format_lat(89.99999) == "90°00.0'N"
    assert format_lat(12 + 59.6 / 60, decimals=0) == "13°00'N"
    assert "60.0'" not in format_lon(-(179 + 59.97 / 60))


def test_format_lon_wraps() -> None:
    assert format_lon(180.0) == "180°00.0'W"  # [-180, 180): +180 is written as 180 W
    assert format_lon(-180.0) == "180°00.0'W"
    assert format_lon(183.5) == "176°30.0'W"
    assert format_lon(-190.0) == "170°00.0'E"
    assert format_lon(360.0 + 1.5) == "001°30.0'E"


@pytest.mark.parametrize("bad", [math.nan, math.inf, 90.0001, -91.0])
def test_format_lat_refuses_non_latitudes(bad: float) -> None:
    with pytest.raises(ValueError):
        format_lat(bad)


def test_format_refuses_bad_decimals() -> None:
    with pytest.raises(ValueError):
        format_lat(1.0, decimals=-1)
    with pytest.raises(ValueError):
        format_lon(math.nan)


_lat = st.floats(min_value=-90.0, max_value=90.0, allow_nan=False)
_lon = st.floats(min_value=-1000.0, max_value=1000.0, allow_nan=False)


@given(_lat)
def test_lat_round_trip_within_half_a_tenth_of_a_minute(lat: float) -> None:
    text = format_lat(lat)
    assert "60.0'" not in text
    assert abs(parse_lat(text) - lat) * 60.0 <= 0.05 + 1e-9


@given(_lon)
def test_lon_round_trip_within_half_a_tenth_of_a_minute(lon: float) -> None:
    text = format_lon(lon)
    back = parse_lon(text)
    assert -180.0 <= back <= 180.0
    diff = (back - lon + 180.0) % 360.0 - 180.0
    assert abs(diff) * 60.0 <= 0.05 + 1e-9


@given(_lat, st.integers(min_value=0, max_value=4))
def test_round_trip_at_any_precision(lat: float, decimals: int) -> None:
    back = parse_lat(format_lat(lat, decimals))
    assert abs(back - lat) * 60.0 <= 0.5 * 10.0**-decimals + 1e-9


@given(_lat, _lon)
def test_position_splits_into_parsable_halves(lat: float, lon: float) -> None:
    lat_text, lon_text = format_position(lat, lon).split(" ")
    assert lat_text == format_lat(lat) and lon_text == format_lon(lon)
    assert parse_lon(lon_text) == pytest.approx(parse_lon(format_lon(lon)))
