"""``changeover plan --gpx``: the plan's marks as GPX 1.1 waypoints for the bridge.

Every changeover's start point (per circuit), its compliant point (going in)
or complete point (going back), each boundary crossing (numbered as the
plan's changeovers, unnumbered where none is made) and each area coming into
force or ceasing while the ship is inside it (``CO3 comes into force``, type
``comes into force``, at the ship's position at that moment, with its time) and
each scrubber event (``S2 EGCS 1 mode change``, type ``scrubber mode change``,
numbered as in the plan's scrubber table, with the action in the comment) as
a ``wpt`` with its name, UTC time, a comment and a type, so they load as marks
beside the route. The
route itself stays in its own file (the voyage's route file, any format): these
are points only, in the same WGS84 degrees. Written with the element names and
order of the GPX 1.1 schema ([GPX-11]); the file is written atomically.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass
from pathlib import Path
from xml.etree import ElementTree as ET

from planner.charts.plan_events import PlanEvent
from planner.common.outputs import write_atomic

GPX_NS = "http://www.topografix.com/GPX/1/1"


@dataclass(frozen=True)
class Waypoint:
    """A GPX waypoint: position [° WGS84], time (ISO 8601 UTC or None), name, comment,
    type."""

    lat: float
    lon: float
    time_utc: str | None
    name: str
    comment: str
    kind: str

    def __post_init__(self) -> None:
        if not -90.0 <= self.lat <= 90.0:
            raise ValueError(f"waypoint {self.name}: latitude {self.lat} outside -90..90")


def _lon(lon: float) -> float:
    """Longitude folded into [−180, 180) as GPX 1.1 requires."""
    return (lon + 180.0) % 360.0 - 180.0


def plan_waypoints(doc: dict, events: Sequence[PlanEvent]) -> list[Waypoint]:
    """The plan's marks, in time order: starts, compliant or complete points, crossings,
    force events and scrubber events."""
    out = []
    for r in doc["changeovers"]:
        n, c = r["number"], r["circuit"]
        if r.get("start_lat") is not None:
            out.append(Waypoint(r["start_lat"], r["start_lon"], r["start_utc"],
                                f"CO{n} {c} start",
                                f"changeover {n} ({r['area']}): switch circuit {c} from "
                                f"{r['from_fuel']} to {r['to_fuel']}", "changeover start"))
        down = r["direction"] == "to_compliant"
        key = "compliant" if down else "complete"
        if r.get(f"{key}_lat") is not None:
            out.append(Waypoint(r[f"{key}_lat"], r[f"{key}_lon"], r.get(f"{key}_utc"),
                                f"CO{n} {c} {key}",
                                f"changeover {n} ({r['area']}): circuit {c} "
                                + ("compliant (record time, position, tanks)" if down
                                   else "back on regular fuel"), f"changeover {key}"))
    seen: dict[str, int] = {}
    for e in events:
        name = _event_name(e)
        seen[name] = seen.get(name, 0) + 1
        if seen[name] > 1:  # the same area left twice: names stay unique on the chart
            name = f"{name} ({seen[name]})"
        if e.is_scrubber:  # the scrubber's name is in the event's area
            out.append(Waypoint(e.lat, e.lon, e.time_utc, name,
                                f"{e.label} {e.kind} {e.area} {e.when} (UTC), at "
                                f"{e.distance_nm:,.1f} nm: {e.note}", e.kind))
        elif e.is_crossing or e.zone:
            out.append(Waypoint(e.lat, e.lon, e.time_utc, name,
                                f"{e.kind} {e.area} at {e.distance_nm:,.1f} nm: {e.note}",
                                "boundary"))
        else:  # a moment on the clock: the ship's position then
            out.append(Waypoint(e.lat, e.lon, e.time_utc, name,
                                f"{e.area} {e.kind} {e.when} (UTC), the ship then at "
                                f"{e.distance_nm:,.1f} nm: {e.note}", e.kind))
    return sorted(out, key=lambda w: (w.time_utc or "", w.name))


def _event_name(e: PlanEvent) -> str:
    """``CO3 boundary``, ``CO3 comes into force``, ``exit Corran Sea ECA``, ``S2 EGCS 1
    mode change`` ..."""
    if e.is_scrubber:
        return f"{e.label} {e.area} {e.kind.removeprefix('scrubber ')}"
    what = "boundary" if e.is_crossing or e.zone else e.kind
    if e.number is not None:
        return f"CO{e.number} {what}"
    return f"{e.kind} {e.area}"


def gpx_text(waypoints: Sequence[Waypoint], name: str, time_utc: str | None = None) -> str:
    """The GPX 1.1 document of ``waypoints`` (UTF-8 XML text)."""
    ET.register_namespace("", GPX_NS)
    root = ET.Element(f"{{{GPX_NS}}}gpx", {"version": "1.1", "creator": "changeover"})
    meta = ET.SubElement(root, f"{{{GPX_NS}}}metadata")
    ET.SubElement(meta, f"{{{GPX_NS}}}name").text = name
    if time_utc:
        ET.SubElement(meta, f"{{{GPX_NS}}}time").text = time_utc
    for w in waypoints:
        wpt = ET.SubElement(root, f"{{{GPX_NS}}}wpt",
                            {"lat": f"{w.lat:.7f}", "lon": f"{_lon(w.lon):.7f}"})
        if w.time_utc:
            ET.SubElement(wpt, f"{{{GPX_NS}}}time").text = w.time_utc
        ET.SubElement(wpt, f"{{{GPX_NS}}}name").text = w.name
        ET.SubElement(wpt, f"{{{GPX_NS}}}cmt").text = w.comment
        ET.SubElement(wpt, f"{{{GPX_NS}}}type").text = w.kind
    ET.indent(root)
    return '<?xml version="1.0" encoding="UTF-8"?>\n' + ET.tostring(root, "unicode") + "\n"


def write_gpx(target: str | Path, waypoints: Sequence[Waypoint], name: str) -> None:
    """Write the waypoints as GPX 1.1 to ``target``, all-or-nothing."""
    from datetime import UTC, datetime

    now = datetime.now(UTC).replace(microsecond=0).isoformat().replace("+00:00", "Z")
    text = gpx_text(waypoints, name, now)
    write_atomic(target, lambda p: Path(p).write_text(text, encoding="utf-8"), suffix=".gpx")
