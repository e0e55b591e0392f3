"""Times at the edges: parse what the user types, show UTC and ship's time.

Inside the program every time is a timezone-aware UTC datetime; the ship's
time is a fixed UTC offset (``+02:00``) applied only when showing a time.
"""

from __future__ import annotations

import re
from datetime import UTC, date, datetime, timedelta, timezone

from geo.errors import InputError

_OFFSET = re.compile(r"^(?:UTC|Z)?\s*([+-])(\d{1,2})(?::?(\d{2}))?$")


def parse_offset(text: str, *, file: str = "--tz", place: str = "") -> timezone:
    """A UTC offset such as ``+02:00``, ``-0530``, ``+2``, ``UTC+3`` or ``Z``."""
    t = text.strip().upper()
    if t in ("Z", "UTC", "+00:00", "0"):
        return UTC
    m = _OFFSET.match(t)
    if not m:
        raise InputError(file, place, text, "a UTC offset such as +02:00 or -05:30")
    hours, minutes = int(m.group(2)), int(m.group(3) or 0)
    if hours > 14 or minutes >= 60:
        raise InputError(file, place, text, "a UTC offset between -14:00 and +14:00")
    sign = 1 if m.group(1) == "+" else -1
    return timezone(sign * timedelta(hours=hours, minutes=minutes))


def parse_moment(text: str, *, file: str = "--depart", place: str = "") -> datetime:
    """An ISO 8601 date-time with its UTC offset (``2027-05-29T08:00+12:00`` or ``...Z``)."""
    t = text.strip()
    try:
        moment = datetime.fromisoformat(t.replace("z", "Z"))
    except ValueError:
        raise InputError(file, place, text, "an ISO 8601 time with offset, "
                         "such as 2027-05-29T08:00+12:00") from None
    if moment.tzinfo is None:
        raise InputError(file, place, text, "a time with its UTC offset (add Z or +hh:mm)")
    try:
        return moment.astimezone(UTC)
    except OverflowError:  # year 1 east of UTC, or year 9999 west of it
        raise InputError(file, place, text, "an ISO 8601 time of a year between 2 and "
                         "9998") from None


def parse_day(text: str, *, file: str = "--on", place: str = "") -> date:
    """An ISO date ``YYYY-MM-DD``."""
    try:
        return date.fromisoformat(text.strip())
    except ValueError:
        raise InputError(file, place, text, "a date such as 2027-06-01") from None


def format_utc(moment: datetime | None) -> str:
    """``2027-06-02 14:05Z`` (minutes, UTC), or an em dash for no time."""
    if moment is None:
        return "—"
    return moment.astimezone(UTC).strftime("%Y-%m-%d %H:%MZ")


def format_offset(tz: timezone) -> str:
    """``+02:00`` style label of a fixed offset."""
    off = tz.utcoffset(None) or timedelta(0)
    sign = "-" if off < timedelta(0) else "+"
    minutes = abs(int(off.total_seconds())) // 60
    return f"{sign}{minutes // 60:02d}:{minutes % 60:02d}"


def format_ship(moment: datetime | None, tz: timezone, with_offset: bool = True) -> str:
    """Ship's time: ``2027-06-03 02:05 (+12:00)`` (the offset left out on request)."""
    if moment is None:
        return "—"
    text = moment.astimezone(tz).strftime("%Y-%m-%d %H:%M")
    return f"{text} ({format_offset(tz)})" if with_offset else text


def iso_utc(moment: datetime | None) -> str | None:
    """ISO 8601 UTC string for JSON (``2027-06-02T14:05:12Z``), or None."""
    if moment is None:
        return None
    return moment.astimezone(UTC).isoformat(timespec="seconds").replace("+00:00", "Z")
