"""A planned route: waypoints joined by legs, as loaded from any route file.

Plain data, checked on creation. Latitudes and longitudes in degrees
(longitude as written, any value; sailings take the shorter way). The leg
type, speed and schedule of a waypoint describe the leg that *arrives* at it
(the convention of IEC 61174 RTZ [IEC-61174-RTZ] [M] and of our CSV), so the
first waypoint's are ignored.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from datetime import datetime

LEG_KINDS = ("rhumb", "great_circle")


@dataclass(frozen=True)
class Waypoint:
    """One waypoint.

    Attributes
    ----------
    name : as in the file (may be empty)
    lat, lon : degrees, WGS84
    leg : ``"rhumb"`` or ``"great_circle"``, the leg arriving here
    speed_kn : planned speed over ground on the leg arriving here, knots, or None
    eta_utc, etd_utc : scheduled arrival / departure here, timezone-aware, or None
    """

    name: str
    lat: float
    lon: float
    leg: str = "rhumb"
    speed_kn: float | None = None
    eta_utc: datetime | None = None
    etd_utc: datetime | None = None

    def __post_init__(self) -> None:
        if not (math.isfinite(self.lat) and -90.0 <= self.lat <= 90.0):
            raise ValueError(f"waypoint {self.name!r}: latitude {self.lat} outside -90..90")
        if not math.isfinite(self.lon):
            raise ValueError(f"waypoint {self.name!r}: longitude {self.lon} is not a number")
        if self.leg not in LEG_KINDS:
            raise ValueError(f"waypoint {self.name!r}: leg {self.leg!r} is not one of {LEG_KINDS}")
        if self.speed_kn is not None and not (math.isfinite(self.speed_kn) and self.speed_kn > 0):
            raise ValueError(f"waypoint {self.name!r}: speed {self.speed_kn} kn must be > 0")
        for t in (self.eta_utc, self.etd_utc):
            if t is not None and t.tzinfo is None:
                raise ValueError(f"waypoint {self.name!r}: time {t} has no UTC offset")


@dataclass(frozen=True)
class Route:
    """A route of at least two waypoints; ``source`` is the file it came from."""

    name: str
    waypoints: tuple[Waypoint, ...]
    source: str = ""
    meta: dict = field(default_factory=dict, compare=False)

    def __post_init__(self) -> None:
        if len(self.waypoints) < 2:
            raise ValueError(f"route {self.name!r}: needs at least two waypoints")

    @property
    def n_legs(self) -> int:
        return len(self.waypoints) - 1
