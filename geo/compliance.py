"""The route check: crossings with their times, the limit on every stretch, time inside.

Joins :mod:`geo.crossings` (where), :mod:`geo.schedule` (when) and the
areas' dates and the global cap (:mod:`geo.limits`) of MARPOL Annex VI
regulation 14 [MARPOL-VI] [P]. On each stretch the limit is the strictest
among the areas the ship is inside *and* that are in force at that moment,
else the global cap of the day. With a schedule, moments when an area comes
into or goes out of force, or the global cap changes, split the stretches at
the place the ship is then; without one, everything is judged on one date
(``on``). An area that comes into force (or ceases to be in force) while the
ship is inside it is an event of its own (:class:`ForceEvent`: a moment on the
clock at the place the ship then is), not a boundary crossing.
"""

from __future__ import annotations

from bisect import bisect_right
from collections.abc import Sequence
from dataclasses import dataclass
from datetime import date, datetime

import numpy as np

from geo.area import Area
from geo.crossings import AreaTrack, Crossing, route_chords, track_area
from geo.ellipsoid import NM_M
from geo.limits import global_cap_changes_utc, global_cap_pct
from geo.path import RoutePath
from geo.plane import AreaShape, area_shape
from geo.progress import Progress, Throttle
from geo.schedule import Schedule, from_epoch, to_epoch


@dataclass(frozen=True)
class TimedCrossing:
    """A crossing with its moment and whether the area is in force.

    ``time_utc`` is a UTC datetime (None without a schedule); ``limit_pct``
    [% m/m] is the limit on the stretch just after the crossing.
    """

    crossing: Crossing
    time_utc: datetime | None
    in_force: bool
    limit_pct: float


FORCE_EVENTS = ("comes_into_force", "ceases")
"""The kinds of :class:`ForceEvent`."""


@dataclass(frozen=True)
class ForceEvent:
    """An area coming into force, or ceasing to be in force, while the ship is inside it.

    Its limit starts (or stops) by the clock at 00:00 UTC of the area's date
    ([MARPOL-VI] [P]; :attr:`geo.area.Area.starts_utc`), wherever the ship then is: a
    deadline in time, not a position she reaches.

    ``area`` the area's name; ``event`` one of :data:`FORCE_EVENTS`; ``time_utc`` the
    moment (UTC datetime); ``distance_m`` [m] along the route, ``lat``, ``lon`` [deg]
    (WGS84) where the ship is then; ``leg`` the leg she is on (from 0); ``limit_pct``
    [% m/m] the limit on the stretch just after it.
    """

    area: str
    event: str
    time_utc: datetime
    distance_m: float
    lat: float
    lon: float
    leg: int
    limit_pct: float

    def __post_init__(self) -> None:
        if self.event not in FORCE_EVENTS:
            raise ValueError(f"force event {self.event!r} not one of {FORCE_EVENTS}")

    @property
    def distance_nm(self) -> float:
        """Where along the route [nm]."""
        return self.distance_m / NM_M


@dataclass(frozen=True)
class Stretch:
    """A part of the route under one limit.

    ``from_m``, ``to_m`` [m] along the route; ``limit_pct`` [% m/m]; ``areas``
    the names of the areas in force there; ``from_utc``, ``to_utc`` UTC
    datetimes when the ship reaches its ends (None without a schedule).
    """

    from_m: float
    to_m: float
    limit_pct: float
    areas: tuple[str, ...]
    from_utc: datetime | None = None
    to_utc: datetime | None = None

    @property
    def from_nm(self) -> float:
        """Start along the route [nm]."""
        return self.from_m / NM_M

    @property
    def to_nm(self) -> float:
        """End along the route [nm]."""
        return self.to_m / NM_M


@dataclass(frozen=True)
class AreaPassage:
    """Distance [nm] and duration [h] (None without a schedule) inside one area."""

    area: Area
    inside_nm: float
    inside_h: float | None


@dataclass(frozen=True, eq=False)
class RouteCheck:
    """Everything the master asks of a route and a set of areas.

    ``on`` is the UTC calendar day used to judge which areas are in force
    when there is no schedule.
    """

    path: RoutePath
    schedule: Schedule | None
    on: date
    tracks: tuple[AreaTrack, ...]
    crossings: tuple[TimedCrossing, ...]
    stretches: tuple[Stretch, ...]
    passages: tuple[AreaPassage, ...]
    force_events: tuple[ForceEvent, ...] = ()

    def limit_at(self, distance_m: float) -> float:
        """The limit [% m/m] at ``distance_m`` [m] along the route (the stretch that holds it).

        A distance at the join of two stretches belongs to the later one.
        """
        return _limit_at(self.stretches, distance_m)


def _limit_at(stretches: Sequence[Stretch], distance_m: float,
              ends_m: Sequence[float] | None = None) -> float:
    """The limit of the first stretch ending after ``distance_m`` (``ends_m``: their ends)."""
    ends_m = [st.to_m for st in stretches] if ends_m is None else ends_m
    return stretches[min(bisect_right(ends_m, distance_m), len(stretches) - 1)].limit_pct


def _inside_at(track: AreaTrack, d: np.ndarray) -> np.ndarray:
    k = np.searchsorted(track.breaks_m, d, side="right")
    return track.inside[k]


def _regime_moments(areas: list[Area]) -> list[datetime]:
    out = list(global_cap_changes_utc())
    for a in areas:
        out.append(a.starts_utc)
        if a.ends_utc is not None:
            out.append(a.ends_utc)
    return out


def check_route(path: RoutePath, areas: list[Area], schedule: Schedule | None, on: date,
                shapes: list[AreaShape] | None = None, *,
                progress: Progress | None = None) -> RouteCheck:
    """Crossings with their times, the limit on every stretch, and time inside each area.

    Parameters
    ----------
    path : RoutePath
        The route's legs.
    areas : list of Area
        The control areas, with their limits and dates in force.
    schedule : Schedule or None
        Times along the route; None judges everything on the day ``on``.
    on : date
        UTC calendar day used when there is no schedule (an area is in force
        if it is in force at any time that day; the global cap of that day).
    shapes : list of AreaShape, optional
        The areas' plane geometry when already built (one per area, same order;
        by default :func:`geo.plane.area_shape` of each area).
    progress : callable, optional
        Called with a short text (``"crossings: area 2 of 5"``) at most a few
        times a second.

    Returns
    -------
    RouteCheck
        Tracks per area; crossings sorted by distance (an exit before an entry
        at one place), each with its UTC datetime; stretches [m] with their
        limit [% m/m] and UTC datetimes; passages with distance [nm] and
        duration [h] inside each area.

    Notes
    -----
    With a schedule, the stretches are split where the ship is when an area
    comes into force (00:00 UTC on ``effective_from``), goes out of force
    (24:00 UTC on ``effective_until``) or the global cap changes (00:00 UTC,
    [MARPOL-VI] [P]); each stretch is judged at its midpoint's moment.

    Examples
    --------
    Due north along 5°E from the equator at 10 kn on 2019-12-31T12:00Z: the
    global cap falls from 3.50 % to 0.50 % at midnight UTC [MARPOL-VI] [P],
    12 h × 10 kn = 120 nm out:

    >>> from datetime import UTC, datetime
    >>> from geo.path import route_path
    >>> from geo.route import Route, Waypoint
    >>> from geo.schedule import make_schedule
    >>> path = route_path(Route("m", (Waypoint("A", 0.0, 5.0), Waypoint("B", 10.0, 5.0))))
    >>> sched = make_schedule(path, datetime(2019, 12, 31, 12, tzinfo=UTC), 10.0)
    >>> check = check_route(path, [], sched, date(2019, 12, 31))
    >>> [(round(st.from_nm, 6), st.limit_pct) for st in check.stretches]
    [(0.0, 3.5), (120.0, 0.5)]
    """
    say = Throttle(progress)
    route = route_chords(path)  # the route is sampled once, for every area
    tracks = []
    for k, area in enumerate(areas):
        say(lambda k=k: f"crossings: area {k + 1} of {len(areas)}")
        shape = shapes[k] if shapes is not None else area_shape(area)
        tracks.append(track_area(path, shape, route))
    stretches = _stretches(path, areas, tracks, schedule, on)
    timed = []
    ends = [st.to_m for st in stretches]
    for t in tracks:
        for c in t.events:
            when = schedule.time_at(c.distance_m) if schedule is not None else None
            live = t.area.in_force_at(when) if when else t.area.in_force_on(on)
            after = c.distance_m + 1e-3
            timed.append(TimedCrossing(c, when, live, _limit_at(stretches, after, ends)))
    timed.sort(key=lambda x: (x.crossing.distance_m, x.crossing.event != "exit"))
    passages = []
    for t in tracks:
        hours = None
        if schedule is not None:
            hours = sum(schedule.hours_between(a, b) for a, b, s in t.intervals() if s)
        passages.append(AreaPassage(t.area, t.inside_m / NM_M, hours))
    forced = _force_events(path, tracks, schedule, stretches) if schedule is not None else []
    return RouteCheck(path, schedule, on, tuple(tracks), tuple(timed), tuple(stretches),
                      tuple(passages), tuple(forced))


def _force_events(path: RoutePath, tracks: list[AreaTrack], schedule: Schedule,
                  stretches: list[Stretch]) -> list[ForceEvent]:
    """Every area coming into or going out of force strictly during the voyage while the
    ship is inside it, in time order."""
    t0, t1 = schedule.knot_epoch_s[0], schedule.knot_epoch_s[-1]
    ends = [st.to_m for st in stretches]
    out = []
    for t in tracks:
        moments = [("comes_into_force", t.area.starts_utc)]
        if t.area.ends_utc is not None:
            moments.append(("ceases", t.area.ends_utc))
        for kind, m in moments:
            e = to_epoch(m)
            if not t0 < e < t1:
                continue
            d = float(schedule.distance_at_epoch([e])[0])
            if not bool(_inside_at(t, np.array([d]))[0]):
                continue
            lat, lon = path.position([d])
            leg = int(np.clip(np.searchsorted(path.start_m, d, side="right") - 1, 0,
                              path.n_legs - 1))
            out.append(ForceEvent(t.area.name, kind, m, d, float(lat[0]),
                                  float((lon[0] + 180.0) % 360.0 - 180.0), leg,
                                  _limit_at(stretches, d + 1e-3, ends)))
    out.sort(key=lambda f: f.time_utc)
    return out


def _stretches(path: RoutePath, areas: list[Area], tracks: list[AreaTrack],
               schedule: Schedule | None, on: date) -> list[Stretch]:
    """The stretches between every break (meeting points, moments in force), each judged at
    its midpoint, neighbours under the same limit and areas merged."""
    breaks = [0.0, path.length_m]
    for t in tracks:
        breaks.extend(t.breaks_m.tolist())
    if schedule is not None:
        t0, t1 = schedule.knot_epoch_s[0], schedule.knot_epoch_s[-1]
        for m in _regime_moments(areas):
            e = to_epoch(m)
            if t0 < e < t1:
                breaks.append(float(schedule.distance_at_epoch([e])[0]))
    edges = np.unique(np.clip(np.array(breaks), 0.0, path.length_m))
    mids = 0.5 * (edges[:-1] + edges[1:])
    inside = np.array([_inside_at(t, mids) for t in tracks]).reshape(len(tracks), len(mids))

    def rule(d: np.ndarray) -> list[datetime] | list[date]:
        if schedule is not None:
            return [from_epoch(s) for s in schedule.epoch_at(d)]
        return [on] * len(d)

    moments = rule(mids)
    raw: list[Stretch] = []
    for k, when in enumerate(moments):
        names, limits = [], []
        for j, a in enumerate(areas):
            live = a.in_force_at(when) if isinstance(when, datetime) else a.in_force_on(when)
            if inside[j, k] and live:
                names.append(a.name)
                limits.append(a.sulphur_limit_pct)
        limit = min(limits) if limits else global_cap_pct(when)
        raw.append(Stretch(float(edges[k]), float(edges[k + 1]), limit, tuple(names)))
    stretches: list[Stretch] = []
    for st in raw:
        if stretches and (stretches[-1].limit_pct, stretches[-1].areas) == (st.limit_pct, st.areas):
            prev = stretches.pop()
            st = Stretch(prev.from_m, st.to_m, st.limit_pct, st.areas)
        stretches.append(st)
    if schedule is not None:
        stretches = [Stretch(s.from_m, s.to_m, s.limit_pct, s.areas, schedule.time_at(s.from_m),
                             schedule.time_at(s.to_m)) for s in stretches]
    return stretches
