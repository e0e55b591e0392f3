"""Why the plan relies on a scrubber nowhere: the load range, an outage, the zones.

The scrubber sample (``areas_sample/egcs_voyage.toml``, fictional) with the scrubber's
``max_load_pct`` typed as the fraction 1.1 (meant 110 %): the main engine runs at 85 % MCR
at 14 kn (its reference point in the ship file) and the generators at 450/750 = 60 % of
their rating, every one above 1.1 %, so the scrubber is available on no leg. The plan must
then say so (the load range), and carry the ship file's ``unusual_input`` warning, as it
does for ``max_sulphur_pct = 0.035``. The synthetic availability pieces below stand for
the other reasons (README, "Scrubbers in the plan").
"""

from __future__ import annotations

import shutil
from functools import lru_cache
from pathlib import Path

import pytest

from planner.ship.scrubbers import Scrubber
from planner.voyage.scrubbing import Availability
from planner.voyage.scrubbing_plan import Scrubbed, not_relied_reasons
from tests.helpers.paths import ROOT


@lru_cache(maxsize=2)
def _plan(max_load: str, folder: str):
    from planner.voyage.run import build_plan

    d = Path(folder)
    shutil.copytree(ROOT / "areas_sample", d, dirs_exist_ok=True)
    ship = d / "ship_egcs.toml"
    text = ship.read_text(encoding="utf-8")
    assert "max_load_pct = 110.0" in text
    ship.write_text(text.replace("max_load_pct = 110.0", f"max_load_pct = {max_load}"),
                    encoding="utf-8")
    return build_plan(d / "egcs_voyage.toml")


@pytest.fixture(scope="module")
def fraction(tmp_path_factory):
    return _plan("1.1", str(tmp_path_factory.mktemp("fraction")))


def test_a_fractional_max_load_is_an_unusual_input_warning_of_the_plan(fraction):
    found = [w for w in fraction.warnings if "max_load_pct = 1.1" in w.text]
    assert [w.kind for w in found] == ["unusual_input"]
    assert "scrubbers.egcs.max_load_pct = 1.1 % MCR looks like a fraction of MCR; expected " \
           "per cent of MCR, such as 110" in found[0].text


def test_the_plan_says_the_load_range_is_why_it_relies_on_the_scrubber_nowhere(fraction):
    assert fraction.scrubber_spans == () and fraction.scrubber_events == ()
    why = not_relied_reasons(fraction.system, fraction.scrubbed)["egcs"]
    assert why is not None
    assert why.startswith("the engines it serves run outside its load range 0-1.1 % MCR on "
                          "every leg sailed (main_engine load 85.0 % MCR at 14.0 kn, above "
                          "scrubber egcs's 1.1 % maximum; dg1 load 60.0 % of its rating")
    assert "so circuit main stays on compliant fuel" in why
    assert "check min_load_pct and max_load_pct in the ship file" in why


def test_the_sample_relies_on_its_scrubber_and_gives_no_reason(tmp_path):
    plan = _plan("110.0", str(tmp_path))
    assert plan.scrubber_spans
    assert not_relied_reasons(plan.system, plan.scrubbed) == {"egcs": None}


S = Scrubber("egcs", ("main_engine",), ("open", "closed"), 3.5, 20.0, 100.0)
LOW = "main_engine load 10.0 % MCR at 8.0 kn, below scrubber egcs's 20 % minimum"


class _System:
    scrubbers = {"egcs": S}


def _group(*pieces: Availability, spans: tuple = ()) -> Scrubbed:
    return Scrubbed(S, ("egcs",), ("main",), pieces, (), (), (), spans=spans)


@pytest.mark.parametrize(("pieces", "expected"), [
    ((Availability(0, 5, None, why="out of service from x", out_of_service=True),
      Availability(5, 9, None, why=LOW, out_of_range=True)),
     "it can work nowhere on the route (out of service, or outside its load range 20-100 % "
     "MCR), so circuit main stays on compliant fuel"),
    ((Availability(0, 5, None, ("Harbour",), "Harbour allows no discharge"),),
     "it can work nowhere on the route (in washwater discharge zones where it cannot work), "
     "so circuit main stays on compliant fuel"),
    ((Availability(0, 5, None, why=LOW, out_of_range=True),),
     f"the engines it serves run outside its load range 20-100 % MCR on every leg sailed "
     f"({LOW}), so circuit main stays on compliant fuel; check min_load_pct and "
     "max_load_pct in the ship file (per cent of MCR, such as 110)"),
])
def test_each_reason_in_words(pieces, expected):
    assert not_relied_reasons(_System(), [_group(*pieces)]) == {"egcs": expected}  # type: ignore[arg-type]


def test_no_reason_where_it_can_work_somewhere_or_is_relied_on():
    some = (Availability(0, 5, None, why=LOW, out_of_range=True),
            Availability(5, 9, "open", why="outside discharge zones: open loop"))
    assert not_relied_reasons(_System(), [_group(*some)]) == {"egcs": None}  # type: ignore[arg-type]
    assert not_relied_reasons(_System(), []) == {"egcs": None}  # type: ignore[arg-type]
