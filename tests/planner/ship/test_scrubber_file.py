"""The ship file's [scrubbers.NAME] tables: the sample, every refusal, the circuit warning."""

from __future__ import annotations

import tomllib
from pathlib import Path

import pytest

from geo.errors import InputError
from planner.ship.scrubber_file import SCRUBBER_KEYS
from planner.ship.scrubbers import served_circuits
from planner.ship.ship_file import load_ship, parse_ship
from tests.helpers.paths import ROOT

SAMPLE = ROOT / "areas_sample" / "ship_egcs.toml"
TEXT = SAMPLE.read_text()
FILE = "egcs.toml"
PART = """[scrubbers.egcs]
consumers = ["main_engine", "dg1", "dg2"]
mode = "hybrid"
max_sulphur_pct = 3.50
min_load_pct = 0.0
max_load_pct = 110.0
"""


def _with(table: str, extra: str = "") -> dict:
    """The sample ship with its [scrubbers.egcs] table replaced by ``table`` (+ ``extra``)."""
    assert PART in TEXT
    return tomllib.loads(TEXT[:TEXT.index(PART)] + table + extra)


def _refusal(data: dict) -> str:
    with pytest.raises(InputError) as e:
        parse_ship(data, FILE)
    message = str(e.value)
    assert "\n" not in message and message.startswith(f"{FILE}: ")
    return message


def test_sample_scrubber_loads() -> None:
    s = load_ship(SAMPLE)
    assert s.ship.fictional and s.ship.imo == "9998884"
    e = s.scrubbers["egcs"]
    assert e.consumers == ("main_engine", "dg1", "dg2") and e.modes == ("open", "closed")
    assert e.max_sulphur_pct == 3.5 and e.hybrid and "fictional" in e.approval
    assert not e.serves("aux_boiler") and e.serves("dg1")
    # the main circuit is served whole: no warning
    assert s.input_warnings == ()
    assert "hsfo_service" in s.circuits["main"].tanks
    assert "hsfo_service" not in s.circuits["boiler"].tanks


def test_ship_without_scrubbers_has_none() -> None:
    assert dict(load_ship(ROOT / "areas_sample" / "ship.toml").scrubbers) == {}


@pytest.mark.parametrize("word, modes", [("open", ("open",)), ("closed", ("closed",)),
                                         ("hybrid", ("open", "closed"))])
def test_mode_words(word: str, modes: tuple) -> None:
    s = parse_ship(_with(PART.replace('"hybrid"', f'"{word}"')), FILE)
    assert s.scrubbers["egcs"].modes == modes and s.scrubbers["egcs"].mode_word == word


def test_defaults_of_the_optional_keys() -> None:
    table = ('[scrubbers.egcs]\nconsumers = ["main_engine", "dg1", "dg2"]\n'
             'mode = "open"\nmax_sulphur_pct = 3.5\n')
    e = parse_ship(_with(table), FILE).scrubbers["egcs"]
    assert (e.min_load_pct, e.max_load_pct, e.approval, e.note) == (0.0, 110.0, "", "")


@pytest.mark.parametrize("old, new, place, words", [
    ('mode = "hybrid"', 'mode = "mixed"', "scrubbers.egcs.mode", '"open" | "closed" | "hybrid"'),
    ('mode = "hybrid"', "mode = 2", "scrubbers.egcs.mode", '"hybrid"'),
    ('mode = "hybrid"\n', "", "scrubbers.egcs.mode", "missing"),
    ("max_sulphur_pct = 3.50", "max_sulphur_pct = 4.51", "scrubbers.egcs.max_sulphur_pct",
     "4.5 % m/m"),
    ("max_sulphur_pct = 3.50", "max_sulphur_pct = 0.0", "scrubbers.egcs.max_sulphur_pct",
     "above 0"),
    ("max_sulphur_pct = 3.50", 'max_sulphur_pct = "3.5"', "scrubbers.egcs.max_sulphur_pct",
     "finite number"),
    ("max_sulphur_pct = 3.50", "max_sulphur_pct = true", "scrubbers.egcs.max_sulphur_pct",
     "finite number"),
    ("max_sulphur_pct = 3.50\n", "", "scrubbers.egcs.max_sulphur_pct", "missing"),
    ("max_load_pct = 110.0", "max_load_pct = 111.0", "scrubbers.egcs.max_load_pct", "110"),
    ("min_load_pct = 0.0", "min_load_pct = -5.0", "scrubbers.egcs.min_load_pct", "from 0"),
    ("min_load_pct = 0.0", "min_load_pct = 120.0", "scrubbers.egcs.min_load_pct", "110"),
    ("min_load_pct = 0.0", "min_load_pct = 110.0", "scrubbers.egcs.min_load_pct",
     "below max_load_pct"),
    ('consumers = ["main_engine", "dg1", "dg2"]', 'consumers = ["main_engine", "dg3"]',
     "scrubbers.egcs.consumers", "a consumer of [consumers]"),
    ('consumers = ["main_engine", "dg1", "dg2"]', 'consumers = ["dg1", "dg1"]',
     "scrubbers.egcs.consumers", "each consumer named once"),
    ('consumers = ["main_engine", "dg1", "dg2"]', "consumers = []",
     "scrubbers.egcs.consumers", "at least one consumer"),
    ('consumers = ["main_engine", "dg1", "dg2"]', 'consumers = "main_engine"',
     "scrubbers.egcs.consumers", "a list of names"),
    ('consumers = ["main_engine", "dg1", "dg2"]\n', "", "scrubbers.egcs.consumers", "missing"),
    ("max_load_pct = 110.0", "max_load = 100.0", "scrubbers.egcs.max_load",
     "did you mean 'max_load_pct'?"),
    ("mode = ", "modes = ", "scrubbers.egcs.modes", "did you mean 'mode'?"),
    ("max_load_pct = 110.0", "approval = 17", "scrubbers.egcs.approval", "text"),
    ("max_load_pct = 110.0", "note = [1]", "scrubbers.egcs.note", "text"),
])
def test_refusals_name_file_key_value_and_expectation(old: str, new: str, place: str,
                                                      words: str) -> None:
    assert old in PART
    message = _refusal(_with(PART.replace(old, new)))
    assert f": {place}: " in message and words in message, message


def test_non_finite_numbers_are_refused() -> None:
    for bad in (float("nan"), float("inf")):
        data = _with(PART)
        data["scrubbers"]["egcs"]["max_sulphur_pct"] = bad
        message = _refusal(data)
        assert ": scrubbers.egcs.max_sulphur_pct: " in message and "finite" in message


def test_non_finite_in_the_file_is_refused(tmp_path: Path) -> None:
    p = tmp_path / "ship.toml"
    p.write_text(TEXT.replace("max_sulphur_pct = 3.50", "max_sulphur_pct = nan"))
    with pytest.raises(InputError, match="ship.toml"):
        load_ship(p)


def test_a_consumer_on_two_scrubbers_is_refused() -> None:
    table = PART.replace('"main_engine", "dg1", "dg2"', '"main_engine", "dg1"')
    second = '\n[scrubbers.aux]\nconsumers = ["dg1", "dg2"]\nmode = "closed"\n' \
             'max_sulphur_pct = 3.5\n'
    message = _refusal(_with(table, second))
    assert ": scrubbers.aux.consumers: 'dg1': " in message and "scrubbers.egcs" in message


def test_scrubbers_must_be_tables() -> None:
    data = _with(PART)
    data["scrubbers"] = {"egcs": 3}
    assert ": scrubbers.egcs: 3: expected a table" in _refusal(data)
    data["scrubbers"] = 3
    assert ": scrubbers: 3: expected a table" in _refusal(data)


def test_all_keys_are_documented_in_the_sample() -> None:
    for key in SCRUBBER_KEYS:
        assert f"{key} " in TEXT, key


def test_unusual_sulphur_is_kept_with_a_warning() -> None:
    s = parse_ship(_with(PART.replace("max_sulphur_pct = 3.50", "max_sulphur_pct = 4.0")), FILE)
    assert s.scrubbers["egcs"].max_sulphur_pct == 4.0
    assert any("scrubbers.egcs.max_sulphur_pct" in w for w in s.input_warnings)


def test_a_circuit_served_in_part_is_warned() -> None:
    s = parse_ship(_with(PART.replace('"main_engine", "dg1", "dg2"', '"main_engine"')), FILE)
    [w] = s.input_warnings
    assert w.startswith(f"{FILE}: scrubbers.egcs.consumers: ")
    assert "main_engine but not dg1, dg2 of circuit main" in w and "one fuel" in w


def test_two_scrubbers_serving_a_circuit_whole_give_no_warning() -> None:
    table = PART.replace('"main_engine", "dg1", "dg2"', '"main_engine"')
    second = '\n[scrubbers.aux]\nconsumers = ["dg1", "dg2"]\nmode = "closed"\n' \
             'max_sulphur_pct = 3.5\n'
    s = parse_ship(_with(table, second), FILE)
    assert list(s.scrubbers) == ["egcs", "aux"] and s.input_warnings == ()


def test_a_boiler_alone_on_its_circuit_gives_no_warning() -> None:
    second = '\n[scrubbers.boiler_egcs]\nconsumers = ["aux_boiler"]\nmode = "open"\n' \
             'max_sulphur_pct = 3.5\n'
    s = parse_ship(_with(PART, second), FILE)
    assert s.input_warnings == () and s.scrubbers["boiler_egcs"].serves("aux_boiler")


def test_modes_allowed_in_a_zone() -> None:
    e = load_ship(SAMPLE).scrubbers["egcs"]
    assert e.modes_allowed(("open", "closed")) == ("open", "closed")
    assert e.modes_allowed(("closed",)) == ("closed",)
    assert e.modes_allowed(()) == ()


def test_served_circuits() -> None:
    s = load_ship(SAMPLE)
    assert served_circuits(s.scrubbers, s.circuits) == {"main": ("egcs",)}
    table = PART.replace('"main_engine", "dg1", "dg2"', '"main_engine"')
    second = '\n[scrubbers.aux]\nconsumers = ["dg1", "dg2"]\nmode = "closed"\n' \
             'max_sulphur_pct = 3.5\n'
    two = parse_ship(_with(table, second), FILE)
    assert served_circuits(two.scrubbers, two.circuits) == {"main": ("egcs", "aux")}
    part = parse_ship(_with(table), FILE)
    assert served_circuits(part.scrubbers, part.circuits) == {}
    plain = load_ship(ROOT / "areas_sample" / "ship.toml")
    assert served_circuits(plain.scrubbers, plain.circuits) == {}
