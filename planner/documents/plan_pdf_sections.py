"""The plan PDF's text around the tables: the facts of the title block, then the notes,
the warnings (in a red box), the standard cautions and the signatures.

Each function takes the ``changeover plan --json`` document (every key read
with a default) and returns title-block facts or reportlab flowables.
reportlab is imported inside the functions.
"""

from __future__ import annotations

from collections.abc import Sequence

from geo.errors import InputError
from planner.common.timefmt import parse_offset
from planner.documents.pdf_common import (
    FRAME_WIDTH_MM,
    caution_box,
    esc,
    para,
    signature_block,
    styles,
)
from planner.documents.plan_pdf_cells import (
    WARN_FILL,
    WARN_RULE,
    groups,
    is_num,
    keep,
    markup,
    offset_text,
    parse_iso,
    pct,
    plain,
    utc_text,
)

KEEP_WARNINGS = 8
"""Up to this many warnings are kept on one page; more flow over pages."""


# ---------------------------------------------------------------- the title block

def _offsets_seen(doc: dict) -> list[str]:
    seen: list[str] = []
    for r in doc.get("changeovers", []):
        for key in ("start_ship_time", "compliant_ship_time", "boundary_ship_time"):
            t = parse_iso(r.get(key))
            if t is not None and offset_text(t) not in seen:
                seen.append(offset_text(t))
    return seen


def _uncertainty_facts(u: dict) -> list[tuple[str, object]]:
    facts: list[tuple[str, object]] = []
    conf = u.get("confidence")
    shown = {"confidence", "samples", "seed"}
    if is_num(conf):
        how = []
        if is_num(u.get("samples")):
            how.append(f"{u['samples']:,} Monte Carlo samples")
        if is_num(u.get("seed")):
            how.append(f"seed {u['seed']}")
        facts.append(("Confidence", f"{pct(conf)}: the starts at this confidence are in the "
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
        elif isinstance(value, str) and parse_iso(value) is not None and "T" in value:
            value = utc_text(value)
        facts.append((plain(label), plain(value)))
    return facts


def title_facts(doc: dict) -> list[tuple[str, object]]:
    """The title block's rows: ship, voyage, route, times, margins, changeovers, fuel."""
    v = doc.get("voyage", {})
    offset = v.get("ship_utc_offset")
    depart = parse_iso(v.get("depart_utc"))
    depart_text = utc_text(v.get("depart_utc"))
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
        margins.append(f"sulphur target {pct(target)} of each limit")
    grouped = groups(doc.get("changeovers", []))
    enter = sum(1 for g in grouped if g[0].get("direction") == "to_compliant")
    summary = (f"{len(grouped)} ({enter} to compliant fuel, {len(grouped) - enter} back to "
               f"regular fuel), {len(doc.get('changeovers', []))} circuit changeovers in all"
               if grouped else "none (" + str(doc.get("no_changeover_reason") or
                                              "no changeover is needed") + ")")
    need, have = doc.get("compliant_fuel_needed_t"), doc.get("compliant_fuel_on_board_t")
    compliant = "—"
    if need is not None and have is not None:
        spare = have - need
        compliant = (f"needed {need:,.1f} t, on board {have:,.1f} t: spare {spare:,.1f} t"
                     if spare >= 0 else
                     markup(f"needed {need:,.1f} t, on board {have:,.1f} t: "
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
        ("Arrival", utc_text(v.get("arrive_utc"))),
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


# ---------------------------------------------------------------- notes, warnings, signatures

def _warning_box(title: str, items: Sequence[str]):
    """Like the caution box, in red: numbered lines that must be read before signing."""
    from reportlab.lib import colors
    from reportlab.lib.units import mm
    from reportlab.platypus import Paragraph, Table, TableStyle

    style = styles()["caution"]
    cells = [[para(title, "caution_h")]]
    cells += [[Paragraph(f"<b>{i}.</b> {esc(plain(x))}", style)] for i, x in enumerate(items, 1)]
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


def notes_and_warnings(doc: dict) -> list:
    """The notes (numbered), then every warning in a red box, or "Warnings: none."."""
    from reportlab.lib.units import mm
    from reportlab.platypus import Spacer

    out: list = []
    notes = doc.get("notes") or []
    if notes:
        shown = [para(f"<b>Note {i}.</b> {esc(plain(n))}", "body", markup=True)
                 for i, n in enumerate(notes, 1)]
        out += keep([para("Notes", "h1"), shown[0]]) + shown[1:]
    warnings = doc.get("warnings") or []
    out.append(Spacer(1, 2 * mm))
    if warnings:
        n = len(warnings)
        box = _warning_box(f"Warnings ({n}): resolve or accept each one before signing",
                           warnings)
        # a short list stays in one piece; a long one flows on, its title repeated
        out += keep([box]) if n <= KEEP_WARNINGS else [box]
    else:
        out.append(para("<b>Warnings:</b> none.", "body", markup=True))
    return out


def cautions(doc: dict) -> list:
    """The standard cautions of the document, in a box."""
    from reportlab.lib.units import mm
    from reportlab.platypus import Spacer

    items = [plain(c) for c in doc.get("cautions") or []]
    if not items:
        return []
    return [Spacer(1, 3 * mm)] + keep([caution_box("Cautions", items)])


def signatures() -> list:
    """What the master and the chief engineer sign to, and their signature lines."""
    from reportlab.platypus import KeepTogether

    text = ("We have checked this plan against the passage plan, the ship's written changeover "
            "procedure and the engine and boiler makers' instructions, and read every warning "
            "and caution above.")
    return [KeepTogether([para("Checked and agreed", "h1"), para(text, "small")]
                         + signature_block(["Master", "Chief engineer"]))]
