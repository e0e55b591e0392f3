"""What the consumers draw and what reaches them: link flows and inlet compositions.

Each consumer burns a mass rate (t/h). Its volumetric draw is that mass over
what one m³ of its inlet blend counts for, ``v = 1000·m / (φ·κ)`` m³/h, with
``φ`` the volume fractions of the fuels at the inlet and ``κ`` per fuel its
density (mass basis) or its density times Q_net / 42.7 (energy basis,
:mod:`planner.flushing.schedule`); the link flows are affine in those draws
(:meth:`~planner.flushing.network.Network.flows_m3h`). Mass and sulphur mix
linearly by mass ([LEVENSPIEL-1999] mass balance [D]).

Before the switch the system is in the steady state of the old valve
position: tanks hold their stated content, every other node the mass balance
of its inflows (:func:`steady_state`).
"""

from __future__ import annotations

import numpy as np

from planner.flushing.network import PIPE, STIRRED, FlowMatrices, Network, Routing, flow_matrices

NEG_FLOW_M3H = 1e-9  # a link flow below minus this is a reversal [m³/h]
_STEADY_ITERATIONS = 50
_STEADY_TOL = 1e-15  # change of a volume fraction that ends the fixed point [-]
_NO_DIAGONAL = 1e-14  # a node with less total outflow than this keeps its composition [m³/h]


class FlushError(ValueError):
    """The simulation cannot go on: a tank runs dry or a flow would reverse."""


class TankDry(FlushError):
    """A tank runs dry during a step: ``tank`` at ``time_h`` [h after the switch]."""

    def __init__(self, tank: str, time_h: float) -> None:
        super().__init__(f"tank {tank!r} runs dry at t = {time_h:.3f} h")
        self.tank, self.time_h = tank, float(time_h)


def normalise(phi: np.ndarray) -> np.ndarray:
    """Volume fractions clipped at 0 and scaled to sum 1 along the last axis.

    Parameters
    ----------
    phi : ndarray (..., F) [-]
        Volume fractions of the fuels, possibly a little off by round-off.

    Returns
    -------
    ndarray (..., F) [-]
        Non-negative fractions summing to 1.

    Examples
    --------
    >>> normalise(np.array([0.75, -1e-17, 0.25])).tolist()
    [0.75, 0.0, 0.25]
    """
    phi = np.clip(phi, 0.0, None)
    return phi / phi.sum(axis=-1, keepdims=True)


def consumer_flows(
    net: Network, rate_t_h: np.ndarray, phi: np.ndarray, kappa_kg_m3: np.ndarray, time_h: float
) -> tuple[np.ndarray, np.ndarray]:
    """Link flows and volumetric consumption for the consumers' rates and inlet blends.

    Parameters
    ----------
    net : Network
    rate_t_h : ndarray (C,) [t/h]
        Each consumer's rate (mass, or mass at the ISO reference energy).
    phi : ndarray (C, F) [-]
        Volume fractions at each consumer inlet.
    kappa_kg_m3 : ndarray (F,) [kg/m³]
        What one m³ of each fuel counts for against the rates
        (:meth:`~planner.flushing.network.Network.draw_density_kg_m3`).
    time_h : float [h]
        Time after the switch, for the message of a reversed flow.

    Returns
    -------
    flows : ndarray (L,) [m³/h]
        Link flows, clipped at 0 (exact mass balance of the rates).
    consumption : ndarray (C,) [m³/h]
        Volumetric draw of each consumer, ``1000·m / (φ·κ)``.

    Raises
    ------
    FlushError
        When a link flow would be below −1e-9 m³/h (a pump rate below the
        consumption it must cover).
    """
    consumption = rate_t_h * 1000.0 / (normalise(phi) @ kappa_kg_m3)
    q = net.flows_m3h(consumption)
    bad = np.flatnonzero(q < -NEG_FLOW_M3H)
    if bad.size:
        i = int(bad[0])
        raise FlushError(
            f"flow on link {net.link_names[i]} would be {q[i]:.4g} m³/h at t = {time_h:.4f} h: "
            "a pump rate below the consumption it must cover"
        )
    return np.clip(q, 0.0, None), consumption


def inlet_composition(
    net: Network, routing: Routing, stirred: np.ndarray, pipe_outlet: np.ndarray
) -> np.ndarray:
    """Composition at each consumer inlet from the nodes that feed them.

    Parameters
    ----------
    net : Network
    routing : Routing
        ``net.before`` or ``net.after``: which node feeds each consumer.
    stirred : ndarray (S, F) [-]
        Volume fractions in each stirred node (a state, or a step mean).
    pipe_outlet : ndarray (P, F) [-]
        Volume fractions leaving each pipe (a value, or a step mean).

    Returns
    -------
    ndarray (C, F) [-]
        Volume fractions at each consumer inlet.
    """
    link = net.consumer_link
    kind, src = routing.src_kind[link], routing.src[link]
    return np.where(
        (kind == STIRRED)[:, None],
        stirred[np.where(kind == STIRRED, src, 0)],
        pipe_outlet[np.where(kind == PIPE, src, 0)] if len(net.pipes) else 0.0,
    )


def steady_state(
    net: Network, rate_t_h: np.ndarray, kappa_kg_m3: np.ndarray
) -> tuple[np.ndarray, np.ndarray]:
    """Compositions before the switch: tanks as stated, every other node at equilibrium.

    The valve is on the first switch's from-tank (``net.before``); a fixed
    point over the flows (which follow the inlet blend) of the linear mass
    balances ``q_out·c = Σ q_in·c_in`` of every stirred node and pipe
    ([LEVENSPIEL-1999] mass balance [D]).

    Parameters
    ----------
    net : Network
    rate_t_h : ndarray (C,) [t/h]
        The consumers' rates at the switch.
    kappa_kg_m3 : ndarray (F,) [kg/m³]
        What one m³ of each fuel counts for against the rates.

    Returns
    -------
    stirred : ndarray (S, F) [-]
        Volume fractions in each stirred node.
    pipes : ndarray (P, F) [-]
        Volume fractions in each pipe (uniform along it).
    """
    s = len(net.stirred)
    comp = _pre_switch_guess(net)
    for _ in range(_STEADY_ITERATIONS):
        phi = inlet_composition(net, net.before, comp[:s], comp[s:])
        q, _ = consumer_flows(net, rate_t_h, phi, kappa_kg_m3, 0.0)
        mat, rhs = _mass_balance(net, flow_matrices(net, net.before, q), comp)
        new = np.linalg.solve(mat, rhs)
        done = np.abs(new - comp).max() < _STEADY_TOL
        comp = new
        if done:
            break
    return comp[:s], comp[s:]


def _pre_switch_guess(net: Network) -> np.ndarray:
    """Start of the fixed point (S + P, F): tanks as stated, the rest full of the from-tank's."""
    p = len(net.pipes)
    start = net.tank_fractions[net.stirred.index(net.switches[0].from_tank)]
    comp = np.vstack((net.tank_fractions, np.tile(start, (p, 1))))
    for i in range(len(net.stirred)):
        if not net.is_tank[i]:
            comp[i] = start
    return comp


def _mass_balance(
    net: Network, fm: FlowMatrices, comp: np.ndarray
) -> tuple[np.ndarray, np.ndarray]:
    """The linear system (S + P) of the steady mass balances; tanks and dead nodes held."""
    s, p, f = len(net.stirred), len(net.pipes), len(net.fuels)
    mat = np.zeros((s + p, s + p))
    mat[:s, :s] = np.diag(fm.stirred_in) - fm.ss
    mat[:s, s:] = -fm.sp
    mat[s:, :s] = -fm.ps
    mat[s:, s:] = np.diag(fm.pipe_flow) - fm.pp
    rhs = np.zeros((s + p, f))
    fixed = np.concatenate((net.is_tank, np.zeros(p, bool)))
    fixed |= np.abs(np.diag(mat)) <= _NO_DIAGONAL
    for i in np.flatnonzero(fixed):
        mat[i] = 0.0
        mat[i, i] = 1.0
        rhs[i] = comp[i]
    return mat, rhs
