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
