"""The Monte Carlo's batched evaluation gives each sample's figure as evaluated alone.

The references are the plain computations written here: ranks by a stable sort and
``numpy.unique`` (ties given their mean rank, as ``scipy.stats.rankdata`` does,
[SCIPY-2020]), the surrogate evaluated one sample at a time, each swing's end as a
sample of its own; compared bit for bit. On the sample ship (fictional), boiler
circuit (three uncertain nodes), VLSFO to MGO.
"""

from __future__ import annotations

import numpy as np
import pytest
from scipy.stats import rankdata

from planner.flushing import flush, make_switch, schedule_at
from planner.flushing.network import compile_network
from planner.ship.ship_file import load_ship
from planner.uncertainty import UncertaintySpec, analyse
from planner.uncertainty.model import circuit_nodes
from planner.uncertainty.sampling import draw, input_defs, one_at_a_time
from planner.uncertainty.sensitivity import lead_of, ranks, swing_leads
from planner.uncertainty.surrogate import build_surrogate
from planner.voyage.flush_cache import FlushCache
from tests.helpers.paths import ROOT

SHIP = ROOT / "areas_sample" / "ship.toml"
LIMIT, TARGET = 0.10, 0.09
CIRCUIT, FROM, TO = "boiler", "vlsfo_service", "mgo_service"


@pytest.fixture(scope="module")
def ship():
    return load_ship(SHIP)


@pytest.fixture(scope="module")
def surrogate(ship):
    nodes = circuit_nodes(ship, CIRCUIT, TO)
    fuels = compile_network(ship, [make_switch(ship, CIRCUIT, FROM, TO)]).fuels
    defs = input_defs(nodes, fuels, UncertaintySpec())
    return build_surrogate(ship, CIRCUIT, FROM, TO, schedule_at(ship), defs, 4.0, 4.0), defs


def reference_ranks(x: np.ndarray) -> np.ndarray:
    """Mean ranks of ties by a stable sort and ``numpy.unique`` (the former method)."""
    order = np.argsort(x, kind="mergesort")
    r = np.empty(len(x))
    r[order] = np.arange(1, len(x) + 1)
    _, inverse, counts = np.unique(x, return_inverse=True, return_counts=True)
    return (np.bincount(inverse, weights=r) / counts)[inverse]


@pytest.mark.parametrize("seed", range(6))
def test_ranks_with_ties_inf_nan_and_signed_zeros(seed):
    rng = np.random.default_rng(seed)
    x = rng.integers(0, 6, size=int(rng.integers(1, 300))).astype(float)
    x[rng.random(len(x)) < 0.15] = np.inf
    x[rng.random(len(x)) < 0.10] = -0.0 if seed % 2 else np.nan
    assert np.array_equal(ranks(x), reference_ranks(x), equal_nan=True)
    if seed % 2:
        assert np.array_equal(ranks(x), rankdata(x))
    y = rng.normal(size=1000)
    assert np.array_equal(ranks(y), reference_ranks(y))


def test_surrogate_batch_is_each_sample_alone(surrogate):
    sur, defs = surrogate
    smp = draw(defs, 300, 5)
    u = sur.u(smp)
    theta = sur.nominal.levels(smp.sulphur(sur.nominal.fuels), TARGET, True)
    batch = sur.time_h(theta, u)
    alone = np.array([sur.time_h(theta[i:i + 1], u[i:i + 1])[0] for i in range(smp.n)])
    assert np.array_equal(batch, alone)
    assert len(np.unique(batch[np.isfinite(batch)])) > 250  # some never: sulphur over target


def test_swings_in_one_batch_are_each_end_alone(surrogate):
    sur, defs = surrogate
    ends = [lead_of(sur, one_at_a_time(defs, d.key, v), TARGET, True)[0]
            for d in defs if d.uncertain for v in (d.low, d.high)]
    assert np.array_equal(swing_leads(sur, defs, TARGET, True), np.array(ends))
    assert len(ends) == 2 * sum(d.uncertain for d in defs)


def test_remembered_simulations_change_nothing(ship):
    sched = schedule_at(ship)
    _, det = flush(ship, CIRCUIT, FROM, TO, sched, limit_pct=LIMIT, target_pct=TARGET)
    plain = analyse(ship, CIRCUIT, "vlsfo", "mgo", sched, limit_pct=LIMIT, target_pct=TARGET,
                    samples=1500, seed=3, deterministic=det)
    cache = FlushCache()
    runs = [analyse(ship, CIRCUIT, "vlsfo", "mgo", sched, limit_pct=LIMIT, target_pct=TARGET,
                    samples=1500, seed=3, deterministic=det, simulator=cache.simulate)
            for _ in range(2)]
    hits, misses = cache.counts()["simulate"]
    assert misses == plain.simulations and hits == plain.simulations
    for u in runs:
        assert np.array_equal(u.time_to_target_h, plain.time_to_target_h)
        assert np.array_equal(u.time_to_limit_h, plain.time_to_limit_h)
        assert u.sensitivity == plain.sensitivity and u.check == plain.check
        assert u.warnings == plain.warnings
