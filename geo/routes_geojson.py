"""Route from GeoJSON (RFC 7946): one LineString, as a Feature, in a FeatureCollection,
or as a bare geometry [RFC-7946] [P].

Coordinates are ``[lon, lat]`` in decimal degrees (a third value, altitude, is
ignored). Longitudes may jump across ±180° between vertices: each leg takes the
shorter way. Optional Feature properties:

- ``name``: the route name;
- ``names``: a list of waypoint names, one per vertex;
- ``legs``: one per vertex, ``"rhumb"`` (default), ``"great_circle"`` or null;
- ``speeds_kn``: one per vertex, planned speed in knots or null.

As in every route file, ``legs[i]`` and ``speeds_kn[i]`` describe the leg that
*arrives* at vertex ``i``, so the first entries are ignored. A FeatureCollection
may hold other features (Points, say) but exactly one LineString.
"""

from __future__ import annotations

import json
from pathlib import Path

from geo.errors import InputError
from geo.position import parse_lat, parse_lon
from geo.route import Route, Waypoint
from geo.routes_common import decode_text, leg_kind, read_bytes, route_name, speed_kn, too_few

ONE_LINE = "a GeoJSON LineString, or a Feature or FeatureCollection holding exactly one"


def load_geojson_route(path: str | Path) -> Route:
    """Read a GeoJSON route file; ``source`` is ``str(path)``."""
    return parse_geojson_route(read_bytes(path), file=str(path))


def parse_geojson_route(data: bytes | str, file: str = "") -> Route:
    """Route from GeoJSON text or bytes (UTF-8); ``file`` names it in errors."""
    text = decode_text(data, file)

    def no_constants(name: str) -> object:
        raise ValueError(name)

    try:
        doc = json.loads(text, parse_constant=no_constants)
    except json.JSONDecodeError as e:
        raise InputError(file, f"line {e.lineno}, column {e.colno}", e.msg, "valid JSON") from None
    except ValueError as e:
        raise InputError(file, "JSON", str(e), "finite numbers (no NaN or Infinity)") from None
    geometry, props, where = _find_line(doc, file)
    return _route(geometry, props, where, file)


def _find_line(doc: object, file: str) -> tuple[dict, dict, str]:
    """The LineString geometry, its properties and the place prefix for errors."""
    if not isinstance(doc, dict):
        raise InputError(file, "top level", type(doc).__name__, ONE_LINE)
    kind = doc.get("type")
    if kind == "LineString":
        return doc, {}, ""
    if kind == "Feature":
        return _feature(doc, file, "feature")
    if kind == "FeatureCollection":
        features = doc.get("features")
        if not isinstance(features, list):
            raise InputError(file, "features", None, "a list of features")
        found: list[tuple[dict, dict, str]] = []
        for i, feature in enumerate(features, start=1):
            if not isinstance(feature, dict) or feature.get("type") != "Feature":
                raise InputError(file, f"feature {i}", _short(feature), "a GeoJSON Feature")
            geom = feature.get("geometry")
            gtype = geom.get("type") if isinstance(geom, dict) else None
            if gtype in ("LineString", "MultiLineString"):
                found.append(_feature(feature, file, f"feature {i}"))
        if len(found) != 1:
            raise InputError(file, "features", f"{len(found)} LineStrings", ONE_LINE)
        return found[0]
    raise InputError(file, "type", kind, ONE_LINE)


def _feature(feature: dict, file: str, where: str) -> tuple[dict, dict, str]:
    geom = feature.get("geometry")
    props = feature.get("properties")
    if props is None:
        props = {}
    if not isinstance(props, dict):
        raise InputError(file, f"{where}, properties", _short(props), "an object or null")
    name = props.get("name")
    if name is not None and not isinstance(name, str):
        raise InputError(file, f"{where}, properties.name", _short(name), "a text")
    if name:
        where = f"{where} {name!r}"
    gtype = geom.get("type") if isinstance(geom, dict) else None
    if gtype != "LineString":
        hint = ONE_LINE
        if gtype == "MultiLineString":
            hint = (
                "a single LineString; join the parts (longitudes may run past ±180°, "
                "legs take the shorter way)"
            )
        raise InputError(file, f"{where}, geometry", gtype, hint)
    return geom, props, where


def _route(geom: dict, props: dict, where: str, file: str) -> Route:
    coords = geom.get("coordinates")
    pre = f"{where}, " if where else ""
    if not isinstance(coords, list):
        raise InputError(file, f"{pre}coordinates", _short(coords), "a list of [lon, lat]")
    n = len(coords)
    names = _per_vertex(props, "names", n, file, pre)
    legs = _per_vertex(props, "legs", n, file, pre)
    speeds = _per_vertex(props, "speeds_kn", n, file, pre)
    waypoints: list[Waypoint] = []
    for i, pos in enumerate(coords):
        at = f"{pre}vertex {i + 1}"
        if not (isinstance(pos, list) and len(pos) >= 2 and all(_is_number(v) for v in pos)):
            raise InputError(file, at, _short(pos), "[lon, lat] in decimal degrees (numbers)")
        lon = parse_lon(pos[0], file=file, place=f"{at}, longitude")
        lat = parse_lat(pos[1], file=file, place=f"{at}, latitude")
        name = names[i]
        if name is not None and not isinstance(name, str):
            raise InputError(file, f"{pre}properties.names[{i}]", _short(name), "a text or null")
        leg = leg_kind(legs[i], file, f"{pre}properties.legs[{i}]")
        speed = speed_kn(
            speeds[i],
            file,
            f"{pre}properties.speeds_kn[{i}]",
            strings=False,
            expected="a speed in knots, a number above 0, or null",
        )
        waypoints.append(Waypoint(name=name or "", lat=lat, lon=lon, leg=leg, speed_kn=speed))
    if len(waypoints) < 2:
        raise too_few(file, len(waypoints))
    return Route(
        name=route_name(props.get("name"), file),
        waypoints=tuple(waypoints),
        source=file,
        meta={"format": "geojson"},
    )


def _per_vertex(props: dict, key: str, n: int, file: str, pre: str) -> list:
    values = props.get(key)
    if values is None:
        return [None] * n
    if not isinstance(values, list) or len(values) != n:
        raise InputError(
            file,
            f"{pre}properties.{key}",
            _short(values),
            f"a list with one entry per vertex ({n})",
        )
    return values


def _is_number(v: object) -> bool:
    return isinstance(v, int | float) and not isinstance(v, bool)


def _short(value: object) -> str:
    text = json.dumps(value, ensure_ascii=False)
    return text if len(text) <= 60 else text[:57] + "..."
