"""A scrubber's load range written as a fraction of MCR (``max_load_pct = 1.1`` for 110 %).

The keys are per cent of MCR (README, "Scrubbers (exhaust gas cleaning systems)"). A range
end above 0 and at most 1.5 (:data:`planner.ship.scrubber_file.FRACTION_LOAD_PCT`) is
taken as written, with a warning naming the file, the key, the value and what is expected;
``min_load_pct`` not below ``max_load_pct`` stays refused, and the refusal says which end
looks like a fraction. The sample ship (``areas_sample/ship_egcs.toml``) is fictional.
"""

from __future__ import annotations

import tomllib

import pytest

from geo.errors import InputError
from planner.ship.scrubber_file import FRACTION_LOAD_PCT
from planner.ship.ship_file import parse_ship
from tests.helpers.paths import ROOT

TEXT = (ROOT / "areas_sample" / "ship_egcs.toml").read_text(encoding="utf-8")
FILE = "egcs.toml"
LOADS = "min_load_pct = 0.0\nmax_load_pct = 110.0\n"


def _ship(low: float | None, high: float | None):
    assert LOADS in TEXT
    lines = ([f"min_load_pct = {low!r}"] if low is not None else []) + (
        [f"max_load_pct = {high!r}"] if high is not None else [])
    return parse_ship(tomllib.loads(TEXT.replace(LOADS, "\n".join(lines) + "\n")), FILE)


def _fraction_warnings(system) -> list[str]:
    return [w for w in system.input_warnings if "looks like a fraction" in w]


def test_max_load_as_a_fraction_is_taken_with_a_warning_naming_key_value_and_expected():
    system = _ship(0.0, 1.1)
    assert system.scrubbers["egcs"].max_load_pct == 1.1  # taken as written
    [w] = _fraction_warnings(system)
    assert w.startswith(f"{FILE}: scrubbers.egcs.max_load_pct = 1.1 % MCR looks like a "
                        "fraction of MCR; expected per cent of MCR, such as 110 "
                        "(max_load_pct = 110 for 1.1 × MCR)")
    assert "only while the engines it serves run at 0-1.1 % MCR" in w
    assert w.endswith("check the ship file.") and "\n" not in w


@pytest.mark.parametrize(("low", "high", "keys"), [
    (0.25, 110.0, ["min_load_pct"]),                    # meant 25 %
    (0.25, 1.0, ["min_load_pct", "max_load_pct"]),      # both ends
    (None, FRACTION_LOAD_PCT, ["max_load_pct"]),        # the end of the guard, included
    (FRACTION_LOAD_PCT, None, ["min_load_pct"]),
])
def test_every_end_that_looks_like_a_fraction_is_warned_of(low, high, keys):
    found = _fraction_warnings(_ship(low, high))
    assert [w.split(" = ")[0].removeprefix(f"{FILE}: scrubbers.egcs.") for w in found] == keys


@pytest.mark.parametrize(("low", "high"), [
    (0.0, 110.0), (None, None), (25.0, 100.0), (0.0, 1.6), (2.0, 110.0), (0.0, 50.0)])
def test_a_range_in_per_cent_is_not_warned_of(low, high):
    assert _fraction_warnings(_ship(low, high)) == []


def test_min_not_below_a_fractional_max_is_refused_saying_it_looks_like_a_fraction():
    with pytest.raises(InputError) as e:
        _ship(25.0, 1.1)
    message = str(e.value)
    assert "\n" not in message and message.startswith(f"{FILE}: scrubbers.egcs.min_load_pct")
    assert "a load below max_load_pct (1.1 % MCR); max_load_pct = 1.1 looks like a fraction " \
           "of MCR: per cent of MCR, such as 110 (max_load_pct = 110 for 1.1 × MCR)" in message
    with pytest.raises(InputError) as e:  # no fraction: the refusal as before
        _ship(60.0, 50.0)
    assert "fraction" not in str(e.value)
    assert str(e.value).endswith("expected a load below max_load_pct (50 % MCR)")
