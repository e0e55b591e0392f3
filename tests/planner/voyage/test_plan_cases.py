"""The voyage plan's rules on constructed voyages (fictional, ``tests/data/voyages``).

Every voyage sails the T1 test ship (one stirred volume of 1.0 m³, fuels of equal
density and Q_net) due east along 50°N; the area boundaries are meridians. Hand
figures use the outside sources listed in ``tests.helpers.plan``: the CSTR washout
([LEVENSPIEL-1999] [D]), the parallel arc on the ellipsoid ([WGS84] [D]) and the
propeller law ([PROPELLER-LAW], common practice). The rules themselves are the plan's
(README, "The voyage plan") and MARPOL Annex VI regulation 14 ([MARPOL-VI]: the
limits by area and date [P]).
"""

from __future__ import annotations

import math
import re
from datetime import timedelta

import pytest

from geo.errors import InputError
from planner.common.timefmt import format_utc
from planner.flushing.summary import SETTLE_FRACTION
from planner.voyage.changeovers import SWITCH_BACK_COMPLETE
from planner.voyage.checks import plan_warnings
from tests.helpers.plan import (
    NM_M,
    S_HFO,
    S_MGO,
    V_M3,
    VOYAGES,
    dg_flow_m3_h,
    dg_rate_t_h,
    flow_m3_h,
    hours,
    mass_rate_t_h,
    parallel_m,
    plan_doc,
    seconds,
    utc,
    washout_log,
)

TIME_TOL_S = 3.0

# The fixtures' areas (tests/data/voyages/*.geojson, fictional): name, the meridian of
# entry and the meridian of exit, °E, in route order.
FAR_AREAS = (("West Far ECA", 3.0, 4.0), ("East Far ECA", 7.0, 8.0))  # far_pair.geojson
CLOSE_AREAS = (("West Close ECA", 3.0, 4.0), ("East Close ECA", 4.2, 5.0))  # close_pair
# close_areas: the fuel of each stretch of the route check, in route order: hfo outside,
# mgo in both areas and, by the stay-compliant rule, in the gap between them
CLOSE_STRETCH_FUELS = ("hfo", "mgo", "mgo", "mgo", "hfo")
Q12 = flow_m3_h(12.0)  # m³/h through the stirred volume at 12 kn (propeller law)
FLUSH_12_H = V_M3 / Q12 * washout_log(0.9 * 0.10)  # to the default target 90 % of 0.10 %
# a switch back is complete within 5 % of the fuels' difference (the planner's stated
# choice, SWITCH_BACK_COMPLETE): washout to 5 % of the step, (V/q)·ln(1/0.05)
BACK_12_H = V_M3 / Q12 * math.log(1.0 / SWITCH_BACK_COMPLETE)


def iso_z(moment) -> str:
    return moment.strftime("%Y-%m-%dT%H:%M:%SZ")


def rows(doc, direction=None):
    return [r for r in doc["changeovers"] if direction in (None, r["direction"])]


def at_lon(doc, lon: float, speed_kn: float = 12.0, from_lon: float = 2.0):
    """When the ship is at ``lon`` on a single-speed parallel route (closed form)."""
    return utc(doc["voyage"]["depart_utc"]) + timedelta(
        hours=hours(parallel_m(from_lon, lon), speed_kn))


# --- 3. an area in force only from a future date -----------------------------------------
# The area file says effective_from = 2030-07-01; an area date takes force at 00:00 UTC
# (the planner's stated convention, geo.area.Area.starts_utc).

def test_area_crossed_before_its_date_needs_no_changeover():
    _, doc = plan_doc("future_before")  # crosses 5°E on 2030-06-20
    assert doc["changeovers"] == []
    # one stretch under the global cap, 0.50 % from 2020-01-01 ([MARPOL-VI] reg. 14 [P])
    assert [(s["limit_pct"], s["areas"]) for s in doc["stretches"]] == [(0.5, [])]
    assert doc["compliant_fuel_needed_t"] == 0.0
    assert isinstance(doc["compliant_fuel_needed_t"], float)  # contract: a number "f"


def test_area_crossed_after_its_date_needs_a_changeover():
    # departs 2030-06-30T20:00Z, before the date, and crosses 5°E after it: the crossing
    # time decides, not the departure date
    _, doc = plan_doc("future_after")
    (row,) = doc["changeovers"]
    assert (row["area"], row["direction"]) == ("Future Five ECA", "to_compliant")
    assert row["boundary_lon"] == pytest.approx(5.0, abs=1e-9)
    assert abs(seconds(row["boundary_utc"], at_lon(doc, 5.0))) <= 1.0
    assert utc(row["boundary_utc"]) > utc("2030-07-01T00:00:00Z")
    start = at_lon(doc, 5.0) - timedelta(hours=FLUSH_12_H + 1.0)
    assert abs(seconds(row["start_utc"], start)) <= TIME_TOL_S + 0.5


def test_area_coming_into_force_while_inside_it():
    # crosses 5°E at 23:40Z on 2030-06-30 (not yet in force): the step down in limit is
    # at 00:00Z on 2030-07-01, 10 h × 12 kn = 120 nm from the departure at 2°E
    _, doc = plan_doc("future_inside")
    (row,) = doc["changeovers"]
    assert row["direction"] == "to_compliant"
    assert row["boundary_utc"] == "2030-07-01T00:00:00Z"
    assert row["boundary_nm"] == pytest.approx(120.0, abs=1e-6)
    lon = 2.0 + math.degrees(120.0 * NM_M / (parallel_m(0.0, 1.0) / math.radians(1.0)))
    assert abs(row["boundary_lon"] - lon) * parallel_m(0.0, 1.0) <= 3.0  # metres
    assert abs(seconds(row["compliant_utc"], "2030-06-30T23:00:00Z")) <= TIME_TOL_S


# --- 4. departing inside an area -----------------------------------------------------------

def test_departing_inside_plans_the_changeover_before_departure():
    # ship_t1g: the stirred volume V feeds the main engine and a generator; alongside the
    # main engine is stopped (the ship file's default port state), so the flush before
    # departure runs at the generator's draw alone. Closed form ([LEVENSPIEL-1999] CSTR
    # washout [D]): T = V / q_dg · ln((S₀ − S₁) / (S_t − S₁)), q_dg = 1500 kW × 200 g/kWh
    # × 42.7/40 / 880 kg/m³ = 0.364 m³/h, S_t = 0.9 × 0.10 %: T = 5.96 h (not the 1.2 h at
    # sea consumption the plan used before it knew the port state).
    plan, doc = plan_doc("depart_inside")
    first = doc["changeovers"][0]
    assert first["before_departure"] is True
    assert first["direction"] == "to_compliant" and first["to_fuel"] == "mgo"
    assert first["boundary_utc"] == doc["voyage"]["depart_utc"]
    port_h = V_M3 / dg_flow_m3_h() * washout_log(0.9 * 0.10)
    assert port_h == pytest.approx(5.96, abs=0.01)
    assert first["duration_h"] == pytest.approx(port_h, abs=TIME_TOL_S / 3600.0)
    depart = utc(doc["voyage"]["depart_utc"])
    assert abs(seconds(first["start_utc"], depart - timedelta(hours=port_h + 1.0))) <= TIME_TOL_S
    assert abs(seconds(first["compliant_utc"], depart - timedelta(hours=1.0))) <= TIME_TOL_S
    (warn,) = [w for w in doc["warnings"] if "departs inside" in w]
    assert (plan.warnings[0].kind, plan.warnings[0].text) == ("departs_inside", warn)  # first
    assert "Meridian Five ECA" in warn and "mgo before departure" in warn
    assert format_utc(utc(first["start_utc"])) in warn  # when to start, alongside
    assert "alongside: main_engine stopped, dg 100 %" in warn
    # the switch back commences at the exit (10°E), never before
    (back,) = rows(doc, "to_regular")
    assert back["start_utc"] == back["boundary_utc"]
    assert back["boundary_lon"] == pytest.approx(10.0, abs=1e-9)
    assert abs(seconds(back["start_utc"], at_lon(doc, 10.0, from_lon=6.0))) <= 1.0


def test_departing_inside_on_compliant_fuel_needs_no_changeover_alongside():
    # [port] departure_fuel = { main = "mgo" }: the circuit is already on mgo at departure
    _, doc = plan_doc("depart_inside_on_mgo")
    assert [r["direction"] for r in doc["changeovers"]] == ["to_regular"]
    assert not any("departs inside" in w for w in doc["warnings"])
    assert ("The voyage departs inside Meridian Five ECA with every circuit already on mgo "
            "([port] departure_fuel): no changeover alongside.") in doc["notes"]
    # mgo is drawn from departure (no flush alongside): (ME at 12 kn + dg) × hours to 10°E
    t_exit = hours(parallel_m(6.0, 10.0), 12.0)
    mgo = [r for r in doc["fuel_needed"] if r["fuel"] == "mgo"]
    assert [r["circuit"] for r in mgo] == ["main"]
    assert mgo[0]["from_utc"] == doc["voyage"]["depart_utc"]
    assert mgo[0]["mass_t"] == pytest.approx((mass_rate_t_h(12.0) + dg_rate_t_h()) * t_exit,
                                             rel=1e-9)


def test_a_circuit_that_burns_nothing_alongside_is_refused(tmp_path):
    # ship_t1 has only the main engine: stopped alongside, the circuit cannot be flushed
    text = (VOYAGES / "depart_inside.toml").read_text().replace("ship_t1g.toml", "ship_t1.toml")
    for f in ("ship_t1.toml", "depart_inside.csv", "meridian_5e.geojson"):
        (tmp_path / f).write_text((VOYAGES / f).read_text())
    (tmp_path / "v.toml").write_text(text)
    with pytest.raises(InputError) as e:
        plan_doc(tmp_path / "v.toml")
    msg = str(e.value)
    assert "v.toml: port.departure_load_pct: 'main_engine stopped'" in msg
    assert "circuit main (main_engine) burning fuel alongside" in msg


def test_departing_inside_and_never_leaving_still_warns():
    # the whole voyage is inside: still a plain warning and a before-departure changeover
    # from the fuel she burns outside (hfo 0.40 %, within the 0.50 % global cap)
    plan, doc = plan_doc("all_inside")
    (row,) = doc["changeovers"]
    assert row["before_departure"] is True and (row["from_fuel"], row["to_fuel"]) == (
        "hfo", "mgo")
    assert any("departs inside Meridian Five ECA" in w and "before departure" in w
               for w in doc["warnings"])
    # the compliant fuel, by hand: alongside from the valve switch to departure at the
    # generator's rate, under way at the main engine's (propeller law, 12 kn) plus the
    # generator's, and the [port] arrival_hours = 6 h alongside after arrival (still
    # inside the area) at the generator's rate
    depart, arrive = utc(doc["voyage"]["depart_utc"]), utc(doc["voyage"]["arrive_utc"])
    before_h = (depart.timestamp() - plan.changes[0].circuits[0].start_epoch_s) / 3600.0
    sea_h = (plan.timeline.end_epoch_s - depart.timestamp()) / 3600.0  # unrounded arrival
    need = (dg_rate_t_h() * before_h + (mass_rate_t_h(12.0) + dg_rate_t_h()) * sea_h
            + dg_rate_t_h() * 6.0)
    assert doc["compliant_fuel_needed_t"] == pytest.approx(need, rel=1e-9)
    (mgo,) = [r for r in doc["fuel_needed"] if r["fuel"] == "mgo"]
    assert abs(seconds(mgo["to_utc"], arrive + timedelta(hours=6.0))) <= 1.0
    assert mgo["alongside_h"] == pytest.approx(6.0)
    # the SO₂ alongside is counted inside the area: 6 h at the generator's rate of mgo
    # (0.05 %; the inlet has settled on it), × 64.066/32.06 ([IUPAC-2021] [D]). The flush
    # record ends once every inlet is within SETTLE_FRACTION of the fuels' difference from
    # the new fuel, and that last blend is held: the figure lies between pure mgo and that
    # bound (conservative: never below the fuel actually burnt)
    port = doc["so2"]["alongside"]
    assert port["areas"] == ["Meridian Five ECA"] and port["hours"] == 6.0
    assert port["fuel_t"] == pytest.approx(dg_rate_t_h() * 6.0, rel=1e-9)
    pure_kg = dg_rate_t_h() * 6.0 * S_MGO * 10.0
    held_kg = dg_rate_t_h() * 6.0 * (S_MGO + SETTLE_FRACTION * (S_HFO - S_MGO)) * 10.0
    assert pure_kg * (1 - 1e-9) <= port["sulphur_kg"] <= held_kg
    area = doc["so2"]["areas"]["Meridian Five ECA"]
    assert area["so2_kg"] == pytest.approx(
        sum(r["so2_kg"] for r in doc["so2"]["stretches"]) + port["so2_kg"], rel=1e-12)


# --- 5. two areas close together / far apart ------------------------------------------------

def test_close_areas_stay_on_compliant_fuel_and_say_why():
    # 0.2° (7.7 nm, 0.65 h) between the two areas
    (west, _, west_exit), (east, east_entry, east_exit) = CLOSE_AREAS
    _, doc = plan_doc("close_areas")
    assert [r["direction"] for r in doc["changeovers"]] == ["to_compliant", "to_regular"]
    down, back = doc["changeovers"]
    assert down["area"] == west and back["area"] == east
    assert back["boundary_lon"] == pytest.approx(east_exit, abs=1e-9)
    assert tuple(s["fuel"] for s in doc["stretches"]) == CLOSE_STRETCH_FUELS
    (note,) = doc["notes"]
    assert note.startswith(f"Stay on mgo from the exit of {west} to {east}")
    assert doc["stretches"][2]["fuel_choice"] == note  # the gap says why it burns mgo
    # why: a switch back at the west exit would complete after the next changeover must start
    done = at_lon(doc, west_exit) + timedelta(hours=BACK_12_H)
    must_start = at_lon(doc, east_entry) - timedelta(hours=FLUSH_12_H + 1.0)
    assert done > must_start
    found = re.findall(r"\d{4}-\d\d-\d\d \d\d:\d\dZ", note)
    assert len(found) == 2
    for text, moment in zip(found, (done, must_start), strict=True):
        assert abs(seconds(text.replace(" ", "T").replace("Z", ":00Z"), moment)) <= 60.0


def test_far_areas_switch_back_and_forth():
    # 3° (116 nm, 9.7 h) between the two areas: in and out of each
    _, doc = plan_doc("far_areas")
    got = [(r["area"], r["direction"]) for r in doc["changeovers"]]
    assert got == [(name, way) for name, _, _ in FAR_AREAS
                   for way in ("to_compliant", "to_regular")]
    assert doc["notes"] == []
    exits = [lon for _, _, lon in FAR_AREAS]
    for r, lon in zip(rows(doc, "to_regular"), exits, strict=True):
        assert r["start_utc"] == r["boundary_utc"]  # commenced at the exit
        assert r["boundary_lon"] == pytest.approx(lon, abs=1e-9)
    first_back, last_back = rows(doc, "to_regular")
    assert abs(seconds(first_back["complete_utc"], first_back["start_utc"])
               - 3600 * BACK_12_H) <= TIME_TOL_S
    # the last one is still under way at the arrival (8.5°E, 1.6 h after the exit); alongside
    # the T1 ship's only consumer, the main engine, is stopped (the default port state), so
    # it never completes: no completion time is made up
    assert hours(parallel_m(8.0, 8.5), 12.0) < BACK_12_H
    assert last_back["complete_utc"] is None
    entries = [lon for _, lon, _ in FAR_AREAS]
    for r, lon in zip(rows(doc, "to_compliant"), entries, strict=True):
        start = at_lon(doc, lon) - timedelta(hours=FLUSH_12_H + 1.0)
        assert abs(seconds(r["start_utc"], start)) <= TIME_TOL_S + 0.5
    # the switch back after West Far completes before the changeover for East Far starts
    assert utc(doc["changeovers"][1]["complete_utc"]) < utc(doc["changeovers"][2]["start_utc"])


def test_a_short_time_on_regular_fuel_stays_compliant_and_says_what_it_costs():
    # far_areas_default: the same voyage with the default minimum of 4 h fully on regular
    # fuel. By hand: 3° of longitude at 50°N between West Far's exit and East Far's entry,
    # at 12 kn; the switch back takes BACK_12_H, the next changeover FLUSH_12_H plus the
    # 1 h margin: 9.65 − 3.0 − 2.17 − 1 = 3.5 h on regular fuel, under 4 h.
    gap_h = hours(parallel_m(4.0, 7.0), 12.0)
    on_regular_h = gap_h - BACK_12_H - FLUSH_12_H - 1.0
    assert 3.0 < on_regular_h < 4.0
    _, doc = plan_doc("far_areas_default")
    assert doc["voyage"]["min_time_on_regular_h"] == 4.0
    assert [(r["area"], r["direction"]) for r in doc["changeovers"]] == [
        ("West Far ECA", "to_compliant"), ("East Far ECA", "to_regular")]
    (note,) = doc["notes"]
    assert note.startswith("Stay on mgo from the exit of West Far ECA to East Far ECA")
    assert f"fully on hfo for only {on_regular_h:.1f} h" in note
    assert "minimum 4 h on regular fuel" in note
    # the cost: mgo burnt from the exit (where the switch back would start) to the start
    # the next changeover would have had, at the main engine's rate (propeller law, 12 kn)
    extra = mass_rate_t_h(12.0) * (gap_h - FLUSH_12_H - 1.0)
    assert f"costs about {extra:.1f} t more mgo" in note


# --- 6. short of compliant fuel -------------------------------------------------------------

def test_short_of_compliant_fuel_names_fuel_and_shortfall():
    # 10 m³ of mgo at 15 °C (8.8 t: VCF 1 at 15 °C, [TABLE-54B]); from the valve switch
    # before 5°E to the arrival at 9°E
    plan, doc = plan_doc("short_fuel")
    (row,) = doc["changeovers"]
    arrive = utc(doc["voyage"]["depart_utc"]) + timedelta(hours=hours(parallel_m(2, 9), 12.0))
    start = at_lon(doc, 5.0) - timedelta(hours=FLUSH_12_H + 1.0)
    need = mass_rate_t_h(12.0) * (arrive - start).total_seconds() / 3600.0
    assert doc["compliant_fuel_needed_t"] == pytest.approx(need, abs=0.01)
    assert doc["compliant_fuel_on_board_t"] == pytest.approx(8.8)
    (warn,) = [w for w in doc["warnings"] if w.startswith("Short of")]
    assert [w.text for w in plan.warnings if w.kind == "quantity"] == [warn]
    # the checks are pure: run again on the plan's parts, the same warnings in the same order
    assert plan_warnings(plan.voyage, plan.timeline, plan.changes, plan.quantities) == \
        plan.warnings
    assert [w.text for w in plan.warnings] == doc["warnings"]
    assert warn.startswith("Short of mgo:")
    assert f"{need - 8.8:.1f} t short" in warn
    assert f"needs {need:.1f} t" in warn and "hold 8.8 t" in warn


# --- 7. an RTZ route with a schedule ----------------------------------------------------------

def test_rtz_schedule_sets_the_times():
    # scheduled.rtz: ETD 06:00Z at 2°E, ETA 11:00Z at 3.5°E, ETA 20:00Z at 6°E; the boundary
    # 5°E is 1.5/2.5 of the second leg (equal Δλ, equal distance on a parallel), so its
    # time is the ETA interpolation 11:00Z + 0.6 × 9 h = 16:24Z. The voyage's default
    # speed_kn = 14 is not used for scheduled legs.
    plan, doc = plan_doc("scheduled")
    assert doc["voyage"]["depart_utc"] == "2030-03-10T06:00:00Z"
    assert doc["voyage"]["arrive_utc"] == "2030-03-10T20:00:00Z"
    (row,) = doc["changeovers"]
    assert row["boundary_utc"] == "2030-03-10T16:24:00Z"
    assert plan.changes[0].boundary_epoch_s == pytest.approx(
        utc("2030-03-10T16:24:00Z").timestamp(), abs=0.05)
    # the flush runs at the schedule's speed on that leg
    v2 = parallel_m(3.5, 6.0) / NM_M / 9.0
    assert plan.timeline.speed_kn(plan.changes[0].boundary_epoch_s) == pytest.approx(v2, rel=1e-9)
    flush_h = V_M3 / flow_m3_h(v2) * washout_log(0.09)
    start = utc("2030-03-10T16:24:00Z") - timedelta(hours=flush_h + 1.0)
    assert plan.changes[0].circuits[0].start_epoch_s == pytest.approx(start.timestamp(),
                                                                abs=TIME_TOL_S)
    assert utc(row["start_utc"]) > utc("2030-03-10T11:00:00Z")  # all on the second leg
