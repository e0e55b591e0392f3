"""A scrubber's load range, end to end: the plan's changeover at a leg whose engine load is
outside the range reaches the map's GPX, the PDF and the journal in its own words.

The scrubber sample (areas_sample/egcs_voyage.toml, fictional) with the scrubber's
``min_load_pct`` set to 60 % MCR: the last leg at 12.0 kn is 85 × (12/14)³ = 53.5 % MCR
(the propeller law, [D]), below it, so the main circuit changes to compliant fuel before
that leg (README, "Scrubbers in the plan").
"""

from __future__ import annotations

import json
import os
import shutil
import subprocess
import sys
from pathlib import Path

import pytest

from tests.helpers.paths import ROOT


def run(cwd: Path, *args: str, env: dict | None = None) -> subprocess.CompletedProcess:
    return subprocess.run([sys.executable, "-m", "planner", *args], cwd=cwd, env=env,
                          capture_output=True, text=True, timeout=300)


@pytest.fixture(scope="module")
def sample(tmp_path_factory) -> Path:
    d = tmp_path_factory.mktemp("load_range")
    shutil.copytree(ROOT / "areas_sample", d, dirs_exist_ok=True)
    ship = d / "ship_egcs.toml"
    text = ship.read_text(encoding="utf-8")
    assert "min_load_pct = 0.0" in text
    ship.write_text(text.replace("min_load_pct = 0.0", "min_load_pct = 60.0"), encoding="utf-8")
    r = run(d, "plan", "egcs_voyage.toml", "--json")
    assert r.returncode == 0, r.stderr
    (d / "plan.json").write_text(r.stdout, encoding="utf-8")
    return d


def _load_changeover(d: Path) -> dict:
    doc = json.loads((d / "plan.json").read_text(encoding="utf-8"))
    [c] = [c for c in doc["changeovers"] if c["boundary_event"] == "load_out_of_range"]
    return c


def test_the_plan_changes_over_before_the_slow_leg(sample: Path):
    c = _load_changeover(sample)
    assert c["circuit"] == "main" and c["direction"] == "to_compliant"
    assert c["boundary_nm"] == pytest.approx(1030.8, abs=0.05)  # where the 12 kn leg begins


def test_the_gpx_and_the_pdf_say_what_the_boundary_is(sample: Path):
    r = run(sample, "plan", "egcs_voyage.toml", "--gpx", "r.gpx", "--pdf", "p.pdf")
    assert r.returncode == 0, r.stderr
    gpx = (sample / "r.gpx").read_text(encoding="utf-8")
    assert "load out of scrubber range global cap" in gpx
    assert "enter global cap" not in gpx
    if shutil.which("pdftotext") is None:
        pytest.skip("pdftotext (poppler-utils) not installed")
    text = subprocess.run(["pdftotext", "-layout", str(sample / "p.pdf"), "-"],
                          capture_output=True, text=True, check=True).stdout
    flat = " ".join(text.split())
    assert "a leg on which a served engine's load is outside the scrubber's load range" in flat
    assert "Leg begins 2027-06-01 19:37Z" in flat
    assert "global cap, enter" not in flat


def test_the_journal_takes_the_changeover_from_the_plan(sample: Path):
    env = dict(os.environ, CHANGEOVER_JOURNAL=str(sample / "j.jsonl"),
               CHANGEOVER_RANK="Chief Engineer", CHANGEOVER_NAME="A. Test")
    r = run(sample, "log", "init", "--ship-file", "ship_egcs.toml", "--tz", "+12:00", env=env)
    assert r.returncode == 0, r.stderr
    n = str(_load_changeover(sample)["number"])
    r = run(sample, "log", "start", "--voyage", "T1", "--from-plan", "plan.json",
            "--changeover", n, "--circuit", "main", "--as-planned", "--fuel", "vlsfo",
            "--from-fuel", "hsfo", "--confirm", env=env)
    assert r.returncode == 0, r.stderr
    assert ("planned start of a leg with a served engine's load outside the scrubber's load "
            "range 2027-06-01 19:37Z") in r.stdout
    assert "entering" not in r.stdout
