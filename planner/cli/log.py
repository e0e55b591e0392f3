"""``changeover log ...``: the ship's changeover journal from the command line.

Every subcommand takes ``--journal PATH`` (or the ``CHANGEOVER_JOURNAL``
environment variable). Entries are checked and written in one transaction:
bad input is one line on standard error, exit status 2, nothing written.
This module holds ``log_app`` and the commands that write entries (init,
setup, fuel, the four changeover steps, tanks, sample, note, correct); the
options are in :mod:`planner.cli.log_options`, the commands that read the
journal (show, verify, export, print) in :mod:`planner.cli.log_read`, the
trend attachment (trend, export-trend) in :mod:`planner.cli.log_trend` and
scrubber events, documents made and export-file in :mod:`planner.cli.log_kinds`,
registered here.
"""

from __future__ import annotations

from pathlib import Path
from typing import TYPE_CHECKING, Annotated

import typer

from planner.cli import log_kinds, log_read, log_trend
from planner.cli.log_options import (
    AreaOpt,
    AsPlannedOpt,
    AtOpt,
    CircuitOpt,
    CircuitsOpt,
    ConfirmOpt,
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
           changeover: int | None = None, as_planned: bool = False,
           confirm: bool = False) -> Typed:
    """The values typed on the command line, as the journal's composer takes them."""
    from planner.journal.compose import Typed

    return Typed(rank, name, at, tz, pos, area, voyage, circuit, tuple(fuel or ()),
                 tuple(from_fuel or ()), tuple(tank or ()), remarks, follows,
                 str(plan) if plan else None, changeover, as_planned, confirm)


def _append(journal: Path | None, make: Make | list[Make]) -> None:
    """Append one entry (or several, in one transaction) and print their summaries."""
    log_trend.append_files(journal, make if isinstance(make, list) else [make], [])


def _step(kind: str, journal: Path | None, rank: str | None, name: str | None, at: str | None,
          tz: str | None, pos: str | None, area: str | None, voyage: str | None,
          circuits: list[str] | None, fuel: list[str] | None, from_fuel: list[str] | None,
          tank: list[str] | None, remarks: str | None, follows: int | None, plan: Path | None,
          changeover: int | None, as_planned: bool, confirm: bool) -> None:
    """Append a changeover step (start, complete, back, back-complete) of ``kind``, one
    entry per circuit named (``all``: every circuit of the plan's changeover, else of the
    journal's ship file), all in one transaction."""
    import dataclasses

    from planner.journal.compose import changeover_entry

    t = _typed(rank, name, at, tz, pos, area, voyage, None, fuel, from_fuel, tank, remarks,
               follows, plan, changeover, as_planned, confirm)
    names = _circuits(journal, circuits or [], plan, changeover)
    if len(names) > 1 and follows is not None:
        from geo.errors import InputError

        raise InputError("--follows", "", follows, "no --follows with several circuits (each "
                                                   "completion follows its circuit's start)")
    if not names:
        _append(journal, changeover_entry(kind, t))
        return
    _append(journal, [changeover_entry(kind, dataclasses.replace(t, circuit=c))
                      for c in names])


def _circuits(journal: Path | None, typed: list[str], plan: Path | None,
              changeover: int | None) -> list[str]:
    """The circuits typed, each once, with ``all`` expanded."""
    from geo.errors import InputError

    out: list[str] = []
    for c in (x.strip() for x in typed):
        if not c:
            raise InputError("--circuit", "", c, "a circuit's name")
        if c.lower() != "all":
            out += [] if c in out else [c]
            continue
        if plan is not None and changeover is not None:
            from planner.journal.plan_link import plan_circuits

            found = plan_circuits(plan, changeover)
        else:
            from planner.journal import Journal

            with Journal.open_read(journal_path(journal)) as j:
                found = list(j.state().circuits)
        if not found:
            raise InputError("--circuit", "", "all", "circuit names: neither the plan's "
                             "changeover nor the journal (log init --ship-file) names any")
        out += [x for x in found if x not in out]
    return out


@log_app.command("init")
def init_cmd(
    journal: JournalOpt = None,
    ship_file: Annotated[Path | None, typer.Option(
        "--ship-file", help="Take the ship's name, IMO number, tanks (with capacities), "
                            "circuits, scrubbers and fuels from this ship file (TOML); its [ship] "
                            "journal key names the journal when --journal is not given.")]
    = None,
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
    from planner.journal.compose_setup import fuel_entry, setup_entry
    from planner.journal.describe import summary

    t = _typed(rank, name, tz=tz)
    then: list[Make] = []
    if ship_file is None:
        make = setup_entry(t, ship, imo, tuple(tank or ()))
    else:
        from planner.journal.ship_link import ship_particulars

        p = ship_particulars(ship_file)
        names = tuple(tank or ()) + tuple(c.tank for c in p.tanks if c.tank not in (tank or ()))
        make = setup_entry(t, ship or p.name, imo or p.imo or None, names,
                           capacities=p.tanks, circuits=p.circuits, source=p.source,
                           scrubbers=p.scrubbers)
        then = [fuel_entry(t, f.name, f.grade, f.sulphur_pct, f.density15_kg_m3, f.bdn_ref)
                for f in p.fuels]
        if journal is None and p.journal and not _journal_env():
            journal = Path(p.journal)
    with Journal.create(journal_path(journal), make, then=then) as j:
        s = j.state()
        for seq in sorted(s.stored):
            for line in summary(s.stored[seq], s):
                typer.echo(line)


def _journal_env() -> bool:
    import os

    return bool(os.environ.get("CHANGEOVER_JOURNAL") or os.environ.get("CHANGEOVER_SHIP"))


@log_app.command("setup")
def setup_cmd(
    journal: JournalOpt = None,
    tank: Annotated[list[str] | None, typer.Option("--tank", help="Tank name to add.")] = None,
    ship: Annotated[str | None, typer.Option(help="New ship's name.")] = None,
    imo: Annotated[str | None, typer.Option(help="New IMO number.")] = None,
    tz: TzOpt = None, rank: RankOpt = None, name: NameOpt = None,
) -> None:
    """Add tank names (or change the ship's name) with a new set-up entry."""
    from planner.journal.compose_setup import setup_entry

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
    port: Annotated[str | None, typer.Option(help="Port of bunkering.")] = None,
    bunkered: Annotated[str | None, typer.Option(help="Date of bunkering, YYYY-MM-DD.")]
    = None,
    supplier: Annotated[str | None, typer.Option(help="Supplier's name, address and "
                                                 "telephone.")] = None,
    product: Annotated[str | None, typer.Option(help="Product name(s).")] = None,
    quantity: Annotated[float | None, typer.Option(help="Quantity, metric tons.")] = None,
    declaration: Annotated[bool | None, typer.Option(
        "--declaration/--no-declaration", help="The supplier's signed declaration that the "
                                               "fuel meets regulation 14 (and 18.3) is on "
                                               "the note.")] = None,
    sample_seal: Annotated[str | None, typer.Option(
        "--sample-seal", help="Seal number of the MARPOL sample delivered with the fuel.")]
    = None,
    journal: JournalOpt = None, at: AtOpt = None, tz: TzOpt = None, remarks: RemarksOpt = None,
    confirm: ConfirmOpt = False, rank: RankOpt = None, name: NameOpt = None,
) -> None:
    """Register a fuel on board with its bunker delivery note items (a new one replaces the
    old)."""
    from planner.journal.compose_setup import fuel_entry

    t = _typed(rank, name, at, tz, remarks=remarks, confirm=confirm)
    _append(journal, fuel_entry(t, fuel, grade, sulphur, density, bdn, port=port,
                                bunkered_on=bunkered, supplier=supplier, product=product,
                                quantity_t=quantity, declaration=declaration,
                                sample_seal=sample_seal))


def _register_step(command: str, kind_name: str, doc: str) -> None:
    def step(
        journal: JournalOpt = None, at: AtOpt = None, tz: TzOpt = None, pos: PosOpt = None,
        area: AreaOpt = None, voyage: VoyageOpt = None, circuit: CircuitsOpt = None,
        fuel: FuelOpt = None, from_fuel: FromFuelOpt = None, tank: TankOpt = None,
        remarks: RemarksOpt = None, follows: FollowsOpt = None, plan: PlanOpt = None,
        changeover: NumberOpt = None, as_planned: AsPlannedOpt = False,
        confirm: ConfirmOpt = False, rank: RankOpt = None, name: NameOpt = None,
    ) -> None:
        from planner.journal import entries

        _step(getattr(entries, kind_name), journal, rank, name, at, tz, pos, area, voyage,
              circuit, fuel, from_fuel, tank, remarks, follows, plan, changeover, as_planned,
              confirm)

    step.__doc__ = doc
    log_app.command(command)(step)


_register_step("start", "STARTED", "Changeover to compliant fuel started (before entry, or before "
               "the area comes into force while the ship is inside it).")
_register_step("complete", "COMPLETED",
               "Changeover to compliant fuel completed, before entry (or before the area "
               "comes into force): regulation 14.6 record "
               "(time, position, --tank for each tank of compliant fuel).")
_register_step("back", "BACK_COMMENCED",
               "Changeover back to regular fuel commenced, after exit (or after the area "
               "ceases): regulation 14.6 record "
               "(time, position, --tank for each tank of compliant fuel).")
_register_step("back-complete", "BACK_COMPLETED", "Changeover back to regular fuel completed.")


@log_app.command("tanks")
def tanks_cmd(
    journal: JournalOpt = None, tank: TankOpt = None, fuel: FuelOpt = None, at: AtOpt = None,
    tz: TzOpt = None, pos: PosOpt = None, area: AreaOpt = None, voyage: VoyageOpt = None,
    remarks: RemarksOpt = None, confirm: ConfirmOpt = False, rank: RankOpt = None,
    name: NameOpt = None,
) -> None:
    """Tank soundings: volume and temperature, corrected to 15 °C, with mass."""
    from planner.journal.compose import tanks_entry

    _append(journal, tanks_entry(_typed(rank, name, at, tz, pos, area, voyage, fuel=fuel,
                                        tank=tank, remarks=remarks, confirm=confirm)))


@log_app.command("sample")
def sample_cmd(
    number: Annotated[str | None, typer.Option(help="Sample number on the label.")] = None,
    seal: Annotated[str | None, typer.Option(help="Seal number.")] = None,
    point: Annotated[str | None, typer.Option(help="Where drawn, e.g. \"ME inlet\".")] = None,
    journal: JournalOpt = None, fuel: FuelOpt = None, at: AtOpt = None, tz: TzOpt = None,
    pos: PosOpt = None, area: AreaOpt = None, voyage: VoyageOpt = None,
    remarks: RemarksOpt = None, confirm: ConfirmOpt = False, rank: RankOpt = None,
    name: NameOpt = None,
) -> None:
    """A fuel sample drawn and sealed."""
    from planner.journal.compose import sample_entry

    t = _typed(rank, name, at, tz, pos, area, voyage, fuel=fuel, remarks=remarks,
               confirm=confirm)
    _append(journal, sample_entry(t, number, seal, point))


@log_app.command("note")
def note_cmd(
    text: Annotated[str, typer.Argument(help="The note.")],
    journal: JournalOpt = None, at: AtOpt = None, tz: TzOpt = None, pos: PosOpt = None,
    area: AreaOpt = None, voyage: VoyageOpt = None, confirm: ConfirmOpt = False,
    rank: RankOpt = None, name: NameOpt = None,
) -> None:
    """A note in words."""
    from planner.journal.compose import note_entry

    _append(journal, note_entry(_typed(rank, name, at, tz, pos, area, voyage,
                                       confirm=confirm), text))


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
    scrubber: log_kinds.ScrubberOpt = None, mode: log_kinds.ModeOpt = None,
    so2_ppm: log_kinds.So2Opt = None, co2_pct: log_kinds.Co2Opt = None,
    limit_pct: log_kinds.LimitPctOpt = None, ratio_limit: log_kinds.RatioLimitOpt = None,
    title: log_kinds.TitleOpt = None,
    rank: RankOpt = None, name: NameOpt = None,
) -> None:
    """Correct an entry: a new entry with the corrected values; the original stays."""
    from planner.journal.compose import correction_entry
    from planner.journal.reports import report_changes
    from planner.journal.scrubber import scrubber_changes

    t = _typed(rank, name, at, tz, pos, area, voyage, circuit, fuel, from_fuel, tank, remarks,
               follows)
    hooks = [h for h in (scrubber_changes(scrubber, mode, so2_ppm, co2_pct, limit_pct,
                                          ratio_limit), report_changes(title)) if h]

    def changes(d: object) -> object:
        for h in hooks:
            d = h(d)
        return d
    _append(journal, correction_entry(entry, t, reason, void, text, number, seal, point,
                                      changes if hooks else None))


log_app.command("trend")(log_trend.trend_cmd)
log_app.command("export-trend")(log_trend.export_trend_cmd)
log_app.command("scrubber")(log_kinds.scrubber_cmd)
log_app.command("report")(log_kinds.report_cmd)
log_app.command("export-file")(log_kinds.export_file_cmd)
log_app.command("show")(log_read.show_cmd)
log_app.command("verify")(log_read.verify_cmd)
log_app.command("export")(log_read.export_cmd)
log_app.command("print")(log_read.print_cmd)
