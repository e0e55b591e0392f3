"""Loading control areas from GeoJSON (geo.area_files).

The areas here are invented (areas_sample/ is a fictional South Pacific
scenario). Inside tests use geo.plane.area_shape; areas and positions are
checked against pyproj.Geod (GeographicLib [KARNEY-2013] [P]) where numbers
matter. The helpers that build GeoJSON features and files (RFC 7946
[RFC-7946]) are in tests/helpers/areas.py.
"""

from __future__ import annotations

import json
import shutil
from datetime import date
from pathlib import Path

import numpy as np
import pytest

from geo.area import Area
from geo.area_files import load_areas
from geo.area_measure import area_km2, cap_area_m2, describe
from geo.plane import area_shape
from tests.helpers.areas import FIXTURES, SAMPLE, SQUARE, closed, feature, refused, write

# ---- the sample scenario ---------------------------------------------------------------


@pytest.fixture(scope="module")
def sample() -> dict[str, Area]:
    return {a.name: a for a in load_areas([SAMPLE])}


def test_sample_folder_loads_sorted_by_file(sample: dict[str, Area]) -> None:
    assert list(sample) == ["Corran Sea ECA", "Meridian Reach ECA", "Skarvik Basin ECA"]
    corran = sample["Corran Sea ECA"]
    assert corran.sulphur_limit_pct == 0.10
    assert corran.effective_from == date(2019, 1, 1) and corran.effective_until is None
    assert corran.edges == "geodesic"
    assert corran.source == "changeover demo scenario (invented)"
    assert len(corran.polygons) == 2 and len(corran.polygons[0].holes) == 1
    assert corran.polygons[0].exterior == ((170, -44), (178, -44), (178, -36), (170, -36))
    assert corran.n_vertices == 12
    assert corran.file.endswith("corran_sea.geojson")
    assert sample["Skarvik Basin ECA"].edges == "rhumb"
    assert sample["Meridian Reach ECA"].polygons[0].exterior[1] == (184, -42)


def test_sample_properties_carry_the_fictional_note() -> None:
    for path in sorted(SAMPLE.glob("*.geojson")):
        for feat in json.loads(path.read_text())["features"]:
            assert "Fictional" in feat["properties"]["note"]
            assert feat["properties"]["source"] == "changeover demo scenario (invented)"


def test_sample_covers(sample: dict[str, Area]) -> None:
    corran = area_shape(sample["Corran Sea ECA"])
    # (lat, lon): inside part 1; in the hole (Isle of Brannoch); in the part 1/part 2 overlap;
    # outside everything
    assert corran.covers([-37.0, -40.0, -40.0, -45.0], [171.0, 174.0, 177.2, 171.0]).tolist() == [
        True,
        False,
        True,
        False,
    ]
    meridian = area_shape(sample["Meridian Reach ECA"])
    assert meridian.covers(
        [-39.5, -39.5, -39.5, -39.5], [179.0, -179.0, 183.0, -175.0]
    ).tolist() == [True, True, True, False]
    skarvik = area_shape(sample["Skarvik Basin ECA"])
    # a rhumb edge at 36°S is the parallel: just inside and just outside it
    assert skarvik.covers([-36.001, -35.999, -38.5], [-168.0, -168.0, 192.0]).tolist() == [
        True,
        False,
        True,
    ]


def test_describe_sample(sample: dict[str, Area]) -> None:
    d = describe(sample["Skarvik Basin ECA"], date(2026, 1, 1))
    assert set(d) >= {
        "name",
        "limit_pct",
        "effective_from",
        "effective_until",
        "edges",
        "vertices",
        "area_km2",
        "in_force_today",
        "source",
        "file",
    }
    assert d["in_force_today"] is False and d["effective_from"] == "2027-06-01"
    assert d["vertices"] == 4 and d["edges"] == "rhumb" and d["effective_until"] is None
    assert describe(sample["Corran Sea ECA"], date(2026, 1, 1))["in_force_today"] is True
    assert d["area_km2"] == pytest.approx(area_km2(sample["Skarvik Basin ECA"]))


# ---- accepted shapes ---------------------------------------------------------------------


def test_pre_split_at_180_is_the_same_area(sample: dict[str, Area]) -> None:
    (split,) = load_areas([FIXTURES / "meridian_reach_split.geojson"])
    whole = sample["Meridian Reach ECA"]
    # the split vertices lie on the unsplit geodesic edges (found with pyproj.Geod), so the
    # two are the same region: same area, same inside points on both sides of 180°
    assert area_km2(split) == pytest.approx(area_km2(whole), rel=1e-9)
    lat = np.array([-39.5, -41.99, -37.03, -42.1, -36.9, -39.5])
    lon = np.array([179.99, -179.99, 180.0, 180.0, -180.0, -175.9])
    assert (
        area_shape(split).covers(lat, lon).tolist() == area_shape(whole).covers(lat, lon).tolist()
    )
    assert area_shape(split).covers(lat, lon).tolist() == [True, True, True, False, False, False]


def test_pole_circling_cap_fixture() -> None:
    (cap,) = load_areas([FIXTURES / "arctic_cap.geojson"])
    # rhumb edges along 70°N are the parallel: the area is the cap above 70°N, closed form
    # π a² (q(90°) − q(70°)) with the authalic q ([LAMBERT-EQUAL-AREA], from memory [M];
    # the formula is checked against pyproj.Geod in test_area_checks)
    assert area_km2(cap) == pytest.approx(cap_area_m2(70.0) / 1e6, rel=1e-9)
    shape = area_shape(cap)
    assert shape.covers([89.0, 70.5, 70.5, 69.5], [0.0, -179.0, 95.0, 10.0]).tolist() == [
        True,
        True,
        True,
        False,
    ]


def test_feature_without_collection_and_extra_properties(tmp_path: Path) -> None:
    path = tmp_path / "one.json"
    path.write_text(
        json.dumps(
            feature(
                note="kept out of the way",
                edges="lonlat",
                source="here",
                effective_until="2030-12-31",
            )
        )
    )
    (area,) = load_areas([str(path)])
    assert area.edges == "lonlat" and area.source == "here"
    assert area.effective_until == date(2030, 12, 31)


def test_multipolygon_with_holes_and_altitude(tmp_path: Path) -> None:
    outer = [[0, 0, 5.0], [4, 0, 5.0], [4, 4, 5.0], [0, 4, 5.0], [0, 0, 5.0]]
    hole = closed([(1, 1), (1, 2), (2, 2), (2, 1)])
    other = closed([(10, 0), (12, 0), (12, 2), (10, 2)])
    (area,) = load_areas([write(tmp_path, feature([[outer, hole], [other]], "MultiPolygon"))])
    assert len(area.polygons) == 2 and area.polygons[0].holes[0][0] == (1, 1)
    assert area.polygons[0].exterior[0] == (0, 0)


def test_repeated_vertices_dropped_and_numbers_kept(tmp_path: Path) -> None:
    ring = [[0, 0], [0, 0], [1, 0], [1, 1], [0, 1], [0, 1], [0, 0]]
    (area,) = load_areas([write(tmp_path, feature([ring]))])
    assert area.polygons[0].exterior == ((0, 0), (1, 0), (1, 1), (0, 1))
    # a later refusal still names vertices as numbered in the file
    bad = [[0, 0], [0, 0], [180, 0], [180, 10], [0, 10], [0, 0]]
    refused([write(tmp_path, feature([bad]))], "edge from vertex 1 to vertex 3")


def test_same_file_twice_is_loaded_once(tmp_path: Path) -> None:
    path = write(tmp_path, feature())
    assert len(load_areas([path, tmp_path, str(path)])) == 1


# ---- refusals: properties ----------------------------------------------------------------


@pytest.mark.parametrize(
    ("over", "parts"),
    [
        ({"sulphur_limit_pct": None}, ["property sulphur_limit_pct: missing: expected a number"]),
        ({"sulphur_limit_pct": "0.10"}, ["property sulphur_limit_pct: '0.10'"]),
        ({"sulphur_limit_pct": True}, ["property sulphur_limit_pct: True"]),
        ({"sulphur_limit_pct": -0.1}, ["property sulphur_limit_pct: -0.1"]),
        ({"sulphur_limit_pct": 101}, ["property sulphur_limit_pct: 101"]),
        ({"name": None}, ["feature 1, property name: missing"]),
        ({"name": "  "}, ["feature 1, property name: '  '"]),
        ({"name": 7}, ["feature 1, property name: 7"]),
        ({"effective_from": None}, ["property effective_from: missing: expected a date"]),
        ({"effective_from": "2019-13-01"}, ["property effective_from: '2019-13-01'"]),
        ({"effective_from": "01/01/2019"}, ["property effective_from: '01/01/2019'"]),
        ({"effective_from": "2019-01-01T00:00"}, ["property effective_from: '2019-01-01T00:00'"]),
        ({"effective_from": 20190101}, ["property effective_from: 20190101"]),
        (
            {"effective_until": "2019-12-31"},
            ["property effective_until: '2019-12-31': expected a date not before effective_from"],
        ),
        ({"effective_until": "soon"}, ["property effective_until: 'soon'"]),
        (
            {"edges": "great circle"},
            ["property edges: 'great circle': expected geodesic | rhumb | lonlat"],
        ),
        ({"source": 3}, ["property source: 3: expected text"]),
    ],
)
def test_bad_properties(tmp_path: Path, over: dict, parts: list[str]) -> None:
    path = write(tmp_path, feature(**over))
    msg = refused([path], str(path), *parts)
    if "name" not in over:
        assert "feature 1 'Test ECA', property" in msg


def test_duplicate_names_across_files(tmp_path: Path) -> None:
    a = write(tmp_path, feature(), name="a.geojson")
    b = write(tmp_path, feature(), feature(name="test eca"), name="b.geojson")
    refused([a, b], f"{b}: feature 1 'Test ECA', property name", f"{a}, feature 1 has it")
    refused([b], f"{b}: feature 2 'test eca'", f"{b}, feature 1 has it")


# ---- refusals: files and geometry --------------------------------------------------------


def test_folder_loading_and_bad_paths(tmp_path: Path) -> None:
    shutil.copy(SAMPLE / "skarvik_basin.geojson", tmp_path / "b.geojson")
    shutil.copy(SAMPLE / "corran_sea.geojson", tmp_path / "a.geojson")
    (tmp_path / "notes.txt").write_text("not an area")
    assert [a.name for a in load_areas([tmp_path])] == ["Corran Sea ECA", "Skarvik Basin ECA"]
    empty = tmp_path / "empty"
    empty.mkdir()
    refused([empty], str(empty), "no *.geojson file")
    refused([tmp_path / "notes.txt"], "notes.txt", "a .txt file", "*.geojson or *.json")
    refused([tmp_path / "missing.geojson"], "missing.geojson", "no such file or folder")


@pytest.mark.parametrize(
    ("text", "parts"),
    [
        ('{"type": "FeatureCollection", "features": [', ["line 1, column 44", "valid JSON"]),
        ('{"type": "Feature", "properties": {"sulphur_limit_pct": NaN}}', ["NaN"]),
        ('{"type": "FeatureCollection", "features": []}', ["features: none"]),
        ('{"type": "Polygon", "coordinates": []}', ["type: 'Polygon'", "a Feature or"]),
        ("[1, 2]", ["type: no type"]),
    ],
)
def test_bad_documents(tmp_path: Path, text: str, parts: list[str]) -> None:
    path = tmp_path / "bad.geojson"
    path.write_text(text)
    refused([path], str(path), *parts)


@pytest.mark.parametrize(
    ("geometry", "parts"),
    [
        (None, ["feature 1 'Test ECA', geometry: missing"]),
        ({"type": "Point", "coordinates": [1, 2]}, ["geometry: 'Point'", "Polygon or Multi"]),
        ({"type": "Polygon", "coordinates": []}, ["polygon 1: no rings"]),
        ({"type": "MultiPolygon", "coordinates": []}, ["geometry coordinates: none"]),
        ({"type": "MultiPolygon", "coordinates": [[]]}, ["polygon 1: no rings"]),
    ],
)
def test_bad_geometry(tmp_path: Path, geometry: dict | None, parts: list[str]) -> None:
    feat = feature()
    feat["geometry"] = geometry
    refused([write(tmp_path, feat)], *parts)


@pytest.mark.parametrize(
    ("ring", "parts"),
    [
        (
            [[0, 0], [1, 0], [1, 1], [0, 1]],
            ["polygon 1, ring 1: first [0.0, 0.0], last [0.0, 1.0]: expected a closed ring"],
        ),
        ([[0, 0], [1, 0], [0, 0]], ["ring 1: 3 positions"]),
        ([[0, 0], [1, 0], [1, 0], [0, 0], [0, 0]], ["ring 1: 2 distinct vertices"]),
        ([[0, 0], [1, 0], ["1", 1], [0, 0]], ['ring 1, vertex 3: ["1", 1]: expected a position']),
        ([[0, 0], [1, 0], [1, True], [0, 0]], ["vertex 3: [1, true]"]),
        ([[0, 0], [1], [1, 1], [0, 0]], ["vertex 2: [1]"]),
        ([[0, 0], [1, 0], [1, 91], [0, 0]], ["vertex 3: [1, 91]: expected a latitude within ±90°"]),
        ([[0, 0], [1, 0], [1, -90.5], [0, 0]], ["vertex 3: [1, -90.5]"]),
        ([[0, 0], [600, 0], [1, 1], [0, 0]], ["vertex 2: [600, 0]: expected a longitude"]),
    ],
)
def test_bad_rings(tmp_path: Path, ring: list, parts: list[str]) -> None:
    refused([write(tmp_path, feature([ring]))], "feature 1 'Test ECA', ", *parts)


def test_places_name_polygon_ring_and_vertex(tmp_path: Path) -> None:
    hole_bad = [[173, -41], [175, -41], [175, -39], [173, "x"], [173, -41]]
    coords = [[SQUARE], [SQUARE, hole_bad]]
    path = write(
        tmp_path,
        feature(),
        feature(coords, "MultiPolygon", name="Corran Sea ECA"),
        feature(name="Third"),
    )
    refused([path], "feature 2 'Corran Sea ECA', polygon 2, ring 2, vertex 4")


# ---- big rings: read at once, refused one by one --------------------------------------------


def _circle(n: int = 60) -> list[list[float]]:
    """A closed ring of n float vertices round 40°S 174°E [deg] (none a whole number)."""
    az = np.linspace(0.0, 2.0 * np.pi, n, endpoint=False) + 0.1
    ring = [[174.0 + 0.5 * float(np.cos(a)), -40.0 + 0.5 * float(np.sin(a))] for a in az]
    return ring + [ring[0]]


@pytest.mark.parametrize(
    ("bad", "parts"),
    [
        ([174.5, True], ["vertex 3: [174.5, true]: expected a position [lon, lat] of two numbers"]),
        ("12", ['vertex 3: "12"']),
        ({"lo": 1.5, "la": 2.5}, ['vertex 3: {"lo": 1.5, "la": 2.5}']),
        ([174.5, None], ["vertex 3: [174.5, null]"]),
        ([[174.5], [-40.5]], ["vertex 3: [[174.5], [-40.5]]"]),
        ([174.5], ["vertex 3: [174.5]"]),
        ([174.5, -95.5], ["vertex 3: [174.5, -95.5]: expected a latitude within ±90°"]),
        ([600.5, -40.5], ["vertex 3: [600.5, -40.5]: expected a longitude"]),
    ],
)
def test_bad_position_in_a_ring_of_floats(tmp_path: Path, bad: object, parts: list[str]) -> None:
    # the whole ring is read at once when every position is good; a bad one is named
    ring = _circle()
    ring[2] = bad
    refused([write(tmp_path, feature([ring]))], "feature 1 'Test ECA', polygon 1, ring 1, ", *parts)


def test_ring_of_floats_kept_as_written_ints_read_as_floats(tmp_path: Path) -> None:
    ring = _circle()
    ring[1:3] = [ring[1], ring[1]]  # a repeated vertex is dropped, numbers kept
    other = [[int(round(x)), int(round(y))] for x, y in ([170, -44], [178, -44], [178, -36])]
    coords = [[ring], [other + [other[0]]]]
    (area,) = load_areas([write(tmp_path, feature(coords, "MultiPolygon"))])
    ext = area.polygons[0].exterior
    assert ext == tuple(tuple(p) for p in ring[:2] + ring[3:-1])
    assert all(type(v) is float for p in ext + area.polygons[1].exterior for v in p)
    bad = _circle()
    bad[5:7] = [[180.0 + bad[4][0], bad[4][1]], bad[7]]  # a half turn from vertex 5 to 6
    refused([write(tmp_path, feature([bad], edges="rhumb"))], "edge from vertex 5 to vertex 6")


def test_altitudes_in_a_ring_of_floats(tmp_path: Path) -> None:
    ring = [p + [12.5] for p in _circle()]
    (area,) = load_areas([write(tmp_path, feature([ring]))])
    assert area.polygons[0].exterior == tuple((p[0], p[1]) for p in ring[:-1])


def test_progress_while_reading(tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    import geo.progress

    write(tmp_path, feature(name="A"), feature(name="B"), name="a.geojson")
    write(tmp_path, feature(name="C"), name="b.geojson")
    shown: list[str] = []
    monkeypatch.setattr(geo.progress, "INTERVAL_S", 0.0)  # every report shown
    assert len(load_areas([tmp_path], progress=shown.append)) == 3
    assert shown == ["reading areas 1/2", "reading areas 1/2, feature 1/2",
                     "reading areas 1/2, feature 2/2", "reading areas 2/2",
                     "reading areas 2/2, feature 1/1"]
    monkeypatch.setattr(geo.progress, "INTERVAL_S", 3600.0)  # only the first
    shown.clear()
    load_areas([tmp_path], progress=shown.append)
    assert shown == ["reading areas 1/2"]
