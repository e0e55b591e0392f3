"""Plain-text tables that never cut a time, a position, a number or an identifier.

A table is a list of :class:`Column` s and rows of text cells. Cells of a column that does
not wrap (``wrap=False``: numbers, times, positions, identifiers) are printed whole; cells of
a column that wraps break only at spaces, so no word is ever cut either. When the table does
not fit the width, it is printed stacked: one block per row, the unwrapped cells on the
first lines (each whole), then ``Header: text`` for each wrapped cell, folded at spaces.

Text is printed as typed: nothing is read as terminal markup (a note holding ``[/]`` or an
escape character is shown, never obeyed: control characters are shown as ``\\x1b``-style
escapes). Lines never end in padding spaces. Pure functions of text, for any command.
"""

from __future__ import annotations

import os
import sys
import textwrap
import unicodedata
from collections.abc import Sequence
from dataclasses import dataclass

GAP = "  "
MIN_WRAP = 12
"""Narrowest a wrapped column is made (wider when its longest word is longer), characters."""


@dataclass(frozen=True)
class Column:
    """A column: its header, ``"l"`` or ``"r"`` alignment, and whether its text may wrap."""

    header: str
    align: str = "l"
    wrap: bool = False

    def __post_init__(self) -> None:
        if self.align not in ("l", "r"):
            raise ValueError(f"Column.align must be 'l' or 'r', got {self.align!r}")


def shown(text: str) -> str:
    """``text`` with control characters (escape, carriage return, tab, ...) made visible."""
    out = []
    for ch in text:
        if ch == "\n":
            out.append(" ")
        elif unicodedata.category(ch) in ("Cc", "Cf") and ch != "\u200d":
            out.append(ch.encode("unicode_escape").decode("ascii"))
        else:
            out.append(ch)
    return "".join(out)


def output_width() -> int:
    """The terminal's width; for a pipe or a file ``COLUMNS`` if set, else 160."""
    if sys.stdout.isatty():
        import shutil

        return max(shutil.get_terminal_size().columns, 20)
    try:
        return max(int(os.environ.get("COLUMNS", "")), 20)
    except ValueError:
        return 160


def _words_max(cells: Sequence[str]) -> int:
    return max((len(w) for c in cells for w in c.split()), default=0)


def _widths(columns: Sequence[Column], rows: Sequence[Sequence[str]], width: int
            ) -> list[int] | None:
    """Column widths that fit ``width``, or None when the table cannot fit whole."""
    natural = [max([len(c.header)] + [len(r[i]) for r in rows]) for i, c in enumerate(columns)]
    fixed = [n if not c.wrap else 0 for n, c in zip(natural, columns, strict=True)]
    floor = [max(min(n, MIN_WRAP), _words_max([r[i] for r in rows]), len(c.header))
             if c.wrap else 0 for i, (n, c) in enumerate(zip(natural, columns, strict=True))]
    room = width - len(GAP) * (len(columns) - 1) - sum(fixed)
    if room < sum(floor):
        return None
    out = [f or fl for f, fl in zip(fixed, floor, strict=True)]
    spare = room - sum(floor)
    want = [natural[i] - floor[i] if c.wrap else 0 for i, c in enumerate(columns)]
    total = sum(want)
    for i, w in enumerate(want):  # share what is left in proportion to what each wants
        if w and total:
            out[i] += min(w, spare * w // total)
    return out


def _wrap(text: str, width: int) -> list[str]:
    return textwrap.wrap(text, width, break_long_words=False, break_on_hyphens=False) or [""]


def _table(columns: Sequence[Column], rows: Sequence[Sequence[str]], widths: list[int],
           struck: Sequence[bool], ansi: bool) -> list[str]:
    def line(cells: Sequence[str]) -> str:
        parts = [c.ljust(w) if col.align == "l" else c.rjust(w)
                 for c, w, col in zip(cells, widths, columns, strict=True)]
        return GAP.join(parts).rstrip()

    out = [line([c.header for c in columns]),
           GAP.join("─" * w for w in widths).rstrip()]
    for row, gone in zip(rows, struck, strict=True):
        cols = [_wrap(cell, w) if c.wrap else [cell]
                for cell, w, c in zip(row, widths, columns, strict=True)]
        for k in range(max(len(x) for x in cols)):
            text = line([x[k] if k < len(x) else "" for x in cols])
            out.append(_strike(text, gone and ansi))
    return out


def _stacked(columns: Sequence[Column], rows: Sequence[Sequence[str]], width: int,
             struck: Sequence[bool], ansi: bool) -> list[str]:
    out: list[str] = []
    for row, gone in zip(rows, struck, strict=True):
        head = [cell for cell, c in zip(row, columns, strict=True) if not c.wrap and cell]
        block, cur = [], ""
        for item in head:  # whole items, as many to a line as fit
            if cur and len(cur) + len(GAP) + len(item) > width:
                block.append(cur)
                cur = "  " + item
            else:
                cur = f"{cur}{GAP}{item}" if cur else item
        block.append(cur)
        for cell, c in zip(row, columns, strict=True):
            if c.wrap and cell:
                block += textwrap.wrap(f"{c.header}: {cell}", width, initial_indent="  ",
                                       subsequent_indent="    ", break_long_words=False,
                                       break_on_hyphens=False)
        out += [_strike(x.rstrip(), gone and ansi) for x in block]
        out.append("")
    return out[:-1]


def _strike(text: str, on: bool) -> str:
    return f"\x1b[9m{text}\x1b[0m" if on and text else text


def render(title: str, columns: Sequence[Column], rows: Sequence[Sequence[str]], width: int,
           struck: Sequence[bool] | None = None, ansi: bool = False) -> str:
    """The table as text at most ``width`` wide (but for a single word longer than the width,
    which is printed whole): a table when it fits, else stacked. ``struck`` rows are struck
    through with an ANSI code when ``ansi`` (a terminal), and only marked by their cells
    otherwise."""
    cells = [[shown(c) for c in r] for r in rows]
    marks = list(struck) if struck is not None else [False] * len(cells)
    widths = _widths(columns, cells, width)
    body = (_table(columns, cells, widths, marks, ansi) if widths is not None
            else _stacked(columns, cells, width, marks, ansi))
    head = textwrap.wrap(shown(title), width, break_long_words=False, break_on_hyphens=False)
    return "\n".join(head + [""] + body)


def use_ansi() -> bool:
    """Whether standard output is a terminal that may take a strike-through (no NO_COLOR)."""
    return sys.stdout.isatty() and not os.environ.get("NO_COLOR")
