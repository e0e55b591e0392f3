"""Details of the scrubber and report entries, and every details class by its stored tag.

:class:`ScrubberDetails`: an exhaust gas cleaning system (scrubber) event as the crew
records it: the scrubber's name, what happened (:data:`SCRUBBER_EVENTS`), the washwater
mode, and for a reading of the emission ratio the SO₂ (ppm) and CO₂ (% v/v) read, the
ratio SO₂/CO₂ computed from them and, when given, the ratio limit in force (typed, or
looked up from the sulphur limit it stands for, Table 1 of [MEPC-340]) and whether the
reading is over it. The derived values are stored as computed when written and checked
again on every read, like a tank sounding's volume at 15 °C.

:class:`ReportDetails`: a document made (the fuel oil non-availability report of MARPOL
Annex VI regulation 18.2 [MARPOL-VI], say): its title, a kind word, the file's name, size
and SHA-256; the bytes are kept beside the entries under that hash
(:mod:`planner.journal.attach`), as a trend file's are.

:data:`DETAIL_TYPES` maps each stored ``type`` tag to its class, for the codec.
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass
from datetime import datetime, timedelta
from typing import ClassVar

from planner.journal.details import (
    MAX_TREND_BYTES,
    ChangeoverDetails,
    FuelDetails,
    NoteDetails,
    SampleDetails,
    SetupDetails,
    TankDetails,
    TrendDetails,
    _number,
    _text,
)

SCRUBBER_EVENTS = ("start", "stop", "mode_change", "failure", "restored", "ratio_reading")
"""What a scrubber entry records: the scrubber started or stopped, its washwater mode
changed, a failure (out of service), service restored, a reading of the SO₂/CO₂ ratio."""

EVENT_WORDS = {"start": "scrubber started", "stop": "scrubber stopped",
               "mode_change": "washwater mode changed", "failure": "SCRUBBER FAILURE",
               "restored": "scrubber back in service", "ratio_reading": "SO₂/CO₂ reading"}
"""Each event in words (a failure in capitals: it is what a reader must see first)."""

NEEDS_MODE = ("start", "mode_change")
"""Events that must name the washwater mode (the mode started in, the mode changed to)."""

SCRUBBER_MODES = ("open", "closed")
"""Washwater modes: open loop (sea water through, discharged) or closed loop."""

RATIO_LIMITS: dict[float, float] = {0.10: 4.3, 0.50: 21.7, 1.00: 43.3, 1.50: 65.0,
                                    3.50: 151.7, 4.50: 195.0}
"""Sulphur limit of the fuel [% m/m] → the SO₂ (ppm) / CO₂ (% v/v) ratio limit that stands
for it, Table 1 of [MEPC-340] (from memory). The same table is kept for the planning side
(planner/fuels/combustion.py on another branch): both are to be made one table."""

SO2_RANGE_PPM = (0.0, 5000.0)
"""SO₂ readings accepted, ppm (a typo guard: the raw exhaust of a 4.50 % fuel is some
1500 ppm; common practice)."""

CO2_RANGE_PCT = (0.1, 20.0)
"""CO₂ readings accepted, % v/v (an engine's exhaust holds some 2 to 15 %; below 0.1 % the
analyser reads air and the ratio means nothing; common practice)."""

RATIO_LIMIT_RANGE = (0.1, 500.0)
"""Ratio limits accepted as typed, ppm per % v/v (Table 1 of [MEPC-340] spans 4.3 to
195.0)."""

PLAN_FIELDS = ("time", "position")
"""What a scrubber entry may take from the plan rather than have typed."""


def _opt_float(cls: str, name: str, value: object, low: float, high: float) -> float | None:
    return None if value is None else _number(cls, name, value, low, high)


def _entry_number(cls: str, name: str, value: object) -> None:
    if value is not None and (isinstance(value, bool) or not isinstance(value, int)
                              or value < 1):
        raise ValueError(f"{cls}.{name} must be a number from 1, got {value!r}")


def ratio_limit_for(sulphur_pct: float) -> float:
    """The SO₂/CO₂ ratio limit [ppm/% v/v] standing for the sulphur limit ``sulphur_pct``
    [% m/m], Table 1 of [MEPC-340]; ``ValueError`` for a limit the table does not hold."""
    for pct, ratio in RATIO_LIMITS.items():
        if isinstance(sulphur_pct, int | float) and not isinstance(sulphur_pct, bool) \
                and math.isclose(pct, sulphur_pct, abs_tol=1e-9):
            return ratio
    raise ValueError(f"sulphur limit must be one of {', '.join(f'{p:.2f}' for p in RATIO_LIMITS)}"
                     f" % m/m (Table 1 of MEPC.340(77)), got {sulphur_pct!r}")


@dataclass(frozen=True)
class ScrubberDetails:
    """A scrubber event (see the module docstring). Make a reading with :meth:`make`.

    ``mode``: ``open`` or ``closed`` (None: not given); ``so2_ppm`` [ppm], ``co2_pct``
    [% v/v]; ``ratio`` = ``so2_ppm / co2_pct`` [ppm/% v/v]; ``ratio_limit`` [ppm/% v/v]
    and ``limit_sulphur_pct`` [% m/m] the limit in force (the latter when the limit was
    looked up from it); ``over_limit``: ``ratio > ratio_limit`` (None without a limit).
    ``plan_*`` and ``planned_*``: the plan's event when prefilled from a plan
    (``from_plan`` lists what was confirmed from it rather than typed).
    """

    TYPE: ClassVar[str] = "scrubber"
    scrubber: str
    event: str
    mode: str | None = None
    so2_ppm: float | None = None
    co2_pct: float | None = None
    ratio: float | None = None
    ratio_limit: float | None = None
    limit_sulphur_pct: float | None = None
    over_limit: bool | None = None
    remarks: str = ""
    plan_source: str = ""
    plan_event: int | None = None
    planned_utc: datetime | None = None
    planned_lat_deg: float | None = None
    planned_lon_deg: float | None = None
    planned_reason: str = ""
    from_plan: tuple[str, ...] = ()

    @classmethod
    def make(cls, scrubber: str, event: str, mode: str | None = None,
             so2_ppm: float | None = None, co2_pct: float | None = None,
             ratio_limit: float | None = None, limit_sulphur_pct: float | None = None,
             remarks: str = "", **plan: object) -> ScrubberDetails:
        """The details with the ratio, the limit (looked up from ``limit_sulphur_pct`` when
        no ``ratio_limit`` is given) and the over-limit flag worked out."""
        ratio = None
        if so2_ppm is not None and co2_pct is not None:
            so2 = _number(cls.__name__, "so2_ppm", so2_ppm, *SO2_RANGE_PPM)
            co2 = _number(cls.__name__, "co2_pct", co2_pct, *CO2_RANGE_PCT)
            ratio = so2 / co2
        if limit_sulphur_pct is not None and ratio_limit is None:
            ratio_limit = ratio_limit_for(limit_sulphur_pct)
        over = None if ratio is None or ratio_limit is None else bool(ratio > ratio_limit)
        return cls(scrubber, event, mode, so2_ppm, co2_pct, ratio, ratio_limit,
                   limit_sulphur_pct, over, remarks, **plan)

    def __post_init__(self) -> None:
        n = type(self).__name__
        _text(n, "scrubber", self.scrubber)
        if self.event not in SCRUBBER_EVENTS:
            raise ValueError(f"{n}.event must be one of {', '.join(SCRUBBER_EVENTS)}, "
                             f"got {self.event!r}")
        if self.mode is not None and self.mode not in SCRUBBER_MODES:
            raise ValueError(f"{n}.mode must be open or closed, got {self.mode!r}")
        if self.event in NEEDS_MODE and self.mode is None:
            raise ValueError(f"{n}: a {self.event} needs the washwater mode (open or closed)")
        so2 = _opt_float(n, "so2_ppm", self.so2_ppm, *SO2_RANGE_PPM)
        co2 = _opt_float(n, "co2_pct", self.co2_pct, *CO2_RANGE_PCT)
        object.__setattr__(self, "so2_ppm", so2)
        object.__setattr__(self, "co2_pct", co2)
        if (so2 is None) != (co2 is None):
            raise ValueError(f"{n}: a reading needs both SO₂ (ppm) and CO₂ (% v/v)")
        if self.event == "ratio_reading" and so2 is None:
            raise ValueError(f"{n}: a ratio reading needs SO₂ (ppm) and CO₂ (% v/v)")
        ratio = _opt_float(n, "ratio", self.ratio, 0.0, SO2_RANGE_PPM[1] / CO2_RANGE_PCT[0])
        if (ratio is None) != (so2 is None) or (ratio is not None and not math.isclose(
                ratio, so2 / co2, rel_tol=1e-9, abs_tol=1e-12)):
            raise ValueError(f"{n}.ratio must be so2_ppm / co2_pct, got {self.ratio!r}")
        object.__setattr__(self, "ratio", ratio)
        limit = _opt_float(n, "ratio_limit", self.ratio_limit, *RATIO_LIMIT_RANGE)
        object.__setattr__(self, "ratio_limit", limit)
        if self.limit_sulphur_pct is not None:
            table = ratio_limit_for(self.limit_sulphur_pct)
            object.__setattr__(self, "limit_sulphur_pct", float(self.limit_sulphur_pct))
            if limit != table:
                raise ValueError(f"{n}.ratio_limit must be {table} for a "
                                 f"{self.limit_sulphur_pct:.2f} % m/m limit, got {limit!r}")
        if limit is not None and ratio is None:
            raise ValueError(f"{n}: a ratio limit needs a reading (SO₂ and CO₂)")
        want = None if ratio is None or limit is None else ratio > limit
        if self.over_limit is not want:
            raise ValueError(f"{n}.over_limit must be {want} (ratio against its limit), "
                             f"got {self.over_limit!r}")
        _text(n, "remarks", self.remarks, empty_ok=True)
        self._check_plan(n)

    def _check_plan(self, n: str) -> None:
        _text(n, "plan_source", self.plan_source, empty_ok=True)
        _entry_number(n, "plan_event", self.plan_event)
        if (self.plan_event is None) != (not self.plan_source):
            raise ValueError(f"{n}: a plan's event needs both its file and its number")
        if self.planned_utc is not None and (not isinstance(self.planned_utc, datetime)
                                             or self.planned_utc.utcoffset() != timedelta(0)):
            raise ValueError(f"{n}.planned_utc must be a UTC time, got {self.planned_utc!r}")
        lat = _opt_float(n, "planned_lat_deg", self.planned_lat_deg, -90.0, 90.0)
        lon = _opt_float(n, "planned_lon_deg", self.planned_lon_deg, -180.0, 180.0)
        object.__setattr__(self, "planned_lat_deg", lat)
        object.__setattr__(self, "planned_lon_deg", lon)
        if (lat is None) != (lon is None):
            raise ValueError(f"{n}: a planned position needs latitude and longitude")
        _text(n, "planned_reason", self.planned_reason, empty_ok=True)
        if not isinstance(self.from_plan, tuple) or any(f not in PLAN_FIELDS
                                                        for f in self.from_plan):
            raise ValueError(f"{n}.from_plan must name fields of {PLAN_FIELDS}")
        if self.from_plan and not self.plan_source:
            raise ValueError(f"{n}.from_plan needs the plan it was taken from")
        if ((self.planned_utc is not None or lat is not None or self.planned_reason)
                and not self.plan_source):
            raise ValueError(f"{n}: planned values need the plan they come from")

    @property
    def failure(self) -> bool:
        """Whether the entry records the scrubber failing (going out of service)."""
        return self.event == "failure"


REPORT_KIND = re.compile(r"^[a-z][a-z0-9_-]{0,39}$")
"""A report's kind word: lowercase letters, digits, ``-`` and ``_``, at most 40."""

MAX_DOCUMENT_BYTES = MAX_TREND_BYTES
"""Largest document kept with a report entry, bytes (20 MiB, as a trend file)."""


@dataclass(frozen=True)
class ReportDetails:
    """A document made and kept in the journal: title, kind word (``nonavailability``), the
    file's name as made, its size [bytes] and the SHA-256 of its bytes (stored beside the
    entries under that hash, :mod:`planner.journal.attach`)."""

    TYPE: ClassVar[str] = "report"
    title: str
    report_kind: str
    file_name: str
    size_bytes: int
    sha256: str
    remarks: str = ""

    def __post_init__(self) -> None:
        n = type(self).__name__
        _text(n, "title", self.title)
        if not isinstance(self.report_kind, str) or not REPORT_KIND.match(self.report_kind):
            raise ValueError(f"{n}.report_kind must be a word of lowercase letters, digits, "
                             f"- or _ (at most 40), got {self.report_kind!r}")
        _text(n, "file_name", self.file_name)
        if isinstance(self.size_bytes, bool) or not isinstance(self.size_bytes, int) \
                or not 0 <= self.size_bytes <= MAX_DOCUMENT_BYTES:
            raise ValueError(f"{n}.size_bytes must be 0 to {MAX_DOCUMENT_BYTES}, "
                             f"got {self.size_bytes!r}")
        if not (isinstance(self.sha256, str) and len(self.sha256) == 64
                and all(c in "0123456789abcdef" for c in self.sha256)):
            raise ValueError(f"{n}.sha256 must be 64 lowercase hex digits, got {self.sha256!r}")
        _text(n, "remarks", self.remarks, empty_ok=True)


Details = (ChangeoverDetails | TankDetails | SampleDetails | NoteDetails | SetupDetails
           | FuelDetails | TrendDetails | ScrubberDetails | ReportDetails)
DETAIL_TYPES: dict[str, type] = {c.TYPE: c for c in (
    ChangeoverDetails, TankDetails, SampleDetails, NoteDetails, SetupDetails, FuelDetails,
    TrendDetails, ScrubberDetails, ReportDetails)}
"""Each stored details ``type`` tag → its class (the codec decodes by it)."""
