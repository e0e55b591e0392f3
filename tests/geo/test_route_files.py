"""Route files: CSV, GeoJSON, the dispatcher by extension, and every refusal.

Fixtures in tests/data/routes/ are small fictional routes written for these
tests. GeoJSON is [RFC-7946] [P]. GPX and RTZ files (XML) are tested in
tests/geo/test_route_files_xml.py.
"""

from __future__ import annotations

import shutil
from pathlib import Path

import pytest

from geo.route_loader import check_sailable, load_route, lon_change
from geo.routes_csv import load_csv_route, parse_csv_route
from geo.routes_geojson import load_geojson_route, parse_geojson_route
from geo.routes_rtz import load_rtz_route
from tests.helpers.geo import refused_call
from tests.helpers.paths import DATA

DATA = DATA / "routes"


# --- CSV -------------------------------------------------------------------------------------


def test_csv_fixture() -> None:
    path = DATA / "sample.csv"
    route = load_csv_route(path)
    assert route.source == str(path) and route.name == "sample"
    assert [w.name for w in route.waypoints] == ["Alpha", "Bravo", "Charlie", "Delta"]
    a, b, c, d = route.waypoints
    assert (a.lat, a.lon) == pytest.approx((50.1, -1.5))
    assert (c.lat, c.lon) == pytest.approx((51.0, -0.5))
    assert (d.lat, d.lon) == pytest.approx((51.0 + 30.5 / 60, 0.25))
    assert [w.leg for w in route.waypoints] == ["rhumb", "great_circle", "rhumb", "great_circle"]
    assert [w.speed_kn for w in route.waypoints] == [None, 12.5, None, 14.0]


def test_csv_column_order_free_and_optional_columns() -> None:
    route = parse_csv_route("lon,lat\n-1,50\n-2,51\n", file="x.csv")
    assert [(w.lat, w.lon, w.name, w.leg, w.speed_kn) for w in route.waypoints] == [
        (50.0, -1.0, "", "rhumb", None),
        (51.0, -2.0, "", "rhumb", None),
    ]


def test_csv_bom_and_crlf() -> None:
    data = "\ufeffname,lat,lon\r\nA,50,-1\r\nB,51,-1\r\n".encode()
    assert parse_csv_route(data, file="x.csv").waypoints[1].name == "B"


@pytest.mark.parametrize(
    ("text", "place", "value"),
    [
        ("name,lat,lon\nA,50,-1\nB,95,-1\n", "line 3, column lat", "95"),
        ("name,lat,lon\nA,50,-1\nB,,-1\n", "line 3, column lat", ""),
        ("name,lat,lon\n# c\n\nA,50,-1\nB,51,1°N\n", "line 5, column lon", "1°N"),
        ("name,lat,lon,leg\nA,50,-1,\nB,51,-1,gc\n", "line 3, column leg", "gc"),
        ("name,lat,lon,speed_kn\nA,50,-1,\nB,51,-1,0\n", "line 3, column speed_kn", "0"),
        ("name,lat,lon,speed_kn\nA,50,-1,\nB,51,-1,-3\n", "line 3, column speed_kn", "-3"),
        ("name,lat,lon,speed_kn\nA,50,-1,\nB,51,-1,12 kn\n", "line 3, column speed_kn", "12 kn"),
        ("name,lat,lon,speed_kn\nA,50,-1,\nB,51,-1,nan\n", "line 3, column speed_kn", "nan"),
        ("name,lat,lon\nA,50,-1\nB,51\n", "line 3", "B,51"),
        ("name,lat,lon\nA,50,-1,x\nB,51,-1\n", "line 2", "A,50,-1,x"),
        ('name,lat,lon\n"A,50,-1\nB,51,-1\n', "line 2", '"A,50,-1'),
    ],
)
def test_csv_refusals_name_line_and_column(text: str, place: str, value: str) -> None:
    err = refused_call(parse_csv_route, text, file="r.csv")
    assert err.file == "r.csv" and err.place == place and err.value == value
    assert str(err).startswith(f"r.csv: {place}: ")


def test_csv_header_required() -> None:
    err = refused_call(parse_csv_route, "A,50,-1\nB,51,-1\n", file="r.csv")
    assert err.place == "line 1 (header)" and "missing lat, lon" in err.expected
    err = refused_call(parse_csv_route, "name;lat;lon\nA;50;-1\n", file="r.csv")
    assert "semicolons" in err.expected
    err = refused_call(parse_csv_route, "lat,lon,LAT\n1,2,3\n", file="r.csv")
    assert "twice" in err.expected
    err = refused_call(parse_csv_route, "# only a comment\n\n", file="r.csv")
    assert err.value is None and "header" in err.expected


def test_csv_too_few_and_bad_encoding() -> None:
    err = refused_call(parse_csv_route, "lat,lon\n50,-1\n", file="r.csv")
    assert "at least two waypoints" in err.expected
    err = refused_call(parse_csv_route, b"lat,lon\n50,-1\n51,\xff\n", file="r.csv")
    assert err.place == "line 3" and err.expected == "UTF-8 text"


# --- GeoJSON ---------------------------------------------------------------------------------


def test_geojson_feature_fixture() -> None:
    route = load_geojson_route(DATA / "sample.geojson")
    assert route.name == "Sample passage" and route.source.endswith("sample.geojson")
    assert [w.name for w in route.waypoints] == ["Alpha", "Bravo", "Charlie"]
    assert [(w.lat, w.lon) for w in route.waypoints] == [(50.1, -1.5), (50.5, -1.0), (51.0, -0.5)]
    assert [w.leg for w in route.waypoints] == ["rhumb", "great_circle", "rhumb"]
    assert [w.speed_kn for w in route.waypoints] == [None, 12.5, None]


def test_geojson_collection_ignores_points_and_keeps_lon_as_written() -> None:
    route = load_geojson_route(DATA / "sample_collection.geojson")
    assert route.name == "Across the date line"
    assert [w.lon for w in route.waypoints] == [179.5, -179.5]
    assert [w.leg for w in route.waypoints] == ["rhumb", "rhumb"]


def test_geojson_bare_linestring_named_after_file() -> None:
    text = '{"type": "LineString", "coordinates": [[0, 50], [1, 51]]}'
    route = parse_geojson_route(text, file="some/dir/passage.json")
    assert route.name == "passage" and route.waypoints[1].lat == 51.0


def _feature(props: str = "{}", coords: str = "[[0, 50], [1, 51]]",
             gtype: str = "LineString") -> str:
    return (
        f'{{"type": "Feature", "properties": {props}, '
        f'"geometry": {{"type": "{gtype}", "coordinates": {coords}}}}}'
    )


@pytest.mark.parametrize(
    ("text", "place_part", "expected_part"),
    [
        ("[1, 2]", "top level", "LineString"),
        ('{"type": "Point", "coordinates": [0, 0]}', "type", "LineString"),
        (
            _feature(gtype="MultiLineString", coords="[[[0, 50], [1, 51]]]"),
            "geometry",
            "join the parts",
        ),
        (_feature(gtype="Polygon"), "geometry", "LineString"),
        (
            '{"type": "FeatureCollection", "features": [' + _feature() + "," + _feature() + "]}",
            "features",
            "exactly one",
        ),
        ('{"type": "FeatureCollection", "features": []}', "features", "exactly one"),
        ('{"type": "FeatureCollection", "features": [3]}', "feature 1", "Feature"),
        (_feature(coords='[[0, 50], ["1", 51]]'), "vertex 2", "numbers"),
        (_feature(coords="[[0, 50], [1]]"), "vertex 2", "[lon, lat]"),
        (_feature(coords="[[0, 50], [1, 91]]"), "vertex 2, latitude", "a latitude"),
        (_feature(coords="[[0, 50], [true, 50]]"), "vertex 2", "numbers"),
        (_feature(coords="[[0, 50]]"), "route", "at least two"),
        (_feature(coords='"x"'), "coordinates", "list"),
        (_feature('{"legs": ["rhumb"]}'), "properties.legs", "one entry per vertex (2)"),
        (_feature('{"legs": [null, "gc"]}'), "properties.legs[1]", "rhumb or great_circle"),
        (_feature('{"speeds_kn": [null, "12"]}'), "properties.speeds_kn[1]", "a number"),
        (_feature('{"speeds_kn": [null, 0]}'), "properties.speeds_kn[1]", "above 0"),
        (_feature('{"names": [null, 5]}'), "properties.names[1]", "a text"),
        (_feature('{"name": 5}'), "properties.name", "a text"),
        (_feature("[1]"), "properties", "an object"),
        (_feature(coords="[[0, 50], [NaN, 51]]"), "JSON", "no NaN"),
        ('{"type": "LineString",\n "coordinates": [[0, 50], [1, 51],]}', "line 2, column", "JSON"),
    ],
)
def test_geojson_refusals(text: str, place_part: str, expected_part: str) -> None:
    err = refused_call(parse_geojson_route, text, file="r.geojson")
    assert err.file == "r.geojson"
    assert place_part in err.place and expected_part in err.expected


def test_geojson_place_names_the_feature() -> None:
    text = _feature('{"name": "Bad"}', coords="[[0, 50], [1, 95]]")
    err = refused_call(parse_geojson_route, text, file="r.geojson")
    assert err.place == "feature 'Bad', vertex 2, latitude" and err.value == 95


# --- load_route: dispatch and sailing checks -------------------------------------------------


@pytest.mark.parametrize(
    ("name", "fmt", "n"),
    [
        ("sample.csv", "csv", 4),
        ("sample.geojson", "geojson", 3),
        ("sample.gpx", "gpx", 3),
        ("sample_v10.gpx", "gpx", 2),
        ("sample_v10.rtz", "rtz", 3),
        ("sample_v11.rtz", "rtz", 4),
        ("sample_v12.rtz", "rtz", 2),
    ],
)
def test_load_route_by_extension(name: str, fmt: str, n: int) -> None:
    route = load_route(DATA / name)
    assert route.meta["format"] == fmt and len(route.waypoints) == n
    assert route.source == str(DATA / name)


@pytest.mark.parametrize(
    ("fixture", "new_name", "fmt"),
    [
        ("sample.gpx", "route.xml", "gpx"),
        ("sample_v11.rtz", "route.XML", "rtz"),
        ("sample.geojson", "route.json", "geojson"),
        ("sample.csv", "ROUTE.CSV", "csv"),
    ],
)
def test_load_route_sniffs_xml_and_ignores_case(
    tmp_path: Path, fixture: str, new_name: str, fmt: str
) -> None:
    path = tmp_path / new_name
    shutil.copy(DATA / fixture, path)
    assert load_route(str(path)).meta["format"] == fmt


def test_load_route_refusals(tmp_path: Path) -> None:
    err = refused_call(load_route, tmp_path / "route.kml")
    assert err.place == "file name extension" and err.value == ".kml"
    err = refused_call(load_route, tmp_path / "route")
    assert err.value is None and ".csv" in err.expected
    err = refused_call(load_route, tmp_path / "absent.csv")
    assert err.value is None and "existing" in err.expected
    (tmp_path / "dir.gpx").mkdir()
    refused_call(load_route, tmp_path / "dir.gpx")
    path = tmp_path / "other.xml"
    path.write_text("<kml/>", encoding="utf-8")
    err = refused_call(load_route, path)
    assert err.place == "root element" and err.value == "<kml>"


def _csv(tmp_path: Path, rows: str) -> Path:
    path = tmp_path / "r.csv"
    path.write_text("name,lat,lon\n" + rows, encoding="utf-8")
    return path


@pytest.mark.parametrize(
    "rows", ["A,10,-90\nB,20,90\n", "A,0,170\nB,0,-10\n", "A,5,10\nB,6,190\n", "A,5,0\nB,6,540\n"]
)
def test_leg_of_exactly_180_degrees_refused(tmp_path: Path, rows: str) -> None:
    err = refused_call(load_route, _csv(tmp_path, rows))
    assert err.place == "leg 1 (waypoint 1 'A' to waypoint 2 'B')"
    assert "exactly 180°" in err.expected and "°" in str(err.value)


@pytest.mark.parametrize("rows", ["A,10,-90\nB,20,89.9\n", "A,0,179.5\nB,0,-179.5\n"])
def test_legs_short_of_180_pass(tmp_path: Path, rows: str) -> None:
    assert load_route(_csv(tmp_path, rows)).n_legs == 1


@pytest.mark.parametrize("lat", ["89.01", "-89.5", "89°30.0'N"])
def test_waypoint_near_a_pole_refused(tmp_path: Path, lat: str) -> None:
    err = refused_call(load_route, _csv(tmp_path, f"A,80,0\nB,{lat},10\n"))
    assert err.place == "waypoint 2 'B'" and "within 1° of a pole" in err.expected


def test_89_degrees_exactly_passes(tmp_path: Path) -> None:
    assert load_route(_csv(tmp_path, "A,80,0\nB,89,10\n")).waypoints[1].lat == 89.0


def test_check_route_on_a_loaded_route_and_lon_change() -> None:
    check_sailable(load_rtz_route(DATA / "sample_v11.rtz"))
    assert lon_change(179.5, -179.5) == pytest.approx(1.0)
    assert lon_change(-179.5, 179.5) == pytest.approx(-1.0)
    assert lon_change(0.0, 180.0) == 180.0 and lon_change(0.0, -180.0) == 180.0
    assert lon_change(10.0, 10.0) == 0.0
