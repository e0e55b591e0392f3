"""What a long command is doing, shown on standard error while it works.

Shown only when standard error is a terminal and the command was not asked
for ``--json``: nothing of it reaches a pipe, a file or the JSON, and it is
gone (transient) before the results are printed. Rich is imported only when
something is shown.

- :func:`status`: one line that the work updates with short texts
  (``plan``, ``route``, ``areas``);
- :class:`SimulationsBar`: done/total simulations of the Monte Carlo, one bar
  per circuit (``flush --confidence``);
- :func:`progress_kwargs`: ``progress=`` for a function only if it takes it, so
  a command passes its status to the work whether or not the work reports yet.
"""

from __future__ import annotations

import inspect
import sys
import time
from collections.abc import Callable, Iterator
from contextlib import contextmanager
from typing import TYPE_CHECKING

if TYPE_CHECKING:
    from rich.progress import Progress, TaskID

Say = Callable[[str], None]
"""Shows a short text: what the work is doing now."""


def shown(json_out: bool) -> bool:
    """Whether progress is shown: standard error is a terminal and no ``--json``."""
    return not json_out and sys.stderr.isatty()


@contextmanager
def status(text: str, json_out: bool) -> Iterator[Say | None]:
    """A status line on standard error, starting with ``text``; yields the function that
    changes it, or None when nothing is shown (see :func:`shown`)."""
    if not shown(json_out):
        yield None
        return
    from planner.cli.console import console

    with console(stderr=True).status(text) as line:
        yield line.update


def progress_kwargs(work: Callable[..., object], say: Say | None) -> dict[str, Say]:
    """``{"progress": say}`` when ``work`` has a ``progress`` parameter and ``say`` is not
    None, else ``{}``: ``work(..., **progress_kwargs(work, say))``."""
    if say is None or "progress" not in inspect.signature(work).parameters:
        return {}
    return {"progress": say}


class SimulationsBar:
    """A bar of done/total simulations per circuit, called as ``bar(done, total)``.

    Set :attr:`circuit` before each circuit's Monte Carlo. Nothing is drawn unless
    progress is shown (see :func:`shown`), nor before the work has run
    :data:`DELAY_S`; use it as a context manager so the bars are cleared at the end.
    """

    DELAY_S = 0.4
    """Quiet time first [s]: a quick Monte Carlo shows no bar."""

    def __init__(self, json_out: bool) -> None:
        self.circuit = ""
        self._shown = shown(json_out)
        self._t0 = time.monotonic()
        self._bar: Progress | None = None
        self._tasks: dict[str, TaskID] = {}

    def __enter__(self) -> SimulationsBar:
        return self

    def __call__(self, done: int, total: int) -> None:
        if not self._shown:
            return
        if self._bar is None:
            if time.monotonic() - self._t0 < self.DELAY_S:
                return
            from rich.progress import Progress

            from planner.cli.console import console

            self._bar = Progress(console=console(stderr=True), transient=True)
            self._bar.start()
        task = self._tasks.get(self.circuit)
        if task is None:
            task = self._bar.add_task(f"Monte Carlo {self.circuit}: simulations", total=total)
            self._tasks[self.circuit] = task
        self._bar.update(task, completed=done, total=total)

    def __exit__(self, *exc: object) -> None:
        if self._bar is not None:
            self._bar.stop()
