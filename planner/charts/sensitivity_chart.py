"""Sensitivity chart: one-at-a-time swings (tornado) and rank correlations, per circuit."""

from __future__ import annotations

from pathlib import Path

from planner.common.outputs import write_atomic

TOP = 10


def draw_sensitivity_chart(analyses, out: str | Path, title: str = "") -> None:
    """One row per circuit: the lead needed with each input at its low and high end, minutes
    against the plain flush; and Spearman's rank correlation of each input with the lead."""
    import matplotlib

    matplotlib.use("Agg")
    import matplotlib.pyplot as plt
    from matplotlib.patches import Patch

    rows = max(1, len(analyses))
    fig, axes = plt.subplots(rows, 2, figsize=(12, 1.2 + 3.6 * rows), dpi=120, squeeze=False,
                             gridspec_kw={"width_ratios": [3, 2]})
    for (ax1, ax2), u in zip(axes, analyses, strict=False):
        base = u.deterministic.time_to_target_h or 0.0
        swings = list(u.sensitivity.swings[:TOP])[::-1]
        labels = [s.label for s in swings]
        reach = [abs(v - base) * 60 for s in swings for v in (s.lead_low_h, s.lead_high_h)
                 if v is not None]
        edge = 1.15 * max(reach, default=1.0) or 1.0
        for i, s in enumerate(swings):
            for v, colour in ((s.lead_low_h, "tab:blue"), (s.lead_high_h, "tab:red")):
                if v is None:
                    ax1.barh(i, edge, left=0, color="none", edgecolor=colour, hatch="//",
                             height=0.6)
                    ax1.text(edge, i, " not reached", va="center", fontsize=7)
                    continue
                ax1.barh(i, (v - base) * 60, color=colour, alpha=0.75, height=0.6)
        ax1.legend(handles=[Patch(color="tab:blue", alpha=0.75, label="input at its low end"),
                            Patch(color="tab:red", alpha=0.75, label="input at its high end")],
                   fontsize=7, loc="lower right")
        ax1.axvline(0.0, color="black", lw=0.8)
        ax1.set_yticks(range(len(swings)), labels, fontsize=8)
        ax1.set_xlabel(f"lead needed against the plain flush ({base * 60:.0f} min), min")
        ax1.set_title(f"{u.circuit}: one at a time, each input at its 95 % range ends",
                      fontsize=9)
        ax1.grid(True, axis="x", lw=0.3)
        rho = u.sensitivity.rank_correlation
        vals = [rho.get(s.key, 0.0) for s in swings]
        ax2.barh(range(len(swings)), vals, color=["tab:red" if v > 0 else "tab:blue"
                                                   for v in vals], alpha=0.75, height=0.6)
        ax2.axvline(0.0, color="black", lw=0.8)
        ax2.set_xlim(-1.0, 1.0)
        ax2.set_yticks(range(len(swings)), [""] * len(swings))
        ax2.set_xlabel("Spearman rank correlation with the lead")
        driver = u.sensitivity.driver_label or "none"
        ax2.set_title(f"{u.samples.n} samples; main driver: {driver}", fontsize=9)
        ax2.grid(True, axis="x", lw=0.3)
    fig.suptitle(title or "What moves the changeover start")
    fig.text(0.01, 0.005, "Advisory only: the engine makers' instructions come first.",
             fontsize=7)
    fig.tight_layout()
    write_atomic(out, lambda p: fig.savefig(p, format="png"), suffix=".png")
    plt.close(fig)
