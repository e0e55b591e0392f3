"""Sulphur and SO₂ burnt on a stretch, from the blend that actually reaches each inlet.

After a valve switch the inlets burn a blend of the old and the new fuel for
hours (the flush), so the sulphur burnt between two moments is the integral of
each consumer's burn rate × its inlet sulphur, not the new fuel's sulphur ×
the mass. The flushing model records, per inlet, the volume fractions φ_i at
every output time (a few seconds apart) and the cumulative volume burnt
(:class:`planner.flushing.result.InletCurve`), so the integral is summed on
those times (trapezoid):

    m_i(t₀, t₁) = ρ_i·Σ_k ΔB_k·(φ_i,k + φ_i,k+1)/2,    S(t₀, t₁) = Σ_i m_i·S_i / 100,

and SO₂ = 64.066/32.06 × S ([IUPAC-2021] [D]). Between switches a circuit
burns its valve's fuel alone (:meth:`planner.voyage.timeline.Timeline.burnt_t`).
When a stretch reaches past the simulated horizon of its flush and the inlets
have not settled on the new fuel (within :data:`SETTLED` of the step), the
flush is simulated further
(:meth:`planner.voyage.flush_cache.FlushCache.simulate`, up to
:data:`MAX_HORIZON_H` after the switch, or until a tank would run dry: the
simulation moves no fuel between tanks); beyond that the last inlet blend is
held. Moments are epoch seconds (``*_epoch_s``: seconds since 1970-01-01 UTC).
"""

from __future__ import annotations

import math
from collections.abc import Sequence

import numpy as np

from planner.flushing import FlushError, FlushResult, InletCurve, Switch
from planner.fuels import Fuel
from planner.voyage.changeovers import CircuitChange
from planner.voyage.flush_cache import FlushCache
from planner.voyage.timeline import Timeline

MAX_HORIZON_H = 96.0
"""Longest flush followed for the sulphur burnt, h after the switch (the plan's horizon)."""

SETTLED = 1e-3
"""An inlet within this share of the fuels' sulphur step from the new fuel has settled [-]."""

Period = tuple[float, float, Fuel, CircuitChange | None]
"""``(from_epoch_s, to_epoch_s, fuel, change)``: a circuit's valve on ``fuel`` from the switch
``change`` (None: since departure, no switch)."""


def _settled(res: FlushResult, part: CircuitChange) -> bool:
    """Every inlet of the circuit within :data:`SETTLED` of the step from the new fuel at the
    end of ``res`` (holding the last blend then changes the sulphur by less than that)."""
    fuels = {f.name: f.sulphur_pct for f in res.fuels}
    s_new, s_old = fuels.get(part.to_fuel), fuels.get(part.from_fuel)
    if s_new is None or s_old is None:
        return False
    step = abs(s_old - s_new)
    return all(abs(float(c.sulphur_pct[-1]) - s_new) <= SETTLED * step
               for c in res.circuit_inlets(part.circuit))


def _result_to(timeline: Timeline, flushes: FlushCache, part: CircuitChange,
               hours: float) -> FlushResult:
    """The flush of ``part`` followed at least ``hours`` after its switch where that matters:
    simulated further (doubling, capped at :data:`MAX_HORIZON_H`) until the inlets have
    settled or a tank would run dry (the simulation moves no fuel between tanks), else the
    longest flush that ran."""
    res = part.study.result
    end = float(res.time_h[-1])
    sched = timeline.consumption_from(part.start_epoch_s, MAX_HORIZON_H)
    switch = Switch(part.circuit, part.from_tank, part.to_tank)
    while hours > end + 1e-9 and end < MAX_HORIZON_H and not _settled(res, part):
        horizon = min(max(2.0 * end, 1.0), MAX_HORIZON_H, float(math.ceil(hours)))
        try:
            res = flushes.simulate(timeline.system, switch, sched, horizon)
        except FlushError:
            break
        end = float(res.time_h[-1])
    return res


def burnt_by_fuel_t(timeline: Timeline, flushes: FlushCache, circuit: str, period: Period,
                    from_epoch_s: float, to_epoch_s: float) -> dict[str, float]:
    """Mass of each fuel a circuit's consumers burn between two moments of one valve period, t.

    Parameters
    ----------
    timeline : Timeline
        The voyage's timeline.
    flushes : FlushCache
        The plan's flushes (a longer flush is simulated through it).
    circuit : str
        The circuit.
    period : Period
        The valve period holding both moments.
    from_epoch_s, to_epoch_s : float [s]
        The moments, seconds since 1970-01-01 UTC (nothing when not in order).

    Returns
    -------
    dict of str to float [t]
        By fuel name.
    """
    _, _, fuel, part = period
    if to_epoch_s <= from_epoch_s:
        return {}
    consumers = timeline.system.circuits[circuit].consumers
    if part is None:
        return {fuel.name: timeline.burnt_t(from_epoch_s, to_epoch_s, fuel, consumers)}
    h0 = (from_epoch_s - part.start_epoch_s) / 3600.0
    h1 = (to_epoch_s - part.start_epoch_s) / 3600.0
    res = _result_to(timeline, flushes, part, h1)
    end_h = float(res.time_h[-1])
    out: dict[str, float] = {}
    inlets = res.circuit_inlets(circuit)
    for inlet in inlets:
        m = _inlet_burnt_t(inlet, min(h0, end_h), min(h1, end_h))
        for f, x in zip(inlet.fuels, m, strict=True):
            out[f.name] = out.get(f.name, 0.0) + float(x)
    if h1 > end_h:  # past the longest flush followed: the last blend held
        tail_from = part.start_epoch_s + max(h0, end_h) * 3600.0
        tail = timeline.burnt_t(tail_from, to_epoch_s, fuel, consumers)
        mf = np.mean([c.mass_fractions[:, -1] for c in inlets], axis=0)
        for f, x in zip(inlets[0].fuels, mf, strict=True):
            out[f.name] = out.get(f.name, 0.0) + float(x) * tail
    return out


def _inlet_burnt_t(inlet: InletCurve, h0: float, h1: float) -> np.ndarray:
    """Mass of each fuel one consumer burns from ``h0`` to ``h1`` h after the switch, t (F,):
    the volume it burns in each output interval (the recorded total, exact) split by the
    inlet's volume fractions (trapezoid on the output times, every few seconds)."""
    if h1 <= h0:
        return np.zeros(len(inlet.fuels))
    t = inlet.time_h
    inner = t[(t > h0) & (t < h1)]
    grid = np.concatenate([[h0], inner, [h1]])
    total = np.interp(grid, t, inlet.burnt_m3.sum(axis=0))
    fr = np.array([np.interp(grid, t, f) for f in np.clip(inlet.fractions, 0.0, None)])
    fr = fr / fr.sum(axis=0)
    vol = (0.5 * (fr[:, 1:] + fr[:, :-1]) * np.diff(total)).sum(axis=1)
    rho = np.array([f.density_kg_m3 for f in inlet.fuels])
    return vol * rho / 1000.0


def sulphur_burnt_t(masses_t: dict[str, float], fuels: dict[str, Fuel]) -> float:
    """Sulphur in the masses burnt, t: Σ m_i·S_i/100.

    Parameters
    ----------
    masses_t : dict of str to float [t]
        Mass of each fuel, by name.
    fuels : dict of str to Fuel
        The fuels by name (their sulphur, % m/m).

    Examples
    --------
    >>> from planner.fuels import Fuel
    >>> f = {"a": Fuel(name="a", grade="DMA", sulphur_pct=0.1, density_kg_m3=850.0,
    ...                viscosity_cst=3.0, viscosity_ref_c=40.0)}
    >>> round(sulphur_burnt_t({"a": 10.0}, f), 6)
    0.01
    """
    return sum(m * fuels[n].sulphur_pct / 100.0 for n, m in masses_t.items())


def stretch_burnt_t(timeline: Timeline, flushes: FlushCache, periods: Sequence[tuple[str, Period]],
                    from_epoch_s: float, to_epoch_s: float) -> dict[str, float]:
    """Mass of each fuel burnt by every circuit between two moments, t, by fuel name.

    Parameters
    ----------
    timeline : Timeline
        The voyage's timeline.
    flushes : FlushCache
        The plan's flushes.
    periods : sequence of (str, Period)
        Every circuit's valve periods, ``(circuit, period)``.
    from_epoch_s, to_epoch_s : float [s]
        The stretch's moments, seconds since 1970-01-01 UTC.
    """
    out: dict[str, float] = {}
    for circuit, period in periods:
        a, b = max(period[0], from_epoch_s), min(period[1], to_epoch_s)
        for name, m in burnt_by_fuel_t(timeline, flushes, circuit, period, a, b).items():
            out[name] = out.get(name, 0.0) + m
    return out
