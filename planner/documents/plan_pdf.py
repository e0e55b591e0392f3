"""The voyage changeover plan as a PDF for the master and the chief engineer to sign.

Built from the ``changeover plan --json`` document alone (see
:func:`planner.voyage.report.plan_json`), so what is printed is exactly what the
JSON says. Page one names the ship, the voyage, the route, departure and
arrival, the ship's time and the planning margins; then the changeovers,
grouped by boundary: each boundary (area, entry or exit, time in UTC and
ship's time, position) once, with every circuit's changeover beneath it (fuel
from and to, start in UTC and ship's time and position, compliant or complete
time and position, margin, duration). Then the fuel burnt and the SO2 formed
on each stretch, the fuel needed against what is on board, SO2 inside each
area against the regular fuel, the notes, the warnings (highlighted), the
standard cautions and lines for both to sign.

Every key added to the contract is read with a default, so a smaller document
(a test's, or an older plan's) still prints. The standard PDF fonts cover
Windows-1252 only: text from the document is made to fit (``→`` becomes
``to``, ``SO₂`` becomes ``SO2``). reportlab is imported inside the functions.
"""

from __future__ import annotations

import re
import unicodedata
from collections.abc import Iterable, Sequence
from datetime import UTC, datetime, timedelta
from pathlib import Path

from geo.errors import InputError
from geo.position import format_lat, format_lon
from planner.common.timefmt import format_utc, parse_offset
from planner.documents.pdf_common import (
    FRAME_WIDTH_MM,
    INK,
    RULE,
    SHADE,
    Markup,
    build_pdf,
    caution_box,
    data_table,
    esc,
    para,
    signature_block,
    styles,
    title_block,
)

TITLE = "Voyage fuel changeover plan"
SUBTITLE = ("MARPOL Annex VI regulation 14: when and where each fuel changeover starts so that "
            "every consumer burns compliant fuel from the boundary of each emission control "
            "area, when the switch back may begin after exit, and the fuel the voyage needs. "
            "For the master and the chief engineer to check and sign before sailing. Times are "
            "UTC unless marked ship's time; positions are WGS84 in degrees and minutes.")
KEEP_WARNINGS = 8
"""Up to this many warnings are kept on one page; more flow over pages."""
WARN_FILL = "#fde9e7"
WARN_RULE = "#a4281b"

# Characters outside Windows-1252 that the documents are known to use, and their stand-ins.
_PLAIN = {"→": " to ", "←": " from ", "⇒": " so ", "≤": "<=", "≥": ">=", "≈": "~",
          "−": "-", "‑": "-", "₂": "2", "₃": "3", "₀": "0", "²": "2", "Δ": "delta ",
          "σ": "sd", "μ": "u", "κ": "k", "τ": "tau", "ε": "e", "√": "sqrt "}


def plain(text: object) -> str:
    """``text`` in characters the standard PDF fonts have (Windows-1252)."""
    s = str(text)
    try:
        s.encode("cp1252")
        return s
    except UnicodeEncodeError:
        pass
    out = []
    for ch in s:
        try:
            ch.encode("cp1252")
            out.append(ch)
            continue
        except UnicodeEncodeError:
            pass
        if ch in _PLAIN:
            out.append(_PLAIN[ch])
            continue
        folded = unicodedata.normalize("NFKD", ch).encode("cp1252", "ignore").decode("cp1252")
        out.append(folded or "?")
    return re.sub(" {2,}", " ", "".join(out))


def _p(text: object, style: str = "cell"):
    return para(plain(text), style)


def _m(text: str) -> Markup:
    """Cell markup from already-escaped text."""
    return Markup(text)


# ---------------------------------------------------------------- times, places, numbers

def _parse(iso: str | None) -> datetime | None:
    if not iso:
        return None
    try:
        return datetime.fromisoformat(iso.replace("Z", "+00:00"))
    except ValueError:
        return None


def _utc(iso: str | None) -> str:
    """``2027-05-30 04:47Z`` (to the minute, as the terminal table), or an em dash."""
    t = _parse(iso)
    return "—" if t is None else format_utc(t)


def _utc_lines(iso: str | None) -> list[str]:
    t = _parse(iso)
    if t is None:
        return ["—"]
    t = t.astimezone(UTC)
    return [t.strftime("%Y-%m-%d"), t.strftime("%H:%MZ")]


def _offset(t: datetime) -> str:
    off = t.utcoffset() or timedelta(0)
    sign = "-" if off < timedelta(0) else "+"
    minutes = abs(int(off.total_seconds())) // 60
    return f"{sign}{minutes // 60:02d}:{minutes % 60:02d}"


def _ship_lines(iso: str | None) -> list[str]:
    """Ship's time as two lines: the date, then the time and its UTC offset."""
    t = _parse(iso)
    if t is None:
        return ["—"]
    return [t.strftime("%Y-%m-%d"), f"{t.strftime('%H:%M')} ({_offset(t)})"]


def _ship_text(iso: str | None) -> str:
    t = _parse(iso)
    return "—" if t is None else f"{t.strftime('%Y-%m-%d %H:%M')} (UTC{_offset(t)})"


def _pos_lines(lat: float | None, lon: float | None) -> list[str]:
    if lat is None or lon is None:
        return ["—"]
    return [format_lat(lat), format_lon(lon)]


def _pos_text(lat: float | None, lon: float | None) -> str:
    return " ".join(_pos_lines(lat, lon))


def _num(x: float | None, fmt: str = ",.1f") -> str:
    return "—" if x is None else format(x, fmt)


def _lines(parts: Iterable[str], bold_first: bool = False) -> Markup:
    parts = [esc(plain(p)) for p in parts]
    if bold_first and parts:
        parts[0] = f"<b>{parts[0]}</b>"
    return _m("<br/>".join(parts))


def _pct(fraction: float) -> str:
    return f"{fraction * 100:.4g} %"


# ---------------------------------------------------------------- the title block

def _offsets_seen(doc: dict) -> list[str]:
    seen: list[str] = []
    for r in doc.get("changeovers", []):
        for key in ("start_ship_time", "compliant_ship_time", "boundary_ship_time"):
            t = _parse(r.get(key))
            if t is not None and _offset(t) not in seen:
                seen.append(_offset(t))
    return seen


def _groups(rows: Sequence[dict]) -> list[list[dict]]:
    """Rows of one changeover (one boundary) together, in the document's order."""
    groups: list[list[dict]] = []
    last = None
    for r in rows:
        key = r.get("number", (r.get("area"), r.get("direction"), r.get("boundary_utc")))
        if groups and key == last:
            groups[-1].append(r)
        else:
            groups.append([r])
        last = key
    return groups


def _is_num(x: object) -> bool:
    return isinstance(x, int | float) and not isinstance(x, bool)


def _uncertainty_facts(u: dict) -> list[tuple[str, object]]:
    facts: list[tuple[str, object]] = []
    conf = u.get("confidence")
    shown = {"confidence", "samples", "seed"}
    if _is_num(conf):
        how = []
        if _is_num(u.get("samples")):
            how.append(f"{u['samples']:,} Monte Carlo samples")
        if _is_num(u.get("seed")):
            how.append(f"seed {u['seed']}")
        facts.append(("Confidence", f"{_pct(conf)}: the starts at this confidence are in the "
                                    "table under the changeovers"
                      + (f" ({', '.join(how)})" if how else "")))
    else:
        shown = set()
    for key, value in u.items():
        if key in shown or isinstance(value, dict | list | tuple) or value is None:
            continue
        label = key.replace("_", " ").strip().capitalize()
        if isinstance(value, float):
            value = f"{value:,.3g}"
        elif isinstance(value, str) and _parse(value) is not None and "T" in value:
            value = _utc(value)
        facts.append((plain(label), plain(value)))
    return facts


def _facts(doc: dict) -> list[tuple[str, object]]:
    v = doc.get("voyage", {})
    offset = v.get("ship_utc_offset")
    depart = _parse(v.get("depart_utc"))
    depart_text = _utc(v.get("depart_utc"))
    if depart is not None and offset:
        try:
            local = depart.astimezone(parse_offset(offset))
        except InputError:
            local = None
        if local is not None:
            depart_text += f" · ship's time {local.strftime('%Y-%m-%d %H:%M')} (UTC{offset})"
    others = [o for o in _offsets_seen(doc) if o != offset]
    ship_time = f"UTC{offset} at departure" if offset else "—"
    if others:
        ship_time += (f"; UTC{', UTC'.join(others)} later on the voyage (every ship's time "
                      "below shows its offset)")
    margin = v.get("time_margin_h")
    target = v.get("sulphur_target_fraction")
    margins = []
    if margin is not None:
        margins.append(f"compliant {margin:g} h before each boundary")
    if target is not None:
        margins.append(f"sulphur target {_pct(target)} of each limit")
    groups = _groups(doc.get("changeovers", []))
    enter = sum(1 for g in groups if g[0].get("direction") == "to_compliant")
    summary = (f"{len(groups)} ({enter} to compliant fuel, {len(groups) - enter} back to "
               f"regular fuel), {len(doc.get('changeovers', []))} circuit changeovers in all"
               if groups else "none: the route crosses no control area in force")
    need, have = doc.get("compliant_fuel_needed_t"), doc.get("compliant_fuel_on_board_t")
    compliant = "—"
    if need is not None and have is not None:
        spare = have - need
        compliant = (f"needed {need:,.1f} t, on board {have:,.1f} t: spare {spare:,.1f} t"
                     if spare >= 0 else
                     _m(f"needed {need:,.1f} t, on board {have:,.1f} t: "
                        f"<font color='{WARN_RULE}'><b>short by {-spare:,.1f} t</b></font>"))
    distance = v.get("distance_nm")
    route = plain(v.get("route") or "—")
    if distance is not None:
        route += f", {distance:,.1f} nm"
    facts = [
        ("Ship", plain(v.get("ship", "—"))),
        ("IMO number", plain(v.get("imo") or "—")),
        ("Voyage", plain(v.get("name", "—"))),
        ("Route", route),
        ("Departure", depart_text),
        ("Arrival", _utc(v.get("arrive_utc"))),
        ("Ship's time", ship_time),
        ("Planning margins", "; ".join(margins) or "—"),
        ("Changeovers", summary),
        ("Compliant fuel", compliant),
    ]
    u = doc.get("uncertainty")
    if isinstance(u, dict):
        facts += _uncertainty_facts(u)
    if v.get("file"):
        facts.append(("Voyage file", plain(v["file"])))
    return facts


# ---------------------------------------------------------------- the changeover table

CH_HEAD = ["No.", "Circuit", "Fuel", "Start UTC", "Start ship's time", "Start position",
           "Compliant / complete UTC", "Compliant / complete at", "Margin h", "Takes h"]
CH_WIDTHS = [9, 16, 19, 18, 23, 22, 20, 22, 15, 14]
CH_ALIGN = "llllllllrr"


def _group_head(g: list[dict]) -> Markup:
    r = g[0]
    area = esc(plain(r.get("area", "—")))
    limit = r.get("limit_pct")
    down = r.get("direction") == "to_compliant"
    if down:
        what = "enter: change to compliant fuel before the boundary"
        target = r.get("target_pct")
        if limit is not None:
            what += f" (limit {limit:.2f} %" + (f", target {target:.3f} %)" if target else ")")
    else:
        what = "exit: change back to regular fuel at or after the boundary, never before"
    if r.get("before_departure"):
        what += "; the voyage departs inside the area: be on compliant fuel before departure"
    where = [f"Boundary {_utc(r.get('boundary_utc'))}"]
    if r.get("boundary_ship_time"):
        where.append(f"ship's time {_ship_text(r.get('boundary_ship_time'))}")
    pos = _pos_text(r.get("boundary_lat"), r.get("boundary_lon"))
    text = ", ".join(where) + f", at {pos}"
    if r.get("boundary_nm") is not None:
        text += f", {r['boundary_nm']:,.1f} nm from departure"
    return _m(f"<b>{area}</b>: {esc(what)}<br/>{esc(text)}")


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
    return ["", _lines([plain(r.get("circuit", "—"))], bold_first=True), _lines(fuel),
            _m(f"<b>{_lines(_utc_lines(r.get('start_utc')))}</b>"),
            _lines(_ship_lines(r.get("start_ship_time"))),
            _lines(_pos_lines(r.get("start_lat"), r.get("start_lon")), bold_first=False),
            _lines(_utc_lines(done)), _lines(_pos_lines(lat, lon)),
            _num(margin, ".2f") if down else "—", _num(dur, ".2f")]


def _changeover_table(doc: dict) -> list:
    from reportlab.lib import colors
    from reportlab.platypus import TableStyle

    groups = _groups(doc.get("changeovers", []))
    if not groups:
        return [para("Changeovers", "h1"),
                para("No changeover is needed: the route crosses no control area in force on "
                     "the voyage's dates.")]
    rows: list[list] = []
    spans: list[tuple[int, int]] = []
    for i, g in enumerate(groups, 1):
        number = g[0].get("number", i)
        first = len(rows) + 1
        rows.append([_m(f"<b>{esc(number)}</b>"), _group_head(g)] + [""] * (len(CH_HEAD) - 2))
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


def _confidence_table(doc: dict) -> list:
    """The starts at the chosen confidence, when the plan has them (``--confidence``)."""
    rows = [r for r in doc.get("changeovers", [])
            if r.get("start_confidence_utc") or r.get("start_p50_utc")]
    u = doc.get("uncertainty")
    if not rows or not isinstance(u, dict):
        return []
    conf = u.get("confidence")
    at = _pct(conf) if _is_num(conf) else "the chosen confidence"
    out = []
    for r in rows:
        extra = r.get("extra_compliant_t")
        out.append([
            _m(f"<b>{esc(r.get('number', ''))}</b>"), plain(r.get("circuit", "—")),
            _utc(r.get("start_utc")), _utc(r.get("start_p50_utc")),
            _m(f"<b>{esc(_utc(r.get('start_confidence_utc')))}</b>"),
            _num(r.get("lead_p50_h"), ".2f"), _num(r.get("lead_confidence_h"), ".2f"),
            plain(r.get("confidence_basis") or "—"),
            _num(extra, ".2f"), plain(r.get("main_driver") or "—")])
    head = ["No.", "Circuit", "Planned start", "P50 start", f"Start at {at}", "Lead P50 h",
            f"Lead {at} h", "Basis", "Extra t", "Main driver"]
    text = (f"Lead: valve switch to the sulphur target (or, where marked, the limit), with how "
            f"much earlier the boundary may be reached (basis: target or limit). A start at {at} "
            "confidence leaves the inlets compliant by the time margin in that share of the "
            "Monte Carlo samples; extra t: the compliant fuel the earlier start costs against "
            "the P50 plan.")
    return _keep([para(f"Changeover starts at {at} confidence", "h2"),
                  data_table(head, out, [7, 13, 26.5, 26.5, 26.5, 13, 14, 11, 12, 28.5],
                             align="lllllrrlrl"),
                  para(text, "small")])


# ---------------------------------------------------------------- fuel and SO2

def _match_so2(doc: dict, st: dict) -> dict | None:
    for s in doc.get("so2", {}).get("stretches", []):
        if abs(s.get("from_nm", -1e9) - st.get("from_nm", 0.0)) < 1e-3:
            return s
    return None


def _stretch_table(doc: dict) -> list:
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
            f"{_num(st.get('from_nm'))} to {_num(st.get('to_nm'))}",
            _num(st.get("limit_pct"), ".2f"),
            _lines(areas) if areas else "global cap",
            _utc(st.get("from_utc")), _utc(st.get("to_utc")),
            fuel + (" *" if mark else ""),
            _num(s.get("fuel_t") if s else None),
            _num(s.get("so2_kg") if s else None, ",.0f"),
            _num(s.get("so2_on_regular_kg") if s else None, ",.0f"),
        ])
    head = ["Distance nm", "Limit %", "Under", "From UTC", "To UTC", "Fuel", "Burnt t",
            "SO2 kg", _m(f"SO2 on<br/>{esc(regular)} kg")]
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
        return _num(x)
    return _m(f"<font color='{WARN_RULE}'><b>short {-x:,.1f}</b></font>")


def _totals_table(doc: dict) -> list:
    totals = doc.get("fuel_totals") or {}
    regular = doc.get("regular_fuel")
    rows = []
    for name, x in totals.items():
        need, have = x.get("needed_t", 0.0), x.get("on_board_t", 0.0)
        m3 = x.get("needed_m3_15c")
        per_t = m3 / need if m3 is not None and need > 0 else None
        spare = have - need
        role = "regular" if name == regular else "compliant"
        rows.append([_lines([name, role], bold_first=True), _num(need), _num(m3),
                     _num(have), _num(have * per_t if per_t else None), _spare(spare),
                     _spare(spare * per_t if per_t else None)])
    if not rows:
        return []
    head = ["Fuel", "Needed t", _m("Needed m³<br/>at 15 °C"), "On board t",
            _m("On board m³<br/>at 15 °C"), "Spare t", _m("Spare m³<br/>at 15 °C")]
    return [para("Fuel needed against fuel on board", "h1"),
            data_table(head, rows, [34, 24, 24, 24, 24, 24, 24], align="lrrrrrr"),
            para("Needed: every circuit's burn for the whole voyage, from each changeover "
                 "start (valve switch) to the next, with the planning margins. On board: the "
                 "tanks' contents at departure from the voyage file. Volumes at 15 °C from "
                 "each fuel's delivery-note density.", "small")]


def _so2_table(doc: dict) -> list:
    so2 = doc.get("so2") or {}
    areas = so2.get("areas") or {}
    if not areas:
        return []
    regular = plain(doc.get("regular_fuel", "regular fuel"))
    rows = []
    for name, x in areas.items():
        p, q = x.get("so2_kg"), x.get("so2_on_regular_kg")
        less = (f"{q - p:,.0f} ({(q - p) / q:.0%})" if p is not None and q else "—")
        rows.append([plain(name), _num(p, ",.0f"), _num(q, ",.0f"), less])
    out = [para("SO2 formed inside each area", "h1"),
           data_table(["Area", "As planned kg", f"On {regular} kg", "Avoided kg (share)"],
                      rows, [60, 36, 40, 42], align="lrrr")]
    if so2.get("total_kg") is not None:
        out.append(para(f"Whole voyage as planned: {so2['total_kg']:,.0f} kg SO2.", "small"))
    return out


# ---------------------------------------------------------------- notes, warnings, signatures

def _warning_box(title: str, lines: Sequence[str]):
    """Like the caution box, in red: numbered lines that must be read before signing."""
    from reportlab.lib import colors
    from reportlab.lib.units import mm
    from reportlab.platypus import Table, TableStyle

    cells = [[para(title, "caution_h")]]
    cells += [[_m_para(f"<b>{i}.</b> {esc(plain(x))}")] for i, x in enumerate(lines, 1)]
    t = Table(cells, colWidths=[FRAME_WIDTH_MM * mm], hAlign="LEFT", repeatRows=1)
    t.setStyle(TableStyle([
        ("BOX", (0, 0), (-1, -1), 1.4, colors.HexColor(WARN_RULE)),
        ("LINEBEFORE", (0, 0), (0, -1), 4, colors.HexColor(WARN_RULE)),
        ("BACKGROUND", (0, 0), (-1, -1), colors.HexColor(WARN_FILL)),
        ("LEFTPADDING", (0, 0), (-1, -1), 8),
        ("RIGHTPADDING", (0, 0), (-1, -1), 6),
        ("TOPPADDING", (0, 0), (-1, -1), 1.5),
        ("BOTTOMPADDING", (0, 0), (-1, -1), 2),
        ("TOPPADDING", (0, 0), (-1, 0), 5),
        ("BOTTOMPADDING", (0, -1), (-1, -1), 5),
    ]))
    return t


def _m_para(text: str):
    from reportlab.platypus import Paragraph

    return Paragraph(text, styles()["caution"])


def _notes_and_warnings(doc: dict) -> list:
    from reportlab.lib.units import mm
    from reportlab.platypus import Spacer

    out: list = []
    notes = doc.get("notes") or []
    if notes:
        shown = [para(f"<b>Note {i}.</b> {esc(plain(n))}", "body", markup=True)
                 for i, n in enumerate(notes, 1)]
        out += _keep([para("Notes", "h1"), shown[0]]) + shown[1:]
    warnings = doc.get("warnings") or []
    out.append(Spacer(1, 2 * mm))
    if warnings:
        n = len(warnings)
        box = _warning_box(f"Warnings ({n}): resolve or accept each one before signing",
                           warnings)
        # a short list stays in one piece; a long one flows on, its title repeated
        out += _keep([box]) if n <= KEEP_WARNINGS else [box]
    else:
        out.append(para("<b>Warnings:</b> none.", "body", markup=True))
    return out


def _cautions(doc: dict) -> list:
    from reportlab.lib.units import mm
    from reportlab.platypus import Spacer

    cautions = [plain(c) for c in doc.get("cautions") or []]
    if not cautions:
        return []
    return [Spacer(1, 3 * mm)] + _keep([caution_box("Cautions", cautions)])


def _signatures() -> list:
    from reportlab.platypus import KeepTogether

    text = ("We have checked this plan against the passage plan, the ship's written changeover "
            "procedure and the engine and boiler makers' instructions, and read every warning "
            "and caution above.")
    return [KeepTogether([para("Checked and agreed", "h1"), para(text, "small")]
                         + signature_block(["Master", "Chief engineer"]))]


# ---------------------------------------------------------------- the document

def _keep(parts: list) -> list:
    from reportlab.platypus import KeepTogether

    return [KeepTogether(parts)] if parts else []


def write_plan_pdf(target: str | Path, doc: dict, *, printed_at: datetime | None = None) -> None:
    """Write the plan of ``doc`` (the ``changeover plan --json`` document) to ``target``.

    All-or-nothing: the file appears complete or not at all.
    """
    printed_at = printed_at or datetime.now(UTC).replace(microsecond=0)
    v = doc.get("voyage", {})
    ship = plain(v.get("ship", "—"))
    imo = plain(v.get("imo") or "—")
    story = title_block(TITLE, SUBTITLE, _facts(doc))
    story += _changeover_table(doc)
    story += _confidence_table(doc)
    story += _keep(_stretch_table(doc))
    story += _keep(_totals_table(doc))
    story += _keep(_so2_table(doc))
    story += _notes_and_warnings(doc)
    story += _cautions(doc)
    story += _signatures()
    build_pdf(target, story, title=TITLE, header_right=f"{ship} · IMO {imo}",
              footer_middle=plain(f"voyage {v.get('name', '')}").strip(),
              printed_at=printed_at)
