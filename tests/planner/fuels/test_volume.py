"""Volume correction to 15 °C and bunker mass: planner.fuels.volume (Table 54B)."""

import math

import numpy as np
import pytest
from hypothesis import given
from hypothesis import strategies as st

from planner.fuels.volume import (
    density_at_temperature_kg_m3,
    mass_t,
    standard_volume_m3,
    thermal_expansion_coefficient,
    volume_correction_factor,
)

# [TABLE-54B] worked bunker examples [P]: ((rho15 kg/m3, t °C), VCF as printed, source)
VCF_WORKED_EXAMPLES = [
    ((992.0, 36.0), 0.9857, "[TABLE-54B] worked bunker example [P]"),
    ((990.3, 34.0), 0.9870, "[TABLE-54B] worked bunker example [P]"),
]


@pytest.mark.parametrize(("inputs", "vcf", "source"), VCF_WORKED_EXAMPLES)
def test_vcf_check_values(inputs, vcf, source):
    # [TABLE-54B] formula against the published worked examples [P], at the printed 4 decimals
    assert round(volume_correction_factor(*inputs), 4) == vcf, source


# Band constants: ((rho15 kg/m3,), alpha from the band's constants, source).
# [TABLE-54B] [S]: rho >= 838.5, K0 186.9696, K1 0.4862; 787.5-838.5, K0 594.5418, K1 0.
# [TABLE-54B] [M], from memory: transition 770.5-787.5 alpha = A + B/rho^2 (A -0.00336312,
# B 2680.3206) and gasolines 653-770.5 (K0 346.4228, K1 0.4388); the entry does not list them.
BAND_CONSTANTS = [
    ((992.0,), 186.9696 / 992.0**2 + 0.4862 / 992.0, "[TABLE-54B] fuel-oil band [S]"),
    ((838.5,), 186.9696 / 838.5**2 + 0.4862 / 838.5, "[TABLE-54B] fuel-oil band [S]"),
    ((1010.0,), 186.9696 / 1010.0**2 + 0.4862 / 1010.0, "[TABLE-54B] fuel-oil band [S]"),
    ((800.0,), 594.5418 / 800.0**2, "[TABLE-54B] jet band [S]"),
    ((780.0,), -0.00336312 + 2680.3206 / 780.0**2, "[TABLE-54B] transition band [M], from memory"),
    ((700.0,), 346.4228 / 700.0**2 + 0.4388 / 700.0, "[TABLE-54B] gasoline band [M], from memory"),
]


@pytest.mark.parametrize(("inputs", "alpha", "source"), BAND_CONSTANTS)
def test_band_constants(inputs, alpha, source):
    assert thermal_expansion_coefficient(*inputs) == pytest.approx(alpha), source


def test_from_memory_bands_join_their_neighbours():
    # Transition (770.5-787.5) and gasoline (653-770.5) constants are from memory
    # ([TABLE-54B] [M]). Not a source check: only that alpha is nearly continuous (within 0.2 %)
    # across every band edge, which a mistyped constant would break.
    for edge in (770.5, 787.5, 838.5):
        below = thermal_expansion_coefficient(edge - 1e-9)
        above = thermal_expansion_coefficient(edge)
        assert above == pytest.approx(below, rel=2e-3)


def test_vcf_is_one_at_15_c_and_arrays_work():
    assert volume_correction_factor(991.0, 15.0) == 1.0
    vcf = volume_correction_factor(np.array([991.0, 845.0]), np.array([40.0, 40.0]))
    assert vcf.shape == (2,)
    assert vcf[1] < vcf[0]  # the lighter fuel expands more


@given(rho=st.floats(653.0, 1075.0), t=st.floats(15.001, 150.0))
def test_vcf_below_one_above_15_c(rho, t):
    assert volume_correction_factor(rho, t) < 1.0


@given(rho=st.floats(653.0, 1075.0), t=st.floats(-18.0, 14.999))
def test_vcf_above_one_below_15_c(rho, t):
    assert volume_correction_factor(rho, t) > 1.0


@pytest.mark.parametrize("rho", [652.9, 1075.1, float("nan")])
def test_density_outside_table_refused(rho):
    with pytest.raises(ValueError, match="Table 54B"):
        volume_correction_factor(rho, 30.0)


def test_standard_volume_and_density_at_temperature():
    v15 = standard_volume_m3(1000.0, 992.0, 36.0)
    assert v15 == pytest.approx(1000.0 * volume_correction_factor(992.0, 36.0))
    assert density_at_temperature_kg_m3(992.0, 36.0) < 992.0
    # mass is conserved: observed volume x density at t = V15 x rho15
    assert 1000.0 * density_at_temperature_kg_m3(992.0, 36.0) == pytest.approx(v15 * 992.0)
    with pytest.raises(ValueError):
        standard_volume_m3(-1.0, 992.0, 36.0)


def test_mass_in_vacuum_and_in_air():
    # in vacuum: V15 x rho15 / 1000
    assert mass_t(1000.0, 991.0, 15.0) == pytest.approx(991.0)
    # weight in air: V15 x (rho15 - 1.1) / 1000, the usual air-buoyancy correction [M], from memory
    # (no bibliography entry gives it)
    assert mass_t(1000.0, 991.0, 15.0, in_air=True) == pytest.approx(989.9)
    m = mass_t(500.0, 992.0, 36.0)
    assert m == pytest.approx(500.0 * volume_correction_factor(992.0, 36.0) * 992.0 / 1000.0)
    assert not math.isnan(m)
