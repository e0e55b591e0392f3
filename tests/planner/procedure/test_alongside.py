"""The written procedure states how long a changeover takes alongside (main engine stopped).

Fixture (fictional): ``tests/data/voyages/ship_t1g.toml``, one well-stirred volume V =
1.0 m³ feeding a main engine and a 1500 kW generator at 200 g/kWh; both fuels 880 kg/m³
with Q_net 40 MJ/kg. Alongside only the generator burns, so by the CSTR washout
([LEVENSPIEL-1999] [D]) the time to the target S_t is T = V/q·ln((S₀ − S₁)/(S_t − S₁)),
q = 1500 × 200 / 10⁶ t/h × 42.7/40 ([ISO-3046] [M], from memory) / 0.880 t/m³.
"""

from __future__ import annotations

import math

import pytest

from planner.procedure import steps
from planner.procedure.facts import gather
from planner.ship.ship_file import load_ship
from tests.helpers.plan import VOYAGES


def test_the_changeover_alongside_is_the_washout_at_the_generator_draw():
    facts = gather(load_ship(VOYAGES / "ship_t1g.toml"), limit_pct=0.10)
    (c,) = facts.circuits
    q = 1500.0 * 200.0 / 1e6 * 42.7 / 40.0 / 0.880
    expected_h = 1.0 / q * math.log((0.40 - 0.05) / (0.09 - 0.05))
    assert c.alongside.time_to_target_h == pytest.approx(expected_h, abs=2.0 / 3600.0)
    assert c.alongside.start_before_h == pytest.approx(expected_h + facts.margin_h, abs=2e-3)
    line = [x for x in steps.checks(facts) if x.startswith("Alongside:")]
    assert line and steps.dur(expected_h) in line[0]


def test_a_circuit_that_burns_nothing_alongside_says_so():
    facts = gather(load_ship(VOYAGES / "ship_t1.toml"), limit_pct=0.10)  # main engine only
    assert facts.circuits[0].alongside is None
    (line,) = [x for x in steps.checks(facts) if x.startswith("Alongside:")]
    assert "circuit main cannot be flushed" in line
