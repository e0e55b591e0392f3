"""The text table layout (planner.cli.text_table): a value is never cut, at any width.

Property tests (hypothesis) over random tables of atoms (times, positions,
numbers: words that must stay whole) and free text, at widths 20-200: every
atom appears whole on one line, no line has trailing spaces, and a line is
wider than the page only when a single atom with its label is (then it is
alone, never cut). The layouts are chosen by width: columns when they fit,
one block per row otherwise.
"""

from __future__ import annotations

from hypothesis import given, settings
from hypothesis import strategies as st

from planner.cli.text_table import Column, Group, TextTable, atom, keep_whole, render, wrap
from planner.common.csv_cells import csv_text, safe_cell

ATOMS = st.sampled_from(["2027-05-30 04:47Z", "39°49.4'S 169°14.0'E", "1,077.92", "0.10",
                         "16:47", "mgo → vlsfo", "KB-BDN-0413", "1.55 h (93 min)"])
TEXT = st.lists(st.sampled_from(["Corran", "Sea", "ECA", "global", "cap", "Meridian"]),
                min_size=1, max_size=6).map(" ".join)


@st.composite
def tables(draw):
    n = draw(st.integers(1, 7))
    wraps = [draw(st.booleans()) for _ in range(n)]
    cols = tuple(Column(draw(TEXT), draw(st.sampled_from("lr")), w) for w in wraps)
    groups = []
    for _ in range(draw(st.integers(1, 3))):
        rows = tuple(tuple(draw(TEXT) if w else atom(draw(ATOMS)) for w in wraps)
                     for _ in range(draw(st.integers(1, 3))))
        head = (f"Changeover 1 at {atom(draw(ATOMS))} {draw(TEXT)}",) if draw(st.booleans()) \
            else ()
        groups.append(Group(rows, head))
    return TextTable("Title " + draw(TEXT), cols, tuple(groups))


@settings(max_examples=300, deadline=None)
@given(tables(), st.integers(20, 200))
def test_no_value_is_ever_cut(t, width):
    lines = render(t, width)
    for g in t.groups:
        for r in g.rows:
            for c, x in zip(t.columns, r, strict=True):
                if not c.wrap:
                    shown = x.replace("\u00a0", " ")
                    assert any(shown in line for line in lines), (shown, width)
    for line in lines:
        assert line == line.rstrip()
        if len(line) > width:  # only an atom too wide for the page, with its label
            assert line.strip().count(" ") <= 5, line


def test_columns_when_they_fit_blocks_when_not():
    t = TextTable("T", (Column("Start UTC"), Column("Start position")),
                  (Group(((atom("2027-05-30 04:47Z"), atom("39°49.4'S 169°14.0'E")),)),))
    wide = render(t, 80)
    assert wide[1].split() == ["Start", "UTC", "Start", "position"]
    assert wide[3] == "2027-05-30 04:47Z  39°49.4'S 169°14.0'E"
    narrow = render(t, 30)
    assert narrow[1:] == ["Start UTC: 2027-05-30 04:47Z", "  Start position:",
                          "    39°49.4'S 169°14.0'E"]


def test_wrap_keeps_times_positions_and_quantities_whole():
    text = keep_whole("switching back would complete at 2027-05-31 11:19Z near "
                      "39°49.4'S 173°00.0'E after 0.18-0.55 h and 1,077.9 nm")
    for w in range(20, 60):
        lines = wrap(text, w)
        for token in ("2027-05-31 11:19Z", "39°49.4'S 173°00.0'E", "0.18-0.55 h",
                      "1,077.9 nm"):
            assert any(token in line for line in lines), (token, w)


def test_csv_cells_never_formulas():
    # CSV injection: a leading =, +, -, @ (or tab, CR) may run as a formula in a
    # spreadsheet; the cell gets an apostrophe, a plain number is left alone (common practice)
    assert safe_cell("=1+1") == "'=1+1"
    assert safe_cell("+cmd|' /C calc'!A0") == "'+cmd|' /C calc'!A0"
    assert safe_cell("-2+3") == "'-2+3"
    assert safe_cell("@SUM(A1:A2)") == "'@SUM(A1:A2)"
    assert safe_cell("\t=x") == "'\t=x"
    assert safe_cell("-39.823815") == "-39.823815" and safe_cell("+12") == "+12"
    assert safe_cell(1e-3) == "0.001" and safe_cell(None) == ""
    assert csv_text(["a (h)"], [["=x"], [-1.5]]) == "a (h)\n'=x\n-1.5\n"
