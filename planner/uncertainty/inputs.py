"""Uncertain inputs of a changeover and their defaults: the ``[uncertainty]`` table.

The table is optional in the ship file (and, key by key, a voyage file may
override it)::

    [uncertainty]
    volumes_pct = 10.0          # ± on every pipe and stirred volume (or a table, below)
    tanks_pct = 5.0             # ± on each tank sounding
    consumption_pct = 5.0       # ± on the consumers' fuel rate (one factor for all)
    mixing_stagnant = 0.10      # up to this part of each stirred volume is stagnant
    mixing_bypass = 0.10        # up to this part of its flow short-circuits it
    sulphur_sd_pct = { mgo = 0.005 }   # standard deviation per fuel, % m/m (or one number)
    boundary_time_min = 15.0    # ± minutes at the boundary (speed, ETA)

    # per volume: volumes_pct = { default = 10.0, supply_line = 25.0 }

Distributions (see :mod:`planner.uncertainty.sampling`):

- a **±** value is the half-width of the central 95 % range of a normal
  distribution: standard deviation = value / 1.96. Volumes, tank soundings
  and consumption are factors ``1 + ε``; the boundary time an offset;
- ``mixing_stagnant`` and ``mixing_bypass`` are the upper ends of uniform
  distributions from 0 (perfect mixing). How they enter the flushing model is
  in :mod:`planner.uncertainty.model` (an effective volume);
- sulphur: normal about the delivery-note value with the standard deviation
  given, else the one derived from the test method's reproducibility
  (:func:`sulphur_sd_from_reproducibility`), truncated at 0.

Every default states its source in :data:`DEFAULTS`. Bad values are one
:class:`geo.errors.InputError` naming the file and key.
"""

from __future__ import annotations

import math
from collections.abc import Mapping
from dataclasses import dataclass, field, replace
from numbers import Real
from pathlib import Path
from types import MappingProxyType

from geo.errors import InputError
from planner.common.input_files import read_toml
from planner.ship.system import FuelSystem

Z95 = 1.959963984540054  # two-sided 95 % normal quantile
Z95_ONE_SIDED = 1.6448536269514722

DEFAULTS: Mapping[str, tuple[float, str]] = MappingProxyType({
    "volumes_pct": (10.0, "common practice: pipe runs and fittings estimated from drawings"),
    "tanks_pct": (5.0, "common practice: soundings with trim, heel and temperature"),
    "consumption_pct": (5.0, "common practice: weather and fouling drift; engine makers' SFOC "
                             "tolerance of about +5 % (from memory)"),
    "mixing_stagnant": (0.10, "common practice (engineering judgement, no published value)"),
    "mixing_bypass": (0.10, "common practice (engineering judgement, no published value)"),
    "boundary_time_min": (15.0, "common practice: speed and ETA a few hours ahead"),
})
SULPHUR_SOURCE = (
    "from the test method's reproducibility R: sd = 0.59·R / 1.645 (0.59·R is the 95 % "
    "margin, [ISO-4259] [P]); R(X) = 0.0847·(X + 0.1) % m/m, the line through the "
    "commonly quoted verification values 0.11 % at the 0.10 % limit and 0.53 % at 0.50 % "
    "([ISO-8754], from memory [M])"
)

_RANGES = {
    "volumes_pct": (0.0, 50.0),
    "tanks_pct": (0.0, 50.0),
    "consumption_pct": (0.0, 50.0),
    "mixing_stagnant": (0.0, 0.9),
    "mixing_bypass": (0.0, 0.9),
    "boundary_time_min": (0.0, 600.0),
}
_SULPHUR_SD_RANGE = (0.0, 1.0)
KEYS = (*_RANGES, "sulphur_sd_pct")


def reproducibility_pct(sulphur_pct: float) -> float:
    """Reproducibility R of a sulphur result at a sulphur content (see SULPHUR_SOURCE).

    Parameters
    ----------
    sulphur_pct : float [% m/m]
        The result.

    Returns
    -------
    float [% m/m]
        A line through R(0.10) = 0.01/0.59 and R(0.50) = 0.03/0.59, the values
        implied by the commonly quoted 95 % verification results 0.11 % and
        0.53 % ([ISO-8754], from memory [M]), at 0 or above.

    Examples
    --------
    >>> round(0.10 + 0.59 * reproducibility_pct(0.10), 6)
    0.11
    """
    r_low, r_high = 0.01 / 0.59, 0.03 / 0.59
    slope = (r_high - r_low) / 0.40
    return max(0.0, r_low + slope * (float(sulphur_pct) - 0.10))


def sulphur_sd_from_reproducibility(sulphur_pct: float) -> float:
    """Standard deviation of a delivery-note sulphur value: 0.59·R / 1.645.

    0.59·R is the one-sided 95 % margin of [ISO-4259] [P], so the standard
    deviation it implies is 0.59·R / 1.645 (≈ R / 2.79) [D].

    Parameters
    ----------
    sulphur_pct : float [% m/m]
        The delivery-note value.

    Returns
    -------
    float [% m/m]
        The standard deviation, with R from :func:`reproducibility_pct`.
    """
    return 0.59 * reproducibility_pct(sulphur_pct) / Z95_ONE_SIDED


@dataclass(frozen=True)
class UncertaintySpec:
    """The uncertain inputs (see the module docstring for the distributions).

    ``*_pct`` values are ± (95 %) in per cent; ``volume_pct_by_name`` and
    ``tank_pct_by_name`` override per node; ``sulphur_sd_by_fuel`` gives
    standard deviations in % m/m (``sulphur_sd_default`` for fuels not named;
    None: from the reproducibility). ``sources`` says where each value came from.
    """

    volumes_pct: float = DEFAULTS["volumes_pct"][0]
    tanks_pct: float = DEFAULTS["tanks_pct"][0]
    consumption_pct: float = DEFAULTS["consumption_pct"][0]
    mixing_stagnant: float = DEFAULTS["mixing_stagnant"][0]
    mixing_bypass: float = DEFAULTS["mixing_bypass"][0]
    boundary_time_min: float = DEFAULTS["boundary_time_min"][0]
    volume_pct_by_name: Mapping[str, float] = field(default_factory=dict)
    tank_pct_by_name: Mapping[str, float] = field(default_factory=dict)
    sulphur_sd_by_fuel: Mapping[str, float] = field(default_factory=dict)
    sulphur_sd_default: float | None = None
    sources: Mapping[str, str] = field(default_factory=dict)

    def __post_init__(self) -> None:
        for key in ("volume_pct_by_name", "tank_pct_by_name", "sulphur_sd_by_fuel", "sources"):
            object.__setattr__(self, key, MappingProxyType(dict(getattr(self, key))))

    @classmethod
    def zero(cls) -> UncertaintySpec:
        """No uncertainty at all: the Monte Carlo gives the deterministic flush."""
        return cls(0.0, 0.0, 0.0, 0.0, 0.0, 0.0, sulphur_sd_default=0.0,
                   sources={k: "zero" for k in KEYS})

    def volume_pct(self, name: str) -> float:
        """± (95 %) of a pipe or stirred volume, %."""
        return self.volume_pct_by_name.get(name, self.volumes_pct)

    def tank_pct(self, name: str) -> float:
        """± (95 %) of a tank sounding, %."""
        return self.tank_pct_by_name.get(name, self.tanks_pct)

    def sulphur_sd(self, fuel_name: str, sulphur_pct: float) -> float:
        """Standard deviation of a fuel's sulphur, % m/m."""
        if fuel_name in self.sulphur_sd_by_fuel:
            return self.sulphur_sd_by_fuel[fuel_name]
        if self.sulphur_sd_default is not None:
            return self.sulphur_sd_default
        return sulphur_sd_from_reproducibility(sulphur_pct)

    def source(self, key: str) -> str:
        """Where the value of ``key`` came from."""
        if key in self.sources:
            return self.sources[key]
        if key == "sulphur_sd_pct":
            return f"default: {SULPHUR_SOURCE}"
        return f"default: {DEFAULTS[key][1]}"

    def describe(self) -> dict:
        """Plain values and sources (for JSON)."""
        return {
            "volumes_pct": self.volumes_pct,
            "volume_pct_by_name": dict(self.volume_pct_by_name),
            "tanks_pct": self.tanks_pct,
            "tank_pct_by_name": dict(self.tank_pct_by_name),
            "consumption_pct": self.consumption_pct,
            "mixing_stagnant": self.mixing_stagnant,
            "mixing_bypass": self.mixing_bypass,
            "sulphur_sd_pct": dict(self.sulphur_sd_by_fuel),
            "sulphur_sd_default_pct": self.sulphur_sd_default,
            "boundary_time_min": self.boundary_time_min,
            "distribution": "± values: 95 % half-width of a normal (sd = value / 1.96); mixing: "
                            "uniform from 0 to the value; sulphur: normal, truncated at 0",
            "sources": {k: self.source(k) for k in KEYS},
        }


def _number(file: str, place: str, value: object, low: float, high: float) -> float:
    if isinstance(value, bool) or not isinstance(value, Real) or not math.isfinite(value):
        raise InputError(file, place, value, f"a number from {low:g} to {high:g}")
    x = float(value)
    if not low <= x <= high:
        raise InputError(file, place, value, f"a number from {low:g} to {high:g}")
    return x


def _by_name(file: str, place: str, value: dict, names: Mapping | None, what: str,
             low: float, high: float) -> tuple[float | None, dict[str, float]]:
    default, each = None, {}
    for k, v in value.items():
        if k == "default":
            default = _number(file, f"{place}.default", v, low, high)
            continue
        if names is not None and k not in names:
            known = ", ".join(sorted(names)) or "none"
            raise InputError(file, f"{place}.{k}", k, f"'default' or a {what} of the ship: {known}")
        each[k] = _number(file, f"{place}.{k}", v, low, high)
    return default, each


def parse_uncertainty(table: object, file: str, system: FuelSystem | None = None,
                      base: UncertaintySpec | None = None) -> UncertaintySpec:
    """The :class:`UncertaintySpec` of an ``[uncertainty]`` table (TOML already parsed).

    Parameters
    ----------
    table : dict or None
        The table (None: ``base`` unchanged). ``*_pct`` values are ± (95 %)
        in [%], ``mixing_*`` fractions [-], ``sulphur_sd_pct`` standard
        deviations [% m/m], ``boundary_time_min`` ± [min].
    file : str
        The file it came from, for messages and sources.
    system : FuelSystem, optional
        When given, the names in per-volume, per-tank and per-fuel tables are
        checked against it.
    base : UncertaintySpec, optional
        The spec the table's keys override (default: the built-in defaults).

    Returns
    -------
    UncertaintySpec
        With each value's source: the file, and the default's own source when
        the value is the default.

    Raises
    ------
    InputError
        A key, name or value out of place (one error naming the file and key).
    """
    spec = base or UncertaintySpec()
    if table is None:
        return spec
    if not isinstance(table, dict):
        raise InputError(file, "uncertainty", table, "an [uncertainty] table")
    for k in table:
        if k not in KEYS:
            raise InputError(file, f"uncertainty.{k}", k, f"one of the keys {', '.join(KEYS)}")
    changes: dict = {}
    sources = dict(spec.sources)
    where = f"{file} [uncertainty]"
    for key in _RANGES:
        if key in table:
            more, sources[key] = _spread(key, table[key], file, where, system, spec)
            changes.update(more)
    if "sulphur_sd_pct" in table:
        more, sources["sulphur_sd_pct"] = _sulphur_sd(table["sulphur_sd_pct"], file, where,
                                                      system, spec)
        changes.update(more)
    return replace(spec, **changes, sources=sources)


def _spread(key: str, value: object, file: str, where: str, system: FuelSystem | None,
            spec: UncertaintySpec) -> tuple[dict, str]:
    """The spec changes and source of one key of ``_RANGES`` (per-name tables for volumes
    and tanks)."""
    low, high = _RANGES[key]
    if key in ("volumes_pct", "tanks_pct") and isinstance(value, dict):
        names = None if system is None else (
            system.volumes if key == "volumes_pct" else system.tanks)
        what = "volume" if key == "volumes_pct" else "tank"
        default, each = _by_name(file, f"uncertainty.{key}", value, names, what, low, high)
        by = "volume_pct_by_name" if key == "volumes_pct" else "tank_pct_by_name"
        changes: dict = {by: {**getattr(spec, by), **each}}
        if default is not None:
            changes[key] = default
        return changes, where
    x = _number(file, f"uncertainty.{key}", value, low, high)
    if key in DEFAULTS and x == DEFAULTS[key][0]:
        return {key: x}, f"{where} (the default: {DEFAULTS[key][1]})"
    return {key: x}, where


def _sulphur_sd(value: object, file: str, where: str, system: FuelSystem | None,
                spec: UncertaintySpec) -> tuple[dict, str]:
    """The spec changes and source of ``sulphur_sd_pct`` (one number, or a per-fuel table)."""
    low, high = _SULPHUR_SD_RANGE
    if not isinstance(value, dict):
        return {"sulphur_sd_default": _number(file, "uncertainty.sulphur_sd_pct", value,
                                              low, high)}, where
    names = None if system is None else system.fuels
    default, each = _by_name(file, "uncertainty.sulphur_sd_pct", value, names, "fuel", low, high)
    changes: dict = {"sulphur_sd_by_fuel": {**spec.sulphur_sd_by_fuel, **each}}
    if default is not None:
        changes["sulphur_sd_default"] = default
        return changes, where
    return changes, f"{where} (fuels not named: {SULPHUR_SOURCE})"


def load_uncertainty(ship_file: str | Path, system: FuelSystem | None = None,
                     voyage_file: str | Path | None = None) -> UncertaintySpec:
    """The spec of a ship file's ``[uncertainty]`` table, then a voyage file's, key by key.

    Parameters
    ----------
    ship_file : str or Path
        The ship TOML (its table is optional).
    system : FuelSystem, optional
        The ship's system, to check the names in per-name tables.
    voyage_file : str or Path, optional
        A voyage TOML whose ``[uncertainty]`` keys override the ship's.

    Returns
    -------
    UncertaintySpec
        The values as in :func:`parse_uncertainty`.

    Raises
    ------
    geo.errors.InputError
        One line for a file that is no readable TOML (a folder, a device such as
        ``/dev/zero``, non-UTF-8 bytes, a NaN or infinite number:
        :func:`planner.common.input_files.read_toml`) or a bad value.
    """
    spec = parse_uncertainty(read_toml(ship_file, "ship file").get("uncertainty"),
                             str(ship_file), system)
    if voyage_file is not None:
        spec = parse_uncertainty(read_toml(voyage_file, "voyage file").get("uncertainty"),
                                 str(voyage_file), system, base=spec)
    return spec
