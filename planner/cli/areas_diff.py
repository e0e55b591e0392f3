"""``changeover areas diff``: the changes as a table that is never cut, and as JSON.

The table is plain text laid out to fit 80 columns whatever the names: each
area is a heading line of its own, and each change a row of what, where, old
and new; a position (degrees and minutes to 0.01', as regulations print them)
is given whole on its own line, old then new, with the distance moved. Names,
dates and positions are never shortened, at any width, on a terminal or piped.
"""

from __future__ import annotations

from pathlib import Path
from typing import TYPE_CHECKING

import typer

if TYPE_CHECKING:
    from geo.area_diff import AreaDiff, Change

_LABELS = {"limit": "limit % m/m", "effective_from": "in force from",
           "effective_until": "in force until"}


def _shown(value: object, kind: str) -> str:
    from geo.position import format_position

    if value is None:
        return "—"
    if isinstance(value, tuple):
        return format_position(value[0], value[1], decimals=2)
    if kind == "limit":
        return f"{value:.2f}"
    return str(value)


def diff_json(diff: AreaDiff, old: Path, new: Path) -> dict:
    """The document ``--json`` prints: ``old``, ``new``, counts, ``changes``, ``unchanged``."""
    def value(v: object) -> object:
        return {"lat": v[0], "lon": v[1]} if isinstance(v, tuple) else v

    return {
        "old": str(old), "new": str(new),
        "old_areas": diff.old_count, "new_areas": diff.new_count,
        "changed": list(diff.changed_areas), "unchanged": list(diff.unchanged),
        "changes": [{"area": c.area, "kind": c.kind, "place": c.place, "old": value(c.old),
                     "new": value(c.new), "moved_m": c.moved_m} for c in diff.changes],
    }


def _lines(c: Change) -> list[str]:
    """The rows of one change, indented under its area."""
    what = _LABELS.get(c.kind, c.kind)
    if c.kind in ("added", "removed"):
        a = c.new if c.kind == "added" else c.old
        until = f" until {a['effective_until']}" if a["effective_until"] else ""
        return [f"  {what}", f"      {a['limit_pct']:.2f} % m/m from {a['effective_from']}{until}",
                f"      {a['polygons']} polygon(s), {a['vertices']} vertices, "
                f"{a['edges']} edges"]
    if c.kind == "renamed":
        return [f"  renamed from: {c.old}"]
    if " " in c.kind:  # polygon, ring or vertex added, removed or moved
        from geo.ellipsoid import NM_M

        verb = c.kind.split()[1]
        if not c.kind.startswith("vertex"):
            count = c.new if c.old is None else c.old
            return [f"  {c.place} {verb} ({count} vertices)"]
        moved = "" if c.moved_m is None else \
            f" {c.moved_m:,.1f} m ({c.moved_m / NM_M:,.2f} nm)"
        rows = [f"  {c.place} {verb}{moved}"]
        if c.old is not None:
            rows.append(f"      old  {_shown(c.old, c.kind)}")
        if c.new is not None:
            rows.append(f"      new  {_shown(c.new, c.kind)}")
        return rows
    return [f"  {what}", f"      old  {_shown(c.old, c.kind)}",
            f"      new  {_shown(c.new, c.kind)}"]


def _areas(n: int) -> str:
    return f"{n} area" + ("" if n == 1 else "s")


def print_diff(diff: AreaDiff, old: Path, new: Path) -> None:
    """Print the changes, area by area, then the count of each."""
    typer.echo(f"old: {old} ({_areas(diff.old_count)})")
    typer.echo(f"new: {new} ({_areas(diff.new_count)})")
    if not diff.changes:
        typer.echo("No change: the same areas, limits, dates and vertices.")
        return
    current = None
    for c in diff.changes:
        if c.area != current:
            current = c.area
            typer.echo("")
            typer.echo(current)
        for line in _lines(c):
            typer.echo(line)
    added = sum(c.kind == "added" for c in diff.changes)
    removed = sum(c.kind == "removed" for c in diff.changes)
    changed = len(diff.changed_areas) - added - removed
    typer.echo("")
    typer.echo(f"{changed} changed, {added} added, {removed} removed, "
               f"{len(diff.unchanged)} unchanged.")
    typer.echo("Check the changes against the official text before replacing the area files.")
