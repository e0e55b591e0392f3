"""A route as a continuous path on the ellipsoid: legs, distance along it, positions.

Each leg is a rhumb line [KARNEY-RHUMB] or a great circle (a geodesic on
WGS84 [WGS84], through pyproj.Geod [KARNEY-2013]). Longitudes are unwrapped
along the route (each leg the shorter way), so a route across 180° stays
continuous. Distances in nautical miles (1852 m [NM-1852] [P]) at the edges,
metres inside the solvers.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from numpy.typing import ArrayLike, NDArray

from geo import rhumb
from geo.curves import GEODESIC, RHUMB, Curves
from geo.ellipsoid import GEOD, NM_M
from geo.errors import InputError
from geo.route import Route

_POLE_CHECK_STEP_M = 10_000.0


@dataclass(frozen=True, eq=False)
class RoutePath:
    """The legs of a route as curves, with cumulative distances.

    ``curves`` holds leg ``i`` (from waypoint ``i`` to ``i + 1``) at index ``i``;
    ``start_m[i]`` is the distance along the route where leg ``i`` begins [m].
    """

    route: Route
    curves: Curves
    start_m: NDArray[np.float64]

    @property
    def length_m(self) -> float:
        """Length of the whole route [m]."""
        return float(self.start_m[-1] + self.curves.length_m[-1])

    @property
    def length_nm(self) -> float:
        """Length of the whole route [nm]."""
        return self.length_m / NM_M

    @property
    def n_legs(self) -> int:
        """Number of legs [-]."""
        return len(self.curves)

    @property
    def leg_length_nm(self) -> NDArray[np.float64]:
        """Length of each leg [nm]."""
        return self.curves.length_m / NM_M

    def locate(self, distance_m: ArrayLike) -> tuple[NDArray[np.int64], NDArray[np.float64]]:
        """Leg index [-] and distance into that leg [m] for distances along the route [m].

        Distances are clamped to the route; a distance at a waypoint belongs
        to the leg leaving it (the last waypoint to the last leg).
        """
        d = np.clip(np.asarray(distance_m, dtype=np.float64), 0.0, self.length_m)
        leg = np.clip(np.searchsorted(self.start_m, d, side="right") - 1, 0, self.n_legs - 1)
        return leg, d - self.start_m[leg]

    def position(self, distance_m: ArrayLike) -> tuple[NDArray, NDArray]:
        """Latitude and unwrapped longitude [deg] at distances along the route [m]."""
        leg, s = self.locate(distance_m)
        return self.curves.point(leg, s)

    def course_deg(self, distance_m: ArrayLike) -> NDArray[np.float64]:
        """Course over ground [deg], true, in [0, 360), at distances along the route [m].

        The geodesic azimuth to the point one metre further along the leg.
        """
        leg, s = self.locate(distance_m)
        lat, lon = self.curves.point(leg, s)
        lat2, lon2 = self.curves.point(leg, s + 1.0)
        az, _, _ = GEOD.inv(lon, lat, lon2, lat2)
        return np.mod(np.asarray(az), 360.0)


def route_path(route: Route) -> RoutePath:
    """Build the path of a route, refusing legs that cannot be sailed.

    Parameters
    ----------
    route : Route
        Waypoints in degrees on WGS84; each waypoint's ``leg`` is the kind of
        the leg arriving at it (``"rhumb"`` or ``"great_circle"``).

    Returns
    -------
    RoutePath
        The legs as :class:`geo.curves.Curves` with longitudes unwrapped along
        the route, and the distance where each leg starts [m]. Lengths are exact
        to round-off (:func:`geo.rhumb.inverse`, pyproj.Geod [KARNEY-2013]).

    Raises
    ------
    InputError
        Naming the leg: a longitude change of exactly 180° (no shorter way),
        any leg coming within 1° of a pole (a great circle is sampled every
        10 km to see it), a leg of zero length.

    Examples
    --------
    One degree of the equator, 111319.490793 m (``RhumbSolve -i -p 9``
    [KARNEY-RHUMB]), is 60.107716 nm of 1852 m [NM-1852]:

    >>> from geo.route import Waypoint
    >>> path = route_path(Route("r", (Waypoint("A", 0.0, 0.0), Waypoint("B", 0.0, 1.0))))
    >>> round(path.length_m, 6), round(path.length_nm, 6)
    (111319.490793, 60.107716)
    """
    wps = route.waypoints
    lat = np.array([w.lat for w in wps])
    lon = np.array([w.lon for w in wps])
    for i in range(len(wps) - 1):
        why = rhumb.check_leg(lat[i], lon[i], lat[i + 1], lon[i + 1])
        if why:
            raise InputError(route.source, f"leg {i + 1} ({wps[i].name!r} to {wps[i + 1].name!r})",
                             f"{lon[i]}° to {lon[i + 1]}°", f"a sailable leg: {why}")
    steps = rhumb.wrap180(np.diff(lon))
    lon_u = lon[0] + np.concatenate([[0.0], np.cumsum(steps)])
    kind = np.array([GEODESIC if w.leg == "great_circle" else RHUMB for w in wps[1:]], np.int8)
    curves = Curves.between(kind, lat[:-1], lon_u[:-1], lat[1:], lon_u[1:], literal_lon=True)
    for i in np.nonzero(curves.length_m <= 0.0)[0]:
        raise InputError(route.source, f"leg {i + 1}", f"{wps[i].name!r} to {wps[i + 1].name!r}",
                         "two different waypoints (this leg has zero length)")
    great = np.nonzero(kind == GEODESIC)[0]
    if len(great):
        sub = curves.subset(great)
        plat, _, idx, _, _ = sub.sample(_POLE_CHECK_STEP_M)
        for j in np.unique(idx[np.abs(plat) > 89.0]):
            i = int(great[j])
            raise InputError(route.source, f"leg {i + 1} ({wps[i].name!r} to {wps[i + 1].name!r})",
                             "great circle", "a leg that stays more than 1° from the poles")
    start = np.concatenate([[0.0], np.cumsum(curves.length_m[:-1])])
    return RoutePath(route, curves, start)
