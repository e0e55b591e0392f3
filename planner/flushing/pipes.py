"""Plug flow in the pipes: first-in first-out queues of parcels, every pipe in one array.

A pipe of volume V delays its inlet by exactly the time its throughput takes
to reach V, whatever the flow does meanwhile ([LEVENSPIEL-1999] plug flow as
a pure delay [P]): the content is a queue of parcels, each a volume with a
quadratic composition profile along it, kept as shifted-Legendre
coefficients over the parcel (``s`` from 0 at its outlet end to 1 at its
inlet end): ``c(s) = m + g·(2s − 1) + k·(6s² − 6s + 1)``, mean ``m``, slope
``g``, curvature ``k``. Composition is a vector of volume fractions of the
distinct fuels. Volumes are in m³; positions ``ξ`` are measured from the
outlet, in m³ of throughput.

A parcel is never rewritten: a step pushes one parcel in at ``ξ = V`` and
moves every parcel ``W`` (the step's throughput) towards the outlet; a parcel
that straddles the outlet keeps its coefficients, only its part past 0 being
in the pipe, and one wholly past it is dropped. Windows and samples integrate
or evaluate the profiles exactly (three-point Gauss-Legendre quadrature is
exact to degree 5, [GAUSS-LEGENDRE] [P]), so the pipes conserve every fuel to
round-off. All pipes are worked on together: the parcels of pipe ``p`` are
the columns ``head[p] … tail[p] − 1`` of one padded array.
"""

from __future__ import annotations

import numpy as np

_WEIGHTS = np.array([1.0, 3.0, 5.0, 7.0])  # 2j + 1 for the Legendre coefficients
# three-point Gauss-Legendre rule on [0, 1] ([GAUSS-LEGENDRE] [P])
_GAUSS_X = 0.5 + 0.5 * np.array([-np.sqrt(0.6), 0.0, np.sqrt(0.6)])  # nodes
_GAUSS_W = np.array([5.0, 8.0, 5.0]) / 18.0  # their weights (sum 1)
_GONE = 1e-13  # a parcel with less than this part of it left in the pipe has left it
_SLACK = 1e-12  # a left limit this close (relative to the pipe volume) to a boundary is before it
_CAPACITY = 16  # parcels per pipe the arrays start with
_FAR = 1e30  # where unused and departed columns start [m³]: far, and cubed still finite
_HALF_FAR = 0.5 * _FAR
# _LEGENDRE_POWERS[n, j]: coefficient of z^n in the shifted Legendre polynomial P_j(z)
_LEGENDRE_POWERS = np.array(
    [[1.0, -1.0, 1.0, -1.0], [0.0, 2.0, -6.0, 12.0], [0.0, 0.0, 6.0, -30.0], [0.0, 0.0, 0.0, 20.0]]
)
# from the powers 0 … 3 of a parcel position s, then of a window position u, to P0 … P2 at
# s and (2j + 1)·Pj, j = 0 … 3, at u: (8, 7)
_TO_LEGENDRE = np.zeros((8, 7))
_TO_LEGENDRE[:4, :3] = _LEGENDRE_POWERS[:, :3]
_TO_LEGENDRE[4:, 3:] = _LEGENDRE_POWERS * _WEIGHTS
_FROM_POWERS = np.ascontiguousarray(_TO_LEGENDRE[[0, 4, 1, 5, 2, 6, 3, 7]].T)  # (7, 8):
# the same from the powers ordered (power, s or u)


class PipeSet:
    """The parcels in every pipe, outlet first, with ``n_fuels`` columns of composition.

    Column ``c`` of every pipe holds the parcel it took in at the ``c``-th step
    since the arrays were last compacted (one per step for every pipe: a pipe
    that did not flow takes in nothing, a column that starts far beyond its
    inlet). ``start`` (N, P): distance of each parcel's outlet end from its
    pipe's outlet, m³ (negative for the parcel straddling the outlet);
    ``length`` (N, P), m³; ``coef`` (N, P, 3, F): mean, slope, curvature.
    A column not in use starts far beyond the inlet and a parcel that has
    left far before the outlet, so neither has any part in a window. Pipe
    ``p`` holds columns ``head[p] … hi − 1``.
    """

    def __init__(self, volume_m3: np.ndarray, composition: np.ndarray) -> None:
        comp = np.asarray(composition, dtype=float)
        p, f = comp.shape
        self.volume_m3 = np.asarray(volume_m3, dtype=float).reshape(p)
        self.start = np.full((_CAPACITY, p), _FAR)
        self.start[0] = 0.0
        self.length = np.ones((_CAPACITY, p))
        self.length[0] = self.volume_m3
        self.coef = np.zeros((_CAPACITY, p, 3, f))
        self.coef[0, :, 0] = comp
        self.head = np.zeros(p, dtype=int)
        self._rows = np.arange(p)
        self._lo, self._hi = 0, 1  # the columns in use: least head, one past the last
        self._powers: dict[int, np.ndarray] = {}  # window's work arrays, by column count

    def window(self, width_m3: np.ndarray, inv_throughput: np.ndarray) -> np.ndarray:
        """Outflow moments of each pipe's first ``width_m3`` (P,) for a step passing W.

        Returns (P, 4, F): the Legendre coefficients ``(2j + 1)·∫c·P_j(ξ/W) dξ / W``,
        j = 0 … 3 (mean, slope, curvature, cubic), with ``1/W = inv_throughput``
        (P,) per pipe: the parts of the step's outflow contributed by the
        parcels now in the pipe.
        """
        lo, hi = self._lo, self._hi
        st, ln = self.start[lo:hi], self.length[lo:hi]  # (n, P), read only
        n, p = st.shape
        if not p:
            return np.zeros((0, 4, self.coef.shape[-1]))
        a = np.maximum(st, 0.0)
        wid = np.minimum(st + ln, width_m3)
        wid -= a
        np.maximum(wid, 0.0, out=wid)
        pw = self._powers.get(n)  # powers 0 … 3 of the nodes' s and u: (4, 2, n, P, 3)
        if pw is None:
            pw = self._powers[n] = np.ones((4, 2, n, p, 3))
        xi = np.multiply(wid[..., None], _GAUSS_X, out=pw[1, 1])
        xi += a[..., None]  # outlet distance of the Gauss nodes of each piece
        s1 = np.subtract(xi, st[..., None], out=pw[1, 0])
        s1 /= ln[..., None]  # ... as parcel positions s
        xi *= inv_throughput[:, None]  # ... and as window positions u
        np.multiply(pw[1], pw[1], out=pw[2])
        np.multiply(pw[2], pw[1], out=pw[3])
        leg = _FROM_POWERS.dot(pw.reshape(8, -1)).reshape(7, n, p, 3)  # P0 … P2 at s, P0 … P3 at u
        c = np.matmul(leg[:3].transpose(1, 2, 3, 0), self.coef[lo:hi])  # (n, P, 3, F)
        c *= np.multiply((wid * inv_throughput)[..., None], _GAUSS_W)[..., None]
        m = leg[3:].transpose(2, 0, 1, 3).reshape(p, 4, 3 * n)
        return np.matmul(m, c.transpose(1, 0, 2, 3).reshape(p, 3 * n, -1))

    def outlets(self) -> np.ndarray:
        """Composition just inside each outlet (P, F): the right limit at ξ = 0."""
        rows, h = self._rows, self.head
        s = np.maximum(-self.start[h, rows], 0.0) / self.length[h, rows]
        return profile(self.coef[h, rows], s)

    def content_m3(self) -> np.ndarray:
        """Volume of each fuel in all the pipes together (F,), m³: each parcel's profile
        integrated exactly over its part inside, ``∫P1 = s² − s``, ``∫P2 = 2s³ − 3s² + s``."""
        lo, hi = self._lo, self._hi
        st, ln = self.start[lo:hi], self.length[lo:hi]
        s0 = (np.maximum(st, 0.0) - st) / ln
        s1 = np.maximum((np.minimum(st + ln, self.volume_m3) - st) / ln, s0)
        parts = np.stack(
            (s1 - s0, s1 * (s1 - 1.0) - s0 * (s0 - 1.0),
             ((2.0 * s1 - 3.0) * s1 + 1.0) * s1 - ((2.0 * s0 - 3.0) * s0 + 1.0) * s0), axis=-1)
        return np.einsum("np,npb,npbf->f", ln, parts, self.coef[lo:hi])

    def max_linear(self, w: np.ndarray, pipes: np.ndarray) -> float:
        """An upper bound of ``w·c`` (``w`` (F,)) over every parcel with a part inside the
        pipes selected by ``pipes`` (P,) bool: ``w·m + |w·g| + max(w·k, −w·k/2)`` (|P₁| ≤ 1,
        −½ ≤ P₂ ≤ 1). −inf when no parcel is inside them."""
        lo, hi = self._lo, self._hi
        st, ln = self.start[lo:hi], self.length[lo:hi]
        inside = (st < self.volume_m3) & (st + ln > 0.0) & pipes
        if not inside.any():
            return -np.inf
        g = self.coef[lo:hi][inside] @ w  # (n, 3)
        bound = g[:, 0] + np.abs(g[:, 1]) + np.maximum(g[:, 2], -0.5 * g[:, 2])
        return float(bound.max())

    def push(self, volume_m3: np.ndarray, coefficients: np.ndarray, every: bool) -> None:
        """Add a parcel at the inlet end of every pipe: ``volume_m3`` (P,) m³ of
        ``coefficients`` (P, 3, F); unless ``every``, pipes with no volume take none."""
        if self._hi >= self.start.shape[0]:
            self._make_room()
        c = self._hi
        if every:
            self.start[c], self.length[c] = self.volume_m3, volume_m3
        else:  # a pipe that took nothing in gets a hole: a column far beyond its inlet
            took = volume_m3 > 0.0
            self.start[c] = np.where(took, self.volume_m3, _FAR)
            self.length[c] = np.where(took, volume_m3, 1.0)
        self.coef[c] = coefficients
        self._hi = c + 1

    def advance(self, throughput_m3: np.ndarray) -> None:
        """Move every parcel ``throughput_m3`` (P,) towards the outlet; drop those gone."""
        lo, hi = self._lo, self._hi
        st = self.start[lo:hi]
        st -= throughput_m3
        ln = self.length[lo:hi]
        np.copyto(st, -_FAR, where=st <= ln * (_GONE - 1.0))  # gone: st + ln <= _GONE·ln
        live = np.abs(st) < _HALF_FAR
        self.head = lo + live.argmax(axis=0)  # the first column still in the pipe
        self._lo = min(self.head.tolist(), default=hi - 1)

    def sample(self, pipes: np.ndarray, positions_m3: np.ndarray, left: np.ndarray) -> np.ndarray:
        """Composition in the pipes ``pipes`` (m,) at outlet distances ``positions_m3`` (m, n).

        Right limits, except where ``left`` (n,) is true: there the left limit
        (a boundary within 1e-12 of the pipe volume belongs to the earlier
        parcel). Returns (m, n, F).
        """
        lo, hi = self._lo, self._hi
        st = self.start[lo:hi, pipes].T  # (m, columns)
        cut = positions_m3 - (_SLACK * self.volume_m3[pipes])[:, None] * left
        # the parcel starting last at or before each position (-inf: none, nor a departed one)
        key = np.where(st[:, None, :] <= cut[:, :, None], st[:, None, :], -np.inf)
        j = np.maximum(np.argmax(key, axis=2) + lo, self.head[pipes][:, None])
        rows = pipes[:, None]
        s = (positions_m3 - self.start[j, rows]) / self.length[j, rows]
        np.clip(s, 0.0, 1.0, out=s)
        return profile(self.coef[j, rows], s)

    def limits(self, pipe: int, position_m3: float) -> tuple[np.ndarray, np.ndarray]:
        """:meth:`sample` of one pipe at one outlet distance [m³], on floats: its left and
        its right limit there (F each)."""
        lo = self._lo
        starts = self.start[lo : self._hi, pipe].tolist()
        lengths = self.length[lo : self._hi, pipe].tolist()
        head = int(self.head[pipe]) - lo
        out = []
        for cut in (position_m3 - _SLACK * float(self.volume_m3[pipe]), position_m3):
            best, k = -np.inf, 0  # the parcel starting last at or before the cut
            for c, v in enumerate(starts):
                if best < v <= cut:
                    best, k = v, c
            k = max(k, head)
            at = min(max((position_m3 - starts[k]) / lengths[k], 0.0), 1.0)
            out.append(np.dot(legendre_basis(at),
                              self.coef[lo + k, pipe]))
        return out[0], out[1]

    def _make_room(self) -> None:
        """Move the columns in use to the first ones, and widen the arrays if still full."""
        lo, hi = self._lo, self._hi
        cap = self.start.shape[0]
        wide = cap * 2 if hi - lo > cap // 2 else cap
        start = np.full((wide, len(self._rows)), _FAR)
        start[: hi - lo] = self.start[lo:hi]
        length = np.ones_like(start)
        length[: hi - lo] = self.length[lo:hi]
        coef = np.zeros((wide, *self.coef.shape[1:]))
        coef[: hi - lo] = self.coef[lo:hi]
        self.start, self.length, self.coef = start, length, coef
        self.head = self.head - lo
        self._lo, self._hi = 0, hi - lo


def legendre_basis(s: float) -> list[float]:
    """The shifted Legendre polynomials P0, P1, P2 at one position along a parcel.

    Parameters
    ----------
    s : float [-]
        Position along the parcel, 0 at its outlet end, 1 at its inlet end.

    Returns
    -------
    list of float [-]
        ``[1, 2s − 1, 6s² − 6s + 1]``: ``legendre_basis(s) · coef`` is :func:`profile` of
        one parcel.
    """
    return [1.0, 2.0 * s - 1.0, (6.0 * s - 6.0) * s + 1.0]


def profile(coef: np.ndarray, s: np.ndarray) -> np.ndarray:
    """Values of parcel profiles at positions along them.

    Parameters
    ----------
    coef : ndarray (..., 3, F) [-]
        Mean, slope and curvature of each profile (shifted Legendre
        coefficients over the parcel).
    s : ndarray (...) [-]
        Position along each parcel, 0 at its outlet end, 1 at its inlet end.

    Returns
    -------
    ndarray (..., F) [-]
        ``m + g·(2s − 1) + k·(6s² − 6s + 1)``.
    """
    s = s[..., None]
    return coef[..., 0, :] + coef[..., 1, :] * (2.0 * s - 1.0) + coef[..., 2, :] * (
        (6.0 * s - 6.0) * s + 1.0
    )


def _fresh_exact(r: float) -> np.ndarray:
    """:func:`fresh_moments` by quadrature for ``r = V/W`` in [0, 1) (W = 1)."""
    pipes = PipeSet(np.array([1.0]), np.eye(3)[:1])
    pipes.start[0, 0], pipes.length[0, 0] = r, 1.0  # the step's inflow, entered behind V
    pipes.coef[0, 0] = np.eye(3)
    return pipes.window(np.array([1.0]), np.array([1.0]))[0]


# Each entry of the map is a polynomial of degree ≤ 8 in r = V/W: fitted once at
# Chebyshev points (exact to round-off), then evaluated per step.
_R_NODES = 0.5 - 0.5 * np.cos(np.pi * (np.arange(11) + 0.5) / 11)
_FRESH_POLY = np.polynomial.polynomial.polyfit(
    _R_NODES, np.array([_fresh_exact(r).ravel() for r in _R_NODES]), 8
)  # (9, 12)
_R_POWERS = np.arange(9.0)


def fresh_moments(volume_m3: float, throughput_m3: float) -> np.ndarray:
    """The map from a step's inflow Legendre moments to the part of its outflow they make.

    When the step's throughput W exceeds the pipe volume V, part of the inflow
    also leaves within the step: inflow entering at inlet position ``ζ`` leaves
    at outlet position ``ζ + V`` ([LEVENSPIEL-1999] plug flow [P]), so the
    quadratic inflow ``Σ Ij·Pj(ζ/W)`` fills the outlet window ``[V, W]``.

    Parameters
    ----------
    volume_m3 : float [m³]
        Pipe volume V.
    throughput_m3 : float [m³]
        Volume passed in the step, W.

    Returns
    -------
    ndarray (4, 3) [-]
        ``O_i = Σ_j map[i, j]·I_j`` from the inflow moments I0 … I2 (mean, slope,
        curvature) to the outflow's O0 … O3 (mean, slope, curvature, cubic).
        Identity in the first three rows when V = 0, zero when V ≥ W; it
        depends on ``r = V/W`` only, through polynomials of degree ≤ 8 fitted
        once at Chebyshev points: exact to round-off (the integrals are
        exact, [GAUSS-LEGENDRE]).

    Examples
    --------
    An empty pipe passes its inflow straight through; a pipe the step does not
    flush delivers none of it:

    >>> bool(np.allclose(fresh_moments(0.0, 2.0)[:3], np.eye(3), atol=1e-12))
    True
    >>> bool(np.all(fresh_moments(1.0, 0.5) == 0.0))
    True
    """
    return fresh_maps(np.array([volume_m3]), np.array([throughput_m3]))[0]


def fresh_maps(volume_m3: np.ndarray, throughput_m3: np.ndarray) -> np.ndarray:
    """:func:`fresh_moments` of every pipe at once.

    Parameters
    ----------
    volume_m3 : ndarray (P,) [m³]
        Pipe volumes V.
    throughput_m3 : ndarray (P,) [m³]
        Volumes passed in the step, W.

    Returns
    -------
    ndarray (P, 4, 3) [-]
        Each pipe's map (zero where W ≤ V).
    """
    if not any(w > v for w, v in zip(throughput_m3.tolist(), volume_m3.tolist(), strict=True)):
        return np.zeros((len(volume_m3), 4, 3))
    return fresh_maps_of(volume_m3.tolist(), throughput_m3.tolist())


def fresh_maps_of(volume_m3: list[float], throughput_m3: list[float]) -> np.ndarray | None:
    """:func:`fresh_maps` from floats, None when no pipe passes more than its volume.

    Parameters
    ----------
    volume_m3 : list of float (P) [m³]
        Pipe volumes V (> 0).
    throughput_m3 : list of float (P) [m³]
        Volumes passed in the step, W.

    Returns
    -------
    ndarray (P, 4, 3) or None [-]
        Each pipe's map (zero where W ≤ V); None when W ≤ V in every pipe.
    """
    passed = [w > v for w, v in zip(throughput_m3, volume_m3, strict=True)]
    if not any(passed):
        return None
    r = [v / w if f else 1.0 for w, v, f in zip(throughput_m3, volume_m3, passed, strict=True)]
    if all(passed):
        return (np.array(r)[:, None] ** _R_POWERS).dot(_FRESH_POLY).reshape(len(r), 4, 3)
    r_mask = np.array((r, passed), dtype=float)  # r, and 1.0 where W > V (else the map is 0)
    maps = (r_mask[0][:, None] ** _R_POWERS).dot(_FRESH_POLY)
    maps *= r_mask[1][:, None]
    return maps.reshape(len(r), 4, 3)
