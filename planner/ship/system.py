"""The ship's fuel system as a whole: :class:`FuelSystem`, checked on creation.

The parts (tanks, stirred volumes, pipes, links, circuits) are in
:mod:`planner.ship.components`, which this module re-exports so that
``from planner.ship.system import Tank`` keeps working. On creation every name,
reference and flow balance is checked (:func:`planner.ship.flows.circuit_flows`);
a problem raises :class:`FuelSystemError` whose ``place`` is the ship-file key.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass, field, replace
from types import MappingProxyType

from planner.fuels import Fuel
from planner.ship.components import (  # noqa: F401  (re-exported)
    RESERVED_NAMES,
    TANK_IN_USE,
    VALVE,
    Circuit,
    Flow,
    FuelSystemError,
    Link,
    Pipe,
    ShipIdentity,
    Stirred,
    Tank,
    Volume,
    check_name,
)
from planner.ship.consumers import Consumer
from planner.ship.flows import circuit_flows
from planner.ship.scrubbers import Scrubber
from planner.ship.thermal import InletWindow


@dataclass(frozen=True)
class FuelSystem:
    """The whole fuel system, checked on creation (names, references, flow balance).

    ``inlet`` is the ship-wide window (the ship file's ``[inlet]`` over the
    two-stroke defaults); ``inlets`` holds each consumer's own window
    (:mod:`planner.ship.inlet_limits`), which :meth:`window_for` returns.
    ``input_warnings`` holds the ship file's values that were taken although
    outside their usual range (:mod:`planner.ship.plausible`), one line each.
    ``scrubbers`` holds the exhaust gas cleaning systems by name
    (:mod:`planner.ship.scrubbers`; empty: the ship has none).
    """

    ship: ShipIdentity
    fuels: Mapping[str, Fuel]
    tanks: Mapping[str, Tank]
    volumes: Mapping[str, Volume]
    consumers: Mapping[str, Consumer]
    circuits: Mapping[str, Circuit]
    inlet: InletWindow = field(default_factory=InletWindow)
    input_warnings: tuple[str, ...] = ()
    inlets: Mapping[str, InletWindow] = field(default_factory=dict)
    scrubbers: Mapping[str, Scrubber] = field(default_factory=dict)

    def __post_init__(self) -> None:
        for name in ("fuels", "tanks", "volumes", "consumers", "circuits", "inlets",
                     "scrubbers"):
            object.__setattr__(self, name, MappingProxyType(dict(getattr(self, name))))
        _check_system(self)
        for name in self.inlets:
            if name not in self.consumers:
                raise FuelSystemError(f"consumers.{name}.inlet", name, "a consumer of [consumers]")
        for s in self.scrubbers.values():
            for c in s.consumers:
                if c not in self.consumers:
                    raise FuelSystemError(f"scrubbers.{s.name}.consumers", c,
                                          "a consumer of [consumers]")

    def window_for(self, consumer: str) -> InletWindow:
        """The inlet window of ``consumer``: its own, else the ship-wide :attr:`inlet`."""
        return self.inlets.get(consumer, self.inlet)

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
            check_name(f"{group}.{key}", key)
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
