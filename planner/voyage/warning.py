"""One warning of the plan, typed: its kind and the text as printed.

The checks that make them are in :mod:`planner.voyage.checks` (quantity, caution
zones, viscosity, early start, unusual input), :mod:`planner.voyage.fuel_checks`
(flash point, a tank running dry after the flush, a legal fuel passed over) and
:mod:`planner.voyage.carriage` (fuel above 0.50 % on board without a scrubber) and
:mod:`planner.voyage.scrubbing` (a scrubber's load range the plan cannot apply).
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Literal

WarningKind = Literal["departs_inside", "quantity", "caution_zone", "viscosity",
                      "start_before_departure", "unusual_input", "swapped_lat_lon",
                      "flash_point", "fuel_passed_over",
                      "tank_dry", "carriage_ban", "scrubber_load_range"]


@dataclass(frozen=True)
class PlanWarning:
    """One warning of the plan.

    Parameters
    ----------
    kind : WarningKind
        ``"departs_inside"`` (be on compliant fuel before departure),
        ``"quantity"`` (short of a fuel), ``"caution_zone"``, ``"viscosity"``,
        ``"start_before_departure"``, ``"unusual_input"`` (a ship-file value
        outside its usual range), ``"swapped_lat_lon"`` (a route waypoint),
        ``"flash_point"`` (a distillate near its flash point), ``"fuel_passed_over"``
        (a fuel within the limit by its delivery note that the fuel-choice margin passes
        over), ``"tank_dry"`` (a tank at a changeover valve that runs dry soon after
        the flush), ``"carriage_ban"`` (fuel on board above what the ship may carry for
        use: 0.50 % without a scrubber, [MEPC-305]) or ``"scrubber_load_range"`` (a served
        consumer whose load the plan cannot hold to a scrubber's load range).
    text : str
        The warning as printed (JSON ``warnings``, terminal, PDF).
    """

    kind: WarningKind
    text: str
