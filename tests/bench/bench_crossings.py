"""Benchmark: exact crossings (geo.plane.area_shape + geo.crossings.track_area) against
the naive way (densify the route every 0.1 nm and test every point with shapely).

A 1000-leg route meanders across several wiggly circular areas (geodesic edges,
vertices by pyproj.Geod.fwd) totalling 200 000 vertices. Not collected by pytest
(pytest runs with --ignore=tests/bench). Run from the repository root::

    python tests/bench/bench_crossings.py [--legs 1000] [--vertices 200000] [--areas 4]

Prints a table of times, event counts and the largest distance between the naive
and the exact events (the naive answer is only good to its 0.1 nm spacing).
"""

from __future__ import annotations

import argparse
import sys
import time
from datetime import date
from pathlib import Path

import numpy as np
import pyproj
import shapely

sys.path.insert(0, str(Path(__file__).resolve().parents[2]))

from geo.area import Area, Polygon  # noqa: E402
from geo.crossings import track_area  # noqa: E402
from geo.curves import Curves  # noqa: E402
from geo.path import route_path  # noqa: E402
from geo.plane import area_shape  # noqa: E402
from geo.route import Route, Waypoint  # noqa: E402

NM = 1852.0
GEOD = pyproj.Geod(ellps="WGS84")


def wiggly_area(name: str, lat_c: float, lon_c: float, radius_m: float, n: int,
                rng) -> Area:
    """A ring of n vertices around a centre, radius wiggling by a few per cent."""
    az = np.linspace(0.0, 360.0, n, endpoint=False)
    th = np.radians(az)
    r = radius_m * (1.0 + 0.04 * np.sin(7 * th + rng.uniform(0, 6)) + 0.02 * np.sin(
        53 * th + rng.uniform(0, 6)) + 0.004 * np.sin(611 * th))
    lon, lat, _ = GEOD.fwd(np.full(n, lon_c), np.full(n, lat_c), az, r)
    ring = tuple(zip(np.asarray(lon).tolist(), np.asarray(lat).tolist(), strict=True))
    return Area(name, 0.1, date(2020, 1, 1), (Polygon(ring),), edges="geodesic")


def meander_route(n_legs: int, lon0: float, lon1: float, rng) -> Route:
    """Waypoints marching east along 50°N, swinging ±2.9° (legs of ~25-30 nm) so the
    route weaves in and out through the top and bottom of every area; legs alternate
    rhumb line and great circle."""
    i = np.arange(n_legs + 1)
    lon = np.linspace(lon0, lon1, n_legs + 1)
    lat = 50.0 + 2.9 * np.sin(2 * np.pi * i / 40.0) + rng.uniform(-0.05, 0.05, n_legs + 1)
    wps = tuple(Waypoint(f"W{k}", float(lat[k]), float(lon[k]),
                         leg="great_circle" if k % 2 else "rhumb") for k in range(n_legs + 1))
    return Route("bench", wps)


def naive(path, areas, step_m: float):
    """Densify the route every step_m, test each point against the densified areas."""
    t0 = time.perf_counter()
    d = np.arange(0.0, path.length_m, step_m)
    lat, lon = path.position(d)
    t1 = time.perf_counter()
    out = {}
    for area in areas:
        ring = area.polygons[0].exterior
        lo = np.array([p[0] for p in ring])
        la = np.array([p[1] for p in ring])
        cv = Curves.between("geodesic", la, lo, np.roll(la, -1), np.roll(lo, -1))
        slat, slon, _, _, _ = cv.sample(step_m)  # edges densified every step_m too
        poly = shapely.Polygon(np.column_stack([slon, slat]))
        shapely.prepare(poly)
        inside = shapely.contains_xy(poly, lon, lat)
        flips = np.nonzero(inside[1:] != inside[:-1])[0]
        out[area.name] = [("enter" if inside[k + 1] else "exit", 0.5 * (d[k] + d[k + 1]))
                          for k in flips]
    t2 = time.perf_counter()
    return out, t1 - t0, t2 - t1, len(d)


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    ap.add_argument("--legs", type=int, default=1000)
    ap.add_argument("--vertices", type=int, default=200_000)
    ap.add_argument("--areas", type=int, default=4)
    ap.add_argument("--step-nm", type=float, default=0.1, help="naive densification step")
    args = ap.parse_args()
    rng = np.random.default_rng(1)
    per = args.vertices // args.areas
    areas = [wiggly_area(f"A{i}", 50.0, -40.0 + 10.0 * i, 300e3, per, rng)
             for i in range(args.areas)]
    route = meander_route(args.legs, -46.0, -40.0 + 10.0 * (args.areas - 1) + 6.0, rng)

    t0 = time.perf_counter()
    path = route_path(route)
    t_path = time.perf_counter() - t0

    t_shape = t_track = 0.0
    exact = {}
    n_events = 0
    for area in areas:
        t0 = time.perf_counter()
        shape = area_shape(area)
        t1 = time.perf_counter()
        tr = track_area(path, shape)
        t2 = time.perf_counter()
        t_shape += t1 - t0
        t_track += t2 - t1
        exact[area.name] = [(e.event, e.distance_m) for e in tr.events]
        n_events += len(tr.events)

    nv, t_dens, t_test, n_pts = naive(path, areas, args.step_nm * NM)
    t_naive = t_dens + t_test
    # the naive way ten times finer (still only good to ~9 m), to show how it scales
    _, f_dens, f_test, f_pts = naive(path, areas, args.step_nm * NM / 10.0)

    # each naive event against the nearest exact event of the same kind and area
    worst = 0.0
    for name, ev in exact.items():
        for kind in ("enter", "exit"):
            a = np.array([d for k, d in ev if k == kind])
            b = np.array([d for k, d in nv[name] if k == kind])
            if len(a) and len(b):
                worst = max(worst, float(np.max(np.min(np.abs(b[:, None] - a[None, :]),
                                                       axis=1))))
    same = all([k for k, _ in exact[n]] == [k for k, _ in nv[n]] for n in exact)
    n_vert = sum(a.n_vertices for a in areas)
    print(f"route: {path.n_legs} legs, {path.length_nm:,.0f} nm; areas: {len(areas)}, "
          f"{n_vert:,} vertices (geodesic edges)")
    print(f"{'step':<52}{'time, s':>10}")
    print("-" * 62)
    print(f"{'route_path':<52}{t_path:>10.3f}")
    print(f"{'area_shape (all areas)':<52}{t_shape:>10.3f}")
    print(f"{'track_area (all areas)':<52}{t_track:>10.3f}")
    print(f"{'exact total':<52}{t_path + t_shape + t_track:>10.3f}")
    print(f"{f'naive: densify route every {args.step_nm} nm ({n_pts:,} pts)':<52}{t_dens:>10.3f}")
    print(f"{'naive: shapely contains on densified areas':<52}{t_test:>10.3f}")
    print(f"{'naive total':<52}{t_naive:>10.3f}")
    fine = f"naive, every {args.step_nm / 10:g} nm ({f_pts:,} pts), total"
    print(f"{fine:<52}{f_dens + f_test:>10.3f}")
    print("-" * 62)
    print(f"speed ratio naive / exact (shape + track): {t_naive / (t_shape + t_track):.2f}x; "
          f"naive / track_area alone: {t_naive / t_track:.2f}x; "
          f"naive at 1/10 the spacing / exact: {(f_dens + f_test) / (t_shape + t_track):.2f}x")
    print(f"events: exact {n_events}, naive {sum(len(v) for v in nv.values())}, "
          f"same sequence: {same}{'' if same else ' (naive misses in-out pairs within a step)'}"
          f"; worst naive error {worst:.1f} m (spacing {args.step_nm * NM:.1f} m)")


if __name__ == "__main__":
    main()
