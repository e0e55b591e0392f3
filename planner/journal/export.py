"""Exporting the journal: JSON with everything needed to re-check the chain, and CSV.

JSON (:func:`export_json`): ``{"format": "changeover-journal", "format_version": 1,
"ship": {"name", "imo"}, "count", "last_seq", "last_hash", "verified", "problems",
"hash_rule", "selection", "entries": [{"seq", "hash", "prev_hash", "entry": {...}}]}``.
``entry`` is the stored content; its canonical JSON (:mod:`.canonical`) and
the rule in ``hash_rule`` give ``hash`` again, so an export of the whole
journal can be verified without this program.

CSV (:func:`export_csv`): one row per entry, columns :data:`CSV_COLUMNS`;
times ISO 8601 UTC, positions in decimal degrees and in degrees and minutes,
volumes m³, temperatures °C, masses t, sulphur % m/m. Tank soundings are
one column (``name: observed m³ @ °C = m³ at 15 °C, t``) with the totals
beside it. A cell a spreadsheet would run as a formula (text starting with
``=``, ``+``, ``-``, ``@``, a tab or a carriage return) is written with a
single quote in front, so it is read as text [OWASP-CSV]; plain numbers
(``-39.823333``) are left as they are (:func:`planner.common.csv_cells.safe_cell`, the one
neutraliser every CSV of the program uses).
"""

from __future__ import annotations

import csv
import io
from collections.abc import Iterable

from planner.common.csv_cells import safe_cell
from planner.common.timefmt import format_ship
from planner.journal.codec import encode, iso
from planner.journal.describe import position_text, trend_text
from planner.journal.describe_kinds import report_text, scrubber_text
from planner.journal.details import FuelUse
from planner.journal.entries import LABELS, Record
from planner.journal.state import JournalState, Stored
from planner.journal.verify import VerifyReport

HASH_RULE = ("hash = SHA-256 hex of UTF-8 (prev_hash + '\\n' + str(seq) + '\\n' + body), body = "
             "JSON of entry with keys sorted, separators ',' ':', non-ASCII as is; entry 1's "
             "prev_hash is 64 zeros")

CSV_COLUMNS = (
    "seq", "kind", "what", "time_utc", "ship_time", "lat_deg", "lon_deg", "position", "area",
    "voyage", "circuit", "fuel_to", "fuel_from", "fuel", "tanks", "total_volume15_m3",
    "total_mass_t", "sample_number", "seal_number", "sampling_point", "text", "follows",
    "corrects", "reason", "void", "corrected_by", "planned_from", "planned_time_utc",
    "planned_position", "planned_boundary_utc", "as_planned", "rank", "name", "written_utc",
    "hash",
)


def export_json(stored: Iterable[Stored], state: JournalState, report: VerifyReport,
                selection: str = "all entries") -> dict:
    """The JSON export document (see the module docstring)."""
    return {
        "format": "changeover-journal",
        "format_version": 1,
        "ship": {"name": state.ship_name, "imo": state.imo_number},
        "count": report.entries,
        "last_seq": report.last_seq,
        "last_hash": report.last_hash,
        "verified": report.ok,
        "problems": [str(p) for p in report.problems],
        "hash_rule": HASH_RULE,
        "selection": selection,
        "entries": [{"seq": s.seq, "hash": s.hash, "prev_hash": s.prev_hash,
                     "entry": encode(s.entry)} for s in stored],
    }


def _fuels(uses: tuple[FuelUse, ...]) -> str:
    return " | ".join(f"{u.fuel.name} ({u.fuel.grade or 'grade not given'}) "
                      f"{u.fuel.sulphur_pct:.2f} % S, BDN {u.fuel.bdn_ref}" for u in uses)


def csv_row(s: Stored, state: JournalState) -> dict[str, str]:
    """One entry as a CSV row (all values text)."""
    e = s.entry
    r: Record | None = e.record
    row = dict.fromkeys(CSV_COLUMNS, "")
    what = "scrubber failure" if getattr(getattr(e.record, "details", None), "failure",
                                         False) else LABELS[e.kind]
    row.update(seq=str(s.seq), kind=e.kind, what=what, rank=e.who.rank,
               name=e.who.name, written_utc=iso(e.written_utc), hash=s.hash)
    if e.correction is not None:
        row.update(corrects=str(e.correction.corrects), reason=e.correction.reason,
                   void="yes" if e.correction.void else "no",
                   what=f"correction of a {LABELS[e.correction.of_kind]} entry")
    later = state.corrections.get(s.seq, [])
    row["corrected_by"] = " ".join(str(c) for c in later)
    if r is None:
        return row
    row.update(time_utc=iso(r.time_utc), ship_time=format_ship(r.time_utc, r.ship_tz),
               area=r.area or "", voyage=r.voyage or "", circuit=r.circuit or "",
               fuel_to=_fuels(r.fuels_as("to")), fuel_from=_fuels(r.fuels_as("from")),
               fuel=_fuels(r.fuels_as("subject")), as_planned=" ".join(r.as_planned))
    if r.position is not None:
        row.update(lat_deg=f"{r.position.lat_deg:.6f}", lon_deg=f"{r.position.lon_deg:.6f}",
                   position=position_text(r.position))
    d = r.details
    tanks = getattr(d, "tanks", ())
    if tanks and not isinstance(tanks[0], str):
        row["tanks"] = " | ".join(
            f"{t.tank}: {t.volume_m3:.3f} m³ @ {t.temperature_c:.1f} °C = "
            f"{t.volume15_m3:.3f} m³ at 15 °C, {t.mass_t:.3f} t ({t.fuel})" for t in tanks)
        row["total_volume15_m3"] = f"{sum(t.volume15_m3 for t in tanks):.3f}"
        row["total_mass_t"] = f"{sum(t.mass_t for t in tanks):.3f}"
    elif tanks:
        row["tanks"] = " | ".join(tanks)
    for col, field in (("sample_number", "sample_number"), ("seal_number", "seal_number"),
                       ("sampling_point", "point")):
        row[col] = getattr(d, field, "") or ""
    row["text"] = getattr(d, "text", "") or getattr(d, "remarks", "") or ""
    if getattr(d, "sha256", None):          # a trend: its file, size, hash, switch, columns
        row["text"] = "; ".join(trend_text(d) + ([d.remarks] if d.remarks else []))
    words = scrubber_text(d) + report_text(d)   # a scrubber event, a document made
    if words:
        row["text"] = "; ".join(words + ([d.remarks] if d.remarks else []))
    if getattr(d, "ship_name", None):
        row["text"] = f"ship {d.ship_name}, IMO {d.imo_number or '(unchanged)'}"
    if getattr(d, "fuel", None) is not None:
        row["fuel"] = _fuels((FuelUse("subject", d.fuel),))
        row["text"] = d.remarks
    follows = getattr(d, "follows", None)
    row["follows"] = "" if follows is None else str(follows)
    p = r.planned
    if p is not None:
        row.update(planned_from=f"{p.source} changeover {p.changeover}",
                   planned_time_utc=iso(p.time_utc) if p.time_utc else "",
                   planned_position=position_text(p.position) if p.position else "",
                   planned_boundary_utc=iso(p.boundary_utc) if p.boundary_utc else "")
    return row


def export_csv(stored: Iterable[Stored], state: JournalState) -> str:
    """CSV text of the entries (header line first), every cell through :func:`safe_cell`."""
    buf = io.StringIO()
    w = csv.DictWriter(buf, fieldnames=CSV_COLUMNS, lineterminator="\n")
    w.writeheader()
    for s in stored:
        w.writerow({k: safe_cell(v) for k, v in csv_row(s, state).items()})
    return buf.getvalue()
