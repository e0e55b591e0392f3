"""Fuel properties: the fuel as bunkered, blending, viscosity, specific energy, volume.

One module per physical concept, pure functions over floats or numpy arrays:

- :mod:`planner.fuels.fuel`: :class:`Fuel`, the delivery-note data, checked;
- :mod:`planner.fuels.blending`: sulphur and density by mass, blends of fuels;
- :mod:`planner.fuels.refutas`: Refutas viscosity blending ([MAPLES-2000]);
- :mod:`planner.fuels.viscosity`: ASTM D341 viscosity-temperature line ([ASTM-D341]);
- :mod:`planner.fuels.energy`: ISO 8217 specific energy, CCAI ([ISO-8217]), SFOC
  scaling ([ISO-3046]), SO₂ ([IUPAC-2021], [MEPC-340]);
- :mod:`planner.fuels.combustion`: the SO₂/CO₂ ratio of a fuel burnt uncleaned, the
  [MEPC-340] ratio limits, the removal a scrubber needs, a fuel's carbon ([MEPC-308]);
- :mod:`planner.fuels.volume`: Table 54B volume correction to 15 °C and mass
  ([TABLE-54B]);
- :mod:`planner.fuels.flash_point`: ISO 8217 minimum flash points ([ISO-8217]) and
  the SOLAS 10 °C margin ([SOLAS-1974]).
"""

from planner.fuels.blending import (
    blend,
    blend_by_volume,
    blend_density_from_masses_kg_m3,
    blend_density_kg_m3,
    blend_sulphur_pct,
    mass_fractions,
    mass_fractions_from_volumes,
)
from planner.fuels.combustion import (
    TABLE_CARBON_PCT,
    CarbonClass,
    carbon_class,
    equivalent_ratio,
    ratio_limit,
    removal_needed,
    uncleaned_ratio,
)
from planner.fuels.energy import (
    ISO_REFERENCE_Q_NET_MJ_KG,
    SO2_CO2_RATIO_LIMITS,
    SO2_PER_KG_SULPHUR,
    ccai,
    gross_specific_energy_mj_kg,
    net_specific_energy_mj_kg,
    sfoc_scaled,
    so2_co2_ratio_limit,
    so2_formed_kg,
    so2_from_fuel_kg,
)
from planner.fuels.flash_point import (
    FLASH_POINT_MARGIN_C,
    ISO_8217_MIN_FLASH_POINT_C,
    grade_min_flash_point_c,
)
from planner.fuels.fuel import Fuel
from planner.fuels.refutas import (
    blend_viscosity_cst,
    viscosity_blending_number,
    viscosity_from_blending_number,
)
from planner.fuels.viscosity import (
    DEFAULT_SLOPE_DISTILLATE,
    DEFAULT_SLOPE_RESIDUAL,
    d341_fit,
    d341_intercept,
    d341_viscosity_cst,
    d341_viscosity_from_z,
    d341_z,
    default_slope,
    temperature_for_viscosity,
)
from planner.fuels.volume import (
    density_at_temperature_kg_m3,
    mass_t,
    standard_volume_m3,
    thermal_expansion_coefficient,
    volume_correction_factor,
)

__all__ = [
    "DEFAULT_SLOPE_DISTILLATE",
    "DEFAULT_SLOPE_RESIDUAL",
    "FLASH_POINT_MARGIN_C",
    "ISO_8217_MIN_FLASH_POINT_C",
    "ISO_REFERENCE_Q_NET_MJ_KG",
    "SO2_CO2_RATIO_LIMITS",
    "SO2_PER_KG_SULPHUR",
    "TABLE_CARBON_PCT",
    "CarbonClass",
    "Fuel",
    "blend",
    "blend_by_volume",
    "blend_density_from_masses_kg_m3",
    "blend_density_kg_m3",
    "blend_sulphur_pct",
    "blend_viscosity_cst",
    "carbon_class",
    "ccai",
    "d341_fit",
    "d341_intercept",
    "d341_viscosity_cst",
    "d341_viscosity_from_z",
    "d341_z",
    "default_slope",
    "density_at_temperature_kg_m3",
    "equivalent_ratio",
    "grade_min_flash_point_c",
    "gross_specific_energy_mj_kg",
    "mass_fractions",
    "mass_fractions_from_volumes",
    "mass_t",
    "net_specific_energy_mj_kg",
    "ratio_limit",
    "removal_needed",
    "sfoc_scaled",
    "so2_co2_ratio_limit",
    "so2_formed_kg",
    "so2_from_fuel_kg",
    "standard_volume_m3",
    "temperature_for_viscosity",
    "thermal_expansion_coefficient",
    "uncleaned_ratio",
    "viscosity_blending_number",
    "viscosity_from_blending_number",
    "volume_correction_factor",
]
