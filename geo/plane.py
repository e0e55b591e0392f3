"""An area drawn in the unwrapped longitude-latitude plane, for inside tests and searches.

Each ring's edges (geodesic, rhumb or lonlat) become :class:`geo.curves.Curves`
and are sampled every :data:`STEP_M` into a plane ring of (lon, lat) with
the longitude unwrapped along the ring. A ring whose longitude winds through
±360° circles a pole; it is closed along that pole (the one on the side of
its mean latitude) so that it bounds the polar cap in the plane. Rings are
then shapely polygons; the parts of an area, and its copies shifted by
±360°, are united, which removes the seams of polygons split at 180°
and the overlaps of MultiPolygon parts.

Sampling error: a chord of length L deviates from the curve it samples by
about L²/(8R) (the sagitta, common practice); with L = 200 m and R down to
~560 km (a rhumb line at 85° latitude seen in the plane) that is under 1 cm.
Crossings themselves are never taken from the plane: they are solved on the
true curves (:mod:`geo.roots`). Polygons, unions and inside tests are
shapely's (GEOS).
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass

import numpy as np
import shapely
from numpy.typing import ArrayLike, NDArray

from geo.area import Area, Ring
from geo.curves import KIND_CODES, Curves

STEP_M = 200.0
"""Sampling step along the true edges [m]."""


@dataclass(frozen=True, eq=False)
class PlaneRing:
    """One ring: its edge curves and its closed plane outline.

    ``xy`` [deg] is closed (first point repeated last), longitude first.
    ``pole`` is +1 / -1 when the ring circles the north / south pole, else 0.
    """

    curves: Curves
    xy: NDArray[np.float64]
    pole: int


def ring_curves(ring: Ring, edges: str) -> tuple[Curves, int]:
    """The edge curves of an open ring and its winding: 0, or ±1 around a pole.

    Parameters
    ----------
    ring : Ring
        Open ring of (lon, lat) vertices [deg] (the closing vertex left out).
    edges : str
        How vertices are joined: ``"geodesic"``, ``"rhumb"`` or ``"lonlat"``.

    Returns
    -------
    curves : Curves
        Edge ``i`` from vertex ``i`` to the next (the last back to the first),
        longitudes unwrapped along the ring; each edge ends exactly where the
        next begins.
    winding : int [-]
        Turns of longitude round the ring: 0, or ±1 for a ring round a pole.

    Notes
    -----
    Geodesic and rhumb edges take the shorter way in longitude; an edge
    between two pole points is taken literally (it runs along the pole).
    Lonlat rings take every longitude as written [RFC-7946], so their steps
    always sum to zero: a lonlat polar area must be written with explicit
    pole vertices.

    Examples
    --------
    >>> polar = tuple((float(lon), 70.0) for lon in range(0, 360, 90))
    >>> curves, winding = ring_curves(polar, "rhumb")
    >>> curves.lon2.tolist(), winding
    ([90.0, 180.0, 270.0, 360.0], 1)
    """
    lon = np.array([p[0] for p in ring], dtype=np.float64)
    lat = np.array([p[1] for p in ring], dtype=np.float64)
    lon_next, lat_next = np.roll(lon, -1), np.roll(lat, -1)
    raw = lon_next - lon
    if edges == "lonlat":
        step = raw  # as written; the closing edge returns to the first vertex
    else:
        step = (raw + 180.0) % 360.0 - 180.0
        at_pole = (np.abs(lat) == 90.0) & (np.abs(lat_next) == 90.0)
        step = np.where(at_pole, raw, step)
    lon_u = lon[0] + np.concatenate([[0.0], np.cumsum(step[:-1])])
    winding = int(round(np.sum(step) / 360.0))
    # each edge ends exactly where the next begins (no round-off zig-zags at vertices)
    lon_end = np.concatenate([lon_u[1:], [lon_u[0] + 360.0 * winding]])
    kind = np.full(len(lon), KIND_CODES[edges], dtype=np.int8)
    curves = Curves.between(kind, lat, lon_u, lat_next, lon_end, literal_lon=True)
    return curves, winding


def plane_ring(ring: Ring, edges: str) -> PlaneRing:
    """Sample a ring into the plane (see the module notes), closing it at a pole if it circles one.

    Parameters
    ----------
    ring : Ring
        Open ring of (lon, lat) vertices [deg].
    edges : str
        ``"geodesic"``, ``"rhumb"`` or ``"lonlat"``.

    Returns
    -------
    PlaneRing
        The edge curves and the closed outline sampled every :data:`STEP_M`
        (200 m) along the true edges, within 1 cm of them; a ring round a pole
        is closed along the pole on the side of its mean latitude.

    Examples
    --------
    >>> polar = tuple((float(lon), 70.0) for lon in range(0, 360, 90))
    >>> ring = plane_ring(polar, "rhumb")
    >>> ring.pole, ring.xy[-3:].tolist()
    (1, [[360.0, 90.0], [0.0, 90.0], [0.0, 70.0]])
    """
    curves, winding = ring_curves(ring, edges)
    lat, lon, _, _, _ = curves.sample(STEP_M)
    xy = np.column_stack([lon, lat])
    # drop the repeated junction points between consecutive edges
    keep = np.ones(len(xy), dtype=bool)
    keep[1:] = np.any(np.diff(xy, axis=0) != 0.0, axis=1)
    xy = xy[keep]
    pole = 0
    if winding != 0:
        pole = 1 if float(np.mean(curves.lat1)) >= 0.0 else -1
        cap = 90.0 * pole
        xy = np.vstack([xy, [[xy[-1, 0], cap], [xy[0, 0], cap], xy[0]]])
    elif np.any(xy[-1] != xy[0]):
        xy = np.vstack([xy, xy[:1]])
    return PlaneRing(curves, xy, pole)


@dataclass(frozen=True, eq=False)
class AreaShape:
    """An area ready for crossing searches and inside tests.

    ``rings`` holds every ring of every part (edges for the root solver);
    ``union`` is the united plane geometry, covering longitudes
    ``[lon_min, lon_max]``; points are tested at λ + k·360 for every k that
    lands in that range.
    """

    area: Area
    rings: tuple[PlaneRing, ...]
    union: shapely.Geometry
    lon_min: float
    lon_max: float

    def _shifts(self) -> NDArray[np.float64]:
        return 360.0 * np.arange(-3, 4)

    def contains(self, lat: ArrayLike, lon: ArrayLike) -> NDArray[np.bool_]:
        """Strictly inside (boundary excluded), for arrays of points [deg]."""
        return self._test(shapely.contains_xy, lat, lon)

    def covers(self, lat: ArrayLike, lon: ArrayLike) -> NDArray[np.bool_]:
        """Inside or on the boundary, for arrays of points [deg]."""
        return self._test(shapely.intersects_xy, lat, lon)

    def _test(self, fn: Callable, lat: ArrayLike, lon: ArrayLike) -> NDArray[np.bool_]:
        lat = np.atleast_1d(np.asarray(lat, dtype=np.float64))
        lon = np.atleast_1d(np.asarray(lon, dtype=np.float64))
        out = np.zeros(lat.shape, dtype=bool)
        for k in self._shifts():
            x = lon + k
            near = (x >= self.lon_min - 1e-9) & (x <= self.lon_max + 1e-9) & ~out
            if np.any(near):
                out[near] = fn(self.union, x[near], lat[near])
        return out


def area_shape(area: Area) -> AreaShape:
    """Build the plane geometry of an area: all parts united, seams at 180° removed.

    Parameters
    ----------
    area : Area
        The area as loaded (rings of (lon, lat) [deg], its ``edges`` kind).

    Returns
    -------
    AreaShape
        Every ring (for the root solver) and the united plane geometry, with
        copies one turn either side, covering ``[lon_min, lon_max]`` [deg].
        Overlapping parts count once and holes are cut out.

    Examples
    --------
    A box split at 180° [RFC-7946] covers the seam once it is united:

    >>> from geo.area import Area, Polygon
    >>> from datetime import date
    >>> west = Polygon(((170.0, -10.0), (180.0, -10.0), (180.0, 10.0), (170.0, 10.0)))
    >>> east = Polygon(((-180.0, -10.0), (-170.0, -10.0), (-170.0, 10.0), (-180.0, 10.0)))
    >>> shape = area_shape(Area("A", 0.1, date(2020, 1, 1), (west, east), edges="rhumb"))
    >>> shape.contains([0.0, 0.0, 0.0], [180.0, -180.0, 160.0]).tolist()
    [True, True, False]
    """
    rings: list[PlaneRing] = []
    polys = []
    for poly in area.polygons:
        ext = plane_ring(poly.exterior, area.edges)
        holes = [plane_ring(h, area.edges) for h in poly.holes]
        rings.append(ext)
        rings.extend(holes)
        polys.append(shapely.Polygon(ext.xy, [h.xy for h in holes]))
    parts = shapely.make_valid(shapely.union_all(polys))
    lo, _, hi, _ = shapely.bounds(parts)
    # copies one turn either side let parts written on either side of 180° meet
    copies = [shapely.transform(parts, lambda c, k=k: c + [k, 0.0]) for k in (-360.0, 360.0)]
    union = shapely.union_all([parts, *copies])
    union = shapely.make_valid(union)
    shapely.prepare(union)
    return AreaShape(area, tuple(rings), union, float(lo) - 360.0, float(hi) + 360.0)
