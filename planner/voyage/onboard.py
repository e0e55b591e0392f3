"""The ship as she sails this voyage: the ship file with the voyage's fuels and tanks.

The voyage file's delivery-note fuels replace (or add to) the ship file's by
name, and each tank sounding (observed m³ at °C) becomes its standard volume
at 15 °C by the Table 54B volume correction factor ([TABLE-54B],
:func:`planner.fuels.standard_volume_m3`).
"""

from __future__ import annotations

from pathlib import Path

from geo.errors import InputError
from planner.common.input_files import read_toml
from planner.fuels import standard_volume_m3
from planner.ship.ship_file import load_ship
from planner.ship.system import FuelSystem, FuelSystemError
from planner.voyage.scrubber_voyage import check_scrubber_inputs
from planner.voyage.voyage_file import Voyage, load_voyage


def is_voyage_file(path: str | Path) -> bool:
    """Whether a TOML file is a voyage file (it has a [voyage] table).

    Parameters
    ----------
    path : str or Path
        A TOML file (False if it cannot be read or parsed).
    """
    try:
        return "voyage" in read_toml(path, "ship or voyage file")
    except InputError:
        return False


def ship_for_voyage(voyage: Voyage) -> FuelSystem:
    """The ship file of ``voyage`` with its fuels and tank contents applied.

    Parameters
    ----------
    voyage : Voyage
        The voyage: its ship file, delivery-note fuels and tank soundings.

    Returns
    -------
    FuelSystem
        The ship with every sounded tank at its standard volume (m³ at 15 °C).

    Raises
    ------
    InputError
        For a tank the ship file lacks, or a volume the tank cannot hold; an outage of a
        scrubber the ship file lacks, or a bad discharge-zone file
        (:func:`planner.voyage.scrubber_voyage.check_scrubber_inputs`).
    """
    system = load_ship(voyage.ship_file)
    check_scrubber_inputs(voyage, system.scrubbers)
    system = system.with_fuels({f.name: f for f in voyage.fuels})
    for name, content in voyage.tanks.items():
        if name not in system.tanks:
            raise InputError(voyage.file, f'tank."{name}"', name,
                             f"a tank of the ship file: {', '.join(sorted(system.tanks))}")
        fuel = voyage.fuel(content.fuel)
        capacity = system.tanks[name].capacity_m3
        if content.volume_m3 > capacity:
            raise InputError(voyage.file, f'tank."{name}".volume_m3', content.volume_m3,
                             f"a sounding of at most the tank's capacity, {capacity:g} m³ "
                             "(ship file)")
        v15 = float(standard_volume_m3(content.volume_m3, fuel.density_kg_m3,
                                       content.temperature_c))
        try:
            system = system.with_tank_content(name, {content.fuel: v15})
        except FuelSystemError as e:
            raise InputError(voyage.file, f'tank."{name}".volume_m3', content.volume_m3,
                             e.expected) from None
    return system


def load_ship_or_voyage(path: str | Path) -> tuple[FuelSystem, Voyage | None]:
    """A ship file, or a voyage file and its ship as she sails it.

    Parameters
    ----------
    path : str or Path
        A ship file or a voyage file (TOML).

    Returns
    -------
    tuple of (FuelSystem, Voyage or None)
        The ship, and the voyage when ``path`` is a voyage file.
    """
    if is_voyage_file(path):
        voyage = load_voyage(path)
        return ship_for_voyage(voyage), voyage
    return load_ship(path), None
