"""The printed record says what happened (issue items 1-3), read back with pdftotext.

- a completion corrected in time and position only: the correction's tank soundings are
  printed (under the correction's entry number, beside the struck original), so the
  record holds valid volumes for that changeover;
- a voided start is printed struck out, never as a changeover missing its record;
- headings follow the facts: a completion after the planned entry is headed "Completed
  ... after entry"; a switch back confirmed from the plan is "at exit", not "0 min before";
- positions taken from a plan are stored as the crew writes them (0.1').
"""

from __future__ import annotations

import json
import re
import subprocess
from datetime import UTC, datetime
from pathlib import Path

import pytest

from planner.documents.record_pdf import write_record_pdf
from planner.journal import Journal
from planner.journal.book import make_book
from planner.journal.compose import Typed, changeover_entry, correction_entry
from planner.journal.entries import BACK_COMMENCED, COMPLETED, STARTED
from tests.planner.journal.test_store import new_journal

PRINTED = datetime(2027, 6, 2, 9, 15, tzinfo=UTC)
needs_poppler = pytest.mark.requires_poppler


def crew(**kw) -> Typed:
    base = dict(rank="2nd Engineer", name="T. Okafor", confirm=True)
    base.update(kw)
    return Typed(**base)


def plan_file(tmp_path: Path) -> Path:
    """A plan in the JSON contract's shape with the round-off a computed plan carries."""
    plan = {"changeovers": [
        {"number": 1, "area": "Corran Sea ECA", "circuit": "main", "direction": "to_compliant",
         "start_utc": "2027-05-30T04:47:34Z", "start_lat": -39.82381501106457,
         "start_lon": 169.23397137580224, "compliant_utc": "2027-05-30T06:20:31Z",
         "boundary_utc": "2027-05-30T07:20:31Z", "boundary_lat": -39.9,
         "boundary_lon": 170.00000000000045, "margin_h": 1.0},
        {"number": 2, "area": "Corran Sea ECA", "circuit": "main", "direction": "to_regular",
         "start_utc": "2027-05-30T17:18:14Z", "start_lat": -39.82302441869514,
         "start_lon": 62.49999999999409, "compliant_utc": None,
         "boundary_utc": "2027-05-30T17:18:14Z", "boundary_lat": -39.82302441869514,
         "boundary_lon": 62.49999999999409, "margin_h": 0.0}]}
    path = tmp_path / "plan.json"
    path.write_text(json.dumps(plan), encoding="utf-8")
    return path


def pdf_text(path: Path, layout: bool = False) -> str:
    args = ["pdftotext"] + (["-layout"] if layout else []) + [str(path), "-"]
    return subprocess.run(args, capture_output=True, text=True, check=True).stdout


def render(journal: Path, out: Path) -> tuple[str, str]:
    with Journal.open(journal) as j:
        state, report = j.state(), j.verify()
    write_record_pdf(out, make_book(state), report, journal_name=journal.name,
                     printed_at=PRINTED)
    return re.sub(r"\s+", " ", pdf_text(out)), pdf_text(out, layout=True)


@pytest.fixture()
def journal(tmp_path) -> Path:
    plan = str(plan_file(tmp_path))
    path = tmp_path / "kestrel.db"
    with new_journal(path) as j:
        j.append(changeover_entry(STARTED, crew(
            voyage="KB27-06", plan=plan, changeover=1, at="2027-05-30T04:45Z",
            pos="39°49.4'S 169°14.0'E", fuels=("MGO",), from_fuels=("VLSFO",))))       # 4
        j.append(changeover_entry(COMPLETED, crew(
            plan=plan, changeover=1, at="2027-05-30T07:32Z", pos="39 52.2 S 170 02.0 E",
            tanks=("MGO service=24.6@30", "MGO storage 3S=99.1@25"))))                   # 5
        j.append(correction_entry(5, crew(at="2027-05-30T07:08Z",
                                          pos="39 53.0 S 169 58.9 E"),
                                  "time and position read from the wrong log line"))   # 6
        j.append(changeover_entry(BACK_COMMENCED, crew(
            plan=plan, changeover=2, as_planned=True, fuels=("VLSFO",),
            tanks=("MGO service=18.1@30",))))                                           # 7
        j.append(changeover_entry(STARTED, crew(
            at="2027-05-30T21:25Z", pos="39 41.7 S 174 14.3 E", area="Corran Sea ECA",
            circuit="main", fuels=("MGO",), from_fuels=("VLSFO",))))                     # 8
        j.append(correction_entry(8, crew(), "entered in error", void=True))           # 9
    return path


@needs_poppler
def test_a_corrected_completion_prints_the_corrections_soundings(journal, tmp_path):
    flat, layout = render(journal, tmp_path / "r.pdf")
    # the correction (entry 6) changed time and position only: its soundings are the
    # original's, printed again under entry 6 (standing), with the original's struck
    rows = [ln.split() for ln in layout.splitlines()]
    assert ["6", "MGO", "service", "MGO", "0.07", "24.600"] in [r[:6] for r in rows]
    assert ["5", "MGO", "service", "MGO", "0.07", "24.600"] not in [r[:6] for r in rows]
    assert "entry 5, as corrected by entry 6" in flat
    # and its corrected time and position beside the original's
    assert "07:32Z" in flat and "07:08Z" in flat
    assert "39°52.2'S" in flat and "39°53.0'S" in flat and "169°58.9'E" in flat
    # against the planned entry at 07:20:31Z (hand calculation): the corrected 07:08Z is
    # 12 min 31 s before it, shown to the whole minute as 13; the original 07:32Z was
    # 11 min 29 s after it, shown as 11
    assert "Completed 11 min after entry" in flat and "Completed 13 min before entry" in flat


@needs_poppler
def test_a_voided_start_is_struck_not_missing(journal, tmp_path):
    flat, _ = render(journal, tmp_path / "r.pdf")
    assert "Not complete" not in flat and "not recorded" not in flat
    assert "Struck out, not a changeover" in flat
    assert "entry 8 struck out by entry 9: entered in error" in flat
    assert flat.count("Chief engineer") == 2  # signature lines for the two changeovers only
    assert "2 changeover(s)" in flat and "Changeover 3" not in flat


@needs_poppler
def test_headings_follow_what_happened(journal, tmp_path):
    flat, _ = render(journal, tmp_path / "r.pdf")
    assert "before entry" not in flat.split("Completed 11 min after entry")[0][-40:]
    assert "Completed before entry" not in flat
    # the switch back confirmed from the plan: at the exit (the plan's 17:18:14Z is written
    # as the crew writes it, 17:18Z), never "0 min before it"
    assert "Commenced at exit" in flat and "commenced at it" in flat
    assert "0 min before" not in flat
    assert "check where the ship left the area" not in flat


def test_plan_positions_and_times_are_stored_as_written(journal):
    with Journal.open(journal) as j:
        back = j.state().stored[7].entry.record
    # 62.49999999999409° -> 62°30.0' = 62.5; 39.82302441869514° = 39°49.381' -> 49.4'
    assert back.position.lon_deg == 62.5 and back.planned.boundary.lon_deg == 62.5
    assert back.position.lat_deg == -39.823333
    assert back.time_utc == datetime(2027, 5, 30, 17, 18, tzinfo=UTC)
    assert back.planned.time_utc == datetime(2027, 5, 30, 17, 18, 14, tzinfo=UTC)


@needs_poppler
def test_notes_and_reasons_of_any_length_print_across_pages(tmp_path):
    from planner.journal.compose import note_entry

    path = tmp_path / "long.db"
    words = " ".join(f"w{i:05d}" for i in range(16000))        # about 100 kB
    with new_journal(path) as j:
        n = j.append(note_entry(crew(at="2027-05-31T12:00Z", tz="+12:00"), words))
        j.append(correction_entry(n.seq, crew(), "x" * 4000 + " end of reason",
                                  text="short now"))
        j.append(changeover_entry(STARTED, crew(
            at="2027-05-31T05:35Z", pos="39 19.9 S 176 24.8 E", area="Corran Sea ECA",
            fuels=("MGO",), remarks="r" * 5000 + " end of remarks")))
    flat, _ = render(path, tmp_path / "long.pdf")
    assert "w00000" in flat and "w15999" in flat          # the whole note, first to last word
    assert "end of reason" in flat and "end of remarks" in flat
    assert int(re.search(r"page 1 of (\d+)", flat).group(1)) > 5
