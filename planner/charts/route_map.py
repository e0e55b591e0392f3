"""Route map: the areas, the route along its true legs, the crossings.

Drawn in longitude and latitude with the longitude unwrapped around the
route (a route across 180° stays in one piece) and the aspect set for the
mid latitude. A sketch for checking, not a chart for navigation.
"""

from __future__ import annotations

from pathlib import Path

import numpy as np

from geo.compliance import RouteCheck
from geo.ellipsoid import NM_M
from planner.outputs import write_atomic

AREA_COLOURS = ("#1b9e77", "#7570b3", "#d95f02", "#e7298a", "#66a61e", "#e6ab02")


def _route_line(check: RouteCheck):
    path = check.path
    d = np.unique(np.concatenate([np.linspace(0.0, path.length_m, 2000), path.start_m]))
    return path.position(d)


def draw_route_map(check: RouteCheck, out: str | Path, extra=None) -> None:
    """Write the map PNG. ``extra(ax)`` may draw more (changeover points) on top."""
    import matplotlib

    matplotlib.use("Agg")
    import matplotlib.pyplot as plt
    import shapely

    lat, lon = _route_line(check)
    pad = 2.0
    x0, x1 = lon.min() - pad, lon.max() + pad
    y0, y1 = max(lat.min() - pad, -90.0), min(lat.max() + pad, 90.0)
    fig, ax = plt.subplots(figsize=(10, 6.5), dpi=120)
    window = shapely.box(x0 - 60, y0 - 30, x1 + 60, y1 + 30)
    for k, track in enumerate(check.tracks):
        from geo.plane import area_shape

        shape = area_shape(track.area)
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
    for tc in check.crossings:
        c = tc.crossing
        cl = c.lon + 360.0 * np.round((lon.mean() - c.lon) / 360.0)
        marker = "v" if c.event == "enter" else "^"
        ax.plot(cl, c.lat, marker, color="crimson" if c.event == "enter" else "royalblue", ms=8)
        ax.annotate(f"{c.event} {c.area}\n{c.distance_m / NM_M:,.1f} nm", (cl, c.lat),
                    textcoords="offset points", xytext=(4, 6), fontsize=7)
    if extra is not None:
        extra(ax)
    ax.set_xlim(x0, x1)
    ax.set_ylim(y0, y1)
    ax.set_aspect(1.0 / max(np.cos(np.radians(0.5 * (y0 + y1))), 0.05))
    ticks = ax.get_xticks()
    ax.set_xticks(ticks)
    ax.set_xticklabels([f"{(t + 180) % 360 - 180:.0f}°" for t in ticks])
    ax.set_xlabel("longitude (degrees, east positive)")
    ax.set_ylabel("latitude (degrees, north positive)")
    ax.set_title(f"Route {check.path.route.name}: areas and boundary crossings "
                 "(sketch, not for navigation)")
    ax.grid(True, lw=0.3)
    ax.legend(loc="best", fontsize=8)
    fig.tight_layout()
    write_atomic(out, lambda p: fig.savefig(p, format="png"), suffix=".png")
    plt.close(fig)
