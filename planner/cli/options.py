"""Options shared by several commands, each declared and checked in one place.

For each shared option there is one ``Annotated`` type (its flag, and a help
text giving the unit and the accepted range) and one check function that
raises :class:`geo.errors.InputError` on a bad value, so every command that
has the option accepts the same values and refuses the rest with the same
line. Ranges and planning defaults come from :mod:`planner.common.defaults`.

==================  =======================================  ===============================
option              accepted                                 default
==================  =======================================  ===============================
``--json``          flag                                     off
``--limit``         above 0 and at most 5 % m/m              0.1 % m/m
``--target-pct``    above 0 and at most ``--limit``, % m/m   the voyage's fraction, else 90 %
                                                             of the limit
``--margin``        0 to 48 h                                the voyage's, else 1 h
``--confidence``    0.5 to 0.9999                            the voyage's; flush: else 0.99
``--samples``       100 to 1000000                           plan 4000, flush 10000
``--seed``          0 or more                                0
``--depart``        ISO 8601 with its offset                 none
``--tz``            a UTC offset, -14:00 to +14:00           ``--depart``'s offset, else UTC
==================  =======================================  ===============================

A default taken from a voyage file was checked when the file was read, in the
same range. Only typer and :mod:`planner.common` are imported here at module
level; ``changeover log`` has its own ``--tz`` (its default is the last
entry's offset).
"""

from __future__ import annotations

from datetime import UTC, datetime, timezone
from typing import TYPE_CHECKING, Annotated

import typer

from planner.common.defaults import (
    DEFAULT_MARGIN_H,
    DEFAULT_TARGET_FRACTION,
    MAX_CONFIDENCE,
    MAX_SAMPLES,
    MIN_CONFIDENCE,
    MIN_SAMPLES,
)

if TYPE_CHECKING:
    from geo.errors import InputError
    from planner.voyage.voyage_file import Voyage

MAX_LIMIT_PCT = 5.0
"""Highest sulphur limit ``--limit`` takes [% m/m] (the global cap is 0.50)."""

MAX_MARGIN_H = 48.0
"""Longest ``--margin`` [h], as the voyage file's ``time_before_boundary_h``."""

PLAN_SAMPLES = 4000
"""``plan``'s default samples per changeover [-]: a voyage runs one study per changeover."""

FLUSH_SAMPLES = 10_000
"""``flush``'s default samples per circuit [-] (``planner.uncertainty`` DEFAULT_SAMPLES)."""

DEFAULT_SEED = 0
"""Default random seed [-]: the same numbers every run."""

FLUSH_CONFIDENCE = 0.99
"""``flush``'s confidence when the Monte Carlo is asked for and no voyage gives one [-]."""

_PCT = f"{DEFAULT_TARGET_FRACTION:.0%}".replace("%", " %")

JsonOpt = Annotated[bool, typer.Option(
    "--json", help="Print the results as JSON instead of text.")]
LimitOpt = Annotated[float, typer.Option(
    "--limit", help=f"Sulphur limit in the area, % m/m, above 0 and at most "
                    f"{MAX_LIMIT_PCT:g}.")]
TargetOpt = Annotated[float | None, typer.Option(
    "--target-pct", help=f"Sulphur to aim at, % m/m, above 0 and at most --limit (default: "
                         f"the voyage file's sulphur_target_fraction of the limit, else "
                         f"{_PCT}).")]
MarginOpt = Annotated[float | None, typer.Option(
    "--margin", help=f"Be compliant this long before the boundary, h, 0 to {MAX_MARGIN_H:g} "
                     f"(default: the voyage file's, else {DEFAULT_MARGIN_H:g}).")]
ConfidenceOpt = Annotated[float | None, typer.Option(
    "--confidence", help=f"Monte Carlo of the uncertain inputs: the start at this confidence, "
                         f"a probability from {MIN_CONFIDENCE:g} to {MAX_CONFIDENCE:g}, e.g. "
                         f"0.99 (default: the voyage file's margins confidence; flush: else "
                         f"{FLUSH_CONFIDENCE:g} when --samples, --seed or --sensitivity-chart "
                         f"is given).")]
SamplesOpt = Annotated[int | None, typer.Option(
    "--samples", help=f"Monte Carlo samples, {MIN_SAMPLES} to {MAX_SAMPLES} (default: plan "
                      f"{PLAN_SAMPLES} per changeover, flush {FLUSH_SAMPLES} per circuit).")]
SeedOpt = Annotated[int | None, typer.Option(
    "--seed", help=f"Random seed of the Monte Carlo, a whole number 0 or more (default "
                   f"{DEFAULT_SEED}: the same seed gives the same numbers).")]
DepartOpt = Annotated[str | None, typer.Option(
    "--depart", help="Departure, ISO 8601 with its UTC offset, e.g. 2027-05-29T08:00+12:00.")]
TzOpt = Annotated[str | None, typer.Option(
    "--tz", help="Ship's time as a UTC offset, -14:00 to +14:00, e.g. +12:00 (default: the "
                 "offset written on --depart, else UTC).")]


def _refuse(option: str, value: object, expected: str) -> InputError:
    """The InputError for ``option``; a whole float is shown as typed (``-1``, not ``-1.0``)."""
    from geo.errors import InputError

    if isinstance(value, float) and value.is_integer():
        value = int(value)
    return InputError(option, "", value, expected)


def check_limit(limit: float) -> float:
    """``--limit`` [% m/m]: above 0 and at most :data:`MAX_LIMIT_PCT`."""
    if not 0.0 < limit <= MAX_LIMIT_PCT:
        raise _refuse("--limit", limit, f"a sulphur limit in % m/m, above 0 and at most "
                      f"{MAX_LIMIT_PCT:g}")
    return limit


def check_target(target_pct: float | None, limit: float, voyage: Voyage | None = None) -> float:
    """``--target-pct`` [% m/m], else the voyage's target fraction (else the default one) of
    ``limit``; above 0 and at most ``limit``."""
    fraction = voyage.sulphur_target_fraction if voyage else DEFAULT_TARGET_FRACTION
    target = target_pct if target_pct is not None else fraction * limit
    if not 0.0 < target <= limit:
        raise _refuse("--target-pct", target_pct, f"a target above 0 and at most the limit "
                      f"{limit} % m/m")
    return target


def check_margin(margin: float | None, voyage: Voyage | None = None) -> float:
    """``--margin`` [h], else the voyage's time margin, else :data:`DEFAULT_MARGIN_H`."""
    margin_h = margin if margin is not None else (voyage.time_margin_h if voyage
                                                  else DEFAULT_MARGIN_H)
    if not 0.0 <= margin_h <= MAX_MARGIN_H:
        raise _refuse("--margin", margin, f"hours, 0 to {MAX_MARGIN_H:g}")
    return margin_h


def check_confidence(confidence: float | None) -> float | None:
    """``--confidence`` [-]: from MIN_CONFIDENCE to MAX_CONFIDENCE inclusive, as the voyage
    file's ``[margins] confidence``; None when not given."""
    if confidence is not None and not MIN_CONFIDENCE <= confidence <= MAX_CONFIDENCE:
        raise _refuse("--confidence", confidence, f"a probability from {MIN_CONFIDENCE:g} to "
                      f"{MAX_CONFIDENCE:g}")
    return confidence


def check_samples(samples: int | None, default: int) -> int:
    """``--samples`` [-], else the command's ``default``: MIN_SAMPLES to :data:`MAX_SAMPLES`."""
    n = default if samples is None else samples
    if not MIN_SAMPLES <= n <= MAX_SAMPLES:
        raise _refuse("--samples", samples, f"a number of samples from {MIN_SAMPLES} to "
                      f"{MAX_SAMPLES}")
    return n


def check_seed(seed: int | None) -> int:
    """``--seed`` [-], else :data:`DEFAULT_SEED`: a whole number 0 or more."""
    s = DEFAULT_SEED if seed is None else seed
    if s < 0:
        raise _refuse("--seed", seed, "a seed of 0 or more")
    return s


def ship_zone(tz: str | None, depart: str | None) -> timezone:
    """The ship's time zone: ``--tz``, else the offset written on ``--depart``, else UTC."""
    from planner.common.timefmt import parse_offset

    if tz:
        return parse_offset(tz)
    if depart:
        try:
            written = datetime.fromisoformat(depart.strip().replace("z", "Z"))
        except ValueError:
            return UTC  # reported when --depart itself is parsed
        if isinstance(written.tzinfo, timezone):
            return written.tzinfo
    return UTC
