"""Watch sheets: one page per changeover for the engineer on watch and the bridge (PDF).

Each page: the changeover's number, area and direction; the boundary in UTC and
ship's time with its position; the planned steps with their clock times (UTC
and ship's time) and positions; the expected readings at regular clock times
with a blank column to write each reading taken; blank fields for what the
record needs (MARPOL Annex VI reg. 14.6: date, time and position of each valve
switch and completion, the boundary crossed, and the sounding of each tank),
and the signature lines. Where the plan relies on a scrubber, its events near a
changeover are steps of that page, and a last page lists every scrubber event
by the ship's watch with its action. Built from
:mod:`planner.documents.watch_facts`.

Printed in black on white only (rules and light grey, no colour meaning), in
fonts of 8 pt or more, laid out for the narrower and shorter of A4 and US
Letter so one page per changeover fits either. reportlab is imported inside
the functions.
"""

from __future__ import annotations

from collections.abc import Sequence
from datetime import UTC, datetime
from pathlib import Path

from planner.documents.pdf_common import (
    Markup,
    build_pdf,
    data_table,
    esc,
    para,
)
from planner.documents.plan_pdf_cells import plain, pos_text
from planner.documents.watch_facts import Moment, ScrubberSheet, WatchSheet, offset

TITLE = "Changeover watch sheet"
WIDTH_MM = 178.0  # the A4 frame; US Letter's is wider, its page shorter (checked in tests)


def _utc(m: Moment | None, day: str) -> str:
    if m is None:
        return "not reached"
    t = m.utc.astimezone(UTC)
    return t.strftime("%H:%MZ") if t.strftime("%Y-%m-%d") == day else t.strftime(
        "%Y-%m-%d %H:%MZ")


def _ship(m: Moment | None, day: str, off: str) -> str:
    if m is None:
        return "—"
    t = m.utc.astimezone(m.ship_tz)
    text = t.strftime("%H:%M") if t.strftime("%Y-%m-%d") == day else t.strftime(
        "%Y-%m-%d %H:%M")
    return text if offset(m) == off else f"{text} ({offset(m)})"


def clock_moment(s: WatchSheet) -> Moment:
    """The moment whose dates the sheet's undated times are on: the first planned step
    (the valve switch or the temperature change before it), else the boundary."""
    timed = [st.when for st in s.steps if st.when is not None]
    return min(timed, key=lambda m: m.utc) if timed else s.boundary


def _head(s: WatchSheet) -> list:
    from planner.charts.plan_events import moment_words, what_text

    b = s.boundary
    at = f"{b.utc.astimezone(UTC):%Y-%m-%d %H:%M}Z"
    row = {"boundary_event": s.boundary_event, "direction": s.direction}
    what = what_text(row, at)
    label, where = moment_words(row)
    limit = f"limit {s.limit_pct:.2f} % m/m" + (f", target {s.target_pct:.3f} % m/m"
                                                 if s.target_pct else "")
    ship = b.utc.astimezone(b.ship_tz)
    c = clock_moment(s)
    facts = [
        (label, f"{at} UTC, ship's time {ship:%Y-%m-%d %H:%M} ({offset(b)})"),
        ("Position", f"{where} {pos_text(b.lat, b.lon)}, {s.boundary_nm:,.1f} nm from "
                     "departure"),
        ("Circuits", "; ".join(f"{c}: {x}" for c, x in zip(s.circuits, s.changes,
                                                            strict=True)) + f"; {limit}"),
        ("Clock", f"times without a date are on {c.utc.astimezone(UTC):%Y-%m-%d} (UTC) and "
                  f"{c.utc.astimezone(c.ship_tz):%Y-%m-%d} (ship's time, UTC{offset(c)})"),
    ]
    rows = [[para(k, "cell_b"), para(plain(v), "cell")] for k, v in facts]
    return [para(plain(f"Changeover {s.number}: {s.area}{what}"), "h1"),
            data_table(["", ""], rows, [28, WIDTH_MM - 28], zebra=False, compact=True)]


def _steps(s: WatchSheet, day: str, ship_day: str, off: str) -> list:
    rows = []
    for st in s.steps:
        pos = pos_text(st.when.lat, st.when.lon) if st.when else "—"
        rows.append([_utc(st.when, day), _ship(st.when, ship_day, off), st.circuit or "bridge",
                     Markup(esc(plain(st.what)) + (" <b>[record]</b>" if st.record else "")),
                     pos])
    return [para("Steps, as planned", "h2"),
            data_table(["UTC", "Ship's time", "Circuit", "Step", "Planned position"], rows,
                       [17, 19, 15, 93, 34], zebra=False, compact=True)]


def _readings(s: WatchSheet, day: str, ship_day: str, off: str) -> list:
    head = ["UTC", "Ship's time"]
    widths = [17.0, 19.0]
    each = (WIDTH_MM - sum(widths)) / len(s.circuits)
    for c in s.circuits:
        head += [f"{c}: S % m/m", "cSt", "°C", "read"]
        widths += [each * 0.3, each * 0.24, each * 0.16, each * 0.3]
    rows = []
    for r in s.readings:
        row = [_utc(r.when, day), _ship(r.when, ship_day, off)]
        for c in s.circuits:
            v = r.values.get(c)
            if v is None:
                row += ["—", "—", "—", ""]
                continue
            sul, lo, hi, temp, flag = v
            visc = "—" if lo is None else (f"{lo:.1f}" if abs(hi - lo) < 0.05
                                           else f"{lo:.1f}-{hi:.1f}")
            row += [f"{sul:.3f}", Markup(f"<b>{visc} {flag}</b>") if flag else visc,
                    "—" if temp is None else f"{temp:.0f}", ""]
        rows.append(row)
    text = (f"Every {s.interval_min} min from the first switch (flushing model and inlet "
            "temperature path): sulphur at the worst inlet, viscosity range, temperature. "
            "Write each reading taken under 'read'. 'low' or 'high': the viscosity leaves "
            "the engine's window (see the plan's warnings).")
    align = "ll" + "rrrl" * len(s.circuits)
    return [para("Expected readings", "h2"), para(text, "small"),
            data_table(head, rows, widths, align=align, zebra=True, compact=True)]


def _event(what: str) -> str:
    """A step's short name for the record: ``valve switched``, ``compliant`` ..."""
    head = what.split(":")[0]
    if head.startswith("departure"):
        return "departed"
    return {"switch the valve": "valve switched", "boundary": "boundary crossed",
            "in force": "in force (position)", "ceases": "ceased (position)",
            "scrubber out": "scrubber out of service (position)",
            "scrubber back": "scrubber back in service (position)"}.get(head, head)


def _record(s: WatchSheet) -> list:
    """Blank fields for the record: each event's actual time and position beside each
    tank's sounding, side by side."""
    from reportlab.lib.units import mm
    from reportlab.platypus import Table, TableStyle

    events = [st for st in s.steps if st.record]
    rows = [[plain(f"{st.circuit or 'bridge'}: {st.record_as or _event(st.what)}"), "", "",
             ""] for st in events]
    t = data_table(["Event", "Date, time UTC", "Position", "Initials"], rows,
                   [36, 24, 27, 14], zebra=False)
    tanks = [[name, fuel, "", ""] for name, fuel in s.tanks]
    tt = data_table(["Tank", "Fuel", "Sounding m³", "at °C"], tanks, [25, 13, 21, 14],
                    zebra=False)
    for table, n in ((t, len(rows)), (tt, len(tanks))):
        for i in range(1, n + 1):
            table._argH[i] = 6.5 * mm
    both = Table([[t, tt]], colWidths=[103 * mm, 75 * mm], hAlign="LEFT")
    both.setStyle(TableStyle([("VALIGN", (0, 0), (-1, -1), "TOP"),
                              ("LEFTPADDING", (0, 0), (-1, -1), 0),
                              ("RIGHTPADDING", (0, 0), (-1, -1), 2)]))
    return [para("Actual: fill in as it happens (the changeover record, reg. 14.6), and "
                 "each tank's sounding at completion", "h2"), both]


def _signatures() -> list:
    """Signature, name and date lines for the engineer on watch, the officer of the watch
    and the chief engineer, on one row."""
    from reportlab.lib import colors
    from reportlab.lib.units import mm
    from reportlab.platypus import Spacer, Table, TableStyle

    roles = ["Engineer on watch", "Officer of the watch", "Chief engineer"]
    w = (WIDTH_MM - 2 * 6) / 3
    head, sign = [], []
    for i, r in enumerate(roles):
        if i:
            head.append("")
            sign.append("")
        head.append(para(r, "cell_b"))
        sign.append(para("Signature, name, date", "small"))
    blank = ["", "", "", "", ""]
    t = Table([head, blank, sign], colWidths=[w * mm, 6 * mm, w * mm, 6 * mm, w * mm],
              rowHeights=[11, 20, 10], hAlign="LEFT")
    t.setStyle(TableStyle([("VALIGN", (0, 0), (-1, -1), "TOP"),
                           ("LEFTPADDING", (0, 0), (-1, -1), 0),
                           ("TOPPADDING", (0, 0), (-1, -1), 1)]
                          + [("LINEBELOW", (c, 1), (c, 1), 0.6, colors.HexColor("#1a1a1a"))
                             for c in (0, 2, 4)]))
    return [Spacer(1, 2 * mm), t]


def sheet_story(s: WatchSheet) -> list:
    """One changeover's page."""
    c = clock_moment(s)
    day, ship_day = f"{c.utc.astimezone(UTC):%Y-%m-%d}", f"{c.utc.astimezone(c.ship_tz):%Y-%m-%d}"
    off = offset(c)
    return (_head(s) + _steps(s, day, ship_day, off) + _readings(s, day, ship_day, off)
            + _record(s) + _signatures()
            + [para("Advisory only: the engine and boiler makers' instructions and the ship's "
                    "safety management system come first; keep the engine room manned.",
                    "small")])


def scrubber_story(s: ScrubberSheet) -> list:
    """The scrubber's page: every scrubber event by the ship's watch, with its action, the
    planned position and blanks for the actual time and initials."""
    from reportlab.lib import colors
    from reportlab.platypus import TableStyle

    from planner.charts.scrubber_marks import CAUTION

    rows, firsts = [], []
    for watch, due in s.watches:
        firsts.append(len(rows) + 1)
        for k, d in enumerate(due):
            utc = d.when.utc.astimezone(UTC)
            ship = d.when.utc.astimezone(d.when.ship_tz)
            why = f"<br/>{esc(plain(d.reason))}" if d.reason else ""
            rows.append([plain(watch) if k == 0 else "", Markup(f"<b>{esc(d.label)}</b>"),
                         f"{utc:%Y-%m-%d %H:%M}Z", f"{ship:%Y-%m-%d %H:%M} ({offset(d.when)})",
                         plain(d.scrubber),
                         Markup(f"<b>{esc(plain(d.action))}</b>{why}"),
                         pos_text(d.when.lat, d.when.lon), "", ""])
    t = data_table(["Watch (ship's time)", "No.", "UTC", "Ship's time", "Scrubber",
                    "Action, and why", "Planned position", "Actual UTC", "Init."], rows,
                   [18, 8, 17, 19, 16, 54, 21, 15, 10], zebra=False, compact=True)
    t.setStyle(TableStyle([("LINEABOVE", (0, r), (-1, r), 0.6, colors.HexColor("#1a1a1a"))
                           for r in firsts]))
    first, last = s.events[0].label, s.events[-1].label
    text = ("Each scrubber event in the watch it falls in (four-hour watches of ship's time), "
            "numbered as in the plan's scrubber table, on its map, chart and GPX marks. Write "
            "the actual time of each and initial it.")
    return [para(plain(f"Scrubber watch sheet: {first} to {last}"), "h1"),
            para(plain(CAUTION), "small"), para(text, "small"), t] + _signatures()


def write_watch_sheets(target: str | Path, sheets: Sequence[WatchSheet | ScrubberSheet], *,
                       ship: str,
                       voyage: str, paper: str = "a4",
                       printed_at: datetime | None = None) -> None:
    """Write one page per changeover to ``target`` (A4 or US Letter), and the scrubber's
    page when there is one, all-or-nothing."""
    from reportlab.platypus import PageBreak

    printed_at = printed_at or datetime.now(UTC).replace(microsecond=0)
    story: list = []
    for k, s in enumerate(sheets):
        if k:
            story.append(PageBreak())
        story += scrubber_story(s) if isinstance(s, ScrubberSheet) else sheet_story(s)
    if not story:
        story = [para("No changeover is needed on this voyage.", "h1")]
    build_pdf(target, story, title=TITLE, header_right=plain(ship),
              footer_middle=plain(f"voyage {voyage}"), printed_at=printed_at, paper=paper,
              margins_mm={"top": 19.0, "bottom": 17.0})

