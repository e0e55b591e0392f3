"""``--csv DIR``: each table a command prints, as one CSV file in a folder.

One table per file, named after the table (``changeovers.csv``,
``stretches.csv`` ...), a header line with the unit of every column, full
dates and times (ISO 8601, UTC, and ship's time with its offset), positions
in decimal degrees (WGS84) and in degrees and minutes. Cells go through
:func:`planner.common.csv_cells.safe_cell`, so a spreadsheet never reads one
as a formula. Every file is made before any is written; each is written
atomically (:func:`planner.common.outputs.write_atomic`).
"""

from __future__ import annotations

from dataclasses import dataclass
from pathlib import Path
from typing import Annotated

import typer

CsvOpt = Annotated[Path | None, typer.Option(
    "--csv", help="Also write each table as a CSV file in this folder (one per table, "
    "units in the headers).")]


@dataclass(frozen=True)
class CsvTable:
    """One CSV file: its name (without ``.csv``), the header with units, the rows."""

    name: str
    header: tuple[str, ...]
    rows: tuple[tuple[object, ...], ...]

    def __post_init__(self) -> None:
        for r in self.rows:
            if len(r) != len(self.header):
                raise ValueError(f"{self.name}: a row of {len(r)} cells for "
                                 f"{len(self.header)} columns")


def fx(x: float | None, places: int) -> str:
    """A number to ``places`` decimals, or an empty cell."""
    return "" if x is None else f"{x:.{places}f}"


def dm(lat: float | None, lon: float | None) -> str:
    """Degrees and minutes, or an empty cell."""
    from geo.position import format_position

    return "" if lat is None or lon is None else format_position(lat, lon)


def check_csv_folder(folder: Path | None) -> None:
    """``--csv``: None, or a folder (existing or to be made) where files can be written,
    never a file: checked before anything is computed or written."""
    if folder is None:
        return
    from geo.errors import InputError
    from planner.common.outputs import check_writable

    if folder.exists() and not folder.is_dir():
        raise InputError("--csv", "", str(folder), "a folder for the CSV files (one per table)")
    try:
        check_writable(folder / "table.csv")
    except InputError as e:
        raise InputError("--csv", "", str(folder), "a folder where the CSV files can be "
                         f"written ({e.value})") from None


def write_csv_dir(folder: Path, tables: list[CsvTable]) -> list[Path]:
    """Write each table to ``folder/NAME.csv`` (the folder made if needed); the paths."""
    from planner.common.csv_cells import csv_text
    from planner.common.outputs import write_atomic

    check_csv_folder(folder)
    texts = [(folder / f"{t.name}.csv", csv_text(t.header, t.rows)) for t in tables]
    for path, text in texts:
        write_atomic(path, lambda p, text=text: Path(p).write_text(text, encoding="utf-8"))
    return [p for p, _ in texts]


def _done(r: dict) -> tuple:
    down = r.get("direction") == "to_compliant"
    key = "compliant" if down and r.get("compliant_utc") else "complete"
    return (r.get(f"{key}_utc"), r.get(f"{key}_ship_time"), r.get(f"{key}_lat"),
            r.get(f"{key}_lon"))


def plan_csv(doc: dict) -> list[CsvTable]:
    """The plan's tables: changeovers, starts at the confidence, stretches, fuel, SO₂, the
    areas coming into force or ceasing while the ship is inside them, and the scrubber's
    events and spans."""
    from planner.charts.plan_events import boundary_event

    rows = []
    for r in doc["changeovers"]:
        when, ship, lat, lon = _done(r)
        rows.append((r["number"], r["area"], r["circuit"], r["direction"], r["from_fuel"],
                     r["to_fuel"], r["start_utc"], r.get("start_ship_time"),
                     fx(r["start_lat"], 6), fx(r["start_lon"], 6),
                     dm(r["start_lat"], r["start_lon"]), when, ship, fx(lat, 6), fx(lon, 6),
                     dm(lat, lon), r["boundary_utc"], r.get("boundary_ship_time"),
                     fx(r["boundary_lat"], 6), fx(r["boundary_lon"], 6),
                     dm(r["boundary_lat"], r["boundary_lon"]), fx(r.get("boundary_nm"), 2),
                     fx(r["margin_h"], 3) if r["direction"] == "to_compliant" else "",
                     fx(r.get("duration_h"), 3), fx(r.get("limit_pct"), 3),
                     fx(r.get("target_pct"), 4), boundary_event(r),
                     "yes" if r.get("clock_deadline") else "no"))
    out = [CsvTable("changeovers", (
        "Changeover (number)", "Area", "Circuit", "Direction", "From fuel", "To fuel",
        "Start (UTC, ISO 8601)", "Start (ship's time, ISO 8601)", "Start latitude (°)",
        "Start longitude (°)", "Start position (° ')", "Done (UTC, ISO 8601)",
        "Done (ship's time, ISO 8601)", "Done latitude (°)", "Done longitude (°)",
        "Done position (° ')", "Boundary (UTC, ISO 8601)",
        "Boundary (ship's time, ISO 8601)", "Boundary latitude (°)", "Boundary longitude (°)",
        "Boundary position (° ')", "Boundary from departure (nm)", "Margin (h)", "Takes (h)",
        "Limit (% m/m)", "Target (% m/m)", "Event", "Clock deadline"), tuple(rows))]
    if isinstance(doc.get("uncertainty"), dict):
        out.append(CsvTable("confidence", (
            "Changeover (number)", "Circuit", "Planned start (UTC, ISO 8601)",
            "P50 start (UTC, ISO 8601)", "Start at the confidence (UTC, ISO 8601)",
            "Lead at the confidence (h)", "Extra compliant fuel (t)", "Main driver",
            "Confidence (fraction)"), tuple(
            (r["number"], r["circuit"], r["start_utc"], r.get("start_p50_utc"),
             r.get("start_confidence_utc"), fx(r.get("lead_confidence_h"), 3),
             fx(r.get("extra_compliant_t"), 3), r.get("main_driver") or "",
             doc["uncertainty"]["confidence"])
            for r in doc["changeovers"] if "start_p50_utc" in r)))
    out.append(CsvTable("stretches", (
        "From (nm)", "To (nm)", "Limit (% m/m)", "Under", "Fuel", "From (UTC, ISO 8601)"),
        tuple((fx(s["from_nm"], 2), fx(s["to_nm"], 2), fx(s["limit_pct"], 3),
               "; ".join(s["areas"]) or "global cap", s["fuel"], s["from_utc"])
              for s in doc["stretches"])))
    out.append(CsvTable("fuel_totals", (
        "Fuel", "Needed (t)", "Needed (m³ at 15 °C)", "On board (t)", "Spare (t)"),
        tuple((f, fx(x["needed_t"], 3), fx(x["needed_m3_15c"], 3), fx(x["on_board_t"], 3),
               fx(x["on_board_t"] - x["needed_t"], 3)) for f, x in doc["fuel_totals"].items())))
    out.append(CsvTable("so2", ("Area", "SO₂ as planned (kg)",
                                f"SO₂ on {doc['regular_fuel']} (kg)"),
                        tuple((a, fx(x["so2_kg"], 1), fx(x["so2_on_regular_kg"], 1))
                              for a, x in doc["so2"]["areas"].items())))
    return out + force_events_csv(doc) + scrubber_csv(doc)


def scrubber_csv(doc: dict) -> list[CsvTable]:
    """The scrubber's events (numbered S1, S2 ... as on the map, chart, PDF and GPX) and
    its spans: the document's ``scrubber_events`` and ``scrubber_spans`` (no file without
    them, so a plan without a scrubber writes the files it always wrote)."""
    from planner.charts.scrubber_marks import event_rows

    out = []
    events, spans = event_rows(doc), doc.get("scrubber_spans") or []
    if events:
        out.append(CsvTable("scrubber_events", (
            "Scrubber event", "Scrubber", "Kind", "Mode", "Time (UTC, ISO 8601)",
            "Time (ship's time, ISO 8601)", "Latitude (°)", "Longitude (°)", "Position (° ')",
            "Distance (nm)", "Action", "Reason"), tuple(
            (e["label"], e["scrubber"], e["event"], e.get("mode") or "",
             e["utc"], e.get("ship_time") or "", fx(e["lat"], 6), fx(e["lon"], 6),
             dm(e["lat"], e["lon"]), fx(e["distance_nm"], 3), e["action"],
             e.get("reason") or "") for e in events)))
    if spans:
        out.append(CsvTable("scrubber_spans", (
            "Scrubber", "Circuits", "Fuel", "Fallback fuel", "Limit (% m/m)", "Mode",
            "From (nm)", "To (nm)", "From (UTC, ISO 8601)", "From (ship's time, ISO 8601)",
            "From position (° ')", "To (UTC, ISO 8601)", "To (ship's time, ISO 8601)",
            "To position (° ')", "Duration (h)", "Areas"), tuple(
            (s["scrubber"], "; ".join(s["circuits"]), s["fuel"], s.get("fallback_fuel") or "",
             fx(s["limit_pct"], 3), s["mode"], fx(s["from_nm"], 3), fx(s["to_nm"], 3),
             s["from_utc"], s.get("from_ship_time") or "",
             dm(s.get("from_lat"), s.get("from_lon")), s["to_utc"],
             s.get("to_ship_time") or "", dm(s.get("to_lat"), s.get("to_lon")),
             fx(s.get("duration_h"), 3), "; ".join(s.get("areas") or [])) for s in spans)))
    return out


def force_events_csv(doc: dict) -> list[CsvTable]:
    """Each area coming into force (or ceasing) while the ship is inside it: the
    document's ``force_events``, with the ship's position then (no file without one, as
    the terminal prints no table)."""
    if not doc.get("force_events"):
        return []
    return [CsvTable("force_events", (
        "Area", "Event", "Time (UTC, ISO 8601)", "Latitude (°)", "Longitude (°)",
        "Position (° ')", "Leg (number)", "Distance (nm)", "Then limit (% m/m)"), tuple(
        (f["area"], f["event"], f["time_utc"], fx(f["lat"], 6), fx(f["lon"], 6),
         dm(f["lat"], f["lon"]), f["leg"], fx(f["distance_nm"], 3),
         fx(f["limit_after_pct"], 3)) for f in doc["force_events"]))]


def route_csv(doc: dict) -> list[CsvTable]:
    """The route check's tables: crossings, stretches, time inside each area, areas coming
    into force or ceasing while inside."""
    from planner.cli.route_tables import ship_time

    off = doc.get("ship_utc_offset")
    return [
        CsvTable("crossings", (
            "Area", "Event", "Latitude (°)", "Longitude (°)", "Position (° ')", "Leg (number)",
            "Distance (nm)", "Time (UTC, ISO 8601)", f"Ship's time ({off or 'no offset'})",
            "In force", "Then limit (% m/m)"), tuple(
            (c["area"], c["event"], fx(c["lat"], 6), fx(c["lon"], 6), dm(c["lat"], c["lon"]),
             c["leg"], fx(c["distance_nm"], 3), c["time_utc"] or "",
             "" if not c["time_utc"] else ship_time(c["time_utc"], off).replace("\u00a0", " "),
             "yes" if c["in_force"] else "no", fx(c["limit_after_pct"], 3))
            for c in doc["crossings"])),
        CsvTable("stretches", (
            "From (nm)", "To (nm)", "Length (nm)", "Limit (% m/m)", "Under",
            "From (UTC, ISO 8601)", "To (UTC, ISO 8601)"), tuple(
            (fx(s["from_nm"], 3), fx(s["to_nm"], 3), fx(s["to_nm"] - s["from_nm"], 3),
             fx(s["limit_pct"], 3), "; ".join(s["areas"]) or "global cap",
             s["from_utc"] or "", s["to_utc"] or "") for s in doc["stretches"])),
        CsvTable("areas", ("Area", "Limit (% m/m)", "Inside (nm)", "Inside (h)"), tuple(
            (a["name"], fx(a["limit_pct"], 3), fx(a["inside_nm"], 3), fx(a["inside_h"], 3))
            for a in doc["areas"])),
        *force_events_csv(doc),
    ]


def flush_csv(doc: dict) -> list[CsvTable]:
    """The flush tables: circuits, and the duration against main engine load."""
    circuits = CsvTable("circuits", (
        "Circuit", "Direction", "From fuel", "To fuel", "Limit (% m/m)", "Target (% m/m)",
        "Limit passed (h after the switch)", "Target reached (h after the switch)",
        "Back on regular level (% m/m)", "Back on regular (h after the switch)",
        "Compliant fuel burnt (t)", "Viscosity min (cSt)", "Viscosity max (cSt)"), tuple(
        (c["name"], c["direction"], c["from_fuel"], c["to_fuel"], fx(c["limit_pct"], 3),
         fx(c["target_pct"], 4) if c["direction"] == "to_compliant" else "",
         fx(c["time_to_limit_h"], 4),
         fx(c["time_to_target_h"], 4) if c["direction"] == "to_compliant" else "",
         fx(c.get("back_on_regular_pct"), 4), fx(c.get("back_on_regular_h"), 4),
         fx(c["compliant_burnt_t"], 3), fx(c["min_viscosity_cst"], 2),
         fx(c["max_viscosity_cst"], 2)) for c in doc["circuits"]))
    out = [circuits]
    if doc.get("table"):
        out.append(CsvTable("load_table", (
            "Circuit", "Main engine load (% MCR)", "Speed (kn)", "To limit (h)",
            "To target (h)", "Burnt (t, by fuel)"), tuple(
            (n, fx(r["load_pct"], 1), fx(r["speed_kn"], 2), fx(r["time_to_limit_h"], 4),
             fx(r["time_to_target_h"], 4),
             "; ".join(f"{f} {v:.3f}" for f, v in r["burnt_t"].items()))
            for n, rows in doc["table"].items() for r in rows)))
    return out


def procedure_csv(doc: dict) -> list[CsvTable]:
    """The procedure's tables: each circuit's volumes, and its duration against load."""
    vols, rows = [], []
    for c in doc["circuits"]:
        for v in c["volumes"]:
            vols.append((c["name"], v["name"], v["kind"], fx(v["volume_m3"], 4),
                         fx(v.get("flow_m3h"), 3), fx(v.get("holds_min"), 2),
                         "; ".join(v.get("fed_from") or [])))
        for r in c["rows"]:
            rows.append((c["name"], fx(r["load_pct"], 1), fx(r["speed_kn"], 2),
                         fx(r["time_to_limit_h"], 4), fx(r["time_to_target_h"], 4),
                         fx(r["start_before_h"], 4), fx(r["start_before_nm"], 2)))
    return [
        CsvTable("volumes", ("Circuit", "Volume", "Kind", "Volume (m³)", "Flow (m³/h)",
                             "Holds (min)", "Fed from"), tuple(vols)),
        CsvTable("durations", ("Circuit", "Main engine load (% MCR)", "Speed (kn)",
                               "To limit (h)", "To target (h)", "Start before boundary (h)",
                               "Start before boundary (nm)"), tuple(rows)),
    ]
