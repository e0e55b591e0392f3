"""The fuel oil non-availability report (MARPOL Annex VI regulation 18.2, [MARPOL-VI]) as a
PDF, with the items of the report template in the 2019 guidelines ([MEPC-320], from memory).

Printed from the facts of :func:`planner.voyage.shortfall_facts.nonavailability_facts`
(with the journal's part when the command was given one): numbered sections for the
ship, the voyage plan and its area entries, the compliant fuel needed against on
board and where it runs out, the attempts to buy compliant fuel, the expected next
port with compliant fuel, the actions and alternatives (the shortfall plan), the
notifications, and the master's signature. What only the master knows is a labelled
blank line (:data:`BLANKS`). reportlab is imported inside the functions (via
:mod:`planner.documents.pdf_common`); text is Latin-1 only.
"""

from __future__ import annotations

import functools
from datetime import UTC, datetime
from pathlib import Path

from geo.position import format_position
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
    styles,
    title_block,
)

TITLE = "Fuel oil non-availability report"
SUBTITLE = ("MARPOL Annex VI regulation 18.2: the ship that cannot obtain compliant fuel oil "
            "under its voyage plan records its attempts to buy it and notifies its "
            "Administration and the competent authority of the port of destination. Items as "
            "in the report template of the 2019 guidelines (MEPC.320(74)). Prepared from the "
            "voyage plan: advisory; the master completes, signs and sends it.")
SECTIONS = ("Particulars of the ship", "The voyage plan", "Compliant fuel needed and on board",
            "Attempts to purchase compliant fuel oil", "Expected next port with compliant fuel",
            "Actions taken and alternatives", "Notifications", "Master")
"""Numbered section headings, in order (tests look for each)."""

BLANKS = ("Flag State", "Reasons given by suppliers", "Actions taken by the master",
          "Operational constraints (e.g. fuel compatibility)", "Previous non-availability "
          "reports", "Notification to the Administration: date, time and reference",
          "Notification to the port of destination: port, authority, date and time",
          "Ship operator and contact (telephone, e-mail)")
"""The labelled lines left for the master (tests look for each)."""

_LINE = "_" * 60


def _blanks(labels: list[str]) -> object:
    """Labelled lines to write on."""
    from reportlab.lib import colors
    from reportlab.lib.units import mm
    from reportlab.platypus import Table, TableStyle

    label_mm = 62.0
    rows = [[para(x, "cell_b"), ""] for x in labels]
    t = Table(rows, colWidths=[label_mm * mm, (FRAME_WIDTH_MM - label_mm) * mm],
              rowHeights=[9 * mm] * len(rows), hAlign="LEFT")
    t.setStyle(TableStyle([("VALIGN", (0, 0), (-1, -1), "BOTTOM"),
                           ("LINEBELOW", (1, 0), (1, -1), 0.6, colors.HexColor("#1a1a1a")),
                           ("LEFTPADDING", (0, 0), (-1, -1), 0)]))
    return t


def _when(utc: str | None, ship: str | None) -> str:
    """``2027-05-29 18:00Z (ship's time 2027-05-30 06:00, +12:00)`` from the JSON's strings."""
    if utc is None:
        return "—"
    moment = datetime.fromisoformat(utc.replace("Z", "+00:00"))
    if not ship:
        return format_utc(moment)
    return f"{format_utc(moment)} (ship's time {ship[:16].replace('T', ' ')}, {ship[16:]})"


@functools.cache
def _kept():
    """The sub-heading style, kept on the page of what follows it."""
    from reportlab.lib.styles import ParagraphStyle

    return ParagraphStyle("h2_kept", parent=styles()["h2"], keepWithNext=1)


def _sub(text: str) -> object:
    from reportlab.platypus import Paragraph

    return Paragraph(esc(text), _kept())


def _head(n: int) -> object:
    return para(f"{n}. {SECTIONS[n - 1]}", "h1")


def _ship(facts: dict) -> list:
    s = facts["ship"]
    j = facts.get("journal")
    rows = [("Name of the ship", s["name"]), ("IMO number", s["imo"] or "—")]
    if j is not None:
        rows.append(("Journal", f"{j['file']}: {j['ship_name'] or '—'}, IMO {j['imo'] or '—'}, "
                     f"{j['entries']} entries (read only)"))
    return [_head(1), data_table(["Item", "Value"], rows, [62, FRAME_WIDTH_MM - 62],
                                 zebra=False), _blanks([BLANKS[0]])]


def _voyage(facts: dict) -> list:
    v = facts["voyage_plan"]
    rows = [("Voyage", v["voyage"]),
            ("Port of departure", v["departure_port"] or "—"),
            ("Departure", _when(v["depart_utc"], v["depart_ship_time"])),
            ("Port of destination", v["arrival_port"] or "—"),
            ("Arrival (planned)", _when(v["arrive_utc"], v["arrive_ship_time"])),
            ("Distance", f"{v['distance_nm']:,.1f} nm"),
            ("Ports on the way with fuel", ", ".join(v["ports_of_call"]) or "none given")]
    out = [_head(2), data_table(["Item", "Value"], rows, [62, FRAME_WIDTH_MM - 62],
                                zebra=False)]
    entries = v["area_entries"]
    if entries:
        out += [_sub("Entries into the control areas, as planned"),
                data_table(["Area", "Limit % m/m", "nm", "UTC (ship's time)", "Position"],
                           [[e["area"], f"{e['limit_pct']:.2f}", f"{e['distance_nm']:,.1f}",
                             _when(e["utc"], e["ship_time"]),
                             format_position(e["lat"], e["lon"])] for e in entries],
                           [44, 20, 16, 58, 40], "lrrll")]
    else:
        out.append(para("The planned route enters no control area.", "body"))
    return out


def _fuel(facts: dict) -> list:
    f = facts["fuel"]
    out = [_head(3), para(f"Compliant fuel needed for the voyage {f['compliant_needed_t']:.1f} t; "
                          f"on board at departure {f['compliant_on_board_t']:.1f} t (voyage "
                          "file soundings, at 15 °C).", "body")]
    sf = facts["shortfall"]
    if sf is None:
        out.append(para("The plan finds the compliant fuel on board sufficient for the voyage.",
                         "body"))
    for s in (sf or {}).get("fuels", []):
        ro = s["runs_out"]
        out.append(data_table(["Fuel", "Needed t", "On board t", "Short t", "Short m³ at 15 °C",
                               "Runs out (UTC, ship's time)", "At"],
                              [[s["fuel"], f"{s['needed_t']:.1f}", f"{s['on_board_t']:.1f}",
                                f"{s['short_t']:.1f}", f"{s['short_m3_15c']:.1f}",
                                _when(ro["utc"], ro["ship_time"]),
                                f"{ro['distance_nm']:,.1f} nm, "
                                f"{format_position(ro['lat'], ro['lon'])}"]],
                              [14, 16, 17, 14, 20, 50, 47], "lrrrrll"))
        if s["not_compliant"]:
            out += [_sub(f"Not compliant without more {s['fuel']}"),
                    data_table(["Area", "From nm", "To nm", "From (UTC, ship's time)",
                                "To (UTC, ship's time)"],
                               [[", ".join(x["areas"]), f"{x['from_nm']:,.1f}",
                                 f"{x['to_nm']:,.1f}", _when(x["from_utc"], x["from_ship_time"]),
                                 _when(x["to_utc"], x["to_ship_time"])]
                                for x in s["not_compliant"]], [40, 16, 16, 53, 53], "lrrll")]
    j = facts.get("journal")
    if j is not None:
        out.append(_sub("From the journal: the latest sounding of each tank"))
        out.append(data_table(["Tank", "Fuel", "m³ observed", "°C", "m³ at 15 °C", "t",
                               "UTC", "Entry"],
                              [[t["tank"], t["fuel"], f"{t['volume_m3']:.1f}",
                                f"{t['temperature_c']:.0f}", f"{t['volume15_m3']:.1f}",
                                f"{t['mass_t']:.1f}", _when(t["utc"], None),
                                f"#{t['entry']}"] for t in j["tanks"]] or [["none"] + [""] * 7],
                              [34, 18, 20, 10, 22, 14, 42, 18], "llrrrrlr"))
        out.append(_sub("From the journal: fuels taken on board (delivery notes)"))
        out.append(data_table(["Fuel", "Grade", "S % m/m", "BDN", "Port", "Date", "Supplier",
                               "t"],
                              [[x["name"], x["grade"], f"{x['sulphur_pct']:.2f}", x["bdn_ref"],
                                x["port"] or "—", x["bunkered_on"] or "—", x["supplier"] or "—",
                                "—" if x["quantity_t"] is None else f"{x['quantity_t']:.1f}"]
                               for x in j["fuels"]] or [["none"] + [""] * 7],
                              [18, 18, 14, 30, 24, 20, 40, 14], "llrlllll"))
    return out


def _attempts(facts: dict) -> list:
    out = [_head(4)]
    rows = [[a["port"], a["supplier"], a["date"], a["fuel"], f"{a['quantity_t']:.1f}",
             a["answer"] or _LINE[:24]] for a in facts["purchase_attempts"]]
    if not rows:
        out.append(para("No attempt is recorded in the voyage file ([[purchase_attempt]]); "
                        "write them here:", "body"))
        rows = [[Markup("&nbsp;<br/>&nbsp;"), "", "", "", "", ""] for _ in range(3)]
    out.append(data_table(["Port", "Supplier", "Date", "Fuel asked for", "t", "Answer"],
                          rows, [28, 38, 20, 30, 14, 48], "llllrl", zebra=False))
    out.append(_blanks([BLANKS[1], ""]))
    return out


def _next_port(facts: dict) -> list:
    n = facts["next_port"]
    out = [_head(5)]
    if n is None:
        out.append(para("None known from the voyage file ([[bunker_port]]):", "body"))
        out.append(_blanks(["Port and expected date"]))
        return out
    sure = "" if n["confirmed"] else " (to be confirmed: its fuels are not stated)"
    out.append(para(f"{n['name']}, {n['distance_nm']:,.1f} nm along the route, due "
                    f"{_when(n['eta_utc'], n['eta_ship_time'])}: {n['fuel']}{sure}.", "body"))
    return out


def _actions(facts: dict) -> list:
    out = [_head(6)]
    lines = facts["actions"] or ["The plan finds no shortfall: no alternative is needed."]
    out += [para(x, "body") for x in lines]
    out.append(_blanks([BLANKS[2], "", BLANKS[3]]))
    return out


def _notify(facts: dict) -> list:
    sf = facts["shortfall"]
    text = ("The ship must notify its Administration and the competent authority of the "
            "port of destination (regulation 18.2)." if sf and sf["must_notify"] else
            "Notify the Administration and the competent authority of the port of destination "
            "when compliant fuel cannot be obtained (regulation 18.2).")
    return [_head(7), para(text, "body"), _blanks(list(BLANKS[4:8]))]


def write_nonavailability_pdf(target: str | Path, facts: dict,
                              printed_at: datetime | None = None) -> None:
    """Write the report (whole or not at all).

    Parameters
    ----------
    target : str or Path
        The PDF to write.
    facts : dict
        :func:`planner.voyage.shortfall_facts.nonavailability_facts`, with ``"journal"``
        (None or the command's journal part).
    printed_at : datetime, optional
        The printed-at time in the footer (default: now, UTC).
    """
    s = facts["ship"]
    v = facts["voyage_plan"]
    story = title_block(TITLE, SUBTITLE, [("Ship", f"{s['name']} · IMO {s['imo'] or '—'}"),
                                          ("Voyage", v["voyage"]),
                                          ("Voyage file", v["file"])])
    story.append(caution_box("Advisory", [
        "The figures come from the voyage plan (advisory). The master decides what to do "
        "and completes, signs and sends this report.",
        "Notifying the Administration and the competent authority of the next port of "
        "destination is the ship's duty (MARPOL Annex VI regulation 18.2)."]))
    for part in (_ship, _voyage, _fuel, _attempts, _next_port, _actions, _notify):
        story += part(facts)
    story += [_head(8), *signature_block(["Master"])]
    build_pdf(target, story, title=TITLE, header_right=f"{s['name']} · IMO {s['imo'] or '—'}",
              footer_middle=f"voyage {v['voyage']}",
              printed_at=printed_at or datetime.now(UTC))
