"""Load a route file of any supported format and check that it can be sailed.

Formats by extension: ``.csv``, ``.geojson`` / ``.json``, ``.gpx``, ``.rtz``, and
``.xml`` recognised by its root element (``<gpx>`` or an RTZ ``<route>``).
Angles are in degrees. Every failure is an :class:`InputError`.
"""

from __future__ import annotations

from collections.abc import Callable
from pathlib import Path

from geo.errors import InputError
from geo.position import format_position
from geo.route import Route
from geo.routes_common import local_name, parse_xml, read_bytes, waypoint_place
from geo.routes_csv import load_csv_route
from geo.routes_geojson import load_geojson_route
from geo.routes_gpx import load_gpx_route, route_from_gpx_root
from geo.routes_rtz import load_rtz_route, route_from_rtz_root

LOADERS: dict[str, Callable[[str | Path], Route]] = {
    ".csv": load_csv_route,
    ".geojson": load_geojson_route,
    ".json": load_geojson_route,
    ".gpx": load_gpx_route,
    ".rtz": load_rtz_route,
}
EXTENSIONS = (*LOADERS, ".xml")

POLE_LIMIT_DEG = 89.0
# "Exactly 180°" allowing for round-off in the file's decimals: 1e-9° is about 0.1 mm.
ANTIPODAL_TOLERANCE_DEG = 1e-9


def load_route(path: str | Path) -> Route:
    """Read a route file, choosing the format by extension, then :func:`check_sailable` it."""
    file = str(path)
    ext = Path(path).suffix.lower()
    if ext not in EXTENSIONS:
        raise InputError(
            file, "file name extension", ext or None, "one of " + ", ".join(EXTENSIONS)
        )
    if ext == ".xml":
        root = parse_xml(read_bytes(path), file)
        kind = local_name(root.tag)
        if kind == "gpx":
            route = route_from_gpx_root(root, file)
        elif kind == "route":
            route = route_from_rtz_root(root, file)
        else:
            raise InputError(
                file, "root element", f"<{kind}>", "a GPX <gpx> or an RTZ <route> root element"
            )
    else:
        route = LOADERS[ext](path)
    check_sailable(route)
    return route


def check_sailable(route: Route) -> None:
    """Refuse what the sailings cannot handle.

    - a waypoint within 1° of a pole (|lat| > 89°);
    - a leg whose longitude change, taken the shorter way round (wrapped to
      (-180°, 180°]), is exactly 180°: east and west are then equally short,
      so the leg is ambiguous.
    """
    file = route.source
    wps = route.waypoints
    for n, wp in enumerate(wps, start=1):
        if abs(wp.lat) > POLE_LIMIT_DEG:
            raise InputError(
                file,
                waypoint_place(n, wp.name),
                wp.lat,
                "a latitude within ±89° (within 1° of a pole: sailings there are not supported)",
            )
    for n in range(1, len(wps)):
        a, b = wps[n - 1], wps[n]
        if abs(abs(lon_change(a.lon, b.lon)) - 180.0) <= ANTIPODAL_TOLERANCE_DEG:
            place = f"leg {n} ({waypoint_place(n, a.name)} to {waypoint_place(n + 1, b.name)})"
            raise InputError(
                file,
                place,
                f"{format_position(a.lat, a.lon)} to {format_position(b.lat, b.lon)}",
                "a leg whose longitude change is not exactly 180° (it has no shorter "
                "way round: add a waypoint between)",
            )


def lon_change(lon_from: float, lon_to: float) -> float:
    """Longitude change in degrees the shorter way round, in (-180, 180]."""
    d = (lon_to - lon_from) % 360.0
    return d - 360.0 if d > 180.0 else d
