"""If the scrubber trips now: the lead against the closed-form washout, the sampling rule,
the time out of compliance, and the edge cases.

Fixtures (fictional, ``tests/data/voyages``, see ``tests.helpers.plan``): ship T1 has
one well-stirred volume V = 1.0 m³ between its valve and the only consumer (a main
engine on the propeller law, flat SFOC, both fuels 880 kg/m³ and 40 MJ/kg), sailing due
east on 50°N into the meridian 5°E (0.10 % area) and arriving at 6°E inside it; the
plan's target is 0.8 × 0.10 = 0.08 %. T1 has no scrubber, so its spans are made by hand:
the circuit ``main`` on ``hfo`` (0.40 %) with ``mgo`` (0.05 %) as the fallback (the plan's
own spans, hsfo on the scrubber, are those of the egcs sample, tested at the end).

Outside sources: the CSTR washout T = V/q · ln((S₀ − S₁)/(S_t − S₁)) ([LEVENSPIEL-1999]
[D]); with a step in the flow the throughput ∫q dt = V·ln(...) is what must pass
([LEVENSPIEL-1999] [D]), and SciPy's ``solve_ivp`` on the same ODE dS/dt = q(t)/V·(S₁ − S)
([SCIPY-2020]); distances on the parallel N·cos φ·Δλ ([WGS84] [D]), the propeller law
([PROPELLER-LAW], common practice). A failure Δ after the valve switch into hfo finds the
stirred volume at c₀ = 1 − exp(−qΔ/V) of hfo (the same washout filling it,
[LEVENSPIEL-1999] [D]), and then needs V/q · ln(c₀ (S_hfo − S_mgo)/(S_t − S_mgo)), or
nothing when that is negative.
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from planner.voyage.flush_cache import FlushCache
from planner.voyage.scrubber_events import ScrubberSpan
from planner.voyage.scrubber_trip import TripLead, plan_trip_leads, trip_leads
from planner.voyage.scrubber_trip_moments import (
    END,
    ENDS_AT_CHANGE,
    ENDS_AT_LIMIT,
    LOAD_CHANGE,
    START,
    STEP,
    out_of_compliance_h,
)
from tests.helpers.plan import S_HFO, S_MGO, V_M3, flow_m3_h, hours, parallel_m, plan_doc

TARGET = 0.8 * 0.10  # the fixtures' sulphur_target_fraction × the area's limit, % m/m
TIME_TOL_H = 3.0 / 3600.0  # a few seconds


def washout_h(q_m3_h: float) -> float:
    """CSTR washout from S_HFO to TARGET on S_MGO at a constant flow ([LEVENSPIEL-1999])."""
    return V_M3 / q_m3_h * math.log((S_HFO - S_MGO) / (TARGET - S_MGO))


@pytest.fixture(scope="module")
def closed():
    return plan_doc("closed_form")[0]


@pytest.fixture(scope="module")
def slowing():
    return plan_doc("speed_change")[0]


def span_between(plan, lon_from: float, lon_to: float, **kw) -> ScrubberSpan:
    """The circuit ``main`` on hfo with mgo as fallback from one longitude to another."""
    a, b = parallel_m(2.0, lon_from), parallel_m(2.0, lon_to)
    ta, tb = (float(x) for x in plan.timeline.schedule.epoch_at([a, b]))
    return ScrubberSpan(kw.pop("scrubber", "egcs"), ("main",), "hfo", "mgo", 0.10, "open",
                        a, b, ta, tb, ("Meridian Five ECA",), **kw)


def test_lead_is_the_closed_form_washout(closed):
    span = span_between(closed, 4.5, 5.2)
    got = plan_trip_leads(closed, [span])
    t = washout_h(flow_m3_h(12.0))  # about 2.46 h at 12 kn
    assert 2.0 < t < 3.0
    assert hours(parallel_m(5.2, 6.0), 12.0) > t  # every flush ends before arrival
    assert got.samples and all(s.circuit == "main" for s in got.samples)
    for s in got.samples:
        assert s.time_to_compliant_h == pytest.approx(t, abs=TIME_TOL_H)
        assert s.problem == ""
        assert s.target_pct == pytest.approx(TARGET, rel=1e-12)


def test_failure_before_the_entry_counts_from_the_boundary(closed):
    """Out of compliance = max(0, T − time to the boundary): hfo (0.40 %) is within the
    global cap (0.50 % in 2030) outside the area."""
    span = span_between(closed, 3.8, 5.2)
    got = plan_trip_leads(closed, [span])
    t = washout_h(flow_m3_h(12.0))
    entry = float(closed.timeline.schedule.epoch_at([parallel_m(2.0, 5.0)])[0])
    for s in got.samples:
        to_boundary_h = max(0.0, (entry - s.fail_epoch_s) / 3600.0)
        assert s.out_of_compliance_h == pytest.approx(max(0.0, t - to_boundary_h),
                                                      abs=TIME_TOL_H)
    # the kink of the out-of-compliance line: the failure whose flush ends at the entry
    (kink,) = [s for s in got.samples if s.kind == ENDS_AT_LIMIT]
    assert kink.fail_epoch_s == pytest.approx(entry - t * 3600.0, abs=3.0)
    assert kink.out_of_compliance_h == pytest.approx(0.0, abs=TIME_TOL_H)
    first = got.samples[0]
    assert first.kind == START
    # at 3.8°E the boundary is 1.2° of the parallel away at 12 kn: more than T
    assert hours(parallel_m(3.8, 5.0), 12.0) > t
    assert first.out_of_compliance_h == 0.0
    # the one boundary row: the entry, where the whole lead is out of compliance
    (row,) = got.boundaries
    assert (row.area, row.event) == ("Meridian Five ECA", "enter")
    assert row.lead.lon == pytest.approx(5.0, abs=1e-7)
    assert row.lead.out_of_compliance_h == pytest.approx(t, abs=TIME_TOL_H)
    assert row.lead.compliant_epoch_s == pytest.approx(entry + t * 3600.0, abs=3.0)


def test_span_starting_inside_gives_a_boundary_row(closed):
    got = plan_trip_leads(closed, [span_between(closed, 5.2, 5.4)])
    (row,) = got.boundaries
    assert (row.area, row.event) == ("Meridian Five ECA", "inside_at_start")
    assert row.lead.fail_epoch_s == got.spans[0].from_epoch_s


def test_out_of_compliance_ends_at_an_exit():
    """A failure 10 min before the ship leaves Meridian Reach ECA (sample voyage): vlsfo
    (0.45 %) is within the 0.50 % cap outside, so only the 10 min count; a 2.60 % fuel
    is out of compliance outside too, so the whole time counts."""
    from planner.voyage.run import build_plan
    from tests.helpers.paths import ROOT

    plan = build_plan(ROOT / "areas_sample" / "voyage.toml")
    exit_ = next(c for c in plan.check.crossings
                 if c.crossing.area == "Meridian Reach ECA" and c.crossing.event == "exit")
    t_exit = exit_.time_utc.timestamp()
    got = out_of_compliance_h(plan.check, plan.timeline, 0.45, t_exit - 600.0, t_exit + 3600.0)
    assert got == pytest.approx(600.0 / 3600.0, abs=1e-6)
    whole = out_of_compliance_h(plan.check, plan.timeline, 2.60, t_exit - 600.0,
                                t_exit + 3600.0)
    assert whole == pytest.approx(4200.0 / 3600.0, abs=1e-6)
    assert out_of_compliance_h(plan.check, plan.timeline, 0.45, t_exit, t_exit) == 0.0


def bent_lead_h(fail_s: float, change_s: float) -> float:
    """The lead across the speed change 14 kn → 10 kn at ``change_s`` [s]: the throughput
    V·ln(...) must pass, at q14 before the change and q10 after ([LEVENSPIEL-1999])."""
    q14, q10 = flow_m3_h(14.0), flow_m3_h(10.0)
    need_m3 = V_M3 * math.log((S_HFO - S_MGO) / (TARGET - S_MGO))
    before_h = max(0.0, (change_s - fail_s) / 3600.0)
    if q14 * before_h >= need_m3:
        return need_m3 / q14
    return before_h + (need_m3 - q14 * before_h) / q10


def test_load_change_and_its_approach_are_sampled(slowing):
    """Speed change at 4.6°E: the lead is K/q14 until a failure whose flush would end at
    the change, bends (linear in the failure moment) to K/q10 at the change; both kinks
    are samples, to a second."""
    span = span_between(slowing, 3.0, 4.85)
    assert hours(parallel_m(4.85, 6.0), 10.0) > washout_h(flow_m3_h(10.0))  # ends at sea
    got = plan_trip_leads(slowing, [span])
    change = float(slowing.timeline.schedule.epoch_at([parallel_m(2.0, 4.6)])[0])
    kinds = {s.kind: s for s in got.samples if s.kind != STEP}
    assert kinds[LOAD_CHANGE].fail_epoch_s == pytest.approx(change, abs=1e-3)
    k14 = washout_h(flow_m3_h(14.0))
    assert kinds[ENDS_AT_CHANGE].fail_epoch_s == pytest.approx(change - k14 * 3600.0, abs=3.0)
    assert kinds[START].fail_epoch_s == span.from_epoch_s
    assert kinds[END].fail_epoch_s == span.to_epoch_s
    for s in got.samples:
        assert s.time_to_compliant_h == pytest.approx(bent_lead_h(s.fail_epoch_s, change),
                                                      abs=TIME_TOL_H)
    # between samples the straight line is the lead: check halfway between two of the bend
    bend = [s for s in got.samples if change - k14 * 3600.0 < s.fail_epoch_s < change]
    assert len(bend) >= 3
    a, b = bend[0], bend[1]
    mid = 0.5 * (a.fail_epoch_s + b.fail_epoch_s)
    line = 0.5 * (a.time_to_compliant_h + b.time_to_compliant_h)
    assert line == pytest.approx(bent_lead_h(mid, change), abs=TIME_TOL_H)


def test_bent_lead_against_solve_ivp(slowing):
    """One failure inside the bend against SciPy's solve_ivp of dS/dt = q(t)/V·(S₁ − S)
    ([SCIPY-2020]), stopped at the target by an event."""
    from scipy.integrate import solve_ivp

    change = float(slowing.timeline.schedule.epoch_at([parallel_m(2.0, 4.6)])[0])
    fail = change - 1800.0  # 30 min before the change
    got = plan_trip_leads(slowing, [ScrubberSpan("egcs", ("main",), "hfo", "mgo", 0.10, "open",
                                                 0.0, 0.0, fail, fail)])
    q14, q10 = flow_m3_h(14.0), flow_m3_h(10.0)

    def rhs(t_h, s):
        q = q14 if t_h < 0.5 else q10
        return [q / V_M3 * (S_MGO - s[0])]

    def at_target(t_h, s):
        return s[0] - TARGET
    at_target.terminal = True
    sol = solve_ivp(rhs, (0.0, 10.0), [S_HFO], events=at_target, rtol=1e-10, atol=1e-12,
                    max_step=0.01)
    assert got.samples[0].time_to_compliant_h == pytest.approx(sol.t_events[0][0],
                                                               abs=TIME_TOL_H)


def test_identical_flushes_are_simulated_once(closed):
    """2.2°E to 2.6°E at 12 kn, arrival (the next load change) more than 8 h away: every
    failure sees the same consumption as far as a flush reads it (its 8 h check of the
    tanks, SERVICE_ENDURANCE_H), so one simulation."""
    assert hours(parallel_m(2.6, 6.0), 12.0) > 8.0
    flushes = FlushCache()
    got = trip_leads(closed.system, closed.timeline, closed.check, flushes,
                     [span_between(closed, 2.2, 2.6)], 0.8)
    assert len(got.samples) > 5
    assert flushes.misses["flush"] == 1
    assert flushes.hits["flush"] == len(got.samples) - 1


def test_failure_on_the_last_minute_before_arrival(closed):
    """Arrival inside the area: alongside the main engine is stopped (the port default),
    nothing flows, so a failure a minute before arrival is never flushed: no figure, a
    reason. A failure T before arrival (the flush ends at the stop) still has its lead."""
    arrive = closed.timeline.end_epoch_s
    span = span_between(closed, 5.0, 6.0)  # 3.2 h at 12 kn, more than T
    got = plan_trip_leads(closed, [span])
    last = got.samples[-1]
    assert last.kind == END and last.fail_epoch_s == pytest.approx(arrive, abs=1e-3)
    assert last.time_to_compliant_h is None and last.out_of_compliance_h is None
    assert "do not reach" in last.problem
    minute = plan_trip_leads(closed, [ScrubberSpan("egcs", ("main",), "hfo", "mgo", 0.10,
                                                    "open", span.to_m, span.to_m,
                                                    arrive - 60.0, arrive - 60.0)])
    assert minute.samples[0].time_to_compliant_h is None
    t = washout_h(flow_m3_h(12.0))
    ok = [s for s in got.samples if s.time_to_compliant_h is not None]
    assert ok and max(s.fail_epoch_s for s in ok) == pytest.approx(arrive - t * 3600.0,
                                                                  abs=3.0)


def test_fallback_tank_too_small(closed):
    """0.5 m³ of mgo where the flush needs V·ln(0.35/0.03) ≈ 2.5 m³: the tank runs dry
    (a FlushError), the lead is missing with the reason, the boundary row is kept."""
    small = closed.system.with_tank_content("mgo_service", {"mgo": 0.5})
    got = trip_leads(small, closed.timeline, closed.check, None,
                     [span_between(closed, 4.9, 5.1)], 0.8)
    assert got.samples and all(s.time_to_compliant_h is None for s in got.samples)
    assert all("dry" in s.problem for s in got.samples)
    (row,) = got.boundaries
    assert row.lead.problem


def test_span_shorter_than_a_step(closed):
    span = span_between(closed, 4.0, 4.01)  # about 0.03 h at 12 kn
    assert span.duration_h < 0.25
    got = plan_trip_leads(closed, [span])
    assert [s.kind for s in got.samples] == [START, END]
    lone = plan_trip_leads(closed, [span_between(closed, 4.0, 4.0)])
    assert [s.kind for s in lone.samples] == [START]


def test_spacing_and_refusals(closed):
    span = span_between(closed, 3.0, 4.0)
    got = plan_trip_leads(closed, [span], step_h=0.5)
    steps = np.diff([s.fail_epoch_s for s in got.samples])
    assert steps.max() <= 0.5 * 3600.0 + 1e-6
    with pytest.raises(ValueError, match="step_h"):
        plan_trip_leads(closed, [span], step_h=0.0)
    with pytest.raises(ValueError, match="hsfo"):
        plan_trip_leads(closed, [ScrubberSpan("egcs", ("main",), "hsfo", "mgo", 0.1, "open",
                                              0.0, 1.0, 0.0, 1.0)])
    with pytest.raises(ValueError, match="problem"):
        TripLead(0, "main", STEP, 0.0, 0.0, 0.0, 0.0, 0.08, None, None, "")
    with pytest.raises(ValueError, match="out_of_compliance_h"):
        TripLead(0, "main", STEP, 0.0, 0.0, 0.0, 0.0, 0.08, 1.0, 2.0, "")


def test_a_boundary_row_falls_back_to_a_fuel_legal_inside():
    """At an entry on the scrubber, the lead is the flush to the fuel the circuits would burn
    inside (the span that ends at the entry does not give a row there): every boundary row's
    fallback fuel is within the limit of the area entered (MARPOL Annex VI reg. 14 [MARPOL-VI];
    the egcs sample: hsfo on the scrubber, mgo inside the areas)."""
    from planner.voyage import run
    from planner.voyage.scrubber_trip import plan_trip_leads
    from planner.voyage.scrubber_trip_json import trip_json
    from tests.helpers.paths import ROOT

    plan = run.build_plan(ROOT / "areas_sample" / "egcs_voyage.toml")
    rows = trip_json(plan, plan_trip_leads(plan))["scrubber_trip"]["boundaries"]
    inside = {a: st.limit_pct for st in plan.check.stretches for a in st.areas}
    assert rows
    for r in rows:
        assert plan.voyage.fuel(r["fallback_fuel"]).sulphur_pct <= inside[r["area"]] + 1e-12, r


def hand_change_into_hfo(plan, lon: float):
    """``(change, switch_s)``: the circuit main's changeover mgo → hfo at ``lon`` (by hand, as
    the plan would make one leaving an area), its flush through the plan's cache."""
    from planner.voyage.changeovers import CircuitChange

    t = float(plan.timeline.schedule.epoch_at([parallel_m(2.0, lon)])[0])
    study = plan.flushes.study(plan.system, "main", "mgo_service", "hfo_service",
                               plan.timeline.consumption_from(t, 96.0), 0.10, 0.3825,
                               thermal=False)
    return CircuitChange("main", "to_regular", "mgo", "hfo", "mgo_service", "hfo_service",
                         t, None, None, t, study), t


@pytest.mark.parametrize("delta_h", [0.0, 0.05, 0.1, 0.25, 0.5, 1.0])
def test_failure_while_the_changeover_into_the_fuel_is_under_way(closed, delta_h):
    """The circuit not yet full of hfo: the lead is the washout from c₀ (module notes), not
    from the volume full of hfo; at the switch itself there is nothing to flush."""
    change, s = hand_change_into_hfo(closed, 3.0)
    span = span_between(closed, 3.0, 4.8)
    t = s + delta_h * 3600.0
    span = ScrubberSpan(span.scrubber, span.circuits, span.fuel, span.fallback_fuel,
                        span.limit_pct, span.mode, span.from_m, span.to_m, s, max(t, s + 60.0))
    got = trip_leads(closed.system, closed.timeline, closed.check, closed.flushes, [span],
                     closed.voyage.sulphur_target_fraction, changes=[change])
    (lead,) = [x for x in got.samples if abs(x.fail_epoch_s - t) < 0.5]
    q = flow_m3_h(12.0)
    c0 = 1.0 - math.exp(-q * delta_h / V_M3)
    want = max(0.0, V_M3 / q * math.log(c0 * (S_HFO - S_MGO) / (TARGET - S_MGO))) if c0 else 0.0
    assert lead.time_to_compliant_h == pytest.approx(want, abs=TIME_TOL_H)
    full = trip_leads(closed.system, closed.timeline, closed.check, closed.flushes, [span],
                      closed.voyage.sulphur_target_fraction)  # without the changeover
    (plain,) = [x for x in full.samples if abs(x.fail_epoch_s - t) < 0.5]
    assert plain.time_to_compliant_h == pytest.approx(washout_h(q), abs=TIME_TOL_H)


def test_sample_failure_at_the_switch_into_hsfo_needs_no_flush():
    """egcs sample (fictional): main's valve goes vlsfo → hsfo at 21:20:33Z leaving Port
    Aldmere harbour waters, vlsfo (0.47 %) the fallback under the 0.50 % cap. A failure at the
    switch finds vlsfo at the inlets: no time to compliant, none out of compliance; a minute
    later hsfo is on its way (a lead, shorter than with the circuit full of hsfo); the span's
    longest time out of compliance is not at its start."""
    from planner.voyage import run
    from planner.voyage.scrubber_trip_json import trip_json
    from planner.voyage.scrubber_trip_moments import UNDER_WAY
    from tests.helpers.paths import ROOT

    plan = run.build_plan(ROOT / "areas_sample" / "egcs_voyage.toml")
    leads = plan_trip_leads(plan)
    first = leads.series(0, "main")
    assert first[0].kind == START
    assert plan.timeline.utc(first[0].fail_epoch_s).strftime("%H:%M:%S") == "21:20:33"
    assert first[0].time_to_compliant_h == 0.0
    assert first[0].out_of_compliance_h == 0.0
    under = [x for x in first if x.kind == UNDER_WAY]
    assert len(under) >= 5
    leads_h = [x.time_to_compliant_h for x in (first[0], *under)]
    assert leads_h == sorted(leads_h)  # the slug of hsfo grows with the time on it
    full = max(x.time_to_compliant_h for x in first)
    assert 0.0 < under[2].time_to_compliant_h < full  # 1 min after the switch
    worst = trip_json(plan, leads)["scrubber_trip"]["spans"][0]["worst"][0]
    assert worst["utc"] != "2027-05-29T21:20:33Z"
