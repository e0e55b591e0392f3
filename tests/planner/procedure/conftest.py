"""Fixtures of the procedure tests: the test ship (:mod:`tests.planner.procedure.petrel`)
written to a file, loaded, and its procedure facts for a 0.10 % limit and a 1.5 h margin."""

from __future__ import annotations

from pathlib import Path

import pytest

from planner.procedure.facts import ProcedureFacts, gather
from planner.ship.ship_file import load_ship
from planner.ship.system import FuelSystem
from tests.planner.procedure.petrel import SHIP


@pytest.fixture(scope="module")
def ship_file(tmp_path_factory) -> Path:
    path = tmp_path_factory.mktemp("ship") / "petrel.toml"
    path.write_text(SHIP, encoding="utf-8")
    return path


@pytest.fixture(scope="module")
def system(ship_file: Path) -> FuelSystem:
    return load_ship(ship_file)


@pytest.fixture(scope="module")
def facts(system: FuelSystem) -> ProcedureFacts:
    return gather(system, limit_pct=0.10, margin_h=1.5)
