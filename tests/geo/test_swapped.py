"""Route waypoints that look like latitude and longitude exchanged (a warning, not a refusal).

Check values: the leg lengths are geodesics by pyproj.Geod [KARNEY-2013]; the rule is ours
(geo/swapped.py, common practice for a plausibility check).
"""

import pytest

from geo.ellipsoid import GEOD, NM_M
from geo.route import Route, Waypoint
from geo.routes_csv import parse_csv_route
from geo.swapped import swapped_waypoints


def _route(*points):
    return Route("r", tuple(Waypoint(f"W{i + 1}", lat, lon) for i, (lat, lon) in
                            enumerate(points)), source="r.csv")


def _nm(a, b):
    return GEOD.inv(a[1], a[0], b[1], b[0])[2] / NM_M


def test_an_exchanged_middle_waypoint_is_named_with_its_legs():
    a, b, c = (54.0, 3.0), (4.0, 54.5), (55.0, 5.0)
    found = swapped_waypoints(_route(a, b, c))
    assert [w.index for w in found] == [2]
    w = found[0]
    assert w.legs_nm == pytest.approx(_nm(a, b) + _nm(b, c), rel=1e-9)  # pyproj [KARNEY-2013]
    assert w.swapped_legs_nm == pytest.approx(_nm(a, (54.5, 4.0)) + _nm((54.5, 4.0), c),
                                              rel=1e-9)
    text = w.text("r.csv")
    assert text.startswith("r.csv: waypoint 2 'W2' at lat 4°, lon 54.5° looks like latitude")
    assert "lat 54.5°, lon 4°" in text


def test_an_exchanged_last_waypoint_is_found():
    found = swapped_waypoints(_route((54.0, 3.0), (54.5, 4.0), (5.0, 55.0)))
    assert [w.index for w in found] == [3]


@pytest.mark.parametrize("points", [
    ((54.0, 3.0), (54.5, 4.0), (55.0, 5.0)),              # a coastal route
    ((-39.5, 166.0), (-40.0, 171.0), (-38.8, -172.0)),    # across 180° (no exchange possible)
    ((10.0, 10.5), (10.5, 10.0), (11.0, 11.0)),           # lat ≈ lon: exchange saves little
    ((50.0, -5.0), (40.0, -70.0)),                        # an ocean crossing
])
def test_routes_that_look_right_give_no_warning(points):
    assert swapped_waypoints(_route(*points)) == []


def test_csv_reader_takes_exponent_numbers():
    # issue 10 item 9: a spreadsheet writes 0.00001 as 1e-05
    r = parse_csv_route("name,lat,lon,speed_kn\nA,1e-05,2.5E+01,\nB,-1.5e0,25.5,1.2e1\n", "r.csv")
    assert [(w.lat, w.lon, w.speed_kn) for w in r.waypoints] == [(1e-05, 25.0, None),
                                                                   (-1.5, 25.5, 12.0)]
