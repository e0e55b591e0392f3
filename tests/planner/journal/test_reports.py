"""Documents made, kept in the journal (``report`` entries): stored, read back, verified,
corrected, refused. The expected SHA-256 is computed here with hashlib (FIPS 180-4 as
Python implements it), independently of the program."""

from __future__ import annotations

import hashlib
import sqlite3
from datetime import UTC, datetime, timedelta, timezone
from pathlib import Path

import pytest

from geo.errors import InputError
from planner.journal import Journal
from planner.journal.compose import Typed, correction_entry
from planner.journal.compose_setup import setup_entry
from planner.journal.details_kinds import ReportDetails
from planner.journal.entries import REPORT, Person
from planner.journal.reports import record_document

CE = Typed(rank="Chief Engineer", name="R. Halvorsen", tz="+12:00", confirm=True)
PDF = b"%PDF-1.4\n% a fictional report for the tests\n" + bytes(range(256)) * 4
MADE = datetime(2027, 6, 2, 16, 5, tzinfo=timezone(timedelta(hours=2)))


@pytest.fixture()
def journal(tmp_path) -> Path:
    path = tmp_path / "ship.db"
    Journal.create(path, setup_entry(CE, "MV Aurora Tern", "1234567", ())).close()
    return path


@pytest.fixture()
def doc(tmp_path) -> Path:
    p = tmp_path / "NAR V27-05.pdf"
    p.write_bytes(PDF)
    return p


def test_record_document_stores_the_entry_and_the_bytes(journal, doc):
    n = record_document(journal, doc, "nonavailability", "Fuel oil non-availability report",
                        MADE, "T. Okafor", "sent to the flag state", rank="2nd Engineer",
                        voyage="V27-05")
    assert n == 2
    with Journal.open_read(journal) as j:
        st = j.state()
        e = st.stored[2].entry
        assert e.kind == REPORT and e.who == Person("2nd Engineer", "T. Okafor")
        d = e.record.details
        assert isinstance(d, ReportDetails)
        assert (d.title, d.report_kind, d.file_name, d.size_bytes, d.remarks) == (
            "Fuel oil non-availability report", "nonavailability", "NAR V27-05.pdf",
            len(PDF), "sent to the flag state")
        assert d.sha256 == hashlib.sha256(PDF).hexdigest()
        # 16:05 at +02:00 is 14:05 UTC; the offset is kept as the ship's time
        assert e.record.time_utc == datetime(2027, 6, 2, 14, 5, tzinfo=UTC)
        assert e.record.ship_offset_min == 120 and e.record.voyage == "V27-05"
        assert j.attachment(d.sha256) == PDF
        assert j.verify().ok


def test_a_person_may_be_given_whole_and_utc_keeps_the_last_offset(journal, doc):
    n = record_document(journal, doc, "nonavailability", "NAR", MADE.astimezone(UTC),
                        Person("Master", "A. Brandt"))
    with Journal.open_read(journal) as j:
        r = j.state().stored[n].entry.record
    assert r.ship_offset_min == 12 * 60       # the set-up's +12:00


def test_altered_bytes_are_found_by_verify(journal, doc):
    record_document(journal, doc, "nonavailability", "NAR", MADE, "T. Okafor",
                    rank="2nd Engineer")
    conn = sqlite3.connect(journal)
    conn.execute("DROP TRIGGER attachments_never_updated")
    conn.execute("UPDATE attachments SET data = X'00'")
    conn.commit()
    conn.close()
    with Journal.open_read(journal) as j:
        report = j.verify()
    assert not report.ok
    assert any(p.seq == 2 and "its document's stored bytes do not give the SHA-256" in p.what
               for p in report.problems)


def test_a_report_is_corrected_and_struck_out(journal, doc):
    record_document(journal, doc, "nonavailability", "NAR", MADE, "T. Okafor",
                    rank="2nd Engineer")
    with Journal.open(journal) as j:
        j.append(correction_entry(2, Typed(rank="Master", name="A. Brandt",
                                           remarks="copy also to the port"), "remarks added"))
        assert j.state().current(2).details.remarks == "copy also to the port"
        j.append(correction_entry(2, Typed(rank="Master", name="A. Brandt"), "wrong voyage",
                                  void=True))
        assert j.state().current(2) is None
        assert j.verify().ok


@pytest.mark.parametrize(("kwargs", "needle"), [
    ({"kind": "Non Availability"}, "--kind"),
    ({"kind": "=cmd|' /C calc'!A0"}, "--kind"),
    ({"title": "  "}, "--title"),
    ({"rank": None}, "--rank"),
    ({"at_utc": datetime(2027, 6, 2, 14, 5)}, "--at"),
    ({"file": "missing.pdf"}, "FILE"),
])
def test_refusals_write_nothing(journal, doc, kwargs, needle):
    args = {"file": doc, "kind": "nonavailability", "title": "NAR", "at_utc": MADE,
            "by": "T. Okafor", "rank": "2nd Engineer"}
    args.update(kwargs)
    before = journal.read_bytes()
    with pytest.raises(InputError, match=needle):
        record_document(journal, **args)
    assert journal.read_bytes() == before


def test_markup_in_a_title_is_kept_as_typed(journal, doc):
    title = "<b>NAR</b> & =SUM(A1) [/] \x1b[31m"
    n = record_document(journal, doc, "nonavailability", title, MADE, "T. Okafor",
                        rank="2nd Engineer")
    with Journal.open_read(journal) as j:
        assert j.state().stored[n].entry.record.details.title == title
