"""The options of the ``changeover log`` subcommands, and the journal file they name.

Declared once here for :mod:`planner.cli.log` (the entries written) and
:mod:`planner.cli.log_read` (listing, verifying, exporting and printing).
"""

from __future__ import annotations

from pathlib import Path
from typing import Annotated

import typer

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
CircuitsOpt = Annotated[list[str] | None, typer.Option(
    "--circuit", help="Fuel circuit, e.g. \"main engine\"; repeat it (or give all) to record "
                      "the same step for several circuits at once, one entry each.")]
ConfirmOpt = Annotated[bool, typer.Option(
    "--confirm", help="Record the entry even with a warning (a completion sooner than the "
                      "modelled flush, an area not in the plan, a time more than an hour "
                      "ahead); the warning is kept in the entry.")]
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


def journal_path(journal: Path | None) -> Path:
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
