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

import numpy as np

from planner.fuels import ISO_REFERENCE_Q_NET_MJ_KG, Fuel
from planner.ship.flows import circuit_flows
from planner.ship.system import TANK_IN_USE, VALVE, FuelSystem, FuelSystemError

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
    """A :class:`Switch` from tank or fuel names (:meth:`FuelSystem.tank_for`)."""
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
    q_net_mj_kg: np.ndarray  # (F,)
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

    def flows_m3h(self, consumption_m3h: np.ndarray) -> np.ndarray:
        """Link flows, m³/h, for volumetric consumptions (C,) m³/h."""
        return self.flow_constant_m3h + self.flow_per_consumption @ consumption_m3h

    def energy_density(self, basis: str) -> np.ndarray:
        """Per fuel, what one m³ delivers: kg (mass basis) or kg at the ISO reference energy."""
        if basis == "mass":
            return self.density_kg_m3
        return self.density_kg_m3 * self.q_net_mj_kg / ISO_REFERENCE_Q_NET_MJ_KG


def compile_network(system: FuelSystem, switches: Sequence[Switch]) -> Network:
    """The :class:`Network` of the circuits in ``switches`` (each circuit at most once)."""
    switches = tuple(switches)
    if not switches:
        raise ValueError("simulate needs at least one switch")
    circuits = [s.circuit for s in switches]
    if len(set(circuits)) != len(circuits):
        raise ValueError(f"each circuit may be switched once, got {circuits}")
    stirred: dict[str, None] = {}
    pipes: dict[str, None] = {}
    consumers: list[str] = []
    consumer_circuit: list[str] = []
    per_circuit = []
    for sw in switches:
        if sw.circuit not in system.circuits:
            raise FuelSystemError("circuit", sw.circuit, f"one of {sorted(system.circuits)}")
        circuit = system.circuits[sw.circuit]
        for t in (sw.from_tank, sw.to_tank):
            if t not in circuit.tanks:
                raise FuelSystemError(
                    f"circuits.{sw.circuit}.tanks", t, f"a tank of the valve: {list(circuit.tanks)}"
                )
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
        per_circuit.append((sw, circuit, circuit_flows(system, circuit)))
    s_names, p_names = tuple(stirred), tuple(pipes)
    fuel_names = sorted(
        {f for n in s_names if n in system.tanks for f in system.tanks[n].content_m3}
    )
    fuels = tuple(system.fuels[f] for f in fuel_names)
    is_tank = np.array([n in system.tanks for n in s_names])
    vol = np.array(
        [
            system.tanks[n].volume_m3 if n in system.tanks else system.volumes[n].volume_m3
            for n in s_names
        ]
    )
    cap = np.array([system.tanks[n].capacity_m3 if n in system.tanks else np.inf for n in s_names])
    frac = np.zeros((len(s_names), len(fuels)))
    for i, n in enumerate(s_names):
        if n in system.tanks:
            t = system.tanks[n]
            for f, v in t.content_m3.items():
                frac[i, fuel_names.index(f)] = v / t.volume_m3

    def where(name: str, tank: str) -> tuple[int, int]:
        if name in (VALVE, TANK_IN_USE):
            name = tank
        if name in stirred:
            return STIRRED, s_names.index(name)
        if name in pipes:
            return PIPE, p_names.index(name)
        return CONSUMER, consumers.index(name)

    names, const, per = [], [], []
    rows: dict[str, list[int]] = {k: [] for k in ("bk", "b", "bdk", "bd", "ak", "a", "adk", "ad")}
    for sw, circuit, flows in per_circuit:
        cols = [consumers.index(c) for c in circuit.consumers]
        for i, link in enumerate(circuit.links):
            names.append(f"{link.source} → {link.target}")
            const.append(flows.constant_m3h[i])
            row = np.zeros(len(consumers))
            row[cols] = flows.per_consumption[i]
            per.append(row)
            for tag, tank in (("b", sw.from_tank), ("a", sw.to_tank)):
                k, j = where(link.source, tank)
                rows[tag + "k"].append(k)
                rows[tag].append(j)
                k, j = where(link.target, tank)
                rows[tag + "dk"].append(k)
                rows[tag + "d"].append(j)
    arr = {k: np.array(v, dtype=int) for k, v in rows.items()}
    before = Routing(arr["bk"], arr["b"], arr["bdk"], arr["bd"])
    after = Routing(arr["ak"], arr["a"], arr["adk"], arr["ad"])
    consumer_link = np.array(
        [
            int(np.flatnonzero((after.dst_kind == CONSUMER) & (after.dst == c))[0])
            for c in range(len(consumers))
        ],
        dtype=int,
    )
    return Network(
        fuels=fuels,
        density_kg_m3=np.array([f.density_kg_m3 for f in fuels]),
        sulphur_pct=np.array([f.sulphur_pct for f in fuels]),
        q_net_mj_kg=np.array([f.q_net for f in fuels]),
        stirred=s_names,
        is_tank=is_tank,
        stirred_volume_m3=vol,
        capacity_m3=cap,
        tank_fractions=frac,
        pipes=p_names,
        pipe_volume_m3=np.array([system.volumes[n].volume_m3 for n in p_names]),
        consumers=tuple(consumers),
        consumer_circuit=tuple(consumer_circuit),
        link_names=tuple(names),
        flow_constant_m3h=np.array(const, dtype=float),
        flow_per_consumption=np.array(per, dtype=float).reshape(len(names), len(consumers)),
        before=before,
        after=after,
        consumer_link=consumer_link,
        switches=switches,
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
    """The :class:`FlowMatrices` of link flows ``q`` (L,) under ``routing``."""
    s, p = len(net.stirred), len(net.pipes)
    ss, sp = np.zeros((s, s)), np.zeros((s, p))
    ps, pp = np.zeros((p, s)), np.zeros((p, p))
    sk, dk = routing.src_kind, routing.dst_kind
    for target, (src_kind, mat) in (
        (STIRRED, (STIRRED, ss)),
        (STIRRED, (PIPE, sp)),
        (PIPE, (STIRRED, ps)),
        (PIPE, (PIPE, pp)),
    ):
        m = (dk == target) & (sk == src_kind)
        np.add.at(mat, (routing.dst[m], routing.src[m]), q[m])
    out = np.zeros(s)
    m = sk == STIRRED
    np.add.at(out, routing.src[m], q[m])
    return FlowMatrices(ss, sp, ps, pp, ss.sum(1) + sp.sum(1), out, ps.sum(1) + pp.sum(1))
