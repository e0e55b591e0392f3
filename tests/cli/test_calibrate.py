"""``changeover calibrate`` end to end, and its refusals (one line, exit 2, nothing written).

The sample trend (``areas_sample/trends/``) is fictional: made by
``tests/helpers/trends.py`` from the sample ship with its pipes 30 % and its
mixing tank 25 % larger than the ship file says (the published rules applied
forwards: [ASTM-D341], [MAPLES-2000]). The fit must find those volumes inside
its intervals ([BATES-WATTS-1988]).
"""

from __future__ import annotations

import json
import shutil
import subprocess
import sys

import pytest

from planner.ship.ship_file import load_ship
from tests.helpers.paths import ROOT
from tests.helpers.trends import inlet_trend, write_trend_csv

SHIP = "areas_sample/ship.toml"
TREND = "areas_sample/trends/kb_main_2027-05-30.csv"
SWITCH = "2027-05-30T16:00+12:00"


def run(*args, cwd=ROOT):
    return subprocess.run([sys.executable, "-m", "planner", "calibrate", *args], cwd=cwd,
                          capture_output=True, text=True, timeout=300)


@pytest.fixture(scope="module")
def outputs(tmp_path_factory):
    d = tmp_path_factory.mktemp("cal")
    r = run(SHIP, TREND, "--switch-at", SWITCH, "--chart", str(d / "c.png"), "--write",
            str(d / "new.toml"))
    j = run(SHIP, TREND, "--switch-at", SWITCH, "--json")
    return d, r, j


def test_table_chart_and_written_ship(outputs):
    d, r, _ = outputs
    assert r.returncode == 0, r.stderr
    out = r.stdout
    assert "pipes (sum of supply_line, booster_line, engine_line, return_line)" in out
    assert "mixing_tank (effective volume)" in out and "m³" in out
    assert "not fitted, ship file's value kept: heaters" in out
    assert ("time until every inlet stays at or below 0.09 % m/m (limit 0.1 %): ship file "
            "1.55 h (93 min)") in out
    assert "Advisory only" in out and "safety management system" in out
    assert (d / "c.png").read_bytes()[:4] == b"\x89PNG"
    new = load_ship(d / "new.toml")
    ship = load_ship(ROOT / SHIP)
    assert new.volumes["mixing_tank"].volume_m3 != ship.volumes["mixing_tank"].volume_m3
    import hashlib

    first = (d / "new.toml").read_text().splitlines()[0]
    digest = hashlib.sha256((ROOT / TREND).read_bytes()).hexdigest()
    assert f"kb_main_2027-05-30.csv (SHA-256 {digest})" in first


def test_json_finds_the_sample_trend_volumes(outputs):
    _, _, j = outputs
    assert j.returncode == 0, j.stderr
    doc = json.loads(j.stdout)
    ship = load_ship(ROOT / SHIP)
    truth = {"pipes": 1.3 * sum(ship.volumes[n].volume_m3 for n in
                                ("supply_line", "booster_line", "engine_line", "return_line")),
             "mixing_tank": 1.25 * 0.5}  # how the sample trend was made (module docstring)
    for p in doc["parameters"]:
        assert p["low_95"] < truth[p["name"]] < p["high_95"], p
        assert p["unit"] == "m³"
    t = doc["time_to_target"]
    assert t["fitted_low_95_h"] < t["fitted_h"] < t["fitted_high_95_h"]
    assert t["fitted_h"] > t["ship_file_h"]  # larger volumes: a longer flush
    assert doc["trends"][0]["before_switch"] == 15 and doc["fit"]["spikes_left_out"] == 1
    assert {n["name"] for n in doc["not_fitted"]} == {"heaters", "filter"}


def _bad(tmp_path, text: str) -> str:
    p = tmp_path / "bad.csv"
    p.write_text(text, encoding="utf-8")
    return str(p)


@pytest.mark.parametrize("case, needle", [
    ("missing", "a viscosity column"),
    ("text", "a number"),
    ("naive", "with its UTC offset, or give the trend's zone with --tz"),
    ("empty", "a header line and readings"),
    ("switches", "one --switch-at per trend file"),
    ("overwrite", "not the ship file itself"),
    ("short", "too little information: the trend ends"),
    ("fit", "--fit"),
])
def test_refusals_are_one_line_exit_2_nothing_written(tmp_path, case, needle):
    ship = tmp_path / "ship.toml"
    shutil.copy(ROOT / SHIP, ship)
    before = ship.read_bytes()
    good = (ROOT / TREND).read_text(encoding="utf-8")
    trend, extra = str(ROOT / TREND), []
    if case == "missing":
        trend = _bad(tmp_path, good.replace("viscosity_cst", "visc"))
    elif case == "text":
        trend = _bad(tmp_path, good.replace(",12.973", ",n/a", 1))
    elif case == "naive":
        t, a, b = inlet_trend(load_ship(ship), end_h=0.5, gap_h=None, spike_at_h=None)
        trend = str(write_trend_csv(tmp_path / "naive.csv", t, a, b, naive=True))
    elif case == "empty":
        trend = _bad(tmp_path, "")
    elif case == "switches":
        extra = ["--switch-at", SWITCH]
    elif case == "short":
        t, a, b = inlet_trend(load_ship(ship), end_h=0.05, step_min=0.25, gap_h=None,
                              spike_at_h=None, start_h=0.0)
        trend = str(write_trend_csv(tmp_path / "short.csv", t, a, b))
    elif case == "fit":
        extra = ["--fit", "pumps"]
    png, new = tmp_path / "c.png", tmp_path / "new.toml"
    target = ship if case == "overwrite" else new
    r = run(str(ship), trend, "--switch-at", SWITCH, *extra, "--chart", str(png),
            "--write", str(target))
    assert r.returncode == 2, (case, r.stdout, r.stderr)
    assert needle in r.stderr and len(r.stderr.strip().splitlines()) == 1, r.stderr
    assert not png.exists() and not new.exists() and ship.read_bytes() == before


def test_naive_times_are_read_in_the_zone_given(tmp_path):
    ship = load_ship(ROOT / SHIP)
    t, a, b = inlet_trend(ship, end_h=1.5, gap_h=None, spike_at_h=None)
    p = write_trend_csv(tmp_path / "naive.csv", t, a, b, naive=True)
    r = run(SHIP, str(p), "--switch-at", "2027-05-30T16:00", "--tz", "+12:00", "--json")
    assert r.returncode == 0, r.stderr
    doc = json.loads(r.stdout)
    # made from the ship file itself: every fitted factor 1 within its interval
    for q in doc["parameters"]:
        assert q["low_95"] <= q["ship_value"] <= q["high_95"], q
    assert doc["trends"][0]["switch_utc"] == "2027-05-30T04:00:00Z"


def test_a_load_column_is_followed_and_checked(tmp_path):
    import numpy as np

    from planner.calibration.model import logged_schedule

    ship = load_ship(ROOT / SHIP)
    t = np.arange(0.0, 2.5, 1 / 60)
    load = np.where(t < 0.5, 85.0, 50.0)
    tt, a, b = inlet_trend(ship, end_h=2.5, start_h=0.0, gap_h=None,
                           schedule=logged_schedule(ship, "main", t, load))
    p = write_trend_csv(tmp_path / "load.csv", tt, a, b, load_pct=np.where(tt < 0.5, 85.0, 50.0))
    r = run(SHIP, str(p), "--switch-at", SWITCH, "--load-col", "load_pct", "--json")
    assert r.returncode == 0, r.stderr
    for q in json.loads(r.stdout)["parameters"]:  # made from the ship file itself
        assert q["low_95"] <= q["ship_value"] <= q["high_95"], q
    bad = tmp_path / "bad.csv"
    bad.write_text(p.read_text().replace(",50.0\n", ",150.0\n", 1), encoding="utf-8")
    r = run(SHIP, str(bad), "--switch-at", SWITCH, "--load-col", "load_pct")
    assert r.returncode == 2 and "a main engine load from 0 to 110 % MCR" in r.stderr
    assert len(r.stderr.strip().splitlines()) == 1
