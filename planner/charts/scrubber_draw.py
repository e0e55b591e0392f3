"""Drawing the scrubber's role: on the route map (spans along the route, events, washwater
discharge zones) and on the voyage chart (spans as bands on the time axis, events).

Styles read in black and white: a span is a double line along the route (open
loop: white between the rules; closed loop: grey between them), on the chart a band
hatched ``//`` (open loop) or ``xx`` (closed loop) on light grey; an event is a white
hexagon labelled ``S1``, ``S2`` ... as in the plan's tables; a discharge zone
a dash-dot (closed loop only) or dotted (no discharge) outline with its name. Takes the rows of
:func:`planner.voyage.report.scrubber_json` (spans) and the events of
:func:`planner.charts.scrubber_marks.scrubber_plan_events`; matplotlib objects
come in as arguments (this module imports no plotting package).
"""

from __future__ import annotations

from collections.abc import Sequence

from planner.charts.plan_events import PlanEvent

SPAN_HATCH = {"open": "//", "closed": "xx"}
"""The chart band's hatch of each washwater mode."""

SPAN_INSIDE = {"open": "white", "closed": "0.55"}
"""The inside of the map's double line for each washwater mode."""

ZONE_WORDS = {("closed",): "closed loop only", (): "no washwater discharge"}
ZONE_LINE = {("closed",): ("-.", 1.1), (): (":", 1.8)}
"""The outline (line style, width) of a zone by the modes it allows."""


def _span_legend(mode: str) -> str:
    return f"scrubber relied on, {mode} loop"


def draw_scrubbers(ax, path, spans: Sequence[dict], events: Sequence[PlanEvent],
                   zones: Sequence[tuple[str, tuple[str, ...], object]]) -> None:
    """Draw on the route map: each span as a double line along ``path`` (the route's
    :class:`geo.path.RoutePath`), each event as a labelled hexagon, each zone (``(name,
    allows, shapely shape)`` of :func:`planner.charts.scrubber_marks.discharge_zones`)
    outlined."""
    import numpy as np
    import shapely

    from geo.ellipsoid import NM_M

    lon_mid = float(np.mean(ax.get_xlim()))
    shown: set[str] = set()
    x0, x1 = ax.get_xlim()
    window = shapely.box(x0 - 5, -90, x1 + 5, 90)
    for name, allows, shape in zones:
        words = ZONE_WORDS.get(allows, "washwater rules")
        legend = f"washwater zone: {words}"
        for j, poly in enumerate(shapely.get_parts(shapely.intersection(shape, window))):
            if poly.geom_type != "Polygon":
                continue
            xs, ys = (np.asarray(v) for v in poly.exterior.xy)
            ax.plot(xs, ys, color="black", lw=ZONE_LINE[allows][1], ls=ZONE_LINE[allows][0],
                    zorder=1.6, label=None if legend in shown else legend)
            shown.add(legend)
            if j == 0:
                ax.annotate(name, (float(xs.mean()), float(ys.min())),
                            textcoords="offset points", xytext=(0, -9), fontsize=7,
                            ha="center", style="italic")
    from matplotlib import patheffects

    for s in spans:
        d = np.linspace(s["from_nm"] * NM_M, s["to_nm"] * NM_M, 200)
        lat, lon = path.position(d)
        legend = _span_legend(s["mode"])
        # a double line: black rules, the inside white (open loop) or grey (closed loop)
        ax.plot(lon, lat, color=SPAN_INSIDE[s["mode"]], lw=3.4, solid_capstyle="butt",
                zorder=1.8, label=None if legend in shown else legend,
                path_effects=[patheffects.Stroke(linewidth=6.2, foreground="black",
                                                 capstyle="butt"), patheffects.Normal()])
        shown.add(legend)
    for k, e in enumerate(events):
        lon = e.lon + 360.0 * round((lon_mid - e.lon) / 360.0)
        ax.plot(lon, e.lat, "h", color="white", ms=9, mec="black", mew=1.0, zorder=4,
                label=None if k else "scrubber event (S number)")
        ax.annotate(e.label, (lon, e.lat), textcoords="offset points",
                    xytext=(8, -12 if k % 2 else 6), fontsize=8, weight="bold",
                    style="italic", zorder=5)


def merged_spans(spans: Sequence[dict]) -> list[dict]:
    """Spans of one scrubber in one mode that follow on each other, as one (the plan cuts
    them where the limit changes; the chart shows the scrubber's mode)."""
    out: list[dict] = []
    for s in spans:
        last = out[-1] if out else None
        if last is not None and last["scrubber"] == s["scrubber"] and \
                last["mode"] == s["mode"] and last["to_utc"] == s["from_utc"]:
            out[-1] = dict(last, to_utc=s["to_utc"], to_nm=s["to_nm"])
        else:
            out.append(dict(s))
    return out


def chart_scrubbers(ax, dt, spans: Sequence[dict], events: Sequence[PlanEvent],
                    above: str = "") -> None:
    """Draw on the voyage chart: each span (:func:`merged_spans`) as a hatched band over
    its time, labelled with the scrubber and its mode, each event as a dash-dot line
    labelled ``S1`` ... ``dt`` turns ISO 8601 UTC texts into the axis's datetimes;
    ``above`` is a line on what the scale leaves out (the fuel burnt on the scrubber)."""
    y_top = ax.get_ylim()[1]
    shown: set[str] = set()
    for k, s in enumerate(merged_spans(spans)):
        a, b = dt(s["from_utc"]), dt(s["to_utc"])
        legend = _span_legend(s["mode"])
        ax.axvspan(a, b, facecolor="0.95", edgecolor="0.78", hatch=SPAN_HATCH[s["mode"]],
                   lw=0.0, zorder=0.5, label=None if legend in shown else legend)
        shown.add(legend)
        ax.annotate(f"{s['scrubber']} {s['mode']}", (a + (b - a) / 2, y_top),
                    textcoords="offset points", xytext=(0, -4 if k % 2 == 0 else -17),
                    fontsize=7, ha="center", va="top",
                    bbox={"boxstyle": "round,pad=0.15", "fc": "white", "ec": "0.45",
                          "lw": 0.5})
    for k, e in enumerate(events):
        if e.time_utc is None:
            continue
        when = dt(e.time_utc)
        ax.axvline(when, color="black", lw=0.9, ls="-.",
                   label=None if k else "scrubber event (S number)")
        ax.annotate(f"{e.label} {e.kind.removeprefix('scrubber ')}", (when, y_top * 0.86),
                    rotation=90, fontsize=7, va="top", xytext=(-9, 0),
                    textcoords="offset points", style="italic", weight="bold")
    if above:
        ax.set_xlabel(f"UTC ({above})")
