"""The flushing simulation: from the switch of the changeover valve to the horizon.

Method ([LEVENSPIEL-1999] for the models: the well-stirred washout [D] and
plug flow as a pure delay [P]):

- the system starts in the steady state it had before the switch, the valve
  on the from-tank (tanks keep their stated content,
  :func:`~planner.flushing.flows.steady_state`);
- at t = 0 the valves switch; time advances in steps with the link flows held
  over each step (:mod:`planner.flushing.step`: exact exponential for stirred
  volumes, parcel queues for plug flow, exact bookkeeping of every fuel);
- flows follow the consumers' volumetric draw ``v = m / ρ_inlet`` (mass basis),
  evaluated at the inlet blend predicted for the middle of the step
  (:mod:`planner.flushing.flows`);
- step ends fall on the output grid, on every change of consumption and on
  the arrival of every sharp front at a pipe outlet
  (:mod:`planner.flushing.fronts`), so plug-flow delays are exact; the step
  length adapts to an error estimate (the cubic part a pipe's quadratic
  parcel profile misses, and the error of the frozen flows);
- every consumer inlet is recorded at each output time and at every step end
  (both sides of a front, :mod:`planner.flushing.record`), so crossing times
  are found on the exact solution between samples at most one output step apart.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np

from planner.flushing.flows import (
    FlushError,
    consumer_flows,
    inlet_composition,
    normalise,
    pipe_outlets,
    steady_state,
)
from planner.flushing.fronts import Fronts, advance_fronts, initial_fronts, next_arrival_h
from planner.flushing.network import FlowMatrices, Network, Switch, compile_network, flow_matrices
from planner.flushing.pipes import PipeQueue
from planner.flushing.record import Recorder, step_trace
from planner.flushing.result import FlushResult, build_result
from planner.flushing.schedule import ConsumptionSchedule
from planner.flushing.step import Propagators, StepResult, commit_step, compute_step
from planner.ship.system import FuelSystem

__all__ = ["FlushError", "simulate"]

_TANK_REFRESH = 0.005  # relative change of a filled tank's volume before rebuilding propagators
_MIN_STEP_EXP = -10  # shortest step: output step · 2^-10
_INITIAL_STEP_EXP = -3
_MIN_STEP_H = 1e-12
_JUMP = 1e-9  # a change of inlet volume fraction between steps that resets the slope [-]


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
        The ship's fuel system (tanks with their content, volumes, circuits).
    switches : Switch or sequence of Switch
        One per circuit simulated (circuits not listed are left out).
    schedule : ConsumptionSchedule
        Rates of the circuits' consumers [t/h], piecewise constant in time.
    horizon_h : float [h]
        End of the simulation after the switch (rounded up to a whole number
        of output steps).
    output_step_s : float, default 10 [s]
        Output resolution.
    tolerance : float, default 1e-3 [-]
        Step error allowance: the cubic part (volume fraction) that the
        quadratic profile of a pipe's inflow or outflow over a step may leave
        out; the frozen consumption flows may be off by a tenth of it (relative).
    max_step_h : float, default 2 [h]
        Longest internal step.

    Returns
    -------
    FlushResult
        Inlet curves (volume fractions [-], burnt volumes [m³]) and tank
        states at every output time [h], with the inventories [m³].

    Raises
    ------
    FlushError
        When a tank runs dry or a link flow would turn negative.
    ValueError
        A horizon or an option that is not positive, or a consumer without rate.

    Notes
    -----
    Well-stirred volumes follow the washout ODE ``V·c' = Σ q_in·(c_in − c)``
    exactly over each step (a matrix exponential, [HIGHAM-2005]); pipes are
    exact plug flow ([LEVENSPIEL-1999]). What is approximated: the flows are
    held over a step (at the blend predicted for its middle) and a stirred
    volume's outflow enters a pipe as a quadratic profile, both within
    ``tolerance``. Every fuel is conserved to round-off.

    Examples
    --------
    One well-stirred volume of 0.5 m³ fed at 4/3 m³/h (1.2 t/h of fuels of
    900 kg/m³) washes out from 0.50 to 0.10 % S with 0.05 % fuel in
    ``(V/q)·ln(0.45/0.05) = 0.8240 h`` ([LEVENSPIEL-1999] CSTR washout [D]):

    >>> from planner.fuels import Fuel
    >>> from planner.ship.consumers import MainEngine
    >>> from planner.ship.system import (Circuit, Flow, FuelSystem, Link, ShipIdentity,
    ...                                  Stirred, Tank)
    >>> fuels = {n: Fuel(name=n, grade="DMA", sulphur_pct=s, density_kg_m3=900.0,
    ...                  viscosity_cst=3.0, viscosity_ref_c=40.0)
    ...          for n, s in (("a", 0.50), ("b", 0.05))}
    >>> links = (Link("valve", "mix", Flow.consumption()), Link("mix", "me"))
    >>> system = FuelSystem(
    ...     ShipIdentity("example"), fuels,
    ...     {"A": Tank("A", 600.0, {"a": 500.0}), "B": Tank("B", 600.0, {"b": 500.0})},
    ...     {"mix": Stirred("mix", 0.5)},
    ...     {"me": MainEngine(name="me", mcr_kw=9000, sfoc_g_kwh=170, ref_speed_kn=14,
    ...                       ref_load_pct=85)},
    ...     {"main": Circuit("main", ("A", "B"), ("me",), links)})
    >>> schedule = ConsumptionSchedule.constant({"me": 1.2}, basis="mass")
    >>> r = simulate(system, Switch("main", "A", "B"), schedule, 2.0)
    >>> round(r.inlets["me"].time_at_or_below_h(0.10), 4)
    0.824
    """
    net = compile_network(system, (switches,) if isinstance(switches, Switch) else switches)
    run = _settings(net, schedule, horizon_h, output_step_s, tolerance, max_step_h)
    state, rec = _start(run)
    cache = _PropagatorCache(net, run.output_step_h, state.volume_m3)
    while state.time_h < run.end_h - 1e-12 * run.end_h:
        _advance(run, state, rec, cache)
    warnings = tuple(state.warnings)
    return build_result(net, rec, run.n_out, run.output_step_h, warnings, state.n_steps)


@dataclass(frozen=True)
class _Run:
    """What stays fixed over a simulation."""

    net: Network
    rates_t_h: np.ndarray  # (segments, C)
    segment_bounds_h: np.ndarray  # the segment starts before the end, then the end
    kappa_kg_m3: np.ndarray  # (F,) what one m³ of each fuel counts for against the rates
    output_step_h: float
    n_out: int
    end_h: float
    tolerance: float
    k_max: int  # longest step: output step · 2^k_max


def _settings(
    net: Network,
    schedule: ConsumptionSchedule,
    horizon_h: float,
    output_step_s: float,
    tolerance: float,
    max_step_h: float,
) -> _Run:
    """The fixed parameters of a run, once its options are checked."""
    if not (math.isfinite(horizon_h) and horizon_h > 0.0):
        raise ValueError(f"horizon_h must be > 0, got {horizon_h!r}")
    if not (output_step_s > 0.0 and tolerance > 0.0 and max_step_h > 0.0):
        raise ValueError("output_step_s, tolerance and max_step_h must be > 0")
    h_out = output_step_s / 3600.0
    n_out = max(1, math.ceil(horizon_h / h_out - 1e-9))
    end_h = n_out * h_out
    k_max = max(0, int(math.floor(math.log2(max(max_step_h / h_out, 1.0)))))
    rates = schedule.rates_for(net.consumers)
    bounds = np.array([t for t in schedule.times_h if t < end_h] + [end_h])
    kappa = net.draw_density_kg_m3(schedule.basis)
    return _Run(net, rates, bounds, kappa, h_out, n_out, end_h, tolerance, k_max)


@dataclass
class _State:
    """The simulation as it advances."""

    time_h: float
    grid: int | None  # index of the output time at time_h (None: between output times)
    x: np.ndarray  # (S, F) stirred compositions
    volume_m3: np.ndarray  # (S,) stirred volumes
    queues: list[PipeQueue]
    fronts: Fronts
    slope: np.ndarray  # (C, F) predicted rate of change of each inlet, 1/h
    k: int  # next trial step: output step · 2^k
    warnings: list[str]
    over_capacity: set[str]  # tanks already warned about
    n_steps: int = 0


def _start(run: _Run) -> tuple[_State, Recorder]:
    """The state at the switch: the steady state before it, fronts at changed pipe inlets."""
    net = run.net
    x, pipe0 = steady_state(net, run.rates_t_h[0], run.kappa_kg_m3)
    vol = net.stirred_volume_m3.copy()
    queues = [PipeQueue(v, c) for v, c in zip(net.pipe_volume_m3, pipe0, strict=True)]
    rec = Recorder(net, x, vol, queues)
    fronts = initial_fronts(net, run.rates_t_h[0], run.kappa_kg_m3, x, pipe0)
    slope = np.zeros((len(net.consumers), len(net.fuels)))
    state = _State(0.0, 0, x, vol, queues, fronts, slope, _INITIAL_STEP_EXP, [], set())
    return state, rec


class _PropagatorCache:
    """The propagators of the present flows and tank volumes, rebuilt when either changes.

    A filled tank's volume is held at a reference value, refreshed once it has
    moved by more than 0.5 % since (its dilution rate is q / V).
    """

    def __init__(self, net: Network, output_step_h: float, volume_m3: np.ndarray) -> None:
        self.net = net
        self.output_step_h = output_step_h
        self.v_ref = volume_m3.copy()
        self._props: Propagators | None = None
        self._key: tuple[bytes, bytes] | None = None

    def get(self, fm: FlowMatrices, q: np.ndarray, volume_m3: np.ndarray) -> Propagators:
        """The propagators for link flows ``q`` (L,) m³/h and stirred volumes (S,) m³."""
        net = self.net
        moved = np.abs(volume_m3 - self.v_ref) > _TANK_REFRESH * self.v_ref
        refresh = net.is_tank & (fm.stirred_in > 0) & moved
        if refresh.any():
            self.v_ref = np.where(refresh, volume_m3, self.v_ref)
        key = (q.tobytes(), self.v_ref.tobytes())
        if self._props is None or key != self._key:
            held = np.where(net.is_tank, self.v_ref, volume_m3)
            self._props, self._key = Propagators(fm, held, self.output_step_h), key
        return self._props


@dataclass(frozen=True)
class _Trial:
    """An accepted step, not yet committed, with what chose its length."""

    step: StepResult
    fm: FlowMatrices
    consumption_m3h: np.ndarray  # (C,)
    h_try: float  # the trial length it was cut from, h
    error: float  # over the allowance
    k: int  # the step exponent after any halving


def _advance(run: _Run, state: _State, rec: Recorder, cache: _PropagatorCache) -> None:
    """One step: try it, record it, commit it, check the tanks, choose the next length."""
    net = run.net
    t = state.time_h
    seg = int(np.searchsorted(run.segment_bounds_h, t * (1 + 1e-13) + 1e-15, side="right")) - 1
    phi0 = inlet_composition(net, net.after, state.x, pipe_outlets(state.queues, len(net.fuels)))
    jump = np.abs(phi0 - rec.last_inlet_end).max(axis=1, keepdims=True) > _JUMP
    state.slope = np.where(jump, 0.0, state.slope)
    trial = _try_step(run, state, cache, seg, phi0)
    step, fm = trial.step, trial.fm
    h = step.h
    times, values = step_trace(net, step, state.x, state.queues, fm, t, state.grid,
                               run.output_step_h)
    mean = inlet_composition(net, net.after, step.stirred_mean, step.pipe_out[0])
    rec.add_step(times, values, mean, trial.consumption_m3h, h)
    x_new, vol_new = commit_step(step, state.x, state.volume_m3, net.is_tank, state.queues, fm)
    state.fronts = advance_fronts(state.fronts, net.pipe_volume_m3, fm, h)
    rec.add_state(t + h, vol_new, x_new)
    _check_dry(net, state.volume_m3, vol_new, fm, t)
    state.warnings += _capacity_warnings(net, vol_new, t + h, state.over_capacity)
    state.slope = 2.0 * (rec.last_inlet_end - rec.last_inlet_mean) / h
    state.x, state.volume_m3 = x_new, vol_new
    state.time_h, state.grid = _next_time(t, h, run.output_step_h)
    state.k = _next_exponent(trial.k, trial.error, h, trial.h_try, run.k_max)
    state.n_steps += 1


def _try_step(
    run: _Run, state: _State, cache: _PropagatorCache, seg: int, phi0: np.ndarray
) -> _Trial:
    """The next step, halved while its error is over twice the allowance (to the shortest)."""
    net = run.net
    t, k = state.time_h, state.k
    h_try = _trial_length_h(k, t, state.grid, run.output_step_h)
    seg_end = run.segment_bounds_h[seg + 1]
    rate = run.rates_t_h[seg]
    while True:
        phi_mid = phi0 + 0.5 * h_try * state.slope
        q, consumption = consumer_flows(net, rate, phi_mid, run.kappa_kg_m3, t)
        fm = flow_matrices(net, net.after, q)
        h = min(h_try, seg_end - t, run.end_h - t, next_arrival_h(state.fronts, fm.pipe_flow))
        h = max(h, _MIN_STEP_H)
        step = compute_step(state.x, state.queues, fm, cache.get(fm, q, state.volume_m3), h)
        err = _step_error(net, step, rate, consumption, run.kappa_kg_m3, run.tolerance)
        if err > 2.0 and k > _MIN_STEP_EXP and h >= 0.99 * h_try:
            k -= 1
            h_try = h_try / 2.0
            continue
        return _Trial(step, fm, consumption, h_try, err, k)


def _trial_length_h(k: int, time_h: float, grid: int | None, output_step_h: float) -> float:
    """``output_step · 2^k``; off the grid, no further than the next output time."""
    h_try = output_step_h * 2.0**k
    if grid is None:
        h_try = min(h_try, (math.floor(time_h / output_step_h + 1e-9) + 1) * output_step_h - time_h)
    return h_try


def _step_error(
    net: Network,
    step: StepResult,
    rate_t_h: np.ndarray,
    consumption_m3h: np.ndarray,
    kappa_kg_m3: np.ndarray,
    tolerance: float,
) -> float:
    """Step error over its allowance (1 = at tolerance; scales about as h²).

    Two parts: the cubic part of pipe inflows and outflows that the quadratic
    profiles leave out (against ``tolerance``, volume fraction), and the
    relative error of the frozen consumption flows against the mean inlet
    blend (against ``tolerance / 10``).
    """
    used = consumption_m3h > 0.0
    err = step.shape_error / tolerance
    if used.any():
        mean = inlet_composition(net, net.after, step.stirred_mean, step.pipe_out[0])
        actual = rate_t_h[used] * 1000.0 / (normalise(mean[used]) @ kappa_kg_m3)
        rel = float(np.abs(actual / consumption_m3h[used] - 1.0).max())
        err = max(err, rel / (0.1 * tolerance))
    return err


def _check_dry(
    net: Network, volume_m3: np.ndarray, new_volume_m3: np.ndarray, fm: FlowMatrices, t_h: float
) -> None:
    """Raise :class:`FlushError` when a tank ran dry during the step that started at ``t_h``."""
    dry = np.flatnonzero(net.is_tank & (new_volume_m3 < 0.0))
    if dry.size:
        i = int(dry[0])
        t_dry = t_h + volume_m3[i] / (fm.stirred_out[i] - fm.stirred_in[i])
        raise FlushError(f"tank {net.stirred[i]!r} runs dry at t = {t_dry:.3f} h")


def _capacity_warnings(
    net: Network, volume_m3: np.ndarray, t_h: float, warned: set[str]
) -> list[str]:
    """A warning for each tank first over its capacity at ``t_h`` (added to ``warned``)."""
    out = []
    for i in np.flatnonzero(net.is_tank & (volume_m3 > net.capacity_m3 * (1 + 1e-9))):
        if net.stirred[i] not in warned:
            warned.add(net.stirred[i])
            out.append(
                f"tank {net.stirred[i]!r} exceeds its capacity "
                f"{net.capacity_m3[i]:g} m³ at t = {t_h:.3f} h"
            )
    return out


def _next_time(time_h: float, h: float, output_step_h: float) -> tuple[float, int | None]:
    """The time after a step, snapped to the output grid when it ends on it, and its index."""
    t_new = time_h + h
    g = round(t_new / output_step_h)
    if abs(t_new - g * output_step_h) <= 1e-9 * output_step_h:
        return g * output_step_h, g
    return t_new, None


def _next_exponent(k: int, error: float, h: float, h_try: float, k_max: int) -> int:
    """Double the next trial step after an easy full step, halve it after one over tolerance."""
    if error < 0.1 and h >= 0.99 * h_try:
        return min(k + 1, k_max)
    if error > 1.0:
        return max(k - 1, _MIN_STEP_EXP)
    return k
