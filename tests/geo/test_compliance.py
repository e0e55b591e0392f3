"""Route check: times of crossings, limits on every stretch, areas' dates, global cap.

Outside references: pyproj.Geod (GeographicLib [KARNEY-2013] [P]) for positions
and distances on a meridian; MARPOL Annex VI regulation 14.1 for the global
cap dates [MARPOL-VI] [P]; arithmetic of constant speed [D], with 1 nm = 1852 m
[NM-1852] [P].
"""

from __future__ import annotations

from datetime import UTC, date, datetime, timedelta

import numpy as np
import pytest

from geo.area import Area, Polygon
from geo.compliance import check_route
from geo.errors import InputError
from geo.limits import global_cap_pct
from geo.path import route_path
from geo.route import Route, Waypoint
from geo.schedule import make_schedule
from tests.helpers.geo import NM, REF_GEOD


def box(name: str, lon0: float, lon1: float, lat0: float, lat1: float, *, limit: float = 0.10,
        start: date = date(2015, 1, 1), until: date | None = None,
        edges: str = "geodesic") -> Area:
    """A lon/lat box [deg] with its limit [% m/m] and dates in force."""
    ring = ((lon0, lat0), (lon1, lat0), (lon1, lat1), (lon0, lat1))
    return Area(name, limit, start, (Polygon(ring),), effective_until=until, edges=edges)


def meridian_route(lat0: float = 0.0, lat1: float = 10.0, lon: float = 5.0,
                   speed: float | None = None, **kw: object) -> Route:
    """Two waypoints on one meridian [deg]; ``speed`` [kn] and ``kw`` for the second."""
    return Route("m", (Waypoint("A", lat0, lon), Waypoint("B", lat1, lon, speed_kn=speed, **kw)))


def test_crossing_times_at_constant_speed() -> None:
    # Along a meridian every leg type is the geodesic: distances from pyproj.Geod
    # [KARNEY-2013].
    path = route_path(meridian_route())
    dep = datetime(2027, 1, 10, 0, 0, tzinfo=UTC)
    sched = make_schedule(path, dep, 12.0)
    area = box("X", 4.0, 6.0, 3.0, 4.0, edges="rhumb")  # parallels and meridians
    check = check_route(path, [area], sched, date(2027, 1, 10))
    enter, exit_ = check.crossings
    _, _, d_enter = REF_GEOD.inv(5.0, 0.0, 5.0, 3.0)
    _, _, d_exit = REF_GEOD.inv(5.0, 0.0, 5.0, 4.0)
    assert enter.crossing.distance_m == pytest.approx(d_enter, abs=1e-3)
    assert exit_.crossing.distance_m == pytest.approx(d_exit, abs=1e-3)
    # time = distance / speed (arithmetic [D]), to the second
    want = dep + timedelta(hours=d_enter / NM / 12.0)
    assert abs((enter.time_utc - want).total_seconds()) < 1e-3
    assert check.passages[0].inside_h == pytest.approx((d_exit - d_enter) / NM / 12.0, rel=1e-9)
    assert [s.limit_pct for s in check.stretches] == [0.50, 0.10, 0.50]
    assert check.stretches[1].areas == ("X",)


REG_14_1 = "[MARPOL-VI] reg. 14.1 [P]"
# (day or moment, cap [% m/m], source)
GLOBAL_CAPS = [
    pytest.param(date(2011, 12, 31), 4.50, REG_14_1, id="2011-12-31"),
    pytest.param(date(2012, 1, 1), 3.50, REG_14_1, id="2012-01-01"),
    pytest.param(date(2019, 12, 31), 3.50, REG_14_1, id="2019-12-31"),
    pytest.param(date(2020, 1, 1), 0.50, REG_14_1, id="2020-01-01"),
    pytest.param(datetime(2019, 12, 31, 23, 0, tzinfo=UTC), 3.50, REG_14_1, id="2019-12-31T23Z"),
    # midnight UTC, not local midnight: 08:00Z on 2020-01-01 in the machine's own zone
    pytest.param(datetime(2020, 1, 1, 8, 0, tzinfo=UTC).astimezone(
        datetime.now().astimezone().tzinfo), 0.50, REG_14_1 + ", 00:00 UTC", id="local time"),
]


@pytest.mark.parametrize(("when", "expected_pct", "source"), GLOBAL_CAPS)
def test_global_cap_table(when: date | datetime, expected_pct: float, source: str) -> None:
    assert global_cap_pct(when) == expected_pct, source


def test_global_cap_changes_at_midnight_utc_during_the_voyage() -> None:
    path = route_path(meridian_route())
    dep = datetime(2019, 12, 31, 12, 0, tzinfo=UTC)
    check = check_route(path, [], make_schedule(path, dep, 10.0), date(2019, 12, 31))
    assert [s.limit_pct for s in check.stretches] == [3.50, 0.50]
    # 12 h at 10 kn = 120 nm (arithmetic [D]): the cap changes there [MARPOL-VI]
    assert check.stretches[0].to_nm == pytest.approx(120.0, abs=1e-6)


def test_area_coming_into_force_while_inside_starts_at_that_moment() -> None:
    path = route_path(meridian_route())
    area = box("Future", 4.0, 6.0, -1.0, 11.0, start=date(2027, 6, 1))
    dep = datetime(2027, 5, 31, 18, 0, tzinfo=UTC)
    check = check_route(path, [area], make_schedule(path, dep, 10.0), date(2027, 5, 31))
    assert check.crossings == ()  # starts and ends inside
    assert [s.limit_pct for s in check.stretches] == [0.50, 0.10]
    assert check.stretches[0].to_nm == pytest.approx(60.0, abs=1e-6)  # 6 h at 10 kn [D]
    assert check.stretches[1].from_utc == datetime(2027, 6, 1, tzinfo=UTC)


def test_in_force_without_times_uses_the_date() -> None:
    path = route_path(meridian_route())
    area = box("Later", 4.0, 6.0, 3.0, 4.0, start=date(2030, 1, 1))
    before = check_route(path, [area], None, date(2029, 12, 31))
    after = check_route(path, [area], None, date(2030, 1, 1))
    assert [c.in_force for c in before.crossings] == [False, False]
    assert [s.limit_pct for s in before.stretches] == [0.50]
    assert [c.in_force for c in after.crossings] == [True, True]
    assert [s.limit_pct for s in after.stretches] == [0.50, 0.10, 0.50]
    assert all(c.time_utc is None for c in after.crossings)
    assert after.passages[0].inside_h is None


def test_area_that_ended_counts_no_more() -> None:
    path = route_path(meridian_route())
    area = box("Old", 4.0, 6.0, 3.0, 4.0, start=date(2010, 1, 1), until=date(2014, 12, 31))
    check = check_route(path, [area], None, date(2015, 1, 1))
    assert [s.limit_pct for s in check.stretches] == [3.50]


def test_strictest_of_overlapping_areas_applies() -> None:
    path = route_path(meridian_route())
    wide = box("Wide", 4.0, 6.0, 2.0, 8.0, limit=0.50)
    inner = box("Inner", 4.0, 6.0, 4.0, 6.0, limit=0.10)
    check = check_route(path, [wide, inner], None, date(2027, 1, 1))
    assert [s.limit_pct for s in check.stretches] == [0.50, 0.50, 0.10, 0.50, 0.50]
    assert check.stretches[2].areas == ("Wide", "Inner")
    assert check.limit_at(5.0 * 60 * NM) == 0.10


def test_schedule_from_etas_and_a_stop() -> None:
    t0 = datetime(2027, 1, 1, 0, 0, tzinfo=UTC)
    route = Route("s", (
        Waypoint("A", 0.0, 5.0, etd_utc=t0),
        Waypoint("B", 1.0, 5.0, eta_utc=t0 + timedelta(hours=6), etd_utc=t0 + timedelta(hours=8)),
        Waypoint("C", 2.0, 5.0, speed_kn=10.0),
    ))
    path = route_path(route)
    sched = make_schedule(path, None, None)
    assert sched.depart_utc == t0
    leg1_nm = path.leg_length_nm[0]
    assert sched.leg_speed_kn[0] == pytest.approx(leg1_nm / 6.0, rel=1e-12)
    assert sched.time_at(path.start_m[1]) == t0 + timedelta(hours=6)  # first arrival
    assert sched.arrive_utc == t0 + timedelta(hours=8 + path.leg_length_nm[1] / 10.0)


def test_schedule_needs_a_speed() -> None:
    path = route_path(meridian_route())
    with pytest.raises(InputError, match="speed"):
        make_schedule(path, datetime(2027, 1, 1, tzinfo=UTC), None)
    assert make_schedule(path, None, None) is None


def test_progress_per_area(monkeypatch: pytest.MonkeyPatch) -> None:
    import geo.progress

    path = route_path(meridian_route())
    areas = [box("Wide", 4.0, 6.0, 2.0, 8.0), box("Inner", 4.0, 6.0, 4.0, 6.0)]
    shown: list[str] = []
    monkeypatch.setattr(geo.progress, "INTERVAL_S", 0.0)
    check = check_route(path, areas, None, date(2027, 1, 1), progress=shown.append)
    assert shown == ["crossings: area 1 of 2", "crossings: area 2 of 2"]
    assert check.crossings == check_route(path, areas, None, date(2027, 1, 1)).crossings


def test_progress_at_most_a_few_times_a_second() -> None:
    from geo.progress import Throttle

    clock = iter(np.arange(0.0, 10.0, 0.01))  # a report asked for every 10 ms, for 10 s
    shown: list[str] = []
    say = Throttle(shown.append, clock=lambda: float(next(clock)))
    for i in range(1000):
        say(lambda i=i: f"step {i}")
    assert shown[0] == "step 0" and 30 <= len(shown) <= 41  # one every 0.25 s
    Throttle(None)(lambda: "never built")
