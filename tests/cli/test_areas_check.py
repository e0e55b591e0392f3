"""``changeover areas [check]``: the old form and the ``check`` command give the same
listing, and the listing never cuts a name, a date or a number at 80 or 120 columns or
piped. The areas are the invented sample's, one renamed here with a very long name.
"""

from __future__ import annotations

import json

import pytest

from geo.area_files import load_areas
from geo.area_measure import describe
from planner.cli.areas_table import cells, layout
from tests.cli.test_route import SAMPLE, run

LONG = "Meridian Reach Emission Control Area of the Invented Archipelago of Long Names"


def _rows() -> list[list[str]]:
    from dataclasses import replace
    from datetime import date

    areas = load_areas([SAMPLE])
    areas[1] = replace(areas[1], name=LONG, effective_until=date(2031, 12, 31))
    return [cells(describe(a, date(2027, 1, 1))) for a in areas]


@pytest.mark.parametrize("columns", [40, 80, 120, 160])
def test_nothing_is_cut(columns: int):
    rows = _rows()
    lines = layout("Control areas", rows, columns)
    text = "\n".join(lines)
    assert all(len(line) <= columns for line in lines if line != LONG), text
    for r in rows:
        for value in r[1:]:
            assert value in text, (value, text)
        for word in r[0].split():
            assert word in text.split(), word
    if columns >= 80:  # the table: each name's words in order down the name column
        name_w = lines[2].index("Limit")  # the header line: the name column, then Limit
        name_col = [line[:name_w] for line in lines[5:]]
        assert " ".join(" ".join(name_col).split()).find(" ".join(LONG.split())) >= 0


def test_table_at_80_columns_wraps_names_but_keeps_rows():
    lines = layout("Control areas", _rows(), 80)
    assert lines[2].startswith("Name") and "Vertices" in lines[2]
    corran = next(line for line in lines if line.startswith("Corran Sea"))
    assert "0.10  2019-01-01" in corran and "568,170  yes" in corran


def test_blocks_when_too_narrow():
    lines = layout("Control areas", _rows(), 40)
    assert "Corran Sea ECA" in lines and "  from 2019-01-01" in lines and "  until —" in lines


def test_old_form_and_check_are_the_same():
    a = run("areas", str(SAMPLE), "--on", "2027-01-01")
    b = run("areas", "check", str(SAMPLE), "--on", "2027-01-01")
    c = run("areas", "--on", "2027-01-01", str(SAMPLE))  # an option first
    assert a.returncode == b.returncode == c.returncode == 0, a.stderr + b.stderr + c.stderr
    assert a.stdout == b.stdout == c.stdout
    assert "Corran Sea ECA       0.10  2019-01-01" in a.stdout  # piped: 160 columns
    j = run("areas", "check", str(SAMPLE), "--json", "--on", "2027-01-01")
    assert [x["name"] for x in json.loads(j.stdout)["areas"]] == [
        "Corran Sea ECA", "Meridian Reach ECA", "Skarvik Basin ECA"]


def test_refusals_of_both_forms(tmp_path):
    for args in (["areas", str(tmp_path / "nowhere")], ["areas", "check", str(tmp_path)]):
        r = run(*args)
        assert r.returncode == 2 and len(r.stderr.splitlines()) == 1 and not r.stdout, args
    r = run("areas", "check")
    assert r.returncode == 2 and "Missing argument" in r.stderr
