"""Flash point: the delivery note's figure or the ISO 8217 grade minimum (issue 10 item 8).

ISO 8217 minima, from memory ([ISO-8217] [M]): 60 °C for DMA, DMZ, DMB and every RM
grade, 43 °C for DMX only.
"""

import pytest

from planner.fuels import Fuel, grade_min_flash_point_c


@pytest.mark.parametrize(("grade", "minimum_c"), [
    ("DMX", 43.0), ("dmx ", 43.0),                      # [ISO-8217] [M], from memory
    ("DMA", 60.0), ("DMZ", 60.0), ("DMB", 60.0),        # [ISO-8217] [M], from memory
    ("RMG 380", 60.0), ("RMK 700", 60.0), ("RME 180", 60.0),
    ("MGO", 60.0), ("VLSFO", 60.0),                     # trade names: every grade but DMX
])
def test_grade_minimum(grade, minimum_c):
    assert grade_min_flash_point_c(grade) == minimum_c


def _fuel(**kw):
    base = dict(name="mgo", grade="DMA", sulphur_pct=0.08, density_kg_m3=850.0,
                viscosity_cst=3.5, viscosity_ref_c=40.0)
    return Fuel(**{**base, **kw})


def test_delivery_note_value_wins_and_the_source_is_named():
    f = _fuel(flash_point_c=68)
    assert f.flash_point == 68.0 and f.flash_point_source == "delivery note"
    g = _fuel(grade="DMX")
    assert g.flash_point == 43.0 and g.flash_point_source == "ISO 8217 minimum for DMX, from memory"


@pytest.mark.parametrize("bad", [float("nan"), -5.0, 301.0, "60", True])
def test_bad_flash_points_are_refused(bad):
    with pytest.raises(ValueError, match="flash_point_c"):
        _fuel(flash_point_c=bad)
