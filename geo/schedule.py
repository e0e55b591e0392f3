"""When the ship is where: times along a route from a departure and speeds or ETAs.

Each leg is sailed at constant speed over ground. A leg's arrival is its
scheduled ETA when the route file gives one (an RTZ schedule), otherwise the
departure from the previous waypoint plus leg length / speed (the leg's own
speed, else the default speed). A scheduled ETD later than the arrival is a
stop at that waypoint. Moments are timezone-aware UTC datetimes (``*_utc``) at
the edges; inside, floats of seconds since 1970-01-01T00:00Z (``*_epoch_s``,
"epoch seconds"). Lengths in metres, speeds in knots (1 kn = 1852 m/h
[NM-1852] [P]).
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
    """Epoch seconds of a timezone-aware datetime.

    Parameters
    ----------
    moment : datetime
        A moment with its UTC offset (any offset, not only UTC).

    Returns
    -------
    float [s since 1970-01-01 UTC]
        The same moment as epoch seconds.

    Raises
    ------
    ValueError
        When ``moment`` is naive (no UTC offset).

    Examples
    --------
    2020-01-01T00:00Z is 18262 days of 86400 s after the epoch [D]:

    >>> to_epoch(datetime(2020, 1, 1, tzinfo=UTC))
    1577836800.0
    """
    if moment.tzinfo is None:
        raise ValueError(f"{moment} has no UTC offset")
    return moment.timestamp()


def from_epoch(moment_epoch_s: float) -> datetime:
    """Timezone-aware UTC datetime of epoch seconds: the inverse of :func:`to_epoch`.

    Parameters
    ----------
    moment_epoch_s : float [s since 1970-01-01 UTC]
        A moment as epoch seconds.

    Returns
    -------
    datetime
        The same moment, timezone-aware, in UTC.

    Examples
    --------
    >>> from_epoch(1577836800.0)
    datetime.datetime(2020, 1, 1, 0, 0, tzinfo=datetime.timezone.utc)
    """
    return datetime.fromtimestamp(float(moment_epoch_s), tz=UTC)


@dataclass(frozen=True, eq=False)
class Schedule:
    """Piecewise-linear time against distance along a route.

    ``knot_m`` [m] along the route is non-decreasing (a stop repeats a
    distance); ``knot_epoch_s`` holds the moments at those knots, epoch seconds
    [s since 1970-01-01 UTC], strictly increasing (named like a duration, but
    a moment: the name is kept because planner reads it); ``leg_speed_kn[i]``
    is leg ``i``'s speed over ground [kn].
    """

    path: RoutePath
    knot_m: NDArray[np.float64]
    knot_epoch_s: NDArray[np.float64]
    leg_speed_kn: NDArray[np.float64]

    @property
    def depart_utc(self) -> datetime:
        """Departure, UTC datetime."""
        return from_epoch(self.knot_epoch_s[0])

    @property
    def arrive_utc(self) -> datetime:
        """Arrival at the last waypoint, UTC datetime."""
        return from_epoch(self.knot_epoch_s[-1])

    def epoch_at(self, distance_m: ArrayLike) -> NDArray[np.float64]:
        """When the ship reaches distances along the route [m], as epoch seconds.

        Returns moments [s since 1970-01-01 UTC], linear in distance on each
        leg; at a stop, the first arrival. Distances are clamped to the route.
        """
        d = np.clip(np.asarray(distance_m, dtype=np.float64), 0.0, self.path.length_m)
        k = np.clip(np.searchsorted(self.knot_m, d, side="left"), 1, len(self.knot_m) - 1)
        d0, d1 = self.knot_m[k - 1], self.knot_m[k]
        t0, t1 = self.knot_epoch_s[k - 1], self.knot_epoch_s[k]
        with np.errstate(divide="ignore", invalid="ignore"):
            f = np.where(d1 > d0, (d - d0) / (d1 - d0), 1.0)
        return t0 + f * (t1 - t0)

    def time_at(self, distance_m: float) -> datetime:
        """When the ship reaches ``distance_m`` [m] along the route, as a UTC datetime."""
        return from_epoch(self.epoch_at([distance_m])[0])

    def distance_at_epoch(self, moment_epoch_s: ArrayLike) -> NDArray[np.float64]:
        """Distance along the route [m] at moments [s since 1970-01-01 UTC].

        Moments before the departure or after the arrival are clamped to the voyage.
        """
        moments = np.asarray(moment_epoch_s, dtype=np.float64)
        return np.interp(moments, self.knot_epoch_s, self.knot_m)

    def hours_between(self, from_m: float, to_m: float) -> float:
        """Duration [h] from reaching ``from_m`` [m] to reaching ``to_m`` [m] along the route."""
        t = self.epoch_at([from_m, to_m])
        return float(t[1] - t[0]) / 3600.0


def make_schedule(path: RoutePath, depart_utc: datetime | None,
                  speed_kn: float | None) -> Schedule | None:
    """Times along the route, or None when there is no departure time at all.

    Parameters
    ----------
    path : RoutePath
        The route's legs and their lengths.
    depart_utc : datetime or None
        Departure from the first waypoint, a timezone-aware datetime; None
        takes the first waypoint's ETD, else its ETA.
    speed_kn : float or None [kn]
        Speed over ground on legs that have neither an ETA nor a speed of
        their own; None when every leg has one.

    Returns
    -------
    Schedule or None
        Knots at every waypoint (two at a stop: the arrival and the later
        ETD); None when there is no departure at all. Each leg is sailed at
        constant speed: its arrival is its ETA, else the departure plus
        length / speed (exact arithmetic, 1 kn = 1852 m/h [NM-1852]).

    Raises
    ------
    InputError
        ``speed_kn`` not above 0, an ETA not after the departure from the
        previous waypoint, or a leg with neither an ETA nor any speed.

    Examples
    --------
    One degree of the equator, 60.107716 nm (see :func:`geo.path.route_path`),
    at 10 kn takes 6.0107716 h, 6 h 0 min 38.8 s:

    >>> from geo.path import route_path
    >>> from geo.route import Route, Waypoint
    >>> path = route_path(Route("r", (Waypoint("A", 0.0, 0.0), Waypoint("B", 0.0, 1.0))))
    >>> sched = make_schedule(path, datetime(2027, 1, 1, tzinfo=UTC), 10.0)
    >>> round(sched.hours_between(0.0, path.length_m), 7)
    6.0107716
    >>> sched.arrive_utc.isoformat(timespec="seconds")
    '2027-01-01T06:00:38+00:00'
    """
    wps = path.route.waypoints
    start = depart_utc or wps[0].etd_utc or wps[0].eta_utc
    if start is None:
        return None
    if speed_kn is not None and not speed_kn > 0:
        raise InputError("--speed", "", speed_kn, "a speed above 0 kn")
    knot_m = [0.0]
    knot_epoch_s = [to_epoch(start)]
    speeds = []
    for i, length in enumerate(path.curves.length_m):
        wp = wps[i + 1]
        dep = knot_epoch_s[-1]
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
        knot_epoch_s.append(arr)
        if wp.etd_utc is not None and to_epoch(wp.etd_utc) > arr and i + 1 < len(wps) - 1:
            knot_m.append(knot_m[-1])
            knot_epoch_s.append(to_epoch(wp.etd_utc))
    return Schedule(path, np.array(knot_m), np.array(knot_epoch_s), np.array(speeds))
