"""Flushing chart: sulphur at each consumer inlet against time, and the viscosity path.

Inlets whose curves are the same (consumers fed by one line) are drawn once,
labelled with all their names, so no line hides another; each distinct line
has its own dash pattern, and the viscosity window's minimum and maximum are
drawn in different styles, so the chart reads in black and white. PNG, or PDF
for a ``.pdf`` name.
"""

from __future__ import annotations

from pathlib import Path

import numpy as np

LINE_STYLES = ("-", "-.", (0, (3, 1, 1, 1, 1, 1)), (0, (1, 1)), (0, (5, 1)))
"""One per distinct inlet line; the limit is long dashes, the target short dots."""
SAME = 1e-9
"""Two inlet curves closer than this everywhere (% m/m or cSt) are one line."""


def distinct_curves(named: list[tuple[str, np.ndarray, np.ndarray]]
                    ) -> list[tuple[list[str], np.ndarray, np.ndarray]]:
    """Curves ``(name, x, y)`` merged where they are the same: ``(names, x, y)``, in order."""
    out: list[tuple[list[str], np.ndarray, np.ndarray]] = []
    for name, x, y in named:
        for names, x0, y0 in out:
            if x0.shape == x.shape and np.allclose(x0, x, rtol=0, atol=SAME) and \
                    np.allclose(y0, y, rtol=0, atol=SAME):
                names.append(name)
                break
        else:
            out.append(([name], x, y))
    return out


def _settled_h(st) -> float | None:
    """When the circuit's change is done [h]: the target going to compliant fuel; going
    back, when every inlet is within 5 % of its last value's distance from its first
    (the plan's back-on-regular rule, on the drawn curves)."""
    if st.summary.direction == "to_compliant":
        return st.summary.time_to_target_h
    t = np.asarray(st.result.time_h)
    out = 0.0
    for c in st.result.circuit_inlets(st.summary.circuit):
        y = np.asarray(c.sulphur_pct)
        below = np.nonzero(y < y[-1] - 0.05 * (y[-1] - y[0]))[0]
        out = max(out, float(t[below[-1] + 1]) if below.size and below[-1] + 1 < t.size else 0.0)
    return out or None


def draw_flush_chart(studies, out: str | Path, title: str = "") -> None:
    """Write the chart (PNG, or PDF for a ``.pdf`` name); see :func:`flush_figure`."""
    from planner.charts.route_map import save_figure

    save_figure(flush_figure(studies, title), out)


def flush_figure(studies, title: str = ""):
    """Two panels: inlet sulphur (% m/m) with limit and target; inlet viscosity (cSt)."""
    import matplotlib

    matplotlib.use("Agg")
    import matplotlib.pyplot as plt

    fig, (ax1, ax2) = plt.subplots(2, 1, figsize=(10, 7.5), dpi=120, sharex=True)
    k = 0
    for st in studies:
        s = st.summary
        sulphur = [(c.consumer, st.result.time_h, np.asarray(c.sulphur_pct))
                   for c in st.result.circuit_inlets(s.circuit)]
        for names, x, y in distinct_curves(sulphur):
            ax1.plot(x, y, lw=1.4, ls=LINE_STYLES[k % len(LINE_STYLES)],
                     label=f"{s.circuit}: {', '.join(names)}")
            k += 1
    k = 0
    for st in studies:
        visc = [(n, np.asarray(p.time_h), np.asarray(p.viscosity_cst))
                for n, p in st.paths.items()]
        for names, x, y in distinct_curves(visc):
            ax2.plot(x, y, lw=1.2, ls=LINE_STYLES[k % len(LINE_STYLES)],
                     label=f"{st.summary.circuit}: {', '.join(names)}")
            k += 1
    s0 = studies[0].summary
    ax1.axhline(s0.limit_pct, color="black", lw=1.4, ls=(0, (9, 3)),
                label=f"limit {s0.limit_pct:.2f} %")
    if s0.direction == "to_compliant":  # a switch back has no target to reach
        ax1.axhline(s0.target_pct, color="dimgrey", lw=1.0, ls=(0, (1, 2)),
                    label=f"target {s0.target_pct:.3f} %")
    for st in studies:
        if st.summary.time_to_target_h is not None and st.summary.direction == "to_compliant":
            ax1.axvline(st.summary.time_to_target_h, color="grey", lw=0.6)
    ax1.set_ylabel("sulphur at inlet, % m/m")
    ax1.grid(True, lw=0.3)
    ax1.legend(fontsize=7, loc="upper right")
    if any(st.paths for st in studies):
        window = next(p.window for st in studies for p in st.paths.values())
        ax2.axhline(window.min_cst, color="black", lw=1.6, ls=(0, (1, 1.5)),
                    label=f"minimum {window.min_cst:g} cSt (dotted)")
        ax2.axhline(window.max_cst, color="dimgrey", lw=1.6, ls=(0, (7, 2, 1, 2)),
                    label=f"maximum {window.max_cst:g} cSt (dash-dot)")
        ax2.set_yscale("log")
    from matplotlib.ticker import FuncFormatter

    ax2.yaxis.set_major_formatter(FuncFormatter(lambda v, _: f"{v:g}"))
    shown = (2, 3, 5, 20, 30, 50)
    ax2.yaxis.set_minor_formatter(FuncFormatter(lambda v, _: f"{v:g}" if v in shown else ""))
    reached = [_settled_h(st) for st in studies]
    reached = [x for x in reached if x]
    if reached:
        ax2.set_xlim(0.0, min(float(studies[0].result.time_h[-1]), 1.6 * max(reached) + 0.25))
    ax2.set_ylabel("viscosity at inlet, cSt (log)")
    ax2.set_xlabel("time after the changeover valve is switched, h")
    ax2.grid(True, lw=0.3, which="both")
    ax2.legend(fontsize=7, loc="upper right")
    fig.suptitle(title or "Changeover at the consumer inlets")
    fig.text(0.01, 0.005, "Advisory only: the engine makers' instructions come first.",
             fontsize=7)
    fig.tight_layout()
    return fig
