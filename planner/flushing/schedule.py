"""Consumption against time: piecewise constant, changing at given times.

A :class:`ConsumptionSchedule` gives each consumer's fuel rate, t/h, in
segments starting at ``times_h`` (the first at 0). With ``basis="energy"``
(the default) a rate is the mass at the ISO reference net specific energy
(42.7 MJ/kg, [ISO-3046] [M]) and the mass actually burnt is scaled by
42.7 / Q_net of the blend at the consumer's inlet: the engine keeps its
power, so a leaner fuel needs more mass. With ``basis="mass"`` the rate is
burnt as given, whatever the fuel. Either way the *volumetric* draw is that
mass over the inlet blend's density (mixing by mass, [LEVENSPIEL-1999] mass
balance [D]).
"""

from __future__ import annotations

import math
from collections.abc import Mapping, Sequence
from dataclasses import dataclass
from types import MappingProxyType

import numpy as np

from planner.ship.consumers import iso_demand_t_h
from planner.ship.system import FuelSystem

BASES = ("energy", "mass")


@dataclass(frozen=True)
class ConsumptionSchedule:
    """Fuel rates, t/h, per consumer in segments starting at ``times_h`` (h, first 0)."""

    times_h: tuple[float, ...]
    rates_t_h: Mapping[str, tuple[float, ...]]
    basis: str = "energy"

    def __post_init__(self) -> None:
        times = tuple(float(t) for t in self.times_h)
        if not times or times[0] != 0.0:
            raise ValueError(f"schedule times_h must start at 0, got {self.times_h!r}")
        if any(not math.isfinite(t) for t in times) or any(
            b <= a for a, b in zip(times, times[1:], strict=False)
        ):
            raise ValueError(f"schedule times_h must increase, got {self.times_h!r}")
        if self.basis not in BASES:
            raise ValueError(f"schedule basis must be one of {BASES}, got {self.basis!r}")
        rates = {}
        for name, values in dict(self.rates_t_h).items():
            vals = tuple(float(v) for v in values)
            if len(vals) != len(times):
                raise ValueError(
                    f"schedule for {name!r}: one rate per segment ({len(times)}), got {len(vals)}"
                )
            if any(not (math.isfinite(v) and v >= 0.0) for v in vals):
                raise ValueError(f"schedule for {name!r}: rates must be >= 0 t/h, got {vals!r}")
            rates[name] = vals
        object.__setattr__(self, "times_h", times)
        object.__setattr__(self, "rates_t_h", MappingProxyType(rates))

    @classmethod
    def constant(cls, rates_t_h: Mapping[str, float], basis: str = "energy") -> ConsumptionSchedule:
        """One segment: each consumer at its rate, t/h, throughout."""
        return cls((0.0,), {k: (v,) for k, v in rates_t_h.items()}, basis)

    @classmethod
    def steps(
        cls,
        times_h: Sequence[float],
        rates_t_h: Sequence[Mapping[str, float]],
        basis: str = "energy",
    ) -> ConsumptionSchedule:
        """Segments from ``times_h[i]`` with the rates ``rates_t_h[i]`` (same consumers in each)."""
        if len(times_h) != len(rates_t_h):
            raise ValueError("schedule: one rate mapping per segment start")
        names = list(rates_t_h[0]) if rates_t_h else []
        return cls(tuple(times_h), {n: tuple(r[n] for r in rates_t_h) for n in names}, basis)

    def segment_index(self, time_h: float) -> int:
        """Index of the segment in force at ``time_h`` (segments are closed on the left)."""
        return int(np.searchsorted(self.times_h, time_h, side="right")) - 1

    def rates_for(self, consumers: Sequence[str]) -> np.ndarray:
        """Rates (n_segments, n_consumers), t/h, in the order of ``consumers``."""
        missing = [c for c in consumers if c not in self.rates_t_h]
        if missing:
            raise ValueError(f"schedule gives no rate for consumer(s) {missing}")
        return np.array([self.rates_t_h[c] for c in consumers], dtype=float).T.reshape(
            len(self.times_h), len(consumers)
        )


def schedule_at(
    system: FuelSystem,
    *,
    load_pct: float | None = None,
    speed_kn: float | None = None,
    circuits: Sequence[str] | None = None,
) -> ConsumptionSchedule:
    """A constant schedule of every consumer at one main-engine operating point.

    Parameters
    ----------
    system : FuelSystem
    load_pct : float, optional [% MCR]
        Main-engine load (give this or ``speed_kn``, not both; neither: the
        engines' reference load).
    speed_kn : float, optional [kn]
        Speed through the water, the load then by the propeller law
        ([PROPELLER-LAW], common practice).
    circuits : sequence of str, optional
        Only these circuits' consumers (default: every consumer).

    Returns
    -------
    ConsumptionSchedule
        One segment, energy basis: main engines at that load, generators and
        boilers at their stated rates [t/h at 42.7 MJ/kg].
    """
    names = (
        [c for k in circuits for c in system.circuits[k].consumers]
        if circuits is not None
        else list(system.consumers)
    )
    return ConsumptionSchedule.constant(
        {
            n: iso_demand_t_h(system.consumers[n], load_pct=load_pct, speed_kn=speed_kn)
            for n in names
        }
    )
