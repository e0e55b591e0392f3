"""The printed record read back with poppler (pdftotext, pdftoppm): every required field there.

Regulation 14.6 items per changeover (date, time UTC and ship's time, position, volume of
compliant fuel in each tank, area, fuel and its sulphur), planned against actual,
corrections beside the struck original, signature lines, page numbers, printed time and the
journal's last hash. Skipped when poppler-utils is not installed.
"""

from __future__ import annotations

import re
import shutil
import sqlite3
import subprocess
from datetime import UTC, datetime
from pathlib import Path

import pytest

from planner.documents.record_pdf import write_record_pdf
from planner.journal import Journal
from planner.journal.book import make_book
from planner.journal.compose import (
    Typed,
    changeover_entry,
    correction_entry,
    note_entry,
    sample_entry,
    tanks_entry,
)
from planner.journal.entries import BACK_COMMENCED, BACK_COMPLETED, COMPLETED, STARTED
from tests.helpers.paths import DATA
from tests.planner.journal.test_store import new_journal

PLAN = str(DATA / "journal" / "plan_sample.json")
PRINTED = datetime(2027, 6, 2, 9, 15, tzinfo=UTC)
needs_poppler = pytest.mark.requires_poppler


def crew(**kw) -> Typed:
    base = dict(rank="2nd Engineer", name="T. Okafor", confirm=True)
    base.update(kw)
    return Typed(**base)


@pytest.fixture(scope="module")
def journal(tmp_path_factory) -> Path:
    path = tmp_path_factory.mktemp("pdf") / "aurora.db"
    with new_journal(path, ("MGO service", "MGO settling", "MGO storage 3S")) as j:
        j.append(changeover_entry(STARTED, crew(
            voyage="V27-05", plan=PLAN, changeover=1, at="2027-05-31T05:35Z",
            pos="39°19.9'S 176°24.8'E", fuels=("MGO",), from_fuels=("VLSFO",))))       # 4
        j.append(changeover_entry(COMPLETED, crew(
            plan=PLAN, changeover=1, at="2027-05-31T10:05Z", pos="39°11.6'S 178°00.4'E",
            tanks=("MGO service=24.6@38", "MGO settling=31.2@30",
                   "MGO storage 3S=92.7@22"))))                                         # 5
        j.append(correction_entry(5, crew(tanks=(
            "MGO service=24.6@38", "MGO settling=13.2@30", "MGO storage 3S=92.7@22")),
            "settling tank sounding misread"))                                          # 6
        j.append(sample_entry(crew(at="2027-05-31T10:30Z", fuels=("MGO",)), "MR-0531-1",
                              "A 448812", "ME inlet"))                                  # 7
        j.append(changeover_entry(BACK_COMMENCED, crew(
            plan=PLAN, changeover=2, as_planned=True, fuels=("VLSFO",),
            tanks=("MGO service=18.1@37", "MGO storage 3S=70.3@22"))))                   # 8
        j.append(changeover_entry(BACK_COMPLETED, crew(
            at="2027-06-01T11:40Z", pos="38°51.8'S 175°08.2'W", fuels=("VLSFO",))))      # 9
        j.append(changeover_entry(STARTED, crew(plan=PLAN, changeover=3, as_planned=True,
                                                fuels=("MGO",), from_fuels=("VLSFO",))))  # 10
        j.append(changeover_entry(COMPLETED, crew(
            plan=PLAN, changeover=3, at="2027-06-01T23:50Z", pos="38°43.6'S 170°58.0'W",
            tanks=("MGO service=23.9@38", "MGO storage 3S=48.8@22"))))                   # 11
        j.append(note_entry(crew(at="2027-06-01T12:00Z"), "wrong journal"))              # 12
        j.append(correction_entry(12, crew(), "entered in the wrong journal", void=True))
        j.append(tanks_entry(crew(at="2027-06-02T08:00Z", fuels=("MGO",),
                                  tanks=("MGO storage 3S=47.1@21",))))                   # 14
    return path


def render(journal: Path, out: Path, voyage: str | None = "V27-05") -> tuple[str, str]:
    with Journal.open(journal) as j:
        state, report = j.state(), j.verify()
    write_record_pdf(out, make_book(state, voyage=voyage), report, journal_name=journal.name,
                     printed_at=PRINTED)
    text = subprocess.run(["pdftotext", str(out), "-"], capture_output=True,
                          text=True, check=True).stdout
    return text, report.last_hash


@needs_poppler
def test_record_holds_every_required_field(journal, tmp_path):
    text, last = render(journal, tmp_path / "record.pdf")
    flat = re.sub(r"\s+", " ", text)
    for needle in (
        "Fuel changeover record", "MV Aurora Tern", "IMO number", "1234567",
        "voyage V27-05", last, "intact: all 14 entries match their hashes",
        "2027-06-02 09:15Z (UTC)",
        # changeover 1: to compliant fuel, completed before entry (corrected)
        "Changeover 1: to compliant fuel before entering Meridian Reach ECA",
        "Changeover started", "Completed 1 h 42 min before entry", "2027-05-31", "05:35Z", "10:05Z",
        "2027-05-31 17:35", "2027-05-31 22:05", "UTC+12:00", "39°19.9'S", "176°24.8'E",
        "39°11.6'S", "178°00.4'E",
        "Compliant fuel: MGO (DMA), 0.07 % m/m S, BDN ALD-0528-01",
        "Changed from: VLSFO (RMG 380), 0.48 % m/m S, BDN ALD-0528-02",
        "Correction of 5: settling tank sounding misread",
        "MGO settling", "31.200", "13.200", "24.600", "92.700",
        # [TABLE-54B] fuel-oil band, MGO 848.5 kg/m³ [D]: VCF 0.9807 at 38 °C (0.9875 at
        # 30 °C, 0.9942 at 22 °C), so 24.6·0.9807 + 13.2·0.9875 + 92.7·0.9942 = 129.320 m³
        "0.9807", "129.320",
        "plan_sample.json #1", "2027-05-31 10:20Z", "actual -15 min",
        "Planned boundary entry 2027-05-31 11:46Z at 39°09.1'S 178°30.0'E: completed "
        "1 h 42 min before it (the plan's margin 1.44 h)",
        # changeover 2: back to regular fuel, commenced after exit
        "Changeover 2: back to regular fuel after leaving Meridian Reach ECA",
        "Commenced 16 min after exit", "06:30Z", "2027-06-01 18:30", "38°53.4'S", "175°56.3'W",
        "time & position confirmed from plan", "Changed back to: VLSFO",
        "Compliant fuel left in the tanks: MGO", "18.100", "70.300",
        # changeover 3: completed after the planned boundary: flagged
        "Changeover 3: to compliant fuel before entering Skarvik Basin ECA",
        # 23:50Z against the planned 23:33:19Z: 16.7 min, shown to the minute as 17
        "Completed 17 min after entry", "Check this changeover",
        "completed 17 min after entry (2027-06-01 23:33Z planned)",
        # other entries, the strike-out, signatures, page numbers
        "Tank soundings, samples and notes", "sample MR-0531-1, seal A 448812, drawn at ME inlet",
        "struck out: entered in the wrong journal", "47.100",
        "Chief engineer", "Master", "Signature", "Name", "Date",
        "page 1 of", "changeover log verify --journal aurora.db --hash",
    ):
        assert needle in flat, needle
    pages = int(re.search(r"page 1 of (\d+)", flat).group(1))
    assert all(f"page {n} of {pages}" in flat for n in range(1, pages + 1))
    assert flat.count("Chief engineer") == 3  # one signature block per changeover


@needs_poppler
def test_record_renders_to_images(journal, tmp_path):
    pdf = tmp_path / "record.pdf"
    text, _ = render(journal, pdf)
    pages = int(re.search(r"page 1 of (\d+)", text).group(1))
    subprocess.run(["pdftoppm", "-r", "40", "-png", str(pdf), str(tmp_path / "p")], check=True)
    pngs = sorted(tmp_path.glob("p-*.png"))
    assert len(pngs) == pages
    assert all(p.read_bytes().startswith(b"\x89PNG") and p.stat().st_size > 2000 for p in pngs)


@needs_poppler
def test_period_selection_and_a_failed_chain_is_printed_loudly(journal, tmp_path):
    copy = tmp_path / "tampered.db"
    shutil.copy(journal, copy)
    conn = sqlite3.connect(copy)
    conn.executescript("DROP TRIGGER entries_never_updated;")
    conn.execute("UPDATE entries SET body = json_set(body, '$.record.position.lat_deg', -38.5) "
                 "WHERE seq = 11")
    conn.commit()
    conn.close()
    with Journal.open(copy) as j:
        state, report = j.state(), j.verify()
    book = make_book(state, since=datetime(2027, 6, 1).date(), until=datetime(2027, 6, 1).date())
    out = tmp_path / "period.pdf"
    write_record_pdf(out, book, report, journal_name=copy.name, printed_at=PRINTED)
    flat = re.sub(r"\s+", " ", subprocess.run(["pdftotext", str(out), "-"], capture_output=True,
                                              text=True, check=True).stdout)
    assert "2027-06-01 to 2027-06-01 (UTC dates)" in flat
    assert "This journal failed its chain check when printed" in flat
    assert "entry 11: its content does not match its hash" in flat
    assert "Meridian Reach ECA" in flat and "Skarvik Basin ECA" in flat
    assert "Changeover started" in flat and "MR-0531-1" not in flat  # 31 May left out
