"""geo.area_diff: what changed between two versions of an area set.

Rings are compared as boundaries on the Earth: the same vertices from another start
or the other way round are no change. A moved vertex's distance is checked against
our own pyproj.Geod [KARNEY-2013] and, for a move along a meridian, against the
meridian arc integrated by SciPy [WGS84] [D] [SCIPY-2020]. The areas are invented.
"""

from __future__ import annotations

from dataclasses import replace
from datetime import date

import pytest

from geo.area import Polygon
from geo.area_diff import diff_areas, ring_changes
from tests.helpers.geo import REF_GEOD, make_area, meridian_arc_quad_m

SQUARE = [(170.0, -44.0), (178.0, -44.0), (178.0, -36.0), (170.0, -36.0)]
HOLE = [(173.0, -41.0), (175.0, -41.0), (175.0, -39.0), (173.0, -39.0)]


def _area(name="Test ECA", parts=None, **over):
    a = make_area(name, parts or [(SQUARE, [HOLE])])
    return replace(a, effective_from=date(2020, 1, 1), **over)


@pytest.mark.parametrize("ring", [SQUARE[2:] + SQUARE[:2], SQUARE[::-1], SQUARE[1:][::-1]
                                  + SQUARE[:1][::-1],
                                  [(lon - 360.0, lat) for lon, lat in SQUARE]],
                         ids=["another start", "reversed", "reversed, another start",
                              "a turn west"])
def test_the_same_ring_written_otherwise_is_no_change(ring):
    assert ring_changes("A", "ring 1", tuple(SQUARE), tuple(ring)) == []


def test_a_moved_vertex_and_its_distance():
    new = list(SQUARE)
    new[2] = (178.0, -35.5)  # 30' north along the meridian 178°E
    (c,) = ring_changes("A", "polygon 1, ring 1", tuple(SQUARE), tuple(new))
    assert (c.kind, c.place, c.old, c.new) == ("vertex moved", "polygon 1, ring 1, vertex 3",
                                               (-36.0, 178.0), (-35.5, 178.0))
    _, _, ref = REF_GEOD.inv(178.0, -36.0, 178.0, -35.5)  # [KARNEY-2013]
    assert c.moved_m == pytest.approx(ref, abs=1e-6)
    # [WGS84] [D]: along a meridian, the arc ∫ρ dφ between the latitudes
    assert c.moved_m == pytest.approx(meridian_arc_quad_m(36.0) - meridian_arc_quad_m(35.5),
                                      abs=1e-6)


def test_added_and_removed_vertices_keep_their_numbers():
    added = SQUARE[:2] + [(178.0, -40.0)] + SQUARE[2:]
    (c,) = ring_changes("A", "ring 1", tuple(SQUARE), tuple(added))
    assert (c.kind, c.place, c.new) == ("vertex added", "ring 1, vertex 3", (-40.0, 178.0))
    (c,) = ring_changes("A", "ring 1", tuple(added), tuple(SQUARE))
    assert (c.kind, c.place, c.old) == ("vertex removed", "ring 1, vertex 3", (-40.0, 178.0))
    # the new ring written from another start: numbers are still the new ring's own
    turned = added[3:] + added[:3]
    (c,) = ring_changes("A", "ring 1", tuple(SQUARE), tuple(turned))
    assert c.place == "ring 1, vertex 5" and turned[4] == (178.0, -40.0)


def test_properties_polygons_rings_and_areas():
    north = [(lon, lat + 1.0) for lon, lat in SQUARE]
    old = [_area("Alpha ECA"), _area("Beta ECA", [north]), _area("Gamma ECA", [SQUARE])]
    alpha = replace(old[0], sulphur_limit_pct=0.05, effective_until=date(2030, 12, 31),
                    edges="rhumb", source="new text",
                    polygons=(Polygon(tuple(SQUARE)), Polygon(tuple(HOLE))))
    gamma = replace(old[2], name="Gamma Sea ECA")  # same rings under a new name
    new = [alpha, gamma, _area("Delta ECA", [HOLE])]
    d = diff_areas(old, new)
    got = [(c.area, c.kind, c.place, c.old, c.new) for c in d.changes]
    assert got == [
        ("Alpha ECA", "limit", "", 0.1, 0.05),
        ("Alpha ECA", "effective_until", "", None, "2030-12-31"),
        ("Alpha ECA", "edges", "", "geodesic", "rhumb"),
        ("Alpha ECA", "source", "", "", "new text"),
        ("Alpha ECA", "ring removed", "polygon 1, ring 2 (hole 1)", 4, None),
        ("Alpha ECA", "polygon added", "polygon 2", None, 4),
        ("Beta ECA", "removed", "", d.changes[6].old, None),
        ("Gamma Sea ECA", "renamed", "", "Gamma ECA", "Gamma Sea ECA"),
        ("Delta ECA", "added", "", None, d.changes[8].new),
    ]
    assert d.changes[6].old == {"limit_pct": 0.1, "effective_from": "2020-01-01",
                                "effective_until": None, "polygons": 1, "vertices": 4,
                                "edges": "geodesic"}
    assert d.changed_areas == ("Alpha ECA", "Beta ECA", "Gamma Sea ECA", "Delta ECA")
    assert d.unchanged == () and (d.old_count, d.new_count) == (3, 3)


def test_names_match_ignoring_case_and_same_sets_are_unchanged():
    a = _area("Alpha ECA")
    d = diff_areas([a], [replace(a, name="ALPHA ECA")])
    assert [(c.kind, c.old, c.new) for c in d.changes] == [("renamed", "Alpha ECA",
                                                            "ALPHA ECA")]
    d = diff_areas([a], [a])
    assert d.changes == () and d.unchanged == ("Alpha ECA",)


def test_a_rename_needs_one_area_with_those_rings():
    old = [_area("Beta ECA", [SQUARE]), _area("Gamma ECA", [SQUARE])]
    d = diff_areas(old, [_area("Gamma Sea ECA", [SQUARE])])
    assert [(c.area, c.kind) for c in d.changes] == [
        ("Beta ECA", "removed"), ("Gamma ECA", "removed"), ("Gamma Sea ECA", "added")]
