"""One trial step of the flushing simulation: its flows, its length, its error.

The flows of a step follow the consumers' volumetric draw ``v = m / ρ_inlet``
(mass basis), evaluated at the inlet blend predicted for the middle of the
step (:mod:`planner.flushing.flows`); the step ends no later than the next
change of consumption, the horizon and the arrival of a sharp front at a pipe
outlet (:mod:`planner.flushing.fronts`), so plug-flow delays are exact. Its
error over the allowance has two parts: the cubic part a pipe's quadratic
parcel profile misses (against ``tolerance``, volume fraction), and the
relative error of the frozen flows against the draw at the step's mean inlet
blend (against ``tolerance / 10``); a step over twice the allowance is halved
and tried again.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import NamedTuple

import numpy as np

from planner.flushing.flowmap import FlowMap, Flows
from planner.flushing.fronts import Fronts, next_arrival_h
from planner.flushing.network import Network
from planner.flushing.pipes import PipeSet, fresh_maps_of
from planner.flushing.record import Inlets
from planner.flushing.step import (
    PropagatorCache,
    Propagators,
    Shares,
    StepResult,
    compute_step,
    shares_of,
)

NO_FLOW_M3H = 1e-14  # a pipe with less flow than this is still [m³/h]
INITIAL_STEP_EXP = 0  # the first trial step is the output step (a front too sharp halves it)
_DOUBLE_BELOW = 0.1  # error over the allowance under which the next trial step doubles
_MIN_STEP_EXP = -10  # shortest step: output step · 2^-10
_MIN_STEP_H = 1e-12
_TANK_REFRESH = 0.005  # relative change of a filled tank's volume before rebuilding propagators


@dataclass(frozen=True)
class Run:
    """What stays fixed over a simulation (``flow_map`` holds the propagators' volumes)."""

    net: Network
    rates_t_h: np.ndarray  # (segments, C)
    bounds_h: list[float]  # the segment starts before the end, then the end
    kappa_kg_m3: np.ndarray  # (F,) what one m³ of each fuel counts for against the rates
    draw_kg_m3: np.ndarray  # (F, 2): that, and 1 (the fractions' sum)
    output_step_h: float
    n_out: int
    end_h: float
    tolerance: float
    k_max: int  # longest step: output step · 2^k_max
    flow_map: FlowMap
    inlets: Inlets
    used: tuple[np.ndarray | None, ...]  # per segment, the consumers with a rate (None: all)
    rates_kg_h: tuple[list[float], ...]  # per segment, the consumers' rates as floats
    kappa: list[float]  # kappa_kg_m3 as floats
    tanks: np.ndarray  # indices of the tanks among the stirred nodes
    tank_list: list[int]  # the same, as ints
    tank_capacity_m3: list[float]  # their capacities [m³]
    filled: np.ndarray  # indices of the tanks some link may fill


class Trial(NamedTuple):
    """An accepted step, not yet committed, with what chose its length."""

    step: StepResult
    flows: Flows
    props: Propagators
    consumption_m3h: np.ndarray  # (C,)
    inlet_mean: np.ndarray  # (C, F) mean inlet composition over the step
    inlet_shape: np.ndarray  # (2, C, F) its Legendre slope and curvature over the step
    h_try: float  # the trial length it was cut from, h
    error: float  # over the allowance
    k: int  # the step exponent after any halving
    through_m3: np.ndarray  # (P,) volume each pipe passes (0 for one that does not flow)
    every: bool  # every pipe flows


class Start(NamedTuple):
    """Where a step starts."""

    time_h: float
    grid: int | None  # index of the output time at time_h (None: between output times)
    k: int  # trial step: output step · 2^k
    segment: int  # the consumption segment in force
    inlet: np.ndarray  # (C, F) composition at each consumer inlet (right limits)
    slope: np.ndarray  # (C, F) its predicted rate of change, 1/h


def try_step(
    run: Run, at: Start, x: np.ndarray, volume_m3: np.ndarray, pipes: PipeSet, fronts: Fronts,
    cache: PropagatorCache,
) -> Trial:
    """The next step from ``at``, halved while its error is over twice the allowance.

    Parameters
    ----------
    run : Run
        What stays fixed over the simulation.
    at : Start
        Where the step starts: time [h], output index, trial exponent,
        consumption segment, inlet compositions [-] and their slopes [1/h].
    x : ndarray (S, F) [-]
        Stirred compositions at the step start.
    volume_m3 : ndarray (S,) [m³]
        Stirred volumes at the step start.
    pipes : PipeSet
        The pipes' content (read, not changed).
    fronts : list of list of float [m³]
        Per pipe, the distances of its sharp fronts from the outlet.
    cache : PropagatorCache
        The propagators computed so far.

    Returns
    -------
    Trial
        The step (:func:`~planner.flushing.step.compute_step`) with its flows
        [m³/h], draws [m³/h], mean inlet blend [-], and its error over the
        allowance [-]: the cubic part a quadratic parcel profile misses
        (against ``tolerance``) and the relative error of the frozen flows
        (against ``tolerance / 10``).
    """
    k, t = at.k, at.time_h
    h_try = _trial_length_h(k, t, at.grid, run.output_step_h)
    limit_h = run.bounds_h[at.segment + 1] - t
    rate = run.rates_kg_h[at.segment]
    s = len(run.net.stirred)
    inlet, slope = at.inlet.tolist(), at.slope.tolist()
    while True:
        drawn = _draws(rate, inlet, run.kappa, slope, 0.5 * h_try)
        consumption = np.array(drawn)
        fl = run.flow_map.flows(consumption, t)
        if run.filled.size and _refresh(run, volume_m3, fl.stirred_in):
            fl = run.flow_map.flows(consumption, t)
        qp = fl.pipe_flow.tolist()
        h = max(min(h_try, limit_h, next_arrival_h(fronts, qp)), _MIN_STEP_H)
        props = cache.get(fl.a)
        every = not qp or min(qp) > NO_FLOW_M3H  # every pipe flows
        shares, checked = _shares(run, fl, every, s)
        through, known, fresh = _pipe_windows(run.net.pipe_volume_m3, pipes, fl.pipe_flow, h,
                                              every)
        step = compute_step(x, known, fresh, fl.bp, shares, props.maps(h), checked)
        legendre = run.inlets.at_consumers(step.moments[1:4], step.outflow)  # (3, C, F)
        mean = legendre[0]
        err = max(step.shape_error / run.tolerance, _flow_error(run, at.segment, drawn, mean))
        if err > 2.0 and k > _MIN_STEP_EXP and h >= 0.99 * h_try:
            k -= 1
            h_try = h_try / 2.0
            continue
        return Trial(step, fl, props, consumption, mean, legendre[1:], h_try, err, k, through,
                     every)


def draw_m3h(rate_kg_h: np.ndarray, phi: np.ndarray, kappa: np.ndarray) -> np.ndarray:
    """Volumetric draw of each consumer at its inlet blend, ``v = m·(φ·1)/(φ·κ)``.

    Parameters
    ----------
    rate_kg_h : ndarray (C,) [kg/h]
        The consumers' rates.
    phi : ndarray (C, F) [-]
        Volume fractions of the fuels at each inlet.
    kappa : ndarray (F, 2) [kg/m³]
        What one m³ of each fuel counts for against the rates, and 1 (the fractions' sum).

    Returns
    -------
    ndarray (C,) [m³/h]
        The draws ([LEVENSPIEL-1999] mass balance [D]).
    """
    d = np.maximum(phi, 0.0).dot(kappa)
    return rate_kg_h * d[:, 1] / d[:, 0]


def _draws(rate_kg_h: list[float], phi: list[list[float]], kappa: list[float],
           slope: list[list[float]] | None = None, dt_h: float = 0.0) -> list[float]:
    """:func:`draw_m3h` on floats (a handful of consumers and fuels: cheaper than arrays),
    at ``φ + dt·slope`` when a slope is given.

    Parameters
    ----------
    rate_kg_h : list of float (C) [kg/h]
        The consumers' rates.
    phi : list of list of float (C, F) [-]
        Volume fractions of the fuels at each inlet.
    kappa : list of float (F) [kg/m³]
        What one m³ of each fuel counts for against the rates.
    slope : list of list of float (C, F), optional [1/h]
        Rate of change of ``phi``.
    dt_h : float, default 0 [h]
        How far along ``slope`` the draws are taken.

    Returns
    -------
    list of float (C) [m³/h]
        The draws, ``m·Σφ⁺/Σφ⁺·κ`` (``φ⁺ = max(φ, 0)``).
    """
    out = []
    if len(kappa) == 2:  # two fuels, the common case, written out
        if slope is not None:
            phi = [[a0 + dt_h * b0, a1 + dt_h * b1]
                   for (a0, a1), (b0, b1) in zip(phi, slope, strict=True)]
        k0, k1 = kappa
        for r, (p0, p1) in zip(rate_kg_h, phi, strict=True):
            p0 = p0 if p0 > 0.0 else 0.0
            p1 = p1 if p1 > 0.0 else 0.0
            mass = p0 * k0 + p1 * k1
            out.append(r * (p0 + p1) / mass if mass else math.nan)
        return out
    if slope is not None:
        phi = [[a + dt_h * b for a, b in zip(ra, rb, strict=True)]
               for ra, rb in zip(phi, slope, strict=True)]
    for r, row in zip(rate_kg_h, phi, strict=True):
        mass = volume = 0.0
        for p, k in zip(row, kappa, strict=True):
            if p > 0.0:
                mass += p * k
                volume += p
        out.append(r * volume / mass if mass else math.nan)
    return out


def _refresh(run: Run, volume_m3: np.ndarray, stirred_in_m3h: np.ndarray) -> bool:
    """Hold a filled tank's new volume once it has moved by more than 0.5 % since it was
    last held (its dilution rate is q / V); True when one was."""
    t = run.filled
    held = run.flow_map.volume_m3
    moved = (stirred_in_m3h[t] > 0.0) & (np.abs(volume_m3[t] - held[t]) > _TANK_REFRESH * held[t])
    if not moved.any():
        return False
    held = held.copy()
    held[t[moved]] = volume_m3[t[moved]]
    run.flow_map.set_volumes(held)
    return True


def _shares(run: Run, fl: Flows, every: bool, s: int) -> tuple[Shares, np.ndarray]:
    """Each pipe's inflow shares (:class:`~planner.flushing.step.Shares`), and which pipes'
    cubic parts count (2, P): of the inflow of all (that flow), of the outflow of those
    feeding a stirred volume."""
    qp = fl.pipe_flow
    checked = np.empty((2, len(qp)))
    checked[0] = 1.0
    np.heaviside(fl.pipe_to_stirred, 0.0, out=checked[1])
    if every:
        if run.flow_map.single_inflow:
            return run.flow_map.unit_shares, checked
        return shares_of(fl.into_pipes / qp[:, None], s), checked
    flowing = qp > NO_FLOW_M3H
    np.heaviside(qp - NO_FLOW_M3H, 0.0, out=checked[0])
    checked[1] *= checked[0]
    inv = np.divide(1.0, qp, out=np.zeros_like(qp), where=flowing)
    return shares_of(fl.into_pipes * inv[:, None], s), checked


def _pipe_windows(
    volume_m3: np.ndarray, pipes: PipeSet, pipe_flow_m3h: np.ndarray, h: float, every: bool,
) -> tuple[np.ndarray, np.ndarray, np.ndarray | None]:
    """The volume each pipe passes over the step (P,) [m³], what the parcels now in the
    pipes deliver (P, 4, F), and the map of the rest (P, 4, 3), None when no pipe passes
    more than its volume."""
    through = pipe_flow_m3h * h
    if every:
        known = pipes.window(np.minimum(volume_m3, through), 1.0 / through)
    else:
        flowing = pipe_flow_m3h > NO_FLOW_M3H
        inv = np.divide(1.0, through, out=np.zeros_like(through), where=flowing)
        through = through * np.heaviside(pipe_flow_m3h - NO_FLOW_M3H, 0.0)
        known = pipes.window(np.minimum(volume_m3, through), inv)
        known[~flowing, 0] = pipes.outlets()[~flowing]
    return through, known, fresh_maps_of(volume_m3.tolist(), through.tolist())


def _flow_error(run: Run, segment: int, consumption_m3h: list[float], inlet_mean: np.ndarray
                ) -> float:
    """Relative error of the frozen consumption flows (C) m³/h against the draw at the
    step's mean inlet blend (C, F), over its allowance (a tenth of the tolerance)."""
    used = run.used[segment]
    rate, mean = run.rates_kg_h[segment], inlet_mean.tolist()
    if used is not None:
        if not used.size:
            return 0.0
        keep = used.tolist()
        rate = [rate[i] for i in keep]
        mean = [mean[i] for i in keep]
        consumption_m3h = [consumption_m3h[i] for i in keep]
    actual = _draws(rate, mean, run.kappa)
    rel = [abs(a / c - 1.0) for a, c in zip(actual, consumption_m3h, strict=True)]
    return max(rel) / (0.1 * run.tolerance)


def _trial_length_h(k: int, time_h: float, grid: int | None, output_step_h: float) -> float:
    """``output_step · 2^k``; off the grid, no further than the next output time."""
    h_try = output_step_h * 2.0**k
    if grid is None:
        h_try = min(h_try, (math.floor(time_h / output_step_h + 1e-9) + 1) * output_step_h - time_h)
    return h_try


def next_exponent(k: int, error: float, h: float, h_try: float, k_max: int) -> int:
    """Double the next trial step after an easy full step, halve it after one over tolerance.

    A step under a tenth of its allowance is doubled. The error estimate grows
    about fourfold when the step doubles (the frozen flows' error goes as h²,
    measured on the test ships), so the doubled step is expected at about 0.4
    of it; a looser rule (0.2) puts a closed-form test's flush 3 s off.

    Parameters
    ----------
    k : int [-]
        The step's exponent (its trial length was output step · 2^k).
    error : float [-]
        Its error over the allowance.
    h : float [h]
        Its length.
    h_try : float [h]
        Its trial length.
    k_max : int [-]
        The exponent of the longest step.

    Returns
    -------
    int [-]
        The next step's exponent.
    """
    if error < _DOUBLE_BELOW and h >= 0.99 * h_try:
        return min(k + 1, k_max)
    if error > 1.0:
        return max(k - 1, _MIN_STEP_EXP)
    return k
