"""The plan PDF's scrubber tables beside the spans: if the scrubber fails, and SO2/CO2.

The same tables the terminal prints (``changeover plan``), read from the document:

- :func:`trip_tables`: from ``scrubber_trip``
  (:func:`planner.voyage.scrubber_trip_json.trip_json`), one group per control-area
  boundary passed on a scrubber (area, what happens there, time in UTC and ship's time,
  position, once in the group's head), a row per circuit beneath: the change if it fails,
  the time to compliant fuel at the inlets, the time out of compliance, when the inlets are
  compliant; then per span and circuit the longest time out of compliance and where, and
  the advisory note;
- :func:`ratio_table`: from the ``stretches`` rows' ``scrubbed``, one group per circuit,
  scrubber and fuel (its sulphur, carbon and their source in the head), a row per stretch:
  the emission ratio limit, the fuel's ratio burnt without cleaning, the removal needed
  ([MEPC-340] Table 1).

Every key is read with a default; nothing is printed for a document without them. Times
print to the minute, positions in degrees and minutes (WGS84). reportlab is imported inside
the functions.
"""

from __future__ import annotations

from planner.documents.pdf_common import INK, RULE, SHADE, data_table, esc, para, styles
from planner.documents.plan_pdf_cells import (
    keep,
    lines,
    markup,
    num,
    plain,
    pos_lines,
    pos_text,
    ship_lines,
    ship_text,
    utc_lines,
    utc_text,
)
from planner.voyage.scrubber_trip_moments import BOUNDARY_WORDS

TRIP_HEAD = ["Circuit", "Change if it fails", "To compliant", "Out of compliance",
             "Compliant UTC", "Compliant ship's time"]
TRIP_WIDTHS = [22, 32, 30, 30, 28, 36]
LONGEST_HEAD = ["Scrubber", "Circuit", "On the scrubber from UTC", "To UTC", "Longest out",
                "If it fails at UTC", "Position"]
LONGEST_WIDTHS = [20, 20, 27, 23, 30, 30, 28]
RATIO_HEAD = ["From nm", "To nm", "Limit % m/m", "Ratio limit", "Uncleaned ratio",
              "Removal needed %"]
RATIO_WIDTHS = [29, 29, 30, 30, 30, 30]
ADVISORY = ("Times from the failure: the valve of each circuit on the span switched to the "
            "fallback fuel at that moment, flushed at the planned consumption until every "
            "inlet is at the plan's flushing target. Out of compliance: of that time, while "
            "the limit in force is below the fuel on the scrubber. A failure while the "
            "changeover into that fuel is still under way starts from the state it has "
            "reached. Advisory only: the engine and boiler makers' instructions and the "
            "ship's safety management system come first; report a scrubber failure as the "
            "flag and port States ask.")
RATIO_NOTE = ("Ratios in ppm SO2 per % v/v CO2: the limit's equivalent (MEPC.340(77) Table 1), "
              "and the served circuit's fuel burnt without cleaning (all sulphur to SO2, all "
              "carbon to CO2). Removal needed: the share of that SO2 the scrubber must remove, "
              "1 - limit / uncleaned. Planning figures only: the scrubber's continuous "
              "monitoring decides.")


def hours_lines(x: float | None) -> list[str]:
    """``1.91 h`` over ``(114 min)``, or a dash."""
    return ["—"] if x is None else [f"{x:.2f} h", f"({x * 60:.0f} min)"]


def _grouped(head: list[str], rows: list[list], group_heads: list[tuple[int, object]],
             widths: list[float], align: str):
    """A table whose groups open with a shaded row spanning every column."""
    from reportlab.lib import colors
    from reportlab.platypus import TableStyle

    for first, _ in group_heads:  # the head as a paragraph of its own: kept left-aligned
        rows[first - 1][0] = para(rows[first - 1][0], "cell", markup=True)
    t = data_table(head, rows, widths, align=align, zebra=False)
    for first, _ in group_heads:
        rows[first - 1][0].style = styles()["cell"]
    cmds = []
    ends = [r for r, _ in group_heads[1:]] + [len(rows) + 1]
    for (first, _), end in zip(group_heads, ends, strict=True):
        cmds += [("SPAN", (0, first), (-1, first)),
                 ("BACKGROUND", (0, first), (-1, first), colors.HexColor(SHADE)),
                 ("LINEABOVE", (0, first), (-1, first), 0.6, colors.HexColor(INK)),
                 ("NOSPLIT", (0, first), (-1, end - 1))]
        for row in range(first + 1, end - 1):
            cmds.append(("LINEBELOW", (0, row), (-1, row), 0.25, colors.HexColor(RULE)))
    t.setStyle(TableStyle(cmds))
    return t


def _boundary_head(r: dict):
    words = BOUNDARY_WORDS.get(r.get("event", ""), plain(r.get("event", "")))
    where = [f"{utc_text(r.get('utc'))}"]
    if r.get("ship_time"):
        where.append(f"ship's time {ship_text(r.get('ship_time'))}")
    where.append(f"at {pos_text(r.get('lat'), r.get('lon'))}")
    if r.get("distance_nm") is not None:
        where.append(f"{r['distance_nm']:,.1f} nm from departure")
    return markup(f"<b>{esc(plain(r.get('area', '—')))}</b>: {esc(plain(words))} "
                  f"({esc(plain(r.get('scrubber', '—')))})<br/>{esc(plain(', '.join(where)))}")


def _lead_row(r: dict) -> list:
    problem = r.get("problem") or ""
    done = ([esc(plain(problem))], [""]) if problem else (
        utc_lines(r.get("compliant_utc")), ship_lines(r.get("compliant_ship_time")))
    return [lines([plain(r.get("circuit", "—"))], bold_first=True),
            lines([f"{plain(r.get('fuel', '—'))} to", plain(r.get("fallback_fuel", "—"))]),
            lines(hours_lines(r.get("time_to_compliant_h"))),
            lines(hours_lines(r.get("out_of_compliance_h"))),
            markup("<br/>".join(done[0])) if problem else lines(done[0]), lines(done[1])]


def boundary_table(trip: dict) -> list:
    """The lead at each boundary passed on a scrubber (a note when none is)."""
    order: list[tuple] = []
    by: dict[tuple, list[dict]] = {}
    for r in trip.get("boundaries") or []:
        key = (r.get("area"), r.get("event"), r.get("utc"), r.get("scrubber"))
        if key not in by:
            order.append(key)
            by[key] = []
        by[key].append(r)
    title = para("If the scrubber fails at a boundary (times from the failure)", "h2")
    if not order:
        return [title, para("No control-area boundary is passed on a scrubber.", "small")]
    from reportlab.platypus import TableStyle

    rows: list[list] = []
    heads: list[tuple[int, object]] = []
    problems: list[int] = []  # rows whose reason takes both "compliant" columns
    for key in order:
        heads.append((len(rows) + 1, key))
        rows.append([_boundary_head(by[key][0])] + [""] * (len(TRIP_HEAD) - 1))
        for r in by[key]:
            if r.get("problem"):
                problems.append(len(rows) + 1)
            rows.append(_lead_row(r))
    t = _grouped(TRIP_HEAD, rows, heads, TRIP_WIDTHS, "llllll")
    if problems:
        t.setStyle(TableStyle([("SPAN", (4, k), (5, k)) for k in problems]))
    return [title, t]


def longest_table(trip: dict) -> list:
    """Per span and circuit: the longest time out of compliance along it, and where."""
    rows = []
    for s in trip.get("spans") or []:
        for w in s.get("worst") or []:
            rows.append([lines([plain(s.get("scrubber", "—"))], bold_first=True),
                         plain(w.get("circuit", "—")), lines(utc_lines(s.get("from_utc"))),
                         lines(utc_lines(s.get("to_utc"))),
                         lines(hours_lines(w.get("out_of_compliance_h"))),
                         lines(utc_lines(w.get("utc"))),
                         lines(pos_lines(w.get("lat"), w.get("lon")))])
    if not rows:
        return []
    return [para("Longest time out of compliance along each span on a scrubber", "h2"),
            data_table(LONGEST_HEAD, rows, LONGEST_WIDTHS, align="lllllll")]


def trip_tables(doc: dict) -> list:
    """The two "if the scrubber fails" tables and their note (nothing without
    ``scrubber_trip``)."""
    trip = doc.get("scrubber_trip")
    if not isinstance(trip, dict):
        return []
    out = keep(boundary_table(trip))
    longest = longest_table(trip)
    if longest:
        out += keep(longest + [para(ADVISORY, "small")])
    else:
        out.append(para(ADVISORY, "small"))
    return out


def ratio_table(doc: dict) -> list:
    """SO2/CO2 of the fuel each served circuit burns on a scrubber, stretch by stretch."""
    heads: dict[tuple, str] = {}
    by: dict[tuple, list[list]] = {}
    for st in doc.get("stretches") or []:
        for x in st.get("scrubbed") or []:
            on = " + ".join(x.get("scrubbers") or [])
            key = (x.get("circuit"), on, x.get("fuel"))
            heads.setdefault(key, (
                f"<b>Circuit {esc(plain(x.get('circuit', '—')))} on "
                f"{esc(plain(x.get('fuel', '—')))}</b>, scrubber {esc(plain(on))}: "
                f"{esc(num(x.get('sulphur_pct'), '.2f'))} % m/m sulphur, "
                f"{esc(num(x.get('carbon_pct'), '.2f'))} % m/m carbon "
                f"({esc(plain(x.get('carbon_source') or '—'))})"))
            by.setdefault(key, []).append([
                num(st.get("from_nm"), ",.1f"), num(st.get("to_nm"), ",.1f"),
                num(st.get("limit_pct"), ".2f"), num(st.get("ratio_limit"), ".1f"),
                num(x.get("uncleaned_ratio"), ".1f"), num(x.get("so2_removal_needed_pct"), ".1f")])
    if not by:
        return []
    rows: list[list] = []
    group_heads: list[tuple[int, object]] = []
    for key, got in by.items():
        group_heads.append((len(rows) + 1, key))
        rows.append([markup(heads[key])] + [""] * (len(RATIO_HEAD) - 1))
        rows += got
    return keep([para("SO2/CO2 of the fuel burnt on a scrubber, by stretch", "h2"),
                 _grouped(RATIO_HEAD, rows, group_heads, RATIO_WIDTHS, "rrrrrr"),
                 para(RATIO_NOTE, "small")])
