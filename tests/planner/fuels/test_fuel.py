"""The fuel as bunkered: planner.fuels.fuel.Fuel, its checks and derived properties."""

import dataclasses

import pytest
from hypothesis import given
from hypothesis import strategies as st

from planner.fuels.energy import net_specific_energy_mj_kg
from planner.fuels.fuel import Fuel
from planner.fuels.viscosity import DEFAULT_SLOPE_DISTILLATE, DEFAULT_SLOPE_RESIDUAL

GOOD = {
    "name": "HFO port",
    "grade": "RMG 380",
    "bdn_ref": "BDN 2024-117",
    "sulphur_pct": 0.48,
    "density_kg_m3": 991.0,
    "viscosity_cst": 380.0,
    "viscosity_ref_c": 50.0,
}


def make(**changes):
    return Fuel(**{**GOOD, **changes})


def test_good_fuel_and_defaults():
    f = make()
    assert f.sulphur_pct == 0.48
    assert f.viscosity2_cst is None and f.water_pct is None and f.q_net_mj_kg is None
    assert Fuel(**{k: v for k, v in GOOD.items() if k != "bdn_ref"}).bdn_ref == ""
    assert make(bdn_ref="").bdn_ref == ""


def test_integers_become_floats():
    f = make(density_kg_m3=991, viscosity_cst=380, viscosity_ref_c=50, sulphur_pct=0)
    assert isinstance(f.density_kg_m3, float) and isinstance(f.sulphur_pct, float)


def test_frozen_and_keyword_only():
    f = make()
    with pytest.raises(dataclasses.FrozenInstanceError):
        f.sulphur_pct = 0.1  # type: ignore[misc]
    with pytest.raises(TypeError):
        Fuel("HFO", "RMG 380", "", 0.48, 991.0, 380.0, 50.0)  # type: ignore[misc]


@pytest.mark.parametrize(
    ("changes", "match"),
    [
        ({"name": ""}, "name"),
        ({"name": "   "}, "name"),
        ({"name": None}, "name"),
        ({"grade": ""}, "grade"),
        ({"grade": 380}, "grade"),
        ({"bdn_ref": None}, "bdn_ref"),
        ({"sulphur_pct": -0.01}, "sulphur_pct"),
        ({"sulphur_pct": 4.51}, "sulphur_pct"),  # above the 4.50 % of [MARPOL-VI] reg. 14.1
        ({"sulphur_pct": float("nan")}, "sulphur_pct"),
        ({"sulphur_pct": "0.5"}, "sulphur_pct"),
        ({"sulphur_pct": True}, "sulphur_pct"),
        ({"density_kg_m3": 699.9}, "density_kg_m3"),
        ({"density_kg_m3": 1100.1}, "density_kg_m3"),
        ({"density_kg_m3": float("inf")}, "density_kg_m3"),
        ({"viscosity_cst": 0.2}, "viscosity_cst"),
        ({"viscosity_cst": -3.0}, "viscosity_cst"),
        ({"viscosity_cst": None}, "viscosity_cst"),
        ({"viscosity_ref_c": -41.0}, "viscosity_ref_c"),
        ({"viscosity_ref_c": 201.0}, "viscosity_ref_c"),
        ({"viscosity2_cst": 35.0}, "both viscosity2_cst and viscosity2_ref_c"),
        ({"viscosity2_ref_c": 100.0}, "both viscosity2_cst and viscosity2_ref_c"),
        ({"viscosity2_cst": 0.1, "viscosity2_ref_c": 100.0}, "viscosity2_cst"),
        ({"viscosity2_cst": 35.0, "viscosity2_ref_c": 250.0}, "viscosity2_ref_c"),
        ({"viscosity2_cst": "35", "viscosity2_ref_c": 100.0}, "viscosity2_cst"),
        ({"viscosity2_cst": 370.0, "viscosity2_ref_c": 52.0}, "apart"),
        ({"viscosity2_cst": 400.0, "viscosity2_ref_c": 100.0}, "fall as temperature rises"),
        ({"viscosity2_cst": 380.0, "viscosity2_ref_c": 100.0}, "fall as temperature rises"),
        ({"viscosity2_cst": 35.0, "viscosity2_ref_c": 20.0}, "fall as temperature rises"),
        ({"water_pct": -0.1}, "water_pct"),
        ({"water_pct": 10.1}, "water_pct"),
        ({"ash_pct": -0.1}, "ash_pct"),
        ({"ash_pct": float("nan")}, "ash_pct"),
        ({"q_net_mj_kg": 29.9}, "q_net_mj_kg"),
        ({"q_net_mj_kg": 50.1}, "q_net_mj_kg"),
    ],
)
def test_every_refusal(changes, match):
    with pytest.raises(ValueError, match=match):
        make(**changes)


def test_refusal_message_names_the_fuel_and_value():
    with pytest.raises(ValueError, match=r"'HFO port'.*sulphur_pct.*between 0 and 4.5.*7\.0"):
        make(sulphur_pct=7.0)


def test_limits_are_inclusive():
    make(sulphur_pct=0.0)
    make(sulphur_pct=4.5)  # the highest global limit, [MARPOL-VI] reg. 14.1
    make(density_kg_m3=700.0, grade="DMA", viscosity_cst=2.0, viscosity_ref_c=40.0)
    make(density_kg_m3=1100.0)
    make(viscosity_cst=0.21)


# The residual/distillate rule: ((grade, rho15 kg/m3, nu cSt, at t °C), residual?, source).
_RM = "[ISO-8217] grade name RM: residual"
_DM = "[ISO-8217] grade name DM: distillate"
_TRADE = "trade name MGO/MDO: distillate (common practice)"
# [ISO-8217] DMB maxima, 900 kg/m3 and 11 cSt at 40 °C: [M], from memory
_DMB = "[ISO-8217] DMB maxima [M], from memory"
IS_RESIDUAL_CASES = [
    (("RMG 380", 991.0, 380.0, 50.0), True, _RM),
    ((" rmk 700 ", 1010.0, 700.0, 50.0), True, _RM),
    (("DMA", 845.0, 3.0, 40.0), False, _DM),
    (("dmb", 890.0, 9.0, 40.0), False, _DM),
    (("MGO", 850.0, 3.5, 40.0), False, _TRADE),
    (("MDO", 880.0, 6.0, 40.0), False, _TRADE),
    # by properties: density above 900 kg/m3 (DMB maximum, [ISO-8217] [M])
    (("VLSFO", 935.0, 8.0, 40.0), True, _DMB),
    # by properties: viscosity at 40 °C above 11 cSt (DMB maximum, [ISO-8217] [M]), here
    # 20 cSt at 50 °C
    (("VLSFO", 880.0, 20.0, 50.0), True, _DMB),
    (("ULSFO", 870.0, 6.0, 40.0), False, _DMB),
]


@pytest.mark.parametrize(("inputs", "residual", "source"), IS_RESIDUAL_CASES)
def test_is_residual_rule(inputs, residual, source):
    grade, density, nu, t = inputs
    f = make(grade=grade, density_kg_m3=density, viscosity_cst=nu, viscosity_ref_c=t)
    assert f.is_residual is residual, source


def test_one_point_uses_assumed_default_slope():
    hfo = make()
    assert hfo.viscosity_slope_assumed and not hfo.has_two_viscosity_points
    assert hfo.d341_coefficients[1] == DEFAULT_SLOPE_RESIDUAL
    assert hfo.viscosity_at(50.0) == pytest.approx(380.0, rel=1e-12)
    mgo = make(grade="DMA", density_kg_m3=845.0, viscosity_cst=3.0, viscosity_ref_c=40.0)
    assert mgo.d341_coefficients[1] == DEFAULT_SLOPE_DISTILLATE
    assert mgo.viscosity_at(40.0) == pytest.approx(3.0, rel=1e-12)


def test_two_points_reproduced_and_inverted():
    f = make(viscosity2_cst=35.0, viscosity2_ref_c=100.0)
    assert not f.viscosity_slope_assumed
    assert f.viscosity_at(50.0) == pytest.approx(380.0, rel=1e-9)
    assert f.viscosity_at(100.0) == pytest.approx(35.0, rel=1e-9)
    assert f.temperature_for_viscosity(35.0) == pytest.approx(100.0, abs=1e-9)
    nu = f.viscosity_at([60.0, 120.0])
    assert nu.shape == (2,) and nu[0] > nu[1]


def test_second_point_may_be_the_colder_one():
    f = make(viscosity_cst=35.0, viscosity_ref_c=100.0, viscosity2_cst=380.0, viscosity2_ref_c=50.0)
    assert f.viscosity_at(50.0) == pytest.approx(380.0, rel=1e-9)


def test_q_net_given_or_estimated():
    assert make(q_net_mj_kg=40.1).q_net == 40.1
    f = make(water_pct=0.3, ash_pct=0.05)
    assert f.q_net == pytest.approx(net_specific_energy_mj_kg(991.0, 0.48, 0.3, 0.05))
    # missing water and ash taken as 0 % m/m
    assert make().q_net == pytest.approx(net_specific_energy_mj_kg(991.0, 0.48, 0.0, 0.0))


@given(
    nu=st.floats(5.0, 700.0),
    t_ref=st.floats(40.0, 50.0),
    t=st.floats(0.0, 140.0),
    dt=st.floats(1.0, 30.0),
)
def test_fuel_viscosity_decreases_with_temperature(nu, t_ref, t, dt):
    f = make(viscosity_cst=nu, viscosity_ref_c=t_ref)
    assert f.viscosity_at(t + dt) < f.viscosity_at(t)
