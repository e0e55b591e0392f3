"""``changeover areas diff OLD NEW`` end to end: the table, ``--json``, the exit status.

An update of the invented sample areas is made here: one area gets an end date and a
moved vertex in its hole, one a new, very long name (the same rings: a rename), a new
limit and start date, one is left alone and one is added. The moved distance is
checked against our own pyproj.Geod [KARNEY-2013]; positions are shown in degrees and minutes as
``geo.position.format_position`` writes them (checked there). Names, dates and
positions must appear whole at 80 and 120 columns, piped.
"""

from __future__ import annotations

import json
import os
import shutil
import subprocess
import sys
from pathlib import Path

import pytest

from tests.cli.test_route import SAMPLE, run
from tests.helpers.geo import REF_GEOD
from tests.helpers.paths import ROOT

LONG = "Meridian Reach Emission Control Area of the Invented Archipelago of Long Names"


@pytest.fixture(scope="module")
def update(tmp_path_factory) -> Path:
    folder = tmp_path_factory.mktemp("update")
    for f in SAMPLE.glob("*.geojson"):
        shutil.copy(f, folder / f.name)
    corran = json.loads((folder / "corran_sea.geojson").read_text(encoding="utf-8"))
    feat = corran["features"][0]
    feat["properties"]["effective_until"] = "2030-12-31"
    feat["geometry"]["coordinates"][0][1][2] = [175, -39.5]  # hole vertex 3: 39°S -> 39°30'S
    (folder / "corran_sea.geojson").write_text(json.dumps(corran), encoding="utf-8")
    reach = json.loads((folder / "meridian_reach.geojson").read_text(encoding="utf-8"))
    feat = reach["features"][0]
    feat["properties"].update(name=LONG, sulphur_limit_pct=0.05, effective_from="2027-09-01")
    (folder / "meridian_reach.geojson").write_text(json.dumps(reach), encoding="utf-8")
    feat["properties"].update(name="Tallow Bank ECA", effective_from="2028-01-01")
    feat["geometry"]["coordinates"] = [[[171, -41], [172, -41], [172, -40], [171, -41]]]
    (folder / "tallow_bank.geojson").write_text(json.dumps(reach), encoding="utf-8")
    return folder


def _run(columns: int, *args: str) -> subprocess.CompletedProcess:
    return subprocess.run([sys.executable, "-m", "planner", "areas", "diff", *args], cwd=ROOT,
                          capture_output=True, text=True, timeout=120,
                          env={**os.environ, "COLUMNS": str(columns)})


@pytest.mark.parametrize("columns", [80, 120])
def test_table_keeps_names_dates_and_positions_whole(update, columns: int):
    r = _run(columns, str(SAMPLE), str(update))
    assert r.returncode == 1, r.stderr  # something changed
    lines = r.stdout.splitlines()
    for whole in (LONG, "Corran Sea ECA", "renamed from: Meridian Reach ECA", "2030-12-31",
                  "2027-09-01", "2021-07-01", "2028-01-01", "39°00.00'S 175°00.00'E",
                  "39°30.00'S 175°00.00'E"):
        assert any(whole in line for line in lines), whole
    assert all(len(line) <= 80 for line in lines if line not in (LONG, ) and
               not line.startswith(("old: ", "new: "))), r.stdout
    _, _, moved = REF_GEOD.inv(175.0, -39.0, 175.0, -39.5)  # [KARNEY-2013]
    assert f"polygon 1, ring 2 (hole 1), vertex 3 moved {moved:,.1f} m ({moved / 1852:,.2f} " \
           f"nm)" in r.stdout
    assert "2 changed, 1 added, 0 removed, 1 unchanged." in r.stdout
    assert "official text" in r.stdout


def test_json(update):
    r = run("areas", "diff", str(SAMPLE), str(update), "--json")
    assert r.returncode == 1, r.stderr
    doc = json.loads(r.stdout)
    assert set(doc) == {"old", "new", "old_areas", "new_areas", "changed", "unchanged",
                        "changes"}
    assert doc["unchanged"] == ["Skarvik Basin ECA"]
    kinds = [(c["area"], c["kind"]) for c in doc["changes"]]
    assert kinds == [("Corran Sea ECA", "effective_until"), ("Corran Sea ECA", "vertex moved"),
                     (LONG, "renamed"), (LONG, "limit"), (LONG, "effective_from"),
                     ("Tallow Bank ECA", "added")]
    assert doc["changes"][3]["old"] == 0.1 and doc["changes"][3]["new"] == 0.05
    moved = doc["changes"][1]
    assert moved["old"] == {"lat": -39.0, "lon": 175.0}
    assert moved["new"] == {"lat": -39.5, "lon": 175.0}
    assert moved["moved_m"] == pytest.approx(REF_GEOD.inv(175.0, -39.0, 175.0, -39.5)[2],
                                             abs=1e-6)


def test_no_change_exits_0(tmp_path):
    r = run("areas", "diff", str(SAMPLE), str(SAMPLE / "corran_sea.geojson"))
    assert r.returncode == 1  # two areas fewer
    r = run("areas", "diff", str(SAMPLE / "corran_sea.geojson"), str(SAMPLE / "corran_sea.geojson"))
    assert r.returncode == 0, r.stderr
    assert "No change: the same areas, limits, dates and vertices." in r.stdout


def test_refusals(tmp_path):
    r = run("areas", "diff", str(tmp_path / "nowhere"), str(SAMPLE))
    assert r.returncode == 2 and len(r.stderr.splitlines()) == 1 and not r.stdout
    assert "nowhere: no such file or folder" in r.stderr
    bad = tmp_path / "bad.geojson"
    bad.write_text('{"type": "Feature"', encoding="utf-8")
    r = run("areas", "diff", str(SAMPLE), str(bad))
    assert r.returncode == 2 and "bad.geojson: line 1" in r.stderr and not r.stdout
