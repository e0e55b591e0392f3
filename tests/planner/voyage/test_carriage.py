"""The carriage ban: fuel above 0.50 % m/m held on board a ship that may not burn it.

The rule ([MEPC-305] [P]; MARPOL Annex VI regulation 14.1.3, the number from memory):
since 2020-03-01 no fuel above 0.50 % for use on board without an approved equivalent
such as a scrubber. ``carriage_ban.toml`` (fictional, tests/data/voyages) holds 40 m³ of
a 2.60 % fuel in a storage tank on a ship without a scrubber; the sample voyage
(areas_sample/, fictional) holds nothing above 0.45 %.
"""

from __future__ import annotations

from dataclasses import replace
from datetime import UTC, date, datetime

import pytest

from planner.ship.scrubbers import Scrubber
from planner.voyage.carriage import (
    CARRIAGE_LIMIT_PCT,
    CarriedFuel,
    ban_applies,
    carriage_limit_pct,
    carriage_warnings,
    carried_over_limit,
)
from planner.voyage.onboard import ship_for_voyage
from planner.voyage.report import plan_json
from planner.voyage.run import build_plan
from planner.voyage.voyage_file import load_voyage
from tests.helpers.paths import ROOT
from tests.helpers.plan import VOYAGES

BAN = VOYAGES / "carriage_ban.toml"
SAMPLE = ROOT / "areas_sample" / "voyage.toml"


@pytest.fixture(scope="module")
def ship():
    return ship_for_voyage(load_voyage(BAN))


def _scrubbed(system, max_sulphur_pct: float, names=("egcs1",)):
    return replace(system, scrubbers={n: Scrubber(n, ("main_engine",), ("open",),
                                                  max_sulphur_pct) for n in names})


def test_the_ban_dates():
    # [MEPC-305]: in force from 2020-03-01 (UTC day)
    assert not ban_applies(date(2020, 2, 29)) and ban_applies(date(2020, 3, 1))
    assert ban_applies(datetime(2020, 3, 1, 0, 30, tzinfo=UTC))
    assert not ban_applies(datetime.fromisoformat("2020-03-01T00:30+01:00"))  # 2020-02-29Z


def test_without_a_scrubber_fuel_above_half_a_percent_is_warned(ship):
    assert carriage_limit_pct(ship) == CARRIAGE_LIMIT_PCT == 0.50  # [MEPC-305]
    found = carried_over_limit(ship)
    assert [(c.fuel, c.sulphur_pct, c.tanks) for c in found] == [
        ("hsfo", 2.60, (("hsfo_storage", 40.0),))]  # sounded at 15 °C: no correction
    w = carriage_warnings(ship, datetime(2030, 3, 10, 6, tzinfo=UTC))
    assert [x.kind for x in w] == ["carriage_ban"]
    text = w[0].text
    for part in ("hsfo", "2.60 % m/m", "hsfo_storage", "40.0 m³", "0.50 % m/m",
                 "regulation 14.1.3", "MEPC.305(73)", "no exhaust gas cleaning system"):
        assert part in text, part


def test_before_the_ban_no_warning(ship):
    assert carriage_warnings(ship, date(2020, 2, 29)) == []
    assert carriage_warnings(ship, datetime(2019, 6, 1, tzinfo=UTC)) == []


def test_a_scrubber_approved_for_the_fuel_silences_it(ship):
    assert carriage_warnings(_scrubbed(ship, 3.50), date(2030, 1, 1)) == []
    assert carriage_limit_pct(_scrubbed(ship, 3.50)) == 3.50


def test_fuel_above_what_the_scrubber_is_approved_for_is_warned(ship):
    w = carriage_warnings(_scrubbed(ship, 1.50), date(2030, 1, 1))
    assert len(w) == 1
    assert "above the 1.50 % m/m the ship's exhaust gas cleaning system (egcs1) is approved" \
        in w[0].text
    two = carriage_warnings(_scrubbed(ship, 1.50, ("a", "b")), date(2030, 1, 1))
    assert "systems (a, b) are approved" in two[0].text


def test_a_scrubber_approved_below_half_a_percent_does_not_lower_the_limit(ship):
    assert carriage_limit_pct(_scrubbed(ship, 0.10)) == 0.50


def test_only_fuel_a_tank_holds(ship):
    empty = ship.with_tank_content("hsfo_storage", {"hfo": 10.0})  # the fuel listed only
    assert carriage_warnings(empty, date(2030, 1, 1)) == []
    listed = carried_over_limit(empty, held_only=False)
    assert [(c.fuel, c.tanks) for c in listed] == [("hsfo", ())]
    assert "no tank holds it now" in listed[0].text()
    mixed = ship.with_tank_content("hsfo_storage", {"hfo": 10.0, "hsfo": 0.5})
    assert [c.tanks for c in carried_over_limit(mixed)] == [(("hsfo_storage", 0.5),)]


def test_carried_fuel_checks_itself():
    with pytest.raises(ValueError, match="not above"):
        CarriedFuel("mgo", 0.05, (), 0.50)


def test_the_plan_json_has_the_warning():
    doc = plan_json(build_plan(BAN))
    ban = [w for w in doc["warnings"] if w.startswith("Carriage ban:")]
    assert len(ban) == 1 and "hsfo (2.60 % m/m sulphur)" in ban[0]
    # the fuel is carried, not burnt: no stretch burns it
    assert {s["fuel"] for s in doc["stretches"]} == {"hfo", "mgo"}


def test_no_warning_for_the_sample_voyage():
    plan = build_plan(SAMPLE)
    assert not [w for w in plan.warnings if w.kind == "carriage_ban"]
    assert max(f.sulphur_pct for f in plan.system.fuels.values()) <= 0.50
