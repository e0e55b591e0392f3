"""Trend files attached to changeover entries: read, checked, stored and checked again.

``log trend ENTRY TREND.csv`` reads the file (a regular file of at most
:data:`~planner.journal.details.MAX_TREND_BYTES`), and appends a ``trend`` entry whose
:class:`~planner.journal.details.TrendDetails` name the file as given, its size and the
SHA-256 of its bytes; the bytes go into the journal's ``attachments`` table under that
hash in the same transaction. The entry is chained like every other, so the chain covers
the hash, and the hash covers the bytes: :func:`attachment_problems` (run by ``verify``)
finds a stored file that is missing, or whose bytes no longer give the entry's hash.

Refused with one line, nothing written: an entry number the journal does not have, a
correction's number, an entry that is not a changeover start or completion, a struck-out
one; a missing, unreadable or non-regular file, or one over the cap.

A ``report`` entry (a document made, :mod:`planner.journal.reports`) keeps its file the
same way: :func:`read_file_bytes` reads it, :func:`store_attachment` stores it and
:func:`attachment_problems` checks it (:data:`ATTACHING`).
"""

from __future__ import annotations

import hashlib
import json
import stat
from collections.abc import Callable, Iterable, Mapping
from datetime import datetime
from pathlib import Path

from geo.errors import InputError
from planner.journal.details import MAX_TREND_BYTES, TREND_COLUMNS, TrendDetails
from planner.journal.entries import (
    CHANGEOVER_KINDS,
    CORRECTION,
    LABELS,
    REPORT,
    TREND,
    Entry,
    Person,
    Record,
    utc_now,
)
from planner.journal.inputs import parse_at, parse_tz
from planner.journal.state import JournalState
from planner.journal.verify import Problem, Row

Builder = Callable[[JournalState], Entry]


def sha256_hex(data: bytes) -> str:
    """SHA-256 of ``data``, lowercase hex."""
    return hashlib.sha256(data).hexdigest()


def read_trend_bytes(path: str | Path, option: str = "TREND.csv") -> bytes:
    """The bytes of a trend file: a regular file of at most :data:`MAX_TREND_BYTES` bytes
    (one :class:`InputError` line otherwise; a device or a pipe is never read)."""
    return read_file_bytes(path, option, "trend file", " (CSV)", MAX_TREND_BYTES,
                           ": cut the export to the changeover")


def read_file_bytes(path: str | Path, option: str, noun: str, form: str, cap: int,
                    hint: str = "") -> bytes:
    """The bytes of a regular file of at most ``cap`` bytes to attach (one
    :class:`InputError` line otherwise, naming it a ``noun`` ``form``; a device or a pipe is
    never read; ``hint`` follows the size refusal)."""
    p = Path(path)
    try:
        st = p.stat()
    except FileNotFoundError:
        raise InputError(option, "", str(path), f"an existing {noun}{form}") from None
    except OSError as exc:
        raise InputError(str(path), "", exc.strerror or str(exc),
                         f"a {noun} you may read") from None
    if not stat.S_ISREG(st.st_mode):
        what = "a folder" if stat.S_ISDIR(st.st_mode) else "not a regular file"
        raise InputError(option, "", str(path), f"a regular {noun}{form}; it is {what}")
    if st.st_size > cap:
        raise InputError(str(path), "file size", f"{st.st_size} bytes",
                         f"a {noun} of at most {cap} bytes ({cap // 2**20} MiB){hint}")
    try:
        with p.open("rb") as f:
            data = f.read(cap + 1)
    except OSError as exc:
        raise InputError(str(path), "", exc.strerror or str(exc),
                         f"a {noun} you may read") from None
    if len(data) > cap:  # grew while read
        raise InputError(str(path), "file size", f"over {cap} bytes",
                         f"a {noun} of at most {cap} bytes")
    return data


def parse_columns(pairs: Iterable[str]) -> tuple[str, ...]:
    """``--column WHAT=NAME`` options, checked (WHAT one of :data:`TREND_COLUMNS`, once)."""
    out, seen = [], set()
    for text in pairs:
        what, eq, name = text.partition("=")
        what, name = what.strip(), name.strip()
        if what not in TREND_COLUMNS or not eq or not name:
            raise InputError("--column", "", text, f"WHAT=NAME with WHAT one of "
                             f"{', '.join(TREND_COLUMNS)} (the trend's column for it)")
        if what in seen:
            raise InputError("--column", "", text, f"each of {', '.join(TREND_COLUMNS)} once")
        seen.add(what)
        out.append(f"{what}={name}")
    return tuple(out)


def target_record(state: JournalState, number: int) -> Record:
    """The record of changeover entry ``number`` as it stands (refused in one line when it
    is not an original changeover start or completion still standing)."""
    if number not in state.stored:
        span = f"1 to {state.last_seq}" if state.last_seq else "none yet"
        raise InputError("ENTRY", "", number, f"the number of an entry in this journal "
                                              f"({span})")
    e = state.stored[number].entry
    if e.kind == CORRECTION and e.correction is not None:
        root = state.root(number)
        raise InputError("ENTRY", "", number, f"the changeover entry itself, not a correction "
                                              f"(entry {number} corrects entry {root})")
    if e.kind not in CHANGEOVER_KINDS:
        raise InputError("ENTRY", "", number, f"a changeover start or completion (entry "
                                              f"{number} is a {LABELS[e.kind]} entry)")
    r = state.current(number)
    if r is None:
        raise InputError("ENTRY", "", number, f"an entry not struck out (entry {number} was "
                                              f"struck out by entry "
                                              f"{state.corrections[number][-1]})")
    return r


def trend_details(number: int, file_name: str, data: bytes, switch_utc: datetime | None,
                  columns: tuple[str, ...], tz: str, remarks: str) -> TrendDetails:
    """The details of a trend entry for ``data`` read from ``file_name``."""
    return TrendDetails(number, file_name, len(data), sha256_hex(data), switch_utc, columns,
                        tz, remarks)


def store_attachment(conn, data: bytes) -> str:
    """Insert ``data`` into ``attachments`` (inside the caller's transaction) unless the
    same bytes are already there; return their SHA-256."""
    digest = sha256_hex(data)
    have = conn.execute("SELECT 1 FROM attachments WHERE sha256 = ?", (digest,)).fetchone()
    if have is None:
        conn.execute("INSERT INTO attachments (sha256, size, data) VALUES (?, ?, ?)",
                     (digest, len(data), data))
    return digest


ATTACHING = {TREND: "trend file", REPORT: "document"}
"""The kinds of entry that attach a file's bytes, and what the file is called."""


def attachment_problems(rows: Iterable[Row], stored: Mapping[str, tuple[int, bytes]]
                        ) -> list[Problem]:
    """Each trend or report entry whose file is missing from ``stored`` (``{sha256: (size,
    bytes)}``) or whose stored bytes no longer give the SHA-256 (and size) the entry holds; and each
    stored file whose bytes do not match the hash it is kept under."""
    out = []
    for row in rows:
        noun = ATTACHING.get(row.kind)
        if noun is None:
            continue
        try:
            d = json.loads(row.body)["record"]["details"]
            digest, size = d["sha256"], d["size_bytes"]
        except (ValueError, KeyError, TypeError):
            continue        # the content check names an unreadable entry
        if digest not in stored:
            out.append(Problem(row.seq, f"its {noun}'s bytes are missing from the journal "
                                        "(removed)"))
            continue
        kept_size, data = stored[digest]
        if sha256_hex(data) != digest or len(data) != size or kept_size != size:
            out.append(Problem(row.seq, f"its {noun}'s stored bytes do not give the SHA-256 "
                                        "the entry holds: the file was changed"))
    for digest, (_, data) in stored.items():
        if sha256_hex(data) != digest and not any(
                p.what.endswith("the file was changed") for p in out):
            out.append(Problem(None, f"an attached file kept under {digest[:16]}… does not "
                                     "match that hash (changed)"))
    return out


def trend_entry(number: int, who: Person, file_name: str, data: bytes,
                switch_at: str | None, columns: tuple[str, ...], tz: str | None,
                remarks: str | None) -> Builder:
    """A ``trend`` entry attaching ``data`` (read from ``file_name``) to changeover entry
    ``number``; built inside the append, against the journal as it stands. Its time is the
    switch time when given, else the changeover entry's; area, voyage and circuit are the
    changeover's."""
    switch = parse_at(switch_at, "--switch-at")[0] if switch_at else None
    zone = ""
    if tz:
        minutes = parse_tz(tz, "--trend-tz")
        zone = f"{'-' if minutes < 0 else '+'}{abs(minutes) // 60:02d}:{abs(minutes) % 60:02d}"
    details = trend_details(number, file_name, data, switch, columns, zone,
                            (remarks or "").strip())

    def make(state: JournalState) -> Entry:
        r = target_record(state, number)
        record = Record(switch or r.time_utc, r.ship_offset_min, None, r.area, r.voyage,
                        r.circuit, (), details)
        try:
            return Entry(TREND, who, utc_now(), record)
        except ValueError as exc:
            raise InputError("entry", "", TREND, str(exc)) from None
    return make


def trends_of(state: JournalState, number: int) -> list[tuple[int, TrendDetails]]:
    """(entry number, details) of the standing trend entries attached to entry ``number``."""
    out = []
    for s, r in state.live([TREND]):
        if r.details.attaches == number:
            out.append((s.seq, r.details))
    return out
