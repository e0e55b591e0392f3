"""The facts and words of the written changeover procedure ([MARPOL-VI] reg. 14.6).

- the facts against the ship file (tanks, volumes, pipe volume = π/4·d²·L, the
  [inlet] limits) and against the flushing model (duration_table and flush
  give the same times; start before boundary = time to target + margin);
- the steps' text: Latin-1 only, naming the ship's own parts and figures.

The ship is :mod:`tests.planner.procedure.petrel` (fictional; fixtures in conftest.py).
"""

from __future__ import annotations

import json
import math
from dataclasses import replace

import pytest

from planner.flushing import flush, schedule_at
from planner.flushing.study import duration_table
from planner.procedure import steps
from planner.procedure.facts import ViscosityCheck, facts_json, gather, table_loads
from planner.ship.consumers import MainEngine


def circuit(facts, name):
    return next(c for c in facts.circuits if c.name == name)


def test_identity_limits_and_fuels_from_the_ship_file(facts, system):
    assert facts.ship.name == "MV Test Petrel" and facts.ship.imo == "9999993"
    assert facts.limit_pct == 0.10 and math.isclose(facts.target_pct, 0.09)
    assert facts.inlet == system.inlet and facts.inlet.min_cst == 2.5
    by = {f.name: f for f in facts.fuels}
    assert not by["vlsfo"].compliant and by["mgo"].compliant
    assert by["vlsfo"].residual and not by["mgo"].residual
    # the heater set point gives the target viscosity (the fuel's [ASTM-D341] line)
    assert math.isclose(by["vlsfo"].viscosity_at_set_point_cst, 14.0, rel_tol=1e-6)
    assert by["mgo"].set_point_c == 38.0                 # thinner than 14 cSt unheated
    mgo = system.fuels["mgo"]
    assert math.isclose(float(mgo.viscosity_at(by["mgo"].thins_to_min_c)), 2.5, rel_tol=1e-6)
    assert not by["mgo"].slope_assumed and by["vlsfo"].slope_assumed
    assert math.isclose(facts.swing_c, by["vlsfo"].set_point_c - 38.0)
    assert math.isclose(facts.swing_min, facts.swing_c / 1.5)


def test_tanks_and_volumes_from_the_ship_file(facts, system):
    tanks = {t.name: t for t in facts.tanks}
    assert set(tanks) == set(system.tanks)
    assert tanks["mgo_storage"].compliant and tanks["mgo_storage"].circuits == ()
    assert tanks["vlsfo_service"].circuits == ("main", "boiler", "aux")
    assert math.isclose(tanks["vlsfo_service"].sulphur_pct, 0.48)
    main = circuit(facts, "main")
    assert [v.name for v in main.volumes] == ["supply_line", "mixing_tank", "heaters",
                                              "engine_line", "return_line"]
    supply = main.volumes[0]
    assert supply.kind == "pipe" and supply.length_m == 30.0 and supply.bore_mm == 40.0
    assert math.isclose(supply.volume_m3, math.pi / 4 * 0.040 ** 2 * 30.0)   # π/4·d²·L
    assert math.isclose(main.stirred_m3, 0.62)
    assert math.isclose(main.pipe_m3, math.pi / 4 * (0.04 ** 2 * 30 + 0.032 ** 2 * 20) + 0.03)
    assert math.isclose(main.total_m3, main.pipe_m3 + main.stirred_m3)
    # the loop pump circulates 5.0 m³/h through the heaters; the mixing tank takes supply + return
    flows = {v.name: v for v in main.volumes}
    assert math.isclose(flows["heaters"].flow_m3h, 5.0)
    assert flows["mixing_tank"].fed_from == ("supply_line", "return_line")
    assert main.returns_to == ("mixing_tank",) and not main.returns_to_tank
    assert math.isclose(flows["heaters"].holds_min, 0.12 / 5.0 * 60.0)
    # the supply line carries what the consumers burn, by volume, on the regular fuel
    # (rates at the 42.7 MJ/kg reference of SFOC, [ISO-3046] [M], scaled to the fuel)
    v = system.fuels["vlsfo"]
    burn = sum(schedule_at(system).rates_t_h[c][0] * 42.7 / v.q_net for c in ("main_engine", "dg1"))
    assert math.isclose(supply.flow_m3h, burn * 1000.0 / v.density_kg_m3, rel_tol=1e-9)
    aux = circuit(facts, "aux")
    assert aux.returns_to_tank and [x.name for x in aux.volumes] == ["aux_line"]


def test_duration_table_is_the_flushing_model(facts, system):
    main = circuit(facts, "main")
    assert main.has_main_engine and main.reference_load_pct == 85.0
    assert (main.from_tank, main.to_tank) == ("vlsfo_service", "mgo_service")
    loads = table_loads(system)
    assert loads == (25.0, 50.0, 75.0, 85.0, 100.0)
    table = duration_table(system, "main", "vlsfo_service", "mgo_service", 0.10, 0.09, loads)
    engine = system.consumers["main_engine"]
    assert isinstance(engine, MainEngine)
    for row, ref in zip(main.rows, table, strict=True):
        assert row.load_pct == ref.load_pct
        # the model repeats itself to round-off (not always to the last bit)
        assert row.time_to_limit_h == pytest.approx(ref.time_to_limit_h, rel=1e-9)
        assert row.time_to_target_h == pytest.approx(ref.time_to_target_h, rel=1e-9)
        assert math.isclose(row.start_before_h, ref.time_to_target_h + 1.5)
        assert math.isclose(row.speed_kn, engine.speed_at_load(row.load_pct))
        assert math.isclose(row.start_before_nm, row.start_before_h * row.speed_kn)
        assert row.burnt_t == pytest.approx(ref.burnt_t)
    # lower load, longer changeover
    times = [r.time_to_target_h for r in main.rows]
    assert times == sorted(times, reverse=True)
    assert main.reference_row.load_pct == 85.0


def test_boiler_circuit_has_its_one_duration(facts, system):
    boiler = circuit(facts, "boiler")
    assert not boiler.has_main_engine and len(boiler.rows) == 1
    _, s = flush(system, "boiler", "vlsfo_service", "mgo_service", schedule_at(system),
                 limit_pct=0.10, target_pct=0.09)
    row = boiler.rows[0]
    assert row.load_pct is None and row.speed_kn is None and row.start_before_nm is None
    assert row.time_to_limit_h == pytest.approx(s.time_to_limit_h, rel=1e-9)
    assert row.time_to_target_h == pytest.approx(s.time_to_target_h, rel=1e-9)
    assert math.isclose(row.start_before_h, s.time_to_target_h + 1.5)


def test_viscosity_check_and_warnings(facts):
    for c in facts.circuits:
        for r in c.rows:
            v = r.viscosity
            assert v.min_cst <= v.max_cst
            assert v.inside == (v.min_cst >= 2.5 - 1e-6 and v.max_cst <= 18.0 + 1e-6)
            assert v.inside == (not v.outside)
    flagged = [w for w in facts.warnings if "leaves the window" in w]
    outside = [c.name for c in facts.circuits if any(not r.viscosity.inside for r in c.rows)]
    assert len({n for n in outside}) == len({w.split(":")[0] for w in flagged})
    assert any("vlsfo: one viscosity point" in w for w in facts.warnings)
    assert not any("mgo: one viscosity point" in w for w in facts.warnings)


def test_json_is_plain(facts):
    doc = json.loads(json.dumps(facts_json(facts), allow_nan=False))
    assert doc["circuits"][0]["name"] == "main"
    assert math.isclose(doc["circuits"][0]["total_m3"], circuit(facts, "main").total_m3)
    assert doc["circuits"][0]["volumes"][0]["holds_min"] > 0


def test_target_and_voyage_defaults(system):
    f = gather(system, limit_pct=0.5, target_pct=0.4, margin_h=0.0)
    assert f.limit_pct == 0.5 and f.target_pct == 0.4
    assert all(r.start_before_h == r.time_to_target_h for c in f.circuits for r in c.rows)


SECTION_STEPS = (steps.purpose, steps.checks, steps.temperature, steps.valves, steps.monitoring,
                 steps.completion, steps.back)


def test_steps_are_latin1_and_name_the_ships_parts(facts):
    for part in SECTION_STEPS:
        for line in part(facts):
            line.encode("latin-1")                   # the PDF's standard fonts
            assert "→" not in line and "≥" not in line
    valves = " ".join(steps.valves(facts))
    assert "in this order: main, aux and boiler" in valves      # longest first at reference load
    assert "open the suction from mgo_service before closing that from vlsfo_service" in valves
    assert "its return goes to the tank in use" in valves       # circuit aux
    checks = " ".join(steps.checks(facts))
    assert "sound mgo_service and mgo_storage" in checks
    assert "confined or congested waters" in checks
    start = circuit(facts, "main").reference_row.start_before_h
    assert f"at least {steps.dur(start)} before the boundary" in checks
    back = steps.back(facts)
    assert any(x.startswith("Circuits main, aux and boiler: ") for x in back)   # same tanks


def test_temperature_steps_follow_the_viscosity_model(facts):
    text = " ".join(steps.temperature(facts))
    assert "1.5 °C/min" in text and f"about {facts.swing_c:.0f} °C" in text
    for c in facts.circuits:
        if all(r.viscosity.inside for r in c.rows):
            assert f"Circuit {c.name}: with the temperature following the fuel" in text
        elif all(g.burner for g in c.windows):
            # a burner's advice: stop the burner for the switch (common practice), never an
            # engine's
            assert f"Circuit {c.name}" in text and "Stop the burner for the switch" in text
        else:
            assert f"Circuit {c.name}" in text and "more slowly" in text
    assert "stop the engine" not in text.lower()
    # a circuit the model can keep inside by cooling early: start that many minutes ahead
    main = circuit(facts, "main")
    early = ViscosityCheck(1.9, 14.0, False, 0.25, "main_engine", ((0.1, 0.3, "below"),))
    rows = tuple(replace(r, viscosity=early) for r in main.rows)
    f2 = replace(facts, circuits=(replace(main, rows=rows),))
    text2 = " ".join(steps.temperature(f2))
    assert "Start lowering the heater set point 15 min before moving the valve" in text2
    assert "falling to 1.9 cSt, below its 2.5 cSt minimum, from 0:06 to 0:18" in text2
    assert "in steps (section 6)" in " ".join(steps.valves(f2))


# Hours and lists as the procedure writes them: (function, argument, text). The minutes
# are the hours × 60, rounded (1.3333 h = 80.0 min, 0.05 h = 3 min, 2.55 h = 153 min).
FORMATS = (
    (steps.hm, 1.3333, "1:20"),
    (steps.hm, None, "—"),
    (steps.hm, 0.05, "0:03"),
    (steps.dur, 0.75, "45 min"),
    (steps.dur, 2.55, "2 h 33 min"),
    (steps.names, [], ""),
    (steps.names, ["a"], "a"),
    (steps.names, ["a", "b", "c"], "a, b and c"),
)


@pytest.mark.parametrize("fn,arg,text", FORMATS, ids=[f"{f.__name__}-{a}" for f, a, _ in FORMATS])
def test_time_formats(fn, arg, text):
    assert fn(arg) == text
