"""Benchmark of the voyage plan (plain script: python tests/bench/bench_plan.py [REPEATS]).

On the sample voyage (``areas_sample/voyage.toml``, fictional), each REPEATS times
(default 3), medians reported:

1. the plan built and its JSON document made, with the plan's flush cache, against the
   same plan with the cache disabled (``FlushCache(enabled=False)``: every flush and
   simulation run), in this process; the documents must be equal;
2. the same with the confidence starts at 0.99 (the command line's 4000 samples, seed 0);
3. the command ``changeover plan areas_sample/voyage.toml --json`` as a process (wall
   time, imports included), for the figure a user sees, against a process that only
   imports the planner (the start-up part of it), and the same with ``--confidence 0.99``;
   also the command's processor time (user and system, less moved by other work on the
   machine than the wall time).

Also printed: the flushes and simulations run and remembered, the machine and its load
average (the machine is shared: wall times move with it).
"""

from __future__ import annotations

import os
import platform
import resource
import statistics
import subprocess
import sys
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[2]
sys.path.insert(0, str(ROOT))
sys.path.insert(0, str(Path(__file__).resolve().parent))

from cpu import cpu_model  # noqa: E402

from planner.voyage.confidence import add_uncertainty  # noqa: E402
from planner.voyage.flush_cache import FlushCache  # noqa: E402
from planner.voyage.report import plan_json  # noqa: E402
from planner.voyage.run import build_plan  # noqa: E402

VOYAGE = ROOT / "areas_sample" / "voyage.toml"
SAMPLES, SEED = 4000, 0  # the command line's defaults for the plan (planner.cli.options)


def run(enabled: bool, confidence: float | None) -> tuple[float, dict, FlushCache]:
    """Wall time [s] of the plan and its document, the document, and the cache used."""
    cache = FlushCache(enabled=enabled)
    t0 = time.perf_counter()
    plan = build_plan(VOYAGE, flushes=cache)
    doc = plan_json(plan)
    if confidence is not None:
        add_uncertainty(plan, doc, confidence, SAMPLES, SEED)
    return time.perf_counter() - t0, doc, cache


def compare(label: str, confidence: float | None, repeats: int) -> None:
    """Median times with and without the cache, their ratio and the cache's counts."""
    cached, plain = [], []
    for _ in range(repeats):
        t, doc, cache = run(True, confidence)
        cached.append(t)
        t, ref, _ = run(False, confidence)
        plain.append(t)
        if doc != ref:
            raise SystemExit(f"{label}: the document differs with the cache disabled")
    a, b = statistics.median(cached), statistics.median(plain)
    print(f"{label}: {a:.2f} s with the cache, {b:.2f} s without (medians of {repeats}); "
          f"{b / a:.1f}x")
    print(f"  ranges {min(cached):.2f}-{max(cached):.2f} s and {min(plain):.2f}-{max(plain):.2f} s")
    for kind, (hits, misses) in cache.counts().items():
        if hits or misses:
            print(f"  {kind}: {misses} run, {hits} remembered ({hits + misses} asked)")


def command(repeats: int, extra: tuple[str, ...] = ()) -> None:
    """Median wall time of the plan command with --json (and ``extra``), as a process."""
    exe = Path(sys.executable).with_name("changeover")
    cmd = ([str(exe)] if exe.exists() else [sys.executable, "-m", "planner"])
    cmd += ["plan", str(VOYAGE.relative_to(ROOT)), "--json", *extra]
    base = [sys.executable, "-c", "import planner.voyage.run, planner.voyage.report"]
    times, imports, cpu = [], [], []
    for _ in range(repeats):  # interleaved, so a burst of load falls on both
        before = resource.getrusage(resource.RUSAGE_CHILDREN)
        t0 = time.perf_counter()
        subprocess.run(cmd, cwd=ROOT, check=True, capture_output=True)
        times.append(time.perf_counter() - t0)
        after = resource.getrusage(resource.RUSAGE_CHILDREN)
        cpu.append(after.ru_utime + after.ru_stime - before.ru_utime - before.ru_stime)
        t0 = time.perf_counter()
        subprocess.run(base, cwd=ROOT, check=True, capture_output=True)
        imports.append(time.perf_counter() - t0)
    a, b = statistics.median(times), statistics.median(imports)
    print(f"command {' '.join(cmd[1:])}: {a:.2f} s median of {repeats} "
          f"({min(times):.2f}-{max(times):.2f} s), imports and start-up included; baseline, "
          f"a process importing the planner only: {b:.2f} s; command / baseline {a / b:.1f}x")
    print(f"  processor time of the command: {statistics.median(cpu):.2f} s median "
          f"({min(cpu):.2f}-{max(cpu):.2f} s)")


def main() -> None:
    repeats = int(sys.argv[1]) if len(sys.argv) > 1 else 3
    print(f"machine: {cpu_model()}, {os.cpu_count()} CPUs, "
          f"Python {platform.python_version()}, load average {os.getloadavg()[0]:.1f}")
    run(True, None)  # warm imports and caches of the libraries
    compare("plan build + JSON", None, repeats)
    compare("plan build + JSON, confidence 0.99", 0.99, repeats)
    command(repeats)
    command(repeats, ("--confidence", "0.99"))
    print(f"load average at the end: {os.getloadavg()[0]:.1f}")


if __name__ == "__main__":
    main()
