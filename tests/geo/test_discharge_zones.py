"""Washwater discharge zones from GeoJSON (geo.discharge_zones): the sample, every refusal.

The zones here are invented; GeoJSON is RFC 7946 [RFC-7946] [P]. The loader
checks geometry exactly as the area loader does (tests/geo/test_area_files.py
and test_area_checks.py cover those checks in depth); here each kind of refusal
is shown to reach a zone file too, with its one line naming file, feature and
property.
"""

from __future__ import annotations

import json
from datetime import date
from pathlib import Path

import pytest

from geo.area_files import NO_LIMIT_PCT
from geo.discharge_zones import ALLOWS_WORDS, DischargeZone, load_discharge_zones
from geo.errors import InputError
from tests.helpers.areas import SAMPLE, closed

SAMPLE_ZONES = SAMPLE / "discharge" / "aldmere_discharge.geojson"
BOX = [(170.0, -40.0), (172.0, -40.0), (172.0, -38.0), (170.0, -38.0)]


def zone(ring: list | None = None, kind: str = "Polygon", coords: object = None,
         **over: object) -> dict:
    """A zone Feature: ``allows = "closed"`` by default; None removes a property."""
    props = {"name": "Test zone", "allows": "closed"}
    props.update(over)
    props = {k: v for k, v in props.items() if v is not None}
    geometry = {"type": kind,
                "coordinates": coords if coords is not None else [closed(ring or BOX)]}
    return {"type": "Feature", "properties": props, "geometry": geometry}


def write(folder: Path, *features: dict, name: str = "zones.geojson") -> Path:
    path = folder / name
    path.write_text(json.dumps({"type": "FeatureCollection", "features": list(features)}))
    return path


def refused(paths: list, *parts: str) -> str:
    with pytest.raises(InputError) as info:
        load_discharge_zones(paths)
    msg = str(info.value)
    assert "\n" not in msg
    for part in parts:
        assert part in msg, f"{part!r} not in {msg!r}"
    return msg


def test_sample_zones_load() -> None:
    zones = load_discharge_zones([SAMPLE_ZONES])
    assert [(z.name, z.allows_word) for z in zones] == [
        ("Port Aldmere harbour waters", "none"),
        ("Corran Sea coastal waters", "closed"),
        ("Brannoch Passage washwater zone", "closed"),
        ("Skarvik harbour waters", "none")]
    assert zones[0].allows == () and zones[1].allows == ("closed",)
    for z in zones:
        assert "Fictional" in z.note and z.area.source == "changeover demo scenario (invented)"
        assert z.area.sulphur_limit_pct == NO_LIMIT_PCT and z.area.edges == "lonlat"
        assert z.area.effective_until is None and z.area.in_force_on(date(2027, 5, 30))


def test_a_folder_and_a_feature_alone(tmp_path: Path) -> None:
    (tmp_path / "a.geojson").write_text(json.dumps(zone(name="A", allows="none")))
    write(tmp_path, zone(name="B"), name="b.geojson")
    zones = load_discharge_zones([tmp_path])
    assert [(z.name, z.allows) for z in zones] == [("A", ()), ("B", ("closed",))]


def test_optional_properties(tmp_path: Path) -> None:
    (z,) = load_discharge_zones([write(tmp_path, zone(
        edges="rhumb", note=" closed loop only ", source="a port notice",
        effective_from="2027-06-01", effective_until="2027-12-31", kind_of="ignored"))])
    assert z.area.edges == "rhumb" and z.note == "closed loop only"
    assert z.area.source == "a port notice"
    assert (z.area.effective_from, z.area.effective_until) == (date(2027, 6, 1),
                                                               date(2027, 12, 31))


def test_holes_and_multipolygons(tmp_path: Path) -> None:
    hole = [(170.5, -39.5), (171.5, -39.5), (171.5, -38.5), (170.5, -38.5)]
    other = [(175.0, -40.0), (176.0, -40.0), (176.0, -39.0), (175.0, -39.0)]
    (z,) = load_discharge_zones([write(tmp_path, zone(
        kind="MultiPolygon", coords=[[closed(BOX), closed(hole)], [closed(other)]]))])
    assert len(z.area.polygons) == 2 and len(z.area.polygons[0].holes) == 1


@pytest.mark.parametrize("over, parts", [
    ({"allows": None}, ("feature 1 'Test zone', property allows", "missing", '"closed"')),
    ({"allows": "open"}, ("property allows", "'open'", '"none"')),
    ({"allows": "Closed"}, ("property allows", "'Closed'")),
    ({"allows": 0}, ("property allows", ": 0: ")),
    ({"note": 3}, ("property note", "expected text")),
    ({"source": ["x"]}, ("property source", "text")),
    ({"name": None}, ("feature 1, property name", "missing")),
    ({"name": "  "}, ("property name", "non-empty")),
    ({"edges": "straight"}, ("property edges", "geodesic | rhumb | lonlat")),
    ({"effective_from": "1 June"}, ("property effective_from", "YYYY-MM-DD")),
    ({"effective_from": "2027-06-01", "effective_until": "2027-05-01"},
     ("property effective_until", "not before effective_from")),
])
def test_property_refusals(tmp_path: Path, over: dict, parts: tuple) -> None:
    path = write(tmp_path, zone(**over))
    refused([path], str(path), *parts)


def test_names_are_unique_ignoring_case(tmp_path: Path) -> None:
    path = write(tmp_path, zone(name="Harbour"), zone(name="harbour", allows="none"))
    refused([path], "feature 2 'harbour', property name", "not already used")


def test_geometry_refusals(tmp_path: Path) -> None:
    bow = [(170.0, -40.0), (172.0, -38.0), (172.0, -40.0), (170.0, -38.0)]
    refused([write(tmp_path, zone(bow), name="bow.geojson")], "polygon 1, ring 1",
            "crosses or touches itself")
    open_ring = [list(p) for p in BOX]
    refused([write(tmp_path, zone(coords=[open_ring]), name="open.geojson")], "ring 1")
    refused([write(tmp_path, zone(kind="LineString", coords=closed(BOX)), name="l.geojson")],
            "geometry", "a Polygon or MultiPolygon")
    far = [(170.0, -40.0), (172.0, -40.0), (172.0, -91.0), (170.0, -38.0)]
    refused([write(tmp_path, zone(far), name="lat.geojson")], "ring 1", "-91")
    half = [(0.0, 10.0), (180.0, 10.0), (180.0, 20.0)]
    refused([write(tmp_path, zone(half), name="half.geojson")], "edge from vertex 1 to vertex 2",
            "less than 180°")
    outside = [(180.0, -50.0), (181.0, -50.0), (181.0, -49.0), (180.0, -49.0)]
    refused([write(tmp_path, zone(coords=[closed(BOX), closed(outside)]), name="h.geojson")],
            "hole 1", "inside the exterior")


def test_file_refusals(tmp_path: Path) -> None:
    refused([tmp_path / "none.geojson"], "no such file or folder")
    (tmp_path / "zones.txt").write_text("{}")
    refused([tmp_path / "zones.txt"], "*.geojson or *.json")
    empty = tmp_path / "empty"
    empty.mkdir()
    refused([empty], "no *.geojson file")
    bad = tmp_path / "bad.geojson"
    bad.write_text('{"type": "FeatureCollection", "features": [}')
    refused([bad], "line 1", "valid JSON")
    nan = tmp_path / "nan.geojson"
    nan.write_text(json.dumps(zone()).replace("170.0", "NaN", 1))
    refused([nan], str(nan))
    one = tmp_path / "geom.geojson"
    one.write_text(json.dumps({"type": "Polygon", "coordinates": [closed(BOX)]}))
    refused([one], "type", "a Feature or FeatureCollection")


def test_the_zone_type_checks_its_allows(tmp_path: Path) -> None:
    (z,) = load_discharge_zones([write(tmp_path, zone())])
    assert set(ALLOWS_WORDS) == {"closed", "none"}
    with pytest.raises(ValueError, match="allows"):
        DischargeZone(z.area, ("open",))
