"""The ship's written fuel changeover procedure (MARPOL Annex VI regulation 14.6,
[MARPOL-VI]), as a PDF.

Printed from :class:`planner.procedure.facts.ProcedureFacts`: a title block with the
ship, the limit and the revision; the cautions; then, numbered, what the
procedure is for and who does what, the fuel system's volumes, how long a
changeover takes against engine load, each consumer's inlet limits, the checks before
starting, temperature and viscosity handling, moving the valves, monitoring,
completion and the regulation 14.6 record, changing back after exit, and the
approval and revision lines. reportlab is imported inside the functions (via
:mod:`planner.documents.pdf_common`); text is Latin-1 only.
"""

from __future__ import annotations

import functools
from collections.abc import Sequence
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
    styles,
    title_block,
)
from planner.procedure import steps
from planner.procedure.facts import CircuitFacts, DurationRow, ProcedureFacts
from planner.procedure.steps import celsius, changing, dur, hm, names

TITLE = "Fuel changeover procedure"
SECTIONS = ("Purpose and responsibilities", "The fuel system", "How long a changeover takes",
            "Each consumer's inlet limits", "Before starting", "Temperature and viscosity",
            "Moving the valves", "Monitoring", "Completion and recording",
            "Changing back after leaving the area", "Approval and revisions")
"""Numbered section headings, in order (tests look for each)."""


@functools.cache
def _kept(style: str):
    """A copy of a heading style that stays on the page of what follows it."""
    from reportlab.lib.styles import ParagraphStyle

    return ParagraphStyle(f"{style}_kept", parent=styles()[style], keepWithNext=1)


def _heading(text: str, style: str = "h2"):
    from reportlab.platypus import Paragraph

    return Paragraph(esc(text), _kept(style))


def _head(n: int) -> object:
    return _heading(f"{n}. {SECTIONS[n - 1]}", "h1")


def _steps(n: int, items: Sequence[str]):
    """Numbered steps n.1, n.2 ... in a borderless two-column table."""
    from reportlab.lib.units import mm
    from reportlab.platypus import Table, TableStyle

    rows = [[para(f"{n}.{i}", "body"), para(t, "body")] for i, t in enumerate(items, 1)]
    t = Table(rows, colWidths=[11 * mm, (FRAME_WIDTH_MM - 11) * mm], hAlign="LEFT")
    t.setStyle(TableStyle([("VALIGN", (0, 0), (-1, -1), "TOP"),
                           ("LEFTPADDING", (0, 0), (-1, -1), 0),
                           ("TOPPADDING", (0, 0), (-1, -1), 0),
                           ("BOTTOMPADDING", (0, 0), (-1, -1), 1)]))
    return t


def _section(n: int, items: Sequence[str]) -> list:
    return [_head(n), _steps(n, items)]


def _checks(f: ProcedureFacts) -> list:
    rows = [[str(i), t, ""] for i, t in enumerate(steps.checks(f), 1)]
    return [_head(5), para("Before every changeover, in either direction. Initial each line.",
                           "small"),
            data_table(["No.", "Check", "Initials"], rows, [10, 146, 22], zebra=False)]


def _cautions(f: ProcedureFacts):
    lines = [
        "<b>Advisory.</b> This procedure and its figures are advisory. The engine and boiler "
        "makers' instructions and the ship's safety management system come first; where they "
        "differ from this procedure, follow them and correct this procedure.",
        "<b>Loss of propulsion or power.</b> A changeover can stop the main engine, a generator "
        "or the boiler. Never start one in confined or congested waters (port approaches, "
        "pilotage waters, traffic separation schemes, close to the shore or to other ships), "
        "and keep the engine room manned until it is complete and the plant runs steady.",
        "<b>Fuel compatibility.</b> Check that the fuels are compatible before they meet in "
        "the system. Incompatible fuels can throw out sludge that blocks filters and starves "
        "the engines.",
        "<b>Boundaries.</b> The official boundaries and sulphur limits of the control areas "
        "are those in MARPOL Annex VI and national law.",
    ]
    lines += [f"<b>Carriage ban.</b> {esc(text)}" for text in f.carriage]
    if f.ship.fictional:
        lines.append("<b>Sample data.</b> This ship is fictional, and so are the sample areas "
                     "supplied with the planner.")
    return caution_box("Cautions", lines, markup=True)


def _system(f: ProcedureFacts) -> list:
    from reportlab.platypus import KeepTogether

    out = [_head(2), para(
        "When a changeover valve is moved, everything between it and the consumers still "
        "holds the old fuel and must be burnt out. Pipes pass the old fuel on unmixed after a "
        "delay; stirred volumes (mixing tank, heaters, filters) thin it out gradually. "
        "Volumes are from the ship file, at 15 °C; flows are at the engine's reference load "
        "on the regular fuel; 'holds' is volume over flow, the time that volume takes to pass "
        "through once.")]
    out.append(_heading("Fuels"))
    out.append(data_table(
        ["Fuel", "Grade", "Delivery note", "S % m/m", "Density 15 °C kg/m³", "Viscosity cSt",
         f"At most {f.limit_pct:.2f} %"],
        [[x.name, x.grade, x.bdn_ref or "—", f"{x.sulphur_pct:.2f}", f"{x.density_kg_m3:.1f}",
          f"{x.viscosity_cst:g} at {x.viscosity_ref_c:g} °C", "yes" if x.compliant else "no"]
         for x in f.fuels], [22, 20, 40, 16, 26, 28, 26], align="lllrrrl"))
    out.append(_heading("Tanks"))
    out.append(data_table(
        ["Tank", "Capacity m³", "Holds m³ at 15 °C", "Fuel", "S % m/m", "Compliant",
         "Valve of circuit"],
        [[t.name, f"{t.capacity_m3:.1f}", f"{t.volume_m3:.1f}",
          ", ".join(t.content_m3), f"{t.sulphur_pct:.2f}", "yes" if t.compliant else "no",
          ", ".join(t.circuits) or "— (transfer only)"] for t in f.tanks],
        [34, 20, 26, 24, 16, 18, 40], align="lrrlrll"))
    for c in f.circuits:
        out.append(KeepTogether(_circuit_volumes(c)))
    return out


def _circuit_volumes(c: CircuitFacts) -> list:
    who = "; ".join(f"{x.name} ({x.kind.replace('_', ' ')}: {x.rating})" for x in c.consumers)
    rows = []
    for i, v in enumerate(c.volumes, 1):
        size = (f"{v.length_m:g} m × {v.bore_mm:g} mm bore" if v.length_m is not None
                else "full, well mixed" if v.kind == "stirred" else "given by volume")
        rows.append([str(i), v.name, v.kind, size, f"{v.volume_m3:.3f}", ", ".join(v.fed_from),
                     f"{v.flow_m3h:.2f}", "—" if v.holds_min is None else f"{v.holds_min:.1f}"])
    rows += [["", Markup("<b>Pipes</b>"), "", "", f"{c.pipe_m3:.3f}", "", "", ""],
             ["", Markup("<b>Stirred volumes</b>"), "", "", f"{c.stirred_m3:.3f}", "", "", ""],
             ["", Markup("<b>Total to the inlets</b>"), "", "", Markup(f"<b>{c.total_m3:.3f}</b>"),
              "", "", ""]]
    out = [_heading(f"Circuit {c.name}"),
           para(f"Changeover valve selects {names(c.tanks)}. Feeds {who}.", "small"),
           data_table(["No.", "Volume", "Kind", "Size", "m³", "Fed from", "Flow m³/h",
                       "Holds min"], rows, [9, 32, 16, 36, 16, 35, 17, 17], align="llllrlrr",
                      zebra=False)]
    if c.returns_to:
        out.append(para(f"Fuel not burnt comes back to {names(c.returns_to)}, so the old fuel "
                        "circulates there until it is burnt.", "small"))
    if c.returns_to_tank:
        out.append(para("A return line follows the valve to the tank in use: after the switch "
                        f"it carries old fuel into {c.to_tank} for a while (the model counts "
                        "it). Sample that tank after the changeover.", "small"))
    return out


def _durations(f: ProcedureFacts) -> list:
    from reportlab.lib.units import mm
    from reportlab.platypus import KeepTogether, Spacer

    out = [_head(3), para(
        "Times run from the moment the changeover valve is moved, from the planner's flushing "
        "model of the volumes in section 2, with the generators and boiler at their running "
        f"rates. <b>At limit</b>: the fuel at every inlet of the circuit is at or below "
        f"{f.limit_pct:.2f} % m/m sulphur and stays there. <b>At target</b>: at or below "
        f"{f.target_pct:.3f} %, the margin aimed at. <b>Start before boundary</b>: the time to "
        f"target plus {dur(f.margin_h)} margin, and the distance the ship runs in it at "
        "that speed. Read the row for the load you will actually run: at lower load it takes "
        "longer. Times are h:min.", markup=True)]
    for c in f.circuits:
        if not c.rows:
            out.append(para(f"Circuit {c.name}: no changeover (one fuel at its valve).", "small"))
            continue
        burnt = [c.to_fuel] + [k for k in c.rows[0].burnt_t if k != c.to_fuel]
        if c.has_main_engine:
            head = ["Load % MCR", "Speed kn"]
            widths = [15, 13]
        else:
            head, widths = ["Consumers"], [28]
        head += ["At limit", "At target", "Start before boundary", "nm"]
        widths += [15, 15, 21, 13]
        head += [f"{b} burnt t" for b in burnt] + ["Inlet viscosity cSt"]
        widths += [(178 - sum(widths) - 42) / len(burnt)] * len(burnt) + [42]
        rows = []
        for r in c.rows:
            bold = r.load_pct == c.reference_load_pct and c.has_main_engine
            cells = ([f"{r.load_pct:g}" + (" (ref.)" if bold else ""),
                      "—" if r.speed_kn is None else f"{r.speed_kn:.1f}"]
                     if c.has_main_engine else [", ".join(x.name for x in c.consumers)])
            cells += [hm(r.time_to_limit_h), hm(r.time_to_target_h), hm(r.start_before_h),
                      "—" if r.start_before_nm is None else f"{r.start_before_nm:.0f}"]
            cells += [f"{r.burnt_t.get(b, 0.0):.2f}" for b in burnt] + [_visc(r, c)]
            rows.append([Markup(f"<b>{esc(x)}</b>") if bold else x for x in cells])
        align = ("lr" if c.has_main_engine else "l") + "rrrr" + "r" * len(burnt) + "l"
        what = (f"Circuit {c.name}: {c.from_fuel} to {c.to_fuel}, against main engine load"
                if c.has_main_engine else
                f"Circuit {c.name}: {c.from_fuel} to {c.to_fuel}, at its running rate")
        out.append(KeepTogether([para(what, "h2"), data_table(head, rows, widths, align=align)]))
    order = changing(f)
    if len(order) > 1:
        out.append(Spacer(1, 2 * mm))
        out.append(para(f"Circuit {order[0].name} takes longest: change it over first, then "
                        f"{names([c.name for c in order[1:]])}, each in time to be at target "
                        "before the margin begins.", "small"))
    return out


def _visc(r: DurationRow, c: CircuitFacts) -> str:
    v = r.viscosity
    text = f"{v.min_cst:.1f}-{v.max_cst:.1f}"
    if v.inside:
        return text + ", inside"
    g = c.window_of(v.consumer)
    if g is not None and g.burner:
        return text + ": outside, stop the burner for the switch"
    if v.lead_h is None:
        return text + ": outside, change over more slowly"
    return text + f": start cooling {v.lead_h * 60:.0f} min early"


_LIMITS = (
    ("Inlet viscosity on heated fuel", "target_cst", "cSt", "the heater set point for residual "
     "fuel"),
    ("Lowest inlet viscosity", "min_cst", "cSt", "never below; low-viscosity alarm at or above "
     "this"),
    ("Highest inlet viscosity", "max_cst", "cSt", "never above; high-viscosity alarm at or "
     "below this"),
    ("Fastest inlet temperature change", "max_rate_c_per_min", "°C/min", "up or down, at any "
     "time (an engine's: thermal shock to the injection equipment; a burner's: its heater)"),
    ("Distillate supply temperature", "supply_temperature_c", "°C", "unheated fuel arrives at "
     "about this"),
    ("Heaters' highest temperature", "max_temperature_c", "°C", "the heaters are not set above "
     "this"),
)


def _limits(f: ProcedureFacts) -> list:
    from reportlab.lib.units import mm
    from reportlab.platypus import Spacer

    groups = f.windows
    col = (100.0 - 0.0) / max(len(groups), 1)
    rows = [[name] + [f"{getattr(g.window, key):g} {unit}" for g in groups] + [meaning]
            for name, key, unit, meaning in _LIMITS]
    fuels = []
    for g in groups:
        w = g.window
        for x in f.fuels:
            t = g.fuel(x.name)
            fuels.append([x.name, g.label,
                          (f"{celsius(t.set_point_c)} ({t.viscosity_at_set_point_cst:.1f} cSt)"
                           + ("" if t.heated else ", not heated")),
                          f"{celsius(t.thins_to_min_c)} ({w.min_cst:g} cSt)"
                          + (" (beyond the heaters)" if t.thins_to_min_c > w.max_temperature_c
                             else ""),
                          f"{celsius(t.thickens_to_max_c)} ({w.max_cst:g} cSt)",
                          "assumed slope" if x.slope_assumed else "two points"])
    return [_head(4), para(
        "Each consumer has its own inlet limits and heating rule: the default of its kind "
        "(two-stroke main engine, four-stroke engine, boiler burner), then the ship file's "
        "[inlet] table, then the consumer's own inlet keys. Where a maker gives other figures "
        "for its own equipment, those apply.", "small"),
        data_table(["Limit"] + [g.label for g in groups] + ["Meaning"], rows,
                   [44] + [col] * len(groups) + [134 - col * len(groups)]),
        Spacer(1, 2 * mm),
        para("What the limits mean for each fuel at each consumer (ASTM D341 line through its "
             "delivery-note viscosity):", "small"),
        data_table(["Fuel", "Consumers", "Inlet temperature in service", "Thinner than the "
                    "minimum above", "Thicker than the maximum below", "Viscosity line"],
                   fuels, [18, 42, 36, 32, 28, 22])]


def _approval(revision: str, printed: datetime, sources: Sequence[tuple[str, str]]) -> list:
    src = "; ".join(f"{n} (SHA-256 {h[:12]})" for n, h in sources) or "the ship file"
    blank = [Markup("&nbsp;<br/>&nbsp;")] * 5
    rows = [[revision, printed.strftime("%Y-%m-%d"), f"Printed from {src}", "", ""],
            blank, blank]
    from reportlab.platypus import KeepTogether

    return [KeepTogether([
        _head(11),
        para("Review this procedure after any change to the fuel system, the engines, the "
             "boilers or the fuels usually bunkered, and print it again from the updated ship "
             "file. Keep the approved copy in the engine control room and one on the bridge.",
             "small"),
        data_table(["Revision", "Date", "What changed", "Chief engineer", "Master"], rows,
                   [18, 22, 82, 28, 28], zebra=False),
        *signature_block(["Prepared by the chief engineer", "Approved by the master"]),
    ])]


def write_procedure_pdf(target: str | Path, facts: ProcedureFacts, *, revision: str = "0",
                        sources: Sequence[tuple[str, str]] = (),
                        printed_at: datetime | None = None) -> None:
    """Write the changeover procedure of ``facts`` to ``target`` (all-or-nothing).

    ``sources``: (file name, SHA-256 hex) of the input files, printed on the revision line.
    """
    printed_at = printed_at or datetime.now(UTC).replace(microsecond=0)
    to = sorted({c.to_fuel for c in changing(facts)})
    frm = sorted({c.from_fuel for c in changing(facts)})
    ship = facts.ship
    facts_rows = [
        ("Ship", ship.name + (" (fictional)" if ship.fictional else "")),
        ("IMO number", ship.imo or "—"),
        ("Sulphur limit", f"{facts.limit_pct:.2f} % m/m in the control area; aim at "
                          f"{facts.target_pct:.3f} %, complete {dur(facts.margin_h)} "
                          "before the boundary"),
        ("Fuels", f"regular {names(frm) or '—'}; compliant {names(to) or '—'}"),
        ("Circuits", "; ".join(f"{c.name}: {', '.join(x.name for x in c.consumers)}"
                               for c in facts.circuits)),
        ("Revision", f"{revision}, printed {format_utc(printed_at)} (UTC); valid when signed "
                     "in section 11"),
    ]
    if facts.voyage:
        facts_rows.insert(4, ("Tank contents", f"as in voyage {facts.voyage}"))
    story = title_block(TITLE, "The ship's written procedure for changing over to compliant "
                        "fuel before entering a sulphur emission control area, and back after "
                        "leaving it (MARPOL Annex VI regulation 14.6).", facts_rows)
    story.append(_cautions(facts))
    if facts.warnings:
        story.append(caution_box("Points for the chief engineer in this ship's figures",
                                 list(facts.warnings)))
    story += _section(1, steps.purpose(facts))
    story += _system(facts) + _durations(facts) + _limits(facts) + _checks(facts)
    for n, part in ((6, steps.temperature), (7, steps.valves), (8, steps.monitoring),
                    (9, steps.completion), (10, steps.back)):
        story += _section(n, part(facts))
    story += _approval(revision, printed_at, sources)
    build_pdf(target, story, title=TITLE, header_right=f"{ship.name} · IMO {ship.imo or '—'}",
              footer_middle=f"revision {revision}", printed_at=printed_at)
