"""The ship file (TOML): loading the sample and the fixtures, and one clear error per fault."""

import math
import re
from pathlib import Path

import pytest

from geo.errors import InputError
from planner.fuels import ISO_REFERENCE_Q_NET_MJ_KG
from planner.ship.consumers import Boiler, Generator, MainEngine, fuel_rate_t_h, iso_demand_t_h
from planner.ship.ship_file import load_ship, parse_ship
from planner.ship.system import Pipe, Stirred
from tests.helpers.flushing import SHIPS

SAMPLE = Path("areas_sample/ship.toml")


def test_sample_ship_loads():
    s = load_ship(SAMPLE)
    assert s.ship.name == "MV Kestrel Bay" and s.ship.fictional and s.ship.imo == "9999993"
    assert set(s.circuits) == {"main", "boiler"}
    assert s.circuits["main"].consumers == ("main_engine", "dg1", "dg2")
    me = s.consumers["main_engine"]
    assert isinstance(me, MainEngine) and me.load_pct_at_speed(14.0) == pytest.approx(85.0)
    # pipe volume from length and bore: π/4·d²·L
    assert s.volumes["supply_line"].volume_m3 == pytest.approx(math.pi / 4 * 0.04**2 * 30.0)
    assert s.tank_for("main", "mgo") == "mgo_service"


@pytest.mark.parametrize("path", sorted(SHIPS.glob("t*.toml")), ids=lambda p: p.stem)
def test_fixtures_load(path):
    s = load_ship(path)
    assert s.circuits and all(c.links for c in s.circuits.values())


def test_chain_form_builds_the_links():
    s = load_ship(SHIPS / "t3_loop.toml")
    pairs = [(lk.source, lk.target) for lk in s.circuits["main"].links]
    assert pairs == [
        ("valve", "supply"),
        ("supply", "mixing"),
        ("mixing", "booster"),
        ("booster", "heater"),
        ("heater", "to_engine"),
        ("to_engine", "return"),
        ("return", "mixing"),
        ("to_engine", "main_engine"),
    ]
    assert isinstance(s.volumes["heater"], Stirred) and isinstance(s.volumes["return"], Pipe)


def _edit(text: str, old: str, new: str) -> str:
    assert old in text, old
    return text.replace(old, new)


def _load_text(tmp_path, text):
    p = tmp_path / "ship.toml"
    p.write_text(text)
    return load_ship(p)


T2 = (SHIPS / "t2_pipe_mix_pipe.toml").read_text()
T4 = (SHIPS / "t4_return_named.toml").read_text()


@pytest.mark.parametrize(
    "base, old, new, place",
    [
        (T2, "volume_m3 = 0.5", "volume_m3 = 0.0", "volumes.mixing.volume_m3"),
        (T2, "volume_m3 = 0.5", "volume_m3 = -1.0", "volumes.mixing.volume_m3"),
        (T2, "bore_mm = 40.0", "bore_mm = 0", "volumes.to_engine.bore_mm"),
        (
            T2,
            'chain = ["supply", "mixing", "to_engine"]',
            'chain = ["supply", "mixer"]',
            "circuits.main.chain.to",
        ),
        (
            T2,
            'tanks = ["hfo_service", "mgo_service"]',
            'tanks = ["hfo_service", "lsfo"]',
            "circuits.main.tanks",
        ),
        (
            T2,
            'consumers = ["main_engine"]',
            'consumers = ["main_engin"]',
            "circuits.main.consumers",
        ),
        (T2, 'fuel = "hfo"', 'fuel = "hfo2"', "tanks.hfo_service.fuel"),
        (T2, 'kind = "stirred"', 'kind = "stired"', "volumes.mixing.kind"),
        (T2, 'kind = "main_engine"', 'kind = "engine"', "consumers.main_engine.kind"),
        (T2, "mcr_kw = 9000.0", 'mcr_kw = "9000"', "consumers.main_engine.mcr_kw"),
        (T2, "volume_m3 = 0.04", "volum_m3 = 0.04", "volumes.supply.volum_m3"),
        (T2, "volume_m3 = 50.0", "volume_m3 = 70.0", "tanks.hfo_service.volume_m3"),
        (T2, "[volumes.mixing]", "[volumes.valve]", "volumes.valve"),
        (T4, 'flow = "consumption" }', "flow_m3h = 1.0 }", "circuits.main.links"),
        (
            T4,
            '{ from = "supply", to = "return", flow = "rest" }',
            '{ from = "supply", to = "return", flow = "rest" }, '
            '{ from = "supply", to = "hfo_service", flow = "rest" }',
            "circuits.main.links[2].flow",
        ),
        (T4, "flow_m3h = 3.0", "flow_m3h = 1.2", "circuits.main.links[2].flow"),
        (T4, 'flow = "consumption"', 'flow = "most"', "circuits.main.links[1].flow"),
        (
            T4,
            '{ from = "mixing", to = "main_engine" }',
            '{ from = "mixing", to = "main_engine", flow = "rest" }',
            "circuits.main.links[4].flow",
        ),
        (T4, 'to = "mgo_service"', 'to = "mgo_servise"', "circuits.main.links[3].to"),
        (T4, '{ from = "mixing", to = "main_engine" },', "", "circuits.main.links"),
        (T4, "[circuits.main]", '[circuits.main]\nchain = ["supply"]', "circuits.main.links"),
    ],
)
def test_bad_ship_files_give_one_line_naming_the_key(tmp_path, base, old, new, place):
    with pytest.raises(InputError) as e:
        _load_text(tmp_path, _edit(base, old, new))
    message = str(e.value)
    assert "\n" not in message and str(tmp_path / "ship.toml") in message
    assert f": {place}" in message, message


def test_unbalanced_flows_name_the_node(tmp_path):
    bad = _edit(
        T4,
        '{ from = "supply", to = "return", flow = "rest" }',
        '{ from = "supply", to = "return", flow_m3h = 1.0 }',
    )
    with pytest.raises(InputError, match=r"balance at 'supply'"):
        _load_text(tmp_path, bad)


def test_pump_below_consumption_at_mcr_is_refused(tmp_path):
    with pytest.raises(InputError, match=r"100 % MCR"):
        _load_text(tmp_path, _edit(T4, "flow_m3h = 3.0", "flow_m3h = 1.8"))


def test_missing_and_malformed_files(tmp_path):
    with pytest.raises(InputError, match="an existing ship file"):
        load_ship(tmp_path / "nope.toml")
    with pytest.raises(InputError, match="valid TOML"):
        _load_text(tmp_path, "[ship\nname = 1")
    with pytest.raises(InputError, match=re.escape("ship.name")):
        parse_ship({"ship": {}}, "x.toml")


def test_main_engine_follows_the_propeller_law():
    me = MainEngine(name="me", mcr_kw=9000, sfoc_g_kwh=171, ref_speed_kn=14, ref_load_pct=85)
    # [PROPELLER-LAW] (common practice): P ∝ v³
    assert me.load_pct_at_speed(7.0) == pytest.approx(85.0 / 8.0)
    assert me.iso_demand_t_h(speed_kn=14.0) == pytest.approx(9000 * 0.85 * 171 / 1e6)
    assert me.speed_at_load(85.0 / 8.0) == pytest.approx(7.0)
    with pytest.raises(ValueError, match="above 110"):
        me.load_pct_at_speed(16.0)


def test_consumption_is_scaled_to_net_specific_energy():
    gen = Generator(name="dg", power_kw=500, sfoc_g_kwh=200)
    boiler = Boiler(name="b", fuel_t_h=0.3)
    assert iso_demand_t_h(gen) == pytest.approx(0.1)
    assert iso_demand_t_h(boiler) == pytest.approx(0.3)
    # [ISO-3046] reference energy [M], from memory: SFOC × 42.7 / Q_net of the fuel burnt
    assert fuel_rate_t_h(0.1, 40.0) == pytest.approx(0.1 * ISO_REFERENCE_Q_NET_MJ_KG / 40.0)
    with pytest.raises(ValueError):
        Generator(name="dg", power_kw=800, sfoc_g_kwh=200, rated_kw=700)
