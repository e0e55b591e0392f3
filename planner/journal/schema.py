"""The journal's SQLite schema, its version and the migrations between versions.

The version lives in ``PRAGMA user_version``; ``PRAGMA application_id`` marks
the file as a changeover journal. :func:`migrate` brings an older journal up
to :data:`SCHEMA_VERSION` inside one ``BEGIN IMMEDIATE`` transaction (all
steps or none) and refuses a journal written by a newer program.

Version 1: the ``entries`` table; triggers that refuse every UPDATE and
DELETE and any INSERT that is not the next entry chained to the last one;
the ``head`` row (number and hash of the last entry) kept by a trigger, so a
removed last entry is noticed.

Version 2: indexes for listing by time, voyage and area.

Version 3: the ``head`` row protected like the entries: it can only be
written by the trigger that follows each new entry (an UPDATE or INSERT that
does not name the last entry and its hash is refused, a DELETE is refused);
the trigger that keeps it updates the row rather than replacing it.

Version 4: the ``attachments`` table, the bytes of files attached to entries (a trend
export, :mod:`planner.journal.attach`), keyed by their SHA-256; the entry that attaches a
file holds that hash, so the chain covers the bytes too. Rows are never updated or
deleted (triggers refuse it, as for the entries).

Version 5: the journal may hold entries of the kinds ``scrubber`` (scrubber events) and
``report`` (documents made, their bytes in ``attachments``), which a program of version 4
cannot read: it now refuses the journal as newer than itself (``update changeover``)
rather than failing on an entry. An index by kind lists them. Taken on the next write;
nothing else changes.

:func:`schema_problems` names every table, index or trigger of the schema
that is missing or not as this program wrote it (a trigger dropped to edit
the entries, say); ``verify`` reports them.

Entries are never rewritten by a migration: the hashed text of an entry
stays exactly as it was written.
"""

from __future__ import annotations

import sqlite3

from planner.journal.canonical import GENESIS_HASH

APPLICATION_ID = 0x43484F56
"""``PRAGMA application_id`` of a changeover journal (ASCII "CHOV")."""

SCHEMA_VERSION = 5
"""The schema version this program writes."""

_V1 = f"""
CREATE TABLE entries (
    seq         INTEGER PRIMARY KEY,      -- entry number: 1, 2, 3, ...
    kind        TEXT NOT NULL,            -- copied from the body, for listing
    time_utc    TEXT,                     -- event time (ISO 8601 UTC), from the body
    voyage      TEXT,
    area        TEXT,
    written_utc TEXT NOT NULL,
    body        TEXT NOT NULL,            -- canonical JSON of the entry (hashed)
    prev_hash   TEXT NOT NULL,
    hash        TEXT NOT NULL UNIQUE      -- SHA-256 over prev_hash, seq and body
);
CREATE TABLE head (
    id   INTEGER PRIMARY KEY CHECK (id = 1),
    seq  INTEGER NOT NULL,
    hash TEXT NOT NULL
);
CREATE TRIGGER entries_never_updated BEFORE UPDATE ON entries
BEGIN
    SELECT RAISE(ABORT, 'journal entries are never changed: add a correction entry');
END;
CREATE TRIGGER entries_never_deleted BEFORE DELETE ON entries
BEGIN
    SELECT RAISE(ABORT, 'journal entries are never deleted: add a correction entry');
END;
CREATE TRIGGER entries_append_only BEFORE INSERT ON entries
WHEN NEW.seq IS NOT (SELECT COALESCE(MAX(seq), 0) + 1 FROM entries)
  OR NEW.prev_hash IS NOT COALESCE((SELECT hash FROM entries ORDER BY seq DESC LIMIT 1),
                                   '{GENESIS_HASH}')
BEGIN
    SELECT RAISE(ABORT, 'an entry must follow the last entry and carry its hash');
END;
CREATE TRIGGER entries_head AFTER INSERT ON entries
BEGIN
    INSERT OR REPLACE INTO head (id, seq, hash) VALUES (1, NEW.seq, NEW.hash);
END;
"""

_V2 = """
CREATE INDEX entries_by_time ON entries (time_utc);
CREATE INDEX entries_by_voyage ON entries (voyage, area);
"""

_V3 = """
DROP TRIGGER IF EXISTS entries_head;
CREATE TRIGGER entries_head AFTER INSERT ON entries
BEGIN
    UPDATE head SET seq = NEW.seq, hash = NEW.hash WHERE id = 1;
    INSERT INTO head (id, seq, hash) SELECT 1, NEW.seq, NEW.hash
        WHERE NOT EXISTS (SELECT 1 FROM head WHERE id = 1);
END;
CREATE TRIGGER head_follows_entries BEFORE UPDATE ON head
WHEN NEW.id IS NOT 1
  OR NEW.seq IS NOT (SELECT MAX(seq) FROM entries)
  OR NEW.hash IS NOT (SELECT hash FROM entries ORDER BY seq DESC LIMIT 1)
BEGIN
    SELECT RAISE(ABORT, 'the journal head is kept by the journal: it names the last entry');
END;
CREATE TRIGGER head_added_once BEFORE INSERT ON head
WHEN (SELECT COUNT(*) FROM head) > 0
  OR NEW.id IS NOT 1
  OR NEW.seq IS NOT (SELECT MAX(seq) FROM entries)
  OR NEW.hash IS NOT (SELECT hash FROM entries ORDER BY seq DESC LIMIT 1)
BEGIN
    SELECT RAISE(ABORT, 'the journal head is kept by the journal: it names the last entry');
END;
CREATE TRIGGER head_never_deleted BEFORE DELETE ON head
BEGIN
    SELECT RAISE(ABORT, 'the journal head is never deleted');
END;
"""

_V4 = """
CREATE TABLE attachments (
    sha256 TEXT PRIMARY KEY,              -- SHA-256 of data, lowercase hex
    size   INTEGER NOT NULL,              -- bytes
    data   BLOB NOT NULL                  -- the file's bytes as read
);
CREATE TRIGGER attachments_never_updated BEFORE UPDATE ON attachments
BEGIN
    SELECT RAISE(ABORT, 'attached files are never changed');
END;
CREATE TRIGGER attachments_never_deleted BEFORE DELETE ON attachments
BEGIN
    SELECT RAISE(ABORT, 'attached files are never deleted');
END;
"""

_V5 = """
CREATE INDEX entries_by_kind ON entries (kind, time_utc);
"""

MIGRATIONS: dict[int, str] = {1: _V1, 2: _V2, 3: _V3, 4: _V4, 5: _V5}
"""SQL that takes the schema from version ``n - 1`` to ``n``."""


class SchemaError(Exception):
    """The file is not a journal this program can use (the message says why)."""


def schema_version(conn: sqlite3.Connection) -> int:
    """``PRAGMA user_version`` of the open database."""
    return int(conn.execute("PRAGMA user_version").fetchone()[0])


def check_journal(conn: sqlite3.Connection) -> int:
    """Raise :class:`SchemaError` unless this is a journal we can read; return its version."""
    app_id = int(conn.execute("PRAGMA application_id").fetchone()[0])
    version = schema_version(conn)
    if app_id != APPLICATION_ID:
        raise SchemaError("an SQLite file but not a changeover journal")
    if version > SCHEMA_VERSION:
        raise SchemaError(f"a journal of schema version {version}, newer than this program's "
                          f"{SCHEMA_VERSION}: update changeover")
    if version < 1:
        raise SchemaError("a journal with no schema")
    return version


def migrate(conn: sqlite3.Connection, target: int = SCHEMA_VERSION, *, new: bool = False) -> int:
    """Bring the schema up to ``target`` in one transaction; return the version reached.

    ``new=True`` sets up an empty database (marks it and starts at version 0).
    The connection must be in autocommit mode (``isolation_level=None``).
    """
    if target > SCHEMA_VERSION:
        raise ValueError(f"target {target} is above SCHEMA_VERSION {SCHEMA_VERSION}")
    conn.execute("BEGIN IMMEDIATE")
    try:
        if new:
            if conn.execute("SELECT COUNT(*) FROM sqlite_master").fetchone()[0]:
                raise SchemaError("not empty")
            conn.execute(f"PRAGMA application_id = {APPLICATION_ID}")
            version = 0
        else:
            version = check_journal(conn)
        while version < target:
            version += 1
            for statement in _statements(MIGRATIONS[version]):
                conn.execute(statement)
            conn.execute(f"PRAGMA user_version = {version}")
        conn.execute("COMMIT")
    except BaseException:
        conn.execute("ROLLBACK")
        raise
    return version


def expected_schema(version: int = SCHEMA_VERSION) -> dict[tuple[str, str], str]:
    """``{(type, name): sql}`` of every table, index and trigger the migrations up to
    ``version`` leave, as SQLite keeps their text (normalised by :func:`_norm`)."""
    import re

    out: dict[tuple[str, str], str] = {}
    create = re.compile(r"^CREATE\s+(TABLE|INDEX|TRIGGER)\s+(\w+)", re.IGNORECASE)
    drop = re.compile(r"^DROP\s+(TABLE|INDEX|TRIGGER)\s+(?:IF\s+EXISTS\s+)?(\w+)",
                      re.IGNORECASE)
    for v in range(1, version + 1):
        for statement in _statements(MIGRATIONS[v]):
            if m := create.match(statement):
                out[(m[1].lower(), m[2])] = _norm(statement)
            elif m := drop.match(statement):
                out.pop((m[1].lower(), m[2]), None)
    return out


def _norm(sql: str) -> str:
    """SQL text without comments, runs of white space or a final semicolon."""
    import re

    text = re.sub(r"--[^\n]*", "", sql)
    return re.sub(r"\s+", " ", text).strip().rstrip(";").strip()


def schema_problems(conn: sqlite3.Connection) -> list[str]:
    """What is missing from the schema, or not as written: ``trigger entries_never_updated
    is missing (dropped)``; empty when the schema is whole."""
    have = {(t, n): _norm(sql or "") for t, n, sql in conn.execute(
        "SELECT type, name, sql FROM sqlite_master WHERE type IN ('table', 'index', 'trigger') "
        "AND name NOT LIKE 'sqlite_%'")}
    out = []
    for (kind, name), sql in expected_schema(schema_version(conn)).items():
        if (kind, name) not in have:
            out.append(f"{kind} {name} is missing (dropped)")
        elif have[(kind, name)] != sql:
            out.append(f"{kind} {name} is not as this program wrote it (replaced)")
    return out


def _statements(script: str) -> list[str]:
    """Split a migration script into statements (triggers kept whole)."""
    out: list[str] = []
    buf = ""
    for line in script.splitlines(keepends=True):
        if line.lstrip().startswith("--") and not buf.strip():
            continue
        buf += line
        if sqlite3.complete_statement(buf):
            out.append(buf.strip())
            buf = ""
    if buf.strip():
        out.append(buf.strip())
    return out
