"""Warnings at entry: values that may be right but need the writer to say so (``--confirm``).

:func:`entry_warnings` lists, for an entry about to be written:

- a completion sooner after its start than the flush the plan modelled (the time from
  the planned start to the planned compliant moment, :attr:`Planned.flush_h`);
- an area that the linked plan does not name (a typo, or the wrong plan);
- a time more than :data:`FUTURE_LIMIT_H` after the moment of writing.

Without ``--confirm`` the entry is refused with the warning in one line (nothing written);
with it the warnings are kept in the entry (``Record.confirmed``) and printed with it.
"""

from __future__ import annotations

from collections.abc import Collection
from datetime import datetime

from geo.errors import InputError
from planner.common.timefmt import format_utc
from planner.journal.entries import COMPLETED, FOLLOWS, Record
from planner.journal.state import JournalState

FUTURE_LIMIT_H = 1.0
"""An event time this far after the moment of writing, hours, needs ``--confirm``."""


def _span(h: float) -> str:
    m = round(abs(h) * 60.0)
    return f"{m // 60} h {m % 60:02d} min" if m >= 60 else f"{m} min"


def entry_warnings(kind: str, r: Record, state: JournalState, written_utc: datetime,
                   plan_areas: Collection[str] = ()) -> list[str]:
    """The warnings of an entry of ``kind`` with record ``r`` (see the module docstring)."""
    out = []
    ahead_h = (r.time_utc - written_utc).total_seconds() / 3600.0
    if ahead_h > FUTURE_LIMIT_H:
        out.append(f"the time {format_utc(r.time_utc)} is {_span(ahead_h)} after now "
                   f"({format_utc(written_utc)})")
    follows = getattr(r.details, "follows", None)
    p = r.planned
    if kind in FOLLOWS and follows is not None and p is not None and p.flush_h is not None:
        start = state.current(follows) if follows in state.stored else None
        if start is not None:
            took_h = (r.time_utc - start.time_utc).total_seconds() / 3600.0
            # whole minutes, as entries are written and shown (a planned start rounded to
            # its minute must not make an as-planned completion look early)
            if round(took_h * 60.0) < round(p.flush_h * 60.0):
                what = "compliant" if kind == COMPLETED else "back on regular fuel"
                out.append(f"completed {_span(took_h)} after its start (entry {follows}), "
                           f"sooner than the {_span(p.flush_h)} the plan ({p.source}) "
                           f"models until {what}")
    if plan_areas and r.area is not None and r.area not in plan_areas:
        out.append(f"the area {r.area!r} is not in the linked plan ("
                   f"{', '.join(sorted(plan_areas))})")
    return out


def confirmed(warnings: list[str], confirm: bool) -> tuple[str, ...]:
    """The warnings to keep in the entry; refused in one line unless ``confirm``."""
    if warnings and not confirm:
        raise InputError("--confirm", "", "; ".join(warnings),
                         "--confirm to record the entry with this warning kept in it")
    return tuple(warnings)

