"""The route check: crossings with their times, the limit on every stretch, time inside.

Joins :mod:`geo.crossings` (where), :mod:`geo.schedule` (when) and the
areas' dates and the global cap (:mod:`geo.limits`). On each stretch the
limit is the strictest among the areas the ship is inside *and* that are in
force at that moment, else the global cap of the day. With a schedule,
moments when an area comes into or goes out of force, or the global cap
changes, split the stretches at the place the ship is then; without one,
everything is judged on one date (``on``).
"""

from __future__ import annotations

from dataclasses import dataclass
from datetime import date, datetime

import numpy as np

from geo.area import Area
from geo.crossings import AreaTrack, Crossing, track_area
from geo.ellipsoid import NM_M
from geo.limits import global_cap_changes_utc, global_cap_pct
from geo.path import RoutePath
from geo.plane import AreaShape, area_shape
from geo.schedule import Schedule, from_epoch, to_epoch


@dataclass(frozen=True)
class TimedCrossing:
    """A crossing with its time (None without a schedule) and whether the area is in force."""

    crossing: Crossing
    time_utc: datetime | None
    in_force: bool
    limit_pct: float


@dataclass(frozen=True)
class Stretch:
    """A part of the route under one limit. Distances in metres along the route."""

    from_m: float
    to_m: float
    limit_pct: float
    areas: tuple[str, ...]
    from_utc: datetime | None = None
    to_utc: datetime | None = None

    @property
    def from_nm(self) -> float:
        return self.from_m / NM_M

    @property
    def to_nm(self) -> float:
        return self.to_m / NM_M


@dataclass(frozen=True)
class AreaPassage:
    """Distance (nm) and hours (None without a schedule) inside one area."""

    area: Area
    inside_nm: float
    inside_h: float | None


@dataclass(frozen=True, eq=False)
class RouteCheck:
    """Everything the master asks of a route and a set of areas."""

    path: RoutePath
    schedule: Schedule | None
    on: date
    tracks: tuple[AreaTrack, ...]
    crossings: tuple[TimedCrossing, ...]
    stretches: tuple[Stretch, ...]
    passages: tuple[AreaPassage, ...]

    def limit_at(self, distance_m: float) -> float:
        """The limit (% m/m) at a distance along the route (the stretch that holds it)."""
        return _limit_at(self.stretches, distance_m)


def _limit_at(stretches, distance_m: float) -> float:
    for st in stretches:
        if distance_m < st.to_m:
            return st.limit_pct
    return stretches[-1].limit_pct


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
                shapes: list[AreaShape] | None = None) -> RouteCheck:
    """Crossings, stretches and time inside for a route against areas.

    ``on`` is the date used when there is no schedule. ``shapes`` may be
    passed when already built (one per area, same order).
    """
    shapes = shapes if shapes is not None else [area_shape(a) for a in areas]
    tracks = [track_area(path, s) for s in shapes]
    breaks = [0.0, path.length_m]
    for t in tracks:
        breaks.extend(t.breaks_m.tolist())
    if schedule is not None:
        t0, t1 = schedule.knot_s[0], schedule.knot_s[-1]
        for m in _regime_moments(areas):
            e = to_epoch(m)
            if t0 < e < t1:
                breaks.append(float(schedule.distance_at_epoch([e])[0]))
    edges = np.unique(np.clip(np.array(breaks), 0.0, path.length_m))
    mids = 0.5 * (edges[:-1] + edges[1:])
    inside = np.array([_inside_at(t, mids) for t in tracks]).reshape(len(tracks), len(mids))

    def rule(d: np.ndarray) -> list:
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
    timed = []
    for t in tracks:
        for c in t.events:
            when = schedule.time_at(c.distance_m) if schedule is not None else None
            live = t.area.in_force_at(when) if when else t.area.in_force_on(on)
            after = c.distance_m + 1e-3
            timed.append(TimedCrossing(c, when, live, _limit_at(stretches, after)))
    timed.sort(key=lambda x: (x.crossing.distance_m, x.crossing.event != "exit"))
    passages = []
    for t in tracks:
        hours = None
        if schedule is not None:
            hours = sum(schedule.hours_between(a, b) for a, b, s in t.intervals() if s)
        passages.append(AreaPassage(t.area, t.inside_m / NM_M, hours))
    return RouteCheck(path, schedule, on, tuple(tracks), tuple(timed), tuple(stretches),
                      tuple(passages))
