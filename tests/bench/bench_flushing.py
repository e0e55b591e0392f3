"""Benchmark of the flushing simulation (plain script: python tests/bench/bench_flushing.py).

1. 48 h of a six-volume circuit with a booster loop (tests/data/ships/t3_loop.toml:
   supply pipe, mixing tank, booster pipe, heater, engine pipe, return pipe) at
   10 s output resolution, HFO 991 kg/m³ to MGO 845 kg/m³ (flows follow the
   inlet density), at the default tolerance and at 1e-4.
2. The duration-against-load table (25, 50, 75, 100 % MCR) of the sample ship's
   main circuit, with the time each row takes.
"""

from __future__ import annotations

import statistics
import sys
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[2]
sys.path.insert(0, str(ROOT))

from planner.flushing import flush, make_switch, schedule_at, simulate  # noqa: E402
from planner.ship.ship_file import load_ship  # noqa: E402


def timed(fn, repeat: int = 7):
    fn()  # warm up
    times = []
    for _ in range(repeat):
        t0 = time.perf_counter()
        out = fn()
        times.append(time.perf_counter() - t0)
    return out, statistics.median(times), min(times)


def main() -> None:
    t3 = load_ship(ROOT / "tests" / "data" / "ships" / "t3_loop.toml")
    sw = make_switch(t3, "main", "hfo", "mgo")
    schedule = schedule_at(t3, load_pct=85.0)
    print("48 h, six-volume circuit with a loop, 10 s output")
    for tol in (1e-3, 1e-4):
        r, med, best = timed(lambda tol=tol: simulate(t3, sw, schedule, 48.0, tolerance=tol))
        t = r.time_to_h("main", 0.10)
        print(
            f"  tolerance {tol:g}: {med * 1000:7.1f} ms median ({best * 1000:.1f} best), "
            f"{r.n_steps} steps, {len(r.time_h)} output points, time to 0.10 % {t:.4f} h"
        )
    ship = load_ship(ROOT / "areas_sample" / "ship.toml")
    print(
        f"\n{ship.ship.name} (fictional), main circuit, VLSFO -> MGO, limit 0.10 %, target 0.09 %"
    )
    print("  load   speed   to limit   to target   VLSFO burnt   MGO burnt   time")
    for load in (25.0, 50.0, 75.0, 100.0):
        sched = schedule_at(ship, load_pct=load, circuits=["main"])
        (_, s), med, _ = timed(
            lambda sched=sched: flush(
                ship, "main", "vlsfo", "mgo", sched, limit_pct=0.10, target_pct=0.09
            ),
            repeat=3,
        )
        speed = ship.consumers["main_engine"].speed_at_load(load)
        print(
            f"  {load:4.0f} %  {speed:5.1f} kn  {s.time_to_limit_h:6.2f} h   "
            f"{s.time_to_target_h:6.2f} h   {s.burnt_t['vlsfo']:8.2f} t   "
            f"{s.burnt_t['mgo']:8.2f} t  {med * 1000:6.1f} ms"
        )


if __name__ == "__main__":
    main()
