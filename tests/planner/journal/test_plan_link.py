"""Prefill from a plan: the plan's own changeover numbers, one row per circuit."""

from __future__ import annotations

import json

import pytest

from geo.errors import InputError
from planner.journal.entries import BACK_COMMENCED, BACK_COMPLETED, STARTED
from planner.journal.plan_link import planned_for


def _row(number, circuit, direction, start, done):
    return {"number": number, "area": "Test ECA", "circuit": circuit, "direction": direction,
            "start_utc": start, "start_lat": -39.5, "start_lon": 170.25,
            "compliant_utc": done if direction == "to_compliant" else None,
            "complete_utc": done, "boundary_utc": "2027-05-30T07:20:00Z",
            "boundary_lat": -39.9, "boundary_lon": 170.0, "margin_h": 1.0}


@pytest.fixture
def plan(tmp_path):
    p = tmp_path / "plan.json"
    p.write_text(json.dumps({"changeovers": [
        _row(1, "main", "to_compliant", "2027-05-30T04:47:00Z", "2027-05-30T06:20:00Z"),
        _row(1, "boiler", "to_compliant", "2027-05-30T05:57:00Z", "2027-05-30T06:20:00Z"),
        _row(2, "main", "to_regular", "2027-05-30T17:18:00Z", "2027-05-30T18:32:00Z"),
    ]}))
    return p


def test_number_is_the_plans_changeover_and_circuit_picks_the_row(plan):
    main = planned_for(STARTED, plan, 1)
    boiler = planned_for(STARTED, plan, 1, "boiler")
    assert (main.circuit, main.time_utc.isoformat()) == ("main", "2027-05-30T04:47:00+00:00")
    assert (boiler.circuit, boiler.time_utc.isoformat()) == ("boiler",
                                                             "2027-05-30T05:57:00+00:00")
    back = planned_for(BACK_COMMENCED, plan, 2)
    assert back.direction == "to_regular"


def test_switch_back_completion_takes_the_complete_time(plan):
    done = planned_for(BACK_COMPLETED, plan, 2)
    assert done.time_utc.isoformat() == "2027-05-30T18:32:00+00:00"


def test_unknown_number_or_circuit_is_refused(plan):
    with pytest.raises(InputError, match="1 to 2"):
        planned_for(STARTED, plan, 3)
    with pytest.raises(InputError, match="boiler"):
        planned_for(STARTED, plan, 1, "aux")
