"""Load sulphur control areas from GeoJSON files (RFC 7946 [RFC-7946] [P]).

Each path is a ``.geojson`` / ``.json`` file or a folder (its ``*.geojson``
files, sorted by name). A file holds a Feature or a FeatureCollection whose
features have Polygon or MultiPolygon geometries, holes allowed, positions
``[lon, lat]`` in degrees (an altitude, if any, is ignored). Properties:

- ``name`` (required, non-empty text, unique among all areas loaded together,
  compared ignoring case);
- ``sulphur_limit_pct`` (required number 0..100, % m/m);
- ``effective_from`` (required date ``YYYY-MM-DD``, UTC), optional
  ``effective_until`` (date, not before ``effective_from``);
- optional ``edges``: ``geodesic`` (default) | ``rhumb`` | ``lonlat``;
- optional ``source`` (text); any other property is kept out of the way.

Rings must be closed (last position equal to the first); the closing vertex
is removed and repeated consecutive vertices are dropped. Latitudes within
±90°; longitudes may continue past ±180 (at most one turn: within ±540°), so
a polygon across 180° may be written split there or continuous. The geometry
is then checked by :func:`geo.area_checks.check_area`.

Every refusal is one :class:`InputError` naming the file, the place
(``feature 3 'Corran Sea ECA', polygon 1, ring 2, vertex 5``) and the value.
"""

from __future__ import annotations

import gc
import json
import math
import re
from collections.abc import Iterator, Sequence
from contextlib import contextmanager
from datetime import date
from numbers import Real
from pathlib import Path

import numpy as np
import orjson
from numpy.typing import NDArray

from geo.area import EDGE_KINDS, Area, Polygon
from geo.area_checks import Text, check_area
from geo.area_rings import read_ring
from geo.errors import InputError
from geo.progress import Progress, Throttle

SUFFIXES = (".geojson", ".json")
_DATE = re.compile(r"\d{4}-\d{2}-\d{2}")
_LIMIT = "a number of % m/m sulphur from 0 to 100, such as 0.10"


def load_areas(paths: Sequence[str | Path], *, progress: Progress | None = None) -> list[Area]:
    """All areas in the given files and folders, in file order then feature order.

    ``progress``, if given, is called with a short text (``"reading areas
    3/12"``) at most a few times a second.
    """
    return _load(paths, progress, None)


NO_LIMIT_PCT = 100.0
"""The 'limit' of a caution zone: none (caution zones restrict when to change over)."""


def load_caution_zones(paths: Sequence[str | Path], *,
                       progress: Progress | None = None) -> list[Area]:
    """Caution zones (confined or congested waters, traffic lanes, pilotage areas).

    The same GeoJSON and checks as areas; only ``name`` is required. A zone is
    returned as an :class:`Area` with no limit (:data:`NO_LIMIT_PCT`), in
    force from ``effective_from`` if given, else always. ``progress`` as for
    :func:`load_areas`.
    """
    defaults = {"sulphur_limit_pct": NO_LIMIT_PCT, "effective_from": "1900-01-01"}
    return _load(paths, progress, defaults)


def _load(paths: Sequence[str | Path], progress: Progress | None,
          defaults: dict | None) -> list[Area]:
    """Read every feature of every file; ``defaults`` fill missing properties."""
    say = Throttle(progress)
    areas: list[Area] = []
    seen: dict[str, str] = {}
    files = _files(paths)
    with _gc_paused():
        for n, path in enumerate(files, start=1):
            head = f"reading areas {n}/{len(files)}"
            say(lambda head=head: head)
            features = _features(path)
            m = len(features)
            for i, feature in enumerate(features, start=1):
                say(lambda head=head, i=i, m=m: f"{head}, feature {i}/{m}")
                if defaults and isinstance(feature, dict) and isinstance(
                        feature.get("properties"), dict):
                    feature = {**feature, "properties": {**defaults, **feature["properties"]}}
                areas.append(_area(path, i, feature, seen))
    return areas


@contextmanager
def _gc_paused() -> Iterator[None]:
    """Hold the cyclic garbage collector while reading.

    Parsed JSON holds no reference cycles, yet the collector's passes over the
    millions of new lists of a big file took most of the reading time.
    """
    was_enabled = gc.isenabled()
    gc.disable()
    try:
        yield
    finally:
        if was_enabled:
            gc.enable()


def _files(paths: Sequence[str | Path]) -> list[Path]:
    out: list[Path] = []
    for p in map(Path, paths):
        if p.is_dir():
            found = sorted(f for f in p.glob("*.geojson") if f.is_file())
            if not found:
                raise InputError(
                    p,
                    "",
                    Text("a folder with no *.geojson file"),
                    "a folder holding area files (*.geojson)",
                )
            out.extend(found)
        elif p.is_file():
            if p.suffix.lower() not in SUFFIXES:
                raise InputError(
                    p,
                    "",
                    Text(f"a {p.suffix or 'plain'} file"),
                    "an area file named *.geojson or *.json",
                )
            out.append(p)
        else:
            raise InputError(
                p,
                "",
                Text("no such file or folder"),
                "an area file (.geojson, .json) or a folder of them",
            )
    unique: dict[Path, Path] = {}
    for f in out:
        unique.setdefault(f.resolve(), f)
    return list(unique.values())


def _refuse_constant(name: str) -> float:
    raise ValueError(f"{name} is not a JSON number")


def _parse(path: Path) -> object:
    """The file's JSON, by orjson: several times faster than the standard library on large
    area files and, like :func:`_parse_checked`, it refuses NaN and Infinity. A file it does
    not take is read again by :func:`_parse_checked`, which gives the one-line error."""
    try:
        data = path.read_bytes()
    except OSError as e:
        raise InputError(path, "", Text(e.strerror or "unreadable"), "a readable file") from None
    try:
        return orjson.loads(data[3:] if data.startswith(b"\xef\xbb\xbf") else data)
    except orjson.JSONDecodeError:
        return _parse_checked(path)


def _features(path: Path) -> list[dict]:
    doc = _parse(path)
    kind = doc.get("type") if isinstance(doc, dict) else None
    if kind == "Feature":
        return [doc]
    if kind == "FeatureCollection":
        feats = doc.get("features")
        if not isinstance(feats, list) or not feats:
            raise InputError(
                path,
                "features",
                Text("none") if feats == [] else feats,
                "a FeatureCollection with at least one Feature",
            )
        return feats
    raise InputError(
        path,
        "type",
        kind if isinstance(kind, str) else Text("no type"),
        "a Feature or FeatureCollection (an area needs its properties)",
    )


def _parse_checked(path: Path) -> object:
    """The file's JSON by the standard library, bad input as one :class:`InputError` line
    (the place as line and column)."""
    try:
        text = path.read_bytes().decode("utf-8-sig")
    except UnicodeDecodeError as e:
        raise InputError(path, f"byte {e.start + 1}", Text("not UTF-8"), "UTF-8 text") from None
    except OSError as e:
        raise InputError(path, "", Text(e.strerror or "unreadable"), "a readable file") from None
    try:
        doc = json.loads(text, parse_constant=_refuse_constant)
    except json.JSONDecodeError as e:
        raise InputError(
            path,
            f"line {e.lineno}, column {e.colno}",
            Text(e.msg),
            "GeoJSON (RFC 7946), valid JSON",
        ) from None
    except ValueError as e:
        raise InputError(path, "", Text(str(e)), "GeoJSON (RFC 7946), valid JSON") from None
    return doc


def _area(path: Path, i: int, feature: object, seen: dict[str, str]) -> Area:
    """Build and check the area of feature ``i`` (1-based) of ``path``."""
    place = f"feature {i}"
    if not isinstance(feature, dict) or feature.get("type") != "Feature":
        kind = feature.get("type") if isinstance(feature, dict) else feature
        raise InputError(path, place, kind, "a GeoJSON Feature")
    props = feature.get("properties")
    if props is None:
        props = {}
    if not isinstance(props, dict):
        raise InputError(path, f"{place}, properties", props, "an object of properties")

    name = props.get("name")
    if not isinstance(name, str) or not name.strip():
        raise InputError(path, f"{place}, property name", name, "the area's name, non-empty text")
    name = name.strip()
    place = f"{place} {name!r}"
    key = name.casefold()
    if key in seen:
        raise InputError(
            path, f"{place}, property name", name, f"a name not already used ({seen[key]} has it)"
        )
    seen[key] = f"{path}, feature {i}"

    limit = props.get("sulphur_limit_pct")
    if (
        isinstance(limit, bool)
        or not isinstance(limit, Real)
        or not (math.isfinite(limit) and 0.0 <= limit <= 100.0)
    ):
        raise InputError(path, f"{place}, property sulphur_limit_pct", limit, _LIMIT)
    start = _date(path, place, props, "effective_from", required=True)
    until = _date(path, place, props, "effective_until", required=False)
    if until is not None and start is not None and until < start:
        raise InputError(
            path,
            f"{place}, property effective_until",
            props["effective_until"],
            f"a date not before effective_from {start.isoformat()}",
        )
    edges = props.get("edges")
    edges = "geodesic" if edges is None else edges
    if edges not in EDGE_KINDS:
        raise InputError(path, f"{place}, property edges", edges, " | ".join(EDGE_KINDS))
    source = props.get("source")
    source = "" if source is None else source
    if not isinstance(source, str):
        raise InputError(path, f"{place}, property source", source, "text")

    polygons, numbers, arrays = _geometry(path, place, feature.get("geometry"))
    area = Area(
        name=name,
        sulphur_limit_pct=float(limit),
        effective_from=start,
        polygons=polygons,
        effective_until=until,
        edges=edges,
        source=source,
        file=str(path),
    )
    return check_area(area, file=str(path), place=place, vertex_numbers=numbers,
                      vertex_xy=arrays)


def _date(path: Path, place: str, props: dict, key: str, *, required: bool) -> date | None:
    value = props.get(key)
    if value is None and not required:
        return None
    if isinstance(value, str) and _DATE.fullmatch(value):
        try:
            return date.fromisoformat(value)
        except ValueError:
            pass
    raise InputError(
        path, f"{place}, property {key}", value, "a date YYYY-MM-DD, such as 2027-03-01"
    )


Numbers = dict[tuple[int, int], NDArray[np.int64]]
"""The file's vertex numbers (1-based) of each stored vertex, per (polygon, ring)."""


def _geometry(path: Path, place: str, geom: object
              ) -> tuple[tuple[Polygon, ...], Numbers, dict[tuple[int, int], NDArray]]:
    """Polygons of a Polygon or MultiPolygon, vertex numbers and (n, 2) arrays per ring."""
    kind = geom.get("type") if isinstance(geom, dict) else None
    coords = geom.get("coordinates") if isinstance(geom, dict) else None
    if kind not in ("Polygon", "MultiPolygon"):
        raise InputError(
            path,
            f"{place}, geometry",
            kind if geom is not None else None,
            "a Polygon or MultiPolygon geometry",
        )
    if kind == "Polygon":
        coords = [coords]
    if not isinstance(coords, list) or not coords:
        raise InputError(
            path, f"{place}, geometry coordinates", Text("none"), f"the coordinates of a {kind}"
        )
    polygons: list[Polygon] = []
    numbers: Numbers = {}
    arrays: dict[tuple[int, int], NDArray] = {}
    for pi, rings in enumerate(coords):
        where = f"{place}, polygon {pi + 1}"
        if not isinstance(rings, list) or not rings:
            raise InputError(path, where, Text("no rings"), "an exterior ring, then any holes")
        parsed = []
        for ri, ring in enumerate(rings):
            vertices, nums, xy = read_ring(path, f"{where}, ring {ri + 1}", ring)
            parsed.append(vertices)
            numbers[(pi, ri)] = nums
            arrays[(pi, ri)] = xy
        polygons.append(Polygon(parsed[0], tuple(parsed[1:])))
    return tuple(polygons), numbers, arrays
