"""The global sulphur cap of MARPOL Annex VI regulation 14.1, by date.

4.50 % m/m before 2012-01-01, 3.50 % from 2012-01-01, 0.50 % from
2020-01-01 [MARPOL-VI] [P]. The cap changes at 00:00 UTC on those dates.
"""

from __future__ import annotations

from datetime import UTC, date, datetime, time

GLOBAL_CAP_STEPS: tuple[tuple[date, float], ...] = (
    (date(2012, 1, 1), 3.50),
    (date(2020, 1, 1), 0.50),
)
GLOBAL_CAP_BEFORE_PCT = 4.50


def global_cap_pct(when: date | datetime) -> float:
    """Global sulphur cap on a day or at a moment.

    Parameters
    ----------
    when : date or datetime
        A UTC calendar day, or a timezone-aware datetime (any offset; its UTC
        day decides).

    Returns
    -------
    float [% m/m]
        The cap of MARPOL Annex VI regulation 14.1 [MARPOL-VI] [P] then.

    Examples
    --------
    >>> global_cap_pct(date(2011, 12, 31)), global_cap_pct(date(2012, 1, 1))
    (4.5, 3.5)
    >>> global_cap_pct(datetime(2019, 12, 31, 23, 59, tzinfo=UTC))
    3.5
    >>> global_cap_pct(datetime(2020, 1, 1, tzinfo=UTC))
    0.5
    """
    day = when.astimezone(UTC).date() if isinstance(when, datetime) else when
    cap = GLOBAL_CAP_BEFORE_PCT
    for start, pct in GLOBAL_CAP_STEPS:
        if day >= start:
            cap = pct
    return cap


def global_cap_changes_utc() -> list[datetime]:
    """The moments the global cap changed, as UTC datetimes (00:00 UTC) [MARPOL-VI] [P].

    Returns
    -------
    list of datetime
        Timezone-aware UTC datetimes, in order.

    Examples
    --------
    >>> [m.isoformat() for m in global_cap_changes_utc()]
    ['2012-01-01T00:00:00+00:00', '2020-01-01T00:00:00+00:00']
    """
    return [datetime.combine(d, time(0), tzinfo=UTC) for d, _ in GLOBAL_CAP_STEPS]
