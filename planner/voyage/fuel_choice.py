"""Which fuel to burn on each stretch of the route.

On every stretch the planner burns the fuel on board with the highest
sulphur content that still meets the stretch's limit with the planning
margin (sulphur at or under ``target_fraction`` × limit): lower-sulphur fuel
costs more, so no stretch burns a cleaner fuel than it must. A stretch that
no fuel on board can meet is an error naming the stretch.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass

from geo.compliance import Stretch
from geo.errors import InputError
from planner.fuels import Fuel


@dataclass(frozen=True)
class FuelChoice:
    """The fuel for one stretch, and why.

    Parameters
    ----------
    stretch : Stretch
        The stretch of the route check (one limit in force throughout).
    fuel : Fuel
        The fuel chosen for it.
    target_pct : float [% m/m]
        The sulphur the fuel had to be at or under: the limit × the target fraction.
    reason : str
        Why this fuel, in words (printed with the plan).
    """

    stretch: Stretch
    fuel: Fuel
    target_pct: float
    reason: str


def choose_fuels(stretches: Sequence[Stretch], fuels: Sequence[Fuel], target_fraction: float,
                 file: str = "") -> list[FuelChoice]:
    """The fuel for every stretch (see the module notes).

    Parameters
    ----------
    stretches : sequence of Stretch
        The route check's stretches, in route order.
    fuels : sequence of Fuel
        The fuels on board.
    target_fraction : float [-]
        Aim at this share of each limit, in (0, 1].
    file : str
        The voyage file, named by the error.

    Returns
    -------
    list of FuelChoice
        One per stretch, in route order.

    Raises
    ------
    InputError
        If no fuel on board meets a stretch's target.
    """
    if not 0.0 < target_fraction <= 1.0:
        raise ValueError(f"target_fraction must be in (0, 1], got {target_fraction}")
    ranked = sorted(fuels, key=lambda f: f.sulphur_pct, reverse=True)
    out = []
    for st in stretches:
        target = st.limit_pct * target_fraction
        ok = [f for f in ranked if f.sulphur_pct <= target + 1e-12]
        if not ok:
            where = ", ".join(st.areas) or "global cap"
            best = min(fuels, key=lambda f: f.sulphur_pct)
            raise InputError(file, f"stretch {st.from_nm:.1f}-{st.to_nm:.1f} nm ({where})",
                             f"lowest sulphur on board {best.sulphur_pct:.3f} % ({best.name})",
                             f"a fuel at or under {target:.3f} % m/m ({target_fraction:.0%} of "
                             f"the {st.limit_pct:.2f} % limit)")
        pick = ok[0]
        too_high = [f.name for f in ranked if f.sulphur_pct > target + 1e-12]
        why = (f"{pick.name} ({pick.sulphur_pct:.3f} %) is the highest-sulphur fuel on board at or "
               f"under the target {target:.3f} % ({target_fraction:.0%} of {st.limit_pct:.2f} %)")
        if too_high:
            why += f"; {', '.join(too_high)} would exceed it"
        out.append(FuelChoice(st, pick, target, why))
    return out


def regular_fuel(choices: Sequence[FuelChoice]) -> Fuel:
    """The highest-sulphur fuel chosen for any stretch: the voyage's regular fuel.

    Parameters
    ----------
    choices : sequence of FuelChoice
        The choices of :func:`choose_fuels` (at least one).
    """
    return max((c.fuel for c in choices), key=lambda f: f.sulphur_pct)
