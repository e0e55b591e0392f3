"""Benchmark of the Monte Carlo (plain script: python tests/bench/bench_uncertainty.py [N_BRUTE]).

1. 10 000 samples of the sample ship's main circuit (VLSFO -> MGO, limit 0.10 %, target
   0.09 %, the default [uncertainty]): wall time of the whole analysis (its simulations,
   the sampling, the evaluation of the 10 000 samples, the sensitivity and the check),
   median of 3.
2. The per-sample work alone (sampling, the surrogate at every sample, sensitivity,
   quantiles, the check's bookkeeping): the analysis again with its simulations
   remembered (``FlushCache.simulate``), median of 5, against a plain Python loop
   that evaluates the surrogate sample by sample (LOOP samples, scaled to 10 000).
3. Accuracy against brute force: N_BRUTE (default 100) of those samples simulated one
   by one with all their inputs at once; the surrogate's error per sample, the
   quantiles of both on the same samples, and the analysis against simulating all
   10 000 samples (scaled).
"""

from __future__ import annotations

import os
import platform
import statistics
import sys
import time
from pathlib import Path

import numpy as np

ROOT = Path(__file__).resolve().parents[2]
sys.path.insert(0, str(ROOT))
sys.path.insert(0, str(Path(__file__).resolve().parent))

from cpu import cpu_model  # noqa: E402

from planner.flushing import schedule_at  # noqa: E402
from planner.ship.ship_file import load_ship  # noqa: E402
from planner.uncertainty import analyse, load_uncertainty  # noqa: E402
from planner.uncertainty.surrogate import Case, Surrogate, run_case  # noqa: E402
from planner.voyage.flush_cache import FlushCache  # noqa: E402

LOOP = 300


def sample_loop_s(sur: Surrogate, samples, n: int) -> float:
    """Seconds for ``n`` samples evaluated one at a time in Python (times to target and
    limit and the lead of each), timed on :data:`LOOP` samples and scaled."""
    fuels = sur.nominal.fuels
    u, sulphur = sur.u(samples), samples.sulphur(fuels)
    t0 = time.perf_counter()
    for i in range(LOOP):
        for level in (0.09, 0.10):
            theta = sur.nominal.levels(sulphur[i:i + 1], level, True)
            sur.time_h(theta, u[i:i + 1])[0] + samples.early_h[i]
    return (time.perf_counter() - t0) * n / LOOP


def per_sample_work(ship, sched, spec, det) -> tuple[float, object]:
    """Median seconds of the analysis with every simulation remembered, and the last one."""
    cache = FlushCache()
    run = lambda: analyse(ship, "main", "vlsfo", "mgo", sched, limit_pct=0.10,  # noqa: E731
                          target_pct=0.09, spec=spec, samples=10_000, seed=0,
                          deterministic=det, simulator=cache.simulate)
    run()
    times = []
    for _ in range(5):
        t0 = time.perf_counter()
        u = run()
        times.append(time.perf_counter() - t0)
    return statistics.median(times), u


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
    whole = statistics.median(times)
    print(f"machine: {cpu_model()}, {os.cpu_count()} CPUs, "
          f"Python {platform.python_version()}, numpy {np.__version__}")
    print(f"{ship.ship.name} (fictional), main circuit, 10 000 samples, seed 0")
    print(f"  whole analysis: {whole:.2f} s median of 3 "
          f"({min(times):.2f}-{max(times):.2f} s), {u.simulations} simulations + the plain flush")
    work, again = per_sample_work(ship, sched, spec, u.deterministic)
    if not np.array_equal(again.time_to_target_h, u.time_to_target_h):
        raise SystemExit("remembered simulations changed the samples' times")
    from planner.uncertainty.surrogate import build_surrogate
    sur = build_surrogate(ship, "main", "vlsfo_service", "mgo_service", sched, u.samples.defs,
                          u.horizon_h, u.horizon_h)
    loop = sample_loop_s(sur, u.samples, u.samples.n)
    print(f"  per-sample work (simulations remembered): {work * 1000:.0f} ms median of 5; "
          f"the surrogate sample by sample in Python: {loop:.2f} s ({loop / work:.0f}x)")
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
    each_s = brute_s / len(idx)
    print(f"\nbrute force: {len(idx)} samples simulated one by one in {brute_s:.1f} s "
          f"({each_s * 1000:.0f} ms each); all 10 000 would take {each_s * 1e4:.0f} s, "
          f"{each_s * 1e4 / whole:.0f}x the analysis")
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
