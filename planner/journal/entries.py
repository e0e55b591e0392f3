"""Journal entries: frozen dataclasses, checked on creation.

An :class:`Entry` is one line of the ship's record: its ``kind``, who wrote
it (rank and name as typed), when it was written, and a :class:`Record` of
what happened: the event time (UTC) and the ship's UTC offset then, the
position, area, voyage, circuit, the fuels named with their delivery-note
data, the kind's own details (tank soundings, sample and seal numbers, note
text) and, when the entry was prefilled from a plan, what was planned.

A correction is an entry of kind ``correction`` that names the entry it
corrects and carries the whole corrected record (or none, when it strikes
the entry out); the corrected entry itself is never touched.

Times are timezone-aware UTC datetimes; the ship's offset is whole minutes
east of UTC (−14 h to +14 h).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from datetime import UTC, datetime, timedelta, timezone

from planner.journal.details import (
    ADDED,
    ChangeoverDetails,
    FuelDetails,
    FuelUse,
    NoteDetails,
    SampleDetails,
    SetupDetails,
    TankDetails,
    TrendDetails,
)
from planner.journal.details_kinds import Details, ReportDetails, ScrubberDetails

SETUP = "setup"
FUEL = "fuel"
STARTED = "changeover_started"
COMPLETED = "changeover_completed"
BACK_COMMENCED = "back_commenced"
BACK_COMPLETED = "back_completed"
TANKS = "tanks"
SAMPLE = "sample"
NOTE = "note"
TREND = "trend"
SCRUBBER = "scrubber"
REPORT = "report"
CORRECTION = "correction"

CHANGEOVER_KINDS = (STARTED, COMPLETED, BACK_COMMENCED, BACK_COMPLETED)
"""The four steps: to compliant fuel (started, completed before entry or before the area
comes into force), back to regular fuel (commenced after exit or after the area ceases,
completed)."""

REG14_KINDS = (COMPLETED, BACK_COMMENCED)
"""The two moments regulation 14.6 asks to be recorded with the volume in each tank."""

DIRECTION = {STARTED: "to_compliant", COMPLETED: "to_compliant",
             BACK_COMMENCED: "to_regular", BACK_COMPLETED: "to_regular"}
"""Direction of each changeover step, as named in the plan JSON."""

FOLLOWS = {COMPLETED: STARTED, BACK_COMPLETED: BACK_COMMENCED}
"""The step each completion follows."""

LABELS = {
    SETUP: "journal set-up",
    FUEL: "fuel on board",
    STARTED: "changeover to compliant fuel started",
    COMPLETED: "changeover to compliant fuel completed",
    BACK_COMMENCED: "changeover to regular fuel commenced",
    BACK_COMPLETED: "changeover to regular fuel completed",
    TANKS: "tank soundings",
    SAMPLE: "fuel sample",
    NOTE: "note",
    TREND: "trend file attached",
    SCRUBBER: "scrubber event",
    REPORT: "document made",
    CORRECTION: "correction",
}
"""What each kind means, in words (the relation of a step to the boundary, before or after
it, is said from the facts where the entry is shown: ``describe.step_heading``)."""

DETAILS_OF = {SETUP: SetupDetails, FUEL: FuelDetails, STARTED: ChangeoverDetails,
              COMPLETED: ChangeoverDetails, BACK_COMMENCED: ChangeoverDetails,
              BACK_COMPLETED: ChangeoverDetails, TANKS: TankDetails, SAMPLE: SampleDetails,
              NOTE: NoteDetails, TREND: TrendDetails, SCRUBBER: ScrubberDetails,
              REPORT: ReportDetails}
"""The details class each (non-correction) kind carries."""

KINDS = tuple(LABELS)
CORRECTABLE = (STARTED, COMPLETED, BACK_COMMENCED, BACK_COMPLETED, TANKS, SAMPLE, NOTE, TREND,
               SCRUBBER, REPORT)
"""Kinds a correction may correct (set-up and fuel entries are superseded by new ones)."""

MAX_OFFSET_MIN = 14 * 60

BOUNDARY_EVENTS = ("enter", "exit", "comes_into_force", "ceases", "departure", "cap_change",
                   "zone_enter", "zone_exit", "scrubber_out_of_service", "scrubber_in_service",
                   "load_out_of_range", "load_in_range")
"""What a planned boundary may be (the plan JSON's ``boundary_event``, docs/json-contract.md):
a crossing (``enter``, ``exit``), a served circuit's place (``zone_*``, ``load_*``) or a
moment on the clock (the others, see
:mod:`planner.journal.events`)."""


def _aware_utc(cls: str, name: str, value: object) -> None:
    if not isinstance(value, datetime) or value.utcoffset() != timedelta(0):
        raise ValueError(f"{cls}.{name} must be a UTC datetime, got {value!r}")


def _opt_text(cls: str, name: str, value: object) -> None:
    if value is not None and (not isinstance(value, str) or not value.strip()):
        raise ValueError(f"{cls}.{name} must be None or non-empty text, got {value!r}")


@dataclass(frozen=True)
class Person:
    """Who made an entry: rank and name exactly as typed."""

    rank: str
    name: str

    def __post_init__(self) -> None:
        for f in ("rank", "name"):
            v = getattr(self, f)
            if not isinstance(v, str) or not v.strip():
                raise ValueError(f"Person.{f} must be non-empty text, got {v!r}")


@dataclass(frozen=True)
class Position:
    """A position on the globe: latitude within ±90°, longitude within ±180°."""

    lat_deg: float
    lon_deg: float

    def __post_init__(self) -> None:
        for f, limit in (("lat_deg", 90.0), ("lon_deg", 180.0)):
            v = getattr(self, f)
            if isinstance(v, bool) or not isinstance(v, int | float) or not math.isfinite(v) \
                    or abs(v) > limit:
                raise ValueError(f"Position.{f} must be within ±{limit:g}°, got {v!r}")
            object.__setattr__(self, f, float(v))


@dataclass(frozen=True)
class Planned:
    """What the plan said for this step (copied from the plan JSON when prefilled).

    ``time_utc``/``position``: the planned time and place of this step (the
    planned start, or the time the fuel at the consumers is planned to be
    compliant); ``boundary_*``: the planned boundary crossing; ``margin_h``:
    the plan's margin, hours; ``flush_h``: the modelled time from the planned
    start to compliant fuel (or back on regular fuel), hours; ``event``: what the
    boundary is (:data:`BOUNDARY_EVENTS`; None in a plan made before the key existed:
    a crossing), and ``clock_deadline`` whether it is a moment on the clock (an area
    coming into force while the ship is inside, a departure...) rather than a crossing;
    for such a moment ``boundary`` is where the ship then is.
    """

    source: str
    changeover: int
    direction: str
    area: str
    circuit: str | None
    time_utc: datetime | None
    position: Position | None
    boundary_utc: datetime | None
    boundary: Position | None
    margin_h: float | None
    flush_h: float | None = field(default=None, metadata=ADDED)
    event: str | None = field(default=None, metadata=ADDED)
    clock_deadline: bool = field(default=False, metadata=ADDED)

    def __post_init__(self) -> None:
        if self.event is not None and self.event not in BOUNDARY_EVENTS:
            raise ValueError(f"Planned.event must be one of {BOUNDARY_EVENTS}, "
                             f"got {self.event!r}")
        if not isinstance(self.clock_deadline, bool):
            raise ValueError(f"Planned.clock_deadline must be true or false, "
                             f"got {self.clock_deadline!r}")
        if not isinstance(self.source, str) or not self.source:
            raise ValueError(f"Planned.source must be text, got {self.source!r}")
        if isinstance(self.changeover, bool) or not isinstance(self.changeover, int) \
                or self.changeover < 1:
            raise ValueError(f"Planned.changeover must be >= 1, got {self.changeover!r}")
        if self.direction not in ("to_compliant", "to_regular"):
            raise ValueError(f"Planned.direction must be to_compliant or to_regular, "
                             f"got {self.direction!r}")
        _opt_text("Planned", "area", self.area)
        _opt_text("Planned", "circuit", self.circuit)
        for f in ("time_utc", "boundary_utc"):
            if getattr(self, f) is not None:
                _aware_utc("Planned", f, getattr(self, f))
        for f in ("position", "boundary"):
            if getattr(self, f) is not None and not isinstance(getattr(self, f), Position):
                raise ValueError(f"Planned.{f} must be a Position")
        if self.margin_h is not None and (isinstance(self.margin_h, bool) or not isinstance(
                self.margin_h, int | float) or not math.isfinite(self.margin_h)):
            raise ValueError(f"Planned.margin_h must be a number, got {self.margin_h!r}")
        if self.margin_h is not None:
            object.__setattr__(self, "margin_h", float(self.margin_h))
        if self.flush_h is not None and (isinstance(self.flush_h, bool) or not isinstance(
                self.flush_h, int | float) or not 0.0 <= self.flush_h <= 1000.0):
            raise ValueError(f"Planned.flush_h must be 0 to 1000 h, got {self.flush_h!r}")


AS_PLANNED_FIELDS = ("time", "position")


@dataclass(frozen=True)
class Record:
    """What happened: the part of an entry a correction replaces.

    ``as_planned`` lists the fields the crew confirmed from the plan rather
    than typed (``"time"``, ``"position"``); ``confirmed`` the warnings raised
    when the entry was made that the writer confirmed with ``--confirm`` (kept
    in the entry and printed with it).
    """

    time_utc: datetime
    ship_offset_min: int
    position: Position | None
    area: str | None
    voyage: str | None
    circuit: str | None
    fuels: tuple[FuelUse, ...]
    details: Details
    planned: Planned | None = None
    as_planned: tuple[str, ...] = ()
    confirmed: tuple[str, ...] = field(default=(), metadata=ADDED)

    def __post_init__(self) -> None:
        _aware_utc("Record", "time_utc", self.time_utc)
        if not isinstance(self.confirmed, tuple) or not all(
                isinstance(w, str) and w.strip() for w in self.confirmed):
            raise ValueError("Record.confirmed must be a tuple of warning texts")
        m = self.ship_offset_min
        if isinstance(m, bool) or not isinstance(m, int) or abs(m) > MAX_OFFSET_MIN:
            raise ValueError(f"Record.ship_offset_min must be whole minutes within ±14 h, "
                             f"got {m!r}")
        if self.position is not None and not isinstance(self.position, Position):
            raise ValueError("Record.position must be a Position or None")
        for f in ("area", "voyage", "circuit"):
            _opt_text("Record", f, getattr(self, f))
        if not isinstance(self.fuels, tuple) or not all(isinstance(f, FuelUse)
                                                        for f in self.fuels):
            raise ValueError("Record.fuels must be a tuple of FuelUse")
        if self.planned is not None and not isinstance(self.planned, Planned):
            raise ValueError("Record.planned must be Planned or None")
        if not isinstance(self.as_planned, tuple) or any(
                a not in AS_PLANNED_FIELDS for a in self.as_planned):
            raise ValueError(f"Record.as_planned must name fields of {AS_PLANNED_FIELDS}")
        if self.as_planned and self.planned is None:
            raise ValueError("Record.as_planned needs the planned values")

    @property
    def ship_tz(self) -> timezone:
        """The ship's time zone as a fixed offset."""
        return timezone(timedelta(minutes=self.ship_offset_min))

    def fuels_as(self, role: str) -> tuple[FuelUse, ...]:
        """The fuels named in ``role`` (``to``, ``from``, ``subject``)."""
        return tuple(f for f in self.fuels if f.role == role)


@dataclass(frozen=True)
class Correction:
    """What a correction entry points at: the entry number, its kind, why; or a strike-out."""

    corrects: int
    of_kind: str
    reason: str
    void: bool = False

    def __post_init__(self) -> None:
        if isinstance(self.corrects, bool) or not isinstance(self.corrects, int) \
                or self.corrects < 1:
            raise ValueError(f"Correction.corrects must be an entry number, got {self.corrects!r}")
        if self.of_kind not in CORRECTABLE:
            raise ValueError(f"Correction.of_kind must be one of {CORRECTABLE}, "
                             f"got {self.of_kind!r}")
        if not isinstance(self.reason, str) or not self.reason.strip():
            raise ValueError("Correction.reason must be non-empty text")
        if not isinstance(self.void, bool):
            raise ValueError("Correction.void must be true or false")


@dataclass(frozen=True)
class Entry:
    """One journal entry (see the module docstring)."""

    kind: str
    who: Person
    written_utc: datetime
    record: Record | None
    correction: Correction | None = None

    def __post_init__(self) -> None:
        if self.kind not in KINDS:
            raise ValueError(f"Entry.kind must be one of {KINDS}, got {self.kind!r}")
        if not isinstance(self.who, Person):
            raise ValueError("Entry.who must be a Person")
        _aware_utc("Entry", "written_utc", self.written_utc)
        if self.kind == CORRECTION:
            c = self.correction
            if not isinstance(c, Correction):
                raise ValueError("a correction entry needs its Correction")
            if c.void != (self.record is None):
                raise ValueError("a correction carries the corrected record unless it voids")
            subject = c.of_kind
        else:
            if self.correction is not None:
                raise ValueError(f"a {self.kind} entry carries no Correction")
            subject = self.kind
        if self.record is None:
            return
        if not isinstance(self.record, Record):
            raise ValueError("Entry.record must be a Record")
        _check_record(subject, self.record)

    @property
    def subject_kind(self) -> str:
        """The kind this entry records: its own, or for a correction the corrected one's."""
        return self.correction.of_kind if self.correction else self.kind


def _check_record(kind: str, r: Record) -> None:
    """The rules of each kind: the details class, and what regulation 14.6 needs."""
    want = DETAILS_OF[kind]
    if not isinstance(r.details, want):
        raise ValueError(f"a {kind} entry carries {want.__name__}, got "
                         f"{type(r.details).__name__}")
    if kind in CHANGEOVER_KINDS:
        missing = [name for name, v in (("position", r.position), ("area", r.area)) if v is None]
        if not r.fuels_as("to"):
            missing.append("the fuel changed to")
        if missing:
            raise ValueError(f"a {LABELS[kind]} entry needs {', '.join(missing)}")
        if kind in REG14_KINDS and not r.details.tanks:
            raise ValueError(f"a {LABELS[kind]} entry needs the volume of compliant fuel in "
                             "each tank (regulation 14.6)")
        if r.details.follows is not None and kind not in FOLLOWS:
            raise ValueError(f"a {LABELS[kind]} entry follows no other step")
    if kind == SCRUBBER and r.position is None:
        raise ValueError("a scrubber event entry needs the position")
    if r.planned is not None and kind in DIRECTION and r.planned.direction != DIRECTION[kind]:
        raise ValueError(f"a {LABELS[kind]} entry cannot carry a plan for a "
                         f"{r.planned.direction} changeover")


def utc_now() -> datetime:
    """Now, UTC, to the second (the written-at time of new entries)."""
    return datetime.now(UTC).replace(microsecond=0)
