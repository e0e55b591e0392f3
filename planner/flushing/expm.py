"""Matrix exponential by scaling and squaring with diagonal Padé approximants (degree ≤ 13).

The method of [HIGHAM-2005]: the Padé degree (3, 5, 7, 9 or 13) and the
scaling are chosen from the 1-norm so that the backward error is at unit
round-off. Numpy only; SciPy's ``expm``, which uses the same method, is the
reference in the tests ([SCIPY-2020]). The simulator's propagators need the
exponential's repeated integrals too and take them all at once from
:mod:`planner.flushing.phi`; this is the exponential of one matrix, kept as
the general-purpose reference.
Works on a stack of matrices (leading axes broadcast), with one scaling for
the whole stack.
"""

from __future__ import annotations

import numpy as np

# [HIGHAM-2005] Table 2.3 [P]: largest 1-norm for which degree m needs no scaling.
_THETA = (
    (3, 1.495585217958292e-2),
    (5, 2.539398330063230e-1),
    (7, 9.504178996162932e-1),
    (9, 2.097847961257068e0),
)
_THETA13 = 5.371920351148152e0
_B = {
    3: (120.0, 60.0, 12.0, 1.0),
    5: (30240.0, 15120.0, 3360.0, 420.0, 30.0, 1.0),
    7: (17297280.0, 8648640.0, 1995840.0, 277200.0, 25200.0, 1512.0, 56.0, 1.0),
    9: (
        17643225600.0,
        8821612800.0,
        2075673600.0,
        302702400.0,
        30270240.0,
        2162160.0,
        110880.0,
        3960.0,
        90.0,
        1.0,
    ),
}
_B13 = (
    64764752532480000.0,
    32382376266240000.0,
    7771770303897600.0,
    1187353796428800.0,
    129060195264000.0,
    10559470521600.0,
    670442572800.0,
    33522128640.0,
    1323241920.0,
    40840800.0,
    960960.0,
    16380.0,
    182.0,
    1.0,
)


def _pade(a: np.ndarray, m: int, eye: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    b = _B[m]
    a2 = a @ a
    powers = [eye, a2]
    for _ in range(2, m // 2 + 1):
        powers.append(powers[-1] @ a2)
    u = sum(b[2 * k + 1] * powers[k] for k in range(m // 2 + 1))
    v = sum(b[2 * k] * powers[k] for k in range(m // 2 + 1))
    return a @ u, v


def _pade13(a: np.ndarray, eye: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    b = _B13
    a2 = a @ a
    a4 = a2 @ a2
    a6 = a4 @ a2
    u = a @ (
        a6 @ (b[13] * a6 + b[11] * a4 + b[9] * a2) + b[7] * a6 + b[5] * a4 + b[3] * a2 + b[1] * eye
    )
    v = a6 @ (b[12] * a6 + b[10] * a4 + b[8] * a2) + b[6] * a6 + b[4] * a4 + b[2] * a2 + b[0] * eye
    return u, v


def expm(a: np.ndarray) -> np.ndarray:
    """The matrix exponential ``exp(a)``, of one matrix or of each matrix of a stack.

    Parameters
    ----------
    a : ndarray (..., n, n) [-]
        Square matrices (in the simulator: the augmented system matrix times
        a step length, dimensionless).

    Returns
    -------
    ndarray (..., n, n) [-]
        ``exp(a)``: scaling and squaring with a diagonal Padé approximant of
        degree 3 to 13 chosen by the 1-norm ([HIGHAM-2005] Table 2.3 [P]); backward
        error at unit round-off, and within 1e-10 relative of SciPy's
        ``scipy.linalg.expm`` in the tests ([SCIPY-2020]).

    Examples
    --------
    ``exp([[0, 1], [0, 0]]) = [[1, 1], [0, 1]]`` (a nilpotent matrix: the
    series stops after two terms), and ``exp(−1) = 0.36787944117…``:

    >>> expm(np.array([[0.0, 1.0], [0.0, 0.0]])).tolist()
    [[1.0, 1.0], [0.0, 1.0]]
    >>> float(expm(np.array([[-1.0]]))[0, 0])
    0.36787944117...
    """
    a = np.asarray(a, dtype=float)
    n = a.shape[-1]
    eye = np.eye(n)
    norm = float(np.abs(a).sum(axis=-2).max()) if a.size else 0.0
    for m, theta in _THETA:
        if norm <= theta:
            u, v = _pade(a, m, eye)
            return np.linalg.solve(v - u, v + u)
    s = max(0, int(np.ceil(np.log2(norm / _THETA13)))) if norm > _THETA13 else 0
    u, v = _pade13(a / 2.0**s, eye)
    r = np.linalg.solve(v - u, v + u)
    for _ in range(s):
        r = r @ r
    return r
