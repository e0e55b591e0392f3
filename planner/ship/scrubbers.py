"""Exhaust gas cleaning systems (scrubbers): which consumers each serves, and how.

A scrubber (EGCS) approved under [MARPOL-VI] regulation 4 as an equivalent to
regulation 14 lets the consumers it serves burn fuel above the sulphur limit in
force, up to the highest fuel sulphur it is approved for, while the cleaned
exhaust meets the SO₂/CO₂ emission ratio of [MEPC-340]. Consumers it does not
serve (often the boilers) change over as any other.

A scrubber works in open loop (sea water through, washwater discharged), in
closed loop (recirculated washwater, little or no discharge), or in either (a
hybrid). Washwater discharge restrictions decide which mode is allowed where.
The approval and the system's operating manual come first; this model only
says where the plan may rely on it.
"""

from __future__ import annotations

import math
from collections.abc import Mapping
from dataclasses import dataclass
from typing import TYPE_CHECKING

if TYPE_CHECKING:
    from planner.ship.components import Circuit

OPEN = "open"
CLOSED = "closed"
MODES = (OPEN, CLOSED)
"""The washwater modes a scrubber may have."""

MODE_WORDS = {"open": (OPEN,), "closed": (CLOSED,), "hybrid": (OPEN, CLOSED)}
"""The ship file's ``mode`` key: ``"hybrid"`` has both modes."""


@dataclass(frozen=True)
class Scrubber:
    """One exhaust gas cleaning system, checked on creation.

    Parameters
    ----------
    name : str
        Its name in the ship file (``[scrubbers.NAME]``).
    consumers : tuple of str
        The consumers whose exhaust it cleans (at least one).
    modes : tuple of str
        Its washwater modes, a non-empty subset of :data:`MODES` in that order
        (``("open", "closed")`` for a hybrid).
    max_sulphur_pct : float [% m/m]
        The highest fuel sulphur it is approved for, in (0, 4.50].
    min_load_pct, max_load_pct : float [% MCR]
        The load range of the served engines in which it may be relied on
        (default 0 to 110, the whole range).
    approval : str
        The approval's reference as the ship file gives it (e.g. the EGCS
        certificate), printed with the plan; may be empty.
    note : str
        Free text from the ship file; may be empty.
    """

    name: str
    consumers: tuple[str, ...]
    modes: tuple[str, ...]
    max_sulphur_pct: float
    min_load_pct: float = 0.0
    max_load_pct: float = 110.0
    approval: str = ""
    note: str = ""

    def __post_init__(self) -> None:
        if not isinstance(self.name, str) or not self.name.strip():
            raise ValueError(f"scrubber name must be a non-empty string, got {self.name!r}")
        if not self.consumers or not all(isinstance(c, str) and c for c in self.consumers):
            raise ValueError(f"scrubber {self.name!r}: consumers must be a non-empty list of "
                             f"names, got {self.consumers!r}")
        if len(set(self.consumers)) != len(self.consumers):
            raise ValueError(f"scrubber {self.name!r}: a consumer is named twice in "
                             f"{self.consumers!r}")
        if not self.modes or any(m not in MODES for m in self.modes) or \
                tuple(m for m in MODES if m in self.modes) != tuple(self.modes):
            raise ValueError(f"scrubber {self.name!r}: modes must be a non-empty subset of "
                             f"{MODES} in that order, got {self.modes!r}")
        for key in ("max_sulphur_pct", "min_load_pct", "max_load_pct"):
            v = getattr(self, key)
            if isinstance(v, bool) or not isinstance(v, int | float) or not math.isfinite(v):
                raise ValueError(f"scrubber {self.name!r}: {key} must be a finite number, "
                                 f"got {v!r}")
        if not 0.0 < self.max_sulphur_pct <= 4.5:
            raise ValueError(f"scrubber {self.name!r}: max_sulphur_pct must be in (0, 4.50] "
                             f"% m/m, got {self.max_sulphur_pct!r}")
        if not 0.0 <= self.min_load_pct < self.max_load_pct <= 110.0:
            raise ValueError(f"scrubber {self.name!r}: the load range must satisfy 0 <= "
                             f"min_load_pct < max_load_pct <= 110 % MCR, got "
                             f"{self.min_load_pct!r} to {self.max_load_pct!r}")
        for key in ("approval", "note"):
            if not isinstance(getattr(self, key), str):
                raise ValueError(f"scrubber {self.name!r}: {key} must be text, "
                                 f"got {getattr(self, key)!r}")

    @property
    def hybrid(self) -> bool:
        """It can work in both modes."""
        return len(self.modes) == 2

    @property
    def mode_word(self) -> str:
        """``"open"``, ``"closed"`` or ``"hybrid"``, as the ship file says it."""
        return "hybrid" if self.hybrid else self.modes[0]

    def allows(self, mode: str) -> bool:
        """It can work in ``mode`` (``"open"`` or ``"closed"``)."""
        return mode in self.modes

    def serves(self, consumer: str) -> bool:
        """It cleans the exhaust of ``consumer``."""
        return consumer in self.consumers

    def modes_allowed(self, zone_allows: tuple[str, ...]) -> tuple[str, ...]:
        """Its modes that a washwater discharge zone allowing ``zone_allows`` permits
        (``()``: it may not run there), in the order of :data:`MODES`."""
        return tuple(m for m in self.modes if m in zone_allows)


def served_circuits(scrubbers: Mapping[str, Scrubber],
                    circuits: Mapping[str, Circuit]) -> dict[str, tuple[str, ...]]:
    """The circuits every consumer of which a scrubber serves, with the scrubbers serving them.

    Only such a circuit can burn fuel above the limit on the scrubbers: a circuit
    carries one fuel to all its consumers.

    Parameters
    ----------
    scrubbers : mapping of str to Scrubber
        The ship's scrubbers (``FuelSystem.scrubbers``).
    circuits : mapping of str to Circuit
        The ship's circuits (``FuelSystem.circuits``).

    Returns
    -------
    dict of str to tuple of str
        Circuit name to the names of the scrubbers serving its consumers (in scrubber
        order; more than one when its consumers are on different scrubbers), in circuit
        order; a circuit with a consumer no scrubber serves is left out.
    """
    out = {}
    for circuit in circuits.values():
        on = [s.name for s in scrubbers.values()
              if any(s.serves(c) for c in circuit.consumers)]
        if on and all(any(scrubbers[n].serves(c) for n in on) for c in circuit.consumers):
            out[circuit.name] = tuple(on)
    return out
