"""The list of areas that ``changeover areas`` prints, laid out so that nothing is cut.

Every value but the name keeps its whole width on one line; the name column
takes the rest of the line and a long name goes on over the next lines,
broken between words. When even that leaves a name column narrower than
:data:`MIN_NAME`, each area is printed as a block of labelled lines instead.
The width is the terminal's (80 when it cannot be told), or
:data:`planner.cli.console.PRINT_WIDTH` when the output is a file or a pipe.
"""

from __future__ import annotations

import shutil
import sys
import textwrap

import typer

MIN_NAME = 12
"""Narrowest name column [characters] before the blocks are used."""

HEADERS = ("Name", "Limit\n% m/m", "From", "Until", "Edges", "Vertices", "Area\nkm²",
           "In\nforce")
RIGHT = (False, True, False, False, False, True, True, False)


def width() -> int:
    """Characters per line of standard output."""
    from planner.cli.console import PRINT_WIDTH

    if not sys.stdout.isatty():
        return PRINT_WIDTH
    return shutil.get_terminal_size((80, 24)).columns


def cells(row: dict) -> list[str]:
    """A row of ``geo.area_measure.describe`` as the table's texts."""
    return [row["name"], f"{row['limit_pct']:.2f}", str(row["effective_from"]),
            str(row["effective_until"] or "—"), row["edges"], str(row["vertices"]),
            f"{row['area_km2']:,.0f}", "yes" if row["in_force_today"] else "no"]


def layout(title: str, rows: list[list[str]], columns: int) -> list[str]:
    """The lines of the table (or the blocks) for ``columns`` characters a line."""
    heads = [h.split("\n") for h in HEADERS]
    widths = [max([len(x) for x in heads[i]] + [len(r[i]) for r in rows])
              for i in range(1, len(HEADERS))]
    gap = "  "
    name_w = columns - sum(widths) - len(gap) * len(widths)
    longest = max([len(r[0]) for r in rows] + [len(HEADERS[0])])
    name_w = min(name_w, longest)
    if name_w < MIN_NAME:
        return _blocks(title, rows)
    lines = [title, ""]
    for k in range(max(len(h) for h in heads)):
        parts = [(h[k] if k < len(h) else "") for h in heads]
        lines.append(_row(parts, [name_w, *widths]))
    lines.append("-" * (name_w + sum(widths) + len(gap) * len(widths)))
    for r in rows:
        names = textwrap.wrap(r[0], name_w, break_on_hyphens=False) or [""]
        lines.append(_row([names[0], *r[1:]], [name_w, *widths]))
        lines.extend(names[1:])
    return lines


def _row(parts: list[str], widths: list[int]) -> str:
    out = [p.rjust(w) if right else p.ljust(w)
           for p, w, right in zip(parts, widths, RIGHT, strict=True)]
    return "  ".join(out).rstrip()


def _blocks(title: str, rows: list[list[str]]) -> list[str]:
    lines = [title]
    for r in rows:
        lines += ["", r[0], f"  limit {r[1]} % m/m", f"  from {r[2]}", f"  until {r[3]}",
                  f"  {r[4]} edges", f"  {r[5]} vertices", f"  {r[6]} km²",
                  f"  in force: {r[7]}"]
    return lines


def print_areas(title: str, rows: list[dict]) -> None:
    """Print the areas' table on standard output."""
    for line in layout(title, [cells(r) for r in rows], width()):
        typer.echo(line)
