"""Shared helpers for the geo reference tests: outside solvers, closed forms, areas, routes.

Outside references used here (never the code under test):

- GeographicLib's command-line tools ``RhumbSolve`` [KARNEY-RHUMB] and
  ``GeodSolve`` [KARNEY-2013] (Debian package geographiclib-tools), called
  once per batch with many lines on stdin;
- a separate ``pyproj.Geod(ellps="WGS84")`` (GeographicLib [KARNEY-2013]) for
  geodesic distances between results and expected points, and with
  ``scipy.optimize.brentq`` [SCIPY-2020] for where a geodesic reaches a given
  longitude or latitude;
- closed forms from the WGS84 definition [WGS84] [D], written out here from
  the constants, not imported from geo: the meridian arc ∫ρ dφ by
  ``scipy.integrate.quad`` [SCIPY-2020] and the parallel arc N·cos φ·Δλ.

Also the small helpers of the route-file tests (``utc``, ``refused_call``).
Not a conftest: other test modules are written concurrently, so this is a
plain module, imported by the geo tests (and by planner tests for RhumbSolve).
"""

from __future__ import annotations

import math
import shutil
import subprocess
from collections.abc import Callable
from datetime import UTC, date, datetime

import numpy as np
import pyproj
import pytest
from numpy.typing import ArrayLike, NDArray
from scipy.integrate import quad
from scipy.optimize import brentq

from geo.area import Area, Polygon
from geo.crossings import AreaTrack, track_area
from geo.errors import InputError
from geo.path import route_path
from geo.plane import area_shape
from geo.route import Route, Waypoint

NM = 1852.0  # [NM-1852] [P]: 1 nautical mile = 1852 m exactly
WGS84_A = 6378137.0  # [WGS84] [P] NIMA TR8350.2: semi-major axis [m]
WGS84_F = 1.0 / 298.257223563  # [WGS84] [P]: flattening
WGS84_E2 = WGS84_F * (2.0 - WGS84_F)

REF_GEOD = pyproj.Geod(ellps="WGS84")
"""pyproj.Geod (GeographicLib [KARNEY-2013]): our own instance, used only to measure."""

HAVE_RHUMBSOLVE = shutil.which("RhumbSolve") is not None
HAVE_GEODSOLVE = shutil.which("GeodSolve") is not None


def wrap180(x: ArrayLike) -> NDArray[np.float64]:
    """Fold into [-180, 180) [deg]."""
    return (np.asarray(x, dtype=np.float64) + 180.0) % 360.0 - 180.0


def unwrap_near(lon: ArrayLike, ref: ArrayLike) -> NDArray[np.float64]:
    """``lon`` modulo 360 brought within 180° of ``ref`` [deg]."""
    ref = np.asarray(ref, dtype=np.float64)
    return ref + wrap180(np.asarray(lon, dtype=np.float64) - ref)


def _run(tool: str, args: list[str], rows: ArrayLike) -> np.ndarray:
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


def rhumbsolve_inverse(lat1: ArrayLike, lon1: ArrayLike, lat2: ArrayLike,
                       lon2: ArrayLike) -> tuple[np.ndarray, np.ndarray]:
    """[KARNEY-RHUMB] RhumbSolve -i -p 9: (course_deg, distance_m) of the shortest rhumb line."""
    out = _run("RhumbSolve", ["-i", "-p", "9"], np.column_stack(np.broadcast_arrays(
        lat1, lon1, lat2, lon2)))
    return out[:, 0], out[:, 1]


def rhumbsolve_direct(lat1: ArrayLike, lon1: ArrayLike, course: ArrayLike,
                      dist: ArrayLike) -> tuple[np.ndarray, np.ndarray]:
    """[KARNEY-RHUMB] RhumbSolve -p 9: (lat2, lon2) [deg] with lon2 unwrapped near lon1."""
    lat1, lon1, course, dist = np.broadcast_arrays(*(np.asarray(v, np.float64) for v in (
        lat1, lon1, course, dist)))
    out = _run("RhumbSolve", ["-p", "9"], np.column_stack([lat1, lon1, course, dist]))
    # RhumbSolve folds lon2 into [-180, 180); put it back beside the start (legs here span
    # less than 180° of longitude, so the nearest turn is the right one)
    return out[:, 0], unwrap_near(out[:, 1], lon1)


def geodsolve_direct(lat1: ArrayLike, lon1: ArrayLike, azi1: ArrayLike,
                     dist: ArrayLike) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """[KARNEY-2013] GeodSolve -u -p 9: (lat2, lon2 unrolled, forward azimuth at point 2)."""
    lat1, lon1, azi1, dist = np.broadcast_arrays(*(np.asarray(v, np.float64) for v in (
        lat1, lon1, azi1, dist)))
    out = _run("GeodSolve", ["-u", "-p", "9"], np.column_stack([lat1, lon1, azi1, dist]))
    return out[:, 0], out[:, 1], out[:, 2]


def geodsolve_inverse(lat1: ArrayLike, lon1: ArrayLike, lat2: ArrayLike,
                      lon2: ArrayLike) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """[KARNEY-2013] GeodSolve -i -p 9: (azi1 [deg], azi2 [deg], s12 [m])."""
    out = _run("GeodSolve", ["-i", "-p", "9"], np.column_stack(np.broadcast_arrays(
        lat1, lon1, lat2, lon2)))
    return out[:, 0], out[:, 1], out[:, 2]


def gap_m(lat1: ArrayLike, lon1: ArrayLike, lat2: ArrayLike, lon2: ArrayLike) -> np.ndarray:
    """Geodesic distance between points [m] (pyproj.Geod [KARNEY-2013])."""
    _, _, d = REF_GEOD.inv(np.asarray(lon1, np.float64), np.asarray(lat1, np.float64),
                           np.asarray(lon2, np.float64), np.asarray(lat2, np.float64))
    return np.asarray(d)


# ---- closed forms and outside solutions, for expected values ---------------------------------


def rho_m(phi_rad: float) -> float:
    """Meridional radius of curvature a(1−e²)/(1−e²sin²φ)^1.5 [m] ([WGS84] [D])."""
    return WGS84_A * (1 - WGS84_E2) / (1 - WGS84_E2 * math.sin(phi_rad) ** 2) ** 1.5


def meridian_arc_quad_m(lat_deg: float) -> float:
    """Meridian arc from the equator, ∫₀^φ ρ dφ [m] by scipy.integrate.quad [SCIPY-2020] [D]."""
    val, err = quad(rho_m, 0.0, math.radians(lat_deg), epsabs=1e-9, epsrel=1e-13, limit=200)
    assert err < 1e-6
    return val


def parallel_arc_m(lat_deg: float, dlon_deg: float) -> float:
    """Parallel arc N·cos φ·|Δλ| [m], N = a/√(1 − e² sin² φ) ([WGS84] [D])."""
    phi = math.radians(lat_deg)
    return WGS84_A * math.cos(phi) / math.sqrt(1 - WGS84_E2 * math.sin(phi) ** 2) * abs(
        math.radians(dlon_deg))


def isometric_lat_rad(lat_deg: float) -> float:
    """Isometric latitude ψ = asinh(tan φ) − e·atanh(e·sin φ) [rad] ([RHUMB-TEXTS] [P])."""
    e = math.sqrt(WGS84_E2)
    p = math.radians(lat_deg)
    return math.asinh(math.tan(p)) - e * math.atanh(e * math.sin(p))


def geodesic_lat_at_lon(lon1: float, lat1: float, lon2: float, lat2: float, lon: float) -> float:
    """Latitude [deg] where the geodesic (lon1, lat1)→(lon2, lat2) reaches ``lon``.

    pyproj.Geod [KARNEY-2013] for the line, scipy.optimize.brentq [SCIPY-2020]
    for the distance along it.
    """
    az, _, dist = REF_GEOD.inv(lon1, lat1, lon2, lat2)

    def f(s: float) -> float:
        x, _, _ = REF_GEOD.fwd(lon1, lat1, az, s)
        return ((x - lon + 180.0) % 360.0) - 180.0

    s = brentq(f, 0.0, dist, xtol=1e-9, rtol=1e-15)
    _, y, _ = REF_GEOD.fwd(lon1, lat1, az, s)
    return float(y)


def geodesic_s_at_lat(lon1: float, lat1: float, lon2: float, lat2: float, lat: float,
                      lo_frac: float = 0.0, hi_frac: float = 1.0) -> tuple[float, float, float]:
    """(distance [m], lat, lon [deg]) where the geodesic (lon1, lat1)→(lon2, lat2) reaches ``lat``.

    pyproj.Geod [KARNEY-2013] and scipy.optimize.brentq [SCIPY-2020], searched
    between the fractions ``lo_frac`` and ``hi_frac`` of the line.
    """
    az, _, dist = REF_GEOD.inv(lon1, lat1, lon2, lat2)

    def f(s: float) -> float:
        return REF_GEOD.fwd(lon1, lat1, az, s)[1] - lat

    s = brentq(f, lo_frac * dist, hi_frac * dist, xtol=1e-9, rtol=1e-15)
    x, y, _ = REF_GEOD.fwd(lon1, lat1, az, s)
    return float(s), float(y), float(x)


# ---- areas, routes and tracks -------------------------------------------------------------------


def make_area(name: str, parts: list, edges: str = "geodesic") -> Area:
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


def make_route(points: list, legs: str | list[str] = "rhumb", name: str = "test") -> Route:
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
    """(event, distance_m, lat, lon) of every event [m, deg]."""
    return [(e.event, e.distance_m, e.lat, e.lon) for e in tr.events]


def kinds(tr: AreaTrack) -> list[str]:
    """The kind, ``"enter"`` or ``"exit"``, of every event."""
    return [e.event for e in tr.events]


def shift_area(area: Area, k: float) -> Area:
    """The same area with every longitude moved by ``k`` degrees."""
    polys = tuple(Polygon(tuple((x + k, y) for x, y in p.exterior),
                          tuple(tuple((x + k, y) for x, y in h) for h in p.holes))
                  for p in area.polygons)
    return Area(area.name, area.sulphur_limit_pct, area.effective_from, polys, edges=area.edges)


Event = tuple[str, float, float, float]


def assert_same_events(ea: list[Event], eb: list[Event], tol_m: float = 1e-6,
                       dist_tol_m: float = 1e-6) -> None:
    """Two event lists agree: kinds, distances [m], and positions (geodesic gap [m])."""
    assert [e[0] for e in ea] == [e[0] for e in eb], (ea, eb)
    if not ea:
        return
    a = np.array([e[1:] for e in ea])
    b = np.array([e[1:] for e in eb])
    assert np.max(np.abs(a[:, 0] - b[:, 0])) <= dist_tol_m, (ea, eb)
    g = gap_m(a[:, 1], a[:, 2], b[:, 1], b[:, 2])
    assert np.max(g) <= tol_m, (g, ea, eb)


# ---- route files ---------------------------------------------------------------------------------


def utc(*args: int) -> datetime:
    """A timezone-aware UTC datetime from year, month, day, hour, ..."""
    return datetime(*args, tzinfo=UTC)


def refused_call(call: Callable, *args: object, **kwargs: object) -> InputError:
    """Assert ``call(*args, **kwargs)`` raises a one-line InputError; return it."""
    with pytest.raises(InputError) as info:
        call(*args, **kwargs)
    assert "\n" not in str(info.value)
    return info.value
