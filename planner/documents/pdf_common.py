"""Shared PDF pieces for every printed document (reportlab, imported inside the functions).

The page: A4 portrait, margins :data:`MARGINS_MM`; a header rule with the
document title on the left and the ship on the right; a footer with the
printed-at time, a middle text (the record puts its journal hash there) and
"page N of M". Text uses the PDF standard fonts (Helvetica, Courier), so
characters are limited to Latin-1 / Windows-1252: ° ³ · — are fine, arrows
and Greek letters are not.

Building blocks, each returning reportlab flowables:

- :func:`para` (escaped text, or ``markup=True`` for ``<b>``, ``<strike>``...);
- :func:`title_block`: title, subtitle and a two-column table of facts;
- :func:`data_table`: a table with a repeated head row, widths in mm;
- :func:`signature_block`: signature, name and date lines for each role;
- :func:`caution_box`: a ruled, tinted box with a heading and lines;
- :func:`figure`: a chart or map (PNG) the frame's width, with its caption;
- :func:`build_pdf`: lays out the story and writes the file all-or-nothing.
"""

from __future__ import annotations

import functools
from collections.abc import Sequence
from datetime import datetime
from pathlib import Path
from xml.sax.saxutils import escape

from planner.common.outputs import write_atomic
from planner.common.timefmt import format_utc

MARGINS_MM = {"left": 16.0, "right": 16.0, "top": 22.0, "bottom": 20.0}
"""Page margins, mm (the header and footer sit inside the top and bottom margins)."""

FRAME_WIDTH_MM = 210.0 - MARGINS_MM["left"] - MARGINS_MM["right"]
"""Width of the text frame on A4 portrait, mm (178)."""

INK = "#1a1a1a"
RULE = "#7a7a7a"
SHADE = "#ececec"
CAUTION_FILL = "#fff4d6"
CAUTION_RULE = "#b07d00"


def esc(text: object) -> str:
    """Text made safe for a reportlab Paragraph."""
    return escape(str(text))


@functools.cache
def styles() -> dict:
    """Paragraph styles by name: title, subtitle, h1, h2, body, small, cell, cell_b, mono,
    caution_h, caution."""
    from reportlab.lib import colors
    from reportlab.lib.styles import ParagraphStyle

    ink = colors.HexColor(INK)
    base = ParagraphStyle("body", fontName="Helvetica", fontSize=9.5, leading=12.5,
                          textColor=ink, spaceAfter=4)
    s = {
        "body": base,
        "title": ParagraphStyle("title", parent=base, fontName="Helvetica-Bold", fontSize=17,
                                leading=21, spaceAfter=2),
        "subtitle": ParagraphStyle("subtitle", parent=base, fontSize=9.5, leading=12.5,
                                   textColor=colors.HexColor("#444444"), spaceAfter=8),
        "h1": ParagraphStyle("h1", parent=base, fontName="Helvetica-Bold", fontSize=12.5,
                             leading=16, spaceBefore=10, spaceAfter=4),
        "h2": ParagraphStyle("h2", parent=base, fontName="Helvetica-Bold", fontSize=10.5,
                             leading=13.5, spaceBefore=8, spaceAfter=3),
        "small": ParagraphStyle("small", parent=base, fontSize=8, leading=10,
                                textColor=colors.HexColor("#333333")),
        "cell": ParagraphStyle("cell", parent=base, fontSize=8, leading=9.8, spaceAfter=0),
        "cell_b": ParagraphStyle("cell_b", parent=base, fontName="Helvetica-Bold", fontSize=8,
                                 leading=9.8, spaceAfter=0),
        "mono": ParagraphStyle("mono", parent=base, fontName="Courier", fontSize=8,
                               leading=10, spaceAfter=0),
        "caution_h": ParagraphStyle("caution_h", parent=base, fontName="Helvetica-Bold",
                                    fontSize=9.5, spaceAfter=2),
        "caution": ParagraphStyle("caution", parent=base, fontSize=8.5, leading=11,
                                  spaceAfter=1),
    }
    return s


def para(text: object, style: str = "body", markup: bool = False):
    """A Paragraph of ``text`` (escaped unless ``markup``)."""
    from reportlab.platypus import Paragraph

    return Paragraph(str(text) if markup else esc(text), styles()[style])


def _cell(value: object, style: str):
    from reportlab.platypus import Flowable

    if isinstance(value, Flowable):
        return value
    return para(value, style, markup=isinstance(value, Markup))


class Markup(str):
    """Cell text that already holds Paragraph markup (``<strike>``, ``<b>``)."""


def figure(png: bytes, caption: str, width_mm: float = FRAME_WIDTH_MM) -> list:
    """A picture (PNG bytes) the frame's width, its aspect kept, with a caption beneath;
    kept together on one page."""
    import io

    from reportlab.lib.units import mm
    from reportlab.lib.utils import ImageReader
    from reportlab.platypus import Image, KeepTogether

    w_px, h_px = ImageReader(io.BytesIO(png)).getSize()
    w = width_mm * mm
    return [KeepTogether([Image(io.BytesIO(png), width=w, height=w * h_px / w_px),
                          para(caption, "small")])]


def data_table(header: Sequence[str], rows: Sequence[Sequence[object]],
               widths_mm: Sequence[float], align: str | None = None, zebra: bool = True,
               compact: bool = False):
    """A table: bold head row repeated on each page, thin rules, optional zebra shading.

    ``align`` is one letter per column (``l`` or ``r``); cells are text,
    :class:`Markup` or flowables. ``compact`` halves the space above and below each
    row's text (a sheet that must fit one page).
    """
    from reportlab.lib import colors
    from reportlab.lib.units import mm
    from reportlab.platypus import Table, TableStyle

    align = align or "l" * len(header)
    body_styles = {"l": "cell", "r": "cell"}
    data = [[_cell(h, "cell_b") for h in header]]
    for r in rows:
        data.append([_cell(v, body_styles[align[i]]) for i, v in enumerate(r)])
    t = Table(data, colWidths=[w * mm for w in widths_mm], repeatRows=1, hAlign="LEFT")
    cmds = [
        ("VALIGN", (0, 0), (-1, -1), "TOP"),
        ("LINEABOVE", (0, 0), (-1, 0), 0.8, colors.HexColor(INK)),
        ("LINEBELOW", (0, 0), (-1, 0), 0.6, colors.HexColor(INK)),
        ("LINEBELOW", (0, -1), (-1, -1), 0.8, colors.HexColor(INK)),
        ("LINEBELOW", (0, 1), (-1, -2), 0.25, colors.HexColor(RULE)),
        ("TOPPADDING", (0, 0), (-1, -1), 1.0 if compact else 2.2),
        ("BOTTOMPADDING", (0, 0), (-1, -1), 1.4 if compact else 2.6),
        ("LEFTPADDING", (0, 0), (-1, -1), 3),
        ("RIGHTPADDING", (0, 0), (-1, -1), 3),
    ]
    if zebra:
        for i in range(2, len(data), 2):
            cmds.append(("BACKGROUND", (0, i), (-1, i), colors.HexColor("#f6f6f6")))
    for i, a in enumerate(align):
        if a == "r":
            for row in data:
                if hasattr(row[i], "style"):
                    row[i].style = _right(row[i].style)
    t.setStyle(TableStyle(cmds))
    return t


@functools.cache
def _right(style):
    from reportlab.lib.enums import TA_RIGHT
    from reportlab.lib.styles import ParagraphStyle

    return ParagraphStyle(f"{style.name}_r", parent=style, alignment=TA_RIGHT)


def title_block(title: str, subtitle: str, facts: Sequence[tuple[str, object]],
                label_mm: float = 42.0) -> list:
    """The document's title, a subtitle, and a ruled two-column table of facts."""
    from reportlab.lib import colors
    from reportlab.lib.units import mm
    from reportlab.platypus import Spacer, Table, TableStyle

    rows = [[para(k, "cell_b"), _cell(v, "cell")] for k, v in facts]
    t = Table(rows, colWidths=[label_mm * mm, (FRAME_WIDTH_MM - label_mm) * mm], hAlign="LEFT")
    t.setStyle(TableStyle([
        ("VALIGN", (0, 0), (-1, -1), "TOP"),
        ("BOX", (0, 0), (-1, -1), 0.8, colors.HexColor(INK)),
        ("LINEBELOW", (0, 0), (-1, -2), 0.25, colors.HexColor(RULE)),
        ("BACKGROUND", (0, 0), (0, -1), colors.HexColor(SHADE)),
        ("TOPPADDING", (0, 0), (-1, -1), 3),
        ("BOTTOMPADDING", (0, 0), (-1, -1), 3.5),
    ]))
    return [para(title, "title"), para(subtitle, "subtitle"), t, Spacer(1, 4 * mm)]


def signature_block(roles: Sequence[str]) -> list:
    """For each role side by side: a line to sign on, then name and date lines."""
    from reportlab.lib import colors
    from reportlab.lib.units import mm
    from reportlab.platypus import Spacer, Table, TableStyle

    n = len(roles)
    gap = 8.0
    w = (FRAME_WIDTH_MM - gap * (n - 1)) / n
    widths, head, sign, name, date = [], [], [], [], []
    for i, role in enumerate(roles):
        if i:
            widths.append(gap * mm)
            for row in (head, sign, name, date):
                row.append("")
        widths.append(w * mm)
        head.append(para(role, "cell_b"))
        sign.append(para("Signature", "small"))
        name.append(para("Name", "small"))
        date.append(para("Date", "small"))
    t = Table([head, sign, name, date], colWidths=widths,
              rowHeights=[12, 26, 20, 20], hAlign="LEFT")
    cmds = [("VALIGN", (0, 1), (-1, -1), "BOTTOM"), ("LEFTPADDING", (0, 0), (-1, -1), 0)]
    for i in range(n):
        c = 2 * i
        cmds += [("LINEBELOW", (c, r), (c, r), 0.6, colors.HexColor(INK)) for r in (1, 2, 3)]
    t.setStyle(TableStyle(cmds))
    return [Spacer(1, 3 * mm), t]


def caution_box(title: str, lines: Sequence[str], markup: bool = False):
    """A ruled, tinted box: bold ``title`` then one paragraph per line."""
    from reportlab.lib import colors
    from reportlab.lib.units import mm
    from reportlab.platypus import Table, TableStyle

    cells = [[para(title, "caution_h")]] + [[para(x, "caution", markup)] for x in lines]
    t = Table(cells, colWidths=[FRAME_WIDTH_MM * mm], hAlign="LEFT")
    t.setStyle(TableStyle([
        ("BOX", (0, 0), (-1, -1), 1.2, colors.HexColor(CAUTION_RULE)),
        ("BACKGROUND", (0, 0), (-1, -1), colors.HexColor(CAUTION_FILL)),
        ("LEFTPADDING", (0, 0), (-1, -1), 6),
        ("RIGHTPADDING", (0, 0), (-1, -1), 6),
        ("TOPPADDING", (0, 0), (-1, -1), 1.5),
        ("BOTTOMPADDING", (0, 0), (-1, -1), 1.5),
        ("TOPPADDING", (0, 0), (-1, 0), 5),
        ("BOTTOMPADDING", (0, -1), (-1, -1), 5),
    ]))
    return t


PAPERS = ("a4", "letter")
"""Paper sizes a document can be printed on: ISO A4 (210 × 297 mm) and US Letter
(8.5 × 11 in, 215.9 × 279.4 mm)."""


def page_size(paper: str) -> tuple[float, float]:
    """(width, height) in points of ``"a4"`` or ``"letter"``."""
    from reportlab.lib.pagesizes import A4, LETTER

    if paper not in PAPERS:
        raise ValueError(f"paper {paper!r} is not one of {', '.join(PAPERS)}")
    return A4 if paper == "a4" else LETTER


def build_pdf(target: str | Path, story: list, *, title: str, header_right: str,
              footer_middle: str, printed_at: datetime, author: str = "changeover",
              paper: str = "a4", margins_mm: dict[str, float] | None = None) -> None:
    """Lay out ``story`` on A4 (or US Letter) with the header and footer and write ``target``
    atomically.

    The footer reads ``printed 2027-06-05 10:00Z`` on the left, ``footer_middle`` in the
    centre and ``page N of M`` on the right.
    """
    from reportlab.lib.units import mm
    from reportlab.platypus import SimpleDocTemplate

    size = page_size(paper)
    furniture = _Furniture(title, header_right, footer_middle,
                           f"printed {format_utc(printed_at)} (UTC)", size)

    m = {**MARGINS_MM, **(margins_mm or {})}

    def write(path: str) -> None:
        doc = SimpleDocTemplate(
            path, pagesize=size, title=title, author=author, creator="changeover",
            leftMargin=m["left"] * mm, rightMargin=m["right"] * mm,
            topMargin=m["top"] * mm, bottomMargin=m["bottom"] * mm)
        doc.build(list(story), canvasmaker=furniture.canvasmaker())

    write_atomic(target, write, suffix=".pdf")


class _Furniture:
    """Header and footer drawn on every page once the page count is known."""

    def __init__(self, title: str, header_right: str, footer_middle: str,
                 footer_left: str, size: tuple[float, float]) -> None:
        self.size = size
        self.title, self.header_right = title, header_right
        self.footer_middle, self.footer_left = footer_middle, footer_left

    def canvasmaker(self):
        from reportlab.pdfgen.canvas import Canvas

        furniture = self

        class NumberedCanvas(Canvas):
            def __init__(self, *args, **kwargs) -> None:
                super().__init__(*args, **kwargs)
                self._pages: list[dict] = []

            def showPage(self) -> None:  # noqa: N802 (reportlab's name)
                self._pages.append(dict(self.__dict__))
                self._startPage()

            def save(self) -> None:
                total = len(self._pages)
                for state in self._pages:
                    self.__dict__.update(state)
                    furniture.draw(self, self._pageNumber, total)
                    super().showPage()
                super().save()

        return NumberedCanvas

    def draw(self, canvas, page: int, pages: int) -> None:
        from reportlab.lib import colors
        from reportlab.lib.units import mm

        w, h = self.size
        left, right = MARGINS_MM["left"] * mm, w - MARGINS_MM["right"] * mm
        canvas.saveState()
        canvas.setStrokeColor(colors.HexColor(RULE))
        canvas.setLineWidth(0.5)
        top = h - 13 * mm
        canvas.setFont("Helvetica-Bold", 8.5)
        canvas.setFillColor(colors.HexColor(INK))
        canvas.drawString(left, top, self.title)
        canvas.setFont("Helvetica", 8.5)
        canvas.drawRightString(right, top, self.header_right)
        canvas.line(left, top - 2.2 * mm, right, top - 2.2 * mm)
        bottom = 11 * mm
        canvas.line(left, bottom + 3.6 * mm, right, bottom + 3.6 * mm)
        canvas.setFont("Helvetica", 7.5)
        canvas.drawString(left, bottom, self.footer_left)
        canvas.drawCentredString((left + right) / 2, bottom, self.footer_middle)
        canvas.setFont("Helvetica-Bold", 7.5)
        canvas.drawRightString(right, bottom, f"page {page} of {pages}")
        canvas.restoreState()
