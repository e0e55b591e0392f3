"""The ship's particulars, tanks, circuits, scrubbers and fuels read from the ship file for
``log init``.

The ship file is read through :func:`planner.ship.ship_file.load_ship` (the same checked
loader the plan uses; nothing here changes it), so every fault in it is one
:class:`geo.errors.InputError` naming the file and the key. What the journal takes:

- the ship's name and IMO number (``[ship] name``, ``imo``);
- every tank with its capacity (``[tanks.NAME] capacity_m3``): soundings above a
  tank's capacity are then refused;
- the circuits' names (``[circuits.NAME]``): an entry naming another circuit is refused;
- the scrubbers' names (``[scrubbers.NAME]``): a scrubber entry naming another is refused;
- every fuel with its grade, sulphur and density at 15 °C (``[fuels.NAME]``) and its
  delivery-note reference (``bdn_ref``; "not given in FILE" when the file has none).
"""

from __future__ import annotations

from dataclasses import dataclass
from pathlib import Path

from geo.errors import InputError
from planner.journal.details import FuelSpec, TankCapacity


@dataclass(frozen=True)
class ShipParticulars:
    """What a journal takes from a ship file (see the module docstring)."""

    source: str
    name: str
    imo: str
    journal: str
    tanks: tuple[TankCapacity, ...]
    circuits: tuple[str, ...]
    fuels: tuple[FuelSpec, ...]
    scrubbers: tuple[str, ...] = ()


def ship_particulars(path: str | Path) -> ShipParticulars:
    """The particulars of the ship file ``path`` (refused in one line if it is not one)."""
    from planner.ship.ship_file import load_ship

    system = load_ship(path)
    name = Path(path).name
    fuels, tanks = [], []
    for f in system.fuels.values():
        try:
            fuels.append(FuelSpec(f.name, f.grade, f.sulphur_pct, f.density_kg_m3,
                                  f.bdn_ref.strip() or f"not given in {name}"))
        except ValueError as exc:
            raise InputError(str(path), f"fuels.{f.name}", f.name, "a fuel the journal can "
                             f"record ({str(exc).split(' must be ')[-1]})") from None
    for t in system.tanks.values():
        try:
            tanks.append(TankCapacity(t.name, t.capacity_m3))
        except ValueError as exc:
            raise InputError(str(path), f"tanks.{t.name}.capacity_m3", t.capacity_m3,
                             str(exc).split(" must be ")[-1]) from None
    return ShipParticulars(source=name, name=system.ship.name, imo=system.ship.imo,
                           journal=system.ship.journal, tanks=tuple(tanks),
                           circuits=tuple(system.circuits), fuels=tuple(fuels),
                           scrubbers=tuple(system.scrubbers))
