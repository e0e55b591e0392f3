"""Hostile voyage files and soundings (issue 10 item 9, issue 11 item 14): one line each.

The expected behaviour is ours (README "What input is refused"); the sulphur ceiling is
the highest global limit there has been, 4.50 % m/m ([MARPOL-VI] reg. 14.1).
"""

import subprocess
import sys

import pytest

from geo.errors import InputError
from planner.voyage.onboard import load_ship_or_voyage, ship_for_voyage
from planner.voyage.run import build_plan
from planner.voyage.voyage_file import load_voyage
from tests.helpers.paths import DATA, ROOT

VOYAGES = DATA / "voyages"
BASE = (VOYAGES / "closed_form.toml").read_text()


def _voyage(tmp_path, old="", new="", route=None):
    text = BASE
    if old:
        assert old in text, old
        text = text.replace(old, new, 1)
    for name in ("ship_t1.toml", "parallel_east.csv", "meridian_5e.geojson"):
        text = text.replace(f'"{name}"', f'"{VOYAGES / name}"')
    if route is not None:
        text = text.replace(f'"{VOYAGES / "parallel_east.csv"}"', f'"{route}"')
    p = tmp_path / "voyage.toml"
    p.write_text(text)
    return p


def _refused(call, path) -> str:
    with pytest.raises(InputError) as err:
        call(path)
    text = str(err.value)
    assert "\n" not in text and text.startswith(str(path))
    return text


def test_folder_special_and_non_utf8_voyage_files(tmp_path):
    assert "not a folder" in _refused(load_voyage, tmp_path)
    assert "not a device, pipe or socket" in _refused(load_voyage, "/dev/zero")
    bad = tmp_path / "v.toml"
    bad.write_bytes(b'[voyage]\nname = "N\xe6ss"\n')
    assert "line 2: 'byte 0xe6': expected UTF-8 text" in _refused(load_voyage, bad)


def test_ship_or_voyage_reader_never_reads_a_device():
    # `changeover flush /dev/zero`: the sniffing of the file kind must not read it either
    assert "not a device, pipe or socket" in _refused(load_ship_or_voyage, "/dev/zero")


@pytest.mark.parametrize(("old", "new", "place"), [
    ("speed_kn = 12.0", "speed_kn = nan", "voyage.speed_kn"),
    ("volume_m3 = 100.0", "volume_m3 = inf", "tank.mgo_service.volume_m3"),
    ("sulphur_target_fraction = 0.8", "sulphur_target_fraction = nan",
     "margins.sulphur_target_fraction"),
])
def test_nan_and_infinity_in_the_voyage_name_the_key(tmp_path, old, new, place):
    p = _voyage(tmp_path, old, new)
    assert f": {place}: " in _refused(load_voyage, p)


def test_delivery_note_sulphur_above_4_50_is_refused(tmp_path):
    p = _voyage(tmp_path, "sulphur_pct = 0.40", "sulphur_pct = 4.51")
    text = _refused(load_voyage, p)
    assert ": fuel[1]: " in text and "4.5" in text


def test_a_sounding_above_the_tank_capacity_is_refused(tmp_path):
    # ship_t1.toml: mgo_service holds 120 m³; 121 m³ cannot be sounded in it.
    p = _voyage(tmp_path, "volume_m3 = 100.0", "volume_m3 = 121.0")
    with pytest.raises(InputError) as err:
        ship_for_voyage(load_voyage(p))
    text = str(err.value)
    assert text.startswith(f'{p}: tank."mgo_service".volume_m3: 121.0: ')
    assert "capacity, 120 m³" in text


def test_a_hot_sounding_over_capacity_is_refused_though_its_15c_volume_fits(tmp_path):
    # 120.5 m³ observed at 60 °C of an 880 kg/m³ fuel is about 118.5 m³ at 15 °C
    # (Table 54B, [TABLE-54B]): the tank still cannot hold the 120.5 m³ seen in it.
    p = _voyage(tmp_path, "volume_m3 = 100.0\ntemperature_c = 15.0",
                "volume_m3 = 120.5\ntemperature_c = 60.0")
    with pytest.raises(InputError, match="capacity, 120 m³"):
        ship_for_voyage(load_voyage(p))


def test_plan_warns_about_an_exchanged_waypoint(tmp_path):
    route = tmp_path / "r.csv"
    # parallel_east.csv with a middle point 50°N 3°E typed as lon, lat (rule: geo/swapped.py)
    route.write_text("name,lat,lon,leg,speed_kn\nWest Point,50.0,2.0,,\n"
                     "Mid,3.0,50.0,rhumb,12.0\nEast Point,50.0,6.0,rhumb,12.0\n")
    plan = build_plan(_voyage(tmp_path, route=route))
    hits = [w.text for w in plan.warnings if w.kind == "swapped_lat_lon"]
    assert len(hits) == 1 and hits[0].startswith(f"{route}: waypoint 2 'Mid'")


def test_plan_carries_the_ship_file_warnings(tmp_path):
    ship = tmp_path / "ship.toml"
    text = (VOYAGES / "ship_t1.toml").read_text()
    old = '[volumes.mixing]\nkind = "stirred"\nvolume_m3 = 1.0'
    assert old in text
    ship.write_text(text.replace(old, old.replace("1.0", "0.0005")))
    p = _voyage(tmp_path)
    p.write_text(p.read_text().replace(f'"{VOYAGES / "ship_t1.toml"}"', f'"{ship}"'))
    plan = build_plan(p)
    hits = [w.text for w in plan.warnings if w.kind == "unusual_input"]
    assert hits and "volumes.mixing.volume_m3 = 0.0005 m³ is outside the usual" in hits[0]


def test_the_sample_plan_has_no_input_warning():
    plan = build_plan(ROOT / "areas_sample" / "voyage.toml")
    assert not [w for w in plan.warnings if w.kind in ("unusual_input", "swapped_lat_lon")]


@pytest.mark.parametrize("args", [("plan", "/dev/zero"), ("flush", "/dev/zero"),
                                  ("plan", "areas_sample")])
def test_command_line_refuses_special_files_and_folders_in_one_line(args):
    r = subprocess.run([sys.executable, "-m", "planner", *args], cwd=ROOT, capture_output=True,
                       text=True, timeout=60)
    assert r.returncode == 2, r.stderr
    lines = [x for x in r.stderr.splitlines() if x.strip()]
    assert len(lines) == 1 and "Traceback" not in r.stderr, r.stderr
    assert lines[0].count(args[1]) >= 1
