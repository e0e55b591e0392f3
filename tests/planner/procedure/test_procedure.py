"""The written changeover procedure (MARPOL Annex VI reg. 14.6): facts, PDF, command.

- the facts against the ship file (tanks, volumes, pipe volume = π/4·d²·L, the
  [inlet] limits) and against the flushing model (duration_table and flush
  give the same times; start before boundary = time to target + margin);
- the PDF read back with pdftotext holds every section and figure the
  procedure must show (skipped without poppler-utils);
- ``changeover procedure`` end to end; a bad ship file is one stderr line,
  exit 2 and no PDF.

The ship here is written out below (a fixed copy of the fictional sample with
a third, general-form circuit whose return goes to the tank in use) so that
changes to areas_sample/ never move these checks.
"""

from __future__ import annotations

import json
import math
import shutil
import subprocess
import sys
from dataclasses import replace
from datetime import UTC, datetime
from pathlib import Path

import pytest

from planner.documents.procedure_pdf import SECTIONS, write_procedure_pdf
from planner.flushing import flush, schedule_at
from planner.flushing.study import duration_table
from planner.procedure import steps
from planner.procedure.facts import ViscosityCheck, facts_json, gather, table_loads
from planner.ship.consumers import MainEngine
from planner.ship.ship_file import load_ship
from tests.helpers.paths import ROOT

SAMPLE = ROOT / "areas_sample"
PRINTED = datetime(2027, 5, 28, 8, 30, tzinfo=UTC)
needs_poppler = pytest.mark.requires_poppler

SHIP = """
[ship]
name = "MV Test Petrel"
imo = "9999993"
fictional = true

[inlet]
target_cst = 14.0
min_cst = 2.5
max_cst = 18.0
max_rate_c_per_min = 1.5
supply_temperature_c = 38.0
max_temperature_c = 150.0

[fuels.vlsfo]
grade = "RMG 380"
bdn_ref = "TP-0001 (fictional)"
sulphur_pct = 0.48
density_kg_m3 = 975.0
viscosity_cst = 290.0
viscosity_ref_c = 50.0

[fuels.mgo]
grade = "DMA"
bdn_ref = "TP-0002 (fictional)"
sulphur_pct = 0.08
density_kg_m3 = 850.0
viscosity_cst = 3.5
viscosity_ref_c = 40.0
viscosity2_cst = 1.9
viscosity2_ref_c = 80.0

[tanks.vlsfo_service]
capacity_m3 = 45.0
fuel = "vlsfo"
volume_m3 = 38.0

[tanks.mgo_service]
capacity_m3 = 30.0
fuel = "mgo"
volume_m3 = 26.0

[tanks.mgo_storage]
capacity_m3 = 120.0
fuel = "mgo"
volume_m3 = 85.0

[consumers.main_engine]
kind = "main_engine"
mcr_kw = 9000.0
sfoc_g_kwh = 171.0
ref_speed_kn = 14.0
ref_load_pct = 85.0

[consumers.dg1]
kind = "generator"
power_kw = 420.0
rated_kw = 700.0
sfoc_g_kwh = 205.0

[consumers.dg3]
kind = "generator"
power_kw = 300.0
sfoc_g_kwh = 210.0

[consumers.aux_boiler]
kind = "boiler"
fuel_t_h = 0.3

[volumes.supply_line]
kind = "pipe"
length_m = 30.0
bore_mm = 40.0

[volumes.mixing_tank]
kind = "stirred"
volume_m3 = 0.5

[volumes.heaters]
kind = "stirred"
volume_m3 = 0.12

[volumes.engine_line]
kind = "pipe"
volume_m3 = 0.03

[volumes.return_line]
kind = "pipe"
length_m = 20.0
bore_mm = 32.0

[volumes.boiler_line]
kind = "pipe"
length_m = 40.0
bore_mm = 25.0

[volumes.burner_heater]
kind = "stirred"
volume_m3 = 0.03

[volumes.aux_line]
kind = "stirred"
volume_m3 = 0.08

[circuits.main]
tanks = ["vlsfo_service", "mgo_service"]
consumers = ["main_engine", "dg1"]
chain = ["supply_line", "mixing_tank"]
loop = ["heaters", "engine_line"]
loop_flow_m3h = 5.0
loop_return = ["return_line"]

[circuits.boiler]
tanks = ["vlsfo_service", "mgo_service"]
consumers = ["aux_boiler"]
chain = ["boiler_line", "burner_heater"]

[circuits.aux]
tanks = ["vlsfo_service", "mgo_service"]
consumers = ["dg3"]
links = [
  { from = "valve", to = "aux_line", flow = "consumption", factor = 3.0 },
  { from = "aux_line", to = "dg3" },
  { from = "aux_line", to = "tank_in_use", flow = "rest" },
]
"""


@pytest.fixture(scope="module")
def ship_file(tmp_path_factory) -> Path:
    path = tmp_path_factory.mktemp("ship") / "petrel.toml"
    path.write_text(SHIP, encoding="utf-8")
    return path


@pytest.fixture(scope="module")
def system(ship_file):
    return load_ship(ship_file)


@pytest.fixture(scope="module")
def facts(system):
    return gather(system, limit_pct=0.10, margin_h=1.5)


def circuit(facts, name):
    return next(c for c in facts.circuits if c.name == name)


def test_identity_limits_and_fuels_from_the_ship_file(facts, system):
    assert facts.ship.name == "MV Test Petrel" and facts.ship.imo == "9999993"
    assert facts.limit_pct == 0.10 and math.isclose(facts.target_pct, 0.09)
    assert facts.inlet == system.inlet and facts.inlet.min_cst == 2.5
    by = {f.name: f for f in facts.fuels}
    assert not by["vlsfo"].compliant and by["mgo"].compliant
    assert by["vlsfo"].residual and not by["mgo"].residual
    # the heater set point gives the target viscosity (ASTM D341 line of the fuel)
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
        else:
            assert f"Circuit {c.name}" in text and "more slowly" in text
    # a circuit the model can keep inside by cooling early: start that many minutes ahead
    main = circuit(facts, "main")
    early = ViscosityCheck(1.9, 14.0, False, 0.25, "main_engine", ((0.1, 0.3, "below"),))
    rows = tuple(replace(r, viscosity=early) for r in main.rows)
    f2 = replace(facts, circuits=(replace(main, rows=rows),))
    text2 = " ".join(steps.temperature(f2))
    assert "Start lowering the heater set point 15 min before moving the valve" in text2
    assert "falling to 1.9 cSt, below the 2.5 cSt minimum, from 0:06 to 0:18" in text2
    assert "in steps (section 6)" in " ".join(steps.valves(f2))


def test_time_formats():
    assert steps.hm(1.3333) == "1:20" and steps.hm(None) == "—" and steps.hm(0.05) == "0:03"
    assert steps.dur(0.75) == "45 min" and steps.dur(2.55) == "2 h 33 min"
    assert steps.names([]) == "" and steps.names(["a"]) == "a"
    assert steps.names(["a", "b", "c"]) == "a, b and c"


@pytest.fixture(scope="module")
def pdf_text(facts, tmp_path_factory) -> str:
    if not shutil.which("pdftotext"):
        pytest.skip("poppler-utils (pdftotext) not installed")
    out = tmp_path_factory.mktemp("pdf") / "procedure.pdf"
    write_procedure_pdf(out, facts, revision="3", sources=[("petrel.toml", "ab" * 32)],
                        printed_at=PRINTED)
    assert out.read_bytes().startswith(b"%PDF")
    text = subprocess.run(["pdftotext", str(out), "-"], capture_output=True, text=True,
                          check=True).stdout
    return " ".join(text.split())


def hm(h: float) -> str:
    m = round(h * 60)
    return f"{m // 60}:{m % 60:02d}"


@needs_poppler
def test_pdf_has_every_section_in_order(pdf_text):
    at = [pdf_text.find(f"{i}. {s}") for i, s in enumerate(SECTIONS, 1)]
    assert all(x >= 0 for x in at), [s for s, x in zip(SECTIONS, at, strict=True) if x < 0]
    assert at == sorted(at)
    for s in ("Before starting", "Temperature and viscosity", "Moving the valves", "Monitoring",
              "Completion and recording", "The fuel system", "How long a changeover takes",
              "The engine's limits", "Approval and revisions"):
        assert s in SECTIONS


@needs_poppler
def test_pdf_has_the_checks_and_the_record_items(pdf_text):
    t = pdf_text
    for phrase in ("Compatibility:", "Soundings: sound mgo_service and mgo_storage",
                   "Heaters and cooler:", "Alarms:", "Manning:", "Position and time:",
                   "clear of confined or congested waters", "regulation 14.6",
                   "the date and time (UTC and ship's time)", "position (latitude and longitude)",
                   "the volume of compliant fuel in each tank", "changeover log complete",
                   "commenced", "changeover log back"):
        assert phrase in t, phrase


@needs_poppler
def test_pdf_has_the_cautions(pdf_text):
    for phrase in ("advisory", "engine and boiler makers' instructions",
                   "safety management system come first", "loss of propulsion or power",
                   "confined or congested waters", "keep the engine room manned",
                   "check that the fuels are compatible", "MARPOL Annex VI and national law",
                   "This ship is fictional"):
        assert phrase.lower() in pdf_text.lower(), phrase


@needs_poppler
def test_pdf_has_the_ships_figures(pdf_text, facts):
    t = pdf_text
    assert "MV Test Petrel" in t and "9999993" in t and "page 1 of" in t
    for tank in facts.tanks:
        assert tank.name in t and f"{tank.capacity_m3:.1f}" in t
    for c in facts.circuits:
        assert f"Circuit {c.name}" in t
        for v in c.volumes:
            assert v.name in t and f"{v.volume_m3:.3f}" in t
        assert f"{c.total_m3:.3f}" in t
        for r in c.rows:
            assert hm(r.time_to_limit_h) in t and hm(r.time_to_target_h) in t
            assert hm(r.start_before_h) in t
    assert "30 m × 40 mm bore" in t
    # the engine's limits from [inlet]
    for s in ("14 cSt", "2.5 cSt", "18 cSt", "1.5 °C/min", "38 °C", "150 °C"):
        assert s in t, s
    # the load table and the sulphur figures
    assert "85 (ref.)" in t and "0.10 % m/m" in t and "0.090 %" in t
    assert "Points for the chief engineer" in t


@needs_poppler
def test_pdf_has_the_signature_and_revision_lines(pdf_text):
    t = pdf_text
    assert "Prepared by the chief engineer" in t and "Approved by the master" in t
    assert t.count("Signature") >= 2 and t.count("Date") >= 2
    assert "3, printed 2027-05-28 08:30" in t
    assert "revision 3" in t and "petrel.toml (SHA-256 abababababab)" in t


def run(*args: str, cwd: Path = ROOT) -> subprocess.CompletedProcess:
    return subprocess.run([sys.executable, "-m", "planner", "procedure", *args], cwd=cwd,
                          capture_output=True, text=True, timeout=300)


def test_command_writes_the_pdf(ship_file, tmp_path):
    out = tmp_path / "proc" / "procedure.pdf"
    r = run(str(ship_file), "--pdf", str(out), "--revision", "2")
    assert r.returncode == 0, r.stderr
    assert out.read_bytes().startswith(b"%PDF")
    assert f"wrote {out}" in r.stdout and "revision 2" in r.stdout
    assert [p.name for p in out.parent.iterdir()] == ["procedure.pdf"]   # no temporary left


def test_command_json_and_voyage_file(ship_file, tmp_path):
    voyage = tmp_path / "voyage.toml"
    voyage.write_text(f"""
[voyage]
name = "TP 1"
ship = "{ship_file.as_posix()}"
route = "{(SAMPLE / 'aldmere_to_skarvik.csv').as_posix()}"
areas = ["{(SAMPLE / 'corran_sea.geojson').as_posix()}"]
depart = "2027-05-30T06:00+12:00"

[[fuel]]
name = "mgo"
grade = "DMA"
sulphur_pct = 0.05
density_kg_m3 = 850.0
viscosity_cst = 3.5
viscosity_ref_c = 40.0

[tank.mgo_service]
fuel = "mgo"
volume_m3 = 12.0
temperature_c = 35.0

[margins]
time_before_boundary_h = 2.0
sulphur_target_fraction = 0.8
""", encoding="utf-8")
    r = run(str(voyage), "--json")
    assert r.returncode == 0, r.stderr
    doc = json.loads(r.stdout)
    assert doc["voyage"] == "TP 1" and doc["margin_h"] == 2.0
    assert math.isclose(doc["target_pct"], 0.08)
    mgo = next(f for f in doc["fuels"] if f["name"] == "mgo")
    assert mgo["sulphur_pct"] == 0.05
    tank = next(t for t in doc["tanks"] if t["name"] == "mgo_service")
    assert 11.5 < tank["volume_m3"] < 12.0          # 12.0 m³ at 35 °C, corrected to 15 °C
    assert [s["file"] for s in doc["sources"]] == ["voyage.toml", "petrel.toml"]


BAD = {
    "toml": "[ship\nname = 'x'\n",
    "value": SHIP.replace('volume_m3 = 0.5', 'volume_m3 = -0.5'),
    "reference": SHIP.replace('tanks = ["vlsfo_service", "mgo_service"]\nconsumers = ["dg3"]',
                              'tanks = ["vlsfo_service", "hfo_day"]\nconsumers = ["dg3"]'),
}


@pytest.mark.parametrize("fault", sorted(BAD))
def test_bad_ship_file_exit_2_one_line_nothing_written(fault, tmp_path):
    ship = tmp_path / "bad.toml"
    ship.write_text(BAD[fault], encoding="utf-8")
    out = tmp_path / "procedure.pdf"
    r = run(str(ship), "--pdf", str(out))
    assert r.returncode == 2, (r.stdout, r.stderr)
    lines = r.stderr.strip().splitlines()
    assert len(lines) == 1 and "bad.toml" in lines[0], r.stderr
    assert not out.exists() and list(tmp_path.iterdir()) == [ship]


@pytest.mark.parametrize("args", [["--limit", "0"], ["--target-pct", "0.2"], []])
def test_bad_options_exit_2(args, ship_file, tmp_path):
    out = tmp_path / "procedure.pdf"
    r = run(str(ship_file), *([] if not args else ["--pdf", str(out)]), *args)
    assert r.returncode == 2 and len(r.stderr.strip().splitlines()) == 1, r.stderr
    assert not out.exists()


def test_missing_ship_file(tmp_path):
    out = tmp_path / "p.pdf"
    r = run(str(tmp_path / "nope.toml"), "--pdf", str(out))
    assert r.returncode == 2 and len(r.stderr.strip().splitlines()) == 1
    assert not out.exists()
