"""Checking the hash chain: every edited, removed or moved row is found and named.

:func:`verify_rows` walks the stored rows in entry-number order and reports,
per entry number:

- a gap in the numbers (entries removed);
- a previous-entry hash that is not the hash of the entry before it (an
  entry before it removed, inserted or moved, or this one moved);
- content that no longer gives its stored hash (the entry was changed), or
  text that is not canonical JSON, or that is not a valid entry;
- a listing column (kind, time, voyage, area, written-at) that differs from
  the hashed content;
- a head row (kept by a trigger) that records more entries, or another last
  hash, than the table holds (the last entries removed), or none at all;
- a table, index or trigger of the schema that is missing or replaced (the
  triggers that refuse edits dropped, say), as
  :func:`planner.journal.schema.schema_problems` finds them;
- an attached file (a trend) missing, or whose stored bytes no longer give the SHA-256
  its entry holds, as :func:`planner.journal.attach.attachment_problems` finds them.

A journal rewritten from the changed entry onwards with freshly computed
hashes passes these checks; that is what the printed last hash is for:
:func:`verify_rows` with ``expect_hash`` confirms that a hash from a printed
copy is still in the chain, and at which entry.
"""

from __future__ import annotations

import json
from collections.abc import Sequence
from dataclasses import dataclass

from planner.journal.canonical import GENESIS_HASH, canonical_json, entry_hash
from planner.journal.codec import DecodeError, decode_entry, encode


@dataclass(frozen=True)
class Row:
    """A row of the ``entries`` table as read, untrusted."""

    seq: int
    kind: str
    time_utc: str | None
    voyage: str | None
    area: str | None
    written_utc: str
    body: str
    prev_hash: str
    hash: str


@dataclass(frozen=True)
class Problem:
    """One finding: the entry number it is about (None for the whole journal) and what."""

    seq: int | None
    what: str

    def __str__(self) -> str:
        return f"entry {self.seq}: {self.what}" if self.seq is not None else self.what


@dataclass(frozen=True)
class VerifyReport:
    """The outcome: entries read, the last one's number and hash, and every problem."""

    entries: int
    last_seq: int
    last_hash: str
    problems: tuple[Problem, ...]
    expect_hash: str | None = None
    expect_seq: int | None = None    # entry whose hash is expect_hash, if found

    @property
    def ok(self) -> bool:
        return not self.problems

    @property
    def confirms_print(self) -> bool:
        """The printed copy's hash is in the chain and nothing wrong was found up to it (no
        problem with the journal as a whole, none at or before that entry)."""
        return self.expect_seq is not None and not any(
            p.seq is None or p.seq <= self.expect_seq for p in self.problems)


def listing_columns(body: dict) -> tuple[str, str | None, str | None, str | None, str]:
    """(kind, time_utc, voyage, area, written_utc) as the table stores them for listing."""
    rec = body.get("record") or {}
    return (body.get("kind"), rec.get("time_utc"), rec.get("voyage"), rec.get("area"),
            body.get("written_utc"))


def verify_rows(rows: Sequence[Row], head: tuple[int, str] | None,
                expect_hash: str | None = None, schema: Sequence[str] = (),
                files: Sequence[Problem] = ()) -> VerifyReport:
    """Check the rows (sorted by ``seq``), the head row, the schema findings ``schema`` and
    the attached files' findings ``files``; see the module docstring."""
    problems: list[Problem] = [Problem(None, f"the journal's {x}") for x in schema]
    problems += files
    expected, prev = 1, GENESIS_HASH
    expect_seq = None
    for row in rows:
        if row.seq > expected:
            gap = f"entry {expected} is" if row.seq == expected + 1 else \
                f"entries {expected} to {row.seq - 1} are"
            problems.append(Problem(expected, f"missing: {gap} not in the journal "
                                              f"(removed)"))
        if row.prev_hash != prev:
            before = f"entry {row.seq - 1}" if row.seq > 1 else "the start of the journal"
            problems.append(Problem(row.seq, f"its previous-entry hash does not match "
                                             f"{before}: entries removed, inserted or moved"))
        if entry_hash(row.prev_hash, row.seq, row.body) != row.hash:
            problems.append(Problem(row.seq, "its content does not match its hash: "
                                             "the entry was changed (or moved)"))
        problems += _content_problems(row)
        if expect_hash is not None and row.hash == expect_hash:
            expect_seq = row.seq
        expected, prev = row.seq + 1, row.hash
    last_seq = rows[-1].seq if rows else 0
    last_hash = rows[-1].hash if rows else GENESIS_HASH
    if head is not None:
        head_seq, head_hash = head
        if head_seq > last_seq:
            span = f"entry {head_seq} is" if head_seq == last_seq + 1 else \
                f"entries {last_seq + 1} to {head_seq} are"
            problems.append(Problem(last_seq + 1, f"missing: {span} gone from the end of the "
                                                  f"journal (its head records entry {head_seq})"))
        elif head_seq == last_seq and head_hash != last_hash:
            problems.append(Problem(last_seq, "its hash differs from the one the journal's "
                                              "head recorded when it was written"))
        elif head_seq < last_seq:
            problems.append(Problem(None, f"the journal's head records entry {head_seq} but "
                                          f"the journal holds {last_seq}: the head was edited"))
    elif rows:
        problems.append(Problem(None, "the journal's head row is missing"))
    if expect_hash is not None and expect_seq is None:
        problems.append(Problem(None, f"hash {expect_hash} (from a printed copy) is not in "
                                      "this journal: entries up to it were changed or removed"))
    return VerifyReport(len(rows), last_seq, last_hash, tuple(problems), expect_hash, expect_seq)


def _content_problems(row: Row) -> list[Problem]:
    try:
        body = json.loads(row.body)
    except ValueError:
        return [Problem(row.seq, "its content is not JSON")]
    out = []
    if canonical_json(body) != row.body:
        out.append(Problem(row.seq, "its stored text is not in canonical form (edited)"))
    if not isinstance(body, dict):
        return out + [Problem(row.seq, "its content is not a journal entry")]
    stored = (row.kind, row.time_utc, row.voyage, row.area, row.written_utc)
    names = ("kind", "time", "voyage", "area", "written-at time")
    for name, col, val in zip(names, stored, listing_columns(body), strict=True):
        if col != val:
            out.append(Problem(row.seq, f"its {name} column ({col!r}) differs from its hashed "
                                        f"content ({val!r})"))
    try:
        entry = decode_entry(body)
    except DecodeError as exc:
        return out + [Problem(row.seq, f"its content is not a valid entry ({exc})")]
    if canonical_json(encode(entry)) != canonical_json(body):
        out.append(Problem(row.seq, "its content does not read back as written"))
    return out
