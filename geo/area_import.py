"""Areas built from what users have (a list of positions, a GIS file), checked, as GeoJSON.

The two importers (:mod:`geo.area_list`, :mod:`geo.area_gis`) read positions;
this module makes them an :class:`Area` with its properties, checks it exactly
as :func:`geo.area_files.load_areas` checks a file (:func:`geo.area_checks.check_area`:
edges spanning 180° of longitude, self-intersection, more than a hemisphere,
holes), and writes the GeoJSON Feature the area loader reads back to the same
area [RFC-7946] [P]: rings closed, ``[lon, lat]`` in degrees, the properties
``name``, ``sulphur_limit_pct``, ``effective_from``, ``effective_until``,
``edges``, ``source`` and a ``note`` saying where the points came from.

Longitudes are written as read (within ±180), except with ``lonlat`` edges,
where a ring crossing 180° is written with longitudes continuing past it
(the loader accepts up to ±540°) so that its straight edges take the short
way; geodesic and rhumb edges take the shorter way whatever the turn.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass
from datetime import date

import numpy as np

from geo.area import EDGE_KINDS, Area, Polygon, Ring
from geo.area_checks import Text, check_area
from geo.area_list import PointList
from geo.errors import InputError

CAUTION = ("Imported by changeover; not the legal text. The official boundary and limit are "
           "those in MARPOL Annex VI and national law: check every point against them.")
"""Written into every imported area's ``note``."""


@dataclass(frozen=True)
class AreaProperties:
    """What a list does not say and the user gives: the area's properties.

    Attributes
    ----------
    name : the area's name
    sulphur_limit_pct : limit inside [% m/m], 0..100
    effective_from : first day in force (UTC)
    effective_until : last day in force (UTC), or None
    edges : how consecutive points are joined, one of :data:`geo.area.EDGE_KINDS`
    source : where the points came from (the input file)
    """

    name: str
    sulphur_limit_pct: float
    effective_from: date
    effective_until: date | None = None
    edges: str = "geodesic"
    source: str = ""

    def __post_init__(self) -> None:
        if self.edges not in EDGE_KINDS:
            raise ValueError(f"edges {self.edges!r} not one of {EDGE_KINDS}")


def list_area(points: PointList, props: AreaProperties, file: str) -> Area:
    """The checked area of a point list; a refusal names the list's point numbers."""
    ring: Ring = tuple((p.lon_deg, p.lat_deg) for p in points.points)
    ring = unwrap_lonlat(ring) if props.edges == "lonlat" else ring
    numbers = {(0, 0): [p.number for p in points.points]}
    return checked_area(props, (Polygon(ring),), file, "points", numbers)


def checked_area(props: AreaProperties, polygons: Sequence[Polygon], file: str, place: str,
                 numbers: dict[tuple[int, int], Sequence[int]] | None = None) -> Area:
    """An :class:`Area` of ``polygons`` with ``props``, checked as the area loader checks it.

    ``file`` and ``place`` (``"feature 2 'Alpha'"``) start every refusal;
    ``numbers[(polygon, ring)]`` are the vertex numbers to name (default 1, 2, ...).
    """
    try:
        area = Area(name=props.name, sulphur_limit_pct=props.sulphur_limit_pct,
                    effective_from=props.effective_from, polygons=tuple(polygons),
                    effective_until=props.effective_until, edges=props.edges,
                    source=props.source, file=file)
    except ValueError as e:
        raise InputError(file, place, Text(str(e)), "an area the loader accepts") from None
    return check_area(area, file=file, place=place, vertex_numbers=numbers)


def unwrap_lonlat(ring: Ring) -> Ring:
    """``ring`` [deg] with each longitude within 180° of the one before, when it still closes.

    A ring whose unwrapped longitudes do not come back round (one round a
    pole) is returned as given.
    """
    lon = np.array([p[0] for p in ring], dtype=np.float64)
    step = np.diff(lon)
    fixed = np.concatenate([[lon[0]], lon[0] + np.cumsum(step - 360.0 * np.round(step / 360.0))])
    closing = abs(fixed[0] - fixed[-1])
    if closing >= 180.0 or np.array_equal(fixed, lon):
        return ring
    if fixed.min() < -180.0:  # keep the ring's start within ±180 and go on eastwards
        fixed = fixed + 360.0
    return tuple((float(x), p[1]) for x, p in zip(fixed, ring, strict=True))


def area_feature(area: Area, note: str) -> dict:
    """The GeoJSON Feature of ``area`` that :func:`geo.area_files.load_areas` reads back."""
    props: dict[str, object] = {
        "name": area.name,
        "sulphur_limit_pct": area.sulphur_limit_pct,
        "effective_from": area.effective_from.isoformat(),
    }
    if area.effective_until is not None:
        props["effective_until"] = area.effective_until.isoformat()
    props.update(edges=area.edges, source=area.source, note=f"{note} {CAUTION}".strip())
    polygons = [[_closed(poly.exterior), *(_closed(h) for h in poly.holes)]
                for poly in area.polygons]
    geometry = ({"type": "Polygon", "coordinates": polygons[0]} if len(polygons) == 1
                else {"type": "MultiPolygon", "coordinates": polygons})
    return {"type": "Feature", "properties": props, "geometry": geometry}


def areas_document(features: Sequence[dict]) -> dict:
    """A FeatureCollection of imported areas."""
    return {"type": "FeatureCollection", "features": list(features)}


def refuse_duplicate_names(names: Sequence[str], file: str, places: Sequence[str]) -> None:
    """Refuse two areas of one import with the same name (compared ignoring case)."""
    seen: dict[str, str] = {}
    for name, place in zip(names, places, strict=True):
        key = name.casefold()
        if key in seen:
            raise InputError(file, place, name, f"a name not already used ({seen[key]} has it)")
        seen[key] = place


def _closed(ring: Ring) -> list[list[float]]:
    return [[float(x), float(y)] for x, y in ring] + [[float(ring[0][0]), float(ring[0][1])]]
