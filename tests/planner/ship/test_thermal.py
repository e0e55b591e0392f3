"""Inlet temperature and viscosity path during a changeover.

References: ASTM D341 ([ASTM-D341] [P]) written out here independently of
planner.fuels; the 2 °C/min rate limit ([TC-SSB-04-2015] [S], common
practice) as plain arithmetic; the 2 cSt minimum at the engine inlet
([ENGINE-GUIDANCE] [P]).
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from planner.fuels import Fuel
from planner.ship.thermal import InletWindow, inlet_path, lead_needed_h

HFO = Fuel(name="HFO", grade="RMG 380", sulphur_pct=0.48, density_kg_m3=991.0,
           viscosity_cst=380.0, viscosity_ref_c=50.0, viscosity2_cst=30.0,
           viscosity2_ref_c=100.0)
MGO = Fuel(name="MGO", grade="DMA", sulphur_pct=0.05, density_kg_m3=845.0, viscosity_cst=3.0,
           viscosity_ref_c=40.0, viscosity2_cst=1.2, viscosity2_ref_c=100.0)


def d341_temperature_c(nu1, t1, nu2, t2, nu):
    """ASTM D341 through two points, solved for the temperature of ``nu`` (independent)."""
    def w(v):
        z = v + 0.7 + math.exp(-1.47 - 1.84 * v - 0.51 * v * v)
        return math.log10(math.log10(z))
    l1, l2 = math.log10(t1 + 273.15), math.log10(t2 + 273.15)
    b = (w(nu1) - w(nu2)) / (l2 - l1)
    a = w(nu1) + b * l1
    return 10 ** ((a - w(nu)) / b) - 273.15


def test_residual_is_heated_to_the_target_viscosity():
    t = np.linspace(0.0, 1.0, 61)
    w = np.vstack([np.ones_like(t), np.zeros_like(t)])
    path = inlet_path([HFO, MGO], w, t, InletWindow(target_cst=13.0))
    want = d341_temperature_c(380.0, 50.0, 30.0, 100.0, 13.0)  # ASTM D341
    assert path.temperature_c == pytest.approx(np.full_like(t, want), abs=1e-6)
    assert path.viscosity_cst == pytest.approx(np.full_like(t, 13.0), rel=1e-9)
    assert path.outside() == []


def test_temperature_falls_no_faster_than_the_rate():
    t = np.linspace(0.0, 2.0, 2 * 600 + 1)  # 12 s steps
    w = np.vstack([(t <= 0).astype(float), (t > 0).astype(float)])  # instant switch
    win = InletWindow(max_rate_c_per_min=2.0, supply_temperature_c=40.0)
    path = inlet_path([HFO, MGO], w, t, win)
    start = d341_temperature_c(380.0, 50.0, 30.0, 100.0, 13.0)
    slope = np.diff(path.temperature_c) / np.diff(t * 60.0)
    assert slope.min() >= -2.0 - 1e-9
    # reaches the distillate's supply temperature after (start - 40)/2 minutes (arithmetic)
    reached = t[np.argmax(path.temperature_c <= 40.0 + 1e-9)] * 60.0
    assert reached == pytest.approx((start - 40.0) / 2.0, abs=0.2 + 1e-9)
    # hot distillate is far below 2 cSt: the window is broken, and reported
    assert path.min_viscosity_cst < 2.0
    spans = path.outside()
    assert spans and spans[0][2] == "below"
    # the slowest switch can't be helped by pre-cooling the HFO within its own window
    assert lead_needed_h([HFO, MGO], w, t, win) is None


def test_gradual_washout_stays_inside_the_window():
    t = np.linspace(0.0, 4.0, 1441)
    x = np.exp(-t / 0.6)
    path = inlet_path([HFO, MGO], np.vstack([x, 1 - x]), t, InletWindow())
    assert path.outside() == []
    assert 2.0 <= path.min_viscosity_cst <= path.max_viscosity_cst <= 20.0


def test_lead_is_the_shortest_that_works():
    vlsfo = Fuel(name="VLSFO", grade="RMD 80", sulphur_pct=0.47, density_kg_m3=930.0,
                 viscosity_cst=60.0, viscosity_ref_c=50.0, viscosity2_cst=12.0,
                 viscosity2_ref_c=100.0)
    t = np.linspace(0.0, 3.0, 1801)
    x = np.exp(-t / 0.08)
    w = np.vstack([x, 1 - x])
    win = InletWindow(min_cst=2.0, max_cst=20.0, target_cst=13.0)
    lead = lead_needed_h([vlsfo, MGO], w, t, win)
    assert lead is not None and lead > 0.0
    grid = np.arange(0.0, 3.0 + 1 / 60, 1 / 60)
    wg = np.array([np.interp(grid, t, wi) for wi in w])
    assert inlet_path([vlsfo, MGO], wg, grid, win, lead).outside() == []
    earlier = lead - 1.0 / 60.0
    assert earlier <= 0 or inlet_path([vlsfo, MGO], wg, grid, win, earlier).outside() != []


def test_window_is_checked():
    with pytest.raises(ValueError):
        InletWindow(min_cst=5.0, target_cst=3.0)
    with pytest.raises(ValueError):
        InletWindow(max_rate_c_per_min=0.0)
