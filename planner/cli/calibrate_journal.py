"""``changeover calibrate --journal J --entry N``: trends taken from the ship's record.

Each ``--entry`` names a trend entry (``log trend``); its stored bytes are checked
against the SHA-256 the chained entry holds (refused in one line otherwise), and read as
a trend with the entry's switch time, or, without one, the time of the changeover start
it belongs to (the entry itself, or the start a completion follows), and with the entry's
column names and time zone where it gives them (else the command's options). The journal
is opened read-only. Used by :mod:`planner.cli.calibrate`.
"""

from __future__ import annotations

import dataclasses
import tempfile
from datetime import datetime
from pathlib import Path


def journal_trends(journal: Path | None, entries: list[int], tz: str | None, time_col: str,
                   temp_col: str, visc_col: str, load_col: str | None
                   ) -> tuple[list, list[str]]:
    """(the trends read, how each is named in a calibrated ship file's comment)."""
    from geo.errors import InputError
    from planner.calibration import TrendColumns, read_trend
    from planner.cli.log_options import journal_path
    from planner.cli.log_trend import check_bytes, trend_of
    from planner.common.timefmt import parse_offset
    from planner.journal import Journal

    if not entries:
        raise InputError("--entry", "", None, "the trend entry (log trend) of --journal to "
                                              "calibrate from")
    if journal is None:
        raise InputError("--journal", "", None, "the journal holding the --entry trend(s)")
    path = journal_path(journal)
    loaded = []
    with Journal.open_read(path) as j:
        state = j.state()
        for n in entries:
            d = trend_of(state, n)
            data = j.attachment(d.sha256)
            check_bytes(data, d, n)
            loaded.append((n, d, data, d.switch_utc or _start_time(state, d.attaches, n)))
    out, named = [], []
    with tempfile.TemporaryDirectory(prefix="changeover-trend-") as tmp:
        for n, d, data, switch in loaded:
            f = Path(tmp) / f"entry{n}_{Path(d.file_name).name}"
            f.write_bytes(data)
            zone_text = d.tz or tz
            zone = parse_offset(zone_text) if zone_text else None
            cols = TrendColumns(d.column("time") or time_col,
                                d.column("temperature") or temp_col,
                                d.column("viscosity") or visc_col,
                                d.column("load") or load_col)
            trend = read_trend(f, switch, cols, zone)
            label = f"{d.file_name} (journal {path.name} entry {n})"
            out.append(dataclasses.replace(trend, file=label))
            named.append(f"{label} (SHA-256 {d.sha256})")
    return out, named


def _start_time(state, seq: int, trend_seq: int) -> datetime:
    """The switch time of the changeover entry ``seq``: its own time for a start, else the
    time of the start it follows."""
    from geo.errors import InputError
    from planner.journal.entries import FOLLOWS

    r = state.current(seq)
    if r is None:
        raise InputError("--entry", "", trend_seq, f"a trend of a changeover that stands "
                                                   f"(entry {seq} was struck out)")
    if state.kind_of(seq) in FOLLOWS:
        start = state.current(r.details.follows) if r.details.follows else None
        if start is None:
            raise InputError("--entry", "", trend_seq, f"a trend with its switch time (log "
                                                       f"trend --switch-at): entry {seq} "
                                                       "follows no recorded start")
        return start.time_utc
    return r.time_utc
