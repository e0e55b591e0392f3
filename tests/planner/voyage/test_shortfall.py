"""The shortfall plan against hand calculations: where the compliant fuel runs out, the
lower speed inside the area that makes it suffice, and the bunker ports on the way.

Fixtures (fictional, ``tests/data/voyages``): ``short_fuel.toml`` (10 m³ of mgo) and
``short_mgo_t1.toml`` (12 m³, three invented bunker ports) sail T1 due east along 50°N at
12 kn from 2°E to 9°E; the area begins at 5°E and runs to the arrival. The only consumer
is a main engine with a flat SFOC, so the mgo rate is constant once the valve is on mgo.

Outside sources (see ``tests.helpers.plan``): the parallel arc on the ellipsoid ([WGS84]
[D]), the propeller law ([PROPELLER-LAW], common practice: power ∝ speed³, so fuel per
nautical mile ∝ speed²), the 42.7 MJ/kg reference energy ([ISO-3046] [M], from memory:
only the 42.7/Q_net scaling is checked), and SciPy's ``brentq`` root finder
([SCIPY-2020]) on the hand-written need. The valve switch and the boundary moment are the
plan's own (the flush is checked in ``test_plan_closed_form.py``).
"""

from __future__ import annotations

import math

import pytest
from scipy.optimize import brentq

from planner.voyage.shortfall import BurnCurve, fuel_shortages
from planner.voyage.shortfall_report import plan_shortfall
from planner.voyage.shortfall_speed import DEFAULT_MIN_LOAD_PCT
from tests.helpers.plan import (
    LAT,
    NM_M,
    REF_LOAD_PCT,
    REF_SPEED_KN,
    RHO,
    lon_back,
    mass_rate_t_h,
    parallel_m,
    plan_doc,
    seconds,
)

SPEED_KN = 12.0
DEPART = "2030-03-10T06:00:00Z"
TOTAL_M = parallel_m(2.0, 9.0)  # [WGS84] parallel arc [D]
BOUNDARY_M = parallel_m(2.0, 5.0)
INSIDE_NM = (TOTAL_M - BOUNDARY_M) / NM_M


@pytest.fixture(scope="module")
def short10():
    return plan_doc("short_fuel")


@pytest.fixture(scope="module")
def short12():
    return plan_doc("short_mgo_t1")


def _switch_h(plan) -> float:
    """Hours from departure to the valve switch onto mgo (the plan's changeover start, to
    the second's fraction: the JSON rounds it to the second)."""
    (ch,) = [c for c in plan.changes if c.direction == "to_compliant"]
    (part,) = ch.circuits
    return (part.start_epoch_s - plan.timeline.start_epoch_s) / 3600.0


def _hand(plan, held_t: float) -> dict:
    """The hand figures: mgo at a constant rate r from the switch to the arrival."""
    r = mass_rate_t_h(SPEED_KN)  # [PROPELLER-LAW], [ISO-3046] scaling
    ts = _switch_h(plan)
    end_h = TOTAL_M / NM_M / SPEED_KN
    boundary_h = BOUNDARY_M / NM_M / SPEED_KN
    return {"r": r, "ts": ts, "need": r * (end_h - ts), "pre": r * (boundary_h - ts),
            "held": held_t, "run_h": ts + held_t / r}


def test_run_out_point_is_on_board_over_rate_times_speed(short10):
    plan, doc = short10
    hand = _hand(plan, 10.0 * RHO / 1000.0)
    (s,) = fuel_shortages(plan)
    assert s.fuel == "mgo"
    assert s.on_board_t == pytest.approx(8.8, abs=1e-9)
    assert s.needed_t == pytest.approx(hand["need"], rel=1e-9)
    assert s.short_t == pytest.approx(hand["need"] - 8.8, rel=1e-9)
    assert s.short_m3 == pytest.approx((hand["need"] - 8.8) * 1000.0 / RHO, rel=1e-9)
    # distance = on board / rate × speed, from the switch on (constant speed from departure)
    run_m = hand["run_h"] * SPEED_KN * NM_M
    assert s.run_out.distance_m == pytest.approx(run_m, abs=0.5)
    assert seconds(plan.timeline.utc(s.run_out.epoch_s), DEPART) == pytest.approx(
        hand["run_h"] * 3600.0, abs=0.01)
    assert s.run_out.lat == pytest.approx(LAT, abs=1e-9)
    assert s.run_out.lon == pytest.approx(lon_back(9.0, TOTAL_M - run_m), abs=1e-7)
    assert s.run_out.where == "at_sea"
    (st,) = s.stretches
    assert st.areas == ("Meridian Five ECA",)
    assert st.from_m == pytest.approx(run_m, abs=0.5)
    assert st.to_m == pytest.approx(TOTAL_M, abs=0.5)
    assert seconds(plan.timeline.utc(st.to_epoch_s), DEPART) == pytest.approx(
        TOTAL_M / NM_M / SPEED_KN * 3600.0, abs=0.01)


def test_json_gives_the_run_out_in_utc_ships_time_and_position(short10):
    plan, doc = short10
    f = doc["shortfall"]["fuels"][0]
    hand = _hand(plan, 8.8)
    ro = f["runs_out"]
    assert seconds(ro["utc"], DEPART) == pytest.approx(hand["run_h"] * 3600.0, abs=1.0)
    assert ro["ship_time"].endswith("+01:00")  # the voyage's ship_time
    assert ro["distance_nm"] == pytest.approx(hand["run_h"] * SPEED_KN, abs=1e-3)
    assert f["short_m3_15c"] == pytest.approx((hand["need"] - 8.8) / 0.88, rel=1e-9)
    assert f["not_compliant"][0]["to_nm"] == pytest.approx(TOTAL_M / NM_M, abs=1e-3)
    assert doc["shortfall"]["must_notify"] is True
    assert any(a.startswith("(c) ") and "regulation 18.2" in a for a in f["advice"])


def _need(v: float, hand: dict) -> float:
    """The need with the area sailed at v: the mgo drawn before the boundary at 12 kn, plus
    C·v²·D inside (C = r/12³: rate ∝ v³, so fuel per nm ∝ v², [PROPELLER-LAW])."""
    c = hand["r"] / SPEED_KN ** 3
    return hand["pre"] + c * v * v * INSIDE_NM


def test_reduced_speed_is_the_propeller_law_root(short12):
    plan, doc = short12
    hand = _hand(plan, 12.0 * RHO / 1000.0)
    (sp,) = plan_shortfall(plan)
    r = sp.reduced
    assert _need(SPEED_KN, hand) == pytest.approx(sp.shortage.needed_t, rel=1e-9)
    # by hand: pre + C v² D = on board  =>  v = sqrt((on board − pre) / (C D))
    c = hand["r"] / SPEED_KN ** 3
    v_hand = math.sqrt((hand["held"] - hand["pre"]) / (c * INSIDE_NM))
    v_brent = brentq(lambda v: _need(v, hand) - hand["held"], 1.0, SPEED_KN, xtol=1e-12)
    assert v_hand == pytest.approx(v_brent, rel=1e-10)  # [SCIPY-2020]
    assert r.speed_kn == pytest.approx(v_hand, abs=1e-6)
    assert r.advised_kn == math.floor(v_hand * 10) / 10
    assert r.need_t == pytest.approx(_need(r.advised_kn, hand), rel=1e-9)
    assert r.need_t <= hand["held"]
    assert r.delay_h == pytest.approx(INSIDE_NM / r.advised_kn - INSIDE_NM / SPEED_KN, rel=1e-9)
    assert r.areas == ("Meridian Five ECA",)
    assert r.refused == ""
    assert not sp.must_notify


def test_reduced_speed_refused_below_the_lowest_load(short10):
    plan, doc = short10
    hand = _hand(plan, 8.8)
    (sp,) = plan_shortfall(plan)
    r = sp.reduced
    # no SFOC curve: the lowest load is the default, v = v_ref (load/ref load)^(1/3)
    v_min = REF_SPEED_KN * (DEFAULT_MIN_LOAD_PCT / REF_LOAD_PCT) ** (1.0 / 3.0)
    assert r.min_kn == pytest.approx(v_min, rel=1e-12)
    assert _need(v_min, hand) > 8.8
    assert r.speed_kn is None and r.advised_kn is None
    assert r.need_t == pytest.approx(_need(v_min, hand), rel=1e-6)
    assert f"{v_min:.1f} kn" in r.refused and "lowest load" in r.refused
    assert sp.must_notify


def test_bunker_ports(short12):
    plan, doc = short12
    hand = _hand(plan, 12.0 * RHO / 1000.0)
    (sp,) = plan_shortfall(plan)
    fennick, deep, west = sp.bunkering
    # before the run-out point: take the shortfall; the room is the tank's capacity (120 m³)
    # less what is left in it there
    t_p = 150.0 / SPEED_KN
    assert fennick.before_run_out and fennick.offered is True
    assert fennick.take_t == pytest.approx(hand["need"] - hand["held"], rel=1e-9)
    assert fennick.take_m3 == pytest.approx((hand["need"] - hand["held"]) / 0.88, rel=1e-9)
    left_t = hand["held"] - hand["r"] * (t_p - hand["ts"])
    assert fennick.room_m3 == pytest.approx(120.0 - left_t / 0.88, rel=1e-9)
    assert fennick.covers and fennick.why == ""
    # the arrival: after the run-out and after the last need
    assert deep.distance_m == pytest.approx(TOTAL_M, abs=1e-6)
    assert not deep.before_run_out and not deep.covers and deep.take_t == pytest.approx(0.0)
    assert "after mgo has run out" in deep.why
    # a port that sells no distillate, given by its waypoint number and its own ETA
    assert west.distance_m == 0.0 and west.offered is False and not west.covers
    assert seconds(plan.timeline.utc(west.epoch_s), DEPART) == 0.0
    assert "does not offer mgo" in west.why


def test_bunker_port_after_the_run_out_gives_the_rest_of_the_voyage(short10):
    """short_fuel.toml has no bunker port: the same port checked through the curve."""
    plan, doc = short10
    hand = _hand(plan, 8.8)
    (s,) = fuel_shortages(plan)
    t = plan.timeline.start_epoch_s + (hand["run_h"] + 1.0) * 3600.0
    assert s.needed_t - s.curve.drawn_by(t) == pytest.approx(
        hand["r"] * (TOTAL_M / NM_M / SPEED_KN - hand["run_h"] - 1.0), rel=1e-9)


def test_burn_curve_moment_is_linear_inside_a_piece():
    c = BurnCurve((0.0, 3600.0, 7200.0), (0.0, 2.0, 2.0))
    assert c.moment_of(1.5) == pytest.approx(2700.0)
    assert c.moment_of(2.5) is None
    assert c.drawn_by(1800.0) == pytest.approx(1.0)
    with pytest.raises(ValueError):
        BurnCurve((0.0, 10.0), (1.0, 0.0))


def test_no_shortfall_on_the_sample_voyage():
    from tests.helpers.paths import ROOT

    plan, doc = plan_doc(ROOT / "areas_sample" / "voyage.toml")
    assert doc["shortfall"] is None
    assert plan_shortfall(plan) == []
    assert doc["compliant_fuel_needed_t"] < doc["compliant_fuel_on_board_t"]


def test_reduced_speed_with_a_generator_on_the_circuit(tmp_path):
    """T1 with a generator (ship_t1g.toml): per mile the main engine burns C·v² and the
    generator g/v (per hour at a constant rate), so the need is pre + D·(C·v² + g/v);
    its root found by SciPy's brentq ([SCIPY-2020]) on the hand-written need."""
    from tests.helpers.plan import VOYAGES, dg_rate_t_h

    text = (VOYAGES / "short_mgo_t1.toml").read_text(encoding="utf-8")
    for name in ("short_east.csv", "meridian_5e.geojson"):
        text = text.replace(f'"{name}"', f'"{(VOYAGES / name).as_posix()}"')
    text = text.replace('"ship_t1.toml"', f'"{(VOYAGES / "ship_t1g.toml").as_posix()}"')
    text = text.replace("volume_m3 = 12.0", "volume_m3 = 18.0")
    p = tmp_path / "g.toml"
    p.write_text(text, encoding="utf-8")
    plan, _ = plan_doc(p)
    g = dg_rate_t_h()
    r12 = mass_rate_t_h(SPEED_KN) + g
    ts = _switch_h(plan)
    pre = r12 * (BOUNDARY_M / NM_M / SPEED_KN - ts)
    c = mass_rate_t_h(SPEED_KN) / SPEED_KN ** 3
    held = 18.0 * RHO / 1000.0

    def need(v: float) -> float:
        return pre + INSIDE_NM * (c * v * v + g / v)

    (sp,) = plan_shortfall(plan)
    assert need(SPEED_KN) == pytest.approx(sp.shortage.needed_t, rel=1e-9)
    v_min = REF_SPEED_KN * (DEFAULT_MIN_LOAD_PCT / REF_LOAD_PCT) ** (1.0 / 3.0)
    v_root = brentq(lambda v: need(v) - held, v_min, SPEED_KN, xtol=1e-12)
    assert sp.reduced.speed_kn == pytest.approx(v_root, abs=1e-6)
    assert sp.reduced.advised_kn == math.floor(v_root * 10) / 10
    assert sp.reduced.need_t == pytest.approx(need(sp.reduced.advised_kn), rel=1e-9)
    # the generator makes the saving smaller than the main engine alone would give
    v_me_only = math.sqrt((held - pre) / (c * INSIDE_NM))
    assert v_root < v_me_only
