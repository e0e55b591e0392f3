"""Volume correction to 15 °C and bunker mass: ASTM Table 54B (ISO 91-1 / API MPMS 11.1, 1980).

The volume correction factor turns a volume observed at ``t`` °C into the
volume at the 15 °C standard temperature (REFERENCE.md section 4, [S])::

    VCF = exp(−α·Δt·(1 + 0.8·α·Δt)),   Δt = t − 15
    α   = K0/ρ² + K1/ρ                 (ρ = density at 15 °C, kg/m³)

The band of constants is chosen by density at 15 °C, not by product name:

===================  ===========  ==========  ==========================
ρ15, kg/m³           K0           K1          source
===================  ===========  ==========  ==========================
838.5 - 1075.0       186.9696     0.4862      REFERENCE.md [S] (fuel oils)
787.5 - 838.5        594.5418     0           REFERENCE.md [S] (jet/kerosene)
770.5 - 787.5        α = A + B/ρ², A = −0.00336312, B = 2680.3206    [M]
653.0 - 770.5        346.4228     0.4388      [M] (gasolines)
===================  ===========  ==========  ==========================

[M]: the transition and gasoline bands, and the overall density limits
653-1075 kg/m³, are from memory (REFERENCE.md does not list them); the tests
only check they join the neighbouring bands smoothly. The table's own
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
correction, from memory]. :func:`mass_t` gives mass in vacuum by default and
weight in air with ``in_air=True``.
"""

from __future__ import annotations

import numpy as np
from numpy.typing import ArrayLike

from planner.fuels._arrays import FloatOrArray, f64, out, require

STANDARD_TEMPERATURE_C = 15.0
"""Standard (reference) temperature of ISO 91-1, °C."""

TABLE_54B_MIN_DENSITY_KG_M3 = 653.0
"""Lowest density at 15 °C covered by Table 54B, kg/m³ [M]."""

TABLE_54B_MAX_DENSITY_KG_M3 = 1075.0
"""Highest density at 15 °C covered by Table 54B, kg/m³ [M]."""

AIR_BUOYANCY_KG_M3 = 1.1
"""Density subtracted for weight in air (buoyancy of air), kg/m³ [M]."""

# (lower bound inclusive, K0, K1) for the K0/ρ² + K1/ρ bands.
_FUEL_OIL = (838.5, 186.9696, 0.4862)  # REFERENCE.md [S]
_JET = (787.5, 594.5418, 0.0)  # REFERENCE.md [S]
_TRANSITION_LOW = 770.5  # [M]
_TRANSITION_A = -0.00336312  # [M]
_TRANSITION_B = 2680.3206  # [M]
_GASOLINE = (TABLE_54B_MIN_DENSITY_KG_M3, 346.4228, 0.4388)  # [M]


def thermal_expansion_coefficient(density15_kg_m3: ArrayLike) -> FloatOrArray:
    """Table 54B coefficient of thermal expansion α at 15 °C, per °C.

    Parameters
    ----------
    density15_kg_m3 : float or array
        Density at 15 °C, kg/m³, within 653-1075 kg/m³ (the table's range [M]).

    Returns
    -------
    float or array
        α, 1/°C (about 6.8e-4 for a 990 kg/m³ fuel oil).
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
    """Table 54B volume correction factor (VCF): volume at 15 °C per volume at ``temperature_c``.

    ``VCF = exp(−α·Δt·(1 + 0.8·α·Δt))``, ``Δt = temperature_c − 15``; below 1
    above 15 °C, above 1 below it.

    Parameters
    ----------
    density15_kg_m3 : float or array
        Density at 15 °C, kg/m³ (653-1075).
    temperature_c : float or array
        Temperature of the observed volume, °C.
    """
    t = f64(temperature_c)
    require(np.isfinite(t), lambda: f"temperature_c must be finite, got {temperature_c!r}")
    alpha = f64(thermal_expansion_coefficient(density15_kg_m3))
    dt = t - STANDARD_TEMPERATURE_C
    return out(np.exp(-alpha * dt * (1.0 + 0.8 * alpha * dt)))


def standard_volume_m3(
    observed_m3: ArrayLike, density15_kg_m3: ArrayLike, temperature_c: ArrayLike
) -> FloatOrArray:
    """Volume at 15 °C, m³, of ``observed_m3`` m³ measured at ``temperature_c`` °C (Table 54B)."""
    v = f64(observed_m3)
    require(np.isfinite(v) & (v >= 0.0), lambda: f"observed_m3 must be >= 0, got {observed_m3!r}")
    return out(v * f64(volume_correction_factor(density15_kg_m3, temperature_c)))


def density_at_temperature_kg_m3(
    density15_kg_m3: ArrayLike, temperature_c: ArrayLike
) -> FloatOrArray:
    """Density, kg/m³, at ``temperature_c`` °C of a fuel of ``density15_kg_m3`` at 15 °C.

    ``ρ_t = ρ15 × VCF(ρ15, t)`` (mass is conserved, volume follows Table 54B).
    """
    return out(f64(density15_kg_m3) * f64(volume_correction_factor(density15_kg_m3, temperature_c)))


def mass_t(
    observed_m3: ArrayLike,
    density15_kg_m3: ArrayLike,
    temperature_c: ArrayLike,
    in_air: bool = False,
) -> FloatOrArray:
    """Mass, tonnes, of ``observed_m3`` m³ of fuel measured at ``temperature_c`` °C.

    ``m = V15 × ρ15 / 1000`` (mass in vacuum), or with ``in_air=True`` the
    weight in air ``V15 × (ρ15 − 1.1) / 1000`` [M, from memory], as commonly
    stated on delivery notes.

    Parameters
    ----------
    observed_m3 : float or array
        Volume at the observed temperature, m³.
    density15_kg_m3 : float or array
        Density at 15 °C, kg/m³ (653-1075).
    temperature_c : float or array
        Temperature of the fuel when the volume was measured, °C.
    in_air : bool, default False
        Subtract the air buoyancy (:data:`AIR_BUOYANCY_KG_M3`).
    """
    rho = f64(density15_kg_m3)
    v15 = f64(standard_volume_m3(observed_m3, rho, temperature_c))
    effective = rho - AIR_BUOYANCY_KG_M3 if in_air else rho
    return out(v15 * effective / 1000.0)
