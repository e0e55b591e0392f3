"""Blending: planner.fuels.blending (mass-basis sulphur and density) and planner.fuels.refutas."""

import numpy as np
import pytest
from hypothesis import given
from hypothesis import strategies as st

from planner.fuels.blending import (
    blend,
    blend_by_volume,
    blend_density_from_masses_kg_m3,
    blend_density_kg_m3,
    blend_sulphur_pct,
    mass_fractions,
    mass_fractions_from_volumes,
)
from planner.fuels.fuel import Fuel
from planner.fuels.refutas import (
    blend_viscosity_cst,
    viscosity_blending_number,
    viscosity_from_blending_number,
)

HFO = Fuel(
    name="HFO",
    grade="RMG 380",
    bdn_ref="BDN-001",
    sulphur_pct=0.50,
    density_kg_m3=991.0,
    viscosity_cst=380.0,
    viscosity_ref_c=50.0,
    water_pct=0.2,
    ash_pct=0.05,
)
MGO = Fuel(
    name="MGO",
    grade="DMA",
    bdn_ref="BDN-002",
    sulphur_pct=0.10,
    density_kg_m3=845.0,
    viscosity_cst=3.0,
    viscosity_ref_c=40.0,
    viscosity2_cst=1.2,
    viscosity2_ref_c=100.0,
)


# Reference cases: (inputs, expected as the source prints it, decimals printed, source).
REFUTAS_CHECK_VALUES = [
    # [MAPLES-2000] Refutas VBN formula; check value [D]: nu 2.234 cSt -> VBN 12.49
    ((2.234,), 12.49, 2, "[MAPLES-2000] Refutas VBN formula; check value [D]"),
]


@pytest.mark.parametrize(("inputs", "expected", "decimals", "source"), REFUTAS_CHECK_VALUES)
def test_refutas_check_value(inputs, expected, decimals, source):
    value = viscosity_blending_number(*inputs)
    assert round(value, decimals) == expected, source
    assert value == pytest.approx(expected, abs=0.5 * 10.0**-decimals), source


@given(nu=st.floats(0.21, 1e5))
def test_refutas_round_trip(nu):
    assert viscosity_from_blending_number(viscosity_blending_number(nu)) == pytest.approx(
        nu, rel=1e-11
    )


def test_refutas_refuses_low_viscosity():
    with pytest.raises(ValueError):
        viscosity_blending_number(0.2)


def test_sulphur_blends_by_mass():
    # [LEVENSPIEL-1999] mass balance [D]: S = sum(m_i S_i) / sum(m_i)
    assert blend_sulphur_pct([3.0, 1.0], [0.5, 0.1]) == pytest.approx(0.4)


def test_mass_versus_volume_basis_991_and_845():
    # 50/50 by volume of 991 and 845 kg/m3 fuels: sulphur weighted 991:845, not 1:1
    # ([LEVENSPIEL-1999] mass balance [D]: volumes must become mass with each fuel's density)
    w = mass_fractions_from_volumes([1.0, 1.0], [991.0, 845.0])
    np.testing.assert_allclose(w, [991.0 / 1836.0, 845.0 / 1836.0])
    expected = (991.0 * 0.5 + 845.0 * 0.1) / (991.0 + 845.0)
    assert blend_sulphur_pct(w, [0.5, 0.1]) == pytest.approx(expected)
    assert expected != pytest.approx(0.30)  # the (wrong) volume average
    assert blend_density_kg_m3([1.0, 1.0], [991.0, 845.0]) == pytest.approx(918.0)
    b = blend_by_volume([HFO, MGO], [50.0, 50.0])
    assert b.sulphur_pct == pytest.approx(expected)
    assert b.density_kg_m3 == pytest.approx(918.0)


def test_density_from_masses_is_total_mass_over_total_volume():
    m = [991.0, 845.0]  # one cubic metre of each
    assert blend_density_from_masses_kg_m3(m, [991.0, 845.0]) == pytest.approx(918.0)


def test_component_axis_first_and_broadcasting():
    masses = np.array([[1.0, 2.0, 0.0], [1.0, 0.0, 3.0]])  # 2 components x 3 cases
    s = blend_sulphur_pct(masses, np.array([[0.5], [0.1]]))
    np.testing.assert_allclose(s, [0.3, 0.5, 0.1])
    np.testing.assert_allclose(mass_fractions(masses).sum(axis=0), 1.0)


@pytest.mark.parametrize(
    ("masses", "values"),
    [([1.0, -1.0], [0.5, 0.1]), ([0.0, 0.0], [0.5, 0.1]), ([1.0, 1.0], [0.5]), ([], [])],
)
def test_blending_refuses_bad_masses(masses, values):
    with pytest.raises(ValueError):
        blend_sulphur_pct(masses, values)


def test_blend_of_two_identical_fuels_equals_the_fuel():
    b = blend([HFO, HFO], [120.0, 80.0], name="HFO twice")
    assert b.sulphur_pct == pytest.approx(HFO.sulphur_pct, rel=1e-12)
    assert b.density_kg_m3 == pytest.approx(HFO.density_kg_m3, rel=1e-12)
    assert b.q_net == pytest.approx(HFO.q_net, rel=1e-12)
    assert b.water_pct == pytest.approx(HFO.water_pct)
    assert b.ash_pct == pytest.approx(HFO.ash_pct)
    assert b.grade == HFO.grade
    assert b.bdn_ref == "BDN-001"
    for t in (20.0, 50.0, 80.0, 100.0, 135.0):
        assert b.viscosity_at(t) == pytest.approx(HFO.viscosity_at(t), rel=1e-9)


def test_blend_of_one_fuel_equals_the_fuel():
    b = blend([MGO], [10.0])
    for t in (20.0, 40.0, 100.0):
        assert b.viscosity_at(t) == pytest.approx(MGO.viscosity_at(t), rel=1e-9)
    assert b.sulphur_pct == pytest.approx(MGO.sulphur_pct)


def test_blend_of_two_fuels():
    b = blend([HFO, MGO], [1.0, 1.0], name="mix")
    assert b.name == "mix"
    assert b.grade == "blend (RMG 380 + DMA)"
    assert b.bdn_ref == "BDN-001 + BDN-002"
    assert b.sulphur_pct == pytest.approx(0.30)
    assert b.water_pct is None and b.ash_pct is None  # MGO gives neither
    assert b.has_two_viscosity_points
    assert (b.viscosity_ref_c, b.viscosity2_ref_c) == (50.0, 100.0)
    nu = blend_viscosity_cst([1.0, 1.0], [HFO.viscosity_at(50.0), MGO.viscosity_at(50.0)])
    assert b.viscosity_at(50.0) == pytest.approx(nu, rel=1e-12)
    assert MGO.viscosity_at(50.0) < b.viscosity_at(50.0) < HFO.viscosity_at(50.0)
    assert b.q_net == pytest.approx((HFO.q_net + MGO.q_net) / 2.0)


def test_blend_of_distillates_uses_40_and_100_c():
    b = blend([MGO, MGO], [1.0, 2.0])
    assert (b.viscosity_ref_c, b.viscosity2_ref_c) == (40.0, 100.0)


def test_blend_refuses_mismatched_masses():
    with pytest.raises(ValueError):
        blend([HFO, MGO], [1.0])
    with pytest.raises(ValueError):
        blend([], [])


_MASS = st.one_of(st.just(0.0), st.floats(1e-6, 1000.0))  # tonnes: zero or a real amount


@given(m1=_MASS, m2=_MASS, s1=st.floats(0.0, 5.0), s2=st.floats(0.0, 5.0))
def test_blend_sulphur_lies_between_components(m1, m2, s1, s2):
    if m1 + m2 <= 0.0:
        return
    s = blend_sulphur_pct([m1, m2], [s1, s2])
    tol = 1e-12 + 1e-9 * max(s1, s2)  # round-off of the weighted mean
    assert min(s1, s2) - tol <= s <= max(s1, s2) + tol


@given(
    w=st.floats(0.0, 1.0),
    nu1=st.floats(0.25, 5000.0),
    nu2=st.floats(0.25, 5000.0),
)
def test_blend_viscosity_lies_between_components(w, nu1, nu2):
    nu = blend_viscosity_cst([w, 1.0 - w], [nu1, nu2]) if w < 1.0 else nu1
    assert min(nu1, nu2) * (1 - 1e-9) <= nu <= max(nu1, nu2) * (1 + 1e-9)


@given(
    m_hfo=st.floats(0.01, 1000.0),
    m_mgo=st.floats(0.01, 1000.0),
)
def test_blend_fuel_sulphur_between_components(m_hfo, m_mgo):
    b = blend([HFO, MGO], [m_hfo, m_mgo])
    assert MGO.sulphur_pct - 1e-12 <= b.sulphur_pct <= HFO.sulphur_pct + 1e-12
    assert MGO.density_kg_m3 - 1e-9 <= b.density_kg_m3 <= HFO.density_kg_m3 + 1e-9
