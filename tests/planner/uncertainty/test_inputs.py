"""The [uncertainty] table: defaults with their sources, parsing, refusals, the sulphur default."""

from __future__ import annotations

import math
import re
import tomllib

import pytest

from geo.errors import InputError
from planner.ship.ship_file import load_ship, parse_ship
from planner.uncertainty import UncertaintySpec, load_uncertainty, parse_uncertainty
from planner.uncertainty.inputs import (
    DEFAULTS,
    KEYS,
    reproducibility_pct,
    sulphur_sd_from_reproducibility,
)
from tests.helpers.paths import ROOT

SHIP = ROOT / "areas_sample" / "ship.toml"
REFERENCE_KEY = re.compile(r"\[[A-Z][A-Z0-9]*(?:-[A-Z0-9]+)+\]")  # a docs/references.md key


@pytest.fixture(scope="module")
def ship():
    return load_ship(SHIP)


def test_every_default_states_its_source():
    spec = UncertaintySpec()
    for key in KEYS:
        src = spec.source(key)
        assert src.startswith("default: ")
        assert ("common practice" in src or "from memory" in src
                or REFERENCE_KEY.search(src)), src
    assert "[ISO-4259]" in spec.source("sulphur_sd_pct")
    assert "[ISO-8754]" in spec.source("sulphur_sd_pct")
    for key, (value, _) in DEFAULTS.items():
        assert getattr(spec, key) == value


# [ISO-8754] verification values, from memory [M] (not checked against the standard): the
# 95 % result at which a sample is taken to exceed the limit. Columns: limit, value, % m/m.
VERIFICATION_VALUES = [(0.10, 0.11), (0.50, 0.53)]
# sd = 0.59·R / 1.645 [D] (0.59·R is the one-sided 95 % margin, [ISO-4259] [P]), with R from
# the line through VERIFICATION_VALUES. Columns: sulphur, sd, tolerance, % m/m.
SULPHUR_SD = [
    (0.10, 0.01 / 1.6448536, 1e-9),  # 0.59·R(0.10) = 0.01
    (0.08, 0.005471, 2e-6),
]


@pytest.mark.parametrize(("limit", "value"), VERIFICATION_VALUES)
def test_reproducibility_gives_the_verification_values(limit, value):
    assert limit + 0.59 * reproducibility_pct(limit) == pytest.approx(value)


@pytest.mark.parametrize(("sulphur", "sd", "tol"), SULPHUR_SD)
def test_sulphur_default_from_reproducibility(sulphur, sd, tol):
    assert sulphur_sd_from_reproducibility(sulphur) == pytest.approx(sd, abs=tol)
    spec = UncertaintySpec()
    assert spec.sulphur_sd("mgo", sulphur) == sulphur_sd_from_reproducibility(sulphur)


def test_sample_ship_table_parses_to_the_defaults(ship):
    spec = load_uncertainty(SHIP, ship)
    for key, (value, _) in DEFAULTS.items():
        assert getattr(spec, key) == value
        assert "ship.toml [uncertainty] (the default:" in spec.source(key)


def test_ship_loader_accepts_the_table():
    data = tomllib.loads(SHIP.read_text(encoding="utf-8"))
    data["uncertainty"] = {"volumes_pct": 3.0}
    parse_ship(data, "x.toml")  # no refusal of the top-level table


def test_values_per_name_and_per_fuel(ship):
    spec = parse_uncertainty({"volumes_pct": {"default": 8.0, "supply_line": 25.0},
                              "tanks_pct": 2.0, "sulphur_sd_pct": {"mgo": 0.004},
                              "boundary_time_min": 30}, "s.toml", ship)
    assert spec.volume_pct("supply_line") == 25.0 and spec.volume_pct("heaters") == 8.0
    assert spec.tank_pct("mgo_service") == 2.0
    assert spec.sulphur_sd("mgo", 0.08) == 0.004
    assert spec.sulphur_sd("vlsfo", 0.48) == sulphur_sd_from_reproducibility(0.48)
    assert spec.boundary_time_min == 30.0
    one = parse_uncertainty({"sulphur_sd_pct": 0.01}, "s.toml", ship)
    assert one.sulphur_sd("vlsfo", 0.48) == 0.01


def test_voyage_overrides_key_by_key(tmp_path, ship):
    voyage = tmp_path / "v.toml"
    voyage.write_text("[uncertainty]\nboundary_time_min = 40.0\n", encoding="utf-8")
    spec = load_uncertainty(SHIP, ship, voyage_file=voyage)
    assert spec.boundary_time_min == 40.0 and spec.volumes_pct == 10.0
    assert spec.source("boundary_time_min").startswith(str(voyage))


def test_zero_spec_has_no_spread():
    z = UncertaintySpec.zero()
    assert z.volume_pct("x") == 0 and z.tank_pct("t") == 0 and z.sulphur_sd("f", 0.5) == 0


@pytest.mark.parametrize(("table", "place"), [
    ({"volumes_pct": -1}, "uncertainty.volumes_pct"),
    ({"volumes_pct": 80}, "uncertainty.volumes_pct"),
    ({"consumption_pct": "5"}, "uncertainty.consumption_pct"),
    ({"mixing_bypass": 0.95}, "uncertainty.mixing_bypass"),
    ({"mixing_stagnant": True}, "uncertainty.mixing_stagnant"),
    ({"boundary_time_min": math.inf}, "uncertainty.boundary_time_min"),
    ({"sulphur_sd_pct": {"hfo": 0.01}}, "uncertainty.sulphur_sd_pct.hfo"),
    ({"sulphur_sd_pct": 2.0}, "uncertainty.sulphur_sd_pct"),
    ({"volumes_pct": {"no_such_pipe": 5}}, "uncertainty.volumes_pct.no_such_pipe"),
    ({"tanks_pct": {"supply_line": 5}}, "uncertainty.tanks_pct.supply_line"),
    ({"volume_pct": 5}, "uncertainty.volume_pct"),
])
def test_bad_values_are_one_clear_error(ship, table, place):
    with pytest.raises(InputError) as e:
        parse_uncertainty(table, "ship.toml", ship)
    assert e.value.file == "ship.toml" and e.value.place == place
    assert str(e.value).startswith(f"ship.toml: {place}: ")


def test_not_a_table(ship):
    with pytest.raises(InputError, match="an \\[uncertainty\\] table"):
        parse_uncertainty(5, "ship.toml", ship)


def _load_refused(ship_file, voyage_file=None) -> str:
    with pytest.raises(InputError) as err:
        load_uncertainty(ship_file, None, voyage_file=voyage_file)
    text = str(err.value)
    assert "\n" not in text
    return text


def test_hostile_files_are_one_line_through_the_shared_reader(tmp_path):
    # the behaviour of planner.common.input_files.read_toml (README "What input is refused")
    assert "not a folder" in _load_refused(tmp_path)
    assert "not a device, pipe or socket" in _load_refused("/dev/zero")
    bad = tmp_path / "latin1.toml"
    bad.write_bytes(b"[uncertainty]\n# caf\xe9\n")
    text = _load_refused(bad)
    assert text.startswith(str(bad)) and "line 2" in text and "0xe9" in text
    nan = tmp_path / "nan.toml"
    nan.write_text("[uncertainty]\nvolume_pct = nan\n", encoding="utf-8")
    assert _load_refused(nan).startswith(str(nan))
    # the voyage file is read by the same reader, and named in its message
    assert _load_refused(SHIP, tmp_path).startswith(str(tmp_path))
    assert "voyage file" in _load_refused(SHIP, tmp_path)
