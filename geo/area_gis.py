"""Read areas from GIS files (Shapefile, GeoPackage, KML) through pyogrio and its GDAL.

pyogrio (with the GDAL it bundles [GDAL-OGR]) is the optional extra
``changeover[gis]`` and is imported only when a GIS file is read: Shapefile
[ESRI-SHAPEFILE], GeoPackage [OGC-GEOPACKAGE] and KML [OGC-KML]. Each Polygon
or MultiPolygon feature of the layer becomes one area; a file in another
coordinate reference system is reprojected to WGS84 longitude and latitude by
pyproj [PROJ-SOFTWARE] [WGS84] [P].
The file's attributes are matched to ours by :data:`FIELD_NAMES` (case
ignored; the first one with a value wins), which covers the 10-letter names a
Shapefile cuts ours to and a KML placemark's name and time span. What a
feature lacks may be given for all features (a limit, dates, the edges); a
feature with no limit and none given is refused, and so is one with no
effective date. Every refusal is one :class:`InputError` naming the file and
the feature.
"""

from __future__ import annotations

import math
import re
import warnings
from collections.abc import Mapping, Sequence
from dataclasses import dataclass
from datetime import date, datetime
from pathlib import Path

import numpy as np
import shapely

from geo.area import EDGE_KINDS, Area, Polygon
from geo.area_checks import Text
from geo.area_import import AreaProperties, checked_area, refuse_duplicate_names, unwrap_lonlat
from geo.errors import InputError

SUFFIXES = (".shp", ".gpkg", ".kml")
"""The GIS files read (others that GDAL reads may work but are not tested)."""

FIELD_NAMES: Mapping[str, tuple[str, ...]] = {
    "name": ("name", "area_name", "areaname", "title"),
    "sulphur_limit_pct": ("sulphur_limit_pct", "sulphur_li", "limit_pct", "sulphur_pct",
                          "s_limit", "limit"),
    "effective_from": ("effective_from", "effective_", "eff_from", "valid_from", "from_date",
                       "in_force", "begin"),
    "effective_until": ("effective_until", "effectiv_1", "eff_until", "valid_to",
                        "valid_until", "until_date", "end"),
    "edges": ("edges", "edge_type"),
    "source": ("source", "src"),
}
"""Our property name, and the attribute names read as it, in order of preference."""

INSTALL = "pip install 'changeover[gis]'"

LIMIT_DECIMALS = 6
"""A limit attribute is read to this many decimals [% m/m]: a single-precision attribute
holds 0.10 as 0.1000000015."""


@dataclass(frozen=True)
class Given:
    """Values given on the command line for features that lack them (None: not given).

    Attributes
    ----------
    sulphur_limit_pct : limit [% m/m]
    effective_from, effective_until : dates in force (UTC)
    edges : one of :data:`geo.area.EDGE_KINDS`
    name_field : the attribute holding the name, instead of :data:`FIELD_NAMES`
    name : the name of the one feature of a layer (refused for a layer of several)
    crs : the coordinate reference system of a file that does not say, e.g. ``EPSG:4326``
    """

    sulphur_limit_pct: float | None = None
    effective_from: date | None = None
    effective_until: date | None = None
    edges: str | None = None
    name_field: str | None = None
    name: str | None = None
    crs: str | None = None

    def __post_init__(self) -> None:
        if self.edges is not None and self.edges not in EDGE_KINDS:
            raise ValueError(f"edges {self.edges!r} not one of {EDGE_KINDS}")
        if self.sulphur_limit_pct is not None and not 0.0 <= self.sulphur_limit_pct <= 100.0:
            raise ValueError(f"limit {self.sulphur_limit_pct} % outside 0..100")


@dataclass(frozen=True)
class GisImport:
    """What was read: the checked areas, and per area where each property came from.

    Attributes
    ----------
    areas : one per feature, in the layer's order
    origins : per area, property name -> ``"file"`` or ``"option"`` or ``"default"``
    layer : the layer read
    crs : the file's coordinate reference system, as named by it
    reprojected : whether the positions were transformed to WGS84
    """

    areas: tuple[Area, ...]
    origins: tuple[dict[str, str], ...]
    layer: str
    crs: str
    reprojected: bool


def read_gis_areas(path: str | Path, *, layer: str | None = None,
                   given: Given = Given()) -> GisImport:
    """The areas of one layer of a GIS file (see the module notes)."""
    pyogrio = _pyogrio(path)
    path = Path(path)
    if not path.is_file():
        raise InputError(path, "", Text("no such file"), "a Shapefile, GeoPackage or KML file")
    layer = _layer(pyogrio, path, layer)
    try:
        with warnings.catch_warnings():
            warnings.simplefilter("ignore")
            meta, _, wkb, fields = pyogrio.raw.read(path, layer=layer, force_2d=True)
    except Exception as e:  # GDAL's own errors: one line
        raise InputError(path, f"layer {layer}", Text(str(e).splitlines()[0]),
                         "a file GDAL can read") from None
    names = [str(n) for n in meta["fields"]]
    columns = dict(zip(names, fields, strict=True))
    geoms = shapely.from_wkb(wkb) if len(wkb) else []
    to_wgs84, crs_name = _transformer(meta.get("crs"), given.crs, path)
    if not len(geoms):
        raise InputError(path, f"layer {layer}", Text("no features"), "at least one area")
    areas, origins, places = [], [], []
    for i, geom in enumerate(geoms):
        row = {n: columns[n][i] for n in names}
        props, origin = _properties(row, path, i + 1, given, len(geoms))
        place = f"feature {i + 1} {props.name!r}"
        polygons = _polygons(geom, to_wgs84, props.edges, path, place)
        areas.append(checked_area(props, polygons, str(path), place))
        origins.append(origin)
        places.append(place)
    refuse_duplicate_names([a.name for a in areas], str(path), places)
    return GisImport(tuple(areas), tuple(origins), layer, crs_name, to_wgs84 is not None)


def _pyogrio(path: str | Path):
    try:
        import pyogrio
        import pyogrio.raw  # noqa: F401
    except ImportError:
        raise InputError(path, "", Text("pyogrio is not installed"),
                         f"the GIS reader: {INSTALL}") from None
    return pyogrio


def _layer(pyogrio, path: Path, layer: str | None) -> str:
    try:
        layers = [str(row[0]) for row in pyogrio.list_layers(path)]
    except Exception as e:  # GDAL's own words, up to its advice
        raise InputError(path, "", Text(str(e).splitlines()[0].split(";")[0].strip()),
                         "a Shapefile, GeoPackage or KML file") from None
    if layer is not None:
        if layer not in layers:
            raise InputError(path, "--layer", layer, f"one of the file's layers: "
                             f"{', '.join(layers)}")
        return layer
    if len(layers) != 1:
        raise InputError(path, "", Text(f"{len(layers)} layers ({', '.join(layers)})"),
                         "--layer NAME to say which one holds the areas")
    return layers[0]


def _transformer(crs: str | None, given: str | None, path: Path):
    """(a pyproj Transformer to WGS84 lon/lat, or None when already there; the CRS's name)."""
    import pyproj

    text = crs or given
    if text is None:
        raise InputError(path, "", Text("no coordinate reference system (a Shapefile's .prj "
                                        "is missing?)"),
                         "a file that names its CRS, or --crs such as EPSG:4326")
    try:
        source = pyproj.CRS.from_user_input(text)
    except pyproj.exceptions.CRSError:
        raise InputError("--crs" if crs is None else path, "", text,
                         "a coordinate reference system such as EPSG:4326") from None
    wgs84 = pyproj.CRS.from_epsg(4326)
    name = source.to_string() if source.to_epsg() is None else f"EPSG:{source.to_epsg()}"
    if source.equals(wgs84, ignore_axis_order=True):
        return None, name
    return pyproj.Transformer.from_crs(source, wgs84, always_xy=True), name


def _value(row: Mapping[str, object], aliases: Sequence[str]) -> tuple[str | None, object]:
    """(attribute name, value) of the first alias present with a value, or (None, None)."""
    by_case = {k.casefold(): k for k in row}
    for alias in aliases:
        key = by_case.get(alias.casefold())
        if key is None:
            continue
        v = row[key]
        if v is None or (isinstance(v, float) and math.isnan(v)) or (
                isinstance(v, np.datetime64) and np.isnat(v)) or (isinstance(v, str)
                                                                  and not v.strip()):
            continue
        return key, v
    return None, None


def _properties(row: Mapping[str, object], path: Path, n: int, given: Given,
                count: int) -> tuple[AreaProperties, dict[str, str]]:
    place = f"feature {n}"
    origin: dict[str, str] = {}
    aliases = (given.name_field,) if given.name_field else FIELD_NAMES["name"]
    if given.name_field and given.name_field.casefold() not in {k.casefold() for k in row}:
        raise InputError(path, "--name-field", given.name_field,
                         f"one of the layer's attributes: {', '.join(row)}")
    if given.name and count != 1:
        raise InputError("--name", "", given.name, f"no --name for a layer of {count} "
                         "features: their names come from an attribute (--name-field)")
    key, name = _value(row, aliases)
    if given.name:
        name, origin["name"] = given.name, "option"
    if name is None:
        raise InputError(path, place, None, f"a name in an attribute ({', '.join(aliases)}); "
                         "--name-field says which attribute holds it")
    name = str(name).strip()
    origin.setdefault("name", "file")
    place = f"{place} {name!r}"

    key, limit = _value(row, FIELD_NAMES["sulphur_limit_pct"])
    limit_pct = _number(limit, path, f"{place}, attribute {key}") if key else None
    origin["sulphur_limit_pct"] = "file" if key else "option"
    if limit_pct is None:
        limit_pct = given.sulphur_limit_pct
    if limit_pct is None:
        raise InputError(path, place, Text("no sulphur limit"),
                         f"an attribute {FIELD_NAMES['sulphur_limit_pct'][0]} (or "
                         f"{', '.join(FIELD_NAMES['sulphur_limit_pct'][1:])}), or --limit")
    start = _date_of(row, "effective_from", given.effective_from, path, place, origin)
    if start is None:
        raise InputError(path, place, Text("no date in force from"),
                         f"an attribute {FIELD_NAMES['effective_from'][0]} (or "
                         f"{', '.join(FIELD_NAMES['effective_from'][1:])}), or --from")
    until = _date_of(row, "effective_until", given.effective_until, path, place, origin)
    key, edges = _value(row, FIELD_NAMES["edges"])
    if key is not None and str(edges).strip().lower() not in EDGE_KINDS:
        raise InputError(path, f"{place}, attribute {key}", edges, " | ".join(EDGE_KINDS))
    origin["edges"] = "file" if key else ("option" if given.edges else "default")
    edges = str(edges).strip().lower() if key else (given.edges or "geodesic")
    key, source = _value(row, FIELD_NAMES["source"])
    source = str(source).strip() if key else str(path)
    origin["source"] = "file" if key else "default"
    if until is not None and until < start:
        raise InputError(path, f"{place}, effective_until", until.isoformat(),
                         f"a date not before effective_from {start.isoformat()}")
    return AreaProperties(name, limit_pct, start, until, edges, source), origin


def _number(value: object, path: Path, where: str) -> float:
    try:
        v = float(str(value).strip()) if isinstance(value, str) else float(value)
    except (TypeError, ValueError):
        v = math.nan
    if not (math.isfinite(v) and 0.0 <= v <= 100.0) or isinstance(value, bool):
        raise InputError(path, where, value, "a number of % m/m sulphur from 0 to 100, "
                         "such as 0.10")
    return round(v, LIMIT_DECIMALS)


_DATE = re.compile(r"(\d{4})[-/]?(\d{2})[-/]?(\d{2})(?:[T ].*)?")


def _date_of(row: Mapping[str, object], prop: str, given: date | None, path: Path, place: str,
             origin: dict[str, str]) -> date | None:
    key, value = _value(row, FIELD_NAMES[prop])
    if key is None:
        origin[prop] = "option" if given else "default"
        return given
    origin[prop] = "file"
    if isinstance(value, np.datetime64):
        value = str(value.astype("datetime64[D]"))
    if isinstance(value, datetime):
        value = value.date()
    if isinstance(value, date):
        return value
    m = _DATE.fullmatch(str(value).strip())
    if m:
        try:
            return date(int(m[1]), int(m[2]), int(m[3]))
        except ValueError:
            pass
    raise InputError(path, f"{place}, attribute {key}", value,
                     "a date YYYY-MM-DD, such as 2027-03-01")


def _polygons(geom: object, to_wgs84, edges: str, path: Path, place: str) -> list[Polygon]:
    """The polygons of a feature's geometry, in WGS84 (lon, lat) [deg], rings open."""
    parts = shapely.get_parts(geom) if geom is not None else []
    kinds = {shapely.get_type_id(p) for p in parts}
    if geom is None or shapely.is_empty(geom) or not kinds <= {3}:  # 3: Polygon
        kind = "no geometry" if geom is None else shapely.get_type_id(geom)
        shown = Text(kind if isinstance(kind, str) else geom.geom_type)
        raise InputError(path, f"{place}, geometry", shown, "a Polygon or MultiPolygon")
    out = []
    for k, poly in enumerate(parts, start=1):
        holes = range(shapely.get_num_interior_rings(poly))
        rings = [shapely.get_exterior_ring(poly),
                 *(shapely.get_interior_ring(poly, j) for j in holes)]
        opened = []
        for r, ring in enumerate(rings, start=1):
            xy = shapely.get_coordinates(ring)[:-1]
            if to_wgs84 is not None:
                lon, lat = to_wgs84.transform(xy[:, 0], xy[:, 1])
                xy = np.column_stack([lon, lat])
            if not np.isfinite(xy).all() or np.any(np.abs(xy[:, 1]) > 90.0):
                raise InputError(path, f"{place}, polygon {k}, ring {r}",
                                 Text("positions off the globe"),
                                 "positions that the file's CRS turns into WGS84 latitudes "
                                 "and longitudes")
            keep = np.ones(len(xy), dtype=bool)
            keep[1:] = np.any(xy[1:] != xy[:-1], axis=1)
            ring_t = tuple((float(x), float(y)) for x, y in xy[keep])
            opened.append(unwrap_lonlat(ring_t) if edges == "lonlat" and len(ring_t) > 2
                          else ring_t)
        if any(len(r) < 3 for r in opened):
            raise InputError(path, f"{place}, polygon {k}", Text("a ring of fewer than three "
                                                                  "distinct vertices"),
                             "rings of at least three distinct vertices")
        out.append(Polygon(opened[0], tuple(opened[1:])))
    return out
