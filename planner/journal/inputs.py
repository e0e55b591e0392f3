"""Reading what the crew types: positions, times, tank soundings.

Every refusal is one :class:`geo.errors.InputError` naming the option.

- Position (``--pos``): latitude then longitude, in degrees and minutes or
  decimal degrees: ``"54°12.3'N 003°30.0'W"``, ``"54 12.3 N 3 30 W"``,
  ``"N54°12.3' W003°30.0'"``, ``"54.205, -3.5"``. Off the globe (latitude
  beyond 90°, longitude beyond 180°) is refused.
- Time (``--at``): ISO 8601 with its offset, UTC (``2027-06-02T14:05Z``) or
  ship's time (``2027-06-02 16:05+02:00``); the written offset is also taken
  as the ship's offset when ``--tz`` is not given.
- Tank (``--tank``): ``NAME=VOLUME@TEMPERATURE``, volume in m³ observed at
  the temperature in °C, optionally ``/FUEL`` for the fuel in it when the
  entry names more than one: ``"MGO service=12.5@32"``,
  ``"LS settling=40.0@55/ULSFO"``.
"""

from __future__ import annotations

import re
from dataclasses import dataclass
from datetime import datetime, timedelta, timezone

from geo.errors import InputError
from geo.position import parse_lat, parse_lon
from planner.common.timefmt import parse_moment, parse_offset
from planner.journal.entries import Position

POS_EXPECTED = ("a position: latitude then longitude, e.g. \"54°12.3'N 003°30.0'W\" or "
                "\"54.205, -3.5\"")
TANK_EXPECTED = 'NAME=VOLUME@TEMPERATURE in m³ at °C, e.g. "MGO service=12.5@32"'

_NUMBER = r"[-+]?\d+(?:\.\d*)?|[-+]?\.\d+"
_TANK = re.compile(rf"^(?P<name>[^=]+?)\s*=\s*(?P<vol>{_NUMBER})\s*(?:m3|m³)?\s*"
                   rf"(?:@\s*(?P<temp>{_NUMBER})\s*(?:°\s*C|C)?)?\s*(?:/\s*(?P<fuel>.+?))?\s*$")


def split_position(text: str) -> tuple[str, str]:
    """Latitude and longitude parts of a typed position (not yet checked)."""
    t = text.strip()
    if "," in t:
        lat, _, lon = t.partition(",")
        return lat.strip(), lon.strip()
    up = t.upper()
    m = re.search(r"[NS]", up)
    if m is not None:
        if m.start() == 0:  # prefix form: N54°12.3' W003°30.0'
            e = re.search(r"[EW]", up)
            if e is not None:
                return t[:e.start()].strip(), t[e.start():].strip()
        else:               # suffix form: 54°12.3'N 003°30.0'W
            return t[:m.end()].strip(), t[m.end():].strip()
    parts = t.split()
    if len(parts) == 2:
        return parts[0], parts[1]
    raise InputError("--pos", "", text, POS_EXPECTED)


def parse_position(text: str, option: str = "--pos") -> Position:
    """A :class:`Position` on the globe from typed text (see the module docstring)."""
    lat_text, lon_text = split_position(text)
    for axis, part in (("latitude", lat_text), ("longitude", lon_text)):
        try:
            value = (parse_lat if axis == "latitude" else parse_lon)(_number_or_text(part))
        except InputError as exc:
            why = exc.expected
            why = why[why.index("(") + 1:-1] if "(" in why else f"not a {axis}"
            raise InputError(option, "", text, f"{POS_EXPECTED} ({axis} {part!r}: {why})"
                             ) from None
        if axis == "latitude":
            lat = value
        else:
            lon = value
    if abs(lon) > 180.0:
        raise InputError(option, "", text, f"{POS_EXPECTED} (longitude within ±180°)")
    return Position(lat, lon)


def written_position(lat_deg: float, lon_deg: float) -> Position:
    """A computed position as the crew writes it: to 0.1 minute of arc (about 185 m), stored
    to 6 decimal places of a degree (``62.49999999999409`` becomes ``62.5``)."""
    def tenth(v: float) -> float:
        return round(round(v * 600.0) / 600.0, 6)
    return Position(tenth(lat_deg), tenth(lon_deg))


def written_time(moment: datetime) -> datetime:
    """A computed time as the crew writes it: to the nearest minute."""
    return (moment + timedelta(seconds=30)).replace(second=0, microsecond=0)


def _number_or_text(text: str) -> float | str:
    try:
        return float(text)
    except ValueError:
        return text


OFFSET_RANGE_MIN = (-12 * 60, 14 * 60)
"""The UTC offsets in use on Earth, minutes east of UTC: -12:00 to +14:00 (common practice:
the time zones of the nautical and civil clocks)."""

RECORD_YEARS = (1990, 2100)
"""Years a ship's changeover record can hold: from before MARPOL Annex VI was adopted (1997)
to the end of any ship now afloat's life."""

AT_EXPECTED = ("an ISO 8601 time with its UTC offset, e.g. 2027-06-02T14:05Z or "
               "2027-06-02T16:05+02:00")


def is_real_offset(minutes: float) -> bool:
    """A UTC offset in use on Earth [min east of UTC] (:data:`OFFSET_RANGE_MIN`, in steps of
    15 minutes)."""
    low, high = OFFSET_RANGE_MIN
    return low <= minutes <= high and not minutes % 15


def _check_offset(minutes: int, text: str, option: str) -> int:
    if not is_real_offset(minutes):
        raise InputError(option, "", text, "a real UTC offset: -12:00 to +14:00, in steps "
                                           "of 15 minutes")
    return minutes


def parse_at(text: str, option: str = "--at") -> tuple[datetime, int | None]:
    """The UTC time typed and the offset written on it in minutes (None when it was UTC).

    The offset must be a real one (:data:`OFFSET_RANGE_MIN`) and the year within
    :data:`RECORD_YEARS`; anything else is one :class:`InputError`.
    """
    t = text.strip()
    try:
        local = datetime.fromisoformat(t.replace("z", "Z"))
    except ValueError:
        raise InputError(option, "", text, AT_EXPECTED) from None
    if local.tzinfo is None:
        raise InputError(option, "", text, "a time with its UTC offset (add Z or +hh:mm)")
    off = local.utcoffset() or timedelta(0)
    if off % timedelta(minutes=1):
        raise InputError(option, "", text, "a UTC offset in whole minutes")
    minutes = _check_offset(int(off.total_seconds() // 60), text, option)
    if not RECORD_YEARS[0] <= local.year <= RECORD_YEARS[1]:
        raise InputError(option, "", text, f"a year from {RECORD_YEARS[0]} to "
                                           f"{RECORD_YEARS[1]}")
    return parse_moment(t, file=option), minutes or None


def parse_tz(text: str, option: str = "--tz") -> int:
    """A UTC offset (``+02:00``, ``-0530``, ``Z``) in whole minutes east of UTC, within
    -12:00 to +14:00."""
    tz: timezone = parse_offset(text, file=option)
    minutes = int((tz.utcoffset(None) or timedelta(0)).total_seconds() // 60)
    return _check_offset(minutes, text, option)


@dataclass(frozen=True)
class TankInput:
    """A sounding as typed: tank name, observed volume m³, temperature °C, fuel name or None."""

    tank: str
    volume_m3: float
    temperature_c: float
    fuel: str | None


def parse_tank(text: str, option: str = "--tank") -> TankInput:
    """One ``--tank`` value (see the module docstring); a negative volume is refused."""
    m = _TANK.match(text.strip())
    if m is None or not m["name"].strip():
        raise InputError(option, "", text, TANK_EXPECTED)
    if m["temp"] is None:
        raise InputError(option, "", text, f"{TANK_EXPECTED} (the temperature is needed to "
                                           "correct the volume to 15 °C)")
    volume = float(m["vol"])
    if volume < 0.0:
        raise InputError(option, "", text, "a volume of 0 m³ or more")
    return TankInput(m["name"].strip(), volume, float(m["temp"]),
                     m["fuel"].strip() if m["fuel"] else None)
