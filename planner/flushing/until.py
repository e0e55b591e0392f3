"""When a flush is over: every inlet at the level, and nothing upstream that could undo it.

A simulation given an :class:`Until` stops at the first output time at which

1. every inlet of the circuit is at or below the level (going to compliant
   fuel; at or above it going back), and
2. so is every volume that still flows: the content of every stirred node
   with an outflow, tanks included, and every parcel in every pipe with a
   flow (bounded over the whole parcel).

Why 2 makes the stop final: sulphur at or below a level ``L`` is the
half-space ``w·φ ≤ 0`` of the volume fractions, ``wᵢ = ρᵢ(Sᵢ − L)``
([LEVENSPIEL-1999] mass balance [D]: sulphur mixes linearly by mass). Well-stirred
mixing and plug-flow transport only ever form convex combinations of what
flows in, and a half-space is convex, so once every flowing content is inside
it, every inlet stays inside it for ever, whatever the consumption does
later. A volume with no flow delivers nothing until it flows again. Condition
1 alone could stop on a transient: an inlet touching the level while old fuel
still waits upstream (a return line, a slower parallel branch).

A parcel's profile ``m + g·P₁(s) + k·P₂(s)`` (:mod:`planner.flushing.pipes`)
has ``|P₁| ≤ 1`` and ``−½ ≤ P₂ ≤ 1`` on the parcel, so
``w·c(s) ≤ w·m + |w·g| + max(w·k, −½·w·k)`` bounds it from above without
locating its extremum.

After the stop, :func:`dry_after_h` extends each tank's level along the rest of
the schedule (the draw at the final inlet blend) to the time it would run dry,
a warning for the planner and not a reason to refuse the flush.
"""

from __future__ import annotations

import bisect
from dataclasses import dataclass

import numpy as np

from planner.flushing.network import Network
from planner.flushing.pipes import PipeSet
from planner.flushing.trial import Run, draw_m3h

_UNFLOWING_M3H = 1e-12  # a node with less outflow than this delivers nothing [m³/h]
RECORD_WAIT = 3.0
"""How long, as a multiple of the time to the level, a flush waits for the record level."""


@dataclass(frozen=True)
class Until:
    """The stopping rule of a flush.

    Parameters
    ----------
    circuit : str
        The switched circuit whose inlets are watched.
    level_pct : float [% m/m]
        The sulphur level the inlets must reach.
    down : bool
        True: at or below the level (to compliant fuel); False: at or above it.
    tail_factor : float, default 0 [-]
        Keep simulating after the inlets first reached the level (at ``t₁``)
        to at least ``(1 + tail_factor)·t₁ + tail_h``, so a chart shows what
        follows (a tank running dry cuts it short).
    tail_h : float, default 0 [h]
        See ``tail_factor``.
    least_h : float, default 0 [h]
        Never stop before this time after the switch.
    record_pct : float, optional [% m/m]
        A level beyond ``level_pct`` the record should also reach (nearer the new
        fuel, for the viscosity path): waited for like ``level_pct``, but only
        until ``RECORD_WAIT`` times the time the inlets took to reach ``level_pct``
        (a tank receiving returns may never get there).
    dry_within_h : float, optional [h]
        Look for tanks running dry after the stop only up to this time after the
        switch (None: to the end of the horizon); the schedule is then read only
        that far, which keeps results comparable between schedules that differ later.
    """

    circuit: str
    level_pct: float
    down: bool
    tail_factor: float = 0.0
    tail_h: float = 0.0
    least_h: float = 0.0
    record_pct: float | None = None
    dry_within_h: float | None = None

    def __post_init__(self) -> None:
        if not np.isfinite(self.level_pct):
            raise ValueError(f"level_pct must be finite, got {self.level_pct!r}")
        if not (self.tail_factor >= 0.0 and self.tail_h >= 0.0 and self.least_h >= 0.0):
            raise ValueError("tail_factor, tail_h and least_h must be >= 0")


class Watch:
    """:class:`Until` compiled for one network: the half-space and the inlets it watches.

    Parameters
    ----------
    until : Until
    net : Network
    of_consumer : ndarray (C,) of int
        Each consumer's source (:class:`~planner.flushing.record.Inlets`).
    """

    def __init__(self, until: Until, net: Network, of_consumer: np.ndarray) -> None:
        sign = 1.0 if until.down else -1.0
        self.until = until
        self.w = sign * net.density_kg_m3 * (net.sulphur_pct - until.level_pct)  # (F,)
        record = until.level_pct if until.record_pct is None else until.record_pct
        self.w_record = sign * net.density_kg_m3 * (net.sulphur_pct - record)
        mine = [i for i, c in enumerate(net.consumer_circuit) if c == until.circuit]
        self.sources = np.array(sorted(set(of_consumer[mine].tolist())), dtype=int)
        self._source_list = self.sources.tolist()
        self._w_list = self.w.tolist()
        self.reached_h: float | None = None  # since when the inlets have been at the level

    def inlets_at_level(self, inlet: np.ndarray, w: np.ndarray | None = None) -> bool:
        """Every watched source (its composition now, ``inlet`` (n_sources, F)) inside the
        half-space ``w·φ ≤ 0`` (default: at the level)."""
        weights = self._w_list if w is None else w.tolist()
        rows = inlet.tolist()  # a handful of sources and fuels: floats are cheaper
        for i in self._source_list:
            if sum(max(p, 0.0) * c for p, c in zip(rows[i], weights, strict=True)) > 0.0:
                return False
        return True

    def settled(self, x: np.ndarray, stirred_out_m3h: np.ndarray, pipes: PipeSet,
                pipe_flow_m3h: np.ndarray, w: np.ndarray | None = None) -> bool:
        """Every flowing content inside the half-space (the module notes; default: the
        level's)."""
        w = self.w if w is None else w
        weights = w.tolist()  # a handful of nodes and fuels: floats are cheaper
        for row, q in zip(x.tolist(), stirred_out_m3h.tolist(), strict=True):
            if q > _UNFLOWING_M3H and sum(
                    max(p, 0.0) * c for p, c in zip(row, weights, strict=True)) > 0.0:
                return False
        return pipes.max_linear(w, pipe_flow_m3h > _UNFLOWING_M3H) <= 0.0

    def over(self, time_h: float, inlet: np.ndarray, x: np.ndarray,
             stirred_out_m3h: np.ndarray, pipes: PipeSet, pipe_flow_m3h: np.ndarray) -> bool:
        """At an output time ``time_h`` [h]: is the flush over? Notes since when the inlets
        have been at the level (the state: inlets (n_sources, F), stirred (S, F), the last
        step's flows [m³/h])."""
        if not self.inlets_at_level(inlet):
            self.reached_h = None
            return False
        if self.reached_h is None:
            self.reached_h = time_h
        if time_h < self.end_h() * (1.0 - 1e-12):
            return False
        if not self.settled(x, stirred_out_m3h, pipes, pipe_flow_m3h):
            return False
        if self.until.record_pct is None or time_h >= RECORD_WAIT * self.reached_h:
            return True
        return (self.inlets_at_level(inlet, self.w_record)
                and self.settled(x, stirred_out_m3h, pipes, pipe_flow_m3h, self.w_record))

    def end_h(self) -> float:
        """The least end once the inlets are at the level: the tail after ``reached_h``."""
        t1 = self.reached_h if self.reached_h is not None else 0.0
        u = self.until
        return max(u.least_h, (1.0 + u.tail_factor) * t1 + u.tail_h)


def dry_after_h(net: Network, rates_t_h: np.ndarray, bounds_h: list[float],
                draw_m3h, flows, volume_m3: np.ndarray, time_h: float) -> dict[str, float]:
    """When each tank would run dry after ``time_h``, along the rest of the schedule.

    Parameters
    ----------
    net : Network
    rates_t_h : ndarray (segments, C) [t/h]
        The consumers' rates per schedule segment.
    bounds_h : list of float [h]
        The segment starts before the end of the schedule, then that end.
    draw_m3h : callable (C,) kg/h -> (C,) m³/h
        The volumetric draw of each consumer at the final inlet blend.
    flows : callable (C,) m³/h -> (stirred_in, stirred_out) (S,) m³/h each
        The flows of the stirred nodes for those draws.
    volume_m3 : ndarray (S,) [m³]
        The stirred volumes at ``time_h``.
    time_h : float [h]
        Where the simulation stopped, h after the switch.

    Returns
    -------
    dict
        Tank name -> time it runs dry [h after the switch], for the tanks that
        do so before the end of the schedule (levels fall linearly in each
        segment; the blend is held at its final value).
    """
    tanks = np.flatnonzero(net.is_tank)
    vol = volume_m3[tanks].astype(float)
    out: dict[str, float] = {}
    seg = max(0, bisect.bisect_right(bounds_h, time_h) - 1)
    t = time_h
    for k in range(seg, len(bounds_h) - 1):
        t1 = bounds_h[k + 1]
        if t1 <= t:
            continue
        q_in, q_out = flows(draw_m3h(rates_t_h[k] * 1000.0))
        net_out = (q_out - q_in)[tanks]
        for j, i in enumerate(tanks.tolist()):
            name = net.stirred[i]
            if name in out or net_out[j] <= 0.0:
                continue
            t_dry = t + vol[j] / net_out[j]
            if t_dry <= t1:
                out[name] = float(t_dry)
        vol = vol - net_out * (t1 - t)
        t = t1
    return out


def run_dry_after_h(run: Run, inlet: np.ndarray, volume_m3: np.ndarray,
                    time_h: float, end_h: float | None = None) -> dict[str, float]:
    """:func:`dry_after_h` for a simulation's run, at the inlet blends it ended with.

    Parameters
    ----------
    run : Run
        The simulation's fixed parameters (network, rates, segments, flows).
    inlet : ndarray (C, F) [-]
        Each consumer's inlet composition at the end.
    volume_m3 : ndarray (S,) [m³]
        The stirred volumes at the end.
    time_h : float [h]
        The end, h after the switch.
    end_h : float, optional [h]
        Look no further than this, h after the switch (None: the run's schedule end).

    Returns
    -------
    dict
        Tank name -> the time it runs dry [h after the switch].
    """

    def flows(consumption_m3h: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        fl = run.flow_map.flows(consumption_m3h, time_h)
        return fl.stirred_in.copy(), fl.stirred_out.copy()

    bounds = run.bounds_h
    if end_h is not None and end_h < bounds[-1]:
        bounds = [b for b in bounds if b < end_h] + [end_h]
    return dry_after_h(run.net, run.rates_t_h, bounds,
                       lambda rate: draw_m3h(rate, inlet, run.draw_kg_m3), flows,
                       volume_m3, time_h)
