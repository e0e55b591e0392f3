"""Shared helpers for the geo reference tests: outside solvers, areas, routes, tracks.

Outside references used here (never the code under test):

- GeographicLib's command-line tools ``RhumbSolve`` and ``GeodSolve`` (Debian
  package geographiclib-tools; Karney 2013 and Karney 2014 "The area of rhumb
  polygons"), called once per batch with many lines on stdin;
- a separate ``pyproj.Geod(ellps="WGS84")`` (GeographicLib, Karney 2013) for
  geodesic distances between results and expected points.

Not a conftest: other test modules are written concurrently, so this is a
plain module imported by the geo tests only.
"""

from __future__ import annotations

import shutil
import subprocess
from datetime import date

import numpy as np
import pyproj

from geo.area import Area, Polygon
from geo.crossings import AreaTrack, track_area
from geo.path import route_path
from geo.plane import area_shape
from geo.route import Route, Waypoint

NM = 1852.0  # REFERENCE.md section 5: 1 nautical mile = 1852 m exactly
WGS84_A = 6378137.0  # WGS84 definition (NIMA TR8350.2)
WGS84_F = 1.0 / 298.257223563
WGS84_E2 = WGS84_F * (2.0 - WGS84_F)

REF_GEOD = pyproj.Geod(ellps="WGS84")
"""pyproj.Geod (GeographicLib, Karney 2013): our own instance, used only to measure."""

HAVE_RHUMBSOLVE = shutil.which("RhumbSolve") is not None
HAVE_GEODSOLVE = shutil.which("GeodSolve") is not None


def wrap180(x):
    """Fold into [-180, 180)."""
    return (np.asarray(x, dtype=np.float64) + 180.0) % 360.0 - 180.0


def unwrap_near(lon, ref):
    """``lon`` modulo 360 brought within 180° of ``ref``."""
    ref = np.asarray(ref, dtype=np.float64)
    return ref + wrap180(np.asarray(lon, dtype=np.float64) - ref)


def _run(tool: str, args: list[str], rows) -> np.ndarray:
    """Run a GeographicLib tool over many input lines at once; one row of floats per line."""
    rows = np.atleast_2d(np.asarray(rows, dtype=np.float64))
    # positional notation, never exponents: GeographicLib reads "1e-5" as 1°E − 5 (the
    # letter is a hemisphere); format_float_positional keeps every digit of the double
    text = "\n".join(" ".join(np.format_float_positional(v, unique=True, trim="-") for v in r)
                     for r in rows) + "\n"
    out = subprocess.run([tool, *args], input=text, capture_output=True, text=True, check=True)
    lines = out.stdout.strip().splitlines()
    assert len(lines) == len(rows), out.stderr
    return np.array([[float(x) for x in line.split()] for line in lines])


def rhumbsolve_inverse(lat1, lon1, lat2, lon2):
    """GeographicLib RhumbSolve -i -p 9: (course_deg, distance_m) of the shortest rhumb line."""
    out = _run("RhumbSolve", ["-i", "-p", "9"], np.column_stack(np.broadcast_arrays(
        lat1, lon1, lat2, lon2)))
    return out[:, 0], out[:, 1]


def rhumbsolve_direct(lat1, lon1, course, dist):
    """GeographicLib RhumbSolve -p 9: (lat2, lon2) with lon2 unwrapped near lon1 + Δλ."""
    lat1, lon1, course, dist = np.broadcast_arrays(*(np.asarray(v, np.float64) for v in (
        lat1, lon1, course, dist)))
    out = _run("RhumbSolve", ["-p", "9"], np.column_stack([lat1, lon1, course, dist]))
    # RhumbSolve folds lon2 into [-180, 180); put it back beside the start (legs here span
    # less than 180° of longitude, so the nearest turn is the right one)
    return out[:, 0], unwrap_near(out[:, 1], lon1)


def geodsolve_direct(lat1, lon1, azi1, dist):
    """GeographicLib GeodSolve -u -p 9: (lat2, lon2 unrolled, forward azimuth at point 2)."""
    lat1, lon1, azi1, dist = np.broadcast_arrays(*(np.asarray(v, np.float64) for v in (
        lat1, lon1, azi1, dist)))
    out = _run("GeodSolve", ["-u", "-p", "9"], np.column_stack([lat1, lon1, azi1, dist]))
    return out[:, 0], out[:, 1], out[:, 2]


def geodsolve_inverse(lat1, lon1, lat2, lon2):
    """GeographicLib GeodSolve -i -p 9: (azi1, azi2, s12)."""
    out = _run("GeodSolve", ["-i", "-p", "9"], np.column_stack(np.broadcast_arrays(
        lat1, lon1, lat2, lon2)))
    return out[:, 0], out[:, 1], out[:, 2]


def gap_m(lat1, lon1, lat2, lon2) -> np.ndarray:
    """Geodesic distance between points, metres (pyproj.Geod, Karney 2013)."""
    _, _, d = REF_GEOD.inv(np.asarray(lon1, np.float64), np.asarray(lat1, np.float64),
                           np.asarray(lon2, np.float64), np.asarray(lat2, np.float64))
    return np.asarray(d)


def make_area(name: str, parts, edges: str = "geodesic") -> Area:
    """An Area from ``[(exterior, [holes...]), ...]`` or ``[exterior, ...]`` of (lon, lat)."""
    polys = []
    for part in parts:
        if isinstance(part, Polygon):
            polys.append(part)
            continue
        if len(part) == 2 and not np.isscalar(part[0][0]):
            ext, holes = part
        else:
            ext, holes = part, ()
        polys.append(Polygon(tuple((float(x), float(y)) for x, y in ext),
                             tuple(tuple((float(x), float(y)) for x, y in h) for h in holes)))
    return Area(name, 0.1, date(2020, 1, 1), tuple(polys), edges=edges)


def make_route(points, legs="rhumb", name: str = "test") -> Route:
    """A Route through (lat, lon) points; ``legs`` one kind or one per leg."""
    n = len(points)
    kinds = [legs] * (n - 1) if isinstance(legs, str) else list(legs)
    wps = [Waypoint(f"W{i}", float(points[i][0]), float(points[i][1]),
                    leg=kinds[i - 1] if i else "rhumb") for i in range(n)]
    return Route(name, tuple(wps))


def track(route: Route, area: Area) -> AreaTrack:
    """The code under test end to end: path, shape, track."""
    return track_area(route_path(route), area_shape(area))


def events(tr: AreaTrack) -> list[tuple[str, float, float, float]]:
    """(event, distance_m, lat, lon) of every event."""
    return [(e.event, e.distance_m, e.lat, e.lon) for e in tr.events]


def kinds(tr: AreaTrack) -> list[str]:
    return [e.event for e in tr.events]


def shift_area(area: Area, k: float) -> Area:
    """The same area with every longitude moved by ``k`` degrees."""
    polys = tuple(Polygon(tuple((x + k, y) for x, y in p.exterior),
                          tuple(tuple((x + k, y) for x, y in h) for h in p.holes))
                  for p in area.polygons)
    return Area(area.name, area.sulphur_limit_pct, area.effective_from, polys, edges=area.edges)


def assert_same_events(ea, eb, tol_m: float = 1e-6, dist_tol_m: float = 1e-6) -> None:
    """Two event lists agree: kinds, distances, and positions (geodesic gap)."""
    assert [e[0] for e in ea] == [e[0] for e in eb], (ea, eb)
    if not ea:
        return
    a = np.array([e[1:] for e in ea])
    b = np.array([e[1:] for e in eb])
    assert np.max(np.abs(a[:, 0] - b[:, 0])) <= dist_tol_m, (ea, eb)
    g = gap_m(a[:, 1], a[:, 2], b[:, 1], b[:, 2])
    assert np.max(g) <= tol_m, (g, ea, eb)
