"""The parts of a fuel system: tanks, volumes, pipes, flows, links and circuits.

Node kinds (the mixing models are those of [LEVENSPIEL-1999]):

- :class:`Tank`: well stirred ([LEVENSPIEL-1999] [D]), its level may fall or
  rise (variable volume);
  holds a content of named fuels (m³ at 15 °C each) up to a capacity.
- :class:`Stirred`: a fixed, always full, well-stirred volume (mixing or
  de-aeration tank, heater, filter, or a lumped volume).
- :class:`Pipe`: plug flow, a pure transport delay of its volume
  ([LEVENSPIEL-1999] [P]); the volume is given directly or by length and bore.
- consumers (:mod:`planner.ship.consumers`): sinks burning their demand.

A :class:`Circuit` is a changeover valve (the pseudo-node ``"valve"``, which
draws from the tank it selects among ``tanks``) and the directed
:class:`Link` s it feeds. A link's flow is affine in the consumers' volumetric
consumption (:class:`Flow`): ``rate_m3h = constant_m3h + factor × Σ v_c`` over
its consumers, or ``"rest"``, what balances its source node. The pseudo-node
``"tank_in_use"`` as a link target is the tank the valve selects (a return
line that follows the valve).

Everything is checked on creation; a problem raises :class:`FuelSystemError`
whose ``place`` is the ship-file key (``circuits.main.links[2].flow``), so the
loader can name it.
"""

from __future__ import annotations

import math
from collections.abc import Mapping
from dataclasses import dataclass, field
from numbers import Real
from types import MappingProxyType

VALVE = "valve"
"""Pseudo-node: the changeover valve of a circuit, drawing from the tank it selects."""

TANK_IN_USE = "tank_in_use"
"""Pseudo-node (link target only): the tank the circuit's valve selects."""

RESERVED_NAMES = frozenset({VALVE, TANK_IN_USE})


class FuelSystemError(ValueError):
    """A fuel-system problem at ship-file key ``place``: ``value`` is not ``expected``."""

    def __init__(self, place: str, value: object, expected: str) -> None:
        self.place, self.value, self.expected = place, value, expected
        shown = "missing" if value is None else repr(value)
        super().__init__(f"{place}: {shown}: expected {expected}")


def _volume(place: str, value: object) -> float:
    if isinstance(value, bool) or not isinstance(value, Real) or not math.isfinite(float(value)):
        raise FuelSystemError(place, value, "a volume in m³, a number above 0")
    if float(value) <= 0.0:
        raise FuelSystemError(place, value, "a volume in m³ above 0")
    return float(value)


def check_name(place: str, name: object) -> str:
    """A node name, checked: a non-empty string and not a pseudo-node name.

    Parameters
    ----------
    place : str
        Ship-file key of the name, for the message (``"tanks.hfo_service"``).
    name : object
        The name to check.

    Returns
    -------
    str
        ``name`` unchanged.

    Raises
    ------
    FuelSystemError
        When ``name`` is empty, not a string, or one of :data:`RESERVED_NAMES`
        (``"valve"``, ``"tank_in_use"``).

    Examples
    --------
    >>> check_name("tanks.hfo_service", "hfo_service")
    'hfo_service'
    >>> try:
    ...     check_name("volumes.valve", "valve")
    ... except FuelSystemError as e:
    ...     print(e)
    volumes.valve: 'valve': expected a name other than ['tank_in_use', 'valve']
    """
    if not isinstance(name, str) or not name.strip():
        raise FuelSystemError(place, name, "a non-empty name")
    if name in RESERVED_NAMES:
        raise FuelSystemError(place, name, f"a name other than {sorted(RESERVED_NAMES)}")
    return name


@dataclass(frozen=True)
class Tank:
    """A well-stirred tank of variable level.

    ``content_m3`` maps fuel names to their volumes at 15 °C, m³ (each ≥ 0, the
    total above 0); ``capacity_m3`` is the most it holds, m³.
    """

    name: str
    capacity_m3: float
    content_m3: Mapping[str, float]

    def __post_init__(self) -> None:
        place = f"tanks.{self.name}"
        check_name(place, self.name)
        object.__setattr__(self, "capacity_m3", _volume(f"{place}.capacity_m3", self.capacity_m3))
        content = {}
        for fuel, v in dict(self.content_m3).items():
            if isinstance(v, bool) or not isinstance(v, Real) or not (float(v) >= 0.0):
                raise FuelSystemError(f"{place}.content.{fuel}", v, "a volume in m³, >= 0")
            content[str(fuel)] = float(v)
        if not content or sum(content.values()) <= 0.0:
            raise FuelSystemError(f"{place}.volume_m3", self.content_m3, "some fuel in the tank")
        if sum(content.values()) > self.capacity_m3 * (1.0 + 1e-9):
            raise FuelSystemError(
                f"{place}.volume_m3",
                sum(content.values()),
                f"at most capacity {self.capacity_m3:g} m³",
            )
        object.__setattr__(self, "content_m3", MappingProxyType(content))

    @property
    def volume_m3(self) -> float:
        """Total content, m³ at 15 °C."""
        return sum(self.content_m3.values())


@dataclass(frozen=True)
class Stirred:
    """A fixed, always full, well-stirred volume, m³ (mixing tank, heater, filter...)."""

    name: str
    volume_m3: float

    kind = "stirred"

    def __post_init__(self) -> None:
        check_name(f"volumes.{self.name}", self.name)
        object.__setattr__(
            self, "volume_m3", _volume(f"volumes.{self.name}.volume_m3", self.volume_m3)
        )


@dataclass(frozen=True)
class Pipe:
    """A plug-flow pipe of ``volume_m3`` m³ (a pure delay of its volume).

    ``length_m`` and ``bore_mm`` are kept when the volume came from them
    (:meth:`from_length`).
    """

    name: str
    volume_m3: float
    length_m: float | None = None
    bore_mm: float | None = None

    kind = "pipe"

    def __post_init__(self) -> None:
        check_name(f"volumes.{self.name}", self.name)
        object.__setattr__(
            self, "volume_m3", _volume(f"volumes.{self.name}.volume_m3", self.volume_m3)
        )

    @classmethod
    def from_length(cls, name: str, length_m: float, bore_mm: float) -> Pipe:
        """A pipe of ``length_m`` m and inner diameter ``bore_mm`` mm: V = π/4·d²·L."""
        length = _volume(f"volumes.{name}.length_m", length_m)
        bore = _volume(f"volumes.{name}.bore_mm", bore_mm)
        return cls(name, math.pi / 4.0 * (bore / 1000.0) ** 2 * length, length, bore)


Volume = Stirred | Pipe


@dataclass(frozen=True)
class Flow:
    """A link's flow, m³/h: ``constant_m3h + factor × Σ v_c``, or the ``rest``.

    ``v_c`` is the volumetric consumption of consumer ``c`` (its mass rate over
    the density at its inlet, so it changes as the fuels mix). ``consumers``
    lists whose consumption counts; None means every consumer downstream of
    the link's target. ``rest``: the flow that balances the link's source
    node (its inflow less its other outflows); then nothing else may be given.
    """

    constant_m3h: float = 0.0
    factor: float = 0.0
    consumers: tuple[str, ...] | None = None
    rest: bool = False

    def __post_init__(self) -> None:
        for name in ("constant_m3h", "factor"):
            v = getattr(self, name)
            if isinstance(v, bool) or not isinstance(v, Real) or not math.isfinite(float(v)):
                raise FuelSystemError(name, v, "a finite number")
            object.__setattr__(self, name, float(v))
        if self.rest and (self.constant_m3h or self.factor or self.consumers):
            raise FuelSystemError("flow", "rest", "'rest' alone, with no rate or factor")
        if self.consumers is not None:
            object.__setattr__(self, "consumers", tuple(self.consumers))

    @classmethod
    def fixed(cls, rate_m3h: float) -> Flow:
        """A fixed pump rate, m³/h."""
        return cls(constant_m3h=rate_m3h)

    @classmethod
    def consumption(cls, factor: float = 1.0, consumers: tuple[str, ...] | None = None) -> Flow:
        """``factor`` × the consumption of ``consumers`` (default: those downstream)."""
        return cls(factor=factor, consumers=consumers)

    @classmethod
    def balance(cls) -> Flow:
        """What balances the source node (``"rest"``)."""
        return cls(rest=True)

    def describe(self) -> str:
        """Short text for messages: ``"2.5 m³/h + 1 × consumption"``."""
        if self.rest:
            return "rest"
        parts = []
        if self.constant_m3h:
            parts.append(f"{self.constant_m3h:g} m³/h")
        if self.factor:
            who = "" if self.consumers is None else f" of {', '.join(self.consumers)}"
            parts.append(f"{self.factor:g} × consumption{who}")
        return " + ".join(parts) or "0 m³/h"


@dataclass(frozen=True)
class Link:
    """A directed flow from ``source`` to ``target`` (node names or pseudo-nodes).

    ``flow`` is None for a link into a consumer (it carries the consumption).
    ``place`` is where the link came from in the ship file (for messages).
    """

    source: str
    target: str
    flow: Flow | None = None
    place: str = field(default="", compare=False)


@dataclass(frozen=True)
class Circuit:
    """A changeover valve selecting among ``tanks``, and the links it feeds."""

    name: str
    tanks: tuple[str, ...]
    consumers: tuple[str, ...]
    links: tuple[Link, ...]

    def __post_init__(self) -> None:
        object.__setattr__(self, "tanks", tuple(self.tanks))
        object.__setattr__(self, "consumers", tuple(self.consumers))
        object.__setattr__(self, "links", tuple(self.links))

    @property
    def volume_names(self) -> tuple[str, ...]:
        """Names of the nodes its links touch, in first-seen order (tanks included)."""
        seen: dict[str, None] = {}
        for link in self.links:
            for n in (link.source, link.target):
                if n not in RESERVED_NAMES:
                    seen[n] = None
        return tuple(seen)


@dataclass(frozen=True)
class ShipIdentity:
    """Who the ship is: name, IMO number, and whether she is fictional (sample data)."""

    name: str
    imo: str = ""
    fictional: bool = False
    notes: str = ""
    journal: str = ""  # the ship's journal file (absolute path once loaded), or ""
