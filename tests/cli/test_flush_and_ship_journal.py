"""``changeover flush`` end to end, and the journal found through the ship file.

Flush figures are checked against the model itself elsewhere (closed forms,
solve_ivp); here: the JSON contract (docs/json-contract.md), the load table's monotony
(higher load, shorter flush: the flow grows with consumption), and refusals.
"""

from __future__ import annotations

import json
import shutil
import subprocess
import sys

from tests.helpers.paths import ROOT


def run(*args, cwd=ROOT, env=None):
    return subprocess.run([sys.executable, "-m", "planner", *args], cwd=cwd, env=env,
                          capture_output=True, text=True, timeout=300)


def test_flush_json_contract_and_table():
    r = run("flush", "areas_sample/ship.toml", "--json", "--table", "--circuit", "main")
    assert r.returncode == 0, r.stderr
    doc = json.loads(r.stdout)
    (c,) = doc["circuits"]
    assert {"name", "from_fuel", "to_fuel", "limit_pct", "time_to_limit_h", "curve"} <= set(c)
    assert (c["name"], c["from_fuel"], c["to_fuel"]) == ("main", "vlsfo", "mgo")
    assert 0.2 < c["time_to_limit_h"] < c["time_to_target_h"] < 6.0
    t, s = zip(*c["curve"], strict=True)
    assert list(t) == sorted(t) and s[0] > c["limit_pct"] > s[-1]
    rows = doc["table"]["main"]
    assert [r["load_pct"] for r in rows] == [25.0, 50.0, 75.0, 100.0]
    times = [r["time_to_target_h"] for r in rows]
    assert times == sorted(times, reverse=True)


def test_flush_tables_and_chart(tmp_path):
    png = tmp_path / "f.png"
    r = run("flush", "areas_sample/voyage.toml", "--table", "--chart", str(png))
    assert r.returncode == 0, r.stderr
    assert "Load % MCR" in r.stdout and "To target" in r.stdout and "min)" in r.stdout
    assert png.read_bytes()[:4] == b"\x89PNG"


def test_flush_refusals(tmp_path):
    for args, needle in ((["--limit", "0"], "--limit"), (["--circuit", "nope"], "--circuit"),
                         (["--load", "150"], "--load"), (["--from", "hfo"], "--from")):
        png = tmp_path / "x.png"
        r = run("flush", "areas_sample/ship.toml", "--chart", str(png), *args)
        assert r.returncode == 2, (args, r.stderr)
        assert needle in r.stderr and len(r.stderr.strip().splitlines()) == 1
        assert not png.exists()


def test_journal_path_from_the_ship_file(tmp_path):
    ship = tmp_path / "ship.toml"
    shutil.copy(ROOT / "areas_sample" / "ship.toml", ship)
    r = run("log", "init", "--journal", str(ship), "--ship", "MV Kestrel Bay", "--imo",
            "9999993", "--tz", "+12:00", "--tank", "mgo_service", "--rank", "C/E",
            "--name", "T. Est")
    assert r.returncode == 0, r.stderr
    assert (tmp_path / "kestrel_bay_journal.sqlite").exists()
    import os

    env = {**os.environ, "CHANGEOVER_SHIP": str(ship)}
    v = run("log", "verify", env=env)
    assert v.returncode == 0 and "chain intact" in v.stdout
