"""The global sulphur cap of MARPOL Annex VI regulation 14.1, by date.

4.50 % m/m before 2012-01-01, 3.50 % from 2012-01-01, 0.50 % from
2020-01-01 (REFERENCE.md section 1 [P]). The cap changes at 00:00 UTC on
those dates.
"""

from __future__ import annotations

from datetime import UTC, date, datetime, time

GLOBAL_CAP_STEPS: tuple[tuple[date, float], ...] = (
    (date(2012, 1, 1), 3.50),
    (date(2020, 1, 1), 0.50),
)
GLOBAL_CAP_BEFORE_PCT = 4.50


def global_cap_pct(when: date | datetime) -> float:
    """Global sulphur cap, % m/m, on a date or at a timezone-aware moment."""
    day = when.astimezone(UTC).date() if isinstance(when, datetime) else when
    cap = GLOBAL_CAP_BEFORE_PCT
    for start, pct in GLOBAL_CAP_STEPS:
        if day >= start:
            cap = pct
    return cap


def global_cap_changes_utc() -> list[datetime]:
    """The moments the global cap changed."""
    return [datetime.combine(d, time(0), tzinfo=UTC) for d, _ in GLOBAL_CAP_STEPS]
