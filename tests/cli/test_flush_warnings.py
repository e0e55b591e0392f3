"""``changeover flush`` shows the ship file's unusual values and the flash-point caution.

- unusual input: a 0.065 mm bore is kept with a warning (the ship file's plausible
  ranges, planner.ship.plausible; README "What input is refused");
- flash point: the sample ship's changeover to mgo holds gas oil of 60 °C flash point
  (ISO 8217 minimum for DMA, [ISO-8217] [M]) above 50 °C in the heated volumes (SOLAS
  II-2 reg. 4.2.2.5's 10 °C margin, [SOLAS-1974] [M]); the fix is the plan's own text,
  and the lead before the switch is the hand calculation (T₁₃ − T₂₀) / (2 °C/min) on
  the ASTM D341 line of vlsfo ([ASTM-D341]); a delivery-note flash point of 150 °C
  (limit 140 °C, above every heater's 130 °C set point here) clears it.
Text and ``--json`` (new keys ``warnings`` and ``warning_kinds``; docs/json-contract.md).
"""

from __future__ import annotations

import json
import subprocess
import sys

from planner.ship.ship_file import load_ship
from tests.helpers.paths import ROOT

SHIP = ROOT / "areas_sample" / "ship.toml"


def run(*args: str) -> str:
    r = subprocess.run([sys.executable, "-m", "planner", "flush", *args], cwd=ROOT,
                       capture_output=True, text=True, timeout=180,
                       env={"COLUMNS": "2000", "PATH": "/usr/bin:/bin"})
    assert r.returncode == 0, r.stderr
    return r.stdout


def _ship(tmp_path, *changes: tuple[str, str]):
    text = SHIP.read_text(encoding="utf-8")
    for old, new in changes:
        assert old in text, old
        text = text.replace(old, new, 1)
    p = tmp_path / "ship.toml"
    p.write_text(text, encoding="utf-8")
    return p


def test_sample_flush_warns_of_the_flash_point_with_a_concrete_fix():
    doc = json.loads(run(str(SHIP), "--json"))
    assert doc["warning_kinds"] == ["flash_point", "flash_point"]
    main, boiler = doc["warnings"]
    vlsfo = load_ship(SHIP).fuels["vlsfo"]
    t13, t20 = (float(vlsfo.temperature_for_viscosity(v)) for v in (13.0, 20.0))
    assert main.startswith("Circuit main (main_engine, dg1, dg2), changeover to mgo:")
    assert f"from {t13:.0f} °C to {t20:.0f} °C" in main
    assert f"starting {(t13 - t20) / 2.0:.0f} min before the switch" in main
    assert boiler.startswith("Circuit boiler (aux_boiler)")
    assert "Stop the burner for the switch" in boiler
    text = " ".join(run(str(SHIP)).split())
    assert "Warning: Circuit main (main_engine, dg1, dg2), changeover to mgo" in text
    assert "Warning: Circuit boiler (aux_boiler)" in text


def test_unusual_ship_value_is_shown_and_flash_point_from_the_delivery_note(tmp_path):
    p = _ship(tmp_path, ("bore_mm = 40.0", "bore_mm = 0.065"),
              ("viscosity_ref_c = 40.0\n", "viscosity_ref_c = 40.0\nflash_point_c = 150.0\n"))
    doc = json.loads(run(str(p), "--json"))
    assert doc["warning_kinds"] == ["unusual_input"]
    [w] = doc["warnings"]
    assert w.startswith(f"{p}: volumes.supply_line.bore_mm = ") and "usual 6-600 mm" in w
    text = " ".join(run(str(p)).split())
    assert f"Warning: {p}: volumes.supply_line.bore_mm" in text
    assert "flash point" not in text
    assert doc["circuits"]           # the old keys are still there
