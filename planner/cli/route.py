"""``changeover route``: the master's route check.

Holds the command and the tables the route check prints (``changeover areas``
is in :mod:`planner.cli.areas`). It computes
everything first, then prints and writes; rich and matplotlib are imported
inside the functions, and matplotlib only when a map is asked for. While they
read and compute, a status line on standard error says what they are doing
(:mod:`planner.cli.progress`: on a terminal, without ``--json``), with the
work's own progress texts where it gives them. ``--json``, ``--depart`` and
``--tz`` come from :mod:`planner.cli.options`.
"""

from __future__ import annotations

from pathlib import Path
from typing import Annotated

import typer

from planner.cli.csv_tables import CsvOpt, check_csv_folder
from planner.cli.options import DepartOpt, JsonOpt, TzOpt

AreasOpt = Annotated[list[Path], typer.Option("--areas", "-a", help="Area GeoJSON file or folder "
                                              "of .geojson files (repeatable).")]


def route_cmd(
    route_file: Annotated[Path, typer.Argument(help="Route file: CSV, GeoJSON, GPX or RTZ.")],
    areas: AreasOpt,
    depart: DepartOpt = None,
    speed: Annotated[float | None, typer.Option(help="Speed over ground for legs without their "
                                                "own, knots.")] = None,
    tz: TzOpt = None,
    on: Annotated[str | None, typer.Option(help="Judge areas in force on this date when there "
                                           "are no times (default today).")] = None,
    json_out: JsonOpt = False,
    geojson: Annotated[Path | None, typer.Option(help="Write route and crossings as GeoJSON.")]
    = None,
    map_png: Annotated[Path | None, typer.Option("--map", help="Draw a PNG map of areas, route "
                                                 "and crossings.")] = None,
    csv: CsvOpt = None,
) -> None:
    """Where and when the route enters and leaves each area, and the limit on every stretch."""
    from planner.cli.options import ship_zone
    from planner.cli.progress import progress_kwargs, status
    from planner.common.outputs import check_outputs, dumps, write_json
    from planner.voyage import run
    from planner.voyage.route_report import route_geojson, route_json

    check_outputs({"--geojson": geojson, "--map": map_png})
    check_csv_folder(csv)
    zone = ship_zone(tz, depart)
    with status("checking the route", json_out) as say:
        check = run.run_route_check(route_file, areas, depart, speed, on,
                                    **progress_kwargs(run.run_route_check, say))
        doc = route_json(check, zone)
        doc["warnings"] = route_warnings(check)
        if map_png is not None:
            from planner.charts.route_map import draw_route_map

            if say:
                say("drawing the map")
            draw_route_map(check, map_png)
        if geojson is not None:
            write_json(geojson, route_geojson(check))
    written = [p for p in (geojson, map_png) if p is not None]
    if csv is not None:
        from planner.cli.csv_tables import route_csv, write_csv_dir

        written += write_csv_dir(csv, route_csv(doc))
    if json_out:
        typer.echo(dumps(doc))
        return
    print_route_check(doc)
    for p in written:
        typer.echo(f"wrote {p}")


def route_warnings(check) -> list[str]:
    """The route's warnings: waypoints that look like latitude and longitude exchanged
    (:func:`geo.swapped.swapped_waypoints`, as in the plan's warnings)."""
    from geo.swapped import swapped_waypoints

    route = check.path.route
    return [w.text(route.source) for w in swapped_waypoints(route)]


def route_lines(doc: dict, cols: int) -> list[str]:
    """The route check as text ``cols`` characters wide: the head line, then the tables of
    crossings, force events, stretches and time inside each area
    (:mod:`planner.cli.route_tables`), then the warnings."""
    from planner.cli.console import table_lines, text_lines
    from planner.cli.plan_tables import utc_full
    from planner.cli.route_tables import route_tables

    r = doc["route"]
    head = f"Route {r['name'] or r['file']}: {r['distance_nm']:,.1f} nm in {r['legs']} legs"
    if r["depart_utc"]:
        head += f", departs {utc_full(r['depart_utc'])}, arrives {utc_full(r['arrive_utc'])}"
    else:
        head += f"; no times given, areas judged as in force on {doc['rules_on']}"
    warnings = [line for w in doc.get("warnings", []) for line in text_lines(w, cols,
                                                                               "Warning: ")]
    return [*text_lines(head, cols), "", *table_lines(route_tables(doc), cols), *warnings,
            *text_lines("Advisory only. Official area boundaries and limits are those in "
                        "MARPOL Annex VI and national law.", cols)]


def print_route_check(doc: dict) -> None:
    """The route check on standard output, laid out for its width."""
    from planner.cli.console import echo_lines, width

    echo_lines(route_lines(doc, width()))
