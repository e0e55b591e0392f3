"""The SO₂/CO₂ emission ratio on each stretch of a plan.

Outside figures: [MEPC-340] Table 1 (from memory) for the limits; the uncleaned ratio
by hand, 10⁴ × (S/32.06)/(C/12.011) with [IUPAC-2021] molar masses [D]; the typical
carbon of heavy fuel oil and gas oil, 84.93 and 87.44 % ([MEPC-308], from memory).
Voyages: the sample (areas_sample/, fictional) and carriage_ban.toml (fictional), whose
mgo has 86.9 % carbon on its delivery note.
"""

from __future__ import annotations

import pytest

from planner.fuels import Fuel
from planner.voyage.emission_ratio import (
    STOICHIOMETRIC_SOURCE,
    TABLE_SOURCE,
    StretchRatio,
    plan_ratios,
    stretch_ratio,
)
from planner.voyage.report import plan_json
from planner.voyage.run import build_plan
from tests.helpers.paths import ROOT
from tests.helpers.plan import VOYAGES

TABLE_1 = {0.10: 4.3, 0.50: 21.7}  # [MEPC-340] Table 1, from memory


def by_hand(sulphur_pct: float, carbon_pct: float) -> float:
    return 1e4 * (sulphur_pct / 32.06) / (carbon_pct / 12.011)  # [IUPAC-2021], [D]


@pytest.fixture(scope="module")
def sample():
    plan = build_plan(ROOT / "areas_sample" / "voyage.toml")
    return plan, plan_json(plan)


def test_every_stretch_has_the_ratio_keys(sample):
    plan, doc = sample
    rows = doc["stretches"]
    assert len(rows) == len(plan.choices) > 2
    for row in rows:
        assert row["ratio_limit"] == TABLE_1[row["limit_pct"]]
        assert row["ratio_limit_source"] == TABLE_SOURCE
        fuel = plan.system.fuels[row["fuel"]]
        carbon = {"vlsfo": 84.93, "mgo": 87.44}[row["fuel"]]  # RMG 380 / DMA [MEPC-308]
        assert row["carbon_pct"] == carbon
        assert "from memory" in row["carbon_source"]
        assert row["uncleaned_ratio"] == pytest.approx(by_hand(fuel.sulphur_pct, carbon),
                                                       rel=1e-12)
        assert row["so2_removal_needed_pct"] == 0.0  # every fuel within its stretch's limit


def test_the_fuel_is_the_one_the_report_says_is_burnt(sample):
    plan, doc = sample
    ratios = plan_ratios(plan.choices, plan.runs)
    assert [r.fuel for r in ratios] == [row["fuel"] for row in doc["stretches"]]
    # the sample stays on mgo between two areas: a 0.50 % stretch burning mgo
    assert any(r.limit_pct == 0.50 and r.fuel == "mgo" for r in ratios)


def test_carbon_from_the_delivery_note():
    doc = plan_json(build_plan(VOYAGES / "carriage_ban.toml"))
    mgo = [r for r in doc["stretches"] if r["fuel"] == "mgo"]
    assert mgo and all(r["carbon_pct"] == 86.9 and r["carbon_source"] == "delivery note"
                       for r in mgo)
    assert mgo[0]["uncleaned_ratio"] == pytest.approx(by_hand(0.05, 86.9), rel=1e-12)


def _hfo(sulphur_pct: float) -> Fuel:
    return Fuel(name="hfo", grade="RMG 380", sulphur_pct=sulphur_pct, density_kg_m3=991.0,
                viscosity_cst=380.0, viscosity_ref_c=50.0)


def test_a_fuel_above_the_limit_needs_removal():
    r = stretch_ratio(0.10, _hfo(2.60))
    raw = by_hand(2.60, 84.93)
    assert r.uncleaned_ratio == pytest.approx(raw, rel=1e-12)
    assert r.removal_needed == pytest.approx(1 - 4.3 / raw, rel=1e-12)
    assert r.json()["so2_removal_needed_pct"] == pytest.approx(100 * (1 - 4.3 / raw))
    assert f"{r.removal_needed * 100:.1f}" == "96.3"


def test_a_limit_not_in_the_table_is_stated_stoichiometric():
    r = stretch_ratio(0.20, _hfo(0.15))
    assert r.ratio_limit_source == STOICHIOMETRIC_SOURCE
    assert r.ratio_limit == pytest.approx(by_hand(0.20, 86.45), rel=1e-12)
    assert r.removal_needed == 0.0


def test_a_fuel_within_the_limit_needs_none_even_if_its_carbon_is_low():
    # 0.10 % fuel at heavy-fuel carbon: uncleaned 4.41 > 4.3, yet legal by its sulphur
    r = stretch_ratio(0.10, _hfo(0.10))
    assert r.uncleaned_ratio > 4.3 and r.removal_needed == 0.0


def test_stretch_ratio_checks_itself():
    with pytest.raises(ValueError):
        StretchRatio(0.1, 4.3, TABLE_SOURCE, "f", 1.0, 85.0, "x", 40.0, 1.5)


def test_no_scrubber_no_served_figures(sample):
    """The first sample's ship has no scrubber: every stretch row has an empty list."""
    _, doc = sample
    assert all(row["scrubbed"] == [] for row in doc["stretches"])


def test_a_served_circuit_has_the_figures_of_its_own_fuel():
    """scrub_far.toml (fictional): the main circuit burns 2.60 % hsfo (RMG 380, no carbon on
    the note: 84.93 % [MEPC-308], from memory) on the scrubber everywhere, the boiler its
    own compliant fuel. Each stretch lists main's figures by hand against its limit
    ([MEPC-340] Table 1: 4.3 for 0.10 %, 21.7 for 0.50 %, from memory)."""
    from tests.planner.voyage.test_scrubbing import plan_of

    plan, doc = plan_of()
    raw = by_hand(2.60, 84.93)
    for row in doc["stretches"]:
        (x,) = row["scrubbed"]
        assert (x["circuit"], x["scrubbers"], x["fuel"], x["sulphur_pct"]) == (
            "main", ["egcs"], "hsfo", 2.60)
        assert x["carbon_pct"] == 84.93 and "from memory" in x["carbon_source"]
        assert x["uncleaned_ratio"] == pytest.approx(raw, rel=1e-12)
        assert x["so2_removal_needed_pct"] == pytest.approx(
            100 * (1 - TABLE_1[row["limit_pct"]] / raw), rel=1e-12)
        # the row's own keys still describe the main fuel burnt (the boiler's runs)
        fuel = plan.system.fuels[row["fuel"]]
        assert row["fuel"] != "hsfo"
        assert row["uncleaned_ratio"] == pytest.approx(by_hand(fuel.sulphur_pct, fuel.carbon),
                                                       rel=1e-12)
    inside = [r for r in doc["stretches"] if r["limit_pct"] == 0.10]
    assert inside and all(f"{r['scrubbed'][0]['so2_removal_needed_pct']:.1f}" == "96.3"
                          for r in inside)


def test_a_stretch_without_a_span_lists_none():
    """A span that only touches a stretch at its end is not on it; a stretch with no span
    has an empty list."""
    from planner.voyage.emission_ratio import served_ratios
    from planner.voyage.scrubber_events import ScrubberSpan
    from tests.planner.voyage.test_scrubbing import plan_of

    plan, _ = plan_of()
    first = plan.choices[0].stretch
    touch = ScrubberSpan("egcs", ("main",), "hsfo", "hfo", 0.5, "open", first.to_m,
                         first.to_m + 10.0, 0.0, 1.0)
    got = served_ratios(plan.choices, [touch], plan.system.fuels, {})
    assert got[0] == [] and [x.circuit for x in got[1]] == ["main"]
    assert all(g == [] for g in got[2:])
