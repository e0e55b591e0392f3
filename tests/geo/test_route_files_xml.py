"""Route files in XML: GPX, RTZ, and hostile or broken XML, with every refusal.

Fixtures in tests/data/routes/ are small fictional routes written for these
tests. GPX is [GPX-11] [P]. RTZ facts relied on (element names, sheduleElement
in 1.0, the leg-arriving convention) are [IEC-61174-RTZ] [M]: from memory, not
checked against the IEC 61174 schema files. Times are ISO 8601 [ISO-8601].
"""

from __future__ import annotations

import time
from pathlib import Path

import pytest

import geo.routes_common
from geo.route_loader import load_route
from geo.routes_gpx import load_gpx_route, parse_gpx_route
from geo.routes_rtz import load_rtz_route, parse_rtz_route
from tests.helpers.geo import refused_call, utc
from tests.helpers.paths import DATA

DATA = DATA / "routes"


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
    err = refused_call(parse_gpx_route, GPX.format(body), file="r.gpx")
    assert place_part in err.place and expected_part in err.expected


def test_gpx_wrong_root_or_namespace() -> None:
    err = refused_call(parse_gpx_route, '<gpx xmlns="http://example.com/x"/>', file="r.gpx")
    assert err.place == "root element" and "GPX 1.1" in err.expected
    err = refused_call(parse_gpx_route, "<kml/>", file="r.gpx")
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
    err = refused_call(parse_rtz_route, text, file="r.rtz")
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
    err = refused_call(load_route, path)
    assert time.monotonic() - start < 5.0
    assert err.file == str(path)
    assert err.place == "document type declaration" and "refused for safety" in err.expected


def test_malformed_xml_names_the_line(tmp_path: Path) -> None:
    path = tmp_path / "bad.gpx"
    path.write_text('<gpx>\n<rte>\n<rtept lat="1" lon="2">\n</rte></gpx>\n', encoding="utf-8")
    err = refused_call(load_route, path)
    assert err.place.startswith("line 4, column ") and err.expected == "well-formed XML"
    err = refused_call(parse_rtz_route, b"", file="empty.rtz")
    assert err.expected == "well-formed XML"


def test_oversized_file_refused_before_reading(
    tmp_path: Path, monkeypatch: pytest.MonkeyPatch
) -> None:
    monkeypatch.setattr(geo.routes_common, "MAX_FILE_BYTES", 100)
    path = tmp_path / "big.rtz"
    path.write_text("<route>" + " " * 200 + "</route>", encoding="utf-8")
    err = refused_call(load_route, path)
    assert err.place == "file size" and "at most 100 bytes" in err.expected
