"""Specific energy, ignition quality, consumption scaling and SO₂ of marine fuels.

- Net and gross specific energy from density, sulphur, water and ash: ISO 8217
  informative annex formula (REFERENCE.md section 4, [P]).
- CCAI, the calculated carbon aromaticity index: ISO 8217 annex [P].
- Specific fuel oil consumption scaled to the fuel burnt from the ISO
  reference net specific energy 42 700 kJ/kg (ISO 3046-1 / ISO 15550) [M:
  from memory in REFERENCE.md, unverified].
- SO₂ formed per kg of sulphur burnt, 64.066/32.06 [D].
- SO₂ (ppm) / CO₂ (% v/v) ratio limits for exhaust gas cleaning equivalence,
  MEPC.340(77) Table 1 [P].
"""

from __future__ import annotations

from types import MappingProxyType

import numpy as np
from numpy.typing import ArrayLike

from planner.fuels._arrays import FloatOrArray, f64, out, require

ISO_REFERENCE_Q_NET_MJ_KG = 42.7
"""ISO reference net specific energy for engine consumption figures, MJ/kg.

42 700 kJ/kg per ISO 3046-1 / ISO 15550. From memory ([M] in REFERENCE.md):
confirm against the engine maker's shop-test conditions.
"""

SO2_PER_KG_SULPHUR = 64.066 / 32.06
"""kg of SO₂ formed per kg of sulphur burnt, ≈ 1.998 (molar masses; REFERENCE.md [D]).

Assumes all the sulphur leaves as SO₂ (a few per cent leave as SO₃/sulphate in
practice). The two molar masses are as REFERENCE.md prints them (SO₂ 64.066,
S 32.06 g/mol); their slight inconsistency only affects the fourth digit.
"""

SO2_CO2_RATIO_LIMITS: MappingProxyType[float, float] = MappingProxyType(
    {0.10: 4.3, 0.50: 21.7, 1.00: 43.3, 1.50: 65.0, 3.50: 151.7, 4.50: 195.0}
)
"""MEPC.340(77) Table 1: fuel sulphur limit, % m/m → SO₂ (ppm) / CO₂ (% v/v) ratio limit."""


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
    """Net (lower) specific energy of a marine fuel, MJ/kg: ISO 8217 informative annex.

    ``Q_net = (46.704 − 8.802e-6·ρ² + 3.167e-3·ρ)·[1 − 0.01(w + a + s)]
    + 0.01·(9.420·s − 2.449·w)``

    Parameters
    ----------
    density_kg_m3 : float or array
        Density at 15 °C, kg/m³.
    sulphur_pct, water_pct, ash_pct : float or array
        Sulphur, water and ash, % m/m. Water on a delivery note is often given
        in % v/v; for fuel oils near 1000 kg/m³ the difference is negligible.

    Notes
    -----
    An estimate from bulk properties, not a calorimeter (bomb) result; use a
    measured value when the supplier gives one. Formula and constants as
    REFERENCE.md quotes the annex; intended for marine fuels (ISO 8217 grades).
    Whether the annex gives a separate constant set for distillates is not
    settled in REFERENCE.md; this one set is used for all fuels. Typical
    marine fuels lie at about 39-42 MJ/kg net (common practice).
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
    """Gross (higher) specific energy of a marine fuel, MJ/kg: ISO 8217 informative annex.

    ``Q_gr = (52.190 − 8.802e-6·ρ²)·[1 − 0.01(w + a + s)] + 0.0942·s``

    Same parameters, units and validity as :func:`net_specific_energy_mj_kg`.
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
    """Calculated carbon aromaticity index (dimensionless): ISO 8217 annex.

    ``CCAI = ρ − 81 − 141·log10(log10(ν + 0.85)) − 483·log10((T + 273)/323)``

    Parameters
    ----------
    density_kg_m3 : float or array
        Density at 15 °C, kg/m³.
    viscosity_cst : float or array
        Kinematic viscosity, cSt, at ``temperature_c``.
    temperature_c : float or array, default 50
        Temperature of that viscosity, °C (the formula uses 273, as printed).

    Notes
    -----
    An ignition-quality indicator for **residual** fuels (higher is worse;
    values of roughly 800-870 are usual); not meaningful for distillates.
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
    """Specific fuel oil consumption, g/kWh, of a fuel of net specific energy ``q_net_mj_kg``.

    ``SFOC_fuel = SFOC_ISO × 42.7 / Q_net``: engine consumption is quoted at
    the ISO reference net specific energy :data:`ISO_REFERENCE_Q_NET_MJ_KG`
    (42 700 kJ/kg, ISO 3046-1 / ISO 15550, [M] from memory); a fuel with less
    energy per kg needs proportionally more mass for the same work.

    Parameters
    ----------
    sfoc_g_kwh : float or array
        Consumption at ISO reference conditions, g/kWh.
    q_net_mj_kg : float or array
        Net specific energy of the fuel burnt, MJ/kg (> 0).
    """
    q = f64(q_net_mj_kg)
    require(
        np.isfinite(q) & (q > 0.0), lambda: f"q_net_mj_kg must be positive, got {q_net_mj_kg!r}"
    )
    return out(f64(sfoc_g_kwh) * ISO_REFERENCE_Q_NET_MJ_KG / q)


def so2_formed_kg(sulphur_burnt_kg: ArrayLike) -> FloatOrArray:
    """SO₂ formed, kg, from ``sulphur_burnt_kg`` kg of sulphur (× :data:`SO2_PER_KG_SULPHUR`)."""
    return out(f64(sulphur_burnt_kg) * SO2_PER_KG_SULPHUR)


def so2_from_fuel_kg(fuel_burnt_kg: ArrayLike, sulphur_pct: ArrayLike) -> FloatOrArray:
    """SO₂ formed, kg, when ``fuel_burnt_kg`` kg of fuel with ``sulphur_pct`` % m/m is burnt."""
    return so2_formed_kg(f64(fuel_burnt_kg) * f64(sulphur_pct) / 100.0)


def so2_co2_ratio_limit(sulphur_limit_pct: float) -> float:
    """SO₂ (ppm) / CO₂ (% v/v) ratio equivalent to a fuel sulphur limit: MEPC.340(77) Table 1.

    Parameters
    ----------
    sulphur_limit_pct : float
        One of the limits in the table (0.10, 0.50, 1.00, 1.50, 3.50, 4.50
        % m/m), matched to within 1e-9.

    Raises
    ------
    ValueError
        For any other value: the table lists only these limits, and this
        function does not interpolate.
    """
    for limit, ratio in SO2_CO2_RATIO_LIMITS.items():
        if abs(float(sulphur_limit_pct) - limit) <= 1e-9:
            return ratio
    listed = ", ".join(f"{k:.2f}" for k in SO2_CO2_RATIO_LIMITS)
    raise ValueError(
        f"no MEPC.340(77) SO2/CO2 ratio for a {sulphur_limit_pct!r} % m/m limit; "
        f"the table lists {listed} % m/m"
    )
