"""``changeover plan``: the voyage's changeovers, quantities and warnings (the main job).

Holds the command (:func:`plan_cmd`: check the options, build the plan and its
document, write the files asked for, print) and the tables it prints
(:func:`print_plan`). The shared options come from :mod:`planner.cli.options`.
"""

from __future__ import annotations

from pathlib import Path
from typing import TYPE_CHECKING, Annotated

import typer

from planner.cli.options import (
    PLAN_SAMPLES,
    ConfidenceOpt,
    JsonOpt,
    SamplesOpt,
    SeedOpt,
    check_confidence,
    check_samples,
    check_seed,
)

if TYPE_CHECKING:
    from collections.abc import Callable

    from rich.console import Console

    from planner.voyage.plan import Plan


def plan_cmd(
    voyage: Annotated[Path, typer.Argument(help="Voyage file (TOML).")],
    json_out: JsonOpt = False,
    geojson: Annotated[Path | None, typer.Option(help="Write route, crossings and changeover "
                                                 "points as GeoJSON.")] = None,
    chart: Annotated[Path | None, typer.Option(help="Chart of sulphur at each inlet along the "
                                               "voyage (PNG).")] = None,
    map_png: Annotated[Path | None, typer.Option("--map", help="Map of areas, route and "
                                                 "changeover points (PNG).")] = None,
    pdf: Annotated[Path | None, typer.Option(help="The plan for signature (PDF).")] = None,
    confidence: ConfidenceOpt = None,
    samples: SamplesOpt = None,
    seed: SeedOpt = None,
) -> None:
    """When and where each changeover starts, what it needs, and what to watch."""
    from planner.common.outputs import dumps

    check_confidence(confidence)
    n_samples, n_seed = check_samples(samples, PLAN_SAMPLES), check_seed(seed)
    plan, doc = _build(voyage, confidence, n_samples, n_seed, json_out)
    _write(plan, doc, geojson, chart, map_png, pdf)
    if json_out:
        typer.echo(dumps(doc))
        return
    print_plan(doc)
    for p in (geojson, chart, map_png, pdf):
        if p is not None:
            typer.echo(f"wrote {p}")


def _build(voyage: Path, confidence: float | None, samples: int, seed: int,
           json_out: bool) -> tuple[Plan, dict]:
    """The plan and its document; what is being done is shown on standard error while it
    runs, when that is a terminal and ``--json`` is not given."""
    from planner.cli.progress import status
    from planner.voyage import run

    with status("planning", json_out) as say:
        plan = run.build_plan(voyage, say)
        return plan, _document(plan, confidence, samples, seed, say)


def _write(plan: Plan, doc: dict, geojson: Path | None, chart: Path | None,
           map_png: Path | None, pdf: Path | None) -> None:
    """The files asked for: chart, map, PDF and GeoJSON."""
    from planner.common.outputs import write_json
    from planner.voyage.report import plan_geojson

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


def _document(plan: Plan, confidence: float | None, samples: int, seed: int,
              progress: Callable[[str], object] | None = None) -> dict:
    """The plan's JSON document, with the confidence starts when a confidence is given (by
    ``--confidence``, else by the voyage file)."""
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
    from planner.cli.console import console

    con = console()
    v = doc["voyage"]
    con.print(f"[bold]{v['ship']}[/bold] — {v['name']}: {v['distance_nm']:,.1f} nm, departs "
              f"{_t(v['depart_utc'])}, arrives {_t(v['arrive_utc'])}; compliant "
              f"{v['time_margin_h']:g} h before each boundary, sulphur target "
              f"{v['sulphur_target_fraction']:.0%} of the limit")
    _print_changeovers(con, doc)
    if "uncertainty" in doc:
        _print_confidence(con, doc)
    _print_fuel(con, doc)
    for n in doc["notes"]:
        con.print(f"[cyan]Note:[/cyan] {n}")
    for w in doc["warnings"]:
        con.print(f"[yellow]Warning:[/yellow] {w}")
    for c in doc["cautions"]:
        con.print(f"[dim]{c}[/dim]")


def _print_changeovers(con: Console, doc: dict) -> None:
    """The changeovers table: start, compliant and boundary, times and positions."""
    from planner.cli.console import table

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


def _print_confidence(con: Console, doc: dict) -> None:
    """The starts at the confidence (Monte Carlo), changeovers to compliant fuel only."""
    from planner.cli.console import table

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


def _print_fuel(con: Console, doc: dict) -> None:
    """Fuel on each stretch, fuel needed against on board, and the SO₂ formed in each area."""
    from planner.cli.console import table

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
