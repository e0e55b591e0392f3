"""An area drawn in the unwrapped longitude-latitude plane, for inside tests and searches.

Each ring's edges (geodesic, rhumb or lonlat) become :class:`geo.curves.Curves`
and are sampled every :data:`STEP_M` into a plane ring of (lon, lat) with
the longitude unwrapped along the ring. A ring whose longitude winds through
±360° circles a pole; it is closed along that pole (the one on the side of
its mean latitude) so that it bounds the polar cap in the plane. Rings are
then shapely polygons; the parts of an area, and its copies shifted by
±360°, are united, which removes the seams of polygons split at 180°
and the overlaps of MultiPolygon parts.

An edge no longer than the step has its two vertices as its only samples,
so its exact curve is computed only if a route meets it (:mod:`geo.edges`).
The plane rings of an area are built once, by the checks on loading, and
kept with it (:func:`area_rings`); :func:`area_shape` unites them and
returns the same shape while it is in use.

Sampling error: a chord of length L deviates from the curve it samples by
about L²/(8R) (the sagitta, common practice); with L = 200 m and R down to
~560 km (a rhumb line at 85° latitude seen in the plane) that is under 1 cm.
Crossings themselves are never taken from the plane: they are solved on the
true curves (:mod:`geo.roots`). Polygons, unions and inside tests are
shapely's (GEOS).
"""

from __future__ import annotations

import weakref
from collections.abc import Callable
from dataclasses import dataclass
from functools import cached_property

import numpy as np
import shapely
from numpy.typing import ArrayLike, NDArray

from geo.area import Area, Ring
from geo.curves import KIND_CODES, Curves
from geo.edges import Edges, concat_edges
from geo.search import AREA_RUN, Chords, chords
from geo.search import STEP_M as SEARCH_STEP_M

STEP_M = 200.0
"""Sampling step along the true edges [m]."""


@dataclass(frozen=True, eq=False)
class PlaneRing:
    """One ring: its edges and its closed plane outline.

    ``edges`` holds the ring's edges (:class:`geo.edges.Edges`; ``curves`` their
    exact curves, built on first use). ``xy`` [deg] is closed (first point
    repeated last), longitude first. ``pole`` is +1 / -1 when the ring circles
    the north / south pole, else 0.
    """

    edges: Edges
    xy: NDArray[np.float64]
    pole: int

    @property
    def curves(self) -> Curves:
        """The exact edge curves (:meth:`geo.edges.Edges.curves`)."""
        return self.edges.curves


def ring_curves(ring: Ring | NDArray[np.float64], edges: str) -> tuple[Curves, int]:
    """The edge curves of an open ring and its winding: 0, or ±1 around a pole.

    Parameters
    ----------
    ring : Ring or ndarray of float [deg]
        Open ring of (lon, lat) vertices (the closing vertex left out), as
        tuples or an (n, 2) array.
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
    ends, winding = ring_edges(ring, edges)
    return ends.curves, winding


def ring_edges(ring: Ring | NDArray[np.float64], edges: str) -> tuple[Edges, int]:
    """The edges of an open ring, as :func:`ring_curves` joins them, without their curves yet.

    Parameters
    ----------
    ring, edges : Ring or ndarray of float [deg], and str
        The vertices and how they are joined, as for :func:`plane_ring`.

    Returns
    -------
    ends : Edges
        The ends of every edge [deg], longitudes unwrapped along the ring.
    winding : int [-]
        Turns of longitude round the ring: 0, or ±1 for a ring round a pole.
    """
    xy = np.asarray(ring, dtype=np.float64)
    lon, lat = xy[:, 0], xy[:, 1]
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
    return Edges(kind, lat, lon_u, lat_next, lon_end), winding


def plane_ring(ring: Ring | NDArray[np.float64], edges: str) -> PlaneRing:
    """Sample a ring into the plane (see the module notes), closing it at a pole if it circles one.

    Parameters
    ----------
    ring : Ring or ndarray of float [deg]
        Open ring of (lon, lat) vertices, as tuples or an (n, 2) array.
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
    ends, winding = ring_edges(ring, edges)
    lat, lon, _, _, _ = ends.sample_fractions(STEP_M)
    xy = np.column_stack([lon, lat])
    # drop the repeated junction points between consecutive edges
    keep = np.ones(len(xy), dtype=bool)
    keep[1:] = (lon[1:] != lon[:-1]) | (lat[1:] != lat[:-1])
    xy = xy[keep]
    pole = 0
    if winding != 0:
        pole = 1 if float(np.mean(ends.lat1)) >= 0.0 else -1
        cap = 90.0 * pole
        xy = np.vstack([xy, [[xy[-1, 0], cap], [xy[0, 0], cap], xy[0]]])
    elif np.any(xy[-1] != xy[0]):
        xy = np.vstack([xy, xy[:1]])
    return PlaneRing(ends, xy, pole)


@dataclass(frozen=True, eq=False)
class AreaShape:
    """An area ready for crossing searches and inside tests.

    ``rings`` holds every ring of every part (edges for the root solver);
    ``parts`` is the parts united; ``union`` (built on first use) is that with
    copies a turn either side, covering longitudes ``[lon_min, lon_max]``.
    Points are tested at λ + k·360 for every k that lands in that range; when
    the parts span less than a turn (``apart``: their copies cannot meet
    them), they are tested against ``parts`` alone at the k that land in its
    own span, the same answer on a third of the outline.
    """

    area: Area
    rings: tuple[PlaneRing, ...]
    parts: shapely.Geometry
    lon_min: float
    lon_max: float
    apart: bool

    @cached_property
    def union(self) -> shapely.Geometry:
        """The parts and their copies a turn either side, united (seams at 180° removed)."""
        copies = [shapely.transform(self.parts, lambda c, k=k: c + [k, 0.0])
                  for k in (-360.0, 360.0)]
        if self.apart:  # the copies cannot meet the parts: no overlay needed
            union = shapely.multipolygons([p for g in (self.parts, *copies) for p in _polygons(g)])
        else:  # parts written on either side of 180° meet their neighbours' copies
            union = shapely.make_valid(shapely.union_all([self.parts, *copies]))
        shapely.prepare(union)
        return union

    def tested(self) -> tuple[shapely.Geometry, float, float]:
        """The geometry points are tested against and its span of longitude [deg]."""
        if self.apart:
            return self.parts, self.lon_min + 360.0, self.lon_max - 360.0
        return self.union, self.lon_min, self.lon_max

    @cached_property
    def boundary(self) -> shapely.Geometry:
        """The outline of :meth:`tested`'s geometry, prepared for distance tests."""
        line = shapely.boundary(self.tested()[0])
        shapely.prepare(line)
        return line

    @cached_property
    def edges(self) -> Edges:
        """Every ring's edges, ring after ring (as in ``rings``)."""
        return concat_edges([r.edges for r in self.rings])

    @property
    def edge_curves(self) -> Curves:
        """Every ring's exact edge curves, ring after ring (built on first use)."""
        return self.edges.curves

    @cached_property
    def search_chords(self) -> Chords:
        """The edges' chords for the crossing search (:func:`geo.search.chords`)."""
        return chords(self.edges, SEARCH_STEP_M, AREA_RUN)

    def contains(self, lat: ArrayLike, lon: ArrayLike) -> NDArray[np.bool_]:
        """Strictly inside (boundary excluded), for arrays of points [deg]."""
        return self._test(shapely.contains_xy, lat, lon)

    def covers(self, lat: ArrayLike, lon: ArrayLike) -> NDArray[np.bool_]:
        """Inside or on the boundary, for arrays of points [deg]."""
        return self._test(shapely.intersects_xy, lat, lon)

    def _test(self, fn: Callable, lat: ArrayLike, lon: ArrayLike) -> NDArray[np.bool_]:
        lat = np.atleast_1d(np.asarray(lat, dtype=np.float64))
        lon = np.atleast_1d(np.asarray(lon, dtype=np.float64))
        geom, lo, hi = self.tested()
        out = np.zeros(lat.shape, dtype=bool)
        for k in 360.0 * np.arange(-3, 4):
            x = lon + k
            near = (x >= lo - 1e-9) & (x <= hi + 1e-9) & ~out
            if np.any(near):
                out[near] = fn(geom, x[near], lat[near])
        return out


def remember_rings(area: Area, rings: tuple[tuple[PlaneRing, ...], ...]) -> None:
    """Keep the plane rings of an area with it, for :func:`area_rings` to return.

    Parameters
    ----------
    area : Area
        The area (frozen data: the rings are kept beside its fields, not
        compared, not shown, and not carried over by ``dataclasses.replace``).
    rings : tuple of tuple of PlaneRing
        Per polygon, its exterior then its holes, built from exactly these
        vertices and ``area.edges``.
    """
    object.__setattr__(area, _RINGS, rings)


def area_rings(area: Area) -> tuple[tuple[PlaneRing, ...], ...]:
    """The plane rings of every polygon, built once per area (the checks on loading build them).

    Parameters
    ----------
    area : Area
        The area as loaded or built.

    Returns
    -------
    tuple of tuple of PlaneRing
        Per polygon, :func:`plane_ring` of its exterior then of each hole.
    """
    rings = area.__dict__.get(_RINGS)
    if rings is None:
        rings = tuple(tuple(plane_ring(r, area.edges) for r in (p.exterior, *p.holes))
                      for p in area.polygons)
        remember_rings(area, rings)
    return rings


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
        Overlapping parts count once and holes are cut out. The same shape
        is returned for an area while it is in use (the plane rings are kept
        with the area for good).

    Notes
    -----
    Parts whose boxes meet are united by GEOS (``shapely.union_all``, then
    ``make_valid``); a part meeting no other is taken as it is when valid.
    The copies a turn either side are added on first use of ``union``, simply
    side by side when they cannot meet the parts (the parts span less than a
    turn).

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
    kept = area.__dict__.get(_SHAPE)
    shape = kept() if kept is not None else None
    if shape is None:
        per_polygon = area_rings(area)
        rings = tuple(r for group in per_polygon for r in group)
        parts = _united([shapely.Polygon(g[0].xy, [h.xy for h in g[1:]]) for g in per_polygon])
        shapely.prepare(parts)
        lo, _, hi, _ = shapely.bounds(parts)
        shape = AreaShape(area, rings, parts, float(lo) - 360.0, float(hi) + 360.0,
                          bool(hi - lo < _APART_DEG))
        # a weak reference: the shape refers to the area, and a cycle would keep a big
        # area set alive until the garbage collector runs
        object.__setattr__(area, _SHAPE, weakref.ref(shape))
    return shape


_RINGS, _SHAPE = "_plane_rings", "_area_shape"
_APART_DEG = 359.99
"""Parts spanning less longitude than this [deg] cannot meet their copies a turn away."""


def _polygons(geom: shapely.Geometry) -> list[shapely.Geometry]:
    """The polygons of a polygonal geometry (empty parts dropped)."""
    return [g for g in shapely.get_parts(geom) if g.geom_type == "Polygon" and not g.is_empty]


def _united(polys: list[shapely.Polygon]) -> shapely.Geometry:
    """The union of the parts: GEOS only on groups whose boxes meet (or on invalid parts)."""
    if len(polys) == 1 and shapely.is_valid(polys[0]):
        return polys[0]
    tree = shapely.STRtree(polys)
    left, right = tree.query(polys)  # pairs whose boxes meet, each part with itself too
    group = np.arange(len(polys))
    for a, b in zip(left.tolist(), right.tolist(), strict=True):
        ra, rb = _root(group, a), _root(group, b)
        if ra != rb:
            group[max(ra, rb)] = min(ra, rb)
    roots = np.array([_root(group, i) for i in range(len(polys))])
    out = []
    for r in np.unique(roots).tolist():
        members = [polys[i] for i in np.flatnonzero(roots == r).tolist()]
        if len(members) == 1 and shapely.is_valid(members[0]):
            out.append(members[0])
        else:
            out.extend(_polygons(shapely.make_valid(shapely.union_all(members))))
    return out[0] if len(out) == 1 else shapely.multipolygons(out)


def _root(group: NDArray[np.int64], i: int) -> int:
    while group[i] != i:
        i = int(group[i])
    return i
