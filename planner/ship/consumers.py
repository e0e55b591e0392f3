"""Fuel consumers and their consumption: main engine, generators, boilers.

Consumption is stated at the ISO reference net specific energy of
42.7 MJ/kg (ISO 3046-1 / ISO 15550; [ISO-3046] [M], from memory) and scaled to
the fuel actually burnt: ``m_fuel = m_ISO × 42.7 / Q_net(fuel)``
(:func:`planner.fuels.sfoc_scaled`). The flushing simulation applies that
scaling to the blend reaching each inlet at every moment.

- :class:`MainEngine`: maximum continuous rating (MCR, kW), specific fuel oil
  consumption (SFOC, g/kWh at ISO reference conditions) at a reference load,
  optionally an SFOC curve against load, and the propeller law: shaft power
  grows with the cube of speed ([PROPELLER-LAW], common practice),
  ``P = P_ref·(v/v_ref)³`` from the reference speed at the reference load.
- :class:`Generator`: a constant running power, kW, times its SFOC.
- :class:`Boiler`: a constant fuel rate, t/h, stated for a fuel of a given net
  specific energy (default the ISO reference, so the rate is scaled like an
  engine's: a boiler with a constant steam demand needs a constant heat input).

Units: power kW, SFOC g/kWh, mass rates t/h, speed knots, load % of MCR.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from numbers import Real
from typing import TypeAlias

import numpy as np

from planner.fuels import ISO_REFERENCE_Q_NET_MJ_KG, Fuel, sfoc_scaled

_MAX_LOAD_PCT = 110.0  # overload rating (common practice); the propeller law stops here


def _positive(owner: str, field: str, value: object, *, allow_zero: bool = False) -> float:
    if isinstance(value, bool) or not isinstance(value, Real) or not math.isfinite(float(value)):
        raise ValueError(f"consumer {owner!r}: {field} must be a finite number, got {value!r}")
    x = float(value)
    if x < 0.0 or (x == 0.0 and not allow_zero):
        bound = ">= 0" if allow_zero else "> 0"
        raise ValueError(f"consumer {owner!r}: {field} must be {bound}, got {value!r}")
    return x


def _name(value: object) -> str:
    if not isinstance(value, str) or not value.strip():
        raise ValueError(f"consumer name must be a non-empty string, got {value!r}")
    return value


@dataclass(frozen=True, kw_only=True)
class MainEngine:
    """A propulsion engine whose power follows the propeller law.

    Attributes
    ----------
    name : str
    mcr_kw : float
        Maximum continuous rating, kW.
    sfoc_g_kwh : float
        SFOC at ISO reference conditions (42.7 MJ/kg fuel) at ``ref_load_pct``, g/kWh.
    ref_speed_kn : float
        Ship speed at which the engine runs at ``ref_load_pct``, knots.
    ref_load_pct : float
        Engine load at ``ref_speed_kn``, % MCR (0-110).
    sfoc_curve : tuple of (load_pct, sfoc_g_kwh) pairs
        Optional SFOC against load, interpolated linearly and held flat beyond
        the ends; empty: ``sfoc_g_kwh`` at every load.
    """

    name: str
    mcr_kw: float
    sfoc_g_kwh: float
    ref_speed_kn: float
    ref_load_pct: float
    sfoc_curve: tuple[tuple[float, float], ...] = ()

    kind = "main_engine"

    def __post_init__(self) -> None:
        n = _name(self.name)
        for field in ("mcr_kw", "sfoc_g_kwh", "ref_speed_kn", "ref_load_pct"):
            object.__setattr__(self, field, _positive(n, field, getattr(self, field)))
        if self.ref_load_pct > _MAX_LOAD_PCT:
            raise ValueError(
                f"consumer {n!r}: ref_load_pct must be at most {_MAX_LOAD_PCT:g} % MCR, "
                f"got {self.ref_load_pct!r}"
            )
        curve = []
        for i, point in enumerate(self.sfoc_curve):
            if len(point) != 2:
                raise ValueError(f"consumer {n!r}: sfoc_curve[{i}] must be [load_pct, g_kwh]")
            load = _positive(n, f"sfoc_curve[{i}] load_pct", point[0])
            sfoc = _positive(n, f"sfoc_curve[{i}] sfoc_g_kwh", point[1])
            curve.append((load, sfoc))
        loads = [p[0] for p in curve]
        if any(b <= a for a, b in zip(loads, loads[1:], strict=False)):
            raise ValueError(f"consumer {n!r}: sfoc_curve loads must increase, got {loads!r}")
        object.__setattr__(self, "sfoc_curve", tuple(curve))

    def load_pct_at_speed(self, speed_kn: float) -> float:
        """Engine load, % MCR, at ``speed_kn`` knots by the propeller law (cube of speed)."""
        v = _positive(self.name, "speed_kn", speed_kn, allow_zero=True)
        load = self.ref_load_pct * (v / self.ref_speed_kn) ** 3
        if load > _MAX_LOAD_PCT:
            raise ValueError(
                f"consumer {self.name!r}: {v:g} kn needs {load:.0f} % MCR by the propeller law, "
                f"above {_MAX_LOAD_PCT:g} %"
            )
        return load

    def speed_at_load(self, load_pct: float) -> float:
        """Ship speed, knots, at which the propeller law gives ``load_pct`` % MCR."""
        load = _positive(self.name, "load_pct", load_pct, allow_zero=True)
        return self.ref_speed_kn * (load / self.ref_load_pct) ** (1.0 / 3.0)

    def sfoc_at(self, load_pct: float) -> float:
        """SFOC at ISO reference conditions, g/kWh, at ``load_pct`` % MCR."""
        if not self.sfoc_curve:
            return self.sfoc_g_kwh
        loads, values = zip(*self.sfoc_curve, strict=True)
        return float(np.interp(load_pct, loads, values))

    def iso_demand_t_h(
        self, *, load_pct: float | None = None, speed_kn: float | None = None
    ) -> float:
        """Fuel rate at the ISO reference net specific energy, t/h.

        Give exactly one of ``load_pct`` (% MCR) or ``speed_kn`` (propeller law);
        neither means the reference load. ``m = P·SFOC / 10⁶`` with P in kW.
        """
        if load_pct is not None and speed_kn is not None:
            raise ValueError(f"consumer {self.name!r}: give load_pct or speed_kn, not both")
        if speed_kn is not None:
            load = self.load_pct_at_speed(speed_kn)
        elif load_pct is not None:
            load = _positive(self.name, "load_pct", load_pct, allow_zero=True)
            if load > _MAX_LOAD_PCT:
                raise ValueError(
                    f"consumer {self.name!r}: load_pct must be at most {_MAX_LOAD_PCT:g}, "
                    f"got {load_pct!r}"
                )
        else:
            load = self.ref_load_pct
        return self.mcr_kw * load / 100.0 * self.sfoc_at(load) / 1e6


@dataclass(frozen=True, kw_only=True)
class Generator:
    """A diesel generator at a constant running power.

    Attributes
    ----------
    name : str
    power_kw : float
        Running power (the electrical load it carries), kW, ≥ 0.
    sfoc_g_kwh : float
        SFOC at ISO reference conditions at that power, g/kWh.
    rated_kw : float or None
        Rating, kW, for the record; ``power_kw`` must not exceed it.
    """

    name: str
    power_kw: float
    sfoc_g_kwh: float
    rated_kw: float | None = None

    kind = "generator"

    def __post_init__(self) -> None:
        n = _name(self.name)
        object.__setattr__(
            self, "power_kw", _positive(n, "power_kw", self.power_kw, allow_zero=True)
        )
        object.__setattr__(self, "sfoc_g_kwh", _positive(n, "sfoc_g_kwh", self.sfoc_g_kwh))
        if self.rated_kw is not None:
            object.__setattr__(self, "rated_kw", _positive(n, "rated_kw", self.rated_kw))
            if self.power_kw > self.rated_kw:
                raise ValueError(
                    f"consumer {n!r}: power_kw {self.power_kw:g} exceeds rated_kw {self.rated_kw:g}"
                )

    def iso_demand_t_h(self, **_: object) -> float:
        """Fuel rate at the ISO reference net specific energy, t/h: ``P·SFOC / 10⁶``."""
        return self.power_kw * self.sfoc_g_kwh / 1e6


@dataclass(frozen=True, kw_only=True)
class Boiler:
    """An oil-fired boiler at a constant heat input.

    Attributes
    ----------
    name : str
    fuel_t_h : float
        Fuel rate, t/h, when burning a fuel of ``q_net_ref_mj_kg``.
    q_net_ref_mj_kg : float
        Net specific energy the rate refers to, MJ/kg (default the ISO 42.7).
    """

    name: str
    fuel_t_h: float
    q_net_ref_mj_kg: float = ISO_REFERENCE_Q_NET_MJ_KG

    kind = "boiler"

    def __post_init__(self) -> None:
        n = _name(self.name)
        object.__setattr__(
            self, "fuel_t_h", _positive(n, "fuel_t_h", self.fuel_t_h, allow_zero=True)
        )
        q = _positive(n, "q_net_ref_mj_kg", self.q_net_ref_mj_kg)
        if not 30.0 <= q <= 50.0:
            raise ValueError(f"consumer {n!r}: q_net_ref_mj_kg must be 30-50 MJ/kg, got {q!r}")
        object.__setattr__(self, "q_net_ref_mj_kg", q)

    def iso_demand_t_h(self, **_: object) -> float:
        """Fuel rate at the ISO reference net specific energy, t/h (same heat input)."""
        return self.fuel_t_h * self.q_net_ref_mj_kg / ISO_REFERENCE_Q_NET_MJ_KG


Consumer: TypeAlias = MainEngine | Generator | Boiler
"""Any fuel consumer."""

CONSUMER_KINDS: dict[str, type] = {
    "main_engine": MainEngine,
    "generator": Generator,
    "boiler": Boiler,
}
"""Consumer classes by the ``kind`` word of the ship file."""


def iso_demand_t_h(
    consumer: Consumer, *, load_pct: float | None = None, speed_kn: float | None = None
) -> float:
    """Fuel rate of a consumer at the ISO reference net specific energy.

    ``m = P·SFOC / 10⁶`` (P in kW, SFOC in g/kWh, m in t/h); a main engine's
    power follows the propeller law ``P = P_ref·(v/v_ref)³``.

    Parameters
    ----------
    consumer : MainEngine, Generator or Boiler
        The consumer.
    load_pct : float or None [% MCR]
        Main engine load, 0-110; main engines only.
    speed_kn : float or None [kn]
        Ship speed, for the propeller law; main engines only. Give at most one
        of ``load_pct`` and ``speed_kn``; neither means the reference load.

    Returns
    -------
    m_ISO : float [t/h]
        Fuel rate at 42.7 MJ/kg; generators and boilers run at their constant
        rate.

    Notes
    -----
    Reference energy [ISO-3046] [M], from memory; the propeller law
    [PROPELLER-LAW] (common practice), within 0-110 % MCR.

    Examples
    --------
    >>> round(iso_demand_t_h(Generator(name="dg", power_kw=500.0, sfoc_g_kwh=200.0)), 6)
    0.1
    >>> me = MainEngine(name="me", mcr_kw=9000.0, sfoc_g_kwh=171.0, ref_speed_kn=14.0,
    ...                 ref_load_pct=85.0)
    >>> round(iso_demand_t_h(me, speed_kn=14.0), 3)
    1.308
    """
    if isinstance(consumer, MainEngine):
        return consumer.iso_demand_t_h(load_pct=load_pct, speed_kn=speed_kn)
    return consumer.iso_demand_t_h()


def fuel_rate_t_h(iso_rate_t_h: float, fuel: Fuel | float) -> float:
    """Mass rate of a fuel for a fuel rate stated at the ISO reference energy.

    ``m = m_ISO × 42.7 / Q_net`` (:func:`planner.fuels.sfoc_scaled`)

    Parameters
    ----------
    iso_rate_t_h : float [t/h]
        Fuel rate at the ISO reference net specific energy, 42.7 MJ/kg.
    fuel : Fuel or float [MJ/kg]
        The fuel burnt, or its net specific energy Q_net.

    Returns
    -------
    m : float [t/h]
        Mass rate of that fuel for the same heat input.

    Notes
    -----
    Reference energy [ISO-3046] [M], from memory; the scaling is an energy
    balance ([D]).

    Examples
    --------
    >>> round(fuel_rate_t_h(0.1, 40.0), 5)
    0.10675
    """
    q_net = fuel.q_net if isinstance(fuel, Fuel) else float(fuel)
    return float(sfoc_scaled(iso_rate_t_h, q_net))
