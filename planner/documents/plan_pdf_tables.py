"""The plan PDF's tables: the changeovers by boundary, the starts at a confidence, and the
fuel and SO₂ figures.

Each function takes the ``changeover plan --json`` document and returns
reportlab flowables (none when the document lacks the table's keys).
reportlab is imported inside the functions.
"""

from __future__ import annotations

from planner.documents.pdf_common import INK, RULE, SHADE, Markup, data_table, esc, para
from planner.documents.plan_pdf_cells import (
    WARN_RULE,
    groups,
    is_num,
    keep,
    lines,
    markup,
    num,
    pct,
    plain,
    pos_lines,
    pos_text,
    ship_lines,
    ship_text,
    utc_lines,
    utc_text,
)

CH_HEAD = ["No.", "Circuit", "Fuel", "Start UTC", "Start ship's time", "Start position",
           "Compliant / complete UTC", "Compliant / complete at", "Margin h", "Takes h"]
CH_WIDTHS = [9, 16, 19, 18, 23, 22, 20, 22, 15, 14]
CH_ALIGN = "llllllllrr"


# ---------------------------------------------------------------- the changeover table

def _group_head(g: list[dict]) -> Markup:
    """The group's head: the area and what the changeover is (from ``boundary_event``:
    a crossing, an area coming into force or ceasing while the ship is inside it, a
    departure), then its moment in UTC and ship's time and the position."""
    from planner.charts.plan_events import moment_words, what_text

    r = g[0]
    area = esc(plain(r.get("area", "—")))
    what = what_text(r, utc_text(r.get("boundary_utc")))
    label, at = moment_words(r)
    where = [f"{label} {utc_text(r.get('boundary_utc'))}"]
    if r.get("boundary_ship_time"):
        where.append(f"ship's time {ship_text(r.get('boundary_ship_time'))}")
    pos = pos_text(r.get("boundary_lat"), r.get("boundary_lon"))
    text = ", ".join(where) + f", {at} {pos}"
    if r.get("boundary_nm") is not None:
        text += f", {r['boundary_nm']:,.1f} nm from departure"
    if r.get("clock_deadline") and label != "Departure":
        text += " (a moment on the clock: no arrival-time spread applies)"
    return markup(f"<b>{area}</b>{esc(plain(what))}<br/>{esc(plain(text))}")


def _circuit_row(r: dict) -> list:
    down = r.get("direction") == "to_compliant"
    done = r.get("compliant_utc") if down else None
    done = done or r.get("complete_utc")
    lat = r.get("compliant_lat") if down else None
    lon = r.get("compliant_lon") if down else None
    if lat is None:
        lat, lon = r.get("complete_lat"), r.get("complete_lon")
    fuel = [f"{plain(r.get('from_fuel', '—'))} to", plain(r.get("to_fuel", "—"))]
    margin = r.get("margin_h")
    dur = r.get("duration_h")
    return ["", lines([plain(r.get("circuit", "—"))], bold_first=True), lines(fuel),
            markup(f"<b>{lines(utc_lines(r.get('start_utc')))}</b>"),
            lines(ship_lines(r.get("start_ship_time"))),
            lines(pos_lines(r.get("start_lat"), r.get("start_lon")), bold_first=False),
            lines(utc_lines(done)), lines(pos_lines(lat, lon)),
            num(margin, ".2f") if down else "—", num(dur, ".2f")]


def changeover_table(doc: dict) -> list:
    """The changeovers grouped by boundary: the boundary once, its circuits beneath it."""
    from reportlab.lib import colors
    from reportlab.platypus import TableStyle

    grouped = groups(doc.get("changeovers", []))
    if not grouped:
        reason = doc.get("no_changeover_reason") or "No changeover is needed."
        return [para("Changeovers", "h1"), para(reason)]
    rows: list[list] = []
    spans: list[tuple[int, int]] = []
    for i, g in enumerate(grouped, 1):
        number = g[0].get("number", i)
        first = len(rows) + 1
        rows.append([markup(f"<b>{esc(number)}</b>"), _group_head(g)]
                    + [""] * (len(CH_HEAD) - 2))
        rows += [_circuit_row(r) for r in g]
        spans.append((first, len(rows)))
    t = data_table(CH_HEAD, rows, CH_WIDTHS, align=CH_ALIGN, zebra=False)
    cmds = []
    for first, last in spans:
        cmds += [("SPAN", (1, first), (-1, first)),
                 ("BACKGROUND", (0, first), (-1, first), colors.HexColor(SHADE)),
                 ("LINEABOVE", (0, first), (-1, first), 0.6, colors.HexColor(INK)),
                 ("NOSPLIT", (0, first), (-1, last))]
        for row in range(first + 1, last):
            cmds.append(("LINEBELOW", (1, row), (-1, row), 0.25, colors.HexColor(RULE)))
    t.setStyle(TableStyle(cmds))
    explain = ("Start: switch the circuit to the new fuel. Compliant: fuel at every inlet at "
               "or under the target (record this time and position, and the compliant fuel in "
               "each tank: reg. 14.6). Complete: back on regular fuel after exit. Margin: "
               "compliant to boundary. Takes: start to compliant or complete.")
    return [para("Changeovers, by boundary", "h1"), para(explain, "small"), t]


def confidence_table(doc: dict) -> list:
    """The starts at the chosen confidence, when the plan has them (``--confidence``)."""
    rows = [r for r in doc.get("changeovers", [])
            if r.get("start_confidence_utc") or r.get("start_p50_utc")]
    u = doc.get("uncertainty")
    if not rows or not isinstance(u, dict):
        return []
    conf = u.get("confidence")
    at = pct(conf) if is_num(conf) else "the chosen confidence"
    out = []
    for r in rows:
        extra = r.get("extra_compliant_t")
        out.append([
            markup(f"<b>{esc(r.get('number', ''))}</b>"), plain(r.get("circuit", "—")),
            utc_text(r.get("start_utc")), utc_text(r.get("start_p50_utc")),
            markup(f"<b>{esc(utc_text(r.get('start_confidence_utc')))}</b>"),
            num(r.get("lead_p50_h"), ".2f"), num(r.get("lead_confidence_h"), ".2f"),
            plain(r.get("confidence_basis") or "—"),
            num(extra, ".2f"), plain(r.get("main_driver") or "—")])
    head = ["No.", "Circuit", "Planned start", "P50 start", f"Start at {at}", "Lead P50 h",
            f"Lead {at} h", "Basis", "Extra t", "Main driver"]
    text = (f"Lead: valve switch to the sulphur target (or, where marked, the limit), with how "
            f"much earlier the boundary may be reached (basis: target or limit). A start at {at} "
            "confidence leaves the inlets compliant by the time margin in that share of the "
            "Monte Carlo samples; extra t: the compliant fuel the earlier start costs against "
            "the P50 plan.")
    return keep([para(f"Changeover starts at {at} confidence", "h2"),
                 data_table(head, out, [7, 13, 26.5, 26.5, 26.5, 13, 14, 11, 12, 28.5],
                            align="lllllrrlrl"),
                 para(text, "small")])


# ---------------------------------------------------------------- fuel and SO2

def _match_so2(doc: dict, st: dict) -> dict | None:
    for s in doc.get("so2", {}).get("stretches", []):
        if abs(s.get("from_nm", -1e9) - st.get("from_nm", 0.0)) < 1e-3:
            return s
    return None


def stretch_table(doc: dict) -> list:
    """Fuel burnt and SO₂ formed on each stretch, with why each burns its fuel."""
    stretches = doc.get("stretches", [])
    if not stretches:
        return []
    regular = plain(doc.get("regular_fuel", "regular fuel"))
    rows, flagged, reasons = [], False, []
    for st in stretches:
        fuel = plain(st.get("fuel", "—"))
        reason = st.get("fuel_choice")
        if reason and plain(reason) not in reasons:
            reasons.append(plain(reason))
        mark = bool(reason) and not plain(reason).startswith(fuel + " ")
        flagged |= mark
        s = _match_so2(doc, st)
        areas = st.get("areas") or []
        rows.append([
            f"{num(st.get('from_nm'))} to {num(st.get('to_nm'))}",
            num(st.get("limit_pct"), ".2f"),
            lines(areas) if areas else "global cap",
            utc_text(st.get("from_utc")), utc_text(st.get("to_utc")),
            fuel + (" *" if mark else ""),
            num(s.get("fuel_t") if s else None),
            num(s.get("so2_kg") if s else None, ",.0f"),
            num(s.get("so2_on_regular_kg") if s else None, ",.0f"),
        ])
    head = ["Distance nm", "Limit %", "Under", "From UTC", "To UTC", "Fuel", "Burnt t",
            "SO2 kg", markup(f"SO2 on<br/>{esc(regular)} kg")]
    out = [para("Fuel and SO2 on each stretch", "h1"),
           data_table(head, rows, [25.5, 13, 29, 26.5, 26.5, 14, 14, 14, 15.5], align="lrllllrrr")]
    notes = []
    if flagged:
        notes.append("* Not the fuel chosen for the limit alone: the ship stays on it from the "
                     "stretch before (see the notes).")
    notes += [f"Fuel choice: {r}" for r in reasons]
    out += [para(n, "small") for n in notes]
    return out


def _spare(x: float | None):
    if x is None or x >= 0:
        return num(x)
    return markup(f"<font color='{WARN_RULE}'><b>short {-x:,.1f}</b></font>")


def totals_table(doc: dict) -> list:
    """Fuel needed against fuel on board, t and m³ at 15 °C, with the spare or shortfall."""
    totals = doc.get("fuel_totals") or {}
    regular = doc.get("regular_fuel")
    rows = []
    for name, x in totals.items():
        need, have = x.get("needed_t", 0.0), x.get("on_board_t", 0.0)
        m3 = x.get("needed_m3_15c")
        per_t = m3 / need if m3 is not None and need > 0 else None
        spare = have - need
        role = "regular" if name == regular else "compliant"
        rows.append([lines([name, role], bold_first=True), num(need), num(m3),
                     num(have), num(have * per_t if per_t else None), _spare(spare),
                     _spare(spare * per_t if per_t else None)])
    if not rows:
        return []
    head = ["Fuel", "Needed t", markup("Needed m³<br/>at 15 °C"), "On board t",
            markup("On board m³<br/>at 15 °C"), "Spare t", markup("Spare m³<br/>at 15 °C")]
    return [para("Fuel needed against fuel on board", "h1"),
            data_table(head, rows, [34, 24, 24, 24, 24, 24, 24], align="lrrrrrr"),
            para("Needed: every circuit's burn for the whole voyage, from each changeover "
                 "start (valve switch) to the next, with the planning margins. On board: the "
                 "tanks' contents at departure from the voyage file. Volumes at 15 °C from "
                 "each fuel's delivery-note density.", "small")]


def so2_table(doc: dict) -> list:
    """SO₂ formed inside each area as planned, on the regular fuel, and the share avoided."""
    so2 = doc.get("so2") or {}
    areas = so2.get("areas") or {}
    if not areas:
        return []
    regular = plain(doc.get("regular_fuel", "regular fuel"))
    rows = []
    for name, x in areas.items():
        p, q = x.get("so2_kg"), x.get("so2_on_regular_kg")
        less = (f"{q - p:,.0f} ({(q - p) / q:.0%})" if p is not None and q else "—")
        rows.append([plain(name), num(p, ",.0f"), num(q, ",.0f"), less])
    out = [para("SO2 formed inside each area", "h1"),
           data_table(["Area", "As planned kg", f"On {regular} kg", "Avoided kg (share)"],
                      rows, [60, 36, 40, 42], align="lrrr")]
    if so2.get("total_kg") is not None:
        out.append(para(f"Whole voyage as planned: {so2['total_kg']:,.0f} kg SO2.", "small"))
    return out
