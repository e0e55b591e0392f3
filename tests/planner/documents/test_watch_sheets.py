"""Watch sheets (``changeover plan VOYAGE --sheets OUT.pdf``), read back as printed.

On the sample voyage, for A4 and US Letter: one page per changeover (its number
as in ``--json``), the page size of the paper (ISO 216 A4 595 × 842 pt; US
Letter 8.5 × 11 in = 612 × 792 pt), every text at 7.5 pt or more and inside the
page, and nothing but greys when rasterised (pdftoppm): it prints in black and
white. Each page holds the boundary (UTC, ship's time, position, written out by
the independent formatters of tests/helpers/terminal.py), each circuit's valve
switch and completion at their clock times from the JSON, the expected readings
(the first reading at the switch is the old fuel's sulphur, 0.45 % m/m for the
sample's vlsfo: nothing has flushed yet), blank fields for the actual time,
position and every tank's sounding, and the signature lines.
"""

from __future__ import annotations

import json
import re
import subprocess
import sys

import pytest

from tests.helpers.cli import changeover_ok as run
from tests.helpers.paths import ROOT
from tests.helpers.terminal import moment, position

pytestmark = pytest.mark.requires_poppler
SIZES = {"a4": (595, 842), "letter": (612, 792)}
TANKS = ("vlsfo_service", "vlsfo_settling", "mgo_service", "mgo_storage")  # ship.toml




@pytest.fixture(scope="module")
def sheets(tmp_path_factory):
    out = tmp_path_factory.mktemp("sheets")
    files = {}
    for paper in SIZES:
        files[paper] = out / f"sheets_{paper}.pdf"
        run("plan", "areas_sample/voyage.toml", "--sheets", str(files[paper]), "--paper", paper)
    doc = json.loads(run("plan", "areas_sample/voyage.toml", "--json").stdout)
    return doc, files


def pages(pdf) -> list[str]:
    text = subprocess.run(["pdftotext", "-layout", str(pdf), "-"], capture_output=True,
                          text=True, check=True).stdout
    return text.rstrip("\f").split("\f")


def info(pdf) -> dict:
    out = subprocess.run(["pdfinfo", str(pdf)], capture_output=True, text=True,
                         check=True).stdout
    return dict(line.split(":", 1) for line in out.splitlines() if ":" in line)


@pytest.mark.parametrize("paper", SIZES)
def test_one_page_per_changeover_on_the_paper(sheets, paper):
    doc, files = sheets
    numbers = sorted({r["number"] for r in doc["changeovers"]})
    got = pages(files[paper])
    assert len(got) == len(numbers)
    w, h = (round(float(x)) for x in re.findall(r"[\d.]+", info(files[paper])["Page size"])[:2])
    assert (w, h) == SIZES[paper]
    for n, page in zip(numbers, got, strict=True):
        area = next(r["area"] for r in doc["changeovers"] if r["number"] == n)
        assert f"Changeover {n}: {area}" in page


@pytest.mark.parametrize("paper", SIZES)
def test_legible_inside_the_page_in_black_and_white(sheets, paper):
    _, files = sheets
    xml = subprocess.run(["pdftotext", "-bbox", str(files[paper]), "-"], capture_output=True,
                         text=True, check=True).stdout
    w, h = SIZES[paper]
    boxes = [tuple(float(x) for x in m.groups()) for m in re.finditer(
        r'xMin="([\d.]+)" yMin="([\d.]+)" xMax="([\d.]+)" yMax="([\d.]+)"', xml)]
    assert boxes
    for x0, y0, x1, y1 in boxes:
        assert y1 - y0 >= 0.92 * 7.5 - 0.05  # Helvetica's box is 0.925 em: 7.5 pt or more
        assert 20 <= x0 and x1 <= w - 20 and 20 <= y0 and y1 <= h - 20  # inside the page
    ppm = subprocess.run(["pdftoppm", "-r", "30", "-f", "1", "-l", "1", str(files[paper])],
                         capture_output=True, check=True).stdout
    parts = ppm.split(maxsplit=4)
    pw, ph = int(parts[1]), int(parts[2])
    px = parts[4][-pw * ph * 3:]
    worst = max(max(px[i:i + 3]) - min(px[i:i + 3]) for i in range(0, len(px), 3))
    assert worst <= 12  # greys only: nothing depends on colour


def _hm(iso: str) -> str:
    return moment(iso).strftime("%H:%M")


def test_each_page_has_times_positions_blanks_and_signatures(sheets):
    doc, files = sheets
    got = pages(files["a4"])
    for r in doc["changeovers"]:
        page = " ".join(got[r["number"] - 1].split())
        b = moment(r["boundary_utc"])
        assert f"{b:%Y-%m-%d %H:%M}Z UTC" in page
        assert f"ship's time {r['boundary_ship_time'][:10]} {_hm(r['boundary_ship_time'])}" in page
        assert position(r["boundary_lat"], r["boundary_lon"]) in page
        assert position(r["start_lat"], r["start_lon"]) in page
        assert f"{_hm(r['start_utc'])}Z {_hm(r['start_ship_time'])} {r['circuit']} switch" in page
        done = r["compliant_utc"] or r["complete_utc"]
        word = "compliant" if r["direction"] == "to_compliant" else "complete"
        assert f"{_hm(done)}Z" in page and f"{r['circuit']}: {word}" in page
        assert f"{r['circuit']}: valve switched" in page  # the blank line to record it
        assert "bridge: boundary crossed" in page
        for tank in TANKS:
            assert tank in page
        for role in ("Engineer on watch", "Officer of the watch", "Chief engineer"):
            assert role in page
        assert page.count("Signature, name, date") == 3


def test_first_reading_is_the_old_fuel(sheets):
    doc, files = sheets
    page = pages(files["a4"])[0]
    first = next(line for line in page.splitlines() if re.match(r"\s*\d\d:\d\dZ\s+\d\d:\d\d\s+0\.",
                                                                line))
    start = next(r for r in doc["changeovers"] if r["number"] == 1 and r["circuit"] == "main")
    assert first.split()[0] == f"{_hm(start['start_utc'])}Z"
    assert first.split()[2] == "0.450"  # vlsfo at the inlet at the switch (voyage.toml)


def test_paper_is_checked(tmp_path):
    out = tmp_path / "s.pdf"
    r = subprocess.run([sys.executable, "-m", "planner", "plan", "areas_sample/voyage.toml",
                        "--sheets", str(out), "--paper", "A3"], cwd=ROOT, capture_output=True,
                       text=True, timeout=120)
    assert r.returncode == 2 and "--paper" in r.stderr and "a4 or letter" in r.stderr
    assert len(r.stderr.strip().splitlines()) == 1 and not out.exists()
