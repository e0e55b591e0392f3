"""The journal file: one SQLite database per ship, appended to and never rewritten.

- WAL mode and ``synchronous = FULL``: a commit is on disk when it returns;
  a writer killed at any moment leaves every committed entry and none of an
  unfinished batch.
- Appends run in ``BEGIN IMMEDIATE``: the write lock is taken first, then
  the last entry's number and hash are read and the new entry chained to
  them, so concurrent writers (other processes) queue and never fork the
  chain. They wait up to :data:`BUSY_TIMEOUT_S` for the lock.
- The entry is built and checked inside that transaction (see
  :meth:`Journal.append`): a bad value raises :class:`geo.errors.InputError`
  and the transaction is rolled back, so nothing is written.
- A new journal is built under a temporary name and linked into place only
  when complete; an existing file is never overwritten.
- :meth:`Journal.open_read` (``show``, ``verify``, ``print``, ``export``)
  opens the file read-only and works on a copy in memory, so a journal on a
  read-only medium or in a read-only folder can be read, and reading never
  writes to it.
- Every SQLite error (a damaged page, a missing table, a read-only file or
  folder, a full disk) is one :class:`geo.errors.InputError` naming the file.
"""

from __future__ import annotations

import contextlib
import json
import os
import sqlite3
from collections.abc import Callable, Iterator, Sequence
from pathlib import Path

from geo.errors import InputError
from planner.journal.canonical import canonical_json, entry_hash
from planner.journal.checks import check_entry
from planner.journal.codec import DecodeError, decode_entry, encode
from planner.journal.entries import Entry
from planner.journal.schema import (
    SCHEMA_VERSION,
    SchemaError,
    check_journal,
    migrate,
    schema_problems,
)
from planner.journal.state import JournalState, Stored
from planner.journal.verify import Row, VerifyReport, listing_columns, verify_rows

BUSY_TIMEOUT_S = 30.0
"""How long a writer waits for another writer's transaction to finish, s."""

Make = Entry | Callable[[JournalState], Entry]
"""An entry, or a function building one from the journal as it stands (run in the append)."""

_COLUMNS = "seq, kind, time_utc, voyage, area, written_utc, body, prev_hash, hash"


def _connect(path: Path, mode: str) -> sqlite3.Connection:
    uri = path.resolve().as_uri() + f"?mode={mode}"
    conn = sqlite3.connect(uri, uri=True, isolation_level=None, timeout=BUSY_TIMEOUT_S)
    conn.execute("PRAGMA synchronous = FULL")
    return conn


def _existing_file(p: Path, path: object, option: str) -> None:
    """Refuse, in one line, a path that is not a journal file we may look at."""
    try:
        ok = p.is_file()
    except OSError as exc:
        raise InputError(str(path), "", exc.strerror or "unreadable",
                         "a journal file you may read") from None
    if not ok:
        raise InputError(option, "", str(path),
                         "an existing journal file (start one with changeover log init)")
    if not os.access(p, os.R_OK):
        raise InputError(str(path), "", "permission denied", "a journal file you may read")


def _stamp(path: Path) -> tuple[int, int]:
    st = path.stat()
    return st.st_mtime_ns, st.st_size


def _copy_into(path: Path, mem: sqlite3.Connection) -> None:
    """Copy the journal file into ``mem`` read-only, creating nothing beside it.

    With no write-ahead log beside the file (no writer has it open, the last one closed
    cleanly) the file is all there is and is read as immutable; the copy is kept only if
    no writer appeared and the file did not change meanwhile. With a log (a writer at
    work, or one killed), SQLite's read-only mode reads the file and the log together.
    """
    wal = Path(f"{path}-wal")
    for _ in range(3):
        if wal.exists():
            break
        before = _stamp(path)
        src = sqlite3.connect(path.resolve().as_uri() + "?mode=ro&immutable=1", uri=True,
                              isolation_level=None)
        try:
            src.backup(mem)
        finally:
            src.close()
        if not wal.exists() and _stamp(path) == before:
            return
    src = _connect(path, "ro")
    try:
        src.backup(mem)
    finally:
        src.close()


def sqlite_expected(exc: sqlite3.Error) -> str:
    """What a journal must be, given the SQLite error met (for the one-line message)."""
    text = str(exc)
    low = text.lower()
    if "unable to open" in low:
        why = "a journal file (and folder) you may read and write"
    elif "readonly" in low or "read-only" in low:
        why = "a journal file you may write, in a folder you may write"
    elif "locked" in low or "busy" in low:
        why = "a journal no other program holds locked (waited 30 s)"
    elif "full" in low:
        why = "room on the disk to write the entry"
    else:
        why = "an undamaged changeover journal (restore a copy; changeover log verify)"
    return f"{why}; SQLite said: {text}"


@contextlib.contextmanager
def sqlite_errors(path: object) -> Iterator[None]:
    """Turn any SQLite error inside the block into one :class:`InputError` naming ``path``."""
    try:
        yield
    except sqlite3.Error as exc:
        raise InputError(str(path), "", None if not str(exc) else "SQLite error",
                         sqlite_expected(exc)) from None


class Journal:
    """An open journal. Use :meth:`create` or :meth:`open`; close it (or use ``with``)."""

    def __init__(self, conn: sqlite3.Connection, path: Path, *, read_only: bool = False) -> None:
        self.conn = conn
        self.path = path
        self.read_only = read_only
        self._state: JournalState | None = None

    # -- opening ---------------------------------------------------------------------------

    @classmethod
    def create(cls, path: str | Path, first: Make, *, option: str = "--journal",
               then: Sequence[Make] = ()) -> Journal:
        """A new journal at ``path`` whose entry 1 is ``first`` (the ship's set-up), followed
        by the entries ``then`` (the fuels, say): all of them are in the file when it
        appears, or there is no file."""
        target = Path(path)
        if target.exists():
            raise InputError(option, "", str(path), "a new file: a journal is never overwritten")
        if not target.parent.is_dir():
            raise InputError(option, "", str(path), "a path in an existing folder")
        tmp = target.with_name(f".{target.name}.{os.getpid()}.new")
        try:
            with sqlite_errors(path):
                conn = _connect(tmp, "rwc")
            try:
                with sqlite_errors(path):
                    conn.execute("PRAGMA journal_mode = WAL")
                    migrate(conn, new=True)
                cls(conn, tmp).append_many([first, *then])
            finally:
                conn.close()
            try:
                os.chmod(tmp, 0o666 & ~_umask())
                os.link(tmp, target)
            except FileExistsError:
                raise InputError(option, "", str(path),
                                 "a new file: a journal is never overwritten") from None
            except OSError:  # no hard links here: rename, having looked first
                if target.exists():
                    raise InputError(option, "", str(path),
                                     "a new file: a journal is never overwritten") from None
                os.replace(tmp, target)
        finally:
            for p in (tmp, Path(f"{tmp}-wal"), Path(f"{tmp}-shm")):
                if p.exists():
                    p.unlink()
        return cls.open(target, option=option)

    @classmethod
    def open_read(cls, path: str | Path, *, option: str = "--journal") -> Journal:
        """An existing journal, read-only, as a copy in memory taken in one consistent read
        (the file is opened read-only; its schema is brought up to date in the copy only)."""
        p = Path(path)
        _existing_file(p, path, option)
        mem = sqlite3.connect(":memory:", isolation_level=None)
        try:
            with sqlite_errors(path):
                _copy_into(p, mem)
                version = check_journal(mem)
                if version < SCHEMA_VERSION:
                    migrate(mem)
        except SchemaError as exc:
            mem.close()
            raise InputError(option, "", str(path), f"a changeover journal this program can "
                                                    f"use; it is {exc}") from None
        except BaseException:
            mem.close()
            raise
        return cls(mem, p, read_only=True)

    @classmethod
    def open(cls, path: str | Path, *, option: str = "--journal") -> Journal:
        """An existing journal, its schema brought up to date (see :mod:`.schema`)."""
        p = Path(path)
        _existing_file(p, path, option)
        for what, where in (("file", p), ("folder", p.parent)):
            if not os.access(where, os.W_OK):
                raise InputError(str(path), "", f"read-only {what}", "a journal file you may "
                                 "write, in a folder you may write (SQLite writes its log "
                                 "beside the file)")
        conn = None
        try:
            conn = _connect(p, "rw")
            version = check_journal(conn)
            if version < SCHEMA_VERSION:
                migrate(conn)
            if conn.execute("PRAGMA journal_mode").fetchone()[0].lower() != "wal":
                conn.execute("PRAGMA journal_mode = WAL")
        except SchemaError as exc:
            conn.close()
            raise InputError(option, "", str(path), f"a changeover journal this program can "
                                                    f"use; it is {exc}") from None
        except sqlite3.Error as exc:
            if conn is not None:
                conn.close()
            raise InputError(str(path), "", "SQLite error", sqlite_expected(exc)) from None
        return cls(conn, p)

    def close(self) -> None:
        self.conn.close()

    def __enter__(self) -> Journal:
        return self

    def __exit__(self, *exc: object) -> None:
        self.close()

    # -- reading ---------------------------------------------------------------------------

    def rows(self) -> list[Row]:
        """Every row, in entry-number order, as stored (untrusted)."""
        with sqlite_errors(self.path):
            cur = self.conn.execute(f"SELECT {_COLUMNS} FROM entries ORDER BY seq")
            return [Row(*r) for r in cur.fetchall()]

    def head(self) -> tuple[int, str] | None:
        """(number, hash) of the last entry as the head row recorded it (None: no head)."""
        try:
            r = self.conn.execute("SELECT seq, hash FROM head WHERE id = 1").fetchone()
        except sqlite3.OperationalError:
            return None     # the head table itself is gone: the schema check names it
        return (int(r[0]), str(r[1])) if r else None

    def read(self) -> list[Stored]:
        """Every entry, decoded (refused if one cannot be read: see :meth:`verify`)."""
        return list(self.state().stored.values())

    def state(self) -> JournalState:
        """The journal as it stands now (one consistent read)."""
        with sqlite_errors(self.path):
            self.conn.execute("BEGIN")
            try:
                return self._refresh()
            finally:
                self.conn.execute("COMMIT")

    def attachments(self) -> dict[str, tuple[int, bytes]]:
        """Every attached file as stored, ``{sha256: (size, bytes)}`` (untrusted; empty when
        the table is gone: the schema check names it)."""
        try:
            cur = self.conn.execute("SELECT sha256, size, data FROM attachments")
        except sqlite3.OperationalError:
            return {}
        return {str(k): (int(n), bytes(b)) for k, n, b in cur.fetchall()}

    def attachment(self, digest: str) -> bytes | None:
        """The bytes of the file attached under SHA-256 ``digest`` (None: not stored)."""
        with sqlite_errors(self.path):
            try:
                r = self.conn.execute("SELECT data FROM attachments WHERE sha256 = ?",
                                      (digest,)).fetchone()
            except sqlite3.OperationalError:
                return None
        return bytes(r[0]) if r else None

    def verify(self, expect_hash: str | None = None) -> VerifyReport:
        """Check the whole chain, the attached files and the schema's triggers (see
        :mod:`.verify` and :func:`planner.journal.attach.attachment_problems`)."""
        from planner.journal.attach import attachment_problems

        with sqlite_errors(self.path):
            self.conn.execute("BEGIN")
            try:
                rows, head = self.rows(), self.head()
                schema = schema_problems(self.conn)
                files = attachment_problems(rows, self.attachments())
            finally:
                self.conn.execute("COMMIT")
        return verify_rows(rows, head, expect_hash, schema, files)

    # -- writing ---------------------------------------------------------------------------

    def append(self, make: Make) -> Stored:
        """Append one entry (built and checked inside the transaction); return it as stored."""
        return self.append_many([make])[0]

    def append_many(self, makes: Sequence[Make], files: Sequence[bytes] = ()) -> list[Stored]:
        """Append entries in one transaction: all of them or, on any error, none; ``files``
        are attached files' bytes stored (under their SHA-256) in the same transaction."""
        if self.read_only:
            raise InputError(str(self.path), "", "read-only copy", "a journal opened to write")
        with sqlite_errors(self.path):
            return self._append_many(makes, files)

    def _append_many(self, makes: Sequence[Make], files: Sequence[bytes] = ()) -> list[Stored]:
        from planner.journal.attach import store_attachment

        conn = self.conn
        conn.execute("BEGIN IMMEDIATE")
        try:
            for data in files:
                store_attachment(conn, data)
            state = self._refresh()
            out = []
            for make in makes:
                entry = make if isinstance(make, Entry) else make(state)
                if not isinstance(entry, Entry):
                    raise TypeError(f"expected an Entry, got {entry!r}")
                check_entry(state, entry)
                stored = self._insert(state, entry)
                state.add(stored)
                out.append(stored)
            conn.execute("COMMIT")
        except BaseException:
            if conn.in_transaction:
                with contextlib.suppress(sqlite3.Error):
                    conn.execute("ROLLBACK")
            self._state = None
            raise
        return out

    def _insert(self, state: JournalState, entry: Entry) -> Stored:
        doc = encode(entry)
        body = canonical_json(doc)
        seq, prev = state.last_seq + 1, state.last_hash
        digest = entry_hash(prev, seq, body)
        self.conn.execute(f"INSERT INTO entries ({_COLUMNS}) VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?)",
                          (seq, *listing_columns(doc), body, prev, digest))
        return Stored(seq, digest, prev, entry)

    def _refresh(self) -> JournalState:
        """Bring the cached state up to the last committed entry (call inside a transaction)."""
        st = self._state or JournalState()
        if st.last_seq:
            r = self.conn.execute("SELECT hash FROM entries WHERE seq = ?",
                                  (st.last_seq,)).fetchone()
            if r is None or r[0] != st.last_hash:
                st = JournalState()
        cur = self.conn.execute(f"SELECT {_COLUMNS} FROM entries WHERE seq > ? ORDER BY seq",
                                (st.last_seq,))
        for row in cur.fetchall():
            st.add(self._decode(Row(*row)))
        self._state = st
        return st

    def _decode(self, row: Row) -> Stored:
        try:
            entry = decode_entry(json.loads(row.body))
        except (ValueError, DecodeError) as exc:
            raise InputError(str(self.path), f"entry {row.seq}", "unreadable",
                             f"a valid entry ({exc}); run changeover log verify") from None
        return Stored(row.seq, row.hash, row.prev_hash, entry)


def _umask() -> int:
    """The process's umask (read without changing it for longer than the call)."""
    mask = os.umask(0o022)
    os.umask(mask)
    return mask
