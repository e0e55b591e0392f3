"""The ship's fuel system: tanks, volumes, consumers, and circuits of links between them.

Node kinds (REFERENCE.md section 3 for the mixing models):

- :class:`Tank`: well stirred, its level may fall or rise (variable volume);
  holds a content of named fuels (m³ at 15 °C each) up to a capacity.
- :class:`Stirred`: a fixed, always full, well-stirred volume (mixing or
  de-aeration tank, heater, filter, or a lumped volume).
- :class:`Pipe`: plug flow, a pure transport delay of its volume; the volume
  is given directly or by length and bore.
- consumers (:mod:`planner.consumers`): sinks burning their demand.

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
from dataclasses import dataclass, field, replace
from numbers import Real
from types import MappingProxyType

from planner.consumers import Consumer
from planner.fuels import Fuel
from planner.thermal import InletWindow

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


def _check_name(place: str, name: object) -> str:
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
        _check_name(place, self.name)
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
        _check_name(f"volumes.{self.name}", self.name)
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
        _check_name(f"volumes.{self.name}", self.name)
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


@dataclass(frozen=True)
class FuelSystem:
    """The whole fuel system, checked on creation (names, references, flow balance)."""

    ship: ShipIdentity
    fuels: Mapping[str, Fuel]
    tanks: Mapping[str, Tank]
    volumes: Mapping[str, Volume]
    consumers: Mapping[str, Consumer]
    circuits: Mapping[str, Circuit]
    inlet: InletWindow = field(default_factory=InletWindow)

    def __post_init__(self) -> None:
        for name in ("fuels", "tanks", "volumes", "consumers", "circuits"):
            object.__setattr__(self, name, MappingProxyType(dict(getattr(self, name))))
        _check_system(self)

    def node_kind(self, name: str) -> str:
        """``"tank"``, ``"stirred"``, ``"pipe"``, ``"consumer"``, a pseudo-node name, or ``""``."""
        if name in RESERVED_NAMES:
            return name
        if name in self.tanks:
            return "tank"
        if name in self.volumes:
            return self.volumes[name].kind
        if name in self.consumers:
            return "consumer"
        return ""

    def tank_for(self, circuit: str, tank_or_fuel: str) -> str:
        """The valve position of ``circuit`` named ``tank_or_fuel``: a tank name, or the one
        tank whose content is mostly that fuel."""
        c = self.circuits.get(circuit)
        if c is None:
            raise FuelSystemError("circuit", circuit, f"one of {sorted(self.circuits)}")
        if tank_or_fuel in c.tanks:
            return tank_or_fuel
        hits = [
            t
            for t in c.tanks
            if max(self.tanks[t].content_m3.items(), key=lambda kv: kv[1])[0] == tank_or_fuel
        ]
        if len(hits) != 1:
            raise FuelSystemError(
                f"circuits.{circuit}.tanks",
                tank_or_fuel,
                f"a tank of the valve {list(c.tanks)} or the fuel of exactly one of them",
            )
        return hits[0]

    def with_fuels(self, fuels: Mapping[str, Fuel]) -> FuelSystem:
        """A copy with ``fuels`` added or replacing those of the same name (e.g. from a voyage)."""
        return replace(self, fuels={**self.fuels, **fuels})

    def with_tank_content(self, tank: str, content_m3: Mapping[str, float]) -> FuelSystem:
        """A copy whose tank ``tank`` holds ``content_m3`` (fuel name → m³ at 15 °C)."""
        if tank not in self.tanks:
            raise FuelSystemError("tanks", tank, f"one of {sorted(self.tanks)}")
        t = self.tanks[tank]
        return replace(self, tanks={**self.tanks, tank: Tank(t.name, t.capacity_m3, content_m3)})


def _check_system(system: FuelSystem) -> None:
    """Names, references and flow balance of every circuit (FuelSystemError on the first fault)."""
    for key, fuel in system.fuels.items():
        if not isinstance(fuel, Fuel) or fuel.name != key:
            raise FuelSystemError(
                f"fuels.{key}", getattr(fuel, "name", fuel), f"a Fuel named {key!r}"
            )
    owners: dict[str, str] = {}
    for group in ("tanks", "volumes", "consumers"):
        for key, obj in getattr(system, group).items():
            if getattr(obj, "name", None) != key:
                raise FuelSystemError(f"{group}.{key}", getattr(obj, "name", obj), f"named {key!r}")
            _check_name(f"{group}.{key}", key)
            if key in owners:
                raise FuelSystemError(
                    f"{group}.{key}", key, f"a name not already used in {owners[key]}"
                )
            owners[key] = group
    for tank in system.tanks.values():
        for fuel in tank.content_m3:
            if fuel not in system.fuels:
                raise FuelSystemError(
                    f"tanks.{tank.name}.fuel", fuel, f"a fuel of [fuels]: {sorted(system.fuels)}"
                )
    volume_owner: dict[str, str] = {}
    consumer_owner: dict[str, str] = {}
    for cname, circuit in system.circuits.items():
        _check_circuit(system, cname, circuit, volume_owner, consumer_owner)
    from planner.flushing.flows import circuit_flows

    for circuit in system.circuits.values():
        circuit_flows(system, circuit)


def _check_circuit(
    system: FuelSystem,
    cname: str,
    circuit: Circuit,
    volume_owner: dict[str, str],
    consumer_owner: dict[str, str],
) -> None:
    here = f"circuits.{cname}"
    if circuit.name != cname:
        raise FuelSystemError(here, circuit.name, f"a circuit named {cname!r}")
    if not circuit.tanks:
        raise FuelSystemError(f"{here}.tanks", [], "at least one tank for the changeover valve")
    for t in circuit.tanks:
        if t not in system.tanks:
            raise FuelSystemError(f"{here}.tanks", t, f"a tank of [tanks]: {sorted(system.tanks)}")
    if len(set(circuit.tanks)) != len(circuit.tanks):
        raise FuelSystemError(f"{here}.tanks", list(circuit.tanks), "each tank once")
    if not circuit.consumers:
        raise FuelSystemError(f"{here}.consumers", [], "at least one consumer")
    for c in circuit.consumers:
        if c not in system.consumers:
            raise FuelSystemError(
                f"{here}.consumers", c, f"a consumer of [consumers]: {sorted(system.consumers)}"
            )
        if c in consumer_owner:
            raise FuelSystemError(f"{here}.consumers", c, f"a consumer not in {consumer_owner[c]}")
        consumer_owner[c] = f"circuits.{cname}"
    fed: dict[str, int] = {}
    ins: dict[str, int] = {}
    outs: dict[str, int] = {}
    for i, link in enumerate(circuit.links):
        place = link.place or f"{here}.links[{i}]"
        src, dst = system.node_kind(link.source), system.node_kind(link.target)
        if src in ("", "consumer", TANK_IN_USE):
            expected = "a tank, volume or 'valve' (a consumer or 'tank_in_use' feeds nothing)"
            raise FuelSystemError(f"{place}.from", link.source, expected)
        if dst in ("", VALVE):
            raise FuelSystemError(
                f"{place}.to", link.target, "a tank, volume, consumer or 'tank_in_use'"
            )
        if link.source == link.target:
            raise FuelSystemError(f"{place}.to", link.target, "a node other than the source")
        if dst == "consumer":
            if link.target not in circuit.consumers:
                raise FuelSystemError(f"{place}.to", link.target, f"a consumer of {here}")
            if link.flow is not None:
                raise FuelSystemError(
                    f"{place}.flow",
                    link.flow.describe(),
                    "no flow on a link into a consumer (it burns its demand)",
                )
            fed[link.target] = fed.get(link.target, 0) + 1
        elif link.flow is None:
            raise FuelSystemError(f"{place}.flow", None, "a flow: a rate, 'consumption' or 'rest'")
        elif link.flow.consumers is not None:
            for c in link.flow.consumers:
                if c not in circuit.consumers:
                    raise FuelSystemError(f"{place}.consumers", c, f"a consumer of {here}")
        if link.flow is not None and link.flow.rest and src == VALVE:
            raise FuelSystemError(
                f"{place}.flow", "rest", "a rate or 'consumption' out of the valve"
            )
        for n in (link.source, link.target):
            if n in system.volumes:
                owner = volume_owner.setdefault(n, here)
                if owner != here:
                    raise FuelSystemError(place, n, f"a volume not already used in {owner}")
        outs[link.source] = outs.get(link.source, 0) + 1
        ins[link.target] = ins.get(link.target, 0) + 1
    for c in circuit.consumers:
        if fed.get(c, 0) != 1:
            raise FuelSystemError(
                f"{here}.links", c, f"exactly one link into consumer {c!r}, found {fed.get(c, 0)}"
            )
    if outs.get(VALVE, 0) == 0:
        raise FuelSystemError(f"{here}.links", None, "at least one link from 'valve'")
    for n in circuit.volume_names:
        if n in system.volumes and (not ins.get(n) or not outs.get(n)):
            raise FuelSystemError(f"{here}.links", n, f"flow into and out of volume {n!r}")
