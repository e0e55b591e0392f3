"""The route's passages through washwater discharge zones (planner.voyage.discharge).

Expected values never come from the code under test:

- closed forms [D] for legs along a parallel (arc N·cos φ·Δλ, [WGS84]) and a
  meridian (arc ΔM = ∫ρ dφ by scipy.integrate.quad [SCIPY-2020]); a zone's
  meridian edges are the same curve whatever its ``edges``;
- pyproj.Geod with brentq [KARNEY-2013] [SCIPY-2020] for where a geodesic top
  edge crosses a meridian;
- the sample route, sampled independently (RhumbSolve [KARNEY-RHUMB] on its rhumb
  legs, pyproj.Geod [KARNEY-2013] on its great-circle leg) and tested inside the
  lonlat zones with shapely [SHAPELY-2] every 1 m around each change of state.
"""

from __future__ import annotations

import json
import math
from datetime import UTC, date, datetime

import numpy as np
import pytest
import shapely

from geo.area import Area, Polygon
from geo.discharge_zones import DischargeZone, load_discharge_zones
from geo.path import route_path
from geo.route_loader import load_route
from geo.schedule import make_schedule
from planner.voyage.discharge import zone_passages
from tests.helpers.geo import (
    REF_GEOD,
    geodesic_lat_at_lon,
    make_route,
    meridian_arc_quad_m,
    parallel_arc_m,
    rhumbsolve_direct,
    rhumbsolve_inverse,
)
from tests.helpers.paths import ROOT

SAMPLE = ROOT / "areas_sample"
ZONES = SAMPLE / "discharge" / "aldmere_discharge.geojson"
TOL_M = 1e-6
BOX = ((0.0, 0.0), (10.0, 0.0), (10.0, 10.0), (0.0, 10.0))
HOLE = ((3.0, 3.0), (7.0, 3.0), (7.0, 7.0), (3.0, 7.0))
PARALLEL = "closed form [D]: parallel arc N·cosφ·Δλ [WGS84]"


def _zone(name: str, parts: list, allows: tuple = ("closed",), edges: str = "lonlat",
          start: date = date(1900, 1, 1), until: date | None = None) -> DischargeZone:
    polys = tuple(Polygon(ext, holes) for ext, holes in parts)
    return DischargeZone(Area(name, 100.0, start, polys, until, edges), allows)


def _east(lat: float, lon0: float, lon1: float):
    """A rhumb route due east along the parallel ``lat`` from ``lon0`` to ``lon1`` [deg]."""
    return route_path(make_route([(lat, lon0), (lat, lon1)], "rhumb"))


def _got(passages) -> list[tuple[str, tuple, float, float]]:
    return [(p.zone, p.allows, p.from_m, p.to_m) for p in passages]


# ---- hand-made cases with closed forms ------------------------------------------------------

def _arc(dlon: float) -> float:
    return parallel_arc_m(5.0, dlon)


CASES = [
    # (zones, route lon0 -> lon1 along 5°N, expected [(zone, allows, from_m, to_m)], source)
    ([_zone("Z", [(BOX, ())])], (-5.0, 15.0),
     [("Z", ("closed",), _arc(5.0), _arc(15.0))], PARALLEL),
    ([_zone("Z", [(BOX, ())], allows=())], (2.0, 15.0),
     [("Z", (), 0.0, _arc(8.0))], PARALLEL + "; departs inside: from 0"),
    ([_zone("Z", [(BOX, ())])], (-5.0, 8.0),
     [("Z", ("closed",), _arc(5.0), _arc(13.0))], PARALLEL + "; arrives inside: to the end"),
    ([_zone("Z", [(BOX, (HOLE,))])], (-5.0, 15.0),
     [("Z", ("closed",), _arc(5.0), _arc(8.0)), ("Z", ("closed",), _arc(12.0), _arc(15.0))],
     PARALLEL + "; a hole: two passages"),
    ([_zone("Z", [(BOX, ()), (((20.0, 0.0), (25.0, 0.0), (25.0, 10.0), (20.0, 10.0)), ())])],
     (-5.0, 30.0),
     [("Z", ("closed",), _arc(5.0), _arc(15.0)), ("Z", ("closed",), _arc(25.0), _arc(30.0))],
     PARALLEL + "; two polygons: two passages"),
    ([_zone("B", [(((4.0, 0.0), (6.0, 0.0), (6.0, 10.0), (4.0, 10.0)), ())], allows=()),
      _zone("A", [(BOX, ())])], (-5.0, 15.0),
     [("A", ("closed",), _arc(5.0), _arc(15.0)), ("B", (), _arc(9.0), _arc(11.0))],
     PARALLEL + "; overlapping zones, sorted by from_m"),
    ([_zone("Z", [(((0.0, 0.0), (5.0, 0.0), (10.0, 0.0), (10.0, 5.0), (10.0, 10.0),
                    (5.0, 10.0), (0.0, 10.0), (0.0, 5.0)), ()),
                  (((10.0, 0.0), (15.0, 0.0), (15.0, 10.0), (10.0, 10.0), (10.0, 5.0)), ())])],
     (-5.0, 20.0),
     [("Z", ("closed",), _arc(5.0), _arc(20.0))],
     PARALLEL + "; two parts sharing an edge: one passage, joined"),
    ([_zone("Z", [(BOX, ())])], (12.0, 20.0), [], "outside all along: none"),
]


@pytest.mark.parametrize("zones, lons, expected, source", CASES,
                         ids=[c[3] for c in CASES])
def test_hand_made_cases(zones, lons, expected, source) -> None:
    got = _got(zone_passages(_east(5.0, *lons), zones))
    assert [g[:2] for g in got] == [e[:2] for e in expected], source
    for g, e in zip(got, expected, strict=True):
        assert g[2] == pytest.approx(e[2], abs=TOL_M) and g[3] == pytest.approx(e[3], abs=TOL_M)


@pytest.mark.parametrize("edges", ["geodesic", "rhumb", "lonlat"])
def test_geodesic_top_edge_against_pyproj(edges: str) -> None:
    # due north along 5°E from 5°S to 20°N: enters on the bottom edge (the equator, the same
    # curve for every kind) and leaves through the top edge, whose latitude at 5°E is that of
    # the geodesic (pyproj.Geod + brentq [KARNEY-2013]), the rhumb line (the parallel) or the
    # straight lon/lat line (10°N); distances are meridian arcs [SCIPY-2020]
    top = {"geodesic": geodesic_lat_at_lon(10.0, 10.0, 0.0, 10.0, 5.0),
           "rhumb": 10.0, "lonlat": 10.0}[edges]
    path = route_path(make_route([(-5.0, 5.0), (20.0, 5.0)], "rhumb"))
    (p,) = zone_passages(path, [_zone("Z", [(BOX, ())], edges=edges)])
    south = meridian_arc_quad_m(-5.0)
    assert p.from_m == pytest.approx(meridian_arc_quad_m(0.0) - south, abs=TOL_M)
    assert p.to_m == pytest.approx(meridian_arc_quad_m(top) - south, abs=1e-5)
    if edges == "geodesic":
        assert top > 10.0  # the geodesic bulges poleward


def test_touching_a_zone_is_no_passage() -> None:
    # along 0° (the zone's bottom edge) and touching its corner: the boundary counts as
    # inside, so a run along an edge from outside is no passage of any length outside it
    path = _east(-1.0, -5.0, 15.0)
    assert zone_passages(path, [_zone("Z", [(BOX, ())])]) == ()


def test_in_force_dates_cut_the_passage_with_a_schedule() -> None:
    # 10 kn along 5°N from 5°W, departing 2027-05-30 12:00Z; the zone comes into force at
    # 2027-06-01 00:00Z, 36 h = 360 nm out (1 nm = 1852 m [NM-1852]), inside the box
    # (entered at 5° of longitude, about 299 nm)
    path = _east(5.0, -5.0, 15.0)
    sched = make_schedule(path, datetime(2027, 5, 30, 12, tzinfo=UTC), 10.0)
    at_m = 360.0 * 1852.0
    assert _arc(5.0) < at_m < _arc(15.0)
    later = _zone("Z", [(BOX, ())], start=date(2027, 6, 1))
    (p,) = zone_passages(path, [later], sched)
    assert p.from_m == pytest.approx(at_m, abs=1e-6)
    assert p.to_m == pytest.approx(_arc(15.0), abs=TOL_M)
    # in force until 2027-05-31 (to 24:00Z, the same moment): cut at the other end
    (q,) = zone_passages(path, [_zone("Z", [(BOX, ())], until=date(2027, 5, 31))], sched)
    assert q.from_m == pytest.approx(_arc(5.0), abs=TOL_M)
    assert q.to_m == pytest.approx(at_m, abs=1e-6)
    # not in force during the voyage at all
    assert zone_passages(path, [_zone("Z", [(BOX, ())], start=date(2027, 7, 1))], sched) == ()
    # without a schedule: judged on a day
    assert zone_passages(path, [later], None, date(2027, 5, 31)) == ()
    assert len(zone_passages(path, [later], None, date(2027, 6, 1))) == 1


# ---- the sample route, against independent sampling -----------------------------------------

def _independent_positions(d_m: np.ndarray, legs: list[tuple], starts: np.ndarray,
                           lengths: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """(lat, lon) at distances along the route, by RhumbSolve or pyproj.Geod per leg."""
    lat = np.empty(len(d_m))
    lon = np.empty(len(d_m))
    k = np.clip(np.searchsorted(starts, d_m, side="right") - 1, 0, len(legs) - 1)
    for i, (lat1, lon1, lat2, lon2, kind) in enumerate(legs):
        on = k == i
        if not np.any(on):
            continue
        s = np.clip(d_m[on] - starts[i], 0.0, lengths[i])
        if kind == "rhumb":
            course, _ = rhumbsolve_inverse(lat1, lon1, lat2, lon2)
            la, lo = rhumbsolve_direct(np.full(len(s), lat1), np.full(len(s), lon1),
                                       np.full(len(s), course[0]), s)
        else:
            az, _, _ = REF_GEOD.inv(lon1, lat1, lon2, lat2)
            lo, la, _ = REF_GEOD.fwd(np.full(len(s), lon1), np.full(len(s), lat1),
                                     np.full(len(s), az), s)
            lo = np.asarray(lo)
        lat[on] = la
        lon[on] = np.asarray(lo) % 360.0  # the sample route lies in 166°E..192°E
    return lat, lon


def _zone_polygons() -> dict[str, tuple[str, shapely.Geometry]]:
    doc = json.loads(ZONES.read_text())
    out = {}
    for f in doc["features"]:
        ring = f["geometry"]["coordinates"][0]
        parts = [shapely.Polygon([(x + 360.0 * k, y) for x, y in ring]) for k in (-1, 0, 1)]
        out[f["properties"]["name"]] = (f["properties"]["allows"], shapely.union_all(parts))
    return out


@pytest.mark.requires_rhumbsolve
def test_sample_route_passages_against_dense_sampling() -> None:
    route = load_route(SAMPLE / "aldmere_to_skarvik.csv")
    wps = route.waypoints
    legs = [(a.lat, a.lon, b.lat, b.lon, b.leg) for a, b in zip(wps, wps[1:], strict=False)]
    lengths = []
    for lat1, lon1, lat2, lon2, kind in legs:
        if kind == "rhumb":
            lengths.append(float(rhumbsolve_inverse(lat1, lon1, lat2, lon2)[1][0]))
        else:
            lengths.append(float(REF_GEOD.inv(lon1, lat1, lon2, lat2)[2]))
    lengths = np.array(lengths)
    starts = np.concatenate([[0.0], np.cumsum(lengths)[:-1]])
    total = float(lengths.sum())
    coarse = np.linspace(0.0, total, int(total // 500.0) + 2)
    lat, lon = _independent_positions(coarse, legs, starts, lengths)
    expected = []
    for name, (word, poly) in _zone_polygons().items():
        inside = shapely.covers(poly, shapely.points(lon, lat))
        flips = np.flatnonzero(inside[1:] != inside[:-1])
        ends = [0.0] if inside[0] else []
        for j in flips:  # 1 m sampling across the bracket
            fine = np.linspace(coarse[j], coarse[j + 1],
                               int(math.ceil(coarse[j + 1] - coarse[j])) + 1)
            flat, flon = _independent_positions(fine, legs, starts, lengths)
            state = shapely.covers(poly, shapely.points(flon, flat))
            m = int(np.flatnonzero(state != state[0])[0])
            ends.append(0.5 * (fine[m - 1] + fine[m]))
        if inside[-1]:
            ends.append(total)
        assert len(ends) % 2 == 0
        for a, b in zip(ends[::2], ends[1::2], strict=True):
            expected.append((name, word, a, b))
    expected.sort(key=lambda e: e[2])
    path = route_path(route)
    assert path.length_m == pytest.approx(total, abs=1e-3)
    got = zone_passages(path, load_discharge_zones([ZONES]))
    assert [(p.zone, p.allows) for p in got] == [
        (n, ("closed",) if w == "closed" else ()) for n, w, _, _ in expected]
    for p, (_, _, a, b) in zip(got, expected, strict=True):
        # the dense check brackets each crossing within 1 m (0.5 m from the midpoint)
        assert abs(p.from_m - a) <= 0.5 + 1e-3 and abs(p.to_m - b) <= 0.5 + 1e-3
    assert got[0].from_m == 0.0 and got[-1].to_m == path.length_m
    assert {p.allows for p in got} == {(), ("closed",)}
