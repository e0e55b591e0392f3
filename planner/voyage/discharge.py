"""The route's passages through washwater discharge zones, from the voyage file's zones.

A zone (:mod:`geo.discharge_zones`) restricts a scrubber's washwater: no
open-loop discharge (closed loop allowed), or none at all. Where the route is
inside a zone is found exactly as where it is inside a control area
(:func:`geo.crossings.track_area`: meeting points solved on the true curves to
1 µm, the state judged between them, touches and runs along an edge giving no
event), so a passage's ends are the route's entry and exit, to the accuracy of
the boundary crossings. A voyage that departs inside a zone has a passage from
0 m; one that arrives inside, a passage to the route's length.

A zone with ``effective_from`` / ``effective_until`` restricts only while in
force (00:00 UTC on the first day up to 24:00 UTC on the last, as an area):
with a schedule the passage is cut where the ship is at those moments; without
one, the zone counts when in force at any time on the check's day.
"""

from __future__ import annotations

from collections.abc import Sequence
from typing import TYPE_CHECKING

from geo.crossings import route_chords, track_area
from geo.discharge_zones import DischargeZone, load_discharge_zones
from geo.path import RoutePath
from geo.plane import area_shape
from geo.schedule import Schedule, to_epoch
from planner.voyage.scrubber_events import ZonePassage

if TYPE_CHECKING:
    from datetime import date

    from geo.compliance import RouteCheck
    from planner.voyage.voyage_file import Voyage


def voyage_discharge_zones(voyage: Voyage) -> list[DischargeZone]:
    """The voyage's washwater discharge zones (empty when it names no file).

    Parameters
    ----------
    voyage : Voyage
        The voyage (its ``discharge_zones`` file, if any).

    Raises
    ------
    geo.errors.InputError
        For any fault of the zone file (:func:`geo.discharge_zones.load_discharge_zones`).
    """
    path = voyage.discharge_zones
    return [] if path is None else load_discharge_zones([path])


def discharge_passages(voyage: Voyage, check: RouteCheck) -> tuple[ZonePassage, ...]:
    """Every passage of the voyage's route through its washwater discharge zones.

    Parameters
    ----------
    voyage : Voyage
        The voyage: its ``discharge_zones`` file (none: no passage).
    check : RouteCheck
        The route check of the voyage (its path, schedule and day).

    Returns
    -------
    tuple of ZonePassage
        Sorted by ``from_m`` [m] (then ``to_m``, then zone name); see :func:`zone_passages`.

    Raises
    ------
    geo.errors.InputError
        For any fault of the zone file.
    """
    zones = voyage_discharge_zones(voyage)
    return zone_passages(check.path, zones, check.schedule, check.on)


def zone_passages(path: RoutePath, zones: Sequence[DischargeZone],
                  schedule: Schedule | None = None, on: date | None = None
                  ) -> tuple[ZonePassage, ...]:
    """The route's exact passages through each zone, while in force.

    Parameters
    ----------
    path : RoutePath
        The route's legs.
    zones : sequence of DischargeZone
        The washwater discharge zones.
    schedule : Schedule, optional
        Times along the route: a zone in force for part of the voyage counts only
        from where the ship is when it comes into force to where she is when it ceases.
    on : date, optional
        Without a schedule, the UTC day on which a zone must be in force to count
        (None: every zone counts, whatever its dates).

    Returns
    -------
    tuple of ZonePassage
        One per continuous stretch inside a zone, ``from_m``, ``to_m`` [m] along the
        route (0 when departing inside, the route's length when arriving inside),
        sorted by ``from_m`` (then ``to_m``, then zone name). Passages of no length are
        left out.

    Notes
    -----
    The stretches inside are those of :func:`geo.crossings.track_area`, whose
    meeting points are each within 1 µm of the zone's edge on the WGS84
    ellipsoid [KARNEY-2013]; neighbouring stretches inside are joined.
    """
    chords = route_chords(path) if zones else None
    out: list[ZonePassage] = []
    for zone in zones:
        window = _in_force_m(zone, path, schedule, on)
        if window is None:
            continue
        lo, hi = window
        track = track_area(path, area_shape(zone.area), chords)
        for a, b in _inside_runs(track.intervals()):
            a, b = max(a, lo), min(b, hi)
            if b > a:
                out.append(ZonePassage(zone.name, zone.allows, a, b))
    out.sort(key=lambda p: (p.from_m, p.to_m, p.zone))
    return tuple(out)


def _inside_runs(intervals: list[tuple[float, float, bool]]) -> list[tuple[float, float]]:
    """The runs of consecutive inside intervals, joined, as (from_m, to_m)."""
    runs: list[tuple[float, float]] = []
    for a, b, inside in intervals:
        if not inside:
            continue
        if runs and runs[-1][1] == a:
            runs[-1] = (runs[-1][0], b)
        else:
            runs.append((a, b))
    return runs


def _in_force_m(zone: DischargeZone, path: RoutePath, schedule: Schedule | None,
                on: date | None) -> tuple[float, float] | None:
    """The part of the route [m] on which the zone is in force (None: nowhere)."""
    area = zone.area
    if schedule is None:
        if on is not None and not area.in_force_on(on):
            return None
        return 0.0, path.length_m
    t0, t1 = float(schedule.knot_epoch_s[0]), float(schedule.knot_epoch_s[-1])
    start = to_epoch(area.starts_utc)
    end = to_epoch(area.ends_utc) if area.ends_utc is not None else None
    if start >= t1 or (end is not None and end <= t0):
        return None
    lo = 0.0 if start <= t0 else float(schedule.distance_at_epoch([start])[0])
    hi = path.length_m if end is None or end >= t1 else \
        float(schedule.distance_at_epoch([end])[0])
    return (lo, hi) if hi > lo else None
