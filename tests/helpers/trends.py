"""Synthetic inlet trends from a known ship, for the calibration tests and the sample.

The blend at the inlet comes from the flushing simulation of the *true* system;
its viscosity at a temperature that changes along the changeover (the heater
control bringing the distillate to its window) comes from the published rules
applied forwards, not from the calibration's inverse: each fuel's viscosity at
that temperature by [ASTM-D341] (``Fuel.viscosity_at``) and the blend by
[MAPLES-2000] Refutas (``planner.fuels.refutas.blend_viscosity_cst``, mass
fractions). Noise is relative (a viscometer's reading error), a gap removes
lines, a spike multiplies one reading.
"""

from __future__ import annotations

from datetime import UTC, datetime, timedelta
from pathlib import Path

import numpy as np

from planner.flushing import ConsumptionSchedule, make_switch, schedule_at, simulate
from planner.fuels.refutas import blend_viscosity_cst
from planner.ship.system import FuelSystem

SWITCH_UTC = datetime(2027, 5, 30, 4, 0, tzinfo=UTC)


def inlet_trend(system: FuelSystem, *, circuit: str = "main", from_tank: str = "vlsfo_service",
                to_tank: str = "mgo_service", inlet: str = "main_engine", end_h: float = 3.0,
                step_min: float = 1.0, noise: float = 0.01, gap_h: tuple[float, float] | None
                = (0.8, 1.0), spike_at_h: float | None = 0.5, spike_factor: float = 6.0,
                seed: int = 1, start_h: float = -0.25,
                schedule: ConsumptionSchedule | None = None) -> tuple[np.ndarray, np.ndarray,
                                                                      np.ndarray]:
    """(time h after the switch, temperature °C, viscosity cSt) of a synthetic trend
    (``schedule``: the consumption, default every consumer at its reference rate)."""
    r = simulate(system, make_switch(system, circuit, from_tank, to_tank),
                 schedule or schedule_at(system), max(end_h, 0.1) + 0.1)
    c = r.inlets[inlet]
    t = np.arange(start_h, end_h + 1e-9, step_min / 60.0)
    mf = np.array([np.interp(np.maximum(t, 0.0), c.time_h, row) for row in c.mass_fractions])
    temp = 130.0 - 75.0 * np.clip(t / 2.0, 0.0, 1.0)  # heaters brought down over 2 h
    nu = np.asarray(blend_viscosity_cst(mf, np.array([f.viscosity_at(temp) for f in r.fuels])))
    nu = nu * (1.0 + noise * np.random.default_rng(seed).standard_normal(len(t)))
    if spike_at_h is not None:
        nu[int(np.argmin(np.abs(t - spike_at_h)))] *= spike_factor
    keep = np.ones(len(t), bool) if gap_h is None else ~((t > gap_h[0]) & (t < gap_h[1]))
    return t[keep], temp[keep], nu[keep]


def write_trend_csv(path: Path, t_h: np.ndarray, temp_c: np.ndarray, nu_cst: np.ndarray, *,
                    switch_utc: datetime = SWITCH_UTC, offset_h: float = 12.0,
                    header: str = "time,temperature_c,viscosity_cst", naive: bool = False,
                    comment: str | None = None, load_pct: np.ndarray | None = None) -> Path:
    """Write a trend as the monitoring system would export it (ship's time with its offset,
    or without one when ``naive``)."""
    from datetime import timezone

    zone = timezone(timedelta(hours=offset_h))
    lines = [f"# {comment}"] if comment else []
    lines.append(header + (",load_pct" if load_pct is not None else ""))
    loads = load_pct if load_pct is not None else [None] * len(t_h)
    for t, a, b, x in zip(t_h, temp_c, nu_cst, loads, strict=True):
        moment = (switch_utc + timedelta(hours=float(t))).astimezone(zone)
        stamp = moment.replace(tzinfo=None).isoformat(timespec="seconds") if naive else \
            moment.isoformat(timespec="seconds")
        lines.append(f"{stamp},{a:.1f},{b:.3f}" + ("" if x is None else f",{x:.1f}"))
    path.write_text("\n".join(lines) + "\n", encoding="utf-8")
    return path
