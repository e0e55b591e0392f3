"""A logged trend of the engine inlet: time, temperature and viscosity readings (CSV).

What the monitoring system exports, one reading a line, with a header line::

    time,temperature_c,viscosity_cst
    2027-05-30T04:00:00+12:00,128.4,13.1
    2027-05-30T04:01:00+12:00,128.2,13.0

- the column names are mapped by the caller (``--time-col``, ``--temp-col``,
  ``--visc-col``); an optional column of the main engine's load, % MCR
  (``--load-col``), makes the consumption follow the log; other columns are
  ignored; the separator is a comma, a
  semicolon or a tab (read from the header line);
- times are ISO 8601; a time without its UTC offset is read in the zone
  given (``tz``) and refused when none is given: a trend in ship's time
  cannot be placed against the switch otherwise;
- a blank cell is a gap in the log (the line is skipped and counted); text
  that is not a number is refused; a reading outside what a viscometer or
  thermometer on a fuel line can show (at or below 0.2 cSt, the lower end of
  the Refutas rule [MAPLES-2000]; above 10 000 cSt; below -20 or above 250 °C)
  is an instrument dropout and is skipped and counted, like a gap.

Refusals are one :class:`geo.errors.InputError` naming the file, the line and
the column.
"""

from __future__ import annotations

import csv
import io
import math
from dataclasses import dataclass
from datetime import UTC, datetime, timezone
from pathlib import Path

import numpy as np

from geo.errors import InputError

MIN_VISCOSITY_CST = 0.2
MAX_VISCOSITY_CST = 10_000.0
TEMPERATURE_RANGE_C = (-20.0, 250.0)
MIN_READINGS = 5
MAX_LOAD_PCT = 110.0


@dataclass(frozen=True)
class TrendColumns:
    """Names of the columns read from a trend file."""

    time: str = "time"
    temperature: str = "temperature_c"
    viscosity: str = "viscosity_cst"
    load: str | None = None


@dataclass(frozen=True, eq=False)
class Trend:
    """Readings of one changeover after its valve switch, in time order.

    ``time_h`` [h] after ``switch_utc``; ``temperature_c`` [°C] and
    ``viscosity_cst`` [cSt] at the inlet; ``load_pct`` [% MCR] the main engine's
    load at each reading when the file has it (NaN where blank). ``skipped`` counts the blank and
    out-of-range readings left out; ``before_switch`` the readings logged
    before the switch (left out of the fit).
    """

    file: str
    switch_utc: datetime
    time_h: np.ndarray
    temperature_c: np.ndarray
    viscosity_cst: np.ndarray
    skipped: int = 0
    before_switch: int = 0
    load_pct: np.ndarray | None = None

    def __post_init__(self) -> None:
        if self.switch_utc.tzinfo is None:
            raise ValueError("switch_utc must be timezone-aware")
        n = len(self.time_h)
        if len(self.temperature_c) != n or len(self.viscosity_cst) != n:
            raise ValueError("one temperature and one viscosity per reading")
        if n and np.any(np.diff(self.time_h) < 0.0):
            raise ValueError("readings must be in time order")

    @property
    def end_h(self) -> float:
        """Time of the last reading after the switch [h]."""
        return float(self.time_h[-1]) if len(self.time_h) else 0.0


def _moment(text: str, tz: timezone | None, file: str, place: str) -> datetime:
    try:
        moment = datetime.fromisoformat(text.strip().replace("z", "Z").replace(" ", "T", 1))
    except ValueError:
        raise InputError(file, place, text, "an ISO 8601 time such as "
                         "2027-05-30T04:00:00+12:00") from None
    if moment.tzinfo is None:
        if tz is None:
            raise InputError(file, place, text, "a time with its UTC offset, or give the "
                             "trend's zone with --tz")
        moment = moment.replace(tzinfo=tz)
    return moment.astimezone(UTC)


def _number(text: str, file: str, place: str) -> float | None:
    t = text.strip()
    if not t:
        return None
    try:
        x = float(t)
    except ValueError:
        raise InputError(file, place, text, "a number (or a blank cell for a gap)") from None
    return x if math.isfinite(x) else None


def _rows(path: Path) -> tuple[list[str], list[list[str]]]:
    try:
        text = path.read_bytes().decode("utf-8-sig")
    except (OSError, UnicodeDecodeError) as e:
        raise InputError(str(path), "", str(e), "a readable UTF-8 CSV file") from None
    lines = [ln for ln in text.splitlines() if ln.strip() and not ln.lstrip().startswith("#")]
    if not lines:
        raise InputError(str(path), "", "empty", "a header line and readings")
    header = lines[0]
    sep = max((";", "\t", ","), key=header.count)
    reader = csv.reader(io.StringIO("\n".join(lines)), delimiter=sep)
    rows = list(reader)
    return [h.strip() for h in rows[0]], rows[1:]


def read_trend(path: str | Path, switch_utc: datetime, columns: TrendColumns = TrendColumns(),
               tz: timezone | None = None) -> Trend:
    """Read a trend file and place its readings against the valve switch.

    Parameters
    ----------
    path : str or Path
        The CSV file (see the module docstring).
    switch_utc : datetime
        When the changeover valve was switched (timezone-aware).
    columns : TrendColumns
        The names of the time, temperature [°C] and viscosity [cSt] columns.
    tz : timezone, optional
        The zone of times written without an offset (else they are refused).

    Returns
    -------
    Trend
        The readings at or after the switch, sorted by time [h after it].

    Raises
    ------
    InputError
        A missing column, text where a number belongs, a time that cannot be
        read or placed, no readings after the switch, fewer than 5 readings.
    """
    file = str(path)
    header, rows = _rows(Path(path))
    index = {}
    wanted = [("time", columns.time), ("temperature", columns.temperature),
              ("viscosity", columns.viscosity)]
    if columns.load is not None:
        wanted.append(("load", columns.load))
    for what, name in wanted:
        if name not in header:
            raise InputError(file, "line 1 (header)", name, f"a {what} column; the columns are "
                             f"{', '.join(header) or 'none'} (map names with the options)")
        index[what] = header.index(name)
    switch_utc = switch_utc.astimezone(UTC)
    t, temp, visc, load = [], [], [], []
    skipped = before = 0
    lo_t, hi_t = TEMPERATURE_RANGE_C
    for k, row in enumerate(rows, start=2):
        cells = {w: (row[i] if i < len(row) else "") for w, i in index.items()}
        if not cells["time"].strip():
            skipped += 1
            continue
        moment = _moment(cells["time"], tz, file, f"line {k}, column {columns.time}")
        x_t = _number(cells["temperature"], file, f"line {k}, column {columns.temperature}")
        x_v = _number(cells["viscosity"], file, f"line {k}, column {columns.viscosity}")
        if (x_t is None or x_v is None or not lo_t <= x_t <= hi_t
                or not MIN_VISCOSITY_CST < x_v <= MAX_VISCOSITY_CST):
            skipped += 1
            continue
        dt_h = (moment - switch_utc).total_seconds() / 3600.0
        if dt_h < 0.0:
            before += 1
            continue
        if "load" in cells:
            load.append(_load(cells["load"], file, f"line {k}, column {columns.load}"))
        t.append(dt_h)
        temp.append(x_t)
        visc.append(x_v)
    if len(t) < MIN_READINGS:
        raise InputError(file, "", f"{len(t)} readings after the switch at "
                         f"{switch_utc:%Y-%m-%dT%H:%MZ}",
                         f"at least {MIN_READINGS} readings of time, temperature and "
                         "viscosity after the valve switch (check --switch-at and --tz)")
    order = np.argsort(np.array(t), kind="stable")
    return Trend(file, switch_utc, np.array(t)[order], np.array(temp)[order],
                 np.array(visc)[order], skipped, before,
                 np.array(load)[order] if columns.load is not None else None)


def _load(text: str, file: str, place: str) -> float:
    x = _number(text, file, place)
    if x is None:
        return math.nan
    if not 0.0 <= x <= MAX_LOAD_PCT:
        raise InputError(file, place, text, f"a main engine load from 0 to {MAX_LOAD_PCT:g} % MCR")
    return x
