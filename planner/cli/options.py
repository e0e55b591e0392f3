"""Options shared by several commands, each declared and checked in one place."""

from __future__ import annotations

from datetime import UTC, datetime, timezone


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
