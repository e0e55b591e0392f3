"""Each consumer's own inlet window in the written procedure, grouped, and its fuel temperatures.

Consumers with the same window (:meth:`planner.ship.system.FuelSystem.window_for`,
defaults by kind in :mod:`planner.ship.inlet_limits`) and the same kind of
advice (an engine's or a boiler burner's) form one group; for each fuel the
group's window gives the inlet temperatures by the ASTM D341 line of the
delivery-note viscosity ([ASTM-D341]). Units: °C, cSt, °C/min, % m/m.
"""

from __future__ import annotations

from dataclasses import dataclass

from planner.ship.inlet_limits import KIND_WORDS
from planner.ship.system import FuelSystem
from planner.ship.thermal import InletWindow


@dataclass(frozen=True)
class FuelTemperatures:
    """The inlet temperatures one window asks of one fuel (°C, cSt)."""

    name: str
    set_point_c: float           # the inlet temperature for the target viscosity, within limits
    viscosity_at_set_point_cst: float
    thins_to_min_c: float        # above this temperature it is thinner than the minimum
    thickens_to_max_c: float     # below this temperature it is thicker than the maximum
    heated: bool                 # its set point is above the supply temperature


@dataclass(frozen=True)
class WindowFacts:
    """Consumers sharing one inlet window and heating rule, and what it asks of each fuel.

    ``kinds``: the consumers' kinds (``main_engine``, ``generator``, ``boiler``);
    a group is all burners or all engines (the advice differs). ``swing_c``: the
    regular fuel's set point less the compliant fuel's under this window, °C.
    """

    consumers: tuple[str, ...]
    kinds: tuple[str, ...]
    window: InletWindow
    fuels: tuple[FuelTemperatures, ...]
    swing_c: float

    @property
    def burner(self) -> bool:
        """Every consumer of the group is a boiler burner."""
        return all(k == "boiler" for k in self.kinds)

    @property
    def label(self) -> str:
        """The kinds in words and the consumers: ``boiler burner aux_boiler``."""
        parts = []
        for kind in dict.fromkeys(self.kinds):
            who = tuple(c for c, k in zip(self.consumers, self.kinds, strict=True) if k == kind)
            parts.append(f"{KIND_WORDS.get(kind, kind)}{'s' if len(who) > 1 else ''} {_and(who)}")
        return ", ".join(parts)

    @property
    def swing_min(self) -> float:
        """Least time for the swing at this window's rate limit, min."""
        return self.swing_c / self.window.max_rate_c_per_min

    def fuel(self, name: str) -> FuelTemperatures:
        return next(f for f in self.fuels if f.name == name)


def _and(items: tuple[str, ...]) -> str:
    return items[0] if len(items) < 2 else ", ".join(items[:-1]) + " and " + items[-1]


def temperatures(f, w: InletWindow) -> tuple[float, float, float, float]:
    """Set point, viscosity there, thinning and thickening temperatures of a fuel under a window.

    Parameters
    ----------
    f : Fuel
        The fuel (its [ASTM-D341] line of the delivery-note viscosity).
    w : InletWindow
        The window (target, minimum and maximum [cSt], supply and heaters' limit [°C]).

    Returns
    -------
    tuple of float [°C, cSt, °C, °C]
        The set point (the target's temperature within the supply temperature and
        the heaters' limit), the viscosity there, and the temperatures above which
        it is thinner than the minimum and below which it is thicker than the maximum.
    """
    sp = min(max(float(f.temperature_for_viscosity(w.target_cst)), w.supply_temperature_c),
             w.max_temperature_c)
    return (sp, float(f.viscosity_at(sp)), float(f.temperature_for_viscosity(w.min_cst)),
            float(f.temperature_for_viscosity(w.max_cst)))


def window_groups(system: FuelSystem, consumers: tuple[str, ...] | list[str],
                  limit_pct: float) -> tuple[WindowFacts, ...]:
    """The consumers' own inlet windows, grouped: one group per window and advice kind.

    Parameters
    ----------
    system : FuelSystem
        The ship (:meth:`~planner.ship.system.FuelSystem.window_for` gives each window).
    consumers : sequence of str
        The consumers, in the order the groups and their members are listed.
    limit_pct : float [% m/m]
        Sulphur limit: a fuel at or below it is compliant (for the swing).

    Returns
    -------
    tuple of WindowFacts
        With each fuel's temperatures under the window ([ASTM-D341]).
    """
    groups: dict[tuple[InletWindow, bool], list[str]] = {}
    for c in consumers:
        burner = system.consumers[c].kind == "boiler"
        groups.setdefault((system.window_for(c), burner), []).append(c)
    out = []
    for (w, _), members in groups.items():
        temps = tuple(FuelTemperatures(f.name, *temperatures(f, w),
                                       temperatures(f, w)[0] > w.supply_temperature_c + 0.5)
                      for f in system.fuels.values())
        regular = [t.set_point_c for t, f in zip(temps, system.fuels.values(), strict=True)
                   if f.sulphur_pct > limit_pct + 1e-12]
        compliant = [t.set_point_c for t, f in zip(temps, system.fuels.values(), strict=True)
                     if f.sulphur_pct <= limit_pct + 1e-12]
        swing = max(regular) - min(compliant) if regular and compliant else 0.0
        out.append(WindowFacts(tuple(members), tuple(system.consumers[c].kind for c in members),
                               w, temps, max(swing, 0.0)))
    return tuple(out)
