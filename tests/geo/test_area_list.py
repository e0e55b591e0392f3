"""Reading an area written as a list of positions (geo.area_list), and its refusals.

One invented area, "Tallow Bank ECA" (not a legal boundary), is written in every
notation the reader takes; every one must give the very same degrees. The
expected degrees are worked by hand beside the points ([D]: 12.30' = 12.30/60° =
0.205°, 18.60' = 0.31°, 48.60' = 0.81°, 06.00' = 0.1°; 0.30' = 18", 0.60' = 36")
and checked against GeographicLib's ``GeoConvert`` [KARNEY-2013], which reads
degrees, minutes and seconds itself.
"""

from __future__ import annotations

import shutil
import subprocess

import pytest

from geo.area_list import parse_point_list, read_point_list
from geo.errors import InputError

EXPECTED = [(1, -40.205, 171.31), (2, -40.205, 174.0), (3, -38.5, 174.75), (4, -37.81, 172.1)]
"""(point, lat, lon) [deg] of Tallow Bank ECA, worked by hand [D] (see the module notes)."""

NOTATIONS = {
    "regulation (mark before the decimals)": """
        # Tallow Bank ECA (invented; not a legal boundary)
        1  40°12'.30 S  171°18'.60 E
        2  40°12'.30 S  174°00'.00 E
        3  38°30'.00 S  174°45'.00 E
        4  37°48'.60 S  172°06'.00 E
        """,
    "degrees minutes, no marks": """
        40 12.30S 171 18.60E
        40 12.30S 174 00.00E
        38 30.00S 174 45.00E
        37 48.60S 172 06.00E
        """,
    "marks after, numbered with a dot": """
        1. 40°12.30'S 171°18.60'E
        2. 40°12.30'S 174°00.00'E
        3. 38°30.00'S 174°45.00'E
        4. 37°48.60'S 172°06.00'E
        """,
    "hemisphere first": """
        S40 12.30 E171 18.60
        S40 12.30 E174 00.00
        S38 30.00 E174 45.00
        S37 48.60 E172 06.00
        """,
    "degrees minutes seconds": """
        (1) 40°12'18" S 171°18'36" E
        (2) 40°12'18" S 174°00'00" E
        (3) 38°30'00" S 174°45'00" E
        (4) 37°48'36" S 172°06'00" E
        """,
    "seconds as two primes, typographic marks": """
        40º12′18′′S, 171º18′36′′E
        40º12′18′′S, 174º00′00′′E
        38º30′00′′S, 174º45′00′′E
        37º48′36′′S, 172º06′00′′E
        """,
    "decimal degrees, signed": """
        -40.205  171.31
        -40.205  174.0
        -38.5    174.75
        -37.81   172.1
        """,
    "decimal degrees with letters, closed": """
        1  40.205S 171.31E
        2  40.205S 174E
        3  38.5S 174.75E
        4  37.81S 172.1E
        5  40.205S 171.31E
        """,
}

CSV = {
    "csv, header, numbered, degrees and minutes": (
        "point,lat,lon\n1,40°12.30'S,171°18.60'E\n2,40°12.30'S,174°00.00'E\n"
        "3,38°30.00'S,174°45.00'E\n4,37°48.60'S,172°06.00'E\n"),
    "csv, decimal degrees": "lat,lon\n-40.205,171.31\n-40.205,174\n-38.5,174.75\n-37.81,172.1\n",
}


def _points(text: str, csv_fields: bool = False) -> list[tuple[int, float, float]]:
    got = parse_point_list(text, "tallow.txt", csv_fields=csv_fields)
    return [(p.number, p.lat_deg, p.lon_deg) for p in got.points]


@pytest.mark.parametrize("name", sorted(NOTATIONS))
def test_every_notation_gives_the_same_degrees(name: str):
    assert _points(NOTATIONS[name]) == EXPECTED  # exact: the numbers are read as fractions


@pytest.mark.parametrize("name", sorted(CSV))
def test_csv_lists(name: str, tmp_path):
    path = tmp_path / "tallow.csv"
    path.write_text(CSV[name], encoding="utf-8")
    got = read_point_list(path)
    assert [(p.number, p.lat_deg, p.lon_deg) for p in got.points] == EXPECTED


def test_counts_and_closing():
    closed = parse_point_list(NOTATIONS["decimal degrees with letters, closed"])
    assert (closed.read, closed.closed_in_file, closed.numbered) == (5, True, True)
    open_ = parse_point_list(NOTATIONS["degrees minutes, no marks"])
    assert (open_.read, open_.closed_in_file, open_.numbered) == (4, False, False)
    assert [p.line for p in parse_point_list(NOTATIONS["regulation (mark before the "
                                                       "decimals)"]).points] == [3, 4, 5, 6]


@pytest.mark.skipif(shutil.which("GeoConvert") is None, reason="needs GeoConvert")
def test_against_geoconvert():
    """[KARNEY-2013] GeoConvert reads the same positions in its own d ' " notation."""
    text = "\n".join(["40d12'18\"S 171d18'36\"E", "40d12.30'S 174d00.00'E",
                      "38d30'S 174d45'E", "37d48.6'S 172d06'E"]) + "\n"
    out = subprocess.run(["GeoConvert", "-p", "12"], input=text, capture_output=True,
                         text=True, check=True).stdout.split()
    ref = [(float(out[2 * i]), float(out[2 * i + 1])) for i in range(4)]
    for (_, lat, lon), (rlat, rlon) in zip(EXPECTED, ref, strict=True):
        assert abs(lat - rlat) < 1e-12 and abs(lon - rlon) < 1e-12


REFUSED = [
    # (text, place in the message, value shown, words of what is expected)
    ("1 40°61'.00 S 171°18'.60 E", "line 1, latitude", "40°61'.00 S", "minutes below 60"),
    ("1 40°12'18\" S 171°18'75\" E", "line 1, longitude", "171°18'75\" E", "seconds below 60"),
    ("1 91°00'.00 S 171°18'.60 E", "line 1, latitude", "91°00'.00 S", "at most 90°"),
    ("1 40°12'.30 S 181°00'.00 E", "line 1, longitude", "181°00'.00 E", "at most 180°"),
    ("-91.0 171.0", "line 1, latitude", "-91.0", "at most 90°"),
    ("-40.0 180.5", "line 1, longitude", "180.5", "at most 180°"),
    ("1 40 12.30S 171 18.60S", "line 1, longitude", "171 18.60S", "E or W"),
    ("1 40 12.30E 171 18.60E", "line 1, latitude", "40 12.30E", "N or S"),
    ("171 18.60E 40 12.30S", "line 1", "171 18.60E 40 12.30S", "latitude first"),
    ("1 -40.205S 171.31E", "line 1, latitude", "-40.205S", "a sign or a hemisphere letter"),
    ("1 40.5°12' S 171°18' E", "line 1, latitude", "40.5°12' S", "decimals on the last part"),
    ("1 40°12.5'30\" S 171°18'00\" E", "line 1, latitude", "40°12.5'30\" S", "whole minutes"),
    ("40 12.30 171 18.60", "line 1", "40 12.30 171 18.60", "need the letters N or S"),
    ("40 12.30S 171 18E 3", "line 1", "40 12.30S 171 18E 3", "a position"),
    ("Tallow Bank ECA\n40 12.30S 171 18.60E", "line 1", "Tallow Bank ECA", "'#' starts"),
]


@pytest.mark.parametrize("text, place, value, expected", REFUSED, ids=[r[2] for r in REFUSED])
def test_refusals_name_file_line_and_value(text: str, place: str, value: str, expected: str):
    with pytest.raises(InputError) as e:
        parse_point_list(text, "tallow.txt")
    msg = str(e.value)
    assert msg.startswith(f"tallow.txt: {place}: "), msg
    assert repr(value) in msg and expected in msg, msg  # InputError quotes text with repr
    assert "\n" not in msg


def _refusal(text: str) -> str:
    with pytest.raises(InputError) as e:
        parse_point_list(text, "tallow.txt")
    return str(e.value)


BODY = NOTATIONS["regulation (mark before the decimals)"]


def test_a_coast_between_points_is_refused_with_their_numbers():
    text = BODY.replace("3  38°30'.00 S", "   thence along the coast of Tallow Island to\n"
                                          "3  38°30'.00 S")
    msg = _refusal(text)
    assert "tallow.txt: line 5, between point 2 and point 3: " in msg, msg
    assert "thence along the coast of Tallow Island to" in msg and "its own points" in msg


def test_a_coast_after_a_position_on_its_line():
    text = BODY.replace("172°06'.00 E", "172°06'.00 E, thence along the coast to point 1")
    msg = _refusal(text)
    assert "line 6, between point 4 and point 1: " in msg, msg


def test_a_coast_before_the_first_point():
    msg = _refusal("from the coast at Cape Tallow\n" + BODY)
    assert "line 1, between the start and point 1: " in msg, msg


def test_point_numbers_must_count_up_by_one():
    msg = _refusal(BODY.replace("3  38°30'.00 S  174°45'.00 E\n", ""))
    assert "line 5: point 4: expected point 3" in msg, msg
    msg = _refusal(BODY.replace("2  40°12'.30 S", "1  40°12'.30 S"))
    assert "line 4: point 1: expected point 2" in msg, msg


def test_point_numbers_on_every_line_or_none():
    msg = _refusal(BODY.replace("2  40°12'.30 S  174°00'.00 E", "40°12'.30 S  174°00'.00 E"))
    assert "line 4: " in msg and "point numbers on every line or on none" in msg, msg


def test_repeated_point_and_too_few():
    msg = _refusal("-40.205 171.31\n-40.205 174\n-40.205 174\n-38.5 174.75\n")
    assert "line 3: point 3 repeats point 2: expected distinct consecutive points" in msg, msg
    msg = _refusal("-40.205 171.31\n-40.205 174\n-40.205 171.31\n")
    assert "2 distinct point(s): expected at least three positions" in msg, msg


def test_unreadable_files(tmp_path):
    bad = tmp_path / "latin1.txt"
    bad.write_bytes("40°12'.30 S 171°18'.60 E\n".encode("latin-1"))
    with pytest.raises(InputError, match=r"latin1.txt: byte 3: not UTF-8"):
        read_point_list(bad)
    with pytest.raises(InputError, match="missing.txt: .*readable list of positions"):
        read_point_list(tmp_path / "missing.txt")
