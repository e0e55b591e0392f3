"""The plan's scrubber rules on a constructed voyage (fictional, ``tests/data/voyages``).

``scrub_far.toml`` sails the T1S test ship (README of the fixtures) due east along 50°N
at 12 kn through two areas (0.10 %, 3°E-4°E and 7°E-8°E); a hybrid scrubber serves the
main engine, whose circuit can burn a 2.60 % fuel; the boiler's circuit is not served.
Discharge zones and outages are given by hand. Hand figures use the outside sources of
``tests.helpers.plan``: the CSTR washout ([LEVENSPIEL-1999] [D]), the parallel arc on
the ellipsoid ([WGS84] [D]) and the propeller law ([PROPELLER-LAW], common practice).
The rules are a ship's officer's (README, "Scrubbers in the plan"): a scrubber may be
relied on only where it can work, in the modes the discharge zone allows ([MEPC-340]
washwater criteria are the zone's business, common practice), and a planned outage is a
moment by which the served circuits must be compliant.
"""

from __future__ import annotations

import math
from dataclasses import replace
from datetime import timedelta
from functools import lru_cache

import pytest

from geo.schedule import to_epoch
from planner.voyage.scrubber_events import ScrubberOutage, ZonePassage
from tests.helpers.plan import (
    V_M3,
    VOYAGES,
    flow_m3_h,
    hours,
    mass_rate_t_h,
    parallel_m,
    utc,
)

TIME_TOL_S = 3.0
S_HSFO, S_MGO = 2.60, 0.05  # % m/m, the fixture's delivery notes
Q12 = flow_m3_h(12.0)  # m³/h through the 1.0 m³ stirred volume at 12 kn
# hsfo to mgo washout to 90 % of 0.10 % ([LEVENSPIEL-1999] CSTR [D])
FLUSH_HSFO_H = V_M3 / Q12 * math.log((S_HSFO - S_MGO) / (0.09 - S_MGO))
ZONE = ("Test Roads (closed only)", 3.75, 3.95)  # inside West Far ECA (3°E-4°E)


@lru_cache(maxsize=1)
def _inputs():
    from geo.area_files import load_areas
    from geo.compliance import check_route
    from geo.path import route_path
    from geo.route_loader import load_route
    from geo.schedule import make_schedule
    from planner.voyage.onboard import ship_for_voyage
    from planner.voyage.voyage_file import load_voyage

    voyage = load_voyage(VOYAGES / "scrub_far.toml")
    path = route_path(load_route(voyage.route_file))
    schedule = make_schedule(path, voyage.depart_utc, voyage.speed_kn)
    check = check_route(path, load_areas(voyage.area_paths), schedule, voyage.depart_utc.date())
    return voyage, ship_for_voyage(voyage), check


def plan_of(modes=None, passages=(), outages=(), scrubber=True):
    from planner.voyage.plan import plan_voyage
    from planner.voyage.report import plan_json

    voyage, system, check = _inputs()
    if not scrubber:
        system = replace(system, scrubbers={})
    elif modes is not None:
        system = replace(system, scrubbers={"egcs": replace(system.scrubbers["egcs"],
                                                            modes=modes)})
    plan = plan_voyage(voyage, system, check, None, passages, outages)
    return plan, plan_json(plan)


def zone(allows: tuple[str, ...]) -> tuple[ZonePassage, ...]:
    name, a, b = ZONE
    return (ZonePassage(name, allows, parallel_m(2.0, a), parallel_m(2.0, b)),)


def at(doc, lon: float):
    """When the ship is at ``lon`` (closed form, one speed)."""
    return utc(doc["voyage"]["depart_utc"]) + timedelta(hours=hours(parallel_m(2.0, lon), 12.0))


def rows(doc, circuit):
    return [r for r in doc["changeovers"] if r["circuit"] == circuit]


def test_hybrid_needs_no_changeover_and_burns_hsfo_in_the_areas():
    plan, doc = plan_of()
    assert rows(doc, "main") == []  # hsfo throughout, the scrubber open loop everywhere
    assert {s["fuel"] for s in doc["scrubber_spans"]} == {"hsfo"}
    inside = [s for s in doc["scrubber_spans"] if s["areas"]]
    assert {s["fallback_fuel"] for s in inside} == {"mgo"} and \
        {s["limit_pct"] for s in inside} == {0.10}
    assert [e["event"] for e in doc["scrubber_events"]] == ["start"]  # from departure
    # the main engine draws hsfo from departure to arrival: rate × time (propeller law)
    main = [n for n in plan.quantities.needs if n.circuit == "main"]
    assert [n.fuel for n in main] == ["hsfo"]
    assert main[0].mass_t == pytest.approx(
        mass_rate_t_h(12.0) * hours(parallel_m(2.0, 8.5), 12.0), rel=1e-6)
    west = [r for r in plan.quantities.so2 if r.areas == ("West Far ECA",)][0]
    assert west.burnt_t["hsfo"] == pytest.approx(mass_rate_t_h(12.0) * hours(
        parallel_m(3.0, 4.0), 12.0), rel=1e-6)


def test_span_so2_formed_and_after_cleaning():
    """SO₂ = fuel × S/100 × 64.066/32.06 ([IUPAC-2021] [D]); after cleaning at most the same
    fuel mass at the limit ([MEPC-340] Table 1: the ratio limits are the fuel limits'
    equivalents [P])."""
    _, doc = plan_of()
    west = [s for s in doc["scrubber_spans"] if s["areas"] == ["West Far ECA"]][0]
    fuel_kg = mass_rate_t_h(12.0) * 1000.0 * hours(parallel_m(3.0, 4.0), 12.0)
    assert west["so2_formed_kg"] == pytest.approx(fuel_kg * S_HSFO / 100 * 64.066 / 32.06,
                                                  rel=1e-6)
    assert west["so2_after_cleaning_max_kg"] == pytest.approx(
        fuel_kg * 0.10 / 100 * 64.066 / 32.06, rel=1e-6)


def test_boiler_not_served_changes_over_as_without_the_scrubber():
    _, with_s = plan_of()
    _, without = plan_of(scrubber=False)
    key = ("area", "direction", "start_utc", "compliant_utc", "complete_utc", "from_fuel",
           "to_fuel", "boundary_event")
    assert [tuple(r[k] for k in key) for r in rows(with_s, "boiler")] == \
        [tuple(r[k] for k in key) for r in rows(without, "boiler")]
    assert len(rows(without, "main")) == 4  # without it, main changes over at every boundary
    assert "scrubbers" not in without and "scrubber_events" not in without


def test_scrubber_never_available_gives_the_plain_plan():
    """Out of service for the whole voyage: every circuit as without a scrubber."""
    voyage, _, check = _inputs()
    out = (ScrubberOutage("egcs", to_epoch(voyage.depart_utc) - 3600.0),)
    _, doc = plan_of(outages=out)
    _, plain = plan_of(scrubber=False)
    key = ("number", "circuit", "start_utc", "compliant_utc", "complete_utc", "to_fuel",
           "boundary_event")
    assert [tuple(r[k] for k in key) for r in doc["changeovers"]] == \
        [tuple(r[k] for k in key) for r in plain["changeovers"]]
    assert doc["scrubber_spans"] == []
    assert [e["event"] for e in doc["scrubber_events"]] == ["out_of_service"]


def test_hybrid_into_a_closed_only_zone_changes_mode():
    _, doc = plan_of(passages=zone(("closed",)))
    assert rows(doc, "main") == []
    ev = [(e["event"], e["mode"]) for e in doc["scrubber_events"]]
    assert ev == [("start", "open"), ("mode_change", "closed"), ("mode_change", "open")]
    changes = [e for e in doc["scrubber_events"] if e["event"] == "mode_change"]
    for e, lon in zip(changes, ZONE[1:], strict=True):
        assert e["distance_nm"] * 1852.0 == pytest.approx(parallel_m(2.0, lon), abs=1.0)
        assert abs((utc(e["utc"]) - at(doc, lon)).total_seconds()) < TIME_TOL_S
    closed = [s for s in doc["scrubber_spans"] if s["mode"] == "closed"]
    assert len(closed) == 1 and ZONE[0] in closed[0]["areas"]


@pytest.mark.parametrize("modes,allows", [(("open",), ("closed",)), (None, ())],
                         ids=["open_only_into_closed_zone", "hybrid_into_no_discharge_zone"])
def test_zone_the_scrubber_cannot_work_in_is_a_changeover_boundary(modes, allows):
    plan, doc = plan_of(modes=modes, passages=zone(allows))
    main = rows(doc, "main")
    assert [(r["direction"], r["boundary_event"], r["area"]) for r in main] == [
        ("to_compliant", "zone_enter", ZONE[0]), ("to_regular", "zone_exit", ZONE[0])]
    down, back = main
    entry = at(doc, ZONE[1])
    assert abs((utc(down["boundary_utc"]) - entry).total_seconds()) < TIME_TOL_S
    # compliant the voyage's 1 h margin before the zone, the flush by the CSTR washout
    assert abs((utc(down["compliant_utc"]) - (entry - timedelta(hours=1))).total_seconds()) \
        < TIME_TOL_S
    assert down["duration_h"] * 3600.0 == pytest.approx(FLUSH_HSFO_H * 3600.0, abs=TIME_TOL_S)
    assert (down["limit_pct"], down["target_pct"]) == (0.10, pytest.approx(0.09))
    assert down["from_fuel"] == "hsfo" and down["to_fuel"] == "mgo"
    assert abs((utc(back["start_utc"]) - at(doc, ZONE[2])).total_seconds()) < TIME_TOL_S
    ev = [e["event"] for e in doc["scrubber_events"]]
    assert ev == ["start", "stop", "start"]
    stop = doc["scrubber_events"][1]
    assert stop["utc"] == down["compliant_utc"]
    assert doc["scrubber_events"][2]["utc"] == back["start_utc"]  # before hsfo reaches it
    assert not plan.changes[[c.area for c in plan.changes].index(ZONE[0])].clock_deadline


def test_outage_mid_area_is_a_clock_deadline():
    voyage, _, _ = _inputs()
    moment = voyage.depart_utc + timedelta(hours=hours(parallel_m(2.0, 3.8), 12.0))
    out = (ScrubberOutage("egcs", to_epoch(moment), None, "washwater pump (test)"),)
    plan, doc = plan_of(outages=out)
    first = rows(doc, "main")[0]
    assert (first["boundary_event"], first["area"], first["clock_deadline"]) == (
        "scrubber_out_of_service", "West Far ECA", True)
    assert abs((utc(first["boundary_utc"]) - moment).total_seconds()) < TIME_TOL_S
    assert abs((utc(first["compliant_utc"]) - (moment - timedelta(hours=1))).total_seconds()) \
        < TIME_TOL_S
    assert first["duration_h"] * 3600.0 == pytest.approx(FLUSH_HSFO_H * 3600.0,
                                                         abs=TIME_TOL_S)
    kinds = [e["event"] for e in doc["scrubber_events"]]
    assert kinds == ["start", "stop", "out_of_service"]
    oos = doc["scrubber_events"][2]
    assert abs((utc(oos["utc"]) - moment).total_seconds()) < 1.0
    assert "washwater pump (test)" in oos["reason"]
    # after it the main circuit changes over with the boiler, as without a scrubber
    later = [r for r in doc["changeovers"] if r["number"] > first["number"]]
    assert {r["circuit"] for r in later} == {"main", "boiler"}
    # the main circuit burns hsfo, then mgo from its planned start
    main = [n for n in plan.quantities.needs if n.circuit == "main"]
    assert [n.fuel for n in main[:2]] == ["hsfo", "mgo"]
    assert abs((plan.timeline.utc(main[0].to_epoch_s) - utc(first["start_utc"]))
               .total_seconds()) < 1.0


def test_json_keys():
    _, doc = plan_of(passages=zone(("closed",)))
    assert set(doc["scrubbers"][0]) >= {"name", "consumers", "circuits", "mode",
                                        "max_sulphur_pct"}
    assert doc["scrubbers"][0]["circuits"] == ["main"]
    assert doc["scrubbers"][0]["mode"] == "hybrid"
    for s in doc["scrubber_spans"]:
        assert set(s) >= {"scrubber", "circuits", "fuel", "fallback_fuel", "limit_pct", "mode",
                          "from_nm", "to_nm", "from_utc", "to_utc", "areas", "duration_h"}
        assert s["duration_h"] * 3600.0 == pytest.approx(
            (utc(s["to_utc"]) - utc(s["from_utc"])).total_seconds(), abs=1.0)
    spans = doc["scrubber_spans"]
    assert all(a["to_nm"] == pytest.approx(b["from_nm"])
               for a, b in zip(spans[:-1], spans[1:], strict=True))
    for n, e in enumerate(doc["scrubber_events"], start=1):
        assert set(e) >= {"number", "scrubber", "event", "mode", "utc", "ship_time", "lat",
                          "lon", "distance_nm", "reason"}
        assert e["number"] == n and e["lat"] == pytest.approx(50.0, abs=1e-6)
    assert [e["utc"] for e in doc["scrubber_events"]] == sorted(
        e["utc"] for e in doc["scrubber_events"])


def test_geojson_has_the_scrubber_event_points():
    from planner.voyage.report import plan_geojson

    plan, doc = plan_of(passages=zone(("closed",)))
    pts = [f for f in plan_geojson(plan, doc)["features"]
           if f["properties"]["kind"] == "scrubber_event"]
    assert [p["properties"]["event"] for p in pts] == [e["event"]
                                                      for e in doc["scrubber_events"]]
    lon = pts[1]["geometry"]["coordinates"][0]
    assert lon == pytest.approx(ZONE[1], abs=1e-6)


def test_a_scrubber_serving_two_valves_plans_each_on_its_own_fuels():
    """The boiler's valve cannot select hsfo: served too, it burns hfo (0.40 %) through the
    areas on the scrubber, and needs the scrubber only inside them (hfo meets the 0.50 %
    global cap, [MARPOL-VI] reg. 14 [P])."""
    from planner.voyage.plan import plan_voyage
    from planner.voyage.report import plan_json

    voyage, system, check = _inputs()
    s = system.scrubbers["egcs"]
    system = replace(system, scrubbers={"egcs": replace(s, consumers=("main_engine",
                                                                      "boiler"))})
    doc = plan_json(plan_voyage(voyage, system, check))
    assert doc["changeovers"] == []
    assert doc["scrubbers"][0]["circuits"] == ["main", "boiler"]
    boiler = [x for x in doc["scrubber_spans"] if x["circuits"] == ["boiler"]]
    assert [(x["fuel"], x["areas"]) for x in boiler] == [("hfo", ["West Far ECA"]),
                                                         ("hfo", ["East Far ECA"])]
    assert abs((utc(boiler[0]["from_utc"]) - at(doc, 3.0)).total_seconds()) < TIME_TOL_S
    starts = [e for e in doc["scrubber_events"] if e["event"] == "start"]
    assert len(starts) == 2 and abs((utc(starts[1]["utc"]) - at(doc, 3.0)).total_seconds()) \
        < TIME_TOL_S


def test_a_circuit_on_two_scrubbers_relies_on_both_at_once():
    """Main engine on one scrubber, generators on another: the main circuit may burn hsfo
    only where both can work (their common modes), up to the lower approved sulphur."""
    from planner.ship.scrubbers import Scrubber
    from planner.voyage.scrubbing import joint_outages, joint_scrubber, served_groups

    _, system, _ = _inputs()
    two = {"a": Scrubber("a", ("main_engine",), ("open", "closed"), 3.5),
           "b": Scrubber("b", ("boiler",), ("open",), 3.0)}
    system = replace(system, scrubbers=two)
    (names, joint, circuits), (names_b, alone, circuits_b) = served_groups(system)
    assert (names, joint.name, circuits) == (("a",), "a", ("main",))
    assert (names_b, alone.name, circuits_b) == (("b",), "b", ("boiler",))
    both = joint_scrubber(two, ("a", "b"))
    assert (both.name, both.modes, both.max_sulphur_pct) == ("a + b", ("open",), 3.0)
    assert joint_scrubber({**two, "b": replace(two["b"], modes=("closed",))},
                          ("a", "b")).modes == ("closed",)
    assert joint_scrubber({"a": replace(two["a"], modes=("open",)),
                           "b": replace(two["b"], modes=("closed",))}, ("a", "b")) is None
    outs = (ScrubberOutage("b", 0.0), ScrubberOutage("c", 0.0))
    assert [o.scrubber for o in joint_outages(outs, ("a", "b"), both)] == ["a + b"]


def test_the_sample_main_circuit_on_two_scrubbers():
    """The scrubber sample (areas_sample/egcs_voyage.toml) with the generators on an
    open-loop-only scrubber of their own: the main circuit cannot burn hsfo in the two
    closed-only zones and changes over for each, the joint scrubber named in the spans."""
    from geo.area_files import load_areas
    from geo.compliance import check_route
    from geo.path import route_path
    from geo.route_loader import load_route
    from geo.schedule import make_schedule
    from planner.ship.scrubbers import Scrubber
    from planner.voyage.onboard import ship_for_voyage
    from planner.voyage.plan import plan_voyage
    from planner.voyage.report import plan_json
    from planner.voyage.run import scrubber_inputs
    from planner.voyage.voyage_file import load_voyage
    from tests.helpers.paths import ROOT

    voyage = load_voyage(ROOT / "areas_sample" / "egcs_voyage.toml")
    system = ship_for_voyage(voyage)
    me = replace(system.scrubbers["egcs"], consumers=("main_engine",))
    dg = Scrubber("dg_egcs", ("dg1", "dg2"), ("open",), 3.5)
    system = replace(system, scrubbers={"egcs": me, "dg_egcs": dg})
    path = route_path(load_route(voyage.route_file))
    check = check_route(path, load_areas(voyage.area_paths),
                        make_schedule(path, voyage.depart_utc, voyage.speed_kn),
                        voyage.depart_utc.date())
    doc = plan_json(plan_voyage(voyage, system, check, None, *scrubber_inputs(voyage, check)))
    assert [s["circuits"] for s in doc["scrubbers"]] == [["main"], ["main"]]
    zones = [r["area"] for r in doc["changeovers"]
             if r["circuit"] == "main" and r["boundary_event"] == "zone_enter"]
    assert zones == ["Corran Sea coastal waters", "Brannoch Passage washwater zone",
                     "Skarvik harbour waters"]
    assert {s["scrubber"] for s in doc["scrubber_spans"]} == {"egcs + dg_egcs"}
    assert {s["mode"] for s in doc["scrubber_spans"]} == {"open"}
