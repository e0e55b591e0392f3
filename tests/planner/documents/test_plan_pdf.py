"""The signed voyage plan (``changeover plan VOYAGE --pdf``), read back with pdftotext.

End to end on the sample scenario: the PDF names the ship and IMO number,
every changeover's start time and position as the JSON gives them, every
warning, the cautions, the master's and chief engineer's signature lines and
"page N of M", in one to four pages (the map and the sulphur chart on one).
Then :func:`write_plan_pdf` on small hand-made documents (no warnings; a long
list of warnings; uncertainty; characters the standard fonts lack), so a layout
failure shows up locally.
"""

from __future__ import annotations

import copy
import json
import shutil
import subprocess
import sys
from datetime import UTC, datetime
from pathlib import Path

import pytest

from geo.position import format_lat, format_lon
from tests.helpers.paths import ROOT

VOYAGE = "areas_sample/voyage.toml"

needs_poppler = pytest.mark.requires_poppler


def pdf_text(path: Path) -> str:
    r = subprocess.run(["pdftotext", str(path), "-"], capture_output=True, text=True,
                       timeout=60, check=True)
    return r.stdout


def flat(text: str) -> str:
    """All whitespace (line ends inside table cells and paragraphs) as single spaces."""
    return " ".join(text.split())


def page_count(path: Path, text: str) -> int:
    if shutil.which("pdfinfo"):
        r = subprocess.run(["pdfinfo", str(path)], capture_output=True, text=True, timeout=60,
                           check=True)
        for line in r.stdout.splitlines():
            if line.startswith("Pages:"):
                return int(line.split()[1])
    return text.rstrip("\f").count("\f") + 1


def hhmm(iso: str) -> str:
    return iso[11:16]


@pytest.fixture(scope="module")
def sample(tmp_path_factory) -> tuple[dict, Path, str]:
    """The sample voyage's JSON document and its PDF (two runs side by side)."""
    out = tmp_path_factory.mktemp("plan_pdf") / "plan.pdf"
    base = [sys.executable, "-m", "planner", "plan", VOYAGE]
    with subprocess.Popen(base + ["--pdf", str(out)], cwd=ROOT, stdout=subprocess.PIPE,
                          stderr=subprocess.PIPE, text=True) as pdf_run, \
         subprocess.Popen(base + ["--json"], cwd=ROOT, stdout=subprocess.PIPE,
                          stderr=subprocess.PIPE, text=True) as json_run:
        pdf_out, pdf_err = pdf_run.communicate(timeout=300)
        json_out, json_err = json_run.communicate(timeout=300)
    assert pdf_run.returncode == 0, pdf_err
    assert json_run.returncode == 0, json_err
    assert f"wrote {out}" in pdf_out
    return json.loads(json_out), out, pdf_text(out) if shutil.which("pdftotext") else ""


@needs_poppler
def test_sample_plan_names_ship_voyage_and_signatures(sample):
    doc, path, text = sample
    t = flat(text)
    v = doc["voyage"]
    assert v["ship"] in t and v["imo"] in t
    assert v["name"] in t
    assert f"{v['distance_nm']:,.1f} nm" in t
    assert "Master" in t and "Chief engineer" in t
    for label in ("Signature", "Name", "Date"):
        assert t.count(label) >= 2
    assert "page 1 of" in t
    assert 1 <= page_count(path, text) <= 4  # with the map and the chart on a page


@needs_poppler
def test_sample_plan_shows_every_changeover_start(sample):
    doc, _, text = sample
    t = flat(text)
    assert doc["changeovers"], "the sample voyage crosses control areas"
    for r in doc["changeovers"]:
        assert r["area"] in t
        # start UTC as date and time, the ship's time with its offset, the position
        assert r["start_utc"][:10] in t
        assert f"{hhmm(r['start_utc'])}Z" in t
        ship = r["start_ship_time"]
        assert f"{hhmm(ship)} ({ship[16:]})" in t
        assert format_lat(r["start_lat"]) in t and format_lon(r["start_lon"]) in t
        assert format_lat(r["boundary_lat"]) in t and format_lon(r["boundary_lon"]) in t
    # each boundary is printed once, with its circuits beneath it
    for n in {r["number"] for r in doc["changeovers"]}:
        rows = [r for r in doc["changeovers"] if r["number"] == n]
        line = f"Boundary {rows[0]['boundary_utc'][:10]} {hhmm(rows[0]['boundary_utc'])}Z"
        assert t.count(line) == 1


@needs_poppler
def test_sample_plan_warnings_cautions_fuel_and_so2(sample):
    doc, _, text = sample
    t = flat(text)
    assert doc["warnings"], "the sample voyage has warnings to print"
    for w in doc["warnings"]:
        assert " ".join(w.split()[:6]) in t
    for c in doc["cautions"]:
        assert flat(c) in t
    for fuel, x in doc["fuel_totals"].items():
        assert fuel in t
        assert f"{x['needed_t']:,.1f}" in t and f"{x['on_board_t']:,.1f}" in t
        assert f"{x['needed_m3_15c']:,.1f}" in t
    for area, x in doc["so2"]["areas"].items():
        assert area in t
        assert f"{x['so2_kg']:,.0f}" in t and f"{x['so2_on_regular_kg']:,.0f}" in t
    for n in doc["notes"]:
        assert " ".join(n.split()[:6]) in t
    assert "→" not in t and "₂" not in t


# ---------------------------------------------------------------- hand-made documents

SMALL = {
    "voyage": {"name": "Test run A - B", "file": "voyage.toml", "ship": "MV Test Hand",
               "imo": "9000001", "route": "a_to_b", "distance_nm": 300.0,
               "depart_utc": "2027-06-01T00:00:00Z", "arrive_utc": "2027-06-02T06:00:00Z",
               "ship_utc_offset": "+02:00", "time_margin_h": 1.0,
               "sulphur_target_fraction": 0.9},
    "changeovers": [
        {"number": 1, "area": "Test ECA", "circuit": "main", "direction": "to_compliant",
         "from_fuel": "vlsfo", "to_fuel": "mgo", "limit_pct": 0.1, "target_pct": 0.09,
         "start_utc": "2027-06-01T08:12:40Z", "start_ship_time": "2027-06-01T10:12+02:00",
         "start_lat": 54.5, "start_lon": -3.25, "compliant_utc": "2027-06-01T10:00:00Z",
         "compliant_lat": 54.5, "compliant_lon": -3.0,
         "boundary_utc": "2027-06-01T11:00:00Z", "boundary_lat": 54.5,
         "boundary_lon": -2.75, "boundary_nm": 120.0, "margin_h": 1.0, "duration_h": 1.79},
        {"number": 2, "area": "Test ECA", "circuit": "main", "direction": "to_regular",
         "from_fuel": "mgo", "to_fuel": "vlsfo", "limit_pct": 0.1,
         "start_utc": "2027-06-01T20:00:00Z", "start_ship_time": "2027-06-01T22:00+02:00",
         "start_lat": 54.5, "start_lon": -1.0, "compliant_utc": None,
         "complete_utc": "2027-06-01T21:30:00Z", "complete_lat": 54.5, "complete_lon": -0.8,
         "boundary_utc": "2027-06-01T20:00:00Z", "boundary_lat": 54.5, "boundary_lon": -1.0,
         "margin_h": 0.0, "duration_h": 1.5},
    ],
    "compliant_fuel_needed_t": 12.0,
    "compliant_fuel_on_board_t": 40.0,
    "warnings": [],
    "cautions": ["Advisory only: test caution."],
}


def _write(tmp_path: Path, doc: dict, name: str = "p.pdf") -> tuple[Path, str]:
    from planner.documents.plan_pdf import write_plan_pdf

    out = tmp_path / name
    write_plan_pdf(out, doc, printed_at=datetime(2027, 5, 1, 12, 0, tzinfo=UTC))
    assert out.is_file() and out.read_bytes()[:5] == b"%PDF-"
    assert [p.name for p in tmp_path.iterdir()] == [out.name]  # no temporary file left
    return out, (pdf_text(out) if shutil.which("pdftotext") else "")


@needs_poppler
def test_small_document_without_warnings(tmp_path):
    out, text = _write(tmp_path, SMALL)
    t = flat(text)
    assert "MV Test Hand" in t and "9000001" in t
    assert "Warnings: none." in t
    assert "08:12Z" in t and "10:12 (+02:00)" in t
    assert f"{format_lat(54.5)}" in t and format_lon(-3.25) in t
    assert "Advisory only: test caution." in t
    assert "printed 2027-05-01 12:00Z" in t
    assert "page 1 of 1" in t
    assert "Confidence" not in t and "Monte Carlo" not in t


@needs_poppler
def test_long_warning_list_flows_over_pages(tmp_path):
    doc = copy.deepcopy(SMALL)
    doc["warnings"] = [f"Warning number {i}: the changeover to mgo for Test ECA would be "
                       "under way inside a caution zone; start earlier or later to clear it, "
                       "and check the viscosity window at the engine inlet." * 2
                       for i in range(1, 61)]
    out, text = _write(tmp_path, doc)
    t = flat(text)
    assert "Warnings (60)" in t
    for i in (1, 30, 60):
        assert f"{i}. Warning number {i}:" in t
    pages = page_count(out, text)
    assert pages >= 2
    assert f"page {pages} of {pages}" in t
    assert "Chief engineer" in t


@needs_poppler
def test_uncertainty_shortage_and_characters_outside_latin1(tmp_path):
    doc = copy.deepcopy(SMALL)
    doc["uncertainty"] = {"confidence": 0.99, "samples": 2000, "seed": 7,
                          "main_driver": "consumption"}
    doc["changeovers"][0].update({
        "start_p50_utc": "2027-06-01T08:13:00Z", "start_confidence_utc": "2027-06-01T07:58:00Z",
        "lead_p50_h": 1.78, "lead_confidence_h": 2.03, "confidence_basis": "target",
        "extra_compliant_t": 0.41, "main_driver": "consumption"})
    doc["compliant_fuel_on_board_t"] = 10.0
    doc["fuel_totals"] = {"vlsfo": {"needed_t": 20.0, "on_board_t": 50.0,
                                    "needed_m3_15c": 20.5},
                          "mgo": {"needed_t": 12.0, "on_board_t": 10.0, "needed_m3_15c": 14.1}}
    doc["regular_fuel"] = "vlsfo"
    doc["warnings"] = ["Fuel vlsfo → mgo: SO₂ limit ≤ 0.10 % is tight."]
    doc["changeovers"][0]["before_departure"] = True
    doc["changeovers"][0]["start_lat"] = None
    doc["changeovers"][0]["start_lon"] = None
    _, text = _write(tmp_path, doc)
    t = flat(text)
    assert "Confidence 99 %" in t and "2,000 Monte Carlo samples, seed 7" in t
    assert "Main driver consumption" in t
    assert "Changeover starts at 99 % confidence" in t
    assert "2027-06-01 07:58Z" in t and "2.03" in t and "0.41" in t
    assert "short by 2.0 t" in t and "short 2.0" in t
    assert "vlsfo to mgo: SO2 limit <= 0.10 % is tight." in t
    assert "before departure" in t


def test_no_changeovers_and_minimal_keys(tmp_path):
    from planner.documents.plan_pdf import write_plan_pdf

    doc = {"voyage": {"ship": "MV Empty", "imo": "9000002", "name": "Coastal"},
           "changeovers": [], "compliant_fuel_needed_t": 0.0, "compliant_fuel_on_board_t": 0.0,
           "warnings": [], "cautions": []}
    out = tmp_path / "empty.pdf"
    write_plan_pdf(out, doc)
    assert out.read_bytes()[:5] == b"%PDF-"
    if shutil.which("pdftotext"):
        assert "No changeover is needed" in flat(pdf_text(out))


# (text, as printed): ° · — ³ are in the Windows-1252 code page, → ₂ ≥ are not and get
# the planner's stand-ins (plan_pdf_cells._PLAIN)
PLAIN_CASES = (
    ("39°49.4'S · 15 °C — m³", "39°49.4'S · 15 °C — m³"),
    ("vlsfo → mgo", "vlsfo to mgo"),
    ("SO₂ ≥ 1", "SO2 >= 1"),
)


@pytest.mark.parametrize("text,printed", PLAIN_CASES)
def test_plain_keeps_windows_1252_and_replaces_the_rest(text, printed):
    from planner.documents.plan_pdf_cells import plain

    assert plain(text) == printed


def test_plain_always_fits_the_fonts():
    from planner.documents.plan_pdf_cells import plain

    plain("any ☃ snowman").encode("cp1252")
