"""``changeover areas import``: the options checked, the import run, the file written.

:func:`run_import` reads the list (:mod:`geo.area_list`) or the GIS file
(:mod:`geo.area_gis`), checks every area (:mod:`geo.area_import`), writes the
area file atomically (:mod:`planner.common.outputs`) and returns the report
that ``--json`` prints and :func:`print_import` shows. Every bad option or
input is one :class:`geo.errors.InputError` before anything is written.
"""

from __future__ import annotations

from datetime import UTC, date, datetime
from pathlib import Path

import typer

LIST_SUFFIXES = (".txt", ".csv")
"""Coordinate lists (:mod:`geo.area_list`); GIS files go to :mod:`geo.area_gis`."""

OUT_SUFFIXES = (".geojson", ".json")


def _day(text: str | None, option: str) -> date | None:
    from planner.common.timefmt import parse_day

    return None if text is None else parse_day(text, file=option)


def _required(value: object, option: str, expected: str) -> None:
    from geo.errors import InputError

    if value is None:
        raise InputError(option, "", None, expected)


def run_import(source: Path, out: Path, *, name: str | None, limit: float | None,
               from_: str | None, until: str | None, edges: str | None, layer: str | None,
               name_field: str | None, crs: str | None) -> dict:
    """Import ``source`` into ``out``; the report (see the README's ``areas import``)."""
    from geo.area import EDGE_KINDS
    from geo.area_checks import Text
    from geo.area_gis import SUFFIXES as GIS_SUFFIXES
    from geo.errors import InputError
    from planner.cli.options import check_limit

    if out.suffix.lower() not in OUT_SUFFIXES:
        raise InputError("--out", "", str(out), "an area file named *.geojson")
    if out.exists() and source.exists() and out.resolve() == source.resolve():
        raise InputError("--out", "", str(out), "a file other than the input")
    if edges is not None and edges not in EDGE_KINDS:
        raise InputError("--edges", "", edges, " | ".join(EDGE_KINDS))
    if limit is not None:
        check_limit(limit)
    start, end = _day(from_, "--from"), _day(until, "--until")
    if start and end and end < start:
        raise InputError("--until", "", until, f"a date not before --from {start.isoformat()}")
    kind = source.suffix.lower()
    if kind in LIST_SUFFIXES:
        for option, value in (("--layer", layer), ("--name-field", name_field), ("--crs", crs)):
            if value is not None:
                raise InputError(option, "", value, f"no {option} for a list of positions "
                                 "(GIS files only)")
        report = _import_list(source, name, limit, start, end, edges)
    elif kind in GIS_SUFFIXES:
        report = _import_gis(source, name, limit, start, end, edges, layer, name_field, crs)
    else:
        raise InputError(source, "", Text(f"a {source.suffix or 'plain'} file"),
                         "a list of positions (.txt, .csv) or a GIS file (.shp, .gpkg, .kml)")
    from planner.common.outputs import write_json

    write_json(out, report.pop("document"))
    report["out"] = str(out)
    return report


def _import_list(source: Path, name: str | None, limit: float | None, start: date | None,
                 end: date | None, edges: str | None) -> dict:
    from geo.area_import import AreaProperties, area_feature, areas_document, list_area
    from geo.area_list import read_point_list

    _required(name, "--name", "the area's name, e.g. --name 'Corran Sea ECA'")
    _required(limit, "--limit", "the area's sulphur limit in % m/m, e.g. --limit 0.10")
    _required(start, "--from", "the first day in force, e.g. --from 2027-03-01")
    if not name.strip():
        from geo.errors import InputError

        raise InputError("--name", "", name, "the area's name, non-empty text")
    points = read_point_list(source)
    props = AreaProperties(name.strip(), float(limit), start, end, edges or "geodesic",
                           str(source))
    area = list_area(points, props, str(source))
    first, last = points.points[0], points.points[-1]
    closing = ("the last point repeats point " if points.closed_in_file
               else "closed back to point ") + str(first.number)
    note = (f"{points.read} points read from {source.name} (points {first.number} to "
            f"{last.number}, lines {first.line} to {last.line}; {closing}).")
    return {"source": str(source), "kind": "list", "points_read": points.read,
            "notes": [note], "areas": [_row(area, {})],
            "document": areas_document([area_feature(area, note)])}


def _import_gis(source: Path, name: str | None, limit: float | None, start: date | None,
                end: date | None, edges: str | None, layer: str | None,
                name_field: str | None, crs: str | None) -> dict:
    from geo.area_gis import Given, read_gis_areas
    from geo.area_import import area_feature, areas_document

    given = Given(limit, start, end, edges, name_field, name, crs)
    got = read_gis_areas(source, layer=layer, given=given)
    moved = ", reprojected to WGS84" if got.reprojected else ""
    note = f"Read from {source.name}, layer {got.layer} ({got.crs}{moved})."
    features = []
    for area, origin in zip(got.areas, got.origins, strict=True):
        options = [k for k, v in origin.items() if v == "option"]
        extra = f" Given on the command line: {', '.join(options)}." if options else ""
        features.append(area_feature(area, note + extra))
    return {"source": str(source), "kind": "gis", "layer": got.layer, "crs": got.crs,
            "reprojected": got.reprojected, "notes": [note],
            "areas": [_row(a, o) for a, o in zip(got.areas, got.origins, strict=True)],
            "document": areas_document(features)}


def _row(area, origin: dict[str, str]) -> dict:
    from geo.area_measure import describe

    row = describe(area, datetime.now(UTC).date())
    row.pop("in_force_today")
    row["origin"] = origin
    return row


def print_import(report: dict) -> None:
    """What was read and written, one line each, never cut (plain text)."""
    for note in report["notes"]:
        typer.echo(note)
    n = len(report["areas"])
    typer.echo(f"wrote {report['out']}: {n} area{'s' if n != 1 else ''}")
    for r in report["areas"]:
        until = f" until {r['effective_until']}" if r["effective_until"] else ""
        given = [k for k, v in r["origin"].items() if v == "option"]
        by = f" ({', '.join(given)} from the command line)" if given else ""
        typer.echo(f"  {r['name']}: {r['limit_pct']:.2f} % m/m from {r['effective_from']}"
                   f"{until}, {r['edges']} edges, {r['polygons']} polygon(s), "
                   f"{r['vertices']} vertices, {r['area_km2']:,.0f} km²{by}")
    typer.echo("Check every point against the official text: the boundaries and limits in "
               "force are those of MARPOL Annex VI and national law.")
