"""The record of a flushing simulation: inlet trace, fuel burnt and tank states, step by step.

Every consumer inlet is recorded at each output time inside a step and at both
sides of every step end (the left limit closes a step, the right limit opens
the next), so the crossing times of :mod:`planner.flushing.result` are found on
the exact solution between samples at most one output step apart.
"""

from __future__ import annotations

import math

import numpy as np

from planner.flushing.flows import inlet_composition, pipe_outlets
from planner.flushing.network import STIRRED, FlowMatrices, Network
from planner.flushing.pipes import PipeQueue
from planner.flushing.step import StepResult


class Recorder:
    """Collects the consumer inlet trace, burnt volumes and tank states step by step.

    Attributes
    ----------
    trace_time_h : list of ndarray (n,)
        Per step, the times of its samples, h after the switch.
    trace_fractions : list of ndarray (C, n, F)
        Per step, the volume fractions at each consumer inlet at those times.
    step_end_h : list of float
        0, then the end of every step, h.
    burnt_m3 : list of ndarray (C, F)
        Cumulative volume of each fuel burnt by each consumer at those times, m³.
    tank_volume_m3, tank_fractions : list of ndarray (S,), (S, F)
        Stirred volumes and compositions at those times.
    inventory_m3 : ndarray (F,)
        Volume of each fuel in the network at the switch, m³.
    last_inlet_end, last_inlet_mean : ndarray (C, F)
        Inlet compositions at the end of the last step and its mean over it.
    """

    def __init__(
        self, net: Network, x: np.ndarray, volume_m3: np.ndarray, queues: list[PipeQueue]
    ) -> None:
        c, f = len(net.consumers), len(net.fuels)
        self.trace_time_h: list[np.ndarray] = []
        self.trace_fractions: list[np.ndarray] = []
        self.step_end_h = [0.0]
        self.burnt_m3 = [np.zeros((c, f))]
        self.tank_volume_m3 = [volume_m3.copy()]
        self.tank_fractions = [x.copy()]
        self.inventory_m3 = volume_m3 @ x + sum((qu.content_m3() for qu in queues), np.zeros(f))
        self.last_inlet_end = inlet_composition(net, net.after, x, pipe_outlets(queues, f))
        self.last_inlet_mean = np.zeros((c, f))
        self.queues = queues

    def add_step(
        self,
        times_h: np.ndarray,
        values: np.ndarray,
        inlet_mean: np.ndarray,
        consumption_m3h: np.ndarray,
        h: float,
    ) -> None:
        """Record a step's inlet samples and the fuel its consumers burnt.

        ``times_h`` (n,) and ``values`` (C, n, F) from :func:`step_trace`;
        ``inlet_mean`` (C, F) the mean inlet composition over the step;
        ``consumption_m3h`` (C,) the volumetric draws held over it; ``h`` its
        length, h.
        """
        self.trace_time_h.append(times_h)
        self.trace_fractions.append(values)
        self.last_inlet_end, self.last_inlet_mean = values[:, -1], inlet_mean
        self.burnt_m3.append(self.burnt_m3[-1] + h * consumption_m3h[:, None] * inlet_mean)

    def add_state(self, time_h: float, volume_m3: np.ndarray, x: np.ndarray) -> None:
        """Record the stirred volumes (S,) m³ and compositions (S, F) at a step end, h."""
        self.step_end_h.append(time_h)
        self.tank_volume_m3.append(volume_m3.copy())
        self.tank_fractions.append(x.copy())


def step_trace(
    net: Network,
    step: StepResult,
    x0: np.ndarray,
    queues: list[PipeQueue],
    fm: FlowMatrices,
    time_h: float,
    grid: int | None,
    output_step_h: float,
) -> tuple[np.ndarray, np.ndarray]:
    """Consumer inlet samples of a step: its start, the output times inside it, its end.

    Parameters
    ----------
    net : Network
    step : StepResult
        The step, not yet committed.
    x0 : ndarray (S, F) [-]
        Stirred compositions at the step start.
    queues : list of PipeQueue
        The pipes' content at the step start.
    fm : FlowMatrices
        The flows held over the step [m³/h].
    time_h : float [h]
        Step start, after the switch.
    grid : int or None [-]
        Index of the output time the step starts on (None: it starts between
        output times, and then ends on the next one, so has none inside).
    output_step_h : float [h]
        Output step.

    Returns
    -------
    times_h : ndarray (n,) [h]
        Sample times: the start, the output times inside, the end.
    values : ndarray (C, n, F) [-]
        Volume fractions at each inlet then: exact for stirred volumes (the
        propagators at the output times) and plug flow (the parcels passing
        the outlet); the end value is the left limit.
    """
    h = step.h
    interior = 0 if grid is None else max(0, math.ceil(h / output_step_h - 1e-9) - 1)
    offsets = np.concatenate(([0.0], np.arange(1, interior + 1) * output_step_h, [h]))
    if grid is None:
        times = time_h + offsets
    else:
        times = grid * output_step_h + offsets
        times[-1] = time_h + h
    link = net.consumer_link
    kind, src = net.after.src_kind[link], net.after.src[link]
    dense = None
    if interior and np.any(kind == STIRRED):
        dense = step.props.dense(step.z0, interior)[:, : len(net.stirred)]
    values = np.empty((len(net.consumers), len(offsets), len(net.fuels)))
    seen: dict[int, int] = {}
    for c in range(len(net.consumers)):
        j = int(src[c])
        if kind[c] == STIRRED:
            values[c, 0] = x0[j]
            if dense is not None:
                values[c, 1:-1] = dense[:, j]
            values[c, -1] = step.x_end[j]
        elif j in seen:
            values[c] = values[seen[j]]
        else:
            seen[j] = c
            values[c] = _pipe_samples(queues[j], fm.pipe_flow[j], step.pipe_in[:, j], offsets, h)
    return times, values


def _pipe_samples(
    queue: PipeQueue, flow_m3h: float, incoming: np.ndarray, offsets_h: np.ndarray, h: float
) -> np.ndarray:
    """What leaves a pipe at ``offsets_h`` into a step (n, F); the last value a left limit."""
    through = flow_m3h * offsets_h
    parcel = (flow_m3h * h, incoming)
    out = np.empty((len(offsets_h), incoming.shape[-1]))
    out[:-1] = queue.values(through[:-1], incoming=parcel)
    out[-1] = queue.values(through[-1:], left=True, incoming=parcel)[0]
    return out
