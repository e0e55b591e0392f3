"""The flush chart: one line per inlet that differs, the two viscosity limits told apart.

The sample ship's main circuit feeds main_engine, dg1 and dg2 through one line:
their times to the limit in ``flush --json`` are equal (so their curves are the
same and must be drawn once, labelled with the three names); the boiler circuit
is its own line. Each consumer has its own viscosity window: the engines' 2 and
20 cSt (the main engine's own table; the four-stroke defaults) and the boiler
burner's 1 and 30 cSt (its kind's defaults, planner.ship.inlet_limits). Every
distinct minimum and maximum must be drawn once, in its own dash pattern
(black-and-white print), named in the legend with the consumer kinds it belongs
to. Read back with pdftotext.
"""

from __future__ import annotations

import json
import subprocess
import sys

import numpy as np
import pytest

from planner.charts.flush_chart import distinct_curves
from tests.helpers.paths import ROOT


def test_distinct_curves_merges_only_equal_ones():
    x = np.linspace(0, 1, 11)
    got = distinct_curves([("a", x, x**2), ("b", x, x**2), ("c", x, x**2 + 1e-6),
                           ("d", x, x**2)])
    assert [names for names, _, _ in got] == [["a", "b", "d"], ["c"]]


def test_figure_lines_and_limit_styles():
    from planner.charts.flush_chart import flush_figure
    from planner.flushing import schedule_at
    from planner.flushing.study import study
    from planner.ship.ship_file import load_ship

    system = load_ship(ROOT / "areas_sample" / "ship.toml")
    sched = schedule_at(system)
    studies = [study(system, c, *_tanks(system, c), sched, 0.1, 0.09)
               for c in ("main", "boiler")]
    fig = flush_figure(studies)
    ax1, ax2 = fig.axes
    labels1 = [ln.get_label() for ln in ax1.get_lines()]
    assert "main: main_engine, dg1, dg2" in labels1 and "boiler: aux_boiler" in labels1
    assert sum(lb.startswith("main:") for lb in labels1) == 1  # one line, not three on top
    lines = {ln.get_label(): ln for ln in ax2.get_lines()}
    lo = next(v for k, v in lines.items() if k.startswith("minimum 2 cSt"))
    hi = next(v for k, v in lines.items() if k.startswith("maximum 20 cSt"))
    assert lo.get_ydata()[0] == 2.0 and hi.get_ydata()[0] == 20.0
    # the boiler burner's own window (kind defaults 1 and 30 cSt), without kinds named by
    # consumer
    lo_b = next(v for k, v in lines.items() if k.startswith("minimum 1 cSt, aux_boiler"))
    hi_b = next(v for k, v in lines.items() if k.startswith("maximum 30 cSt, aux_boiler"))
    limits = [lo, hi, lo_b, hi_b]
    assert len({str(x._dash_pattern) for x in limits}) == 4   # four styles, one per value
    styles = [str(ln._dash_pattern) for ln in ax1.get_lines()
              if not ln.get_label().startswith("_")]  # the legend's lines (not the markers)
    assert len(set(styles)) == len(styles)  # each sulphur line its own pattern


def _tanks(system, circuit):
    from planner.flushing.study import default_tanks

    return default_tanks(system, circuit)


@pytest.mark.requires_poppler
def test_chart_pdf_legend(tmp_path):
    pdf = tmp_path / "flush.pdf"
    args = [sys.executable, "-m", "planner", "flush", "areas_sample/voyage.toml"]
    r = subprocess.run([*args, "--chart", str(pdf)], cwd=ROOT, capture_output=True, text=True,
                       timeout=120)
    assert r.returncode == 0, r.stderr
    doc = json.loads(subprocess.run([*args, "--json"], cwd=ROOT, capture_output=True,
                                    text=True, timeout=120).stdout)
    main = next(c for c in doc["circuits"] if c["name"] == "main")
    assert len(set(main["consumer_time_to_limit_h"].values())) == 1  # one line feeds all
    t = " ".join(subprocess.run(["pdftotext", "-raw", str(pdf), "-"], capture_output=True,
                                text=True, check=True).stdout.split())
    # one sulphur line for the three inlets; the viscosity panel splits them only where the
    # paths differ (the engine's and the generators' own inlet limits and heating)
    assert t.count("main: " + ", ".join(main["consumer_time_to_limit_h"])) == 1
    assert "main: main_engine" in t and "main: dg1, dg2" in t
    assert "minimum 2 cSt, two-stroke main engine, four-stroke engine (dotted)" in t
    assert "maximum 20 cSt, two-stroke main engine, four-stroke engine (dash-dot)" in t
    assert "minimum 1 cSt, boiler burner (sparse dots)" in t
    assert "maximum 30 cSt, boiler burner (dash-dot-dot)" in t
