"""Route from a CSV file with a header line.

Columns (any order, matched case-insensitively; other columns are ignored)::

    name,lat,lon,leg,speed_kn

``lat`` and ``lon`` are required: decimal degrees or degrees and minutes
(``54°12.3'N``). ``name``, ``leg`` and ``speed_kn`` are optional and may be
blank. ``leg`` is ``rhumb`` (default) or ``great_circle`` (``loxodrome`` /
``orthodrome`` accepted); ``speed_kn`` is the planned speed in knots. Both
describe the leg that *ends* at that row, so the first row's are ignored.
Blank lines and lines starting with ``#`` are skipped. A quoted field may not
span lines.
"""

from __future__ import annotations

import csv
from pathlib import Path

from geo.errors import InputError
from geo.position import parse_lat, parse_lon
from geo.route import Route, Waypoint
from geo.routes_common import decode_text, leg_kind, read_bytes, route_name, speed_kn, too_few

COLUMNS = ("name", "lat", "lon", "leg", "speed_kn")
REQUIRED = ("lat", "lon")
HEADER_EXPECTED = (
    "a header line naming the columns name, lat, lon (and optionally leg, speed_kn), "
    "separated by commas"
)


def load_csv_route(path: str | Path) -> Route:
    """Read a CSV route file; ``source`` is ``str(path)``."""
    return parse_csv_route(read_bytes(path), file=str(path))


def parse_csv_route(data: bytes | str, file: str = "") -> Route:
    """Route from CSV text or bytes (UTF-8); ``file`` names it in errors."""
    text = decode_text(data, file)
    columns: dict[str, int] | None = None
    width = 0
    waypoints: list[Waypoint] = []
    for lineno, raw in enumerate(text.split("\n"), start=1):
        line = raw.rstrip("\r")
        if not line.strip() or line.lstrip().startswith("#"):
            continue
        try:
            fields = next(csv.reader([line], strict=True))
        except csv.Error as e:
            raise InputError(file, f"line {lineno}", line, f"CSV fields ({e})") from None
        if columns is None:
            columns = _header(fields, file, lineno, line)
            width = len(fields)
            continue
        if len(fields) != width:
            raise InputError(
                file,
                f"line {lineno}",
                line,
                f"{width} comma-separated fields as in the header, not {len(fields)}",
            )
        waypoints.append(_row(fields, columns, file, lineno))
    if columns is None:
        raise InputError(file, "line 1", None, HEADER_EXPECTED)
    if len(waypoints) < 2:
        raise too_few(file, len(waypoints))
    return Route(
        name=route_name(None, file), waypoints=tuple(waypoints), source=file, meta={"format": "csv"}
    )


def _header(fields: list[str], file: str, lineno: int, line: str) -> dict[str, int]:
    columns: dict[str, int] = {}
    for i, cell in enumerate(fields):
        key = cell.strip().lower()
        if key in COLUMNS:
            if key in columns:
                raise InputError(
                    file,
                    f"line {lineno} (header)",
                    cell,
                    f"each column named once; {key} appears twice",
                )
            columns[key] = i
    missing = [c for c in REQUIRED if c not in columns]
    if missing:
        hint = HEADER_EXPECTED
        if ";" in line and "," not in line:
            hint += " (this line uses semicolons)"
        raise InputError(
            file, f"line {lineno} (header)", line, f"{hint}; missing {', '.join(missing)}"
        )
    return columns


def _row(fields: list[str], columns: dict[str, int], file: str, lineno: int) -> Waypoint:
    def cell(key: str) -> str:
        return fields[columns[key]].strip() if key in columns else ""

    def place(key: str) -> str:
        return f"line {lineno}, column {key}"

    lat = parse_lat(cell("lat"), file=file, place=place("lat"))
    lon = parse_lon(cell("lon"), file=file, place=place("lon"))
    leg = leg_kind(cell("leg"), file, place("leg"))
    speed = speed_kn(cell("speed_kn"), file, place("speed_kn"))
    return Waypoint(name=cell("name"), lat=lat, lon=lon, leg=leg, speed_kn=speed)
