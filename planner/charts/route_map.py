"""Route map: the areas, the route along its true legs, the crossings.

Drawn in longitude and latitude with the longitude unwrapped around the
route (a route across 180° stays in one piece) and the aspect set for the
mid latitude. Ticks fall on round steps and say exactly where they are
(:mod:`planner.charts.geo_ticks`: whole degrees, or degrees and minutes when
zoomed in). Crossings are numbered 1, 2, ... along the route, or carry the
labels given (the plan's changeover numbers). Written as PNG, or as PDF when
the file name ends in ``.pdf`` (vector: its text can be read back). A sketch
for checking, not a chart for navigation.
"""

from __future__ import annotations

from pathlib import Path

import numpy as np

from geo.compliance import RouteCheck
from geo.ellipsoid import NM_M
from planner.common.outputs import write_atomic

NOTE_LINES_FIT = 8
"""Legend lines under the map that fit its foot; the figure grows by each line more."""
NOTE_LINE_IN = 0.125
"""The height of one legend line (7 pt monospace), inches."""

LEGEND_ONE_COLUMN = 11
"""A legend of more entries than this is laid out in two columns."""

AREA_COLOURS = ("#1b9e77", "#7570b3", "#d95f02", "#e7298a", "#66a61e", "#e6ab02")


def _route_line(check: RouteCheck):
    path = check.path
    d = np.unique(np.concatenate([np.linspace(0.0, path.length_m, 2000), path.start_m]))
    return path.position(d)


def save_figure(fig, out: str | Path) -> None:
    """Write a figure atomically: PDF when ``out`` ends in ``.pdf``, else PNG; then close
    it."""
    import matplotlib.pyplot as plt

    kind = "pdf" if str(out).lower().endswith(".pdf") else "png"
    write_atomic(out, lambda p: fig.savefig(p, format=kind), suffix=f".{kind}")
    plt.close(fig)


def figure_png(fig, dpi: int = 200) -> bytes:
    """A figure as PNG bytes (for a document), then closed."""
    import io

    import matplotlib.pyplot as plt

    buf = io.BytesIO()
    fig.savefig(buf, format="png", dpi=dpi)
    plt.close(fig)
    return buf.getvalue()


def draw_route_map(check: RouteCheck, out: str | Path, extra=None,
                   labels: list[tuple[str, str]] | None = None,
                   notes: list[str] | None = None) -> None:
    """Write the map (PNG, or PDF for a ``.pdf`` name); see :func:`map_figure`."""
    save_figure(map_figure(check, extra, labels, notes), out)


def _force_events(check: RouteCheck, ax, lon_mid: float) -> list[str]:
    """Each area coming into force (or ceasing) while the ship is inside it: a star at the
    ship's position then, labelled with its time; the legend lines."""
    from geo.position import format_position
    from planner.common.timefmt import iso_utc

    out = []
    for k, f in enumerate(check.force_events):
        kind = "comes into force" if f.event == "comes_into_force" else "ceases to apply"
        when = iso_utc(f.time_utc)
        when = f"{when[:10]} {when[11:16]}Z"
        lon = f.lon + 360.0 * np.round((lon_mid - f.lon) / 360.0)
        ax.plot(lon, f.lat, "*", color="darkgreen", ms=12, mec="black", mew=0.5,
                label="area in force from then (ship's position)" if k == 0 else None)
        ax.annotate(f"{kind} {when}", (lon, f.lat), textcoords="offset points",
                    xytext=(0, 9), fontsize=8, ha="center", weight="bold")
        out.append(f" *  {kind} {f.area} {when}, ship at {format_position(f.lat, f.lon)}, "
                   f"{f.distance_nm:,.1f} nm")
    return out


def map_figure(check: RouteCheck, extra=None, labels: list[tuple[str, str]] | None = None,
               notes: list[str] | None = None):
    """The map as a matplotlib figure. ``extra(ax)`` may draw more (changeover points) on
    top; ``labels`` gives each crossing's (label, legend line) in order (default: 1, 2,
    ... with event, area and distance); ``notes`` are more legend lines (the plan's events
    that are no crossing). Without ``extra``, each area coming into force or ceasing while
    the ship is inside it is drawn with its time (the route check's force events)."""
    import matplotlib

    matplotlib.use("Agg")
    import matplotlib.pyplot as plt
    import shapely

    from planner.charts.geo_ticks import lat_label, lon_label, ticks_deg

    lat, lon = _route_line(check)
    pad = 1.5
    x0, x1 = lon.min() - pad, lon.max() + pad
    y0, y1 = lat.min() - pad, lat.max() + pad
    window = shapely.box(x0, -90.0, x1, 90.0)
    shapes = [t.shape for t in check.tracks]
    for shape in shapes:
        part = shapely.intersection(shape.union, window)
        if not part.is_empty:
            _, b0, _, b1 = part.bounds
            y0, y1 = min(y0, b0 - 0.5), max(y1, b1 + 0.5)
    y0, y1 = max(y0, -90.0), min(y1, 90.0)
    aspect = 1.0 / max(np.cos(np.radians(0.5 * (y0 + y1))), 0.05)
    height = float(np.clip(10.0 * (y1 - y0) * aspect / (x1 - x0), 3.0, 9.0))
    lines = len(check.crossings) + len(notes or []) + (len(check.force_events)
                                                       if extra is None else 0)
    grow = max(0, lines - NOTE_LINES_FIT) * NOTE_LINE_IN
    fig, ax = plt.subplots(figsize=(11, height + 1.8 + grow), dpi=120)
    for k, (track, shape) in enumerate(zip(check.tracks, shapes, strict=True)):
        colour = AREA_COLOURS[k % len(AREA_COLOURS)]
        geom = shapely.intersection(shape.union, window)
        polys = [g for g in shapely.get_parts(geom) if g.geom_type == "Polygon"]
        for j, poly in enumerate(polys):
            xs, ys = poly.exterior.xy
            label = None
            if j == 0:
                live = "" if track.area.in_force_on(check.on) or check.schedule else \
                    " (not in force)"
                label = f"{track.area.name}: {track.area.sulphur_limit_pct:.2f} %{live}"
            ax.fill(xs, ys, color=colour, alpha=0.18, label=label)
            ax.plot(xs, ys, color=colour, lw=1.0)
            for hole in poly.interiors:
                hx, hy = hole.xy
                ax.fill(hx, hy, color="white")
                ax.plot(hx, hy, color=colour, lw=0.8, ls="--")
    ax.plot(lon, lat, color="black", lw=1.6, label="route")
    for w in check.path.route.waypoints:
        wl = w.lon + 360.0 * np.round((lon.mean() - w.lon) / 360.0)
        ax.plot(wl, w.lat, "ks", ms=4)
        ax.annotate(w.name, (wl, w.lat), textcoords="offset points", xytext=(4, -10), fontsize=8)
    extra_notes, notes = notes, []
    if labels is None:
        labels = [(str(n), f"{n}  {tc.crossing.event:<5} {tc.crossing.area}  at "
                   f"{tc.crossing.distance_m / NM_M:,.1f} nm"
                   + ("" if tc.in_force else " (not in force then)"))
                  for n, tc in enumerate(check.crossings, start=1)]
    shown = set()
    for n, (tc, (label, note)) in enumerate(zip(check.crossings, labels, strict=True), 1):
        c = tc.crossing
        cl = c.lon + 360.0 * np.round((lon.mean() - c.lon) / 360.0)
        enter = c.event == "enter"
        ax.plot(cl, c.lat, "v" if enter else "^", color="crimson" if enter else "royalblue",
                ms=8, label=None if c.event in shown else ("enter" if enter else "exit"))
        shown.add(c.event)
        if label:
            ax.annotate(label, (cl, c.lat), textcoords="offset points", fontsize=8,
                        xytext=(0, 9 if n % 2 else -16), ha="center", weight="bold")
        notes.append(note)
    notes += list(extra_notes or [])
    if extra is None:
        notes += _force_events(check, ax, float(lon.mean()))
    if notes:
        fig.text(0.01, 0.01, "\n".join(notes), fontsize=7, family="monospace", va="bottom")
    if extra is not None:
        extra(ax)
    ax.set_aspect(aspect)
    xt, yt = ticks_deg(x0, x1, 10), ticks_deg(y0, y1, 8)
    ax.set_xticks(xt, [lon_label(t) for t in xt])
    ax.set_yticks(yt, [lat_label(t) for t in yt])
    ax.set_ylim(y0, y1)
    ax.set_xlim(x0, x1)
    ax.set_xlabel("longitude")
    ax.set_ylabel("latitude")
    ax.set_title(f"Route {check.path.route.name}: areas and boundary crossings "
                 "(sketch, not for navigation)")
    ax.grid(True, lw=0.3)
    many = len(ax.get_legend_handles_labels()[1]) > LEGEND_ONE_COLUMN
    ax.legend(loc="best", fontsize=8, ncol=2 if many else 1)
    bottom, top = 0.03 + 0.018 * len(notes) / (height + 1.8) * 6, 1.0
    if grow:  # more legend lines than fit: the figure grew by them, and they get its foot
        bottom = (len(notes) * NOTE_LINE_IN + 0.6) / (height + 1.8 + grow)
        top = 1.0 - 0.15 / (height + 1.8 + grow)
    fig.tight_layout(rect=(0, bottom, 1, top))
    return fig
