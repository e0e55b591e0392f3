"""Combustion of a fuel burnt uncleaned: its SO₂/CO₂ emission ratio, and a fuel's carbon.

The exhaust gas cleaning guidelines ([MEPC-340] Table 1 [P]) state each fuel
sulphur limit as an SO₂ (ppm) / CO₂ (% v/v) ratio of the exhaust. Burnt
without cleaning, all the sulphur taken to leave as SO₂ and all the carbon
as CO₂, a fuel gives (both gases in the same exhaust, so their volume shares
are their mole shares) [D]::

    ratio = 10⁴ × (w_S / M_S) / (w_C / M_C)        [ppm per % v/v]

with ``w_S``, ``w_C`` the mass fractions of sulphur and carbon and the
molar masses M_S 32.06, M_C 12.011 g/mol ([IUPAC-2021] [P]). The table's six
values are this stoichiometry at one carbon content: every row, at the
precision printed, is reproduced by one ``w_C`` from 0.8643 to 0.8647 (the
test works the interval out), so :data:`TABLE_CARBON_PCT` is 86.45 %.

Limits the table does not list: :func:`ratio_limit` refuses them; the plan
states :func:`equivalent_ratio` instead, the same stoichiometry at the
table's carbon, and says it is not a tabulated value (our choice,
documented; [D]).

The carbon mass fraction of a fuel comes from its delivery note or analysis
when given (``Fuel.carbon_pct``), else a typical value for its class: the
carbon contents of the IMO CO₂ conversion factors ([MEPC-308] [M], from
memory): diesel/gas oil (ISO 8217 grades DMX to DMB) 0.8744, light fuel oil
(RMA to RMD) 0.8594, heavy fuel oil (RME to RMK) 0.8493, for
C_F = 3.206, 3.151 and 3.114 t CO₂/t fuel (C_F = w_C × 44/12). Trade names
MGO and MDO count as gas oil; any other grade by :attr:`Fuel.is_residual`,
a residual as heavy fuel oil (the VLSFO and HSFO of the trade are mostly
RMG/RMK grades: common practice).

The scrubber's approval and its operating manual, and the continuous
monitoring they require, decide compliance; these figures only show what
cleaning a fuel would need.
"""

from __future__ import annotations

from dataclasses import dataclass

from planner.fuels.energy import SO2_CO2_RATIO_LIMITS, so2_co2_ratio_limit

M_S_G_MOL = 32.06
"""Molar mass of sulphur, g/mol ([IUPAC-2021] conventional value [P])."""

M_C_G_MOL = 12.011
"""Molar mass of carbon, g/mol ([IUPAC-2021] conventional value [P])."""

TABLE_CARBON_PCT = 86.45
"""Carbon content, % m/m, at which the stoichiometric ratio reproduces every row of
[MEPC-340] Table 1 at the precision it prints (interval 86.43-86.47 %, [D])."""


@dataclass(frozen=True)
class CarbonClass:
    """A fuel class of the IMO CO₂ conversion factors ([MEPC-308] [M], from memory).

    Parameters
    ----------
    name : str
        The class as the guidelines name it.
    grades : str
        The ISO 8217 grades it covers, in words.
    carbon_pct : float [% m/m]
        Its carbon content.
    cf_t_t : float [t CO₂ / t fuel]
        Its CO₂ conversion factor C_F as printed.
    """

    name: str
    grades: str
    carbon_pct: float
    cf_t_t: float

    def __post_init__(self) -> None:
        if not 0.0 < self.carbon_pct < 100.0 or self.cf_t_t <= 0.0:
            raise ValueError(f"carbon class {self.name!r}: carbon_pct in (0, 100) and a "
                             f"positive C_F expected, got {self.carbon_pct!r}, {self.cf_t_t!r}")


GAS_OIL = CarbonClass("diesel/gas oil", "ISO 8217 DMX to DMB", 87.44, 3.206)
LIGHT_FUEL_OIL = CarbonClass("light fuel oil", "ISO 8217 RMA to RMD", 85.94, 3.151)
HEAVY_FUEL_OIL = CarbonClass("heavy fuel oil", "ISO 8217 RME to RMK", 84.93, 3.114)
CARBON_CLASSES = (GAS_OIL, LIGHT_FUEL_OIL, HEAVY_FUEL_OIL)
"""The three liquid-fuel classes of the conversion factors ([MEPC-308] [M])."""

_LIGHT_RM = ("RMA", "RMB", "RMC", "RMD")
_GAS_OIL_NAMES = ("MGO", "MDO")


def carbon_class(grade: str, is_residual: bool) -> CarbonClass:
    """The conversion-factor class of a fuel, by its grade (rule in the module notes).

    Parameters
    ----------
    grade : str
        The ISO 8217 grade or trade name (case and spaces ignored).
    is_residual : bool
        Whether the fuel is residual (used when the grade is not ``DM*``, ``RM*``,
        ``MGO`` or ``MDO``).

    Returns
    -------
    CarbonClass
        Gas oil, light fuel oil or heavy fuel oil.

    Examples
    --------
    >>> carbon_class("DMA", False).name, carbon_class("RMB 30", True).name
    ('diesel/gas oil', 'light fuel oil')
    >>> carbon_class("RMG 380", True).name, carbon_class("VLSFO", True).name
    ('heavy fuel oil', 'heavy fuel oil')
    """
    g = grade.strip().upper()
    if g.startswith("DM") or g in _GAS_OIL_NAMES:
        return GAS_OIL
    if g.startswith(_LIGHT_RM):
        return LIGHT_FUEL_OIL
    if g.startswith("RM") or is_residual:
        return HEAVY_FUEL_OIL
    return GAS_OIL


def uncleaned_ratio(sulphur_pct: float, carbon_pct: float) -> float:
    """SO₂/CO₂ ratio of the exhaust of a fuel burnt without cleaning (stoichiometric).

    ``ratio = 10⁴ × (w_S / 32.06) / (w_C / 12.011)``, all S to SO₂ and all C to CO₂.

    Parameters
    ----------
    sulphur_pct : float [% m/m]
        Sulphur of the fuel, 0-100.
    carbon_pct : float [% m/m]
        Carbon of the fuel, above 0 and at most 100.

    Returns
    -------
    ratio : float [ppm / % v/v]
        SO₂ in ppm over CO₂ in % v/v.

    Notes
    -----
    Molar masses [IUPAC-2021] [P]; the stoichiometry [D]. A few per cent of the
    sulphur leaves as SO₃ or sulphate and a little carbon as CO or soot (common
    practice), so a measured ratio is a little lower.

    Examples
    --------
    [MEPC-340] Table 1 gives 4.3 for 0.10 % m/m; at 86.5 % carbon [D]:

    >>> round(uncleaned_ratio(0.10, 86.5), 2), round(uncleaned_ratio(3.50, 86.5), 1)
    (4.33, 151.6)
    """
    s, c = float(sulphur_pct), float(carbon_pct)
    if not 0.0 <= s <= 100.0:
        raise ValueError(f"sulphur_pct must be between 0 and 100 % m/m, got {sulphur_pct!r}")
    if not 0.0 < c <= 100.0:
        raise ValueError(f"carbon_pct must be above 0 and at most 100 % m/m, got {carbon_pct!r}")
    return 1.0e4 * (s / M_S_G_MOL) / (c / M_C_G_MOL)


def ratio_limit(sulphur_limit_pct: float) -> float:
    """The [MEPC-340] Table 1 ratio limit for a fuel sulphur limit (tabulated limits only).

    Parameters
    ----------
    sulphur_limit_pct : float [% m/m]
        0.10, 0.50, 1.00, 1.50, 3.50 or 4.50 (within 1e-9).

    Returns
    -------
    ratio : float [ppm / % v/v]
        SO₂ (ppm) / CO₂ (% v/v) limit.

    Raises
    ------
    ValueError
        For a limit the table does not list (use :func:`equivalent_ratio`, which
        says it is not tabulated).

    Notes
    -----
    [MEPC-340] Table 1 [P], through :func:`planner.fuels.energy.so2_co2_ratio_limit`.

    Examples
    --------
    >>> ratio_limit(0.10), ratio_limit(3.50)
    (4.3, 151.7)
    """
    return so2_co2_ratio_limit(sulphur_limit_pct)


def is_tabulated(sulphur_limit_pct: float) -> bool:
    """Whether [MEPC-340] Table 1 lists this sulphur limit (within 1e-9).

    Parameters
    ----------
    sulphur_limit_pct : float [% m/m]
        A fuel sulphur limit.
    """
    return any(abs(float(sulphur_limit_pct) - k) <= 1e-9 for k in SO2_CO2_RATIO_LIMITS)


def equivalent_ratio(sulphur_limit_pct: float) -> float:
    """The ratio equivalent to any sulphur limit: the table's value when it lists the limit,
    else the stoichiometric ratio at the table's carbon (:data:`TABLE_CARBON_PCT`).

    Parameters
    ----------
    sulphur_limit_pct : float [% m/m]
        A fuel sulphur limit, 0-4.50.

    Returns
    -------
    ratio : float [ppm / % v/v]
        [MEPC-340] Table 1 [P], or the stoichiometric value [D] (not a published limit).

    Examples
    --------
    >>> equivalent_ratio(0.50), round(equivalent_ratio(0.20), 2)
    (21.7, 8.67)
    """
    if is_tabulated(sulphur_limit_pct):
        return ratio_limit(sulphur_limit_pct)
    return uncleaned_ratio(sulphur_limit_pct, TABLE_CARBON_PCT)


def removal_needed(sulphur_pct: float, carbon_pct: float, limit_ratio: float) -> float:
    """The share of the SO₂ a scrubber must remove to bring a fuel's exhaust to a ratio.

    ``removal = 1 − limit / uncleaned`` (0 when the uncleaned ratio is already within it).

    Parameters
    ----------
    sulphur_pct, carbon_pct : float [% m/m]
        The fuel's sulphur and carbon.
    limit_ratio : float [ppm / % v/v]
        The ratio limit, > 0.

    Returns
    -------
    removal : float [-]
        Fraction of the SO₂ removed, 0 to 1 (CO₂ taken as unchanged by the scrubber).

    Notes
    -----
    [D] from :func:`uncleaned_ratio`; the limit from [MEPC-340].

    Examples
    --------
    A 2.60 % heavy fuel oil (84.93 % carbon) against the 0.10 % limit's 4.3:

    >>> round(removal_needed(2.60, 84.93, 4.3) * 100, 2)
    96.25
    """
    if not limit_ratio > 0.0:
        raise ValueError(f"limit_ratio must be positive, got {limit_ratio!r}")
    raw = uncleaned_ratio(sulphur_pct, carbon_pct)
    return 0.0 if raw <= limit_ratio else 1.0 - limit_ratio / raw
