"""Results of a flushing simulation: inlet curves, crossing times, masses, tank states.

Array convention (as :mod:`planner.fuels`): the fuel (component) axis is the
**first** axis, time the second: ``fractions`` has shape (n_fuels, n_times).
Compositions are volume fractions at 15 °C; sulphur and density follow on a
mass basis ([LEVENSPIEL-1999] mass balance [D]): ``S = Σ φᵢρᵢSᵢ / Σ φᵢρᵢ``,
``ρ = Σ φᵢρᵢ`` (ideal mixing).

Crossing times are found on the recorded trace (every output time plus both
sides of every step end) by linear interpolation of the composition between
neighbours; since sulphur at or below a level is *linear* in the volume
fractions (``Σ φᵢρᵢ(Sᵢ − L) ≤ 0``), that root is exact for the interpolant,
and a front (two samples at one time) gives its time exactly.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass, field
from functools import cached_property
from types import MappingProxyType

import numpy as np

from planner.flushing.network import Network, Switch
from planner.flushing.record import Recorder
from planner.fuels import Fuel


def _sulphur(fr: np.ndarray, rho: np.ndarray, s: np.ndarray) -> np.ndarray:
    m = np.clip(fr, 0.0, None) * rho[:, None]
    return (m * s[:, None]).sum(0) / m.sum(0)


def crossing_h(t: np.ndarray, g: np.ndarray, settled: bool) -> float | None:
    """When a sampled excess ``g`` gets to 0 or below, on straight lines between samples.

    Parameters
    ----------
    t : ndarray (n,) [h]
        Sample times, increasing.
    g : ndarray (n,) [-]
        The excess over the level at each sample (any unit: only its sign and linear
        interpolation count).
    settled : bool
        True: the time from which ``g ≤ 0`` to the last sample; False: the first time.

    Returns
    -------
    float or None [h]
        None when never (``settled``: when above at the last sample).
    """
    above = g > 0.0
    if settled:
        if above[-1]:
            return None
        idx = np.flatnonzero(above)
        if idx.size == 0:
            return float(t[0])
        k = int(idx[-1]) + 1
    else:
        idx = np.flatnonzero(~above)
        if idx.size == 0:
            return None
        k = int(idx[0])
        if k == 0:
            return float(t[0])
    t0, t1, g0, g1 = t[k - 1], t[k], g[k - 1], g[k]
    if t1 <= t0 or g0 == g1:
        return float(t1)
    return float(t0 + (t1 - t0) * g0 / (g0 - g1))


@dataclass(frozen=True)
class InletCurve:
    """Fuel at one consumer's inlet against time.

    Attributes
    ----------
    consumer, circuit : str
    fuels : tuple of Fuel
        The distinct fuels, in the order of the first axis of the arrays.
    time_h : ndarray (n,)
        Output times, h after the switch.
    fractions : ndarray (F, n)
        Volume fractions of each fuel at the inlet.
    burnt_m3 : ndarray (F, n)
        Cumulative volume of each fuel burnt since the switch, m³ at 15 °C.
    trace_time_h, trace_fractions : ndarray (K,), (F, K)
        The finer record the crossing times are found on.
    """

    consumer: str
    circuit: str
    fuels: tuple[Fuel, ...]
    time_h: np.ndarray
    fractions: np.ndarray
    burnt_m3: np.ndarray
    trace_time_h: np.ndarray
    trace_fractions: np.ndarray

    @cached_property
    def _rho(self) -> np.ndarray:
        return np.array([f.density_kg_m3 for f in self.fuels])

    @cached_property
    def _s(self) -> np.ndarray:
        return np.array([f.sulphur_pct for f in self.fuels])

    @cached_property
    def _trace_clipped(self) -> np.ndarray:
        return np.clip(self.trace_fractions, 0.0, None)

    @property
    def sulphur_pct(self) -> np.ndarray:
        """Sulphur at the inlet, % m/m (n,)."""
        return _sulphur(self.fractions, self._rho, self._s)

    @property
    def density_kg_m3(self) -> np.ndarray:
        """Density of the inlet blend at 15 °C, kg/m³ (n,)."""
        return self._rho @ np.clip(self.fractions, 0.0, None)

    @property
    def mass_fractions(self) -> np.ndarray:
        """Mass fractions of each fuel at the inlet (F, n), for Refutas viscosity blending."""
        m = np.clip(self.fractions, 0.0, None) * self._rho[:, None]
        return m / m.sum(0)

    @cached_property
    def burnt_t(self) -> np.ndarray:
        """Cumulative mass of each fuel burnt since the switch, t (F, n)."""
        return self.burnt_m3 * self._rho[:, None] / 1000.0

    def burnt_until_t(self, time_h: float) -> np.ndarray:
        """Mass of each fuel burnt from the switch to ``time_h``, t (F,)."""
        volume = [np.interp(time_h, self.time_h, b) for b in self.burnt_m3]
        return np.array(volume) * self._rho / 1000.0

    def _g(self, level_pct: float) -> np.ndarray:
        return ((self._s - level_pct) * self._rho) @ self._trace_clipped

    def time_at_or_below_h(self, level_pct: float, settled: bool = True) -> float | None:
        """When inlet sulphur is at or below ``level_pct`` % m/m, h after the switch.

        ``settled=True``: from when it stays so until the horizon (None if it is
        above at the horizon); ``settled=False``: the first time it gets there.
        """
        return crossing_h(self.trace_time_h, self._g(level_pct), settled)

    def time_at_or_above_h(self, level_pct: float, settled: bool = True) -> float | None:
        """As :meth:`time_at_or_below_h`, for sulphur at or above ``level_pct`` (switching back)."""
        return crossing_h(self.trace_time_h, -self._g(level_pct), settled)


@dataclass(frozen=True)
class TankCurve:
    """A tank's level and composition against time (output times)."""

    name: str
    fuels: tuple[Fuel, ...]
    capacity_m3: float
    time_h: np.ndarray
    volume_m3: np.ndarray  # (n,)
    fractions: np.ndarray  # (F, n)

    @property
    def sulphur_pct(self) -> np.ndarray:
        """Sulphur of the tank content, % m/m (n,)."""
        rho = np.array([f.density_kg_m3 for f in self.fuels])
        return _sulphur(self.fractions, rho, np.array([f.sulphur_pct for f in self.fuels]))

    @property
    def content_m3(self) -> np.ndarray:
        """Volume of each fuel in the tank, m³ at 15 °C (F, n)."""
        return self.fractions * self.volume_m3


@dataclass(frozen=True)
class FlushResult:
    """Everything a simulation gives (see :func:`planner.flushing.simulate`).

    ``inventory_*_m3`` and ``burnt_m3`` are per fuel (F,) over the whole
    network (tanks, volumes and pipes): initial = final + burnt to round-off.

    ``end`` says why the record ends at ``time_h[-1]``: ``"horizon"`` (the time
    asked for), ``"settled"`` (every inlet at the level and nothing flowing
    above it, :mod:`planner.flushing.until`) or ``"tank_dry"`` (a tank ran dry
    after the inlets reached the level). ``tank_dry_h`` maps each tank that runs
    dry, in the simulation or after it at the final blend along the rest of the
    schedule, to that time [h after the switch]. ``schedule_read_h``: how far the
    consumption schedule was read [h after the switch]: the end of the record, or the
    longest horizon when the dry times were extended along the schedule.
    """

    fuels: tuple[Fuel, ...]
    switches: tuple[Switch, ...]
    time_h: np.ndarray
    inlets: Mapping[str, InletCurve]
    tanks: Mapping[str, TankCurve]
    inventory_initial_m3: np.ndarray
    inventory_final_m3: np.ndarray
    burnt_m3: np.ndarray
    warnings: tuple[str, ...]
    n_steps: int
    tank_dry_h: Mapping[str, float] = field(default_factory=lambda: MappingProxyType({}))
    end: str = "horizon"
    schedule_read_h: float = 0.0

    def circuit_inlets(self, circuit: str) -> list[InletCurve]:
        """The inlet curves of ``circuit``'s consumers."""
        return [c for c in self.inlets.values() if c.circuit == circuit]

    def time_to_h(self, circuit: str, level_pct: float, settled: bool = True) -> float | None:
        """When every inlet of ``circuit`` is at or below ``level_pct`` % m/m (None: not by
        the horizon): the latest of its consumers' times."""
        times = [c.time_at_or_below_h(level_pct, settled) for c in self.circuit_inlets(circuit)]
        return None if any(x is None for x in times) else max(times)  # type: ignore[type-var]

    def sulphur_t(self, volumes_m3: np.ndarray) -> float:
        """Mass of sulphur, t, in per-fuel volumes (F,) m³."""
        rho = np.array([f.density_kg_m3 for f in self.fuels])
        s = np.array([f.sulphur_pct for f in self.fuels])
        return float(np.sum(volumes_m3 * rho * s) / 100.0 / 1000.0)

    def sulphur_balance_t(self) -> tuple[float, float, float]:
        """Sulphur, t: (held at the start, held at the end, burnt). First = second + third."""
        return (
            self.sulphur_t(self.inventory_initial_m3),
            self.sulphur_t(self.inventory_final_m3),
            self.sulphur_t(self.burnt_m3),
        )


def build_result(
    net: Network,
    rec: Recorder,
    n_out: int,
    output_step_h: float,
    warnings: tuple[str, ...],
    n_steps: int,
    *,
    tank_dry_h: Mapping[str, float] | None = None,
    end: str = "horizon",
    schedule_read_h: float = 0.0,
) -> FlushResult:
    """Assemble a :class:`FlushResult` from the simulator's record.

    Parameters
    ----------
    net : Network
    rec : Recorder
        The record of every step.
    n_out : int [-]
        Number of output steps (the output times are ``0 … n_out·output_step_h``).
    output_step_h : float [h]
        Output step.
    warnings : tuple of str
        The simulation's warnings (a tank over its capacity).
    n_steps : int [-]
        Number of internal steps taken.
    tank_dry_h : mapping, optional [h]
        Tank name -> when it runs dry, h after the switch.
    end : str, default "horizon"
        Why the record ends (:class:`FlushResult`).
    schedule_read_h : float, default 0 [h]
        How far the schedule was read, if beyond the record.

    Returns
    -------
    FlushResult
        Inlet compositions at the output times are the trace's samples there
        (exact); burnt volumes and tank states are interpolated linearly
        between step ends (exact at them).
    """
    grid = np.arange(n_out + 1) * output_step_h
    trace_t, trace_phi = rec.trace()  # (K,), (sources, K, F)
    idx = np.searchsorted(trace_t, grid * (1 + 1e-12) + 1e-15, side="right") - 1
    step_t = np.array(rec.step_end_h)
    burnt = rec.burnt_m3()  # (steps + 1, C, F)
    n_c, n_f = burnt.shape[1], burnt.shape[2]
    tv, tx = np.array(rec.tank_volume_m3), np.array(rec.tank_fractions)
    tanks_i = np.flatnonzero(net.is_tank)
    at_grid = _interp_rows(grid, step_t, np.concatenate(
        (burnt.reshape(len(step_t), -1), tv[:, tanks_i], tx[:, tanks_i].reshape(len(step_t), -1)),
        axis=1))
    inlets = {}
    by_source: dict[int, tuple[np.ndarray, np.ndarray]] = {}  # consumers share a source's arrays
    for c, name in enumerate(net.consumers):
        k = int(rec.inlets.of_consumer[c])
        if k not in by_source:
            src = trace_phi[k]
            by_source[k] = (src.take(idx, axis=0).T, src.T)
        at_output, trace = by_source[k]
        b = at_grid[:, c * n_f : (c + 1) * n_f].T
        inlets[name] = InletCurve(
            name, net.consumer_circuit[c], net.fuels, grid, at_output, b, trace_t, trace
        )
    tanks = {}
    base = n_c * n_f
    for k, i in enumerate(tanks_i.tolist()):
        vol = at_grid[:, base + k]
        col = base + len(tanks_i) + k * n_f
        fr = at_grid[:, col : col + n_f].T
        tanks[net.stirred[i]] = TankCurve(
            net.stirred[i], net.fuels, float(net.capacity_m3[i]), grid, vol, fr
        )
    final = tv[-1] @ tx[-1] + rec.pipes.content_m3()
    return FlushResult(
        fuels=net.fuels,
        switches=net.switches,
        time_h=grid,
        inlets=MappingProxyType(inlets),
        tanks=MappingProxyType(tanks),
        inventory_initial_m3=rec.inventory_m3,
        inventory_final_m3=final,
        burnt_m3=burnt[-1].sum(0),
        warnings=warnings,
        n_steps=n_steps,
        tank_dry_h=MappingProxyType(dict(tank_dry_h or {})),
        end=end,
        schedule_read_h=max(float(schedule_read_h), float(step_t[-1])),
    )


def _interp_rows(x: np.ndarray, xp: np.ndarray, fp: np.ndarray) -> np.ndarray:
    """:func:`numpy.interp` of every column of ``fp`` (n, M), given at increasing ``xp``
    (n,), at ``x`` (m,): (m, M), all columns at once (the same formula:
    ``slope·(x − xp[j]) + fp[j]``, the end values outside ``xp``)."""
    n = len(xp)
    if n < 2:
        return np.repeat(fp[:1], len(x), axis=0)
    j = np.clip(np.searchsorted(xp, x, side="right") - 1, 0, n - 2)
    slopes = (fp[1:] - fp[:-1]) / (xp[1:] - xp[:-1])[:, None]  # per interval (n - 1, M)
    out = slopes.take(j, axis=0)
    out *= (x - xp.take(j))[:, None]
    out += fp.take(j, axis=0)
    out[x <= xp[0]] = fp[0]
    out[x >= xp[-1]] = fp[-1]
    return out
