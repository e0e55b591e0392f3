"""Rules an entry must meet against the journal as it stands, checked inside the append.

Each refusal is one :class:`geo.errors.InputError` naming the option the
value came from, so the command line prints one line and nothing is written:
an unknown tank, circuit or scrubber (when the ship file named them), a
sounding above the tank's capacity (when the ship file gave it), a fuel not
registered, a correction of an entry that does not exist (or of the wrong
kind), a completion timed before its start (or a start corrected to after its
completion), a first entry that is not the ship's set-up.
"""

from __future__ import annotations

from geo.errors import InputError
from planner.common.timefmt import format_utc
from planner.journal.codec import encode
from planner.journal.details_kinds import ScrubberDetails
from planner.journal.entries import (
    CORRECTABLE,
    CORRECTION,
    FOLLOWS,
    LABELS,
    SETUP,
    Entry,
    Record,
)
from planner.journal.state import JournalState


def check_entry(state: JournalState, entry: Entry) -> None:
    """Raise :class:`InputError` unless ``entry`` may follow the entries in ``state``."""
    if state.last_seq == 0:
        d = entry.record.details if entry.record else None
        if entry.kind != SETUP or d is None or not d.ship_name or not d.imo_number:
            raise InputError("--journal", "entry 1", entry.kind,
                             "the ship's set-up first (changeover log init --ship --imo)")
    root = None
    if entry.kind == CORRECTION and entry.correction is not None:
        root = check_correction(state, entry.correction.corrects, entry.correction.of_kind)
    check_lengths(entry)
    if entry.record is not None:
        check_tanks(state, entry.record)
        check_circuit(state, entry.record)
        check_scrubber(state, entry.record)
        check_order(state, entry.subject_kind, entry.record, root)


NAME_CHARS = 120
"""Longest name, number or reference an entry holds (a rank, a tank, an area, a seal...);
only the free text (:data:`FREE_TEXT`) may be longer."""

FREE_TEXT = {"text": "the note", "remarks": "--remarks", "reason": "--reason",
             "supplier": "--supplier", "confirmed": "--confirm",
             "planned_reason": "the plan's reason"}
"""Fields of free text, of any length (printed in full across pages)."""


def check_lengths(entry: Entry) -> None:
    """Every text of the entry but its free text is at most :data:`NAME_CHARS` long."""
    def walk(value: object, key: str) -> None:
        if isinstance(value, dict):
            for k, v in value.items():
                if k not in FREE_TEXT:
                    walk(v, k)
        elif isinstance(value, list):
            for v in value:
                walk(v, key)
        elif isinstance(value, str) and len(value) > NAME_CHARS:
            raise InputError(key, "", value[:40] + "…", f"at most {NAME_CHARS} characters "
                                                        "(only notes, remarks and reasons "
                                                        "may be longer)")
    walk(encode(entry), "entry")


def check_correction(state: JournalState, corrects: int, of_kind: str | None = None) -> int:
    """The original entry number a correction of entry ``corrects`` goes back to, after
    checking that it exists, may be corrected and (if given) is of kind ``of_kind``."""
    if corrects not in state.stored:
        span = f"1 to {state.last_seq}" if state.last_seq else "none yet"
        raise InputError("correct", "entry number", corrects,
                         f"the number of an entry in this journal ({span})")
    root = state.root(corrects)
    kind = state.kind_of(root)
    if kind not in CORRECTABLE:
        raise InputError("correct", "entry number", corrects,
                         f"an entry that can be corrected: a {LABELS[kind]} entry is "
                         "superseded by a new one (changeover log setup / log fuel)")
    if of_kind is not None and of_kind != kind:
        raise InputError("correct", "entry number", corrects,
                         f"a {LABELS[of_kind]} entry (it is a {LABELS[kind]} entry)")
    return root


def check_tanks(state: JournalState, r: Record) -> None:
    """Every tank named must be one the journal knows (when it knows any)."""
    tanks = getattr(r.details, "tanks", ())
    if not state.tanks or not tanks or isinstance(tanks[0], str):
        return
    for t in tanks:
        if t.tank not in state.tanks:
            raise InputError("--tank", "", t.tank,
                             f"one of the journal's tanks: {', '.join(state.tanks)} "
                             "(add more with changeover log setup --tank)")
        cap = state.capacity_m3.get(t.tank)
        if cap is not None and t.volume_m3 > cap:
            raise InputError("--tank", t.tank, f"{t.volume_m3:g} m³",
                             f"at most the tank's capacity, {cap:g} m³ (from the ship file)")


def check_circuit(state: JournalState, r: Record) -> None:
    """A circuit named must be one of the ship file's (when the journal was set up from it)."""
    if state.circuits and r.circuit is not None and r.circuit not in state.circuits:
        raise InputError("--circuit", "", r.circuit,
                         f"one of the ship's circuits: {', '.join(state.circuits)}")


def check_scrubber(state: JournalState, r: Record) -> None:
    """A scrubber named must be one of the ship file's (when the journal was set up from a
    ship file that named its scrubbers), or several of them as a plan relies on them together
    on one circuit (``"a + b"``, :func:`planner.voyage.scrubbing.joint_scrubber`)."""
    name = r.details.scrubber if isinstance(r.details, ScrubberDetails) else None
    if not state.scrubbers or name is None:
        return
    if name not in state.scrubbers and not all(
            part in state.scrubbers for part in name.split(" + ")):
        raise InputError("--scrubber", "", name,
                         f"one of the ship's scrubbers: {', '.join(state.scrubbers)}")


def check_order(state: JournalState, kind: str, r: Record, root: int | None) -> None:
    """A completion is not before the start it follows; a start not after its completions."""
    follows = getattr(r.details, "follows", None)
    if kind in FOLLOWS and follows is not None:
        if follows not in state.stored or state.kind_of(follows) != FOLLOWS[kind]:
            raise InputError("--follows", "", follows,
                             f"the number of a {LABELS[FOLLOWS[kind]]} entry")
        start = state.current(follows)
        if start is None:
            raise InputError("--follows", "", follows, "an entry that is not struck out")
        if r.time_utc < start.time_utc:
            raise InputError("--at", "", format_utc(r.time_utc),
                             f"a time at or after the start of this changeover "
                             f"(entry {follows}, {format_utc(start.time_utc)})")
    if root is not None and kind in FOLLOWS.values():
        for s, done in state.completions_of(root):
            if done.time_utc < r.time_utc:
                raise InputError("--at", "", format_utc(r.time_utc),
                                 f"a time at or before the completion of this changeover "
                                 f"(entry {s.seq}, {format_utc(done.time_utc)})")
