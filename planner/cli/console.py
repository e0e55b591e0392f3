"""The terminal: its width, printing laid-out lines, and one rich Console for the commands.

The width a table is laid out for (:func:`width`): the terminal's (or
``COLUMNS``) when standard output is a terminal, else (a file, a pipe, a
printer) :data:`PRINT_WIDTH`. Tables are laid out by
:mod:`planner.cli.text_table` (:func:`table_lines`, :func:`text_lines`: pure,
for a given width) and printed by :func:`echo_lines`, with no trailing spaces.
Rich is imported lazily, for the status line and bars on standard error and
the journal's listing.
"""

from __future__ import annotations

import shutil
import sys
from collections.abc import Iterable
from typing import TYPE_CHECKING

if TYPE_CHECKING:
    from rich.console import Console
    from rich.table import Table

    from planner.cli.text_table import TextTable

PRINT_WIDTH = 160
MIN_WIDTH = 20


def width() -> int:
    """Characters per line [-]: the terminal's (``COLUMNS`` if set, as
    :func:`shutil.get_terminal_size` reads it) when standard output is a terminal, else
    :data:`PRINT_WIDTH`."""
    if sys.stdout.isatty():
        return max(shutil.get_terminal_size().columns, MIN_WIDTH)
    return PRINT_WIDTH


def echo_lines(lines: Iterable[str]) -> None:
    """Print lines on standard output, without trailing spaces."""
    import typer

    for line in lines:
        typer.echo(line.rstrip())


def table_lines(tables: Iterable[TextTable], cols: int) -> list[str]:
    """Each table laid out for ``cols`` characters, a blank line after each."""
    from planner.cli.text_table import render

    out: list[str] = []
    for t in tables:
        out += [*render(t, cols), ""]
    return out


def text_lines(text: str, cols: int, prefix: str = "") -> list[str]:
    """A paragraph wrapped at its spaces to ``cols``, ``prefix`` on the first line and the
    rest indented under it; times, positions and numbers with units stay whole."""
    from planner.cli.text_table import keep_whole, wrap

    return wrap(keep_whole(prefix + text), cols, "", " " * (2 if prefix else 0))


def console(stderr: bool = False) -> Console:
    """A rich Console; wide when writing to a file or a pipe."""
    from rich.console import Console

    stream = sys.stderr if stderr else sys.stdout
    if stream.isatty():
        return Console(stderr=stderr)
    return Console(stderr=stderr, width=PRINT_WIDTH)


def table(title: str, columns: list[tuple[str, str]], **kw: object) -> Table:
    """A rich Table with a simple rule under the head; ``columns`` are (header, side): "l"
    or "r" (kept on one line), or "w" (left, folded when too long)."""
    from rich import box
    from rich.table import Table

    t = Table(title=title, title_justify="left", box=box.SIMPLE_HEAD, pad_edge=False, **kw)
    for header, side in columns:
        t.add_column(header, justify="right" if side == "r" else "left", no_wrap=True,
                     overflow="fold" if side == "w" else "ellipsis")
    return t
