"""``changeover plan``: the voyage's changeovers, quantities and warnings (the main job).

Holds the command (:func:`plan_cmd`: check the options, build the plan and its
document, write the files asked for, print) and the tables it prints
(:func:`print_plan`). The shared options come from :mod:`planner.cli.options`.
"""

from __future__ import annotations

from pathlib import Path
from typing import TYPE_CHECKING, Annotated

import typer

from planner.cli.csv_tables import CsvOpt, check_csv_folder
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
    csv: CsvOpt = None,
    sheets: Annotated[Path | None, typer.Option(help="Watch sheets: one page per changeover "
                                                "for the engineer on watch and the bridge "
                                                "(PDF).")] = None,
    paper: Annotated[str, typer.Option(help="Paper of --sheets: a4 or letter.")] = "a4",
    gpx: Annotated[Path | None, typer.Option(help="Changeover start, compliant and boundary "
                                             "points as GPX 1.1 waypoints.")] = None,
    trip_chart: Annotated[Path | None, typer.Option(help="If the scrubber fails: each "
                                                    "circuit's time to compliant fuel along "
                                                    "the voyage (PNG).")] = None,
    confidence: ConfidenceOpt = None,
    samples: SamplesOpt = None,
    seed: SeedOpt = None,
) -> None:
    """When and where each changeover starts, what it needs, and what to watch."""
    from planner.common.outputs import check_outputs, dumps

    check_outputs({"--geojson": geojson, "--chart": chart, "--map": map_png, "--pdf": pdf,
                   "--sheets": sheets, "--gpx": gpx, "--trip-chart": trip_chart})
    check_csv_folder(csv)
    _check_paper(paper)
    check_confidence(confidence)
    n_samples, n_seed = check_samples(samples, PLAN_SAMPLES), check_seed(seed)
    plan, doc = _build(voyage, confidence, n_samples, n_seed, json_out)
    _write(plan, doc, geojson, chart, map_png, pdf)
    _write_watch(plan, doc, sheets, paper, gpx)
    _write_trip(plan, trip_chart)
    written = [p for p in (geojson, chart, map_png, pdf, sheets, gpx, trip_chart)
               if p is not None]
    if csv is not None:
        from planner.cli.csv_tables import plan_csv, write_csv_dir

        written += write_csv_dir(csv, plan_csv(doc))
    if json_out:
        typer.echo(dumps(doc))
        return
    print_plan(doc)
    for p in written:
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
    """The files asked for: chart, map, PDF (with the map and the chart) and GeoJSON."""
    from planner.common.outputs import write_json
    from planner.voyage.report import plan_geojson

    if chart is not None:
        from planner.charts.route_map import save_figure

        save_figure(_chart(plan, doc), chart)
    if map_png is not None:
        from planner.charts.route_map import save_figure

        save_figure(_map(plan, doc), map_png)
    if pdf is not None:
        from planner.charts.route_map import figure_png
        from planner.documents.plan_pdf import write_plan_pdf

        figures = [(figure_png(_map(plan, doc)), "Route map: the areas, caution zones, route "
                    "and crossings, numbered as the changeovers above (a crossing without a "
                    "changeover is unnumbered); dots: changeover starts with their number. "
                    "A sketch, not for navigation."),
                   (figure_png(_chart(plan, doc)), "Sulphur at each circuit's inlet along the "
                    "voyage against UTC, with the limit in force; the lines are the crossings, "
                    "numbered as the changeovers.")]
        write_plan_pdf(pdf, doc, figures=figures)
    if geojson is not None:
        write_json(geojson, plan_geojson(plan, doc))


def _check_paper(paper: str) -> None:
    """``--paper``: a4 or letter."""
    from geo.errors import InputError

    if paper not in ("a4", "letter"):
        raise InputError("--paper", "", paper, "a4 or letter")


def _write_watch(plan: Plan, doc: dict, sheets: Path | None, paper: str,
                 gpx: Path | None) -> None:
    """The watch sheets (PDF) and the GPX waypoints, when asked for."""
    if sheets is not None:
        from planner.documents.watch_facts import watch_sheets
        from planner.documents.watch_sheets_pdf import write_watch_sheets

        v = doc["voyage"]
        write_watch_sheets(sheets, watch_sheets(plan), ship=f"{v['ship']} · IMO {v['imo']}",
                           voyage=v["name"], paper=paper)
    if gpx is not None:
        from planner.charts.plan_marks import events_of
        from planner.documents.gpx_marks import plan_waypoints, write_gpx

        write_gpx(gpx, plan_waypoints(doc, events_of(plan, doc)),
                  name=f"{doc['voyage']['name']}: changeover marks")


def _map(plan: Plan, doc: dict):
    """The route map figure with the plan's marks and changeover numbers."""
    from planner.charts.plan_marks import crossing_labels, event_notes, events_of, plan_marks
    from planner.charts.route_map import map_figure

    events = events_of(plan, doc)
    return map_figure(plan.check, plan_marks(plan, doc), crossing_labels(events),
                      event_notes(events))


def _chart(plan: Plan, doc: dict):
    """The sulphur chart figure, its events numbered as the changeovers."""
    from planner.charts.plan_chart import chart_figure
    from planner.charts.plan_marks import events_of

    return chart_figure(plan, events_of(plan, doc))


def _write_trip(plan: Plan, out: Path | None) -> None:
    """``--trip-chart``: the time to compliant fuel if the scrubber fails, along the voyage
    (refused when the plan relies on no scrubber)."""
    if out is None:
        return
    if not plan.scrubber_spans:
        from geo.errors import InputError

        raise InputError(plan.voyage.file, "--trip-chart", str(out),
                         "a voyage whose plan relies on a scrubber (the ship file's "
                         "[scrubbers] and fuel above a limit on the way)")
    from planner.charts.trip_chart import draw_trip_chart
    from planner.voyage.scrubber_trip import plan_trip_leads

    draw_trip_chart(plan, plan_trip_leads(plan), out)


def _document(plan: Plan, confidence: float | None, samples: int, seed: int,
              progress: Callable[[str], object] | None = None) -> dict:
    """The plan's JSON document, with the confidence starts when a confidence is given (by
    ``--confidence``, else by the voyage file)."""
    from planner.voyage.report import plan_json

    doc = plan_json(plan)
    if plan.scrubber_spans:  # if the scrubber fails: the flush from each moment it is relied on
        from planner.voyage.scrubber_trip import plan_trip_leads
        from planner.voyage.scrubber_trip_json import trip_json

        if progress is not None:
            progress("if the scrubber fails")
        doc.update(trip_json(plan, plan_trip_leads(plan)))
    conf = confidence if confidence is not None else plan.voyage.confidence
    if conf is not None:
        from planner.voyage.confidence import add_uncertainty

        add_uncertainty(plan, doc, conf, samples, seed, progress)
    return doc


def plan_lines(doc: dict, cols: int) -> list[str]:
    """The plan as text ``cols`` characters wide: its head line, the tables
    (:mod:`planner.cli.plan_tables`), then the notes, warnings and cautions."""
    from planner.cli.console import table_lines, text_lines
    from planner.cli.plan_tables import plan_tables, utc_full

    v = doc["voyage"]
    out = text_lines(f"{v['ship']} — {v['name']}: {v['distance_nm']:,.1f} nm, departs "
                     f"{utc_full(v['depart_utc'])}, arrives {utc_full(v['arrive_utc'])}; "
                     f"compliant {v['time_margin_h']:g} h before each boundary, sulphur "
                     f"target {v['sulphur_target_fraction']:.0%} of the limit", cols)
    out += ["", *table_lines(plan_tables(doc), cols)]
    if doc.get("scrubber_trip"):
        from planner.cli.trip_print import trip_lines

        out += ["", *trip_lines(doc, cols)]
    for n in doc["notes"]:
        out += text_lines(n, cols, "Note: ")
    for w in doc["warnings"]:
        out += text_lines(w, cols, "Warning: ")
    from planner.cli.shortfall_print import shortfall_lines

    out += shortfall_lines(doc.get("shortfall"), cols)
    for c in doc["cautions"]:
        out += text_lines(c, cols)
    return out


def print_plan(doc: dict) -> None:
    """The plan on standard output, laid out for its width."""
    from planner.cli.console import echo_lines, width

    echo_lines(plan_lines(doc, width()))
