"""Sizes of control areas on the WGS84 ellipsoid, and a summary for tables and JSON.

Two independent ways to measure, which the tests compare:

- the ellipsoidal cylindrical equal-area plane (Lambert), exact for any
  outline drawn in it: x = a·λ, y = a·q(φ)/2 with the authalic function
  q(φ) = (1−e²)[sinφ/(1−e²sin²φ) − (1/(2e))·ln((1−e·sinφ)/(1+e·sinφ))]
  (Snyder 1987, *Map projections: a working manual*, USGS Professional
  Paper 1395, authalic latitude and cylindrical equal-area projection
  [LAMBERT-EQUAL-AREA]; from memory [M], checked against pyproj.Geod and
  GeographicLib's ``Planimeter`` in the tests and examples). The area element of
  the ellipsoid, a²(1−e²)cosφ/(1−e²sin²φ)² dφ dλ, is exactly dx·dy, so the
  shoelace formula over a ring sampled densely in longitude and latitude
  gives its area; the whole ellipsoid is 2π·a²·q(90°) (510 065 621.724 km²
  for WGS84 [WGS84] [D]);
- pyproj.Geod.polygon_area_perimeter (GeographicLib [KARNEY-2013] [P]),
  exact for geodesic polygons.

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
    """The authalic function q(φ) of the WGS84 ellipsoid.

    Parameters
    ----------
    lat_deg : array_like of float [deg]
        Geodetic latitude, -90 to 90.

    Returns
    -------
    ndarray of float [-]
        q(φ) = (1 − e²)·[sin φ/(1 − e² sin² φ) − (1/(2e))·ln((1 − e sin φ)/(1 + e sin φ))]
        [LAMBERT-EQUAL-AREA] [M], closed form, exact to round-off; odd in φ,
        2·sin φ on a sphere.

    Examples
    --------
    The ellipsoid's area is 2π·a²·q(90°); GeographicLib's ``Planimeter -p 9``
    [KARNEY-2013] gives 255032810862044.2188 m² for the hemisphere bounded by
    the equator, so q(90°) = 1.995531087503 [D]:

    >>> round(float(authalic_q(90.0)), 12)
    1.995531087503
    """
    s = np.sin(np.radians(np.asarray(lat_deg, dtype=np.float64)))
    return (1.0 - E2) * (
        s / (1.0 - E2 * s * s) - (1.0 / (2.0 * E)) * np.log((1.0 - E * s) / (1.0 + E * s))
    )


EARTH_AREA_M2 = float(2.0 * math.pi * A_M**2 * authalic_q(90.0))
"""Surface area of the WGS84 ellipsoid, m²: 2π·a²·q(90°)."""

HEMISPHERE_M2 = EARTH_AREA_M2 / 2.0
"""Half the surface of the WGS84 ellipsoid, m²."""


def equal_area_xy(lon_deg: ArrayLike, lat_deg: ArrayLike) -> tuple[NDArray, NDArray]:
    """Cylindrical equal-area coordinates of WGS84 points.

    Parameters
    ----------
    lon_deg : array_like of float [deg]
        Longitude, unwrapped (any value).
    lat_deg : array_like of float [deg]
        Geodetic latitude.

    Returns
    -------
    x, y : ndarray of float [m]
        x = a·λ, y = a·q(φ)/2 [LAMBERT-EQUAL-AREA] [M]: dx·dy is exactly the
        area element of the ellipsoid [D].

    Examples
    --------
    >>> x, y = equal_area_xy(1.0, 0.0)  # 1° of the equator: RhumbSolve -i -p 9 [KARNEY-RHUMB]
    >>> round(float(x), 6), float(y)
    (111319.490793, 0.0)
    """
    x = A_M * np.radians(np.asarray(lon_deg, dtype=np.float64))
    y = 0.5 * A_M * authalic_q(lat_deg)
    return x, y


def cap_area_m2(lat_deg: float) -> float:
    """Area of the polar cap poleward of a latitude.

    Parameters
    ----------
    lat_deg : float [deg]
        Latitude of the cap's edge; its sign is ignored.

    Returns
    -------
    float [m²]
        π·a²·(q(90°) − q(|φ|)) [LAMBERT-EQUAL-AREA] [D], exact to round-off.

    Examples
    --------
    The cap north of the 70th parallel; GeographicLib's ``Planimeter -R -p 9``
    [KARNEY-RHUMB] on rhumb lines along 70°N gives 15506340665454.9062 m²:

    >>> round(cap_area_m2(70.0) / 1e6, 3)
    15506340.665
    """
    return float(math.pi * A_M**2 * (authalic_q(90.0) - authalic_q(abs(lat_deg))))


def plane_ring_area_m2(xy: ArrayLike) -> float:
    """Area enclosed by a closed ring of points joined straight in the equal-area plane.

    Parameters
    ----------
    xy : array_like of float [deg]
        Closed ring (first point repeated last) of (lon, lat) rows, longitudes
        unwrapped; it must not cross itself.

    Returns
    -------
    float [m²]
        The shoelace formula in the plane of :func:`equal_area_xy`, coordinates
        taken relative to their mean to keep round-off small. Exact for outlines
        straight in that plane (meridians and parallels are); for curved edges,
        sample them densely first (:func:`geo.plane.plane_ring`).

    Examples
    --------
    The 1° box at 0°N 0°E, bounded by meridians and parallels;
    ``Planimeter -R -p 9`` [KARNEY-RHUMB] gives 12308463893.9753 m²:

    >>> round(plane_ring_area_m2([(0, 0), (1, 0), (1, 1), (0, 1), (0, 0)]), 3)
    12308463893.975
    """
    pts = np.asarray(xy, dtype=np.float64)
    x, y = equal_area_xy(pts[:, 0], pts[:, 1])
    x = x - x.mean()
    y = y - y.mean()
    return float(abs(np.sum(x[:-1] * y[1:] - x[1:] * y[:-1])) / 2.0)


def ring_area_m2(ring: Ring, edges: str) -> float:
    """Area enclosed by one open ring with the given edges, in the equal-area plane.

    Parameters
    ----------
    ring : Ring
        Open ring of (lon, lat) vertices [deg].
    edges : str
        ``"geodesic"``, ``"rhumb"`` or ``"lonlat"``.

    Returns
    -------
    float [m²]
        :func:`plane_ring_area_m2` of the ring sampled every 200 m along its
        true edges (within 1e-6 relative of pyproj.Geod [KARNEY-2013] in the
        tests). For a ring round a pole this is the polar cap side, as
        :func:`geo.plane.plane_ring` closes it.

    Examples
    --------
    >>> round(ring_area_m2(((0, 0), (1, 0), (1, 1), (0, 1)), "rhumb"), 3)  # see above
    12308463893.975
    """
    return plane_ring_area_m2(plane_ring(ring, edges).xy)


def area_km2(area: Area) -> float:
    """Area covered by an area: its united plane geometry in the equal-area plane.

    Parameters
    ----------
    area : Area
        The area as loaded.

    Returns
    -------
    float [km²]
        The union of :func:`geo.plane.area_shape` (parts, holes, copies at
        ±360°) cut to one turn of longitude starting at the westmost point of
        the parts, so every point of the ellipsoid is counted at most once.
        Sampling every 200 m along the true edges keeps the error below 1e-9
        relative.

    Examples
    --------
    A geodesic triangle; GeographicLib's ``Planimeter -p 9`` [KARNEY-2013]
    gives 28265768791593.6797 m²:

    >>> from geo.area import Polygon
    >>> tri = Polygon(((-30.0, -10.0), (40.0, -5.0), (10.0, 50.0)))
    >>> round(area_km2(Area("T", 0.1, date(2020, 1, 1), (tri,))), 1)
    28265768.8
    """
    shape = area_shape(area)
    west = shape.lon_min + 360.0
    turn = shapely.box(west, -90.0, west + 360.0, 90.0)
    one = shapely.intersection(shape.union, turn)

    def to_plane(c: NDArray[np.float64]) -> NDArray[np.float64]:
        return np.column_stack(equal_area_xy(c[:, 0], c[:, 1]))

    return float(shapely.area(shapely.transform(one, to_plane))) / 1e6


def _geod_ring_m2(ring: Ring, edges: str) -> float:
    """|area| of one ring by pyproj.Geod (GeographicLib [KARNEY-2013]), m².

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
    """Area by pyproj.Geod, part by part: exteriors minus holes, summed.

    Parameters
    ----------
    area : Area
        The area as loaded.

    Returns
    -------
    float [km²]
        The outside reference for :func:`area_km2` (GeographicLib
        [KARNEY-2013] [P], exact for geodesic polygons; rhumb and lonlat
        edges sampled every 200 m): equal on areas whose parts do not overlap.
        Overlaps are counted twice here.

    Examples
    --------
    The triangle of :func:`area_km2`; ``Planimeter -p 9``: 28265768791593.6797 m²:

    >>> from geo.area import Polygon
    >>> tri = Polygon(((-30.0, -10.0), (40.0, -5.0), (10.0, 50.0)))
    >>> round(geodesic_area_km2(Area("T", 0.1, date(2020, 1, 1), (tri,))), 6)
    28265768.791594
    """
    total = 0.0
    for poly in area.polygons:
        total += _geod_ring_m2(poly.exterior, area.edges)
        total -= sum(_geod_ring_m2(h, area.edges) for h in poly.holes)
    return total / 1e6


def describe(area: Area, today: date) -> dict:
    """A plain summary of an area for tables and ``--json``.

    Parameters
    ----------
    area : Area
        The area as loaded.
    today : date
        The UTC calendar day for ``in_force_today``.

    Returns
    -------
    dict
        Keys: name, limit_pct [% m/m], effective_from, effective_until (ISO
        8601 dates [ISO-8601] or None), edges, polygons, vertices,
        area_km2 [km²] (:func:`area_km2`), in_force_today (in force at any time
        on the UTC day ``today``), source, file.
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
