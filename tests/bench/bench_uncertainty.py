"""Benchmark of the Monte Carlo (plain script: python tests/bench/bench_uncertainty.py [N_BRUTE]).

1. 10 000 samples of the sample ship's main circuit (VLSFO -> MGO, limit 0.10 %, target
   0.09 %, the default [uncertainty]): wall time of the whole analysis (its simulations,
   the sampling, the evaluation of the 10 000 samples, the sensitivity and the check).
2. Accuracy against brute force: N_BRUTE (default 100) of those samples simulated one
   by one with all their inputs at once; the surrogate's error per sample, and the
   quantiles of both on the same samples.
"""

from __future__ import annotations

import statistics
import sys
import time
from pathlib import Path

import numpy as np

ROOT = Path(__file__).resolve().parents[2]
sys.path.insert(0, str(ROOT))

from planner.flushing import schedule_at  # noqa: E402
from planner.ship.ship_file import load_ship  # noqa: E402
from planner.uncertainty import analyse, load_uncertainty  # noqa: E402
from planner.uncertainty.surrogate import Case, run_case  # noqa: E402


def main() -> None:
    n_brute = int(sys.argv[1]) if len(sys.argv) > 1 else 100
    ship_file = ROOT / "areas_sample" / "ship.toml"
    ship = load_ship(ship_file)
    spec = load_uncertainty(ship_file, ship)
    sched = schedule_at(ship)
    sims = [0]

    def count(done: int, total: int) -> None:
        sims[0] += 1

    times, u = [], None
    for _ in range(3):
        sims[0] = 0
        t0 = time.perf_counter()
        u = analyse(ship, "main", "vlsfo", "mgo", sched, limit_pct=0.10, target_pct=0.09,
                    spec=spec, samples=10_000, seed=0, progress=count)
        times.append(time.perf_counter() - t0)
    print(f"{ship.ship.name} (fictional), main circuit, 10 000 samples, seed 0")
    print(f"  whole analysis: {statistics.median(times):.2f} s median of 3 "
          f"({min(times):.2f} best), {u.simulations} simulations + the plain flush")
    q = u.time_quantiles()
    print("  time to target P50/P90/P99: " + ", ".join(
        "not reached" if v is None else f"{v:.3f} h" for v in q.values())
        + f"; plain flush {u.deterministic.time_to_target_h:.3f} h")
    print(f"  surrogate check ({len(u.check.index)} samples): {u.check.max_error_s:.2f} s")

    idx = np.flatnonzero(np.isfinite(u.time_to_target_h))[:n_brute]
    nodes = [d.node for d in u.samples.defs if d.kind == "volume"]
    s_fuels = u.samples.sulphur([ship.fuels["mgo"], ship.fuels["vlsfo"]])
    exact = []
    t0 = time.perf_counter()
    for i in idx:
        f = {n: float(np.exp(u.samples.log_factor(n, "volume")[i])) for n in nodes}
        c = run_case(ship, "main", "vlsfo_service", "mgo_service", sched, u.horizon_h,
                     Case(f, float(u.samples.values["consumption"][i])))
        exact.append(c.time_to_h(s_fuels[i:i + 1], 0.09, True)[0])
    brute_s = time.perf_counter() - t0
    exact = np.array(exact)
    sur = u.time_to_target_h[idx]
    err = (sur - exact) * 3600
    print(f"\nbrute force: {len(idx)} samples simulated one by one in {brute_s:.1f} s "
          f"({brute_s / len(idx) * 1000:.0f} ms each)")
    print(f"  surrogate - exact: max |error| {np.abs(err).max():.2f} s, rms "
          f"{np.sqrt(np.mean(err**2)):.2f} s, mean {err.mean():+.2f} s "
          f"(times {exact.min():.2f}-{exact.max():.2f} h); max relative "
          f"{np.abs(err / 3600 / exact).max():.2e}")
    for p in (0.5, 0.9):
        a, b = np.quantile(exact, p), np.quantile(sur, p)
        print(f"  P{p * 100:.0f} on these samples: exact {a:.4f} h, surrogate {b:.4f} h "
              f"({(b - a) * 3600:+.2f} s)")


if __name__ == "__main__":
    main()
