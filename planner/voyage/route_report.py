"""The route check as plain data: the ``--json`` contract and the GeoJSON export.

Keys follow docs/json-contract.md; keys may be added, never renamed.
Legs count from 1 here (leg 1 joins waypoints 1 and 2), as on the bridge.
"""

from __future__ import annotations

from datetime import timezone

from geo.compliance import RouteCheck
from geo.ellipsoid import NM_M
from geo.rhumb import wrap180
from planner.common.timefmt import format_offset, iso_utc


def route_json(check: RouteCheck, tz: timezone | None = None) -> dict:
    """The ``changeover route --json`` document.

    Parameters
    ----------
    check : RouteCheck
        The route check.
    tz : timezone, optional
        Ship's time (its offset is printed as ``ship_utc_offset``).

    Returns
    -------
    dict
        Times ISO 8601 UTC, distances nm, positions degrees (WGS84), durations h,
        limits % m/m.
    """
    path = check.path
    sched = check.schedule
    out = {
        "route": {
            "name": path.route.name,
            "file": path.route.source,
            "distance_nm": path.length_nm,
            "legs": path.n_legs,
            "depart_utc": iso_utc(sched.depart_utc) if sched else None,
            "arrive_utc": iso_utc(sched.arrive_utc) if sched else None,
        },
        "rules_on": None if sched else check.on.isoformat(),
        "ship_utc_offset": format_offset(tz) if tz else None,
        "crossings": [
            {
                "area": tc.crossing.area,
                "event": tc.crossing.event,
                "leg": tc.crossing.leg + 1,
                "lat": tc.crossing.lat,
                "lon": tc.crossing.lon,
                "distance_nm": tc.crossing.distance_nm,
                "time_utc": iso_utc(tc.time_utc),
                "in_force": tc.in_force,
                "limit_after_pct": tc.limit_pct,
            }
            for tc in check.crossings
        ],
        "force_events": force_event_rows(check),
        "stretches": [
            {
                "from_nm": st.from_nm,
                "to_nm": st.to_nm,
                "limit_pct": st.limit_pct,
                "areas": list(st.areas),
                "from_utc": iso_utc(st.from_utc),
                "to_utc": iso_utc(st.to_utc),
            }
            for st in check.stretches
        ],
        "areas": [
            {
                "name": p.area.name,
                "limit_pct": p.area.sulphur_limit_pct,
                "inside_nm": p.inside_nm,
                "inside_h": p.inside_h,
            }
            for p in check.passages
        ],
    }
    return out


def force_event_rows(check: RouteCheck) -> list[dict]:
    """Each area coming into force (or ceasing) while the ship is inside it, as plain data.

    Parameters
    ----------
    check : RouteCheck
        The route check (with a schedule; none without one).

    Returns
    -------
    list of dict
        ``area``, ``event`` (``"comes_into_force"`` or ``"ceases"``), ``time_utc`` (ISO
        8601 UTC), ``lat``, ``lon`` (degrees, WGS84), ``leg`` (from 1), ``distance_nm``,
        ``limit_after_pct`` (% m/m), in time order.
    """
    return [{"area": f.area, "event": f.event, "time_utc": iso_utc(f.time_utc), "lat": f.lat,
             "lon": f.lon, "leg": f.leg + 1, "distance_nm": f.distance_nm,
             "limit_after_pct": f.limit_pct} for f in check.force_events]


def route_geojson(check: RouteCheck) -> dict:
    """A GeoJSON FeatureCollection ([RFC-7946]): the route as a LineString, crossings as Points.

    The line is sampled every 5 nm along the true legs (rhumb or great circle),
    longitudes continuing past ±180 where the route crosses it, so any GIS
    draws the real track rather than straight lon/lat chords.

    Parameters
    ----------
    check : RouteCheck
        The route check.
    """
    import numpy as np

    path = check.path
    step = 5 * NM_M
    d = np.unique(np.concatenate([np.arange(0.0, path.length_m, step), path.start_m,
                                  [path.length_m]]))
    lat, lon = path.position(d)
    features = [{
        "type": "Feature",
        "geometry": {"type": "LineString",
                     "coordinates": [[float(x), float(y)] for x, y in zip(lon, lat, strict=True)]},
        "properties": {"kind": "route", "name": path.route.name, "distance_nm": path.length_nm},
    }]
    for w in path.route.waypoints:
        features.append({"type": "Feature",
                         "geometry": {"type": "Point", "coordinates": [w.lon, w.lat]},
                         "properties": {"kind": "waypoint", "name": w.name}})
    for tc in check.crossings:
        c = tc.crossing
        features.append({
            "type": "Feature",
            "geometry": {"type": "Point", "coordinates": [float(wrap180(c.lon)), c.lat]},
            "properties": {"kind": "crossing", "area": c.area, "event": c.event,
                           "leg": c.leg + 1, "distance_nm": c.distance_nm,
                           "time_utc": iso_utc(tc.time_utc), "in_force": tc.in_force},
        })
    for f in check.force_events:
        features.append({
            "type": "Feature",
            "geometry": {"type": "Point", "coordinates": [f.lon, f.lat]},
            "properties": {"kind": "force_event", "area": f.area, "event": f.event,
                           "leg": f.leg + 1, "distance_nm": f.distance_nm,
                           "time_utc": iso_utc(f.time_utc)},
        })
    return {"type": "FeatureCollection", "features": features}
