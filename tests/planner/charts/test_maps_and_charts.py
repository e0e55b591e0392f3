"""Maps and charts read back as a person reads them (issue 12 items 3-5).

The plan's map and chart are drawn as PDF (vector: the same figure as the PNG)
and read back with poppler's ``pdftotext -bbox``; the PNGs and the plan PDF's
pages are rasterised (``pdftoppm``) and looked at for ink. Checked against the
plan's own ``--json`` document and against values written out here:

- tick labels say exactly where they are: the label's text, parsed as degrees
  (and minutes), is a linear function of its position on the page (a 2.5°
  tick labelled in whole degrees would break the line), and 170°E sits on the
  crossing of the sample's meridian edge at 170°E (areas_sample: the areas'
  own vertices, as in tests/cli/test_route.py);
- every crossing is listed and labelled, a crossing where a changeover is made
  carrying that changeover's number, on the map, in its legend and on the chart;
- the flush chart draws consumers of one circuit on one line when their curves
  are the same, and the viscosity window's two limits in different styles.
"""

from __future__ import annotations

import json
import re
import shutil
import subprocess
from pathlib import Path

import pytest

from planner.charts.geo_ticks import lat_label, lon_label, tick_step_min, ticks_deg
from tests.helpers.cli import changeover_ok as run
from tests.helpers.paths import ROOT
from tests.helpers.pdf import pdf_flat, pdf_words

needs_poppler = pytest.mark.requires_poppler
VOYAGE = "areas_sample/voyage.toml"
ROUTE = ["route", "areas_sample/aldmere_to_skarvik.csv", "--areas", "areas_sample",
         "--depart", "2027-05-30T06:00+12:00"]




words, text = pdf_words, pdf_flat


LON = re.compile(r"^(\d+)°(?:(\d\d)')?([EW]?)$")


def lon_of(label: str) -> float | None:
    """A longitude label read as a person reads it, unwrapped east of 0° (175°W → 185)."""
    m = LON.match(label)
    if not m:
        return None
    v = int(m.group(1)) + int(m.group(2) or 0) / 60.0
    return 360.0 - v if m.group(3) == "W" else v


@pytest.fixture(scope="module")
def drawn(tmp_path_factory):
    out = tmp_path_factory.mktemp("charts")
    files = {k: out / n for k, n in (("map_pdf", "map.pdf"), ("chart_pdf", "chart.pdf"),
                                     ("map_png", "map.png"), ("plan_pdf", "plan.pdf"))}
    run("plan", VOYAGE, "--map", str(files["map_pdf"]), "--chart", str(files["chart_pdf"]),
        "--pdf", str(files["plan_pdf"]))
    run("plan", VOYAGE, "--map", str(files["map_png"]))
    doc = json.loads(run("plan", VOYAGE, "--json").stdout)
    crossings = json.loads(run(*ROUTE, "--json").stdout)["crossings"]
    return doc, crossings, files


def numbered(doc: dict, crossings: list[dict]) -> list[tuple[str, dict]]:
    """Each crossing with the number of the changeover whose boundary it is (or ''),
    matched by area and distance (0.01 nm), written out here from the JSON."""
    firsts = {}
    for r in doc["changeovers"]:
        firsts.setdefault(r["number"], r)
    out = []
    for c in crossings:
        n = [k for k, r in firsts.items() if r["area"] == c["area"]
             and abs(r["boundary_nm"] - c["distance_nm"]) <= 0.01]
        out.append((str(n[0]) if n else "", c))
    return out


@needs_poppler
def test_map_ticks_are_where_their_labels_say(drawn):
    _, crossings, files = drawn
    ws = words(files["map_pdf"])
    ticks = [(lon_of(t), x, y) for t, x, y in ws if lon_of(t) is not None]
    ticks = [t for t in ticks if abs(t[2] - max(y for _, _, y in ticks)) < 2]  # the x axis
    assert len(ticks) >= 4
    (l0, x0, _), (l1, x1, _) = ticks[0], ticks[-1]
    scale = (x1 - x0) / (l1 - l0)
    for lon, x, _ in ticks:  # every label on the same straight line: no label is off its tick
        assert abs(x0 + (lon - l0) * scale - x) < 0.5, (lon, x)
    # 170°E is a boundary meridian of the sample (the first crossing, at 170°E exactly)
    first = crossings[0]
    assert abs(first["lon"] - 170.0) < 1e-6
    label = [(x, y) for t, x, y in ws if t == "1"]
    want = x0 + (170.0 - l0) * scale
    assert any(abs(x - want) < 1.0 for x, _ in label), "crossing 1 is drawn on its tick"


@needs_poppler
def test_map_numbers_every_crossing_as_the_plan(drawn):
    doc, crossings, files = drawn
    t = text(files["map_pdf"])
    ws = words(files["map_pdf"])
    width = max(x for _, x, _ in ws)
    for label, c in numbered(doc, crossings):
        line = f"{label or '-'} {c['event']} {c['area']} at {c['distance_nm']:,.1f} nm"
        assert line in t, line
        if label:
            assert any(w == label for w, _, _ in ws)
    # every changeover start to compliant fuel carries its number beside its dot
    starts = {r["number"] for r in doc["changeovers"] if r["direction"] == "to_compliant"}
    counts = {n: sum(w == str(n) for w, x, _ in ws if x < width) for n in starts}
    for n, rows in counts.items():
        circuits = sum(r["number"] == n for r in doc["changeovers"])
        assert rows >= 1 + circuits, (n, rows)  # the crossing's label and each start's


@needs_poppler
def test_chart_lists_every_crossing_with_the_map_numbers(drawn):
    doc, crossings, files = drawn
    t = text(files["chart_pdf"])
    for label, c in numbered(doc, crossings):
        assert f"{label or '-'} {c['event']} {c['area']}" in t
    assert len(numbered(doc, crossings)) == 7  # the sample crosses seven boundaries


@needs_poppler
def test_plan_pdf_includes_map_and_chart(drawn):
    _, _, files = drawn
    t = text(files["plan_pdf"])
    assert "Route map:" in t and "Sulphur at each circuit's inlet" in t
    if shutil.which("pdfimages"):
        listing = subprocess.run(["pdfimages", "-list", str(files["plan_pdf"])],
                                 capture_output=True, text=True, check=True).stdout
        rows = [r.split() for r in listing.splitlines()[2:] if r.strip()]
        big = [r for r in rows if r[2] == "image" and int(r[3]) >= 1500]  # the figures, 200 dpi
        assert len(big) == 2
    ink = page_ink(files["plan_pdf"], 2)
    assert ink > 0.05  # the figures' page is far from blank


def page_ink(pdf: Path, page: int) -> float:
    """Share of non-white pixels on a page rasterised at 40 dpi (pdftoppm, greyscale)."""
    out = subprocess.run(["pdftoppm", "-r", "40", "-gray", "-f", str(page), "-l", str(page),
                          str(pdf)], capture_output=True, check=True).stdout
    w, h, body = _pgm(out)
    return sum(1 for b in body if b < 200) / (w * h)


def _pgm(data: bytes) -> tuple[int, int, bytes]:
    parts = data.split(maxsplit=4)
    assert parts[0] == b"P5"
    w, h = int(parts[1]), int(parts[2])
    return w, h, parts[4][-w * h:]


def test_map_png_is_a_picture(drawn):
    _, _, files = drawn
    import numpy as np
    from PIL import Image

    img = Image.open(files["map_png"]).convert("L")
    assert img.width >= 1000
    dark = float((np.asarray(img) < 200).mean())
    assert 0.02 < dark < 0.6


# ---- the tick rules themselves, against values written out by hand

@pytest.mark.parametrize(("lo", "hi", "labels"), [
    # 167.5°E to 189°E (171°W): steps of 5°, 180° without a side, west past it
    (167.5, 189.0, ["170°E", "175°E", "180°", "175°W"]),
    # zoomed in over 1.7°: quarter degrees in degrees and minutes; 58°E exactly on 58
    (57.2, 58.9, ["57°15'E", "57°30'E", "57°45'E", "58°E", "58°15'E", "58°30'E",
                  "58°45'E"]),
    # 12°, at most 8 ticks: 2° steps (2.5° is no candidate: its ticks have no whole label)
    (52.0, 64.0, ["52°E", "54°E", "56°E", "58°E", "60°E", "62°E", "64°E"]),
])
def test_lon_ticks_by_hand(lo, hi, labels):
    assert [lon_label(x) for x in ticks_deg(lo, hi, 8)] == labels


def test_lat_labels_and_steps():
    assert [lat_label(x) for x in ticks_deg(-41.3, -39.6)] == [
        "41°15'S", "41°S", "40°45'S", "40°30'S", "40°15'S", "40°S", "39°45'S"]
    assert lat_label(0.0) == "0°" and lat_label(12.5) == "12°30'N"
    assert tick_step_min(0.05) == 1 and tick_step_min(40.0) == 300


def test_an_area_coming_into_force_inside_is_its_own_numbered_event(tmp_path):
    """tests/data/voyages/future_inside.toml (its head comment): the ship enters Future
    Five ECA at 5°E (23:40Z) before the area comes into force at 2030-07-01 00:00Z
    (future_5e.geojson ``effective_from``), 20 min later at 12 kn, 4 nm on, at 120.0 nm;
    the changeover is for that moment, not for the crossing."""
    from planner.charts.plan_marks import events_of
    from planner.voyage.report import plan_json
    from planner.voyage.run import build_plan

    plan = build_plan(ROOT / "tests" / "data" / "voyages" / "future_inside.toml")
    doc = plan_json(plan)
    events = events_of(plan, doc)
    assert [(e.number, e.kind) for e in events] == [(None, "enter"), (1, "comes into force")]
    crossing, in_force = events
    assert crossing.note.startswith("not in force then")
    assert in_force.time_utc == "2030-07-01T00:00:00Z"
    assert abs(in_force.distance_nm - 120.0) < 0.01 and crossing.distance_nm < 120.0
    pdf = tmp_path / "chart.pdf"
    run("plan", "tests/data/voyages/future_inside.toml", "--chart", str(pdf))
    assert "1 comes into force Future Five ECA" in text(pdf)
    assert "- enter Future Five ECA" in text(pdf)


@needs_poppler
def test_second_sample_numbers_agree_in_table_map_chart_and_gpx(tmp_path):
    """areas_sample/skarvik_to_tarrow.toml: a departure inside an area (changeover 1, no
    crossing), an exit, an entry before the Tarrow area's date (no changeover: not in force
    then) and the area coming into force while inside (its own numbered event, at the
    ``force_events`` row's moment). Each numbered event, written out here from the JSON
    (crossings matched by area and distance, force events by area and time), carries the
    same number in the terminal table, the map's legend, the chart and the GPX names."""
    from xml.etree import ElementTree as ET

    voyage = "areas_sample/skarvik_to_tarrow.toml"
    files = {k: tmp_path / n for k, n in (("map", "map.pdf"), ("chart", "chart.pdf"),
                                          ("gpx", "m.gpx"))}
    run("plan", voyage, "--map", str(files["map"]), "--chart", str(files["chart"]),
        "--gpx", str(files["gpx"]))
    doc = json.loads(run("plan", voyage, "--json").stdout)
    table = run("plan", voyage).stdout
    crossings = json.loads(run("route", "areas_sample/skarvik_to_tarrow.csv", "--areas",
                               "areas_sample/skarvik_basin.geojson", "--areas",
                               "areas_sample/tarrow", "--depart", doc["voyage"]["depart_utc"],
                               "--json").stdout)["crossings"]
    firsts = {}
    for r in doc["changeovers"]:
        firsts.setdefault(r["number"], r)
    kinds = {"enter": "enter", "exit": "exit", "comes_into_force": "comes into force",
             "departure": "before departure"}
    want = {}  # number -> (kind as drawn, area)
    for n, r in firsts.items():
        ev = r["boundary_event"]
        if ev in ("enter", "exit"):
            assert any(c["area"] == r["area"] and c["event"] == ev
                       and abs(c["distance_nm"] - r["boundary_nm"]) <= 0.01 for c in crossings)
        if ev == "comes_into_force":
            assert any(f["area"] == r["area"] and f["time_utc"] == r["boundary_utc"]
                       for f in doc["force_events"])
        want[n] = (kinds[ev], r["area"])
    assert sorted(k for k, _ in want.values()) == sorted(
        ["before departure", "exit", "comes into force"])
    m, c = text(files["map"]), text(files["chart"])
    names = {w.find("{http://www.topografix.com/GPX/1/1}name").text
             for w in ET.parse(files["gpx"]).getroot()}
    for n, (kind, area) in want.items():
        assert f"Changeover {n}: {area}" in table
        assert f"{n} {kind} {area}" in m and f"{n} {kind} {area}" in c, (n, kind)
        assert (f"CO{n} boundary" if kind in ("enter", "exit") else f"CO{n} {kind}") in names
    # the one crossing without a changeover is unnumbered everywhere
    (entry,) = [x for x in crossings if x["event"] == "enter"]
    assert f"- enter {entry['area']} at {entry['distance_nm']:,.1f} nm" in m
    assert f"- enter {entry['area']}" in c and f"enter {entry['area']}" in names
