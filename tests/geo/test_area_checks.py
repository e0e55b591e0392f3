"""Geometry checks on loaded areas (geo.area_checks) and area measures (geo.area_measure).

Outside reference: pyproj.Geod (GeographicLib, Karney 2013, "Algorithms for
geodesics", J. Geodesy 87), exact to round-off [KARNEY-2013] [P]; our own
instance, ``REF_GEOD`` (tests/helpers/geo.py). The authalic function q and the
equal-area plane are from Snyder 1987 (USGS Professional Paper 1395)
[LAMBERT-EQUAL-AREA], from memory [M]: they are checked here against pyproj
and against the area element of the ellipsoid [WGS84] [D] before anything
relies on them.
"""

from __future__ import annotations

import math
from datetime import date
from pathlib import Path

import numpy as np
import pytest

from geo.area import Area, Polygon
from geo.area_files import load_areas
from geo.area_measure import (
    EARTH_AREA_M2,
    area_km2,
    authalic_q,
    cap_area_m2,
    geodesic_area_km2,
    ring_area_m2,
)
from geo.ellipsoid import A_M, E2
from geo.plane import area_shape
from geo.position import format_position
from tests.helpers.areas import SAMPLE, closed, feature, load_one, refused, write
from tests.helpers.geo import REF_GEOD, geodesic_lat_at_lon

# ---- the equal-area plane against pyproj ------------------------------------------------


def test_earth_area_matches_pyproj() -> None:
    # pyproj.Geod [KARNEY-2013]: a ring along the equator bounds a hemisphere;
    # 510 065 621.724 km² for WGS84 [WGS84] is from memory [M] and agrees
    lons = np.arange(0.0, 360.0, 1.0)
    hemi, _ = REF_GEOD.polygon_area_perimeter(lons, np.zeros_like(lons))
    assert EARTH_AREA_M2 == pytest.approx(2.0 * abs(hemi), rel=1e-12)
    assert EARTH_AREA_M2 / 1e6 == pytest.approx(510_065_621.724, abs=0.01)
    # [KARNEY-2013] GeographicLib Planimeter -p 9 on the equator: 255032810862044.2188 m²
    assert EARTH_AREA_M2 == pytest.approx(2 * 255032810862044.2188, rel=1e-12)


def test_authalic_q_derivative_is_the_area_element() -> None:
    # [D] dA = a²(1−e²)cosφ/(1−e²sin²φ)² dφ dλ must equal dx·dy = a·dλ · (a/2)·dq
    phi = np.radians(np.array([-80.0, -33.3, 0.0, 12.5, 45.0, 71.0, 89.0]))
    h = 1e-6
    dq = (authalic_q(np.degrees(phi + h)) - authalic_q(np.degrees(phi - h))) / (2 * h)
    element = (1 - E2) * np.cos(phi) / (1 - E2 * np.sin(phi) ** 2) ** 2
    assert np.allclose(0.5 * dq, element, rtol=1e-8)


def _geodesic_polygon_m2(ring: list[tuple[float, float]]) -> float:
    """|area| of the geodesic polygon on (lon, lat) vertices [m²], pyproj.Geod [KARNEY-2013]."""
    signed, _ = REF_GEOD.polygon_area_perimeter([p[0] for p in ring], [p[1] for p in ring])
    return abs(float(signed))


PYPROJ = "pyproj.Geod.polygon_area_perimeter [KARNEY-2013] [P]"

# (ring of (lon, lat) [deg], expected area [m²], source): geodesic polygons
GEODESIC_POLYGONS = [
    pytest.param(ring, _geodesic_polygon_m2(ring), PYPROJ, id=name) for name, ring in [
        ("Corran Sea part 1", [(170, -44), (178, -44), (178, -36), (170, -36)]),
        ("across 180, continued", [(178.5, -42), (184, -42), (184, -37), (178.5, -37)]),
        ("about 1.1 km square", [(0.0, 0.0), (0.01, 0.0), (0.01, 0.01), (0.0, 0.01)]),
        ("long edges, both hemispheres", [(-30, -5), (40, -10), (10, 50)]),
        ("high latitude", [(10, 80), (100, 82), (-150, 85), (-60, 81)]),
        ("five vertices, south", [(-70, -60), (-20, -75), (30, -62), (5, -50), (-40, -52)]),
        ("round the north pole", [(lon, 70) for lon in range(0, 360, 30)]),
        ("round the south pole, westward", [(lon, -50) for lon in range(0, -360, -45)]),
    ]
]


@pytest.mark.parametrize(("ring", "expected_m2", "source"), GEODESIC_POLYGONS)
def test_equal_area_agrees_with_pyproj_geodesic(tmp_path: Path, ring: list[tuple[float, float]],
                                                expected_m2: float, source: str) -> None:
    area = load_one(tmp_path, ring)
    assert ring_area_m2(area.polygons[0].exterior, "geodesic") == pytest.approx(expected_m2,
                                                                               rel=1e-6), source
    assert area_km2(area) == pytest.approx(expected_m2 / 1e6, rel=1e-6), source
    assert geodesic_area_km2(area) == pytest.approx(expected_m2 / 1e6, rel=1e-12), source


@pytest.mark.parametrize("edges", ["rhumb", "lonlat"])
def test_equal_area_agrees_with_pyproj_on_the_sampled_ring(tmp_path: Path, edges: str) -> None:
    ring = [(-171, -41), (-165, -41), (-165, -36), (-171, -36)]
    area = load_one(tmp_path, ring, edges=edges)
    # pyproj.Geod [KARNEY-2013] on the ring sampled every 200 m (geodesic chords)
    assert area_km2(area) == pytest.approx(geodesic_area_km2(area), rel=1e-6)
    # rhumb and lonlat edges along parallels and meridians are the same lines: the
    # region is a lat/lon box, whose area is closed form, (a²/2)·Δλ·Δq [D]
    box = 0.5 * A_M**2 * math.radians(6.0) * float(authalic_q(-36.0) - authalic_q(-41.0))
    assert area_km2(area) == pytest.approx(box / 1e6, rel=1e-9)


def test_polar_cap_rhumb_and_lonlat_and_geodesic(tmp_path: Path) -> None:
    cap70 = cap_area_m2(70.0)
    # [KARNEY-RHUMB] GeographicLib Planimeter -R -p 9 on rhumb lines along 70°N:
    # 15506340665454.9062 m²
    assert cap70 == pytest.approx(15506340665454.9062, rel=1e-12)
    # [D] the cap from the area element: ∫ a²(1−e²)cosφ/(1−e²sin²φ)² dφ dλ, by quadrature
    phi = np.linspace(math.radians(70.0), math.pi / 2, 200001)
    f = (1 - E2) * np.cos(phi) / (1 - E2 * np.sin(phi) ** 2) ** 2
    quad = 2 * math.pi * A_M**2 * float(np.sum((f[1:] + f[:-1]) / 2 * np.diff(phi)))
    assert cap70 == pytest.approx(quad, rel=1e-9)
    parallel = [(float(lon), 70.0) for lon in range(0, 360, 30)]
    rhumb = load_one(tmp_path, parallel, edges="rhumb")
    assert area_km2(rhumb) == pytest.approx(cap70 / 1e6, rel=1e-9)
    # pyproj.Geod [KARNEY-2013] on the 200 m-sampled parallel, as a ring round the pole
    assert geodesic_area_km2(rhumb) == pytest.approx(cap70 / 1e6, rel=1e-6)
    # lonlat (RFC 7946 style [RFC-7946]): the parallel written 0..360, closed through the pole
    lonlat = [*((float(lon), 70.0) for lon in range(0, 361, 30)), (360.0, 90.0), (0.0, 90.0)]
    assert area_km2(load_one(tmp_path, lonlat, edges="lonlat")) == pytest.approx(
        cap70 / 1e6, rel=1e-9
    )
    # geodesic edges cut inside the parallel: smaller, and exactly pyproj's value [KARNEY-2013]
    geodesic = load_one(tmp_path, parallel, edges="geodesic")
    ref, _ = REF_GEOD.polygon_area_perimeter([p[0] for p in parallel], [70.0] * 12)
    assert area_km2(geodesic) == pytest.approx(abs(ref) / 1e6, rel=1e-6)
    assert area_km2(geodesic) < 0.97 * cap70 / 1e6


def test_union_counts_overlaps_once() -> None:
    corran = load_areas([SAMPLE / "corran_sea.geojson"])[0]
    ext, hole = corran.polygons[0].exterior, corran.polygons[0].holes[0]

    def geod(ring: tuple[tuple[float, float], ...]) -> float:  # pyproj.Geod [KARNEY-2013]
        return abs(REF_GEOD.polygon_area_perimeter([p[0] for p in ring], [p[1] for p in ring])[0])

    # part 2 lies inside part 1, so the area is part 1 less the hole
    assert area_km2(corran) == pytest.approx((geod(ext) - geod(hole)) / 1e6, rel=1e-6)
    extra = geod(corran.polygons[1].exterior) / 1e6
    assert geodesic_area_km2(corran) == pytest.approx(area_km2(corran) + extra, rel=1e-6)


# ---- refusals ------------------------------------------------------------------------------


@pytest.mark.parametrize("edges", ["geodesic", "rhumb"])
def test_edge_of_exactly_180_degrees_refused(tmp_path: Path, edges: str) -> None:
    ring = [(0, -10), (180, -10), (180, 10), (0, 10)]
    path = write(tmp_path, feature([closed(ring)], edges=edges))
    refused(
        [path],
        "ring 1, edge from vertex 1 to vertex 2",
        "10°00.0'S 000°00.0'E to 10°00.0'S 180°00.0'W",
        "less than 180°",
    )
    ring = [(-90, -10), (90, -10), (90, 10), (-90, 10)]
    refused([write(tmp_path, feature([closed(ring)], edges=edges))], "vertex 1 to vertex 2")


def test_lonlat_edges_of_180_degrees_are_literal(tmp_path: Path) -> None:
    area = load_one(tmp_path, [(0, -10), (180, -10), (180, 10), (0, 10)], edges="lonlat")
    assert area_shape(area).covers([0.0, 0.0], [90.0, -90.0]).tolist() == [True, False]


def test_rhumb_edge_into_a_pole_refused_geodesic_accepted(tmp_path: Path) -> None:
    ring = [(0, 80), (10, 90), (20, 80)]
    refused(
        [write(tmp_path, feature([closed(ring)], edges="rhumb"))],
        "edge from vertex 1 to vertex 2",
        "along a meridian",
    )
    load_one(tmp_path, ring, edges="geodesic")
    load_one(tmp_path, [(0, 80), (0, 90), (20, 90), (20, 80)], edges="rhumb")


def test_self_intersecting_ring_named_with_position(tmp_path: Path) -> None:
    ring = [(0, 0), (20, 20), (20, 0), (0, 20)]  # a bow tie of geodesics
    # where its geodesic diagonals cross: on lon 10 by symmetry, latitude by pyproj.Geod
    # [KARNEY-2013] and brentq [SCIPY-2020]
    lat = geodesic_lat_at_lon(0.0, 0.0, 20.0, 20.0, 10.0)
    where = format_position(lat, 10.0)
    assert where == "10°28.3'N 010°00.0'E"
    path = write(tmp_path, feature([closed(ring)]))
    refused(
        [path],
        str(path),
        "feature 1 'Test ECA', polygon 1, ring 1: crosses or touches "
        f"itself at {where} (edges starting at vertices 1, 3)",
    )


def test_ring_touching_itself_refused(tmp_path: Path) -> None:
    ring = [(0, 0), (4, 0), (4, 4), (2, 0), (0, 4)]
    refused(
        [write(tmp_path, feature([closed(ring)], edges="lonlat"))],
        "touches itself at 00°00.0'N 002°00.0'E",
    )


def test_ring_round_the_pole_twice_refused(tmp_path: Path) -> None:
    ring = [(0, 70), (90, 70), (180, 70), (-90, 70), (0, 72), (90, 72), (180, 72), (-90, 72)]
    refused([write(tmp_path, feature([closed(ring)]))], "winds 2 times round the pole")


def test_ring_larger_than_a_hemisphere_refused(tmp_path: Path) -> None:
    # meant as the 20° strip across 180°, but lonlat edges take 170 → -170 the long way
    ring = [(-170, -60), (170, -60), (170, 60), (-170, 60)]
    refused(
        [write(tmp_path, feature([closed(ring)], edges="lonlat"))],
        "ring 1: encloses",
        "82 % of the Earth",
        "at most a hemisphere",
        "split it at 180° or continue longitudes past 180",
    )
    # the same strip continued past 180 is fine
    load_one(tmp_path, [(170, -60), (190, -60), (190, 60), (170, 60)], edges="lonlat")
    big = [
        (-170, -80),
        (-10, -80),
        (10, -80),
        (170, -80),
        (170, 80),
        (10, 80),
        (-10, 80),
        (-170, 80),
    ]
    refused([write(tmp_path, feature([closed(big)]))], "% of the Earth", "check the vertices")


def test_hemisphere_boundary(tmp_path: Path) -> None:
    # a lonlat lune 179.9° wide pole to pole is under half the Earth; 180.1° is over
    load_one(tmp_path, [(0, -90), (179.9, -90), (179.9, 90), (0, 90)], edges="lonlat")
    refused(
        [
            write(
                tmp_path,
                feature([closed([(0, -90), (180.1, -90), (180.1, 90), (0, 90)])], edges="lonlat"),
            )
        ],
        "50 % of the Earth",
    )


def test_hole_outside_exterior_refused(tmp_path: Path) -> None:
    rings = [[(0, 0), (4, 0), (4, 4), (0, 4)], [(3, 3), (5, 3), (5, 3.5), (3, 3.5)]]
    path = write(tmp_path, feature([closed(r) for r in rings]))
    refused(
        [path], "polygon 1, ring 2 (hole 1): reaches outside its exterior, e.g. at ", "004°", "E"
    )
    apart = [[(0, 0), (4, 0), (4, 4), (0, 4)], [(10, 1), (11, 1), (11, 2), (10, 2)]]
    refused([write(tmp_path, feature([closed(r) for r in apart]))], "reaches outside")


def test_overlapping_holes_refused(tmp_path: Path) -> None:
    rings = [
        [(0, 0), (4, 0), (4, 4), (0, 4)],
        [(1, 1), (3, 1), (3, 2), (1, 2)],
        [(2, 1.5), (3.5, 1.5), (3.5, 3), (2, 3)],
    ]
    refused(
        [write(tmp_path, feature([closed(r) for r in rings]))], "ring 3 (hole 2): overlaps hole 1"
    )


def test_holes_may_share_edges(tmp_path: Path) -> None:
    ext = [(170.3, -44.1), (177.7, -43.9), (177.9, -36.2), (170.1, -36.4)]
    # hole 1 runs along the exterior's first edge (the other way round); hole 2 shares
    # hole 1's upper edge
    a, b = ext[0], ext[1]
    mid = (174.0, -40.0)
    hole1 = [b, a, mid]
    hole2 = [a, (171.0, -38.0), mid]
    area = load_one(tmp_path, ext, hole1, hole2)
    assert len(area.polygons[0].holes) == 2


def test_hole_written_on_the_other_side_of_180(tmp_path: Path) -> None:
    ext = [(178.5, -42), (184, -42), (184, -37), (178.5, -37)]
    hole = [(-178, -40), (-177, -40), (-177, -39), (-178, -39)]
    area = load_one(tmp_path, ext, hole)
    assert area.polygons[0].holes[0][0] == (182.0, -40.0)  # the same point, one turn east
    shape = area_shape(area)
    assert shape.covers([-39.5, -39.5, -41.0], [-177.5, 182.5, -177.5]).tolist() == [
        False,
        False,
        True,
    ]


def test_holes_in_a_polar_cap(tmp_path: Path) -> None:
    cap = [(float(lon), 60.0) for lon in range(0, 360, 30)]
    # a hole round the pole is refused; the message says how to write the band instead
    ring80 = [(float(lon), 80.0) for lon in range(0, 360, 30)]
    refused(
        [write(tmp_path, feature([closed(cap), closed(ring80)], edges="rhumb"))],
        "ring 2 (hole 1): goes round the pole",
        "as one ring",
    )
    band = [(float(lon), 60.0) for lon in range(0, 361, 30)] + [
        (float(lon), 80.0) for lon in range(360, -1, -30)
    ]
    area = load_one(tmp_path, band, edges="rhumb")
    # [D] closed-form caps (authalic q) and pyproj.Geod on the sampled ring agree
    assert area_km2(area) == pytest.approx((cap_area_m2(60) - cap_area_m2(80)) / 1e6, rel=1e-9)
    assert geodesic_area_km2(area) == pytest.approx(area_km2(area), rel=1e-6)
    assert area_shape(area).covers([85.0, 70.0, 70.0], [10.0, -100.0, 0.0]).tolist() == [
        False,
        True,
        True,
    ]
    # a hole across the meridian where the exterior ring starts
    seam = [(-5, 75), (5, 75), (5, 80), (-5, 80)]
    refused(
        [write(tmp_path, feature([closed(cap), closed(seam)]))],
        "crosses longitude 000°00.0'E where the exterior ring round the pole starts",
        "start the exterior ring at another vertex",
    )
    # the same hole is fine with the exterior started elsewhere, wherever it is written
    turned = cap[3:] + cap[:3]
    for hole in (seam, [(355, 75), (365, 75), (365, 80), (355, 80)]):
        area = load_one(tmp_path, turned, hole)
        assert area_shape(area).covers([77.0, 77.0], [0.0, 10.0]).tolist() == [False, True]


def test_checks_run_on_areas_built_in_code() -> None:
    from geo.area_checks import check_area

    area = Area(
        "Code ECA", 0.1, date(2020, 1, 1), (Polygon(((0, 0), (180, 0), (180, 10), (0, 10))),)
    )
    with pytest.raises(ValueError, match="polygon 1, ring 1, edge from vertex 1 to vertex 2"):
        check_area(area, file="code")
