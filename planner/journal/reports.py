"""Documents made, kept in the journal: a ``report`` entry with the file's bytes attached.

A document the program made (the fuel oil non-availability report of MARPOL Annex VI
regulation 18.2 [MARPOL-VI], say) is recorded as an entry of kind ``report`` whose
:class:`~planner.journal.details_kinds.ReportDetails` hold its title, a kind word, the
file's name, size and SHA-256; the bytes go into the ``attachments`` table under that hash
in the same transaction (:mod:`planner.journal.attach`), so the chain covers them and
``log export-file`` gives them back checked.

:func:`record_document` is the call for a command that makes a document and records it;
:func:`report_entry` the builder ``log report`` appends.
"""

from __future__ import annotations

from collections.abc import Callable
from datetime import UTC, datetime, timedelta
from pathlib import Path

from geo.errors import InputError
from planner.journal.attach import read_file_bytes, sha256_hex
from planner.journal.details_kinds import MAX_DOCUMENT_BYTES, REPORT_KIND, ReportDetails
from planner.journal.entries import REPORT, Entry, Person, Record, utc_now
from planner.journal.state import JournalState

Builder = Callable[[JournalState], Entry]


def read_document_bytes(path: str | Path, option: str = "FILE") -> bytes:
    """The bytes of a document to keep: a regular file of at most
    :data:`MAX_DOCUMENT_BYTES` bytes (one :class:`InputError` line otherwise)."""
    return read_file_bytes(path, option, "document file", "", MAX_DOCUMENT_BYTES)


def report_details(file_name: str, data: bytes, kind: str, title: str,
                   note: str = "") -> ReportDetails:
    """The details of a report entry for ``data`` read from ``file_name`` (each bad value
    one :class:`InputError` naming its option)."""
    word = (kind or "").strip().lower()
    if not REPORT_KIND.match(word):
        raise InputError("--kind", "", kind, "a kind word of lowercase letters, digits, - or _ "
                                             "(at most 40), e.g. nonavailability")
    if not isinstance(title, str) or not title.strip():
        raise InputError("--title", "", None, "the document's title")
    return ReportDetails(" ".join(title.split()), word, file_name, len(data), sha256_hex(data),
                         (note or "").strip())


def report_entry(who: Person, details: ReportDetails, at_utc: datetime | None = None,
                 offset_min: int | None = None, voyage: str | None = None,
                 area: str | None = None) -> Builder:
    """A ``report`` entry, built inside the append: its time ``at_utc`` (default now), the
    ship's offset ``offset_min`` (default the last entry's, else UTC), the voyage (default
    the last entry's) and the area if given."""
    def make(state: JournalState) -> Entry:
        moment = at_utc or utc_now()
        offset = offset_min if offset_min is not None else (state.last_offset_min or 0)
        record = Record(moment, offset, None, area, voyage or state.last_voyage, None, (),
                        details)
        try:
            return Entry(REPORT, who, utc_now(), record)
        except ValueError as exc:
            raise InputError("entry", "", REPORT, str(exc)) from None
    return make


def record_document(journal: str | Path, file: str | Path, kind: str, title: str,
                    at_utc: datetime, by: str | Person, note: str = "", *,
                    rank: str | None = None, voyage: str | None = None,
                    area: str | None = None) -> int:
    """Record the document ``file`` in ``journal`` (its bytes kept, checked by the chain);
    return the new entry's number.

    Parameters
    ----------
    journal : path
        The ship's journal (it must exist; opened to write and migrated if older).
    file : path
        The document made (a regular file of at most 20 MiB), e.g. the PDF just written.
    kind : str
        Its kind word, lowercase: ``nonavailability`` for a fuel oil non-availability
        report (MARPOL Annex VI regulation 18.2 [MARPOL-VI]).
    title : str
        Its title as printed on it.
    at_utc : datetime
        When it was made: timezone-aware; a non-UTC offset is taken as the ship's time.
    by : str or Person
        Who made it: a :class:`~planner.journal.entries.Person`, or the name as signed
        with ``rank`` given.
    note : str
        Remarks (free text).
    rank : str
        The rank as signed, when ``by`` is a name.
    voyage, area : str
        The voyage (default the journal's last) and the control area it is about.

    Returns
    -------
    int
        The entry number of the ``report`` entry written. Bad input raises
        :class:`geo.errors.InputError` (one line) and writes nothing.
    """
    from planner.journal.store import Journal

    if isinstance(by, Person):
        who = by
    else:
        for opt, v in (("--rank", rank), ("--name", by)):
            if not isinstance(v, str) or not v.strip():
                raise InputError(opt, "", None, "who made the document: rank and name as "
                                                "they sign (or set CHANGEOVER_RANK and "
                                                "CHANGEOVER_NAME)")
        who = Person(rank.strip(), by.strip())
    if not isinstance(at_utc, datetime) or at_utc.utcoffset() is None:
        raise InputError("--at", "", at_utc, "a time with its UTC offset")
    off = at_utc.utcoffset() or timedelta(0)
    offset = int(off.total_seconds() // 60) or None
    path = Path(file)
    data = read_document_bytes(path, "FILE")
    details = report_details(path.name, data, kind, title, note)
    make = report_entry(who, details, at_utc.astimezone(UTC), offset, voyage, area)
    with Journal.open(journal) as j:
        (stored,) = j.append_many([make], [data])
    return stored.seq

