"""Distillate near its flash point in heated volumes (issue 10 item 8).

The check values are hand calculations written beside them: a step change into one
well-stirred volume ([LEVENSPIEL-1999]: the new fuel's fraction is 1 − exp(−t/τ)) and a
temperature falling at the rate limit (2 °C/min, [TC-SSB-04-2015]). The margin is SOLAS
II-2 reg. 4.2.2.5's 10 °C ([SOLAS-1974] [M]), the flash point ISO 8217's 60 °C minimum for
DMA ([ISO-8217] [M]).
"""

import math
import shutil

import numpy as np
import pytest

from planner.fuels import Fuel
from planner.ship.flash_margin import flash_margin_span
from planner.voyage.run import build_plan
from tests.helpers.paths import DATA, ROOT

HFO = Fuel(name="hfo", grade="RMG 380", sulphur_pct=0.4, density_kg_m3=991.0,
           viscosity_cst=380.0, viscosity_ref_c=50.0)
MGO = Fuel(name="mgo", grade="DMA", sulphur_pct=0.05, density_kg_m3=845.0, viscosity_cst=3.0,
           viscosity_ref_c=40.0)


def test_span_of_a_stirred_washout_by_hand():
    tau, t0 = 0.5, 130.0
    t = np.linspace(0.0, 2.0, 2001)
    phi = 1.0 - np.exp(-t / tau)                   # volume fraction of gas oil
    m = np.vstack([(1 - phi) * HFO.density_kg_m3, phi * MGO.density_kg_m3])
    w = m / m.sum(0)
    temp = np.maximum(t0 - 120.0 * t, 40.0)        # 2 °C/min = 120 °C/h
    span = flash_margin_span([HFO, MGO], w, t, temp)
    # mainly gas oil by mass from φ* = ρ_h/(ρ_h + ρ_d): t* = −τ·ln(1 − φ*)
    phi_star = 991.0 / (991.0 + 845.0)
    t_star = -tau * math.log(1.0 - phi_star)
    assert span.from_h == pytest.approx(t_star, abs=1e-3)
    assert span.max_temperature_c == pytest.approx(t0 - 120.0 * t_star, abs=0.2)
    assert span.limit_c == 50.0                    # 60 °C − 10 °C
    assert span.to_h == pytest.approx((t0 - 50.0) / 120.0, abs=1e-3)


def test_no_span_when_cool_enough_or_residual():
    t = np.linspace(0.0, 1.0, 11)
    assert flash_margin_span([MGO], np.ones((1, 11)), t, np.full(11, 50.0)) is None  # at limit
    assert flash_margin_span([HFO], np.ones((1, 11)), t, np.full(11, 130.0)) is None
    high = Fuel(name="m", grade="DMA", sulphur_pct=0.05, density_kg_m3=845.0,
                viscosity_cst=3.0, viscosity_ref_c=40.0, flash_point_c=80.0)
    assert flash_margin_span([high], np.ones((1, 11)), t, np.full(11, 69.0)) is None


def test_plan_flash_warning_matches_the_hand_calculation():
    # closed_form.toml: one 1.0 m³ stirred volume, both fuels 880 kg/m³ and 40 MJ/kg, so
    # mass fraction = volume fraction = 1 − exp(−t/τ). ME: P = 9000·0.85·(12/14)³ =
    # 4817.5 kW; 4817.5·171/10⁶ = 0.82380 t/h at 42.7 MJ/kg, ×42.7/40 = 0.87941 t/h,
    # /0.880 t/m³ = 0.99933 m³/h; τ = 1.0/0.99933 = 1.00067 h; half gas oil at τ·ln 2.
    plan = build_plan(DATA / "voyages" / "closed_form.toml")
    [w] = [w for w in plan.warnings if w.kind == "flash_point"]
    tau = 1.0 / (9000 * 0.85 * (12 / 14) ** 3 * 171e-6 * 42.7 / 40 / 0.880)
    t_star = tau * math.log(2.0)
    hfo = Fuel(name="h", grade="RMG 380", sulphur_pct=0.4, density_kg_m3=880.0,
               viscosity_cst=380.0, viscosity_ref_c=50.0)
    t0 = float(hfo.temperature_for_viscosity(13.0))  # heated to 13 cSt ([ASTM-D341] line)
    assert f"at up to {t0 - 120.0 * t_star:.0f} °C {t_star:.2f}-" in w.text
    assert "flash point 60 °C, ISO 8217 minimum for DMA, from memory" in w.text
    # the fix is concrete: lower the set point ahead of the switch, to the residual's 20 cSt
    # temperature, at 2 °C/min: (T13 − T20) / 2 min before the switch (rate × time)
    t20 = float(hfo.temperature_for_viscosity(20.0))
    assert f"from {t0:.0f} °C to {t20:.0f} °C" in w.text
    assert f"starting {(t0 - t20) / 2.0:.0f} min before the switch" in w.text
    assert "blend the distillate in more slowly" not in w.text


def _copy(tmp_path, old, new):
    folder = tmp_path / "v"
    shutil.copytree(DATA / "voyages", folder)
    p = folder / "closed_form.toml"
    text = p.read_text()
    assert old in text, old
    p.write_text(text.replace(old, new, 1))
    return p


def test_a_delivery_note_flash_point_clears_the_warning(tmp_path):
    # 150 °C flash point: 140 °C limit, above the 135 °C the heater ever reaches
    p = _copy(tmp_path, 'viscosity_ref_c = 40.0', 'viscosity_ref_c = 40.0\nflash_point_c = 150.0')
    assert not [w for w in build_plan(p).warnings if w.kind == "flash_point"]


def test_a_hot_distillate_tank_warns_with_the_solas_limit(tmp_path):
    p = _copy(tmp_path, "volume_m3 = 100.0\ntemperature_c = 15.0",
              "volume_m3 = 100.0\ntemperature_c = 55.0")
    texts = [w.text for w in build_plan(p).warnings if w.kind == "flash_point"]
    tank = [t for t in texts if t.startswith("Tank mgo_service")]
    assert len(tank) == 1 and "is at 55 °C" in tank[0] and "above 50 °C" in tank[0]


def test_sample_plan_flash_warnings_name_the_circuit_and_a_fix_it_can_do():
    plan = build_plan(ROOT / "areas_sample" / "voyage.toml")
    texts = {w.text.split(" ")[1]: w.text for w in plan.warnings if w.kind == "flash_point"}
    assert set(texts) == {"main", "boiler"}
    # a burner: stop it for the switch, or its heater lowered and then off (common practice)
    assert "Stop the burner for the switch" in texts["boiler"]
    assert "switch the heater off as mgo arrives" in texts["boiler"]
    # an engine: when to start lowering the set point, to what, by what clock time
    assert "lower the heater set point from 130 °C to 113 °C" in texts["main"]
    assert "min before the switch (" in texts["main"] and "Z)" in texts["main"]
    assert "more slowly" not in texts["main"] and "stop the engine" not in texts["main"].lower()


def _sample_inlet(circuit, consumer):
    from planner.flushing import schedule_at
    from planner.flushing.study import study
    from planner.ship.ship_file import load_ship

    system = load_ship(ROOT / "areas_sample" / "ship.toml")
    st = study(system, circuit, "vlsfo_service", "mgo_service", schedule_at(system), 0.1, 0.09)
    curve = next(c for c in st.result.circuit_inlets(circuit) if c.consumer == consumer)
    return system, curve


@pytest.mark.parametrize(("circuit", "consumer"), [("main", "main_engine"),
                                                   ("boiler", "aux_boiler")])
def test_precooled_path_of_the_sample_by_hand(circuit, consumer):
    """The sample ship's changeover to mgo, the set point lowered ahead of the switch.

    Hand calculation (rate limit × time): the old fuel vlsfo is brought from its target
    temperature T_t to T_max, where it has the consumer's maximum viscosity ([ASTM-D341]
    line of its delivery-note viscosity), in (T_t − T_max)/r; held; once the blend arriving
    needs less it falls at the rate r (the set point drops far faster), so it is at
    50 °C (60 °C flash point − 10 °C) (T_max − 50)/r after it starts falling.
    """
    from planner.ship.flash_margin import precool_path

    system, curve = _sample_inlet(circuit, consumer)
    w = system.window_for(consumer)
    vlsfo = system.fuels["vlsfo"]
    t_target = float(vlsfo.temperature_for_viscosity(w.target_cst))
    t_max = float(vlsfo.temperature_for_viscosity(w.max_cst))
    p = precool_path(curve.fuels, curve.mass_fractions, curve.time_h, w)
    r = w.max_rate_c_per_min
    assert p.set_point_c == pytest.approx(t_target, abs=1e-6)
    assert p.precool_c == pytest.approx(t_max, abs=1e-6)
    assert p.lead_h * 60.0 == pytest.approx((t_target - t_max) / r, abs=1e-6)
    # the fall: the minute it starts is read off the path's own held stretch; from there
    # the time to 50 °C is (T_max − 50)/r (one grid minute of rounding)
    from planner.ship.thermal import blend_line, set_point_c

    grid = np.arange(0.0, curve.time_h[-1] + 1 / 120, 1 / 60)
    wg = np.array([np.interp(grid, curve.time_h, x) for x in curve.mass_fractions])
    sp = set_point_c(*blend_line(curve.fuels, wg), w)
    fall_h = float(grid[np.flatnonzero(sp < t_max)[0]])
    assert p.at_limit_h - fall_h == pytest.approx((t_max - 50.0) / r / 60.0, abs=1.5 / 60)
    # the span left: the distillate is mainly mgo before the temperature is down to 50 °C,
    # so a real ship has this too, and the warning stays (the old fuel may not be cooler)
    assert p.span is not None
    assert p.span.max_temperature_c == pytest.approx(
        t_max - r * 60.0 * (p.span.from_h - fall_h), abs=r * 1.5)
