"""The SO₂/CO₂ emission ratio on each stretch of a plan: the limit and the fuel burnt.

For every stretch of the route check (one sulphur limit throughout), the ratio
limit equivalent to that limit ([MEPC-340] Table 1 [P], or the stoichiometric
value at the table's carbon for a limit the table does not list [D],
:func:`planner.fuels.combustion.equivalent_ratio`), the ratio of the fuel the
plan burns there if it went uncleaned (:func:`planner.fuels.combustion.uncleaned_ratio`,
the run's fuel, after any changeover is complete), the carbon content used
and where it comes from, and the share of the SO₂ a scrubber would have to
remove: 0 when the fuel is within the stretch's sulphur limit by its delivery
note, else ``1 − limit / uncleaned``.

On a stretch where the plan relies on a scrubber (:class:`ScrubberSpan`), the served
circuits burn their own fuel above the limit: :func:`served_ratios` gives the same
figures for each served circuit's fuel (:class:`ServedRatio`), the ones the scrubber's
operator needs, beside the main fuel's.

Only figures: an exhaust gas cleaning system's approval, its operating manual
and the continuous monitoring they require decide compliance ([MEPC-340]).
Pure functions of the plan's parts.
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence
from dataclasses import dataclass

from planner.fuels import Fuel
from planner.fuels.combustion import (
    TABLE_CARBON_PCT,
    equivalent_ratio,
    is_tabulated,
    removal_needed,
    uncleaned_ratio,
)
from planner.voyage.fuel_choice import FuelChoice
from planner.voyage.runs import Run
from planner.voyage.scrubber_events import ScrubberSpan

_OVERLAP_M = 1e-3  # a span touching a stretch at one end (under 1 mm) is not on it

TABLE_SOURCE = "MEPC.340(77) Table 1"
"""``ratio_limit_source`` of a tabulated limit ([MEPC-340])."""

STOICHIOMETRIC_SOURCE = (f"not in MEPC.340(77) Table 1: stoichiometric at the table's "
                         f"{TABLE_CARBON_PCT:g} % carbon")
"""``ratio_limit_source`` of a limit the table does not list ([D])."""


@dataclass(frozen=True)
class StretchRatio:
    """The emission-ratio figures of one stretch.

    Parameters
    ----------
    limit_pct : float [% m/m]
        The stretch's sulphur limit.
    ratio_limit : float [ppm / % v/v]
        The SO₂/CO₂ ratio equivalent to it.
    ratio_limit_source : str
        :data:`TABLE_SOURCE` or :data:`STOICHIOMETRIC_SOURCE`.
    fuel : str
        The fuel burnt on the stretch.
    sulphur_pct : float [% m/m]
        Its delivery-note sulphur.
    carbon_pct : float [% m/m]
        Its carbon (:attr:`planner.fuels.Fuel.carbon`).
    carbon_source : str
        Where that carbon comes from (:attr:`planner.fuels.Fuel.carbon_source`).
    uncleaned_ratio : float [ppm / % v/v]
        Its exhaust's ratio burnt without cleaning.
    removal_needed : float [-]
        The share of the SO₂ a scrubber would remove to meet ``ratio_limit``, 0 to 1
        (0 when the fuel is within ``limit_pct``).
    """

    limit_pct: float
    ratio_limit: float
    ratio_limit_source: str
    fuel: str
    sulphur_pct: float
    carbon_pct: float
    carbon_source: str
    uncleaned_ratio: float
    removal_needed: float

    def __post_init__(self) -> None:
        if not self.ratio_limit > 0.0 or not 0.0 <= self.removal_needed <= 1.0:
            raise ValueError(f"stretch ratio: a positive ratio limit and a removal in [0, 1] "
                             f"expected, got {self.ratio_limit!r}, {self.removal_needed!r}")

    def json(self) -> dict:
        """The keys added to the plan JSON's stretch rows (ratios ppm per % v/v, % m/m)."""
        return {"ratio_limit": self.ratio_limit, "ratio_limit_source": self.ratio_limit_source,
                "uncleaned_ratio": self.uncleaned_ratio, "carbon_pct": self.carbon_pct,
                "carbon_source": self.carbon_source,
                "so2_removal_needed_pct": self.removal_needed * 100.0}


def stretch_ratio(limit_pct: float, fuel: Fuel) -> StretchRatio:
    """The emission-ratio figures of a stretch with limit ``limit_pct`` burning ``fuel``.

    Parameters
    ----------
    limit_pct : float [% m/m]
        The sulphur limit in force.
    fuel : Fuel
        The fuel burnt.

    Returns
    -------
    StretchRatio
        Ratios in ppm SO₂ per % v/v CO₂ ([MEPC-340]; stoichiometry [D]).

    Examples
    --------
    >>> hfo = Fuel(name="hfo", grade="RMG 380", sulphur_pct=2.6, density_kg_m3=991.0,
    ...            viscosity_cst=380.0, viscosity_ref_c=50.0)
    >>> r = stretch_ratio(0.10, hfo)
    >>> r.ratio_limit, round(r.uncleaned_ratio, 1), round(r.removal_needed * 100, 2)
    (4.3, 114.7, 96.25)
    """
    limit = equivalent_ratio(limit_pct)
    source = TABLE_SOURCE if is_tabulated(limit_pct) else STOICHIOMETRIC_SOURCE
    c = fuel.carbon
    raw = uncleaned_ratio(fuel.sulphur_pct, c)
    within = fuel.sulphur_pct <= limit_pct + 1e-12
    need = 0.0 if within else removal_needed(fuel.sulphur_pct, c, limit)
    return StretchRatio(limit_pct, limit, source, fuel.name, fuel.sulphur_pct, c,
                        fuel.carbon_source, raw, need)


def burnt_on(runs: Sequence[Run], from_m: float) -> Fuel:
    """The fuel of the run a stretch starting at ``from_m`` belongs to (the last run for a
    stretch past every run's start, as the plan report reads it).

    Parameters
    ----------
    runs : sequence of Run
        The plan's runs, in route order (at least one).
    from_m : float [m]
        Where the stretch starts, along the route from departure.
    """
    for r in runs:
        if r.from_m - 1e-6 <= from_m < r.to_m - 1e-6:
            return r.fuel
    return runs[-1].fuel


def plan_ratios(choices: Sequence[FuelChoice], runs: Sequence[Run]) -> list[StretchRatio]:
    """The emission-ratio figures of every stretch of a plan, in route order.

    Parameters
    ----------
    choices : sequence of FuelChoice
        The plan's fuel choice per stretch (``Plan.choices``: the limits).
    runs : sequence of Run
        The plan's runs (``Plan.runs``: the fuel actually burnt, after the
        stay-compliant rule).
    """
    return [stretch_ratio(c.stretch.limit_pct, burnt_on(runs, c.stretch.from_m))
            for c in choices]


@dataclass(frozen=True)
class ServedRatio:
    """The emission-ratio figures of one served circuit's fuel on a stretch where it relies
    on a scrubber.

    Parameters
    ----------
    circuit : str
        The served circuit.
    scrubbers : tuple of str
        The ship file's scrubbers it relies on (two or more: at once).
    ratio : StretchRatio
        The figures of its fuel against the stretch's limit (:func:`stretch_ratio`).
    """

    circuit: str
    scrubbers: tuple[str, ...]
    ratio: StretchRatio

    def __post_init__(self) -> None:
        if not self.circuit or not self.scrubbers:
            raise ValueError(f"served ratio: a circuit and its scrubbers expected, got "
                             f"{self.circuit!r}, {self.scrubbers!r}")

    def json(self) -> dict:
        """One entry of a stretch row's ``scrubbed`` (ratios ppm per % v/v, % m/m, %)."""
        r = self.ratio
        return {"circuit": self.circuit, "scrubbers": list(self.scrubbers), "fuel": r.fuel,
                "sulphur_pct": r.sulphur_pct, "uncleaned_ratio": r.uncleaned_ratio,
                "carbon_pct": r.carbon_pct, "carbon_source": r.carbon_source,
                "so2_removal_needed_pct": r.removal_needed * 100.0}


def served_ratios(choices: Sequence[FuelChoice], spans: Sequence[ScrubberSpan],
                  fuels: Mapping[str, Fuel],
                  names: Mapping[str, tuple[str, ...]]) -> list[list[ServedRatio]]:
    """For every stretch of a plan, the figures of each served circuit relying on a scrubber
    there (a span of it overlapping the stretch), in the spans' time order, once per
    circuit, scrubber and fuel; an empty list where none does.

    Parameters
    ----------
    choices : sequence of FuelChoice
        The plan's fuel choice per stretch (``Plan.choices``: the stretches and limits).
    spans : sequence of ScrubberSpan
        Where the plan relies on a scrubber (``Plan.scrubber_spans``).
    fuels : mapping of str to Fuel
        The fuels by name (``FuelSystem.fuels``; a span of a fuel not in it, which a plan
        never has, is left out).
    names : mapping of str to tuple of str
        The ship file's scrubbers each span's scrubber stands for (a joint ``"a + b"``);
        a name not in it stands for itself.
    """
    out = []
    for c in choices:
        st = c.stretch
        rows: dict[tuple[str, str, str], ServedRatio] = {}
        for x in spans:
            if min(x.to_m, st.to_m) - max(x.from_m, st.from_m) <= _OVERLAP_M or \
                    x.fuel not in fuels:
                continue
            for circuit in x.circuits:
                key = (circuit, x.scrubber, x.fuel)
                if key not in rows:
                    rows[key] = ServedRatio(circuit, names.get(x.scrubber, (x.scrubber,)),
                                            stretch_ratio(st.limit_pct, fuels[x.fuel]))
        out.append(list(rows.values()))
    return out
