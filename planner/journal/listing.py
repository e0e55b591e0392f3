"""Rows for ``changeover log show`` and lines for ``verify``: plain text, no terminal code.

Each listed entry is a :class:`ListRow` of short cells; an entry that a
later correction replaced is marked so the table can strike it through.
"""

from __future__ import annotations

import textwrap
from collections.abc import Iterable
from dataclasses import dataclass
from datetime import date

from geo.errors import InputError
from planner.common.timefmt import format_ship, format_utc
from planner.journal.codec import encode
from planner.journal.describe import bdn_items, position_text, sample_and_text, trend_text
from planner.journal.describe_kinds import report_text, scrubber_text
from planner.journal.details import TankReading
from planner.journal.entries import (
    BACK_COMMENCED,
    BACK_COMPLETED,
    COMPLETED,
    CORRECTION,
    FUEL,
    KINDS,
    NOTE,
    REPORT,
    SAMPLE,
    SCRUBBER,
    SETUP,
    STARTED,
    TANKS,
    TREND,
)
from planner.journal.state import JournalState, Stored
from planner.journal.verify import VerifyReport

COMMAND_KINDS = {"start": STARTED, "complete": COMPLETED, "back": BACK_COMMENCED,
                 "back-complete": BACK_COMPLETED, "tanks": TANKS, "sample": SAMPLE, "note": NOTE,
                 "correction": CORRECTION, "correct": CORRECTION, "fuel": FUEL, "setup": SETUP,
                 "init": SETUP, "trend": TREND, "scrubber": SCRUBBER, "report": REPORT}
"""Kind names as the commands spell them, to the stored kinds."""

SHOWN_CHARS = 120
"""Longest note, remarks or reason shown in the listing (shortened at a word; ``show
--json`` and the printed record hold it whole)."""

SHORT = {v: k for k, v in COMMAND_KINDS.items() if k not in ("correct", "init")}


def parse_kinds(names: Iterable[str]) -> set[str]:
    """Stored kinds from command names (``complete``) or stored names (``changeover_completed``)."""
    out = set()
    for n in names:
        k = COMMAND_KINDS.get(n.strip().lower(), n.strip().lower())
        if k not in KINDS:
            raise InputError("--kind", "", n, f"one of {', '.join(SHORT.values())}")
        out.add(k)
    return out


def parse_day_opt(text: str | None, option: str) -> date | None:
    from planner.common.timefmt import parse_day

    return parse_day(text, file=option) if text else None


@dataclass(frozen=True)
class ListRow:
    """One entry for the listing; ``replaced`` when a correction now stands in its place."""

    seq: int
    kind: str
    utc: str
    ship_time: str
    position: str
    area: str
    details: str
    who: str
    status: str
    replaced: bool


def _details(s: Stored) -> str:
    e = s.entry
    r = e.record
    head = ""
    if e.kind == CORRECTION and e.correction is not None:
        c = e.correction
        reason = textwrap.shorten(c.reason, SHOWN_CHARS, placeholder=" …")
        head = f"{'strikes out' if c.void else 'corrects'} {c.corrects}: {reason}"
        if r is None:
            return head
        head += "; "
    d = r.details
    parts = [f"circuit {r.circuit}"] if r.circuit else []
    fuels = [f"{u.role} {u.fuel.name} {u.fuel.sulphur_pct:.2f} % S" for u in r.fuels]
    parts += fuels
    tanks = getattr(d, "tanks", ())
    if tanks and isinstance(tanks[0], TankReading):
        parts.append(f"{len(tanks)} tank{'s' if len(tanks) > 1 else ''} "
                     f"{sum(t.volume15_m3 for t in tanks):.3f} m³ at 15 °C "
                     f"({', '.join(t.tank for t in tanks)})")
    elif tanks:
        parts.append(f"tanks {', '.join(tanks)}")
    if getattr(d, "ship_name", None):
        parts.insert(0, f"ship {d.ship_name}, IMO {d.imo_number}")
    if getattr(d, "fuel", None) is not None:
        f = d.fuel
        parts.append(f"{f.name} {f.grade} {f.sulphur_pct:.2f} % S, {f.density15_kg_m3:.1f} "
                     f"kg/m³, BDN {f.bdn_ref}")
        parts += bdn_items(f)
    parts += scrubber_text(d) + report_text(d)
    parts += [textwrap.shorten(x, SHOWN_CHARS, placeholder=" …") for x in sample_and_text(d)]
    parts += trend_text(d)
    if getattr(d, "follows", None):
        parts.append(f"follows {d.follows}")
    if r.planned is not None:
        parts.append(f"plan {r.planned.source} #{r.planned.changeover}")
    parts += [f"confirmed warning: {w}" for w in r.confirmed]
    return head + "; ".join(parts)


def list_rows(state: JournalState, voyage: str | None = None, area: str | None = None,
              since: date | None = None, until: date | None = None,
              kinds: set[str] | None = None) -> list[ListRow]:
    """Entries in number order that match every filter given (a record's values as written)."""
    rows = []
    for s in state.stored.values():
        e = s.entry
        r = e.record
        if r is None and e.correction is not None:
            r = state.stored[state.root(e.correction.corrects)].entry.record
        if kinds and e.kind not in kinds:
            continue
        if voyage is not None and (r is None or r.voyage != voyage):
            continue
        if area is not None and (r is None or r.area != area):
            continue
        day = r.time_utc.date() if r is not None else None
        if day is not None and ((since and day < since) or (until and day > until)):
            continue
        later = state.corrections.get(s.seq, [])
        status = ""
        if later:
            last = state.stored[later[-1]].entry
            verb = "struck out" if last.record is None else "corrected"
            status = f"{verb} by {', '.join(str(c) for c in later)}"
        elif e.kind == CORRECTION and e.correction is not None:
            root = state.root(e.correction.corrects)
            newer = [c for c in state.corrections.get(root, []) if c > s.seq]
            status = f"superseded by {newer[-1]}" if newer else "stands"
        rows.append(ListRow(
            s.seq, SHORT.get(e.kind, e.kind),
            format_utc(r.time_utc) if r else "—",
            format_ship(r.time_utc, r.ship_tz) if r else "—",
            position_text(r.position) if r else "—",
            (r.area or "") if r else "", _details(s), f"{e.who.rank} {e.who.name}", status,
            bool(later) or status.startswith("superseded")))
    return rows


def rows_json(state: JournalState, rows: list[ListRow]) -> list[dict]:
    """The listed entries in full, for ``show --json``."""
    return [{"seq": r.seq, "hash": state.stored[r.seq].hash, "status": r.status,
             "entry": encode(state.stored[r.seq].entry)} for r in rows]


def verify_lines(name: str, report: VerifyReport) -> list[str]:
    """What ``verify`` prints."""
    n = report.entries
    if report.ok:
        lines = [f"journal {name}: {n} entries, chain intact; last entry {report.last_seq}, "
                 f"hash {report.last_hash}"]
    else:
        lines = [f"journal {name}: {n} entries, FAILED verification "
                 f"({len(report.problems)} problem{'s' if len(report.problems) > 1 else ''}):"]
        lines += [f"  {p}" for p in report.problems]
    if report.confirms_print:
        lines.append(f"the printed copy's hash is entry {report.expect_seq}'s: entries 1 to "
                     f"{report.expect_seq} are as they were when printed")
    elif report.expect_seq is not None:
        lines.append(f"the printed copy's hash is entry {report.expect_seq}'s, but the "
                     f"problems above mean entries 1 to {report.expect_seq} cannot be "
                     "confirmed as printed")
    return lines


def verify_json(name: str, report: VerifyReport) -> dict:
    """``verify --json``."""
    return {"journal": name, "ok": report.ok, "entries": report.entries,
            "last_seq": report.last_seq, "last_hash": report.last_hash,
            "problems": [{"seq": p.seq, "what": p.what} for p in report.problems],
            "hash_checked": report.expect_hash, "hash_at_entry": report.expect_seq,
            "print_confirmed": report.confirms_print}
