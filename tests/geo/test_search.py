"""The fast paths of the crossing search give what the plain ones give.

- geo.edges.Edges samples a ring exactly as geo.curves.Curves.sample does on its
  exact curves (bit for bit), computing curves only for edges that need them; its
  length bound is never below the exact length (pyproj.Geod [KARNEY-2013] and
  GeographicLib RhumbSolve [KARNEY-RHUMB] via geo.rhumb, checked against RhumbSolve
  in test_rhumb.py);
- geo.search.close_pairs finds exactly the chord pairs an STR-tree over every
  chord finds with shapely's ``dwithin`` [STR-1997] (GEOS distances);
- geo.search.segment_distance equals shapely's distance between two segments;
- geo.plane.area_shape unites parts only where their boxes meet: its inside
  tests and its union agree with GEOS's union of everything.

Random geometry comes from numpy generators with fixed seeds.
"""

from __future__ import annotations

from datetime import date

import numpy as np
import pytest
import shapely

from geo.area import Area, Polygon
from geo.curves import Curves
from geo.edges import Edges
from geo.plane import STEP_M, area_shape, plane_ring, ring_edges
from geo.search import AREA_RUN, chords, close_pairs, segment_distance
from geo.search import STEP_M as SEARCH_STEP_M
from tests.helpers.geo import REF_GEOD


def _ring(rng: np.random.Generator, n: int, spread_deg: float) -> np.ndarray:
    """A star-shaped ring of n vertices (lon, lat) round 30°N 100°E [deg]."""
    ang = np.sort(rng.uniform(0.0, 2.0 * np.pi, n))
    r = spread_deg * (1.0 + 0.3 * rng.uniform(size=n))
    return np.column_stack([100.0 + r * np.cos(ang) / np.cos(np.radians(30.0)),
                            30.0 + r * np.sin(ang)])


RINGS = [(kind, n, spread) for kind in ("geodesic", "rhumb", "lonlat")
         for n, spread in ((5, 3.0), (40, 0.05), (300, 0.01), (2000, 0.2))]
SPECIAL = [
    ("rhumb", [(0.0, 80.0), (0.0, 90.0), (20.0, 90.0), (20.0, 80.0)]),  # along the pole
    ("lonlat", [(0.0, 60.0), (360.0, 60.0), (360.0, 90.0), (0.0, 90.0)]),  # a whole turn
    ("geodesic", [(0.0, 80.0), (10.0, 90.0), (20.0, 80.0)]),  # through the pole
    ("rhumb", [(float(lon), 70.0) for lon in range(0, 360, 30)]),  # round the pole
]


def _cases() -> list[tuple[str, np.ndarray]]:
    rng = np.random.default_rng(11)
    return [(k, _ring(rng, n, s)) for k, n, s in RINGS] + [(k, np.array(r)) for k, r in SPECIAL]


@pytest.mark.parametrize(("kind", "ring"), _cases(), ids=lambda v: v if isinstance(v, str) else "")
def test_edges_sample_like_their_exact_curves(kind: str, ring: np.ndarray) -> None:
    # definition (geo.edges): the same samples, fractions and offsets, bit for bit
    ends, _ = ring_edges(ring, kind)
    exact = Curves.between(ends.kind, ends.lat1, ends.lon1, ends.lat2, ends.lon2,
                           literal_lon=True)
    for step in (STEP_M, SEARCH_STEP_M):
        fresh = Edges(ends.kind, ends.lat1, ends.lon1, ends.lat2, ends.lon2)
        got = fresh.sample_fractions(step)
        want = exact.sample_fractions(step)
        for g, w in zip(got, want, strict=True):
            assert g.shape == w.shape and np.array_equal(g, w)
    sub = np.arange(0, len(ends), 3)
    assert np.array_equal(ends.subset_curves(sub).length_m, exact.length_m[sub])


@pytest.mark.parametrize(("kind", "ring"), _cases(), ids=lambda v: v if isinstance(v, str) else "")
def test_length_bound_is_an_upper_bound(kind: str, ring: np.ndarray) -> None:
    ends, _ = ring_edges(ring, kind)
    exact = ends.curves.length_m
    assert np.all(ends.length_bound_m() >= exact * (1.0 - 1e-12))
    # and for geodesics, against pyproj.Geod [KARNEY-2013] directly
    _, _, dist = REF_GEOD.inv(ends.lon1, ends.lat1, ends.lon2, ends.lat2)
    assert np.all(ends.length_bound_m() >= np.asarray(dist) * (1.0 - 1e-12))


def test_plane_ring_is_the_exact_curves_sampled() -> None:
    # geo.plane: the outline is the exact curves sampled every 200 m, repeated junctions
    # dropped, closed; short edges keep their vertices, long ones are sampled between
    rng = np.random.default_rng(3)
    pr = plane_ring(_ring(rng, 200, 0.5), "geodesic")
    lat, lon, _, _, _ = pr.curves.sample(STEP_M)
    xy = np.column_stack([lon, lat])
    xy = xy[np.concatenate([[True], np.any(np.diff(xy, axis=0) != 0.0, axis=1)])]
    assert np.array_equal(pr.xy, xy if np.all(xy[-1] == xy[0]) else np.vstack([xy, xy[:1]]))


def _brute_pairs(route, area, pad: float, shifts: list[float]) -> set[tuple[int, int, float]]:
    """Every chord pair within ``pad`` by shapely.STRtree and dwithin (GEOS) [STR-1997]."""
    out = set()
    for k in shifts:
        q = area.xy(np.arange(len(area))) + np.array([k, 0.0])
        tree = shapely.STRtree(shapely.linestrings(q))
        ir, ie = tree.query(shapely.linestrings(route.xy(np.arange(len(route)))),
                            predicate="dwithin", distance=pad)
        out |= {(int(a), int(b), float(k)) for a, b in zip(ir, ie, strict=True)}
    return out


@pytest.mark.parametrize("seed", range(4))
def test_close_pairs_are_the_dwithin_pairs(seed: int) -> None:
    rng = np.random.default_rng(seed)
    area_ring = _ring(rng, 3000, 1.0)
    area_ring[:, 0] -= 360.0 * (seed % 2)  # written a turn west: found through the shift
    ends, _ = ring_edges(area_ring, "geodesic")
    area = chords(ends, SEARCH_STEP_M, AREA_RUN)
    lon = np.linspace(97.0, 103.0, 40)
    lat = 30.0 + 1.2 * np.sin(np.arange(40)) + rng.uniform(-0.1, 0.1, 40)
    legs = Curves.between(np.where(np.arange(39) % 2, 0, 1), lat[:-1], lon[:-1], lat[1:], lon[1:])
    route = chords(legs, SEARCH_STEP_M)
    shifts = [360.0 * (seed % 2)]
    for ch in (route, area):  # every chord lies in its run's box
        xy = ch.xy(np.arange(len(ch)))
        box = ch.run_box[np.arange(len(ch)) // ch.run]
        assert np.all((xy >= box[:, None, :2]) & (xy <= box[:, None, 2:]))
    for pad in (1e-4, 3e-3):
        ir, ie, sh = close_pairs(route, area, pad, shifts)
        got = set(zip(ir.tolist(), ie.tolist(), sh.tolist(), strict=True))
        assert len(got) == len(ir)
        assert got == _brute_pairs(route, area, pad, shifts)
        assert len(got) > 0


def test_segment_distance_matches_shapely() -> None:
    rng = np.random.default_rng(7)
    p = rng.uniform(-1.0, 1.0, (500, 2, 2))
    q = rng.uniform(-1.0, 1.0, (500, 2, 2))
    q[:50, 1] = q[:50, 0]  # some segments are single points
    q[50:100] = p[50:100, ::-1]  # some the same segment reversed
    want = shapely.distance(shapely.linestrings(p), shapely.linestrings(q))
    assert np.allclose(segment_distance(p, q), want, rtol=0.0, atol=1e-15)


def _area(*rings: list[tuple[float, float]], edges: str = "rhumb") -> Area:
    return Area("U", 0.1, date(2020, 1, 1), tuple(Polygon(tuple(r)) for r in rings), edges=edges)


BOX = [(0.0, 0.0), (4.0, 0.0), (4.0, 4.0), (0.0, 4.0)]
UNIONS = {
    "apart": _area(BOX, [(10.0, 0.0), (12.0, 0.0), (12.0, 2.0), (10.0, 2.0)]),
    "overlapping": _area(BOX, [(3.0, 1.0), (6.0, 1.0), (6.0, 3.0), (3.0, 3.0)]),
    "touching": _area(BOX, [(4.0, 0.0), (6.0, 0.0), (6.0, 4.0), (4.0, 4.0)]),
    "split at 180": _area([(170.0, -5.0), (180.0, -5.0), (180.0, 5.0), (170.0, 5.0)],
                          [(-180.0, -5.0), (-170.0, -5.0), (-170.0, 5.0), (-180.0, 5.0)]),
    "round the pole": _area([(float(lon), 70.0) for lon in range(0, 360, 30)]),
}


@pytest.mark.parametrize("name", list(UNIONS))
def test_area_shape_agrees_with_the_union_of_everything(name: str) -> None:
    area = UNIONS[name]
    shape = area_shape(area)
    polys = [shapely.Polygon(r.xy) for r in shape.rings]
    parts = shapely.make_valid(shapely.union_all(polys))
    copies = [shapely.transform(parts, lambda c, k=k: c + [k, 0.0]) for k in (-360.0, 360.0)]
    whole = shapely.make_valid(shapely.union_all([parts, *copies]))
    assert shapely.area(shapely.symmetric_difference(shape.union, whole)) < 1e-9
    rng = np.random.default_rng(5)
    lo, lat0, hi, lat1 = shapely.bounds(parts)
    lon = rng.uniform(lo - 2.0, hi + 2.0, 4000)
    lat = rng.uniform(max(lat0 - 2.0, -90.0), min(lat1 + 2.0, 90.0), 4000)
    lon = np.concatenate([lon, lon - 360.0, [180.0, -180.0, 4.0, 2.0]])
    lat = np.concatenate([lat, lat, [0.0, 0.0, 2.0, 0.0]])
    inside = np.zeros(len(lon), dtype=bool)
    for k in 360.0 * np.arange(-3, 4):
        x = lon + k
        near = (x >= shape.lon_min - 1e-9) & (x <= shape.lon_max + 1e-9) & ~inside
        inside[near] = shapely.contains_xy(whole, x[near], lat[near])
    assert np.array_equal(shape.contains(lat, lon), inside)
