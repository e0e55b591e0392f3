"""The flushing simulation: from the switch of the changeover valve to the horizon.

Method ([LEVENSPIEL-1999] for the models: the well-stirred washout [D] and
plug flow as a pure delay [P]):

- the system starts in the steady state it had before the switch, the valve
  on the from-tank (tanks keep their stated content,
  :func:`~planner.flushing.flows.steady_state`);
- at t = 0 the valves switch; time advances in steps with the link flows held
  over each step (:mod:`planner.flushing.step`: exact exponential for stirred
  volumes, parcels for plug flow, exact bookkeeping of every fuel);
- flows follow the consumers' volumetric draw ``v = m / ρ_inlet`` (mass basis),
  evaluated at the inlet blend predicted for the middle of the step
  (:mod:`planner.flushing.trial`; every flow-weighted matrix of the step comes
  from one product, :mod:`planner.flushing.flowmap`);
- step ends fall on the output grid, on every change of consumption and on
  the arrival of every sharp front at a pipe outlet
  (:mod:`planner.flushing.fronts`), so plug-flow delays are exact; the step
  length adapts to an error estimate (the cubic part a pipe's quadratic
  parcel profile misses, and the error of the frozen flows);
- every consumer inlet is recorded at each output time and at every step end
  (both sides of a front, :mod:`planner.flushing.record`: the step ends as the
  simulation goes, the output times inside steps once it is done), so
  crossing times are found on the exact solution between samples at most one
  output step apart.

The propagators depend on the stirred volumes' system matrix and the step
length only (:class:`~planner.flushing.step.PropagatorCache`): while the
stirred volumes' own flows do not change, a step length met before costs no
exponential at all, and a doubled one a single doubling.
"""
from __future__ import annotations

import bisect
import math
from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np

from planner.flushing.flowmap import FlowMap, Flows
from planner.flushing.flows import FlushError, TankDry, steady_state
from planner.flushing.fronts import Fronts, advance_fronts, initial_fronts
from planner.flushing.network import STIRRED, Network, Switch, compile_network
from planner.flushing.pipes import PipeSet
from planner.flushing.record import Inlets, Recorder
from planner.flushing.result import FlushResult, build_result
from planner.flushing.schedule import ConsumptionSchedule
from planner.flushing.step import PropagatorCache, StepResult, dense_start
from planner.flushing.trial import (
    INITIAL_STEP_EXP,
    Run,
    Start,
    next_exponent,
    try_step,
)
from planner.flushing.until import Until, Watch, run_dry_after_h
from planner.ship.system import FuelSystem

__all__ = ["FlushError", "Until", "simulate"]

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
    until: Until | None = None,
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
    until : Until, optional
        Stop at the first output time at which the circuit's inlets are at the
        level and nothing still flowing upstream is above it
        (:mod:`planner.flushing.until`); ``horizon_h`` is then the longest
        simulated time. A tank running dry after the inlets reached the level
        ends the simulation there instead of refusing it; either way
        :attr:`FlushResult.tank_dry_h` gives when each tank runs (or would run,
        at the final blend along the rest of the schedule) dry.

    Returns
    -------
    FlushResult
        Inlet curves (volume fractions [-], burnt volumes [m³]) and tank
        states at every output time [h], with the inventories [m³].

    Raises
    ------
    FlushError
        When a tank runs dry (before the inlets reach the level, with ``until``)
        or a link flow would turn negative.
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
    cache = PropagatorCache(run.output_step_h)
    watch = None if until is None else Watch(until, net, run.inlets.of_consumer)
    n_out, end, dry = run.n_out, "horizon", {}
    while state.time_h < run.end_h - 1e-12 * run.end_h:
        try:
            _advance(run, state, rec, cache)
        except TankDry as exc:
            if watch is None or watch.reached_h is None:
                raise FlushError(str(exc) if watch is None else
                                 f"{exc}, before every inlet of circuit {until.circuit!r} "
                                 f"is at {until.level_pct:.3f} % m/m") from None
            dry[exc.tank] = exc.time_h
            n_out, end = math.floor(state.time_h / run.output_step_h + 1e-9), "tank_dry"
            break
        if watch is not None and state.grid is not None and _over(watch, state):
            n_out, end = state.grid, "settled"
            break
    read_h = 0.0
    if watch is not None:
        read_h = run.end_h
        if until.dry_within_h is not None:
            read_h = min(read_h, max(state.time_h, until.dry_within_h))
        dry = {**run_dry_after_h(run, state.inlet[run.inlets.of_consumer], state.volume_m3,
                                 state.time_h, read_h), **dry}
    warnings = tuple(state.warnings)
    return build_result(net, rec, n_out, run.output_step_h, warnings, state.n_steps,
                        tank_dry_h=dry, end=end,
                        schedule_read_h=read_h)


def _over(watch: Watch, state: _State) -> bool:
    """At an output time: is the flush over (:meth:`Watch.over`)?"""
    return watch.over(state.time_h, state.inlet, state.x, state.stirred_out_m3h, state.pipes,
                      state.pipe_flow_m3h)


def _settings(
    net: Network,
    schedule: ConsumptionSchedule,
    horizon_h: float,
    output_step_s: float,
    tolerance: float,
    max_step_h: float,
) -> Run:
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
    bounds = [t for t in schedule.times_h if t < end_h] + [end_h]
    kappa = net.draw_density_kg_m3(schedule.basis)
    routing = net.after
    into = routing.dst[routing.dst_kind == STIRRED]
    filled = np.array(sorted(set(into[net.is_tank[into]].tolist())), dtype=int)  # as np.unique
    return Run(
        net=net,
        rates_t_h=rates,
        bounds_h=bounds,
        kappa_kg_m3=kappa,
        draw_kg_m3=np.stack((kappa, np.ones_like(kappa)), axis=1),
        output_step_h=h_out,
        n_out=n_out,
        end_h=end_h,
        tolerance=tolerance,
        k_max=k_max,
        flow_map=FlowMap(net, routing, net.stirred_volume_m3),
        inlets=Inlets(net),
        used=tuple(None if np.all(r > 0.0) else np.flatnonzero(r > 0.0) for r in rates),
        rates_kg_h=tuple((r * 1000.0).tolist() for r in rates),
        kappa=kappa.tolist(),
        tanks=np.flatnonzero(net.is_tank),
        tank_list=np.flatnonzero(net.is_tank).tolist(),
        tank_capacity_m3=net.capacity_m3[net.is_tank].tolist(),
        filled=filled,
    )


@dataclass
class _State:
    """The simulation as it advances."""

    time_h: float
    grid: int | None  # index of the output time at time_h (None: between output times)
    x: np.ndarray  # (S, F) stirred compositions
    volume_m3: np.ndarray  # (S,) stirred volumes
    pipes: PipeSet
    fronts: Fronts
    inlet: np.ndarray  # (n_sources, F) composition at each source now (right limits)
    last_end: np.ndarray  # (n_sources, F) compositions at the end of the last step (left limits)
    jump: float  # largest difference between the right and left limits of the last step end [-]
    slope: np.ndarray  # (C, F) predicted rate of change of each inlet, 1/h
    k: int  # next trial step: output step · 2^k
    warnings: list[str]
    over_capacity: set[str]  # tanks already warned about
    n_steps: int = 0
    # the last step's outflows (S,) and pipe flows (P,): views of the flow map's buffer, which
    # holds them until the next step's flows
    stirred_out_m3h: np.ndarray | None = None
    pipe_flow_m3h: np.ndarray | None = None


def _start(run: Run) -> tuple[_State, Recorder]:
    """The state at the switch: the steady state before it, fronts at changed pipe inlets."""
    net = run.net
    x, pipe0 = steady_state(net, run.rates_t_h[0], run.kappa_kg_m3)
    vol = net.stirred_volume_m3.copy()
    pipes = PipeSet(net.pipe_volume_m3, pipe0)
    rec = Recorder(run.inlets, x, vol, pipes, run.output_step_h)
    fronts = initial_fronts(net, run.rates_t_h[0], run.kappa_kg_m3, x, pipe0)
    inlet = run.inlets.values(x, pipe0)
    slope = np.zeros_like(inlet[run.inlets.of_consumer])
    state = _State(0.0, 0, x, vol, pipes, fronts, inlet, inlet, 0.0, slope, INITIAL_STEP_EXP, [],
                   set())
    return state, rec


def _advance(run: Run, state: _State, rec: Recorder, cache: PropagatorCache) -> None:
    """One step: try it, commit it, record it, check the tanks, choose the next length."""
    t = state.time_h
    seg = bisect.bisect_right(run.bounds_h, t * (1 + 1e-13) + 1e-15) - 1
    of_consumer = run.inlets.of_consumer
    phi0 = state.inlet.take(of_consumer, axis=0)
    if state.jump > _JUMP:  # a front reached an inlet
        change = np.abs(phi0 - state.last_end[of_consumer])
        state.slope = np.where(change.max(axis=1, keepdims=True) > _JUMP, 0.0, state.slope)
    at = Start(t, state.grid, state.k, seg, phi0, state.slope)
    trial = try_step(run, at, state.x, state.volume_m3, state.pipes, state.fronts, cache)
    step, fl = trial.step, trial.flows
    h = step.h
    x_new, vol_new = _commit_stirred(run, state, step, fl)
    _check_tanks(run, state, vol_new, fl, t, t + h)
    qp, through = fl.pipe_flow, trial.through_m3
    interior = _interior(h, state.grid, run.output_step_h)
    if interior and run.inlets.stirred.size:
        g = np.matmul(fl.bp, step.outflow)  # into the stirred
        dense = trial.props.dense(dense_start(state.x, g, h), interior)
        rec.add_dense(dense[:, run.inlets.stirred])
    parcels = step.inflow[:3].transpose(1, 0, 2)
    state.pipes.push(through, parcels, trial.every)
    through_list = through.tolist()
    end, inlet = run.inlets.ends(step, state.pipes, x_new, through_list)
    rec.add(t, h, interior, state.inlet, end, qp, parcels)
    state.pipes.advance(through)
    state.fronts = advance_fronts(state.fronts, run.net.pipe_volume_m3, through_list,
                                  fl.into_pipes[:, len(run.net.stirred):])
    rec.add_state(h * trial.consumption_m3h, trial.inlet_mean, vol_new, x_new)
    state.stirred_out_m3h, state.pipe_flow_m3h = fl.stirred_out, qp
    state.last_end = end
    state.jump = 0.0 if end is inlet else float(np.maximum.reduce(np.abs(inlet - end), axis=None))
    shape = trial.inlet_shape  # d/dt at s = 1 of its Legendre profile:
    state.slope = (2.0 / h) * shape[0] + (6.0 / h) * shape[1]
    state.inlet, state.x, state.volume_m3 = inlet, x_new, vol_new
    state.time_h, state.grid = _next_time(t, h, run.output_step_h)
    state.k = next_exponent(trial.k, trial.error, h, trial.h_try, run.k_max)
    state.n_steps += 1


def _interior(h: float, grid: int | None, output_step_h: float) -> int:
    """How many output times lie inside a step of ``h`` hours (none when it starts off the
    grid: it then ends on the next output time)."""
    if grid is None:
        return 0
    return max(0, math.ceil(h / output_step_h - 1e-9) - 1)


def _commit_stirred(
    run: Run, state: _State, step: StepResult, fl: Flows
) -> tuple[np.ndarray, np.ndarray]:
    """The stirred compositions (S, F) and volumes (S,) at the step end.

    From the content ``V·x0 + h·(Σ q_in·mean_in − q_out·mean_x)`` over the new
    volume: every fuel is conserved to round-off however long the step
    ([LEVENSPIEL-1999] mass balance [D]); tanks move by ``h·(q_in − q_out)``.
    """
    h, mean = step.h, step.moments[1]
    content = fl.balance.dot(np.concatenate((mean, step.outflow[0])))  # the gain, m³/h
    content *= h
    content += state.volume_m3[:, None] * state.x
    volume = state.volume_m3 + h * fl.tank_net
    if float(np.minimum.reduce(volume)) > 0.0:
        content /= volume[:, None]
        return content, volume
    with np.errstate(invalid="ignore", divide="ignore"):
        return np.where(volume[:, None] > 0.0, content / volume[:, None], state.x), volume


def _check_tanks(
    run: Run, state: _State, volume_m3: np.ndarray, fl: Flows, t_h: float, t_end_h: float
) -> None:
    """Raise :class:`TankDry` when a tank would run dry during the step from ``t_h`` (before
    anything of the step is recorded); warn once for each tank first over its capacity at
    its end ``t_end_h``."""
    net = run.net
    vt = volume_m3[run.tanks].tolist()
    for i, v in zip(run.tank_list, vt, strict=True):
        if v < 0.0:
            t_dry = t_h + state.volume_m3[i] / (fl.stirred_out[i] - fl.stirred_in[i])
            raise TankDry(net.stirred[i], t_dry)
    for i, v, cap in zip(run.tank_list, vt, run.tank_capacity_m3, strict=True):
        if v > cap * (1 + 1e-9) and net.stirred[i] not in state.over_capacity:
            state.over_capacity.add(net.stirred[i])
            state.warnings.append(
                f"tank {net.stirred[i]!r} exceeds its capacity {cap:g} m³ at t = {t_end_h:.3f} h"
            )


def _next_time(time_h: float, h: float, output_step_h: float) -> tuple[float, int | None]:
    """The time after a step, snapped to the output grid when it ends on it, and its index."""
    t_new = time_h + h
    g = round(t_new / output_step_h)
    if abs(t_new - g * output_step_h) <= 1e-9 * output_step_h:
        return g * output_step_h, g
    return t_new, None
