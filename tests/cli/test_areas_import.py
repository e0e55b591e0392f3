"""``changeover areas import`` of coordinate lists, end to end, and its refusals.

The invented Tallow Bank ECA of tests/geo/test_area_list.py, written in every notation,
must give the very same area file; the sample scenario's Meridian Reach and Skarvik
Basin areas, written as lists (tests/data/area_lists/), must load as the hand-written
GeoJSON areas do and give the same route crossings. The crossing of Meridian Reach's
western edge (the meridian 178°30'E, a geodesic) by the great-circle leg from
40°00'S 171°00'E to 39°00'S 179°30'E is checked against pyproj's geodesic with SciPy's
root finder [KARNEY-2013] [SCIPY-2020] (tests.helpers.geo.geodesic_lat_at_lon).
"""

from __future__ import annotations

import json
from pathlib import Path

import pytest

from geo.area_diff import diff_areas
from geo.area_files import load_areas
from geo.errors import InputError
from planner.cli.areas_import import run_import
from tests.cli.test_route import ROUTE, SAMPLE, run
from tests.geo.test_area_list import CSV, EXPECTED, NOTATIONS
from tests.helpers.geo import geodesic_lat_at_lon
from tests.helpers.paths import DATA

LISTS = DATA / "area_lists"
TALLOW = {"name": "Tallow Bank ECA", "limit": 0.1, "from_": "2027-03-01", "until": None,
          "edges": None, "layer": None, "name_field": None, "crs": None}


def _import(source: Path, out: Path, **over: object) -> dict:
    return run_import(source, out, **{**TALLOW, **over})


def _document(path: Path) -> dict:
    doc = json.loads(path.read_text(encoding="utf-8"))
    for f in doc["features"]:
        f["properties"].pop("source")
        f["properties"].pop("note")
    return doc


def test_every_notation_writes_the_same_area_file(tmp_path):
    docs = {}
    for i, (name, text) in enumerate({**NOTATIONS, **CSV}.items()):
        source = tmp_path / (f"list{i}.csv" if name in CSV else f"list{i}.txt")
        source.write_text(text, encoding="utf-8")
        report = _import(source, tmp_path / f"out{i}.geojson")
        assert report["points_read"] in (4, 5)
        docs[name] = _document(tmp_path / f"out{i}.geojson")
    first = next(iter(docs.values()))
    for name, doc in docs.items():
        assert doc == first, name
    ring = first["features"][0]["geometry"]["coordinates"][0]
    assert ring == [[lon, lat] for _, lat, lon in EXPECTED + EXPECTED[:1]]  # closed
    assert first["features"][0]["properties"] == {
        "name": "Tallow Bank ECA", "sulphur_limit_pct": 0.1, "effective_from": "2027-03-01",
        "edges": "geodesic"}


def test_the_written_file_loads_with_source_note_and_count(tmp_path):
    source = tmp_path / "tallow.txt"
    source.write_text(NOTATIONS["regulation (mark before the decimals)"], encoding="utf-8")
    out = tmp_path / "areas" / "tallow.geojson"
    r = run("areas", "import", str(source), "--name", "Tallow Bank ECA", "--limit", "0.10",
            "--from", "2027-03-01", "--until", "2031-12-31", "--edges", "rhumb",
            "--out", str(out))
    assert r.returncode == 0, r.stderr
    assert "4 points read from tallow.txt (points 1 to 4, lines 3 to 6; closed back to " \
           "point 1)" in r.stdout
    assert "Tallow Bank ECA: 0.10 % m/m from 2027-03-01 until 2031-12-31, rhumb edges" in \
           r.stdout and "MARPOL Annex VI" in r.stdout
    props = json.loads(out.read_text(encoding="utf-8"))["features"][0]["properties"]
    assert props["source"] == str(source) and "4 points read" in props["note"]
    assert "not the legal text" in props["note"]
    (area,) = load_areas([out])
    assert (area.name, area.edges, area.effective_until.isoformat()) == (
        "Tallow Bank ECA", "rhumb", "2031-12-31")
    assert area.polygons[0].exterior == tuple((lon, lat) for _, lat, lon in EXPECTED)
    listed = run("areas", str(out.parent), "--on", "2028-01-01", "--json")  # the old form
    assert listed.returncode == 0, listed.stderr
    assert json.loads(listed.stdout)["areas"][0]["in_force_today"] is True


@pytest.fixture(scope="module")
def imported(tmp_path_factory) -> Path:
    """The sample's Meridian Reach and Skarvik Basin imported from lists, with Corran Sea."""
    folder = tmp_path_factory.mktemp("imported")
    r = run("areas", "import", str(LISTS / "meridian_reach.txt"), "--name",
            "Meridian Reach ECA", "--limit", "0.10", "--from", "2021-07-01",
            "--out", str(folder / "meridian_reach.geojson"))
    assert r.returncode == 0, r.stderr
    r = run("areas", "import", str(LISTS / "skarvik_basin.csv"), "--name",
            "Skarvik Basin ECA", "--limit", "0.10", "--from", "2027-06-01", "--edges", "rhumb",
            "--out", str(folder / "skarvik_basin.geojson"), "--json")
    assert r.returncode == 0, r.stderr
    report = json.loads(r.stdout)
    assert report["points_read"] == 5 and report["areas"][0]["vertices"] == 4
    (folder / "corran_sea.geojson").write_bytes((SAMPLE / "corran_sea.geojson").read_bytes())
    return folder


def test_imported_lists_are_the_sample_areas(imported):
    diff = diff_areas(load_areas([SAMPLE]), load_areas([imported]))
    assert {c.kind for c in diff.changes} == {"source"}  # only where they were copied from


def _crossings(areas: Path) -> list[dict]:
    r = run("route", str(ROUTE), "--areas", str(areas), "--depart", "2027-06-05T06:00+12:00",
            "--json")
    assert r.returncode == 0, r.stderr
    return json.loads(r.stdout)["crossings"]


def test_route_gives_the_same_crossings(imported):
    before, after = _crossings(SAMPLE), _crossings(imported)
    assert len(after) == len(before) == 7
    for a, b in zip(before, after, strict=True):
        assert (a["area"], a["event"], a["leg"], a["in_force"]) == (
            b["area"], b["event"], b["leg"], b["in_force"])
        assert b["lat"] == pytest.approx(a["lat"], abs=1e-9)
        assert b["lon"] == pytest.approx(a["lon"], abs=1e-9)
        assert b["distance_nm"] == pytest.approx(a["distance_nm"], abs=1e-6)
    enter = next(c for c in after if c["area"] == "Meridian Reach ECA")
    # [KARNEY-2013] pyproj geodesic + [SCIPY-2020] brentq: the leg reaches 178°30'E here
    assert enter["lon"] == pytest.approx(178.5, abs=1e-9)
    assert enter["lat"] == pytest.approx(geodesic_lat_at_lon(171.0, -40.0, 179.5, -39.0, 178.5),
                                         abs=1e-8)


# ---- refusals: one line, exit 2, nothing written ------------------------------------------

BASE = ["--name", "Tallow Bank ECA", "--limit", "0.10", "--from", "2027-03-01"]
BODY = NOTATIONS["regulation (mark before the decimals)"]
BOWTIE = "1 40°00'.00 S 171°00'.00 E\n2 38°00'.00 S 174°00'.00 E\n" \
         "3 40°00'.00 S 174°00'.00 E\n4 38°00'.00 S 171°00'.00 E\n"
HALF_TURN = "1 10°00'.00 S 010°00'.00 E\n2 10°00'.00 S 170°00'.00 W\n3 20°00'.00 S 170°00'.00 W\n"
BIG = "\n".join(f"{lat} {lon}" for lon, lat in [(-170, -80), (-10, -80), (10, -80), (170, -80),
                                                 (170, 80), (10, 80), (-10, 80), (-170, 80)])
REFUSALS = [
    # (list text, options replacing BASE's, words in the one line)
    (BODY, ["--limit", "0.10", "--from", "2027-03-01"], ["--name: missing: expected the area's "
                                                         "name"]),
    (BODY, ["--name", "X", "--from", "2027-03-01"], ["--limit: missing: expected"]),
    (BODY, ["--name", "X", "--limit", "0.1"], ["--from: missing: expected the first day"]),
    (BODY, [*BASE, "--limit", "7"], ["--limit: 7: expected a sulphur limit"]),
    (BODY, [*BASE, "--from", "2027-13-01"], ["--from: '2027-13-01': expected a date"]),
    (BODY, [*BASE, "--until", "2026-01-01"], ["--until: '2026-01-01': expected a date not "
                                              "before --from 2027-03-01"]),
    (BODY, [*BASE, "--edges", "straight"], ["--edges: 'straight': expected geodesic | rhumb |"]),
    (BODY, [*BASE, "--layer", "eca"], ["--layer: 'eca': expected no --layer for a list"]),
    (BODY, [*BASE, "--crs", "EPSG:4326"], ["--crs: 'EPSG:4326': expected no --crs for a list"]),
    (BOWTIE, BASE, ["points, polygon 1, ring 1: crosses or touches itself at 39°",
                    "(edges starting at vertices 1, 3)"]),
    (HALF_TURN, BASE, ["points, polygon 1, ring 1, edge from vertex 1 to vertex 2",
                       "changing longitude by less than 180°"]),
    (BIG, BASE, ["points, polygon 1, ring 1: encloses", "at most a hemisphere"]),
    (BODY.replace("3  38°30'.00 S", "thence along the coast to\n3  38°30'.00 S"), BASE,
     ["line 5, between point 2 and point 3", "thence along the coast to"]),
    (BODY.replace("38°30'", "38°75'"), BASE, ["line 5, latitude: \"38°75'.00 S\": expected "
                                              "minutes below 60"]),
]


@pytest.mark.parametrize("text, options, words", REFUSALS,
                         ids=[w[0][:40] for _, _, w in REFUSALS])
def test_refusals(tmp_path, text: str, options: list[str], words: list[str]):
    source = tmp_path / "tallow.txt"
    source.write_text(text, encoding="utf-8")
    out = tmp_path / "out" / "tallow.geojson"
    r = run("areas", "import", str(source), *options, "--out", str(out))
    assert r.returncode == 2, r.stdout + r.stderr
    assert len(r.stderr.splitlines()) == 1 and r.stderr.startswith("changeover: error: ")
    for w in words:
        assert w in r.stderr, r.stderr
    if "--" not in words[0][:2]:
        assert str(source) in r.stderr
    assert not out.exists() and not out.parent.exists() and not r.stdout


def test_file_kinds_refused(tmp_path):
    source = tmp_path / "tallow.txt"
    source.write_text(BODY, encoding="utf-8")
    for out, words in ((tmp_path / "tallow.json5", "--out: "), (source, "--out: ")):
        with pytest.raises(InputError, match=words):
            _import(source, out)
    other = tmp_path / "tallow.docx"
    other.write_text(BODY, encoding="utf-8")
    with pytest.raises(InputError, match=r"tallow.docx: a .docx file: expected a list of "
                                         r"positions \(.txt, .csv\) or a GIS file"):
        _import(other, tmp_path / "o.geojson")
    with pytest.raises(InputError, match=r"nowhere.txt: .*expected a readable list"):
        _import(tmp_path / "nowhere.txt", tmp_path / "o.geojson")
    assert not (tmp_path / "o.geojson").exists()
