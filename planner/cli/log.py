"""``changeover log ...``: the ship's changeover journal from the command line.

Every subcommand takes ``--journal PATH`` (or the ``CHANGEOVER_JOURNAL``
environment variable). Entries are checked and written in one transaction:
bad input is one line on standard error, exit status 2, nothing written.
This module holds ``log_app`` and the commands that write entries (init,
setup, fuel, the four changeover steps, tanks, sample, note, correct); the
options are in :mod:`planner.cli.log_options` and the commands that read the
journal (show, verify, export, print) in :mod:`planner.cli.log_read`,
registered here.
"""

from __future__ import annotations

from pathlib import Path
from typing import TYPE_CHECKING, Annotated

import typer

from planner.cli import log_read
from planner.cli.log_options import (
    AreaOpt,
    AsPlannedOpt,
    AtOpt,
    CircuitOpt,
    FollowsOpt,
    FromFuelOpt,
    FuelOpt,
    JournalOpt,
    NameOpt,
    NumberOpt,
    PlanOpt,
    PosOpt,
    RankOpt,
    RemarksOpt,
    TankOpt,
    TzOpt,
    VoyageOpt,
    journal_path,
)

if TYPE_CHECKING:
    from planner.journal.compose import Typed
    from planner.journal.store import Make

log_app = typer.Typer(
    name="log",
    help="The ship's changeover journal: record each changeover (the regulation 14.6 items), "
         "tank soundings, samples and notes; list, verify, export and print it. Entries are "
         "never changed: a correction is a new entry that points at the one it corrects.")
"""The ``log`` group; :mod:`planner.cli` adds its help when given no command, and the
summaries its help lists."""


def _typed(rank: str | None, name: str | None, at: str | None = None, tz: str | None = None,
           pos: str | None = None, area: str | None = None, voyage: str | None = None,
           circuit: str | None = None, fuel: list[str] | None = None,
           from_fuel: list[str] | None = None, tank: list[str] | None = None,
           remarks: str | None = None, follows: int | None = None, plan: Path | None = None,
           changeover: int | None = None, as_planned: bool = False) -> Typed:
    """The values typed on the command line, as the journal's composer takes them."""
    from planner.journal.compose import Typed

    return Typed(rank, name, at, tz, pos, area, voyage, circuit, tuple(fuel or ()),
                 tuple(from_fuel or ()), tuple(tank or ()), remarks, follows,
                 str(plan) if plan else None, changeover, as_planned)


def _append(journal: Path | None, make: Make) -> None:
    """Append one entry to the journal and print its summary."""
    from planner.journal import Journal
    from planner.journal.describe import summary

    with Journal.open(journal_path(journal)) as j:
        stored = j.append(make)
        for line in summary(stored, j.state()):
            typer.echo(line)


def _step(kind: str, journal: Path | None, rank: str | None, name: str | None, at: str | None,
          tz: str | None, pos: str | None, area: str | None, voyage: str | None,
          circuit: str | None, fuel: list[str] | None, from_fuel: list[str] | None,
          tank: list[str] | None, remarks: str | None, follows: int | None, plan: Path | None,
          changeover: int | None, as_planned: bool) -> None:
    """Append a changeover step (start, complete, back, back-complete) of ``kind``."""
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
    with Journal.create(journal_path(journal), make) as j:
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


log_app.command("show")(log_read.show_cmd)
log_app.command("verify")(log_read.verify_cmd)
log_app.command("export")(log_read.export_cmd)
log_app.command("print")(log_read.print_cmd)
