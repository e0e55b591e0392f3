"""``changeover procedure``: print the ship's written changeover procedure (PDF).

MARPOL Annex VI regulation 14.6 asks the ship to carry a written procedure
showing how the changeover is done. This command gathers the ship's facts
(:mod:`planner.procedure.facts`) and prints them (:mod:`planner.documents.procedure_pdf`);
everything is computed before anything is written, and bad input writes nothing.
The module holds the command, its two parts (gather the facts, name the source
files with their hashes) and takes the shared options from
:mod:`planner.cli.options`.
"""

from __future__ import annotations

from pathlib import Path
from typing import TYPE_CHECKING, Annotated

import typer

from planner.cli.csv_tables import CsvOpt, check_csv_folder
from planner.cli.options import (
    JsonOpt,
    LimitOpt,
    MarginOpt,
    TargetOpt,
    check_limit,
    check_margin,
    check_target,
)
from planner.common.defaults import DEFAULT_LIMIT_PCT

if TYPE_CHECKING:
    from planner.procedure.facts import ProcedureFacts
    from planner.ship.system import FuelSystem
    from planner.voyage.voyage_file import Voyage


def _sha256(path: Path) -> str:
    """The file's SHA-256, hexadecimal."""
    import hashlib

    return hashlib.sha256(path.read_bytes()).hexdigest()


def procedure_cmd(
    ship: Annotated[Path, typer.Argument(help="Ship file, or a voyage file (its fuels and tank "
                                         "contents are used).")],
    pdf: Annotated[Path | None, typer.Option(help="The PDF to write.")] = None,
    limit: LimitOpt = DEFAULT_LIMIT_PCT,
    target_pct: TargetOpt = None,
    margin: MarginOpt = None,
    revision: Annotated[str, typer.Option(help="Revision of the procedure, as printed: up to "
                                          "20 characters.")] = "0",
    json_out: JsonOpt = False,
    csv: CsvOpt = None,
) -> None:
    """The ship-specific written changeover procedure (regulation 14.6) as a PDF."""
    from geo.errors import InputError
    from planner.procedure.facts import facts_json
    from planner.voyage.onboard import load_ship_or_voyage

    if pdf is None and csv is None and not json_out:
        raise InputError("--pdf", "", None, "the PDF file to write, e.g. --pdf procedure.pdf "
                         "(or --csv FOLDER, or --json)")
    from planner.common.outputs import check_outputs

    check_outputs({"--pdf": pdf})
    check_csv_folder(csv)
    check_limit(limit)
    if not revision.strip() or len(revision) > 20:
        raise InputError("--revision", "", revision, "a short revision mark, e.g. 0, 1 or B")
    system, voyage = load_ship_or_voyage(ship)
    target = check_target(target_pct, limit, voyage)
    margin_h = check_margin(margin, voyage)
    facts = _gather(ship, system, voyage, limit, target, margin_h)
    sources = _sources(ship, voyage)
    doc = facts_json(facts)
    doc["sources"] = [{"file": n, "sha256": h} for n, h in sources]
    written = []
    if pdf is not None:
        from planner.documents.procedure_pdf import write_procedure_pdf

        write_procedure_pdf(pdf, facts, revision=revision.strip(), sources=sources)
    if csv is not None:
        from planner.cli.csv_tables import procedure_csv, write_csv_dir

        written = write_csv_dir(csv, procedure_csv(doc))
    if json_out:
        from planner.common.outputs import dumps

        typer.echo(dumps(doc))
        return
    _print(doc)
    if pdf is not None:
        typer.echo(f"wrote {pdf}: the changeover procedure of {system.ship.name}, revision "
                   f"{revision.strip()}, {len(facts.circuits)} circuit(s)")
    for p in written:
        typer.echo(f"wrote {p}")
    from planner.cli.console import echo_lines, text_lines, width

    for w in facts.carriage:
        echo_lines(text_lines(w, width(), "caution: carriage ban: "))
    for w in facts.warnings:
        echo_lines(text_lines(w, width(), "note: "))


def procedure_tables(doc: dict) -> list:
    """The terminal tables: each circuit's duration against main engine load, with when to
    start before the boundary (the procedure's central table)."""
    from planner.cli.text_table import table

    def f(x: float | None, fmt: str) -> str:
        return "—" if x is None else format(x, fmt)

    out = []
    for c in doc["circuits"]:
        rows = [[f(r["load_pct"], ".0f"), f(r["speed_kn"], ".1f"), f(r["time_to_limit_h"], ".2f"),
                 f(r["time_to_target_h"], ".2f"), f(r["start_before_h"], ".2f"),
                 f(r["start_before_nm"], ",.1f")] for r in c["rows"]]
        out.append(table(f"Circuit {c['name']} ({c['from_fuel']} → {c['to_fuel']}, "
                         f"{c['total_m3']:.3f} m³ to flush): how long a changeover takes",
                         [("Load % MCR", "r"), ("Speed kn", "r"), ("To limit h", "r"),
                          ("To target h", "r"), ("Start before the boundary h", "r"),
                          ("Start before the boundary nm", "r")], rows))
    return out


def _print(doc: dict) -> None:
    from planner.cli.console import echo_lines, table_lines, width

    echo_lines(table_lines(procedure_tables(doc), width()))


def _gather(ship: Path, system: FuelSystem, voyage: Voyage | None, limit: float, target: float,
            margin_h: float) -> ProcedureFacts:
    """The procedure's facts (InputError when the system cannot run the changeover)."""
    from geo.errors import InputError
    from planner.flushing import FlushError, expected_for
    from planner.procedure.facts import gather

    try:
        return gather(system, limit_pct=limit, target_pct=target, margin_h=margin_h,
                      voyage=voyage.name if voyage else "")
    except FlushError as e:
        raise InputError(str(ship), "fuel system", str(e), expected_for(
            e, "a system that can run the changeover (tanks not running dry, pumps above "
            "consumption)")) from None


def _sources(ship: Path, voyage: Voyage | None) -> list[tuple[str, str]]:
    """The files the procedure is made from, with their SHA-256, as printed on it."""
    sources = [(ship.name, _sha256(ship))]
    if voyage is not None:
        ship_file = Path(voyage.ship_file)
        sources.append((ship_file.name, _sha256(ship_file)))
    return sources
