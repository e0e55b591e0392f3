"""When the ship is where: times along a route from a departure and speeds or ETAs.

Each leg is sailed at constant speed over ground. A leg's arrival is its
scheduled ETA when the route file gives one (an RTZ schedule), otherwise the
departure from the previous waypoint plus leg length / speed (the leg's own
speed, else the default speed). A scheduled ETD later than the arrival is a
stop at that waypoint. Times are timezone-aware UTC; inside, seconds since
the Unix epoch as floats.
"""

from __future__ import annotations

from dataclasses import dataclass
from datetime import UTC, datetime

import numpy as np
from numpy.typing import ArrayLike, NDArray

from geo.ellipsoid import NM_M
from geo.errors import InputError
from geo.path import RoutePath


def to_epoch(moment: datetime) -> float:
    """Seconds since 1970-01-01T00:00Z of a timezone-aware datetime."""
    if moment.tzinfo is None:
        raise ValueError(f"{moment} has no UTC offset")
    return moment.timestamp()


def from_epoch(seconds: float) -> datetime:
    """Timezone-aware UTC datetime from seconds since the epoch."""
    return datetime.fromtimestamp(float(seconds), tz=UTC)


@dataclass(frozen=True, eq=False)
class Schedule:
    """Piecewise-linear time against distance along a route.

    ``knot_m`` is non-decreasing (a stop repeats a distance), ``knot_s``
    (epoch seconds) strictly increasing; ``leg_speed_kn[i]`` is leg ``i``'s speed.
    """

    path: RoutePath
    knot_m: NDArray[np.float64]
    knot_s: NDArray[np.float64]
    leg_speed_kn: NDArray[np.float64]

    @property
    def depart_utc(self) -> datetime:
        return from_epoch(self.knot_s[0])

    @property
    def arrive_utc(self) -> datetime:
        return from_epoch(self.knot_s[-1])

    def epoch_at(self, distance_m: ArrayLike) -> NDArray[np.float64]:
        """Epoch seconds when the ship reaches each distance (first arrival at a stop)."""
        d = np.clip(np.asarray(distance_m, dtype=np.float64), 0.0, self.path.length_m)
        k = np.clip(np.searchsorted(self.knot_m, d, side="left"), 1, len(self.knot_m) - 1)
        d0, d1 = self.knot_m[k - 1], self.knot_m[k]
        t0, t1 = self.knot_s[k - 1], self.knot_s[k]
        with np.errstate(divide="ignore", invalid="ignore"):
            f = np.where(d1 > d0, (d - d0) / (d1 - d0), 1.0)
        return t0 + f * (t1 - t0)

    def time_at(self, distance_m: float) -> datetime:
        """UTC time when the ship reaches ``distance_m`` along the route."""
        return from_epoch(self.epoch_at([distance_m])[0])

    def distance_at_epoch(self, seconds: ArrayLike) -> NDArray[np.float64]:
        """Distance along the route (m) at epoch seconds (clamped to the voyage)."""
        return np.interp(np.asarray(seconds, dtype=np.float64), self.knot_s, self.knot_m)

    def hours_between(self, from_m: float, to_m: float) -> float:
        """Hours from reaching ``from_m`` to reaching ``to_m``."""
        t = self.epoch_at([from_m, to_m])
        return float(t[1] - t[0]) / 3600.0


def make_schedule(path: RoutePath, depart_utc: datetime | None,
                  speed_kn: float | None) -> Schedule | None:
    """Times along the route, or None when there is no departure time at all.

    The departure is ``depart_utc``, else the first waypoint's ETD or ETA.
    A leg with neither an ETA nor any speed is an ``InputError``.
    """
    wps = path.route.waypoints
    start = depart_utc or wps[0].etd_utc or wps[0].eta_utc
    if start is None:
        return None
    if speed_kn is not None and not speed_kn > 0:
        raise InputError("--speed", "", speed_kn, "a speed above 0 kn")
    knot_m = [0.0]
    knot_s = [to_epoch(start)]
    speeds = []
    for i, length in enumerate(path.curves.length_m):
        wp = wps[i + 1]
        dep = knot_s[-1]
        if wp.eta_utc is not None:
            arr = to_epoch(wp.eta_utc)
            if arr <= dep:
                raise InputError(path.route.source, f"waypoint {i + 2} {wp.name!r} ETA",
                                 wp.eta_utc.isoformat(), "an ETA after the departure from the "
                                 "previous waypoint")
            speeds.append(length / NM_M / ((arr - dep) / 3600.0))
        else:
            v = wp.speed_kn or speed_kn
            if v is None:
                raise InputError(path.route.source, f"leg {i + 1} (to {wp.name!r})", None,
                                 "a speed: give --speed KN or a speed per leg in the route")
            speeds.append(v)
            arr = dep + length / NM_M / v * 3600.0
        knot_m.append(float(path.start_m[i] + length))
        knot_s.append(arr)
        if wp.etd_utc is not None and to_epoch(wp.etd_utc) > arr and i + 1 < len(wps) - 1:
            knot_m.append(knot_m[-1])
            knot_s.append(to_epoch(wp.etd_utc))
    return Schedule(path, np.array(knot_m), np.array(knot_s), np.array(speeds))
