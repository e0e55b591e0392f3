"""A sulphur control area as the user supplied it: plain data, checked on creation.

Rings are lists of ``(lon, lat)`` vertices in degrees, open (the closing
vertex of the GeoJSON ring removed). How consecutive vertices are joined is
the area's ``edges``: ``"geodesic"`` (the default, as MARPOL Annex VI
Appendix VII defines its boundaries [MARPOL-VI] [P]), ``"rhumb"`` or
``"lonlat"`` (straight in longitude and latitude, the plain RFC 7946 reading
[RFC-7946]).

An area is in force from 00:00 UTC on ``effective_from`` up to the end
(24:00 UTC) of ``effective_until`` when that is given.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from datetime import UTC, date, datetime, time, timedelta

EDGE_KINDS = ("geodesic", "rhumb", "lonlat")

Ring = tuple[tuple[float, float], ...]


@dataclass(frozen=True)
class Polygon:
    """One polygon: an exterior ring and any holes, each an open ring of (lon, lat)."""

    exterior: Ring
    holes: tuple[Ring, ...] = ()

    def __post_init__(self) -> None:
        for ring in (self.exterior, *self.holes):
            if len(ring) < 3:
                raise ValueError("a ring needs at least three distinct vertices")

    @property
    def n_vertices(self) -> int:
        return len(self.exterior) + sum(len(h) for h in self.holes)


@dataclass(frozen=True)
class Area:
    """A sulphur control area.

    Attributes
    ----------
    name : unique among the areas loaded together
    sulphur_limit_pct : limit inside, % m/m
    effective_from : first day in force (UTC)
    effective_until : last day in force (UTC), or None
    edges : how vertices are joined, one of :data:`EDGE_KINDS`
    polygons : one or more polygons (MultiPolygon parts may overlap)
    source : where the user copied the coordinates from, free text
    file : the file it was loaded from
    """

    name: str
    sulphur_limit_pct: float
    effective_from: date
    polygons: tuple[Polygon, ...]
    effective_until: date | None = None
    edges: str = "geodesic"
    source: str = ""
    file: str = ""

    def __post_init__(self) -> None:
        if not self.name:
            raise ValueError("an area needs a name")
        if not (math.isfinite(self.sulphur_limit_pct) and 0.0 <= self.sulphur_limit_pct <= 100.0):
            raise ValueError(f"area {self.name!r}: limit {self.sulphur_limit_pct} % outside 0..100")
        if self.edges not in EDGE_KINDS:
            raise ValueError(f"area {self.name!r}: edges {self.edges!r} not one of {EDGE_KINDS}")
        if self.effective_until is not None and self.effective_until < self.effective_from:
            raise ValueError(f"area {self.name!r}: effective_until before effective_from")
        if not self.polygons:
            raise ValueError(f"area {self.name!r}: no polygon")

    def __getstate__(self) -> dict:
        """The fields only: the plane geometry kept beside them (:mod:`geo.plane`) is rebuilt."""
        return {k: v for k, v in self.__dict__.items() if not k.startswith("_")}

    @property
    def starts_utc(self) -> datetime:
        """The moment the area comes into force."""
        return datetime.combine(self.effective_from, time(0), tzinfo=UTC)

    @property
    def ends_utc(self) -> datetime | None:
        """The moment the area stops being in force, or None."""
        if self.effective_until is None:
            return None
        return datetime.combine(self.effective_until + timedelta(days=1), time(0), tzinfo=UTC)

    def in_force_at(self, moment: datetime) -> bool:
        """Whether the area is in force at a timezone-aware moment."""
        end = self.ends_utc
        return self.starts_utc <= moment and (end is None or moment < end)

    def in_force_on(self, day: date) -> bool:
        """Whether the area is in force at any time on a UTC calendar day."""
        return self.effective_from <= day and (
            self.effective_until is None or day <= self.effective_until
        )

    @property
    def n_vertices(self) -> int:
        return sum(p.n_vertices for p in self.polygons)
