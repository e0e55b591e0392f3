"""The record of a flushing simulation: inlet trace, fuel burnt and tank states, step by step.

Every consumer inlet is recorded at each output time inside a step and at both
sides of every step end (the left limit closes a step, the right limit opens
the next), so the crossing times of :mod:`planner.flushing.result` are found on
the exact solution between samples at most one output step apart. The trace is
kept per *source*, the node feeding one or more consumers, and shared out to
the consumers when the result is built.

A step records only its two ends; the samples at the output times inside it
are evaluated once the simulation is done (:meth:`Recorder.trace`): for a
pipe, from the parcels that entered it, read at the throughput of each output
time (exact plug flow, [LEVENSPIEL-1999] [P]); for a stirred node, from the
propagators, during the step (:meth:`Recorder.add_dense`).
"""

from __future__ import annotations

import numpy as np

from planner.flushing.network import STIRRED, Network
from planner.flushing.pipes import PipeSet, legendre_basis, profile
from planner.flushing.step import StepResult


class Inlets:
    """Which node feeds each consumer: the distinct sources, stirred nodes first.

    Attributes
    ----------
    stirred, pipes : ndarray of int
        Indices of the stirred nodes and of the pipes that feed consumers.
    pipe_list, pipe_volume_m3 : list of int, list of float [m³]
        Those pipes as ints, and their volumes.
    of_consumer : ndarray (C,) of int
        Each consumer's source, an index into ``stirred`` then ``pipes``.
    """

    def __init__(self, net: Network) -> None:
        link = net.consumer_link
        kinds, nodes = net.after.src_kind[link].tolist(), net.after.src[link].tolist()
        found = list(dict.fromkeys(zip(kinds, nodes, strict=True)))
        stirred = [n for k, n in found if k == STIRRED]
        pipes = [n for k, n in found if k != STIRRED]
        order = [(STIRRED, n) for n in stirred] + [(k, n) for k, n in found if k != STIRRED]
        self.stirred = np.array(stirred, dtype=int)
        self.pipes = np.array(pipes, dtype=int)
        self.pipe_list = pipes  # the same, as ints
        self.pipe_volume_m3 = net.pipe_volume_m3[self.pipes].tolist()  # their volumes [m³]
        self.of_consumer = np.array([order.index(kn) for kn in zip(kinds, nodes, strict=True)],
                                    dtype=int)
        n_stirred = len(net.stirred)  # each consumer's source among the stirred nodes, then pipes
        self._at_consumer = np.array(
            [n if k == STIRRED else n_stirred + n for k, n in zip(kinds, nodes, strict=True)],
            dtype=int)
        self._pipe_at_consumer = None if stirred else np.array(nodes, dtype=int)

    def ends(self, step: StepResult, pipes: PipeSet, x_new: np.ndarray, through_m3: list[float]
             ) -> tuple[np.ndarray, np.ndarray]:
        """Each source's composition at a step's end: the left limit closing it and the right
        limit opening the next (n_sources, F each; one array when they are the same).

        A stirred node: the step's end state (``step``), then the bookkept state
        ``x_new`` (S, F). A pipe: its parcels (the step's own pushed in, not yet moved on)
        at the step's throughput ``through_m3`` (P) [m³]; when it passed more than its
        volume, that is inside the parcel it took in ([LEVENSPIEL-1999] plug flow [P]).
        """
        n_st = self.stirred.size
        pipe_end = pipe_in = None
        if self.pipes.size:
            w = [through_m3[i] for i in self.pipe_list]
            at = [1.0 - v / x if x > v * (1.0 + 1e-9) else -1.0
                  for x, v in zip(w, self.pipe_volume_m3, strict=True)]
            if min(at) >= 0.0:  # every source pipe passed more than its volume
                basis = [legendre_basis(s) for s in at]
                if len(at) == 1:  # the profile of the one source pipe's parcel, (1, F)
                    pipe_end = pipe_in = np.dot(basis[0], step.inflow[:3, self.pipe_list[0]])[None]
                else:
                    parcel = step.inflow[:3].take(self.pipes, axis=1).transpose(1, 0, 2)
                    pipe_end = pipe_in = np.matmul(np.array(basis)[:, None, :], parcel)[:, 0]
            else:
                both = [pipes.limits(i, x) for i, x in zip(self.pipe_list, w, strict=True)]
                pipe_end, pipe_in = np.array([b[0] for b in both]), np.array([b[1] for b in both])
            if not n_st:
                return pipe_end, pipe_in
        shape = (n_st + self.pipes.size, x_new.shape[1])
        end, inlet = np.empty(shape), np.empty(shape)
        end[:n_st] = step.moments[0][self.stirred]
        inlet[:n_st] = x_new[self.stirred]
        if pipe_end is not None:
            end[n_st:], inlet[n_st:] = pipe_end, pipe_in
        return end, inlet

    def values(self, stirred: np.ndarray, pipe_outlet: np.ndarray) -> np.ndarray:
        """Composition at each source (n_sources, F) from stirred (S, F) and pipe (P, F) values."""
        return np.concatenate((stirred[self.stirred], pipe_outlet[self.pipes]))

    def at_consumers(self, stirred: np.ndarray, pipe_outlet: np.ndarray) -> np.ndarray:
        """Each consumer's inlet (k, C, F) from stirred (k, S, F) and pipe (k, P, F) values:
        ``values(...)[of_consumer]`` for ``k`` quantities at once."""
        if self._pipe_at_consumer is not None:  # every consumer fed by a pipe
            return pipe_outlet.take(self._pipe_at_consumer, axis=1)
        return np.concatenate((stirred, pipe_outlet), axis=1).take(self._at_consumer, axis=1)


class Recorder:
    """Collects the inlet trace, the fuel burnt and the tank states step by step.

    Attributes
    ----------
    inlets : Inlets
    step_end_h : list of float
        0, then the end of every step, h.
    drawn_m3, inlet_mean : list of ndarray (C,), (C, F)
        Per step, the volume each consumer drew and its mean inlet composition.
    tank_volume_m3, tank_fractions : list of ndarray (S,), (S, F)
        Stirred volumes and compositions at 0 and at every step end.
    inventory_m3 : ndarray (F,)
        Volume of each fuel in the network at the switch, m³.
    pipes : PipeSet
        The pipes' content (at the end, once the simulation is done).
    """

    def __init__(
        self, inlets: Inlets, x: np.ndarray, volume_m3: np.ndarray, pipes: PipeSet,
        output_step_h: float,
    ) -> None:
        self.inlets = inlets
        self.output_step_h = output_step_h
        self.step_end_h = [0.0]
        self.drawn_m3: list[np.ndarray] = []
        self.inlet_mean: list[np.ndarray] = []
        self.tank_volume_m3 = [volume_m3.copy()]
        self.tank_fractions = [x.copy()]
        self.inventory_m3 = volume_m3 @ x + pipes.content_m3()
        self.pipes = pipes
        m = inlets.pipes.size
        self._first = pipes.outlets()[inlets.pipes] if m else None  # the content at the switch
        self._steps: list[tuple[float, float, int, np.ndarray, np.ndarray]] = []
        self._flow: list[np.ndarray] = []  # per step, flow through each source pipe (m,)
        self._parcels: list[np.ndarray] = []  # per step, the parcel each took in (3, m, F)
        self._dense: list[np.ndarray] = []  # stirred sources inside steps (n, n_stirred, F)

    def add(
        self,
        time_h: float,
        h: float,
        interior: int,
        start: np.ndarray,
        end: np.ndarray,
        pipe_flow_m3h: np.ndarray,
        parcels: np.ndarray,
    ) -> None:
        """Record a step from ``time_h`` of ``h`` hours with ``interior`` output times inside:
        each source's composition at its start (right limits) and end (left limits),
        (n_sources, F); the flow through each pipe (P,) m³/h and the parcels they took
        in (P, 3, F)."""
        self._steps.append((time_h, h, interior, start, end))
        self.step_end_h.append(time_h + h)
        if self.inlets.pipes.size:
            self._flow.append(pipe_flow_m3h.take(self.inlets.pipes))
            self._parcels.append(parcels.take(self.inlets.pipes, axis=0))

    def add_dense(self, values: np.ndarray) -> None:
        """The stirred sources at the output times inside the last step (n, n_stirred, F)."""
        self._dense.append(values)

    def add_state(
        self, drawn_m3: np.ndarray, inlet_mean: np.ndarray, volume_m3: np.ndarray, x: np.ndarray
    ) -> None:
        """The volume each consumer drew in the last step (C,) m³, its mean inlet (C, F), and
        the stirred volumes (S,) m³ and compositions (S, F) at its end."""
        self.drawn_m3.append(drawn_m3)
        self.inlet_mean.append(inlet_mean)
        self.tank_volume_m3.append(volume_m3)
        self.tank_fractions.append(x)

    def burnt_m3(self) -> np.ndarray:
        """Cumulative volume of each fuel burnt by each consumer at 0 and every step end
        (steps + 1, C, F), m³."""
        n_c, n_f = len(self.inlets.of_consumer), self.inventory_m3.size
        if not self.inlet_mean:
            return np.zeros((1, n_c, n_f))
        steps = np.array(self.drawn_m3)[:, :, None] * np.array(self.inlet_mean)
        return np.concatenate((np.zeros((1, n_c, n_f)), np.cumsum(steps, axis=0)))

    def trace(self) -> tuple[np.ndarray, np.ndarray]:
        """The trace: sample times (K,) h and each source's composition then (n_sources, K, F).

        Per step its start (right limit), the output times inside it, its end
        (left limit).
        """
        time_h, h, interior, start, end = zip(*self._steps, strict=True)
        n = np.array(interior, dtype=int)
        last = np.cumsum(n + 2) - 1
        first = last - n - 1
        step = np.repeat(np.arange(len(n)), n + 2)
        t0 = np.array(time_h)
        times = t0[step] + (np.arange(len(step)) - first[step]) * self.output_step_h
        times[last] = t0 + np.array(h)  # inside a step, the output times; then its end
        n_src, n_f = start[0].shape
        values = np.empty((n_src, len(times), n_f))
        values[:, first] = np.array(start).transpose(1, 0, 2)
        values[:, last] = np.array(end).transpose(1, 0, 2)
        if n.any():
            inside = np.ones(len(times), dtype=bool)
            inside[first] = inside[last] = False
            inner = np.flatnonzero(inside)
            n_st = self.inlets.stirred.size
            if n_st:
                values[:n_st, inner] = np.concatenate(self._dense).transpose(1, 0, 2)
            if self.inlets.pipes.size:
                offsets = (inner - first[step[inner]]) * self.output_step_h
                values[n_st:, inner] = self._pipe_samples(n, offsets)
        return times, values

    def _pipe_samples(self, interior: np.ndarray, offsets_h: np.ndarray) -> np.ndarray:
        """The source pipes' outflow at the output times inside steps (m, n_inner, F): the
        parcels that entered each, read at the throughput up to each time (right limits)."""
        flow = np.array(self._flow)  # (steps, m)
        parcels = np.array(self._parcels)  # (steps, m, 3, F)
        volume = self.pipes.volume_m3[self.inlets.pipes]
        took = flow > 1e-14
        passed = flow * np.array([st[1] for st in self._steps])[:, None] * took
        outlet = np.concatenate((np.zeros((1, len(volume))), np.cumsum(passed, axis=0)))
        step = np.repeat(np.arange(len(interior)), interior)
        out = np.empty((len(volume), len(step), parcels.shape[-1]))
        for i, v in enumerate(volume.tolist()):
            rows = np.flatnonzero(took[:, i])
            starts = np.concatenate(([0.0], v + outlet[rows, i]))
            lengths = np.concatenate(([v], passed[rows, i]))
            coef = np.concatenate((np.zeros((1, 3, parcels.shape[-1])), parcels[rows, i]))
            coef[0, 0] = self._first[i]
            at = outlet[step, i] + flow[step, i] * offsets_h
            k = np.searchsorted(starts, at, side="right") - 1  # at >= 0 = starts[0]
            s = (at - starts[k]) / lengths[k]
            np.clip(s, 0.0, 1.0, out=s)
            out[i] = profile(coef[k], s)
        return out
