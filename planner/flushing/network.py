"""Compile the circuits being switched into arrays for the simulator.

Nodes fall into two state groups: *stirred* (tanks, with variable volume, and
fixed stirred volumes) whose composition is a vector of volume fractions of
the distinct fuels, and *pipes* (plug flow queues). Consumers are sinks. Each
link has a source and target index in these groups, resolved twice: before
the switch (the valve and ``tank_in_use`` on the from-tank, used for the
steady state the system starts from) and after it (on the to-tank).

Link flows are affine in the consumers' volumetric consumption
(:mod:`planner.ship.flows`): ``q = a + B @ v``, m³/h.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass
from functools import cached_property

import numpy as np

from planner.fuels import ISO_REFERENCE_Q_NET_MJ_KG, Fuel
from planner.ship.flows import CircuitFlows, circuit_flows
from planner.ship.system import TANK_IN_USE, VALVE, Circuit, FuelSystem, FuelSystemError

STIRRED, PIPE, CONSUMER = 0, 1, 2


@dataclass(frozen=True)
class Switch:
    """Switch ``circuit``'s changeover valve at t = 0 from ``from_tank`` to ``to_tank``.

    ``from_tank == to_tank`` holds the valve where it is (e.g. a second circuit
    simulated alongside, or tank flushing where only the fill source changes).
    """

    circuit: str
    from_tank: str
    to_tank: str


def make_switch(system: FuelSystem, circuit: str, from_: str, to: str) -> Switch:
    """A :class:`Switch` from tank or fuel names.

    Parameters
    ----------
    system : FuelSystem
    circuit : str
        Name of the circuit whose valve is switched.
    from_, to : str
        Tank names, or fuel names (the circuit's valve tank holding that fuel,
        :meth:`~planner.ship.system.FuelSystem.tank_for`).

    Returns
    -------
    Switch
    """
    return Switch(circuit, system.tank_for(circuit, from_), system.tank_for(circuit, to))


@dataclass(frozen=True)
class Routing:
    """Source and target of every link: kind (STIRRED, PIPE, CONSUMER) and index."""

    src_kind: np.ndarray
    src: np.ndarray
    dst_kind: np.ndarray
    dst: np.ndarray


@dataclass(frozen=True)
class Network:
    """The arrays the simulator runs on (see the module docstring)."""

    fuels: tuple[Fuel, ...]
    density_kg_m3: np.ndarray  # (F,)
    sulphur_pct: np.ndarray  # (F,)
    stirred: tuple[str, ...]
    is_tank: np.ndarray  # (S,) bool
    stirred_volume_m3: np.ndarray  # (S,) initial volume
    capacity_m3: np.ndarray  # (S,) inf for fixed volumes
    tank_fractions: np.ndarray  # (S, F) initial composition of tanks (fixed volumes: 0)
    pipes: tuple[str, ...]
    pipe_volume_m3: np.ndarray  # (P,)
    consumers: tuple[str, ...]
    consumer_circuit: tuple[str, ...]
    link_names: tuple[str, ...]
    flow_constant_m3h: np.ndarray  # (L,)
    flow_per_consumption: np.ndarray  # (L, C)
    before: Routing
    after: Routing
    consumer_link: np.ndarray  # (C,) index of the link feeding each consumer
    switches: tuple[Switch, ...]

    @cached_property
    def q_net_mj_kg(self) -> np.ndarray:
        """Net specific energy of each fuel (F,), MJ/kg (worked out when first asked for:
        an estimate costs more than the rest of the network)."""
        return np.array([f.q_net for f in self.fuels])

    def flows_m3h(self, consumption_m3h: np.ndarray) -> np.ndarray:
        """Link flows (L,), m³/h, for volumetric consumptions (C,), m³/h."""
        return self.flow_constant_m3h + self.flow_per_consumption @ consumption_m3h

    def draw_density_kg_m3(self, basis: str) -> np.ndarray:
        """What one m³ of each fuel counts for against the consumers' rates (F,), kg/m³.

        Its density on the ``"mass"`` basis; on the ``"energy"`` basis the mass
        at the ISO reference net specific energy, ``ρ·Q_net / 42.7``
        ([ISO-3046] [M]).
        """
        if basis == "mass":
            return self.density_kg_m3
        return self.density_kg_m3 * self.q_net_mj_kg / ISO_REFERENCE_Q_NET_MJ_KG


@dataclass(frozen=True)
class _Nodes:
    """The nodes of the switched circuits, in first-seen order."""

    stirred: tuple[str, ...]
    pipes: tuple[str, ...]
    consumers: tuple[str, ...]
    consumer_circuit: tuple[str, ...]


_Part = tuple[Switch, Circuit, CircuitFlows]  # one switched circuit


def compile_network(system: FuelSystem, switches: Sequence[Switch]) -> Network:
    """The :class:`Network` of the circuits in ``switches``.

    Parameters
    ----------
    system : FuelSystem
    switches : sequence of Switch
        At least one; each circuit at most once.

    Returns
    -------
    Network

    Raises
    ------
    ValueError
        No switch, or a circuit switched twice.
    FuelSystemError
        An unknown circuit, or a tank that is not one of its valve's.
    """
    switches = tuple(switches)
    if not switches:
        raise ValueError("simulate needs at least one switch")
    circuits = [s.circuit for s in switches]
    if len(set(circuits)) != len(circuits):
        raise ValueError(f"each circuit may be switched once, got {circuits}")
    nodes, parts = _collect_nodes(system, switches)
    fuel_names = _fuel_names(system, nodes.stirred)
    fuels = tuple(system.fuels[f] for f in fuel_names)
    names, constant, per_consumption = _link_flows(parts, nodes.consumers)
    after = _routing(parts, nodes, after=True)
    return Network(
        fuels=fuels,
        density_kg_m3=np.array([f.density_kg_m3 for f in fuels]),
        sulphur_pct=np.array([f.sulphur_pct for f in fuels]),
        stirred=nodes.stirred,
        is_tank=np.array([n in system.tanks for n in nodes.stirred]),
        stirred_volume_m3=np.array([_volume_m3(system, n) for n in nodes.stirred]),
        capacity_m3=np.array(
            [system.tanks[n].capacity_m3 if n in system.tanks else np.inf for n in nodes.stirred]
        ),
        tank_fractions=_tank_fractions(system, nodes.stirred, fuel_names),
        pipes=nodes.pipes,
        pipe_volume_m3=np.array([system.volumes[n].volume_m3 for n in nodes.pipes]),
        consumers=nodes.consumers,
        consumer_circuit=nodes.consumer_circuit,
        link_names=names,
        flow_constant_m3h=constant,
        flow_per_consumption=per_consumption,
        before=_routing(parts, nodes, after=False),
        after=after,
        consumer_link=_consumer_links(after, len(nodes.consumers)),
        switches=switches,
    )


def _check_switch(system: FuelSystem, sw: Switch) -> Circuit:
    """The switched circuit, once its name and both tanks are known to be its valve's."""
    if sw.circuit not in system.circuits:
        raise FuelSystemError("circuit", sw.circuit, f"one of {sorted(system.circuits)}")
    circuit = system.circuits[sw.circuit]
    for t in (sw.from_tank, sw.to_tank):
        if t not in circuit.tanks:
            raise FuelSystemError(
                f"circuits.{sw.circuit}.tanks", t, f"a tank of the valve: {list(circuit.tanks)}"
            )
    return circuit


def _collect_nodes(
    system: FuelSystem, switches: tuple[Switch, ...]
) -> tuple[_Nodes, list[_Part]]:
    """The nodes of every switched circuit, and each circuit with its link flows."""
    stirred: dict[str, None] = {}
    pipes: dict[str, None] = {}
    consumers: list[str] = []
    consumer_circuit: list[str] = []
    parts: list[_Part] = []
    for sw in switches:
        circuit = _check_switch(system, sw)
        stirred.setdefault(sw.from_tank)
        stirred.setdefault(sw.to_tank)
        for name in circuit.volume_names:
            kind = system.node_kind(name)
            if kind in ("tank", "stirred"):
                stirred.setdefault(name)
            elif kind == "pipe":
                pipes.setdefault(name)
        consumers += circuit.consumers
        consumer_circuit += [sw.circuit] * len(circuit.consumers)
        parts.append((sw, circuit, circuit_flows(system, circuit)))
    nodes = _Nodes(tuple(stirred), tuple(pipes), tuple(consumers), tuple(consumer_circuit))
    return nodes, parts


def _fuel_names(system: FuelSystem, stirred: tuple[str, ...]) -> list[str]:
    """The distinct fuels in the tanks among ``stirred``, sorted by name."""
    return sorted({f for n in stirred if n in system.tanks for f in system.tanks[n].content_m3})


def _volume_m3(system: FuelSystem, name: str) -> float:
    """Initial volume of a tank or a stirred volume, m³."""
    return system.tanks[name].volume_m3 if name in system.tanks else system.volumes[name].volume_m3


def _tank_fractions(
    system: FuelSystem, stirred: tuple[str, ...], fuel_names: list[str]
) -> np.ndarray:
    """Volume fractions (S, F) of each tank's content (rows of fixed volumes 0)."""
    frac = np.zeros((len(stirred), len(fuel_names)))
    for i, n in enumerate(stirred):
        if n in system.tanks:
            t = system.tanks[n]
            for f, v in t.content_m3.items():
                frac[i, fuel_names.index(f)] = v / t.volume_m3
    return frac


def _link_flows(
    parts: list[_Part], consumers: tuple[str, ...]
) -> tuple[tuple[str, ...], np.ndarray, np.ndarray]:
    """Link names, and the affine flows ``a`` (L,) m³/h and ``B`` (L, C) over all circuits."""
    names, constant, per = [], [], []
    for _, circuit, flows in parts:
        cols = [consumers.index(c) for c in circuit.consumers]
        for i, link in enumerate(circuit.links):
            names.append(f"{link.source} → {link.target}")
            constant.append(flows.constant_m3h[i])
            row = np.zeros(len(consumers))
            row[cols] = flows.per_consumption[i]
            per.append(row)
    per_consumption = np.array(per, dtype=float).reshape(len(names), len(consumers))
    return tuple(names), np.array(constant, dtype=float), per_consumption


def _locate(name: str, tank: str, nodes: _Nodes) -> tuple[int, int]:
    """Kind and index of a link end, the valve and ``tank_in_use`` standing for ``tank``."""
    if name in (VALVE, TANK_IN_USE):
        name = tank
    if name in nodes.stirred:
        return STIRRED, nodes.stirred.index(name)
    if name in nodes.pipes:
        return PIPE, nodes.pipes.index(name)
    return CONSUMER, nodes.consumers.index(name)


def _routing(parts: list[_Part], nodes: _Nodes, *, after: bool) -> Routing:
    """Every link's ends with the valves on the to-tanks (``after``) or the from-tanks."""
    ends: list[tuple[int, int, int, int]] = []
    for sw, circuit, _ in parts:
        tank = sw.to_tank if after else sw.from_tank
        for link in circuit.links:
            ends.append((*_locate(link.source, tank, nodes), *_locate(link.target, tank, nodes)))
    src_kind, src, dst_kind, dst = (np.array([e[k] for e in ends], dtype=int) for k in range(4))
    return Routing(src_kind, src, dst_kind, dst)


def _consumer_links(routing: Routing, n_consumers: int) -> np.ndarray:
    """Index of the link feeding each consumer (C,)."""
    return np.array(
        [
            int(np.flatnonzero((routing.dst_kind == CONSUMER) & (routing.dst == c))[0])
            for c in range(n_consumers)
        ],
        dtype=int,
    )


@dataclass(frozen=True)
class FlowMatrices:
    """Flow-weighted connection matrices for one set of link flows (all m³/h).

    ``ss[i, j]``: flow from stirred j into stirred i; ``sp[i, p]``: pipe p into
    stirred i; ``ps[p, j]``, ``pp[p, r]``: stirred j / pipe r into pipe p;
    ``stirred_in``, ``stirred_out``: totals per stirred node; ``pipe_flow``:
    flow through each pipe.
    """

    ss: np.ndarray
    sp: np.ndarray
    ps: np.ndarray
    pp: np.ndarray
    stirred_in: np.ndarray
    stirred_out: np.ndarray
    pipe_flow: np.ndarray


def flow_matrices(net: Network, routing: Routing, q: np.ndarray) -> FlowMatrices:
    """The :class:`FlowMatrices` of link flows under a routing.

    Parameters
    ----------
    net : Network
    routing : Routing
        ``net.before`` or ``net.after``.
    q : ndarray (L,) [m³/h]
        Link flows.

    Returns
    -------
    FlowMatrices
        Connection matrices and totals [m³/h].
    """
    s, p = len(net.stirred), len(net.pipes)
    links, index = _flat_index(routing, s, p)
    flat = np.bincount(index, weights=q[links], minlength=(s + p) * (s + p) + s)
    ss = flat[: s * s].reshape(s, s)
    sp = flat[s * s : s * (s + p)].reshape(s, p)
    ps = flat[s * (s + p) : s * (s + p) + p * s].reshape(p, s)
    pp = flat[s * (s + p) + p * s : (s + p) * (s + p)].reshape(p, p)
    out = flat[(s + p) * (s + p) :]
    return FlowMatrices(ss, sp, ps, pp, ss.sum(1) + sp.sum(1), out, ps.sum(1) + pp.sum(1))


_FLAT_INDEX: dict[int, tuple[Routing, np.ndarray, np.ndarray]] = {}


def _flat_index(routing: Routing, s: int, p: int) -> tuple[np.ndarray, np.ndarray]:
    """For :func:`flow_matrices`: which link (and where in ``[ss | sp | ps | pp | out]``,
    flattened) each entry adds to; kept per routing (compared by identity)."""
    found = _FLAT_INDEX.get(id(routing))
    if found is not None and found[0] is routing:
        return found[1], found[2]
    links, index = [], []
    blocks = {(STIRRED, STIRRED): (0, s), (STIRRED, PIPE): (s * s, p),
              (PIPE, STIRRED): (s * (s + p), s), (PIPE, PIPE): (s * (s + p) + p * s, p)}
    for k, (sk, si, dk, di) in enumerate(zip(routing.src_kind.tolist(), routing.src.tolist(),
                                             routing.dst_kind.tolist(), routing.dst.tolist(),
                                             strict=True)):
        if (dk, sk) in blocks:
            base, width = blocks[(dk, sk)]
            links.append(k)
            index.append(base + di * width + si)
        if sk == STIRRED:
            links.append(k)
            index.append((s + p) * (s + p) + si)
    if len(_FLAT_INDEX) > 32:
        _FLAT_INDEX.clear()
    _FLAT_INDEX[id(routing)] = (routing, np.array(links, dtype=int), np.array(index, dtype=int))
    return _FLAT_INDEX[id(routing)][1], _FLAT_INDEX[id(routing)][2]
