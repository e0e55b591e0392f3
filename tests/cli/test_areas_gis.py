"""``changeover areas import`` of GIS files (Shapefile, GeoPackage, KML) through pyogrio.

The sample scenario's three invented areas (a MultiPolygon with a hole, one written
with longitudes past 180°, one with rhumb edges) are written here with pyogrio (GDAL
[GDAL-OGR]) in each format ([ESRI-SHAPEFILE], [OGC-GEOPACKAGE], [OGC-KML]) and must
import to the same areas: ``geo.area_diff`` finds nothing but their source, and the
route check gives the same crossings. A Shapefile in UTM zone 60S (EPSG:32760,
positions transformed by pyproj [PROJ-SOFTWARE] in the test) must come back within
1 mm of the WGS84 vertices, measured with pyproj's geodesic [KARNEY-2013]. A KML file
written by hand (a placemark's name, ExtendedData and TimeSpan) checks the KML reading
apart from GDAL's own writer. Every refusal: one line naming the file, exit 2, nothing
written.
"""

from __future__ import annotations

import json
import os
import warnings
from pathlib import Path

import numpy as np
import pyproj
import pytest
import shapely

from geo.area import Area
from geo.area_diff import diff_areas
from geo.area_files import load_areas
from tests.cli.test_route import ROUTE, SAMPLE, run
from tests.helpers.geo import gap_m

pyogrio = pytest.importorskip("pyogrio")
from pyogrio import raw  # noqa: E402

AREAS = load_areas([SAMPLE])
DRIVERS = {".shp": "ESRI Shapefile", ".gpkg": "GPKG", ".kml": "KML"}


def _shape(area: Area, transform=None) -> shapely.MultiPolygon:
    def ring(r):
        xy = np.array(r + r[:1], dtype=np.float64)
        if transform is not None:
            xy = np.column_stack(transform.transform(xy[:, 0], xy[:, 1]))
        return xy
    return shapely.MultiPolygon([shapely.Polygon(ring(p.exterior), [ring(h) for h in p.holes])
                                 for p in area.polygons])


def write_gis(path: Path, areas=AREAS, *, fields: dict[str, list] | None = None,
              crs: str | None = "EPSG:4326", transform=None, layer: str | None = None) -> Path:
    """Write ``areas`` with pyogrio (GDAL) as ``path``'s format; attributes ``fields``."""
    if fields is None:
        fields = {"name": [a.name for a in areas],
                  "sulphur_limit_pct": [a.sulphur_limit_pct for a in areas],
                  "effective_from": [a.effective_from.isoformat() for a in areas],
                  "edges": [a.edges for a in areas]}
    geoms = np.array(shapely.to_wkb([_shape(a, transform) for a in areas]), dtype=object)
    data = [v if isinstance(v, np.ndarray) else
            np.array(v, dtype=np.float64 if isinstance(v[0], float) else object)
            for v in fields.values()]
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")  # GDAL laundering Shapefile names, folding 184° to -176°
        raw.write(path, geoms, data, list(fields), driver=DRIVERS[path.suffix], crs=crs,
                  geometry_type="MultiPolygon", layer=layer, append=layer is not None
                  and path.exists())
    return path


def import_(source: Path, out: Path, *options: str):
    return run("areas", "import", str(source), "--out", str(out), *options)


def test_gdal_writes_and_reads_the_three_formats():
    drivers = pyogrio.list_drivers()
    for name in DRIVERS.values():
        assert "r" in drivers.get(name, "") and "w" in drivers[name], name


@pytest.fixture(scope="module")
def sample_crossings() -> list[dict]:
    r = run("route", str(ROUTE), "--areas", str(SAMPLE), "--depart", "2027-06-05T06:00+12:00",
            "--json")
    assert r.returncode == 0, r.stderr
    return json.loads(r.stdout)["crossings"]


@pytest.mark.parametrize("suffix", sorted(DRIVERS))
def test_each_format_imports_to_the_same_areas(tmp_path, suffix: str, sample_crossings):
    source = write_gis(tmp_path / f"areas{suffix}")
    out = tmp_path / "imported" / "areas.geojson"
    r = import_(source, out)
    assert r.returncode == 0, r.stderr
    assert "3 areas" in r.stdout and "EPSG:4326" in r.stdout
    assert "Corran Sea ECA: 0.10 % m/m from 2019-01-01, geodesic edges, 2 polygon(s), " \
           "12 vertices" in r.stdout
    diff = diff_areas(AREAS, load_areas([out]))
    assert {c.kind for c in diff.changes} == {"source"}, diff.changes
    r = run("route", str(ROUTE), "--areas", str(out), "--depart", "2027-06-05T06:00+12:00",
            "--json")
    assert r.returncode == 0, r.stderr
    got, ref = json.loads(r.stdout)["crossings"], sample_crossings
    assert len(ref) == 7
    assert [(c["area"], c["event"], c["leg"]) for c in got] == [
        (c["area"], c["event"], c["leg"]) for c in ref]
    for a, b in zip(ref, got, strict=True):
        assert gap_m(a["lat"], a["lon"], b["lat"], b["lon"]) < 1e-6  # [KARNEY-2013]


def test_a_projected_file_comes_back_within_a_millimetre(tmp_path):
    utm = pyproj.Transformer.from_crs("EPSG:4326", "EPSG:32760", always_xy=True)
    areas = AREAS[:2]  # Corran Sea and Meridian Reach, 170°E to 176°W: zone 60 (177°E)
    source = write_gis(tmp_path / "utm60s.shp", areas, crs="EPSG:32760", transform=utm)
    out = tmp_path / "utm.geojson"
    r = import_(source, out, "--json")
    assert r.returncode == 0, r.stderr
    report = json.loads(r.stdout)
    assert report["reprojected"] is True and report["crs"] == "EPSG:32760"
    back = load_areas([out])
    for a, b in zip(areas, back, strict=True):
        assert diff_areas([a], [b]).changes  # moved by round-off, so not bit for bit
        worst = 0.0
        for p, q in zip(a.polygons, b.polygons, strict=True):
            for r1, r2 in zip((p.exterior, *p.holes), (q.exterior, *q.holes), strict=True):
                # the Shapefile writer turns rings clockwise: match each vertex to the nearest
                x1, y1 = np.array(r1).T
                x2, y2 = np.array(r2).T
                assert len(r1) == len(r2)
                d = gap_m(y1[:, None], x1[:, None], y2[None, :], x2[None, :])
                worst = max(worst, float(d.min(axis=1).max()))
        assert worst < 1e-3, (a.name, worst)  # [KARNEY-2013] pyproj geodesic distance


HANDWRITTEN_KML = """<?xml version="1.0" encoding="UTF-8"?>
<kml xmlns="http://www.opengis.net/kml/2.2">
<Document><name>Invented areas (not legal boundaries)</name>
<Placemark>
  <name>Corran Sea ECA</name>
  <ExtendedData><Data name="sulphur_limit_pct"><value>0.10</value></Data>
    <Data name="effective_from"><value>2019-01-01</value></Data></ExtendedData>
  <MultiGeometry>
    <Polygon><outerBoundaryIs><LinearRing><coordinates>
      170,-44 178,-44 178,-36 170,-36 170,-44</coordinates></LinearRing></outerBoundaryIs>
      <innerBoundaryIs><LinearRing><coordinates>
      173,-41 175,-41 175,-39 173,-39 173,-41</coordinates></LinearRing></innerBoundaryIs>
    </Polygon>
    <Polygon><outerBoundaryIs><LinearRing><coordinates>
      176.5,-43 177.8,-43 177.8,-38 176.5,-38 176.5,-43</coordinates></LinearRing>
    </outerBoundaryIs></Polygon>
  </MultiGeometry>
</Placemark>
<Placemark>
  <name>Meridian Reach ECA</name>
  <TimeSpan><begin>2021-07-01</begin></TimeSpan>
  <ExtendedData><Data name="limit_pct"><value>0.10</value></Data></ExtendedData>
  <Polygon><outerBoundaryIs><LinearRing><coordinates>
    178.5,-42,0 -176,-42,0 -176,-37,0 178.5,-37,0 178.5,-42,0
  </coordinates></LinearRing></outerBoundaryIs></Polygon>
</Placemark>
</Document>
</kml>
"""


def test_a_handwritten_kml(tmp_path):
    source = tmp_path / "reach.kml"
    source.write_text(HANDWRITTEN_KML, encoding="utf-8")
    out = tmp_path / "reach.geojson"
    r = import_(source, out)
    assert r.returncode == 0, r.stderr
    diff = diff_areas(AREAS[:2], load_areas([out]))  # a MultiGeometry with a hole; a TimeSpan
    assert {c.kind for c in diff.changes} == {"source"}, diff.changes


def test_a_limit_or_dates_given_for_features_without(tmp_path):
    fields = {"area_name": [a.name for a in AREAS]}
    source = write_gis(tmp_path / "bare.gpkg", fields=fields)
    out = tmp_path / "bare.geojson"
    r = import_(source, out, "--limit", "0.10", "--from", "2019-01-01", "--json")
    assert r.returncode == 0, r.stderr
    report = json.loads(r.stdout)
    assert all(a["origin"]["sulphur_limit_pct"] == "option" for a in report["areas"])
    doc = json.loads(out.read_text(encoding="utf-8"))
    assert "Given on the command line: sulphur_limit_pct, effective_from" in \
           doc["features"][0]["properties"]["note"]
    assert [a.effective_from.isoformat() for a in load_areas([out])] == ["2019-01-01"] * 3


def test_a_single_precision_limit_and_a_date_field(tmp_path):
    source = write_gis(tmp_path / "f32.gpkg", AREAS[:1], fields={
        "name": ["Corran Sea ECA"], "limit_pct": np.array([0.1], dtype=np.float32),
        "valid_from": np.array(["2019-01-01"], dtype="datetime64[D]")})
    assert float(np.float32(0.1)) != 0.1  # what the file holds
    out = tmp_path / "f32.geojson"
    assert import_(source, out).returncode == 0
    (area,) = load_areas([out])
    assert area.sulphur_limit_pct == 0.1 and area.effective_from.isoformat() == "2019-01-01"


def test_name_field_and_layer(tmp_path):
    source = write_gis(tmp_path / "two.gpkg", AREAS[:1], layer="eca", fields={
        "label": ["Corran Sea ECA"], "sulphur_limit_pct": [0.1], "valid_from": ["2019-01-01"]})
    write_gis(source, AREAS[1:2], layer="other", fields={
        "label": ["Meridian Reach ECA"], "sulphur_limit_pct": [0.1], "valid_from": ["2021-07-01"]})
    out = tmp_path / "one.geojson"
    r = import_(source, out, "--layer", "other", "--name-field", "label")
    assert r.returncode == 0, r.stderr
    assert [a.name for a in load_areas([out])] == ["Meridian Reach ECA"]


def _refused(tmp_path: Path, source: Path, *options: str, env: dict | None = None) -> str:
    out = tmp_path / "out" / "refused.geojson"
    r = run_env(["areas", "import", str(source), "--out", str(out), *options], env)
    assert r.returncode == 2, r.stdout + r.stderr
    assert len(r.stderr.splitlines()) == 1 and r.stderr.startswith("changeover: error: ")
    assert not out.parent.exists() and not r.stdout
    return r.stderr


def run_env(args: list[str], env: dict | None):
    if env is None:
        return run(*args)
    import subprocess
    import sys

    from tests.helpers.paths import ROOT
    return subprocess.run([sys.executable, "-m", "planner", *args], cwd=ROOT,
                          capture_output=True, text=True, timeout=120,
                          env={**os.environ, **env})


def _fields(**over):
    base = {"name": ["Corran Sea ECA"], "sulphur_limit_pct": [0.1],
            "effective_from": ["2019-01-01"]}
    base.update(over)
    return {k: v for k, v in base.items() if v is not None}


GIS_REFUSALS = [
    # (attributes, options, words)
    (_fields(sulphur_limit_pct=None), [], ["feature 1 'Corran Sea ECA': no sulphur limit: "
                                           "expected an attribute sulphur_limit_pct", "--limit"]),
    (_fields(effective_from=None), [], ["no date in force from", "or --from"]),
    (_fields(name=None, label=["x"]), [], ["feature 1: missing: expected a name in an "
                                           "attribute", "--name-field"]),
    (_fields(), ["--name-field", "label"], ["--name-field: 'label': expected one of the "
                                            "layer's attributes: name"]),
    (_fields(sulphur_limit_pct=["lots"]), [], ["attribute sulphur_limit_pct: 'lots': expected a "
                                               "number of % m/m"]),
    (_fields(effective_from=["1 March"]), [], ["attribute effective_from: '1 March': expected "
                                               "a date YYYY-MM-DD"]),
    (_fields(edges=["curved"]), [], ["attribute edges: 'curved': expected geodesic | rhumb"]),
    (_fields(effective_until=["2018-01-01"]), [], ["effective_until: '2018-01-01': expected a "
                                                   "date not before effective_from 2019-01-01"]),
]


@pytest.mark.parametrize("fields, options, words", GIS_REFUSALS,
                         ids=[w[0][:30] for _, _, w in GIS_REFUSALS])
def test_refusals(tmp_path, fields, options, words):
    source = write_gis(tmp_path / "one.gpkg", AREAS[:1], fields=fields)
    msg = _refused(tmp_path, source, *options)
    assert str(source) in msg
    for w in words:
        assert w in msg, msg


def test_refusals_of_the_file(tmp_path):
    two = write_gis(tmp_path / "two.gpkg", AREAS[:1], layer="a")
    write_gis(two, AREAS[1:2], layer="b")
    assert "2 layers (a, b): expected --layer NAME" in _refused(tmp_path, two)
    assert "--layer: 'c': expected one of the file's layers: a, b" in _refused(
        tmp_path, two, "--layer", "c")
    dup = write_gis(tmp_path / "dup.gpkg", AREAS[:2], fields={
        "name": ["Same", "same"], "sulphur_limit_pct": [0.1, 0.1],
        "effective_from": ["2019-01-01"] * 2})
    assert "feature 2 'same': 'same': expected a name not already used (feature 1 'Same'" in \
           _refused(tmp_path, dup)
    nocrs = write_gis(tmp_path / "nocrs.shp", AREAS[:1], crs=None)
    assert "no coordinate reference system" in _refused(tmp_path, nocrs)
    r = import_(nocrs, tmp_path / "ok.geojson", "--crs", "EPSG:4326")
    assert r.returncode == 0, r.stderr
    assert "--crs: 'EPSG:99999': expected a coordinate reference system" in _refused(
        tmp_path, nocrs, "--crs", "EPSG:99999")


def test_refused_geometry_and_self_intersection(tmp_path):
    line = tmp_path / "line.gpkg"
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        raw.write(line, np.array([shapely.to_wkb(shapely.LineString([(170, -40), (175, -40)]))],
                                 dtype=object),
                  [np.array(["L"], dtype=object), np.array([0.1]),
                   np.array(["2019-01-01"], dtype=object)],
                  ["name", "sulphur_limit_pct", "effective_from"], driver="GPKG",
                  crs="EPSG:4326", geometry_type="LineString")
    assert "feature 1 'L', geometry: LineString: expected a Polygon or MultiPolygon" in \
           _refused(tmp_path, line)
    bow = tmp_path / "bow.gpkg"
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        raw.write(bow, np.array([shapely.to_wkb(shapely.Polygon(
            [(171, -40), (174, -38), (174, -40), (171, -38)]))], dtype=object),
                  [np.array(["Bow"], dtype=object), np.array([0.1]),
                   np.array(["2019-01-01"], dtype=object)],
                  ["name", "sulphur_limit_pct", "effective_from"], driver="GPKG",
                  crs="EPSG:4326", geometry_type="Polygon")
    msg = _refused(tmp_path, bow)
    assert "feature 1 'Bow', polygon 1, ring 1: crosses or touches itself" in msg, msg


def test_without_pyogrio_one_line_says_how_to_install(tmp_path):
    stub = tmp_path / "stub" / "pyogrio"
    stub.mkdir(parents=True)
    (stub / "__init__.py").write_text("raise ImportError('no pyogrio here')\n", encoding="utf-8")
    from tests.helpers.paths import ROOT
    source = write_gis(tmp_path / "areas.gpkg")
    msg = _refused(tmp_path, source, env={"PYTHONPATH": os.pathsep.join(
        [str(stub.parent), str(ROOT)])})
    assert "pyogrio is not installed: expected the GIS reader: pip install " \
           "'changeover[gis]'" in msg, msg
    # the main job and the list import never need it
    env = {**os.environ, "PYTHONPATH": os.pathsep.join([str(stub.parent), str(ROOT)])}
    for args in (["route", str(ROUTE), "--areas", str(SAMPLE), "--on", "2027-01-01"],
                 ["areas", "import", str(ROOT / "tests/data/area_lists/meridian_reach.txt"),
                  "--name", "M", "--limit", "0.1", "--from", "2021-07-01",
                  "--out", str(tmp_path / "m.geojson")]):
        r = run_env(args, env)
        assert r.returncode == 0, r.stderr


def test_name_given_for_one_feature_and_refused_for_several(tmp_path):
    one = write_gis(tmp_path / "one.gpkg", AREAS[:1])
    out = tmp_path / "one.geojson"
    r = import_(one, out, "--name", "Corran Outer ECA")
    assert r.returncode == 0, r.stderr
    assert [a.name for a in load_areas([out])] == ["Corran Outer ECA"]
    three = write_gis(tmp_path / "three.gpkg")
    assert "--name: 'X': expected no --name for a layer of 3 features" in _refused(
        tmp_path, three, "--name", "X")


def _write_one(path: Path, geom, crs: str = "EPSG:4326") -> Path:
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        raw.write(path, np.array([geom if geom is None else shapely.to_wkb(geom)], dtype=object),
                  [np.array(["A"], dtype=object), np.array([0.1]),
                   np.array(["2019-01-01"], dtype=object)],
                  ["name", "sulphur_limit_pct", "effective_from"], driver="GPKG", crs=crs,
                  geometry_type="Polygon")
    return path


def test_refusals_of_unreadable_or_empty_files_and_bad_geometry(tmp_path):
    junk = tmp_path / "junk.gpkg"
    junk.write_text("not a geopackage", encoding="utf-8")
    assert "not recognized as being in a supported file format.: expected a Shapefile, " \
           "GeoPackage or KML file" in _refused(tmp_path, junk)
    assert "nowhere.shp: no such file: expected a Shapefile" in _refused(
        tmp_path, tmp_path / "nowhere.shp")
    empty = tmp_path / "empty.gpkg"
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        raw.write(empty, np.array([], dtype=object), [np.array([], dtype=object)], ["name"],
                  driver="GPKG", crs="EPSG:4326", geometry_type="Polygon")
    assert "layer empty: no features: expected at least one area" in _refused(tmp_path, empty)
    far = _write_one(tmp_path / "far.gpkg", shapely.Polygon([(0, 0), (1e9, 0), (1e9, 1e9)]),
                     crs="EPSG:32760")
    assert "feature 1 'A', polygon 1, ring 1: positions off the globe" in _refused(tmp_path, far)
    thin = _write_one(tmp_path / "thin.gpkg", shapely.Polygon([(170, -40), (171, -40),
                                                               (171, -40), (170, -40)]))
    assert "feature 1 'A', polygon 1: a ring of fewer than three distinct vertices" in \
           _refused(tmp_path, thin)
    none = _write_one(tmp_path / "none.gpkg", None)
    assert "feature 1 'A', geometry: no geometry: expected a Polygon or MultiPolygon" in \
           _refused(tmp_path, none)
