"""``changeover procedure``: print the ship's written changeover procedure (PDF).

MARPOL Annex VI regulation 14.6 asks the ship to carry a written procedure
showing how the changeover is done. This command gathers the ship's facts
(:mod:`planner.procedure.facts`) and prints them (:mod:`planner.documents.procedure_pdf`);
everything is computed before anything is written, and bad input writes nothing.
"""

from __future__ import annotations

from pathlib import Path
from typing import Annotated

import typer


def _sha256(path: Path) -> str:
    import hashlib

    return hashlib.sha256(path.read_bytes()).hexdigest()


def procedure_cmd(
    ship: Annotated[Path, typer.Argument(help="Ship file, or a voyage file (its fuels and tank "
                                         "contents are used).")],
    pdf: Annotated[Path | None, typer.Option(help="The PDF to write.")] = None,
    limit: Annotated[float, typer.Option(help="Sulphur limit in the area, % m/m.")] = 0.10,
    target_pct: Annotated[float | None, typer.Option(help="Sulphur to aim at, % m/m (default "
                                                     "90 % of the limit, or the voyage's "
                                                     "margin).")] = None,
    margin: Annotated[float | None, typer.Option(help="Be compliant this long before the "
                                                 "boundary, h (default 1, or the voyage's).")]
    = None,
    revision: Annotated[str, typer.Option(help="Revision of the procedure, as printed.")] = "0",
    json_out: Annotated[bool, typer.Option("--json", help="Print the procedure's figures as "
                                           "JSON.")] = False,
) -> None:
    """The ship-specific written changeover procedure (regulation 14.6) as a PDF."""
    from geo.errors import InputError
    from planner.flushing import FlushError
    from planner.procedure.facts import (
        DEFAULT_MARGIN_H,
        DEFAULT_TARGET_FRACTION,
        facts_json,
        gather,
    )
    from planner.voyage.onboard import load_ship_or_voyage

    if pdf is None and not json_out:
        raise InputError("--pdf", "", None, "the PDF file to write, e.g. --pdf procedure.pdf")
    system, voyage = load_ship_or_voyage(ship)
    if not 0.0 < limit <= 5.0:
        raise InputError("--limit", "", limit, "a sulphur limit in % m/m, above 0 and at most 5")
    fraction = voyage.sulphur_target_fraction if voyage else DEFAULT_TARGET_FRACTION
    target = target_pct if target_pct is not None else fraction * limit
    if not 0.0 < target <= limit:
        raise InputError("--target-pct", "", target_pct, f"a target above 0 and at most the "
                         f"limit {limit} % m/m")
    margin_h = margin if margin is not None else (voyage.time_margin_h if voyage
                                                  else DEFAULT_MARGIN_H)
    if not 0.0 <= margin_h <= 48.0:
        raise InputError("--margin", "", margin, "hours, 0 to 48")
    if not revision.strip() or len(revision) > 20:
        raise InputError("--revision", "", revision, "a short revision mark, e.g. 0, 1 or B")
    try:
        facts = gather(system, limit_pct=limit, target_pct=target, margin_h=margin_h,
                       voyage=voyage.name if voyage else "")
    except FlushError as e:
        raise InputError(str(ship), "fuel system", str(e), "a system that can run the "
                         "changeover (tanks not running dry, pumps above consumption)") from None
    sources = [(ship.name, _sha256(ship))]
    if voyage is not None:
        ship_file = Path(voyage.ship_file)
        sources.append((ship_file.name, _sha256(ship_file)))
    if pdf is not None:
        from planner.documents.procedure_pdf import write_procedure_pdf

        write_procedure_pdf(pdf, facts, revision=revision.strip(), sources=sources)
    if json_out:
        from planner.common.outputs import dumps

        doc = facts_json(facts)
        doc["sources"] = [{"file": n, "sha256": h} for n, h in sources]
        typer.echo(dumps(doc))
        return
    typer.echo(f"wrote {pdf}: the changeover procedure of {system.ship.name}, revision "
               f"{revision.strip()}, {len(facts.circuits)} circuit(s)")
    for w in facts.warnings:
        typer.echo(f"note: {w}")
