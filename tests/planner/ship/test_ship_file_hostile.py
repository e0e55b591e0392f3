"""Hostile and implausible ship files: refused in one line naming file and key, or warned.

Issue 10 item 9 and issue 11 item 14. The accepted and usual ranges are ours
(planner/ship/plausible.py, each marked from memory or common practice); the sulphur
ceiling is the highest global limit there has been, 4.50 % m/m ([MARPOL-VI] reg. 14.1);
the IMO check digit rule is the one the journal uses (planner/common/imo.py, from memory).
"""

from pathlib import Path

import pytest

from geo.errors import InputError
from planner.ship.ship_file import load_ship

SAMPLE = Path("areas_sample/ship.toml").read_text()


def _load(tmp_path, old, new):
    assert old in SAMPLE, old
    p = tmp_path / "ship.toml"
    p.write_text(SAMPLE.replace(old, new, 1))
    return p, load_ship(p)


def _refused(tmp_path, old, new) -> str:
    with pytest.raises(InputError) as err:
        _load(tmp_path, old, new)
    text = str(err.value)
    assert "\n" not in text and text.startswith(str(tmp_path / "ship.toml"))
    return text


@pytest.mark.parametrize(("old", "new", "place", "hint"), [
    ("volume_m3 = 0.5", "volume_l = 0.5", "volumes.mixing_tank.volume_l", "volume_m3"),
    ("ref_speed_kn = 14.0", "ref_speed_kts = 14.0", "consumers.main_engine.ref_speed_kts",
     "ref_speed_kn"),
    ("capacity_m3 = 45.0", "capacity = 45.0", "tanks.vlsfo_service.capacity", "capacity_m3"),
    ("target_cst = 13.0", "target_cSt = 13.0", "consumers.main_engine.inlet.target_cSt",
     "target_cst"),
    ('journal = "', 'journl = "', "ship.journl", "journal"),
])
def test_unknown_keys_name_the_nearest_valid_key(tmp_path, old, new, place, hint):
    text = _refused(tmp_path, old, new)
    assert f": {place}: " in text and f"did you mean {hint!r}" in text


@pytest.mark.parametrize(("old", "new", "place"), [
    ("mcr_kw = 9000.0", "mcr_kw = nan", "consumers.main_engine.mcr_kw"),
    ("volume_m3 = 0.12", "volume_m3 = inf", "volumes.heaters.volume_m3"),
    ("[85.0, 171.0]", "[85.0, -inf]", "consumers.main_engine.sfoc_curve[4][2]"),
])
def test_nan_and_infinity_are_refused_with_the_key(tmp_path, old, new, place):
    assert f": {place}: " in _refused(tmp_path, old, new)


@pytest.mark.parametrize(("old", "new", "place", "expected"), [
    ("mcr_kw = 9000.0", "mcr_kw = 1e308", "consumers.main_engine.mcr_kw",
     "above 0 to 200000 kW"),
    ("loop_flow_m3h = 5.5", "loop_flow_m3h = 1e308", "circuits.main.loop_flow_m3h",
     "from 0 to 10000 m³/h"),
    ("volume_m3 = 0.5", "volume_m3 = 1e-300", "volumes.mixing_tank.volume_m3",
     "from 1e-09 to 10000 m³"),
    ("capacity_m3 = 45.0", "capacity_m3 = 1e308", "tanks.vlsfo_service.capacity_m3",
     "above 0 to 100000 m³"),
    ("power_kw = 420.0", "power_kw = 1e308", "consumers.dg1.power_kw", "from 0 to 100000 kW"),
    ("fuel_t_h = 0.3", "fuel_t_h = 1e308", "consumers.aux_boiler.fuel_t_h", "to 100 t/h"),
    ("length_m = 30.0", "length_m = 1e-300", "volumes.supply_line.bore_mm",
     "a bore and length giving"),
])
def test_absurd_magnitudes_are_refused_with_the_range(tmp_path, old, new, place, expected):
    text = _refused(tmp_path, old, new)
    assert f": {place}: " in text and expected in text, text


def test_sulphur_above_the_highest_global_limit_is_refused(tmp_path):
    # 4.50 % m/m: the global limit before 2012, the highest there has been [MARPOL-VI]
    text = _refused(tmp_path, "sulphur_pct = 0.45", "sulphur_pct = 4.6")
    assert ": fuels.vlsfo: " in text and "4.5" in text
    _load(tmp_path, "sulphur_pct = 0.45", "sulphur_pct = 4.5")


@pytest.mark.parametrize("imo", ['"9999994"', '"999999"', '"IMO 99999x3"', "9999990"])
def test_a_bad_imo_check_digit_is_refused(tmp_path, imo):
    # 9,9,9,9,9,9 × 7,6,5,4,3,2 = 243: the check digit is 3 (rule from memory)
    text = _refused(tmp_path, 'imo = "9999993"', f"imo = {imo}")
    assert ": ship.imo: " in text and "check digit" in text


def test_good_imo_forms_are_stored_as_digits(tmp_path):
    _, ship = _load(tmp_path, 'imo = "9999993"', 'imo = "IMO 9999993"')
    assert ship.ship.imo == "9999993"
    _, ship = _load(tmp_path, 'imo = "9999993"', "imo = 9999993")
    assert ship.ship.imo == "9999993"


@pytest.mark.parametrize(("old", "new", "place", "usual"), [
    ("bore_mm = 40.0", "bore_mm = 0.065", "volumes.supply_line.bore_mm", "usual 6-600 mm"),
    ("volume_m3 = 0.5", "volume_m3 = 800.0", "volumes.mixing_tank.volume_m3",
     "usual 0.001-10 m³"),
    ("mcr_kw = 9000.0", "mcr_kw = 90.0", "consumers.main_engine.mcr_kw", "usual 300-90000 kW"),
])
def test_unusual_values_are_kept_with_a_warning(tmp_path, old, new, place, usual):
    p, ship = _load(tmp_path, old, new)
    [warning] = ship.input_warnings
    assert warning.startswith(f"{p}: {place} = ") and usual in warning


def test_the_sample_ship_has_no_unusual_value():
    assert load_ship("areas_sample/ship.toml").input_warnings == ()


def test_ship_file_flash_point_from_the_delivery_note(tmp_path):
    _, ship = _load(tmp_path, "sulphur_pct = 0.08", "sulphur_pct = 0.08\nflash_point_c = 68.0")
    assert ship.fuels["mgo"].flash_point == 68.0
    text = _refused(tmp_path, "sulphur_pct = 0.08", "sulphur_pct = 0.08\nflash_point_c = 400.0")
    assert ": fuels.mgo: " in text and "flash_point_c" in text
