"""Drawing the scrubber's role: on the route map (spans along the route, events, washwater
discharge zones) and on the voyage chart (spans as bands on the time axis, events).

Styles read in black and white: a span is a double line along the route (open
loop: white between the rules; closed loop: grey between them), on the chart a band
hatched ``//`` (open loop) or ``xx`` (closed loop) on light grey; an event is a white
hexagon labelled ``S1``, ``S2`` ... as in the plan's tables; a discharge zone
a dash-dot outline with its name. Takes the rows of
:func:`planner.charts.scrubber_marks.scrubber_rows` and the events of
:func:`planner.charts.scrubber_marks.scrubber_plan_events`; matplotlib objects
come in as arguments (this module imports no plotting package).
"""

from __future__ import annotations

from collections.abc import Sequence

from planner.charts.plan_events import PlanEvent
from planner.charts.scrubber_marks import DischargeZone

SPAN_HATCH = {"open": "//", "closed": "xx"}
"""The chart band's hatch of each washwater mode."""

SPAN_INSIDE = {"open": "white", "closed": "0.55"}
"""The inside of the map's double line for each washwater mode."""

ZONE_WORDS = {("closed",): "closed loop only", (): "no washwater discharge"}


def _span_legend(mode: str) -> str:
    return f"scrubber relied on, {mode} loop"


def draw_scrubbers(ax, path, spans: Sequence[dict], events: Sequence[PlanEvent],
                   zones: Sequence[DischargeZone]) -> None:
    """Draw on the route map: each span as a double line along ``path`` (the route's
    :class:`geo.path.RoutePath`), each event as a labelled hexagon, each zone outlined."""
    import numpy as np

    from geo.ellipsoid import NM_M

    lon_mid = float(np.mean(ax.get_xlim()))
    shown: set[str] = set()
    for z in zones:
        words = ZONE_WORDS.get(z.allows, "washwater rules")
        for j, ring in enumerate(z.rings):
            xs = np.array([p[0] for p in ring])
            ys = np.array([p[1] for p in ring])
            xs = xs + 360.0 * np.round((lon_mid - xs.mean()) / 360.0)
            legend = f"washwater zone: {words}"
            ax.plot(xs, ys, color="black", lw=1.1, ls="-.", zorder=1.6,
                    label=None if legend in shown else legend)
            shown.add(legend)
            if j == 0:
                ax.annotate(f"{z.name} ({words})", (xs.mean(), ys.max()),
                            textcoords="offset points", xytext=(0, 3), fontsize=7,
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


def chart_scrubbers(ax, dt, spans: Sequence[dict], events: Sequence[PlanEvent]) -> None:
    """Draw on the voyage chart: each span as a hatched band over its time, labelled with
    the scrubber and its mode, each event as a dash-dot line labelled ``S1`` ... ``dt``
    turns ISO 8601 UTC texts into the axis's datetimes."""
    y_top = ax.get_ylim()[1]
    shown: set[str] = set()
    for s in spans:
        a, b = dt(s["from_utc"]), dt(s["to_utc"])
        legend = _span_legend(s["mode"])
        ax.axvspan(a, b, facecolor="0.95", edgecolor="0.78", hatch=SPAN_HATCH[s["mode"]],
                   lw=0.0, zorder=0.5, label=None if legend in shown else legend)
        shown.add(legend)
        ax.annotate(f"{s['scrubber']} {s['mode']} loop", (a + (b - a) / 2, y_top),
                    textcoords="offset points", xytext=(0, -10), fontsize=7, ha="center",
                    va="top", bbox={"boxstyle": "round,pad=0.15", "fc": "white",
                                    "ec": "0.45", "lw": 0.5})
    for k, e in enumerate(events):
        if e.time_utc is None:
            continue
        when = dt(e.time_utc)
        ax.axvline(when, color="black", lw=0.9, ls="-.",
                   label=None if k else "scrubber event (S number)")
        ax.annotate(f"{e.label} {e.kind} {e.area}", (when, y_top * 0.55), rotation=90,
                    fontsize=7, va="center", xytext=(-9, 0), textcoords="offset points",
                    style="italic", weight="bold")
