"""Plug flow in a pipe: a first-in first-out queue of parcels.

A pipe of volume V delays its inlet by exactly the time its throughput takes
to reach V, whatever the flow does meanwhile ([LEVENSPIEL-1999] plug flow as
a pure delay [P]): the content is a queue of
parcels, each a volume with a quadratic composition profile along it, kept
as shifted-Legendre coefficients over the parcel (``s`` from 0 at its outlet
end to 1 at its inlet end): ``c(s) = m + g·(2s − 1) + k·(6s² − 6s + 1)``,
mean ``m``, slope ``g``, curvature ``k``. Composition is a vector of volume
fractions of the distinct fuels. Volumes are in m³; positions ``ξ`` are
measured from the outlet, in m³ of throughput.

Windows and splits integrate the profiles exactly (three-point
Gauss-Legendre quadrature is exact to degree 5, [GAUSS-LEGENDRE] [P]), so the
pipe conserves every fuel to round-off.
"""

from __future__ import annotations

import numpy as np

_WEIGHTS = np.array([1.0, 3.0, 5.0, 7.0])  # 2j + 1 for the Legendre coefficients
# three-point Gauss-Legendre rule on [0, 1] ([GAUSS-LEGENDRE] [P])
_GAUSS_X = 0.5 + 0.5 * np.array([-np.sqrt(0.6), 0.0, np.sqrt(0.6)])  # nodes
_GAUSS_W = np.array([5.0, 8.0, 5.0]) / 18.0  # their weights (sum 1)


class PipeQueue:
    """The parcels in one pipe, outlet first. ``n_fuels`` columns of composition."""

    def __init__(self, volume_m3: float, composition: np.ndarray) -> None:
        self.volume_m3 = float(volume_m3)
        comp = np.asarray(composition, dtype=float)
        self.vol = np.array([self.volume_m3])
        self.coef = np.zeros((1, 3, comp.shape[0]))  # (parcel, m/g/k, fuel)
        self.coef[0, 0] = comp

    def outlet(self) -> np.ndarray:
        """Composition just inside the outlet (right limit at position 0)."""
        m, g, k = self.coef[0]
        return m - g + k

    def content_m3(self) -> np.ndarray:
        """Volume of each fuel in the pipe, m³."""
        return self.vol @ self.coef[:, 0]

    def window(
        self, width_m3: float, throughput_m3: float
    ) -> tuple[np.ndarray, np.ndarray, np.ndarray, np.ndarray]:
        """Outflow moments of the first ``width_m3`` m³, for a step passing ``throughput_m3``.

        Returns the Legendre coefficients ``(2j + 1)·∫c·P_j(ξ/W) dξ / W``,
        j = 0 … 3 (mean, slope, curvature, cubic) with ``W = throughput_m3``: the
        parts of the step's outflow contributed by the parcels now in the pipe.
        """
        cum = np.cumsum(self.vol)
        n = min(int(np.searchsorted(cum, width_m3, side="left")) + 1, len(cum))
        hi = np.minimum(cum[:n], width_m3)
        lo = cum[:n] - self.vol[:n]
        # each piece starts at its parcel's outlet end: s = η / L along the parcel
        out = _moments(self.coef[:n], lo, hi - lo, hi - lo, self.vol[:n], throughput_m3)
        return out[0], out[1], out[2], out[3]

    def values(
        self,
        positions_m3: np.ndarray,
        left: bool = False,
        incoming: tuple[float, np.ndarray] | None = None,
    ) -> np.ndarray:
        """Composition at outlet distances ``positions_m3`` (right limits; left if ``left``).

        ``incoming`` = (volume, coefficients (3, F)) of a parcel about to enter,
        to look past the present content without changing the queue.
        """
        edges = np.concatenate(([0.0], np.cumsum(self.vol)))
        pos = np.asarray(positions_m3, dtype=float)
        # a left limit at a parcel boundary (to round-off) belongs to the earlier parcel
        slack = 1e-12 * edges[-1]
        j = (
            np.searchsorted(edges, pos - slack, side="left")
            if left
            else np.searchsorted(edges, pos, side="right")
        ) - 1
        j = np.minimum(np.maximum(j, 0), len(self.vol) - 1)
        s = np.minimum(np.maximum((pos - edges[j]) / self.vol[j], 0.0), 1.0)
        out = _profile(self.coef[j], s)
        if incoming is not None and incoming[0] > 0.0:
            past = pos > edges[-1] if not left else pos > edges[-1] * (1.0 + 1e-12)
            if past.any():
                s_in = np.minimum((pos[past] - edges[-1]) / incoming[0], 1.0)
                out[past] = _profile(
                    np.broadcast_to(incoming[1], (len(s_in), *incoming[1].shape)), s_in
                )
        return out

    def push(self, volume_m3: float, coefficients: np.ndarray) -> None:
        """Add a parcel of ``coefficients`` (3, F) = mean, slope, curvature at the inlet end."""
        if volume_m3 <= 0.0:
            return
        self.vol = np.append(self.vol, volume_m3)
        self.coef = np.concatenate((self.coef, coefficients[None]), axis=0)

    def pop(self, volume_m3: float) -> None:
        """Remove ``volume_m3`` m³ from the outlet end, splitting the parcel at the cut."""
        if volume_m3 <= 0.0:
            return
        cum = np.cumsum(self.vol)
        j = min(int(np.searchsorted(cum, volume_m3, side="right")), len(cum) - 1)
        start = cum[j - 1] if j else 0.0
        vol, coef = self.vol[j:].copy(), self.coef[j:].copy()
        s = (volume_m3 - start) / vol[0]
        if s >= 1.0 - 1e-13:
            vol, coef = vol[1:], coef[1:]
        elif s > 1e-13:
            coef[0] = _restrict(coef[0], s)
            vol[0] = vol[0] * (1.0 - s)
        # keep the pipe exactly full: absorb round-off in the inlet-end parcel
        vol[-1] += self.volume_m3 - vol.sum()
        self.vol, self.coef = vol, coef


def _profile(coef: np.ndarray, s: np.ndarray) -> np.ndarray:
    """Values of profiles ``coef`` (n, 3, F) at parcel positions ``s`` (n,)."""
    s = s[:, None]
    return coef[:, 0] + coef[:, 1] * (2.0 * s - 1.0) + coef[:, 2] * (6.0 * s * s - 6.0 * s + 1.0)


def _restrict(coef: np.ndarray, s_cut: float) -> np.ndarray:
    """Legendre coefficients (3, F) of a profile restricted to ``s ∈ [s_cut, 1]``."""
    m, g, k = coef
    a0, a1, a2 = m - g + k, 2.0 * g - 6.0 * k, 6.0 * k  # monomials in s
    span = 1.0 - s_cut
    b0 = a0 + a1 * s_cut + a2 * s_cut * s_cut  # monomials in σ, s = s_cut + span·σ
    b1 = (a1 + 2.0 * a2 * s_cut) * span
    b2 = a2 * span * span
    return np.stack((b0 + b1 / 2.0 + b2 / 3.0, b1 / 2.0 + b2 / 2.0, b2 / 6.0))


def _moments(
    coef: np.ndarray,
    lo: np.ndarray,
    width: np.ndarray,
    s_width: np.ndarray,
    s_length: np.ndarray,
    throughput: float,
) -> np.ndarray:
    """Legendre coefficients (4, F) over a step of quadratic pieces.

    Piece n covers outlet positions ``[lo, lo + width]`` and there follows the
    profile ``coef[n]`` (mean, slope, curvature over a parcel, as in
    :func:`_profile`) from ``s = 0`` to ``s = s_width / s_length``. Returns
    ``(2j + 1)·Σ ∫c·P_j(ξ/W) dξ / W`` for the shifted Legendre polynomials
    P0 … P3 (P3 = 20u³ − 30u² + 12u − 1). The integrands are polynomials of
    degree ≤ 5, so three-point Gauss-Legendre quadrature on each piece is
    exact ([GAUSS-LEGENDRE]: n points are exact to degree 2n − 1 [P]).
    """
    w = 1.0 / throughput
    s = (s_width / s_length)[:, None] * _GAUSS_X  # (n, 3) positions along each parcel
    c = (
        coef[:, 0, None]
        + coef[:, 1, None] * (2.0 * s - 1.0)[..., None]
        + coef[:, 2, None] * (6.0 * s * s - 6.0 * s + 1.0)[..., None]
    )  # (n, 3, F)
    u = (lo[:, None] + width[:, None] * _GAUSS_X) * w
    legendre = np.stack(
        (
            np.ones_like(u),
            2.0 * u - 1.0,
            (6.0 * u - 6.0) * u + 1.0,
            ((20.0 * u - 30.0) * u + 12.0) * u - 1.0,
        ),
        axis=-1,
    )  # (n, 3, 4)
    weights = width[:, None] * _GAUSS_W  # (n, 3)
    return np.einsum("ng,ngj,ngf->jf", weights, legendre, c) * (w * _WEIGHTS)[:, None]


def _fresh_exact(r: float) -> np.ndarray:
    """:func:`fresh_moments` by quadrature for ``r = V/W`` in [0, 1) (W = 1)."""
    width = np.array([1.0 - r])
    bases = np.eye(3)[None]  # (1, 3 coefficients, 3 bases)
    return _moments(bases, np.array([r]), width, width, np.array([1.0]), 1.0)


# Each entry of the map is a polynomial of degree ≤ 8 in r = V/W: fitted once at
# Chebyshev points (exact to round-off), then evaluated per step.
_R_NODES = 0.5 - 0.5 * np.cos(np.pi * (np.arange(11) + 0.5) / 11)
_FRESH_POLY = np.polynomial.polynomial.polyfit(
    _R_NODES, np.array([_fresh_exact(r).ravel() for r in _R_NODES]), 8
)  # (9, 12)
_R_POWERS = np.arange(9)


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
    if throughput_m3 <= volume_m3:
        return np.zeros((4, 3))
    r = volume_m3 / throughput_m3
    return (r**_R_POWERS @ _FRESH_POLY).reshape(4, 3)
