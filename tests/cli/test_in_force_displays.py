"""An area coming into force while the ship is inside it, as every display shows it
(issue 10 item 5, issue 12).

``areas_sample/skarvik_to_tarrow.toml`` (fictional): the Tarrow Approaches ECA comes
into force at 2027-06-12 00:00 UTC (its ``effective_from``) while MV Kestrel Bay is
inside it, and she departs inside the Skarvik Basin ECA. By MARPOL Annex VI regulation
14 ([MARPOL-VI] [P]) the limit applies from the area's date wherever the ship then is:
that changeover is due at a moment on the clock, not at a boundary she reaches, so no
display may call it an entry or give its place as a "boundary". Every display is read
back as text (the terminal at 80 and 120 columns and piped, ``pdftotext`` of the plan
PDF, the watch sheets, the map and the chart, the parsed GPX) and checked against the
plan's own ``--json`` (its ``force_events`` row and ``boundary_event``), with the
positions and times written out by the independent formatters of
``tests/helpers/terminal.py``. The ship's time is a hand calculation: 00:00Z at the
voyage's ``ship_time = "-11:00"`` is 13:00 the day before.
"""

from __future__ import annotations

import csv
import json
import re
from datetime import UTC, timedelta, timezone
from xml.etree import ElementTree as ET

import pytest

from tests.cli.test_tables_width import blocks, check_lines, on_a_line
from tests.helpers.cli import changeover_ok as run
from tests.helpers.pdf import pdf_flat, pdf_pages
from tests.helpers.terminal import moment, on_tty, piped, position, utc_full

VOYAGE = "areas_sample/skarvik_to_tarrow.toml"
PLAN = ["plan", VOYAGE]
SHIP_TZ = timezone(timedelta(hours=-11))  # the voyage file's ship_time
GPX = "{http://www.topografix.com/GPX/1/1}"
WIDTHS = (80, 120, None)  # None: piped




@pytest.fixture(scope="module")
def plan(tmp_path_factory):
    out = tmp_path_factory.mktemp("in_force")
    files = {k: out / n for k, n in (("pdf", "plan.pdf"), ("sheets", "sheets.pdf"),
                                     ("map", "map.pdf"), ("chart", "chart.pdf"),
                                     ("gpx", "marks.gpx"), ("csv", "csv"))}
    run(*PLAN, "--pdf", str(files["pdf"]), "--sheets", str(files["sheets"]), "--map",
        str(files["map"]), "--chart", str(files["chart"]), "--gpx", str(files["gpx"]),
        "--csv", str(files["csv"]))
    doc = json.loads(run(*PLAN, "--json").stdout)
    texts = {w: (piped(PLAN) if w is None else on_tty(PLAN, w)) for w in WIDTHS}
    return doc, files, texts


def in_force(doc: dict) -> tuple[dict, dict]:
    """The force event and the first changeover row made for it (by ``boundary_event``)."""
    (ev,) = doc["force_events"]
    (n,) = {r["number"] for r in doc["changeovers"] if r["boundary_event"] == "comes_into_force"}
    row = next(r for r in doc["changeovers"] if r["number"] == n)
    assert row["boundary_utc"] == ev["time_utc"] and row["area"] == ev["area"]
    return ev, row


def ship_text(iso: str) -> str:
    return moment(iso).astimezone(SHIP_TZ).strftime("%Y-%m-%d %H:%M")


def test_the_json_has_what_the_displays_need(plan):
    doc, _, _ = plan
    ev, row = in_force(doc)
    assert (ev["area"], ev["event"], ev["time_utc"]) == (
        "Tarrow Approaches ECA", "comes_into_force", "2027-06-12T00:00:00Z")
    assert ship_text(ev["time_utc"]) == "2027-06-11 13:00"  # by hand: 00:00Z − 11 h
    assert row["clock_deadline"] is True


@pytest.mark.parametrize("width", WIDTHS)
def test_terminal_names_the_in_force_event(plan, width):
    doc, _, texts = plan
    text = texts[width]
    check_lines(text, width)
    ev, row = in_force(doc)
    block = blocks(text)[row["number"]]
    flat = " ".join(block.split())
    assert flat.startswith(f"Changeover {row['number']}: {ev['area']} comes into force at "
                           f"{moment(ev['time_utc']):%H:%MZ} while the ship is inside it")
    assert f"compliant by {moment(ev['time_utc']):%H:%MZ} wherever the ship is" in flat
    assert on_a_line(utc_full(ev["time_utc"]), block)
    assert f"Comes into force {utc_full(ev['time_utc'])}" in flat
    assert on_a_line(f"{ship_text(ev['time_utc'])} (-11:00)", block)
    assert on_a_line(position(ev["lat"], ev["lon"]), block)
    assert f"the ship then at {position(ev['lat'], ev['lon'])}" in flat
    assert on_a_line(f"{ev['distance_nm']:,.1f} nm", block)
    # never a crossing's words for it
    assert "Boundary" not in block and "enter" not in block and "exit" not in block


@pytest.mark.parametrize("width", WIDTHS)
def test_terminal_names_the_departure_alongside(plan, width):
    doc, _, texts = plan
    (first,) = [r for r in doc["changeovers"] if r["boundary_event"] == "departure"]
    block = blocks(texts[width])[first["number"]]
    flat = " ".join(block.split())
    assert "departure (alongside)" in flat
    assert f"be compliant before departure at {moment(first['boundary_utc']):%H:%MZ}" in flat
    assert f"Departure {utc_full(doc['voyage']['depart_utc'])}" in flat
    assert "Boundary" not in block and "enter:" not in block
    # a real crossing keeps its words
    (exit_n,) = {r["number"] for r in doc["changeovers"] if r["boundary_event"] == "exit"}
    exit_block = " ".join(blocks(texts[width])[exit_n].split())
    assert "exit: change back to regular fuel" in exit_block and "Boundary " in exit_block


@pytest.mark.requires_poppler
def test_plan_pdf_names_the_in_force_event(plan):
    doc, files, _ = plan
    ev, row = in_force(doc)
    t = pdf_flat(files["pdf"])
    when = utc_full(ev["time_utc"])
    assert f"{ev['area']} comes into force at {when} while the ship is inside it" in t
    assert (f"Comes into force {when}, ship's time {ship_text(ev['time_utc'])} (UTC-11:00), "
            f"the ship then at {position(ev['lat'], ev['lon'])}") in t
    assert f"Boundary {when}" not in t and f"{ev['area']}, enter" not in t
    assert "departure (alongside)" in t


@pytest.mark.requires_poppler
def test_watch_sheet_names_the_in_force_event(plan):
    doc, files, _ = plan
    ev, row = in_force(doc)
    pages = pdf_pages(files["sheets"])
    assert len(pages) == len({r["number"] for r in doc["changeovers"]})  # one page each
    page = pages[row["number"] - 1]
    when = utc_full(ev["time_utc"])
    assert f"Changeover {row['number']}:" in page
    assert f"Changeover {row['number']}: {ev['area']} comes into force at {when}" in page
    assert f"Comes into force {when} UTC, ship's time {ship_text(ev['time_utc'])}" in page
    assert f"the ship then at {position(ev['lat'], ev['lon'])}" in page
    assert f"in force: {ev['area']} comes into force now" in page
    assert "boundary: enter" not in page and "boundary crossed" not in page
    assert "Boundary" not in page


@pytest.mark.requires_poppler
def test_map_and_chart_name_the_in_force_event_with_its_time(plan):
    doc, files, _ = plan
    ev, row = in_force(doc)
    n, when = row["number"], utc_full(ev["time_utc"])
    m = pdf_flat(files["map"])
    assert (f"{n} comes into force {ev['area']} {when}, ship at "
            f"{position(ev['lat'], ev['lon'])}, {ev['distance_nm']:,.1f} nm") in m
    assert f"{n} comes into force {when}" in m  # the label beside its star
    # the crossing before the area's date stays a crossing, unnumbered
    (cross,) = [c for c in json.loads(run("route", "areas_sample/skarvik_to_tarrow.csv",
                                          "--areas", "areas_sample/skarvik_basin.geojson",
                                          "--areas", "areas_sample/tarrow", "--depart",
                                          doc["voyage"]["depart_utc"], "--json").stdout)
                ["crossings"] if c["event"] == "enter"]
    assert not cross["in_force"]
    assert f"- enter {ev['area']} at {cross['distance_nm']:,.1f} nm: not in force then" in m
    c = pdf_flat(files["chart"])
    assert f"{n} comes into force {ev['area']} {when}" in c
    assert f"{n} enter {ev['area']}" not in c and f"{n} enter {ev['area']}" not in m


def test_gpx_has_the_in_force_point_with_its_time(plan):
    doc, files, _ = plan
    ev, row = in_force(doc)
    root = ET.parse(files["gpx"]).getroot()
    wpts = {w.find(f"{GPX}name").text: w for w in root.iter(f"{GPX}wpt")}
    w = wpts[f"CO{row['number']} comes into force"]
    assert w.find(f"{GPX}time").text == ev["time_utc"]
    assert w.find(f"{GPX}type").text == "comes into force"
    assert abs(float(w.get("lat")) - ev["lat"]) < 1e-7
    assert abs(float(w.get("lon")) - ev["lon"]) < 1e-7
    assert f"CO{row['number']} boundary" not in wpts


def test_csv_event_column_and_force_events(plan):
    doc, files, _ = plan
    ev, row = in_force(doc)
    with (files["csv"] / "changeovers.csv").open(encoding="utf-8", newline="") as f:
        rows = list(csv.DictReader(f))
    assert [r["Event"] for r in rows] == [r["boundary_event"] for r in doc["changeovers"]]
    assert [r["Clock deadline"] for r in rows] == [
        "yes" if r["clock_deadline"] else "no" for r in doc["changeovers"]]
    with (files["csv"] / "force_events.csv").open(encoding="utf-8", newline="") as f:
        (fe,) = list(csv.DictReader(f))
    assert (fe["Area"], fe["Event"], fe["Time (UTC, ISO 8601)"]) == (
        ev["area"], "comes_into_force", ev["time_utc"])
    assert fe["Position (° ')"] == position(ev["lat"], ev["lon"])


ROUTE = ["route", "areas_sample/skarvik_to_tarrow.csv", "--areas",
         "areas_sample/skarvik_basin.geojson", "--areas", "areas_sample/tarrow", "--depart",
         "2027-06-10T06:00-11:00", "--tz", "-11:00"]


@pytest.mark.parametrize("width", WIDTHS)
def test_route_prints_the_force_events_table(width, tmp_path):
    doc = json.loads(piped([*ROUTE, "--json"]))
    (ev,) = doc["force_events"]
    text = piped(ROUTE) if width is None else on_tty(ROUTE, width)
    check_lines(text, width)
    assert "Coming into force / ceasing while inside" in text
    part = text.split("Coming into force / ceasing while inside", 1)[1].split(
        "Sulphur limit along the route", 1)[0]
    for token in (utc_full(ev["time_utc"]), ship_text(ev["time_utc"]),
                  position(ev["lat"], ev["lon"]), f"{ev['distance_nm']:,.2f}"):
        assert on_a_line(token, part), token
    assert re.search(r"comes\s+into\s+force", part)
    out = tmp_path / "route_csv"
    run(*ROUTE, "--csv", str(out))
    with (out / "force_events.csv").open(encoding="utf-8", newline="") as f:
        (fe,) = list(csv.DictReader(f))
    assert fe["Time (UTC, ISO 8601)"] == ev["time_utc"] and fe["Leg (number)"] == str(ev["leg"])
    assert moment(fe["Time (UTC, ISO 8601)"]).astimezone(UTC).hour == 0


@pytest.mark.requires_poppler
def test_route_map_marks_the_in_force_moment(tmp_path):
    doc = json.loads(piped([*ROUTE, "--json"]))
    (ev,) = doc["force_events"]
    pdf = tmp_path / "route_map.pdf"
    run(*ROUTE, "--map", str(pdf))
    t = pdf_flat(pdf)
    when = utc_full(ev["time_utc"])
    assert (f"comes into force {ev['area']} {when}, ship at {position(ev['lat'], ev['lon'])}, "
            f"{ev['distance_nm']:,.1f} nm") in t
    assert f"comes into force {when}" in t  # the star's label
    (entry,) = [c for c in doc["crossings"] if c["event"] == "enter"]
    assert f"enter {entry['area']} at {entry['distance_nm']:,.1f} nm (not in force then)" in t
