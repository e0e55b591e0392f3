"""Waypoints that look like latitude and longitude written the wrong way round.

A waypoint typed as ``lat = 3.2, lon = 54.1`` instead of ``54.1, 3.2`` is a
valid position, so no reader can refuse it; it shows as a detour: the legs
into and out of it are long while the same waypoint with its two numbers
exchanged sits close to its neighbours. The rule (ours, common practice for a
plausibility check): waypoint ``i`` is flagged when its longitude is within
±90° (so that the exchange is a position at all) and exchanging the numbers
shortens its legs (to the previous and the next waypoint, those that exist)
to less than a quarter and by more than :data:`MIN_SAVING_NM`. Distances are
geodesics on WGS84 ([KARNEY-2013], pyproj.Geod). It is a warning, never a
refusal: such a route may be meant.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from geo.ellipsoid import GEOD, NM_M
from geo.route import Route

MIN_SAVING_NM = 100.0
"""Least shortening, nm, that flags a waypoint (smaller detours are left alone)."""

MAX_RATIO = 0.25
"""The exchanged waypoint's legs must be shorter than this share of its legs as written."""


@dataclass(frozen=True)
class SwappedWaypoint:
    """A waypoint whose latitude and longitude look exchanged.

    Attributes
    ----------
    index : int
        Its number in the route, counting from 1.
    name : str
        Its name (may be empty).
    lat, lon : float [deg]
        As written.
    legs_nm : float [nm]
        Length of its legs as written.
    swapped_legs_nm : float [nm]
        Length of its legs with latitude and longitude exchanged.
    """

    index: int
    name: str
    lat: float
    lon: float
    legs_nm: float
    swapped_legs_nm: float

    def text(self, source: str) -> str:
        """The warning, one line: where, what was written and what it may be."""
        who = f"waypoint {self.index}" + (f" {self.name!r}" if self.name else "")
        return (f"{source}: {who} at lat {self.lat:g}°, lon {self.lon:g}° looks like latitude "
                f"and longitude exchanged: its legs are {self.legs_nm:.0f} nm as written, "
                f"{self.swapped_legs_nm:.0f} nm at lat {self.lon:g}°, lon {self.lat:g}°; "
                "check the route file.")


def _legs_m(lat: np.ndarray, lon: np.ndarray, plat: np.ndarray, plon: np.ndarray,
            has: np.ndarray) -> np.ndarray:
    _, _, d = GEOD.inv(plon, plat, lon, lat)
    return np.where(has, np.asarray(d, dtype=np.float64), 0.0)


def _savings(lat: np.ndarray, lon: np.ndarray) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Each waypoint's legs [m] as written and exchanged, and whether it may be exchanged."""
    n = len(lat)
    idx = np.arange(n)
    has_prev, has_next = idx > 0, idx < n - 1
    p, q = np.clip(idx - 1, 0, n - 1), np.clip(idx + 1, 0, n - 1)
    wlon = (lon + 180.0) % 360.0 - 180.0
    can = (np.abs(wlon) <= 90.0) & (lat != wlon)
    slat, slon = np.where(can, wlon, lat), np.where(can, lat, lon)
    now = _legs_m(lat, lon, lat[p], lon[p], has_prev) + _legs_m(lat, lon, lat[q], lon[q], has_next)
    swp = (_legs_m(slat, slon, lat[p], lon[p], has_prev)
           + _legs_m(slat, slon, lat[q], lon[q], has_next))
    return now, swp, can


def swapped_waypoints(route: Route) -> list[SwappedWaypoint]:
    """The route's waypoints that look like latitude and longitude exchanged.

    The waypoint whose exchange shortens the route most is taken first, if it
    meets the rule, and exchanged; then the next, until none does (so the
    neighbours of an exchanged waypoint, whose legs to it are long too, are
    not flagged with it).

    Parameters
    ----------
    route : Route
        The route as read (degrees, WGS84).

    Returns
    -------
    list of SwappedWaypoint
        In route order; empty for a route that looks right.

    Notes
    -----
    The rule is in the module notes (ours, common practice); distances by
    pyproj.Geod [KARNEY-2013].

    Examples
    --------
    >>> from geo.route import Waypoint
    >>> r = Route("r", (Waypoint("A", 54.0, 3.0), Waypoint("B", 3.5, 54.5),
    ...                 Waypoint("C", 55.0, 4.0)))
    >>> [(w.index, w.name) for w in swapped_waypoints(r)]
    [(2, 'B')]
    """
    wps = route.waypoints
    lat = np.array([w.lat for w in wps], dtype=np.float64)
    lon = np.array([w.lon for w in wps], dtype=np.float64)
    found: list[SwappedWaypoint] = []
    flagged = np.zeros(len(wps), dtype=bool)
    while len(wps) >= 2:
        now, swp, can = _savings(lat, lon)
        hit = can & ~flagged & (swp < MAX_RATIO * now) & (now - swp > MIN_SAVING_NM * NM_M)
        if not hit.any():
            break
        i = int(np.argmax(np.where(hit, now - swp, -np.inf)))
        w = wps[i]
        found.append(SwappedWaypoint(i + 1, w.name, w.lat, w.lon, float(now[i] / NM_M),
                                     float(swp[i] / NM_M)))
        flagged[i] = True
        lat[i], lon[i] = (lon[i] + 180.0) % 360.0 - 180.0, lat[i]
    return sorted(found, key=lambda s: s.index)
