"""The journal as it stands: a fold over its entries, in order.

:class:`JournalState` knows the ship (name, IMO number), the tank names and
fuels registered so far (set up from a ship file, also its circuits and
scrubbers), the ship's last UTC offset and voyage, and for every entry its
corrections: :meth:`JournalState.current` is the record as it now reads (the
latest correction, or None when struck out), while the original and every
earlier version stay available for printing.
"""

from __future__ import annotations

from collections.abc import Iterable, Iterator
from dataclasses import dataclass

from planner.journal.canonical import GENESIS_HASH
from planner.journal.details import FuelSpec
from planner.journal.entries import (
    CORRECTION,
    FOLLOWS,
    FUEL,
    SETUP,
    Entry,
    Record,
)


@dataclass(frozen=True)
class Stored:
    """An entry as stored: its number, its hash and the hash it chains to."""

    seq: int
    hash: str
    prev_hash: str
    entry: Entry


class JournalState:
    """Everything later entries are checked against (build with :meth:`of`)."""

    def __init__(self) -> None:
        self.ship_name: str | None = None
        self.imo_number: str | None = None
        self.tanks: list[str] = []
        self.capacity_m3: dict[str, float] = {}
        self.circuits: list[str] = []
        self.scrubbers: list[str] = []
        self.fuels: dict[str, FuelSpec] = {}
        self.stored: dict[int, Stored] = {}
        self.corrections: dict[int, list[int]] = {}
        self.last_seq = 0
        self.last_hash = GENESIS_HASH
        self.last_offset_min: int | None = None
        self.last_voyage: str | None = None

    @classmethod
    def of(cls, stored: Iterable[Stored]) -> JournalState:
        """The state after ``stored`` (in entry order)."""
        state = cls()
        for s in stored:
            state.add(s)
        return state

    def add(self, s: Stored) -> None:
        """Take in the next entry."""
        self.stored[s.seq] = s
        self.last_seq, self.last_hash = s.seq, s.hash
        e = s.entry
        if e.kind == CORRECTION and e.correction is not None:
            root = self.root(e.correction.corrects)
            self.corrections.setdefault(root, []).append(s.seq)
        r = e.record
        if e.kind == SETUP and r is not None:
            d = r.details
            self.ship_name = d.ship_name or self.ship_name
            self.imo_number = d.imo_number or self.imo_number
            self.tanks += [t for t in d.tanks if t not in self.tanks]
            self.capacity_m3.update({c.tank: c.capacity_m3 for c in d.capacities})
            self.circuits += [c for c in d.circuits if c not in self.circuits]
            self.scrubbers += [x for x in d.scrubbers if x not in self.scrubbers]
            self.last_offset_min = r.ship_offset_min
        elif e.kind == FUEL and r is not None:
            self.fuels[r.details.fuel.name] = r.details.fuel
        elif r is not None and e.kind != CORRECTION:
            self.last_offset_min = r.ship_offset_min
            self.last_voyage = r.voyage or self.last_voyage

    def root(self, seq: int) -> int:
        """The original entry a (chain of) correction(s) goes back to."""
        seen = set()
        while seq in self.stored and seq not in seen:
            seen.add(seq)
            e = self.stored[seq].entry
            if e.kind != CORRECTION or e.correction is None:
                return seq
            seq = e.correction.corrects
        return seq

    def kind_of(self, seq: int) -> str:
        """The kind an entry (or the entry a correction corrects) records."""
        return self.stored[self.root(seq)].entry.subject_kind

    def versions(self, seq: int) -> list[Stored]:
        """The original entry then each of its corrections, in order."""
        root = self.root(seq)
        return [self.stored[root]] + [self.stored[c] for c in self.corrections.get(root, [])]

    def current(self, seq: int) -> Record | None:
        """The record of an original entry as it now reads (None when struck out)."""
        return self.versions(seq)[-1].entry.record

    def originals(self, kinds: Iterable[str] | None = None) -> Iterator[Stored]:
        """The original (non-correction) entries, optionally of some kinds, in order."""
        want = set(kinds) if kinds is not None else None
        for s in self.stored.values():
            if s.entry.kind != CORRECTION and (want is None or s.entry.kind in want):
                yield s

    def live(self, kinds: Iterable[str]) -> Iterator[tuple[Stored, Record]]:
        """(original, current record) of the entries of ``kinds`` not struck out."""
        for s in self.originals(kinds):
            r = self.current(s.seq)
            if r is not None:
                yield s, r

    def completions_of(self, start_seq: int) -> list[tuple[Stored, Record]]:
        """The live completions whose current record follows the start ``start_seq``."""
        kind = self.kind_of(start_seq)
        done = [k for k, v in FOLLOWS.items() if v == kind]
        return [(s, r) for s, r in self.live(done) if r.details.follows == start_seq]

    def open_start(self, completion_kind: str, voyage: str | None, area: str | None,
                   circuit: str | None) -> tuple[Stored, Record] | None:
        """The latest live start the completion may follow: same voyage, area and circuit
        where given, and not yet completed."""
        want = FOLLOWS[completion_kind]
        found = None
        for s, r in self.live([want]):
            if voyage is not None and r.voyage is not None and r.voyage != voyage:
                continue
            if area is not None and r.area != area:
                continue
            if circuit is not None and r.circuit != circuit:
                continue
            if self.completions_of(s.seq):
                continue
            found = (s, r)
        return found

    def latest_live(self, kind: str, voyage: str | None, area: str | None
                    ) -> tuple[Stored, Record] | None:
        """The latest live entry of ``kind`` in the voyage and area (where given)."""
        found = None
        for s, r in self.live([kind]):
            if (voyage is None or r.voyage in (None, voyage)) and (area is None
                                                                   or r.area == area):
                found = (s, r)
        return found
