"""Checks on a loaded area's geometry; each refusal is one :class:`InputError` line.

Run by :func:`geo.area_files.load_areas` on every area it builds. Per ring:

1. edges with no single meaning: a geodesic or rhumb edge whose longitude
   change is exactly ±180° (no shorter way: a geodesic between such points
   runs over a pole), and a rhumb edge to or from a pole other than along a
   meridian (a rhumb line spirals into a pole);
2. a ring that crosses or touches itself, found on the ring drawn in the
   unwrapped lon/lat plane (:func:`geo.plane.plane_ring`, edges sampled every
   200 m) with shapely; the message gives the place in degrees and minutes
   and the edges involved. A ring that winds round a pole more than once is
   refused too;
3. a ring enclosing more than a hemisphere (area in the equal-area plane,
   :mod:`geo.area_measure`; for a ring round a pole, the polar cap side);
   usually a polygon across 180° written with lonlat edges the long way.

Per polygon: every hole must lie inside its exterior (tested at whole turns
of longitude), must not go round a pole (the plane cannot cut a polar cap
out of a polar cap; a band between parallels is written as one ring), and
holes must not overlap each other (shared edges are fine). A hole lying
inside only a turn east or west, as when written on the other side of 180°,
is moved there (the same points on the Earth), so that the plane geometry
of :func:`geo.plane.area_shape` is built right.
"""

from __future__ import annotations

from collections import Counter
from collections.abc import Mapping, Sequence
from dataclasses import replace

import numpy as np
import shapely
from numpy.typing import NDArray

from geo.area import Area, Polygon, Ring
from geo.area_measure import EARTH_AREA_M2, HEMISPHERE_M2, plane_ring_area_m2
from geo.errors import InputError
from geo.plane import STEP_M, PlaneRing, plane_ring, remember_rings
from geo.position import format_lon, format_position
from geo.rhumb import wrap180


class Text:
    """A value already in words: InputError shows it as written, without quotes."""

    def __init__(self, text: str) -> None:
        self.text = text

    def __str__(self) -> str:
        return self.text

    def __repr__(self) -> str:
        return self.text


def _pos(lon: float, lat: float) -> str:
    return format_position(float(lat), float(lon))


def _join(*parts: str) -> str:
    return ", ".join(p for p in parts if p)


def check_area(
    area: Area,
    *,
    file: str = "",
    place: str = "",
    vertex_numbers: Mapping[tuple[int, int], Sequence[int]] | None = None,
    vertex_xy: Mapping[tuple[int, int], NDArray[np.float64]] | None = None,
) -> Area:
    """Check every ring and hole of ``area``; return it, holes moved by whole turns if needed.

    ``place`` prefixes every message (``"feature 3 'Corran Sea ECA'"``);
    ``vertex_numbers[(polygon, ring)]`` gives the vertex numbers as written
    in the file for each stored vertex (0-based polygon and ring indices,
    ring 0 the exterior); by default vertex k is number k + 1.
    ``vertex_xy[(polygon, ring)]``, when the caller has them, are the rings'
    vertices as (n, 2) arrays of (lon, lat) [deg] (saves converting them).
    Raises :class:`InputError` on the first problem found. The plane rings
    built here are kept with the returned area (:func:`geo.plane.area_rings`).
    """
    file = file or area.file
    polygons, planes, moved = [], [], False
    for pi, poly in enumerate(area.polygons):
        rings = []
        for ri, ring in enumerate((poly.exterior, *poly.holes)):
            where = _join(place, f"polygon {pi + 1}", f"ring {ri + 1}")
            xy = (vertex_xy or {}).get((pi, ri))
            xy = np.asarray(ring, dtype=np.float64) if xy is None else xy
            nums = (vertex_numbers or {}).get((pi, ri))
            nums = range(1, len(ring) + 1) if nums is None else nums
            check_edges(xy, area.edges, file, where, nums)
            pr = plane_ring(xy, area.edges)
            check_simple(pr, file, where, nums)
            check_hemisphere(pr, file, where, area.edges)
            rings.append(pr)
        holes = check_holes(poly, rings, file, _join(place, f"polygon {pi + 1}"))
        if holes is not poly.holes:
            moved = True
            rings[1:] = [plane_ring(h, area.edges) for h in holes]
        polygons.append(Polygon(poly.exterior, holes))
        planes.append(tuple(rings))
    checked = replace(area, polygons=tuple(polygons)) if moved else area
    remember_rings(checked, tuple(planes))
    return checked


def check_edges(ring: Ring | NDArray[np.float64], edges: str, file: str, where: str,
                nums: Sequence[int]) -> None:
    """Refuse edges without one meaning (see module notes). Lonlat edges are always literal.

    ``ring`` is an open ring of (lon, lat) [deg], as tuples or an (n, 2) array.
    """
    if edges == "lonlat":
        return
    xy = np.asarray(ring, dtype=np.float64)
    lon1, lat1 = xy[:, 0], xy[:, 1]
    lon2, lat2 = np.roll(lon1, -1), np.roll(lat1, -1)
    dlon = wrap180(lon2 - lon1)
    pole1, pole2 = np.abs(lat1) == 90.0, np.abs(lat2) == 90.0
    # a geodesic to a pole is the meridian of the other end; along the pole: as written
    into_pole = (pole1 != pole2) & (dlon != 0.0) if edges == "rhumb" else np.zeros_like(pole1)
    half_turn = ~pole1 & ~pole2 & (dlon == -180.0)
    bad = np.flatnonzero(into_pole | half_turn)
    if not len(bad):
        return
    i = int(bad[0])
    j = (i + 1) % len(xy)
    edge = f"edge from vertex {nums[i]} to vertex {nums[j]}"
    shown = Text(f"{_pos(lon1[i], lat1[i])} to {_pos(lon2[i], lat2[i])}")
    if into_pole[i]:
        raise InputError(
            file,
            _join(where, edge),
            shown,
            "a rhumb edge that reaches a pole along a meridian (a rhumb line "
            "spirals into a pole): write the pole as two vertices at 90° with "
            "the longitudes of its neighbours, or use geodesic edges",
        )
    why = (
        "a geodesic between such points runs over a pole"
        if edges == "geodesic"
        else "a rhumb line could go either way round"
    )
    raise InputError(
        file,
        _join(where, edge),
        shown,
        f"an edge changing longitude by less than 180° ({edges} edges take the "
        f"shorter way and here there is none; {why}): add a vertex between them",
    )


def _crossings(xy: np.ndarray) -> list[tuple[float, float]]:
    """Points where a closed plane ring crosses, touches or overlaps itself."""
    noded = shapely.unary_union(shapely.LineString(xy))
    ends: Counter[tuple[float, float]] = Counter()
    for part in shapely.get_parts(noded):
        c = shapely.get_coordinates(part)
        for x, y in (c[0], c[-1]):
            ends[(round(float(x), 9), round(float(y), 9))] += 1
    points = [p for p, k in ends.items() if k > 2]
    if not points:  # fall back on GEOS's own report
        reason = shapely.is_valid_reason(shapely.Polygon(xy))
        inside = reason[reason.find("[") + 1 : reason.rfind("]")].split()
        points = [(float(inside[0]), float(inside[1]))] if len(inside) == 2 else [tuple(xy[0])]
    return points


def check_simple(pr: PlaneRing, file: str, where: str, nums: Sequence[int]) -> None:
    """Refuse a ring that crosses or touches itself in the plane, naming where and which edges."""
    turns = abs(round(float(np.sum(pr.edges.lon2 - pr.edges.lon1)) / 360.0))
    if turns > 1:
        raise InputError(
            file,
            where,
            Text(f"winds {turns} times round the pole"),
            "a ring that goes round a pole at most once",
        )
    if shapely.LinearRing(pr.xy).is_simple:
        return
    lon0, lat0 = _crossings(pr.xy)[0]
    lat, lon, idx, _, _ = pr.curves.sample(STEP_M)
    lines = shapely.linestrings(np.column_stack([lon, lat]), indices=idx)
    near = np.flatnonzero(shapely.distance(lines, shapely.Point(lon0, lat0)) < 1e-7)
    which = ", ".join(f"{nums[int(k)]}" for k in near)
    edges = f" (edges starting at vertices {which})" if len(near) else ""
    raise InputError(
        file,
        where,
        Text(f"crosses or touches itself at {_pos(lon0, lat0)}{edges}"),
        "a ring whose edges meet only at its vertices, one after another",
    )


def check_hemisphere(pr: PlaneRing, file: str, where: str, edges: str) -> None:
    """Refuse a ring enclosing more than half the ellipsoid (equal-area plane, m²)."""
    area_m2 = plane_ring_area_m2(pr.xy)
    if area_m2 <= HEMISPHERE_M2:
        return
    if edges == "lonlat":
        advice = (
            "; with lonlat edges a polygon written across 180° goes the long way round: "
            "split it at 180° or continue longitudes past 180"
        )
    else:
        advice = ": check the vertices (an area is the smaller side of its ring)"
    size = f"{area_m2 / 1e6:,.0f}".replace(",", " ")
    raise InputError(
        file,
        where,
        Text(f"encloses {size} km², {100 * area_m2 / EARTH_AREA_M2:.0f} % of the Earth"),
        "a ring enclosing at most a hemisphere" + advice,
    )


def _plane_polygon(pr: PlaneRing, shift_turns: int = 0) -> shapely.Polygon:
    return shapely.Polygon(pr.xy + np.array([360.0 * shift_turns, 0.0]))


_SLIVER = 1e-9
"""Area ratio (in the plane) below which an overlap is round-off along a shared edge."""


def _sliver(part: shapely.Geometry, whole: shapely.Geometry) -> bool:
    return bool(shapely.area(part) <= _SLIVER * shapely.area(whole))


def check_holes(
    poly: Polygon, planes: Sequence[PlaneRing], file: str, where: str
) -> tuple[Ring, ...]:
    """Refuse holes outside their exterior or overlapping; return the holes, moved if needed.

    Holes may share edges or points with the exterior and with each other. The
    holes are returned as given (the same tuple) when none is moved.
    """
    if not poly.holes:
        return poly.holes
    shell = _plane_polygon(planes[0])
    shapely.prepare(shell)
    moved: list[Ring] = []
    placed: list[shapely.Polygon] = []
    for hi, (hole, pr) in enumerate(zip(poly.holes, planes[1:], strict=True)):
        here = _join(where, f"ring {hi + 2} (hole {hi + 1})")
        if pr.pole:
            raise InputError(
                file,
                here,
                Text("goes round the pole"),
                "a hole that does not go round a pole: write a band between two parallels "
                "as one ring (along one parallel, up a meridian, back along the other, "
                "down the same meridian)",
            )
        turn, hole_poly = _turn_inside(shell, pr)
        if turn is None:
            _refuse_outside(planes[0], hole_poly, file, here)
        _refuse_overlap(hole_poly, placed, file, here)
        placed.append(hole_poly)
        moved.append(hole if turn == 0 else tuple((lon + 360.0 * turn, lat) for lon, lat in hole))
    return poly.holes if all(m is h for m, h in zip(moved, poly.holes, strict=True)) \
        else tuple(moved)


def _turn_inside(shell: shapely.Polygon,
                 pr: PlaneRing) -> tuple[int | None, shapely.Polygon]:
    """The turn (0, -1, 1, -2, 2) that puts a hole inside the shell, and the hole moved there."""
    for k in (0, -1, 1, -2, 2):
        shifted = _plane_polygon(pr, k)
        if shapely.covers(shell, shifted) or (
            shapely.intersects(shell, shifted)
            and _sliver(shapely.difference(shifted, shell), shifted)
        ):
            return k, shifted
    return None, _plane_polygon(pr)


def _refuse_outside(shell: PlaneRing, hole_poly: shapely.Polygon, file: str, here: str) -> None:
    """Refuse a hole lying outside its exterior at every turn, saying where."""
    shell_turns = shapely.union_all([_plane_polygon(shell, k) for k in range(-2, 3)])
    outside = shapely.difference(hole_poly, shell_turns)
    if _sliver(outside, hole_poly):
        raise InputError(
            file,
            here,
            Text(
                f"crosses longitude {format_lon(float(shell.xy[0, 0]))} where "
                "the exterior ring round the pole starts"
            ),
            "a hole not crossing the start of its exterior ring: start the "
            "exterior ring at another vertex",
        )
    p = shapely.get_coordinates(shapely.point_on_surface(outside))[0]
    raise InputError(
        file,
        here,
        Text(f"reaches outside its exterior, e.g. at {_pos(p[0], p[1])}"),
        "a hole that lies inside the exterior ring (ring 1) of its polygon",
    )


def _refuse_overlap(hole_poly: shapely.Polygon, placed: Sequence[shapely.Polygon], file: str,
                    here: str) -> None:
    """Refuse a hole overlapping one placed before it (only those whose boxes meet are tried)."""
    if not placed:
        return
    x0, y0, x1, y1 = shapely.bounds(hole_poly)
    b = shapely.bounds(np.asarray(placed, dtype=object))
    near = (b[:, 0] <= x1) & (b[:, 2] >= x0) & (b[:, 1] <= y1) & (b[:, 3] >= y0)
    for hj in np.flatnonzero(near).tolist():
        other = placed[hj]
        if not shapely.intersects(hole_poly, other):
            continue
        common = shapely.intersection(hole_poly, other)
        if not _sliver(common, hole_poly):
            p = shapely.get_coordinates(shapely.point_on_surface(common))[0]
            raise InputError(
                file,
                here,
                Text(f"overlaps hole {hj + 1} at {_pos(p[0], p[1])}"),
                "holes that do not overlap each other",
            )
