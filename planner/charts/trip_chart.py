"""If the scrubber trips now: time to compliant fuel against the failure moment.

One line per circuit and span (line styles, so the chart reads in black and
white): the time from a failure at that moment until every inlet of the circuit
is at the flushing target on the fallback fuel; beside it, thinner and grey,
the part of that time out of compliance. Each control-area boundary passed on a
scrubber is a dotted vertical line labelled with its area and what happens there
(entered; on the scrubber from there inside it, in which washwater mode; coming into
force); the spans are shaded. UTC along the bottom, the ship's time (with its offset) along the top.
Samples whose flush never reaches the target are crosses on the axis.
Moments are epoch seconds (``*_epoch_s``: seconds since 1970-01-01 UTC) until
they are drawn. PNG, or PDF for a ``.pdf`` name.
"""

from __future__ import annotations

import math
from pathlib import Path

import numpy as np

from planner.voyage.plan import Plan
from planner.voyage.scrubber_trip import TripLeads
from planner.voyage.scrubber_trip_moments import COMES_INTO_FORCE, ENTER, INSIDE_AT_START

LINE_STYLES = ("-", "--", "-.", ":")
"""One per circuit, so the chart reads in black and white."""
_MINUTES_UP_TO_H = 3.0  # leads all under this are drawn in minutes
_NEAR = 0.03  # boundary lines closer than this share of the spans' time are labelled apart


def draw_trip_chart(plan: Plan, leads: TripLeads, out: str | Path) -> None:
    """Write the chart (PNG, or PDF for a ``.pdf`` name); see :func:`trip_figure`.

    Parameters
    ----------
    plan : Plan
        The plan the leads are of (its timeline, ship's time zones, ship's name).
    leads : TripLeads
        :func:`planner.voyage.scrubber_trip.trip_leads` of its spans.
    out : str or Path
        The file written (atomically).
    """
    from planner.charts.route_map import save_figure

    save_figure(trip_figure(plan, leads), out)


def _ship_labels(plan: Plan, ticks: np.ndarray) -> list[str]:
    """Ship's time (``dd HH:MM`` and its offset) at matplotlib date numbers (UTC)."""
    import matplotlib.dates as mdates

    from planner.common.timefmt import format_offset

    out = []
    for x in ticks:
        utc = mdates.num2date(x)
        tz = plan.voyage.ship_tz_at(utc)
        out.append(f"{utc.astimezone(tz).strftime('%d %b %H:%M')}\n({format_offset(tz)})")
    return out


def boundary_label(area: str, event: str, mode: str) -> str:
    """What happens at a boundary row's moment, as the chart writes it beside its line
    (two short lines where one would be long): ``enter Corran Sea ECA``, ``inside Corran Sea
    ECA:`` over ``closed loop from here`` (a span on the scrubber starting inside the area, in
    the span's washwater mode), ``Corran Sea ECA comes`` over ``into force on the scrubber``."""
    if event == ENTER:
        return f"enter {area}"
    if event == INSIDE_AT_START:
        return f"inside {area}:\n{mode} loop from here"
    if event == COMES_INTO_FORCE:
        return f"{area} comes\ninto force on the scrubber"
    return area


def boundary_labels(leads: TripLeads) -> list[tuple[str, float]]:
    """``(label, epoch_s)`` of each boundary the chart marks, once, in time order."""
    seen = dict.fromkeys((r.area, r.event, leads.spans[r.lead.span].mode, r.lead.fail_epoch_s)
                         for r in leads.boundaries)
    return [(boundary_label(a, e, m), t) for a, e, m, t in seen]


def trip_figure(plan: Plan, leads: TripLeads):
    """The figure (see the module notes); an empty chart says there is no span."""
    import matplotlib

    matplotlib.use("Agg")
    import matplotlib.dates as mdates
    import matplotlib.pyplot as plt

    def dt(epoch_s) -> np.ndarray:
        """Naive UTC datetimes (what matplotlib's date axis takes) of epoch seconds."""
        return np.array([plan.timeline.utc(v).replace(tzinfo=None)
                         for v in np.atleast_1d(epoch_s)])

    fig, ax = plt.subplots(figsize=(11, 6.5), dpi=120)
    known = [s.time_to_compliant_h for s in leads.samples if s.time_to_compliant_h is not None]
    minutes = not known or max(known) < _MINUTES_UP_TO_H
    scale, unit = (60.0, "min") if minutes else (1.0, "h")
    circuits = list(dict.fromkeys(c for s in leads.spans for c in s.circuits))
    labelled: set[str] = set()
    for i, span in enumerate(leads.spans):
        ax.axvspan(*dt([span.from_epoch_s, span.to_epoch_s]), color="0.92", lw=0,
                   label=None if "span" in labelled else "on a scrubber")
        labelled.add("span")
        for c in span.circuits:
            got = leads.series(i, c)
            if not got:
                continue
            ls = LINE_STYLES[circuits.index(c) % len(LINE_STYLES)]
            t = dt([s.fail_epoch_s for s in got])
            lead = np.array([np.nan if s.time_to_compliant_h is None
                             else s.time_to_compliant_h * scale for s in got])
            out = np.array([np.nan if s.out_of_compliance_h is None
                            else s.out_of_compliance_h * scale for s in got])
            first = c not in labelled
            labelled.add(c)
            ax.plot(t, lead, color="black", lw=1.6, ls=ls,
                    label=f"to compliant fuel, circuit {c}" if first else None)
            ax.plot(t, out, color="0.45", lw=1.0, ls=ls,
                    label=f"out of compliance, circuit {c}" if first else None)
            never = np.isnan(lead)
            if never.any():
                ax.plot(t[never], np.zeros(int(never.sum())), "x", color="black", ms=5,
                        label=None if "never" in labelled else "target not reached")
                labelled.add("never")
    top = max([v * scale for v in known] + [1.0]) * 1.25
    shown = list(leads.spans)
    near_s = _NEAR * ((max(s.to_epoch_s for s in shown) - min(s.from_epoch_s for s in shown))
                      if shown else 0.0)
    last_s, last_left = -math.inf, False
    for label, when_s in boundary_labels(leads):
        when = dt(when_s)[0]
        ax.axvline(when, color="black", lw=0.8, ls=":")
        # left of its line, unless the label before is close on the left (then right)
        left = not (last_left and when_s - last_s < near_s)
        ax.annotate(label, (when, top * 0.02), rotation=90, fontsize=7, va="bottom",
                    ha="right" if left else "left", xytext=(-2 if left else 2, 0),
                    textcoords="offset points",
                    bbox={"facecolor": "white", "edgecolor": "none", "pad": 0.5})
        last_s, last_left = when_s, left
    if leads.spans:
        a = min(s.from_epoch_s for s in leads.spans)
        b = max(s.to_epoch_s for s in leads.spans)
        pad = max(0.05 * (b - a), 1800.0)
        ax.set_xlim(*dt([a - pad, b + pad]))
    else:
        ax.text(0.5, 0.5, "No span on a scrubber", transform=ax.transAxes, ha="center")
    ax.set_ylim(0.0, top)
    ax.set_ylabel(f"time from the failure, {unit}")
    ax.set_xlabel("failure moment, UTC")
    ax.xaxis.set_major_formatter(mdates.DateFormatter("%d %b %H:%M"))
    for lab in ax.get_xticklabels():
        lab.set_rotation(30)
        lab.set_ha("right")
    ax.grid(True, lw=0.3)
    ax.legend(fontsize=8, loc="upper center", bbox_to_anchor=(0.5, -0.28), ncol=3,
              frameon=False)
    top_ax = ax.twiny()
    top_ax.set_xlim(ax.get_xlim())
    ticks = ax.get_xticks()
    top_ax.set_xticks(ticks)
    top_ax.set_xticklabels(_ship_labels(plan, ticks), fontsize=7)
    top_ax.set_xlabel("ship's time", fontsize=8)
    ax.set_title(f"{plan.system.ship.name}: if the scrubber fails, time until the inlets are "
                 "compliant on fuel alone (advisory)", fontsize=10)
    fig.tight_layout()
    return fig
