"""The scrubber-trip tables, made from the ``scrubber_trip`` JSON document.

"If the scrubber fails here, how long are we out of compliance?": one group per
control-area boundary passed on a scrubber (its time in UTC and ship's time,
its position, once in the group's head), one row per circuit beneath: the fuel
changed from and to, the time to compliant fuel at the inlets, the time out of
compliance, and when the inlets would be compliant. Then, per span and
circuit, the longest time out of compliance along it and where. Every value
is an atom of :mod:`planner.cli.text_table`, so no layout cuts it. The
document is :func:`planner.voyage.scrubber_trip_json.trip_json`'s.
"""

from __future__ import annotations

from planner.cli.plan_tables import position, ship_cell, ship_full, utc_cell, utc_full
from planner.cli.text_table import Column, Group, TextTable, atom, keep_whole, table

DASH = "—"
EVENT_WORDS = {"enter": "entered on the scrubber",
               "inside_at_start": "on the scrubber from here, inside the area",
               "comes_into_force": "comes into force while on the scrubber"}
ADVISORY = ("Advisory only: a failure's time out of compliance is counted until every "
            "inlet reaches the plan's flushing target, at the planned consumption; a "
            "failure while the changeover into the span's fuel is still under way starts "
            "from the state that changeover has reached. The "
            "engine and boiler makers' instructions and the ship's safety management "
            "system come first; report a scrubber failure as the flag and port States ask.")


def hours(x: float | None) -> str:
    """``1.55 h (93 min)`` as one word, or a dash."""
    return DASH if x is None else atom(f"{x:.2f} h ({x * 60:.0f} min)")


def _day(iso: str | None) -> str:
    return "" if not iso else iso[:10]


def _lead_cells(r: dict, day: str, ship_day: str, offset: str) -> tuple[str, ...]:
    ship = ship_cell(r["compliant_ship_time"], ship_day, offset)
    done = DASH if r["compliant_utc"] is None else f"{utc_cell(r['compliant_utc'], day)} {ship}"
    return (atom(r["circuit"]), f"{atom(r['fuel'])} → {atom(r['fallback_fuel'])}",
            hours(r["time_to_compliant_h"]), hours(r["out_of_compliance_h"]),
            done if not r["problem"] else keep_whole(r["problem"]))


def _head(r: dict) -> tuple[str, ...]:
    words = EVENT_WORDS.get(r["event"], r["event"])
    return (f"{r['area']}: {words} ({atom(r['scrubber'])}), {utc_full(r['utc'])}, "
            f"{ship_full(r['ship_time'])} ship's time, {position(r['lat'], r['lon'])}, "
            f"{atom(format(r['distance_nm'], ',.1f') + ' nm')} from departure",)


def boundary_table(doc: dict) -> TextTable:
    """The lead at each boundary passed on a scrubber, one group per boundary."""
    cols = (Column("Circuit"), Column("Change if it fails", wrap=True),
            Column("To compliant"), Column("Out of compliance"),
            Column("Compliant at UTC, ship's time", wrap=True))
    groups: list[Group] = []
    keys: list[tuple] = []
    rows: dict[tuple, list[tuple[str, ...]]] = {}
    heads: dict[tuple, tuple[str, ...]] = {}
    for r in doc["scrubber_trip"]["boundaries"]:
        key = (r["area"], r["event"], r["utc"], r["scrubber"])
        if key not in rows:
            keys.append(key)
            rows[key], heads[key] = [], _head(r)
        st = r["ship_time"] or ""
        rows[key].append(_lead_cells(r, _day(r["utc"]), _day(st), st[-6:]))
    groups = [Group(tuple(rows[k]), heads[k]) for k in keys]
    note = "" if groups else "No control-area boundary is passed on a scrubber."
    return TextTable("If the scrubber fails at a boundary (times from the failure)", cols,
                     tuple(groups), note)


def longest_table(doc: dict) -> TextTable:
    """Per span and circuit: the longest time out of compliance along it, and where."""
    out = []
    for s in doc["scrubber_trip"]["spans"]:
        for w in s["worst"]:
            out.append([atom(s["scrubber"]), atom(w["circuit"]),
                        f"{utc_full(s['from_utc'])} to {utc_full(s['to_utc'])}",
                        hours(w["out_of_compliance_h"]),
                        f"{utc_full(w['utc'])} {position(w['lat'], w['lon'])}"])
    return table("Longest time out of compliance along each span on a scrubber",
                 [("Scrubber", "l"), ("Circuit", "l"), ("On the scrubber (UTC)", "w"),
                  ("Longest out", "l"), ("If it fails at (UTC, position)", "w")], out)


def trip_tables(doc: dict) -> list[TextTable]:
    """The boundary table and the longest-time table of the document."""
    return [boundary_table(doc), longest_table(doc)]


def trip_lines(doc: dict, cols: int) -> list[str]:
    """The tables laid out ``cols`` characters wide, then the advisory line."""
    from planner.cli.console import table_lines, text_lines

    return table_lines(trip_tables(doc), cols) + text_lines(ADVISORY, cols)


def print_trip(doc: dict) -> None:
    """The tables on standard output, laid out for its width."""
    from planner.cli.console import echo_lines, width

    echo_lines(trip_lines(doc, width()))
