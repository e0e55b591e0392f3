"""The scrubber's role in the plan as rows every display prints: spans, numbered events,
the action each event asks of the crew, and the washwater discharge zones.

The plan's :class:`~planner.voyage.scrubber_events.ScrubberSpan` and
:class:`~planner.voyage.scrubber_events.ScrubberEvent` become plain rows
(:func:`scrubber_rows`: the ``scrubber_spans`` and ``scrubber_events`` keys of
the plan document, times ISO 8601 UTC and ship's time, positions in degrees,
distances nm). Events are numbered 1..n in time order and labelled ``S1``,
``S2`` ... (:func:`planner.charts.plan_events.scrubber_label`), so the map, the
chart, the GPX marks, the PDF, the watch sheets and the CSV name the same event
alike. :func:`action_text`
says what the crew does at each event, in words; it reads only the rows, so a
document loaded back prints the same. The EGCS approval and its operating
manual come first ([MARPOL-VI] regulation 4; [MEPC-340]): these are the
plan's assumptions, not operating instructions. Pure data (no matplotlib).
"""

from __future__ import annotations

import json
from dataclasses import dataclass
from pathlib import Path

from planner.charts.plan_events import SCRUBBER_KINDS, PlanEvent, scrubber_label
from planner.voyage.plan import Plan

MATCH_S = 1.0
"""An event begins or ends a span when their moments agree to 1 s."""

CAUTION = ("The EGCS approval (MARPOL Annex VI regulation 4) and the scrubber's operating "
           "manual come first: the plan only assumes where the scrubber may be relied on; "
           "its washwater discharge is subject to the local rules of each port and coastal "
           "state.")
"""Printed with every scrubber section (the plan PDF, the watch sheets)."""


def _ship_time(plan: Plan, epoch_s: float) -> str:
    from planner.common.timefmt import format_offset

    utc = plan.timeline.utc(epoch_s)
    tz = plan.voyage.ship_tz_at(utc)
    return utc.astimezone(tz).strftime("%Y-%m-%dT%H:%M") + format_offset(tz)


def _at(plan: Plan, distance_m: float) -> tuple[float, float]:
    import numpy as np

    lat, lon = plan.check.path.position(np.array([distance_m]))
    return float(lat[0]), (float(lon[0]) + 180.0) % 360.0 - 180.0


def _utc(plan: Plan, epoch_s: float) -> str:
    from planner.common.timefmt import iso_utc

    return iso_utc(plan.timeline.utc(epoch_s))


def scrubber_rows(plan: Plan) -> dict[str, list[dict]]:
    """The plan's scrubber spans and events as document rows.

    Parameters
    ----------
    plan : Plan
        The plan (its ``scrubber_spans`` and ``scrubber_events``; both empty: no rows).

    Returns
    -------
    dict
        ``{"scrubber_spans": [...], "scrubber_events": [...]}``. A span row: scrubber,
        circuits, fuel, fallback_fuel, limit_pct [% m/m], mode, from_nm / to_nm [nm],
        from_utc / to_utc, from_ship_time / to_ship_time, from_lat / from_lon / to_lat
        / to_lon [°], duration_h [h], areas. An event row: number (1..n in time order),
        label (``S1``), scrubber, kind, mode, time_utc, ship_time, lat / lon [°],
        distance_nm [nm], reason, and action (:func:`action_text`).
    """
    from geo.ellipsoid import NM_M

    spans = []
    for s in plan.scrubber_spans:
        lat0, lon0 = _at(plan, s.from_m)
        lat1, lon1 = _at(plan, s.to_m)
        spans.append({
            "scrubber": s.scrubber, "circuits": list(s.circuits), "fuel": s.fuel,
            "fallback_fuel": s.fallback_fuel, "limit_pct": s.limit_pct, "mode": s.mode,
            "from_nm": s.from_m / NM_M, "to_nm": s.to_m / NM_M,
            "from_utc": _utc(plan, s.from_epoch_s), "to_utc": _utc(plan, s.to_epoch_s),
            "from_ship_time": _ship_time(plan, s.from_epoch_s),
            "to_ship_time": _ship_time(plan, s.to_epoch_s),
            "from_lat": lat0, "from_lon": lon0, "to_lat": lat1, "to_lon": lon1,
            "duration_h": s.duration_h, "areas": list(s.areas)})
    events = []
    ordered = sorted(plan.scrubber_events, key=lambda e: (e.epoch_s, e.distance_m))
    for n, e in enumerate(ordered, start=1):
        lat, lon = _at(plan, e.distance_m)
        events.append({
            "number": n, "label": scrubber_label(n), "scrubber": e.scrubber, "kind": e.kind,
            "mode": e.mode, "time_utc": _utc(plan, e.epoch_s),
            "ship_time": _ship_time(plan, e.epoch_s), "lat": lat, "lon": lon,
            "distance_nm": e.distance_m / NM_M, "reason": e.reason})
    for r in events:
        r["action"] = action_text(r, spans)
    return {"scrubber_spans": spans, "scrubber_events": events}


def with_scrubbers(plan: Plan, doc: dict) -> dict:
    """``doc`` with the plan's scrubber rows added where it has none (a copy; the plan's
    own rows are kept when the document already carries them)."""
    rows = scrubber_rows(plan)
    out = dict(doc)
    for key, value in rows.items():
        if not out.get(key):
            out[key] = value
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
    """What the crew does at a scrubber event (a row of :func:`scrubber_rows`), in words.

    The span the event begins (start, mode change) or ends (stop, out of service) names
    the circuits, the fuel and the fallback fuel; without one the words are general.
    """
    name, kind, mode = event.get("scrubber", "?"), event.get("kind"), event.get("mode")
    t = _seconds(event.get("time_utc"))
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
    fallback = (f": {_circuits(s)} must change to {s['fallback_fuel']} (at or under "
                f"{s['limit_pct']:.2f} % m/m)" if s else "")
    return (f"{name} out of service{fallback}; follow the ship's EGCS failure procedure and "
            "report as its approval requires")


def relies_text(spans: list[dict]) -> str:
    """One line on what the plan relies on the scrubbers for (empty for no span)."""
    if not spans:
        return ""
    parts = []
    for s in spans:
        parts.append(f"{s['scrubber']} ({s['mode']} loop) for {_circuits(s)} on {s['fuel']} "
                     f"under {s['limit_pct']:.2f} % m/m from {s['from_nm']:,.1f} to "
                     f"{s['to_nm']:,.1f} nm")
    hours = sum(s.get("duration_h") or 0.0 for s in spans)
    return ("The plan relies on the scrubber to burn fuel above the limit in force: "
            + "; ".join(parts) + f" ({hours:,.1f} h in all). Without it those circuits burn "
            "their fallback fuel, and need the changeovers and the compliant fuel for it.")


@dataclass(frozen=True)
class DischargeZone:
    """A washwater discharge zone to draw: its name, the modes it allows (``("closed",)``
    or none) and its polygons as rings of ``(lon, lat)`` [°]."""

    name: str
    allows: tuple[str, ...]
    rings: tuple[tuple[tuple[float, float], ...], ...]


def _rings(geom: dict) -> list[tuple[tuple[float, float], ...]]:
    kind, coords = geom.get("type"), geom.get("coordinates") or []
    polys = [coords] if kind == "Polygon" else coords if kind == "MultiPolygon" else []
    return [tuple((float(p[0]), float(p[1])) for p in poly[0]) for poly in polys if poly]


def discharge_zones(plan: Plan) -> list[DischargeZone]:
    """The voyage's washwater discharge zones (``Voyage.discharge_zones``: a GeoJSON file,
    features with ``name`` and ``allows`` = ``"closed"`` | ``"none"``), for drawing only;
    empty when the voyage names none."""
    src = getattr(plan.voyage, "discharge_zones", None)
    if src is None:
        return []
    if isinstance(src, str | Path):
        data = json.loads(Path(src).read_text(encoding="utf-8"))
        feats = data.get("features", [])
    else:
        feats = list(src)
    out = []
    for f in feats:
        if isinstance(f, dict):
            props = f.get("properties") or {}
            allows = props.get("allows", "none")
            out.append(DischargeZone(str(props.get("name", "")),
                                     ("closed",) if allows == "closed" else (),
                                     tuple(_rings(f.get("geometry") or {}))))
    return out


def scrubber_plan_events(rows: list[dict]) -> list[PlanEvent]:
    """The scrubber event rows (``scrubber_events``) as the map's, chart's and GPX's events,
    labelled ``S1``, ``S2`` ... with the action as the note."""
    out = []
    for r in rows:
        why = f"; {r['reason']}" if r.get("reason") else ""
        out.append(PlanEvent(r["number"], SCRUBBER_KINDS[r["kind"]], r["scrubber"],
                             r.get("time_utc"), r["lat"], r["lon"], r["distance_nm"],
                             (r.get("action") or r["kind"]) + why))
    return out
