"""The record as a reader wants it: changeovers grouped, every version of every entry kept.

Pure data for printing and listing (no I/O): :func:`select` picks the
original entries of a voyage, an area or a period, each as a :class:`Line`
holding the original and all its corrections; :func:`make_book` groups the
changeover steps into :class:`Changeover` s (a start with the completion that
follows it), each with the trend files attached to its steps, and keeps scrubber events,
documents made, and tank soundings, samples and notes (and a trend whose changeover is
outside the selection) apart.
"""

from __future__ import annotations

from collections.abc import Iterable
from dataclasses import dataclass
from datetime import date

from planner.journal.details import FuelSpec
from planner.journal.entries import (
    CHANGEOVER_KINDS,
    CORRECTABLE,
    DIRECTION,
    FOLLOWS,
    REPORT,
    SCRUBBER,
    TREND,
    Planned,
    Record,
)
from planner.journal.state import JournalState, Stored


@dataclass(frozen=True)
class Version:
    """One version of an entry: the original or a correction; ``record`` None = struck out."""

    stored: Stored
    record: Record | None
    reason: str | None
    standing: bool          # the version that now stands


@dataclass(frozen=True)
class Line:
    """An original entry with its versions (original first)."""

    seq: int
    kind: str
    versions: tuple[Version, ...]

    @property
    def standing(self) -> Version:
        return self.versions[-1]

    @property
    def struck(self) -> bool:
        """Struck out by a correction."""
        return self.standing.record is None

    @property
    def record(self) -> Record:
        """The record as it stands, or the last one before it was struck out."""
        for v in reversed(self.versions):
            if v.record is not None:
                return v.record
        raise AssertionError("an original entry always has a record")


@dataclass(frozen=True)
class Changeover:
    """A start and the completion that follows it (either may be missing)."""

    direction: str                 # to_compliant or to_regular
    area: str
    circuit: str | None
    voyage: str | None
    steps: tuple[Line, ...]
    trends: tuple[Line, ...] = ()  # trend files attached to its steps (log trend)

    @property
    def struck(self) -> bool:
        """Every step struck out by a correction: no changeover stands here."""
        return all(line.struck for line in self.steps)

    @property
    def planned(self) -> Planned | None:
        for line in self.steps:
            if line.record.planned is not None:
                return line.record.planned
        return None


@dataclass(frozen=True)
class Book:
    """What the printed record holds."""

    ship_name: str
    imo_number: str
    fuels: tuple[FuelSpec, ...]
    changeovers: tuple[Changeover, ...]
    others: tuple[Line, ...]
    selection: str
    entries: int
    last_seq: int
    last_hash: str
    scrubber: tuple[Line, ...] = ()   # scrubber events, in time order
    reports: tuple[Line, ...] = ()    # documents made, in time order

    @property
    def standing(self) -> tuple[Changeover, ...]:
        """The changeovers not wholly struck out (those the record counts and numbers)."""
        return tuple(ch for ch in self.changeovers if not ch.struck)


def line_of(state: JournalState, seq: int) -> Line:
    """The :class:`Line` of original entry ``seq``."""
    vs = state.versions(seq)
    out = []
    for i, s in enumerate(vs):
        c = s.entry.correction
        out.append(Version(s, s.entry.record, c.reason if c else None, i == len(vs) - 1))
    return Line(vs[0].seq, vs[0].entry.kind, tuple(out))


def select(state: JournalState, voyage: str | None = None, area: str | None = None,
           since: date | None = None, until: date | None = None,
           kinds: Iterable[str] = CORRECTABLE) -> list[Line]:
    """Original entries of ``kinds`` whose record (as it stands) matches, in time order."""
    lines = []
    for s in state.originals(kinds):
        line = line_of(state, s.seq)
        r = line.record
        day = r.time_utc.date()
        if voyage is not None and r.voyage != voyage:
            continue
        if area is not None and r.area != area:
            continue
        if (since is not None and day < since) or (until is not None and day > until):
            continue
        lines.append(line)
    return sorted(lines, key=lambda x: (x.record.time_utc, x.seq))


def describe_selection(voyage: str | None, area: str | None, since: date | None,
                       until: date | None) -> str:
    """``voyage V27-05; 2027-06-01 to 2027-06-04 (UTC)`` or ``all entries``."""
    parts = []
    if voyage:
        parts.append(f"voyage {voyage}")
    if area:
        parts.append(f"area {area}")
    if since or until:
        parts.append(f"{since.isoformat() if since else 'start'} to "
                     f"{until.isoformat() if until else 'now'} (UTC dates)")
    return "; ".join(parts) or "all entries"


def make_book(state: JournalState, voyage: str | None = None, area: str | None = None,
              since: date | None = None, until: date | None = None) -> Book:
    """The printed record's content for a voyage, an area or a period."""
    lines = select(state, voyage, area, since, until)
    steps = [x for x in lines if x.kind in CHANGEOVER_KINDS]
    groups: list[list[Line]] = []
    by_start: dict[int, list[Line]] = {}
    for line in steps:
        follows = getattr(line.record.details, "follows", None)
        if line.kind in FOLLOWS and follows in by_start:
            by_start[follows].append(line)
            continue
        group = [line]
        groups.append(group)
        if line.kind in FOLLOWS.values():
            by_start[line.seq] = group
    trends = [x for x in lines if x.kind == TREND]

    def attached(group: list[Line]) -> tuple[Line, ...]:
        seqs = {x.seq for x in group}
        return tuple(t for t in trends if t.record.details.attaches in seqs)

    changeovers = tuple(Changeover(DIRECTION[g[0].kind], g[0].record.area or "",
                                   g[0].record.circuit, g[0].record.voyage, tuple(g),
                                   attached(g))
                        for g in groups)
    shown = {t.seq for ch in changeovers for t in ch.trends}
    used: dict[str, FuelSpec] = {}
    for line in lines:
        for v in line.versions:
            for f in (v.record.fuels if v.record else ()):
                used.setdefault(f"{f.fuel.name}\n{f.fuel.bdn_ref}", f.fuel)
    apart = (*CHANGEOVER_KINDS, SCRUBBER, REPORT)
    others = tuple(x for x in lines if x.kind not in apart and x.seq not in shown)
    return Book(state.ship_name or "", state.imo_number or "", tuple(used.values()),
                changeovers, others, describe_selection(voyage, area, since, until),
                len(state.stored), state.last_seq, state.last_hash,
                tuple(x for x in lines if x.kind == SCRUBBER),
                tuple(x for x in lines if x.kind == REPORT))
