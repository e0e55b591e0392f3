"""Entry and exit of a route into each area, exact on the WGS84 ellipsoid.

Method (per area):

1. *Search*: the legs and every area edge are sampled every
   :data:`SEARCH_STEP_M` in the unwrapped lon/lat plane (area copies shifted
   by multiples of 360° where the route needs them); :mod:`geo.search`
   (an STR-tree [STR-1997] over runs of chords, then exact plane distances)
   gives each leg chord the edge chords within :data:`SEARCH_PAD_DEG`
   (chords deviate from their curves by well under a metre, so no meeting
   is missed). The route is sampled once for all areas
   (:func:`route_chords`), each area once (kept with its shape).
2. *Solve*: each candidate pair is solved on the true curves
   (:func:`geo.roots.intersect`) to :data:`geo.roots.TOL_M`.
3. *Classify*: meeting points closer than :data:`MERGE_M` along the route are
   merged; the route is inside or outside on each interval between them
   (tested at the interval's midpoint, strictly inside the area; an interval
   lying on the boundary is inside when the route is inside next to it); an
   event exists only where that state flips. Touches, vertex hits without
   crossing, runs along an edge, overlapping parts, holes and seams of
   polygons split at 180° therefore give no event. The start counts as
   inside when it is on the boundary, so a route that starts inside (or on
   the edge) has no entry event there, and a route that arrives on the
   boundary from outside enters there, at its end.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import shapely
from numpy.typing import NDArray

from geo import rhumb, roots, search
from geo.area import Area
from geo.ellipsoid import NM_M
from geo.path import RoutePath
from geo.plane import AreaShape
from geo.search import Chords

SEARCH_STEP_M = search.STEP_M
"""Sampling step of the search [m]."""
SEARCH_PAD_DEG = 1e-4
"""Chords this close in the plane are candidate pairs [deg] (about 10 m)."""
MERGE_M = 1e-3
"""Meeting points closer than this along the route are one [m]."""
BOUNDARY_TOL_DEG = 1e-7  # a midpoint this close to the boundary is on it (about 1 cm)
_PARAM_SLACK_M = 1e-3


@dataclass(frozen=True)
class Crossing:
    """One entry into or exit from an area.

    ``event`` is ``"enter"`` or ``"exit"``; ``leg`` counts from 0 (leg ``i``
    joins waypoints ``i`` and ``i + 1``); ``distance_m`` [m] is along the
    route; ``lat``, ``lon`` [deg], with ``lon`` folded into [-180, 180).
    """

    area: str
    event: str
    leg: int
    distance_m: float
    lat: float
    lon: float

    @property
    def distance_nm(self) -> float:
        """Distance along the route [nm]."""
        return self.distance_m / NM_M


@dataclass(frozen=True, eq=False)
class AreaTrack:
    """Inside/outside state of one area along the whole route.

    ``breaks_m`` are the merged meeting points (m along the route), and
    ``inside[k]`` the state on the k-th interval between ``0``, the breaks
    and the route's end.
    """

    area: Area
    shape: AreaShape
    breaks_m: NDArray[np.float64]
    inside: NDArray[np.bool_]
    start_inside: bool
    events: tuple[Crossing, ...]
    route_length_m: float

    def intervals(self) -> list[tuple[float, float, bool]]:
        """``(from_m, to_m, inside)`` for every interval along the route, distances [m]."""
        edges = np.concatenate([[0.0], self.breaks_m, [self.route_length_m]])
        return [(float(a), float(b), bool(s)) for a, b, s in zip(edges[:-1], edges[1:],
                                                                   self.inside, strict=True)]

    @property
    def inside_m(self) -> float:
        """Distance sailed inside the area [m]."""
        return sum(b - a for a, b, s in self.intervals() if s)


def _chord_params(p: NDArray, q: NDArray) -> tuple[NDArray, NDArray]:
    """Where chords p[:,0]->p[:,1] and q[:,0]->q[:,1] cross (fractions, clamped to 0..1)."""
    dp = p[:, 1] - p[:, 0]
    dq = q[:, 1] - q[:, 0]
    w = q[:, 0] - p[:, 0]
    det = dp[:, 0] * dq[:, 1] - dp[:, 1] * dq[:, 0]
    with np.errstate(divide="ignore", invalid="ignore"):
        a = (w[:, 0] * dq[:, 1] - w[:, 1] * dq[:, 0]) / det
        b = (w[:, 0] * dp[:, 1] - w[:, 1] * dp[:, 0]) / det
    a = np.where(np.isfinite(a), np.clip(a, 0.0, 1.0), 0.5)
    b = np.where(np.isfinite(b), np.clip(b, 0.0, 1.0), 0.5)
    return a, b


def route_chords(path: RoutePath) -> Chords:
    """The route's search chords, to share between areas.

    Parameters
    ----------
    path : RoutePath
        The route's legs.

    Returns
    -------
    Chords
        The legs sampled every :data:`SEARCH_STEP_M` (:func:`geo.search.chords`);
        pass them to :func:`meeting_points` or :func:`track_area` for each area.
    """
    return search.chords(path.curves, SEARCH_STEP_M)


def meeting_points(path: RoutePath, shape: AreaShape,
                   route: Chords | None = None) -> tuple[NDArray, NDArray]:
    """Every point where the route meets the area's boundary, solved on the true curves.

    Parameters
    ----------
    path : RoutePath
        The route's legs.
    shape : AreaShape
        The area's rings (their edges are the curves met).
    route : Chords, optional
        The route's search chords (:func:`route_chords`), when already built.

    Returns
    -------
    leg : ndarray of int [-]
        Leg of each meeting point (unsorted; a point may repeat where two
        edges meet it, at a vertex).
    s_m : ndarray of float [m]
        Distance into that leg, clipped to the leg.

    Notes
    -----
    Search on chords every :data:`SEARCH_STEP_M` (:mod:`geo.search`, an
    STR-tree [STR-1997] over runs of chords), then :func:`geo.roots.intersect`
    on the true curves: each point, on the leg, is within 1 µm
    (:data:`geo.roots.TOL_M`) of the edge on the ellipsoid. Chords deviate
    from their curves by well under a metre (L²/8R, common practice), far
    inside :data:`SEARCH_PAD_DEG`, so no meeting is missed.
    """
    route = route if route is not None else route_chords(path)
    area = shape.search_chords
    if len(area) == 0 or len(route) == 0:
        return np.zeros(0, np.int64), np.zeros(0)
    rmin, rmax = route.lon_range()
    emin, emax = area.lon_range()
    shifts = [360.0 * k for k in range(int(np.floor((rmin - emax) / 360.0)) - 1,
                                       int(np.ceil((rmax - emin) / 360.0)) + 2)
              if emin + 360.0 * k <= rmax + 1.0 and emax + 360.0 * k >= rmin - 1.0]
    ir, ie, shift = search.close_pairs(route, area, SEARCH_PAD_DEG, shifts)
    if len(ir) == 0:
        return np.zeros(0, np.int64), np.zeros(0)
    q = area.xy(ie)
    q[:, :, 0] += shift[:, None]
    a, b = _chord_params(route.xy(ir), q)
    jr, je = route.start[ir], area.start[ie]
    leg = route.curve[jr]
    # exact curves of the edges met only (short edges have none until needed)
    met, edge = np.unique(area.curve[je], return_inverse=True)
    edges = shape.edges.subset_curves(met)
    leg_len = path.curves.length_m[leg]
    edge_len = edges.length_m[edge]
    s_lo, s_hi = leg_len * route.frac[jr], leg_len * route.frac[jr + 1]
    t_lo, t_hi = edge_len * area.frac[je], edge_len * area.frac[je + 1]
    s0 = s_lo + a * (s_hi - s_lo)
    t0 = t_lo + b * (t_hi - t_lo)
    s, t, ok = roots.intersect(path.curves, leg, s0, edges, edge, t0)
    ok &= (s >= -_PARAM_SLACK_M) & (s <= leg_len + _PARAM_SLACK_M)
    ok &= (t >= -_PARAM_SLACK_M) & (t <= edge_len + _PARAM_SLACK_M)
    return leg[ok], np.clip(s[ok], 0.0, leg_len[ok])


def _interval_states(shape: AreaShape, lat: NDArray,
                     lon: NDArray) -> tuple[NDArray[np.bool_], NDArray[np.bool_]]:
    """For interval midpoints: strictly inside the area, and on its boundary."""
    lat = np.atleast_1d(np.asarray(lat, dtype=np.float64))
    lon = np.atleast_1d(np.asarray(lon, dtype=np.float64))
    inside = shape.contains(lat, lon)
    boundary = shape.boundary
    # only over the area's own span is the united boundary the true one: the outermost
    # copies (a turn either side) keep the seams of polygons split at 180° as edges
    lo, hi = shape.lon_min + 360.0, shape.lon_max - 360.0
    near = np.zeros(len(lat), dtype=bool)
    for shift in (-720.0, -360.0, 0.0, 360.0, 720.0):
        x = lon + shift
        here = (x >= lo - 1e-6) & (x <= hi + 1e-6)
        if np.any(here):
            pts = shapely.points(x[here], lat[here])
            near[here] |= shapely.dwithin(boundary, pts, BOUNDARY_TOL_DEG)
    return inside & ~near, near


def _settle_boundary_runs(inside: NDArray[np.bool_], on_edge: NDArray[np.bool_],
                          start_inside: bool) -> NDArray[np.bool_]:
    """Give each run of intervals lying on the boundary the state around it.

    The boundary counts as inside, so a run is inside when the route is inside
    just before or just after it (before the first interval: the start's
    state; after the last: the state before). Touching or following the
    boundary from outside, or from inside, therefore flips nothing.
    """
    inside = inside.copy()
    n = len(inside)
    i = 0
    while i < n:
        if not on_edge[i]:
            i += 1
            continue
        j = i
        while j + 1 < n and on_edge[j + 1]:
            j += 1
        before = bool(inside[i - 1]) if i > 0 else start_inside
        after = bool(inside[j + 1]) if j + 1 < n else before
        inside[i:j + 1] = before or after
        i = j + 1
    return inside


def track_area(path: RoutePath, shape: AreaShape, route: Chords | None = None) -> AreaTrack:
    """Meeting points, interval states and enter/exit events of one area along a route.

    Parameters
    ----------
    path : RoutePath
        The route's legs.
    shape : AreaShape
        The area (:func:`geo.plane.area_shape`).
    route : Chords, optional
        The route's search chords (:func:`route_chords`), shared between areas.

    Returns
    -------
    AreaTrack
        Merged meeting points ``breaks_m`` [m], the state on every interval
        between them, whether the route starts inside, and the events
        (:class:`Crossing`; each on the leg within 1 µm of the edge, and
        checked in the tests to 1e-6 m against closed forms and GeographicLib).

    Notes
    -----
    Meeting points within :data:`MERGE_M` are merged; each interval is judged
    at its midpoint (strictly inside the united plane outline, sampled every
    200 m; a midpoint within :data:`BOUNDARY_TOL_DEG` of the boundary lies on
    it and takes the state next to it). The boundary counts as inside; an
    event exists only where the state flips (see the module notes).

    Examples
    --------
    Due east along 5°N through a 10° box: the entry at 0°E and the exit at
    10°E are parallel arcs N·cos φ·Δλ from 5°W [WGS84] [D], 554493.531160637 m
    and 1663480.593481910 m by ``RhumbSolve -i -p 9`` [KARNEY-RHUMB]:

    >>> from datetime import date
    >>> from geo.area import Area, Polygon
    >>> from geo.path import route_path
    >>> from geo.plane import area_shape
    >>> from geo.route import Route, Waypoint
    >>> box = Polygon(((0.0, 0.0), (10.0, 0.0), (10.0, 10.0), (0.0, 10.0)))
    >>> area = Area("Box", 0.1, date(2020, 1, 1), (box,))
    >>> route = Route("r", (Waypoint("A", 5.0, -5.0), Waypoint("B", 5.0, 15.0)))
    >>> tr = track_area(route_path(route), area_shape(area))
    >>> [(e.event, round(e.distance_m, 3), round(e.lon, 9)) for e in tr.events]
    [('enter', 554493.531, 0.0), ('exit', 1663480.593, 10.0)]
    """
    leg, s = meeting_points(path, shape, route)
    d = path.start_m[leg] + s
    order = np.argsort(d, kind="stable")
    d, leg, s = d[order], leg[order], s[order]
    keep = np.ones(len(d), dtype=bool)
    if len(d):
        keep[1:] = np.diff(d) > MERGE_M
    # the solver's meetings, not the sampled plane outline (good to about a centimetre),
    # decide whether the start is on the boundary
    start_on_boundary = bool(np.any(d <= MERGE_M))
    end_on_boundary = bool(np.any(d >= path.length_m - MERGE_M))
    # a meeting at either end of the route is not an event: the boundary counts as inside
    keep &= (d > MERGE_M) & (d < path.length_m - MERGE_M)
    d, leg, s = d[keep], leg[keep], s[keep]
    ends = np.concatenate([[0.0], d, [path.length_m]])
    mids = 0.5 * (ends[:-1] + ends[1:])
    mlat, mlon = path.position(mids)
    strict, on_edge = _interval_states(shape, mlat, mlon)
    lat0, lon0 = path.position([0.0])
    start_inside = start_on_boundary or bool(shape.covers(lat0, lon0)[0])
    inside = _settle_boundary_runs(strict, on_edge, start_inside)
    events: list[Crossing] = []
    name = shape.area.name
    if start_inside != bool(inside[0]):
        events.append(Crossing(name, "exit" if start_inside else "enter", 0, 0.0,
                               float(lat0[0]), float(rhumb.wrap180(lon0[0]))))
    if len(d):
        plat, plon = path.curves.point(leg, s)
        for k in np.nonzero(inside[1:] != inside[:-1])[0]:
            events.append(Crossing(name, "enter" if inside[k + 1] else "exit", int(leg[k]),
                                   float(d[k]), float(plat[k]), float(rhumb.wrap180(plon[k]))))
    if end_on_boundary and not inside[-1]:
        # arriving on the boundary from outside is arriving inside (mirror of the start)
        lat1, lon1 = path.position([path.length_m])
        events.append(Crossing(name, "enter", path.n_legs - 1, path.length_m, float(lat1[0]),
                               float(rhumb.wrap180(lon1[0]))))
    return AreaTrack(shape.area, shape, d, inside, start_inside, tuple(events), path.length_m)
