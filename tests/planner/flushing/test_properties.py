"""Property tests of the flushing simulation (hypothesis): monotone in volume and consumption,
sulphur bounded by the two fuels'."""

from hypothesis import given, settings
from hypothesis import strategies as st

from planner.flushing import ConsumptionSchedule, Switch, simulate
from tests.helpers.flushing import HFO, MGO, loop_system, series

AB = Switch("main", "A", "B")
SLACK_H = 0.05 / 3600.0  # numerical slack: 0.05 s
volumes = st.lists(st.floats(0.01, 0.6), min_size=1, max_size=4)
kinds = st.text("sp", min_size=4, max_size=4)
rates = st.floats(0.2, 3.0)


def time_to_limit(system, rate, limit=0.10):
    schedule = ConsumptionSchedule.constant({"me": rate}, "mass")
    return simulate(system, AB, schedule, 24.0).inlets["me"].time_at_or_below_h(limit)


@settings(max_examples=25, deadline=None)
@given(vols=volumes, kinds=kinds, rate=rates, which=st.integers(0, 3), extra=st.floats(0.01, 0.5))
def test_more_volume_never_shortens_the_flush(vols, kinds, rate, which, extra):
    which %= len(vols)
    bigger = list(vols)
    bigger[which] += extra
    t_small = time_to_limit(series(vols, kinds[: len(vols)]), rate)
    t_big = time_to_limit(series(bigger, kinds[: len(vols)]), rate)
    assert t_big >= t_small - SLACK_H


@settings(max_examples=25, deadline=None)
@given(vols=volumes, kinds=kinds, rate=rates, factor=st.floats(1.01, 3.0))
def test_higher_consumption_never_lengthens_the_flush(vols, kinds, rate, factor):
    system = series(vols, kinds[: len(vols)])
    assert time_to_limit(system, rate * factor) <= time_to_limit(system, rate) + SLACK_H


@settings(max_examples=15, deadline=None)
@given(
    mixing=st.floats(0.1, 1.0),
    loop=st.lists(st.floats(0.005, 0.2), min_size=1, max_size=3),
    ratio=st.floats(1.5, 8.0),
    rate=rates,
    back=st.booleans(),
)
def test_sulphur_stays_between_the_two_fuels(mixing, loop, ratio, rate, back):
    q = rate * 1000.0 / MGO.density_kg_m3
    kinds = "psp"[: len(loop)]
    system = loop_system(mixing, loop, kinds, ratio * q)
    sw = Switch("main", "B", "A") if back else AB
    schedule = ConsumptionSchedule.constant({"me": rate}, "mass")
    r = simulate(system, sw, schedule, 6.0)
    lo, hi = MGO.sulphur_pct, HFO.sulphur_pct
    for curve in (r.inlets["me"].sulphur_pct, r.tanks["A"].sulphur_pct, r.tanks["B"].sulphur_pct):
        assert curve.min() >= lo - 1e-9 and curve.max() <= hi + 1e-9
    s = r.inlets["me"].sulphur_pct
    # and it moves from the old fuel's towards the new one's
    start, end = (hi, lo) if not back else (lo, hi)
    assert abs(s[0] - start) < 1e-12 and abs(s[-1] - end) < abs(s[0] - end)
