"""The voyage timeline: speed, consumption by the propeller law, stops.

Times are epoch seconds (about 1.8e9 s), so agreement is to about 1e-9 relative.
References: the propeller law, power ∝ speed³ ([PROPELLER-LAW], common practice),
with the sample engine's own reference point; arithmetic of constant speed; the
42.7 MJ/kg reference energy of SFOC ([ISO-3046] [M], from memory: the same constant
as the code, so only the scaling is checked).
"""

from __future__ import annotations

from datetime import UTC, datetime, timedelta

import pytest

from geo.path import route_path
from geo.route import Route, Waypoint
from geo.schedule import make_schedule, to_epoch
from planner.fuels import ISO_REFERENCE_Q_NET_MJ_KG
from planner.ship.consumers import MainEngine
from planner.ship.ship_file import load_ship
from planner.voyage.timeline import Timeline

T0 = datetime(2027, 1, 1, tzinfo=UTC)


@pytest.fixture(scope="module")
def timeline() -> Timeline:
    route = Route("stop", (
        Waypoint("A", 0.0, 5.0, etd_utc=T0),
        Waypoint("B", 1.0, 5.0, speed_kn=12.0, etd_utc=T0 + timedelta(hours=10)),
        Waypoint("C", 2.0, 5.0, speed_kn=10.0),
    ))
    path = route_path(route)
    return Timeline(make_schedule(path, None, None), load_ship("areas_sample/ship.toml"))


def test_speed_and_stop(timeline):
    legs = timeline.schedule.path.leg_length_nm
    arrive_b = to_epoch(T0) + legs[0] / 12.0 * 3600.0
    assert timeline.speed_kn(to_epoch(T0) + 60.0) == pytest.approx(12.0, rel=1e-9)
    assert timeline.speed_kn(arrive_b + 60.0) == 0.0  # waiting at B until its ETD
    assert timeline.speed_kn(to_epoch(T0 + timedelta(hours=10)) + 60.0) == pytest.approx(10.0)


def test_consumption_follows_the_propeller_law_and_stops(timeline):
    me = next(c for c in timeline.system.consumers.values() if isinstance(c, MainEngine))
    at12 = timeline.rates_iso_t_h(to_epoch(T0) + 60.0)
    at10 = timeline.rates_iso_t_h(to_epoch(T0 + timedelta(hours=10)) + 60.0)
    stopped = timeline.rates_iso_t_h(to_epoch(T0 + timedelta(hours=9)))
    # [PROPELLER-LAW] from the engine's reference point: load = ref · (v / v_ref)³
    load12 = me.ref_load_pct * (12.0 / me.ref_speed_kn) ** 3
    want12 = me.mcr_kw * load12 / 100.0 * me.sfoc_at(load12) / 1e6
    assert at12[me.name] == pytest.approx(want12, rel=1e-9)
    assert at10[me.name] < at12[me.name]
    assert stopped[me.name] == 0.0
    others = [n for n in at12 if n != me.name]
    assert all(stopped[n] == at12[n] > 0 for n in others)  # generators and boiler run on


def test_schedule_for_a_flush_steps_at_the_stop(timeline):
    start = to_epoch(T0) + 3600.0
    sched = timeline.consumption_from(start, 12.0)
    legs = timeline.schedule.path.leg_length_nm
    assert sched.times_h[0] == 0.0
    assert sched.times_h[1] == pytest.approx(legs[0] / 12.0 - 1.0, rel=1e-9)
    assert sched.times_h[2] == pytest.approx(9.0, rel=1e-9)


def test_burnt_mass_scales_with_the_fuels_energy(timeline):
    fuel = timeline.system.fuels["mgo"]
    a = to_epoch(T0 + timedelta(hours=9))
    b = a + 1800.0  # half an hour stopped: generators and boiler only
    iso = sum(timeline.rates_iso_t_h(a + 1.0).values()) * 0.5
    assert timeline.burnt_t(a, b, fuel) == pytest.approx(
        iso * ISO_REFERENCE_Q_NET_MJ_KG / fuel.q_net, rel=1e-9)
