"""Sizes of control areas on the WGS84 ellipsoid, and a summary for tables and JSON.

Two independent ways to measure, which the tests compare:

- the ellipsoidal cylindrical equal-area plane (Lambert), exact for any
  outline drawn in it: x = a·λ, y = a·q(φ)/2 with the authalic function
  q(φ) = (1−e²)[sinφ/(1−e²sin²φ) − (1/(2e))·ln((1−e·sinφ)/(1+e·sinφ))]
  (Snyder 1987, *Map projections: a working manual*, USGS Professional
  Paper 1395, authalic latitude and cylindrical equal-area projection; from
  memory, checked against pyproj.Geod in the tests). The area element of
  the ellipsoid, a²(1−e²)cosφ/(1−e²sin²φ)² dφ dλ, is exactly dx·dy, so the
  shoelace formula over a ring sampled densely in longitude and latitude
  gives its area; the whole ellipsoid is 2π·a²·q(90°) (510 065 621.724 km²
  for WGS84);
- pyproj.Geod.polygon_area_perimeter (GeographicLib, Karney 2013), exact for
  geodesic polygons.

:func:`area_km2` uses the first on the united plane geometry of
:func:`geo.plane.area_shape`, so overlapping MultiPolygon parts count once,
holes are removed and polygons split at 180° join up. :func:`geodesic_area_km2`
is the second, part by part (overlaps counted twice): the outside reference.
"""

from __future__ import annotations

import math
from datetime import date

import numpy as np
import shapely
from numpy.typing import ArrayLike, NDArray

from geo.area import Area, Ring
from geo.ellipsoid import A_M, E2, GEOD, E
from geo.plane import PlaneRing, area_shape, plane_ring


def authalic_q(lat_deg: ArrayLike) -> NDArray[np.float64]:
    """The authalic function q(φ) (dimensionless; 2 at the pole on a sphere)."""
    s = np.sin(np.radians(np.asarray(lat_deg, dtype=np.float64)))
    return (1.0 - E2) * (
        s / (1.0 - E2 * s * s) - (1.0 / (2.0 * E)) * np.log((1.0 - E * s) / (1.0 + E * s))
    )


EARTH_AREA_M2 = float(2.0 * math.pi * A_M**2 * authalic_q(90.0))
"""Surface area of the WGS84 ellipsoid, m²: 2π·a²·q(90°)."""

HEMISPHERE_M2 = EARTH_AREA_M2 / 2.0
"""Half the surface of the WGS84 ellipsoid, m²."""


def equal_area_xy(lon_deg: ArrayLike, lat_deg: ArrayLike) -> tuple[NDArray, NDArray]:
    """Cylindrical equal-area coordinates in metres: x = a·λ, y = a·q(φ)/2."""
    x = A_M * np.radians(np.asarray(lon_deg, dtype=np.float64))
    y = 0.5 * A_M * authalic_q(lat_deg)
    return x, y


def cap_area_m2(lat_deg: float) -> float:
    """Area of the polar cap poleward of latitude ``|lat_deg|``, m²: π·a²·(q(90°) − q(|φ|))."""
    return float(math.pi * A_M**2 * (authalic_q(90.0) - authalic_q(abs(lat_deg))))


def plane_ring_area_m2(xy: ArrayLike) -> float:
    """Area enclosed by a closed ring of (lon, lat) points joined straight in the plane, m².

    Shoelace formula in the equal-area plane, coordinates taken relative to
    their mean to keep round-off small. The ring must not cross itself.
    """
    pts = np.asarray(xy, dtype=np.float64)
    x, y = equal_area_xy(pts[:, 0], pts[:, 1])
    x = x - x.mean()
    y = y - y.mean()
    return float(abs(np.sum(x[:-1] * y[1:] - x[1:] * y[:-1])) / 2.0)


def ring_area_m2(ring: Ring, edges: str) -> float:
    """Area enclosed by one open ring with the given edges, m² (equal-area plane).

    For a ring around a pole this is the polar cap side, as
    :func:`geo.plane.plane_ring` closes it.
    """
    return plane_ring_area_m2(plane_ring(ring, edges).xy)


def area_km2(area: Area) -> float:
    """Area covered by an area, km²: its united plane geometry in the equal-area plane.

    The union of :func:`geo.plane.area_shape` (parts, holes, copies at ±360°)
    is cut to one turn of longitude starting at the westmost point of the
    parts, so every point of the ellipsoid is counted at most once. Sampling
    every 200 m along the true edges keeps the error below 1e-9 relative.
    """
    shape = area_shape(area)
    west = shape.lon_min + 360.0
    turn = shapely.box(west, -90.0, west + 360.0, 90.0)
    one = shapely.intersection(shape.union, turn)

    def to_plane(c: NDArray[np.float64]) -> NDArray[np.float64]:
        return np.column_stack(equal_area_xy(c[:, 0], c[:, 1]))

    return float(shapely.area(shapely.transform(one, to_plane))) / 1e6


def _geod_ring_m2(ring: Ring, edges: str) -> float:
    """|area| of one ring by pyproj.Geod (GeographicLib), m².

    Geodesic edges: on the vertices as written. Rhumb and lonlat edges: on
    the ring sampled every 200 m along the true edges (without the closing
    along a pole that the plane adds; GeographicLib handles rings around a
    pole itself). pyproj returns a signed area (positive counter-clockwise),
    reduced to at most a hemisphere in size: its magnitude is taken.
    """
    if edges == "geodesic":
        lon = [p[0] for p in ring]
        lat = [p[1] for p in ring]
    else:
        pr: PlaneRing = plane_ring(ring, edges)
        xy = pr.xy[:-3] if pr.pole else pr.xy[:-1]
        lon, lat = xy[:, 0], xy[:, 1]
    signed, _ = GEOD.polygon_area_perimeter(lon, lat)
    return abs(float(signed))


def geodesic_area_km2(area: Area) -> float:
    """Area by pyproj.Geod, part by part (exterior minus holes, summed), km².

    The outside reference for :func:`area_km2`: equal on areas whose parts do
    not overlap. Overlaps are counted twice here.
    """
    total = 0.0
    for poly in area.polygons:
        total += _geod_ring_m2(poly.exterior, area.edges)
        total -= sum(_geod_ring_m2(h, area.edges) for h in poly.holes)
    return total / 1e6


def describe(area: Area, today: date) -> dict:
    """A plain summary of an area for tables and ``--json``.

    Keys: name, limit_pct, effective_from, effective_until (ISO dates or
    None), edges, polygons, vertices, area_km2, in_force_today (in force at
    any time on the UTC day ``today``), source, file.
    """
    return {
        "name": area.name,
        "limit_pct": area.sulphur_limit_pct,
        "effective_from": area.effective_from.isoformat(),
        "effective_until": area.effective_until.isoformat() if area.effective_until else None,
        "edges": area.edges,
        "polygons": len(area.polygons),
        "vertices": area.n_vertices,
        "area_km2": area_km2(area),
        "in_force_today": area.in_force_on(today),
        "source": area.source,
        "file": area.file,
    }
