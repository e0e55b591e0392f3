"""Plan marks for the route map: caution zones, every changeover start with its number,
and the crossings labelled with the plan's changeover numbers; where the plan relies on
a scrubber, its spans along the route, its events (``S1``, ``S2`` ...) and the washwater
discharge zones.

A drawing callback for :func:`planner.charts.route_map.draw_route_map`
(matplotlib is imported by the map, inside its drawing function), and the
crossing labels (:func:`crossing_labels`) from :mod:`planner.charts.plan_events`.
The scrubber's drawing is :mod:`planner.charts.scrubber_draw`.
"""

from __future__ import annotations

import textwrap
from collections.abc import Callable

from planner.charts.plan_events import PlanEvent, plan_events
from planner.voyage.checks import caution_zone_shapes
from planner.voyage.plan import Plan

CROSSING_KINDS = ("enter", "exit")
NOTE_WIDTH = 150
"""A scrubber event's action is wrapped to this many characters under the map."""
IN_FORCE_KINDS = ("comes into force", "ceases to apply")


def events_of(plan: Plan, doc: dict) -> list[PlanEvent]:
    """The plan's events (every crossing and every force event of the document, numbered
    where a changeover is made), and the scrubber events (``S1``, ``S2`` ..., from the
    document's ``scrubber_events`` or else the plan's), in order along the route."""
    from planner.charts.scrubber_marks import event_rows, scrubber_plan_events, with_scrubbers
    from planner.voyage.route_report import route_json

    out = plan_events(route_json(plan.check)["crossings"], doc["changeovers"],
                      doc.get("force_events", []))
    scrub = scrubber_plan_events(event_rows(with_scrubbers(plan, doc)))
    if not scrub:
        return out
    return sorted(out + scrub, key=lambda e: (e.distance_nm, e.time_utc or "",
                                              e.is_scrubber, e.number or 0))


def crossing_labels(events: list[PlanEvent]) -> list[tuple[str, str]]:
    """(label, legend line) of each crossing, in the route's order."""
    out = []
    for e in events:
        if _crossing(e):
            out.append((e.label, f"{e.label or '-':>2}  {e.kind:<5} {e.area} at "
                        f"{e.distance_nm:,.1f} nm: {e.note}"))
    return out


def _crossing(e: PlanEvent) -> bool:
    """A crossing of the route check's areas (the map draws those itself)."""
    return e.kind in CROSSING_KINDS and not e.zone


def event_notes(events: list[PlanEvent]) -> list[str]:
    """The map legend's line of each event that is no crossing (an area coming into force
    while the ship is inside it, a departure, a change of the global cap, a scrubber
    event: two lines, its action beneath), with its time and the ship's position then."""
    from geo.position import format_position

    out = []
    for e in events:
        if _crossing(e):
            continue
        head = (f"{e.label or '-':>2}  {e.kind} {e.area} {e.when}, ship at "
                f"{format_position(e.lat, e.lon)}, {e.distance_nm:,.1f} nm")
        if e.is_scrubber:  # its action on lines of their own (the legend's width)
            out += [head + ":"] + textwrap.wrap(e.note, NOTE_WIDTH, initial_indent=" " * 6,
                                                subsequent_indent=" " * 6)
        else:
            out.append(f"{head}: {e.note}")
    return out


def plan_marks(plan: Plan, doc: dict) -> Callable[[object], None]:
    """Extra drawing for the route map: caution zones, every changeover start labelled with
    its changeover's number, and the events that are no crossing (before departure).

    ``doc`` is the plan's ``--json`` document (the starts are read from its rows).
    """
    from planner.charts.scrubber_marks import discharge_zones, with_scrubbers

    events = [e for e in events_of(plan, doc) if not _crossing(e)]
    scrub = [e for e in events if e.is_scrubber]
    events = [e for e in events if not e.is_scrubber]
    spans = with_scrubbers(plan, doc).get("scrubber_spans") or []
    zones = discharge_zones(plan)

    def draw(ax) -> None:
        import numpy as np
        import shapely

        lon_mid = float(np.mean(ax.get_xlim()))
        x0, x1 = ax.get_xlim()
        window = shapely.box(x0 - 5, -90, x1 + 5, 90)
        for k, shape in enumerate(caution_zone_shapes(plan.voyage)):
            for poly in shapely.get_parts(shapely.intersection(shape.union, window)):
                if poly.geom_type != "Polygon":
                    continue
                xs, ys = poly.exterior.xy
                ax.fill(xs, ys, facecolor="none", edgecolor="dimgrey", hatch="////", lw=0.8,
                        label="caution zone" if k == 0 else None)
        first = True
        for k, r in enumerate(doc["changeovers"]):
            if r["direction"] != "to_compliant" or r["start_lat"] is None:
                continue
            lon = r["start_lon"] + 360.0 * round((lon_mid - r["start_lon"]) / 360.0)
            ax.plot(lon, r["start_lat"], "o", color="darkorange", ms=6, mec="black",
                    label="changeover start (its number)" if first else None)
            ax.annotate(str(r["number"]), (lon, r["start_lat"]), textcoords="offset points",
                        xytext=(-7, 6 if k % 2 else -12), fontsize=8, color="saddlebrown",
                        ha="center")
            first = False
        shown: set[str] = set()
        for e in events:
            lon = e.lon + 360.0 * round((lon_mid - e.lon) / 360.0)
            clock = e.kind in IN_FORCE_KINDS
            kind = "washwater zone boundary (changeover)" if e.zone else e.kind
            ax.plot(lon, e.lat, "*" if clock else "D", color="darkgreen" if clock else "purple",
                    ms=12 if clock else 6, mec="black", mew=0.5,
                    label=None if kind in shown else
                    (f"area {e.kind} (ship's position then)" if clock else kind))
            shown.add(kind)
            text = f"{e.label} {e.kind} {e.when}".strip() if clock else e.label
            ax.annotate(text, (lon, e.lat), textcoords="offset points", xytext=(0, 9),
                        fontsize=8, ha="center", weight="bold")
        if spans or scrub or zones:
            from planner.charts.scrubber_draw import draw_scrubbers

            draw_scrubbers(ax, plan.check.path, spans, scrub, zones)
    return draw
