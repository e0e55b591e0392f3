"""The journal file: WAL, triggers that refuse rewriting, schema versions, checks in the append."""

from __future__ import annotations

import sqlite3
from pathlib import Path

import pytest

from geo.errors import InputError
from planner.journal import Journal
from planner.journal.compose import (
    Typed,
    changeover_entry,
    correction_entry,
    note_entry,
    tanks_entry,
)
from planner.journal.compose_setup import fuel_entry, setup_entry
from planner.journal.entries import COMPLETED, CORRECTION, STARTED
from planner.journal.schema import APPLICATION_ID, SCHEMA_VERSION, migrate

CE = Typed(rank="Chief Engineer", name="R. Halvorsen", tz="+12:00", confirm=True)


def new_journal(path: Path, tanks=("MGO service", "MGO storage 3S")) -> Journal:
    j = Journal.create(path, setup_entry(CE, "MV Aurora Tern", "1234567", tanks))
    j.append(fuel_entry(CE, "MGO", "DMA", 0.07, 848.5, "ALD-0528-01"))
    j.append(fuel_entry(CE, "VLSFO", "RMG 380", 0.48, 989.2, "ALD-0528-02"))
    return j


def step(**kw) -> Typed:
    base = dict(rank="2nd Engineer", name="T. Okafor", pos="39°19.9'S 176°24.8'E",
                area="Meridian Reach ECA", voyage="V1", confirm=True)
    base.update(kw)
    return Typed(**base)


def test_create_open_and_wal(tmp_path):
    path = tmp_path / "ship.db"
    with new_journal(path) as j:
        assert j.conn.execute("PRAGMA journal_mode").fetchone()[0] == "wal"
        assert j.conn.execute("PRAGMA user_version").fetchone()[0] == SCHEMA_VERSION
        assert j.conn.execute("PRAGMA application_id").fetchone()[0] == APPLICATION_ID
    assert [p.name for p in tmp_path.iterdir()] == ["ship.db"]  # nothing left beside it
    with Journal.open(path) as j:
        st = j.state()
        assert (st.ship_name, st.imo_number, st.last_seq) == ("MV Aurora Tern", "1234567", 3)
        assert sorted(st.fuels) == ["MGO", "VLSFO"]
        assert j.verify().ok


def test_never_overwrites_and_refuses_non_journals(tmp_path):
    path = tmp_path / "ship.db"
    new_journal(path).close()
    before = path.read_bytes()
    with pytest.raises(InputError, match="never overwritten"):
        Journal.create(path, setup_entry(CE, "Other", "1234567", ()))
    assert path.read_bytes() == before
    other = tmp_path / "other.db"
    sqlite3.connect(other).execute("CREATE TABLE t (x)").connection.close()
    with pytest.raises(InputError, match="not a changeover journal"):
        Journal.open(other)
    text = tmp_path / "notes.txt"
    text.write_text("hello " * 200)
    with pytest.raises(InputError, match="changeover journal"):
        Journal.open(text)
    with pytest.raises(InputError, match="existing journal"):
        Journal.open(tmp_path / "none.db")


def test_bad_first_entry_leaves_no_file(tmp_path):
    path = tmp_path / "ship.db"
    with pytest.raises(InputError, match="--tz"):
        Journal.create(path, setup_entry(Typed(rank="C/E", name="X"), "MV X", "1234567", ()))
    assert list(tmp_path.iterdir()) == []


def test_triggers_refuse_update_delete_and_out_of_chain_insert(tmp_path):
    path = tmp_path / "ship.db"
    new_journal(path).close()
    conn = sqlite3.connect(path)
    with pytest.raises(sqlite3.DatabaseError, match="never changed"):
        conn.execute("UPDATE entries SET area = 'x' WHERE seq = 2")
    with pytest.raises(sqlite3.DatabaseError, match="never deleted"):
        conn.execute("DELETE FROM entries WHERE seq = 3")
    row = conn.execute("SELECT kind, time_utc, voyage, area, written_utc, body, hash "
                       "FROM entries WHERE seq = 3").fetchone()
    with pytest.raises(sqlite3.DatabaseError, match="follow the last entry"):
        conn.execute("INSERT INTO entries VALUES (4, ?, ?, ?, ?, ?, ?, ?, ?)",
                     (*row[:6], "0" * 64, "f" * 64))
    with pytest.raises(sqlite3.DatabaseError, match="follow the last entry"):
        conn.execute("INSERT INTO entries VALUES (9, ?, ?, ?, ?, ?, ?, ?, ?)",
                     (*row[:6], row[6], "e" * 64))
    conn.close()
    with Journal.open(path) as j:
        assert j.verify().ok and j.state().last_seq == 3


def test_migration_from_version_1(tmp_path):
    path = tmp_path / "old.db"
    conn = sqlite3.connect(path, isolation_level=None)
    conn.execute("PRAGMA journal_mode = WAL")
    assert migrate(conn, target=1, new=True) == 1
    old = Journal(conn, path)
    old.append(setup_entry(CE, "MV Aurora Tern", "1234567", ()))
    old.append(note_entry(CE, "written by version 1"))
    conn.close()
    with Journal.open(path) as j:
        assert j.conn.execute("PRAGMA user_version").fetchone()[0] == SCHEMA_VERSION
        names = {r[0] for r in j.conn.execute("SELECT name FROM sqlite_master")}
        assert {"entries_by_time", "entries_by_voyage"} <= names
        assert j.verify().ok and j.state().last_seq == 2
        j.append(note_entry(CE, "written after the migration"))
        assert j.verify().ok


def test_newer_schema_refused(tmp_path):
    path = tmp_path / "ship.db"
    new_journal(path).close()
    conn = sqlite3.connect(path)
    conn.execute("PRAGMA user_version = 99")
    conn.close()
    with pytest.raises(InputError, match="newer than this program"):
        Journal.open(path)


def test_changeover_pairing_defaults_and_order(tmp_path):
    with new_journal(tmp_path / "ship.db") as j:
        s = j.append(changeover_entry(STARTED, step(at="2027-05-31T05:35Z", fuels=("MGO",),
                                                    from_fuels=("VLSFO",))))
        with pytest.raises(InputError, match="at or after the start"):
            j.append(changeover_entry(COMPLETED, step(at="2027-05-31T05:00Z",
                                                      tanks=("MGO service=20@38",))))
        done = j.append(changeover_entry(COMPLETED, Typed(
            confirm=True, rank="C/E", name="R. H.", at="2027-05-31T10:05Z",
            pos="39°11.6'S 178°00.4'E",
            tanks=("MGO service=24.6@38", "MGO storage 3S=92.7@22"))))
        r = done.entry.record
        assert r.details.follows == s.seq
        assert r.area == "Meridian Reach ECA" and r.voyage == "V1" and r.ship_offset_min == 720
        assert [u.fuel.name for u in r.fuels] == ["MGO", "VLSFO"]
        assert [t.fuel for t in r.details.tanks] == ["MGO", "MGO"]
        with pytest.raises(InputError, match="at or before the completion"):
            j.append(correction_entry(s.seq, step(at="2027-05-31T11:00Z"), "wrong"))
        assert j.state().last_seq == 5


def test_refusals_write_nothing(tmp_path):
    with new_journal(tmp_path / "ship.db") as j:
        cases = [
            (tanks_entry(step(fuels=("MGO",), tanks=("MGO servise=1@20",))), "journal's tanks"),
            (tanks_entry(step(fuels=("MGO",), tanks=("MGO service=-1@20",))), "0 m³ or more"),
            (tanks_entry(step(fuels=("LSMGO",), tanks=("MGO service=1@20",))), "registered"),
            (tanks_entry(step(fuels=("MGO", "VLSFO"), tanks=("MGO service=1@20",))), "/FUEL"),
            (changeover_entry(COMPLETED, step(pos="91 0", fuels=("MGO",),
                                              tanks=("MGO service=1@20",))), "--pos"),
            (changeover_entry(COMPLETED, step(fuels=("MGO",))), "each tank"),
            (correction_entry(42, step(), "typo"), "1 to 3"),
            (correction_entry(2, step(), "typo"), "superseded"),
            (note_entry(Typed(name="X", tz="Z"), "hello"), "--rank"),
        ]
        for make, why in cases:
            with pytest.raises(InputError, match=why):
                j.append(make)
        assert j.state().last_seq == 3 and j.verify().ok


def test_correction_and_void_keep_the_original(tmp_path):
    with new_journal(tmp_path / "ship.db") as j:
        n = j.append(note_entry(step(at="2027-05-31T12:00Z"), "engine room manned"))
        c = j.append(correction_entry(n.seq, step(), "time", text="engine room manned "
                                                                 "throughout"))
        v = j.append(correction_entry(c.seq, step(), "wrong journal", void=True))
        st = j.state()
        assert [s.seq for s in st.versions(n.seq)] == [n.seq, c.seq, v.seq]
        assert st.current(n.seq) is None
        assert st.stored[n.seq].entry.record.details.text == "engine room manned"
        assert st.stored[c.seq].entry.kind == CORRECTION
        with pytest.raises(InputError, match="not struck out"):
            j.append(correction_entry(n.seq, step(), "again", text="x"))
        with pytest.raises(InputError, match="corrected values"):
            j.append(correction_entry(c.seq, step(), "nothing"))
