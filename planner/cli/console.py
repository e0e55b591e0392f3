"""The terminal: one rich Console for the commands (imported lazily by them).

When the output is not a terminal (a file, a pipe, a printer), tables are laid
out up to 160 columns wide rather than wrapped at 80.
"""

from __future__ import annotations

import sys
from typing import TYPE_CHECKING

if TYPE_CHECKING:
    from rich.console import Console
    from rich.table import Table

PRINT_WIDTH = 160


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
