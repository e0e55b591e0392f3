"""One time step of the flushing simulation with frozen flows.

Over a step of ``h`` hours the link flows are held constant. Then:

- stirred volumes (tanks and fixed volumes, the well-stirred model
  ``V·c' = Σ q_in·(c_in − c)`` of [LEVENSPIEL-1999] [D]) follow a linear ODE
  solved *exactly* by a matrix exponential ([HIGHAM-2005],
  :mod:`planner.flushing.expm`) of an augmented system that also carries the
  pipe outflows entering them as quadratics in time and the first four
  repeated time integrals of every stirred composition (from which each
  stirred node's step mean and Legendre moments follow);
- pipes (plug flow, [LEVENSPIEL-1999] [P]) deliver what their parcel queues
  hold; when a step passes more than a pipe's volume, the part that enters and
  leaves within the step
  depends on this step's inflow, so all pipe outflow moments are found
  together from one small linear system (exact bookkeeping, no iteration);
- the new state comes from exact volume bookkeeping with those means, so every
  fuel is conserved to round-off however long the step.

Time in hours, volumes m³, flows m³/h, compositions as volume fractions (…, F).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from planner.flushing.expm import expm
from planner.flushing.network import FlowMatrices
from planner.flushing.pipes import PipeQueue, fresh_moments

_NO_FLOW = 1e-14


class Propagators:
    """Matrix exponentials of the augmented system for one set of flows and volumes.

    Augmented state ``z = [x (S), u, u', u'' (P each), X1 … X4 (S each)]``:
    stirred compositions, the pipe outflows entering them as quadratics in
    time (value and two derivatives), and the running repeated
    integrals of ``x`` (``X_k(h) = ∫(h − t)^(k−1) x dt / (k−1)!``, from which the
    step's Legendre moments of ``x`` follow). ``power(k)`` is ``exp(M·h_out·2^k)`` (k ≥ 0,
    by squaring); ``step(h)`` is ``exp(M·h)`` for any h.
    """

    def __init__(self, fm: FlowMatrices, volume_m3: np.ndarray, output_step_h: float) -> None:
        s, p = fm.sp.shape
        self.s, self.p = s, p
        n = 5 * s + 3 * p
        m = np.zeros((n, n))
        xs, us = slice(0, s), slice(s, s + p)
        ds, d2s = slice(s + p, s + 2 * p), slice(s + 2 * p, s + 3 * p)
        xk = [slice(s * k + 3 * p, s * (k + 1) + 3 * p) for k in range(1, 5)]
        m[xs, xs] = (fm.ss - np.diag(fm.stirred_in)) / volume_m3[:, None]
        m[xs, us] = fm.sp / volume_m3[:, None]
        m[us, ds] = np.eye(p)
        m[ds, d2s] = np.eye(p)
        m[xk[0], xs] = np.eye(s)
        for a, b in zip(xk[1:], xk, strict=False):
            m[a, b] = np.eye(s)
        self.matrix = m
        self.slices = (xs, us, ds, d2s, *xk)
        self.output_step_h = output_step_h
        self._powers: list[np.ndarray] = []
        self._steps: dict[float, np.ndarray] = {}

    def power(self, k: int) -> np.ndarray:
        """``exp(M·h_out·2^k)``, k ≥ 0."""
        if not self._powers:
            self._powers.append(expm(self.matrix * self.output_step_h))
        while len(self._powers) <= k:
            self._powers.append(self._powers[-1] @ self._powers[-1])
        return self._powers[k]

    def step(self, h: float) -> np.ndarray:
        """``exp(M·h)``: a power of the output propagator when ``h = h_out·2^k``."""
        ratio = h / self.output_step_h
        k = int(round(np.log2(ratio))) if ratio > 0.999 else -1
        if k >= 0 and abs(ratio - 2.0**k) <= 1e-9 * ratio:
            return self.power(k)
        if h not in self._steps:
            if len(self._steps) > 32:
                self._steps.clear()
            self._steps[h] = expm(self.matrix * h)
        return self._steps[h]

    def dense(self, z0: np.ndarray, count: int) -> np.ndarray:
        """``z`` at ``h_out, 2·h_out, …, count·h_out`` after ``z0``: shape (count, N, F)."""
        cur = z0[None]
        level = 0
        while cur.shape[0] < count + 1:
            cur = np.concatenate((cur, np.matmul(self.power(level), cur)), axis=0)
            level += 1
        return cur[1 : count + 1]


@dataclass
class StepResult:
    """What one step computes, before it is committed."""

    h: float
    z0: np.ndarray  # (N, F) augmented start state
    x_end: np.ndarray  # (S, F) ODE end state (left limit)
    stirred_mean: np.ndarray  # (S, F)
    pipe_in: np.ndarray  # (3, P, F) inlet mean, slope and curvature (the parcel to push)
    pipe_out: np.ndarray  # (2, P, F) outflow mean and slope
    shape_error: float  # largest cubic (P3) coefficient of a pipe inflow or outflow
    props: Propagators  # the propagators used (for dense output)


def compute_step(
    x0: np.ndarray,
    queues: list[PipeQueue],
    fm: FlowMatrices,
    props: Propagators,
    h: float,
) -> StepResult:
    """Solve one step with frozen flows, from the stirred state and the pipe queues.

    Stirred volumes follow the linear ODE exactly through ``exp(M·h)``
    ([LEVENSPIEL-1999] CSTR model; [HIGHAM-2005] for the exponential); the
    pipes' outflows are the parcels they hold plus, when the step passes more
    than a pipe's volume, what enters and leaves within the step, all found
    together from one linear system ([LEVENSPIEL-1999] plug flow, exact).

    Parameters
    ----------
    x0 : ndarray (S, F) [-]
        Volume fractions in each stirred node at the step start.
    queues : list of PipeQueue
        The pipes' content (read, not changed).
    fm : FlowMatrices
        The link flows held over the step [m³/h].
    props : Propagators
        The matrix exponentials for these flows and volumes.
    h : float [h]
        Step length.

    Returns
    -------
    StepResult
        Means and moments over the step, the end state, and the cubic part
        the quadratic profiles leave out [-] (exact for stirred volumes and
        plug flow; the pipes carry quadratic profiles, so a stirred outflow
        entering a pipe is approximated to that cubic part).
    """
    p, f = props.p, x0.shape[1]
    xs = props.slices[0]
    big = props.step(h)
    rows = _moment_rows(big, props.slices, h)
    queued = _queued_outflow(queues, fm.pipe_flow, h, f)
    ws, wp = _inflow_weights(fm, queued.flowing)
    o0, o1, o2 = _pipe_outflows(queued, _outflow_maps(rows, props.slices, h), ws, wp, x0)
    z0 = _augmented_start(big.shape[0], props.slices, x0, (o0, o1, o2), h)
    mean_x = rows.mean @ z0
    i0 = ws @ mean_x + wp @ o0
    i1 = ws @ (rows.slope @ z0) + wp @ o1
    i2 = ws @ (rows.curvature @ z0) + wp @ o2
    x_end = big[xs] @ z0
    shape = _shape_error(fm, queued, ws @ (rows.cubic @ z0), (i0, i1, i2)) if p else 0.0
    pipe_in = np.stack((i0, i1, i2))
    return StepResult(h, z0, x_end, mean_x, pipe_in, np.stack((o0, o1)), shape, props)


@dataclass(frozen=True)
class _MomentRows:
    """Rows of ``exp(M·h)`` giving the step's Legendre moments of ``x`` from ``z0`` (S, N)."""

    mean: np.ndarray
    slope: np.ndarray
    curvature: np.ndarray
    cubic: np.ndarray


def _moment_rows(big: np.ndarray, slices: tuple[slice, ...], h: float) -> _MomentRows:
    """Legendre moments of x over the step from its repeated integrals X1 … X4 at h."""
    x1, x2, x3, x4 = slices[4:]
    rm = big[x1] / h  # step mean of x, as a map of z0
    rl = 3.0 * (big[x1] / h - 2.0 * big[x2] / (h * h))  # Legendre slope of x
    rq = 5.0 * (big[x1] / h - 6.0 * big[x2] / h**2 + 12.0 * big[x3] / h**3)  # curvature
    # cubic Legendre coefficient: P3(1 − v) = −P3(v), ∫(1 − u)^(k−1)·x du = (k−1)!·X_k/h^k
    rc = -7.0 * (
        120.0 * big[x4] / h**4 - 60.0 * big[x3] / h**3 + 12.0 * big[x2] / h**2 - big[x1] / h
    )
    return _MomentRows(rm, rl, rq, rc)


@dataclass(frozen=True)
class _QueuedOutflow:
    """What the parcels now in each pipe deliver over the step, and the map of the rest."""

    known: np.ndarray  # (4, P, F) outflow moments from the parcels now in each pipe
    fresh: np.ndarray  # (P, 4, 3) map from this step's inflow moments to the outflow's
    flowing: np.ndarray  # (P,) bool


def _queued_outflow(
    queues: list[PipeQueue], pipe_flow_m3h: np.ndarray, h: float, n_fuels: int
) -> _QueuedOutflow:
    """Outflow moments of each pipe's present content over a step of ``h`` hours."""
    p = len(queues)
    flowing = pipe_flow_m3h > _NO_FLOW
    known = np.zeros((4, p, n_fuels))
    fresh = np.zeros((p, 4, 3))
    for i, queue in enumerate(queues):
        if not flowing[i]:
            known[0, i] = queue.outlet()
            continue
        through = pipe_flow_m3h[i] * h
        known[:, i] = queue.window(min(queue.volume_m3, through), through)
        fresh[i] = fresh_moments(queue.volume_m3, through)
    return _QueuedOutflow(known, fresh, flowing)


def _inflow_weights(fm: FlowMatrices, flowing: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Shares of each pipe's inflow from each stirred node (P, S) and each pipe (P, P)."""
    qp = fm.pipe_flow
    with np.errstate(invalid="ignore", divide="ignore"):
        ws = np.where(flowing[:, None], fm.ps / qp[:, None], 0.0)
        wp = np.where(flowing[:, None], fm.pp / qp[:, None], 0.0)
    return ws, wp


_Maps = list[tuple[np.ndarray, np.ndarray, np.ndarray, np.ndarray]]


def _outflow_maps(rows: _MomentRows, slices: tuple[slice, ...], h: float) -> _Maps:
    """Legendre moments (mean, slope, curvature) of x as maps of x0, O0, O1, O2.

    A pipe outflow O0 + O1·P1(τ) + O2·P2(τ) enters the ODE as
    u(0) = O0 − O1 + O2, u'(0) = (2·O1 − 6·O2)/h, u''(0) = 12·O2/h².
    """
    xs, us, ds, d2s = slices[:4]
    return [
        (
            r[:, xs],
            r[:, us],
            -r[:, us] + (2.0 / h) * r[:, ds],
            r[:, us] - (6.0 / h) * r[:, ds] + (12.0 / h**2) * r[:, d2s],
        )
        for r in (rows.mean, rows.slope, rows.curvature)
    ]


def _pipe_outflows(
    queued: _QueuedOutflow, maps: _Maps, ws: np.ndarray, wp: np.ndarray, x0: np.ndarray
) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Outflow moments O0, O1, O2 (P, F) of every pipe over the step.

    ``y = [O0; O1; O2]``; the inflow moments are ``I_j = ws·(moment j of x) + wp·O_j``
    and ``O = K + F·I``: one linear system when any pipe passes more than its
    volume in the step, else just the parcels now in the pipes.
    """
    known, fresh = queued.known, queued.fresh
    if not np.any(fresh):
        return known[0], known[1], known[2]
    p, f = fresh.shape[0], x0.shape[1]
    tx = np.vstack([ws @ mp[0] for mp in maps])
    ty = np.zeros((3 * p, 3 * p))
    for j, mp in enumerate(maps):
        for col in range(3):
            ty[j * p : (j + 1) * p, col * p : (col + 1) * p] = ws @ mp[col + 1]
        ty[j * p : (j + 1) * p, j * p : (j + 1) * p] += wp
    fd = np.zeros((3 * p, 3 * p))
    diag = np.arange(p)
    for r_ in range(3):
        for c_ in range(3):
            fd[r_ * p + diag, c_ * p + diag] = fresh[:, r_, c_]
    rhs = known[:3].reshape(3 * p, f) + fd @ (tx @ x0)
    y = np.linalg.solve(np.eye(3 * p) - fd @ ty, rhs)
    return y[:p], y[p : 2 * p], y[2 * p :]


def _augmented_start(
    n: int,
    slices: tuple[slice, ...],
    x0: np.ndarray,
    outflow: tuple[np.ndarray, np.ndarray, np.ndarray],
    h: float,
) -> np.ndarray:
    """The augmented start state ``z0`` (N, F): x0, the pipe outflows as quadratics, X = 0."""
    xs, us, ds, d2s = slices[:4]
    o0, o1, o2 = outflow
    z0 = np.zeros((n, x0.shape[1]))
    z0[xs] = x0
    z0[us] = o0 - o1 + o2
    z0[ds] = (2.0 * o1 - 6.0 * o2) / h
    z0[d2s] = (12.0 / h**2) * o2
    return z0


def _shape_error(
    fm: FlowMatrices,
    queued: _QueuedOutflow,
    i3: np.ndarray,
    inflow: tuple[np.ndarray, np.ndarray, np.ndarray],
) -> float:
    """What the quadratic profiles leave out: the largest cubic coefficient [-].

    The cubic part ``i3`` of every pipe's inflow, and of the outflow of the
    parcels entering a stirred volume.
    """
    fresh, flowing = queued.fresh, queued.flowing
    o3 = queued.known[3] + sum(fresh[:, 3, j][:, None] * m for j, m in enumerate(inflow))
    to_stirred = fm.sp.sum(axis=0) > 0.0
    return float(
        max(
            np.abs(o3[flowing & to_stirred]).max(initial=0.0),
            np.abs(i3[flowing]).max(initial=0.0),
        )
    )


def commit_step(
    step: StepResult,
    x0: np.ndarray,
    volume_m3: np.ndarray,
    is_tank: np.ndarray,
    queues: list[PipeQueue],
    fm: FlowMatrices,
) -> tuple[np.ndarray, np.ndarray]:
    """Advance the pipe queues in place and return the new stirred state (bookkeeping).

    Parameters
    ----------
    step : StepResult
        The step, from :func:`compute_step`.
    x0 : ndarray (S, F) [-]
        Volume fractions in each stirred node at the step start.
    volume_m3 : ndarray (S,) [m³]
        Stirred volumes at the step start.
    is_tank : ndarray (S,) of bool [-]
        Which stirred nodes are tanks (their volume changes).
    queues : list of PipeQueue
        The pipes' content: each takes in the step's inflow parcel and gives
        out its throughput.
    fm : FlowMatrices
        The flows held over the step [m³/h].

    Returns
    -------
    x : ndarray (S, F) [-]
        Volume fractions at the step end, from the content
        ``V·x0 + h·(Σ q_in·mean_in − q_out·mean_x)`` over the new volume:
        every fuel is conserved to round-off however long the step
        ([LEVENSPIEL-1999] mass balance [D]).
    volume_m3 : ndarray (S,) [m³]
        Stirred volumes at the step end (tanks ``V + h·(q_in − q_out)``).
    """
    h = step.h
    mean_x = step.stirred_mean
    o0 = step.pipe_out[0]
    content = volume_m3[:, None] * x0 + h * (fm.ss @ mean_x + fm.sp @ o0)
    content -= h * fm.stirred_out[:, None] * mean_x
    new_volume = np.where(is_tank, volume_m3 + h * (fm.stirred_in - fm.stirred_out), volume_m3)
    with np.errstate(invalid="ignore", divide="ignore"):
        x_new = np.where(new_volume[:, None] > 0.0, content / new_volume[:, None], x0)
    for i, queue in enumerate(queues):
        through = fm.pipe_flow[i] * h
        if through > _NO_FLOW * h:
            queue.push(through, step.pipe_in[:, i])
            queue.pop(through)
    return x_new, new_volume
