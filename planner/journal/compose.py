"""Building entries from what the crew typed, against the journal as it stands.

Each ``*_entry`` function takes the typed values (:class:`Typed`, strings as
given) and returns a function of the :class:`JournalState` that builds the
:class:`Entry`; :meth:`planner.journal.store.Journal.append` runs it inside
its transaction, so the defaults below are read from the same journal the
entry is chained into, and any refusal writes nothing.

Defaults, each shown back to the user after the entry is written:

- time: ``--at``, else (with ``--as-planned``) the planned time, else now;
- ship's offset: ``--tz``, else the offset written on ``--at``, else (with the time
  taken from the plan) the offset of the plan's ship's time for that step, else the
  last entry's;
- voyage: ``--voyage``, else the last entry's;
- area and circuit: typed, else the plan's, else the start being completed;
- a completion follows the latest open start of the same voyage, area and
  circuit (``--follows N`` to name it), and takes its fuels;
- the changeover back takes as compliant fuel the one the last completion
  changed to;
- a tank's fuel: ``/FUEL`` on the tank, else the entry's compliant fuel.
"""

from __future__ import annotations

import dataclasses
from collections.abc import Callable
from dataclasses import dataclass

from geo.errors import InputError
from planner.journal.checks import check_correction
from planner.journal.confirm import confirmed, entry_warnings
from planner.journal.details import (
    ChangeoverDetails,
    FuelSpec,
    FuelUse,
    NoteDetails,
    SampleDetails,
    TankDetails,
    TankReading,
)
from planner.journal.entries import (
    BACK_COMMENCED,
    BACK_COMPLETED,
    COMPLETED,
    CORRECTION,
    FOLLOWS,
    NOTE,
    REG14_KINDS,
    SAMPLE,
    TANKS,
    Correction,
    Entry,
    Person,
    Planned,
    Record,
    utc_now,
)
from planner.journal.inputs import (
    POS_EXPECTED,
    parse_at,
    parse_position,
    parse_tank,
    parse_tz,
    written_time,
)
from planner.journal.plan_link import plan_areas, planned_step
from planner.journal.state import JournalState

Builder = Callable[[JournalState], Entry]


@dataclass(frozen=True)
class Typed:
    """The values typed for an entry (None or empty: not given)."""

    rank: str | None = None
    name: str | None = None
    at: str | None = None
    tz: str | None = None
    pos: str | None = None
    area: str | None = None
    voyage: str | None = None
    circuit: str | None = None
    fuels: tuple[str, ...] = ()
    from_fuels: tuple[str, ...] = ()
    tanks: tuple[str, ...] = ()
    remarks: str | None = None
    follows: int | None = None
    plan: str | None = None
    changeover: int | None = None
    as_planned: bool = False
    confirm: bool = False


def _who(t: Typed) -> Person:
    for opt, v, env in (("--rank", t.rank, "CHANGEOVER_RANK"), ("--name", t.name,
                                                                "CHANGEOVER_NAME")):
        if not v or not v.strip():
            raise InputError(opt, "", None, f"who makes the entry, as you sign (or set {env})")
    return Person(t.rank.strip(), t.name.strip())


def _when(t: Typed, state: JournalState, planned: Planned | None,
          plan_offset_min: int | None = None):
    """(UTC time, ship's offset in minutes, fields taken from the plan); ``plan_offset_min``
    [min east of UTC]: the offset the plan gives for the planned time, taken with it."""
    taken: list[str] = []
    written = None
    if t.at:
        moment, written = parse_at(t.at)
    elif t.as_planned and planned is not None:
        if planned.time_utc is None:
            raise InputError("--at", "", None, "the time: the plan has none for this step")
        moment = written_time(planned.time_utc)
        taken.append("time")
    else:
        moment = utc_now()
    if t.tz:
        offset = parse_tz(t.tz)
    elif written is not None:
        offset = written
    elif taken and plan_offset_min is not None:
        offset = plan_offset_min
    elif state.last_offset_min is not None:
        offset = state.last_offset_min
    else:
        raise InputError("--tz", "", None, "the ship's time as a UTC offset, e.g. +02:00")
    return moment, offset, taken


def _where(t: Typed, planned: Planned | None, required: bool, taken: list[str]):
    if t.pos:
        return parse_position(t.pos)
    if t.as_planned and planned is not None and planned.position is not None:
        taken.append("position")
        return planned.position
    if required:
        hint = " (or --as-planned to confirm the planned one)" if (
            planned is not None and planned.position is not None) else ""
        raise InputError("--pos", "", None, POS_EXPECTED + hint)
    return None


def _fuel(state: JournalState, name: str, option: str) -> FuelSpec:
    if name not in state.fuels:
        known = ", ".join(state.fuels) or "none yet"
        raise InputError(option, "", name, f"a fuel registered in the journal ({known}; add one "
                                           "with changeover log fuel)")
    return state.fuels[name]


def _uses(state: JournalState, names: tuple[str, ...], role: str, option: str):
    return tuple(FuelUse(role, _fuel(state, n.strip(), option)) for n in names)


def _tanks(state: JournalState, texts: tuple[str, ...], fuels: tuple[FuelUse, ...]):
    readings: list[TankReading] = []
    for text in texts:
        ti = parse_tank(text)
        if ti.fuel is not None:
            fuel = _fuel(state, ti.fuel, "--tank")
        elif len({f.fuel.name for f in fuels}) == 1:
            fuel = fuels[0].fuel
        else:
            raise InputError("--tank", "", text, "the tank's fuel: add /FUEL, e.g. "
                                                 f"\"{ti.tank}=...@.../MGO\", or give one --fuel")
        if any(r.tank == ti.tank for r in readings):
            raise InputError("--tank", "", ti.tank, "each tank once in an entry")
        try:
            readings.append(TankReading.measure(ti.tank, fuel.name, ti.volume_m3,
                                                ti.temperature_c, fuel.density15_kg_m3))
        except ValueError as exc:
            raise InputError("--tank", "", text, str(exc).split(" must be ")[-1]) from None
    return tuple(readings)


def _planned(kind: str, t: Typed) -> tuple[Planned | None, int | None]:
    """The plan's values for the step, and the ship's offset [min] the plan gives then."""
    if t.plan is None:
        if t.changeover is not None or t.as_planned:
            raise InputError("--from-plan", "", None, "the plan JSON to take the "
                                                      "changeover from")
        return None, None
    return planned_step(kind, t.plan, t.changeover, t.circuit)


def _confirmed(kind: str, record: Record, state: JournalState, t: Typed) -> Record:
    """The record with its warnings at entry kept, or refused without ``--confirm``."""
    areas = plan_areas(t.plan) if t.plan else ()
    found = entry_warnings(kind, record, state, utc_now(), areas)
    keep = confirmed(found, t.confirm)
    return dataclasses.replace(record, confirmed=keep) if keep else record


def _entry(kind: str, who: Person, record: Record | None, correction: Correction | None = None):
    try:
        return Entry(kind, who, utc_now(), record, correction)
    except ValueError as exc:
        raise InputError("entry", "", kind, str(exc)) from None


def changeover_entry(kind: str, t: Typed) -> Builder:
    """A started / completed / back-commenced / back-completed entry (see module defaults)."""
    def make(state: JournalState) -> Entry:
        who = _who(t)
        planned, plan_offset = _planned(kind, t)
        moment, offset, taken = _when(t, state, planned, plan_offset)
        position = _where(t, planned, True, taken)
        voyage = t.voyage or state.last_voyage
        area = t.area or (planned.area if planned else None)
        circuit = t.circuit or (planned.circuit if planned else None)
        follows, prior = None, None
        if kind in FOLLOWS:
            if t.follows is not None:
                follows = t.follows
                prior = state.current(follows) if follows in state.stored else None
            else:
                found = state.open_start(kind, voyage, area, circuit)
                if found is not None:
                    follows, prior = found[0].seq, found[1]
            if prior is not None:
                area, circuit = area or prior.area, circuit or prior.circuit
                voyage = voyage or prior.voyage
        if not area:
            raise InputError("--area", "", None, "the control area, e.g. \"Corran Sea ECA\"")
        to = _uses(state, t.fuels, "to", "--fuel")
        frm = _uses(state, t.from_fuels, "from", "--from-fuel")
        if prior is not None:
            to = to or prior.fuels_as("to")
            frm = frm or prior.fuels_as("from")
        if kind == BACK_COMMENCED and not frm:
            done = state.latest_live(COMPLETED, voyage, area)
            frm = tuple(FuelUse("from", f.fuel) for f in done[1].fuels_as("to")) if done else ()
        if not to:
            raise InputError("--fuel", "", None, "the fuel changed to, by its name in the "
                                                 f"journal ({', '.join(state.fuels) or 'none'})")
        compliant = frm if kind in (BACK_COMMENCED, BACK_COMPLETED) else to
        tanks = _tanks(state, t.tanks, compliant)
        if kind in REG14_KINDS and not tanks:
            raise InputError("--tank", "", None, "the volume of compliant fuel in each tank "
                                                 "(regulation 14.6), e.g. \"MGO service=12.5@32\"")
        details = ChangeoverDetails(tanks, (t.remarks or "").strip(), follows)
        record = Record(moment, offset, position, area, voyage, circuit, to + frm, details,
                        planned, tuple(taken))
        return _entry(kind, who, _confirmed(kind, record, state, t))
    return make


def _simple(kind: str, t: Typed, details_of: Callable[[JournalState, tuple], object]) -> Builder:
    def make(state: JournalState) -> Entry:
        who = _who(t)
        moment, offset, _ = _when(t, state, None)
        position = _where(t, None, False, [])
        fuels = _uses(state, t.fuels, "subject", "--fuel")
        details = details_of(state, fuels)
        record = Record(moment, offset, position, t.area, t.voyage or state.last_voyage,
                        t.circuit, fuels, details)
        return _entry(kind, who, _confirmed(kind, record, state, t))
    return make


def tanks_entry(t: Typed) -> Builder:
    """Tank soundings (at least one ``--tank``)."""
    def details(state: JournalState, fuels: tuple) -> TankDetails:
        if not t.tanks:
            raise InputError("--tank", "", None, "at least one tank sounding")
        return TankDetails(_tanks(state, t.tanks, fuels), (t.remarks or "").strip())
    return _simple(TANKS, t, details)


def sample_entry(t: Typed, number: str | None, seal: str | None, point: str | None) -> Builder:
    """A fuel sample drawn: sample number and seal number required."""
    def details(state: JournalState, fuels: tuple) -> SampleDetails:
        for opt, v in (("--number", number), ("--seal", seal)):
            if not v or not v.strip():
                raise InputError(opt, "", None, "the number on the sample label and its seal")
        return SampleDetails(number.strip(), seal.strip(), (point or "").strip(),
                             (t.remarks or "").strip())
    return _simple(SAMPLE, t, details)


def note_entry(t: Typed, text: str) -> Builder:
    """A note in words."""
    def details(state: JournalState, fuels: tuple) -> NoteDetails:
        if not text or not text.strip():
            raise InputError("note", "text", None, "the note's text")
        return NoteDetails(text.strip())
    return _simple(NOTE, t, details)


def correction_entry(number: int, t: Typed, reason: str | None, void: bool = False,
                     text: str | None = None, sample_number: str | None = None,
                     seal: str | None = None, point: str | None = None,
                     changes: Callable[[object], object] | None = None) -> Builder:
    """A correction of entry ``number``: the given values replace those of the version
    corrected; the original stays. ``void`` strikes the entry out; ``changes`` turns the
    details (with the common changes made) into the corrected ones (a scrubber's readings,
    :func:`planner.journal.scrubber.scrubber_changes`; a report's title)."""
    def make(state: JournalState) -> Entry:
        who = _who(t)
        if not reason or not reason.strip():
            raise InputError("--reason", "", None, "why the entry is corrected")
        check_correction(state, number)
        kind = state.kind_of(number)
        corrected = state.stored[number].entry
        base = corrected.record if corrected.kind == CORRECTION else state.current(number)
        if base is None:
            raise InputError("correct", "entry number", number, "an entry not struck out")
        if void:
            return _entry(CORRECTION, who, None, Correction(number, kind, reason.strip(), True))
        record = _corrected(state, kind, base, t, text, sample_number, seal, point)
        if changes is not None:
            record = dataclasses.replace(record, details=changes(record.details))
        if record == base:
            raise InputError("correct", "", number, "the corrected values (--at, --pos, --tank, "
                                                    "--fuel, --area, --text, ...) or --void")
        return _entry(CORRECTION, who, record, Correction(number, kind, reason.strip()))
    return make


def _corrected(state: JournalState, kind: str, base: Record, t: Typed, text: str | None,
               sample_number: str | None, seal: str | None, point: str | None) -> Record:
    ch: dict[str, object] = {}
    taken = [a for a in base.as_planned]
    if t.at:
        ch["time_utc"], written = parse_at(t.at)
        ch["ship_offset_min"] = written if written is not None else base.ship_offset_min
        taken = [a for a in taken if a != "time"]
    if t.tz:
        ch["ship_offset_min"] = parse_tz(t.tz)
    if t.pos:
        ch["position"] = parse_position(t.pos)
        taken = [a for a in taken if a != "position"]
    for f in ("area", "voyage", "circuit"):
        if getattr(t, f):
            ch[f] = getattr(t, f).strip()
    fuels = base.fuels
    role = "subject" if kind in (TANKS, SAMPLE, NOTE) else "to"
    if t.fuels:
        fuels = tuple(f for f in fuels if f.role != role) + _uses(state, t.fuels, role, "--fuel")
    if t.from_fuels:
        fuels = tuple(f for f in fuels if f.role != "from") + _uses(state, t.from_fuels, "from",
                                                                     "--from-fuel")
    ch["fuels"] = fuels
    d = base.details
    dch: dict[str, object] = {}
    if t.tanks and hasattr(d, "tanks"):
        comp = tuple(f for f in fuels if f.role == ("from" if kind in (BACK_COMMENCED,
                                                                      BACK_COMPLETED) else role))
        dch["tanks"] = _tanks(state, t.tanks, comp)
    if t.remarks is not None and hasattr(d, "remarks"):
        dch["remarks"] = t.remarks.strip()
    for field, v in (("text", text), ("sample_number", sample_number), ("seal_number", seal),
                     ("point", point)):
        if v is not None and hasattr(d, field):
            dch[field] = v.strip()
    if t.follows is not None and hasattr(d, "follows"):
        dch["follows"] = t.follows
    try:
        ch["details"] = dataclasses.replace(d, **dch)
        ch["as_planned"] = tuple(taken)
        return dataclasses.replace(base, **ch)
    except ValueError as exc:
        raise InputError("correct", "", kind, str(exc)) from None

