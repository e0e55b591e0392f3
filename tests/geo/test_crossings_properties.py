"""Properties of geo.crossings.track_area on random routes and areas (hypothesis).

- events of one area alternate enter/exit, starting with exit iff the route starts
  inside (definition of entry and exit);
- reversing the route reverses the events: same positions (1e-6 m, pyproj.Geod
  [KARNEY-2013]), enter↔exit, distances L − d (1e-6 m);
- splitting a leg at an interior point found by the direct problem (GeographicLib
  RhumbSolve [KARNEY-RHUMB] for rhumb legs, the same rhumb line; pyproj.Geod.fwd
  [KARNEY-2013] for great circles, the same geodesic) changes no event position or
  distance (1e-6 m);
- shifting the area's longitudes by whole turns changes nothing (1e-6 m).

Areas are star-shaped rings around a random centre (vertices by pyproj.Geod.fwd at
sorted azimuths, gaps under 120°, so the ring is simple), optionally with a hole
and a second, overlapping part; every edge kind. Routes of 2–4 waypoints lie
within 800 km of the centre, each leg a rhumb line or a great circle. Hypothesis
draws one integer seed per example and the geometry follows from it (numpy), so
the examples are all different; a failure prints the seed.
"""

from __future__ import annotations

import numpy as np
import pytest
from hypothesis import HealthCheck, assume, given, settings
from hypothesis import strategies as st
from numpy.typing import ArrayLike, NDArray

from geo.area import Area
from geo.crossings import track_area
from geo.path import route_path
from geo.plane import area_shape
from geo.route import Route, Waypoint
from tests.helpers.geo import (
    REF_GEOD,
    assert_same_events,
    events,
    make_area,
    rhumbsolve_direct,
    rhumbsolve_inverse,
    shift_area,
)

TOL_M = 1e-6
SETTINGS = settings(max_examples=40, deadline=None, derandomize=True,
                    suppress_health_check=[HealthCheck.too_slow])


EDGE_KINDS = ("geodesic", "rhumb", "lonlat")


def _dyadic(x: ArrayLike) -> NDArray[np.float64]:
    return np.round(np.asarray(x, dtype=np.float64) * 2.0**20) / 2.0**20


def _star_ring(rng: np.random.Generator, lat_c: float, lon_c: float, r_min_m: float,
               r_max_m: float) -> tuple[list[tuple[float, float]], float]:
    """A star-shaped ring of (lon, lat) around a centre (pyproj.Geod.fwd)."""
    n = int(rng.integers(3, 10))
    gaps = rng.uniform(0.3, 1.0, n)
    az = rng.uniform(0.0, 360.0) + np.cumsum(gaps / gaps.sum() * 360.0)
    if np.max(gaps / gaps.sum() * 360.0) > 120.0:  # keep every angular gap under 120°
        az = np.linspace(0.0, 360.0, n, endpoint=False) + az[0]
    r = rng.uniform(r_min_m, r_max_m, n)
    lon, lat, _ = REF_GEOD.fwd(np.full(n, lon_c), np.full(n, lat_c), az, r)
    lon = lon_c + ((np.asarray(lon) - lon_c + 180.0) % 360.0 - 180.0)
    # vertices on a 2⁻²⁰° grid: sums of their longitudes are exact, which keeps clear of
    # the plane-outline round-off bug shown by test_plane_ring_vertex_round_off
    # (tests/geo/test_crossings.py)
    lon, lat = _dyadic(lon), _dyadic(lat)
    return [(float(x), float(y)) for x, y in zip(lon, lat, strict=True)], float(r.min())


def _case(seed: int) -> tuple[Area, Route]:
    """An area and a route, every choice from one seed (so every example differs)."""
    rng = np.random.default_rng(seed)
    lat_c = rng.uniform(-65.0, 65.0)
    lon_c = rng.uniform(-180.0, 180.0)
    edges = EDGE_KINDS[seed % 3]
    ring, r_min = _star_ring(rng, lat_c, lon_c, 60e3, 400e3)
    holes = []
    if rng.random() < 0.4:
        frac = rng.uniform(0.1, 0.35)
        holes.append(_star_ring(rng, lat_c, lon_c, 0.5 * frac * r_min, frac * r_min)[0])
    parts = [(ring, holes)]
    if rng.random() < 0.4:
        # a second part overlapping the first: centre within 300 km
        lon2, lat2, _ = REF_GEOD.fwd(lon_c, lat_c, rng.uniform(0, 360), rng.uniform(0, 300e3))
        parts.append((_star_ring(rng, float(lat2), float(lon2), 60e3, 300e3)[0], []))
    area = make_area("A", parts, edges)
    n = int(rng.integers(2, 5))
    lon, lat, _ = REF_GEOD.fwd(np.full(n, lon_c), np.full(n, lat_c), rng.uniform(0, 360, n),
                               rng.uniform(0, 800e3, n))
    legs = rng.choice(["rhumb", "great_circle"], n)
    wps = tuple(Waypoint(f"W{i}", float(lat[i]), float(lon[i]), leg=str(legs[i]))
                for i in range(n))
    return area, Route("r", wps)


@st.composite
def area_and_route(draw: st.DrawFn) -> tuple[Area, Route]:
    area, route = _case(draw(st.integers(0, 2**32 - 1)))
    # consecutive waypoints at least 1 km apart (zero-length legs are refused)
    w = route.waypoints
    for a, b in zip(w[:-1], w[1:], strict=True):
        assume(REF_GEOD.inv(a.lon, a.lat, b.lon, b.lat)[2] > 1e3)
    return area, route


def _reverse(route: Route) -> Route:
    """The same legs sailed backwards (a leg's kind belongs to the waypoint it arrives at)."""
    w = route.waypoints
    kinds = [x.leg for x in w[1:]][::-1]
    rev = [Waypoint(x.name, x.lat, x.lon, leg=kinds[i - 1] if i else "rhumb")
           for i, x in enumerate(w[::-1])]
    return Route(route.name + " reversed", tuple(rev))


@SETTINGS
@given(area_and_route())
def test_events_alternate(case: tuple[Area, Route]) -> None:
    # definition: per area, entries and exits alternate; the first is an exit iff the
    # route starts inside (the boundary counts as inside)
    area, route = case
    tr = track_area(route_path(route), area_shape(area))
    k = [e.event for e in tr.events]
    want = ["exit", "enter"] if tr.start_inside else ["enter", "exit"]
    assert k == [want[i % 2] for i in range(len(k))]
    d = [e.distance_m for e in tr.events]
    assert d == sorted(d)
    assert all(0.0 <= x <= tr.route_length_m for x in d)
    # the interval states agree with the events and cover the route
    iv = tr.intervals()
    assert iv[0][0] == 0.0 and iv[-1][1] == tr.route_length_m
    flips = sum(1 for a, b in zip(iv[:-1], iv[1:], strict=True) if a[2] != b[2])
    assert flips + (tr.start_inside != iv[0][2]) == len(k)
    assert 0.0 <= tr.inside_m <= tr.route_length_m + 1e-9


@SETTINGS
@given(area_and_route())
def test_reversing_the_route_reverses_the_events(case: tuple[Area, Route]) -> None:
    # symmetry of the curves: a rhumb line / geodesic sailed backwards is the same line
    area, route = case
    shape = area_shape(area)
    fwd = track_area(route_path(route), shape)
    back_path = route_path(_reverse(route))
    back = track_area(back_path, shape)
    length = fwd.route_length_m
    assert back.route_length_m == pytest.approx(length, abs=1e-6)
    flip = {"enter": "exit", "exit": "enter"}
    expected = [(flip[e.event], length - e.distance_m, e.lat, e.lon) for e in fwd.events][::-1]
    assert_same_events(events(back), expected, TOL_M, TOL_M)
    assert back.inside_m == pytest.approx(fwd.inside_m, abs=1e-5)


def _split_point(route: Route, leg: int, frac: float) -> tuple[float, float]:
    """The point a fraction along a leg, by the direct problem on that very line."""
    a, b = route.waypoints[leg], route.waypoints[leg + 1]
    if b.leg == "great_circle":
        # pyproj.Geod.fwd (GeographicLib [KARNEY-2013]): the same geodesic
        az, _, dist = REF_GEOD.inv(a.lon, a.lat, b.lon, b.lat)
        lon, lat, _ = REF_GEOD.fwd(a.lon, a.lat, az, frac * dist)
        return float(lat), float(lon)
    # [KARNEY-RHUMB] GeographicLib RhumbSolve (geographiclib-tools): the same rhumb line
    course, dist = rhumbsolve_inverse(a.lat, a.lon, b.lat, b.lon)
    lat, lon = rhumbsolve_direct(a.lat, a.lon, course, frac * dist)
    return float(lat[0]), float(lon[0])


@pytest.mark.requires_rhumbsolve
@SETTINGS
@given(area_and_route(), st.data())
def test_splitting_a_leg_changes_nothing(case: tuple[Area, Route], data: st.DataObject) -> None:
    area, route = case
    shape = area_shape(area)
    leg = data.draw(st.integers(0, route.n_legs - 1))
    frac = data.draw(st.floats(0.05, 0.95))
    lat, lon = _split_point(route, leg, frac)
    w = list(route.waypoints)
    w.insert(leg + 1, Waypoint("split", lat, lon, leg=w[leg + 1].leg))
    split = Route("split", tuple(w))
    a = track_area(route_path(route), shape)
    split_path = route_path(split)
    b = track_area(split_path, shape)
    assert b.route_length_m == pytest.approx(a.route_length_m, abs=1e-6)
    assert_same_events(events(b), events(a), TOL_M, TOL_M)
    # leg numbers after the split point move up by one
    at = split_path.start_m[leg + 1]
    want = [e.leg + (e.leg > leg or (e.leg == leg and e.distance_m > at)) for e in a.events]
    assert [e.leg for e in b.events] == want


@SETTINGS
@given(area_and_route(), st.sampled_from([-720.0, -360.0, 360.0, 720.0]))
def test_shifting_the_area_by_whole_turns_changes_nothing(case: tuple[Area, Route],
                                                          turns: float) -> None:
    area, route = case
    path = route_path(route)
    a = track_area(path, area_shape(area))
    b = track_area(path, area_shape(shift_area(area, turns)))
    assert a.start_inside == b.start_inside
    assert_same_events(events(b), events(a), TOL_M, TOL_M)
