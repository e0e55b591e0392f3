"""Progress reports for long jobs (big area files, many areas): a short text, now and then.

A caller passes ``progress``, a function taking one text such as ``"reading
areas 3/12"`` or ``"crossings: area 2 of 5"``; :class:`Throttle` calls it at
most once every :data:`INTERVAL_S`, so a command line can show it without
slowing the work down. The texts are built only when they are shown.
"""

from __future__ import annotations

import time
from collections.abc import Callable

Progress = Callable[[str], None]
"""A function shown a short progress text."""

INTERVAL_S = 0.25
"""Least time between two reports [s]: at most four a second."""


class Throttle:
    """Pass texts to ``progress`` (which may be None) at most every ``interval_s`` [s].

    ``interval_s`` defaults to :data:`INTERVAL_S`; ``clock`` gives the time [s].

    The first report is always passed on; later ones only once ``interval_s``
    has gone by since the last one passed.

    Examples
    --------
    >>> shown = []
    >>> say = Throttle(shown.append, interval_s=3600.0)
    >>> for i in range(1, 4):
    ...     say(lambda: f"reading areas {i}/3")
    >>> shown
    ['reading areas 1/3']
    """

    def __init__(self, progress: Progress | None, interval_s: float | None = None,
                 clock: Callable[[], float] = time.monotonic) -> None:
        self._progress = progress
        self._interval_s = interval_s
        self._clock = clock
        self._last_s = -float("inf")

    def __call__(self, text: Callable[[], str]) -> None:
        """Report the text that ``text()`` returns, if a report is due."""
        if self._progress is None:
            return
        now = self._clock()
        interval = INTERVAL_S if self._interval_s is None else self._interval_s
        if now - self._last_s >= interval:
            self._last_s = now
            self._progress(text())
