"""What each kind of journal entry holds beyond time and place: frozen, checked on creation.

Units: volumes in m³, temperatures in °C, densities in kg/m³ at 15 °C,
sulphur in % m/m, masses in tonnes. A bad value raises ``ValueError`` naming
the field and the value; the command line turns it into one
:class:`geo.errors.InputError` line.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from datetime import date, datetime, timedelta
from typing import ClassVar

from planner.common.imo import imo_check_digit, valid_imo  # noqa: F401  (re-exported)
from planner.fuels.volume import (
    TABLE_54B_MAX_DENSITY_KG_M3,
    TABLE_54B_MIN_DENSITY_KG_M3,
    standard_volume_m3,
    volume_correction_factor,
)

STORED_MAX_SULPHUR_PCT = 5.0
"""The highest sulphur a stored fuel entry may hold [% m/m]: journals written while the
entry ceiling was 5.0 % must still read whole (the journal never loses an entry). New
entries are refused above :data:`planner.fuels.fuel.MAX_SULPHUR_PCT` (4.50 %) when they
are composed (:mod:`planner.journal.compose_setup`)."""

MAX_TANK_VOLUME_M3 = 1e5
"""Largest tank volume accepted, m³ (a typo guard, not a ship limit)."""

TANK_TEMPERATURE_RANGE_C = (-10.0, 150.0)
"""Temperatures accepted for a sounding, °C (as in the voyage file)."""


MAX_BUNKER_T = 1e6
"""Largest quantity bunkered accepted, tonnes (a typo guard)."""

ADDED = {"omit_default": True}
"""Metadata of a field added after journals were first written: the codec leaves it out of
the stored JSON while it holds its default, so every entry written before the field existed
reads back, and hashes, exactly as written."""


def _opt_number(cls: str, name: str, value: object, low: float, high: float) -> float | None:
    return None if value is None else _number(cls, name, value, low, high)


def _iso_day(cls: str, name: str, value: object) -> None:
    if value == "":
        return
    try:
        ok = isinstance(value, str) and date.fromisoformat(value).isoformat() == value
    except ValueError:
        ok = False
    if not ok:
        raise ValueError(f"{cls}.{name} must be a date YYYY-MM-DD, got {value!r}")


def _text(cls: str, name: str, value: object, *, empty_ok: bool = False) -> None:
    if not isinstance(value, str) or (not empty_ok and not value.strip()):
        raise ValueError(f"{cls}.{name} must be {'text' if empty_ok else 'non-empty text'}, "
                         f"got {value!r}")


def _number(cls: str, name: str, value: object, low: float, high: float) -> float:
    if isinstance(value, bool) or not isinstance(value, int | float) or not math.isfinite(value):
        raise ValueError(f"{cls}.{name} must be a finite number, got {value!r}")
    if not low <= value <= high:
        raise ValueError(f"{cls}.{name} must be from {low:g} to {high:g}, got {value!r}")
    return float(value)


@dataclass(frozen=True)
class FuelSpec:
    """A fuel on board as its bunker delivery note (BDN) states it."""

    name: str                 # the ship's name for it, e.g. "MGO"
    grade: str                # e.g. "DMA" (ISO 8217); may be empty
    sulphur_pct: float        # % m/m, from the delivery note
    density15_kg_m3: float    # kg/m³ at 15 °C, from the delivery note
    bdn_ref: str              # delivery-note number or reference
    # the other items of a bunker delivery note (MARPOL Annex VI regulation 18 and its
    # Appendix V [MARPOL-VI], from memory), each optional ("" or None: not given)
    port: str = field(default="", metadata=ADDED)              # port of bunkering
    bunkered_on: str = field(default="", metadata=ADDED)       # date, YYYY-MM-DD
    supplier: str = field(default="", metadata=ADDED)          # name, address, telephone
    product: str = field(default="", metadata=ADDED)           # product name(s)
    quantity_t: float | None = field(default=None, metadata=ADDED)   # metric tons
    declaration: bool | None = field(default=None, metadata=ADDED)   # supplier's declaration
    sample_seal: str = field(default="", metadata=ADDED)       # seal of the MARPOL sample

    def __post_init__(self) -> None:
        _text("FuelSpec", "name", self.name)
        _text("FuelSpec", "grade", self.grade, empty_ok=True)
        _text("FuelSpec", "bdn_ref", self.bdn_ref)
        for f in ("port", "supplier", "product", "sample_seal"):
            _text("FuelSpec", f, getattr(self, f), empty_ok=True)
        _iso_day("FuelSpec", "bunkered_on", self.bunkered_on)
        object.__setattr__(self, "quantity_t", _opt_number("FuelSpec", "quantity_t",
                                                           self.quantity_t, 0.0, MAX_BUNKER_T))
        if self.declaration is not None and not isinstance(self.declaration, bool):
            raise ValueError(f"FuelSpec.declaration must be true, false or None, "
                             f"got {self.declaration!r}")
        object.__setattr__(self, "sulphur_pct",
                           _number("FuelSpec", "sulphur_pct", self.sulphur_pct, 0.0,
                                   STORED_MAX_SULPHUR_PCT))
        object.__setattr__(self, "density15_kg_m3",
                           _number("FuelSpec", "density15_kg_m3", self.density15_kg_m3,
                                   TABLE_54B_MIN_DENSITY_KG_M3, TABLE_54B_MAX_DENSITY_KG_M3))


FUEL_ROLES = ("to", "from", "subject")
"""``to``: the fuel changed to; ``from``: the fuel changed from; ``subject``: the fuel
a tank or sample entry is about."""


@dataclass(frozen=True)
class FuelUse:
    """A fuel named by an entry, with its role and the delivery-note data as it stood."""

    role: str
    fuel: FuelSpec

    def __post_init__(self) -> None:
        if self.role not in FUEL_ROLES:
            raise ValueError(f"FuelUse.role must be one of {FUEL_ROLES}, got {self.role!r}")
        if not isinstance(self.fuel, FuelSpec):
            raise ValueError(f"FuelUse.fuel must be a FuelSpec, got {self.fuel!r}")


@dataclass(frozen=True)
class TankReading:
    """One tank's sounding: observed volume and temperature, and the same at 15 °C.

    ``vcf`` is the Table 54B volume correction factor for the fuel's density at
    the observed temperature (:func:`planner.fuels.volume.volume_correction_factor`),
    ``volume15_m3 = volume_m3 × vcf`` and ``mass_t = volume15_m3 × density15_kg_m3 / 1000``
    (mass in vacuum). The derived values are stored as computed when written.
    Make one with :meth:`measure`.
    """

    tank: str
    fuel: str
    volume_m3: float
    temperature_c: float
    density15_kg_m3: float
    vcf: float
    volume15_m3: float
    mass_t: float

    @classmethod
    def measure(cls, tank: str, fuel: str, volume_m3: float, temperature_c: float,
                density15_kg_m3: float) -> TankReading:
        """A reading with the 15 °C volume and mass worked out (Table 54B)."""
        v = _number("TankReading", "volume_m3", volume_m3, 0.0, MAX_TANK_VOLUME_M3)
        t = _number("TankReading", "temperature_c", temperature_c, *TANK_TEMPERATURE_RANGE_C)
        rho = _number("TankReading", "density15_kg_m3", density15_kg_m3,
                      TABLE_54B_MIN_DENSITY_KG_M3, TABLE_54B_MAX_DENSITY_KG_M3)
        vcf = float(volume_correction_factor(rho, t))
        v15 = float(standard_volume_m3(v, rho, t))
        return cls(tank, fuel, v, t, rho, vcf, v15, v15 * rho / 1000.0)

    def __post_init__(self) -> None:
        _text("TankReading", "tank", self.tank)
        _text("TankReading", "fuel", self.fuel)
        for name, low, high in (
                ("volume_m3", 0.0, MAX_TANK_VOLUME_M3),
                ("temperature_c", *TANK_TEMPERATURE_RANGE_C),
                ("density15_kg_m3", TABLE_54B_MIN_DENSITY_KG_M3, TABLE_54B_MAX_DENSITY_KG_M3),
                ("vcf", 0.8, 1.2),
                ("volume15_m3", 0.0, 1.2 * MAX_TANK_VOLUME_M3),
                ("mass_t", 0.0, 1.2 * MAX_TANK_VOLUME_M3)):
            object.__setattr__(self, name, _number("TankReading", name, getattr(self, name),
                                                   low, high))
        if not math.isclose(self.volume15_m3, self.volume_m3 * self.vcf, rel_tol=1e-9,
                            abs_tol=1e-9):
            raise ValueError(f"TankReading {self.tank!r}: volume15_m3 is not volume_m3 × vcf")
        if not math.isclose(self.mass_t, self.volume15_m3 * self.density15_kg_m3 / 1000.0,
                            rel_tol=1e-9, abs_tol=1e-9):
            raise ValueError(f"TankReading {self.tank!r}: mass_t is not volume15_m3 × density")


def _tanks(cls: str, tanks: object) -> None:
    if not isinstance(tanks, tuple) or not all(isinstance(t, TankReading) for t in tanks):
        raise ValueError(f"{cls}.tanks must be a tuple of TankReading")
    names = [t.tank for t in tanks]
    for n in names:
        if names.count(n) > 1:
            raise ValueError(f"{cls}.tanks names tank {n!r} twice")


@dataclass(frozen=True)
class ChangeoverDetails:
    """A changeover step: the tanks sounded with it, remarks, and the step it follows.

    ``follows`` is the entry number of the start this completion belongs to
    (None for a start, or a completion logged without its start).
    """

    TYPE: ClassVar[str] = "changeover"
    tanks: tuple[TankReading, ...] = ()
    remarks: str = ""
    follows: int | None = None

    def __post_init__(self) -> None:
        _tanks("ChangeoverDetails", self.tanks)
        _text("ChangeoverDetails", "remarks", self.remarks, empty_ok=True)
        if self.follows is not None and (isinstance(self.follows, bool)
                                         or not isinstance(self.follows, int)
                                         or self.follows < 1):
            raise ValueError(f"ChangeoverDetails.follows must be an entry number, "
                             f"got {self.follows!r}")


@dataclass(frozen=True)
class TankDetails:
    """Tank soundings on their own (at least one tank)."""

    TYPE: ClassVar[str] = "tanks"
    tanks: tuple[TankReading, ...]
    remarks: str = ""

    def __post_init__(self) -> None:
        _tanks("TankDetails", self.tanks)
        if not self.tanks:
            raise ValueError("TankDetails needs at least one tank")
        _text("TankDetails", "remarks", self.remarks, empty_ok=True)


@dataclass(frozen=True)
class SampleDetails:
    """A fuel sample drawn: its number, the seal number and where it was drawn."""

    TYPE: ClassVar[str] = "sample"
    sample_number: str
    seal_number: str
    point: str = ""           # sampling point, e.g. "ME inlet" or "bunker manifold"
    remarks: str = ""

    def __post_init__(self) -> None:
        _text("SampleDetails", "sample_number", self.sample_number)
        _text("SampleDetails", "seal_number", self.seal_number)
        _text("SampleDetails", "point", self.point, empty_ok=True)
        _text("SampleDetails", "remarks", self.remarks, empty_ok=True)


@dataclass(frozen=True)
class NoteDetails:
    """A note in words."""

    TYPE: ClassVar[str] = "note"
    text: str

    def __post_init__(self) -> None:
        _text("NoteDetails", "text", self.text)


@dataclass(frozen=True)
class TankCapacity:
    """A tank's capacity as the ship file gives it, m³ (soundings above it are refused)."""

    tank: str
    capacity_m3: float

    def __post_init__(self) -> None:
        _text("TankCapacity", "tank", self.tank)
        object.__setattr__(self, "capacity_m3", _number("TankCapacity", "capacity_m3",
                                                        self.capacity_m3, 0.0,
                                                        MAX_TANK_VOLUME_M3))
        if self.capacity_m3 <= 0.0:
            raise ValueError(f"TankCapacity.capacity_m3 must be above 0, got "
                             f"{self.capacity_m3!r}")


@dataclass(frozen=True)
class SetupDetails:
    """The ship the journal belongs to, and tank names it knows.

    The first entry of every journal is a set-up with the ship's name and IMO
    number. Later set-ups may add tank names or (rarely) change the name;
    None means unchanged. Read from a ship file (``source``), it also holds the
    tanks' capacities, the circuits' names and the scrubbers' names (``scrubbers``:
    empty in journals set up before the journal took them, and then not checked).
    """

    TYPE: ClassVar[str] = "setup"
    ship_name: str | None
    imo_number: str | None
    tanks: tuple[str, ...] = ()
    capacities: tuple[TankCapacity, ...] = field(default=(), metadata=ADDED)
    circuits: tuple[str, ...] = field(default=(), metadata=ADDED)
    source: str = field(default="", metadata=ADDED)   # the ship file it was read from
    scrubbers: tuple[str, ...] = field(default=(), metadata=ADDED)   # the ship file's

    def __post_init__(self) -> None:
        if self.ship_name is not None:
            _text("SetupDetails", "ship_name", self.ship_name)
        if self.imo_number is not None and not (isinstance(self.imo_number, str)
                                                and valid_imo(self.imo_number)):
            raise ValueError(f"SetupDetails.imo_number must be 7 digits with a valid check "
                             f"digit, got {self.imo_number!r}")
        if not isinstance(self.tanks, tuple):
            raise ValueError("SetupDetails.tanks must be a tuple of names")
        for t in self.tanks:
            _text("SetupDetails", "tanks", t)
        if not isinstance(self.capacities, tuple) or not all(
                isinstance(c, TankCapacity) and c.tank in self.tanks for c in self.capacities):
            raise ValueError("SetupDetails.capacities must be TankCapacity of its tanks")
        if not isinstance(self.circuits, tuple):
            raise ValueError("SetupDetails.circuits must be a tuple of names")
        for c in self.circuits:
            _text("SetupDetails", "circuits", c)
        if not isinstance(self.scrubbers, tuple):
            raise ValueError("SetupDetails.scrubbers must be a tuple of names")
        for s in self.scrubbers:
            _text("SetupDetails", "scrubbers", s)
        _text("SetupDetails", "source", self.source, empty_ok=True)


@dataclass(frozen=True)
class FuelDetails:
    """A fuel taken on board (its delivery-note data), for later entries to name."""

    TYPE: ClassVar[str] = "fuel"
    fuel: FuelSpec
    remarks: str = ""

    def __post_init__(self) -> None:
        if not isinstance(self.fuel, FuelSpec):
            raise ValueError("FuelDetails.fuel must be a FuelSpec")
        _text("FuelDetails", "remarks", self.remarks, empty_ok=True)


MAX_TREND_BYTES = 20 * 2**20
"""Largest trend file attached to an entry, bytes (20 MiB: a week of one-second readings
of a few columns is well under it; the journal holds the bytes)."""

TREND_COLUMNS = ("time", "temperature", "viscosity", "load")
"""What a trend file's column mapping may name (``changeover calibrate``'s options)."""


@dataclass(frozen=True)
class TrendDetails:
    """A trend file (an export of the inlet viscosity and temperature) attached to a
    changeover entry: the file's name as given, its size and the SHA-256 of its bytes (the
    bytes themselves are kept beside the entries, under that hash), and optionally the
    valve switch time and the column mapping, as ``changeover calibrate`` takes them.

    ``attaches``: the number of the changeover entry (start or completion);
    ``columns``: ``"time=Zeit"``-style pairs for :data:`TREND_COLUMNS`; ``tz``: the UTC
    offset of times written without one (``+12:00``), or empty.
    """

    TYPE: ClassVar[str] = "trend"
    attaches: int
    file_name: str
    size_bytes: int
    sha256: str
    switch_utc: datetime | None = None
    columns: tuple[str, ...] = ()
    tz: str = ""
    remarks: str = ""

    def __post_init__(self) -> None:
        if isinstance(self.attaches, bool) or not isinstance(self.attaches, int) \
                or self.attaches < 1:
            raise ValueError(f"TrendDetails.attaches must be an entry number, "
                             f"got {self.attaches!r}")
        _text("TrendDetails", "file_name", self.file_name)
        if isinstance(self.size_bytes, bool) or not isinstance(self.size_bytes, int) \
                or not 0 <= self.size_bytes <= MAX_TREND_BYTES:
            raise ValueError(f"TrendDetails.size_bytes must be 0 to {MAX_TREND_BYTES}, "
                             f"got {self.size_bytes!r}")
        if not (isinstance(self.sha256, str) and len(self.sha256) == 64
                and all(c in "0123456789abcdef" for c in self.sha256)):
            raise ValueError(f"TrendDetails.sha256 must be 64 lowercase hex digits, "
                             f"got {self.sha256!r}")
        if self.switch_utc is not None and (not isinstance(self.switch_utc, datetime)
                                            or self.switch_utc.utcoffset() != timedelta(0)):
            raise ValueError(f"TrendDetails.switch_utc must be a UTC time, "
                             f"got {self.switch_utc!r}")
        if not isinstance(self.columns, tuple):
            raise ValueError("TrendDetails.columns must be a tuple of WHAT=NAME pairs")
        for c in self.columns:
            what, eq, name = c.partition("=") if isinstance(c, str) else ("", "", "")
            if what not in TREND_COLUMNS or not eq or not name.strip():
                raise ValueError(f"TrendDetails.columns: {c!r} is not WHAT=NAME with WHAT "
                                 f"one of {', '.join(TREND_COLUMNS)}")
        _text("TrendDetails", "tz", self.tz, empty_ok=True)
        _text("TrendDetails", "remarks", self.remarks, empty_ok=True)

    def column(self, what: str) -> str | None:
        """The trend's column name for ``what`` (``time``...), or None (the default)."""
        for c in self.columns:
            w, _, name = c.partition("=")
            if w == what:
                return name
        return None
