"""The plan PDF's "Scrubber" section: what the plan relies on the scrubbers for, their
spans and their events.

Read from the document's ``scrubber_spans`` and ``scrubber_events`` rows (the
shape of :func:`planner.voyage.report.scrubber_json`), every key with a
default; nothing is printed when both are empty, so a plan without a scrubber
prints as before. Spans: scrubber, circuits, fuel (and the fallback fuel),
washwater mode, from and to in UTC, ship's time and position. Events, numbered
``S1``, ``S2`` ... as on the map, the chart and the GPX marks: time in UTC and
ship's time, position, event, mode, the action and why; beneath them, for each
scrubber of ``scrubbers`` the plan relies on nowhere, "Scrubber NAME is not
relied on: ..." with its ``not_relied_on`` reason, as the terminal prints it (a
plan relying on no scrubber prints the section for these lines alone). Then the caution that
the EGCS approval and its operating manual come first ([MARPOL-VI] regulation
4; [MEPC-340]); then, as the terminal prints them, the "if the scrubber fails" tables
and the SO2/CO2 table (:mod:`planner.documents.plan_pdf_trip`). reportlab is imported
inside the functions.
"""

from __future__ import annotations

from planner.documents.pdf_common import caution_box, data_table, esc, para
from planner.documents.plan_pdf_cells import (
    keep,
    lines,
    markup,
    plain,
    pos_lines,
    ship_lines,
    utc_lines,
)
from planner.documents.plan_pdf_trip import ratio_table, trip_tables

SPAN_HEAD = ["Scrubber", "Circuits", "Fuel (fallback), limit", "Mode", "From UTC",
             "From ship's time", "From position", "To UTC", "To ship's time", "To position"]
SPAN_WIDTHS = [17, 15, 20, 12, 17, 21, 20, 17, 21, 18]
EVENT_HEAD = ["No.", "UTC", "Ship's time", "Position", "Event", "Mode", "Action, and why"]
EVENT_WIDTHS = [9, 18, 21, 22, 24, 13, 71]
KIND_WORDS = {"start": "start", "stop": "stop", "mode_change": "mode change",
              "out_of_service": "out of service"}


def _span_row(s: dict) -> list:
    fuel = [plain(s.get("fuel", "—"))]
    if s.get("fallback_fuel"):
        fuel.append(f"({plain(s['fallback_fuel'])})")
    if s.get("limit_pct") is not None:
        fuel.append(f"{s['limit_pct']:.2f} % m/m")
    return [lines([plain(s.get("scrubber", "—"))], bold_first=True),
            lines(s.get("circuits") or ["—"]), lines(fuel), plain(s.get("mode") or "—"),
            lines(utc_lines(s.get("from_utc"))), lines(ship_lines(s.get("from_ship_time"))),
            lines(pos_lines(s.get("from_lat"), s.get("from_lon"))),
            lines(utc_lines(s.get("to_utc"))), lines(ship_lines(s.get("to_ship_time"))),
            lines(pos_lines(s.get("to_lat"), s.get("to_lon")))]


def _event_row(e: dict) -> list:
    label = e.get("label") or f"S{e.get('number', '')}"
    action = esc(plain(e.get("action") or ""))
    why = esc(plain(e.get("reason") or ""))
    text = f"<b>{action}</b>" + (f"<br/>{why}" if why else "")
    return [markup(f"<b>{esc(label)}</b>"), lines(utc_lines(e.get("utc"))),
            lines(ship_lines(e.get("ship_time"))), lines(pos_lines(e.get("lat"), e.get("lon"))),
            lines([plain(e.get("scrubber", "—")),
                   KIND_WORDS.get(e.get("event", ""), plain(e.get("event", "—")))],
                  bold_first=True),
            plain(e.get("mode") or "—"), markup(text)]


def relies_text(spans: list[dict]) -> str:
    """What the plan relies on the scrubbers for, in one paragraph (empty for no span)."""
    from planner.charts.scrubber_marks import relies_text as words

    return words(spans)


def not_relied_lines(doc: dict) -> list[str]:
    """"Scrubber NAME is not relied on: REASON." for each scrubber of the document's
    ``scrubbers`` with a ``not_relied_on`` reason, in the file's order (the terminal's
    words, :func:`planner.cli.plan_tables.scrubber_tables`)."""
    out = []
    for s in doc.get("scrubbers") or []:
        why = s.get("not_relied_on") if isinstance(s, dict) else None
        if why:
            out.append(f"Scrubber {s.get('name', '—')} is not relied on: "
                       f"{str(why).rstrip('.')}.")
    return out


def _relied_on_nowhere(why_not: list[str]) -> list:
    """The section when the plan relies on no scrubber: its head and the reasons."""
    return keep([para("Scrubber", "h1"),
                 para("No scrubber event: the plan relies on no scrubber on this voyage.",
                      "body")]
                + [para(plain(x), "body") for x in why_not])


def scrubber_section(doc: dict) -> list:
    """The section "Scrubber" (nothing when the document has no scrubber span or event
    and no scrubber with a ``not_relied_on`` reason)."""
    from planner.charts.scrubber_marks import CAUTION, event_rows

    spans = doc.get("scrubber_spans") or []
    events = event_rows(doc)
    why_not = not_relied_lines(doc)
    if not spans and not events:
        return _relied_on_nowhere(why_not) if why_not else []
    head: list = [para("Scrubber", "h1")]
    if spans:
        head.append(para(plain(relies_text(spans)), "body"))
    out = keep(head + [caution_box("Scrubber (EGCS)", [plain(CAUTION)])])
    if spans:
        out += keep([para("Where the plan relies on it", "h2"),
                     data_table(SPAN_HEAD, [_span_row(s) for s in spans], SPAN_WIDTHS,
                                align="llllllllll")])
        limits = sorted({s["limit_pct"] for s in spans if s.get("limit_pct") is not None})
        if limits:
            out.append(para("Fuel: burnt on the span on the scrubber; (fallback): the fuel "
                            "the circuits burn there without it, the one to change to if it "
                            "fails. Limit: the sulphur limit in force on the span, "
                            f"{', '.join(f'{x:.2f}' for x in limits)} % m/m.", "small"))
    if events:
        out += [para("Scrubber events, in time order", "h2"),
                data_table(EVENT_HEAD, [_event_row(e) for e in events], EVENT_WIDTHS,
                           align="lllllll"),
                para("Numbered S1, S2 ... as on the route map, the sulphur chart and the GPX "
                     "marks. Times UTC and ship's time; positions WGS84.", "small")]
    out += [para(plain(x), "body") for x in why_not]
    return out + trip_tables(doc) + ratio_table(doc)
