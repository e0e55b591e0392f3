"""Benchmark of the flushing simulation (plain script: python tests/bench/bench_flushing.py).

For the sample ship's main circuit (areas_sample/ship.toml, VLSFO -> MGO, 85 %
MCR, limit 0.10 %, target 0.09 %) and the six-volume loop circuit of
tests/data/ships/t3_loop.toml (HFO -> MGO): the median time of one
:func:`planner.flushing.flush` over many runs, against a baseline run in the
same process, an independent general-purpose solution of the same network:
explicit Euler stepping of every well-stirred volume, each pipe a chain of
``CELLS`` well-stirred cells (tanks in series approach plug flow,
[LEVENSPIEL-1999] [P]), the flows following the consumers' volumetric draw at
the inlet blend at every step. It reads only the network's description (node
volumes, link ends, affine link flows), none of the simulator's numerics.
Both flush times are printed so the two can be compared; the baseline's differ
by the dispersion its cells add to the pipes.

The machine is shared and noisy: medians of many runs, with the spread, and
the ratio of the medians.
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

from planner.flushing import flush, make_switch, schedule_at  # noqa: E402
from planner.flushing.network import CONSUMER, PIPE, STIRRED, compile_network  # noqa: E402
from planner.ship.ship_file import load_ship  # noqa: E402

CELLS = 20  # well-stirred cells per pipe in the baseline
COURANT = 0.5  # baseline time step over the shortest cell residence time
OUTPUT_STEP_H = 10.0 / 3600.0
HORIZON_H = 6.0

CASES = [
    ("sample ship, main circuit", ROOT / "areas_sample" / "ship.toml", "vlsfo", "mgo"),
    ("t3 loop (six volumes)", ROOT / "tests" / "data" / "ships" / "t3_loop.toml", "hfo", "mgo"),
]


def timed(fn, repeat: int) -> tuple[object, list[float]]:
    """The result of ``fn`` and the wall time of each of ``repeat`` runs, s."""
    out = fn()  # warm up
    times = []
    for _ in range(repeat):
        t0 = time.perf_counter()
        out = fn()
        times.append(time.perf_counter() - t0)
    return out, times


def settled_crossing_h(t_h: np.ndarray, s_pct: np.ndarray, level_pct: float) -> float | None:
    """When ``s_pct`` gets to ``level_pct`` and stays at or below it, h (linear between
    samples; None if above at the end)."""
    above = np.flatnonzero(s_pct > level_pct)
    if not above.size:
        return float(t_h[0])
    k = int(above[-1])
    if k == len(s_pct) - 1:
        return None
    g0, g1 = s_pct[k] - level_pct, s_pct[k + 1] - level_pct
    return float(t_h[k] + (t_h[k + 1] - t_h[k]) * g0 / (g0 - g1))


def baseline(system, circuit: str, from_: str, to: str, schedule, limit_pct, target_pct):
    """Times to limit and target, h, by explicit stepping of cells (module docstring)."""
    net = compile_network(system, [make_switch(system, circuit, from_, to)])
    s, r = len(net.stirred), net.after
    # states: the stirred volumes, then CELLS cells per pipe; composition (n, F)
    n = s + CELLS * len(net.pipes)
    volume = np.concatenate((net.stirred_volume_m3, np.repeat(net.pipe_volume_m3 / CELLS, CELLS)))

    def first_cell(p):
        return s + CELLS * p

    src, dst, link_of = [], [], []  # each flow path: from state, into state (-1: a consumer)
    for i in range(len(r.src)):
        a = int(r.src[i]) if r.src_kind[i] == STIRRED else first_cell(int(r.src[i])) + CELLS - 1
        if r.dst_kind[i] == CONSUMER:
            b = -1
        else:
            b = int(r.dst[i]) if r.dst_kind[i] == STIRRED else first_cell(int(r.dst[i]))
        src.append(a), dst.append(b), link_of.append(i)
    pipe_links = []  # the flow through each pipe: the sum of its inlet links
    for p in range(len(net.pipes)):
        into = [i for i in range(len(r.src)) if r.dst_kind[i] == PIPE and r.dst[i] == p]
        pipe_links.append(into)
        for c in range(CELLS - 1):
            src.append(first_cell(p) + c), dst.append(first_cell(p) + c + 1), link_of.append(-1 - p)
    src, dst = np.array(src), np.array(dst)
    into = np.zeros((n, len(src)))  # incidence: which path flows into which state
    for k, b in enumerate(dst):
        if b >= 0:
            into[b, k] = 1.0
    into /= volume[:, None]
    into[net.is_tank.nonzero()[0]] = 0.0  # tanks: level and content held (none is filled here)
    rates = schedule.rates_for(net.consumers)[0] * 1000.0
    kappa = net.draw_density_kg_m3(schedule.basis)
    feed = np.array([src[link_of.index(int(k))] for k in net.consumer_link])
    y = np.zeros((n, len(net.fuels)))
    y[:s] = net.tank_fractions
    start = net.tank_fractions[net.stirred.index(net.switches[0].from_tank)]
    y[~np.concatenate((net.is_tank, np.zeros(n - s, bool)))] = start
    y[net.stirred.index(net.switches[0].to_tank)] = net.tank_fractions[
        net.stirred.index(net.switches[0].to_tank)]

    def path_flows(phi):
        q = net.flows_m3h(rates / (phi @ kappa))
        pipe_q = [q[links].sum() for links in pipe_links]
        return np.array([q[i] if i >= 0 else pipe_q[-1 - i] for i in link_of])

    q = path_flows(y[feed])
    dt = COURANT * float(np.min(volume[dst[dst >= 0]] / np.maximum(q[dst >= 0], 1e-12)))
    steps_per_output = max(1, int(np.ceil(OUTPUT_STEP_H / dt)))
    dt = OUTPUT_STEP_H / steps_per_output
    n_out = int(round(HORIZON_H / OUTPUT_STEP_H))
    rho, sulphur = net.density_kg_m3, net.sulphur_pct
    out = np.empty((n_out + 1, len(net.consumers)))
    for k in range(n_out + 1):
        phi = np.clip(y[feed], 0.0, None)
        m = phi * rho
        out[k] = (m @ sulphur) / m.sum(axis=1)
        if k == n_out:
            break
        for _ in range(steps_per_output):
            q = path_flows(np.clip(y[feed], 0.0, None))
            dst_y = y[np.maximum(dst, 0)]
            y += dt * (into @ (q[:, None] * (y[src] - dst_y)))
    t_h = np.arange(n_out + 1) * OUTPUT_STEP_H
    worst = out.max(axis=1)  # every inlet must be under the level
    return settled_crossing_h(t_h, worst, limit_pct), settled_crossing_h(t_h, worst, target_pct)


def spread(times: list[float]) -> str:
    q = statistics.quantiles(times, n=4) if len(times) >= 4 else [min(times), 0, max(times)]
    return f"median {statistics.median(times) * 1000:8.2f} ms (quartiles {q[0] * 1000:.2f}-" \
           f"{q[2] * 1000:.2f}, best {min(times) * 1000:.2f})"


def main() -> None:
    print(f"machine: {cpu_model()} "
          f"({platform.machine()}), {os.cpu_count()} cores, Python {platform.python_version()}, "
          f"numpy {np.__version__}, load average {os.getloadavg()[0]:.1f}")
    for name, path, from_, to in CASES:
        system = load_ship(path)
        sched = schedule_at(system, load_pct=85.0, circuits=["main"])

        def run(system=system, sched=sched, from_=from_, to=to):
            return flush(system, "main", from_, to, sched, limit_pct=0.10, target_pct=0.09)

        (result, summary), t_flush = timed(run, repeat=101)
        (lim_b, tgt_b), t_base = timed(
            lambda system=system, sched=sched, from_=from_, to=to: baseline(
                system, "main", from_, to, sched, 0.10, 0.09), repeat=5)
        ratio = statistics.median(t_base) / statistics.median(t_flush)
        print(f"\n{name}: {result.n_steps} steps, {len(result.time_h)} output points")
        print(f"  flush     {spread(t_flush)}   to limit {summary.time_to_limit_h * 60:8.3f} min,"
              f" to target {summary.time_to_target_h * 60:8.3f} min")
        print(f"  baseline  {spread(t_base)}   to limit {lim_b * 60:8.3f} min,"
              f" to target {tgt_b * 60:8.3f} min  ({CELLS} cells per pipe, explicit Euler)")
        print(f"  baseline / flush: {ratio:.0f}x (medians)")


if __name__ == "__main__":
    main()
