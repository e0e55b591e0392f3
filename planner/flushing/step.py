"""One time step of the flushing simulation with frozen flows.

Over a step of ``h`` hours the link flows are held constant. Then:

- stirred volumes (tanks and fixed volumes, the well-stirred model
  ``V·c' = Σ q_in·(c_in − c)`` of [LEVENSPIEL-1999] [D]) follow the linear ODE
  ``x' = A·x + g(t)``, where ``g = Bp·u`` carries the pipe outflows ``u``
  entering them, quadratics in time. Its solution and the first four repeated
  time integrals of ``x`` (from which each stirred node's step mean and
  Legendre moments follow) are exact sums of ``G_k = h^k·φ_k(A·h)``, k = 0 … 7,
  applied to ``x(0)`` and to the inputs' Taylor coefficients
  (:mod:`planner.flushing.phi`, [HIGHAM-2005]); those sums depend on ``A`` and
  ``h`` only, so they are kept (:class:`StepMaps`) and reused while the
  stirred volumes' flows do not change;
- pipes (plug flow, [LEVENSPIEL-1999] [P]) deliver what their parcels hold;
  when a step passes more than a pipe's volume, the part that enters and
  leaves within the step depends on this step's inflow, so all pipe outflow
  moments are found together from one small linear system (exact
  bookkeeping, no iteration);
- the new state comes from exact volume bookkeeping with those means, so every
  fuel is conserved to round-off however long the step.

Time in hours, volumes m³, flows m³/h, compositions as volume fractions (…, F).
"""

from __future__ import annotations

import math
from typing import NamedTuple

import numpy as np

from planner.flushing.phi import phi_double, phi_stack

try:  # the LAPACK gesv kernel numpy.linalg.solve calls, without its per-call checks
    from numpy.linalg._umath_linalg import solve as _gesv
except ImportError:  # pragma: no cover - a numpy without it
    _gesv = None

_ORDER = 7  # φ_0 … φ_7: the end state and four repeated integrals of a quadratic input
_CACHED_STEPS = 64  # step lengths kept per stirred-volume matrix
_CACHED_MATRICES = 8  # stirred-volume matrices kept


def _moment_coefficients() -> np.ndarray:
    """``C`` (20, 8): the step maps as sums of φ_k (module docstring, [D]).

    With ``z_n = X_n/h^n`` (``X_0 = x(h)``, ``X_n = ∫(h − t)^(n−1)/(n−1)!·x dt``)
    and the input in Legendre form ``g = g0 + g1·P1(t/h) + g2·P2(t/h)`` (Taylor
    coefficients ``a0 = g0 − g1 + g2``, ``a1 = (2g1 − 6g2)/h``, ``a2 = 12g2/h²``):
    ``z_n = φ_n·x0 + h·[φ_{n+1}·g0 + (2φ_{n+2} − φ_{n+1})·g1
    + (φ_{n+1} − 6φ_{n+2} + 12φ_{n+3})·g2]``; the outputs are the end state
    ``z_0``, the mean ``z_1``, and the Legendre slope ``3(z_1 − 2z_2)``,
    curvature ``5(z_1 − 6z_2 + 12z_3)`` and cubic ``7(z_1 − 12z_2 + 60z_3 − 120z_4)``.
    Rows (output, input) with outputs end, mean, slope, curvature, cubic and
    inputs x0, g0, g1, g2.
    """
    z = np.zeros((5, 4, _ORDER + 1))
    for n in range(5):
        z[n, 0, n] = 1.0
        z[n, 1, n + 1] = 1.0
        z[n, 2, n + 1], z[n, 2, n + 2] = -1.0, 2.0
        z[n, 3, n + 1], z[n, 3, n + 2], z[n, 3, n + 3] = 1.0, -6.0, 12.0
    outputs = np.array(
        [
            [1.0, 0.0, 0.0, 0.0, 0.0],
            [0.0, 1.0, 0.0, 0.0, 0.0],
            [0.0, 3.0, -6.0, 0.0, 0.0],
            [0.0, 5.0, -30.0, 60.0, 0.0],
            [0.0, 7.0, -84.0, 420.0, -840.0],
        ]
    )
    return np.einsum("mn,nik->mik", outputs, z).reshape(20, _ORDER + 1)


_COEF = _moment_coefficients()


class StepMaps:
    """The linear maps of one step of ``h`` hours for one stirred-volume matrix ``A``.

    ``from_x`` (5S, S) and ``from_g`` (5S, 3S) give the end state and the
    step's mean, Legendre slope, curvature and cubic of every stirred node
    (five blocks of S rows) from ``x(0)`` and from the Legendre coefficients
    ``g0, g1, g2`` of the pipe outflows entering them; ``by_row`` (15S, S) is
    ``from_g`` with its rows split by input moment (row (output, node, input)),
    so that one product with ``Bp`` gives the map from the pipe outflow moments.
    """

    __slots__ = ("h", "phi", "from_x", "from_g", "by_row")

    def __init__(self, phi: np.ndarray, h: float) -> None:
        s = phi.shape[1]
        r = _COEF.dot(phi.reshape(_ORDER + 1, s * s)).reshape(5, 4, s, s)
        r[:, 1:] *= h
        full = r.transpose(0, 2, 1, 3).reshape(5 * s, 4 * s)
        self.h, self.phi = h, phi
        self.from_x = np.ascontiguousarray(full[:, :s])
        self.from_g = np.ascontiguousarray(full[:, s:])
        self.by_row = self.from_g.reshape(15 * s, s)


class Propagators:
    """The :class:`StepMaps` of one stirred-volume matrix ``A`` (1/h), by step length.

    A step twice one already known is found by one application of the
    doubling identity (:func:`~planner.flushing.phi.phi_double`). ``dense``
    gives the stirred state at the output times inside a step.
    """

    def __init__(self, a: np.ndarray, output_step_h: float) -> None:
        self.a = a
        self.output_step_h = output_step_h
        self._maps: dict[float, StepMaps] = {}
        self._dense: list[np.ndarray] = []

    def maps(self, h: float) -> StepMaps:
        """The :class:`StepMaps` of a step of ``h`` hours."""
        found = self._maps.get(h)
        if found is None:
            half = self._maps.get(0.5 * h)
            phi = phi_double(half.phi) if half is not None else phi_stack(self.a * h, _ORDER)
            if len(self._maps) >= _CACHED_STEPS:
                self._maps.clear()
            found = self._maps[h] = StepMaps(phi, h)
        return found

    def dense(self, y0: np.ndarray, count: int) -> np.ndarray:
        """``x`` at ``h_out, 2·h_out, …, count·h_out`` into a step: (count, S, F).

        ``y0`` (4S, F) is ``[x(0); a0; a1; a2]``, the state and the Taylor
        coefficients of the input ``g``; ``[x, g, g', g'']`` advances by
        ``exp`` of its augmented matrix over ``h_out`` (blocks ``G_k``), applied
        by repeated squaring.
        """
        if not self._dense:
            self._dense.append(_augmented_step(self.a, self.output_step_h))
        cur = y0[None]
        level = 0
        while cur.shape[0] < count + 1:
            if len(self._dense) <= level:
                self._dense.append(self._dense[-1] @ self._dense[-1])
            cur = np.concatenate((cur, np.matmul(self._dense[level], cur)), axis=0)
            level += 1
        return cur[1 : count + 1, : self.a.shape[0]]


def _augmented_step(a: np.ndarray, tau: float) -> np.ndarray:
    """``exp`` over ``tau`` of ``[x, g, g', g'']`` with ``x' = A·x + g`` and ``g''' = 0``."""
    s = a.shape[0]
    phi = phi_stack(a * tau, 3)
    e = _augmented_template(s, tau).copy()
    for k in range(4):
        e[:s, k * s : (k + 1) * s] = tau**k * phi[k]
    return e


_TEMPLATES: dict[tuple[int, float], np.ndarray] = {}


def _augmented_template(s: int, tau: float) -> np.ndarray:
    """The matrix of :func:`_augmented_step` but its first block row (zero here): the
    Taylor shifts of the input, which depend on the size and ``tau`` only (kept)."""
    found = _TEMPLATES.get((s, tau))
    if found is None:
        eye = np.eye(s)
        found = np.zeros((4 * s, 4 * s))
        for row in range(1, 4):
            for k in range(row, 4):
                shift = tau ** (k - row) / _FACT[k - row]  # g^(row) advances by Taylor's formula
                found[row * s : (row + 1) * s, k * s : (k + 1) * s] = shift * eye
        if len(_TEMPLATES) >= _CACHED_MATRICES:
            _TEMPLATES.clear()
        _TEMPLATES[(s, tau)] = found
    return found


_FACT = (1.0, 1.0, 2.0, 6.0)


class PropagatorCache:
    """:class:`Propagators` by the stirred-volume matrix, compared to the last bit."""

    def __init__(self, output_step_h: float) -> None:
        self.output_step_h = output_step_h
        self._by_matrix: dict[bytes, Propagators] = {}

    def get(self, a: np.ndarray) -> Propagators:
        """The :class:`Propagators` of the stirred-volume matrix ``a`` (S, S) [1/h]."""
        key = a.tobytes()
        found = self._by_matrix.get(key)
        if found is None:
            if len(self._by_matrix) >= _CACHED_MATRICES:
                self._by_matrix.clear()
            found = self._by_matrix[key] = Propagators(a.copy(), self.output_step_h)
        return found


class StepResult(NamedTuple):
    """What one step computes, before it is committed."""

    h: float
    moments: np.ndarray  # (5, S, F): end state, mean, slope, curvature, cubic of x
    outflow: np.ndarray  # (3, P, F): pipe outflow mean, slope and curvature
    inflow: np.ndarray  # (4, P, F): pipe inflow mean, slope, curvature (the parcel to push),
    #                     and the cubic part of its stirred share
    shape_error: float  # largest cubic coefficient the quadratic profiles leave out [-]


def compute_step(
    x0: np.ndarray,
    known: np.ndarray,
    fresh: np.ndarray | None,
    bp: np.ndarray,
    shares: Shares,
    maps: StepMaps,
    checked: np.ndarray,
) -> StepResult:
    """Solve one step with frozen flows, from the stirred state and the pipes' content.

    Stirred volumes follow the linear ODE exactly through the step maps
    ([LEVENSPIEL-1999] CSTR model; [HIGHAM-2005] for the exponential); the
    pipes' outflows are the parcels they hold plus, when the step passes more
    than a pipe's volume, what enters and leaves within the step, all found
    together from one linear system ([LEVENSPIEL-1999] plug flow, exact).

    Parameters
    ----------
    x0 : ndarray (S, F) [-]
        Volume fractions in each stirred node at the step start.
    known : ndarray (P, 4, F) [-]
        Outflow moments (mean, slope, curvature, cubic) from the parcels now
        in each pipe (:meth:`~planner.flushing.pipes.PipeSet.window`).
    fresh : ndarray (P, 4, 3) or None [-]
        The map from each pipe's inflow moments to its outflow's
        (:func:`~planner.flushing.pipes.fresh_maps`); None when no pipe passes
        more than its volume.
    bp : ndarray (S, P) [1/h]
        Pipe outflow into each stirred volume over its volume.
    shares : Shares
        Share of each pipe's inflow from each stirred volume and each pipe [-].
    maps : StepMaps
        The stirred-volume maps for this step length and these flows.
    checked : ndarray (2, P) [-]
        1 where the cubic part counts toward the error: of a pipe's inflow
        (first row), of a pipe's outflow into a stirred volume (second row).

    Returns
    -------
    StepResult
        Moments of the stirred compositions and of the pipe outflows and
        inflows over the step [-]: exact for stirred volumes and plug flow; the
        pipes carry quadratic profiles, so a stirred outflow entering a pipe is
        approximated to its cubic part (``shape_error``, the error estimate).
    """
    s, p = bp.shape
    f = x0.shape[1]
    mx = maps.from_x.dot(x0)
    from_out = maps.by_row.dot(bp).reshape(5 * s, 3 * p)  # the map from_g·(1 ⊗ Bp)
    if fresh is None:
        out = known[:, :3].transpose(1, 0, 2)
        out2 = out.reshape(3 * p, f)
    else:
        solved = _pipe_outflows(from_out, mx, known, fresh, s, shares)  # (4P, F)
        out2 = solved[: 3 * p]
        out = out2.reshape(3, p, f)
    moments = mx + from_out.dot(out2)
    both = np.empty((5 * p, f))  # the inflow moments (moment, pipe), then the outflow cubic
    np.dot(shares.ws_blocks, moments[s:], out=both[: 4 * p])
    both[: 3 * p] += shares.wp_blocks.dot(out2)
    inflow = both[: 4 * p].reshape(4, p, f)
    moments = moments.reshape(5, s, f)
    shape = 0.0
    if p:
        both[4 * p :] = known[:, 3] if fresh is None else solved[3 * p :]
        cubic = np.abs(both[3 * p :])  # (2P, F): the cubic parts of the inflow, the outflow
        cubic *= checked.reshape(2 * p, 1)
        shape = float(np.maximum.reduce(cubic, axis=None))
    return StepResult(maps.h, moments, out, inflow, shape)


class Shares(NamedTuple):
    """Each pipe's inflow shares ``ws`` from the stirred volumes and ``wp`` from the pipes,
    on the diagonal blocks of the moments' maps, moment by moment (all [-])."""

    ws_blocks: np.ndarray  # (4P, 4S): ws on the diagonal blocks, one per moment
    wp_blocks: np.ndarray  # (3P, 3P): wp on the diagonal blocks, one per moment
    w_blocks: np.ndarray  # (3P, 3S + 3P): the first three of each, side by side


def shares_of(w_in: np.ndarray, s: int) -> Shares:
    """The :class:`Shares` of the inflow shares ``w_in`` (P, S + P) [-].

    Parameters
    ----------
    w_in : ndarray (P, S + P) [-]
        Share of each pipe's inflow from each stirred volume, then each pipe.
    s : int [-]
        Number of stirred volumes S.

    Returns
    -------
    Shares
        ``ws`` (P, S) and ``wp`` (P, P) on the diagonal blocks of a (4P, 4S) and a
        (3P, 3P) array, and the first three blocks of both side by side (3P, 3S + 3P).
    """
    p = w_in.shape[0]
    ws_blocks, wp_blocks = np.zeros((4 * p, 4 * s)), np.zeros((3 * p, 3 * p))
    for j in range(4):
        ws_blocks[j * p : (j + 1) * p, j * s : (j + 1) * s] = w_in[:, :s]
        if j < 3:
            wp_blocks[j * p : (j + 1) * p, j * p : (j + 1) * p] = w_in[:, s:]
    both = np.concatenate((ws_blocks[: 3 * p, : 3 * s], wp_blocks), axis=1)
    return Shares(ws_blocks, wp_blocks, both)


def _pipe_outflows(
    from_out: np.ndarray,
    mx: np.ndarray,
    known: np.ndarray,
    fresh: np.ndarray,
    s: int,
    shares: Shares,
) -> np.ndarray:
    """Outflow moments O0 … O3 of every pipe over the step (4P, F: moment, pipe).

    The inflow moments are ``I_j = ws·(moment j of x) + wp·O_j`` (j < 3) and
    ``O = K + F·I``, where moment j of ``x`` is ``from_x·x0 + from_out·O``: with
    the unknowns ordered (moment, pipe) and the equations (pipe, moment),
    ``(Π − F·T)·O = K + F·U`` (Π the permutation between the two orders). The
    cubic O3, which nothing depends on, is solved for with the rest (its own
    column of T is 0): the part of the outflow the quadratic profiles leave out.
    """
    p, f = known.shape[0], mx.shape[1]
    aug = _augmented(s, p, f)  # [[from_out, 0, moments of x(0)], [1, 0, 0]] (mean … curvature)
    aug[: 3 * s, : 3 * p] = from_out[s : 4 * s]
    aug[: 3 * s, 4 * p :] = mx[s : 4 * s]
    tu = shares.w_blocks.dot(aug)  # (3P, 4P + F): [T | 0 | U], moment, pipe
    ftu = np.matmul(fresh, tu.reshape(3, p, -1).transpose(1, 0, 2))
    ftu = ftu.reshape(4 * p, 4 * p + f)
    system = _permutation(p) - ftu[:, : 4 * p]
    rhs = known.reshape(4 * p, f) + ftu[:, 4 * p :]
    return _solve(system, rhs)


def _solve(a: np.ndarray, b: np.ndarray) -> np.ndarray:
    """``numpy.linalg.solve(a, b)`` for a square ``a`` and a 2-D ``b`` of floats, the same
    kernel and so the same result; a singular ``a`` (a result not finite) goes through
    ``numpy.linalg.solve`` for its error."""
    if _gesv is not None:
        r = _gesv(a, b, signature="dd->d")
        if math.isfinite(r.item(0)):  # singular: all NaN
            return r
    return np.linalg.solve(a, b)


_AUGMENTED: dict[tuple[int, int, int], np.ndarray] = {}
_PERMUTATIONS: dict[int, np.ndarray] = {}


def _augmented(s: int, p: int, f: int) -> np.ndarray:
    """A work array (3S + 3P, 4P + F) for :func:`_pipe_outflows`: its last 3P rows hold
    ``[1, 0, 0]``, the first 3S are written at each step but for their zero columns
    3P … 4P − 1 (the cubic, which no inflow depends on)."""
    found = _AUGMENTED.get((s, p, f))
    if found is None:
        found = _AUGMENTED[(s, p, f)] = np.zeros((3 * s + 3 * p, 4 * p + f))
        found[3 * s :, : 3 * p] = np.eye(3 * p)
    return found


def _permutation(p: int) -> np.ndarray:
    """Π (4P, 4P): row (pipe q, moment i) has its 1 in column (moment i, pipe q)."""
    found = _PERMUTATIONS.get(p)
    if found is None:
        found = _PERMUTATIONS[p] = np.zeros((4 * p, 4 * p))
        found[np.arange(4 * p), (np.arange(4 * p) % 4) * p + np.arange(4 * p) // 4] = 1.0
    return found


def dense_start(x0: np.ndarray, g: np.ndarray, h: float) -> np.ndarray:
    """``[x(0); a0; a1; a2]`` (4S, F) for :meth:`Propagators.dense`.

    Parameters
    ----------
    x0 : ndarray (S, F) [-]
        Stirred compositions at the step start.
    g : ndarray (3, S, F) [1/h]
        Legendre coefficients of the pipe outflows into the stirred volumes.
    h : float [h]
        Step length.

    Returns
    -------
    ndarray (4S, F) [-, 1/h, 1/h², 1/h³]
        The state and the input's Taylor coefficients at the step start.
    """
    a0 = g[0] - g[1] + g[2]
    a1 = (2.0 * g[1] - 6.0 * g[2]) / h
    a2 = (12.0 / (h * h)) * g[2]
    return np.concatenate((x0, a0, a1, a2))
