"""The SO₂/CO₂ ratio of a fuel burnt uncleaned against [MEPC-340] Table 1, and a fuel's carbon.

Outside sources: [MEPC-340] Table 1 (from memory, as the reference list quotes it),
[IUPAC-2021] molar masses, [MEPC-308] carbon contents and conversion factors (from
memory); the stoichiometry is derived here [D].
"""

from __future__ import annotations

import math

import pytest

from planner.fuels import Fuel
from planner.fuels.combustion import (
    GAS_OIL,
    HEAVY_FUEL_OIL,
    LIGHT_FUEL_OIL,
    TABLE_CARBON_PCT,
    carbon_class,
    equivalent_ratio,
    is_tabulated,
    ratio_limit,
    removal_needed,
    uncleaned_ratio,
)

# [MEPC-340] Table 1, from memory: fuel sulphur % m/m -> SO2 (ppm) / CO2 (% v/v), 1 decimal
TABLE_1 = ((0.10, 4.3), (0.50, 21.7), (1.00, 43.3), (1.50, 65.0), (3.50, 151.7), (4.50, 195.0))


def _carbon_interval() -> tuple[float, float]:
    """The carbon contents (% m/m) whose stoichiometric ratio prints as every row of the
    table: ratio = K·S/C within ±0.05 of the printed value, so C in [K·S/(r + 0.05),
    K·S/(r − 0.05)], intersected over the rows [D]."""
    k = 1.0e4 * 12.011 / 32.06  # [IUPAC-2021] molar masses
    lows = [k * s / (r + 0.05) for s, r in TABLE_1]
    highs = [k * s / (r - 0.05) for s, r in TABLE_1]
    return max(lows), min(highs)


def test_the_interval_of_carbon_that_reproduces_table_1():
    # [MEPC-340] Table 1, from memory; stoichiometry [D]: about 86.43-86.47 % carbon
    low, high = _carbon_interval()
    assert round(low, 2) == 86.43 and round(high, 2) == 86.47
    assert 86.432 < low < 86.434 and 86.464 < high < 86.466
    assert low < TABLE_CARBON_PCT < high


@pytest.mark.parametrize("carbon_pct", [None, "low", "high"])
def test_one_carbon_content_reproduces_every_row(carbon_pct):
    # [MEPC-340] Table 1, from memory; stoichiometry [D]
    low, high = _carbon_interval()
    c = {None: TABLE_CARBON_PCT, "low": low + 1e-9, "high": high - 1e-9}[carbon_pct]
    for s, printed in TABLE_1:
        assert f"{uncleaned_ratio(s, c):.1f}" == f"{printed:.1f}", (s, c)


def test_just_outside_the_interval_a_row_no_longer_prints():
    # [MEPC-340] Table 1, from memory; stoichiometry [D]: the interval is tight
    low, high = _carbon_interval()
    for c in (low - 1e-4, high + 1e-4):
        assert any(f"{uncleaned_ratio(s, c):.1f}" != f"{r:.1f}" for s, r in TABLE_1)


def test_reference_check_at_86_5_percent_carbon():
    # the reference list's own check of the table [D]: w_C 0.865 gives 4.33 at 0.10 %
    # and 151.6 at 3.50 % (so 0.865 just misses the 151.7 printed)
    assert f"{uncleaned_ratio(0.10, 86.5):.2f}" == "4.33"
    assert f"{uncleaned_ratio(3.50, 86.5):.1f}" == "151.6"


def test_ratio_by_hand():
    # 1 % sulphur, 85 % carbon: 1e4 × (1/32.06)/(85/12.011) [IUPAC-2021], [D]
    assert uncleaned_ratio(1.0, 85.0) == pytest.approx(1e4 * (1 / 32.06) / (85 / 12.011),
                                                       rel=1e-15)
    assert uncleaned_ratio(0.0, 85.0) == 0.0
    for bad in ((-0.1, 85.0), (1.0, 0.0), (1.0, 101.0), (101.0, 85.0)):
        with pytest.raises(ValueError):
            uncleaned_ratio(*bad)


@pytest.mark.parametrize("limit,ratio", TABLE_1)
def test_ratio_limit_is_the_table(limit, ratio):
    assert ratio_limit(limit) == ratio  # [MEPC-340] Table 1, from memory
    assert equivalent_ratio(limit) == ratio
    assert is_tabulated(limit)


def test_other_limits_are_refused_or_stated_stoichiometric():
    with pytest.raises(ValueError, match="0.10, 0.50"):
        ratio_limit(0.20)
    assert not is_tabulated(0.20)
    # the stoichiometric value at the table's carbon [D], between the 0.10 and 0.50 rows
    assert equivalent_ratio(0.20) == pytest.approx(uncleaned_ratio(0.20, TABLE_CARBON_PCT))
    assert 4.3 < equivalent_ratio(0.20) < 21.7


def test_removal_needed():
    # 1 − limit/uncleaned [D]; a 3.50 % fuel at the table's carbon against 4.3 (0.10 %)
    raw = uncleaned_ratio(3.5, TABLE_CARBON_PCT)
    assert removal_needed(3.5, TABLE_CARBON_PCT, 4.3) == pytest.approx(1 - 4.3 / raw)
    # at the table's carbon the ratio is linear in sulphur: 1 − 0.10/3.50 to 3 digits
    assert removal_needed(3.5, TABLE_CARBON_PCT, 4.3) == pytest.approx(1 - 0.1 / 3.5, abs=2e-3)
    assert removal_needed(0.08, 87.44, 4.3) == 0.0
    with pytest.raises(ValueError):
        removal_needed(1.0, 85.0, 0.0)


@pytest.mark.parametrize("cls", [GAS_OIL, LIGHT_FUEL_OIL, HEAVY_FUEL_OIL])
def test_conversion_factor_is_carbon_times_44_over_12(cls):
    # [MEPC-308], from memory: C_F printed to 3 decimals = carbon content × 44/12
    assert f"{cls.carbon_pct / 100 * 44 / 12:.3f}" == f"{cls.cf_t_t:.3f}"
    # and with [IUPAC-2021] molar masses (44.009/12.011) within 0.1 %
    assert cls.carbon_pct / 100 * 44.009 / 12.011 == pytest.approx(cls.cf_t_t, rel=1e-3)


@pytest.mark.parametrize("grade,residual,cls", [
    ("DMA", False, GAS_OIL), ("dmz ", False, GAS_OIL), ("DMB", False, GAS_OIL),
    ("MGO", False, GAS_OIL), ("MDO", True, GAS_OIL),
    ("RMA 10", True, LIGHT_FUEL_OIL), ("RMB 30", True, LIGHT_FUEL_OIL),
    ("RMD 80", True, LIGHT_FUEL_OIL),
    ("RME 180", True, HEAVY_FUEL_OIL), ("RMG 380", True, HEAVY_FUEL_OIL),
    ("RMK 700", True, HEAVY_FUEL_OIL),
    ("VLSFO", True, HEAVY_FUEL_OIL), ("ULSFO", False, GAS_OIL),
])
def test_carbon_class_by_grade(grade, residual, cls):
    # [MEPC-308] grade ranges, from memory; trade names common practice
    assert carbon_class(grade, residual) is cls


def _fuel(**kw) -> Fuel:
    base = dict(name="f", grade="RMG 380", sulphur_pct=2.6, density_kg_m3=991.0,
                viscosity_cst=380.0, viscosity_ref_c=50.0)
    return Fuel(**{**base, **kw})


def test_fuel_carbon_from_delivery_note_or_typical():
    assert _fuel().carbon == 84.93
    assert "heavy fuel oil" in _fuel().carbon_source and "from memory" in _fuel().carbon_source
    given = _fuel(carbon_pct=86.1)
    assert given.carbon == 86.1 and given.carbon_source == "delivery note"
    mgo = _fuel(grade="DMA", sulphur_pct=0.08, density_kg_m3=850.0, viscosity_cst=3.5,
                viscosity_ref_c=40.0)
    assert mgo.carbon == 87.44


@pytest.mark.parametrize("bad,match", [
    (69.9, "between 70 and 92"), (92.5, "between 70 and 92"), (math.nan, "finite"),
    ("86", "a number"), (True, "a number"),
])
def test_fuel_carbon_refused(bad, match):
    with pytest.raises(ValueError, match=match):
        _fuel(carbon_pct=bad)


def test_fuel_carbon_with_water_and_ash_above_100_refused():
    with pytest.raises(ValueError, match="more than 100"):
        _fuel(carbon_pct=91.0, sulphur_pct=4.5, water_pct=5.0, ash_pct=0.1)
