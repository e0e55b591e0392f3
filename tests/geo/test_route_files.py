"""Route files: CSV, GeoJSON, GPX, RTZ, the dispatcher, and every refusal.

Fixtures in tests/data/routes/ are small fictional routes written for these
tests. RTZ facts relied on (element names, sheduleElement in 1.0, the
leg-arriving convention) are from REFERENCE.md section 5, marked [M] there:
from memory, not checked against the IEC 61174 schema files.
"""

from __future__ import annotations

import shutil
import time
from datetime import UTC, datetime
from pathlib import Path

import pytest

import geo.routes_common
from geo.errors import InputError
from geo.route_loader import check_sailable, load_route, lon_change
from geo.routes_csv import load_csv_route, parse_csv_route
from geo.routes_geojson import load_geojson_route, parse_geojson_route
from geo.routes_gpx import load_gpx_route, parse_gpx_route
from geo.routes_rtz import load_rtz_route, parse_rtz_route
from tests.helpers.paths import DATA

DATA = DATA / "routes"


def utc(*args: int) -> datetime:
    return datetime(*args, tzinfo=UTC)


def refused(call, *args, **kwargs) -> InputError:
    with pytest.raises(InputError) as info:
        call(*args, **kwargs)
    assert "\n" not in str(info.value)
    return info.value


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
    err = refused(parse_csv_route, text, file="r.csv")
    assert err.file == "r.csv" and err.place == place and err.value == value
    assert str(err).startswith(f"r.csv: {place}: ")


def test_csv_header_required() -> None:
    err = refused(parse_csv_route, "A,50,-1\nB,51,-1\n", file="r.csv")
    assert err.place == "line 1 (header)" and "missing lat, lon" in err.expected
    err = refused(parse_csv_route, "name;lat;lon\nA;50;-1\n", file="r.csv")
    assert "semicolons" in err.expected
    err = refused(parse_csv_route, "lat,lon,LAT\n1,2,3\n", file="r.csv")
    assert "twice" in err.expected
    err = refused(parse_csv_route, "# only a comment\n\n", file="r.csv")
    assert err.value is None and "header" in err.expected


def test_csv_too_few_and_bad_encoding() -> None:
    err = refused(parse_csv_route, "lat,lon\n50,-1\n", file="r.csv")
    assert "at least two waypoints" in err.expected
    err = refused(parse_csv_route, b"lat,lon\n50,-1\n51,\xff\n", file="r.csv")
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


def _feature(props: str = "{}", coords: str = "[[0, 50], [1, 51]]", gtype: str = "LineString"):
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
    err = refused(parse_geojson_route, text, file="r.geojson")
    assert err.file == "r.geojson"
    assert place_part in err.place and expected_part in err.expected


def test_geojson_place_names_the_feature() -> None:
    text = _feature('{"name": "Bad"}', coords="[[0, 50], [1, 95]]")
    err = refused(parse_geojson_route, text, file="r.geojson")
    assert err.place == "feature 'Bad', vertex 2, latitude" and err.value == 95


# --- GPX -------------------------------------------------------------------------------------


def test_gpx_11_first_route_only() -> None:
    route = load_gpx_route(DATA / "sample.gpx")
    assert route.name == "Sample passage"
    assert [w.name for w in route.waypoints] == ["Alpha", "Bravo", ""]
    assert [(w.lat, w.lon) for w in route.waypoints] == [(50.1, -1.5), (50.5, -1.0), (51.0, -0.5)]
    assert all(w.leg == "rhumb" and w.speed_kn is None for w in route.waypoints)
    assert route.meta["version"] == "1.1" and route.meta["routes_in_file"] == 2


def test_gpx_10_and_no_namespace() -> None:
    assert load_gpx_route(DATA / "sample_v10.gpx").meta["version"] == "1.0"
    text = '<gpx><rte><rtept lat="1" lon="2"/><rtept lat="3" lon="4"/></rte></gpx>'
    route = parse_gpx_route(text, file="plain.gpx")
    assert route.name == "plain" and route.waypoints[1].lon == 4.0


GPX = '<gpx xmlns="http://www.topografix.com/GPX/1/1">{}</gpx>'


@pytest.mark.parametrize(
    ("body", "place_part", "expected_part"),
    [
        ("<trk><trkseg/></trk>", "<gpx>", "export the route"),
        ("", "<gpx>", "<rte>"),
        ('<rte><rtept lat="1" lon="2"/></rte>', "route", "at least two"),
        (
            '<rte><rtept lat="1" lon="2"/><rtept lat="91" lon="2"><name>X</name></rtept></rte>',
            "<rtept> waypoint 2 'X', attribute lat",
            "a latitude",
        ),
        (
            '<rte><rtept lat="1" lon="2"/><rtept lat="1"/></rte>',
            "waypoint 2, attribute lon",
            "a longitude",
        ),
        (
            '<rte><rtept lat="1" lon="2"/><rtept lat="1" lon="2°N"/></rte>',
            "attribute lon",
            "a longitude",
        ),
    ],
)
def test_gpx_refusals(body: str, place_part: str, expected_part: str) -> None:
    err = refused(parse_gpx_route, GPX.format(body), file="r.gpx")
    assert place_part in err.place and expected_part in err.expected


def test_gpx_wrong_root_or_namespace() -> None:
    err = refused(parse_gpx_route, '<gpx xmlns="http://example.com/x"/>', file="r.gpx")
    assert err.place == "root element" and "GPX 1.1" in err.expected
    err = refused(parse_gpx_route, "<kml/>", file="r.gpx")
    assert err.value == "kml"


# --- RTZ -------------------------------------------------------------------------------------


def test_rtz_10_shedule_element_and_calculated_schedule() -> None:
    route = load_rtz_route(DATA / "sample_v10.rtz")
    assert route.name == "Sample RTZ 1.0" and route.meta["version"] == "1.0"
    assert route.meta["schedule_kind"] == "calculated" and route.meta["schedule"] == "Plan A"
    a, b, c = route.waypoints
    # the <leg> of a waypoint describes the leg arriving at it
    assert [w.leg for w in route.waypoints] == ["rhumb", "great_circle", "rhumb"]
    assert b.speed_kn == 11.0  # schedule speed overrides speedMax 12
    assert c.speed_kn == 10.0
    assert a.etd_utc == utc(2025, 6, 1, 8) and a.eta_utc is None
    assert b.eta_utc == utc(2025, 6, 1, 10, 30) and c.eta_utc == utc(2025, 6, 1, 13)


def test_rtz_11_manual_over_calculated_and_default_waypoint() -> None:
    route = load_rtz_route(DATA / "sample_v11.rtz")
    assert route.meta["schedule_kind"] == "manual"
    assert route.meta["schedule"] == "Master's plan" and route.meta["schedules_ignored"] == 1
    a, b, c, d = route.waypoints
    # defaultWaypoint: Orthodrome at 13.5 kn where a waypoint has no value of its own
    assert (b.leg, b.speed_kn) == ("great_circle", 13.5)  # calculated's 20 kn not used
    assert (c.leg, c.speed_kn) == ("rhumb", 8.5)  # own Loxodrome; manual speed wins
    assert (d.leg, d.speed_kn) == ("great_circle", 9.0)  # own speedMax, default geometry
    # times with an offset are stored in UTC
    assert a.etd_utc == utc(2025, 6, 1, 8) and a.etd_utc.utcoffset().total_seconds() == 0
    assert c.eta_utc == utc(2025, 6, 1, 12)
    assert b.eta_utc is None and d.eta_utc is None


def test_rtz_12() -> None:
    route = load_rtz_route(DATA / "sample_v12.rtz")
    assert route.meta["version"] == "1.2" and "schedule" not in route.meta
    assert route.waypoints[1].leg == "great_circle" and route.waypoints[1].speed_kn == 12.0


def _rtz(waypoints: str = "", schedules: str = "", ns: str = "http://www.cirm.org/RTZ/1/1") -> str:
    if not waypoints:
        waypoints = (
            '<waypoint id="1" name="A"><position lat="50" lon="-1"/></waypoint>'
            '<waypoint id="2" name="B"><position lat="51" lon="-1"/></waypoint>'
        )
    return (
        f'<route xmlns="{ns}" version="1.1"><routeInfo routeName="T"/>'
        f"<waypoints>{waypoints}</waypoints>{schedules}</route>"
    )


def _schedule(entries: str, kind: str = "manual", tag: str = "scheduleElement") -> str:
    body = "".join(f"<{tag} {e}/>" for e in entries.split("|"))
    return f'<schedules><schedule id="1" name="S"><{kind}>{body}</{kind}></schedule></schedules>'


def test_rtz_either_spelling_in_any_version_and_empty_manual_falls_back() -> None:
    text = _rtz(
        schedules=_schedule('waypointId="2" eta="2025-01-01T00:00:00Z"', tag="sheduleElement")
    )
    assert parse_rtz_route(text).waypoints[1].eta_utc == utc(2025, 1, 1)
    sched = (
        '<schedules><schedule id="1"><manual/><calculated>'
        '<scheduleElement waypointId="2" eta="2025-01-01T06:00:00-03:00"/>'
        "</calculated></schedule></schedules>"
    )
    route = parse_rtz_route(_rtz(schedules=sched))
    assert route.meta["schedule_kind"] == "calculated"
    assert route.waypoints[1].eta_utc == utc(2025, 1, 1, 9)


def test_rtz_default_waypoint_outside_waypoints_is_tolerated() -> None:
    text = _rtz().replace(
        "<waypoints>",
        '<defaultWaypoint><leg geometryType="Orthodrome"/></defaultWaypoint><waypoints>',
    )
    assert parse_rtz_route(text).waypoints[1].leg == "great_circle"


WP = '<waypoint id="{id}" name="{name}"><position lat="{lat}" lon="{lon}"/>{leg}</waypoint>'


def _wps(*specs: dict) -> str:
    out = []
    for i, spec in enumerate(specs, start=1):
        fields = {"id": i, "name": f"W{i}", "lat": 50, "lon": -1, "leg": ""} | spec
        out.append(WP.format(**fields))
    return "".join(out)


@pytest.mark.parametrize(
    ("text", "place_part", "expected_part"),
    [
        (_rtz(ns="http://www.cirm.org/RTZ/9/9"), "root element", "RTZ namespace"),
        ("<route><waypoints/></route>", "root element", "RTZ namespace"),
        (_rtz(waypoints=_wps({})), "route", "at least two"),
        ('<route xmlns="http://www.cirm.org/RTZ/1/0"/>', "<route>", "<waypoints>"),
        (_rtz(waypoints=_wps({}, {"id": 1})), "waypoint 2 (id 1, 'W2')", "only once"),
        (
            _rtz(waypoints=_wps({}, {"lat": "x"})),
            "waypoint 2 (id 2, 'W2'), <position> lat",
            "a latitude",
        ),
        (_rtz(waypoints=_wps({}, {"lon": "200°E"})), "<position> lon", "at most 180°"),
        (
            _rtz(waypoints=_wps({}, {"leg": '<leg geometryType="Rhumb"/>'})),
            "<leg> geometryType",
            "Loxodrome or Orthodrome",
        ),
        (_rtz(waypoints=_wps({}, {"leg": '<leg speedMax="0"/>'})), "<leg> speedMax", "above 0"),
        (_rtz(waypoints=_wps({}, {"leg": '<leg speedMax="ten"/>'})), "<leg> speedMax", "knots"),
        (_rtz(waypoints='<waypoint id="1"/><waypoint id="2"/>'), "waypoint 1 (id 1)", "<position"),
        (
            _rtz(schedules=_schedule('waypointId="2" eta="2025-06-01T12:00:00"')),
            "schedule 'S', <manual> entry 1 (<scheduleElement>), eta",
            "no offset",
        ),
        (_rtz(schedules=_schedule('waypointId="2" eta="2025-06-01"')), "eta", "no offset"),
        (_rtz(schedules=_schedule('waypointId="2" etd="tomorrow"')), "etd", "ISO 8601"),
        (
            _rtz(schedules=_schedule('waypointId="7" eta="2025-06-01T12:00:00Z"')),
            "entry 1 (<scheduleElement>), waypointId",
            "id of a waypoint",
        ),
        (_rtz(schedules=_schedule('eta="2025-06-01T12:00:00Z"')), "waypointId", "id of a"),
        (
            _rtz(schedules=_schedule('waypointId="2" speed="0"')),
            "entry 1 (<scheduleElement>), speed",
            "above 0",
        ),
        (_rtz(schedules=_schedule('waypointId="2"|waypointId="2"')), "entry 2", "one schedule"),
        (
            _rtz(
                schedules=_schedule(
                    'waypointId="1" etd="2025-06-01T12:00:00Z"|'
                    'waypointId="2" eta="2025-06-01T11:00:00Z"'
                )
            ),
            "waypoint 2 'B', eta",
            "not before the etd of waypoint 1",
        ),
        (
            _rtz(
                schedules=_schedule(
                    'waypointId="2" eta="2025-06-01T12:00:00Z" etd="2025-06-01T11:59:00Z"'
                )
            ),
            "waypoint 2 'B', etd",
            "not before the eta of waypoint 2",
        ),
    ],
)
def test_rtz_refusals(text: str, place_part: str, expected_part: str) -> None:
    err = refused(parse_rtz_route, text, file="r.rtz")
    assert err.file == "r.rtz"
    assert place_part in err.place, err.place
    assert expected_part in err.expected, err.expected


# --- hostile and broken XML ------------------------------------------------------------------

BILLION_LAUGHS = """<?xml version="1.0"?>
<!DOCTYPE route [
 <!ENTITY a "lol">
 <!ENTITY b "&a;&a;&a;&a;&a;&a;&a;&a;&a;&a;">
 <!ENTITY c "&b;&b;&b;&b;&b;&b;&b;&b;&b;&b;">
 <!ENTITY d "&c;&c;&c;&c;&c;&c;&c;&c;&c;&c;">
 <!ENTITY e "&d;&d;&d;&d;&d;&d;&d;&d;&d;&d;">
 <!ENTITY f "&e;&e;&e;&e;&e;&e;&e;&e;&e;&e;">
 <!ENTITY g "&f;&f;&f;&f;&f;&f;&f;&f;&f;&f;">
 <!ENTITY h "&g;&g;&g;&g;&g;&g;&g;&g;&g;&g;">
 <!ENTITY i "&h;&h;&h;&h;&h;&h;&h;&h;&h;&h;">
]>
<route xmlns="http://www.cirm.org/RTZ/1/1"><routeInfo routeName="&i;"/></route>
"""
EXTERNAL_ENTITY = """<?xml version="1.0"?>
<!DOCTYPE gpx [<!ENTITY x SYSTEM "file:///etc/passwd">]>
<gpx><rte><rtept lat="1" lon="2"><name>&x;</name></rtept><rtept lat="3" lon="4"/></rte></gpx>
"""
EXTERNAL_DTD = """<?xml version="1.0"?>
<!DOCTYPE gpx SYSTEM "http://example.invalid/gpx.dtd">
<gpx><rte><rtept lat="1" lon="2"/><rtept lat="3" lon="4"/></rte></gpx>
"""
PARAMETER_ENTITY = """<?xml version="1.0"?>
<!DOCTYPE r [<!ENTITY % p SYSTEM "http://example.invalid/p.dtd"> %p;]>
<route xmlns="http://www.cirm.org/RTZ/1/1"/>
"""


@pytest.mark.parametrize("name", ["laughs.rtz", "xxe.gpx", "dtd.gpx", "param.rtz", "x.xml"])
@pytest.mark.parametrize("body", [BILLION_LAUGHS, EXTERNAL_ENTITY, EXTERNAL_DTD, PARAMETER_ENTITY])
def test_hostile_xml_refused_quickly(tmp_path: Path, name: str, body: str) -> None:
    path = tmp_path / name
    path.write_text(body, encoding="utf-8")
    start = time.monotonic()
    err = refused(load_route, path)
    assert time.monotonic() - start < 5.0
    assert err.file == str(path)
    assert err.place == "document type declaration" and "refused for safety" in err.expected


def test_malformed_xml_names_the_line(tmp_path: Path) -> None:
    path = tmp_path / "bad.gpx"
    path.write_text('<gpx>\n<rte>\n<rtept lat="1" lon="2">\n</rte></gpx>\n', encoding="utf-8")
    err = refused(load_route, path)
    assert err.place.startswith("line 4, column ") and err.expected == "well-formed XML"
    err = refused(parse_rtz_route, b"", file="empty.rtz")
    assert err.expected == "well-formed XML"


def test_oversized_file_refused_before_reading(
    tmp_path: Path, monkeypatch: pytest.MonkeyPatch
) -> None:
    monkeypatch.setattr(geo.routes_common, "MAX_FILE_BYTES", 100)
    path = tmp_path / "big.rtz"
    path.write_text("<route>" + " " * 200 + "</route>", encoding="utf-8")
    err = refused(load_route, path)
    assert err.place == "file size" and "at most 100 bytes" in err.expected


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
    err = refused(load_route, tmp_path / "route.kml")
    assert err.place == "file name extension" and err.value == ".kml"
    err = refused(load_route, tmp_path / "route")
    assert err.value is None and ".csv" in err.expected
    err = refused(load_route, tmp_path / "absent.csv")
    assert err.value is None and "existing" in err.expected
    (tmp_path / "dir.gpx").mkdir()
    refused(load_route, tmp_path / "dir.gpx")
    path = tmp_path / "other.xml"
    path.write_text("<kml/>", encoding="utf-8")
    err = refused(load_route, path)
    assert err.place == "root element" and err.value == "<kml>"


def _csv(tmp_path: Path, rows: str) -> Path:
    path = tmp_path / "r.csv"
    path.write_text("name,lat,lon\n" + rows, encoding="utf-8")
    return path


@pytest.mark.parametrize(
    "rows", ["A,10,-90\nB,20,90\n", "A,0,170\nB,0,-10\n", "A,5,10\nB,6,190\n", "A,5,0\nB,6,540\n"]
)
def test_leg_of_exactly_180_degrees_refused(tmp_path: Path, rows: str) -> None:
    err = refused(load_route, _csv(tmp_path, rows))
    assert err.place == "leg 1 (waypoint 1 'A' to waypoint 2 'B')"
    assert "exactly 180°" in err.expected and "°" in str(err.value)


@pytest.mark.parametrize("rows", ["A,10,-90\nB,20,89.9\n", "A,0,179.5\nB,0,-179.5\n"])
def test_legs_short_of_180_pass(tmp_path: Path, rows: str) -> None:
    assert load_route(_csv(tmp_path, rows)).n_legs == 1


@pytest.mark.parametrize("lat", ["89.01", "-89.5", "89°30.0'N"])
def test_waypoint_near_a_pole_refused(tmp_path: Path, lat: str) -> None:
    err = refused(load_route, _csv(tmp_path, f"A,80,0\nB,{lat},10\n"))
    assert err.place == "waypoint 2 'B'" and "within 1° of a pole" in err.expected


def test_89_degrees_exactly_passes(tmp_path: Path) -> None:
    assert load_route(_csv(tmp_path, "A,80,0\nB,89,10\n")).waypoints[1].lat == 89.0


def test_check_route_on_a_loaded_route_and_lon_change() -> None:
    check_sailable(load_rtz_route(DATA / "sample_v11.rtz"))
    assert lon_change(179.5, -179.5) == pytest.approx(1.0)
    assert lon_change(-179.5, 179.5) == pytest.approx(-1.0)
    assert lon_change(0.0, 180.0) == 180.0 and lon_change(0.0, -180.0) == 180.0
    assert lon_change(10.0, 10.0) == 0.0
