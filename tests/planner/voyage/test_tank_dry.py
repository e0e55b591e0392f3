"""A small gas-oil service tank: the plan is made, with a warning giving when it runs dry.

The sample voyage (areas_sample/, fictional) with 9 m³ in ``mgo_service`` instead of 26 m³:
the main circuit's flush (about 1.5 h) is complete long before the tank, which feeds the
main engine and both generators at about 1.8 m³/h, runs dry (hand figure:
9 m³ / 1.8 m³/h ≈ 5 h, plain mass balance [LEVENSPIEL-1999] [D]). Before the flush stopped
once settled, every flush ran at least 6 h and this plan was refused. The warning is given
when the tank runs dry within 8 h of the switch, the least a service tank must hold at MCR
([SOLAS-1974] II-1/26.11 [P]); the sample's 26 m³ last about 15 h, so its plan is silent.
"""

from __future__ import annotations

import re
import shutil

from planner.voyage.run import build_plan
from tests.helpers.paths import ROOT


def small_service_tank(tmp_path, volume_m3: float):
    shutil.copytree(ROOT / "areas_sample", tmp_path / "sample")
    voyage = tmp_path / "sample" / "voyage.toml"
    text = voyage.read_text()
    block = '[tank.mgo_service]\nfuel = "mgo"\nvolume_m3 = 26.0'
    assert block in text
    voyage.write_text(text.replace(block, block.replace("26.0", f"{volume_m3}")))
    return voyage


def test_a_small_service_tank_is_planned_with_a_dry_warning(tmp_path):
    plan = build_plan(small_service_tank(tmp_path, 9.0))
    dry = [w for w in plan.warnings if w.kind == "tank_dry"]
    assert dry, [w.text for w in plan.warnings]
    main = [w.text for w in dry if w.text.startswith("Circuit main:")]
    assert main and "mgo_service" in main[0]
    hours = float(re.search(r"(\d+\.\d) h after the valve", main[0]).group(1))
    flush_min = float(re.search(r"complete (\d+) min after", main[0]).group(1))
    assert 3.5 < hours < 6.0  # 9 m³ at about 1.8 m³/h, less what the flush took
    assert flush_min / 60.0 < hours


def test_the_sample_plan_has_no_dry_warning():
    plan = build_plan(ROOT / "areas_sample" / "voyage.toml")
    assert not [w for w in plan.warnings if w.kind == "tank_dry"]
