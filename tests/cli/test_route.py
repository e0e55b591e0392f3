"""``changeover route`` and ``changeover areas`` end to end, as a user runs them.

The JSON keys checked are the contract in docs/json-contract.md. Positions are checked
against the sample areas' own vertices (the route crosses meridian edges
at 170°E, 173°E, 175°E, 178°E, 178.5°E, 176°W and 171°W).
"""

from __future__ import annotations

import json
import subprocess
import sys
from pathlib import Path

import pytest

from tests.helpers.paths import ROOT

SAMPLE = ROOT / "areas_sample"
ROUTE = SAMPLE / "aldmere_to_skarvik.csv"


def run(*args: str, cwd: Path = ROOT) -> subprocess.CompletedProcess:
    return subprocess.run([sys.executable, "-m", "planner", *args], cwd=cwd,
                          capture_output=True, text=True, timeout=120)


@pytest.fixture(scope="module")
def timed() -> dict:
    r = run("route", str(ROUTE), "--areas", str(SAMPLE), "--depart", "2027-05-30T06:00+12:00",
            "--json")
    assert r.returncode == 0, r.stderr
    return json.loads(r.stdout)


def test_route_json_contract(timed):
    assert set(timed) >= {"route", "crossings", "stretches", "areas"}
    assert set(timed["route"]) >= {"distance_nm", "legs"}
    assert timed["route"]["legs"] == 4
    for c in timed["crossings"]:
        assert set(c) >= {"area", "event", "leg", "lat", "lon", "distance_nm", "time_utc",
                          "in_force"}
        assert c["event"] in ("enter", "exit")
    d = [c["distance_nm"] for c in timed["crossings"]]
    assert d == sorted(d)
    for s in timed["stretches"]:
        assert set(s) >= {"from_nm", "to_nm", "limit_pct", "areas"}
    for a in timed["areas"]:
        assert set(a) >= {"name", "inside_nm", "inside_h"}


def test_sample_events(timed):
    events = [(c["area"], c["event"], round(c["lon"], 9)) for c in timed["crossings"]]
    assert events == [
        ("Corran Sea ECA", "enter", 170.0), ("Corran Sea ECA", "exit", 173.0),  # hole
        ("Corran Sea ECA", "enter", 175.0), ("Corran Sea ECA", "exit", 178.0),
        ("Meridian Reach ECA", "enter", 178.5), ("Meridian Reach ECA", "exit", -176.0),
        ("Skarvik Basin ECA", "enter", -171.0),
    ]
    assert all(c["in_force"] for c in timed["crossings"])
    assert all(c["time_utc"].endswith("Z") for c in timed["crossings"])
    stretches = timed["stretches"]
    assert stretches[0]["from_nm"] == 0.0
    assert stretches[-1]["to_nm"] == pytest.approx(timed["route"]["distance_nm"])
    assert [s["limit_pct"] for s in stretches] == [0.5, 0.1, 0.5, 0.1, 0.5, 0.1, 0.5, 0.1]
    for a, b in zip(stretches, stretches[1:], strict=False):
        assert a["to_nm"] == b["from_nm"]


def test_without_times_the_date_decides():
    r = run("route", str(ROUTE), "--areas", str(SAMPLE), "--on", "2027-01-01", "--json")
    assert r.returncode == 0, r.stderr
    doc = json.loads(r.stdout)
    sk = [c for c in doc["crossings"] if c["area"] == "Skarvik Basin ECA"]
    assert [c["in_force"] for c in sk] == [False]  # in force from 2027-06-01
    assert all(c["time_utc"] is None for c in doc["crossings"])
    assert doc["stretches"][-1]["limit_pct"] == 0.5
    assert all(a["inside_h"] is None for a in doc["areas"])


def test_tables_geojson_and_map(tmp_path):
    gj, png = tmp_path / "r.geojson", tmp_path / "m.png"
    r = run("route", str(ROUTE), "--areas", str(SAMPLE), "--depart", "2027-05-30T06:00+12:00",
            "--geojson", str(gj), "--map", str(png))
    assert r.returncode == 0, r.stderr
    assert "Boundary crossings" in r.stdout and "39°54.0'S 170°00.0'E" in r.stdout
    assert "Ship's time +12:00" in r.stdout and "nm" in r.stdout
    doc = json.loads(gj.read_text())
    kinds = [f["properties"]["kind"] for f in doc["features"]]
    assert kinds.count("route") == 1 and kinds.count("crossing") == 7
    assert png.read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"


@pytest.mark.parametrize("args, needle", [
    (["--depart", "2027-05-30 06:00"], "--depart"),
    (["--depart", "2027-05-30T06:00Z", "--speed", "-3"], "--speed"),
    (["--tz", "+25:00"], "--tz"),
    (["--on", "2027-13-01"], "--on"),
])
def test_bad_options_exit_2_and_write_nothing(tmp_path, args, needle):
    gj = tmp_path / "r.geojson"
    r = run("route", str(ROUTE), "--areas", str(SAMPLE), "--geojson", str(gj), *args)
    assert r.returncode == 2
    lines = r.stderr.strip().splitlines()
    assert len(lines) == 1 and needle in lines[0], r.stderr
    assert not gj.exists() and list(tmp_path.iterdir()) == []


def test_bad_area_file_names_file_and_place(tmp_path):
    bad = tmp_path / "bad.geojson"
    bad.write_text(json.dumps({"type": "Feature", "properties": {
        "name": "B", "sulphur_limit_pct": "low", "effective_from": "2020-01-01"},
        "geometry": {"type": "Polygon", "coordinates": [[[0, 0], [1, 0], [1, 1], [0, 0]]]}}))
    r = run("route", str(ROUTE), "--areas", str(bad))
    assert r.returncode == 2
    assert "bad.geojson" in r.stderr and "sulphur_limit_pct" in r.stderr
    assert len(r.stderr.strip().splitlines()) == 1


def test_missing_route_file():
    r = run("route", "nowhere.csv", "--areas", str(SAMPLE))
    assert r.returncode == 2 and "nowhere.csv" in r.stderr


def test_areas_listing():
    r = run("areas", str(SAMPLE), "--on", "2027-01-01", "--json")
    assert r.returncode == 0, r.stderr
    doc = json.loads(r.stdout)
    names = {a["name"]: a for a in doc["areas"]}
    assert set(names) == {"Corran Sea ECA", "Meridian Reach ECA", "Skarvik Basin ECA"}
    assert names["Skarvik Basin ECA"]["in_force_today"] is False
    assert names["Corran Sea ECA"]["in_force_today"] is True
    assert all(a["area_km2"] > 1e5 for a in doc["areas"])
    table = run("areas", str(SAMPLE))
    assert table.returncode == 0 and "km²" in table.stdout


def test_route_warns_of_swapped_latitude_and_longitude(tmp_path):
    """A waypoint written lat 4.0, lon 54.5 between (54.0 N, 3.0 E) and (55.0 N, 5.0 E)
    (fictional): exchanged, it is 54.5 N 4.0 E, beside its neighbours. The route check
    prints the plan's warning (geo/swapped.py's rule) with the legs' lengths, checked here
    with pyproj's geodesics ([KARNEY-2013])."""
    from pyproj import Geod

    route = tmp_path / "swapped.csv"
    route.write_text("name,lat,lon\nA,54.0,3.0\nB,4.0,54.5\nC,55.0,5.0\n", encoding="utf-8")
    geod = Geod(ellps="WGS84")

    def nm(a, b):
        return geod.inv(a[1], a[0], b[1], b[0])[2] / 1852.0  # [NM-1852]

    legs = nm((54.0, 3.0), (4.0, 54.5)) + nm((4.0, 54.5), (55.0, 5.0))
    swapped = nm((54.0, 3.0), (54.5, 4.0)) + nm((54.5, 4.0), (55.0, 5.0))
    r = run("route", str(route), "--areas", str(SAMPLE))
    assert r.returncode == 0, r.stderr
    text = " ".join(r.stdout.split())
    assert (f"Warning: {route}: waypoint 2 'B' at lat 4°, lon 54.5° looks like latitude and "
            f"longitude exchanged: its legs are {legs:.0f} nm as written, {swapped:.0f} nm at "
            "lat 54.5°, lon 4°") in text
    doc = json.loads(run("route", str(route), "--areas", str(SAMPLE), "--json").stdout)
    assert len(doc["warnings"]) == 1 and "waypoint 2 'B'" in doc["warnings"][0]
    # a route that looks right has none
    ok = json.loads(run("route", str(ROUTE), "--areas", str(SAMPLE), "--json").stdout)
    assert ok["warnings"] == []
