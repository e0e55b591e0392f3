"""Plan marks for the route map: caution zones and every changeover start.

A drawing callback for :func:`planner.charts.route_map.draw_route_map`
(matplotlib is imported by the map, inside its drawing function).
"""

from __future__ import annotations

from collections.abc import Callable

from planner.voyage.checks import caution_zone_shapes
from planner.voyage.plan import Plan


def plan_marks(plan: Plan, doc: dict) -> Callable[[object], None]:
    """Extra drawing for the route map: caution zones and every changeover start.

    ``doc`` is the plan's ``--json`` document (the starts are read from its rows).
    """
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
        for r in doc["changeovers"]:
            if r["direction"] != "to_compliant" or r["start_lat"] is None:
                continue
            lon = r["start_lon"] + 360.0 * round((lon_mid - r["start_lon"]) / 360.0)
            ax.plot(lon, r["start_lat"], "o", color="darkorange", ms=6, mec="black",
                    label="changeover start" if first else None)
            first = False
    return draw
