"""The scrubber in the plan PDF, the watch sheets and the GPX marks (issue 14).

The first sample voyage with spans and events put in by hand (tests/helpers/scrubbers.py:
at distances along its own route, at its own schedule's moments), and the scrubber
sample (areas_sample/egcs_voyage.toml) through the command line. PDFs are read back
with pdftotext; what they must say is written out here: positions in degrees and minutes
and ship's time (UTC+12:00 before the sample's zone change, its voyage file) by hand
arithmetic, the hours of each span from its moments, the ship's four-hour watches.
A plan without a scrubber prints no scrubber section, step or page.
"""

from __future__ import annotations

import json
import xml.etree.ElementTree as ET
from datetime import datetime, timedelta

import pytest

from tests.helpers.cli import changeover_ok as run
from tests.helpers.pdf import pdf_flat, pdf_pages

needs_poppler = pytest.mark.requires_poppler
GPX = "{http://www.topografix.com/GPX/1/1}"


def dm(value: float, hemi: str) -> str:
    """Degrees and minutes to 0.1', by hand: 39.5694 S → 39°34.2'S."""
    a = abs(value)
    deg = int(a)
    minutes = round((a - deg) * 60.0, 1)
    if minutes >= 60.0:
        deg, minutes = deg + 1, 0.0
    return f"{deg}°{minutes:04.1f}'{hemi[0] if value >= 0 else hemi[1]}"


def lon_dm(lon: float) -> str:
    return dm((lon + 180.0) % 360.0 - 180.0, "EW")


def ship(utc: str, hours: int = 12) -> datetime:
    """Ship's time at UTC+12:00 (the sample's ``ship_time`` before its zone change)."""
    return datetime.fromisoformat(utc.replace("Z", "+00:00")) + timedelta(hours=hours)


@pytest.fixture(scope="module")
def scrubbed(tmp_path_factory):
    from planner.charts.scrubber_marks import with_scrubbers
    from planner.documents.plan_pdf import write_plan_pdf
    from planner.voyage.report import plan_json
    from planner.voyage.run import build_plan
    from tests.helpers.scrubbers import VOYAGE
    from tests.helpers.scrubbers import scrubbed as put_in

    out = tmp_path_factory.mktemp("scrubbed")
    plain = build_plan(VOYAGE)
    plan = put_in(plain)
    doc = with_scrubbers(plan, plan_json(plan))
    write_plan_pdf(out / "plan.pdf", doc)
    write_plan_pdf(out / "plain.pdf", plan_json(plain))
    return plain, plan, doc, out


@needs_poppler
def test_pdf_scrubber_section(scrubbed):
    _, _, doc, out = scrubbed
    t = pdf_flat(out / "plan.pdf")
    assert "Scrubber The plan relies on the scrubber to burn fuel above the limit" in t
    assert "The EGCS approval (MARPOL Annex VI regulation 4) and the scrubber's operating " \
           "manual come first" in t
    # what the plan relies on it for: 32.4 to 809.9 nm, the hours by hand from the moments
    spans = doc["scrubber_spans"]
    hours = {m: sum((datetime.fromisoformat(s["to_utc"][:-1]) -
                     datetime.fromisoformat(s["from_utc"][:-1])).total_seconds()
                    for s in spans if s["mode"] == m) / 3600.0 for m in ("open", "closed")}
    assert f"EGCS 1 for circuit main on hsfo from {60000 / 1852:,.1f} to " \
           f"{1500000 / 1852:,.1f} nm ({hours['open']:,.1f} h open loop, " \
           f"{hours['closed']:,.1f} h closed loop; under 0.10 % m/m)" in t
    for s in spans:  # each span: from and to in UTC, ship's time and position
        for end in ("from", "to"):
            utc = s[f"{end}_utc"]
            assert f"{utc[:10]} {utc[11:16]}Z" in t
            assert f"{ship(utc):%Y-%m-%d %H:%M} (+12:00)" in t
            assert f"{dm(s[f'{end}_lat'], 'NS')} {lon_dm(s[f'{end}_lon'])}" in t
    for n, e in enumerate(doc["scrubber_events"], start=1):
        assert f"S{n} {e['utc'][:10]} {e['utc'][11:16]}Z" in t
        assert f"{dm(e['lat'], 'NS')} {lon_dm(e['lon'])}" in t
        assert e["reason"] in t
    assert "start EGCS 1 in open loop, then switch circuit main to hsfo" in t
    assert "change EGCS 1 to closed loop before the zone" in t


@needs_poppler
def test_pdf_without_scrubber_has_no_section(scrubbed):
    t = pdf_flat(scrubbed[3] / "plain.pdf")
    assert "Scrubber" not in t and "EGCS" not in t and "S1 " not in t


def test_watch_sheets_carry_the_scrubber_events(scrubbed, tmp_path):
    """An event put 10 min before changeover 1's first valve switch is a step of its
    sheet, before the switch; the scrubber's page lists every event by the ship's watch."""
    import dataclasses

    from planner.documents.watch_facts import ScrubberSheet, WatchSheet, watch_sheets
    from planner.documents.watch_sheets_pdf import write_watch_sheets
    from planner.voyage.scrubber_events import ScrubberEvent

    plain, plan, _, _ = scrubbed
    first = min(c.start_epoch_s for c in plan.changes[0].circuits)
    near = ScrubberEvent("EGCS 1", "mode_change", "closed", first - 600.0,
                         float(plan.timeline.schedule.distance_at_epoch([first - 600.0])[0]),
                         "test: near changeover 1")
    events = sorted((*plan.scrubber_events, near), key=lambda e: e.epoch_s)
    plan = dataclasses.replace(plan, scrubber_events=tuple(events))
    sheets = watch_sheets(plan)
    assert [type(s) for s in sheets] == [WatchSheet] * len(plan.changes) + [ScrubberSheet]
    label = f"S{events.index(near) + 1}"
    steps = sheets[0].steps
    k = next(i for i, s in enumerate(steps) if s.what.startswith(label))
    switch = next(i for i, s in enumerate(steps) if s.what.startswith("switch the valve"))
    assert k < switch and steps[k].record and steps[k].circuit == "EGCS 1"
    assert steps[k].record_as == f"{label} mode change"
    # the watches by hand: ship's time UTC+12:00, and UTC-11:00 from 2027-06-01 12:00Z
    # (the sample voyage file's zone change)
    change = datetime.fromisoformat("2027-06-01T12:00+00:00")
    for d in sheets[-1].events:
        local = d.when.utc + timedelta(hours=12 if d.when.utc < change else -11)
        start = local.hour // 4 * 4
        assert d.watch == f"{start:02d}-{start + 4:02d}", d
    out = tmp_path / "sheets.pdf"
    write_watch_sheets(out, sheets, ship="MV Kestrel Bay", voyage="test")
    pages = pdf_pages(out)
    assert len(pages) == len(sheets)  # one page each, the scrubber's too
    assert f"Scrubber watch sheet: S1 to S{len(events)}" in pages[-1]
    assert "operating manual come first" in pages[-1]
    assert f"EGCS 1: {label} mode change" in pages[0]
    plain_sheets = watch_sheets(plain)
    assert all(isinstance(s, WatchSheet) for s in plain_sheets)
    assert not any(s.circuit == "EGCS 1" for sh in plain_sheets for s in sh.steps)


def test_gpx_marks_scrubber_events(scrubbed):
    from planner.charts.plan_marks import events_of
    from planner.documents.gpx_marks import gpx_text, plan_waypoints

    plain, plan, doc, _ = scrubbed
    root = ET.fromstring(gpx_text(plan_waypoints(doc, events_of(plan, doc)), "t"))
    wpts = root.findall(f"{GPX}wpt")
    names = [w.findtext(f"{GPX}name") for w in wpts]
    assert len(names) == len(set(names))  # unique on the chart plotter
    marks = [w for w in wpts if (w.findtext(f"{GPX}type") or "").startswith("scrubber ")]
    assert [w.findtext(f"{GPX}name") for w in marks] == [
        "S1 EGCS 1 start", "S2 EGCS 1 mode change", "S3 EGCS 1 mode change", "S4 EGCS 1 stop"]
    for w, e in zip(marks, doc["scrubber_events"], strict=True):
        assert w.findtext(f"{GPX}time") == e["utc"]
        assert float(w.get("lat")) == pytest.approx(e["lat"], abs=1e-7)
        assert -180.0 <= float(w.get("lon")) < 180.0  # GPX 1.1 [GPX-11]
        assert e["reason"] in w.findtext(f"{GPX}cmt")
    from planner.voyage.report import plan_json

    plain_marks = plan_waypoints(plan_json(plain), events_of(plain, plan_json(plain)))
    assert not any(w.kind.startswith("scrubber") for w in plain_marks)


@needs_poppler
def test_the_scrubber_sample_through_the_command_line(tmp_path):
    """``changeover plan`` on the scrubber sample writes every output with the scrubber's
    role in it; its PDF's scrubber events are the ``--json`` document's."""
    files = {k: tmp_path / n for k, n in (("pdf", "plan.pdf"), ("sheets", "sheets.pdf"),
                                           ("gpx", "marks.gpx"), ("map", "map.png"),
                                           ("chart", "chart.png"))}
    run("plan", "areas_sample/egcs_voyage.toml", *[x for k, p in files.items()
                                                   for x in (f"--{k}", str(p))])
    doc = json.loads(run("plan", "areas_sample/egcs_voyage.toml", "--json").stdout)
    t = pdf_flat(files["pdf"])
    for e in doc["scrubber_events"]:
        assert f"S{e['number']} {e['utc'][:10]} {e['utc'][11:16]}Z" in t
    assert "Scrubber watch sheet: S1 to S" in pdf_pages(files["sheets"])[-1]
    gpx = files["gpx"].read_text(encoding="utf-8")
    assert gpx.count("<type>scrubber ") == len(doc["scrubber_events"])
    for k in ("map", "chart"):
        assert files[k].read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"
