"""Distillate held near its flash point in a heated volume during a changeover.

The inlet temperature path (:mod:`planner.ship.thermal`) is the temperature
of the heater's outlet and of every volume after it to the consumer. Where
that fuel is mainly distillate (at least :data:`DISTILLATE_SHARE` of it by
mass; our rule) and hotter than its flash point less the margin
(:data:`planner.fuels.FLASH_POINT_MARGIN_C`, 10 °C, the margin SOLAS II-2
regulation 4.2.2.5 sets for heated fuel tanks, [SOLAS-1974] [M], from
memory), the plan cautions: we apply that tank margin to the heaters and lines
as a caution, SOLAS does not. The flash point is the lowest of the distillates
present: a blend's flash point is near that of its more volatile part
(common practice, on the safe side).
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np
from numpy.typing import ArrayLike

from planner.fuels import FLASH_POINT_MARGIN_C, Fuel

DISTILLATE_SHARE = 0.5
"""Share of distillate by mass from which a blend is held as a distillate (ours)."""

_PRESENT = 1e-3  # a fuel below this mass fraction throughout is not counted


@dataclass(frozen=True)
class FlashSpan:
    """When a heated distillate is within the margin of its flash point.

    Attributes
    ----------
    fuel : Fuel
        The distillate whose flash point applies (the lowest present).
    from_h, to_h : float [h]
        First and last time of the span, h after the switch.
    max_temperature_c : float [°C]
        Highest temperature of the distillate in the span.
    limit_c : float [°C]
        Flash point less the margin: the temperature not to exceed.
    """

    fuel: Fuel
    from_h: float
    to_h: float
    max_temperature_c: float
    limit_c: float


def flash_margin_span(fuels: Sequence[Fuel], mass_fractions: ArrayLike, time_h: ArrayLike,
                      temperature_c: ArrayLike, path_time_h: ArrayLike | None = None,
                      margin_c: float = FLASH_POINT_MARGIN_C) -> FlashSpan | None:
    """The span in which mainly-distillate fuel is hotter than its flash point less the margin.

    ``hot = w_distillate ≥ 0.5  and  T > FP_min − margin``

    Parameters
    ----------
    fuels : sequence of Fuel
        The fuels, in the order of the first axis of ``mass_fractions``.
    mass_fractions : array_like [-]
        Composition by mass, (n_fuels, n_times), at ``time_h``.
    time_h : array_like [h]
        Times of the compositions, increasing.
    temperature_c : array_like [°C]
        Temperature of the fuel at ``path_time_h``.
    path_time_h : array_like or None [h]
        Times of the temperatures (default ``time_h``); compositions are
        interpolated onto them (held before the first time).
    margin_c : float [°C], default 10
        Kept below the flash point ([SOLAS-1974] reg. II-2/4.2.2.5, [M]).

    Returns
    -------
    FlashSpan or None
        None when the distillate stays at least the margin below its flash point.

    Notes
    -----
    The margin from [SOLAS-1974] [M] (heated tanks), applied here to heated
    volumes as a caution; the flash point from the delivery note or
    [ISO-8217] [M] (:attr:`planner.fuels.Fuel.flash_point`).

    Examples
    --------
    Gas oil of the ISO 8217 minimum flash point (60 °C) at 55 °C, then 45 °C:

    >>> mgo = Fuel(name="MGO", grade="DMA", sulphur_pct=0.05, density_kg_m3=845.0,
    ...            viscosity_cst=3.0, viscosity_ref_c=40.0)
    >>> s = flash_margin_span([mgo], [[1.0, 1.0, 1.0]], [0.0, 0.1, 0.2], [55.0, 52.0, 45.0])
    >>> s.from_h, s.to_h, s.max_temperature_c, s.limit_c
    (0.0, 0.1, 55.0, 50.0)
    """
    w = np.asarray(mass_fractions, dtype=np.float64)
    t = np.asarray(time_h, dtype=np.float64)
    temp = np.asarray(temperature_c, dtype=np.float64)
    tp = t if path_time_h is None else np.asarray(path_time_h, dtype=np.float64)
    distillate = [i for i, f in enumerate(fuels) if not f.is_residual and w[i].max() > _PRESENT]
    if not distillate:
        return None
    share = np.interp(tp, t, w[distillate].sum(axis=0))
    fuel = min((fuels[i] for i in distillate), key=lambda f: f.flash_point)
    limit = fuel.flash_point - margin_c
    hot = (share >= DISTILLATE_SHARE) & (temp > limit)
    if not hot.any():
        return None
    idx = np.flatnonzero(hot)
    return FlashSpan(fuel, float(tp[idx[0]]), float(tp[idx[-1]]), float(temp[idx].max()), limit)


@dataclass(frozen=True)
class Precool:
    """Lowering the heater set point before the switch, and the flash-point span left after.

    The chief engineer's way to keep a distillate cool in the heated volumes
    (common practice; the engine makers' changeover guidance lowers the
    temperature of the old fuel first, [ENGINE-GUIDANCE] [M]): before the
    valve is moved, bring the set point down from the old fuel's service
    temperature to the coolest its maximum viscosity allows, at the rate limit;
    hold it there; after the switch let it follow the blend down at the rate
    limit (never above that held temperature).

    Attributes
    ----------
    set_point_c : float [°C]
        The old fuel's service set point (its target viscosity).
    precool_c : float [°C]
        Where it is taken before the switch: the old fuel at the window's
        maximum viscosity ([ASTM-D341] line), not below the supply temperature.
    lead_h : float [h]
        How long before the switch to start: (set point − precool) / rate.
    at_limit_h : float or None [h]
        When the temperature is first at or below the flash point less the
        margin, h after the switch (None: not within the path).
    span : FlashSpan or None
        The span still within the margin on that path (None: none).
    """

    set_point_c: float
    precool_c: float
    lead_h: float
    at_limit_h: float | None
    span: FlashSpan | None


def precool_path(fuels: Sequence[Fuel], mass_fractions: ArrayLike, time_h: ArrayLike,
                 window, margin_c: float = FLASH_POINT_MARGIN_C,
                 step_h: float = 1.0 / 60.0) -> Precool:
    """The flash-point span left when the heater set point is lowered ahead of the switch.

    ``T_pre = max(T(ν_max; old fuel), T_supply)``, lead ``(T_set − T_pre) / r``;
    after the switch ``T`` follows ``min(T_set(blend), T_pre)`` at the rate
    ``r`` (:func:`planner.ship.thermal.rate_limited`), on a one-minute grid.

    Parameters
    ----------
    fuels : sequence of Fuel
        The fuels, in the order of the first axis of ``mass_fractions``.
    mass_fractions : array_like [-]
        The inlet's composition by mass, (n_fuels, n_times), from the switch.
    time_h : array_like [h]
        Times of the compositions, increasing, from 0 (the switch).
    window : InletWindow
        The consumer's heating rule and limits.
    margin_c : float [°C], default 10
        Kept below the flash point ([SOLAS-1974] reg. II-2/4.2.2.5, [M]).
    step_h : float [h], default 1/60
        Grid step.

    Returns
    -------
    Precool

    Notes
    -----
    [ASTM-D341] and [MAPLES-2000] for the blends' viscosity
    (:func:`planner.ship.thermal.blend_line`); the rate limit from
    [TC-SSB-04-2015] [S] for engines.

    Examples
    --------
    Residual fuel washed out by gas oil in a stirred volume of 0.1 h residence:

    >>> from planner.ship.thermal import InletWindow
    >>> hfo = Fuel(name="HFO", grade="RMG 380", sulphur_pct=0.48, density_kg_m3=991.0,
    ...            viscosity_cst=380.0, viscosity_ref_c=50.0)
    >>> mgo = Fuel(name="MGO", grade="DMA", sulphur_pct=0.05, density_kg_m3=845.0,
    ...            viscosity_cst=3.0, viscosity_ref_c=40.0)
    >>> t = np.linspace(0.0, 3.0, 181)
    >>> x = np.exp(-t / 0.1)
    >>> p = precool_path([hfo, mgo], [x, 1.0 - x], t, InletWindow())
    >>> round(p.set_point_c), round(p.precool_c), round(p.lead_h * 60, 1)
    (135, 119, 8.4)
    """
    from planner.fuels import temperature_for_viscosity
    from planner.ship.thermal import blend_line, rate_limited, set_point_c

    w = np.asarray(mass_fractions, dtype=np.float64)
    t = np.asarray(time_h, dtype=np.float64)
    grid = np.arange(t[0], t[-1] + step_h / 2, step_h)
    w_grid = np.array([np.interp(grid, t, wi) for wi in w])
    a, b = blend_line(fuels, w_grid)
    sp = set_point_c(a, b, window)
    start = float(sp[0])
    pre = min(start, max(float(temperature_for_viscosity(window.max_cst, a[0], b[0])),
                         window.supply_temperature_c))
    temp = rate_limited(np.minimum(sp, pre), grid, pre, window.max_rate_c_per_min)
    span = flash_margin_span(fuels, w_grid, grid, temp, margin_c=margin_c)
    limit = (min((f.flash_point for f, wi in zip(fuels, w, strict=True)
                  if not f.is_residual and wi.max() > _PRESENT), default=np.inf) - margin_c)
    cool = np.flatnonzero(temp <= limit)
    return Precool(start, pre, (start - pre) / window.max_rate_c_per_min / 60.0,
                   float(grid[cool[0]]) if cool.size else None, span)


def inlet_flash_spans(result, circuit: str, paths, margin_c: float = FLASH_POINT_MARGIN_C
                      ) -> dict[str, FlashSpan]:
    """Each consumer of a circuit whose inlet path holds distillate within the margin.

    Parameters
    ----------
    result : FlushResult
        The flush (:meth:`~planner.flushing.FlushResult.circuit_inlets` gives
        each inlet's composition).
    circuit : str
        The circuit switched.
    paths : mapping of str to InletPath
        Each consumer's temperature path (:func:`planner.flushing.study.study`).
    margin_c : float [°C], default 10
        Kept below the flash point ([SOLAS-1974] reg. II-2/4.2.2.5, [M]).

    Returns
    -------
    dict of str to FlashSpan
        Only the consumers with a span (:func:`flash_margin_span`).
    """
    curves = {c.consumer: c for c in result.circuit_inlets(circuit)}
    out = {}
    for consumer, path in paths.items():
        curve = curves.get(consumer)
        if curve is None:
            continue
        span = flash_margin_span(curve.fuels, curve.mass_fractions, curve.time_h,
                                 path.temperature_c, path.time_h, margin_c)
        if span is not None:
            out[consumer] = span
    return out
