"""``changeover log show|verify|export|print``: reading the journal, never writing it.

Plain command functions, registered on ``log_app`` by :mod:`planner.cli.log`.
Rich is imported only by the listing, reportlab only by ``print``.
"""

from __future__ import annotations

from pathlib import Path
from typing import Annotated

import typer

from planner.cli.log_options import (
    AreaOpt,
    JournalOpt,
    SinceOpt,
    UntilOpt,
    VoyageOpt,
    journal_path,
)
from planner.cli.options import JsonOpt


def show_cmd(
    journal: JournalOpt = None, voyage: VoyageOpt = None, area: AreaOpt = None,
    since: SinceOpt = None, until: UntilOpt = None,
    kind: Annotated[list[str] | None, typer.Option(help="Only these kinds (start, complete, "
                                                   "back, back-complete, tanks, sample, note, "
                                                   "trend, scrubber, report, correction, "
                                                   "fuel, setup).")] = None,
    json_out: JsonOpt = False,
) -> None:
    """List entries (filtered by voyage, area, dates or kind), corrections beside originals."""
    from planner.common.outputs import dumps
    from planner.journal import Journal
    from planner.journal.listing import list_rows, parse_day_opt, parse_kinds, rows_json

    kinds = parse_kinds(kind or [])
    d0, d1 = parse_day_opt(since, "--since"), parse_day_opt(until, "--until")
    with Journal.open_read(journal_path(journal)) as j:
        state = j.state()
    rows = list_rows(state, voyage, area, d0, d1, kinds)
    if json_out:
        typer.echo(dumps({"ship": {"name": state.ship_name, "imo": state.imo_number},
                          "entries": rows_json(state, rows)}))
        return
    from planner.cli.log_table import Column, output_width, render, use_ansi

    columns = [Column("No.", "r"), Column("Kind"), Column("UTC"), Column("Ship's time"),
               Column("Position"), Column("Area and details", wrap=True),
               Column("By, status", wrap=True)]
    cells = [[str(r.seq), r.kind, r.utc, r.ship_time, r.position,
              "; ".join(x for x in (r.area, r.details) if x),
              "; ".join(x for x in (r.who, r.status) if x)] for r in rows]
    typer.echo(render(f"{state.ship_name} (IMO {state.imo_number}): {len(rows)} of "
                      f"{state.last_seq} entries", columns, cells, output_width(),
                      [r.replaced for r in rows], use_ansi()))


def verify_cmd(
    journal: JournalOpt = None,
    hash_: Annotated[str | None, typer.Option("--hash", help="Last hash from a printed copy: "
                                              "check the journal still holds it.")] = None,
    json_out: JsonOpt = False,
) -> None:
    """Check the hash chain: names every changed, removed or moved entry (exit 1 if any)."""
    from geo.errors import InputError
    from planner.common.outputs import dumps
    from planner.journal import Journal
    from planner.journal.canonical import is_hash
    from planner.journal.listing import verify_json, verify_lines

    if hash_ is not None and not is_hash(hash_.strip().lower()):
        raise InputError("--hash", "", hash_, "a SHA-256 hash: 64 hexadecimal digits")
    path = journal_path(journal)
    with Journal.open_read(path) as j:
        report = j.verify(hash_.strip().lower() if hash_ else None)
    if json_out:
        typer.echo(dumps(verify_json(path.name, report)))
    else:
        typer.echo("\n".join(verify_lines(path.name, report)))
    if not report.ok:
        raise typer.Exit(1)


def export_cmd(
    journal: JournalOpt = None,
    out: Annotated[Path | None, typer.Option(help="Write here (default: standard output).")]
    = None,
    fmt: Annotated[str | None, typer.Option("--format", help="csv or json (default: from the "
                                            "--out extension, else json).")] = None,
    voyage: VoyageOpt = None, area: AreaOpt = None, since: SinceOpt = None,
    until: UntilOpt = None,
) -> None:
    """Export entries as CSV or JSON (a whole-journal JSON can be re-checked without us)."""
    from geo.errors import InputError
    from planner.common.outputs import check_outputs, dumps, write_text
    from planner.journal import Journal
    from planner.journal.book import describe_selection
    from planner.journal.export import export_csv, export_json
    from planner.journal.listing import list_rows, parse_day_opt

    kind = (fmt or (out.suffix.lstrip(".") if out else "json")).lower()
    check_outputs({"--out": out})
    if kind not in ("csv", "json"):
        raise InputError("--format", "", fmt or str(out), "csv or json")
    d0, d1 = parse_day_opt(since, "--since"), parse_day_opt(until, "--until")
    path = journal_path(journal)
    not_the_journal(out, path, "--out")
    with Journal.open_read(path) as j:
        state = j.state()
        report = j.verify()
    seqs = [r.seq for r in list_rows(state, voyage, area, d0, d1)]
    stored = [state.stored[n] for n in seqs]
    if kind == "csv":
        text = export_csv(stored, state)
    else:
        text = dumps(export_json(stored, state, report,
                                 describe_selection(voyage, area, d0, d1))) + "\n"
    if out is None:
        typer.echo(text, nl=False)
        return
    write_text(out, text)
    typer.echo(f"wrote {out} ({len(stored)} entries)")


def print_cmd(
    pdf: Annotated[Path | None, typer.Option(help="The PDF to write.")] = None,
    journal: JournalOpt = None, voyage: VoyageOpt = None, area: AreaOpt = None,
    since: SinceOpt = None, until: UntilOpt = None,
) -> None:
    """Print the changeover record (PDF) for a voyage, an area or a period."""
    from geo.errors import InputError

    if pdf is None:
        raise InputError("--pdf", "", None, "the PDF file to write, e.g. --pdf record.pdf")
    from planner.common.outputs import check_outputs

    check_outputs({"--pdf": pdf})
    from planner.documents.record_pdf import write_record_pdf
    from planner.journal import Journal
    from planner.journal.book import make_book
    from planner.journal.listing import parse_day_opt

    d0, d1 = parse_day_opt(since, "--since"), parse_day_opt(until, "--until")
    path = journal_path(journal)
    not_the_journal(pdf, path, "--pdf")
    with Journal.open_read(path) as j:
        state = j.state()
        report = j.verify()
    book = make_book(state, voyage, area, d0, d1)
    from reportlab.platypus.doctemplate import LayoutError

    try:
        write_record_pdf(pdf, book, report, journal_name=path.name)
    except LayoutError:
        raise InputError(str(path), "", "an entry too long for a page", "entries this "
                         "program wrote (names at most 120 characters); show --json "
                         "lists them") from None
    typer.echo(f"wrote {pdf}: {len(book.standing)} changeovers, {len(book.scrubber)} scrubber "
               f"events, {len(book.reports)} documents made, {len(book.others)} other "
               f"entries; journal last hash {report.last_hash}")


def not_the_journal(out: Path | None, journal: Path, option: str) -> None:
    """Refuse an output file that is the journal itself (or its SQLite log files)."""
    if out is None:
        return
    import os

    from geo.errors import InputError

    target = os.path.realpath(out)
    for p in (journal, Path(f"{journal}-wal"), Path(f"{journal}-shm")):
        if target == os.path.realpath(p):
            raise InputError(option, "", str(out), "a file other than the journal (writing "
                                                   "there would replace the record)")
