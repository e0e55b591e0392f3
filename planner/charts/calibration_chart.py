"""Calibration chart: the measured blend at the inlet, and the ship file's and fitted models."""

from __future__ import annotations

from pathlib import Path
from typing import TYPE_CHECKING

from planner.common.outputs import write_atomic

if TYPE_CHECKING:
    from planner.calibration import Calibration


def draw_calibration_chart(cal: Calibration, out: str | Path, title: str = "") -> None:
    """One panel per trend: the new fuel's share of the inlet blend, % m/m, against the time
    after the valve switch, h: the readings (spikes left out marked), the ship file's model
    and the fitted model."""
    import matplotlib

    matplotlib.use("Agg")
    import matplotlib.pyplot as plt

    n = len(cal.series)
    fig, axes = plt.subplots(n, 1, figsize=(10, 3.6 + 2.6 * n), dpi=120, squeeze=False)
    for ax, s in zip(axes[:, 0], cal.series, strict=True):
        t, y = s.trend.time_h, 100.0 * s.measured
        ax.plot(t[~s.spike], y[~s.spike], ".", ms=3, color="0.45", label="measured "
                "(from viscosity and temperature)")
        if s.spike.any():
            ax.plot(t[s.spike], y[s.spike], "x", ms=6, color="crimson",
                    label="spike, left out")
        ax.plot(s.model_time_h, 100.0 * s.ship_share, lw=1.3, ls="--", color="tab:blue",
                label="model, ship file's values")
        ax.plot(s.model_time_h, 100.0 * s.fitted_share, lw=1.6, color="tab:orange",
                label="model, fitted values")
        ax.set_ylim(-10.0, 110.0)
        ax.set_xlim(0.0, s.trend.end_h)
        ax.set_ylabel("new fuel at inlet, % m/m")
        ax.set_title(f"{Path(s.trend.file).name}: switch {s.trend.switch_utc:%Y-%m-%d %H:%M} "
                     "UTC", fontsize=9)
        ax.grid(True, lw=0.3)
        ax.legend(fontsize=7, loc="lower right")
    axes[-1, 0].set_xlabel("time after the changeover valve is switched, h")
    fig.suptitle(title or "Calibration: measured and modelled blend at the inlet")
    fig.text(0.01, 0.005, "Advisory only: a change to the changeover procedure follows the "
             "ship's safety management system.", fontsize=7)
    fig.tight_layout()
    write_atomic(out, lambda p: fig.savefig(p, format="png"), suffix=".png")
    plt.close(fig)
