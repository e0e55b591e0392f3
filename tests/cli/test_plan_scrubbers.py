"""``changeover plan`` on the scrubber sample (areas_sample/egcs_voyage.toml, fictional),
end to end through the command line.

MV Gannet Shoal's hybrid scrubber serves the main circuit (main engine and generators);
the boiler's circuit is not served. The sample's discharge zones: Port Aldmere's harbour
waters and Skarvik's allow no discharge, Corran Sea coastal waters and the Brannoch
Passage zone closed loop only. So (README, "Scrubbers in the plan", the rules of a
ship's officer): the main circuit leaves Port Aldmere on vlsfo (the scrubber cannot work
in the harbour) and changes to hsfo at the harbour's limit, keeps hsfo through every
control area with the scrubber in closed loop across the two closed-only zones, and is
compliant on mgo before Skarvik's harbour waters; the boiler changes over at every
area as without a scrubber. Every printed table must fit 80 columns, and every time and
position of the document's scrubber events must be on one line of the text.
"""

from __future__ import annotations

import json

import pytest

from tests.helpers.terminal import on_tty, piped, position, utc_full

PLAN = ["plan", "areas_sample/egcs_voyage.toml"]
WIDTHS = (80, 120, None)


@pytest.fixture(scope="module")
def sample():
    doc = json.loads(piped([*PLAN, "--json"]))
    texts = {w: (piped(PLAN) if w is None else on_tty(PLAN, w)) for w in WIDTHS}
    return doc, texts


def test_the_sample_plan_relies_on_the_scrubber(sample):
    doc, _ = sample
    assert doc["scrubbers"][0]["name"] == "egcs" and doc["scrubbers"][0]["circuits"] == ["main"]
    main = [r for r in doc["changeovers"] if r["circuit"] == "main"]
    assert [(r["boundary_event"], r["area"], r["from_fuel"], r["to_fuel"]) for r in main] == [
        ("zone_exit", "Port Aldmere harbour waters", "vlsfo", "hsfo"),
        ("zone_enter", "Skarvik harbour waters", "hsfo", "mgo")]
    boiler = [r for r in doc["changeovers"] if r["circuit"] == "boiler"]
    assert len(boiler) == 5 and {r["to_fuel"] for r in boiler} == {"mgo", "vlsfo"}
    ev = [(e["event"], e["mode"]) for e in doc["scrubber_events"]]
    assert ev == [("start", "open"), ("mode_change", "closed"), ("mode_change", "open"),
                  ("mode_change", "closed"), ("mode_change", "open"), ("stop", None)]
    assert doc["scrubber_events"][0]["utc"] == main[0]["start_utc"]
    assert doc["scrubber_events"][-1]["utc"] == main[1]["compliant_utc"]
    # hsfo inside every control area while the scrubber is relied on
    inside = {a for s in doc["scrubber_spans"] for a in s["areas"] if a.endswith("ECA")}
    assert inside == {"Corran Sea ECA", "Meridian Reach ECA", "Skarvik Basin ECA"}
    assert {s["fuel"] for s in doc["scrubber_spans"]} == {"hsfo"}
    assert "hsfo" in doc["fuel_totals"]


@pytest.mark.parametrize("width", WIDTHS)
def test_the_scrubber_tables_are_whole(sample, width):
    doc, texts = sample
    text = texts[width]
    for line in text.splitlines():
        assert line == line.rstrip() and "…" not in line
        if width is not None:
            assert len(line) <= width, line
    assert "Scrubber events" in text and "Where the plan relies on a scrubber" in text
    for e in doc["scrubber_events"]:
        assert any(utc_full(e["utc"]) in line for line in text.splitlines())
        assert any(position(e["lat"], e["lon"]) in line for line in text.splitlines())
        assert any(f"{e['distance_nm']:,.1f}" in line for line in text.splitlines())
    for s in doc["scrubber_spans"]:
        assert any(utc_full(s["from_utc"]) in line for line in text.splitlines())
        assert any(f"{s['duration_h']:.2f}" in line for line in text.splitlines())
    # the served circuits' own boundaries in words, not as area crossings
    assert "exit (a washwater discharge zone)" in " ".join(text.split())


@pytest.mark.parametrize("width", WIDTHS)
def test_the_served_circuits_emission_ratio_is_shown(sample, width):
    """The stretches' ``scrubbed`` figures in the text, each number whole on one line: main
    on hsfo (2.60 %, 84.93 % carbon [MEPC-308], from memory), uncleaned
    10⁴ × (2.60/32.06)/(84.93/12.011) = 114.7 by hand ([IUPAC-2021] [D]); to meet 4.3 (0.10 %,
    [MEPC-340] Table 1, from memory) 96.3 % of it removed."""
    doc, texts = sample
    lines = texts[width].splitlines()
    assert "SO₂/CO₂ of the fuel burnt on a scrubber, by stretch" in lines
    raw = 1e4 * (2.60 / 32.06) / (84.93 / 12.011)
    assert f"{raw:.1f}" == "114.7" and f"{100 * (1 - 4.3 / raw):.1f}" == "96.3"
    rows = [(st, x) for st in doc["stretches"] for x in st["scrubbed"]]
    assert rows and {x["fuel"] for _, x in rows} == {"hsfo"}
    head = " ".join(" ".join(lines).split())
    assert "Circuit main on hsfo (2.60 % m/m sulphur, 84.93 % m/m carbon" in head
    for st, x in rows:
        cells = [f"{st['from_nm']:,.1f}", f"{st['to_nm']:,.1f}", f"{st['ratio_limit']:.1f}",
                 f"{x['uncleaned_ratio']:.1f}", f"{x['so2_removal_needed_pct']:.1f}"]
        assert any(all(c in line.split() for c in cells) for line in lines), cells


def test_the_sample_files_are_written(tmp_path):
    gj = tmp_path / "plan.geojson"
    out = piped([*PLAN, "--geojson", str(gj), "--map", str(tmp_path / "map.png"),
                 "--gpx", str(tmp_path / "marks.gpx")])
    assert f"wrote {gj}" in out
    kinds = [f["properties"]["kind"] for f in json.loads(gj.read_text())["features"]]
    assert kinds.count("scrubber_event") == 6


@pytest.mark.parametrize("cols", [80, 120, 160])
def test_an_outage_is_named_as_a_moment_on_the_clock(cols):
    """The changeover for a planned outage reads as a deadline on the clock, not as an entry
    (README, "Scrubbers in the plan"), and its rows are whole at every width."""
    from datetime import timedelta

    from geo.schedule import to_epoch
    from planner.charts.plan_marks import events_of
    from planner.cli.plan import plan_lines
    from planner.voyage.scrubber_events import ScrubberOutage
    from tests.planner.voyage.test_scrubbing import _inputs, hours, parallel_m, plan_of

    voyage, _, _ = _inputs()
    moment = voyage.depart_utc + timedelta(hours=hours(parallel_m(2.0, 3.8), 12.0))
    plan, doc = plan_of(outages=(ScrubberOutage("egcs", to_epoch(moment)),))
    lines = plan_lines(doc, cols)
    assert all(len(line) <= cols for line in lines)
    text = " ".join(" ".join(lines).split())
    row = next(r for r in doc["changeovers"] if r["boundary_event"] == "scrubber_out_of_service")
    assert f"Changeover {row['number']}: West Far ECA, scrubber out of service at" in text
    assert f"Scrubber out of service {utc_full(row['boundary_utc'])}" in text
    assert position(row["start_lat"], row["start_lon"]) in text
    # the map, chart and GPX marks draw it too, under its own number
    assert row["number"] in {e.number for e in events_of(plan, doc)}


@pytest.mark.parametrize("cols", [80, 120, 160])
def test_a_leg_out_of_the_load_range_is_named_in_the_text(cols):
    """The changeover before a slow leg below the scrubber's minimum load reads as such (not
    as an area's entry), and the scrubber stop says which engine at what load: 15.9 % MCR at
    8 kn by the propeller law, 85 % × (8/14)³ ([PROPELLER-LAW], common practice)."""
    from planner.cli.plan import plan_lines
    from tests.planner.voyage.test_scrubber_load import plan_of

    _, doc = plan_of(min_load_pct=25.0)
    lines = plan_lines(doc, cols)
    assert all(len(line) <= cols for line in lines)
    text = " ".join(" ".join(lines).split())
    down = next(r for r in doc["changeovers"] if r["boundary_event"] == "load_out_of_range")
    assert (f"Changeover {down['number']}: West Far ECA, a leg on which a served engine's "
            "load is outside the scrubber's load range") in text
    assert f"Leg begins {utc_full(down['boundary_utc'])}" in text
    assert f"main_engine load {85 * (8 / 14) ** 3:.1f} % MCR at 8.0 kn, below scrubber " \
        "egcs's 25 % minimum" in text
    back = next(r for r in doc["changeovers"] if r["boundary_event"] == "load_in_range")
    assert f"Changeover {back['number']}: West Far ECA, the served engines' load back " \
        "within" in text
