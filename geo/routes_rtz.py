"""Route from an IEC 61174 route exchange file (RTZ), versions 1.0, 1.1 and 1.2.

Element names and the leg-arriving convention: [IEC-61174-RTZ] [M].

Read: ``routeInfo@routeName``; ``waypoints/waypoint`` (``id``, ``name``,
``position@lat``/``@lon`` in decimal degrees, optional ``leg`` with
``geometryType`` Loxodrome | Orthodrome and ``speedMax`` in knots);
``waypoints/defaultWaypoint/leg`` as the default for waypoints without their
own values; and the first ``schedules/schedule``, its ``manual`` schedule if
it has one, else its ``calculated`` one, whose ``scheduleElement`` entries
(``waypointId``, ``eta``, ``etd``, ``speed`` in knots) give the times at each
waypoint (ISO 8601 [ISO-8601] with Z or an offset, stored in UTC). A
waypoint's ``leg`` and a schedule ``speed`` describe the leg *arriving* at that
waypoint; the schedule speed overrides ``speedMax``. Everything else (cross-track limits,
turn radii, extensions) is ignored.
"""

from __future__ import annotations

from collections.abc import Callable
from datetime import UTC, datetime
from pathlib import Path
from xml.etree.ElementTree import Element

from geo.errors import InputError
from geo.position import parse_lat, parse_lon
from geo.route import Route, Waypoint
from geo.routes_common import (
    leg_kind,
    local_name,
    namespace,
    parse_xml,
    read_bytes,
    route_name,
    speed_kn,
    too_few,
    waypoint_place,
)

RTZ_NAMESPACES = {
    "http://www.cirm.org/RTZ/1/0": "1.0",
    "http://www.cirm.org/RTZ/1/1": "1.1",
    "http://www.cirm.org/RTZ/1/2": "1.2",
}
GEOMETRY_WORDS = {"loxodrome": "rhumb", "orthodrome": "great_circle"}
GEOMETRY_EXPECTED = "geometryType Loxodrome or Orthodrome"
# IEC 61174 RTZ schema 1.0 spells it sheduleElement; 1.1 corrected it to
# scheduleElement (from memory, [IEC-61174-RTZ] [M]). Both are accepted.
SCHEDULE_ELEMENTS = ("scheduleElement", "sheduleElement")
TIME_EXPECTED = "an ISO 8601 time with Z or a UTC offset, such as 2025-06-01T08:00:00Z"
SPEED_EXPECTED = "a speed in knots, a number above 0"


def load_rtz_route(path: str | Path) -> Route:
    """Read an RTZ route file; ``source`` is ``str(path)``."""
    return parse_rtz_route(read_bytes(path), file=str(path))


def parse_rtz_route(data: bytes | str, file: str = "") -> Route:
    """Route from RTZ bytes or text; ``file`` names it in errors."""
    return route_from_rtz_root(parse_xml(data, file), file)


def route_from_rtz_root(root: Element, file: str) -> Route:
    """Route from an already (safely) parsed RTZ root element."""
    ns = namespace(root.tag)
    if local_name(root.tag) != "route" or ns not in RTZ_NAMESPACES:
        raise InputError(
            file,
            "root element",
            root.tag,
            "<route> in an RTZ namespace: " + ", ".join(RTZ_NAMESPACES),
        )

    def q(name: str) -> str:
        return f"{{{ns}}}{name}"

    info = root.find(q("routeInfo"))
    name = route_name(info.get("routeName") if info is not None else None, file)
    container = root.find(q("waypoints"))
    if container is None:
        raise InputError(file, "<route>", None, "a <waypoints> element")
    default = container.find(q("defaultWaypoint"))
    if default is None:  # tolerated outside <waypoints> too
        default = root.find(q("defaultWaypoint"))
    default_leg = default.find(q("leg")) if default is not None else None

    fields: list[dict] = []
    index: dict[str, int] = {}
    for n, wp in enumerate(container.findall(q("waypoint")), start=1):
        wid = wp.get("id")
        at = waypoint_place(n, wp.get("name", ""), wid)
        if wid is not None:
            if wid.strip() in index:
                raise InputError(file, at, wid, "a waypoint id used only once")
            index[wid.strip()] = n - 1
        pos = wp.find(q("position"))
        if pos is None:
            raise InputError(file, at, None, "a <position lat=... lon=...> element")
        leg_el = wp.find(q("leg"))
        geometry = _attr(leg_el, default_leg, "geometryType")
        speed = _attr(leg_el, default_leg, "speedMax")
        fields.append(
            {
                "name": wp.get("name", "").strip(),
                "lat": parse_lat(pos.get("lat"), file=file, place=f"{at}, <position> lat"),
                "lon": parse_lon(pos.get("lon"), file=file, place=f"{at}, <position> lon"),
                "leg": leg_kind(
                    geometry, file, f"{at}, <leg> geometryType", GEOMETRY_WORDS, GEOMETRY_EXPECTED
                ),
                "speed_kn": speed_kn(speed, file, f"{at}, <leg> speedMax", expected=SPEED_EXPECTED),
            }
        )
    if len(fields) < 2:
        raise too_few(file, len(fields))

    meta: dict = {"format": "rtz", "version": RTZ_NAMESPACES[ns]}
    schedules = root.find(q("schedules"))
    found = schedules.findall(q("schedule")) if schedules is not None else []
    if found:
        _apply_schedule(found[0], q, fields, index, file, meta)
        meta["schedules_ignored"] = len(found) - 1
    _check_times(fields, file)
    waypoints = tuple(Waypoint(**f) for f in fields)
    return Route(name=name, waypoints=waypoints, source=file, meta=meta)


def _attr(own: Element | None, default: Element | None, key: str) -> str | None:
    """The attribute of the waypoint's own <leg>, else of the default waypoint's."""
    for element in (own, default):
        if element is not None and (element.get(key) or "").strip():
            return element.get(key)
    return None


def _apply_schedule(
    schedule: Element,
    q: Callable[[str], str],
    fields: list[dict],
    index: dict[str, int],
    file: str,
    meta: dict,
) -> None:
    """Put the times and speeds of one <schedule> onto ``fields``: manual wins."""
    label = schedule.get("name") or schedule.get("id") or ""
    chosen: tuple[str, list[Element]] | None = None
    for kind in ("manual", "calculated"):
        part = schedule.find(q(kind))
        if part is None:
            continue
        entries = [e for e in part if local_name(e.tag) in SCHEDULE_ELEMENTS]
        if entries:
            chosen = (kind, entries)
            break
    if chosen is None:
        return
    kind, entries = chosen
    meta["schedule"] = label
    meta["schedule_kind"] = kind
    seen: set[int] = set()
    for k, entry in enumerate(entries, start=1):
        at = f"schedule {label!r}" if label else "schedule"
        at += f", <{kind}> entry {k} (<{local_name(entry.tag)}>)"
        wid = entry.get("waypointId")
        if wid is None or wid.strip() not in index:
            raise InputError(file, f"{at}, waypointId", wid, "the id of a waypoint in the route")
        i = index[wid.strip()]
        if i in seen:
            raise InputError(file, f"{at}, waypointId", wid, "one schedule entry per waypoint")
        seen.add(i)
        for key, attr in (("eta_utc", "eta"), ("etd_utc", "etd")):
            value = entry.get(attr)
            if value is not None and value.strip():
                fields[i][key] = _utc(value, file, f"{at}, {attr}")
        speed = speed_kn(entry.get("speed"), file, f"{at}, speed", expected=SPEED_EXPECTED)
        if speed is not None:
            fields[i]["speed_kn"] = speed


def _utc(text: str, file: str, place: str) -> datetime:
    """A timezone-aware UTC datetime from ISO 8601 text that carries Z or an offset."""
    try:
        moment = datetime.fromisoformat(text.strip())
    except ValueError:
        raise InputError(file, place, text, TIME_EXPECTED) from None
    if moment.tzinfo is None or moment.utcoffset() is None:
        raise InputError(file, place, text, TIME_EXPECTED + " (this one has no offset)")
    return moment.astimezone(UTC)


def _check_times(fields: list[dict], file: str) -> None:
    """Scheduled times must not run backwards along the route (ETA <= ETD <= next ETA)."""
    last: tuple[datetime, str] | None = None
    for n, f in enumerate(fields, start=1):
        for key in ("eta_utc", "etd_utc"):
            moment = f.get(key)
            if moment is None:
                continue
            if last is not None and moment < last[0]:
                raise InputError(
                    file,
                    f"{waypoint_place(n, f['name'])}, {key[:3]}",
                    moment.isoformat(),
                    f"a time not before the {last[1]} ({last[0].isoformat()})",
                )
            last = (moment, f"{key[:3]} of waypoint {n}")
