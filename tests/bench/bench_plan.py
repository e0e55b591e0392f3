"""Benchmark of the voyage plan (plain script: python tests/bench/bench_plan.py [REPEATS] [TREE]).

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
   machine than the wall time); given TREE (another checkout, e.g. ``git archive main``
   unpacked), the same commands run on its code, interleaved, and the ratio.

4. the command again with its byte code kept between runs (``PYTHONPYCACHEPREFIX`` set to a
   directory of its own, ``PYTHONDONTWRITEBYTECODE`` unset), as an installed package runs:
   where the environment forbids writing byte code (this project's machines set
   ``PYTHONDONTWRITEBYTECODE=1``), an editable checkout compiles every module of the
   planner from source at each start, about a seventh of the command's instructions.

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
import tempfile
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


_ENV: dict[str, str] | None = None  # the environment of the commands (None: this one's)


def _timed(cmd: list[str], cwd: Path) -> tuple[float, float]:
    """Wall time and processor time (user and system) of one run of ``cmd``, s."""
    before = resource.getrusage(resource.RUSAGE_CHILDREN)
    t0 = time.perf_counter()
    subprocess.run(cmd, cwd=cwd, check=True, capture_output=True, env=_ENV)
    wall = time.perf_counter() - t0
    after = resource.getrusage(resource.RUSAGE_CHILDREN)
    return wall, after.ru_utime + after.ru_stime - before.ru_utime - before.ru_stime


def command(repeats: int, extra: tuple[str, ...] = (), against: Path | None = None) -> None:
    """Median wall time of the plan command with --json (and ``extra``), as a process;
    with ``against``, also the same command run on the code of that tree (interleaved)."""
    args = ["plan", str(VOYAGE.relative_to(ROOT)), "--json", *extra]
    cmd = [sys.executable, "-m", "planner", *args]  # the package of the working directory
    base = [sys.executable, "-c", "import planner.voyage.run, planner.voyage.report"]
    times, imports, cpu, old, old_cpu = [], [], [], [], []
    for _ in range(repeats):  # interleaved, so a burst of load falls on all alike
        wall, proc = _timed(cmd, ROOT)
        times.append(wall), cpu.append(proc)
        imports.append(_timed(base, ROOT)[0])
        if against is not None:
            wall, proc = _timed(cmd, against)
            old.append(wall), old_cpu.append(proc)
    a, b = statistics.median(times), statistics.median(imports)
    print(f"command {' '.join(args)}: {a:.2f} s median of {repeats} "
          f"({min(times):.2f}-{max(times):.2f} s), imports and start-up included; baseline, "
          f"a process importing the planner only: {b:.2f} s; command / baseline {a / b:.1f}x")
    print(f"  processor time of the command: {statistics.median(cpu):.2f} s median "
          f"({min(cpu):.2f}-{max(cpu):.2f} s)")
    if against is not None:
        c, d = statistics.median(old), statistics.median(old_cpu)
        print(f"  the same on the code of {against}: {c:.2f} s median wall "
              f"({min(old):.2f}-{max(old):.2f} s), {d:.2f} s processor; "
              f"that / this: {c / a:.2f}x wall, {d / statistics.median(cpu):.2f}x processor")


def main() -> None:
    repeats = int(sys.argv[1]) if len(sys.argv) > 1 else 3
    against = Path(sys.argv[2]).resolve() if len(sys.argv) > 2 else None
    print(f"machine: {cpu_model()}, {os.cpu_count()} CPUs, "
          f"Python {platform.python_version()}, load average {os.getloadavg()[0]:.1f}")
    run(True, None)  # warm imports and caches of the libraries
    compare("plan build + JSON", None, repeats)
    compare("plan build + JSON, confidence 0.99", 0.99, repeats)
    command(repeats, against=against)
    command(repeats, ("--confidence", "0.99"), against)
    with tempfile.TemporaryDirectory() as cache:
        global _ENV
        _ENV = {k: v for k, v in os.environ.items() if k != "PYTHONDONTWRITEBYTECODE"}
        _ENV["PYTHONPYCACHEPREFIX"] = cache
        print("with the byte code kept between runs (as installed):")
        _timed([sys.executable, "-m", "planner", "plan", str(VOYAGE.relative_to(ROOT)), "--json"],
               ROOT)  # writes it
        command(repeats)
        command(repeats, ("--confidence", "0.99"))
        _ENV = None
    print(f"load average at the end: {os.getloadavg()[0]:.1f}")


if __name__ == "__main__":
    main()
