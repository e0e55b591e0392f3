"""Benchmark: loading area files (geo.area_files.load_areas) against reading their JSON alone.

Writes GeoJSON files of wiggly circular areas (geodesic edges, vertices by
pyproj.Geod.fwd, radius 300 km round 50°N, 10° of longitude apart) totalling
the given number of vertices into a temporary folder, then, in a fresh
process per size so that the peak memory is that size's own:

- *json*: reading and parsing the files with the standard library's ``json``
  (the baseline the ratio is taken against: a plain-Python loader pays at least
  this);
- *load_areas*: reading (parsed by orjson), every check on every ring, and the
  plane rings the checks build (kept with each area for the crossing search),
  so a ratio below 1 is a loader faster than the standard library's parse alone;
- the peak resident memory of that process (``resource.getrusage``).

Not collected by pytest (pytest runs with --ignore=tests/bench). Run from the
repository root::

    python tests/bench/bench_areas.py [--vertices 200000] [--files 4] [--scaling]
"""

from __future__ import annotations

import argparse
import inspect
import json
import os
import platform
import resource
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

import numpy as np
import pyproj

ROOT = Path(__file__).resolve().parents[2]
sys.path.insert(0, str(ROOT))
sys.path.insert(0, str(Path(__file__).resolve().parent))

from cpu import cpu_model  # noqa: E402

from geo.area_files import load_areas  # noqa: E402

GEOD = pyproj.Geod(ellps="WGS84")
SCALING = (10_000, 50_000, 200_000, 1_000_000)


def wiggly_ring(lat_c: float, lon_c: float, radius_m: float, n: int,
                rng: np.random.Generator) -> np.ndarray:
    """n vertices (lon, lat) [deg] round a centre, the radius wiggling by a few per cent."""
    az = np.linspace(0.0, 360.0, n, endpoint=False)
    th = np.radians(az)
    r = radius_m * (1.0 + 0.04 * np.sin(7 * th + rng.uniform(0, 6)) + 0.02 * np.sin(
        53 * th + rng.uniform(0, 6)) + 0.004 * np.sin(611 * th))
    lon, lat, _ = GEOD.fwd(np.full(n, lon_c), np.full(n, lat_c), az, r)
    return np.column_stack([lon, lat])


def write_area_files(folder: Path, n_vertices: int, n_files: int = 4, seed: int = 1) -> list[Path]:
    """One area per file, ``n_vertices`` in all; area i centred at 50°N, (-40 + 10 i)°E."""
    rng = np.random.default_rng(seed)
    folder.mkdir(parents=True, exist_ok=True)
    paths = []
    for i in range(n_files):
        ring = wiggly_ring(50.0, -40.0 + 10.0 * i, 300e3, n_vertices // n_files, rng).tolist()
        feature = {"type": "Feature",
                   "properties": {"name": f"A{i}", "sulphur_limit_pct": 0.1,
                                  "effective_from": "2020-01-01", "edges": "geodesic"},
                   "geometry": {"type": "Polygon", "coordinates": [ring + ring[:1]]}}
        path = folder / f"area_{i:02d}.geojson"
        path.write_text(json.dumps({"type": "FeatureCollection", "features": [feature]}))
        paths.append(path)
    return paths


def peak_rss_mb() -> float:
    """Peak resident memory of this process [MB] (Linux reports kB)."""
    return resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024.0


def child(folder: Path, repeat: int) -> dict:
    """Time json and load_areas on a folder; the numbers as a dict."""
    files = sorted(folder.glob("*.geojson"))
    t_json, t_load, calls = [], [], []
    for _ in range(repeat):
        t0 = time.perf_counter()
        for f in files:
            json.loads(f.read_bytes().decode("utf-8-sig"))
        t_json.append(time.perf_counter() - t0)
        t0 = time.perf_counter()
        areas = load_areas([folder])
        t_load.append(time.perf_counter() - t0)
    if "progress" in inspect.signature(load_areas).parameters:
        load_areas([folder], progress=calls.append)
    return {"json_s": min(t_json), "load_s": min(t_load),
            "load_median_s": statistics.median(t_load),
            "vertices": sum(a.n_vertices for a in areas), "files": len(files),
            "rss_mb": peak_rss_mb(), "progress": calls[:3], "progress_calls": len(calls)}


def run_child(folder: Path, repeat: int) -> dict:
    out = subprocess.run([sys.executable, __file__, "--child", str(folder), "--repeat",
                          str(repeat)], capture_output=True, text=True, check=True)
    return json.loads(out.stdout)


def machine() -> str:
    return (f"{cpu_model()}, {os.cpu_count()} cores, "
            f"Python {platform.python_version()}, load average {os.getloadavg()[0]:.2f}")


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    ap.add_argument("--vertices", type=int, default=200_000)
    ap.add_argument("--files", type=int, default=4)
    ap.add_argument("--repeat", type=int, default=3)
    ap.add_argument("--scaling", action="store_true", help="also 10k, 50k, 200k and 1M vertices")
    ap.add_argument("--child", type=Path, help=argparse.SUPPRESS)
    args = ap.parse_args()
    if args.child:
        print(json.dumps(child(args.child, args.repeat)))
        return
    print(f"machine: {machine()}; code: {ROOT}")
    sizes = SCALING if args.scaling else (args.vertices,)
    print(f"{'vertices':>10}{'files':>6}{'json, s':>10}{'load, s':>10}{'median':>9}"
          f"{'load/json':>11}{'µs/vertex':>11}{'peak RSS, MB':>14}")
    with tempfile.TemporaryDirectory() as tmp:
        for n in sizes:
            folder = Path(tmp) / f"v{n}"
            write_area_files(folder, n, args.files)
            r = run_child(folder, args.repeat if n <= 200_000 else 1)
            print(f"{r['vertices']:>10,}{r['files']:>6}{r['json_s']:>10.3f}{r['load_s']:>10.3f}"
                  f"{r['load_median_s']:>9.3f}{r['load_s'] / r['json_s']:>10.2f}x"
                  f"{1e6 * r['load_s'] / r['vertices']:>11.2f}{r['rss_mb']:>14.0f}")
    if r["progress_calls"]:
        print(f"progress: {r['progress_calls']} calls on the last load, first {r['progress']}")


if __name__ == "__main__":
    main()
