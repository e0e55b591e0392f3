"""The simulator's kernels against independent references, each named beside its check.

- the φ-functions of a matrix against the exponential of the augmented block
  matrix ``[[X, I, 0, …], [0, 0, I, …], …]`` by SciPy ([SCIPY-2020]
  ``scipy.linalg.expm``, the method of [HIGHAM-2005]);
- the pipes' outflow windows and samples against adaptive quadrature of the
  parcel profiles ([SCIPY-2020] ``scipy.integrate.quad``), including pipes
  that take nothing in for a while (plug flow, [LEVENSPIEL-1999] [P]);
- the one-product flow map against the link-by-link flow matrices;
- the dense-output matrix against SciPy's exponential of the augmented system
  ([SCIPY-2020] ``scipy.linalg.expm``), and the pipe system's solve against
  ``numpy.linalg.solve`` itself, bit for bit;
- a branch whose consumer burns nothing: its inlet keeps the old fuel and every
  fuel is conserved ([LEVENSPIEL-1999] mass balance [D]).
"""

import numpy as np
import pytest
import scipy.linalg
from scipy.integrate import quad

from planner.flushing import ConsumptionSchedule, FlushError, make_switch, simulate
from planner.flushing.flowmap import FlowMap
from planner.flushing.network import compile_network, flow_matrices
from planner.flushing.phi import phi_double, phi_stack
from planner.flushing.pipes import PipeSet, fresh_maps, fresh_maps_of, fresh_moments, profile
from planner.flushing.trial import _draws, draw_m3h
from planner.ship.ship_file import load_ship
from tests.helpers.flushing import SHIPS


def compartmental(rng, n, scale):
    """A random well-stirred network matrix: off-diagonal ≥ 0, columns losing at least
    what they pass on."""
    a = rng.uniform(0.0, 1.0, (n, n)) * (rng.random((n, n)) < 0.5)
    np.fill_diagonal(a, 0.0)
    a -= np.diag(a.sum(axis=0) + rng.uniform(0.0, 2.0, n) * (rng.random(n) < 0.7))
    return a * scale


def block_phi(x, order):
    """φ_0 … φ_order of ``x`` from scipy's exponential of the augmented block matrix."""
    n = len(x)
    w = np.zeros((n * (order + 1), n * (order + 1)))
    w[:n, :n] = x
    for k in range(order):
        w[k * n : (k + 1) * n, (k + 1) * n : (k + 2) * n] = np.eye(n)
    e = scipy.linalg.expm(w)
    return np.array([e[:n, k * n : (k + 1) * n] for k in range(order + 1)])


@pytest.mark.parametrize("scale", [1e-4, 1e-2, 0.5, 10.0, 300.0])
def test_phi_functions_match_the_block_exponential(scale):
    rng = np.random.default_rng(3)
    for _ in range(10):
        x = compartmental(rng, int(rng.integers(1, 7)), scale)
        ref = block_phi(x, 7)  # [SCIPY-2020] expm of the augmented matrix ([HIGHAM-2005])
        got = phi_stack(x, 7)
        for k in range(8):
            np.testing.assert_allclose(got[k], ref[k], rtol=0, atol=2e-12 * np.abs(ref[k]).max())


def test_phi_doubling_is_the_stack_at_twice_the_matrix():
    x = compartmental(np.random.default_rng(5), 4, 3.0)
    np.testing.assert_allclose(phi_double(phi_stack(x, 7)), phi_stack(2.0 * x, 7),
                               rtol=0, atol=1e-13)


def profile_at(coef, s):
    return float(profile(np.asarray(coef)[None, :, :1], np.array([s]))[0, 0])


def shifted_legendre(j, u):
    return (1.0, 2 * u - 1, (6 * u - 6) * u + 1, ((20 * u - 30) * u + 12) * u - 1)[j]


def window_by_quadrature(parcels, width, through):
    """(2j + 1)·∫_0^width c(ξ)·P_j(ξ/W) dξ / W over parcels (start, length, coef)."""
    out = np.zeros(4)
    for start, length, coef in parcels:
        a, b = max(start, 0.0), min(start + length, width)
        if b <= a:
            continue
        for j in range(4):
            val, _ = quad(lambda xi, coef=coef, start=start, length=length, j=j:
                          profile_at(coef, (xi - start) / length)
                          * shifted_legendre(j, xi / through), a, b, epsabs=1e-14)
            out[j] += (2 * j + 1) * val / through
    return out


def test_pipe_windows_and_samples_match_quadrature_with_an_idle_pipe():
    rng = np.random.default_rng(11)
    volume = np.array([0.3, 0.2])
    pipes = PipeSet(volume, np.array([[1.0, 0.0], [0.5, 0.5]]))
    # a reference list per pipe: (start from the outlet, length, coefficients (3, F))
    ref = [[(0.0, 0.3, np.array([[1.0, 0.0], [0, 0], [0, 0]]))],
           [(0.0, 0.2, np.array([[0.5, 0.5], [0, 0], [0, 0]]))]]
    for step in range(12):
        through = rng.uniform(0.05, 0.5, 2)
        through[1] = 0.0 if step in (3, 4, 7) else through[1]  # the second pipe idles
        for p in range(2):
            if through[p] == 0.0:
                continue
            inv = np.divide(1.0, through, out=np.zeros(2), where=through > 0)
            got = pipes.window(np.minimum(volume, through), inv)
            expected = window_by_quadrature(ref[p], min(volume[p], through[p]), through[p])
            np.testing.assert_allclose(got[p, :, 0], expected, rtol=0, atol=1e-11)
        coef = rng.normal(size=(2, 3, 2))
        pipes.push(through, coef, bool(np.all(through > 0)))
        for p in range(2):
            if through[p] > 0.0:
                ref[p].append((volume[p], through[p], coef[p]))
        # samples at throughput positions, before the parcels move on
        for p in range(2):
            at = np.array([[0.0, 0.37 * through[p], through[p]]])
            got = pipes.sample(np.array([p]), at, np.array([False, False, False]))[0, :, 0]
            for k, pos in enumerate(at[0]):
                start, length, coef_p = next(
                    r for r in reversed(ref[p]) if r[0] <= pos + 1e-15)
                assert got[k] == pytest.approx(
                    profile_at(coef_p, min(1.0, (pos - start) / length)), abs=1e-12)
        pipes.advance(through)
        ref = [[(s - through[p], ln, c) for s, ln, c in ref[p] if s - through[p] + ln > 0.0]
               for p in range(2)]
        # the content stays the pipe volume (exact plug flow)
        assert pipes.window(volume, np.ones(2))[:, 0].sum(axis=1) == pytest.approx(
            [sum(quad(lambda xi, r=r: sum(profile(r[2][None, :, f:f + 1],
                                                  np.array([(xi - r[0]) / r[1]]))[0, 0]
                                          for f in range(2)),
                      max(r[0], 0.0), min(r[0] + r[1], volume[p]))[0] for r in ref[p])
             for p in range(2)], abs=1e-10)


def test_pipe_limits_are_the_samples_left_and_right():
    # limits(p, x) on floats is sample() at x, its left limit then its right limit
    # (a boundary within 1e-12 of the volume belongs to the earlier parcel)
    rng = np.random.default_rng(5)
    volume = np.array([0.3, 0.2])
    pipes = PipeSet(volume, np.array([[1.0, 0.0], [0.5, 0.5]]))
    for _ in range(6):
        through = rng.uniform(0.05, 0.25, 2)
        pipes.push(through, rng.normal(size=(2, 3, 2)), True)
        for p in range(2):
            for x in (0.0, 0.5 * through[p], through[p], float(volume[p])):
                both = pipes.sample(np.array([p]), np.array([[x, x]]), np.array([True, False]))
                left, right = pipes.limits(p, x)
                np.testing.assert_allclose(left, both[0, 0], rtol=1e-15, atol=1e-15)
                np.testing.assert_allclose(right, both[0, 1], rtol=1e-15, atol=1e-15)
        pipes.advance(through)


def test_fresh_moments_of_a_pipe_flushed_twice_over():
    # inflow that enters and leaves within the step: its first half leaves in the outlet
    # window [V, W] for V = W/2 ([LEVENSPIEL-1999] plug flow [P]); a constant inflow
    # fills half the window: mean 1/2, and its Legendre slope (3∫_{1/2}^1 (2u − 1) du = 3/4)
    m = fresh_moments(0.5, 1.0)
    assert m[0, 0] == pytest.approx(0.5, abs=1e-14)
    assert m[1, 0] == pytest.approx(0.75, abs=1e-14)


@pytest.mark.parametrize("n_fuels", [2, 3])
def test_draws_on_floats_are_draw_m3h(n_fuels):
    # the step's draws on floats (two fuels written out, any number in general) against
    # the array form, at the inlet and along its slope, a negative fraction counting as 0
    rng = np.random.default_rng(n_fuels)
    rate = rng.uniform(100.0, 2000.0, 3)
    phi = rng.dirichlet(np.ones(n_fuels), 3)
    phi[0, 0] = -1e-12
    slope = rng.normal(size=(3, n_fuels))
    kappa = rng.uniform(800.0, 1000.0, n_fuels)
    two = np.stack((kappa, np.ones(n_fuels)), axis=1)
    for dt in (0.0, 0.01):
        got = _draws(rate.tolist(), phi.tolist(), kappa.tolist(), slope.tolist(), dt)
        np.testing.assert_allclose(got, draw_m3h(rate, phi + dt * slope, two), rtol=1e-14)


def test_fresh_maps_of_floats_are_each_pipes_map():
    # per pipe the map of fresh_moments; none where the step does not flush the pipe
    # through (W <= V), and None when it flushes none
    volume, through = [0.5, 1.0, 0.2], [1.0, 0.8, 0.2]
    maps = fresh_maps_of(volume, through)
    np.testing.assert_allclose(maps[0], fresh_moments(0.5, 1.0), rtol=1e-14, atol=1e-15)
    assert np.all(maps[1:] == 0.0)
    np.testing.assert_array_equal(fresh_maps(np.array(volume), np.array(through)), maps)
    assert fresh_maps_of([1.0, 0.3], [0.5, 0.3]) is None


@pytest.mark.parametrize("path", sorted(SHIPS.glob("t*.toml")), ids=lambda p: p.stem)
def test_flow_map_matches_the_link_by_link_matrices(path):
    system = load_ship(path)
    for circuit in system.circuits:
        tanks = system.circuits[circuit].tanks
        net = compile_network(system, [make_switch(system, circuit, tanks[0], tanks[1])])
        fmap = FlowMap(net, net.after, net.stirred_volume_m3)
        s = len(net.stirred)
        for v in np.random.default_rng(1).uniform(0.1, 2.0, (5, len(net.consumers))):
            fl = fmap.flows(v, 0.0)
            fm = flow_matrices(net, net.after, np.clip(net.flows_m3h(v), 0.0, None))
            tol = {"rtol": 1e-12, "atol": 1e-12}
            np.testing.assert_allclose(fl.into_stirred, np.hstack((fm.ss, fm.sp)), **tol)
            np.testing.assert_allclose(fl.into_pipes, np.hstack((fm.ps, fm.pp)), **tol)
            np.testing.assert_allclose(fl.pipe_flow, fm.pipe_flow, **tol)
            np.testing.assert_allclose(fl.stirred_out, fm.stirred_out, **tol)
            a = (fm.ss - np.diag(fm.stirred_in)) / net.stirred_volume_m3[:, None]
            np.testing.assert_allclose(fl.system[:, :s], a, **tol)
            np.testing.assert_array_equal(fl.a, fl.system[:, :s])  # the same, contiguous
            np.testing.assert_array_equal(fl.bp, fl.system[:, s:])
            # the commit's balance, the tanks' net inflow, the pipes' flow into stirred volumes
            gain = np.hstack((fm.ss - np.diag(fm.stirred_out), fm.sp))
            np.testing.assert_allclose(fl.balance, gain, **tol)
            np.testing.assert_allclose(
                fl.tank_net, (fm.stirred_in - fm.stirred_out) * net.is_tank, **tol)
            np.testing.assert_allclose(fl.pipe_to_stirred, fm.sp.sum(axis=0), **tol)


def test_a_branch_that_burns_nothing_keeps_the_old_fuel():
    system = load_ship(SHIPS / "t5_two_circuits.toml")
    schedule = ConsumptionSchedule.constant({"main_engine": 1.3, "dg1": 0.0}, basis="mass")
    r = simulate(system, make_switch(system, "main", "hfo", "mgo"), schedule, 6.0)
    held0, held1, burnt = r.sulphur_balance_t()
    assert abs(held0 - held1 - burnt) <= 1e-9 * held0  # [LEVENSPIEL-1999] mass balance [D]
    np.testing.assert_allclose(r.inventory_initial_m3, r.inventory_final_m3 + r.burnt_m3,
                               rtol=1e-12, atol=1e-12)
    idle = r.inlets["dg1"]
    np.testing.assert_array_equal(idle.sulphur_pct, idle.sulphur_pct[0])  # nothing moves
    assert r.inlets["main_engine"].time_at_or_below_h(0.10) is not None


def test_a_filled_tank_warns_over_capacity_and_a_drawn_tank_runs_dry():
    # t4, back to HFO: the 3.0 m³/h supply pump's excess returns to the MGO tank (120 m³,
    # 100 held) while the 50 m³ HFO tank is drawn at the pump rate: dry at 50/3 h
    system = load_ship(SHIPS / "t4_return_named.toml")
    sw = make_switch(system, "main", "mgo", "hfo")
    schedule = ConsumptionSchedule.constant({"main_engine": 1.3}, basis="mass")
    r = simulate(system, sw, schedule, 16.0)
    assert len(r.warnings) == 1 and "'mgo_service' exceeds its capacity 120 m³" in r.warnings[0]
    with pytest.raises(FlushError, match=r"'hfo_service' runs dry at t = 16\.667 h"):
        simulate(system, sw, schedule, 30.0)


def test_the_pipe_system_solve_is_numpys_bit_for_bit_and_refuses_a_singular_one():
    """``step._solve`` calls the LAPACK kernel behind ``numpy.linalg.solve`` directly: the
    same result to the last bit (the reference is numpy.linalg.solve itself), and a singular
    system still raises numpy's LinAlgError."""
    from planner.flushing.step import _solve

    rng = np.random.default_rng(7)
    for p in (1, 2, 4, 6):
        a = np.eye(3 * p) + 0.3 * rng.standard_normal((3 * p, 3 * p))
        b = rng.standard_normal((3 * p, 2))
        assert np.array_equal(_solve(a, b), np.linalg.solve(a, b))
    with pytest.warns(RuntimeWarning), pytest.raises(np.linalg.LinAlgError):
        _solve(np.zeros((3, 3)), np.ones((3, 2)))


@pytest.mark.parametrize("tau", [10.0 / 3600.0, 0.05])
def test_the_dense_output_matrix_is_the_exponential_of_the_augmented_system(tau):
    """``exp`` over ``tau`` of ``[x, g, g', g'']`` with ``x' = A·x + g``, ``g''' = 0``
    against SciPy's exponential of that block matrix ([SCIPY-2020] ``scipy.linalg.expm``),
    twice for the same size and step (the kept constant blocks must stay as they were)."""
    from planner.flushing.step import _augmented_step

    rng = np.random.default_rng(3)
    for _ in range(2):
        a = compartmental(rng, 4, 20.0)
        n = len(a)
        m = np.zeros((4 * n, 4 * n))
        m[:n, :n] = a
        for k in range(3):
            m[k * n:(k + 1) * n, (k + 1) * n:(k + 2) * n] = np.eye(n)
        ref = scipy.linalg.expm(m * tau)
        got = _augmented_step(a, tau)
        assert np.allclose(got, ref, rtol=1e-12, atol=1e-14)
