"""Benchmark: the route check (geo.compliance.check_route, exact crossings) against the
inexact shortcut of testing points every 0.1 nm along the route for inside/outside.

Areas: wiggly circular areas (geodesic edges) written as GeoJSON files and
loaded with geo.area_files.load_areas (tests/bench/bench_areas.py writes them),
200 000 vertices in all by default. Route: waypoints marching east along 50°N,
swinging ±2.9° (legs of 25-30 nm), so the route weaves in and out through the
top and bottom of every area; legs alternate rhumb line and great circle.

- *check_route, first*: right after loading (the plane rings the loader's
  checks built are reused; the areas' united shapes are built here);
- *check_route, again*: the same areas (their shapes are kept with them);
- *shortcut* (the baseline): densify the route every 0.1 nm, test each point
  with shapely against polygons of the same vertices (straight between them),
  events where the state flips. It is only good to its spacing (up to ~92 m
  off) and misses in-out pairs closer than that.

With ``--scaling``, a table for 10k, 50k, 200k and 1M vertices and 100, 1 000
and 10 000 legs, one process per vertex count, with its peak resident memory.
Not collected by pytest (pytest runs with --ignore=tests/bench). Run from the
repository root::

    python tests/bench/bench_crossings.py [--legs 1000] [--vertices 200000] [--scaling]
"""

from __future__ import annotations

import argparse
import json
import subprocess
import sys
import tempfile
import time
from datetime import date
from pathlib import Path

import numpy as np
import shapely

BENCH = Path(__file__).resolve().parent
sys.path.insert(0, str(BENCH.parents[1]))
sys.path.insert(0, str(BENCH))

from bench_areas import ROOT, SCALING, machine, peak_rss_mb, write_area_files  # noqa: E402

from geo.area_files import load_areas  # noqa: E402
from geo.compliance import check_route  # noqa: E402
from geo.path import route_path  # noqa: E402
from geo.route import Route, Waypoint  # noqa: E402

NM = 1852.0
DAY = date(2025, 6, 1)
LEGS = (100, 1_000, 10_000)


def meander_route(n_legs: int, n_areas: int, seed: int = 2) -> Route:
    """Waypoints east along 50°N across every area, swinging ±2.9° every 40 legs."""
    rng = np.random.default_rng(seed)
    i = np.arange(n_legs + 1)
    lon = np.linspace(-46.0, -40.0 + 10.0 * (n_areas - 1) + 6.0, n_legs + 1)
    lat = 50.0 + 2.9 * np.sin(2 * np.pi * i / 40.0) + rng.uniform(-0.05, 0.05, n_legs + 1)
    wps = tuple(Waypoint(f"W{k}", float(lat[k]), float(lon[k]),
                         leg="great_circle" if k % 2 else "rhumb") for k in range(n_legs + 1))
    return Route("bench", wps)


def shortcut(path, areas, step_m: float) -> dict[str, list[tuple[str, float]]]:
    """The baseline: points every step_m along the route, inside or not, flips as events."""
    d = np.append(np.arange(0.0, path.length_m, step_m), path.length_m)
    lat, lon = path.position(d)
    out = {}
    for area in areas:
        polys = [shapely.Polygon(p.exterior, p.holes) for p in area.polygons]
        geom = polys[0] if len(polys) == 1 else shapely.union_all(polys)
        shapely.prepare(geom)
        inside = shapely.contains_xy(geom, lon, lat)
        flips = np.flatnonzero(inside[1:] != inside[:-1])
        out[area.name] = [("enter" if inside[k + 1] else "exit", 0.5 * (d[k] + d[k + 1]))
                          for k in flips]
    return out


def timed(fn, repeat: int = 1):
    best, out = float("inf"), None
    for _ in range(repeat):
        t0 = time.perf_counter()
        out = fn()
        best = min(best, time.perf_counter() - t0)
    return out, best


def exact(folder: Path, n_legs: int, n_areas: int, repeat: int) -> dict:
    """Load, then time check_route on one route: first after loading, and again."""
    path = route_path(meander_route(n_legs, n_areas))
    firsts = []
    for _ in range(repeat):  # each first check on freshly loaded areas
        areas = load_areas([folder])
        check, t = timed(lambda areas=areas: check_route(path, areas, None, DAY))
        firsts.append(t)
    _, t_again = timed(lambda: check_route(path, areas, None, DAY), repeat)
    events: dict[str, list[tuple[str, float]]] = {a.name: [] for a in areas}
    for tc in check.crossings:
        events[tc.crossing.area].append((tc.crossing.event, tc.crossing.distance_m))
    return {"legs": n_legs, "nm": path.length_nm, "vertices": sum(a.n_vertices for a in areas),
            "first_s": min(firsts), "again_s": t_again, "events": events}


def baseline(folder: Path, row: dict, n_areas: int, step_nm: float, repeat: int) -> dict:
    """Time the shortcut on the same areas and route; its events against the exact ones."""
    path = route_path(meander_route(row["legs"], n_areas))
    areas = load_areas([folder])
    naive, t_naive = timed(lambda: shortcut(path, areas, step_nm * NM), repeat)
    worst = 0.0
    for name, ev in row["events"].items():
        for kind in ("enter", "exit"):
            a = np.array([x for k, x in ev if k == kind])
            b = np.array([x for k, x in naive[name] if k == kind])
            if len(a) and len(b):
                worst = max(worst, float(np.max(np.min(np.abs(b[:, None] - a[None, :]), axis=1))))
    same = all([k for k, _ in row["events"][n]] == [k for k, _ in naive[n]] for n in naive)
    return {"naive_s": t_naive, "naive_events": sum(map(len, naive.values())), "same": same,
            "worst_m": worst, "n_events": sum(map(len, row["events"].values()))}


def child(n_vertices: int, n_areas: int, step_nm: float, legs: list[int]) -> dict:
    """One vertex count: every route exactly (then the peak memory), then the shortcuts."""
    with tempfile.TemporaryDirectory() as tmp:
        folder = Path(tmp)
        write_area_files(folder, n_vertices, n_areas)
        rows = [exact(folder, n, n_areas, 1) for n in legs]
        rss = peak_rss_mb()  # before the shortcut, whose own arrays are larger
        for r in rows:
            r.update(baseline(folder, r, n_areas, step_nm, 1))
            del r["events"]
    return {"rows": rows, "rss_mb": rss}


def headline(args: argparse.Namespace) -> None:
    with tempfile.TemporaryDirectory() as tmp:
        folder = Path(tmp)
        write_area_files(folder, args.vertices, args.areas)
        _, t_load = timed(lambda: load_areas([folder]), 3)
        r = exact(folder, args.legs, args.areas, 3)
        r.update(baseline(folder, r, args.areas, args.step_nm, 3))
        fine = baseline(folder, r, args.areas, args.step_nm / 10.0, 1)
    print(f"route: {r['legs']} legs, {r['nm']:,.0f} nm; areas: {args.areas}, "
          f"{r['vertices']:,} vertices (geodesic edges), best of 3")
    print(f"{'step':<58}{'time, s':>9}{'baseline/this':>15}")
    print("-" * 82)
    rows = [("load_areas (for reference)", t_load),
            ("check_route, first after loading (builds the shapes)", r["first_s"]),
            ("check_route, again (shapes kept with the areas)", r["again_s"]),
            (f"baseline: shortcut, points every {args.step_nm:g} nm", r["naive_s"]),
            (f"shortcut, points every {args.step_nm / 10:g} nm", fine["naive_s"])]
    for label, t in rows:
        print(f"{label:<58}{t:>9.3f}{r['naive_s'] / t:>14.2f}x")
    print("-" * 82)
    print(f"events: exact {r['n_events']}, shortcut {r['naive_events']}, same sequence: "
          f"{r['same']}; worst shortcut error {r['worst_m']:.1f} m (spacing "
          f"{args.step_nm * NM:.1f} m; at {args.step_nm / 10:g} nm: {fine['worst_m']:.1f} m)")


def scaling(args: argparse.Namespace) -> None:
    print(f"{'vertices':>10}{'legs':>7}{'route, nm':>11}{'first, s':>10}{'again, s':>10}"
          f"{'shortcut, s':>13}{'ratio first':>13}{'ratio again':>13}{'events':>8}"
          f"{'peak RSS, MB':>14}")
    print("(peak RSS: the process loading that vertex count and checking all three routes,"
          " measured before the shortcut runs)")
    for n in SCALING:
        cmd = [sys.executable, __file__, "--child", str(n), "--areas", str(args.areas),
               "--step-nm", str(args.step_nm)]
        out = json.loads(subprocess.run(cmd, capture_output=True, text=True,
                                        check=True).stdout)
        for r in out["rows"]:
            print(f"{r['vertices']:>10,}{r['legs']:>7,}{r['nm']:>11,.0f}{r['first_s']:>10.3f}"
                  f"{r['again_s']:>10.3f}{r['naive_s']:>13.3f}"
                  f"{r['naive_s'] / r['first_s']:>12.2f}x{r['naive_s'] / r['again_s']:>12.2f}x"
                  f"{r['n_events']:>8}{out['rss_mb']:>14.0f}")


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    ap.add_argument("--legs", type=int, default=1000)
    ap.add_argument("--vertices", type=int, default=200_000)
    ap.add_argument("--areas", type=int, default=4)
    ap.add_argument("--step-nm", type=float, default=0.1, help="the shortcut's spacing")
    ap.add_argument("--scaling", action="store_true",
                    help="the table for 10k..1M vertices and 100..10 000 legs")
    ap.add_argument("--child", type=int, help=argparse.SUPPRESS)
    args = ap.parse_args()
    if args.child:
        print(json.dumps(child(args.child, args.areas, args.step_nm, list(LEGS))))
        return
    print(f"machine: {machine()}; code: {ROOT}")
    scaling(args) if args.scaling else headline(args)


if __name__ == "__main__":
    main()
