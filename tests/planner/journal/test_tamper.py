"""Tampering through sqlite3 (triggers dropped first, as an attacker would): verify names it."""

from __future__ import annotations

import json
import sqlite3
from pathlib import Path

import pytest

from planner.journal import Journal
from planner.journal.canonical import canonical_json, entry_hash
from planner.journal.compose import Typed, changeover_entry, note_entry, tanks_entry
from planner.journal.entries import COMPLETED, STARTED
from planner.journal.listing import verify_lines
from planner.journal.schema import expected_schema
from tests.planner.journal.test_store import new_journal

TRIGGERS = ("entries_never_updated", "entries_never_deleted", "entries_append_only",
            "head_follows_entries")
DROP = " ".join(f"DROP TRIGGER {t};" for t in TRIGGERS)
DROPPED = [f"the journal's trigger {t} is missing (dropped)" for t in TRIGGERS]


def crew(**kw) -> Typed:
    base = dict(rank="2nd Engineer", name="T. Okafor", pos="39°19.9'S 176°24.8'E",
                area="Meridian Reach ECA", voyage="V1", confirm=True)
    base.update(kw)
    return Typed(**base)


@pytest.fixture
def journal(tmp_path) -> Path:
    """Entries: 1 set-up, 2-3 fuels, 4 start, 5 completion with tanks, 6 tanks, 7-9 notes."""
    path = tmp_path / "ship.db"
    with new_journal(path) as j:
        j.append(changeover_entry(STARTED, crew(at="2027-05-31T05:35Z", fuels=("MGO",))))
        j.append(changeover_entry(COMPLETED, crew(at="2027-05-31T10:05Z", tanks=(
            "MGO service=24.6@38", "MGO storage 3S=92.7@22"))))
        j.append(tanks_entry(crew(at="2027-05-31T12:00Z", fuels=("MGO",),
                                  tanks=("MGO storage 3S=90.1@22",))))
        for i in range(3):
            j.append(note_entry(crew(at=f"2027-05-31T1{3 + i}:00Z"), f"note {i}"))
        assert j.verify().ok
    return path


def attack(path: Path, *sql: tuple) -> None:
    conn = sqlite3.connect(path)
    conn.executescript(DROP)
    for statement, *args in sql:
        conn.execute(statement, *args)
    conn.commit()
    conn.close()


def restore_triggers(path: Path) -> None:
    """Put the dropped triggers back as they were, as a careful forger would."""
    conn = sqlite3.connect(path)
    for (kind, name), sql in expected_schema().items():
        if kind == "trigger" and name in TRIGGERS:
            conn.execute(sql)
    conn.commit()
    conn.close()


def problems(path: Path, expect_hash: str | None = None, dropped: bool = True) -> list[str]:
    """The entries' problems, after checking that verify named the dropped triggers."""
    with Journal.open_read(path) as j:
        report = j.verify(expect_hash)
    assert not report.ok
    found = [str(p) for p in report.problems]
    if dropped:
        assert found[:len(DROPPED)] == DROPPED, found
        return found[len(DROPPED):]
    return found


def body(path: Path, seq: int) -> dict:
    conn = sqlite3.connect(path)
    text = conn.execute("SELECT body FROM entries WHERE seq = ?", (seq,)).fetchone()[0]
    conn.close()
    return json.loads(text)


def test_changed_volume_is_named(journal):
    attack(journal, ("UPDATE entries SET body = json_set(body, "
                     "'$.record.details.tanks[0].volume_m3', 34.6) WHERE seq = 5",))
    found = problems(journal)
    assert any(p.startswith("entry 5: its content does not match its hash") for p in found)
    assert all(p.startswith("entry 5:") for p in found), found


def test_changed_volume_rewritten_canonically_with_new_hash_is_named(journal):
    doc = body(journal, 5)
    doc["record"]["details"]["tanks"][0]["volume_m3"] = 34.6
    text = canonical_json(doc)
    conn = sqlite3.connect(journal)
    prev = conn.execute("SELECT prev_hash FROM entries WHERE seq = 5").fetchone()[0]
    conn.close()
    attack(journal, ("UPDATE entries SET body = ?, hash = ? WHERE seq = 5",
                     (text, entry_hash(prev, 5, text))))
    found = problems(journal)
    # The edited entry now matches its own new hash; the next one no longer chains to it.
    assert any(p.startswith("entry 6: its previous-entry hash does not match entry 5")
               for p in found), found
    # The derived values in the tank reading no longer agree with the volume either.
    assert any(p.startswith("entry 5: its content is not a valid entry") for p in found), found


def test_deleted_entry_is_named(journal):
    attack(journal, ("DELETE FROM entries WHERE seq = 4",))
    found = problems(journal)
    assert found[0].startswith("entry 4: missing")
    assert any(p.startswith("entry 5: its previous-entry hash does not match entry 4")
               for p in found)


def test_deleted_last_entry_is_named(journal):
    attack(journal, ("DELETE FROM entries WHERE seq = 9",))
    found = problems(journal)
    assert found == ["entry 9: missing: entry 9 is gone from the end of the journal (its head "
                     "records entry 9)"]


def test_swapped_rows_are_named(journal):
    conn = sqlite3.connect(journal)
    cols = "kind, time_utc, voyage, area, written_utc, body, prev_hash, hash"
    r7 = conn.execute(f"SELECT {cols} FROM entries WHERE seq = 7").fetchone()
    r8 = conn.execute(f"SELECT {cols} FROM entries WHERE seq = 8").fetchone()
    conn.close()
    sets = ", ".join(f"{c.strip()} = ?" for c in cols.split(","))
    attack(journal, (f"UPDATE entries SET {sets} WHERE seq = 7", (*r8[:-1], "swapping")),
           (f"UPDATE entries SET {sets} WHERE seq = 8", r7),
           ("UPDATE entries SET hash = ? WHERE seq = 7", (r8[-1],)))
    found = problems(journal)
    assert {p.split(":")[0] for p in found} >= {"entry 7", "entry 8", "entry 9"}
    assert any(p.startswith("entry 7: its content does not match its hash") for p in found)


def test_renumbered_rows_are_named(journal):
    attack(journal, ("UPDATE entries SET seq = -8 WHERE seq = 8",),
           ("UPDATE entries SET seq = 8 WHERE seq = 7",),
           ("UPDATE entries SET seq = 7 WHERE seq = -8",))
    found = problems(journal)
    assert any(p.startswith("entry 7: its previous-entry hash") for p in found)
    assert any(p.startswith("entry 8: its content does not match its hash") for p in found)


def test_listing_column_edit_is_named(journal):
    attack(journal, ("UPDATE entries SET area = 'Skarvik Basin ECA' WHERE seq = 5",))
    assert problems(journal) == ["entry 5: its area column ('Skarvik Basin ECA') differs from "
                                 "its hashed content ('Meridian Reach ECA')"]


def test_whole_chain_rewrite_is_caught_by_the_printed_hash(journal):
    with Journal.open(journal) as j:
        printed = j.verify().last_hash
    conn = sqlite3.connect(journal)
    rows = conn.execute("SELECT seq, body, prev_hash FROM entries ORDER BY seq").fetchall()
    conn.close()
    doc = json.loads(rows[6][1])  # entry 7, a note
    doc["record"]["details"]["text"] = "rewritten"
    prev, updates = None, []
    for seq, text, old_prev in rows:
        if seq == 7:
            text = canonical_json(doc)
        p = old_prev if prev is None else prev
        h = entry_hash(p, seq, text)
        if seq >= 7:
            updates.append(("UPDATE entries SET body = ?, prev_hash = ?, hash = ? WHERE seq = ?",
                            (text, p, h, seq)))
        prev = h
    updates.append(("UPDATE head SET hash = ?", (prev,)))
    attack(journal, *updates)
    restore_triggers(journal)
    with Journal.open(journal) as j:
        assert j.verify().ok  # a consistent forgery passes the chain on its own...
    found = problems(journal, printed, dropped=False)  # ...but not against the printed copy
    assert found == [f"hash {printed} (from a printed copy) is not in this journal: entries up "
                     "to it were changed or removed"]


def test_the_head_row_is_protected_like_the_entries(journal):
    conn = sqlite3.connect(journal)
    for statement in ("UPDATE head SET seq = 8", "UPDATE head SET hash = 'x'",
                      "DELETE FROM head", "INSERT INTO head VALUES (2, 9, 'x')"):
        with pytest.raises(sqlite3.DatabaseError, match="journal head"):
            conn.execute(statement)
    conn.close()
    with Journal.open(journal) as j:
        j.append(note_entry(crew(at="2027-05-31T16:00Z"), "the head follows"))
        assert j.head()[0] == 10 and j.verify().ok


def test_a_head_edited_with_its_trigger_dropped_is_named(journal):
    attack(journal, ("UPDATE head SET seq = 8, hash = (SELECT hash FROM entries WHERE seq = 8)",))
    found = problems(journal)
    assert found == ["the journal's head records entry 8 but the journal holds 9: the head was "
                     "edited"]


def test_verify_hash_never_reassures_after_a_bad_entry(journal, tmp_path):
    with Journal.open(journal) as j:
        printed = j.verify().last_hash
    attack(journal, ("UPDATE entries SET body = json_set(body, '$.record.details.text', "
                     "'edited') WHERE seq = 7",))
    restore_triggers(journal)
    with Journal.open_read(journal) as j:
        report = j.verify(printed)
    assert report.expect_seq == 9 and not report.confirms_print
    lines = verify_lines("ship.db", report)
    assert not any("are as they were" in x for x in lines)
    assert lines[-1] == ("the printed copy's hash is entry 9's, but the problems above mean "
                         "entries 1 to 9 cannot be confirmed as printed")
