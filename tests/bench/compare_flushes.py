"""Same results before and after a speed change: every test ship's flushes, compared.

Plain script, not collected by pytest. For every ship of ``tests/data/ships`` and
the sample ship, every circuit, both directions between its tanks and four loads
(30, 60, 85 and 100 % MCR; limit 0.10 %, target 0.09 % m/m), it runs
:func:`planner.flushing.flush` with the code of ``--code`` (default: this
repository) and writes, per case, the times to the limit and the target, the step
count, the output curves and the trace of every inlet (or the error) to ``--dump``.
Given ``--against`` (an earlier dump), it prints the largest difference of the
flush times [min] and of the inlet volume fractions [-], and the cases whose step
count or length differ. To compare with the main branch::

    git archive main | tar -x -C /tmp/base
    .venv/bin/python tests/bench/compare_flushes.py --code /tmp/base --dump /tmp/base.json
    .venv/bin/python tests/bench/compare_flushes.py --dump /tmp/new.json --against /tmp/base.json

For the error of either against a converged solution, dump a reference at a thousandth
of the tolerance (``--tolerance 1e-6``, about 30 times the steps) and compare with it.
"""

from __future__ import annotations

import argparse
import itertools
import json
import sys
from pathlib import Path

ROOT = Path(__file__).resolve().parents[2]
LOADS_PCT = (30.0, 60.0, 85.0, 100.0)


def dump(code: Path, tolerance: float | None = None) -> dict:
    """Every case's results with the package found under ``code`` (at the simulation's
    default step tolerance, or at ``tolerance``)."""
    sys.path.insert(0, str(code))
    import numpy as np

    from planner.flushing import flush, schedule_at
    from planner.ship.ship_file import load_ship

    ships = sorted((ROOT / "tests" / "data" / "ships").glob("*.toml"))
    ships.append(ROOT / "areas_sample" / "ship.toml")
    out = {}
    for path in ships:
        system = load_ship(path)
        for name, circuit in system.circuits.items():
            for a, b in itertools.permutations(circuit.tanks, 2):
                for load in LOADS_PCT:
                    key = f"{path.name}:{name}:{a}->{b}:{load:g}"
                    try:
                        sched = schedule_at(system, load_pct=load, circuits=[name])
                        options = {} if tolerance is None else {"tolerance": tolerance}
                        r, s = flush(system, name, a, b, sched, limit_pct=0.10, target_pct=0.09,
                                     **options)
                    except Exception as exc:  # an error must stay the same error
                        out[key] = {"error": f"{type(exc).__name__}: {exc}"}
                        continue
                    out[key] = {
                        "limit_h": s.time_to_limit_h, "target_h": s.time_to_target_h,
                        "n_steps": r.n_steps, "time_h": np.asarray(r.time_h).tolist(),
                        "fractions": {c: np.asarray(v.fractions).tolist()
                                      for c, v in r.inlets.items()},
                        "trace": {c: np.asarray(v.trace_fractions).tolist()
                                  for c, v in r.inlets.items()},
                        "trace_h": {c: np.asarray(v.trace_time_h).tolist()
                                    for c, v in r.inlets.items()},
                    }
    return out


def compare(new: dict, old: dict) -> None:
    """Print the largest differences between two dumps."""
    import numpy as np

    if new.keys() != old.keys():
        raise SystemExit("the two dumps have different cases")
    worst_min, worst_phi, moved = 0.0, 0.0, []
    steps_new = steps_old = restepped = 0
    for key, a in new.items():
        b = old[key]
        if "error" in a or "error" in b:
            if a != b:
                moved.append(f"{key}: {a.get('error')} / {b.get('error')}")
            continue
        for f in ("limit_h", "target_h"):
            if (a[f] is None) != (b[f] is None):
                moved.append(f"{key}: {f} {a[f]} / {b[f]}")
            elif a[f] is not None:
                worst_min = max(worst_min, abs(a[f] - b[f]) * 60.0)
        steps_new += a["n_steps"]
        steps_old += b["n_steps"]
        if len(a["time_h"]) != len(b["time_h"]):  # settled one output time earlier or later
            moved.append(f"{key}: {len(a['time_h'])} / {len(b['time_h'])} output times")
        same_steps = a.get("trace_h") == b.get("trace_h")
        if not same_steps:
            restepped += 1
        # the trace holds every step end: comparable only where the steps end at the same times
        for part in ("fractions", "trace") if same_steps else ("fractions",):
            for c in a[part]:
                x, y = np.array(a[part][c]), np.array(b[part][c])
                n = min(x.shape[-1], y.shape[-1])  # the output times both have
                x, y = x[..., :n], y[..., :n]
                worst_phi = max(worst_phi, float(np.max(np.abs(x - y), initial=0.0)))
    print(f"{len(new)} cases; largest flush-time difference {worst_min:.3g} min; largest "
          f"inlet volume-fraction difference (output times, and every step end where the "
          f"steps are the same) {worst_phi:.3g}")
    print(f"steps: {steps_new} now, {steps_old} before ({steps_new / max(steps_old, 1):.3f}); "
          f"{restepped} cases stepped differently")
    for line in moved:
        print("  differs:", line)


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    ap.add_argument("--code", type=Path, default=ROOT, help="where the planner package is")
    ap.add_argument("--dump", type=Path, required=True, help="write the results here (JSON)")
    ap.add_argument("--against", type=Path, help="an earlier dump to compare with")
    ap.add_argument("--tolerance", type=float,
                    help="the simulation's step tolerance (default: its own, 1e-3); a dump at "
                         "1e-6 is a reference to measure the default's error against")
    args = ap.parse_args()
    results = dump(args.code.resolve(), args.tolerance)
    args.dump.write_text(json.dumps(results))
    print(f"{len(results)} cases written to {args.dump}")
    if args.against is not None:
        compare(results, json.loads(args.against.read_text()))


if __name__ == "__main__":
    main()
