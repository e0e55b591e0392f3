"""Entries in words: positions, fuels, tanks, planned against actual, and warnings.

Plain text for the terminal and the printed record; units on every figure
(m³, °C, t, % m/m, hours, minutes).
"""

from __future__ import annotations

from datetime import datetime

from geo.position import format_position
from planner.common.timefmt import format_ship, format_utc
from planner.journal.describe_kinds import report_text, scrubber_text
from planner.journal.details import FuelSpec, FuelUse, TankReading
from planner.journal.entries import (
    BACK_COMMENCED,
    BACK_COMPLETED,
    COMPLETED,
    CORRECTION,
    LABELS,
    STARTED,
    Planned,
    Position,
    Record,
)
from planner.journal.events import (
    alongside,
    boundary_phrase,
    event_of,
    late_check,
    moment_word,
)
from planner.journal.state import JournalState, Stored


def position_text(p: Position | None) -> str:
    """``54°12.3'N 003°30.0'W``, or an em dash."""
    return format_position(p.lat_deg, p.lon_deg) if p is not None else "—"


def fuel_text(u: FuelUse) -> str:
    """``MGO (DMA), 0.08 % m/m S, BDN BDN-0412``."""
    f = u.fuel
    grade = f" ({f.grade})" if f.grade else ""
    return f"{f.name}{grade}, {f.sulphur_pct:.2f} % m/m S, BDN {f.bdn_ref}"


def bdn_items(f: FuelSpec) -> list[str]:
    """The optional bunker delivery note items given for a fuel, in words with units."""
    out = []
    if f.port or f.bunkered_on:
        out.append("bunkered" + (f" at {f.port}" if f.port else "")
                   + (f" on {f.bunkered_on}" if f.bunkered_on else ""))
    if f.supplier:
        out.append(f"supplier {f.supplier}")
    if f.product:
        out.append(f"product {f.product}")
    if f.quantity_t is not None:
        out.append(f"quantity {f.quantity_t:.3f} t")
    if f.declaration is not None:
        out.append("supplier's declaration " + ("signed" if f.declaration else "NOT given"))
    if f.sample_seal:
        out.append(f"MARPOL sample seal {f.sample_seal}")
    return out


def tank_text(t: TankReading) -> str:
    """``MGO service 12.500 m³ @ 32.0 °C = 12.323 m³ at 15 °C, 10.474 t``."""
    return (f"{t.tank} {t.volume_m3:.3f} m³ @ {t.temperature_c:.1f} °C = "
            f"{t.volume15_m3:.3f} m³ at 15 °C, {t.mass_t:.3f} t")


def sample_and_text(d: object) -> list[str]:
    """The sample line (number, seal, where drawn) and the free text of an entry's details."""
    out = []
    if getattr(d, "sample_number", None):
        out.append(f"sample {d.sample_number}, seal {d.seal_number}"
                   f"{', drawn at ' + d.point if d.point else ''}")
    text = getattr(d, "text", "") or getattr(d, "remarks", "")
    if text:
        out.append(text)
    return out


def trend_text(d: object) -> list[str]:
    """A trend attachment in words: ``trend ME_inlet.csv, 48 213 bytes, SHA-256 ...``, the
    entry it belongs to, the switch time and the column mapping when given (else ``[]``)."""
    if getattr(d, "attaches", None) is None:
        return []
    out = [f"trend {d.file_name}, {d.size_bytes} bytes, SHA-256 {d.sha256}",
           f"attached to entry {d.attaches}"]
    if d.switch_utc is not None:
        out.append(f"valve switched {format_utc(d.switch_utc)}")
    if d.columns:
        out.append("columns " + ", ".join(d.columns))
    if d.tz:
        out.append(f"times without an offset are UTC{d.tz}")
    return out


def minutes_text(delta_h: float) -> str:
    """``1 h 05 min`` / ``25 min`` from hours (sign dropped)."""
    m = round(abs(delta_h) * 60.0)
    return f"{m // 60} h {m % 60:02d} min" if m >= 60 else f"{m} min"


def against_plan(kind: str, r: Record) -> list[str]:
    """Actual against planned, and the margin to the planned boundary crossing."""
    p: Planned | None = r.planned
    if p is None:
        return []
    out = []
    head = f"planned ({p.source}, changeover {p.changeover})"
    if p.time_utc is not None:
        d = (r.time_utc - p.time_utc).total_seconds() / 3600.0
        when = "as planned" if abs(d) < 1 / 120 else \
            f"{minutes_text(d)} {'later' if d > 0 else 'earlier'} than planned"
        out.append(f"{head}: {format_utc(p.time_utc)}"
                   f"{', ' + position_text(p.position) if p.position else ''}; {when}")
    else:
        out.append(head)
    if p.boundary_utc is not None:
        out.append(boundary_text(kind, r))
    if r.as_planned:
        out.append(f"{' and '.join(r.as_planned)} confirmed from the plan, not typed")
    return out


VERB = {STARTED: "started", COMPLETED: "completed", BACK_COMMENCED: "commenced",
        BACK_COMPLETED: "completed"}

STEP_NAME = {STARTED: "Changeover started", COMPLETED: "Completed",
             BACK_COMMENCED: "Commenced", BACK_COMPLETED: "Changeover back completed"}
"""The printed name of each changeover step, before its relation to the boundary."""


def boundary_minutes(r: Record) -> int | None:
    """Whole minutes from the step to the planned boundary crossing (positive: the step came
    first), or None without a planned boundary."""
    p = r.planned
    if p is None or p.boundary_utc is None:
        return None
    return round((p.boundary_utc - r.time_utc).total_seconds() / 60.0)


def relation_text(kind: str, r: Record) -> str:
    """``completed 12 min after entry``, ``commenced at exit``, ``completed 1 h 00 min
    before the area came into force``, ``completed alongside 2 h 10 min before departure``,
    or ``""`` without a planned boundary: what happened, in words, for the step of
    ``kind``, measured against the planned boundary whatever it is (a crossing or a moment
    on the clock, :mod:`planner.journal.events`)."""
    m = boundary_minutes(r)
    if m is None or r.planned is None:
        return ""
    event = event_of(r.planned, r.planned.direction)
    what = moment_word(event)
    verb = VERB.get(kind, "written")
    if m == 0:  # "at entry", "as the area came into force"
        return f"{verb} {'at' if event in ('enter', 'exit', 'departure') else 'as'} {what}"
    return (f"{verb} {alongside(event, m > 0)}{minutes_text(m / 60.0)} "
            f"{'before' if m > 0 else 'after'} {what}")


def step_heading(kind: str, r: Record | None) -> str:
    """The heading of a changeover step as it happened: ``Completed 12 min after entry``,
    ``Commenced 16 min after exit``, ``Completed 1 h 00 min before the area came into
    force``; ``Completed`` when no planned boundary is linked."""
    base = STEP_NAME.get(kind, LABELS.get(kind, kind))
    if r is None or kind not in (COMPLETED, BACK_COMMENCED):
        return base
    rel = relation_text(kind, r)
    return rel[0].upper() + rel[1:] if rel else base


def boundary_text(kind: str, r: Record) -> str:
    """``planned boundary entry 2027-05-31 11:46Z at ...: completed 1 h 42 min before it``
    (``... at it`` within half a minute); for a moment on the clock ``Tarrow Approaches
    ECA came into force at 2027-06-12 00:00Z (...; the ship then at ...): completed
    1 h 00 min before it``."""
    p = r.planned
    m = boundary_minutes(r)
    if p is None or m is None:
        return ""
    event = event_of(p, p.direction)
    margin = f" (the plan's margin {p.margin_h:.2f} h)" if p.margin_h is not None else ""
    rel = "at it" if m == 0 else (f"{alongside(event, m > 0)}{minutes_text(m / 60.0)} "
                                  f"{'before' if m > 0 else 'after'} it")
    head = boundary_phrase(event, p.area, format_utc(p.boundary_utc),
                           position_text(p.boundary) if p.boundary else "")
    return f"{head}: {VERB.get(kind, 'written')} {rel}{margin}"


def warnings(kind: str, r: Record) -> list[str]:
    """What a reader must notice: a completion after the planned boundary (entry, the area
    coming into force, departure), a changeover back commenced before it (exit, the area
    ceasing), to the whole minute, as the record shows them."""
    p = r.planned
    m = boundary_minutes(r)
    if p is None or m is None:
        return []
    event = event_of(p, p.direction)
    if (kind == COMPLETED and m < 0) or (kind == BACK_COMMENCED and m > 0):
        return [f"{relation_text(kind, r)} ({format_utc(p.boundary_utc)} planned): "
                f"{late_check(event, kind == COMPLETED)}"]
    return []


def when_text(moment: datetime, r: Record) -> str:
    """``2027-06-02 13:00Z (ship's time 2027-06-02 15:00 +02:00)``."""
    return f"{format_utc(moment)} (ship's time {format_ship(moment, r.ship_tz)})"


def summary(s: Stored, state: JournalState) -> list[str]:
    """Lines shown after an entry is written (and by ``show --detail``)."""
    e = s.entry
    r = e.record
    label = LABELS[e.kind]
    if r is not None and getattr(r.details, "failure", False):
        label = "scrubber failure"
    if e.kind == CORRECTION and e.correction is not None:
        c = e.correction
        label = (f"{'strike-out' if c.void else 'correction'} of entry {c.corrects} "
                 f"({LABELS[c.of_kind]}): {c.reason}")
    if r is not None and e.kind in (COMPLETED, BACK_COMMENCED) and relation_text(e.kind, r):
        label = f"{label} {relation_text(e.kind, r).split(' ', 1)[1]}"
    lines = [f"entry {s.seq} written: {label}"]
    if r is not None:
        parts = [when_text(r.time_utc, r)]
        if r.position is not None:
            parts.append(position_text(r.position))
        parts += [x for x in (r.area, r.circuit) if x]
        if r.voyage:
            parts.append(f"voyage {r.voyage}")
        follows = getattr(r.details, "follows", None)
        if follows:
            parts.append(f"follows entry {follows}")
        lines.append("  " + " · ".join(parts))
        for u in r.fuels:
            lines.append(f"  fuel {u.role}: {fuel_text(u)}")
        tanks = getattr(r.details, "tanks", ())
        caps = {c.tank: c.capacity_m3 for c in getattr(r.details, "capacities", ())}
        if getattr(r.details, "ship_name", None):
            lines.append(f"  ship {r.details.ship_name}, IMO {r.details.imo_number or '—'}")
        if getattr(r.details, "source", ""):
            lines.append(f"  read from the ship file {r.details.source}")
        for t in tanks:
            cap = f" (capacity {caps[t]:g} m³)" if t in caps else ""
            lines.append(f"  tank {tank_text(t)}" if isinstance(t, TankReading) else
                         f"  tank known: {t}{cap}")
        if getattr(r.details, "circuits", ()):
            lines.append(f"  circuits: {', '.join(r.details.circuits)}")
        if getattr(r.details, "scrubbers", ()):
            lines.append(f"  scrubbers: {', '.join(r.details.scrubbers)}")
        if tanks and isinstance(tanks[0], TankReading):
            lines.append(f"  total {sum(t.volume15_m3 for t in tanks):.3f} m³ at 15 °C, "
                         f"{sum(t.mass_t for t in tanks):.3f} t")
        d = r.details
        if getattr(d, "fuel", None) is not None:
            lines.append(f"  fuel: {fuel_text(FuelUse('subject', d.fuel))}, "
                         f"{d.fuel.density15_kg_m3:.1f} kg/m³ at 15 °C")
            lines += [f"  {x}" for x in bdn_items(d.fuel)]
        lines += ["  " + x for x in scrubber_text(d) + report_text(d)]
        lines += ["  " + x for x in sample_and_text(d)]
        lines += ["  " + x for x in trend_text(d)]
        lines += ["  " + x for x in against_plan(e.subject_kind, r)]
        lines += ["  warning: " + x for x in warnings(e.subject_kind, r)]
        lines += ["  warning confirmed (--confirm): " + x for x in r.confirmed]
    lines.append(f"  by {e.who.rank} {e.who.name}; hash {s.hash}")
    return lines
