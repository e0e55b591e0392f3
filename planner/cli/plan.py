"""``changeover plan``: the voyage's changeovers, quantities and warnings (the main job)."""

from __future__ import annotations

from pathlib import Path
from typing import Annotated

import typer


def plan_cmd(
    voyage: Annotated[Path, typer.Argument(help="Voyage file (TOML).")],
    json_out: Annotated[bool, typer.Option("--json", help="Print JSON (documented keys).")]
    = False,
    geojson: Annotated[Path | None, typer.Option(help="Write route, crossings and changeover "
                                                 "points as GeoJSON.")] = None,
    chart: Annotated[Path | None, typer.Option(help="Chart of sulphur at each inlet along the "
                                               "voyage (PNG).")] = None,
    map_png: Annotated[Path | None, typer.Option("--map", help="Map of areas, route and "
                                                 "changeover points (PNG).")] = None,
    pdf: Annotated[Path | None, typer.Option(help="The plan for signature (PDF).")] = None,
    confidence: Annotated[float | None, typer.Option(help="Also the starts at this confidence "
                                                     "(Monte Carlo), e.g. 0.99 (default: the "
                                                     "voyage file's, if any).")] = None,
    samples: Annotated[int, typer.Option(help="Monte Carlo samples per changeover.")] = 4000,
    seed: Annotated[int, typer.Option(help="Random seed (same seed, same numbers).")] = 0,
) -> None:
    """When and where each changeover starts, what it needs, and what to watch."""
    import sys

    from geo.errors import InputError
    from planner.common.outputs import dumps, write_json
    from planner.voyage import run
    from planner.voyage.report import plan_geojson

    if confidence is not None and not 0.5 <= confidence < 1.0:
        raise InputError("--confidence", "", confidence, "a confidence from 0.5 to below 1")
    if samples < 100:
        raise InputError("--samples", "", samples, "at least 100 samples")
    if sys.stderr.isatty() and not json_out:
        from planner.cli.console import console

        with console(stderr=True).status("planning") as status:
            plan = run.build_plan(voyage, lambda text: status.update(text))
            doc = _document(plan, confidence, samples, seed, status.update)
    else:
        plan = run.build_plan(voyage)
        doc = _document(plan, confidence, samples, seed)
    if chart is not None:
        from planner.charts.plan_chart import draw_plan_chart

        draw_plan_chart(plan, chart)
    if map_png is not None:
        from planner.charts.plan_marks import plan_marks
        from planner.charts.route_map import draw_route_map

        draw_route_map(plan.check, map_png, extra=plan_marks(plan, doc))
    if pdf is not None:
        from planner.documents.plan_pdf import write_plan_pdf

        write_plan_pdf(pdf, doc)
    if geojson is not None:
        write_json(geojson, plan_geojson(plan, doc))
    if json_out:
        typer.echo(dumps(doc))
        return
    print_plan(doc)
    for p in (geojson, chart, map_png, pdf):
        if p is not None:
            typer.echo(f"wrote {p}")


def _document(plan, confidence, samples, seed, progress=None) -> dict:
    from planner.voyage.report import plan_json

    doc = plan_json(plan)
    conf = confidence if confidence is not None else plan.voyage.confidence
    if conf is not None:
        from planner.voyage.confidence import add_uncertainty

        add_uncertainty(plan, doc, conf, samples, seed, progress)
    return doc


def _dm(lat: float | None, lon: float | None) -> str:
    from geo.position import format_position

    return "—" if lat is None else format_position(lat, lon)


def _t(iso: str | None) -> str:
    return "—" if iso is None else iso.replace("T", " ")[:16] + ("Z" if iso.endswith("Z") else "")


def print_plan(doc: dict) -> None:
    """The plan as tables on the terminal."""
    from planner.cli.console import console, table

    con = console()
    v = doc["voyage"]
    con.print(f"[bold]{v['ship']}[/bold] — {v['name']}: {v['distance_nm']:,.1f} nm, departs "
              f"{_t(v['depart_utc'])}, arrives {_t(v['arrive_utc'])}; compliant "
              f"{v['time_margin_h']:g} h before each boundary, sulphur target "
              f"{v['sulphur_target_fraction']:.0%} of the limit")
    t = table("Changeovers", [("#", "r"), ("Area", "w"), ("Circuit", "l"), ("Change", "l"),
                              ("Start UTC", "l"), ("Start ship's time", "l"),
                              ("Start position", "l"), ("Compliant / done UTC", "l"),
                              ("Boundary UTC", "l"), ("Boundary position", "l"),
                              ("Margin h", "r"), ("Takes h", "r")])
    for r in doc["changeovers"]:
        change = f"{r['from_fuel']} → {r['to_fuel']}"
        done = r["compliant_utc"] or r["complete_utc"]
        t.add_row(str(r["number"]), r["area"], r["circuit"], change, _t(r["start_utc"]),
                  (r["start_ship_time"] or "—").replace("T", " "),
                  _dm(r["start_lat"], r["start_lon"]), _t(done), _t(r["boundary_utc"]),
                  _dm(r["boundary_lat"], r["boundary_lon"]), f"{r['margin_h']:.2f}",
                  "—" if r["duration_h"] is None else f"{r['duration_h']:.2f}")
    con.print(t)
    if "uncertainty" in doc:
        u = doc["uncertainty"]
        ut = table(f"Start at {u['confidence']:.0%} confidence ({u['samples']} samples, seed "
                   f"{u['seed']}; main driver: {u['main_driver'] or '—'})",
                   [("#", "r"), ("Circuit", "l"), ("P50 start UTC", "l"),
                    (f"{u['confidence']:.0%} start UTC", "l"), ("Lead h", "r"),
                    ("Extra compliant t", "r"), ("Driver", "w")])
        for r in doc["changeovers"]:
            if "start_p50_utc" in r:
                ut.add_row(str(r["number"]), r["circuit"], _t(r["start_p50_utc"]),
                           _t(r["start_confidence_utc"]),
                           "—" if r["lead_confidence_h"] is None else
                           f"{r['lead_confidence_h']:.2f}",
                           "—" if r["extra_compliant_t"] is None else
                           f"{r['extra_compliant_t']:.2f}", r["main_driver"] or "—")
        con.print(ut)
    s = table("Fuel on each stretch", [("From nm", "r"), ("To nm", "r"), ("Limit %", "r"),
                                       ("Under", "w"), ("Fuel", "l"), ("From UTC", "l")])
    for st in doc["stretches"]:
        s.add_row(f"{st['from_nm']:,.1f}", f"{st['to_nm']:,.1f}", f"{st['limit_pct']:.2f}",
                  ", ".join(st["areas"]) or "global cap", st["fuel"], _t(st["from_utc"]))
    con.print(s)
    q = table("Fuel needed (valve switch to valve switch) against fuel on board",
              [("Fuel", "l"), ("Needed t", "r"), ("Needed m³ at 15 °C", "r"),
               ("On board t", "r"), ("Spare t", "r")])
    for f, x in doc["fuel_totals"].items():
        q.add_row(f, f"{x['needed_t']:.1f}", f"{x['needed_m3_15c']:.1f}",
                  f"{x['on_board_t']:.1f}", f"{x['on_board_t'] - x['needed_t']:.1f}")
    con.print(q)
    so = table("SO₂ formed inside each area", [("Area", "w"), ("As planned kg", "r"),
                                               (f"On {doc['regular_fuel']} kg", "r")])
    for a, x in doc["so2"]["areas"].items():
        so.add_row(a, f"{x['so2_kg']:,.0f}", f"{x['so2_on_regular_kg']:,.0f}")
    con.print(so)
    for n in doc["notes"]:
        con.print(f"[cyan]Note:[/cyan] {n}")
    for w in doc["warnings"]:
        con.print(f"[yellow]Warning:[/yellow] {w}")
    for c in doc["cautions"]:
        con.print(f"[dim]{c}[/dim]")
