"""geo.area_import: an imported area, checked as the loader checks it, written as GeoJSON.

The written Feature must load back (geo.area_files.load_areas) to the same area; with
lonlat edges a ring across 180° is written with longitudes continuing past it, so that
its straight edges take the short way: its size must then be that of the sample's
Meridian Reach written the same way, and a ring round a pole is left as it is. Sizes are
checked against the equal-area plane's own test against pyproj (tests/geo), here only
compared with each other. The areas are invented.
"""

from __future__ import annotations

import json
from dataclasses import replace
from datetime import date

import pytest

from geo.area_files import load_areas
from geo.area_import import (
    AreaProperties,
    area_feature,
    areas_document,
    list_area,
    refuse_duplicate_names,
    unwrap_lonlat,
)
from geo.area_list import read_point_list
from geo.area_measure import area_km2
from geo.errors import InputError
from tests.helpers.areas import SAMPLE
from tests.helpers.paths import DATA

REACH = DATA / "area_lists" / "meridian_reach.txt"


def _props(**over) -> AreaProperties:
    base = {"name": "Meridian Reach ECA", "sulphur_limit_pct": 0.1,
            "effective_from": date(2021, 7, 1), "source": str(REACH)}
    return AreaProperties(**{**base, **over})


def test_written_feature_loads_back_to_the_same_area(tmp_path):
    area = list_area(read_point_list(REACH), _props(effective_until=date(2030, 6, 30)),
                     str(REACH))
    path = tmp_path / "reach.geojson"
    path.write_text(json.dumps(areas_document([area_feature(area, "4 points read.")])),
                    encoding="utf-8")
    (back,) = load_areas([path])
    for field in ("name", "sulphur_limit_pct", "effective_from", "effective_until", "edges",
                  "source", "polygons"):
        assert getattr(back, field) == getattr(area, field), field
    note = json.loads(path.read_text(encoding="utf-8"))["features"][0]["properties"]["note"]
    assert note.startswith("4 points read. Imported by changeover; not the legal text.")
    assert "MARPOL Annex VI and national law" in note


def test_lonlat_edges_across_180_take_the_short_way():
    area = list_area(read_point_list(REACH), _props(edges="lonlat"), str(REACH))
    assert [lon for lon, _ in area.polygons[0].exterior] == [178.5, 184.0, 184.0, 178.5]
    (sample,) = load_areas([SAMPLE / "meridian_reach.geojson"])  # written 178.5 ... 184
    assert area_km2(area) == pytest.approx(area_km2(replace(sample, edges="lonlat")),
                                           rel=1e-12)


def test_unwrap_keeps_a_ring_round_a_pole_and_a_ring_that_needs_nothing():
    polar = tuple((float(lon), 70.0) for lon in (-150, -90, -30, 30, 90, 150))
    assert unwrap_lonlat(polar) is polar
    plain = ((170.0, -44.0), (178.0, -44.0), (178.0, -36.0))
    assert unwrap_lonlat(plain) is plain
    west = ((-176.0, -42.0), (178.5, -42.0), (178.5, -37.0), (-176.0, -37.0))
    assert [p[0] for p in unwrap_lonlat(west)] == [184.0, 178.5, 178.5, 184.0]


def test_refusals():
    with pytest.raises(ValueError, match="edges 'straight'"):
        _props(edges="straight")
    with pytest.raises(InputError, match=r"reach.txt: points: an area needs a name: expected"):
        list_area(read_point_list(REACH), _props(name=""), "reach.txt")
    with pytest.raises(InputError, match=r"f.gpkg: feature 2 'b': 'b': expected a name not "
                                         r"already used \(feature 1 'B' has it\)"):
        refuse_duplicate_names(["B", "b"], "f.gpkg", ["feature 1 'B'", "feature 2 'b'"])
