"""Pieces of the printed changeover record: text cells, long free text, other entries.

Used by :mod:`planner.documents.record_pdf`. A cell holds escaped text, struck through
(grey) for a version that no longer stands; free text longer than :data:`CELL_CHARS` is
cut in its cell with a pointer and printed in full under the table, in paragraphs that
break across pages. The other entries (tank soundings, samples, notes) are one table, the
scrubber events another, the documents made a third.
reportlab is imported inside functions.
"""

from __future__ import annotations

from planner.common.timefmt import format_offset, format_utc
from planner.documents.pdf_common import FRAME_WIDTH_MM, Markup, data_table, esc, para
from planner.journal.book import Line, Version
from planner.journal.describe import fuel_text, position_text, sample_and_text, trend_text
from planner.journal.entries import LABELS, Record

GREY = "#6b6b6b"
CELL_CHARS = 240
"""Longest free text (a reason, a note, remarks) put in a table cell; longer text is cut
there with a pointer and printed in full, across pages if need be, under the table."""


def short_text(text: str, seq: int) -> str:
    """``text`` for a table cell: whole when short, else its start and where the rest is."""
    if len(text) <= CELL_CHARS:
        return text
    return f"{text[:CELL_CHARS].rstrip()}… (entry {seq} in full below)"


def long_texts(pairs: list[tuple[int, str, str]]) -> list:
    """Paragraphs holding in full each (entry, what, text) too long for its cell."""
    out = []
    for seq, what, text in pairs:
        if len(text) > CELL_CHARS:
            out.append(para(f"Entry {seq}, {what} in full:", "small"))
            out += [para(chunk, "small") for chunk in chunks(text)]
    return out


def chunks(text: str, size: int = 2000) -> list[str]:
    """Text in pieces of about ``size`` characters (paragraphs that can break across pages)."""
    out = []
    for block in text.splitlines() or [""]:
        out += [block[i:i + size] for i in range(0, max(len(block), 1), size)]
    return out


def cell(lines: list[str], struck: bool = False, bold: bool = False) -> Markup:
    text = "<br/>".join(esc(x) for x in lines)
    if bold:
        text = f"<b>{text}</b>"
    if struck:
        text = f'<font color="{GREY}"><strike>{text}</strike></font>'
    return Markup(text)


def ship_time(r: Record) -> list[str]:
    local = r.time_utc.astimezone(r.ship_tz)
    return [local.strftime("%Y-%m-%d %H:%M"), f"UTC{format_offset(r.ship_tz)}"]


def others_section(lines: tuple[Line, ...]) -> list:
    if not lines:
        return []
    rows = []
    for line in lines:
        for i, v in enumerate(line.versions):
            struck = not v.standing
            r = v.record
            reason = short_text(v.reason or "", v.stored.seq)
            label = LABELS[line.kind] if i == 0 else (
                f"struck out: {reason}" if r is None else f"correction of "
                f"{v.stored.entry.correction.corrects}: {reason}")
            if r is None:
                rows.append([cell([str(v.stored.seq)], struck), cell([label], struck)]
                            + [cell(["—"], struck)] * 4)
                continue
            rows.append([cell([str(v.stored.seq)], struck), cell([label], struck),
                         cell([format_utc(r.time_utc)], struck), cell(ship_time(r), struck),
                         cell(position_text(r.position).split(" ", 1), struck),
                         cell(other_details(v), struck)])
    full = [(v.stored.seq, what, text) for line in lines for v in line.versions
            for what, text in (("reason", v.reason or ""),
                               ("text", "\n".join(sample_and_text(v.record.details))
                                if v.record else ""))]
    return [para("Tank soundings, samples and notes", "h1"),
            data_table(["Entry", "What", "UTC", "Ship's time", "Position", "Details"], rows,
                       [12, 28, 25, 25, 27, FRAME_WIDTH_MM - 117])] + long_texts(full)


def other_details(v: Version) -> list[str]:
    r = v.record
    d = r.details
    out = [fuel_text(u) for u in r.fuels]
    for t in getattr(d, "tanks", ()):
        out.append(f"{t.tank}: {t.volume_m3:.3f} m³ @ {t.temperature_c:.1f} °C = "
                   f"{t.volume15_m3:.3f} m³ at 15 °C, {t.mass_t:.3f} t")
    out += [short_text(x, v.stored.seq) for x in sample_and_text(d)]
    out += trend_text(d)
    out += [f"confirmed when written: {w}" for w in r.confirmed]
    e = v.stored.entry
    out.append(f"by {e.who.rank} {e.who.name}")
    return out


def trend_lines(trends: tuple[Line, ...]) -> list[str]:
    """One sentence per trend file attached to a changeover's steps (a struck-out one said
    so), with how to get the stored bytes back."""
    out = []
    for line in trends:
        v = line.standing
        e = line.versions[0].stored.entry
        words = "; ".join(trend_text(line.record.details))
        if line.struck:
            out.append(f"Trend file of entry {line.seq} struck out by entry {v.stored.seq} "
                       f"({v.reason or ''}): {words}.")
            continue
        out.append(f"Trend file attached, entry {line.seq} by {e.who.rank} {e.who.name}: "
                   f"{words}. Kept in the journal: changeover log export-trend {line.seq} "
                   "OUT.csv writes it back, checked against this hash.")
    return out


def latin(text: str) -> str:
    """Text for the PDF's standard fonts (Latin-1): the subscript two of SO₂ as ``2``."""
    return text.replace("\u2082", "2")


def _label(line: Line, i: int, v: Version, first: str) -> str:
    """The version's label: ``first`` for the original, else the correction's or strike-out's
    words with its reason."""
    reason = short_text(v.reason or "", v.stored.seq)
    if i == 0:
        return first
    if v.record is None:
        return f"struck out: {reason}"
    return f"correction of {v.stored.entry.correction.corrects}: {reason}"


def _scrubber_row(line: Line, i: int, v: Version) -> list[Markup]:
    from planner.journal.describe_kinds import (
        OVER_WORDS,
        event_head,
        planned_text,
        reading_text,
    )

    struck = not v.standing
    r = v.record
    if r is None:
        return ([cell([str(v.stored.seq)], struck), cell([_label(line, i, v, "")], struck)]
                + [cell(["—"], struck)] * 4)
    d = r.details
    head = latin(event_head(d))
    label = [head] if i == 0 else [_label(line, i, v, ""), head]
    notes = [latin(reading_text(d))] if d.ratio is not None else []
    if d.remarks:
        notes.append(short_text(latin(d.remarks), v.stored.seq))
    notes += [short_text(latin(x), v.stored.seq) for x in planned_text(d)]
    e = v.stored.entry
    notes.append(f"by {e.who.rank} {e.who.name}")
    body = "<br/>".join(f"<b>{esc(x)}</b>" if OVER_WORDS in x else esc(x) for x in notes)
    shown = [esc(x) for x in label]
    if d.failure or d.over_limit:   # the event line in bold: what a reader must see
        shown[-1] = f"<b>{shown[-1]}</b>"
    event = "<br/>".join(shown)
    if struck:
        body = f'<font color="{GREY}"><strike>{body}</strike></font>'
        event = f'<font color="{GREY}"><strike>{event}</strike></font>'
    return [cell([str(v.stored.seq)], struck, bold=v.standing), Markup(event),
            cell([format_utc(r.time_utc)], struck), cell(ship_time(r), struck),
            cell(position_text(r.position).split(" ", 1), struck), Markup(body)]


def scrubber_section(lines: tuple[Line, ...]) -> list:
    """Scrubber events in time order, each version (corrections struck through), with a
    caution box for every failure and over-limit reading that stands."""
    from planner.documents.pdf_common import caution_box
    from planner.journal.describe_kinds import event_head, reading_text

    if not lines:
        return []
    rows = [_scrubber_row(line, i, v) for line in lines for i, v in enumerate(line.versions)]
    out = [para("Scrubber events", "h1"), para(
        "Exhaust gas cleaning system events as recorded: SO2 in ppm and CO2 in % v/v read at "
        "the scrubber outlet, their ratio against the limit in force (MEPC.340(77) Table 1 "
        "for the sulphur limit named).", "small"),
           data_table(["Entry", "Event", "UTC", "Ship's time", "Position",
                       "Readings, remarks, by"], rows, [12, 36, 25, 25, 24,
                                                       FRAME_WIDTH_MM - 122])]
    marks = []
    for line in lines:
        r = line.standing.record
        if r is None or not (r.details.failure or r.details.over_limit):
            continue
        what = reading_text(r.details) if r.details.over_limit else event_head(r.details)
        action = f"; action: {r.details.remarks}" if r.details.remarks else \
            "; no action recorded"
        marks.append(latin(f"entry {line.seq}, {format_utc(r.time_utc)}, "
                           f"{position_text(r.position)}: {what}"
                           f"{action if r.details.failure else ''}"))
    if marks:
        out.append(caution_box("Scrubber failures and readings over the limit", marks))
    full = [(v.stored.seq, what, text) for line in lines for v in line.versions
            for what, text in (("reason", v.reason or ""),
                               ("remarks", v.record.details.remarks if v.record else ""))]
    return out + long_texts(full)


def reports_section(lines: tuple[Line, ...]) -> list:
    """Documents made and kept in the journal: title, kind, file, size, the SHA-256 in
    short (the first 16 digits) and when, each version (corrections struck through)."""
    if not lines:
        return []
    rows = []
    for line in lines:
        for i, v in enumerate(line.versions):
            struck = not v.standing
            r = v.record
            if r is None:
                rows.append([cell([str(v.stored.seq)], struck),
                             cell([_label(line, i, v, "")], struck)] + [cell(["—"], struck)] * 3)
                continue
            d = r.details
            label = [d.title, f"({d.report_kind})"]
            if i:
                label.insert(0, _label(line, i, v, ""))
            e = v.stored.entry
            rows.append([cell([str(v.stored.seq)], struck), cell(label, struck),
                         cell([format_utc(r.time_utc)] + ship_time(r), struck),
                         cell([d.file_name, f"{d.size_bytes} bytes"], struck),
                         cell([f"{d.sha256[:16]}…", f"by {e.who.rank} {e.who.name}"]
                              + ([short_text(d.remarks, v.stored.seq)] if d.remarks else []),
                              struck)])
    from reportlab.platypus import KeepTogether

    return [KeepTogether([para("Documents made", "h1"), para(
        "Each document is kept in the journal under its SHA-256 (first 16 hexadecimal digits "
        "shown): changeover log export-file ENTRY OUT writes it back, checked against the "
        "full hash in the chain.", "small"),
            data_table(["Entry", "Document", "Made (UTC, ship's time)", "File", "SHA-256, by"],
                       rows, [12, 56, 32, 38, FRAME_WIDTH_MM - 138])])]
