"""The scrubber-trip chart: written, not blank, one line pair per circuit, the boundary named.

The hand-made span of ``tests.helpers.trip`` (sample voyage, fictional): circuits main
and boiler, the entry into Meridian Reach ECA inside the span. The PNG is read back
with matplotlib's own reader and must hold more than one grey level (something drawn).
"""

from __future__ import annotations

import numpy as np

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
