"""The one CSV formula neutraliser (planner.common.csv_cells.safe_cell), used by the
tables' --csv and by ``log export``: a cell a spreadsheet would run as a formula (leading
``=``, ``+``, ``-``, ``@``, tab, carriage return) gets an apostrophe in front, as OWASP's
CSV injection guidance says [OWASP-CSV]; a plain number stays a number."""

from __future__ import annotations

import pytest

from planner.common.csv_cells import csv_text, safe_cell
from planner.journal import export


@pytest.mark.parametrize(("cell", "safe"), [
    ("\tcmd", "'\tcmd"), ("\rcmd", "'\rcmd"), ("-39.5", "-39.5"), ("-1-1", "'-1-1"),
    ("@x", "'@x"), ("ok", "ok"), ("", ""), ("42", "42"), ("=1+1", "'=1+1"),
    ("+12", "+12"), ("-1e-05", "-1e-05"), ("+cmd|' /C calc'!A0", "'+cmd|' /C calc'!A0")])
def test_safe_cell(cell, safe):
    assert safe_cell(cell) == safe  # [OWASP-CSV]


def test_the_journal_export_uses_the_same_neutraliser():
    assert export.safe_cell is safe_cell
    assert csv_text(["a"], [["=x"]]) == "a\n'=x\n"
