"""The scrubber-trip chart: written, not blank, one line pair per circuit, the boundaries
named with what happens there, and its values those of a flush run directly.

The hand-made span of ``tests.helpers.trip`` (sample voyage, fictional): circuits main
and boiler, the entry into Meridian Reach ECA inside the span. The PNG is read back
with matplotlib's own reader and must hold more than one grey level (something drawn).
The scrubber sample (areas_sample/egcs_voyage.toml, fictional): the plotted lead at one
moment against :func:`planner.flushing.flush` from that moment; the labels of its
boundaries; and the sulphur chart's legend, kept off every label.
"""

from __future__ import annotations

import numpy as np
import pytest

from tests.helpers.paths import ROOT
from tests.helpers.trip import sample_trip


def test_chart_written_and_not_blank(tmp_path):
    from matplotlib.image import imread

    from planner.charts.trip_chart import draw_trip_chart

    plan, _, leads, _ = sample_trip()
    out = tmp_path / "trip.png"
    draw_trip_chart(plan, leads, out)
    data = out.read_bytes()
    assert data[:8] == b"\x89PNG\r\n\x1a\n"
    img = imread(out)
    assert img.shape[0] > 400 and img.shape[1] > 800
    grey = img[..., :3].mean(axis=2)
    assert np.unique(np.round(grey, 2)).size > 10
    assert (grey < 0.2).mean() > 0.005  # black lines and text


def test_chart_lines_labels_and_boundary():
    from planner.charts.trip_chart import trip_figure

    plan, _, leads, _ = sample_trip()
    fig = trip_figure(plan, leads)
    ax = fig.axes[0]
    labels = [line.get_label() for line in ax.get_lines()]
    for c in ("main", "boiler"):
        assert f"to compliant fuel, circuit {c}" in labels
        assert f"out of compliance, circuit {c}" in labels
    styles = {line.get_label(): line.get_linestyle() for line in ax.get_lines()}
    assert styles["to compliant fuel, circuit main"] != styles["to compliant fuel, circuit boiler"]
    texts = [t.get_text() for t in ax.texts]
    assert "enter Meridian Reach ECA" in texts
    assert ax.get_ylabel() == "time from the failure, min"  # every lead under 3 h
    top = fig.axes[1]
    assert all("(+12:00)" in t.get_text() or "(-11:00)" in t.get_text()
               for t in top.get_xticklabels())
    import matplotlib.pyplot as plt

    plt.close(fig)


# ---------------------------------------------------------------- the scrubber sample

@pytest.fixture(scope="module")
def egcs():
    """The scrubber sample (areas_sample/egcs_voyage.toml, fictional): hsfo on egcs for
    circuit main, vlsfo the fallback under the 0.50 % cap and mgo inside the areas."""
    from planner.voyage.run import build_plan
    from planner.voyage.scrubber_trip import plan_trip_leads

    plan = build_plan(ROOT / "areas_sample" / "egcs_voyage.toml")
    return plan, plan_trip_leads(plan)


def plotted_lead(fig, epoch_s: float, plan) -> float:
    """The value the chart's 'to compliant fuel' line of circuit main plots at a sample moment
    (read from the drawn lines: black, the thicker of each pair), in the axis' unit."""
    import matplotlib.dates as mdates

    x0 = mdates.date2num(plan.timeline.utc(epoch_s).replace(tzinfo=None))
    got = []
    for line in fig.axes[0].get_lines():
        if line.get_color() != "black" or line.get_linewidth() != 1.6:
            continue
        xs = mdates.date2num(line.get_xdata())
        for k in np.flatnonzero(np.abs(xs - x0) < 0.5 / 86400.0):
            got.append(float(line.get_ydata()[k]))
    assert got, "the moment is not a plotted sample"
    return got[0]


def test_chart_values_are_the_flush_from_that_moment(egcs):
    """A failure in the middle of the span inside Corran Sea ECA (2027-05-30 07:20Z to
    12:19Z, hsfo → mgo, the circuit full of hsfo since 22:35Z the day before): the curve's
    value there is the time :func:`planner.flushing.flush` gives directly for the switch
    hsfo_service → mgo_service at the consumption from that moment, to the 0.090 % target
    (0.9 × the 0.10 % limit, the voyage's sulphur target fraction)."""
    import matplotlib.pyplot as plt

    from planner.charts.trip_chart import trip_figure
    from planner.flushing import flush

    plan, leads = egcs
    i = next(k for k, s in enumerate(leads.spans)
             if s.areas == ("Corran Sea ECA",) and s.mode == "open")
    span = leads.spans[i]
    mid = 0.5 * (span.from_epoch_s + span.to_epoch_s)
    sample = min(leads.series(i, "main"), key=lambda s: abs(s.fail_epoch_s - mid))
    assert span.from_epoch_s + 3600.0 < sample.fail_epoch_s < span.to_epoch_s - 3600.0
    _, summary = flush(plan.system, "main", "hsfo_service", "mgo_service",
                       plan.timeline.consumption_from(sample.fail_epoch_s, 96.0),
                       limit_pct=0.10, target_pct=0.09)
    want_h = summary.time_to_target_h
    assert 1.0 < want_h < 3.0
    fig = trip_figure(plan, leads)
    try:
        unit = fig.axes[0].get_ylabel().rsplit(", ", 1)[1]
        got_h = plotted_lead(fig, sample.fail_epoch_s, plan) / (60.0 if unit == "min" else 1.0)
        assert got_h == pytest.approx(want_h, abs=1.0 / 3600.0)
        # a failure at the valve switch into hsfo (21:20:33Z) finds vlsfo at the inlets
        first = leads.series(0, "main")[0]
        assert plotted_lead(fig, first.fail_epoch_s, plan) == 0.0
    finally:
        plt.close(fig)


def test_sample_boundary_labels_say_what_happens(egcs):
    """Every boundary line of the sample says what happens there, and no two labels
    overlap once drawn."""
    import matplotlib.pyplot as plt

    from planner.charts.trip_chart import trip_figure

    plan, leads = egcs
    fig = trip_figure(plan, leads)
    try:
        fig.canvas.draw()
        texts = [t for t in fig.axes[0].texts if t.get_text()]
        words = [t.get_text() for t in texts]
        assert words.count("enter Corran Sea ECA") == 2
        assert "enter Meridian Reach ECA" in words
        assert "enter Skarvik Basin ECA" in words
        assert "inside Corran Sea ECA:\nclosed loop from here" in words
        assert "inside Meridian Reach ECA:\nclosed loop from here" in words
        assert "inside Meridian Reach ECA:\nopen loop from here" in words
        assert all(w.startswith(("enter ", "inside ")) for w in words), words
        boxes = [t.get_window_extent() for t in texts]
        for a in range(len(boxes)):
            for b in range(a + 1, len(boxes)):
                assert not boxes[a].overlaps(boxes[b]), (words[a], words[b])
    finally:
        plt.close(fig)


def test_sulphur_chart_legend_hides_no_label(egcs):
    """``--chart`` of the sample: the legend is outside the axes, over no event label (the
    S6 stop among them) and no changeover label."""
    import matplotlib.pyplot as plt

    from planner.charts.plan_chart import chart_figure
    from planner.charts.plan_marks import events_of
    from planner.voyage.report import plan_json

    plan, _ = egcs
    fig = chart_figure(plan, events_of(plan, plan_json(plan)))
    try:
        fig.canvas.draw()
        ax = fig.axes[0]
        texts = [t for t in ax.texts if t.get_text()]
        assert any(t.get_text() == "S6 stop" for t in texts)
        (legend,) = fig.legends
        box = legend.get_window_extent()
        assert box.y1 < ax.get_window_extent().y0  # under the axes
        for t in texts:
            assert not box.overlaps(t.get_window_extent()), t.get_text()
    finally:
        plt.close(fig)
