"""Voyage chart: sulphur at each circuit's inlet along the voyage, the limit, the events.

Every crossing is marked and labelled as on the plan's map and in its tables
(:mod:`planner.charts.plan_events`: the changeover's number where one is made,
unnumbered where none is); a moment on the clock (an area coming into force or
ceasing while the ship is inside it, a departure) is a dashed line labelled
with its kind and time. Moments are epoch seconds (``*_epoch_s``: seconds
since 1970-01-01 UTC) until they are drawn, against UTC. Where the plan relies
on a scrubber, its spans are hatched bands labelled with the scrubber and its
washwater mode, and its events dash-dot lines labelled ``S1``, ``S2`` ...
(:mod:`planner.charts.scrubber_draw`). PNG, or PDF for a ``.pdf`` name.
"""

from __future__ import annotations

from datetime import datetime
from pathlib import Path

import numpy as np

from planner.charts.plan_events import KINDS, PlanEvent
from planner.voyage.plan import Plan

LINE_STYLES = ("-", "--", "-.", ":")
"""One per circuit, so the chart reads in black and white."""


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


def plan_spans(plan: Plan) -> list[dict]:
    """The plan's scrubber spans as rows (none without a scrubber)."""
    if not plan.scrubber_spans:
        return []
    from planner.voyage.report import scrubber_json

    return scrubber_json(plan)["scrubber_spans"]


def _above(plan: Plan, spans: list[dict]) -> str:
    """The line naming the fuels burnt on a scrubber above the chart's scale."""
    top = max([st.limit_pct for st in plan.check.stretches] + [0.6]) * 1.05
    fuels = []
    for s in spans:
        try:
            pct = plan.voyage.fuel(s["fuel"]).sulphur_pct
        except KeyError:
            continue
        text = f"{s['fuel']} {pct:.2f} % m/m"
        if pct > top and text not in fuels:
            fuels.append(text)
    if not fuels:
        return ""
    return (f"on the scrubber (hatched): {', '.join(fuels)} at the served inlets, above "
            "the scale")


def draw_plan_chart(plan: Plan, out: str | Path, events: list[PlanEvent] | None = None) -> None:
    """Write the chart (PNG, or PDF for a ``.pdf`` name); see :func:`chart_figure`."""
    from planner.charts.route_map import save_figure

    save_figure(chart_figure(plan, events), out)


def chart_figure(plan: Plan, events: list[PlanEvent] | None = None):
    """Inlet sulphur per circuit against UTC, with the limit in force and each event
    (default: each changeover's boundary, numbered in order) as a labelled line."""
    import matplotlib

    matplotlib.use("Agg")
    import matplotlib.dates as mdates
    import matplotlib.pyplot as plt

    def dt(epoch_s) -> np.ndarray:
        """Naive UTC datetimes (what matplotlib's date axis takes) of epoch seconds."""
        return np.array([plan.timeline.utc(v).replace(tzinfo=None)
                         for v in np.atleast_1d(epoch_s)])

    fig, ax = plt.subplots(figsize=(11, 6.2), dpi=120)
    for k, circuit in enumerate(plan.system.circuits):
        t, s = inlet_sulphur_along_voyage(plan, circuit)
        ax.plot(dt(t), s, lw=1.5, ls=LINE_STYLES[k % len(LINE_STYLES)],
                label=f"inlet sulphur, circuit {circuit}")
    sched = plan.timeline.schedule
    lt, lv = [], []
    for st in plan.check.stretches:
        a, b = (float(x) for x in sched.epoch_at([st.from_m, st.to_m]))
        lt += [a, b]
        lv += [st.limit_pct, st.limit_pct]
    ax.plot(dt(lt), lv, color="black", lw=1.0, label="limit in force")
    if events is None:
        events = [PlanEvent(n, KINDS[ch.boundary_event], ch.area,
                            plan.timeline.utc(ch.boundary_epoch_s).isoformat(), 0.0, 0.0, 0.0,
                            "") for n, ch in enumerate(plan.changes, start=1)]
    scrub = [e for e in events if e.is_scrubber]
    for e in events:
        if e.time_utc is None or e.is_scrubber:
            continue
        when = datetime.fromisoformat(e.time_utc.replace("Z", "+00:00")).replace(tzinfo=None)
        clock = not (e.is_crossing or e.zone)
        ax.axvline(when, color="darkgreen" if clock else "grey", lw=1.0 if clock else 0.7,
                   ls="--" if clock else ":")
        at = f" {e.when}" if clock else ""
        ax.annotate(f"{e.label or '-'} {e.kind} {e.area}{at}", (when, 0.02), rotation=90,
                    fontsize=7, va="bottom", xytext=(2, 0), textcoords="offset points",
                    weight="bold" if e.label else "normal")
    ax.set_ylabel("sulphur, % m/m")
    ax.set_xlabel("UTC")
    ax.xaxis.set_major_formatter(mdates.DateFormatter("%d %b %H:%M"))
    fig.autofmt_xdate()
    ax.set_ylim(0.0, max(lv + [0.6]) * 1.05)
    spans = plan_spans(plan)
    if spans or scrub:
        from planner.charts.scrubber_draw import chart_scrubbers

        chart_scrubbers(ax, lambda iso: datetime.fromisoformat(iso.replace("Z", "+00:00"))
                        .replace(tzinfo=None), spans, scrub, _above(plan, spans))
    ax.grid(True, lw=0.3)
    # the legend under the axes, so it hides no curve and no event's label (S6 stop, ...)
    handles, labels = ax.get_legend_handles_labels()
    ncol = 4
    fig.legend(handles, labels, fontsize=8, loc="lower center", ncol=ncol, frameon=False)
    rows = -(-len(labels) // ncol)
    ax.set_title(f"{plan.system.ship.name}: sulphur at the inlets along the voyage "
                 "(advisory)")
    fig.tight_layout(rect=(0.0, 0.035 * rows + 0.01, 1.0, 1.0))
    return fig
