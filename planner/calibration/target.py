"""Time to the sulphur target with the ship file's values and with the fitted ones.

The fitted model's time comes with a 95 % interval by the delta method
([BATES-WATTS-1988] [P]): ``sd(T) = √(gᵀ·C·g)`` with ``g = ∂T/∂u`` by forward
differences of 0.02 in each log-factor and ``C`` the fit's covariance.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from planner.calibration.fit import DIFF_LOG, Calibration
from planner.calibration.model import Changeover, apply
from planner.flushing import CircuitSummary, flush
from planner.ship.system import FuelSystem

Z95 = 1.959963984540054


@dataclass(frozen=True)
class TimeToTarget:
    """Time to target after the switch [h]: ship file, fitted, and the fitted 95 % range
    (None where the target is not reached within the simulated horizon). ``direction``
    ``"to_compliant"`` (every inlet at or below the target from then on) or
    ``"to_regular"`` (at or above it)."""

    direction: str
    limit_pct: float
    target_pct: float
    ship_h: float | None
    fitted_h: float | None
    fitted_low_h: float | None
    fitted_high_h: float | None


def _summary(system: FuelSystem, change: Changeover, limit_pct: float,
             target_pct: float) -> CircuitSummary:
    _, s = flush(system, change.circuit, change.from_tank, change.to_tank, change.schedule,
                 limit_pct=limit_pct, target_pct=target_pct)
    return s


def time_to_target(system: FuelSystem, cal: Calibration, change: Changeover, limit_pct: float,
                   target_pct: float) -> TimeToTarget:
    """The time to the target with the ship file's values and with the fitted ones.

    Parameters
    ----------
    system : FuelSystem
        The ship file's system.
    cal : Calibration
        Fitted log-factors [-] and their covariance [-].
    change : Changeover
        The changeover and the rates [t/h] to judge it at.
    limit_pct : float [% m/m]
        Sulphur limit.
    target_pct : float [% m/m]
        Planning target.

    Returns
    -------
    TimeToTarget
        Times [h] after the switch (:func:`planner.flushing.flush`), the fitted
        one with its 95 % interval by the delta method [BATES-WATTS-1988].
    """
    first = _summary(system, change, limit_pct, target_pct)
    ship = first.time_to_target_h
    u = cal.u

    def at(x: np.ndarray) -> float | None:
        sys_, sched = apply(system, change.schedule, cal.parameters, x)
        c = Changeover(change.circuit, change.from_tank, change.to_tank, change.inlet, sched)
        return _summary(sys_, c, limit_pct, target_pct).time_to_target_h

    fitted = at(u)
    low = high = None
    if fitted is not None:
        g = []
        for j in range(len(u)):
            e = np.zeros(len(u))
            e[j] = DIFF_LOG
            tj = at(u + e)
            g.append(math.nan if tj is None else (tj - fitted) / DIFF_LOG)
        g_arr = np.array(g)
        if np.all(np.isfinite(g_arr)):
            sd = math.sqrt(max(float(g_arr @ cal.covariance @ g_arr), 0.0))
            low, high = max(fitted - Z95 * sd, 0.0), fitted + Z95 * sd
    return TimeToTarget(first.direction, limit_pct, target_pct, ship, fitted, low, high)
