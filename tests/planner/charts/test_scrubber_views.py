"""The scrubber on the plan's map and chart, read back as a person reads them (issue 14).

Two plans: the scrubber sample (areas_sample/egcs_voyage.toml, fictional: the plan's own
spans and events and its washwater zone file), and the first sample with spans and
events put in by hand (tests/helpers/scrubbers.py) at distances along its own route.
The map and chart are drawn as PDF (vector) and read back with ``pdftotext -bbox``;
what they must show is written out here from the plan's ``--json`` rows and from the
zone file's own GeoJSON properties (read with :mod:`json`, not the loader). A plan
without a scrubber draws nothing of it.
"""

from __future__ import annotations

import json
import re

import pytest

from planner.charts.plan_events import PlanEvent, scrubber_label
from planner.charts.scrubber_draw import merged_spans
from planner.charts.scrubber_marks import action_text, event_rows, relies_text
from tests.helpers.paths import ROOT
from tests.helpers.pdf import pdf_flat, pdf_words

needs_poppler = pytest.mark.requires_poppler
EGCS = ROOT / "areas_sample" / "egcs_voyage.toml"
ZONES = ROOT / "areas_sample" / "discharge" / "aldmere_discharge.geojson"
LON = re.compile(r"^(\d+)°(?:(\d\d)')?([EW]?)$")


def lon_of(label: str) -> float | None:
    """A longitude tick label read as a person reads it, unwrapped east of 0° (175°W →
    185)."""
    m = LON.match(label)
    if not m:
        return None
    v = int(m.group(1)) + int(m.group(2) or 0) / 60.0
    return 360.0 - v if m.group(3) == "W" else v


@pytest.fixture(scope="module")
def egcs(tmp_path_factory):
    """The scrubber sample's plan, its document, and its map and chart as PDF."""
    from planner.charts.plan_chart import chart_figure
    from planner.charts.plan_marks import crossing_labels, event_notes, events_of, plan_marks
    from planner.charts.route_map import map_figure, save_figure
    from planner.voyage.report import plan_json
    from planner.voyage.run import build_plan

    out = tmp_path_factory.mktemp("egcs")
    plan = build_plan(EGCS)
    doc = plan_json(plan)
    events = events_of(plan, doc)
    save_figure(map_figure(plan.check, plan_marks(plan, doc), crossing_labels(events),
                           event_notes(events)), out / "map.pdf")
    save_figure(chart_figure(plan, events), out / "chart.pdf")
    save_figure(map_figure(plan.check, plan_marks(plan, doc), crossing_labels(events),
                           event_notes(events)), out / "map.png")
    return plan, doc, events, out


def test_the_sample_relies_on_its_scrubber(egcs):
    _, doc, events, _ = egcs
    assert doc["scrubber_spans"] and len(doc["scrubber_events"]) >= 4
    scrub = [e for e in events if e.is_scrubber]
    # numbered 1..n in time order, drawn S1..Sn, as the document numbers them
    assert [e.label for e in scrub] == [f"S{r['number']}" for r in doc["scrubber_events"]]
    assert [r["number"] for r in doc["scrubber_events"]] == list(
        range(1, len(doc["scrubber_events"]) + 1))
    times = [r["utc"] for r in doc["scrubber_events"]]
    assert times == sorted(times)


@needs_poppler
def test_map_draws_every_scrubber_event_at_its_longitude(egcs):
    _, doc, _, out = egcs
    ws = pdf_words(out / "map.pdf")
    ticks = [(lon_of(t), x, y) for t, x, y in ws if lon_of(t) is not None]
    ticks = [t for t in ticks if abs(t[2] - max(y for _, _, y in ticks)) < 2]  # the x axis
    (l0, x0, _), (l1, x1, _) = ticks[0], ticks[-1]
    scale = (x1 - x0) / (l1 - l0)
    for r in doc["scrubber_events"]:
        want = x0 + (r["lon"] % 360.0 - l0) * scale  # the sample lies east of 165°E
        label = f"S{r['number']}"
        xs = [x for t, x, _ in ws if t == label]
        # the label sits 8 points right of its hexagon, and is 2-3 characters wide
        assert any(0.0 < x - want < 20.0 for x in xs), (label, want, xs)


@needs_poppler
def test_map_legend_lists_spans_events_and_zones(egcs):
    _, doc, _, out = egcs
    t = pdf_flat(out / "map.pdf")
    assert "scrubber relied on, open loop" in t and "scrubber relied on, closed loop" in t
    assert "scrubber event (S number)" in t
    zones = json.loads(ZONES.read_text(encoding="utf-8"))["features"]
    allows = {z["properties"]["allows"] for z in zones}
    assert allows == {"closed", "none"}
    assert "washwater zone: closed loop only" in t and "washwater zone: no washwater " \
        "discharge" in t
    for z in zones:
        assert z["properties"]["name"] in t
    for r in doc["scrubber_events"]:
        kind = r["event"].replace("_", " ")
        assert f"S{r['number']} scrubber {kind} {r['scrubber']} {r['utc'][:10]} " \
               f"{r['utc'][11:16]}Z" in t


@needs_poppler
def test_chart_bands_and_events(egcs):
    plan, doc, _, out = egcs
    t = pdf_flat(out / "chart.pdf")
    # one band per run of spans in one mode; the limit changes inside a run do not cut it
    runs = []
    for s in doc["scrubber_spans"]:
        if runs and runs[-1][0] == s["mode"] and runs[-1][1] == s["from_utc"]:
            runs[-1][1] = s["to_utc"]
        else:
            runs.append([s["mode"], s["to_utc"]])
    assert len(merged_spans(doc["scrubber_spans"])) == len(runs) < len(doc["scrubber_spans"])
    for mode, _ in runs:
        assert f"egcs {mode}" in t
    assert t.count("egcs open") + t.count("egcs closed") == len(runs)
    for r in doc["scrubber_events"]:
        assert f"S{r['number']} {r['event'].replace('_', ' ')}" in t
    # the sample's hsfo (2.60 % m/m by its delivery note) is above the scale: named
    assert "hsfo 2.60 % m/m at the served inlets, above the scale" in t


def test_map_png_written(egcs):
    import numpy as np
    from PIL import Image

    img = Image.open(egcs[3] / "map.png").convert("L")
    dark = float((np.asarray(img) < 200).mean())
    assert img.height > img.width * 0.6 and 0.02 < dark < 0.6


# ---- the hand-made spans on the first sample, and a plan without a scrubber

@pytest.fixture(scope="module")
def samples():
    from planner.voyage.report import plan_json
    from planner.voyage.run import build_plan
    from tests.helpers.scrubbers import VOYAGE, scrubbed

    plain = build_plan(VOYAGE)
    return plain, plan_json(plain), scrubbed(plain)


def test_a_plan_without_scrubber_has_no_scrubber_event(samples):
    from planner.charts.plan_marks import event_notes, events_of
    from planner.charts.scrubber_marks import with_scrubbers

    plain, doc, _ = samples
    assert "scrubber_events" not in doc
    assert with_scrubbers(plain, doc) is doc  # nothing added, nothing copied
    events = events_of(plain, doc)
    assert not any(e.is_scrubber for e in events)
    assert not any("scrubber" in n for n in event_notes(events))


@needs_poppler
def test_a_plan_without_scrubber_draws_none(samples, tmp_path):
    from planner.charts.plan_chart import chart_figure
    from planner.charts.plan_marks import crossing_labels, event_notes, events_of, plan_marks
    from planner.charts.route_map import map_figure, save_figure

    plain, doc, _ = samples
    events = events_of(plain, doc)
    save_figure(map_figure(plain.check, plan_marks(plain, doc), crossing_labels(events),
                           event_notes(events)), tmp_path / "m.pdf")
    save_figure(chart_figure(plain, events), tmp_path / "c.pdf")
    for f in ("m.pdf", "c.pdf"):
        t = pdf_flat(tmp_path / f).lower()
        assert "scrubber" not in t and "washwater" not in t and "egcs" not in t


def test_hand_spans_are_placed_on_the_route(samples):
    """The events' positions are those of the route at their distances: the sample's
    route runs along 39°-40°S from 166°E (Port Aldmere) eastwards past 180°
    (areas_sample/aldmere_to_skarvik.csv), and an event's time is the schedule's there."""
    from planner.charts.plan_marks import events_of
    from planner.charts.scrubber_marks import with_scrubbers
    from tests.helpers.scrubbers import EVENTS

    _, doc, plan = samples
    full = with_scrubbers(plan, doc)
    rows = full["scrubber_events"]
    assert [r["distance_nm"] for r in rows] == pytest.approx([m / 1852.0 for *_, m, _ in
                                                              EVENTS])  # [NM-1852]
    for r in rows:
        assert -40.5 < r["lat"] < -38.0
    scrub = [e for e in events_of(plan, full) if e.is_scrubber]
    assert [e.label for e in scrub] == ["S1", "S2", "S3", "S4"]
    # in order along the route among the crossings: S2 (700 000 m) between the Corran Sea
    # ECA exit at 604 229 m and the entry at 777 333 m (the route check's crossings)
    events = events_of(plan, full)
    assert [e.distance_nm for e in events] == sorted(e.distance_nm for e in events)
    k = [e.label for e in events].index("S2")
    assert (events[k - 1].kind, events[k + 1].kind) == ("exit", "enter")
    assert events[k - 1].distance_nm == pytest.approx(604229.54 / 1852.0, abs=0.01)


# ---- the words, against sentences written out here

SPANS = [{"scrubber": "EGCS 1", "circuits": ["main"], "fuel": "hsfo", "fallback_fuel": "mgo",
          "limit_pct": 0.1, "mode": "open", "from_nm": 10.0, "to_nm": 50.0,
          "from_utc": "2027-05-30T00:00:00Z", "to_utc": "2027-05-30T03:00:00Z",
          "duration_h": 3.0},
         {"scrubber": "EGCS 1", "circuits": ["main"], "fuel": "hsfo", "fallback_fuel": "mgo",
          "limit_pct": 0.1, "mode": "closed", "from_nm": 50.0, "to_nm": 60.0,
          "from_utc": "2027-05-30T03:00:00Z", "to_utc": "2027-05-30T04:30:00Z",
          "duration_h": 1.5}]


def _event(kind: str, mode: str | None, utc: str) -> dict:
    return {"number": 1, "scrubber": "EGCS 1", "event": kind, "mode": mode, "utc": utc,
            "lat": -39.5, "lon": 170.0, "distance_nm": 10.0, "reason": "why"}


@pytest.mark.parametrize(("kind", "mode", "utc", "words"), [
    ("start", "open", "2027-05-30T00:00:00Z",
     "start EGCS 1 in open loop, then switch circuit main to hsfo (not before it runs)"),
    ("mode_change", "closed", "2027-05-30T03:00:00Z",
     "change EGCS 1 to closed loop before the zone (no open-loop washwater discharge "
     "there)"),
    ("mode_change", "open", "2027-05-30T04:00:00Z", "EGCS 1 may change back to open loop"),
    ("stop", None, "2027-05-30T04:30:00Z",
     "stop EGCS 1 only once circuit main burns mgo at every inlet (at or under 0.10 % m/m)"),
    ("out_of_service", None, "2027-05-30T04:30:00Z",
     "EGCS 1 out of service from now: circuit main must be on mgo (at or under 0.10 % "
     "m/m); report it as the scrubber's approval requires"),
    ("out_of_service", None, "2027-05-30T09:00:00Z",  # no span ends then
     "EGCS 1 out of service from now: no fuel above the limit on the circuits it serves; "
     "report it as the scrubber's approval requires"),
    ("stop", None, "2027-05-30T09:00:00Z", "stop EGCS 1"),  # no span ends then
])
def test_action_words(kind, mode, utc, words):
    assert action_text(_event(kind, mode, utc), SPANS) == words


def test_two_circuits_take_the_plural():
    spans = [dict(SPANS[0], circuits=["main", "aux"])]
    stop = _event("stop", None, "2027-05-30T03:00:00Z")
    assert "once circuits main, aux burn mgo" in action_text(stop, spans)


def test_labels_and_relies_line():
    rows = event_rows({"scrubber_events": [_event("start", "open", "2027-05-30T00:00:00Z"),
                                           dict(_event("stop", None, "2027-05-30T04:30:00Z"),
                                                number=2)],
                       "scrubber_spans": SPANS})
    assert [r["label"] for r in rows] == ["S1", "S2"] == [scrubber_label(1), scrubber_label(2)]
    assert rows[1]["action"].startswith("stop EGCS 1 only once")
    line = relies_text(SPANS)
    # 3.0 h open + 1.5 h closed, from 10.0 to 60.0 nm, the hours added here by hand
    assert "EGCS 1 for circuit main on hsfo from 10.0 to 60.0 nm (3.0 h open loop, 1.5 h " \
           "closed loop; under 0.10 % m/m)" in line
    assert "fallback fuel (mgo)" in line
    assert relies_text([]) == ""


def test_a_scrubber_event_is_not_a_crossing():
    e = PlanEvent(3, "scrubber mode change", "EGCS 1", "2027-05-30T03:00:00Z", -39.5, 170.0,
                  50.0, "x")
    assert e.is_scrubber and not e.is_crossing and e.label == "S3"
    c = PlanEvent(3, "enter", "Corran Sea ECA", None, -39.5, 170.0, 50.0, "x")
    assert not c.is_scrubber and c.label == "3"
    with pytest.raises(ValueError, match="event kind"):
        PlanEvent(1, "scrubber nap", "EGCS 1", None, 0.0, 0.0, 0.0, "")


@pytest.mark.parametrize(("event", "direction", "label", "words"), [
    ("zone_enter", "to_compliant", ("Boundary", "at"),
     ", enter (a washwater discharge zone the scrubber cannot work in): change the served "
     "circuits to compliant fuel before the boundary (limit 0.10 % m/m)"),
    ("zone_exit", "to_regular", ("Boundary", "at"),
     ", exit (a washwater discharge zone): change the served circuits back to the "
     "high-sulphur fuel at or after the boundary, never before"),
    ("scrubber_out_of_service", "to_compliant", ("Scrubber out of service", "the ship then at"),
     ", scrubber out of service at 14:00Z: the served circuits compliant by 14:00Z wherever "
     "the ship is (limit 0.10 % m/m)"),
    ("scrubber_in_service", "to_regular", ("Scrubber back in service", "the ship then at"),
     ", scrubber back in service at 14:00Z: change back to the high-sulphur fuel at or after "
     "14:00Z, never before"),
    ("load_out_of_range", "to_compliant", ("Leg begins", "at"),
     ", a leg on which a served engine's load is outside the scrubber's load range (see the "
     "scrubber events): change the served circuits to compliant fuel before the leg "
     "(limit 0.10 % m/m)"),
    ("load_in_range", "to_regular", ("Leg begins", "at"),
     ", the served engines' load back within the scrubber's load range: change the served "
     "circuits back to the high-sulphur fuel at or after the leg's start, never before"),
])
def test_the_served_circuits_boundaries_have_words(event, direction, label, words):
    """The words of the served circuits' own boundaries, one text for the terminal table
    (planner/cli/plan_tables.py), the PDF, the sheets, the map, the chart and the GPX."""
    from planner.charts.plan_events import KINDS, moment_words, plan_events, what_text

    r = {"boundary_event": event, "direction": direction, "limit_pct": 0.1, "number": 3,
         "area": "Corran Sea ECA", "to_fuel": "mgo", "boundary_nm": 50.0, "boundary_lat": -39.9,
         "boundary_lon": 171.0, "boundary_utc": "2027-05-30T14:00:00Z"}
    assert what_text(r, "14:00Z") == words
    assert moment_words(r) == label
    [e] = plan_events([], [r], [])
    assert e.kind == KINDS[event] and e.label == "3"
    assert e.zone == event.startswith(("zone_", "load_"))  # places, not clock moments
