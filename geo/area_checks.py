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

from geo.area import Area, Polygon, Ring
from geo.area_measure import EARTH_AREA_M2, HEMISPHERE_M2, plane_ring_area_m2
from geo.errors import InputError
from geo.plane import STEP_M, PlaneRing, plane_ring
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
) -> Area:
    """Check every ring and hole of ``area``; return it, holes moved by whole turns if needed.

    ``place`` prefixes every message (``"feature 3 'Corran Sea ECA'"``);
    ``vertex_numbers[(polygon, ring)]`` gives the vertex numbers as written
    in the file for each stored vertex (0-based polygon and ring indices,
    ring 0 the exterior); by default vertex k is number k + 1.
    Raises :class:`InputError` on the first problem found.
    """
    file = file or area.file
    polygons = []
    for pi, poly in enumerate(area.polygons):
        planes = []
        for ri, ring in enumerate((poly.exterior, *poly.holes)):
            where = _join(place, f"polygon {pi + 1}", f"ring {ri + 1}")
            nums = list((vertex_numbers or {}).get((pi, ri), range(1, len(ring) + 1)))
            check_edges(ring, area.edges, file, where, nums)
            pr = plane_ring(ring, area.edges)
            check_simple(pr, file, where, nums)
            check_hemisphere(pr, file, where, area.edges)
            planes.append(pr)
        holes = check_holes(poly, planes, file, _join(place, f"polygon {pi + 1}"))
        polygons.append(Polygon(poly.exterior, holes))
    return replace(area, polygons=tuple(polygons))


def check_edges(ring: Ring, edges: str, file: str, where: str, nums: Sequence[int]) -> None:
    """Refuse edges without one meaning (see module notes). Lonlat edges are always literal."""
    if edges == "lonlat":
        return
    n = len(ring)
    for i in range(n):
        (lon1, lat1), (lon2, lat2) = ring[i], ring[(i + 1) % n]
        dlon = float(wrap180(lon2 - lon1))
        at_pole = (abs(lat1) == 90.0, abs(lat2) == 90.0)
        edge = f"edge from vertex {nums[i]} to vertex {nums[(i + 1) % n]}"
        shown = Text(f"{_pos(lon1, lat1)} to {_pos(lon2, lat2)}")
        if all(at_pole):
            continue  # along the pole, taken as written
        if any(at_pole):
            if edges == "rhumb" and dlon != 0.0:
                raise InputError(
                    file,
                    _join(where, edge),
                    shown,
                    "a rhumb edge that reaches a pole along a meridian (a rhumb line "
                    "spirals into a pole): write the pole as two vertices at 90° with "
                    "the longitudes of its neighbours, or use geodesic edges",
                )
            continue  # a geodesic to a pole is the meridian of the other end
        if dlon == -180.0:
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
    turns = abs(round(float(np.sum(pr.curves.lon2 - pr.curves.lon1)) / 360.0))
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

    Holes may share edges or points with the exterior and with each other.
    """
    shell = _plane_polygon(planes[0])
    shell_turns = shapely.union_all([_plane_polygon(planes[0], k) for k in range(-2, 3)])
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
        turn, hole_poly = None, _plane_polygon(pr)
        for k in (0, -1, 1, -2, 2):
            shifted = _plane_polygon(pr, k)
            if shapely.intersects(shell, shifted) and _sliver(
                shapely.difference(shifted, shell), shifted
            ):
                turn, hole_poly = k, shifted
                break
        if turn is None:
            outside = shapely.difference(hole_poly, shell_turns)
            if _sliver(outside, hole_poly):
                raise InputError(
                    file,
                    here,
                    Text(
                        f"crosses longitude {format_lon(float(planes[0].xy[0, 0]))} where "
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
        for hj, other in enumerate(placed):
            common = shapely.intersection(hole_poly, other)
            if not _sliver(common, hole_poly):
                p = shapely.get_coordinates(shapely.point_on_surface(common))[0]
                raise InputError(
                    file,
                    here,
                    Text(f"overlaps hole {hj + 1} at {_pos(p[0], p[1])}"),
                    "holes that do not overlap each other",
                )
        placed.append(hole_poly)
        moved.append(tuple((lon + 360.0 * turn, lat) for lon, lat in hole))
    return tuple(moved)
