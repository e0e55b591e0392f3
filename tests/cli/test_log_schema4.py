"""A journal written by the program at schema version 4 (before scrubber and report
entries): read, listed, exported and printed exactly as that program did, and migrated to
version 5 on the next write with every old entry's hash unchanged.

``tests/data/journal/schema4_journal.sqlite`` was made with the main branch's program at
schema 4 (set-up, two fuels, a changeover start and completion, a trend file attached, a
note and its correction, a sample); ``schema4_show.txt`` (``COLUMNS=100 log show``) and
``schema4_export.csv`` (``log export --format csv``) are that program's own output for it.
"""

from __future__ import annotations

import os
import shutil
import sqlite3
import subprocess
import sys
from pathlib import Path

import pytest

from tests.cli.test_log import run
from tests.helpers.paths import ROOT

DATA = ROOT / "tests" / "data" / "journal"


def ok(journal: Path, *args: str) -> str:
    r = run(journal, *args)
    assert r.returncode == 0, r.stderr
    return r.stdout


@pytest.fixture()
def j(tmp_path) -> Path:
    p = tmp_path / "old.sqlite"
    shutil.copy(DATA / "schema4_journal.sqlite", p)
    return p


def _version(path: Path) -> int:
    conn = sqlite3.connect(path)
    try:
        return conn.execute("PRAGMA user_version").fetchone()[0]
    finally:
        conn.close()


def _hashes(path: Path) -> list[tuple[int, str, str]]:
    conn = sqlite3.connect(path)
    try:
        return conn.execute("SELECT seq, body, hash FROM entries ORDER BY seq").fetchall()
    finally:
        conn.close()


def test_read_listed_and_exported_as_the_old_program_did(j, tmp_path):
    before = j.read_bytes()
    assert "9 entries, chain intact" in ok(j, "verify")
    r = subprocess.run([sys.executable, "-m", "planner", "log", "show", "--journal", str(j)],
                       cwd=ROOT, capture_output=True, text=True, timeout=60,
                       env={**os.environ, "COLUMNS": "100"})
    assert r.returncode == 0, r.stderr
    assert r.stdout == (DATA / "schema4_show.txt").read_text()
    assert ok(j, "export", "--format", "csv") == (DATA / "schema4_export.csv").read_text()
    ok(j, "print", "--pdf", str(tmp_path / "r.pdf"))
    ok(j, "export-trend", "6", str(tmp_path / "t.csv"))
    assert j.read_bytes() == before and _version(j) == 4       # reading never migrates


def test_the_next_write_migrates_to_5_and_keeps_every_entry(j, tmp_path):
    old = _hashes(j)
    ok(j, "scrubber", "stop", "--scrubber", "EGCS 1", "--pos", "-39.3, 176.6", "--at",
       "2026-05-31T13:00Z")
    assert _version(j) == 5
    assert _hashes(j)[:len(old)] == old
    conn = sqlite3.connect(j)
    names = {r[0] for r in conn.execute("SELECT name FROM sqlite_master")}
    conn.close()
    assert "entries_by_kind" in names
    assert "10 entries, chain intact" in ok(j, "verify")
    doc = tmp_path / "nar.pdf"
    doc.write_bytes(b"%PDF-1.4 fictional")
    ok(j, "report", str(doc), "--kind", "nonavailability", "--title", "NAR")
    back = tmp_path / "trend.csv"
    ok(j, "export-file", "6", str(back))                         # the old trend still reads
    assert back.read_bytes() == (ROOT / "areas_sample" / "trends" /
                                 "kb_main_2027-05-30.csv").read_bytes()
    assert "11 entries, chain intact" in ok(j, "verify")


def test_a_version_4_program_is_told_the_journal_is_newer(j):
    """The version is what stops an older program from failing on a scrubber entry: its
    check (the same rule as :func:`planner.journal.schema.check_journal`, at 4) refuses a
    version 5 file by name."""
    from planner.journal.schema import SchemaError, check_journal

    ok(j, "scrubber", "stop", "--scrubber", "EGCS 1", "--pos", "-39.3, 176.6", "--at",
       "2026-05-31T13:00Z")
    conn = sqlite3.connect(j)
    conn.execute("PRAGMA user_version = 6")      # as this program will meet a later one
    conn.commit()
    with pytest.raises(SchemaError, match="schema version 6, newer than this program's 5"):
        check_journal(conn)
    conn.close()
