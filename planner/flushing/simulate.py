"""The flushing simulation: from the switch of the changeover valve to the horizon.

Method (REFERENCE.md section 3 for the models):

- the system starts in the steady state it had before the switch, the valve
  on the from-tank (tanks keep their stated content);
- at t = 0 the valves switch; time advances in steps with the link flows held
  over each step (:mod:`planner.flushing.step`: exact exponential for stirred
  volumes, parcel queues for plug flow, exact bookkeeping of every fuel);
- flows follow the consumers' volumetric draw ``v = m / ρ_inlet`` (mass basis),
  evaluated at the inlet blend predicted for the middle of the step;
- step ends fall on the output grid, on every change of consumption and on
  the arrival of every sharp front at a pipe outlet, so plug-flow delays are
  exact; the step length adapts to an error estimate (the curvature a pipe's
  affine parcel profile misses, and the error of the frozen flows);
- every consumer inlet is recorded at each output time and at every step end
  (both sides of a front), so crossing times are found on the exact solution
  between samples at most one output step apart.
"""

from __future__ import annotations

import math
from collections.abc import Sequence

import numpy as np

from planner.flushing.network import PIPE, STIRRED, Network, Switch, compile_network, flow_matrices
from planner.flushing.pipes import PipeQueue
from planner.flushing.result import FlushResult, build_result
from planner.flushing.schedule import ConsumptionSchedule
from planner.flushing.step import Propagators, commit_step, compute_step
from planner.ship.system import FuelSystem


class FlushError(ValueError):
    """The simulation cannot go on: a tank runs dry or a flow would reverse."""


_NEG_FLOW = 1e-9  # m³/h
_TANK_REFRESH = 0.005  # relative change of a filled tank's volume before rebuilding propagators
_MIN_STEP_EXP = -10
_INITIAL_STEP_EXP = -3


def _normalise(phi: np.ndarray) -> np.ndarray:
    phi = np.clip(phi, 0.0, None)
    return phi / phi.sum(axis=-1, keepdims=True)


def _flows(net: Network, routing, rate: np.ndarray, phi: np.ndarray, kappa: np.ndarray, t: float):
    consumption = rate * 1000.0 / (_normalise(phi) @ kappa)
    q = net.flows_m3h(consumption)
    bad = np.flatnonzero(q < -_NEG_FLOW)
    if bad.size:
        i = int(bad[0])
        raise FlushError(
            f"flow on link {net.link_names[i]} would be {q[i]:.4g} m³/h at t = {t:.4f} h: "
            "a pump rate below the consumption it must cover"
        )
    return np.clip(q, 0.0, None), consumption


def _steady_state(
    net: Network, rate: np.ndarray, kappa: np.ndarray
) -> tuple[np.ndarray, np.ndarray]:
    """Compositions (S, F), (P, F) before the switch: tanks as stated, the rest at equilibrium."""
    s, p, f = len(net.stirred), len(net.pipes), len(net.fuels)
    start = net.tank_fractions[net.stirred.index(net.switches[0].from_tank)]
    comp = np.vstack((net.tank_fractions, np.tile(start, (p, 1))))
    for i in range(s):
        if not net.is_tank[i]:
            comp[i] = start
    for _ in range(50):
        phi = _inlets(net, net.before, comp[:s], comp[s:])
        q, _ = _flows(net, net.before, rate, phi, kappa, 0.0)
        fm = flow_matrices(net, net.before, q)
        mat = np.zeros((s + p, s + p))
        mat[:s, :s] = np.diag(fm.stirred_in) - fm.ss
        mat[:s, s:] = -fm.sp
        mat[s:, :s] = -fm.ps
        mat[s:, s:] = np.diag(fm.pipe_flow) - fm.pp
        rhs = np.zeros((s + p, f))
        fixed = np.concatenate((net.is_tank, np.zeros(p, bool)))
        fixed |= np.abs(np.diag(mat)) <= 1e-14
        for i in np.flatnonzero(fixed):
            mat[i] = 0.0
            mat[i, i] = 1.0
            rhs[i] = comp[i]
        new = np.linalg.solve(mat, rhs)
        done = np.abs(new - comp).max() < 1e-15
        comp = new
        if done:
            break
    return comp[:s], comp[s:]


def _inlet_means(net: Network, step) -> np.ndarray:
    """Mean composition at each consumer inlet over a step (C, F)."""
    link = net.consumer_link
    kind, src = net.after.src_kind[link], net.after.src[link]
    stirred = step.stirred_mean[np.where(kind == STIRRED, src, 0)]
    if not len(net.pipes):
        return stirred
    return np.where(
        (kind == STIRRED)[:, None], stirred, step.pipe_out[0][np.where(kind == PIPE, src, 0)]
    )


def _step_error(net, step, rate, consumption, kappa, tolerance) -> float:
    """Step error over its allowance (1 = at tolerance; scales about as h²).

    Two parts: the curvature of pipe inflows and outflows that the affine
    profiles leave out (against ``tolerance``, volume fraction), and the
    relative error of the frozen consumption flows against the mean inlet
    blend (against ``tolerance / 10``).
    """
    used = consumption > 0.0
    err = step.shape_error / tolerance
    if used.any():
        mean = _normalise(_inlet_means(net, step)[used]) @ kappa
        actual = rate[used] * 1000.0 / mean
        err = max(err, float(np.abs(actual / consumption[used] - 1.0).max()) / (0.1 * tolerance))
    return err


def _pipe_outlets(queues: list[PipeQueue], n_fuels: int) -> np.ndarray:
    """Composition just inside each pipe outlet (P, F)."""
    out = np.zeros((len(queues), n_fuels))
    for i, qu in enumerate(queues):
        out[i] = qu.outlet()
    return out


def _inlets(net: Network, routing, x: np.ndarray, pipe_out: np.ndarray) -> np.ndarray:
    """Composition at each consumer inlet (C, F) from stirred states and pipe outlet values."""
    link = net.consumer_link
    kind, src = routing.src_kind[link], routing.src[link]
    return np.where(
        (kind == STIRRED)[:, None],
        x[np.where(kind == STIRRED, src, 0)],
        pipe_out[np.where(kind == PIPE, src, 0)] if len(net.pipes) else 0.0,
    )


def simulate(
    system: FuelSystem,
    switches: Switch | Sequence[Switch],
    schedule: ConsumptionSchedule,
    horizon_h: float,
    *,
    output_step_s: float = 10.0,
    tolerance: float = 1e-3,
    max_step_h: float = 2.0,
) -> FlushResult:
    """Simulate the circuits of ``switches`` from the switch (t = 0) to ``horizon_h``.

    Parameters
    ----------
    system : FuelSystem
    switches : Switch or sequence of Switch
        One per circuit simulated (circuits not listed are left out).
    schedule : ConsumptionSchedule
        Rates of the circuits' consumers, t/h, piecewise constant in time.
    horizon_h : float
        End of the simulation, hours after the switch (rounded up to a whole
        number of output steps).
    output_step_s : float, default 10
        Output resolution, seconds.
    tolerance : float, default 1e-3
        Step error allowance: the curvature (volume fraction) that the affine
        profile of a pipe's inflow or outflow over a step may leave out; the
        frozen consumption flows may be off by a tenth of it (relative).
    max_step_h : float, default 2
        Longest internal step, hours.

    Raises
    ------
    FlushError
        When a tank runs dry or a link flow would turn negative.
    """
    if isinstance(switches, Switch):
        switches = (switches,)
    net = compile_network(system, switches)
    if not (math.isfinite(horizon_h) and horizon_h > 0.0):
        raise ValueError(f"horizon_h must be > 0, got {horizon_h!r}")
    if not (output_step_s > 0.0 and tolerance > 0.0 and max_step_h > 0.0):
        raise ValueError("output_step_s, tolerance and max_step_h must be > 0")
    h_out = output_step_s / 3600.0
    n_out = max(1, math.ceil(horizon_h / h_out - 1e-9))
    t_end = n_out * h_out
    k_max = max(0, int(math.floor(math.log2(max(max_step_h / h_out, 1.0)))))
    rates = schedule.rates_for(net.consumers)
    seg_times = np.array([t for t in schedule.times_h if t < t_end] + [t_end])
    kappa = net.energy_density(schedule.basis)
    p_count = len(net.pipes)
    x, pipe0 = _steady_state(net, rates[0], kappa)
    vol = net.stirred_volume_m3.copy()
    queues = [PipeQueue(v, c) for v, c in zip(net.pipe_volume_m3, pipe0, strict=True)]
    rec = _Recorder(net, x, vol, queues)
    markers: list[list[float]] = [[] for _ in range(p_count)]
    # sharp fronts at t = 0: a pipe whose inlet now differs from its content
    q0, _ = _flows(net, net.after, rates[0], _inlets(net, net.after, x, pipe0), kappa, 0.0)
    fm0 = flow_matrices(net, net.after, q0)
    with np.errstate(invalid="ignore", divide="ignore"):
        inlet0 = (fm0.ps @ x + fm0.pp @ pipe0) / fm0.pipe_flow[:, None]
    for i in range(p_count):
        if fm0.pipe_flow[i] > 0 and np.abs(inlet0[i] - pipe0[i]).max() > 1e-12:
            markers[i].append(net.pipe_volume_m3[i])

    t, grid, on_grid = 0.0, 0, True
    k = _INITIAL_STEP_EXP
    props: Propagators | None = None
    key: tuple | None = None
    v_ref = vol.copy()
    slope = np.zeros((len(net.consumers), len(net.fuels)))
    warnings: list[str] = []
    over: set[str] = set()
    n_steps = 0
    while t < t_end - 1e-12 * t_end:
        seg = int(np.searchsorted(seg_times, t * (1 + 1e-13) + 1e-15, side="right")) - 1
        seg_end = seg_times[seg + 1]
        pipe_now = _pipe_outlets(queues, len(net.fuels))
        phi0 = _inlets(net, net.after, x, pipe_now)
        jump = np.abs(phi0 - rec.last_inlet_end).max(axis=1, keepdims=True) > 1e-9
        slope = np.where(jump, 0.0, slope)
        h_try = h_out * 2.0**k
        if not on_grid:
            h_try = min(h_try, (math.floor(t / h_out + 1e-9) + 1) * h_out - t)
        while True:
            q, consumption = _flows(
                net, net.after, rates[seg], phi0 + 0.5 * h_try * slope, kappa, t
            )
            fm = flow_matrices(net, net.after, q)
            h = min(h_try, seg_end - t, t_end - t)
            for i in range(p_count):
                if markers[i] and fm.pipe_flow[i] > 0:
                    h = min(h, markers[i][0] / fm.pipe_flow[i])
            h = max(h, 1e-12)
            refresh = (
                net.is_tank & (fm.stirred_in > 0) & (np.abs(vol - v_ref) > _TANK_REFRESH * v_ref)
            )
            if refresh.any():
                v_ref = np.where(refresh, vol, v_ref)
            new_key = (q.tobytes(), v_ref.tobytes())
            if props is None or new_key != key:
                props, key = Propagators(fm, np.where(net.is_tank, v_ref, vol), h_out), new_key
            step = compute_step(x, queues, fm, props, h)
            err = _step_error(net, step, rates[seg], consumption, kappa, tolerance)
            if err > 2.0 and k > _MIN_STEP_EXP and h >= 0.99 * h_try:
                k -= 1
                h_try = h_try / 2.0
                continue
            break
        x_new, vol_new = commit_and_record(
            rec,
            net,
            step,
            x,
            vol,
            queues,
            fm,
            consumption,
            t,
            grid if on_grid else None,
            h_out,
            markers,
        )
        dry = np.flatnonzero(net.is_tank & (vol_new < 0.0))
        if dry.size:
            i = int(dry[0])
            t_dry = t + vol[i] / (fm.stirred_out[i] - fm.stirred_in[i])
            raise FlushError(f"tank {net.stirred[i]!r} runs dry at t = {t_dry:.3f} h")
        for i in np.flatnonzero(net.is_tank & (vol_new > net.capacity_m3 * (1 + 1e-9))):
            if net.stirred[i] not in over:
                over.add(net.stirred[i])
                warnings.append(
                    f"tank {net.stirred[i]!r} exceeds its capacity "
                    f"{net.capacity_m3[i]:g} m³ at t = {t + h:.3f} h"
                )
        slope = 2.0 * (rec.last_inlet_end - rec.last_inlet_mean) / h
        x, vol = x_new, vol_new
        t_new = t + h
        g = round(t_new / h_out)
        if abs(t_new - g * h_out) <= 1e-9 * h_out:
            t, grid, on_grid = g * h_out, g, True
        else:
            t, on_grid = t_new, False
        if err < 0.1 and h >= 0.99 * h_try:
            k = min(k + 1, k_max)
        elif err > 1.0:
            k = max(k - 1, _MIN_STEP_EXP)
        n_steps += 1
    return build_result(net, rec, n_out, h_out, tuple(warnings), n_steps)


class _Recorder:
    """Collects the consumer inlet trace, burnt volumes and tank states step by step."""

    def __init__(self, net: Network, x: np.ndarray, vol: np.ndarray, queues: list[PipeQueue]):
        c, f = len(net.consumers), len(net.fuels)
        self.trace_t: list[np.ndarray] = []
        self.trace_phi: list[np.ndarray] = []  # each (C, n, F)
        self.step_t = [0.0]
        self.burnt = [np.zeros((c, f))]
        self.tank_vol = [vol.copy()]
        self.tank_x = [x.copy()]
        self.inventory0 = vol @ x + sum((qu.content_m3() for qu in queues), np.zeros(f))
        self.last_inlet_start = np.zeros((c, f))
        self.last_inlet_end = _inlets(net, net.after, x, _pipe_outlets(queues, f))
        self.last_inlet_mean = np.zeros((c, f))
        self.queues = queues


def commit_and_record(rec, net, step, x, vol, queues, fm, consumption, t, grid, h_out, markers):
    """Record the step's inlet trace and burnt volumes, then commit it; returns (x, vol)."""
    h = step.h
    link = net.consumer_link
    kind, src = net.after.src_kind[link], net.after.src[link]
    interior = 0
    if grid is not None:
        interior = max(0, math.ceil(h / h_out - 1e-9) - 1)
    offsets = np.concatenate(([0.0], np.arange(1, interior + 1) * h_out, [h]))
    times = (grid * h_out + offsets) if grid is not None else t + offsets
    if grid is not None:
        times[-1] = t + h
    values = np.empty((len(net.consumers), len(offsets), len(net.fuels)))
    dense = step.x_end[None] if interior == 0 else None
    if interior and np.any(kind == STIRRED):
        xs = slice(0, len(net.stirred))
        dense = props_dense(step, interior)[:, xs]
    seen: dict[int, int] = {}
    for c in range(len(net.consumers)):
        j = int(src[c])
        if kind[c] == STIRRED:
            values[c, 0] = x[j]
            if interior:
                values[c, 1:-1] = dense[:, j]
            values[c, -1] = step.x_end[j]
        elif j in seen:
            values[c] = values[seen[j]]
        else:
            seen[j] = c
            qu = queues[j]
            through = fm.pipe_flow[j] * offsets
            incoming = (fm.pipe_flow[j] * h, step.pipe_in[:, j])
            values[c, :-1] = qu.values(through[:-1], incoming=incoming)
            values[c, -1] = qu.values(through[-1:], left=True, incoming=incoming)[0]
    rec.trace_t.append(times)
    rec.trace_phi.append(values)
    means = _inlet_means(net, step)
    rec.last_inlet_start, rec.last_inlet_end, rec.last_inlet_mean = (
        values[:, 0],
        values[:, -1],
        means,
    )
    rec.burnt.append(rec.burnt[-1] + h * consumption[:, None] * means)
    x_new, vol_new = commit_step(step, x, vol, net.is_tank, queues, fm)
    # a front reaching a pipe outlet at the step end enters the pipes it feeds
    # then: their new markers must not be moved by this step's throughput
    entering: list[int] = []
    for i, qu in enumerate(queues):
        through = fm.pipe_flow[i] * h
        moved = [m - through for m in markers[i]]
        arrived = [m for m in moved if m <= 1e-9 * qu.volume_m3]
        markers[i] = [m for m in moved if m > 1e-9 * qu.volume_m3]
        if arrived:
            entering.extend(int(r) for r in np.flatnonzero(fm.pp[:, i] > 0))
    for r in entering:
        markers[r].append(queues[r].volume_m3)
    rec.step_t.append(t + h)
    rec.tank_vol.append(vol_new.copy())
    rec.tank_x.append(x_new.copy())
    return x_new, vol_new


def props_dense(step, count):
    """Augmented states at the interior output times of a step (needs the step's propagators)."""
    return step.props.dense(step.z0, count)
