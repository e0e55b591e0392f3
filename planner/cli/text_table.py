"""Tables as plain text lines that never cut a value: columns, wrapping, or stacked blocks.

A :class:`TextTable` is laid out for a width in characters by :func:`render`:

- each column is as wide as its widest cell; a header may wrap at its spaces;
  a ``wrap`` column (free text) may wrap at spaces down to its longest word;
- a value is never cut: times, positions, identifiers and numbers are single
  words (their inner spaces are no-break spaces, :func:`atom`), and a word is
  never broken, so when the columns cannot fit the width the table is laid out
  *stacked*: one block per row, ``Header: value`` on each line;
- rows may come in groups, each with head lines (a boundary's time and place
  once, its circuits beneath): the head wraps at spaces, its atoms kept whole;
- lines carry no trailing spaces.

Pure functions of text; the command line prints the lines (:mod:`planner.cli.console`).
"""

from __future__ import annotations

import re
import textwrap
from dataclasses import dataclass, field

NBSP = "\u00a0"
GAP = 2  # spaces between columns
INDENT = 2  # rows of a group under its head


def atom(text: object) -> str:
    """``text`` as one word: its spaces become no-break spaces, so it never wraps."""
    return str(text).replace(" ", NBSP)


@dataclass(frozen=True)
class Column:
    """A column: its header, ``"l"`` or ``"r"`` alignment, and whether its cells are free
    text that may wrap at spaces (``wrap``)."""

    header: str
    align: str = "l"
    wrap: bool = False

    def __post_init__(self) -> None:
        if self.align not in ("l", "r"):
            raise ValueError(f"column {self.header!r}: align {self.align!r} is not 'l' or 'r'")


@dataclass(frozen=True)
class Group:
    """Rows under head lines (no head: a plain run of rows)."""

    rows: tuple[tuple[str, ...], ...]
    head: tuple[str, ...] = ()


@dataclass(frozen=True)
class TextTable:
    """A titled table of columns and groups of rows; every row has one cell per column."""

    title: str
    columns: tuple[Column, ...]
    groups: tuple[Group, ...] = field(default=())
    note: str = ""

    def __post_init__(self) -> None:
        n = len(self.columns)
        for g in self.groups:
            for r in g.rows:
                if len(r) != n:
                    raise ValueError(f"table {self.title!r}: a row of {len(r)} cells for "
                                     f"{n} columns")

    @property
    def grouped(self) -> bool:
        """Whether any group has head lines (its rows are then indented)."""
        return any(g.head for g in self.groups)


def table(title: str, columns: list[tuple[str, str]], rows: list[list[str]],
          note: str = "") -> TextTable:
    """A table of one plain group; ``columns`` are (header, side): ``"l"``, ``"r"`` or
    ``"w"`` (left, free text that may wrap)."""
    cols = tuple(Column(h, "r" if s == "r" else "l", s == "w") for h, s in columns)
    return TextTable(title, cols, (Group(tuple(tuple(r) for r in rows)),), note)


def _words(text: str) -> list[str]:
    return text.split(" ") if text else [""]


def _longest_word(text: str) -> int:
    return max(len(w) for w in _words(text))


def wrap(text: str, width: int, indent: str = "", hang: str = "") -> list[str]:
    """``text`` wrapped at its spaces to ``width`` (never breaking a word), first line
    indented by ``indent``, the others by ``hang``; no-break spaces shown as spaces."""
    out = []
    for para in text.split("\n"):
        got = textwrap.wrap(para, width=max(width, 1), initial_indent=indent,
                            subsequent_indent=hang, break_long_words=False,
                            break_on_hyphens=False) or [indent]
        out += got
    return [line.replace(NBSP, " ").rstrip() for line in out]


def _fit(t: TextTable, width: int) -> list[int] | None:
    """Column widths that fit ``width``, or None when even the narrowest layout is wider."""
    rows = [r for g in t.groups for r in g.rows]
    avail = width - (INDENT if t.grouped else 0) - GAP * (len(t.columns) - 1)
    natural, least = [], []
    for i, c in enumerate(t.columns):
        cells = [r[i] for r in rows]
        full = max([len(x) for x in cells] + [0])
        words = max([_longest_word(x) for x in cells] + [0]) if c.wrap else full
        natural.append(max(full, len(c.header)))
        least.append(max(words, _longest_word(c.header), 1))
    if sum(natural) <= avail:
        return natural
    if sum(least) > avail:
        return None
    # headers wrap first (columns down to their cells), then free-text columns shrink
    widths = [max(least[i], max([len(r[i]) for r in rows] + [0])) if not c.wrap else natural[i]
              for i, c in enumerate(t.columns)]
    spare = avail - sum(widths)
    if spare >= 0:
        return _grow(widths, natural, spare)
    order = sorted((i for i, c in enumerate(t.columns) if c.wrap), key=lambda i: -widths[i])
    need = -spare
    while need > 0 and order:
        free = [j for j in order if widths[j] > least[j]]
        if not free:
            break
        i = max(free, key=lambda j: widths[j])
        widths[i] -= 1
        need -= 1
    return widths if need <= 0 else None


def _grow(widths: list[int], natural: list[int], spare: int) -> list[int]:
    """Give spare characters back to columns narrower than their natural width."""
    widths = list(widths)
    for i in sorted(range(len(widths)), key=lambda j: natural[j] - widths[j]):
        add = min(spare, natural[i] - widths[i])
        if add > 0:
            widths[i] += add
            spare -= add
    return widths


def _row_lines(cells: tuple[str, ...], widths: list[int], cols: tuple[Column, ...],
               indent: str, header: bool = False) -> list[str]:
    """One row as lines: free-text cells (and headers) wrapped to their column."""
    parts = [wrap(x, w) if (c.wrap or header) else [x.replace(NBSP, " ")]
             for x, w, c in zip(cells, widths, cols, strict=True)]
    out = []
    for k in range(max(len(p) for p in parts)):
        bits = []
        for p, w, c in zip(parts, widths, cols, strict=True):
            s = p[k] if k < len(p) else ""
            bits.append(s.rjust(w) if c.align == "r" else s.ljust(w))
        out.append((indent + (" " * GAP).join(bits)).rstrip())
    return out


def _stacked(t: TextTable, width: int) -> list[str]:
    out: list[str] = []
    label = max(len(c.header) for c in t.columns) + 1
    label = min(label, max(width // 3, 8))
    for g in t.groups:
        if g.head:
            out.append("")
            for h in g.head:
                out += wrap(h, width)
        for r in g.rows:
            pad = "  " if g.head else ""
            out.append("" if not g.head else pad.rstrip())
            first = True
            for c, x in zip(t.columns, r, strict=True):
                if not x:
                    continue
                name = f"{c.header}:"
                if first:
                    out += wrap(f"{atom(name)} {x}", width, pad, pad + "    ")
                    first = False
                    continue
                head = pad + "  " + name.ljust(label)
                if len(head) + 1 + _longest_word(x) <= width:
                    out += wrap(x, width, head + " ", " " * (len(head) + 1))
                else:
                    out.append(head.rstrip())
                    out += wrap(x, width, pad + "    ", pad + "    ")
    return [line for i, line in enumerate(out) if line or (i and out[i - 1])]


def render(t: TextTable, width: int) -> list[str]:
    """The table's lines for a terminal or page ``width`` characters wide: title, columns
    (stacked blocks, one per row, when they cannot fit), then the note; no trailing
    spaces."""
    out = wrap(t.title, width)
    if not any(g.rows for g in t.groups):
        return out + (wrap(t.note, width) if t.note else [])
    widths = _fit(t, width)
    out += _stacked(t, width) if widths is None else _columns(t, widths, width)
    if t.note:
        out += wrap(t.note, width)
    return out


def _columns(t: TextTable, widths: list[int], width: int) -> list[str]:
    """The column layout, each group's head wrapped to the page width above its rows."""
    indent = " " * INDENT if t.grouped else ""
    heads = tuple(c.header for c in t.columns)
    out = _row_lines(heads, widths, t.columns, indent, header=True)
    out.append(indent + "─" * (sum(widths) + GAP * (len(widths) - 1)))
    for g in t.groups:
        if g.head and len(out) > 2:
            out.append("")
        for h in g.head:
            out += wrap(h, width, "", indent)
        for r in g.rows:
            out += _row_lines(r, widths, t.columns, indent)
    return out


_WHOLE = re.compile(
    r"\d{4}-\d{2}-\d{2}[ T]\d{2}:\d{2}(?::\d{2})?(?:Z|[+-]\d{2}:\d{2})?"
    r"(?: \((?:UTC)?[+-]\d{2}:\d{2}\))?"
    r"|\d{2}°\d{2}(?:\.\d+)?'[NS] \d{3}°\d{2}(?:\.\d+)?'[EW]"
    r"|-?\d[\d,.]*(?:-\d[\d,.]*)? (?:h|min|nm|kn|t|kg|m³|cSt|°C|%(?: m/m)?)(?![\w³])")


def keep_whole(text: str) -> str:
    """``text`` with its times, positions and numbers with units made single words
    (:func:`atom`), so wrapping never splits one."""
    return _WHOLE.sub(lambda m: atom(m.group(0)), text)
