"""Link flows of a circuit as affine functions of the consumers' volumetric consumption.

Every link's flow is ``q_l = a_l + Σ_c B_lc·v_c``, m³/h, where ``v_c`` is
consumer ``c``'s volumetric consumption (mass rate / inlet density). A link
into a consumer carries ``v_c``; a ``"consumption"`` link carries ``factor ×
Σ v_c`` over its consumers (default: those downstream of its target); a fixed
link its constant; a ``"rest"`` link what balances its source node, found by
solving the node balances (a small linear system, since rest links may feed
each other round a loop).

Fixed-volume nodes (stirred volumes and pipes) must balance for every
consumption: ``Σ in = Σ out`` identically in ``a`` and ``B``, else the
system is refused with the unbalanced node named. Tanks need not balance
(their level moves), unless they have a rest outflow (an overflow), which
holds their level.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import TYPE_CHECKING

import numpy as np

from planner.ship.components import TANK_IN_USE, Circuit, FuelSystemError, Link

if TYPE_CHECKING:
    from planner.ship.system import FuelSystem

_TOL = 1e-9


@dataclass(frozen=True)
class CircuitFlows:
    """Affine link flows of one circuit: ``q = constant_m3h + per_consumption @ v``.

    Attributes
    ----------
    links : tuple of Link
        The circuit's links, in order.
    consumers : tuple of str
        Consumer order of the columns of ``per_consumption`` (the circuit's).
    constant_m3h : ndarray (n_links,)
        Constant part of each link's flow, m³/h.
    per_consumption : ndarray (n_links, n_consumers)
        Coefficient of each consumer's volumetric consumption (m³/h per m³/h).
    """

    links: tuple[Link, ...]
    consumers: tuple[str, ...]
    constant_m3h: np.ndarray
    per_consumption: np.ndarray

    def rates_m3h(self, consumption_m3h: np.ndarray) -> np.ndarray:
        """Each link's flow, m³/h, for volumetric consumptions ``consumption_m3h`` (n_c,)."""
        return self.constant_m3h + self.per_consumption @ np.asarray(consumption_m3h, dtype=float)


def _describe(a: float, b: np.ndarray, consumers: tuple[str, ...]) -> str:
    parts = [f"{a:.6g} m³/h"] if abs(a) > _TOL else []
    parts += [
        f"{x:.6g} × consumption({c})" for x, c in zip(b, consumers, strict=True) if abs(x) > _TOL
    ]
    return " + ".join(parts) or "0"


def _downstream_consumers(system: FuelSystem, circuit: Circuit, start: str) -> list[str]:
    seen, todo, found = {start}, [start], []
    while todo:
        node = todo.pop()
        if node in circuit.consumers:
            found.append(node)
            continue
        for link in circuit.links:
            if link.source == node and link.target not in seen and link.target != TANK_IN_USE:
                seen.add(link.target)
                todo.append(link.target)
    return [c for c in circuit.consumers if c in found]


def circuit_flows(system: FuelSystem, circuit: Circuit) -> CircuitFlows:
    """The link flows of a circuit as affine functions of the consumers' consumption.

    ``q = a + B·v``: each link's flow q (m³/h) from the consumers' volumetric
    consumptions v (m³/h); "rest" links are found from the node balances
    ``Σ q_in = Σ q_out`` (a small linear system).

    Parameters
    ----------
    system : FuelSystem
        The fuel system the circuit belongs to (node kinds, consumers).
    circuit : Circuit
        The circuit.

    Returns
    -------
    CircuitFlows
        ``a`` [m³/h] and ``B`` [-] for every link, in the circuit's order.

    Raises
    ------
    FuelSystemError
        When a fixed-volume node (stirred volume or pipe) does not balance for
        every consumption, two "rest" links leave one node, the "rest" links
        form a loop the other flows do not determine, or a "consumption" link
        reaches no consumer.

    Notes
    -----
    Volume balance of incompressible flow ([D]); tanks need not balance
    (their level moves).

    Examples
    --------
    A mixing tank and a heater, a 3 m³/h circulating pump and the surplus
    returned to the mixing tank:

    >>> from planner.fuels import Fuel
    >>> from planner.ship.consumers import Generator
    >>> from planner.ship.system import (Circuit, Flow, FuelSystem, Link, ShipIdentity,
    ...                                  Stirred, Tank)
    >>> mgo = Fuel(name="mgo", grade="DMA", sulphur_pct=0.05, density_kg_m3=845.0,
    ...            viscosity_cst=3.0, viscosity_ref_c=40.0)
    >>> links = (Link("valve", "mixing", Flow.consumption()),
    ...          Link("mixing", "heater", Flow.fixed(3.0)),
    ...          Link("heater", "mixing", Flow.balance()),
    ...          Link("heater", "dg", None))
    >>> system = FuelSystem(
    ...     ShipIdentity("MV Example", fictional=True), {"mgo": mgo},
    ...     {"mgo_service": Tank("mgo_service", 30.0, {"mgo": 25.0})},
    ...     {"mixing": Stirred("mixing", 0.5), "heater": Stirred("heater", 0.1)},
    ...     {"dg": Generator(name="dg", power_kw=500.0, sfoc_g_kwh=200.0)},
    ...     {"main": Circuit("main", ("mgo_service",), ("dg",), links)})
    >>> circuit_flows(system, system.circuits["main"]).rates_m3h([0.5]).tolist()
    [0.5, 3.0, 2.5, 0.5]
    """
    here = f"circuits.{circuit.name}"
    links = circuit.links
    consumers = circuit.consumers
    n_l, n_c = len(links), len(consumers)
    coef = np.zeros((n_l, 1 + n_c))  # column 0: constant, then one per consumer
    rest = [i for i, link in enumerate(links) if link.flow is not None and link.flow.rest]
    for i, link in enumerate(links):
        place = link.place or f"{here}.links[{i}]"
        if link.flow is None:  # into a consumer
            coef[i, 1 + consumers.index(link.target)] = 1.0
        elif not link.flow.rest:
            coef[i, 0] = link.flow.constant_m3h
            if link.flow.factor:
                who = link.flow.consumers
                if who is None:
                    who = tuple(_downstream_consumers(system, circuit, link.target))
                    if not who:
                        raise FuelSystemError(
                            f"{place}.flow",
                            "consumption",
                            f"a consumer downstream of {link.target!r} (none is reached)",
                        )
                for c in who:
                    coef[i, 1 + consumers.index(c)] += link.flow.factor
    if rest:
        sources = [links[i].source for i in rest]
        for i, s in zip(rest, sources, strict=True):
            if sources.count(s) > 1:
                place = links[i].place or f"{here}.links[{i}]"
                raise FuelSystemError(f"{place}.flow", "rest", f"one 'rest' outflow from {s!r}")
        k = len(rest)
        mat = np.eye(k)
        rhs = np.zeros((k, 1 + n_c))
        for row, (i, s) in enumerate(zip(rest, sources, strict=True)):
            for j, link in enumerate(links):
                if link.target == s:
                    if j in rest:
                        mat[row, rest.index(j)] -= 1.0
                    else:
                        rhs[row] += coef[j]
                elif link.source == s and j != i:
                    rhs[row] -= coef[j]
        if abs(np.linalg.det(mat)) < 1e-12:
            raise FuelSystemError(
                f"{here}.links",
                sources,
                "'rest' flows that the other flows determine (these form a loop of 'rest' links)",
            )
        coef[rest] = np.linalg.solve(mat, rhs)
    for name in circuit.volume_names:
        kind = system.node_kind(name)
        if kind not in ("stirred", "pipe"):
            continue
        flow_in = sum(
            (coef[j] for j, lk in enumerate(links) if lk.target == name), np.zeros(1 + n_c)
        )
        flow_out = sum(
            (coef[j] for j, lk in enumerate(links) if lk.source == name), np.zeros(1 + n_c)
        )
        scale = 1.0 + np.abs(flow_in).max() + np.abs(flow_out).max()
        if np.abs(flow_in - flow_out).max() > _TOL * scale:
            raise FuelSystemError(
                f"{here}.links",
                name,
                f"flows that balance at {name!r}: in "
                f"{_describe(flow_in[0], flow_in[1:], consumers)}, out "
                f"{_describe(flow_out[0], flow_out[1:], consumers)}",
            )
    return CircuitFlows(links, consumers, coef[:, 0].copy(), coef[:, 1:].copy())
