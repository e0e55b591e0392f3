"""Temperature and viscosity at a consumer inlet during a changeover.

Residual fuel is heated to a target viscosity (default 13 cSt; residual fuel
is heated to about 13-17 cSt at the injectors, [ENGINE-GUIDANCE] [P]);
distillate arrives at its supply temperature. During a changeover the heater
set point follows what the blend now at the inlet needs, but the inlet
temperature changes no faster than a set rate (default 2 °C/min, the usual
rule of thumb against thermal shock, [TC-SSB-04-2015] [S]; common
practice). The blend's viscosity-temperature line comes from Refutas blending
(mass fractions, [MAPLES-2000]) at two temperatures, then ASTM D341
([ASTM-D341]) through them.

The engine's window: at least 2 cSt at the inlet (published engine-maker
guidance on 0.10 % S distillate fuels, [ENGINE-GUIDANCE] [P]) and at most a
maximum (default 20 cSt, common practice), both user-set. When the path
leaves the window the fix is reported: how long before the valve switch
the temperature must start moving (pre-cooling the old fuel towards the
coolest temperature its own maximum viscosity allows, or pre-heating), or
that the switch must be slower.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np
from numpy.typing import ArrayLike, NDArray

from planner.fuels import Fuel, blend_viscosity_cst, d341_fit, d341_viscosity_cst
from planner.fuels import temperature_for_viscosity as d341_temperature

_T_LOW_C, _T_HIGH_C = 50.0, 100.0


@dataclass(frozen=True)
class InletWindow:
    """Heating rule and engine limits at a consumer inlet (°C, cSt, °C/min).

    Attributes
    ----------
    target_cst : float
        Viscosity residual fuel is heated to, cSt (default 13; about 13-17 cSt
        at the injectors, [ENGINE-GUIDANCE] [P]).
    min_cst : float
        Lowest viscosity allowed at the inlet, cSt (default 2,
        [ENGINE-GUIDANCE] [P]).
    max_cst : float
        Highest viscosity allowed at the inlet, cSt (default 20, common practice).
    max_rate_c_per_min : float
        Fastest change of the inlet temperature, °C/min (default 2,
        [TC-SSB-04-2015] [S]).
    supply_temperature_c : float
        Temperature an unheated fuel arrives at, °C (default 40).
    max_temperature_c : float
        Heaters' limit, °C (default 150; up to about 150 °C at the inlet,
        [ENGINE-GUIDANCE] [S]).
    """

    target_cst: float = 13.0
    min_cst: float = 2.0
    max_cst: float = 20.0
    max_rate_c_per_min: float = 2.0
    supply_temperature_c: float = 40.0
    max_temperature_c: float = 150.0

    def __post_init__(self) -> None:
        if not 0.0 < self.min_cst <= self.target_cst <= self.max_cst:
            raise ValueError("inlet window needs 0 < min_cst <= target_cst <= max_cst "
                             f"(got {self.min_cst}, {self.target_cst}, {self.max_cst} cSt)")
        if not self.max_rate_c_per_min > 0.0:
            raise ValueError(f"max_rate_c_per_min must be > 0 (got {self.max_rate_c_per_min})")
        if not self.supply_temperature_c < self.max_temperature_c:
            raise ValueError("supply_temperature_c must be below max_temperature_c")


def blend_line(fuels: Sequence[Fuel], mass_fractions: ArrayLike) -> tuple[NDArray, NDArray]:
    """ASTM D341 constants of blends of fuels, from Refutas blending at 50 and 100 °C.

    ``ν_blend(T) = VBN⁻¹(Σ wᵢ·VBN(νᵢ(T)))`` at T = 50 and 100 °C, then the
    D341 line ``log10 log10 Z = A − B·log10 T`` through the two points.

    Parameters
    ----------
    fuels : sequence of Fuel
        The fuels, in the order of the first axis of ``mass_fractions``.
    mass_fractions : array_like [-]
        Mass fraction of each fuel, shaped (n_fuels, ...); further axes are
        blends (e.g. times).

    Returns
    -------
    (A, B) : tuple of ndarray [-]
        D341 constants of each blend, shaped as ``mass_fractions[0]``.

    Notes
    -----
    Refutas blending [MAPLES-2000] [P] and the [ASTM-D341] line [P].

    Examples
    --------
    >>> hfo = Fuel(name="HFO", grade="RMG 380", sulphur_pct=0.48,
    ...            density_kg_m3=991.0, viscosity_cst=380.0, viscosity_ref_c=50.0)
    >>> mgo = Fuel(name="MGO", grade="DMA", sulphur_pct=0.05,
    ...            density_kg_m3=845.0, viscosity_cst=3.0, viscosity_ref_c=40.0)
    >>> a, b = blend_line([hfo, mgo], [[0.5], [0.5]])
    >>> round(float(d341_viscosity_cst(50.0, a, b)[0]), 2)
    13.4
    """
    w = np.asarray(mass_fractions, dtype=np.float64)
    nu_lo = np.array([f.viscosity_at(_T_LOW_C) for f in fuels], dtype=np.float64)
    nu_hi = np.array([f.viscosity_at(_T_HIGH_C) for f in fuels], dtype=np.float64)
    shape = (len(fuels),) + (1,) * (w.ndim - 1)
    v_lo = blend_viscosity_cst(w, np.broadcast_to(nu_lo.reshape(shape), w.shape))
    v_hi = blend_viscosity_cst(w, np.broadcast_to(nu_hi.reshape(shape), w.shape))
    a, b = d341_fit(v_lo, _T_LOW_C, v_hi, _T_HIGH_C)
    return np.asarray(a), np.asarray(b)


def set_point_c(a: ArrayLike, b: ArrayLike, window: InletWindow) -> NDArray[np.float64]:
    """Heater set point for blends: the temperature of the target viscosity, within limits.

    ``T_set = clip(T(ν_target), supply_temperature_c, max_temperature_c)`` on
    each blend's D341 line; a fuel already thinner than the target at its
    supply temperature is not heated.

    Parameters
    ----------
    a, b : array_like [-]
        ASTM D341 constants of the blends (:func:`blend_line`).
    window : InletWindow
        Target viscosity and temperature limits.

    Returns
    -------
    T_set : ndarray [°C]
        Set point of each blend.

    Notes
    -----
    [ASTM-D341] [P]; the 13 cSt default target from [ENGINE-GUIDANCE] [P].

    Examples
    --------
    >>> hfo = Fuel(name="HFO", grade="RMG 380", sulphur_pct=0.48,
    ...            density_kg_m3=991.0, viscosity_cst=380.0, viscosity_ref_c=50.0)
    >>> mgo = Fuel(name="MGO", grade="DMA", sulphur_pct=0.05,
    ...            density_kg_m3=845.0, viscosity_cst=3.0, viscosity_ref_c=40.0)
    >>> a, b = blend_line([hfo, mgo], [[1.0, 0.0], [0.0, 1.0]])
    >>> set_point_c(a, b, InletWindow()).round(1)
    array([135.3,  40. ])
    """
    t = np.asarray(d341_temperature(window.target_cst, a, b), dtype=np.float64)
    return np.clip(t, window.supply_temperature_c, window.max_temperature_c)


def rate_limited(
    target_c: NDArray, time_h: NDArray, start_c: float, rate_c_per_min: float
) -> NDArray:
    """A temperature that follows a target, changing no faster than a set rate.

    ``T_k = T_(k−1) + clip(T_target,k − T_(k−1), −r·Δt_k, r·Δt_k)``

    Parameters
    ----------
    target_c : ndarray [°C]
        Target temperature at each time.
    time_h : ndarray [h]
        Times, increasing.
    start_c : float [°C]
        Temperature before the first time.
    rate_c_per_min : float [°C/min]
        Fastest change allowed, > 0.

    Returns
    -------
    T : ndarray [°C]
        Temperature at each time.

    Notes
    -----
    The rate limit against thermal shock: at most about 2 °C/min at the
    engine inlet ([TC-SSB-04-2015] [S]).

    Examples
    --------
    From 120 °C towards 40 °C at 2 °C/min, in 6-minute steps:

    >>> rate_limited(np.array([120.0, 40.0, 40.0, 40.0]), np.array([0.0, 0.1, 0.2, 0.3]),
    ...              120.0, 2.0)
    array([120., 108.,  96.,  84.])
    """
    out = np.empty_like(target_c)
    cur = start_c
    dt_min = np.diff(time_h, prepend=time_h[0]) * 60.0
    for k in range(len(target_c)):
        step = rate_c_per_min * dt_min[k]
        cur = cur + min(max(target_c[k] - cur, -step), step)
        out[k] = cur
    return out


@dataclass(frozen=True, eq=False)
class InletPath:
    """Temperature (°C), viscosity (cSt) and set point (°C) at an inlet against time (h)."""

    time_h: NDArray[np.float64]
    temperature_c: NDArray[np.float64]
    viscosity_cst: NDArray[np.float64]
    set_point_c: NDArray[np.float64]
    window: InletWindow

    @property
    def min_viscosity_cst(self) -> float:
        return float(np.min(self.viscosity_cst))

    @property
    def max_viscosity_cst(self) -> float:
        return float(np.max(self.viscosity_cst))

    def outside(self) -> list[tuple[float, float, str]]:
        """Spans ``(from_h, to_h, "below"|"above")`` outside the engine's window."""
        spans: list[tuple[float, float, str]] = []
        for label, bad in (("below", self.viscosity_cst < self.window.min_cst - 1e-9),
                           ("above", self.viscosity_cst > self.window.max_cst + 1e-9)):
            edges = np.diff(np.concatenate([[0], bad.astype(np.int8), [0]]))
            starts, ends = np.nonzero(edges == 1)[0], np.nonzero(edges == -1)[0] - 1
            spans += [(float(self.time_h[i]), float(self.time_h[j]), label)
                      for i, j in zip(starts, ends, strict=True)]
        return sorted(spans)



def inlet_path(fuels: Sequence[Fuel], mass_fractions: ArrayLike, time_h: ArrayLike,
               window: InletWindow, lead_h: float = 0.0) -> InletPath:
    """The temperature and viscosity path at a consumer inlet over a changeover.

    The set point follows each moment's blend (:func:`set_point_c`), the
    temperature follows the set point at the window's rate
    (:func:`rate_limited`), and the viscosity is the blend's at that
    temperature (:func:`blend_line`, ASTM D341).

    Parameters
    ----------
    fuels : sequence of Fuel
        The fuels, in the order of the first axis of ``mass_fractions``.
    mass_fractions : array_like [-]
        The inlet's composition by mass, shaped (n_fuels, n_times).
    time_h : array_like [h]
        Times of the compositions, increasing.
    window : InletWindow
        Heating rule and engine limits.
    lead_h : float [h], default 0
        With ``lead_h`` > 0 the temperature starts moving that long before
        t = 0, towards the temperature the first composition tolerates nearest
        the final set point (its own viscosity window); the path returned then
        covers ``-lead_h`` onwards.

    Returns
    -------
    InletPath
        Temperature [°C], viscosity [cSt] and set point [°C] against time [h];
        the inlet starts settled at the set point of the first composition.

    Notes
    -----
    [MAPLES-2000] and [ASTM-D341] for the blend's viscosity; the default
    window from [ENGINE-GUIDANCE] and [TC-SSB-04-2015].

    Examples
    --------
    A gradual washout from residual fuel to gas oil stays inside the window:

    >>> hfo = Fuel(name="HFO", grade="RMG 380", sulphur_pct=0.48,
    ...            density_kg_m3=991.0, viscosity_cst=380.0, viscosity_ref_c=50.0)
    >>> mgo = Fuel(name="MGO", grade="DMA", sulphur_pct=0.05,
    ...            density_kg_m3=845.0, viscosity_cst=3.0, viscosity_ref_c=40.0)
    >>> t = np.linspace(0.0, 4.0, 241)
    >>> x = np.exp(-t / 0.6)
    >>> path = inlet_path([hfo, mgo], np.vstack([x, 1.0 - x]), t, InletWindow())
    >>> path.outside(), round(path.max_viscosity_cst, 2), round(path.min_viscosity_cst, 2)
    ([], 13.0, 3.01)
    """
    a, b = blend_line(fuels, mass_fractions)
    return path_on_line(np.asarray(time_h, dtype=np.float64), a, b, window, lead_h)


def path_on_line(t: NDArray, a: NDArray, b: NDArray, window: InletWindow,
                 lead_h: float = 0.0) -> InletPath:
    """The inlet path of :func:`inlet_path` for blends given as ASTM D341 lines ([ASTM-D341]).

    Parameters
    ----------
    t : ndarray [h]
        Times, increasing.
    a, b : ndarray [-]
        ASTM D341 constants of the blend at each time (:func:`blend_line`).
    window : InletWindow
        Heating rule and engine limits.
    lead_h : float [h], default 0
        Time before t = 0 at which the temperature starts moving (see
        :func:`inlet_path`).

    Returns
    -------
    InletPath
        Temperature [°C], viscosity [cSt] and set point [°C] against time [h].

    Examples
    --------
    >>> hfo = Fuel(name="HFO", grade="RMG 380", sulphur_pct=0.48,
    ...            density_kg_m3=991.0, viscosity_cst=380.0, viscosity_ref_c=50.0)
    >>> t = np.linspace(0.0, 1.0, 61)
    >>> a, b = blend_line([hfo], [np.ones_like(t)])
    >>> path = path_on_line(t, a, b, InletWindow(target_cst=13.0))
    >>> round(float(path.viscosity_cst[-1]), 6)
    13.0
    """
    sp = set_point_c(a, b, window)
    start = float(sp[0])
    if lead_h > 0.0:
        pre = _pre_target_c(float(a[0]), float(b[0]), float(sp[-1]), window)
        n_pre = max(2, int(np.ceil(lead_h * 60.0 - 1e-9)) + 1)
        t_pre = np.linspace(-lead_h, 0.0, n_pre)[:-1]
        t = np.concatenate([t_pre, t])
        a = np.concatenate([np.full(len(t_pre), a[0]), a])
        b = np.concatenate([np.full(len(t_pre), b[0]), b])
        sp = np.concatenate([np.full(len(t_pre), pre), sp])
    temp = rate_limited(sp, t, start, window.max_rate_c_per_min)
    nu = np.asarray(d341_viscosity_cst(temp, a, b), dtype=np.float64)
    return InletPath(t, temp, nu, sp, window)


def _pre_target_c(a: float, b: float, final_c: float, window: InletWindow) -> float:
    """Where the old fuel may be taken before the switch: toward the final set point,
    no further than its own viscosity window allows."""
    cool_limit = float(d341_temperature(window.max_cst, a, b))
    hot_limit = float(d341_temperature(window.min_cst, a, b))
    lo, hi = sorted((cool_limit, hot_limit))
    return float(np.clip(final_c, max(lo, window.supply_temperature_c),
                         min(hi, window.max_temperature_c)))


def lead_needed_h(fuels: Sequence[Fuel], mass_fractions: ArrayLike, time_h: ArrayLike,
                  window: InletWindow, max_lead_h: float = 4.0,
                  step_h: float = 1.0 / 60.0) -> float | None:
    """Shortest lead before the valve switch that keeps the inlet inside the window.

    Tries leads of 0, 1, 2, ... minutes up to 1 h, then every 5 minutes, with
    the path of :func:`inlet_path` on a one-minute grid.

    Parameters
    ----------
    fuels : sequence of Fuel
        The fuels, in the order of the first axis of ``mass_fractions``.
    mass_fractions : array_like [-]
        The inlet's composition by mass, shaped (n_fuels, n_times).
    time_h : array_like [h]
        Times of the compositions, increasing.
    window : InletWindow
        Heating rule and engine limits.
    max_lead_h : float [h], default 4
        Longest lead tried.
    step_h : float [h], default 1/60
        Step of the leads tried and of the time grid.

    Returns
    -------
    lead : float or None [h]
        0 when no lead is needed; None when no lead up to ``max_lead_h``
        suffices (then the switch itself must be slower).

    Notes
    -----
    The window's limits from [ENGINE-GUIDANCE] and [TC-SSB-04-2015].

    Examples
    --------
    >>> hfo = Fuel(name="HFO", grade="RMG 380", sulphur_pct=0.48,
    ...            density_kg_m3=991.0, viscosity_cst=380.0, viscosity_ref_c=50.0)
    >>> mgo = Fuel(name="MGO", grade="DMA", sulphur_pct=0.05,
    ...            density_kg_m3=845.0, viscosity_cst=3.0, viscosity_ref_c=40.0)
    >>> t = np.linspace(0.0, 4.0, 241)
    >>> x = np.exp(-t / 0.6)
    >>> lead_needed_h([hfo, mgo], np.vstack([x, 1.0 - x]), t, InletWindow())
    0.0
    """
    t = np.asarray(time_h, dtype=np.float64)
    w = np.asarray(mass_fractions, dtype=np.float64)
    grid = np.arange(t[0], t[-1] + step_h, step_h)  # a minute grid is enough for a rate limit
    w_grid = np.array([np.interp(grid, t, wi) for wi in w])
    a, b = blend_line(fuels, w_grid)  # once: only the lead changes below
    k = 0
    while k * step_h <= max_lead_h + 1e-12:
        if not path_on_line(grid, a, b, window, k * step_h).outside():
            return k * step_h
        k += 1 if k * step_h < 1.0 else 5
    return None
