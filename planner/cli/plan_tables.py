"""The plan's terminal tables, made from the ``changeover plan --json`` document.

The changeover table is laid out as the plan PDF's: grouped by changeover
(one boundary), the boundary's time, ship's time and position once in the
group's head, one row per circuit beneath it. Times in the rows are ``HH:MM``
when they fall on the head's date (UTC, and ship's time with the head's
offset), else written in full with their date. Every value is an atom of
:mod:`planner.cli.text_table`, so no layout cuts it.

What each group is (a crossing, an area coming into force or ceasing while the
ship is inside it, a departure, a change of the global cap) comes from the
row's ``boundary_event``, in the words of :mod:`planner.charts.plan_events`
that the PDF and the watch sheets use too; a new kind needs its phrase there.
"""

from __future__ import annotations

from datetime import UTC, datetime, timedelta

from planner.cli.text_table import Column, Group, TextTable, atom, keep_whole, table

DASH = "—"


def parse(iso: str | None) -> datetime | None:
    """The moment of an ISO 8601 text with its offset, or None."""
    if not iso:
        return None
    return datetime.fromisoformat(iso.replace("Z", "+00:00"))


def offset_text(t: datetime) -> str:
    """``+12:00`` / ``-11:00``: the UTC offset of an aware datetime."""
    off = t.utcoffset() or timedelta(0)
    sign = "-" if off < timedelta(0) else "+"
    m = abs(int(off.total_seconds())) // 60
    return f"{sign}{m // 60:02d}:{m % 60:02d}"


def utc_full(iso: str | None) -> str:
    """``2027-05-30 04:47Z`` as one word, or a dash."""
    t = parse(iso)
    return DASH if t is None else atom(t.astimezone(UTC).strftime("%Y-%m-%d %H:%MZ"))


def ship_full(iso: str | None) -> str:
    """``2027-05-30 16:47 (+12:00)`` as one word, or a dash."""
    t = parse(iso)
    return DASH if t is None else atom(f"{t.strftime('%Y-%m-%d %H:%M')} ({offset_text(t)})")


def utc_cell(iso: str | None, day: str) -> str:
    """``04:47Z`` when on ``day`` (``YYYY-MM-DD``, UTC), else with its date."""
    t = parse(iso)
    if t is None:
        return DASH
    t = t.astimezone(UTC)
    return t.strftime("%H:%MZ") if t.strftime("%Y-%m-%d") == day else utc_full(iso)


def ship_cell(iso: str | None, day: str, offset: str) -> str:
    """``16:47`` when on ``day`` at ``offset`` (ship's time), else with its date and offset."""
    t = parse(iso)
    if t is None:
        return DASH
    if t.strftime("%Y-%m-%d") == day and offset_text(t) == offset:
        return t.strftime("%H:%M")
    return ship_full(iso)


def position(lat: float | None, lon: float | None) -> str:
    """Degrees and minutes (WGS84) as one word, or a dash."""
    from geo.position import format_position

    return DASH if lat is None or lon is None else atom(format_position(lat, lon))


def num(x: float | None, fmt: str = ".2f") -> str:
    """A number in ``fmt``, or a dash."""
    return DASH if x is None else format(x, fmt)


def groups(rows: list[dict]) -> list[list[dict]]:
    """Rows of one changeover (one number) together, in the document's order."""
    out: list[list[dict]] = []
    for r in rows:
        if out and out[-1][0].get("number") == r.get("number"):
            out[-1].append(r)
        else:
            out.append([r])
    return out


def _what(r: dict, day: str = "") -> str:
    """What the changeover is, in words (after the area's name), from its
    ``boundary_event`` (:func:`planner.charts.plan_events.what_text`, the words the
    PDF, the sheets, the map and the chart use); the boundary's moment as ``HH:MMZ``
    when on ``day``."""
    from planner.charts.plan_events import what_text

    return what_text(r, utc_cell(r.get("boundary_utc"), day))


def _moment_words(r: dict) -> tuple[str, str]:
    from planner.charts.plan_events import moment_words

    return moment_words(r)


def _head(g: list[dict]) -> tuple[str, ...]:
    r = g[0]
    b = parse(r.get("boundary_utc"))
    ship = parse(r.get("boundary_ship_time"))
    day = f"{b.astimezone(UTC):%Y-%m-%d}" if b else ""
    first = keep_whole(f"Changeover {r.get('number')}: {r.get('area', DASH)}{_what(r, day)}")
    label, at = _moment_words(r)
    where = f"{label} {utc_full(r.get('boundary_utc'))}"
    if ship is not None:
        where += f", ship's time {ship_full(r.get('boundary_ship_time'))}"
    where += f", {at} {position(r.get('boundary_lat'), r.get('boundary_lon'))}"
    if r.get("boundary_nm") is not None:
        where += f", {atom(format(r['boundary_nm'], ',.1f') + ' nm')} from departure"
    if r.get("clock_deadline") and label != "Departure":
        where += " (a moment on the clock: no arrival-time spread applies)"
    dates = []
    if b is not None:
        dates.append(f"UTC on {b.astimezone(UTC):%Y-%m-%d}")
    if ship is not None:
        dates.append(f"ship's time on {ship:%Y-%m-%d} ({offset_text(ship)})")
    return (first, where, "Times below: " + ", ".join(dates) + ", unless dated") if dates \
        else (first, where)


CHANGEOVER_COLUMNS = (
    Column("Circuit"), Column("Fuel", wrap=True), Column("Start UTC"),
    Column("Start ship's time"), Column("Start position"), Column("Done UTC"),
    Column("Done position"), Column("Margin h", "r"), Column("Takes h", "r"))


def done_at(r: dict) -> tuple[str | None, float | None, float | None]:
    """When and where the changeover is done: compliant going in, complete going back."""
    if r.get("direction") == "to_compliant" and r.get("compliant_utc"):
        return r["compliant_utc"], r.get("compliant_lat"), r.get("compliant_lon")
    return r.get("complete_utc"), r.get("complete_lat"), r.get("complete_lon")


def _row(r: dict, day: str, ship_day: str, offset: str) -> tuple[str, ...]:
    when, lat, lon = done_at(r)
    down = r.get("direction") == "to_compliant"
    return (atom(r.get("circuit", DASH)), f"{r.get('from_fuel', DASH)} → {r.get('to_fuel', DASH)}",
            utc_cell(r.get("start_utc"), day),
            ship_cell(r.get("start_ship_time"), ship_day, offset),
            position(r.get("start_lat"), r.get("start_lon")), utc_cell(when, day),
            position(lat, lon), num(r.get("margin_h")) if down else DASH,
            num(r.get("duration_h")))


def changeover_table(doc: dict) -> TextTable:
    """The changeovers by boundary: the boundary once in each group's head, its circuits
    beneath."""
    out = []
    for g in groups(doc.get("changeovers", [])):
        b = parse(g[0].get("boundary_utc"))
        ship = parse(g[0].get("boundary_ship_time"))
        day = f"{b.astimezone(UTC):%Y-%m-%d}" if b else ""
        ship_day, offset = (f"{ship:%Y-%m-%d}", offset_text(ship)) if ship else ("", "")
        out.append(Group(tuple(_row(r, day, ship_day, offset) for r in g), _head(g)))
    note = ("Start: switch the circuit's valve to the new fuel. Done: going in, compliant, "
            "every inlet at or under the target (record the time, position and compliant fuel "
            "in each tank: MARPOL Annex VI reg. 14.6); going back, complete, back on regular "
            "fuel. Margin: compliant to boundary. Takes: start to done. "
            "log start --changeover N takes the changeover's number.")
    if not out:
        return table("Changeovers, by boundary", [("", "l")], [],
                     "No changeover is needed: the route crosses no control area in force "
                     "on the voyage's dates.")
    return TextTable("Changeovers, by boundary", CHANGEOVER_COLUMNS, tuple(out), note)


def confidence_table(doc: dict) -> TextTable | None:
    """The starts at the confidence (Monte Carlo), changeovers to compliant fuel only."""
    u = doc.get("uncertainty")
    if not isinstance(u, dict):
        return None
    rows = [[str(r["number"]), atom(r["circuit"]), utc_full(r.get("start_utc")),
             utc_full(r.get("start_p50_utc")), utc_full(r.get("start_confidence_utc")),
             num(r.get("lead_confidence_h")), num(r.get("extra_compliant_t")),
             r.get("main_driver") or DASH]
            for r in doc["changeovers"] if "start_p50_utc" in r]
    pc = f"{u['confidence']:.0%}"
    return table(f"Start at {pc} confidence ({u['samples']} samples, seed {u['seed']}; main "
                 f"driver: {u['main_driver'] or DASH})",
                 [("No.", "r"), ("Circuit", "l"), ("Planned start UTC", "l"),
                  ("P50 start UTC", "l"), (f"{pc} start UTC", "l"), ("Lead h", "r"),
                  ("Extra compliant t", "r"), ("Driver", "w")], rows)


def fuel_tables(doc: dict) -> list[TextTable]:
    """Fuel on each stretch, fuel needed against on board, and the SO₂ inside each area."""
    s = table("Fuel on each stretch", [
        ("From nm", "r"), ("To nm", "r"), ("Limit % m/m", "r"), ("Under", "w"), ("Fuel", "l"),
        ("From UTC", "l")],
        [[f"{st['from_nm']:,.1f}", f"{st['to_nm']:,.1f}", f"{st['limit_pct']:.2f}",
          ", ".join(st["areas"]) or "global cap", atom(st["fuel"]), utc_full(st["from_utc"])]
         for st in doc["stretches"]])
    q = table("Fuel needed (valve switch to valve switch) against fuel on board", [
        ("Fuel", "l"), ("Needed t", "r"), ("Needed m³ at 15 °C", "r"), ("On board t", "r"),
        ("Spare t", "r")],
        [[atom(f), f"{x['needed_t']:.1f}", f"{x['needed_m3_15c']:.1f}",
          f"{x['on_board_t']:.1f}", f"{x['on_board_t'] - x['needed_t']:.1f}"]
         for f, x in doc["fuel_totals"].items()])
    so = table("SO₂ formed inside each area", [
        ("Area", "w"), ("As planned kg", "r"), (f"On {doc['regular_fuel']} kg", "r")],
        [[a, f"{x['so2_kg']:,.0f}", f"{x['so2_on_regular_kg']:,.0f}"]
         for a, x in doc["so2"]["areas"].items()])
    return [s, q, so]


def scrubber_tables(doc: dict) -> list[TextTable]:
    """The scrubber events (start, stop, mode changes, out of service) and the spans on which
    the plan relies on a scrubber; none when the ship file has no scrubber."""
    if "scrubbers" not in doc:
        return []
    why_not = [f"Scrubber {s['name']} is not relied on: {s['not_relied_on']}."
               for s in doc["scrubbers"] if s.get("not_relied_on")]
    ev = table("Scrubber events", [
        ("No.", "r"), ("Scrubber", "l"), ("Event", "l"), ("Mode", "l"), ("UTC", "l"),
        ("Ship's time", "l"), ("Position", "l"), ("nm", "r"), ("Why", "w")],
        [[str(e["number"]), atom(e["scrubber"]), atom(e["event"].replace("_", " ")),
          e["mode"] or DASH, utc_full(e["utc"]), ship_full(e["ship_time"]),
          position(e["lat"], e["lon"]), f"{e['distance_nm']:,.1f}", e["reason"]]
         for e in doc["scrubber_events"]],
        " ".join(["Start: in operation before the high-sulphur fuel reaches the inlets (at "
                  "the valve switch to it). Stop: every served inlet compliant again. The "
                  "approval and the system's operating manual come first."
                  if doc["scrubber_events"] else
                  "No scrubber event: the plan relies on no scrubber on this voyage.",
                  *why_not]))
    sp = table("Where the plan relies on a scrubber", [
        ("Scrubber", "l"), ("Circuits", "l"), ("Fuel", "l"), ("Fallback", "l"),
        ("Limit % m/m", "r"), ("Mode", "l"), ("From nm", "r"), ("To nm", "r"),
        ("From UTC", "l"), ("To UTC", "l"), ("Hours", "r"), ("SO₂ formed kg", "r"),
        ("SO₂ cleaned ≤ kg", "r"), ("Under", "w")],
        [[atom(x["scrubber"]), atom(", ".join(x["circuits"])), atom(x["fuel"]),
          atom(x["fallback_fuel"]), f"{x['limit_pct']:.2f}", x["mode"],
          f"{x['from_nm']:,.1f}", f"{x['to_nm']:,.1f}", utc_full(x["from_utc"]),
          utc_full(x["to_utc"]), f"{x['duration_h']:.2f}", f"{x['so2_formed_kg']:,.0f}",
          f"{x['so2_after_cleaning_max_kg']:,.0f}", ", ".join(x["areas"]) or "global cap"]
         for x in doc["scrubber_spans"]],
        "Fallback: the fuel the circuits burn there without the scrubber (change to it if the "
        "scrubber fails). SO₂ of the served circuits: formed, and after cleaning at most "
        "what the same fuel mass at the limit would form (the emission ratio limit's "
        "equivalent, MEPC.340(77); the monitoring records the real emission).")
    return [ev, sp, *ratio_tables(doc)]


RATIO_COLUMNS = (
    Column("From nm", "r"), Column("To nm", "r"), Column("Limit % m/m", "r"),
    Column("Ratio limit", "r"), Column("Uncleaned ratio", "r"),
    Column("Removal needed %", "r"))


def ratio_tables(doc: dict) -> list[TextTable]:
    """The SO₂/CO₂ figures of the fuel each served circuit burns on a scrubber, stretch by
    stretch (the ``stretches`` rows' ``scrubbed``): one group per circuit, scrubber and fuel,
    its fuel's sulphur, carbon and source in the head; none when no stretch has one."""
    heads: dict[tuple[str, str, str], tuple[str, ...]] = {}
    rows: dict[tuple[str, str, str], list[tuple[str, ...]]] = {}
    for st in doc.get("stretches", []):
        for x in st.get("scrubbed", []):
            on = " + ".join(x["scrubbers"])
            key = (x["circuit"], on, x["fuel"])
            heads.setdefault(key, (
                f"Circuit {atom(x['circuit'])} on {atom(x['fuel'])} "
                f"({atom(format(x['sulphur_pct'], '.2f') + ' % m/m')} sulphur, "
                f"{atom(format(x['carbon_pct'], '.2f') + ' % m/m')} carbon: "
                f"{x['carbon_source']}), scrubber {atom(on)}",))
            rows.setdefault(key, []).append((
                f"{st['from_nm']:,.1f}", f"{st['to_nm']:,.1f}", f"{st['limit_pct']:.2f}",
                f"{st['ratio_limit']:.1f}", f"{x['uncleaned_ratio']:.1f}",
                f"{x['so2_removal_needed_pct']:.1f}"))
    if not rows:
        return []
    return [TextTable(
        "SO₂/CO₂ of the fuel burnt on a scrubber, by stretch", RATIO_COLUMNS,
        tuple(Group(tuple(r), heads[k]) for k, r in rows.items()),
        "Ratios in ppm SO₂ per % v/v CO₂: the limit's equivalent (MEPC.340(77) Table 1), and "
        "the served circuit's fuel burnt without cleaning (all sulphur to SO₂, all carbon to "
        "CO₂). Removal needed: the share of that SO₂ the scrubber must remove, 1 - limit / "
        "uncleaned. Planning figures only: the scrubber's continuous monitoring decides.")]


def plan_tables(doc: dict) -> list[TextTable]:
    """Every table the plan prints, in order."""
    conf = confidence_table(doc)
    return [changeover_table(doc), *([conf] if conf else []), *scrubber_tables(doc),
            *fuel_tables(doc)]
