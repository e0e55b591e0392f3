"""Voyage chart: sulphur at each circuit's inlet along the voyage, the limit, the boundaries.

Moments are epoch seconds (``*_epoch_s``: seconds since 1970-01-01 UTC) until
they are drawn, against UTC.
"""

from __future__ import annotations

from pathlib import Path

import numpy as np

from planner.common.outputs import write_atomic
from planner.voyage.plan import Plan


def inlet_sulphur_along_voyage(plan: Plan, circuit: str) -> tuple[np.ndarray, np.ndarray]:
    """``(epoch_s, sulphur_pct)`` at the circuit's worst inlet for the whole voyage.

    Between changeovers the inlet burns the valve's fuel; from each
    changeover's start to the next, the simulated curve of that changeover
    (held at its last value after the simulation ends). ``epoch_s`` are seconds
    since 1970-01-01 UTC, ``sulphur_pct`` % m/m.
    """
    t0, t1 = plan.timeline.start_epoch_s, plan.timeline.end_epoch_s
    parts = [(c.start_epoch_s, c) for ch in plan.changes for c in ch.circuits
             if c.circuit == circuit]
    parts.sort(key=lambda x: x[0])
    first_fuel = plan.voyage.fuel(parts[0][1].from_fuel) if parts else plan.runs[0].fuel
    ts, ss = [min(t0, parts[0][0]) if parts else t0], [first_fuel.sulphur_pct]
    for k, (start, part) in enumerate(parts):
        end = parts[k + 1][0] if k + 1 < len(parts) else t1
        curve = np.array(part.study.worst_curve(n=600))
        tt = start + curve[:, 0] * 3600.0
        keep = tt < end
        ts += [start] + tt[keep].tolist()
        ss += [ss[-1]] + curve[keep, 1].tolist()
        ts.append(end)
        ss.append(float(curve[keep, 1][-1]) if keep.any() else ss[-1])
    return np.array(ts), np.array(ss)


def draw_plan_chart(plan: Plan, out: str | Path) -> None:
    """Write the PNG: inlet sulphur per circuit against UTC, with the limit in force."""
    import matplotlib

    matplotlib.use("Agg")
    import matplotlib.dates as mdates
    import matplotlib.pyplot as plt

    def dt(epoch_s) -> np.ndarray:
        """Naive UTC datetimes (what matplotlib's date axis takes) of epoch seconds."""
        return np.array([plan.timeline.utc(v).replace(tzinfo=None)
                         for v in np.atleast_1d(epoch_s)])

    fig, ax = plt.subplots(figsize=(11, 5.5), dpi=120)
    for circuit in plan.system.circuits:
        t, s = inlet_sulphur_along_voyage(plan, circuit)
        ax.plot(dt(t), s, lw=1.5, label=f"inlet sulphur, circuit {circuit}")
    sched = plan.timeline.schedule
    lt, lv = [], []
    for st in plan.check.stretches:
        a, b = (float(x) for x in sched.epoch_at([st.from_m, st.to_m]))
        lt += [a, b]
        lv += [st.limit_pct, st.limit_pct]
    ax.plot(dt(lt), lv, color="crimson", lw=1.2, ls="--", label="limit in force")
    for n, ch in enumerate(plan.changes, start=1):
        ax.axvline(dt(ch.boundary_epoch_s)[0], color="grey", lw=0.7, ls=":")
        ax.annotate(f"{n} {'enter' if ch.direction == 'to_compliant' else 'exit'} {ch.area}",
                    (dt(ch.boundary_epoch_s)[0], 0.02), rotation=90, fontsize=7, va="bottom",
                    xytext=(2, 0), textcoords="offset points")
    ax.set_ylabel("sulphur, % m/m")
    ax.set_xlabel("UTC")
    ax.xaxis.set_major_formatter(mdates.DateFormatter("%d %b %H:%M"))
    fig.autofmt_xdate()
    ax.set_ylim(0.0, max(lv + [0.6]) * 1.05)
    ax.grid(True, lw=0.3)
    ax.legend(fontsize=8, loc="upper right")
    ax.set_title(f"{plan.system.ship.name}: sulphur at the inlets along the voyage "
                 "(advisory)")
    fig.tight_layout()
    write_atomic(out, lambda p: fig.savefig(p, format="png"), suffix=".png")
    plt.close(fig)
