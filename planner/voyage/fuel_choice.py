"""Which fuel to burn on each stretch of the route.

On every stretch the planner burns the fuel on board with the highest
sulphur content that meets the stretch's limit *by its delivery-note
sulphur* (the limits of [MARPOL-VI] regulation 14 [P] apply to the fuel's
sulphur content, which the delivery note of regulation 18 states [M]):
lower-sulphur fuel costs more,
so no stretch burns a cleaner fuel than it must. An optional fuel-choice
margin (the voyage file's ``[margins] fuel_choice_margin``, a share of the
limit, off by default) asks for ``sulphur <= limit × (1 − margin)`` instead;
a fuel within the limit that the margin passes over is recorded on the
choice, so the plan can say what it costs. The flushing target of a
changeover (``sulphur_target_fraction`` × limit) is a separate figure: it is
about the blend at the inlets, not about which fuel is legal.

A stretch that no fuel on board can meet is an error naming the stretch.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass

from geo.compliance import Stretch
from geo.errors import InputError
from planner.fuels import Fuel

_EPS = 1e-12


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
        The sulphur the fuel had to be at or under: the limit × (1 − fuel-choice margin).
    reason : str
        Why this fuel, in words (printed with the plan).
    passed_over : tuple of Fuel
        Fuels with more sulphur than ``fuel`` that meet the limit by their delivery note
        but not the fuel-choice margin (empty without a margin).
    """

    stretch: Stretch
    fuel: Fuel
    target_pct: float
    reason: str
    passed_over: tuple[Fuel, ...] = ()


def fuel_choice_target_pct(limit_pct: float, choice_margin: float) -> float:
    """The sulphur a fuel must be at or under to be chosen, % m/m.

    Parameters
    ----------
    limit_pct : float [% m/m]
        The limit in force.
    choice_margin : float [-]
        The share of the limit kept as a margin, in [0, 1) (0: the limit itself).

    Examples
    --------
    A 0.48 % fuel against the 0.50 % global cap: legal with no margin, passed
    over with a 10 % margin (0.45 %):

    >>> fuel_choice_target_pct(0.50, 0.0), round(fuel_choice_target_pct(0.50, 0.1), 6)
    (0.5, 0.45)
    """
    if not 0.0 <= choice_margin < 1.0:
        raise ValueError(f"choice_margin must be in [0, 1), got {choice_margin}")
    return limit_pct * (1.0 - choice_margin)


def choose_fuels(stretches: Sequence[Stretch], fuels: Sequence[Fuel], choice_margin: float = 0.0,
                 file: str = "") -> list[FuelChoice]:
    """The fuel for every stretch (see the module notes).

    Parameters
    ----------
    stretches : sequence of Stretch
        The route check's stretches, in route order.
    fuels : sequence of Fuel
        The fuels on board.
    choice_margin : float [-]
        The fuel-choice margin, a share of each limit in [0, 1) (default 0: a fuel is
        judged on its delivery-note sulphur against the limit itself).
    file : str
        The voyage file, named by the error.

    Returns
    -------
    list of FuelChoice
        One per stretch, in route order.

    Raises
    ------
    InputError
        If no fuel on board meets a stretch's limit (with the margin).
    """
    ranked = sorted(fuels, key=lambda f: f.sulphur_pct, reverse=True)
    out = []
    for st in stretches:
        target = fuel_choice_target_pct(st.limit_pct, choice_margin)
        ok = [f for f in ranked if f.sulphur_pct <= target + _EPS]
        if not ok:
            where = ", ".join(st.areas) or "global cap"
            best = min(fuels, key=lambda f: f.sulphur_pct)
            shown = (f"{target:.3f} % m/m (the {st.limit_pct:.2f} % limit less the "
                     f"fuel-choice margin {choice_margin * 100:g} %)" if choice_margin > 0 else
                     f"the {st.limit_pct:.2f} % m/m limit")
            raise InputError(file, f"stretch {st.from_nm:.1f}-{st.to_nm:.1f} nm ({where})",
                             f"lowest sulphur on board {best.sulphur_pct:.3f} % ({best.name})",
                             f"a fuel at or under {shown}")
        pick = ok[0]
        passed = tuple(f for f in ranked if target + _EPS < f.sulphur_pct <= st.limit_pct + _EPS)
        too_high = [f.name for f in ranked if f.sulphur_pct > st.limit_pct + _EPS]
        why = (f"{pick.name} ({pick.sulphur_pct:.3f} %) is the highest-sulphur fuel on board "
               f"within the {st.limit_pct:.2f} % limit by its delivery note")
        if choice_margin > 0:
            why += (f" and the fuel-choice margin {choice_margin * 100:g} % (at or under "
                    f"{target:.3f} %)")
        if passed:
            why += (f"; {', '.join(f'{f.name} ({f.sulphur_pct:.3f} %)' for f in passed)} "
                    "would be legal but the margin passes it over")
        if too_high:
            why += f"; {', '.join(too_high)} would exceed the limit"
        out.append(FuelChoice(st, pick, target, why, passed))
    return out


def regular_fuel(choices: Sequence[FuelChoice]) -> Fuel:
    """The highest-sulphur fuel chosen for any stretch: the voyage's regular fuel.

    Parameters
    ----------
    choices : sequence of FuelChoice
        The choices of :func:`choose_fuels` (at least one).
    """
    return max((c.fuel for c in choices), key=lambda f: f.sulphur_pct)
