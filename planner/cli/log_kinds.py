"""``changeover log scrubber``, ``log report`` and ``log export-file``.

``log scrubber EVENT --scrubber NAME ...`` records a scrubber event (start, stop,
mode-change, failure, restored, ratio-reading) with its time, position, washwater mode
and, for a reading, SO₂ [ppm] and CO₂ [% v/v] with the ratio and the limit in force
(:mod:`planner.journal.scrubber`); ``--from-plan PLAN.json --event N`` prefills it from
the plan's scrubber event N. ``log report FILE --kind WORD --title TEXT`` keeps a document
made, its bytes under their SHA-256 (:mod:`planner.journal.reports`); ``log export-file
ENTRY OUT`` writes the bytes of a report or trend entry back, checked against the hash in
the chain. Registered on ``log_app`` by :mod:`planner.cli.log`.
"""

from __future__ import annotations

from pathlib import Path
from typing import Annotated

import typer

from planner.cli.log_options import (
    AreaOpt,
    AsPlannedOpt,
    AtOpt,
    ConfirmOpt,
    JournalOpt,
    NameOpt,
    PlanOpt,
    PosOpt,
    RankOpt,
    TzOpt,
    VoyageOpt,
    journal_path,
)

NoteOpt = Annotated[str | None, typer.Option(
    "--remarks", "--note", help="Remarks in words (for a failure: the action taken).")]
ScrubberOpt = Annotated[str | None, typer.Option(
    "--scrubber", help="The scrubber's name, e.g. \"EGCS 1\" (default: the plan's).")]
ModeOpt = Annotated[str | None, typer.Option(
    "--mode", help="Washwater mode: open or closed (needed for start and mode-change).")]
So2Opt = Annotated[float | None, typer.Option(
    "--so2-ppm", help="SO₂ read at the scrubber outlet, ppm.")]
Co2Opt = Annotated[float | None, typer.Option(
    "--co2-pct", help="CO₂ read with it, % v/v.")]
LimitPctOpt = Annotated[float | None, typer.Option(
    "--limit-pct", help="The sulphur limit in force, % m/m (0.10, 0.50, 1.00, 1.50, 3.50, "
                        "4.50): the ratio limit is looked up (MEPC.340(77) Table 1).")]
RatioLimitOpt = Annotated[float | None, typer.Option(
    "--ratio-limit", help="The SO₂/CO₂ ratio limit in force as typed, ppm/% v/v.")]
EventNumberOpt = Annotated[int | None, typer.Option(
    "--event", help="Which scrubber event of the plan (its number).")]
TitleOpt = Annotated[str | None, typer.Option("--title", help="The document's title.")]


def scrubber_cmd(
    event: Annotated[str, typer.Argument(help="start, stop, mode-change, failure, restored "
                                              "or ratio-reading.")],
    scrubber: ScrubberOpt = None, mode: ModeOpt = None, so2_ppm: So2Opt = None,
    co2_pct: Co2Opt = None, limit_pct: LimitPctOpt = None, ratio_limit: RatioLimitOpt = None,
    journal: JournalOpt = None, at: AtOpt = None, tz: TzOpt = None, pos: PosOpt = None,
    area: AreaOpt = None, voyage: VoyageOpt = None, remarks: NoteOpt = None,
    plan: PlanOpt = None, event_number: EventNumberOpt = None,
    as_planned: AsPlannedOpt = False, confirm: ConfirmOpt = False, rank: RankOpt = None,
    name: NameOpt = None,
) -> None:
    """A scrubber event: started, stopped, washwater mode changed, failure, back in service,
    or an SO₂/CO₂ reading against its limit."""
    from planner.cli.log_trend import append_files
    from planner.journal.compose import Typed
    from planner.journal.scrubber import scrubber_entry

    t = Typed(rank, name, at, tz, pos, area, voyage, remarks=remarks,
              plan=str(plan) if plan else None, as_planned=as_planned, confirm=confirm)
    append_files(journal, [scrubber_entry(t, scrubber, event, mode, so2_ppm, co2_pct,
                                          limit_pct, ratio_limit, event_number)], [])


def report_cmd(
    file: Annotated[Path, typer.Argument(help="The document made (a PDF, say).")],
    kind: Annotated[str | None, typer.Option(
        "--kind", help="Its kind word, e.g. nonavailability.")] = None,
    title: TitleOpt = None,
    journal: JournalOpt = None, at: AtOpt = None, tz: TzOpt = None, area: AreaOpt = None,
    voyage: VoyageOpt = None, remarks: NoteOpt = None, rank: RankOpt = None,
    name: NameOpt = None,
) -> None:
    """Keep a document made (a non-availability report, say) in the journal: its bytes, name,
    size and SHA-256 in the chain."""
    from planner.cli.log_trend import append_files
    from planner.journal.compose import Typed, _when, _who
    from planner.journal.reports import read_document_bytes, report_details, report_entry

    t = Typed(rank, name, at, tz, remarks=remarks)
    who = _who(t)
    data = read_document_bytes(file, "FILE")
    details = report_details(file.name, data, kind or "", title or "", remarks or "")

    def make(state):
        moment, offset, _ = _when(t, state, None)
        return report_entry(who, details, moment, offset, voyage, area)(state)
    append_files(journal, [make], [data])


def export_file_cmd(
    entry: Annotated[int, typer.Argument(help="The report or trend entry.")],
    out: Annotated[Path, typer.Argument(help="The file to write its bytes to.")],
    journal: JournalOpt = None,
) -> None:
    """Write a stored document or trend file back, checked against the SHA-256 its entry
    holds."""
    from planner.cli.log_read import not_the_journal
    from planner.cli.log_trend import check_bytes, file_of
    from planner.common.outputs import check_outputs, write_atomic
    from planner.journal import Journal
    from planner.journal.entries import REPORT, TREND

    check_outputs({"OUT": out})
    path = journal_path(journal)
    not_the_journal(out, path, "OUT")
    with Journal.open_read(path) as j:
        state = j.state()
        d = file_of(state, entry, (REPORT, TREND))
        data = j.attachment(d.sha256)
    check_bytes(data, d, entry, "file")
    write_atomic(out, lambda p: Path(p).write_bytes(data))
    typer.echo(f"wrote {out}: {d.file_name} of entry {entry}, {d.size_bytes} bytes, SHA-256 "
               f"{d.sha256} (matches the journal)")
