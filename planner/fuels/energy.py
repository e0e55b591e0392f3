"""Specific energy, ignition quality, consumption scaling and SO₂ of marine fuels.

- Net and gross specific energy from density, sulphur, water and ash: the
  ISO 8217 informative annex formula ([ISO-8217] [P]).
- CCAI, the calculated carbon aromaticity index: ISO 8217 annex ([ISO-8217] [P]).
- Specific fuel oil consumption scaled to the fuel burnt from the ISO
  reference net specific energy 42 700 kJ/kg (ISO 3046-1 / ISO 15550,
  [ISO-3046] [M], from memory, unverified).
- SO₂ formed per kg of sulphur burnt, 64.066/32.06 ([IUPAC-2021] [D]).
- SO₂ (ppm) / CO₂ (% v/v) ratio limits for exhaust gas cleaning equivalence,
  MEPC.340(77) Table 1 ([MEPC-340] [P]).
"""

from __future__ import annotations

from types import MappingProxyType

import numpy as np
from numpy.typing import ArrayLike

from planner.fuels._arrays import FloatOrArray, f64, out, require

ISO_REFERENCE_Q_NET_MJ_KG = 42.7
"""ISO reference net specific energy for engine consumption figures, MJ/kg.

42 700 kJ/kg per ISO 3046-1 / ISO 15550 ([ISO-3046] [M], from memory):
confirm against the engine maker's shop-test conditions.
"""

SO2_PER_KG_SULPHUR = 64.066 / 32.06
"""kg of SO₂ formed per kg of sulphur burnt, ≈ 1.998 (molar masses; [IUPAC-2021] [D]).

Assumes all the sulphur leaves as SO₂ (in practice a few per cent leave as
SO₃/sulphate: common practice). The two molar masses are as [IUPAC-2021] gives
them (SO₂ 64.066, S 32.06 g/mol); their slight inconsistency only affects the
fourth digit.
"""

SO2_CO2_RATIO_LIMITS: MappingProxyType[float, float] = MappingProxyType(
    {0.10: 4.3, 0.50: 21.7, 1.00: 43.3, 1.50: 65.0, 3.50: 151.7, 4.50: 195.0}
)
"""[MEPC-340] Table 1 [P]: fuel sulphur limit, % m/m → SO₂ (ppm) / CO₂ (% v/v) ratio limit."""


def _check_fractions(sulphur_pct: np.ndarray, water_pct: np.ndarray, ash_pct: np.ndarray) -> None:
    checks = (("sulphur_pct", sulphur_pct), ("water_pct", water_pct), ("ash_pct", ash_pct))
    for label, value in checks:
        require(
            np.isfinite(value) & (value >= 0.0) & (value <= 100.0),
            lambda label=label, value=value: (
                f"{label} must be a percentage between 0 and 100, got {value!r}"
            ),
        )


def net_specific_energy_mj_kg(
    density_kg_m3: ArrayLike,
    sulphur_pct: ArrayLike,
    water_pct: ArrayLike = 0.0,
    ash_pct: ArrayLike = 0.0,
) -> FloatOrArray:
    """Net (lower) specific energy of a marine fuel: the ISO 8217 informative annex.

    ``Q_net = (46.704 − 8.802e-6·ρ² + 3.167e-3·ρ)·[1 − 0.01(w + a + s)]
    + 0.01·(9.420·s − 2.449·w)``

    Parameters
    ----------
    density_kg_m3 : float or array_like [kg/m³]
        Density at 15 °C, > 0.
    sulphur_pct, water_pct, ash_pct : float or array_like [% m/m]
        Sulphur, water and ash, 0-100. Water on a delivery note is often given
        in % v/v; for fuel oils near 1000 kg/m³ the difference is negligible.

    Returns
    -------
    Q_net : float or ndarray [MJ/kg]
        Net specific energy.

    Notes
    -----
    An estimate from bulk properties, not a calorimeter (bomb) result; use a
    measured value when the supplier gives one. Formula and constants of the
    annex ([ISO-8217] [P]), intended for marine fuels (the ISO 8217 grades).
    Whether the annex gives a separate constant set for distillates is not
    settled in [ISO-8217]; this one set is used for all fuels. Typical
    marine fuels lie at about 39-42 MJ/kg net (common practice).

    Examples
    --------
    Check value ([ISO-8217] annex formula; check value [D]): ρ 987 kg/m³,
    s 2.5, w 0.02, a 0 % m/m give 40.45 MJ/kg.

    >>> round(net_specific_energy_mj_kg(987.0, 2.5, 0.02, 0.0), 2)
    40.45
    """
    rho, s, w, a = f64(density_kg_m3), f64(sulphur_pct), f64(water_pct), f64(ash_pct)
    require(
        np.isfinite(rho) & (rho > 0.0),
        lambda: f"density_kg_m3 must be positive, got {density_kg_m3!r}",
    )
    _check_fractions(s, w, a)
    base = 46.704 - 8.802e-6 * rho * rho + 3.167e-3 * rho
    return out(base * (1.0 - 0.01 * (w + a + s)) + 0.01 * (9.420 * s - 2.449 * w))


def gross_specific_energy_mj_kg(
    density_kg_m3: ArrayLike,
    sulphur_pct: ArrayLike,
    water_pct: ArrayLike = 0.0,
    ash_pct: ArrayLike = 0.0,
) -> FloatOrArray:
    """Gross (higher) specific energy of a marine fuel: the ISO 8217 informative annex.

    ``Q_gr = (52.190 − 8.802e-6·ρ²)·[1 − 0.01(w + a + s)] + 0.0942·s``

    Parameters
    ----------
    density_kg_m3 : float or array_like [kg/m³]
        Density at 15 °C, > 0.
    sulphur_pct, water_pct, ash_pct : float or array_like [% m/m]
        Sulphur, water and ash, 0-100.

    Returns
    -------
    Q_gr : float or ndarray [MJ/kg]
        Gross specific energy.

    Notes
    -----
    Same source ([ISO-8217] [P]) and validity as
    :func:`net_specific_energy_mj_kg`.

    Examples
    --------
    Check value ([ISO-8217] annex formula; check value [D]): ρ 987 kg/m³,
    s 2.5, w 0.02, a 0 % m/m give 42.75 MJ/kg.

    >>> round(gross_specific_energy_mj_kg(987.0, 2.5, 0.02, 0.0), 2)
    42.75
    """
    rho, s, w, a = f64(density_kg_m3), f64(sulphur_pct), f64(water_pct), f64(ash_pct)
    require(
        np.isfinite(rho) & (rho > 0.0),
        lambda: f"density_kg_m3 must be positive, got {density_kg_m3!r}",
    )
    _check_fractions(s, w, a)
    return out((52.190 - 8.802e-6 * rho * rho) * (1.0 - 0.01 * (w + a + s)) + 0.0942 * s)


def ccai(
    density_kg_m3: ArrayLike, viscosity_cst: ArrayLike, temperature_c: ArrayLike = 50.0
) -> FloatOrArray:
    """Calculated carbon aromaticity index (CCAI) of a residual fuel: ISO 8217 annex.

    ``CCAI = ρ − 81 − 141·log10(log10(ν + 0.85)) − 483·log10((T + 273)/323)``

    Parameters
    ----------
    density_kg_m3 : float or array_like [kg/m³]
        Density at 15 °C.
    viscosity_cst : float or array_like [cSt]
        Kinematic viscosity at ``temperature_c``, > 0.15 cSt.
    temperature_c : float or array_like [°C], default 50
        Temperature of that viscosity (the formula uses 273, as printed).

    Returns
    -------
    CCAI : float or ndarray [-]
        The index.

    Notes
    -----
    [ISO-8217] annex [P]. An ignition-quality indicator for **residual** fuels
    (higher is worse; values of roughly 800-870 are usual, common practice);
    not meaningful for distillates.

    Examples
    --------
    Check value ([ISO-8217] annex CCAI; check value [D]): ρ 991 kg/m³ and
    380 cSt at 50 °C give 852.

    >>> round(ccai(991.0, 380.0, 50.0))
    852
    """
    rho, nu, t = f64(density_kg_m3), f64(viscosity_cst), f64(temperature_c)
    require(
        np.isfinite(nu) & (nu > 0.15),
        lambda: f"viscosity_cst must be > 0.15 cSt, got {viscosity_cst!r}",
    )
    require(
        np.isfinite(t) & (t > -273.0),
        lambda: f"temperature_c must be above -273 °C, got {temperature_c!r}",
    )
    viscosity_term = 141.0 * np.log10(np.log10(nu + 0.85))
    temperature_term = 483.0 * np.log10((t + 273.0) / 323.0)
    return out(rho - 81.0 - viscosity_term - temperature_term)


def sfoc_scaled(sfoc_g_kwh: ArrayLike, q_net_mj_kg: ArrayLike) -> FloatOrArray:
    """Specific fuel oil consumption scaled to the net specific energy of the fuel burnt.

    ``SFOC_fuel = SFOC_ISO × 42.7 / Q_net``: engine consumption is quoted at
    the ISO reference net specific energy :data:`ISO_REFERENCE_Q_NET_MJ_KG`
    (42 700 kJ/kg, ISO 3046-1 / ISO 15550); a fuel with less energy per kg
    needs proportionally more mass for the same work.

    Parameters
    ----------
    sfoc_g_kwh : float or array_like [g/kWh]
        Consumption at ISO reference conditions (any mass-rate unit scales
        the same way, e.g. t/h).
    q_net_mj_kg : float or array_like [MJ/kg]
        Net specific energy of the fuel burnt, > 0.

    Returns
    -------
    SFOC_fuel : float or ndarray [g/kWh]
        Consumption of the fuel burnt, in the unit of ``sfoc_g_kwh``.

    Notes
    -----
    The reference energy is [ISO-3046] [M], from memory; the scaling itself
    is an energy balance ([D]) for the same work at the same efficiency.

    Examples
    --------
    170 g/kWh at ISO conditions, burning a 40.45 MJ/kg fuel:

    >>> round(sfoc_scaled(170.0, 40.45), 1)
    179.5
    """
    q = f64(q_net_mj_kg)
    require(
        np.isfinite(q) & (q > 0.0), lambda: f"q_net_mj_kg must be positive, got {q_net_mj_kg!r}"
    )
    return out(f64(sfoc_g_kwh) * ISO_REFERENCE_Q_NET_MJ_KG / q)


def so2_formed_kg(sulphur_burnt_kg: ArrayLike) -> FloatOrArray:
    """SO₂ formed by burning sulphur.

    ``m_SO2 = m_S × 64.066 / 32.06`` (:data:`SO2_PER_KG_SULPHUR`)

    Parameters
    ----------
    sulphur_burnt_kg : float or array_like [kg]
        Sulphur burnt.

    Returns
    -------
    m_SO2 : float or ndarray [kg]
        SO₂ formed, all the sulphur taken as leaving as SO₂.

    Notes
    -----
    Molar masses S 32.06, SO₂ 64.066 g/mol ([IUPAC-2021] [D]).

    Examples
    --------
    [IUPAC-2021]: 1.998 kg SO₂ per kg sulphur [D].

    >>> round(so2_formed_kg(1.0), 3)
    1.998
    """
    return out(f64(sulphur_burnt_kg) * SO2_PER_KG_SULPHUR)


def so2_from_fuel_kg(fuel_burnt_kg: ArrayLike, sulphur_pct: ArrayLike) -> FloatOrArray:
    """SO₂ formed by burning fuel of a given sulphur content.

    ``m_SO2 = m_fuel × S/100 × 64.066 / 32.06``

    Parameters
    ----------
    fuel_burnt_kg : float or array_like [kg]
        Fuel burnt.
    sulphur_pct : float or array_like [% m/m]
        Sulphur content of that fuel.

    Returns
    -------
    m_SO2 : float or ndarray [kg]
        SO₂ formed.

    Notes
    -----
    [IUPAC-2021] molar masses [D]; see :func:`so2_formed_kg`.

    Examples
    --------
    100 t of 0.50 % m/m fuel holds 500 kg sulphur, about 1 t of SO₂:

    >>> round(so2_from_fuel_kg(100_000.0, 0.5))
    999
    """
    return so2_formed_kg(f64(fuel_burnt_kg) * f64(sulphur_pct) / 100.0)


def so2_co2_ratio_limit(sulphur_limit_pct: float) -> float:
    """SO₂/CO₂ emission ratio equivalent to a fuel sulphur limit: MEPC.340(77) Table 1.

    Parameters
    ----------
    sulphur_limit_pct : float [% m/m]
        One of the limits in the table (0.10, 0.50, 1.00, 1.50, 3.50, 4.50
        % m/m), matched to within 1e-9.

    Returns
    -------
    ratio : float [ppm / % v/v]
        SO₂ (ppm) / CO₂ (% v/v) ratio limit for exhaust gas cleaning.

    Raises
    ------
    ValueError
        For any other value: the table lists only these limits, and this
        function does not interpolate.

    Notes
    -----
    [MEPC-340] Table 1 [P], for exhaust gas cleaning systems accepted as an
    equivalent under [MARPOL-VI] regulation 4.

    Examples
    --------
    [MEPC-340] Table 1 [P]: 4.3 for 0.10 % m/m, 21.7 for 0.50 % m/m.

    >>> so2_co2_ratio_limit(0.10), so2_co2_ratio_limit(0.50)
    (4.3, 21.7)
    """
    for limit, ratio in SO2_CO2_RATIO_LIMITS.items():
        if abs(float(sulphur_limit_pct) - limit) <= 1e-9:
            return ratio
    listed = ", ".join(f"{k:.2f}" for k in SO2_CO2_RATIO_LIMITS)
    raise ValueError(
        f"no MEPC.340(77) SO2/CO2 ratio for a {sulphur_limit_pct!r} % m/m limit; "
        f"the table lists {listed} % m/m"
    )
