"""The printed changeover record: regulation 14.6 items ([MARPOL-VI]) from the journal, ready
to sign.

Page one names the ship (name, IMO number), what the copy covers, the
journal's entry count, its last hash and whether the chain verified when
printed. Then the fuels named, with sulphur and delivery-note references;
then each changeover: every step's entry number, date, time in UTC and in
ship's time, position and what was planned; the fuel and its sulphur; the
volume of compliant fuel in each tank (observed, at 15 °C by Table 54B [TABLE-54B], and
mass); the margin to the planned boundary (a crossing, or a moment on the clock such as
the area coming into force while the ship is inside it); and lines for the chief
engineer and the master to sign. A corrected entry is printed struck through
with the correction under it, never left out. Other entries (tank soundings,
samples, notes) follow in one table, after the scrubber events (time, position, event,
washwater mode, SO2 and CO2 readings against the ratio limit, an over-limit reading and a
failure said in words) and the documents made (title, file, SHA-256). reportlab is
imported inside functions.
"""

from __future__ import annotations

from datetime import UTC, datetime
from pathlib import Path

from planner.common.timefmt import format_utc
from planner.documents.pdf_common import (
    FRAME_WIDTH_MM,
    Markup,
    build_pdf,
    caution_box,
    data_table,
    esc,
    para,
    signature_block,
    title_block,
)
from planner.documents.record_pdf_cells import (
    cell,
    long_texts,
    others_section,
    reports_section,
    scrubber_section,
    ship_time,
    short_text,
    trend_lines,
)
from planner.journal.book import Book, Changeover, Line, Version
from planner.journal.describe import (
    bdn_items,
    boundary_text,
    fuel_text,
    position_text,
    step_heading,
    warnings,
)
from planner.journal.details import TankReading
from planner.journal.entries import (
    COMPLETED,
    REG14_KINDS,
    Record,
)
from planner.journal.events import event_of, goal_text
from planner.journal.verify import VerifyReport

TITLE = "Fuel changeover record"
SUBTITLE = ("MARPOL Annex VI regulation 14.6: the changeover to compliant fuel completed before "
            "entry into an emission control area (or before the area comes into force while "
            "the ship is inside it), and the changeover to regular fuel commenced after exit "
            "(or after the area ceases to be in force), with the volume of compliant fuel in "
            "each tank. Printed from the ship's journal, where entries are never changed: a "
            "correction is printed beside the struck-through original.")


def goal(ch: Changeover) -> str:
    """What the changeover is for, from its planned boundary (a crossing by default)."""
    return goal_text(event_of(ch.planned, ch.direction), ch.direction, ch.area)


def _plannedcell(r: Record) -> list[str]:
    p = r.planned
    if p is None:
        return ["not linked to a plan"]
    out = [f"{p.source} #{p.changeover}"]
    if p.time_utc is not None:
        out.append(format_utc(p.time_utc))
        d = round((r.time_utc - p.time_utc).total_seconds() / 60.0)
        out.append("as planned" if d == 0 else f"actual {'+' if d > 0 else '-'}{abs(d)} min")
    if p.position is not None:
        out.insert(2, position_text(p.position))
    if r.as_planned:
        out.append(f"{' & '.join(r.as_planned)} confirmed from plan")
    return out


def _version_row(v: Version, kind: str, first: bool) -> list[Markup]:
    s, r = v.stored, v.record
    struck = not v.standing
    if first:
        label = [step_heading(kind, r)]
    elif r is None:
        label = [f"Struck out: {short_text(v.reason or '', s.seq)}"]
    else:
        label = [f"Correction of {v.stored.entry.correction.corrects}: "
                 f"{short_text(v.reason or '', s.seq)}", step_heading(kind, r)]
    if r is None:
        return [cell([str(s.seq)], struck), cell(label, struck)] + [cell(["—"], struck)] * 5
    return [
        cell([str(s.seq)], struck, bold=v.standing),
        cell(label, struck, bold=first and v.standing),
        cell([r.time_utc.strftime("%Y-%m-%d")], struck),
        cell([r.time_utc.strftime("%H:%M") + "Z"], struck),
        cell(ship_time(r), struck),
        cell(position_text(r.position).split(" ", 1), struck),
        cell(_plannedcell(r), struck),
    ]


def _steps_table(ch: Changeover):
    rows = []
    for line in ch.steps:
        for i, v in enumerate(line.versions):
            rows.append(_version_row(v, line.kind, i == 0))
    return data_table(["Entry", "Step", "Date (UTC)", "Time UTC", "Ship's time", "Position",
                       "Planned"], rows, [12, 40, 20, 16, 25, 29, 36], zebra=False)


def _tank_rows(v: Version, struck: bool) -> list[list[Markup]]:
    tanks = [t for t in getattr(v.record.details, "tanks", ()) if isinstance(t, TankReading)]
    sulphur = {u.fuel.name: u.fuel.sulphur_pct for u in v.record.fuels}
    rows = []
    for t in tanks:
        s = sulphur.get(t.fuel)
        rows.append([cell([str(v.stored.seq)], struck), cell([t.tank], struck),
                     cell([t.fuel], struck), cell(["—" if s is None else f"{s:.2f}"], struck),
                     cell([f"{t.volume_m3:.3f}"], struck),
                     cell([f"{t.temperature_c:.1f}"], struck), cell([f"{t.vcf:.4f}"], struck),
                     cell([f"{t.volume15_m3:.3f}"], struck), cell([f"{t.mass_t:.3f}"], struck)])
    if tanks:
        rows.append([cell([""], struck), cell(["Total"], struck, bold=True), "", "",
                     cell([f"{sum(t.volume_m3 for t in tanks):.3f}"], struck), "", "",
                     cell([f"{sum(t.volume15_m3 for t in tanks):.3f}"], struck, bold=True),
                     cell([f"{sum(t.mass_t for t in tanks):.3f}"], struck, bold=True)])
    return rows


def _tanks_section(line: Line) -> list:
    """The soundings of every version: each superseded list struck through, then the list
    that stands (the correction's, even when it kept the original's soundings)."""
    rows: list[list[Markup]] = []
    versions = [v for v in line.versions if v.record is not None]
    standing = versions[-1] if versions and not line.struck else None
    shown = []
    for v in versions:
        tanks = getattr(v.record.details, "tanks", ())
        if v is standing or tanks in shown or (
                standing is not None and tanks == standing.record.details.tanks):
            continue
        shown.append(tanks)
        rows += _tank_rows(v, struck=True)
    if standing is not None:
        rows += _tank_rows(standing, struck=False)
    if not rows:
        return []
    what = "completed" if line.kind == COMPLETED else "commenced"
    which = f"entry {line.seq}"
    if len(line.versions) > 1:
        which += (f", struck out by entry {line.standing.stored.seq}" if line.struck else
                  f", as corrected by entry {line.standing.stored.seq}")
    return [para(f"Compliant fuel in each tank when the changeover was {what} ({which}); "
                 "observed volume corrected to 15 °C with the Table 54B volume "
                 "correction factor (VCF); mass = volume at 15 °C × density at 15 °C.", "small"),
            data_table(["Entry", "Tank", "Fuel", "S % m/m", "Observed m³", "Temp °C", "VCF",
                        "m³ at 15 °C", "Mass t"], rows, [12, 38, 20, 15, 20, 15, 16, 22, 20],
                       align="lllrrrrrr", zebra=False)]


def _fuel_lines(ch: Changeover) -> list[str]:
    out: list[str] = []
    for line in ch.steps:
        r = line.record
        to, frm = r.fuels_as("to"), r.fuels_as("from")
        if ch.direction == "to_compliant":
            out += [f"Compliant fuel: {fuel_text(u)}" for u in to]
            out += [f"Changed from: {fuel_text(u)}" for u in frm]
        else:
            out += [f"Changed back to: {fuel_text(u)}" for u in to]
            out += [f"Compliant fuel left in the tanks: {fuel_text(u)}" for u in frm]
        if out:
            break
    return out


def _key_step(ch: Changeover) -> Line | None:
    """The regulation 14.6 step of a changeover (else its first step), not struck out."""
    live = [x for x in ch.steps if not x.struck]
    for line in live:
        if line.kind in REG14_KINDS:
            return line
    return live[0] if live else None


def numbered(book: Book) -> list[tuple[int | None, Changeover]]:
    """The changeovers with their printed numbers; one whose every step is struck out has
    none (it is printed struck, never counted as a changeover or as a missing record)."""
    out, n = [], 0
    for ch in book.changeovers:
        if ch.struck:
            out.append((None, ch))
        else:
            n += 1
            out.append((n, ch))
    return out


def _struck_text(ch: Changeover) -> list[str]:
    return [f"entry {x.seq} struck out by entry {x.standing.stored.seq}: "
            f"{short_text(x.standing.reason or '', x.standing.stored.seq)}" for x in ch.steps]


def _summary(book: Book) -> list:
    rows = []
    for i, ch in numbered(book):
        key = _key_step(ch)
        what = goal(ch)
        if ch.circuit:
            what += f" ({ch.circuit})"
        if i is None:
            rows.append([cell(["—"], True), cell([what], True),
                         cell(["struck out"] + _struck_text(ch)), "", "", ""])
            continue
        if key is None or key.kind not in REG14_KINDS:
            rows.append([str(i), what, "not recorded", "—", "—", "—"])
            continue
        r = key.record
        tanks = [t for t in getattr(r.details, "tanks", ()) if isinstance(t, TankReading)]
        step = "completed" if key.kind == COMPLETED else "commenced"
        ref = f"entry {key.seq}" + (f", corrected by {key.standing.stored.seq}"
                                    if len(key.versions) > 1 else "")
        rows.append([str(i), what, [f"{step} {format_utc(r.time_utc)}", ref],
                     ship_time(r), position_text(r.position).split(" ", 1),
                     [f"{sum(t.volume15_m3 for t in tanks):.3f} m³",
                      f"{sum(t.mass_t for t in tanks):.3f} t, {len(tanks)} tank(s)"]])
    if not rows:
        return []
    cells = [[c if isinstance(c, Markup) else cell(c if isinstance(c, list) else [c])
              for c in row] for row in rows]
    return [para("Changeovers in this record", "h1"), data_table(
        ["No.", "Changeover", "Reg. 14.6 time (UTC)", "Ship's time", "Position",
         "Compliant fuel at 15 °C"], cells, [10, 56, 32, 25, 27, 28], align="lllllr")]


def _changeover(i: int | None, ch: Changeover) -> list:
    from reportlab.platypus import KeepTogether

    name = f"Changeover {i}" if i is not None else "Struck out, not a changeover"
    head = f"{name}: {goal(ch)}"
    facts = [x for x in (f"circuit {ch.circuit}" if ch.circuit else "",
                         f"voyage {ch.voyage}" if ch.voyage else "") if x]
    parts = [para(head, "h1")]
    if facts:
        parts.append(para(" · ".join(facts), "small"))
    parts.append(_steps_table(ch))
    if i is None:
        parts += [para(x[0].upper() + x[1:] + ".", "small") for x in _struck_text(ch)]
        return parts + long_texts(_free_texts(ch.steps))
    parts += [para(x, "small") for x in _fuel_lines(ch)]
    key = _key_step(ch)
    note = boundary_text(key.kind, key.record) if key is not None else ""
    if note:
        parts.append(para(note[0].upper() + note[1:] + ".", "small"))
    for line in ch.steps:
        if line.kind in REG14_KINDS:
            parts += _tanks_section(line)
    parts += [para(t, "small") for t in trend_lines(ch.trends)]
    who = []
    for line in ch.steps:
        for v in line.versions:
            e = v.stored.entry
            who.append(f"entry {v.stored.seq} by {e.who.rank} {e.who.name}, written "
                       f"{format_utc(e.written_utc)}")
    parts.append(para("Entered: " + "; ".join(who) + ".", "small"))
    for seq, what, text in _free_texts(ch.steps):
        parts.append(para(f"Entry {seq}, {what}: {short_text(text, seq)}", "small"))
    warn = [w for line in ch.steps if not line.struck for w in warnings(line.kind, line.record)]
    warn += [f"entry {line.standing.stored.seq}, confirmed when written: {w}"
             for line in ch.steps if not line.struck for w in line.record.confirmed]
    if warn:
        parts.append(caution_box("Check this changeover", warn))
    if not any(line.kind in REG14_KINDS for line in ch.steps if not line.struck):
        parts.append(caution_box("Not complete", [
            "No completion of this changeover (or commencement of the change back) is recorded "
            "in the selection: regulation 14.6 asks for that record."]))
    sign = signature_block(["Chief engineer", "Master"])
    return [KeepTogether(parts + sign)] + long_texts(_free_texts(ch.steps))


def _free_texts(lines: tuple[Line, ...]) -> list[tuple[int, str, str]]:
    """(entry, what, text) of every version's remarks and correction reason."""
    out = []
    for line in lines:
        for v in line.versions:
            if v.reason:
                out.append((v.stored.seq, "reason", v.reason))
            remarks = getattr(v.record.details, "remarks", "") if v.record else ""
            if remarks:
                out.append((v.stored.seq, "remarks", remarks))
    return out


def write_record_pdf(target: str | Path, book: Book, report: VerifyReport, *,
                     journal_name: str, printed_at: datetime | None = None) -> None:
    """Write the changeover record of ``book`` to ``target`` (all-or-nothing)."""
    printed_at = printed_at or datetime.now(UTC).replace(microsecond=0)
    check = (f"intact: all {report.entries} entries match their hashes" if report.ok else
             f"FAILED: {len(report.problems)} problem(s), listed below")
    facts = [
        ("Ship", book.ship_name),
        ("IMO number", book.imo_number),
        ("This copy covers", f"{book.selection}: {len(book.standing)} changeover(s), "
                             f"{len(book.scrubber)} scrubber event(s), {len(book.reports)} "
                             f"document(s) made, {len(book.others)} other entries"),
        ("Journal", f"{journal_name}: {book.entries} entries, the last is entry "
                    f"{book.last_seq}"),
        ("Journal's last hash", para(book.last_hash, "mono")),
        ("Chain check", check),
        ("Printed", f"{format_utc(printed_at)} (UTC)"),
    ]
    story = title_block(TITLE, SUBTITLE, facts)
    if not report.ok:
        shown = [str(p) for p in report.problems[:15]]
        if len(report.problems) > 15:
            shown.append(f"... and {len(report.problems) - 15} more (changeover log verify)")
        story.append(caution_box("This journal failed its chain check when printed", shown))
    story += _summary(book)
    if book.fuels:
        story.append(para("Fuels named in this record", "h1"))
        story.append(data_table(
            ["Fuel", "Grade", "Sulphur % m/m", "Density 15 °C kg/m³", "Delivery note"],
            [[f.name, f.grade or "—", f"{f.sulphur_pct:.2f}", f"{f.density15_kg_m3:.1f}",
              f.bdn_ref] for f in book.fuels], [34, 30, 26, 32, FRAME_WIDTH_MM - 122],
            align="llrrl"))
        for f in book.fuels:
            items = bdn_items(f)
            if items:
                story.append(para(f"{f.name}, delivery note {f.bdn_ref}: " + "; ".join(items)
                                  + ".", "small"))
    if not book.changeovers:
        story.append(para("No changeover is recorded in this selection.", "h2"))
    for i, ch in numbered(book):
        story += _changeover(i, ch)
    story += scrubber_section(book.scrubber)
    story += reports_section(book.reports)
    story += others_section(book.others)
    story += [para("How to check this copy", "h2"), para(
        f"Run <font face='Courier'>changeover log verify --journal {esc(journal_name)} --hash "
        f"{book.last_hash}</font>: the journal must still hold this hash (entry "
        f"{book.last_seq}) and every entry must match its hash. Times are UTC unless marked "
        "ship's time; positions are WGS84 in degrees and minutes.", "small", markup=True)]
    build_pdf(target, story, title=TITLE,
              header_right=f"{book.ship_name} · IMO {book.imo_number}",
              footer_middle=f"journal last hash {book.last_hash[:16]}… (entry {book.last_seq})",
              printed_at=printed_at)
