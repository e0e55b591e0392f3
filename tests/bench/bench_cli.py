"""Benchmark: how quickly the command line answers ``--help``.

Runs ``changeover --help``, ``changeover plan --help`` and, as the baseline in
the same run, ``python -c pass`` (the interpreter starting and stopping), each
as a fresh process, interleaved so that a burst of load on the machine falls on
all three alike. Not collected by pytest (pytest runs with
--ignore=tests/bench). Run from the repository root with the project's
interpreter::

    .venv/bin/python tests/bench/bench_cli.py [--runs 41] [--warm 3]

Prints the median and the minimum wall time of each, its ratio to the
baseline's, the time above the baseline, the median processor time (user and
system: less moved by other work on the machine than the wall time), and the
machine (processor, CPUs).
No assertion: the test that ``--help`` imports nothing heavy is
``tests/cli/test_help_imports.py``.
"""

from __future__ import annotations

import argparse
import os
import platform
import resource
import statistics
import subprocess
import sys
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[2]
sys.path.insert(0, str(Path(__file__).resolve().parent))

from cpu import cpu_model  # noqa: E402

_SCRIPT = Path(sys.executable).with_name("changeover")
CHANGEOVER = [str(_SCRIPT)] if _SCRIPT.exists() else [sys.executable, "-m", "planner"]
"""The installed ``changeover`` beside the interpreter, else ``python -m planner``."""

CASES: dict[str, list[str]] = {
    "python -c pass": [sys.executable, "-c", "pass"],
    "changeover --help": [*CHANGEOVER, "--help"],
    "changeover plan --help": [*CHANGEOVER, "plan", "--help"],
}
"""What is timed, each as a fresh process."""

BASELINE = "python -c pass"


def timed_s(argv: list[str]) -> tuple[float, float]:
    """Wall and processor (user + system) time of one run of ``argv`` [s]; its output is
    discarded, a failure raises."""
    before = resource.getrusage(resource.RUSAGE_CHILDREN)
    t0 = time.perf_counter()
    subprocess.run(argv, cwd=ROOT, check=True, stdout=subprocess.DEVNULL,
                   stderr=subprocess.DEVNULL)
    wall = time.perf_counter() - t0
    after = resource.getrusage(resource.RUSAGE_CHILDREN)
    return wall, (after.ru_utime - before.ru_utime) + (after.ru_stime - before.ru_stime)


def measure(runs: int, warm: int) -> dict[str, list[tuple[float, float]]]:
    """``runs`` (wall, processor) times [s] of every case, after ``warm`` unrecorded rounds
    (file cache, byte-code files); the cases take turns in each round."""
    times: dict[str, list[tuple[float, float]]] = {name: [] for name in CASES}
    for i in range(warm + runs):
        for name, argv in CASES.items():
            t = timed_s(argv)
            if i >= warm:
                times[name].append(t)
    return times


def report(times: dict[str, list[tuple[float, float]]]) -> None:
    """The table: median and minimum wall time [ms], ratios to the baseline, wall time
    above it [ms], median processor time [ms]."""
    wall = {name: [w for w, _ in ts] for name, ts in times.items()}
    base_med, base_min = statistics.median(wall[BASELINE]), min(wall[BASELINE])
    print(f"machine: {cpu_model()}, {os.cpu_count()} CPUs, "
          f"Python {platform.python_version()}, {len(wall[BASELINE])} runs each")
    print(f"{'command':<24}{'median ms':>10}{'min ms':>8}{'median/base':>13}{'min/base':>10}"
          f"{'above base ms':>15}{'cpu ms':>8}")
    print("-" * 88)
    for name, ws in wall.items():
        med, low = statistics.median(ws), min(ws)
        cpu = statistics.median(c for _, c in times[name])
        print(f"{name:<24}{med * 1e3:>10.1f}{low * 1e3:>8.1f}{med / base_med:>13.2f}"
              f"{low / base_min:>10.2f}{(med - base_med) * 1e3:>15.1f}{cpu * 1e3:>8.1f}")


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    ap.add_argument("--runs", type=int, default=41, help="timed runs of each command")
    ap.add_argument("--warm", type=int, default=3, help="untimed rounds first")
    args = ap.parse_args()
    report(measure(args.runs, args.warm))


if __name__ == "__main__":
    main()
