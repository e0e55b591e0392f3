"""Flushing chart: sulphur at each consumer inlet against time, and the viscosity path."""

from __future__ import annotations

from pathlib import Path

from planner.common.outputs import write_atomic


def draw_flush_chart(studies, out: str | Path, title: str = "") -> None:
    """Two panels: inlet sulphur (% m/m) with limit and target; inlet viscosity (cSt)."""
    import matplotlib

    matplotlib.use("Agg")
    import matplotlib.pyplot as plt

    fig, (ax1, ax2) = plt.subplots(2, 1, figsize=(10, 7.5), dpi=120, sharex=True)
    for st in studies:
        s = st.summary
        for curve in st.result.circuit_inlets(s.circuit):
            ax1.plot(st.result.time_h, curve.sulphur_pct, lw=1.4,
                     label=f"{s.circuit}: {curve.consumer}")
        if st.paths:
            for name, p in st.paths.items():
                ax2.plot(p.time_h, p.viscosity_cst, lw=1.2, label=f"{s.circuit}: {name}")
    s0 = studies[0].summary
    ax1.axhline(s0.limit_pct, color="crimson", lw=1.2, ls="--",
                label=f"limit {s0.limit_pct:.2f} %")
    ax1.axhline(s0.target_pct, color="darkorange", lw=1.0, ls=":",
                label=f"target {s0.target_pct:.3f} %")
    for st in studies:
        if st.summary.time_to_target_h is not None:
            ax1.axvline(st.summary.time_to_target_h, color="grey", lw=0.6)
    ax1.set_ylabel("sulphur at inlet, % m/m")
    ax1.grid(True, lw=0.3)
    ax1.legend(fontsize=7, loc="upper right")
    if any(st.paths for st in studies):
        window = next(p.window for st in studies for p in st.paths.values())
        ax2.axhline(window.min_cst, color="crimson", lw=1.0, ls="--",
                    label=f"minimum {window.min_cst:g} cSt")
        ax2.axhline(window.max_cst, color="crimson", lw=1.0, ls="--",
                    label=f"maximum {window.max_cst:g} cSt")
        ax2.set_yscale("log")
    from matplotlib.ticker import FuncFormatter

    ax2.yaxis.set_major_formatter(FuncFormatter(lambda v, _: f"{v:g}"))
    ax2.yaxis.set_minor_formatter(FuncFormatter(lambda v, _: f"{v:g}" if v in (3, 5) else ""))
    reached = [st.summary.time_to_target_h for st in studies if st.summary.time_to_target_h]
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
    write_atomic(out, lambda p: fig.savefig(p, format="png"), suffix=".png")
    plt.close(fig)
