"""What the plan relies on scrubbers for: spans of high-sulphur fuel, and events.

Plain data shared by the plan, its reports, charts and documents. A
:class:`ScrubberSpan` is a stretch of the voyage on which the circuits a
scrubber serves burn a fuel above the sulphur limit in force, made good by the
scrubber (:mod:`planner.ship.scrubbers`); a :class:`ScrubberEvent` is a moment
the crew acts on it: start, stop, a change of washwater mode, or the scrubber
going out of service (from the voyage file).

Moments are epoch seconds (``*_epoch_s``: seconds since 1970-01-01 UTC),
distances metres along the route from departure.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from planner.ship.scrubbers import MODES

START = "start"
STOP = "stop"
MODE_CHANGE = "mode_change"
OUT_OF_SERVICE = "out_of_service"
EVENT_KINDS = (START, STOP, MODE_CHANGE, OUT_OF_SERVICE)
"""What a scrubber event can be."""


def _finite(owner: str, **values: float) -> None:
    for key, v in values.items():
        if isinstance(v, bool) or not isinstance(v, int | float) or not math.isfinite(v):
            raise ValueError(f"{owner}: {key} must be a finite number, got {v!r}")


@dataclass(frozen=True)
class ScrubberSpan:
    """A stretch on which served circuits burn fuel above the limit, on the scrubber.

    Parameters
    ----------
    scrubber : str
        The scrubber relied on.
    circuits : tuple of str
        The circuits burning ``fuel`` (every consumer on them served by the scrubber).
    fuel : str
        The fuel burnt (the voyage file's name), above ``limit_pct``.
    fallback_fuel : str
        The fuel the circuits would burn here without the scrubber (the plain
        fuel choice): the fuel to change to if it fails.
    limit_pct : float [% m/m]
        The sulphur limit in force on the span (the lowest, if it changes).
    mode : str
        The washwater mode on the span (``"open"`` or ``"closed"``).
    from_m, to_m : float [m]
        Where the span begins and ends, along the route from departure.
    from_epoch_s, to_epoch_s : float [s]
        When it begins and ends, seconds since 1970-01-01 UTC.
    areas : tuple of str
        The control areas (and discharge zones, by name) it passes, in route order.
    """

    scrubber: str
    circuits: tuple[str, ...]
    fuel: str
    fallback_fuel: str
    limit_pct: float
    mode: str
    from_m: float
    to_m: float
    from_epoch_s: float
    to_epoch_s: float
    areas: tuple[str, ...] = ()

    def __post_init__(self) -> None:
        owner = f"scrubber span of {self.scrubber!r}"
        _finite(owner, limit_pct=self.limit_pct, from_m=self.from_m, to_m=self.to_m,
                from_epoch_s=self.from_epoch_s, to_epoch_s=self.to_epoch_s)
        if not self.circuits:
            raise ValueError(f"{owner}: circuits must not be empty")
        if self.mode not in MODES:
            raise ValueError(f"{owner}: mode must be one of {MODES}, got {self.mode!r}")
        if self.to_m < self.from_m or self.to_epoch_s < self.from_epoch_s:
            raise ValueError(f"{owner}: it must not end before it begins")

    @property
    def duration_h(self) -> float:
        """How long the span lasts, h."""
        return (self.to_epoch_s - self.from_epoch_s) / 3600.0


@dataclass(frozen=True)
class ScrubberEvent:
    """One moment the crew acts on a scrubber.

    Parameters
    ----------
    scrubber : str
        The scrubber.
    kind : str
        One of :data:`EVENT_KINDS`.
    mode : str or None
        The washwater mode from this moment on (None after a stop or out of service).
    epoch_s : float [s]
        When, seconds since 1970-01-01 UTC.
    distance_m : float [m]
        Where, along the route from departure.
    reason : str
        Why, in words (printed with the plan): the area or discharge zone entered or
        left, the fuel changed to, the voyage file's out-of-service statement.
    """

    scrubber: str
    kind: str
    mode: str | None
    epoch_s: float
    distance_m: float
    reason: str = ""

    def __post_init__(self) -> None:
        _finite(f"scrubber event of {self.scrubber!r}", epoch_s=self.epoch_s,
                distance_m=self.distance_m)
        if self.kind not in EVENT_KINDS:
            raise ValueError(f"scrubber event kind must be one of {EVENT_KINDS}, "
                             f"got {self.kind!r}")
        if self.mode is not None and self.mode not in MODES:
            raise ValueError(f"scrubber event mode must be one of {MODES} or None, "
                             f"got {self.mode!r}")
        if (self.mode is None) != (self.kind in (STOP, OUT_OF_SERVICE)):
            raise ValueError(f"a {self.kind} scrubber event "
                             f"{'carries no' if self.kind in (STOP, OUT_OF_SERVICE) else 'needs a'}"
                             f" mode, got {self.mode!r}")


@dataclass(frozen=True)
class ScrubberOutage:
    """A scrubber out of service from a moment, as the voyage file states it.

    Parameters
    ----------
    scrubber : str
        The scrubber (a name of the ship file's ``[scrubbers]``).
    from_epoch_s : float [s]
        Out of service from this moment, seconds since 1970-01-01 UTC.
    until_epoch_s : float or None [s]
        Back in service at this moment (None: for the rest of the voyage).
    reason : str
        Why, as the voyage file says it (may be empty).
    """

    scrubber: str
    from_epoch_s: float
    until_epoch_s: float | None = None
    reason: str = ""

    def __post_init__(self) -> None:
        _finite(f"outage of {self.scrubber!r}", from_epoch_s=self.from_epoch_s)
        if self.until_epoch_s is not None:
            _finite(f"outage of {self.scrubber!r}", until_epoch_s=self.until_epoch_s)
            if self.until_epoch_s <= self.from_epoch_s:
                raise ValueError(f"outage of {self.scrubber!r}: it must end after it begins")

    def covers(self, epoch_s: float) -> bool:
        """The scrubber is out of service at ``epoch_s``."""
        return self.from_epoch_s <= epoch_s and (self.until_epoch_s is None
                                                 or epoch_s < self.until_epoch_s)


@dataclass(frozen=True)
class ZonePassage:
    """The route's passage through one washwater discharge zone.

    Parameters
    ----------
    zone : str
        The zone's name (its GeoJSON ``name``).
    allows : tuple of str
        The washwater modes the zone allows (``("closed",)``: no open-loop
        discharge; ``()``: no discharge at all, no scrubbing).
    from_m, to_m : float [m]
        Where the route enters and leaves it, along the route from departure (0 when
        the voyage departs inside it; the route's length when it arrives inside it).
    """

    zone: str
    allows: tuple[str, ...]
    from_m: float
    to_m: float

    def __post_init__(self) -> None:
        _finite(f"passage of zone {self.zone!r}", from_m=self.from_m, to_m=self.to_m)
        if any(m not in MODES for m in self.allows):
            raise ValueError(f"zone {self.zone!r}: allows must be a subset of {MODES}, "
                             f"got {self.allows!r}")
        if self.to_m < self.from_m:
            raise ValueError(f"passage of zone {self.zone!r}: it must not end before it begins")
