"""Pieces of the printed changeover record: text cells, long free text, other entries.

Used by :mod:`planner.documents.record_pdf`. A cell holds escaped text, struck through
(grey) for a version that no longer stands; free text longer than :data:`CELL_CHARS` is
cut in its cell with a pointer and printed in full under the table, in paragraphs that
break across pages. The other entries (tank soundings, samples, notes) are one table.
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
