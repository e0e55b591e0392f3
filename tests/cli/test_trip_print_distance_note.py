"""The "If the scrubber fails at a boundary" table of ``changeover plan``: distances with
the thousands separator, and the note on a failure during the changeover into the fuel.

The scrubber sample (areas_sample/egcs_voyage.toml, fictional) as a person runs it, on a
terminal 80 and 120 columns wide and piped. Its last boundary, Skarvik Basin ECA, is more
than 1,000 nm from departure: it must read "1,077.9 nm from departure" as every other
table writes distances (``f"{x:,.1f}"``, as the plan's "Fuel on each stretch" and
changeover tables; before, "1077.9"). Every boundary's UTC, ship's time, position and
distance of the JSON (written out by the independent formatters of
``tests/helpers/terminal.py``) is whole on one line, and no line is wider than the
terminal. The advisory note says, as the PDF's note and README ("If the scrubber fails")
do, that a failure while the changeover into the span's fuel is still under way starts
from the state that changeover has reached.
"""

from __future__ import annotations

import json
from functools import lru_cache

import pytest

from tests.helpers.terminal import moment, on_tty, piped, position, utc_full

ARGS = ["plan", "areas_sample/egcs_voyage.toml"]
UNDER_WAY = ("a failure while the changeover into the span's fuel is still under way starts "
             "from the state that changeover has reached")


@lru_cache(maxsize=1)
def boundaries() -> list[dict]:
    return json.loads(piped([*ARGS, "--json"]))["scrubber_trip"]["boundaries"]


@lru_cache(maxsize=4)
def printed(columns: int | None) -> list[str]:
    text = piped(ARGS) if columns is None else on_tty(ARGS, columns)
    return text.splitlines()


def _trip_part(lines: list[str]) -> list[str]:
    """From the boundary table's title to the line before the notes."""
    first = lines.index("If the scrubber fails at a boundary (times from the failure)")
    last = next(i for i, x in enumerate(lines) if i > first and x.startswith("Note: "))
    return lines[first:last]


def _flat(lines: list[str]) -> str:
    return " ".join(" ".join(lines).split())


def test_the_sample_has_a_boundary_beyond_a_thousand_miles():
    assert max(r["distance_nm"] for r in boundaries()) == pytest.approx(1077.9, abs=0.05)


@pytest.mark.parametrize("columns", [80, 120, None], ids=["80", "120", "piped"])
def test_distances_have_the_separator_and_nothing_is_cut(columns):
    lines = printed(columns)
    part = _trip_part(lines)
    if columns is not None:
        assert all(len(x) <= columns for x in lines), max(lines, key=len)
    assert not any("…" in x for x in part)
    assert "1077.9" not in "\n".join(part)
    for r in boundaries():
        d = f"{r['distance_nm']:,.1f} nm"
        assert any(d in x for x in part), d
        assert any(utc_full(r["utc"]) in x for x in part)
        ship = moment(r["ship_time"])
        assert any(f"{ship.strftime('%Y-%m-%d %H:%M')} ({r['ship_time'][-6:]})" in x
                   for x in part)
        assert any(position(r["lat"], r["lon"]) in x for x in part)
    assert any("1,077.9 nm" in x for x in part)


@pytest.mark.parametrize("columns", [80, 120, None], ids=["80", "120", "piped"])
def test_the_note_says_a_failure_under_way_starts_from_the_changeover_state(columns):
    text = _flat(_trip_part(printed(columns)))
    assert "Advisory only: a failure's time out of compliance" in text
    assert UNDER_WAY in text


def test_the_note_is_in_the_tables_lines_at_any_width():
    """The tables' own lines (no subprocess): a hand-made document without a boundary
    still ends with the full note."""
    from planner.cli.trip_print import trip_lines

    doc = {"scrubber_trip": {"step_h": 0.25, "spans": [], "boundaries": [], "samples": []}}
    for width in (80, 120):
        lines = trip_lines(doc, width)
        assert all(len(x) <= width for x in lines)
        assert UNDER_WAY in _flat(lines)
