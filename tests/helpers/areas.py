"""Shared helpers for the area-file tests: GeoJSON features, files and refusals.

Used by tests/geo/test_area_files.py and tests/geo/test_area_checks.py. The
areas built here are invented; GeoJSON is RFC 7946 [RFC-7946] [P]: rings of
``[lon, lat]`` positions in degrees, closed (the first position repeated last).
"""

from __future__ import annotations

import json
from collections.abc import Sequence
from os import PathLike
from pathlib import Path

import pytest

from geo.area import Area
from geo.area_files import load_areas
from geo.errors import InputError
from tests.helpers.paths import DATA, ROOT

SAMPLE = ROOT / "areas_sample"
"""The fictional sample scenario's areas."""

FIXTURES = DATA / "areas"
"""Area files written for the tests."""

SQUARE: list[list[float]] = [[170, -44], [178, -44], [178, -36], [170, -36], [170, -44]]
"""A closed GeoJSON ring [deg]: the default geometry of :func:`feature`."""

Position = Sequence[float]


def props(**over: object) -> dict:
    """Valid properties of an invented area, with overrides (None removes a key)."""
    base = {"name": "Test ECA", "sulphur_limit_pct": 0.10, "effective_from": "2020-01-01"}
    base.update(over)
    return {k: v for k, v in base.items() if v is not None}


def feature(coords: object = None, kind: str = "Polygon", **over: object) -> dict:
    """A Feature; ``coords`` are the geometry's coordinates (a Polygon's rings by default)."""
    return {
        "type": "Feature",
        "properties": props(**over),
        "geometry": {"type": kind, "coordinates": coords if coords is not None else [SQUARE]},
    }


def closed(ring: Sequence[Position]) -> list:
    """A GeoJSON ring from open vertices [deg]: the first repeated last."""
    return [list(p) for p in ring] + [list(ring[0])]


def write(folder: Path, *features: dict, name: str = "areas.geojson") -> Path:
    """Write the features as one FeatureCollection file in ``folder``; return its path."""
    path = folder / name
    path.write_text(json.dumps({"type": "FeatureCollection", "features": list(features)}))
    return path


def load_one(folder: Path, *rings: Sequence[Position], edges: str = "geodesic") -> Area:
    """Load a one-feature file whose Polygon has the given open rings [deg]."""
    coords = [closed(r) for r in rings]
    (area,) = load_areas([write(folder, feature(coords, edges=edges))])
    return area


def refused(paths: Sequence[str | PathLike], *parts: str) -> str:
    """Assert loading fails with one InputError line containing every part; return it."""
    with pytest.raises(InputError) as info:
        load_areas(paths)
    msg = str(info.value)
    assert "\n" not in msg
    for part in parts:
        assert part in msg, f"{part!r} not in {msg!r}"
    return msg
