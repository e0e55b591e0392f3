"""The written changeover procedure printed and run: the PDF and ``changeover procedure``.

- the PDF read back with pdftotext holds every section and figure the
  procedure must show ([MARPOL-VI] reg. 14.6; skipped without poppler-utils);
- ``changeover procedure`` end to end; a bad ship file is one stderr line,
  exit 2 and no PDF.

The ship is :mod:`tests.planner.procedure.petrel` (fictional; fixtures in conftest.py).
"""

from __future__ import annotations

import json
import math
import shutil
import subprocess
import sys
from datetime import UTC, datetime
from pathlib import Path

import pytest

from planner.documents.procedure_pdf import SECTIONS, write_procedure_pdf
from tests.helpers.paths import ROOT
from tests.planner.procedure.petrel import SHIP

SAMPLE = ROOT / "areas_sample"
PRINTED = datetime(2027, 5, 28, 8, 30, tzinfo=UTC)
needs_poppler = pytest.mark.requires_poppler

# The [inlet] table of the test ship (petrel.SHIP) as the PDF prints it
INLET_PRINTED = {
    "target_cst": "14 cSt",
    "min_cst": "2.5 cSt",
    "max_cst": "18 cSt",
    "max_rate_c_per_min": "1.5 °C/min",
    "supply_temperature_c": "38 °C",
    "max_temperature_c": "150 °C",
}


@pytest.fixture(scope="module")
def pdf_text(facts, tmp_path_factory) -> str:
    if not shutil.which("pdftotext"):
        pytest.skip("poppler-utils (pdftotext) not installed")
    out = tmp_path_factory.mktemp("pdf") / "procedure.pdf"
    write_procedure_pdf(out, facts, revision="3", sources=[("petrel.toml", "ab" * 32)],
                        printed_at=PRINTED)
    assert out.read_bytes().startswith(b"%PDF")
    text = subprocess.run(["pdftotext", str(out), "-"], capture_output=True, text=True,
                          check=True).stdout
    return " ".join(text.split())


def hm(h: float) -> str:
    m = round(h * 60)
    return f"{m // 60}:{m % 60:02d}"


@needs_poppler
def test_pdf_has_every_section_in_order(pdf_text):
    at = [pdf_text.find(f"{i}. {s}") for i, s in enumerate(SECTIONS, 1)]
    assert all(x >= 0 for x in at), [s for s, x in zip(SECTIONS, at, strict=True) if x < 0]
    assert at == sorted(at)
    for s in ("Before starting", "Temperature and viscosity", "Moving the valves", "Monitoring",
              "Completion and recording", "The fuel system", "How long a changeover takes",
              "Each consumer's inlet limits", "Approval and revisions"):
        assert s in SECTIONS


@needs_poppler
def test_pdf_has_the_checks_and_the_record_items(pdf_text):
    t = pdf_text
    for phrase in ("Compatibility:", "Soundings: sound mgo_service and mgo_storage",
                   "Heaters and cooler for the", "Alarms:", "Manning:", "Position and time:",
                   "clear of confined or congested waters", "regulation 14.6",
                   "the date and time (UTC and ship's time)", "position (latitude and longitude)",
                   "the volume of compliant fuel in each tank", "changeover log complete",
                   "commenced", "changeover log back"):
        assert phrase in t, phrase


@needs_poppler
def test_pdf_has_the_cautions(pdf_text):
    for phrase in ("advisory", "engine and boiler makers' instructions",
                   "safety management system come first", "loss of propulsion or power",
                   "confined or congested waters", "keep the engine room manned",
                   "check that the fuels are compatible", "MARPOL Annex VI and national law",
                   "This ship is fictional"):
        assert phrase.lower() in pdf_text.lower(), phrase


@needs_poppler
def test_pdf_has_the_ships_figures(pdf_text, facts):
    t = pdf_text
    assert "MV Test Petrel" in t and "9999993" in t and "page 1 of" in t
    for tank in facts.tanks:
        assert tank.name in t and f"{tank.capacity_m3:.1f}" in t
    for c in facts.circuits:
        assert f"Circuit {c.name}" in t
        for v in c.volumes:
            assert v.name in t and f"{v.volume_m3:.3f}" in t
        assert f"{c.total_m3:.3f}" in t
        for r in c.rows:
            assert hm(r.time_to_limit_h) in t and hm(r.time_to_target_h) in t
            assert hm(r.start_before_h) in t
    assert "30 m × 40 mm bore" in t
    # the engine's limits from [inlet]
    for key, s in INLET_PRINTED.items():
        assert s in t, (key, s)
    # the load table and the sulphur figures
    assert "85 (ref.)" in t and "0.10 % m/m" in t and "0.090 %" in t
    assert "Points for the chief engineer" in t


@needs_poppler
def test_pdf_has_the_signature_and_revision_lines(pdf_text):
    t = pdf_text
    assert "Prepared by the chief engineer" in t and "Approved by the master" in t
    assert t.count("Signature") >= 2 and t.count("Date") >= 2
    assert "3, printed 2027-05-28 08:30" in t
    assert "revision 3" in t and "petrel.toml (SHA-256 abababababab)" in t


def run(*args: str, cwd: Path = ROOT) -> subprocess.CompletedProcess:
    return subprocess.run([sys.executable, "-m", "planner", "procedure", *args], cwd=cwd,
                          capture_output=True, text=True, timeout=300)


def test_command_writes_the_pdf(ship_file, tmp_path):
    out = tmp_path / "proc" / "procedure.pdf"
    r = run(str(ship_file), "--pdf", str(out), "--revision", "2")
    assert r.returncode == 0, r.stderr
    assert out.read_bytes().startswith(b"%PDF")
    assert f"wrote {out}" in r.stdout and "revision 2" in r.stdout
    assert [p.name for p in out.parent.iterdir()] == ["procedure.pdf"]   # no temporary left


def test_command_json_and_voyage_file(ship_file, tmp_path):
    voyage = tmp_path / "voyage.toml"
    voyage.write_text(f"""
[voyage]
name = "TP 1"
ship = "{ship_file.as_posix()}"
route = "{(SAMPLE / 'aldmere_to_skarvik.csv').as_posix()}"
areas = ["{(SAMPLE / 'corran_sea.geojson').as_posix()}"]
depart = "2027-05-30T06:00+12:00"

[[fuel]]
name = "mgo"
grade = "DMA"
sulphur_pct = 0.05
density_kg_m3 = 850.0
viscosity_cst = 3.5
viscosity_ref_c = 40.0

[tank.mgo_service]
fuel = "mgo"
volume_m3 = 12.0
temperature_c = 35.0

[margins]
time_before_boundary_h = 2.0
sulphur_target_fraction = 0.8
""", encoding="utf-8")
    r = run(str(voyage), "--json")
    assert r.returncode == 0, r.stderr
    doc = json.loads(r.stdout)
    assert doc["voyage"] == "TP 1" and doc["margin_h"] == 2.0
    assert math.isclose(doc["target_pct"], 0.08)
    mgo = next(f for f in doc["fuels"] if f["name"] == "mgo")
    assert mgo["sulphur_pct"] == 0.05
    tank = next(t for t in doc["tanks"] if t["name"] == "mgo_service")
    assert 11.5 < tank["volume_m3"] < 12.0          # 12.0 m³ at 35 °C, corrected to 15 °C
    assert [s["file"] for s in doc["sources"]] == ["voyage.toml", "petrel.toml"]


BAD = {
    "toml": "[ship\nname = 'x'\n",
    "value": SHIP.replace('volume_m3 = 0.5', 'volume_m3 = -0.5'),
    "reference": SHIP.replace('tanks = ["vlsfo_service", "mgo_service"]\nconsumers = ["dg3"]',
                              'tanks = ["vlsfo_service", "hfo_day"]\nconsumers = ["dg3"]'),
}


@pytest.mark.parametrize("fault", sorted(BAD))
def test_bad_ship_file_exit_2_one_line_nothing_written(fault, tmp_path):
    ship = tmp_path / "bad.toml"
    ship.write_text(BAD[fault], encoding="utf-8")
    out = tmp_path / "procedure.pdf"
    r = run(str(ship), "--pdf", str(out))
    assert r.returncode == 2, (r.stdout, r.stderr)
    lines = r.stderr.strip().splitlines()
    assert len(lines) == 1 and "bad.toml" in lines[0], r.stderr
    assert not out.exists() and list(tmp_path.iterdir()) == [ship]


@pytest.mark.parametrize("args", [["--limit", "0"], ["--target-pct", "0.2"], []])
def test_bad_options_exit_2(args, ship_file, tmp_path):
    out = tmp_path / "procedure.pdf"
    r = run(str(ship_file), *([] if not args else ["--pdf", str(out)]), *args)
    assert r.returncode == 2 and len(r.stderr.strip().splitlines()) == 1, r.stderr
    assert not out.exists()


def test_missing_ship_file(tmp_path):
    out = tmp_path / "p.pdf"
    r = run(str(tmp_path / "nope.toml"), "--pdf", str(out))
    assert r.returncode == 2 and len(r.stderr.strip().splitlines()) == 1
    assert not out.exists()
