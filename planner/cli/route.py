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

from datetime import timezone
from pathlib import Path
from typing import TYPE_CHECKING, Annotated

import typer

from planner.cli.options import DepartOpt, JsonOpt, TzOpt

if TYPE_CHECKING:
    from geo.compliance import RouteCheck

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
) -> None:
    """Where and when the route enters and leaves each area, and the limit on every stretch."""
    from planner.cli.options import ship_zone
    from planner.cli.progress import progress_kwargs, status
    from planner.common.outputs import dumps, write_json
    from planner.voyage import run
    from planner.voyage.route_report import route_geojson, route_json

    zone = ship_zone(tz, depart)
    with status("checking the route", json_out) as say:
        check = run.run_route_check(route_file, areas, depart, speed, on,
                                    **progress_kwargs(run.run_route_check, say))
        doc = route_json(check, zone)
        if map_png is not None:
            from planner.charts.route_map import draw_route_map

            if say:
                say("drawing the map")
            draw_route_map(check, map_png)
        if geojson is not None:
            write_json(geojson, route_geojson(check))
    if json_out:
        typer.echo(dumps(doc))
        return
    print_route_check(check, zone)
    for p in (geojson, map_png):
        if p is not None:
            typer.echo(f"wrote {p}")


def print_route_check(check: RouteCheck, zone: timezone) -> None:
    """Tables of crossings, stretches and time inside each area."""
    from geo.position import format_position
    from planner.cli.console import console, table
    from planner.common.timefmt import format_offset, format_ship, format_utc

    con = console()
    path = check.path
    sched = check.schedule
    head = f"Route {path.route.name or path.route.source}: {path.length_nm:,.1f} nm in " \
           f"{path.n_legs} legs"
    if sched:
        head += f", departs {format_utc(sched.depart_utc)}, arrives {format_utc(sched.arrive_utc)}"
    else:
        head += f"; no times given, areas judged as in force on {check.on.isoformat()}"
    con.print(head)
    t = table("Boundary crossings", [
        ("Area", "w"), ("Event", "l"), ("Position", "l"), ("Leg", "r"), ("Dist nm", "r"),
        ("UTC", "l"), (f"Ship's time {format_offset(zone)}", "l"), ("In force", "l"),
        ("Then limit %", "r")])
    for tc in check.crossings:
        c = tc.crossing
        t.add_row(c.area, c.event, format_position(c.lat, c.lon), str(c.leg + 1),
                  f"{c.distance_nm:,.2f}", format_utc(tc.time_utc),
                  format_ship(tc.time_utc, zone, with_offset=False), "yes" if tc.in_force else "no",
                  f"{tc.limit_pct:.2f}")
    if not check.crossings:
        con.print("The route crosses no area boundary.")
    else:
        con.print(t)
    s = table("Sulphur limit along the route", [
        ("From nm", "r"), ("To nm", "r"), ("Length nm", "r"), ("Limit % m/m", "r"),
        ("Under", "w"), ("From UTC", "l"), ("To UTC", "l")])
    for st in check.stretches:
        s.add_row(f"{st.from_nm:,.2f}", f"{st.to_nm:,.2f}", f"{st.to_nm - st.from_nm:,.2f}",
                  f"{st.limit_pct:.2f}", ", ".join(st.areas) or "global cap",
                  format_utc(st.from_utc), format_utc(st.to_utc))
    con.print(s)
    a = table("Time inside each area", [
        ("Area", "w"), ("Limit % m/m", "r"), ("Inside nm", "r"), ("Inside h", "r")])
    for p in check.passages:
        a.add_row(p.area.name, f"{p.area.sulphur_limit_pct:.2f}", f"{p.inside_nm:,.2f}",
                  "—" if p.inside_h is None else f"{p.inside_h:,.2f}")
    con.print(a)
    con.print("[dim]Advisory only. Official area boundaries and limits are those in MARPOL "
              "Annex VI and national law.[/dim]")
