"""The procedure gives each consumer its own inlet window and heating rule (issue 10 item 7).

The sample ship (areas_sample/ship.toml, fictional) gives the generators and the boiler no
inlet keys, so their windows are the kind defaults of :mod:`planner.ship.inlet_limits`
(four-stroke engine: 14 cSt, 2-20 cSt, 2 °C/min, from memory / common practice; boiler
burner: 15 cSt, 1-30 cSt, 10 °C/min, from memory); the main engine's own table repeats the
two-stroke figures. The expected temperatures are worked out here by the ASTM D341 line of
each fuel's delivery-note viscosity ([ASTM-D341], `Fuel.temperature_for_viscosity`).
"""

from __future__ import annotations

import json
import shutil
import subprocess
import sys

import pytest

from planner.procedure import steps
from planner.procedure.facts import facts_json, gather
from planner.ship.inlet_limits import BOILER_BURNER, FOUR_STROKE, TWO_STROKE
from planner.ship.ship_file import load_ship
from tests.helpers.paths import ROOT

SHIP = ROOT / "areas_sample" / "ship.toml"


@pytest.fixture(scope="module")
def system():
    return load_ship(SHIP)


@pytest.fixture(scope="module")
def facts(system):
    return gather(system, limit_pct=0.10)


def test_each_consumer_gets_its_kind_default_window(facts):
    by = {c: g for g in facts.windows for c in g.consumers}
    assert by["main_engine"].window == TWO_STROKE
    assert by["dg1"].window == by["dg2"].window == FOUR_STROKE
    assert by["aux_boiler"].window == BOILER_BURNER and by["aux_boiler"].burner
    assert by["dg1"] is by["dg2"]                       # one group for the two generators
    boiler = next(c for c in facts.circuits if c.name == "boiler")
    assert [g.consumers for g in boiler.windows] == [("aux_boiler",)]


def test_window_temperatures_follow_the_d341_line_of_each_fuel(facts, system):
    vlsfo = system.fuels["vlsfo"]
    for g in facts.windows:
        w = g.window
        t = g.fuel("vlsfo")
        # set point: the D341 temperature of the target viscosity, clipped to the heaters
        expected = min(max(float(vlsfo.temperature_for_viscosity(w.target_cst)),
                           w.supply_temperature_c), w.max_temperature_c)
        assert t.set_point_c == pytest.approx(expected)
        assert t.thickens_to_max_c == pytest.approx(
            float(vlsfo.temperature_for_viscosity(w.max_cst)))
        assert g.fuel("mgo").heated is False       # 3.5 cSt at 40 °C: thinner than any target
    boiler = next(g for g in facts.windows if g.burner)
    # the burner's 30 cSt maximum lets vlsfo cool further than the engines' 20 cSt
    engine = next(g for g in facts.windows if "main_engine" in g.consumers)
    assert boiler.fuel("vlsfo").thickens_to_max_c < engine.fuel("vlsfo").thickens_to_max_c


def test_json_carries_each_window_with_its_label(facts):
    doc = json.loads(json.dumps(facts_json(facts)))
    boiler = next(c for c in doc["circuits"] if c["name"] == "boiler")
    (w,) = boiler["windows"]
    assert w["consumers"] == ["aux_boiler"] and w["burner"] is True
    assert w["label"] == "boiler burner aux_boiler"
    assert (w["window"]["min_cst"], w["window"]["max_cst"]) == (1.0, 30.0)
    assert w["window"]["max_rate_c_per_min"] == 10.0
    # the old ship-wide keys stay (docs/json-contract.md: add, never rename)
    assert "inlet" in doc and "swing_c" in doc and "fuels" in doc
    labels = [g["label"] for g in doc["windows"]]
    assert labels == ["two-stroke main engine main_engine", "four-stroke engines dg1 and dg2",
                      "boiler burner aux_boiler"]


def test_boiler_text_has_the_burner_window_and_burner_advice(facts):
    text = " ".join(steps.temperature(facts) + steps.checks(facts) + steps.back(facts))
    assert "boiler burner aux_boiler 1-30 cSt, at most 10 °C/min" in text
    assert "two-stroke main engine main_engine 2-20 cSt, at most 2 °C/min" in text
    assert "switch the burner heater off or bypass it" in text
    assert "Or stop the burner for the switch" in text
    # an engine is never told to stop; a burner never gets the engine's rate-limit wording
    assert "stop the engine" not in text.lower()
    burner_part = next(x for x in steps.temperature(facts) if x.startswith("Boiler burner"))
    assert "2 °C/min" not in burner_part and "cooler" not in burner_part


def _pdftotext(pdf) -> str:
    return " ".join(subprocess.run(["pdftotext", str(pdf), "-"], capture_output=True, text=True,
                                   check=True).stdout.split())


@pytest.mark.requires_poppler
def test_procedure_pdf_prints_each_window(tmp_path):
    if not shutil.which("pdftotext"):
        pytest.skip("poppler-utils (pdftotext) not installed")
    pdf = tmp_path / "p.pdf"
    subprocess.run([sys.executable, "-m", "planner", "procedure", str(SHIP), "--pdf", str(pdf)],
                   check=True, capture_output=True)
    t = _pdftotext(pdf)
    assert "Each consumer's inlet limits" in t
    assert "boiler burner aux_boiler" in t and "four-stroke engines dg1 and dg2" in t
    assert "The model holds every inlet to the same window" not in t
    # the boiler's limits and the burner's advice are printed, the engines' as theirs
    assert "1 cSt" in t and "30 cSt" in t and "10 °C/min" in t
    assert "switch the burner heater off or bypass it" in t
    assert "stop the engine" not in t.lower()


def test_procedure_gives_the_flash_point_fix_of_each_consumer(facts, system):
    # the same caution as the plan's (planner.voyage.fuel_checks.changeover_flash_text);
    # hand calculation (rate × time): vlsfo lowered from its 13 cSt temperature to its
    # 20 cSt one ([ASTM-D341]) at 2 °C/min starts (T13 − T20)/2 min before the switch
    vlsfo = system.fuels["vlsfo"]
    t13, t20 = (float(vlsfo.temperature_for_viscosity(v)) for v in (13.0, 20.0))
    text = steps.temperature(facts)
    main = next(x for x in text if x.startswith("Flash point: Circuit main"))
    assert f"from {t13:.0f} °C to {t20:.0f} °C" in main
    assert f"starting {(t13 - t20) / 2.0:.0f} min before the switch" in main
    boiler = next(x for x in text if x.startswith("Flash point: Circuit boiler"))
    assert "Stop the burner for the switch" in boiler and "more slowly" not in boiler
    doc = facts_json(facts)
    ref = next(c for c in doc["circuits"] if c["name"] == "main")["rows"]
    assert any(r["flash_caution"] == main.removeprefix("Flash point: ") for r in ref)
