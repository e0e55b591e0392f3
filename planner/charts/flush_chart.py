"""Flushing chart: sulphur at each consumer inlet against time, and the viscosity path.

Inlets whose curves are the same (consumers fed by one line) are drawn once,
labelled with all their names, so no line hides another; each distinct line
has its own dash pattern. Each consumer has its own viscosity window
(:meth:`planner.ship.system.FuelSystem.window_for`): every distinct minimum and
maximum is drawn once, in its own style (minima dotted, maxima dash-dot, each
value its own pattern), labelled with the consumer kinds it belongs to
(two-stroke main engine, four-stroke engine, boiler burner), so the chart reads
in black and white. PNG, or PDF for a ``.pdf`` name.
"""

from __future__ import annotations

from collections.abc import Mapping
from pathlib import Path

import numpy as np

LINE_STYLES = ("-", "-.", (0, (3, 1, 1, 1, 1, 1)), (0, (1, 1)), (0, (5, 1)))
"""One per distinct inlet line; the limit is long dashes, the target short dots."""
MIN_STYLES = (((0, (1, 1.5)), "dotted"), ((0, (1, 4)), "sparse dots"),
              ((0, (2, 1, 2, 4)), "dot pairs"))
"""Styles of the distinct viscosity minima, with their names in the legend."""
MAX_STYLES = (((0, (7, 2, 1, 2)), "dash-dot"), ((0, (7, 2, 1, 2, 1, 2)), "dash-dot-dot"),
              ((0, (14, 4)), "long dashes"))
"""Styles of the distinct viscosity maxima, with their names in the legend."""
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


def _cycle(styles: tuple, n: int) -> list:
    """``n`` styles from ``styles``, repeating when there are more values than styles."""
    return [styles[i % len(styles)] for i in range(n)]


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


def window_limits(studies, kinds: Mapping[str, str] | None = None
                  ) -> tuple[list[tuple[float, list[str]]], list[tuple[float, list[str]]]]:
    """The distinct viscosity minima and maxima of the studies' inlet windows, cSt.

    Each as ``(value, who)``, in the order first met; ``who`` are the consumer
    kinds in words (:data:`planner.ship.inlet_limits.KIND_WORDS`) of the inlets
    whose window has that value, or their names where ``kinds`` (consumer →
    kind) does not name them.
    """
    from planner.ship.inlet_limits import KIND_WORDS

    lows: dict[float, list[str]] = {}
    highs: dict[float, list[str]] = {}
    for st in studies:
        for consumer, p in st.paths.items():
            kind = (kinds or {}).get(consumer)
            who = KIND_WORDS.get(kind, kind) if kind else consumer
            for store, value in ((lows, p.window.min_cst), (highs, p.window.max_cst)):
                names = store.setdefault(float(value), [])
                if who not in names:
                    names.append(who)
    return list(lows.items()), list(highs.items())


def draw_flush_chart(studies, out: str | Path, title: str = "",
                     kinds: Mapping[str, str] | None = None) -> None:
    """Write the chart (PNG, or PDF for a ``.pdf`` name); see :func:`flush_figure`."""
    from planner.charts.route_map import save_figure

    save_figure(flush_figure(studies, title, kinds), out)


def flush_figure(studies, title: str = "", kinds: Mapping[str, str] | None = None):
    """Two panels: inlet sulphur (% m/m) with limit and target; inlet viscosity (cSt) with
    each distinct window limit (``kinds``: consumer → kind, for the legend)."""
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
        lows, highs = window_limits(studies, kinds)
        for (value, who), (style, name) in zip(lows, _cycle(MIN_STYLES, len(lows)),
                                               strict=True):
            ax2.axhline(value, color="black", lw=1.6, ls=style,
                        label=f"minimum {value:g} cSt, {', '.join(who)} ({name})")
        for (value, who), (style, name) in zip(highs, _cycle(MAX_STYLES, len(highs)),
                                               strict=True):
            ax2.axhline(value, color="dimgrey", lw=1.6, ls=style,
                        label=f"maximum {value:g} cSt, {', '.join(who)} ({name})")
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
    ax2.legend(fontsize=7, loc="center right")  # clear of the window limits at top and bottom
    fig.suptitle(title or "Changeover at the consumer inlets")
    fig.text(0.01, 0.005, "Advisory only: the engine makers' instructions come first.",
             fontsize=7)
    fig.tight_layout()
    return fig
