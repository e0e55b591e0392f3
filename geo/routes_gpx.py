"""Route from a GPX file: the first ``gpx/rte``, its ``rtept`` waypoints.

GPX 1.1 [GPX-11] [P] (namespace ``http://www.topografix.com/GPX/1/1``), GPX
1.0, or no namespace. Each ``rtept`` has ``lat`` and ``lon`` attributes in
decimal degrees and an optional ``name`` child. GPX has no leg type or speed: every
leg is a rhumb line with no planned speed. Tracks (``trk``) are not routes.
"""

from __future__ import annotations

from pathlib import Path
from xml.etree.ElementTree import Element

from geo.errors import InputError
from geo.position import parse_lat, parse_lon
from geo.route import Route, Waypoint
from geo.routes_common import (
    local_name,
    namespace,
    parse_xml,
    read_bytes,
    route_name,
    too_few,
    waypoint_place,
)

GPX_NAMESPACES = {
    "http://www.topografix.com/GPX/1/1": "1.1",
    "http://www.topografix.com/GPX/1/0": "1.0",
    "": "",
}


def load_gpx_route(path: str | Path) -> Route:
    """Read the first route of a GPX file; ``source`` is ``str(path)``."""
    return parse_gpx_route(read_bytes(path), file=str(path))


def parse_gpx_route(data: bytes | str, file: str = "") -> Route:
    """Route from GPX bytes or text; ``file`` names it in errors."""
    return route_from_gpx_root(parse_xml(data, file), file)


def route_from_gpx_root(root: Element, file: str) -> Route:
    """Route from an already (safely) parsed GPX root element."""
    ns = namespace(root.tag)
    if local_name(root.tag) != "gpx" or ns not in GPX_NAMESPACES:
        raise InputError(
            file, "root element", root.tag, "<gpx> in the GPX 1.1 or 1.0 namespace, or in none"
        )

    def q(name: str) -> str:
        return f"{{{ns}}}{name}" if ns else name

    routes = root.findall(q("rte"))
    if not routes:
        hint = " (this file has tracks, <trk>: export the route, not a track)"
        raise InputError(
            file,
            "<gpx>",
            None,
            "a route element <rte>" + (hint if root.find(q("trk")) is not None else ""),
        )
    rte = routes[0]
    waypoints: list[Waypoint] = []
    for n, pt in enumerate(rte.findall(q("rtept")), start=1):
        name = _text(pt.find(q("name")))
        at = f"<rtept> {waypoint_place(n, name)}"
        lat = parse_lat(pt.get("lat"), file=file, place=f"{at}, attribute lat")
        lon = parse_lon(pt.get("lon"), file=file, place=f"{at}, attribute lon")
        waypoints.append(Waypoint(name=name, lat=lat, lon=lon))
    if len(waypoints) < 2:
        raise too_few(file, len(waypoints))
    return Route(
        name=route_name(_text(rte.find(q("name"))), file),
        waypoints=tuple(waypoints),
        source=file,
        meta={"format": "gpx", "version": GPX_NAMESPACES[ns], "routes_in_file": len(routes)},
    )


def _text(element: Element | None) -> str:
    return (element.text or "").strip() if element is not None else ""
