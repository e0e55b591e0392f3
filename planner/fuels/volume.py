"""Volume correction to 15 °C and bunker mass: ASTM Table 54B (ISO 91-1 / API MPMS 11.1, 1980).

The volume correction factor turns a volume observed at ``t`` °C into the
volume at the 15 °C standard temperature ([TABLE-54B] [S])::

    VCF = exp(−α·Δt·(1 + 0.8·α·Δt)),   Δt = t − 15
    α   = K0/ρ² + K1/ρ                 (ρ = density at 15 °C, kg/m³)

The band of constants is chosen by density at 15 °C, not by product name:

===================  ===========  ==========  ==========================
ρ15, kg/m³           K0           K1          source
===================  ===========  ==========  ==========================
838.5 - 1075.0       186.9696     0.4862      [TABLE-54B] [S] (fuel oils)
787.5 - 838.5        594.5418     0           [TABLE-54B] [S] (jet/kerosene)
770.5 - 787.5        α = A + B/ρ², A = −0.00336312, B = 2680.3206    [M]
653.0 - 770.5        346.4228     0.4388      [M] (gasolines)
===================  ===========  ==========  ==========================

[M]: the transition and gasoline bands ([TABLE-54B] [M]), and the overall
density limits 653-1075 kg/m³, are from memory; the tests only check they
join the neighbouring bands smoothly. The table's own
temperature range (about −18 to 150 °C for fuel oils) is also from memory
and not enforced.

The continuous formula is used without the printed table's intermediate
roundings, so a result may differ from a printed table entry by one unit in
the fourth decimal.

Mass
----
Mass in vacuum, tonnes = V15 × ρ15 / 1000. Bunker delivery notes and trade
usually state mass "in air" (weight), which removes the air buoyancy:
V15 × (ρ15 − 1.1) / 1000 [M: the well-known 1.1 kg/m³ weight-in-air
correction, from memory; no bibliography entry gives it yet]. :func:`mass_t`
gives mass in vacuum by default and weight in air with ``in_air=True``.
"""

from __future__ import annotations

import numpy as np
from numpy.typing import ArrayLike

from planner.fuels._arrays import FloatOrArray, f64, out, require

STANDARD_TEMPERATURE_C = 15.0
"""Standard (reference) temperature of ISO 91-1, °C."""

TABLE_54B_MIN_DENSITY_KG_M3 = 653.0
"""Lowest density at 15 °C covered by Table 54B, kg/m³ ([TABLE-54B] [M])."""

TABLE_54B_MAX_DENSITY_KG_M3 = 1075.0
"""Highest density at 15 °C covered by Table 54B, kg/m³ ([TABLE-54B] [M])."""

AIR_BUOYANCY_KG_M3 = 1.1
"""Density subtracted for weight in air (buoyancy of air), kg/m³ [M], from memory."""

# (lower bound inclusive, K0, K1) for the K0/ρ² + K1/ρ bands.
_FUEL_OIL = (838.5, 186.9696, 0.4862)  # [TABLE-54B] [S]
_JET = (787.5, 594.5418, 0.0)  # [TABLE-54B] [S]
_TRANSITION_LOW = 770.5  # [TABLE-54B] [M]
_TRANSITION_A = -0.00336312  # [TABLE-54B] [M]
_TRANSITION_B = 2680.3206  # [TABLE-54B] [M]
_GASOLINE = (TABLE_54B_MIN_DENSITY_KG_M3, 346.4228, 0.4388)  # [TABLE-54B] [M]


def thermal_expansion_coefficient(density15_kg_m3: ArrayLike) -> FloatOrArray:
    """Coefficient of thermal expansion at 15 °C of ASTM Table 54B.

    ``α = K0/ρ² + K1/ρ`` with the band constants of the module docstring (the
    transition band ``α = A + B/ρ²``).

    Parameters
    ----------
    density15_kg_m3 : float or array_like [kg/m³]
        Density at 15 °C, within 653-1075 kg/m³ (the table's range, [M]).

    Returns
    -------
    alpha : float or ndarray [1/°C]
        About 6.8e-4 for a 990 kg/m³ fuel oil.

    Notes
    -----
    [TABLE-54B]: the fuel-oil (838.5-1075 kg/m³) and jet (787.5-838.5 kg/m³)
    bands [S]; the transition and gasoline bands [M], from memory. The band
    is chosen by density, not by product name.

    Examples
    --------
    >>> round(thermal_expansion_coefficient(990.0), 7)
    0.0006819
    """
    rho = f64(density15_kg_m3)
    require(
        np.isfinite(rho)
        & (rho >= TABLE_54B_MIN_DENSITY_KG_M3)
        & (rho <= TABLE_54B_MAX_DENSITY_KG_M3),
        lambda: (
            f"density15_kg_m3 must be within {TABLE_54B_MIN_DENSITY_KG_M3}-"
            f"{TABLE_54B_MAX_DENSITY_KG_M3} kg/m³ for Table 54B, got {density15_kg_m3!r}"
        ),
    )
    inv2 = 1.0 / (rho * rho)
    alpha = np.select(
        [rho >= _FUEL_OIL[0], rho >= _JET[0], rho >= _TRANSITION_LOW],
        [
            _FUEL_OIL[1] * inv2 + _FUEL_OIL[2] / rho,
            _JET[1] * inv2 + _JET[2] / rho,
            _TRANSITION_A + _TRANSITION_B * inv2,
        ],
        default=_GASOLINE[1] * inv2 + _GASOLINE[2] / rho,
    )
    return out(alpha)


def volume_correction_factor(density15_kg_m3: ArrayLike, temperature_c: ArrayLike) -> FloatOrArray:
    """Volume correction factor (VCF) of ASTM Table 54B: volume at 15 °C per observed volume.

    ``VCF = exp(−α·Δt·(1 + 0.8·α·Δt))``, ``Δt = temperature_c − 15``; below 1
    above 15 °C, above 1 below it.

    Parameters
    ----------
    density15_kg_m3 : float or array_like [kg/m³]
        Density at 15 °C, 653-1075 kg/m³.
    temperature_c : float or array_like [°C]
        Temperature of the observed volume.

    Returns
    -------
    VCF : float or ndarray [-]
        Volume correction factor to 15 °C.

    Notes
    -----
    [TABLE-54B] [S] (the generalized-products table, ISO 91-1), for densities
    of its bands (:func:`thermal_expansion_coefficient`). The continuous
    formula is used without the printed table's roundings, so a result may
    differ from a table entry by one unit in the fourth decimal. The table's
    temperature range (about −18 to 150 °C for fuel oils, [M]) is not
    enforced.

    Examples
    --------
    [TABLE-54B] worked bunker examples [P]: ρ15 992.0 kg/m³ at 36 °C gives
    0.9857, ρ15 990.3 kg/m³ at 34 °C gives 0.9870.

    >>> round(volume_correction_factor(992.0, 36.0), 4)
    0.9857
    >>> f"{volume_correction_factor(990.3, 34.0):.4f}"
    '0.9870'
    """
    t = f64(temperature_c)
    require(np.isfinite(t), lambda: f"temperature_c must be finite, got {temperature_c!r}")
    alpha = f64(thermal_expansion_coefficient(density15_kg_m3))
    dt = t - STANDARD_TEMPERATURE_C
    return out(np.exp(-alpha * dt * (1.0 + 0.8 * alpha * dt)))


def standard_volume_m3(
    observed_m3: ArrayLike, density15_kg_m3: ArrayLike, temperature_c: ArrayLike
) -> FloatOrArray:
    """Volume at 15 °C of a volume observed at another temperature (ASTM Table 54B).

    ``V15 = V_t × VCF(ρ15, t)``

    Parameters
    ----------
    observed_m3 : float or array_like [m³]
        Volume at the observed temperature, ≥ 0.
    density15_kg_m3 : float or array_like [kg/m³]
        Density at 15 °C, 653-1075 kg/m³.
    temperature_c : float or array_like [°C]
        Temperature of the fuel when the volume was measured.

    Returns
    -------
    V15 : float or ndarray [m³]
        Volume at 15 °C.

    Notes
    -----
    [TABLE-54B] [S]; validity as :func:`volume_correction_factor`.

    Examples
    --------
    1000 m³ of a 992.0 kg/m³ fuel at 36 °C ([TABLE-54B] worked example [P],
    VCF 0.9857):

    >>> round(standard_volume_m3(1000.0, 992.0, 36.0), 1)
    985.7
    """
    v = f64(observed_m3)
    require(np.isfinite(v) & (v >= 0.0), lambda: f"observed_m3 must be >= 0, got {observed_m3!r}")
    return out(v * f64(volume_correction_factor(density15_kg_m3, temperature_c)))


def density_at_temperature_kg_m3(
    density15_kg_m3: ArrayLike, temperature_c: ArrayLike
) -> FloatOrArray:
    """Density at a temperature of a fuel of given density at 15 °C.

    ``ρ_t = ρ15 × VCF(ρ15, t)`` (mass is conserved, volume follows Table 54B).

    Parameters
    ----------
    density15_kg_m3 : float or array_like [kg/m³]
        Density at 15 °C, 653-1075 kg/m³.
    temperature_c : float or array_like [°C]
        Temperature.

    Returns
    -------
    rho_t : float or ndarray [kg/m³]
        Density at ``temperature_c``.

    Notes
    -----
    [TABLE-54B] [S] and a mass balance ([D]); validity as
    :func:`volume_correction_factor`.

    Examples
    --------
    >>> round(density_at_temperature_kg_m3(992.0, 36.0), 1)
    977.8
    """
    return out(f64(density15_kg_m3) * f64(volume_correction_factor(density15_kg_m3, temperature_c)))


def mass_t(
    observed_m3: ArrayLike,
    density15_kg_m3: ArrayLike,
    temperature_c: ArrayLike,
    in_air: bool = False,
) -> FloatOrArray:
    """Mass of a volume of fuel measured at an observed temperature.

    ``m = V15 × ρ15 / 1000`` (mass in vacuum), or with ``in_air=True`` the
    weight in air ``V15 × (ρ15 − 1.1) / 1000`` [M, from memory], as commonly
    stated on delivery notes.

    Parameters
    ----------
    observed_m3 : float or array_like [m³]
        Volume at the observed temperature, ≥ 0.
    density15_kg_m3 : float or array_like [kg/m³]
        Density at 15 °C, 653-1075 kg/m³.
    temperature_c : float or array_like [°C]
        Temperature of the fuel when the volume was measured.
    in_air : bool, default False
        Subtract the air buoyancy (:data:`AIR_BUOYANCY_KG_M3`).

    Returns
    -------
    m : float or ndarray [t]
        Mass in vacuum, or weight in air.

    Notes
    -----
    V15 by [TABLE-54B] [S]; the 1.1 kg/m³ air-buoyancy correction is from
    memory ([M]; no bibliography entry gives it).

    Examples
    --------
    >>> round(mass_t(1000.0, 991.0, 15.0), 6), round(mass_t(1000.0, 991.0, 15.0, in_air=True), 6)
    (991.0, 989.9)
    """
    rho = f64(density15_kg_m3)
    v15 = f64(standard_volume_m3(observed_m3, rho, temperature_c))
    effective = rho - AIR_BUOYANCY_KG_M3 if in_air else rho
    return out(v15 * effective / 1000.0)
