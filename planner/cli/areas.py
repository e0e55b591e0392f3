"""``changeover areas``: list and check area files, import them, compare two versions.

A group of three commands, ``check`` (also the group's default, so the old
``changeover areas FILES...`` still lists the areas), ``import`` and ``diff``.
:class:`AreasGroup` reads a first word that is not one of its commands as the
start of ``check``'s arguments; a file or folder named ``import``, ``diff`` or
``check`` is written ``./import``. The commands compute everything first, then
print and write; the computing packages, rich and pyogrio are imported inside
them. :mod:`planner.cli` registers them on :data:`areas_app`.
"""

from __future__ import annotations

from datetime import UTC, datetime
from pathlib import Path
from typing import Annotated

import typer
from typer.core import TyperGroup

from planner.cli.options import JsonOpt, LimitOpt

DEFAULT_COMMAND = "check"


class AreasGroup(TyperGroup):
    """The ``areas`` group: a first word that is not a command (or ``--help``) starts ``check``."""

    def parse_args(self, ctx, args: list[str]) -> list[str]:  # noqa: ANN001 (click's Context)
        if args and args[0] not in self.commands and args[0] not in ctx.help_option_names:
            args = [DEFAULT_COMMAND, *args]
        return super().parse_args(ctx, args)


areas_app = typer.Typer(
    name="areas", cls=AreasGroup,
    help="Area files: list and check them (areas [check] PATHS), import a regulation's list of "
         "positions or a GIS file (areas import), and compare two versions (areas diff).")
"""The ``areas`` group; :mod:`planner.cli` registers the commands and the bare-group help."""

OnOpt = Annotated[str | None, typer.Option(help="Date for 'in force' (default today).")]


def check_cmd(
    paths: Annotated[list[Path], typer.Argument(help="Area GeoJSON files or folders.")],
    json_out: JsonOpt = False,
    on: OnOpt = None,
) -> None:
    """List the control areas in files or folders, with their limits, dates and size."""
    from geo.area_files import load_areas
    from geo.area_measure import describe
    from planner.cli.progress import progress_kwargs, status
    from planner.common.outputs import dumps
    from planner.common.timefmt import parse_day

    day = parse_day(on) if on else datetime.now(UTC).date()
    with status("reading the areas", json_out) as say:
        found = load_areas(paths, **progress_kwargs(load_areas, say))
        if say:
            say("measuring the areas")
        rows = [describe(a, day) for a in found]
    if json_out:
        typer.echo(dumps({"on": day.isoformat(), "areas": rows}))
        return
    from planner.cli.areas_table import print_areas

    print_areas(f"Control areas (in force judged on {day.isoformat()})", rows)


def import_cmd(
    source: Annotated[Path, typer.Argument(
        help="A list of positions (LIST.txt, LIST.csv) or a GIS file (FILE.shp, FILE.gpkg, "
             "FILE.kml).")],
    out: Annotated[Path, typer.Option("--out", help="The area file to write (*.geojson).")],
    name: Annotated[str | None, typer.Option(
        help="The area's name (a list: required; a GIS layer of one feature: instead of "
             "the file's).")] = None,
    limit: Annotated[float | None, LimitOpt.__metadata__[0]] = None,
    from_: Annotated[str | None, typer.Option(
        "--from", help="First day in force, YYYY-MM-DD, from 00:00 UTC (a list: required; a "
                       "GIS file: for features without one).")] = None,
    until: Annotated[str | None, typer.Option(
        help="Last day in force, YYYY-MM-DD, to 24:00 UTC (optional).")] = None,
    edges: Annotated[str | None, typer.Option(
        help="How consecutive points are joined: geodesic (default; MARPOL Annex VI Appendix "
             "VII), rhumb or lonlat.")] = None,
    layer: Annotated[str | None, typer.Option(help="GIS file: the layer holding the areas.")]
    = None,
    name_field: Annotated[str | None, typer.Option(
        help="GIS file: the attribute holding each area's name.")] = None,
    crs: Annotated[str | None, typer.Option(
        help="GIS file that does not name its coordinate reference system: its CRS, e.g. "
             "EPSG:4326.")] = None,
    json_out: JsonOpt = False,
) -> None:
    """Write an area file from a regulation's list of positions or from a GIS file.

    Every area is checked as 'changeover areas' checks it before anything is written.
    """
    from planner.cli.areas_import import run_import
    from planner.common.outputs import dumps

    report = run_import(source, out, name=name, limit=limit, from_=from_, until=until,
                        edges=edges, layer=layer, name_field=name_field, crs=crs)
    if json_out:
        typer.echo(dumps(report))
        return
    from planner.cli.areas_import import print_import

    print_import(report)


def diff_cmd(
    old: Annotated[Path, typer.Argument(help="The areas now in use: a file or folder.")],
    new: Annotated[Path, typer.Argument(help="The update: a file or folder.")],
    json_out: JsonOpt = False,
) -> None:
    """What changed between two versions of an area set: areas, limits, dates and vertices.

    Exit status 0 when the two are the same, 1 when anything changed.
    """
    from geo.area_diff import diff_areas
    from geo.area_files import load_areas
    from planner.cli.areas_diff import diff_json, print_diff
    from planner.cli.progress import status
    from planner.common.outputs import dumps

    with status("comparing the areas", json_out):
        diff = diff_areas(load_areas([old]), load_areas([new]))
    if json_out:
        typer.echo(dumps(diff_json(diff, old, new)))
    else:
        print_diff(diff, old, new)
    if diff.changes:
        raise typer.Exit(1)
