"""The carriage ban: fuel above 0.50 % on board a ship that may not burn it.

Since 2020-03-01 a ship may not carry fuel with more than 0.50 % m/m sulphur
for use on board (for propulsion or operation) unless it has an approved
equivalent such as an exhaust gas cleaning system (MARPOL Annex VI
regulation 14.1.3, as amended by MEPC.305(73), [MEPC-305] [P]; regulation
number [M]). So:

- a ship without a scrubber (``FuelSystem.scrubbers`` empty) that holds fuel
  above 0.50 % in any tank gets a warning naming the fuel, its sulphur, the
  tanks and the rule;
- a ship with scrubbers is warned of fuel above the highest fuel sulphur any
  of them is approved for (``Scrubber.max_sulphur_pct``, and never below
  0.50 %);
- only fuel a tank holds counts, and only from 2020-03-01 on (the voyage's
  departure, or the day a ship file is studied).

Fuel carried as cargo is outside the rule; the planner knows only the ship's
own tanks, so every tank is taken as holding fuel for use on board. Pure
functions of the ship.
"""

from __future__ import annotations

from dataclasses import dataclass
from datetime import UTC, date, datetime

from planner.ship.system import FuelSystem
from planner.voyage.warning import PlanWarning

CARRIAGE_BAN_FROM = date(2020, 3, 1)
"""The carriage ban applies from this UTC day ([MEPC-305] [P])."""

CARRIAGE_LIMIT_PCT = 0.50
"""Highest fuel sulphur a ship without an approved equivalent may carry for use, % m/m
([MEPC-305] [P])."""

RULE = ("MARPOL Annex VI regulation 14.1.3 (MEPC.305(73)): since 2020-03-01 fuel above "
        "0.50 % m/m may not be carried for use on board without an approved equivalent such "
        "as an exhaust gas cleaning system")
"""The rule, in words, as the warnings quote it."""


@dataclass(frozen=True)
class CarriedFuel:
    """A fuel above what the ship may carry for use, and where it is.

    Parameters
    ----------
    fuel : str
        The fuel's name.
    sulphur_pct : float [% m/m]
        Its delivery-note sulphur.
    tanks : tuple of tuple of (str, float)
        The tanks that hold it and how much, m³ at 15 °C (empty: listed, not held).
    limit_pct : float [% m/m]
        What the ship may carry: 0.50, or its scrubbers' highest approved sulphur.
    scrubbers : tuple of str
        The ship's scrubbers (empty: none).
    """

    fuel: str
    sulphur_pct: float
    tanks: tuple[tuple[str, float], ...]
    limit_pct: float
    scrubbers: tuple[str, ...] = ()

    def __post_init__(self) -> None:
        if not self.sulphur_pct > self.limit_pct:
            raise ValueError(f"carried fuel {self.fuel!r}: sulphur {self.sulphur_pct!r} % is "
                             f"not above the {self.limit_pct!r} % carriage limit")

    def text(self) -> str:
        """The warning as printed (plan, flush): ``Carriage ban:`` and :meth:`body`."""
        return f"Carriage ban: {self.body()}"

    def body(self) -> str:
        """What is carried, where, why it may not be, and the rule."""
        held = ", ".join(f"{t} ({v:.1f} m³ at 15 °C)" for t, v in self.tanks)
        where = (f"held in tank{'s' if len(self.tanks) > 1 else ''} {held}" if self.tanks
                 else "listed for the ship though no tank holds it now")
        if self.scrubbers:
            why = (f"above the {self.limit_pct:.2f} % m/m the ship's exhaust gas cleaning "
                   f"system{'s' if len(self.scrubbers) > 1 else ''} "
                   f"({', '.join(self.scrubbers)}) {'are' if len(self.scrubbers) > 1 else 'is'}"
                   " approved for")
        else:
            why = (f"above {self.limit_pct:.2f} % m/m, and the ship file lists no exhaust gas "
                   "cleaning system (scrubber)")
        return (f"{self.fuel} ({self.sulphur_pct:.2f} % m/m sulphur) is {where}, "
                f"{why}. {RULE}. Unless it is carried as cargo, it may not be on board.")


def ban_applies(when: date | datetime) -> bool:
    """Whether the carriage ban is in force on a day or at a moment (its UTC day).

    Parameters
    ----------
    when : date or datetime
        A UTC day, or an aware datetime.

    Examples
    --------
    >>> ban_applies(date(2020, 2, 29)), ban_applies(date(2020, 3, 1))
    (False, True)
    """
    day = when.astimezone(UTC).date() if isinstance(when, datetime) else when
    return day >= CARRIAGE_BAN_FROM


def carriage_limit_pct(system: FuelSystem) -> float:
    """The highest fuel sulphur the ship may carry for use, % m/m: 0.50 without a scrubber,
    else the highest ``max_sulphur_pct`` of its scrubbers (at least 0.50).

    Parameters
    ----------
    system : FuelSystem
        The ship.
    """
    approved = [s.max_sulphur_pct for s in system.scrubbers.values()]
    return max([CARRIAGE_LIMIT_PCT, *approved])


def carried_over_limit(system: FuelSystem, held_only: bool = True) -> list[CarriedFuel]:
    """The ship's fuels above :func:`carriage_limit_pct`, in the ship's fuel order.

    Parameters
    ----------
    system : FuelSystem
        The ship (as she sails: the voyage's fuels and soundings applied).
    held_only : bool
        Only fuels some tank holds (default); False also lists a fuel of the ship file
        no tank holds now (the written procedure, a standing document).
    """
    limit = carriage_limit_pct(system)
    scrubbers = tuple(system.scrubbers)
    out = []
    for fuel in system.fuels.values():
        if fuel.sulphur_pct <= limit + 1e-12:
            continue
        tanks = tuple((t.name, float(t.content_m3[fuel.name])) for t in system.tanks.values()
                      if t.content_m3.get(fuel.name, 0.0) > 0.0)
        if tanks or not held_only:
            out.append(CarriedFuel(fuel.name, fuel.sulphur_pct, tanks, limit, scrubbers))
    return out


def carriage_warnings(system: FuelSystem, when: date | datetime) -> list[PlanWarning]:
    """``carriage_ban`` warnings: each fuel held above what the ship may carry, from
    2020-03-01 on.

    Parameters
    ----------
    system : FuelSystem
        The ship as she sails (its tanks' contents and its scrubbers).
    when : date or datetime
        The voyage's departure (or the day the ship is studied).
    """
    if not ban_applies(when):
        return []
    return [PlanWarning("carriage_ban", c.text()) for c in carried_over_limit(system)]
