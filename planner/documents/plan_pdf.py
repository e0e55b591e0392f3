"""The voyage changeover plan as a PDF for the master and the chief engineer to sign.

Built from the ``changeover plan --json`` document alone (see
:func:`planner.voyage.report.plan_json`), so what is printed is exactly what the
JSON says. Page one names the ship, the voyage, the route, departure and
arrival, the ship's time and the planning margins; then the changeovers,
grouped by boundary: each boundary (area, entry or exit, time in UTC and
ship's time, position) once, with every circuit's changeover beneath it (fuel
from and to, start in UTC and ship's time and position, compliant or complete
time and position, margin, duration); where the plan relies on a scrubber, the
section "Scrubber" (:mod:`planner.documents.plan_pdf_scrubber`: its spans, its
events S1, S2 ... and the caution); the route map and the sulphur chart
when given (their events numbered as the changeovers). Then the fuel burnt and the SO2 formed
on each stretch, the fuel needed against what is on board, SO2 inside each
area against the regular fuel, the notes, the warnings (highlighted), the
standard cautions and lines for both to sign.

Every key added to the contract is read with a default, so a smaller document
(a test's, or an older plan's) still prints. The pieces:

- :mod:`planner.documents.plan_pdf_cells`: values as cell text in the
  characters the standard fonts have (``→`` becomes ``to``);
- :mod:`planner.documents.plan_pdf_tables`: the tables;
- :mod:`planner.documents.plan_pdf_sections`: the title block's facts, notes,
  warnings, cautions and signatures;
- this module: the document in order. reportlab is imported inside the functions.
"""

from __future__ import annotations

from collections.abc import Sequence
from datetime import UTC, datetime
from pathlib import Path

from planner.documents.pdf_common import build_pdf, figure, title_block
from planner.documents.plan_pdf_cells import keep, plain
from planner.documents.plan_pdf_scrubber import scrubber_section
from planner.documents.plan_pdf_sections import (
    cautions,
    notes_and_warnings,
    signatures,
    title_facts,
)
from planner.documents.plan_pdf_tables import (
    changeover_table,
    confidence_table,
    so2_table,
    stretch_table,
    totals_table,
)

TITLE = "Voyage fuel changeover plan"
SUBTITLE = ("MARPOL Annex VI regulation 14: when and where each fuel changeover starts so that "
            "every consumer burns compliant fuel from the boundary of each emission control "
            "area, when the switch back may begin after exit, and the fuel the voyage needs. "
            "For the master and the chief engineer to check and sign before sailing. Times are "
            "UTC unless marked ship's time; positions are WGS84 in degrees and minutes.")


def write_plan_pdf(target: str | Path, doc: dict, *, printed_at: datetime | None = None,
                   figures: Sequence[tuple[bytes, str]] = ()) -> None:
    """Write the plan of ``doc`` (the ``changeover plan --json`` document) to ``target``.

    All-or-nothing: the file appears complete or not at all. ``printed_at`` (aware,
    default now, UTC) is printed in the footer. ``figures`` are (PNG, caption) pairs
    (the map and the sulphur chart) printed after the changeover tables.
    """
    printed_at = printed_at or datetime.now(UTC).replace(microsecond=0)
    v = doc.get("voyage", {})
    ship = plain(v.get("ship", "—"))
    imo = plain(v.get("imo") or "—")
    story = title_block(TITLE, SUBTITLE, title_facts(doc))
    story += changeover_table(doc)
    story += confidence_table(doc)
    story += scrubber_section(doc)
    for png, caption in figures:
        story += figure(png, plain(caption))
    story += keep(stretch_table(doc))
    story += keep(totals_table(doc))
    story += keep(so2_table(doc))
    story += notes_and_warnings(doc)
    story += cautions(doc)
    story += signatures()
    build_pdf(target, story, title=TITLE, header_right=f"{ship} · IMO {imo}",
              footer_middle=plain(f"voyage {v.get('name', '')}").strip(),
              printed_at=printed_at)
