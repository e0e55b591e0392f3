"""Sharp fronts in the pipes, followed so that a step ends exactly on each arrival.

A front is a jump in composition carried by plug flow: it leaves a pipe of
volume V once the throughput since it entered reaches V, whatever the flow
does meanwhile ([LEVENSPIEL-1999] plug flow as a pure delay [P]). Each pipe
keeps the distances of its fronts from its outlet, m³ of throughput, nearest
first. A step never carries a front past an outlet, so plug-flow delays are
exact; a front that arrives at an outlet enters the pipes that outlet feeds.
"""

from __future__ import annotations

import math
from collections.abc import Sequence

import numpy as np

from planner.flushing.flows import consumer_flows, inlet_composition
from planner.flushing.network import Network, flow_matrices

Fronts = list[list[float]]  # per pipe, distances of its fronts from the outlet [m³]

_JUMP = 1e-12  # a change of volume fraction at a pipe inlet that makes a front [-]
_ARRIVED = 1e-9  # a front this close to the outlet, relative to the pipe volume, has left it


def initial_fronts(
    net: Network,
    rate_t_h: np.ndarray,
    kappa_kg_m3: np.ndarray,
    stirred: np.ndarray,
    pipes: np.ndarray,
) -> Fronts:
    """The fronts at the switch: at the inlet of every pipe whose inflow now differs.

    Parameters
    ----------
    net : Network
    rate_t_h : ndarray (C,) [t/h]
        The consumers' rates at the switch.
    kappa_kg_m3 : ndarray (F,) [kg/m³]
        What one m³ of each fuel counts for against the rates.
    stirred : ndarray (S, F) [-]
        Volume fractions in the stirred nodes (the steady state before the switch).
    pipes : ndarray (P, F) [-]
        Volume fractions in the pipes (uniform along each).

    Returns
    -------
    list of list of float [m³]
        Per pipe, the pipe's volume if a front starts at its inlet, else nothing.
    """
    phi = inlet_composition(net, net.after, stirred, pipes)
    q0, _ = consumer_flows(net, rate_t_h, phi, kappa_kg_m3, 0.0)
    fm0 = flow_matrices(net, net.after, q0)
    with np.errstate(invalid="ignore", divide="ignore"):
        inlet0 = (fm0.ps @ stirred + fm0.pp @ pipes) / fm0.pipe_flow[:, None]
    fronts: Fronts = [[] for _ in net.pipes]
    for i in range(len(net.pipes)):
        if fm0.pipe_flow[i] > 0 and np.abs(inlet0[i] - pipes[i]).max() > _JUMP:
            fronts[i].append(net.pipe_volume_m3[i])
    return fronts


def next_arrival_h(fronts: Fronts, pipe_flow_m3h: Sequence[float]) -> float:
    """Time until the first front reaches a pipe outlet at the present flows.

    Parameters
    ----------
    fronts : list of list of float [m³]
        Per pipe, the distances of its fronts from the outlet.
    pipe_flow_m3h : sequence of float (P,) [m³/h]
        Flow through each pipe.

    Returns
    -------
    float [h]
        ``min V_front / q`` over the pipes that flow (inf when no front moves).

    Examples
    --------
    A front 0.2 m³ from the outlet of a pipe passing 4 m³/h arrives in 0.05 h:

    >>> next_arrival_h([[0.2], []], [4.0, 1.0])
    0.05
    """
    h = math.inf
    if not any(fronts):
        return h
    for distances, flow in zip(fronts, pipe_flow_m3h, strict=True):
        if distances and flow > 0:
            h = min(h, distances[0] / flow)
    return float(h)


def advance_fronts(
    fronts: Fronts, pipe_volume_m3: np.ndarray, throughput_m3: Sequence[float],
    pipe_to_pipe_m3h: np.ndarray,
) -> Fronts:
    """The fronts after a step that passed ``throughput_m3`` through each pipe.

    Parameters
    ----------
    fronts : list of list of float [m³]
        Per pipe, the distances of its fronts from the outlet.
    pipe_volume_m3 : ndarray (P,) [m³]
        Volume of each pipe.
    throughput_m3 : sequence of float (P,) [m³]
        Volume each pipe passed in the step.
    pipe_to_pipe_m3h : ndarray (P, P) [m³/h]
        Flow from pipe r (column) into pipe p (row) over the step.

    Returns
    -------
    list of list of float [m³]
        The fronts moved on by each pipe's throughput; one that reached an
        outlet is gone, and starts at the inlet of each pipe that outlet feeds
        (those new fronts are not moved by this step's throughput).
    """
    if not any(fronts):
        return fronts
    moved: Fronts = []
    entering: list[int] = []
    for i, (distances, through) in enumerate(zip(fronts, throughput_m3, strict=True)):
        shifted = [m - through for m in distances]
        gone = _ARRIVED * float(pipe_volume_m3[i])
        moved.append([m for m in shifted if m > gone])
        if any(m <= gone for m in shifted):
            entering.extend(int(r) for r in np.flatnonzero(pipe_to_pipe_m3h[:, i] > 0))
    for r in entering:
        moved[r].append(float(pipe_volume_m3[r]))
    return moved
