"""``changeover log trend`` and ``log export-trend``: a trend file kept with its changeover.

``log trend ENTRY TREND.csv`` attaches the file (its bytes, name, size and SHA-256, and
optionally the valve switch time and the column mapping) to changeover entry ENTRY, as a
new entry of its own (:mod:`planner.journal.attach`); ``log export-trend ENTRY OUT.csv``
writes the stored bytes of trend entry ENTRY back, after checking them against the hash in
the chain. Registered on ``log_app`` by :mod:`planner.cli.log`.
"""

from __future__ import annotations

from pathlib import Path
from typing import Annotated

import typer

from planner.cli.log_options import JournalOpt, NameOpt, RankOpt, RemarksOpt, journal_path

ColumnOpt = Annotated[list[str] | None, typer.Option(
    "--column", help="The trend's column for time, temperature, viscosity or load, as "
                     "WHAT=NAME (e.g. \"viscosity=ME inlet visc\"); repeatable. Default: "
                     "changeover calibrate's defaults.")]


def trend_cmd(
    entry: Annotated[int, typer.Argument(help="The changeover entry (start or completion) "
                                              "the trend belongs to.")],
    trend: Annotated[Path, typer.Argument(help="The trend file (CSV export of the inlet "
                                               "temperature and viscosity).")],
    switch_at: Annotated[str | None, typer.Option(
        help="When the changeover valve was switched, ISO 8601 with its offset (for "
             "changeover calibrate --journal).")] = None,
    column: ColumnOpt = None,
    trend_tz: Annotated[str | None, typer.Option(
        "--trend-tz", help="UTC offset of the trend's times written without one, "
                           "e.g. +12:00.")] = None,
    remarks: RemarksOpt = None,
    journal: JournalOpt = None, rank: RankOpt = None, name: NameOpt = None,
) -> None:
    """Attach a trend file to a changeover entry (stored with its SHA-256 in the chain)."""
    from planner.journal.attach import parse_columns, read_trend_bytes, trend_entry
    from planner.journal.compose import Typed, _who

    who = _who(Typed(rank, name))
    columns = parse_columns(column or [])
    data = read_trend_bytes(trend)
    make = trend_entry(entry, who, trend.name, data, switch_at, columns, trend_tz, remarks)
    append_files(journal, [make], [data])


def append_files(journal: Path | None, makes: list, files: list[bytes]) -> None:
    """Append entries and the attached files' bytes in one transaction and print the
    entries' summaries (every ``log`` command that writes goes through here)."""
    from planner.journal import Journal
    from planner.journal.describe import summary

    with Journal.open(journal_path(journal)) as j:
        stored = j.append_many(makes, files)
        state = j.state()
        for s in stored:
            for line in summary(s, state):
                typer.echo(line)


def export_trend_cmd(
    entry: Annotated[int, typer.Argument(help="The trend entry (from log trend).")],
    out: Annotated[Path, typer.Argument(help="The file to write the trend's bytes to.")],
    journal: JournalOpt = None,
) -> None:
    """Write a stored trend file back, checked against the SHA-256 its entry holds."""
    from planner.cli.log_read import not_the_journal
    from planner.common.outputs import check_outputs, write_atomic
    from planner.journal import Journal

    check_outputs({"OUT.csv": out})
    path = journal_path(journal)
    not_the_journal(out, path, "OUT.csv")
    with Journal.open_read(path) as j:
        state = j.state()
        d = trend_of(state, entry)
        data = j.attachment(d.sha256)
    check_bytes(data, d, entry)
    write_atomic(out, lambda p: Path(p).write_bytes(data))
    typer.echo(f"wrote {out}: {d.file_name} of entry {entry}, {d.size_bytes} bytes, SHA-256 "
               f"{d.sha256} (matches the journal)")


def trend_of(state, entry: int):
    """The :class:`~planner.journal.details.TrendDetails` of trend entry ``entry`` as it
    stands (one line if it is not one)."""
    from planner.journal.entries import TREND

    return file_of(state, entry, (TREND,))


def file_of(state, entry: int, kinds: tuple[str, ...]):
    """The details of entry ``entry`` of one of ``kinds`` (entries that attach a file) as
    it stands, or as written when struck out (the bytes stay); one line if it is not one."""
    from geo.errors import InputError
    from planner.journal.entries import LABELS, TREND

    if entry not in state.stored:
        span = f"1 to {state.last_seq}" if state.last_seq else "none yet"
        raise InputError("ENTRY", "", entry, f"the number of an entry in this journal ({span})")
    kind = state.kind_of(entry)
    if kind not in kinds:
        what = "a trend entry (log trend)" if kinds == (TREND,) else \
            "a trend or report entry (log trend, log report)"
        raise InputError("ENTRY", "", entry, f"{what}; entry {entry} is a "
                                             f"{LABELS[kind]} entry")
    r = state.current(state.root(entry))
    if r is None:
        r = state.stored[state.root(entry)].entry.record  # struck out: the bytes stay
    return r.details


def check_bytes(data: bytes | None, d, entry: int, noun: str = "trend") -> None:
    """Refuse stored bytes that are missing or do not give the entry's SHA-256 and size."""
    from geo.errors import InputError
    from planner.journal.attach import sha256_hex

    if data is None:
        raise InputError("ENTRY", "", entry, f"a {noun} whose bytes are in the journal (they "
                                             "are missing: run changeover log verify)")
    if sha256_hex(data) != d.sha256 or len(data) != d.size_bytes:
        raise InputError("ENTRY", "", entry, f"a {noun} whose stored bytes match the SHA-256 "
                                             "in its entry (they do not: the journal was "
                                             "altered; run changeover log verify)")
