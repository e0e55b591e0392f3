"""The scrubber's role in the plan as rows every display prints: spans, numbered events,
the action each event asks of the crew, and the washwater discharge zones.

The rows are the plan document's ``scrubber_spans`` and ``scrubber_events``
(:func:`planner.voyage.report.scrubber_json`: times ISO 8601 UTC and ship's
time, positions in degrees, distances nm; :func:`with_scrubbers` adds them
from the plan to a document without them). Events are numbered 1..n in time
order and labelled ``S1``, ``S2`` ... (:func:`planner.charts.plan_events.scrubber_label`),
so the map, the chart, the GPX marks, the PDF, the watch sheets and the CSV name
the same event alike. :func:`action_text` says what the crew does at each
event, in words; it reads only the rows, so a document loaded back prints the
same. The EGCS approval and its operating
manual come first ([MARPOL-VI] regulation 4; [MEPC-340]): these are the
plan's assumptions, not operating instructions. Pure data (no matplotlib).
"""

from __future__ import annotations

from planner.charts.plan_events import SCRUBBER_KINDS, PlanEvent, scrubber_label
from planner.voyage.plan import Plan

MATCH_S = 1.0
"""An event begins or ends a span when their moments agree to 1 s."""

CAUTION = ("The EGCS approval (MARPOL Annex VI regulation 4) and the scrubber's operating "
           "manual come first: the plan only assumes where the scrubber may be relied on; "
           "its washwater discharge is subject to the local rules of each port and coastal "
           "state.")
"""Printed with every scrubber section (the plan PDF, the watch sheets)."""


def with_scrubbers(plan: Plan, doc: dict) -> dict:
    """``doc`` with the plan's ``scrubber_spans`` and ``scrubber_events``
    (:func:`planner.voyage.report.scrubber_json`) where it lacks them and the plan has
    any (a copy; a document that carries them is returned as it is)."""
    if ("scrubber_events" in doc and "scrubber_spans" in doc) or not (
            plan.scrubber_spans or plan.scrubber_events):
        return doc
    from planner.voyage.report import scrubber_json

    rows = scrubber_json(plan)
    out = dict(doc)
    for key in ("scrubber_spans", "scrubber_events"):
        out.setdefault(key, rows[key])
    return out


def event_rows(doc: dict) -> list[dict]:
    """The document's ``scrubber_events`` rows, each with its ``label`` (``S1``) and its
    ``action`` (:func:`action_text`) added (copies; none without a scrubber)."""
    spans = doc.get("scrubber_spans") or []
    out = []
    for r in doc.get("scrubber_events") or []:
        row = dict(r)
        row.setdefault("label", scrubber_label(r["number"]))
        row.setdefault("action", action_text(r, spans))
        out.append(row)
    return out


def _seconds(iso: str | None) -> float | None:
    from datetime import datetime

    if not iso:
        return None
    return datetime.fromisoformat(iso.replace("Z", "+00:00")).timestamp()


def _span(spans: list[dict], scrubber: str, at_s: float | None, end: str) -> dict | None:
    """The span of ``scrubber`` whose ``end`` (``from_utc`` or ``to_utc``) is at ``at_s``."""
    if at_s is None:
        return None
    for s in spans:
        t = _seconds(s.get(end))
        if s.get("scrubber") == scrubber and t is not None and abs(t - at_s) <= MATCH_S:
            return s
    return None


def _circuits(s: dict, verb: str = "") -> str:
    """``circuit main`` / ``circuits main, aux``, with the verb agreeing (``burns``)."""
    names = list(s.get("circuits") or [])
    one = len(names) == 1
    text = ("circuit " if one else "circuits ") + ", ".join(names)
    return text + (f" {verb}s" if one else f" {verb}") if verb else text


def action_text(event: dict, spans: list[dict]) -> str:
    """What the crew does at a scrubber event (a ``scrubber_events`` row), in words.

    The span the event begins (start, mode change) or ends (stop, out of service) names
    the circuits, the fuel and the fallback fuel; without one the words are general.
    """
    name, kind, mode = event.get("scrubber", "?"), event.get("event"), event.get("mode")
    t = _seconds(event.get("utc"))
    if kind == "start":
        s = _span(spans, name, t, "from_utc")
        then = (f", then switch {_circuits(s)} to {s['fuel']} (not before it runs)"
                if s else "")
        return f"start {name} in {mode} loop{then}"
    if kind == "mode_change":
        if mode == "closed":
            return (f"change {name} to closed loop before the zone (no open-loop washwater "
                    "discharge there)")
        return f"{name} may change back to open loop"
    s = _span(spans, name, t, "to_utc")
    if kind == "stop":
        if s:
            return (f"stop {name} only once {_circuits(s, 'burn')} {s['fallback_fuel']} at every "
                    f"inlet (at or under {s['limit_pct']:.2f} % m/m)")
        return f"stop {name}"
    fallback = (f"{_circuits(s)} must be on {s['fallback_fuel']} (at or under "
                f"{s['limit_pct']:.2f} % m/m)" if s else
                "no fuel above the limit on the circuits it serves")
    return (f"{name} out of service from now: {fallback}; report it as the scrubber's "
            "approval requires")


def relies_text(spans: list[dict]) -> str:
    """One line on what the plan relies on the scrubbers for (empty for no span): per
    scrubber, circuits and fuel, the stretch, the hours in each mode, the limits and the
    fallback fuels."""
    if not spans:
        return ""
    groups: dict[tuple, list[dict]] = {}
    for s in spans:
        groups.setdefault((s["scrubber"], tuple(s["circuits"]), s["fuel"]), []).append(s)
    parts, fallbacks = [], []
    for (name, _, fuel), rows in groups.items():
        hours = {m: sum(r.get("duration_h") or 0.0 for r in rows if r["mode"] == m)
                 for m in ("open", "closed")}
        modes = ", ".join(f"{h:,.1f} h {m} loop" for m, h in hours.items() if h > 0)
        limits = sorted({r["limit_pct"] for r in rows})
        parts.append(f"{name} for {_circuits(rows[0])} on {fuel} from "
                     f"{min(r['from_nm'] for r in rows):,.1f} to "
                     f"{max(r['to_nm'] for r in rows):,.1f} nm ({modes}; under "
                     f"{' and '.join(f'{x:.2f}' for x in limits)} % m/m)")
        for r in rows:
            if r.get("fallback_fuel") and r["fallback_fuel"] not in fallbacks:
                fallbacks.append(r["fallback_fuel"])
    back = f" ({', '.join(fallbacks)})" if fallbacks else ""
    return ("The plan relies on the scrubber to burn fuel above the limit in force: "
            + "; ".join(parts) + f". Without it those circuits burn their fallback fuel{back} "
            "there, and need the changeovers and the compliant fuel for it.")


def discharge_zones(plan: Plan) -> list[tuple[str, tuple[str, ...], object]]:
    """The voyage's washwater discharge zones to draw: ``(name, allows, shape)``, the shape
    the zone's united plane geometry (shapely, unwrapped longitudes, true edges); empty
    when the voyage names no zone file."""
    from geo.plane import area_shape
    from planner.voyage.discharge import voyage_discharge_zones

    return [(z.name, z.allows, area_shape(z.area).union)
            for z in voyage_discharge_zones(plan.voyage)]


def scrubber_plan_events(rows: list[dict]) -> list[PlanEvent]:
    """Scrubber event rows (of :func:`event_rows`) as the map's, chart's and GPX's events,
    labelled ``S1``, ``S2`` ... with the action (and why) as the note."""
    out = []
    for r in rows:
        why = f"; {r['reason']}" if r.get("reason") else ""
        out.append(PlanEvent(r["number"], SCRUBBER_KINDS[r["event"]], r["scrubber"],
                             r.get("utc"), r["lat"], r["lon"], r["distance_nm"],
                             (r.get("action") or r["event"]) + why))
    return out
