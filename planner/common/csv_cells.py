"""CSV cells that a spreadsheet reads as text, never as a formula.

A cell beginning with ``=``, ``+``, ``-`` or ``@`` (or a tab or carriage
return) may be run as a formula when the file is opened in a spreadsheet
(CSV injection, OWASP's guidance [OWASP-CSV]: prefix such a cell with an apostrophe).
A plain number (``-39.823815``, ``+12``) is left as it is, so figures stay
figures; anything else that looks like a formula gets the apostrophe. The one
neutraliser of the program: the tables' ``--csv`` and the journal's ``log export`` use it.
"""

from __future__ import annotations

import csv
import io
import re
from collections.abc import Iterable, Sequence

_FORMULA_START = ("=", "+", "-", "@", "\t", "\r")
_NUMBER = re.compile(r"^[+-]?(\d+(\.\d*)?|\.\d+)([eE][+-]?\d+)?$")


def safe_cell(value: object) -> str:
    """``value`` as CSV text, neutralised when it would read as a formula.

    Examples
    --------
    >>> safe_cell("=HYPERLINK(\\"x\\")")
    '\\'=HYPERLINK("x")'
    >>> safe_cell(-39.5), safe_cell("@SUM(A1)"), safe_cell(None), safe_cell("mgo")
    ('-39.5', "'@SUM(A1)", '', 'mgo')
    """
    if value is None:
        return ""
    text = value if isinstance(value, str) else str(value)
    if text.startswith(_FORMULA_START) and not _NUMBER.match(text):
        return "'" + text
    return text


def csv_text(header: Sequence[str], rows: Iterable[Sequence[object]]) -> str:
    """A CSV document (``\\n`` line ends, minimal quoting), every cell through
    :func:`safe_cell`."""
    buf = io.StringIO()
    w = csv.writer(buf, lineterminator="\n")
    w.writerow([safe_cell(h) for h in header])
    for r in rows:
        w.writerow([safe_cell(x) for x in r])
    return buf.getvalue()
