"""``changeover log ...``: the ship's changeover journal from the command line.

Every subcommand takes ``--journal PATH`` (or the ``CHANGEOVER_JOURNAL``
environment variable). Entries are checked and written in one transaction:
bad input is one line on standard error, exit status 2, nothing written.
Rich is imported only by the listing, reportlab only by ``print``.
"""

from __future__ import annotations

from pathlib import Path
from typing import Annotated

import typer

log_app = typer.Typer(
    name="log", no_args_is_help=True,
    help="The ship's changeover journal: record each changeover (the regulation 14.6 items), "
         "tank soundings, samples and notes; list, verify, export and print it. Entries are "
         "never changed: a correction is a new entry that points at the one it corrects.")

JournalOpt = Annotated[Path | None, typer.Option(
    "--journal", "-j", envvar="CHANGEOVER_JOURNAL", show_envvar=False,
    help="The ship's journal file (or set CHANGEOVER_JOURNAL).")]
RankOpt = Annotated[str | None, typer.Option(envvar="CHANGEOVER_RANK", show_envvar=False,
                                             help="Your rank as you sign, e.g. \"2nd Engineer\" "
                                                  "(or set CHANGEOVER_RANK).")]
NameOpt = Annotated[str | None, typer.Option(envvar="CHANGEOVER_NAME", show_envvar=False,
                                             help="Your name as you sign (or set "
                                                  "CHANGEOVER_NAME).")]
AtOpt = Annotated[str | None, typer.Option(help="When: ISO 8601 with its offset, UTC "
                                           "(2027-06-02T14:05Z) or ship's time "
                                           "(2027-06-02T16:05+02:00). Default: now.")]
TzOpt = Annotated[str | None, typer.Option(help="Ship's time as a UTC offset, e.g. +02:00 "
                                           "(default: the offset on --at, else the last "
                                           "entry's).")]
PosOpt = Annotated[str | None, typer.Option("--pos", help="Position, latitude then longitude: "
                                            "\"54°12.3'N 003°30.0'W\" or \"54.205, -3.5\".")]
AreaOpt = Annotated[str | None, typer.Option(help="Control area, e.g. \"Corran Sea ECA\".")]
VoyageOpt = Annotated[str | None, typer.Option(help="Voyage (default: the last entry's).")]
CircuitOpt = Annotated[str | None, typer.Option(help="Fuel circuit, e.g. \"main engine\".")]
FuelOpt = Annotated[list[str] | None, typer.Option(
    "--fuel", help="Fuel by its journal name (see log fuel); for a changeover the fuel changed "
                   "to. Repeatable.")]
FromFuelOpt = Annotated[list[str] | None, typer.Option(
    "--from-fuel", help="Fuel changed from (repeatable).")]
TankOpt = Annotated[list[str] | None, typer.Option(
    "--tank", help="Tank sounding NAME=VOLUME@TEMP (m³ observed at °C), e.g. "
                   "\"MGO service=12.5@32\"; /FUEL at the end when the entry names more than "
                   "one fuel. Repeat for each tank.")]
RemarksOpt = Annotated[str | None, typer.Option(help="Remarks in words.")]
PlanOpt = Annotated[Path | None, typer.Option("--from-plan", help="Plan JSON (changeover plan "
                                              "VOYAGE --json) to prefill from.")]
NumberOpt = Annotated[int | None, typer.Option("--changeover", help="Which changeover of the "
                                               "plan, from 1.")]
AsPlannedOpt = Annotated[bool, typer.Option("--as-planned", help="Take the time and position "
                                            "not typed from the plan (confirming them).")]
FollowsOpt = Annotated[int | None, typer.Option(help="Entry number of the start this "
                                                "completes (default: the open one).")]
SinceOpt = Annotated[str | None, typer.Option(help="From this UTC date, YYYY-MM-DD.")]
UntilOpt = Annotated[str | None, typer.Option(help="To this UTC date, YYYY-MM-DD (inclusive).")]


def _path(journal: Path | None) -> Path:
    """The journal file: ``--journal`` (or CHANGEOVER_JOURNAL) as a journal path, or as a
    ship file (``.toml``) whose ``[ship] journal`` key names it; else CHANGEOVER_SHIP."""
    import os

    from geo.errors import InputError

    if (journal is None or not str(journal)) and os.environ.get("CHANGEOVER_SHIP"):
        journal = Path(os.environ["CHANGEOVER_SHIP"])
    if journal is None or not str(journal):
        raise InputError("--journal", "", None, "the journal file or the ship file (or set "
                         "CHANGEOVER_JOURNAL or CHANGEOVER_SHIP)")
    if journal.suffix.lower() == ".toml":
        from planner.ship.ship_file import load_ship

        ship = load_ship(journal)
        if not ship.ship.journal:
            raise InputError(journal, "ship.journal", None, "the journal file's name in the "
                             "ship file's [ship] table")
        return Path(ship.ship.journal)
    return journal


def _typed(rank, name, at=None, tz=None, pos=None, area=None, voyage=None, circuit=None,
           fuel=None, from_fuel=None, tank=None, remarks=None, follows=None, plan=None,
           changeover=None, as_planned=False):
    from planner.journal.compose import Typed

    return Typed(rank, name, at, tz, pos, area, voyage, circuit, tuple(fuel or ()),
                 tuple(from_fuel or ()), tuple(tank or ()), remarks, follows,
                 str(plan) if plan else None, changeover, as_planned)


def _append(journal: Path | None, make) -> None:
    from planner.journal import Journal
    from planner.journal.describe import summary

    with Journal.open(_path(journal)) as j:
        stored = j.append(make)
        for line in summary(stored, j.state()):
            typer.echo(line)


def _step(kind: str, journal, rank, name, at, tz, pos, area, voyage, circuit, fuel, from_fuel,
          tank, remarks, follows, plan, changeover, as_planned) -> None:
    from planner.journal.compose import changeover_entry

    t = _typed(rank, name, at, tz, pos, area, voyage, circuit, fuel, from_fuel, tank, remarks,
               follows, plan, changeover, as_planned)
    _append(journal, changeover_entry(kind, t))


@log_app.command("init")
def init_cmd(
    journal: JournalOpt = None,
    ship: Annotated[str | None, typer.Option(help="Ship's name.")] = None,
    imo: Annotated[str | None, typer.Option(help="IMO number, 7 digits (check digit tested).")]
    = None,
    tz: TzOpt = None,
    tank: Annotated[list[str] | None, typer.Option(
        "--tank", help="A tank name entries may use (repeatable; none: any name).")] = None,
    rank: RankOpt = None, name: NameOpt = None,
) -> None:
    """Start a new journal for a ship (never overwrites a file)."""
    from planner.journal import Journal
    from planner.journal.compose import setup_entry
    from planner.journal.describe import summary

    make = setup_entry(_typed(rank, name, tz=tz), ship, imo, tuple(tank or ()))
    with Journal.create(_path(journal), make) as j:
        s = j.state()
        for line in summary(s.stored[1], s):
            typer.echo(line)


@log_app.command("setup")
def setup_cmd(
    journal: JournalOpt = None,
    tank: Annotated[list[str] | None, typer.Option("--tank", help="Tank name to add.")] = None,
    ship: Annotated[str | None, typer.Option(help="New ship's name.")] = None,
    imo: Annotated[str | None, typer.Option(help="New IMO number.")] = None,
    tz: TzOpt = None, rank: RankOpt = None, name: NameOpt = None,
) -> None:
    """Add tank names (or change the ship's name) with a new set-up entry."""
    from planner.journal.compose import setup_entry

    _append(journal, setup_entry(_typed(rank, name, tz=tz), ship, imo, tuple(tank or ())))


@log_app.command("fuel")
def fuel_cmd(
    fuel: Annotated[str, typer.Argument(help="The ship's name for the fuel, e.g. MGO.")],
    sulphur: Annotated[float | None, typer.Option(help="Sulphur, % m/m, from the delivery "
                                                  "note.")] = None,
    density: Annotated[float | None, typer.Option(help="Density at 15 °C, kg/m³, from the "
                                                  "note.")] = None,
    bdn: Annotated[str | None, typer.Option(help="Bunker delivery note number or reference.")]
    = None,
    grade: Annotated[str, typer.Option(help="Grade, e.g. DMA or RMG 380.")] = "",
    journal: JournalOpt = None, at: AtOpt = None, tz: TzOpt = None, remarks: RemarksOpt = None,
    rank: RankOpt = None, name: NameOpt = None,
) -> None:
    """Register a fuel on board with its delivery-note data (a new one replaces the old)."""
    from planner.journal.compose import fuel_entry

    t = _typed(rank, name, at, tz, remarks=remarks)
    _append(journal, fuel_entry(t, fuel, grade, sulphur, density, bdn))


def _register_step(command: str, kind_name: str, doc: str) -> None:
    def step(
        journal: JournalOpt = None, at: AtOpt = None, tz: TzOpt = None, pos: PosOpt = None,
        area: AreaOpt = None, voyage: VoyageOpt = None, circuit: CircuitOpt = None,
        fuel: FuelOpt = None, from_fuel: FromFuelOpt = None, tank: TankOpt = None,
        remarks: RemarksOpt = None, follows: FollowsOpt = None, plan: PlanOpt = None,
        changeover: NumberOpt = None, as_planned: AsPlannedOpt = False,
        rank: RankOpt = None, name: NameOpt = None,
    ) -> None:
        from planner.journal import entries

        _step(getattr(entries, kind_name), journal, rank, name, at, tz, pos, area, voyage,
              circuit, fuel, from_fuel, tank, remarks, follows, plan, changeover, as_planned)

    step.__doc__ = doc
    log_app.command(command)(step)


_register_step("start", "STARTED", "Changeover to compliant fuel started (before entry).")
_register_step("complete", "COMPLETED",
               "Changeover to compliant fuel completed, before entry: regulation 14.6 record "
               "(time, position, --tank for each tank of compliant fuel).")
_register_step("back", "BACK_COMMENCED",
               "Changeover back to regular fuel commenced, after exit: regulation 14.6 record "
               "(time, position, --tank for each tank of compliant fuel).")
_register_step("back-complete", "BACK_COMPLETED", "Changeover back to regular fuel completed.")


@log_app.command("tanks")
def tanks_cmd(
    journal: JournalOpt = None, tank: TankOpt = None, fuel: FuelOpt = None, at: AtOpt = None,
    tz: TzOpt = None, pos: PosOpt = None, area: AreaOpt = None, voyage: VoyageOpt = None,
    remarks: RemarksOpt = None, rank: RankOpt = None, name: NameOpt = None,
) -> None:
    """Tank soundings: volume and temperature, corrected to 15 °C, with mass."""
    from planner.journal.compose import tanks_entry

    _append(journal, tanks_entry(_typed(rank, name, at, tz, pos, area, voyage, fuel=fuel,
                                        tank=tank, remarks=remarks)))


@log_app.command("sample")
def sample_cmd(
    number: Annotated[str | None, typer.Option(help="Sample number on the label.")] = None,
    seal: Annotated[str | None, typer.Option(help="Seal number.")] = None,
    point: Annotated[str | None, typer.Option(help="Where drawn, e.g. \"ME inlet\".")] = None,
    journal: JournalOpt = None, fuel: FuelOpt = None, at: AtOpt = None, tz: TzOpt = None,
    pos: PosOpt = None, area: AreaOpt = None, voyage: VoyageOpt = None,
    remarks: RemarksOpt = None, rank: RankOpt = None, name: NameOpt = None,
) -> None:
    """A fuel sample drawn and sealed."""
    from planner.journal.compose import sample_entry

    t = _typed(rank, name, at, tz, pos, area, voyage, fuel=fuel, remarks=remarks)
    _append(journal, sample_entry(t, number, seal, point))


@log_app.command("note")
def note_cmd(
    text: Annotated[str, typer.Argument(help="The note.")],
    journal: JournalOpt = None, at: AtOpt = None, tz: TzOpt = None, pos: PosOpt = None,
    area: AreaOpt = None, voyage: VoyageOpt = None, rank: RankOpt = None, name: NameOpt = None,
) -> None:
    """A note in words."""
    from planner.journal.compose import note_entry

    _append(journal, note_entry(_typed(rank, name, at, tz, pos, area, voyage), text))


@log_app.command("correct")
def correct_cmd(
    entry: Annotated[int, typer.Argument(help="Number of the entry to correct.")],
    reason: Annotated[str | None, typer.Option(help="Why (printed beside the correction).")]
    = None,
    void: Annotated[bool, typer.Option("--void", help="Strike the entry out.")] = False,
    journal: JournalOpt = None, at: AtOpt = None, tz: TzOpt = None, pos: PosOpt = None,
    area: AreaOpt = None, voyage: VoyageOpt = None, circuit: CircuitOpt = None,
    fuel: FuelOpt = None, from_fuel: FromFuelOpt = None,
    tank: Annotated[list[str] | None, typer.Option(
        "--tank", help="Tank soundings (replace the entry's whole list).")] = None,
    remarks: RemarksOpt = None, follows: FollowsOpt = None,
    text: Annotated[str | None, typer.Option(help="Note text.")] = None,
    number: Annotated[str | None, typer.Option(help="Sample number.")] = None,
    seal: Annotated[str | None, typer.Option(help="Seal number.")] = None,
    point: Annotated[str | None, typer.Option(help="Sampling point.")] = None,
    rank: RankOpt = None, name: NameOpt = None,
) -> None:
    """Correct an entry: a new entry with the corrected values; the original stays."""
    from planner.journal.compose import correction_entry

    t = _typed(rank, name, at, tz, pos, area, voyage, circuit, fuel, from_fuel, tank, remarks,
               follows)
    _append(journal, correction_entry(entry, t, reason, void, text, number, seal, point))


@log_app.command("show")
def show_cmd(
    journal: JournalOpt = None, voyage: VoyageOpt = None, area: AreaOpt = None,
    since: SinceOpt = None, until: UntilOpt = None,
    kind: Annotated[list[str] | None, typer.Option(help="Only these kinds (start, complete, "
                                                   "back, back-complete, tanks, sample, note, "
                                                   "correction, fuel, setup).")] = None,
    json_out: Annotated[bool, typer.Option("--json", help="Print JSON.")] = False,
) -> None:
    """List entries (filtered by voyage, area, dates or kind), corrections beside originals."""
    from planner.common.outputs import dumps
    from planner.journal import Journal
    from planner.journal.listing import list_rows, parse_day_opt, parse_kinds, rows_json

    kinds = parse_kinds(kind or [])
    d0, d1 = parse_day_opt(since, "--since"), parse_day_opt(until, "--until")
    with Journal.open(_path(journal)) as j:
        state = j.state()
    rows = list_rows(state, voyage, area, d0, d1, kinds)
    if json_out:
        typer.echo(dumps({"ship": {"name": state.ship_name, "imo": state.imo_number},
                          "entries": rows_json(state, rows)}))
        return
    from planner.cli.console import console, table

    t = table(f"{state.ship_name} (IMO {state.imo_number}): {len(rows)} of "
              f"{state.last_seq} entries", [
                  ("No.", "r"), ("Kind", "l"), ("UTC", "l"), ("Ship's time", "l"),
                  ("Position", "l"), ("Area", "w"), ("Details", "w"), ("By", "w"),
                  ("Status", "w")])
    for col in t.columns:
        col.no_wrap = col.header in ("No.", "Kind", "UTC", "Ship's time", "Position")
    for r in rows:
        cells = [str(r.seq), r.kind, r.utc, r.ship_time, r.position, r.area, r.details, r.who]
        t.add_row(*[f"[strike]{c}[/strike]" if r.replaced else c for c in cells], r.status)
    console().print(t)


@log_app.command("verify")
def verify_cmd(
    journal: JournalOpt = None,
    hash_: Annotated[str | None, typer.Option("--hash", help="Last hash from a printed copy: "
                                              "check the journal still holds it.")] = None,
    json_out: Annotated[bool, typer.Option("--json", help="Print JSON.")] = False,
) -> None:
    """Check the hash chain: names every changed, removed or moved entry (exit 1 if any)."""
    from geo.errors import InputError
    from planner.common.outputs import dumps
    from planner.journal import Journal
    from planner.journal.canonical import is_hash
    from planner.journal.listing import verify_json, verify_lines

    if hash_ is not None and not is_hash(hash_.strip().lower()):
        raise InputError("--hash", "", hash_, "a SHA-256 hash: 64 hexadecimal digits")
    path = _path(journal)
    with Journal.open(path) as j:
        report = j.verify(hash_.strip().lower() if hash_ else None)
    if json_out:
        typer.echo(dumps(verify_json(path.name, report)))
    else:
        typer.echo("\n".join(verify_lines(path.name, report)))
    if not report.ok:
        raise typer.Exit(1)


@log_app.command("export")
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
    from planner.common.outputs import dumps, write_atomic
    from planner.journal import Journal
    from planner.journal.book import describe_selection
    from planner.journal.export import export_csv, export_json
    from planner.journal.listing import list_rows, parse_day_opt

    kind = (fmt or (out.suffix.lstrip(".") if out else "json")).lower()
    if kind not in ("csv", "json"):
        raise InputError("--format", "", fmt or str(out), "csv or json")
    d0, d1 = parse_day_opt(since, "--since"), parse_day_opt(until, "--until")
    with Journal.open(_path(journal)) as j:
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
    write_atomic(out, lambda p: Path(p).write_text(text, encoding="utf-8"))
    typer.echo(f"wrote {out} ({len(stored)} entries)")


@log_app.command("print")
def print_cmd(
    pdf: Annotated[Path | None, typer.Option(help="The PDF to write.")] = None,
    journal: JournalOpt = None, voyage: VoyageOpt = None, area: AreaOpt = None,
    since: SinceOpt = None, until: UntilOpt = None,
) -> None:
    """Print the changeover record (PDF) for a voyage, an area or a period."""
    from geo.errors import InputError

    if pdf is None:
        raise InputError("--pdf", "", None, "the PDF file to write, e.g. --pdf record.pdf")
    from planner.documents.record_pdf import write_record_pdf
    from planner.journal import Journal
    from planner.journal.book import make_book
    from planner.journal.listing import parse_day_opt

    d0, d1 = parse_day_opt(since, "--since"), parse_day_opt(until, "--until")
    path = _path(journal)
    with Journal.open(path) as j:
        state = j.state()
        report = j.verify()
    book = make_book(state, voyage, area, d0, d1)
    write_record_pdf(pdf, book, report, journal_name=path.name)
    typer.echo(f"wrote {pdf}: {len(book.changeovers)} changeovers, {len(book.others)} other "
               f"entries; journal last hash {report.last_hash}")
