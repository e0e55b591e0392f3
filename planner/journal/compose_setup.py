"""Set-up and fuel entries from what the crew typed, or from the ship file.

:func:`setup_entry` records the ship (name, IMO number), the tank names the
journal knows and, read from the ship file (:mod:`.ship_link`), each tank's
capacity and the circuits; :func:`fuel_entry` a fuel on board with the
bunker delivery note's items (MARPOL Annex VI regulation 18 and Appendix V
[MARPOL-VI], from memory: reference, port and date of bunkering, supplier,
product, quantity, density at 15 °C, sulphur, the supplier's declaration
and the seal of the MARPOL sample), all but the reference, sulphur and
density optional. Both build inside the append, like :mod:`.compose`.
"""

from __future__ import annotations

import dataclasses

from geo.errors import InputError
from planner.fuels.fuel import MAX_SULPHUR_PCT
from planner.journal.compose import Builder, Typed, _entry, _simple, _when, _who
from planner.journal.details import (
    FuelDetails,
    FuelSpec,
    SetupDetails,
    TankCapacity,
    valid_imo,
)
from planner.journal.entries import FUEL, SETUP, Entry, Record
from planner.journal.state import JournalState

BDN_OPTIONS = {"port": "--port", "bunkered_on": "--bunkered", "supplier": "--supplier",
               "product": "--product", "quantity_t": "--quantity", "declaration":
               "--declaration", "sample_seal": "--sample-seal"}
"""The optional delivery-note items of :class:`FuelSpec` and the ``log fuel`` options."""


def check_imo(imo: str, option: str = "--imo") -> str:
    """The 7 digits of an IMO number typed as ``1234567`` or ``IMO 1234567``, check digit valid."""
    digits = imo.strip().upper().removeprefix("IMO").strip()
    if not valid_imo(digits):
        raise InputError(option, "", imo, "a 7-digit IMO number whose last digit is its check "
                                          "digit (the first six times 7,6,5,4,3,2, summed, mod 10)")
    return digits


def setup_entry(t: Typed, ship: str | None, imo: str | None, tanks: tuple[str, ...], *,
                capacities: tuple[TankCapacity, ...] = (), circuits: tuple[str, ...] = (),
                source: str = "", scrubbers: tuple[str, ...] = ()) -> Builder:
    """The ship's set-up: name and IMO number (entry 1), or later tank names to add; with
    the tanks' capacities, the circuits and the scrubbers when read from the ship file
    ``source``."""
    imo_digits = check_imo(imo) if imo else None
    names = tuple(n.strip() for n in tanks)
    for n in names:
        if not n or names.count(n) > 1:
            raise InputError("--tank", "", n, "tank names, each once")

    def make(state: JournalState) -> Entry:
        if state.last_seq == 0 and (not ship or not ship.strip() or not imo_digits):
            raise InputError("--ship" if not ship else "--imo", "", None,
                             "the ship's name and IMO number")
        if state.last_seq and not (ship or imo_digits or names):
            raise InputError("setup", "", None, "something to set: --tank, --ship or --imo")
        moment, offset, _ = _when(dataclasses.replace(t, at=None), state, None)
        record = Record(moment, offset, None, None, None, None, (),
                        SetupDetails(ship.strip() if ship else None, imo_digits, names,
                                     capacities, circuits, source, scrubbers))
        return _entry(SETUP, _who(t), record)
    return make


def fuel_entry(t: Typed, name: str, grade: str, sulphur_pct: float | None,
               density15_kg_m3: float | None, bdn_ref: str | None, **items: object) -> Builder:
    """A fuel on board with its delivery-note data, for later entries to name; ``items``
    are the optional ones of :data:`BDN_OPTIONS` (None: not given)."""
    if sulphur_pct is None or not 0.0 <= sulphur_pct <= MAX_SULPHUR_PCT:
        raise InputError("--sulphur", "", sulphur_pct, f"% m/m from the delivery note, 0 to "
                         f"{MAX_SULPHUR_PCT:.2f} (the highest global limit there has been)")
    if density15_kg_m3 is None or not 653.0 <= density15_kg_m3 <= 1075.0:
        raise InputError("--density", "", density15_kg_m3,
                         "kg/m³ at 15 °C from the delivery note, 653 to 1075 (Table 54B)")
    for opt, v in (("fuel", name), ("--bdn", bdn_ref)):
        if not v or not v.strip():
            raise InputError(opt, "", None, "the fuel's name and its delivery-note reference")
    given = {k: (v.strip() if isinstance(v, str) else v) for k, v in items.items()
             if v is not None}
    for key, value in given.items():
        try:
            FuelSpec("x", "", 0.0, 850.0, "x", **{key: value})
        except (TypeError, ValueError) as exc:
            why = str(exc).split(" must be ")[-1].split(", got")[0]
            raise InputError(BDN_OPTIONS.get(key, key), "", value, why) from None
    spec = FuelSpec(name.strip(), (grade or "").strip(), sulphur_pct, density15_kg_m3,
                    bdn_ref.strip(), **given)
    return _simple(FUEL, dataclasses.replace(t, fuels=()),
                   lambda state, fuels: FuelDetails(spec, (t.remarks or "").strip()))
