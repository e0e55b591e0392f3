"""The φ-functions of a matrix: its exponential and the exponential's repeated integrals.

``φ_0(X) = exp(X)`` and ``φ_k(X) = Σ_j X^j / (j + k)!`` (k ≥ 1), so that
``h^k·φ_k(A·h) = ∫_0^h (h − t)^(k−1)/(k−1)!·exp(A·t) dt``: the exact solution
of a linear ODE ``x' = A·x + g(t)`` with a polynomial input ``g`` over a step of
``h``, and the repeated time integrals of that solution, are sums of these
matrices applied to ``x(0)`` and to the input's Taylor coefficients.

Method: scaling and squaring ([HIGHAM-2005] for ``φ_0``) carried to every
``φ_k`` at once. ``X`` is scaled by ``2^-s`` until its 1-norm is at most 1/2,
the Taylor series of degree 14 is summed (truncation below 3e-17, the unit
round-off's fifth part), and the scaling is undone by ``s`` applications of
the doubling identity

``φ_k(2X) = 2^-k·[φ_0(X)·φ_k(X) + Σ_{j=1..k} φ_j(X)/(k − j)!]``

([D], derived here: write ``φ_k(2X) = ∫_0^1 exp(2(1 − θ)X)·θ^(k−1)/(k−1)! dθ``,
put ``θ = τ/2`` and split ``τ`` at 1; on ``[1, 2]`` expand ``(1 + σ)^(k−1)``
binomially). For ``k = 0`` it is the squaring of [HIGHAM-2005]. All the
functions of one matrix come out of the same products, as one stack.
"""

from __future__ import annotations

import math

import numpy as np

_THETA = 0.5  # 1-norm of the scaled matrix
_DEGREE = 14  # Taylor degree: 0.5^15 / 15! = 2.3e-17
_MAX_ORDER = 12

# _TAYLOR[k, j] = 1 / (j + k)!, the Taylor coefficients of φ_k
_TAYLOR = np.array(
    [[1.0 / math.factorial(j + k) for j in range(_DEGREE + 1)] for k in range(_MAX_ORDER + 1)]
)
# _DOUBLE[k, j] = 1 / (k − j)! for 1 ≤ j ≤ k: the sum of the doubling identity
_DOUBLE = np.array(
    [
        [1.0 / math.factorial(k - j) if 1 <= j <= k else 0.0 for j in range(_MAX_ORDER + 1)]
        for k in range(_MAX_ORDER + 1)
    ]
)
_HALVES = 0.5 ** np.arange(_MAX_ORDER + 1)


def phi_stack(x: np.ndarray, order: int) -> np.ndarray:
    """``φ_0(x) … φ_order(x)`` of one square matrix, as a stack.

    Parameters
    ----------
    x : ndarray (n, n) [-]
        The matrix (in the simulator: the stirred-volume system matrix times
        a step length, dimensionless).
    order : int [-]
        Highest φ-function wanted, 0 to 12.

    Returns
    -------
    ndarray (order + 1, n, n) [-]
        ``φ_k(x)`` for k = 0 … order, by Taylor series and the doubling identity
        of the module docstring ([HIGHAM-2005] scaling and squaring, extended
        [D]). Within 1e-12 relative of the exponential of the augmented block
        matrix ``[[x, I, 0, …], [0, 0, I, …], …]`` in the tests.

    Examples
    --------
    For the 1×1 matrix ``[−1]``: ``φ_0 = e^-1``, ``φ_1 = 1 − e^-1``,
    ``φ_2 = e^-1`` (``(e^-1 − 1 + 1)/1``):

    >>> [round(float(v), 12) for v in phi_stack(np.array([[-1.0]]), 2)[:, 0, 0]]
    [0.367879441171, 0.632120558829, 0.367879441171]
    """
    x = np.asarray(x, dtype=float)
    n = x.shape[0]
    norm = float(np.abs(x).sum(axis=0).max()) if x.size else 0.0
    s = max(0, math.ceil(math.log2(norm / _THETA))) if norm > _THETA else 0
    y = x * 0.5**s
    powers = np.empty((_DEGREE + 1, n, n))
    powers[0] = np.eye(n)
    for j in range(_DEGREE):
        np.dot(powers[j], y, out=powers[j + 1])
    phi = _TAYLOR[: order + 1].dot(powers.reshape(_DEGREE + 1, n * n))
    phi = phi.reshape(order + 1, n, n)
    for _ in range(s):
        phi = phi_double(phi)
    return phi


def phi_double(phi: np.ndarray) -> np.ndarray:
    """The stack ``φ_k(2x)`` from the stack ``φ_k(x)`` (the doubling identity).

    Parameters
    ----------
    phi : ndarray (p + 1, n, n) [-]
        ``φ_0(x) … φ_p(x)``, p ≤ 12.

    Returns
    -------
    ndarray (p + 1, n, n) [-]
        ``φ_0(2x) … φ_p(2x)`` ([D], module docstring).

    Examples
    --------
    >>> one = phi_stack(np.array([[-0.5]]), 1)
    >>> bool(np.allclose(phi_double(one), phi_stack(np.array([[-1.0]]), 1), rtol=1e-15))
    True
    """
    p1, n = phi.shape[0], phi.shape[1]
    out = np.matmul(phi[0], phi)
    out += _DOUBLE[:p1, :p1].dot(phi.reshape(p1, n * n)).reshape(p1, n, n)
    out *= _HALVES[:p1, None, None]
    return out
