"""Crossing classification (geo.crossings.track_area) on routes whose events are known.

Expected positions come from closed forms or outside solvers, never from the code
under test (tests/helpers/geo.py):

- closed form [D]: parallel arc N·cosφ·Δλ (WGS84 definition [WGS84], NIMA
  TR8350.2) for rhumb legs along a parallel; meridian arc ΔM = ∫ρ dφ
  (scipy.integrate.quad [SCIPY-2020]) for legs along a meridian;
- pyproj.Geod (GeographicLib [KARNEY-2013]) with scipy.optimize.brentq
  [SCIPY-2020] for the latitude of a geodesic edge at a given longitude and the
  distance along a great-circle leg to a given latitude.

The boundary counts as inside (geo.crossings): a route starting on it is inside
at the start, and touching or following the boundary from either side flips
nothing. Cases with a closed-form answer are one table, CLOSED_FORM_CASES, of
(inputs, expected, source) rows.
"""

from __future__ import annotations

import functools
from typing import NamedTuple

import numpy as np
import pytest
import shapely
from scipy.optimize import brentq

from geo.area import Area
from geo.crossings import track_area
from geo.path import route_path
from geo.plane import AreaShape, area_shape, plane_ring
from tests.helpers.geo import (
    REF_GEOD,
    Event,
    assert_same_events,
    events,
    gap_m,
    geodesic_lat_at_lon,
    geodesic_s_at_lat,
    isometric_lat_rad,
    kinds,
    make_area,
    make_route,
    meridian_arc_quad_m,
    parallel_arc_m,
    shift_area,
    track,
)

EDGES = ("geodesic", "rhumb", "lonlat")
POS_TOL_M = 1e-6
DIST_TOL_M = 1e-6
SQUARE = [(0.0, 0.0), (10.0, 0.0), (10.0, 10.0), (0.0, 10.0)]  # (lon, lat)
HOLE = [(3.0, 3.0), (7.0, 3.0), (7.0, 7.0), (3.0, 7.0)]
POLAR_RING = [(float(x), 70.0) for x in range(-180, 180, 10)]

PARALLEL = "closed form [D]: parallel arcs N·cosφ·Δλ [WGS84]"
MERIDIAN = "closed form [D]: meridian arc ΔM, quadrature of ρ [SCIPY-2020]"
GEOD_EDGE = "pyproj.Geod + brentq [KARNEY-2013]: latitude of the geodesic edge there"
arc = meridian_arc_quad_m
parallel = parallel_arc_m


def _along_5n(*lons: tuple[str, float], start: float = -5.0) -> list[Event]:
    """Events on 5°N at the given longitudes, distances as parallel arcs from ``start``."""
    return [(k, parallel(5.0, lon - start), 5.0, lon) for k, lon in lons]


# ---------------------------------------------------------------------------
# crossings with a closed-form answer: one table


class Case(NamedTuple):
    """A route, an area, and what must happen, with the source of the expected values."""

    points: list[tuple[float, float]]  # (lat, lon) [deg]
    legs: str
    area: Area
    expected: list[Event]  # (event, distance [m], lat, lon [deg])
    start_inside: bool | None  # None: not checked
    inside_m: float | None  # distance inside [m], to 2e-6 m; None: not checked
    source: str


def _closed_form_cases() -> list:
    rows = []

    def add(name: str, *args: object) -> None:
        rows.append(pytest.param(Case(*args), id=name))

    # the geodesic north edge of the square (0°, 10°N)→(10°E, 10°N) bulges poleward
    # (pyproj.Geod + brentq [KARNEY-2013]; test_geodesic_edges_bulge_poleward)
    top_5e = geodesic_lat_at_lon(0.0, 10.0, 10.0, 10.0, 5.0)
    top_2_5e = geodesic_lat_at_lon(0.0, 10.0, 10.0, 10.0, 2.5)
    for e in EDGES:
        sq = make_area("sq", [SQUARE], e)
        add(f"along 5N through meridian edges, {e}", [(5.0, -5.0), (5.0, 15.0)], "rhumb", sq,
            _along_5n(("enter", 0.0), ("exit", 10.0)), None, parallel(5.0, 10.0), PARALLEL)
        # the north edge at 5°E is at 10° for rhumb and lonlat edges
        top = top_5e if e == "geodesic" else 10.0
        add(f"along 5E through the square, {e}", [(-5.0, 5.0), (15.0, 5.0)], "great_circle", sq,
            [("enter", arc(0.0) - arc(-5.0), 0.0, 5.0), ("exit", arc(top) - arc(-5.0), top, 5.0)],
            None, None, f"{MERIDIAN}; {GEOD_EDGE}")
        add(f"starting inside, exit at 10E, {e}", [(5.0, 5.0), (5.0, 15.0), (5.0, 16.0)], "rhumb",
            sq, _along_5n(("exit", 10.0), start=5.0), True, None, PARALLEL)
        # from outside onto the meridian edge 0°, along it, then into the area: the
        # boundary counts as inside, so the entry is where the route reaches it
        add(f"onto the meridian edge and in, {e}", [(3.0, -5.0), (3.0, 0.0), (7.0, 0.0),
                                                    (7.0, 5.0)], "rhumb", sq,
            [("enter", parallel(3.0, 5.0), 3.0, 0.0)], None, None, PARALLEL)
        holed = make_area("h", [(SQUARE, [HOLE])], e)
        add(f"hole: exit and enter, {e}", [(5.0, -5.0), (5.0, 15.0)], "rhumb", holed,
            _along_5n(("enter", 0.0), ("exit", 3.0), ("enter", 7.0), ("exit", 10.0)), None, None,
            PARALLEL)
        add(f"starting in the hole, {e}", [(5.0, 5.0), (5.0, 15.0)], "rhumb", holed,
            _along_5n(("enter", 7.0), ("exit", 10.0), start=5.0), False, None, PARALLEL)
        # the parts overlap between 4° and 6°E: only the outer events
        parts = [[(0.0, 0.0), (6.0, 0.0), (6.0, 10.0), (0.0, 10.0)],
                 [(4.0, 2.0), (10.0, 2.0), (10.0, 8.0), (4.0, 8.0)]]
        for order, ps in (("", parts), (" other order", parts[::-1])):
            add(f"overlapping parts{order}, {e}", [(5.0, -5.0), (5.0, 15.0)], "rhumb",
                make_area("m", ps, e), _along_5n(("enter", 0.0), ("exit", 10.0)), None, None,
                PARALLEL)
    add("rhumb due north from inside through the geodesic edge", [(5.0, 2.5), (12.0, 2.5)],
        "rhumb", make_area("sq", [SQUARE]),
        [("exit", arc(top_2_5e) - arc(5.0), top_2_5e, 2.5)], True, None,
        f"{MERIDIAN}; {GEOD_EDGE}")
    # a cap round the north pole: rhumb edges follow the 70th parallel; geodesic edges
    # bulge poleward, so between vertices (25°E) the entry is at the geodesic's latitude
    for leg in ("rhumb", "great_circle"):
        for e in ("rhumb", "geodesic"):
            for lon in (20.0, 25.0):
                lat_in = 70.0
                source = MERIDIAN
                if e == "geodesic" and lon == 25.0:
                    lat_in = geodesic_lat_at_lon(20.0, 70.0, 30.0, 70.0, 25.0)
                    source = f"{MERIDIAN}; {GEOD_EDGE}"
                add(f"polar cap, {e} edges, {leg} along {lon}E", [(60.0, lon), (80.0, lon)], leg,
                    make_area("pole", [POLAR_RING], e),
                    [("enter", arc(lat_in) - arc(60.0), lat_in, lon)], None,
                    arc(80.0) - arc(lat_in), source)
        south = make_area("south", [[(x, -y) for x, y in POLAR_RING]], "rhumb")
        add(f"south polar cap, {leg}", [(-60.0, 20.0), (-80.0, 20.0)], leg, south,
            [("enter", arc(-60.0) - arc(-70.0), -70.0, 20.0)], None, None, MERIDIAN)
    return rows


CLOSED_FORM_CASES = _closed_form_cases()


@pytest.mark.parametrize("case", CLOSED_FORM_CASES)
def test_events_against_closed_forms(case: Case) -> None:
    tr = track(make_route(case.points, legs=case.legs), case.area)
    assert_same_events(events(tr), case.expected, POS_TOL_M, DIST_TOL_M)
    if case.start_inside is not None:
        assert tr.start_inside is case.start_inside, case.source
    if case.inside_m is not None:
        assert tr.inside_m == pytest.approx(case.inside_m, abs=2e-6), case.source
    assert sum(b - a for a, b, _ in tr.intervals()) == pytest.approx(tr.route_length_m, abs=1e-6)


def test_geodesic_edges_bulge_poleward() -> None:
    # pyproj.Geod + brentq [KARNEY-2013]: the references above differ from the parallel
    assert geodesic_lat_at_lon(0.0, 10.0, 10.0, 10.0, 5.0) > 10.0
    assert geodesic_lat_at_lon(20.0, 70.0, 30.0, 70.0, 25.0) > 70.0


# ---------------------------------------------------------------------------
# touches and runs along the boundary: no event


def _tangent_quad(lat0: float, north: bool) -> Area:
    """A quad whose side is the geodesic due east through (lat0, 10°E) (pyproj.Geod)."""
    lo1, la1, _ = REF_GEOD.fwd(10.0, lat0, -90.0, 300e3)
    lo2, la2, _ = REF_GEOD.fwd(10.0, lat0, 90.0, 300e3)
    far = 3.0 if north else -3.0
    return make_area("tangent", [[(lo1, la1), (lo2, la2), (lo2, la2 + far), (lo1, la1 + far)]])


def test_touch_tangent_from_outside() -> None:
    # pyproj.Geod [KARNEY-2013]: a geodesic heading due east is at its highest latitude, so
    # the parallel through that point touches it from the north; the area lies south: no event
    tr = track(make_route([(50.0, 5.0), (50.0, 15.0)]), _tangent_quad(50.0, north=False))
    assert tr.events == ()
    assert tr.inside_m == 0.0


def test_touch_tangent_from_inside() -> None:
    # the same touch with the area to the north: the route stays inside, no event
    tr = track(make_route([(50.0, 9.0), (50.0, 11.0)]), _tangent_quad(50.0, north=True))
    assert tr.events == ()
    assert tr.start_inside
    assert tr.inside_m == pytest.approx(tr.route_length_m, abs=1e-9)
    # and passing right through the quad: only the far sides give events
    tr = track(make_route([(50.0, 5.0), (50.0, 15.0)]), _tangent_quad(50.0, north=True))
    assert kinds(tr) == ["enter", "exit"]


@pytest.mark.parametrize("edges", EDGES)
def test_vertex_touch_and_turn_back(edges: str) -> None:
    # definition: touching a vertex from outside, or from inside, and turning back
    area = make_area("sq", [SQUARE], edges)
    assert track(make_route([(-1.0, -1.0), (0.0, 0.0), (-0.5, -1.0)]), area).events == ()
    tr = track(make_route([(5.0, 5.0), (10.0, 10.0), (6.0, 5.0)]), area)
    assert tr.events == () and tr.start_inside
    # passing straight through the vertex is an entry there
    tr = track(make_route([(-1.0, -1.0), (0.0, 0.0), (1.0, 1.0)]), area)
    assert kinds(tr) == ["enter"]
    assert gap_m(tr.events[0].lat, tr.events[0].lon, 0.0, 0.0) <= POS_TOL_M


@pytest.mark.parametrize("edges", EDGES)
@pytest.mark.parametrize("leg", ["rhumb", "great_circle"])
def test_route_along_a_meridian_edge(edges: str, leg: str) -> None:
    # the west edge of the square is the meridian 0° (every edge kind): running along it
    area = make_area("sq", [SQUARE], edges)
    assert track(make_route([(-5.0, 0.0), (15.0, 0.0)], legs=leg), area).events == ()
    assert track(make_route([(5.0, -5.0), (5.0, 0.0), (15.0, 0.0)], legs=leg), area).events == ()
    # from inside: to the edge, along it, back inside
    tr = track(make_route([(3.0, 5.0), (3.0, 0.0), (7.0, 0.0), (7.0, 5.0)], legs=leg), area)
    assert tr.events == () and tr.start_inside
    assert tr.inside_m == pytest.approx(tr.route_length_m, abs=1e-9)
    # from outside onto the edge, along it, then in: CLOSED_FORM_CASES


# ---------------------------------------------------------------------------
# starting on the boundary (starting inside: CLOSED_FORM_CASES)


@pytest.mark.parametrize("edges", EDGES)
@pytest.mark.parametrize(("start", "away"), [
    ((5.0, 0.0), (5.0, -5.0)),  # on the meridian edge 0°, going west
    ((0.0, 5.0), (-5.0, 5.0)),  # on the equator edge, going south
    ((0.0, 0.0), (-1.0, -1.0)),  # on a vertex, going away
    ((5.0, 10.0), (5.0, 12.0)),  # on the meridian edge 10°, going east
])
def test_route_starting_on_the_boundary_going_outward(edges: str, start: tuple[float, float],
                                                      away: tuple[float, float]) -> None:
    # definition (geo.crossings): the start on the boundary counts as inside, so leaving
    # is an exit at distance 0; a route starting there going inward has no event there
    tr = track(make_route([start, away]), make_area("sq", [SQUARE], edges))
    assert tr.start_inside
    assert kinds(tr) == ["exit"]
    ev = tr.events[0]
    assert ev.distance_m == 0.0 and ev.leg == 0
    assert gap_m(ev.lat, ev.lon, *start) <= POS_TOL_M
    tr = track(make_route([start, (5.0, 5.0)]), make_area("sq", [SQUARE], edges))
    assert tr.start_inside and tr.events == ()


# ---------------------------------------------------------------------------
# 180° and shifts by whole turns


def _split_pair(edges: str) -> tuple[Area, Area]:
    """One area across 180° written continuously, and the same split at 180° [RFC-7946].

    The ring is (165, -12), (188, -8), (192, 9), (170, 11). For geodesic edges the
    split points are where the edges reach 180° (pyproj.Geod + brentq [KARNEY-2013]),
    so both describe the same area; rhumb and lonlat edges are split where they
    cross 180° by their own closed forms [D] (rhumb: isometric latitude linear in
    longitude [RHUMB-TEXTS]; lonlat: latitude linear in longitude).
    """
    ring = [(165.0, -12.0), (188.0, -8.0), (192.0, 9.0), (170.0, 11.0)]
    (x1, y1), (x2, y2) = ring[0], ring[1]
    (x3, y3), (x4, y4) = ring[2], ring[3]
    if edges == "geodesic":
        ys = geodesic_lat_at_lon(x1, y1, x2, y2, 180.0)
        yn = geodesic_lat_at_lon(x3, y3, x4, y4, 180.0)
    elif edges == "lonlat":
        ys = y1 + (y2 - y1) * (180.0 - x1) / (x2 - x1)
        yn = y4 + (y3 - y4) * (180.0 - x4) / (x3 - x4)
    else:
        psi = isometric_lat_rad

        def lat_at(ya: float, xa: float, yb: float, xb: float) -> float:
            target = psi(ya) + (psi(yb) - psi(ya)) * (180.0 - xa) / (xb - xa)
            return brentq(lambda y: psi(y) - target, -80, 80, xtol=1e-14, rtol=1e-15)

        ys = lat_at(y1, x1, y2, x2)
        yn = lat_at(y4, x4, y3, x3)
    whole = make_area("a", [ring], edges)
    west = [(165.0, -12.0), (180.0, ys), (180.0, yn), (170.0, 11.0)]
    east = [(-180.0, ys), (-172.0, -8.0), (-168.0, 9.0), (-180.0, yn)]
    split = make_area("a", [west, east], edges)
    return whole, split


SPLIT_ROUTES = {
    "west-east": ([(-2.0, 160.0), (1.0, -160.0)], "rhumb"),
    "along the seam": ([(-30.0, 180.0), (30.0, 180.0)], "rhumb"),
    "near the seam corner": ([(5.0, 175.0), (12.0, -178.0), (-15.0, -179.9)], "great_circle"),
    "in and out twice": ([(0.0, 150.0), (0.0, 179.0), (20.0, 179.5), (0.0, -175.0),
                          (0.0, -150.0)], "rhumb"),
}


@functools.cache
def _split_shape(edges: str, which: str, turns: int) -> AreaShape:
    """area_shape of the continuous or split area, shifted by whole turns (built once)."""
    whole, split = _split_pair(edges)
    area = whole if which == "whole" else split
    return area_shape(shift_area(area, 360.0 * turns) if turns else area)


@pytest.mark.parametrize("edges", EDGES)
@pytest.mark.parametrize("route_name", sorted(SPLIT_ROUTES))
def test_split_at_180_equals_continuous(edges: str, route_name: str) -> None:
    # [RFC-7946] split vs longitudes continuing past 180: the same area, the same events
    pts, leg = SPLIT_ROUTES[route_name]
    path = route_path(make_route(pts, legs=leg))
    ea = events(track_area(path, _split_shape(edges, "whole", 0)))
    assert ea, "the route crosses the area"
    eb = events(track_area(path, _split_shape(edges, "split", 0)))
    assert_same_events(eb, ea, POS_TOL_M, DIST_TOL_M)
    # and with the area written a turn either way (two turns for the continuous one)
    for which, turns in (("whole", -1), ("whole", 2), ("split", 1), ("split", -1)):
        ec = events(track_area(path, _split_shape(edges, which, turns)))
        assert_same_events(ec, ea, POS_TOL_M, DIST_TOL_M)


def test_route_written_past_180() -> None:
    # the route's own longitudes written past 180 (190 = -170) give the same events
    whole, _ = _split_pair("geodesic")
    a = events(track(make_route([(-2.0, 160.0), (1.0, -160.0)]), whole))
    b = events(track(make_route([(-2.0, 160.0), (1.0, 200.0)]), whole))
    c = events(track(make_route([(-2.0, -200.0), (1.0, -160.0)]), whole))
    assert_same_events(b, a)
    assert_same_events(c, a)


# ---------------------------------------------------------------------------
# an area around the north pole


def test_polar_area_route_across() -> None:
    # great-circle legs (65°N 0°) → (80°N 90°E) → (65°N 180°) across the cap bounded by
    # the 70th parallel (rhumb edges): entry and exit where the legs reach 70°N
    # (pyproj.Geod + brentq [KARNEY-2013])
    area = make_area("pole", [POLAR_RING], "rhumb")
    pts = [(65.0, 0.0), (80.0, 90.0), (65.0, 180.0)]
    tr = track(make_route(pts, legs="great_circle"), area)
    s1, y1, x1 = geodesic_s_at_lat(0.0, 65.0, 90.0, 80.0, 70.0)
    leg1 = REF_GEOD.inv(0.0, 65.0, 90.0, 80.0)[2]
    s2, y2, x2 = geodesic_s_at_lat(90.0, 80.0, 180.0, 65.0, 70.0)
    assert_same_events(events(tr), [("enter", s1, y1, x1), ("exit", leg1 + s2, y2, x2)],
                       POS_TOL_M, DIST_TOL_M)
    assert [e.leg for e in tr.events] == [0, 1]
    # the ring written the other way round, or shifted by a turn, changes nothing
    for other in (make_area("pole", [POLAR_RING[::-1]], "rhumb"), shift_area(area, 360.0),
                  shift_area(area, -720.0)):
        assert_same_events(events(track(make_route(pts, legs="great_circle"), other)),
                           events(tr))
    # lonlat edges taken literally: the cap has to be written up to the pole [RFC-7946]
    cap = make_area("cap", [[*POLAR_RING, (180.0, 70.0), (180.0, 90.0), (-180.0, 90.0)]],
                    "lonlat")
    assert_same_events(events(track(make_route(pts, legs="great_circle"), cap)), events(tr))


def test_polar_area_geodesic_edges_route_across() -> None:
    # geodesic ring: the route meets the edge between vertices; check against pyproj +
    # brentq [KARNEY-2013] for the latitude of the route at the meeting (the edge and
    # route geodesics meet where their latitudes at one longitude agree)
    area = make_area("pole", [POLAR_RING], "geodesic")
    pts = [(65.0, 0.0), (80.0, 90.0)]
    tr = track(make_route(pts, legs="great_circle"), area)
    assert kinds(tr) == ["enter"]
    ev = tr.events[0]
    # the meeting longitude lies between the vertices 0° and 10°E (edge 0°→10°)
    assert 0.0 < ev.lon < 10.0
    edge_lat = geodesic_lat_at_lon(0.0, 70.0, 10.0, 70.0, ev.lon)
    route_lat = geodesic_lat_at_lon(0.0, 65.0, 90.0, 80.0, ev.lon)
    assert ev.lat == pytest.approx(edge_lat, abs=1e-10)
    assert ev.lat == pytest.approx(route_lat, abs=1e-10)
    _, _, d = REF_GEOD.inv(0.0, 65.0, ev.lon, ev.lat)
    assert ev.distance_m == pytest.approx(d, abs=1e-6)


# ---------------------------------------------------------------------------
# regressions, and arriving on the boundary


def test_plane_ring_vertex_round_off() -> None:
    # found by test_crossings_properties (hypothesis), vertices by pyproj.Geod.fwd: vertex
    # round-off once made zig-zag outlines; each edge now ends exactly where the next begins
    r1 = ((0.4667817794413054, -0.27130780133041527), (-0.4667817794413054,
          -0.27130780133041527), (0.0, 0.5426215233311784))
    r2 = ((0.34646206877628555, 0.4156787351498281), (0.5308016594572488, 0.09423294012843546),
          (0.4667822492371367, -0.2712987703334768), (0.18435045744437656, -0.5098875423269932),
          (-0.1843495171605885, -0.5098875423269932), (-0.46678130895334863,
          -0.2712987703334768), (-0.5308007191734608, 0.09423294012843546),
          (-0.502378500436682, 0.6027259077300551), (4.7014189402047315e-07, 0.6059363540912371))
    xy = plane_ring(r2, "geodesic").xy
    step = np.hypot(*np.diff(xy, axis=0).T)
    assert step.min() > 1e-9  # samples are ~200 m apart; no near-duplicate points
    assert shapely.is_valid(shapely.Polygon(xy))
    area_shape(make_area("two parts", [r1, r2]))  # raised GEOSException before the fix


@pytest.mark.parametrize("edges", ["geodesic", "rhumb", "lonlat"])
def test_route_ending_on_the_boundary_enters_there_and_reverses(edges: str) -> None:
    # The boundary counts as inside: arriving on it from outside is an entry at the
    # route's end, the mirror of a start on the boundary leaving it (exit at 0).
    # The route ends on a meridian edge (a geodesic, rhumb and lonlat line alike);
    # its length along the parallel is the closed form N(φ)·cos φ·Δλ [WGS84] [D].
    area = make_area("B", [[(4.0, 3.0), (6.0, 3.0), (6.0, 4.0), (4.0, 4.0)]], edges=edges)
    arriving = track(make_route([(3.5, 0.0), (3.5, 4.0)]), area)
    leaving = track(make_route([(3.5, 4.0), (3.5, 0.0)]), area)
    length = parallel(3.5, 4.0)
    assert kinds(arriving) == ["enter"] and kinds(leaving) == ["exit"]
    assert arriving.events[0].distance_m == pytest.approx(length, abs=1e-6)
    assert leaving.events[0].distance_m == 0.0
