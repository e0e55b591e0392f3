"""Where two curves on the ellipsoid meet, solved on the true curves to round-off.

For every pair (curve ``a`` at parameter ``s``, curve ``b`` at ``t``) find
``a(s) = b(t)`` by Newton's method in a local azimuthal equidistant frame
centred on the current point of ``a``: the offset of ``b(t)`` is
``d·(sin z, cos z)`` with distance ``d`` and azimuth ``z`` from the inverse
geodesic problem (pyproj.Geod [KARNEY-2013] [P]), and the two tangents come from
points one metre further along each curve. The frame is exact at its centre
and recentred every step, so the iteration converges quadratically; it stops
when the two points are within :data:`TOL_M` on the ellipsoid (after one
last step, which brings the parameters to round-off too), so the answer
is exact to that tolerance whatever the curve types (geodesic, rhumb,
lonlat), since the residual is measured by the geodesic distance itself.
"""

from __future__ import annotations

import numpy as np
from numpy.typing import NDArray

from geo.curves import Curves
from geo.ellipsoid import GEOD

TOL_M = 1e-6
"""Stop when the two points are this close [m] (1 µm)."""
_H_M = 1.0
_MAX_ITER = 40
_MAX_STEP_M = 200_000.0


def _offset(lat0: NDArray, lon0: NDArray, lat: NDArray, lon: NDArray) -> tuple[NDArray, NDArray]:
    """East and north offset (m) of points from a centre, azimuthal equidistant."""
    az, _, d = GEOD.inv(lon0, lat0, lon, lat)
    az = np.radians(np.asarray(az))
    d = np.asarray(d)
    return d * np.sin(az), d * np.cos(az)


def intersect(a: Curves, ia: NDArray, s0: NDArray, b: Curves, ib: NDArray,
              t0: NDArray) -> tuple[NDArray, NDArray, NDArray]:
    """Where curve ``a[ia]`` meets curve ``b[ib]``, from starting guesses, for arrays of pairs.

    Parameters
    ----------
    a : Curves
        The first batch (route legs, in :mod:`geo.crossings`).
    ia : ndarray of int [-]
        Index into ``a`` of each pair.
    s0 : ndarray of float [m]
        Starting guess of the parameter along ``a[ia]`` (see :mod:`geo.curves`).
    b : Curves
        The second batch (area edges).
    ib : ndarray of int [-]
        Index into ``b`` of each pair.
    t0 : ndarray of float [m]
        Starting guess of the parameter along ``b[ib]``.

    Returns
    -------
    s : ndarray of float [m]
        Parameter along ``a[ia]`` of the meeting point.
    t : ndarray of float [m]
        Parameter along ``b[ib]`` of the meeting point.
    ok : ndarray of bool [-]
        Whether the pair converged. Pairs whose curves run parallel (no
        isolated meeting point) or do not converge are not ok.

    Notes
    -----
    Newton's method on ``a(s) = b(t)`` in the azimuthal equidistant frame of
    the current point of ``a``, recentred every step (see the module notes),
    at most 40 steps of at most 200 km. Converged pairs are within
    :data:`TOL_M` (1 µm) of each other on the ellipsoid, measured by the
    geodesic distance [KARNEY-2013], for every pair of curve kinds; on lines
    built with ``GeodSolve`` and ``RhumbSolve`` [KARNEY-RHUMB]
    (tests/geo/test_curves_roots.py) the meeting points and parameters come
    out within 1e-8 to 6e-7 m of the constructed ones.

    Examples
    --------
    The equator (a rhumb line) and the meridian 5°E (a geodesic) meet at
    0°N 5°E, 5 × 111319.490793274 m along the equator (``RhumbSolve -i -p 9``
    [KARNEY-RHUMB]) and 1105854.833 m from 10°S along the meridian
    (``GeodSolve -i -p 9`` [KARNEY-2013]: 1105854.833234372 m):

    >>> equator = Curves.between("rhumb", [0.0], [0.0], [0.0], [10.0])
    >>> meridian = Curves.between("geodesic", [-10.0], [5.0], [10.0], [5.0])
    >>> s, t, ok = intersect(equator, np.array([0]), np.array([5.0e5]),
    ...                      meridian, np.array([0]), np.array([1.0e6]))
    >>> round(float(s[0]), 6), round(float(t[0]), 6), bool(ok[0])
    (556597.453966, 1105854.833234, True)
    """
    s = np.array(s0, dtype=np.float64)
    t = np.array(t0, dtype=np.float64)
    ok = np.zeros(s.shape, dtype=bool)
    active = np.ones(s.shape, dtype=bool)
    for _ in range(_MAX_ITER):
        k = np.nonzero(active)[0]
        if len(k) == 0:
            break
        plat, plon = a.point(ia[k], s[k])
        qlat, qlon = b.point(ib[k], t[k])
        qx, qy = _offset(plat, plon, qlat, qlon)
        gap = np.hypot(qx, qy)
        # converged pairs take this last Newton step too: the gap is within TOL_M, but the
        # parameters are only within TOL_M / sin(crossing angle); one more step makes them
        # exact to round-off (quadratic convergence)
        done = gap <= TOL_M
        ok[k[done]] = True
        active[k[done]] = False
        ulat, ulon = a.point(ia[k], s[k] + _H_M)
        ux, uy = _offset(plat, plon, ulat, ulon)
        vlat, vlon = b.point(ib[k], t[k] + _H_M)
        vx, vy = _offset(plat, plon, vlat, vlon)
        ux, uy = ux / _H_M, uy / _H_M
        vx, vy = (vx - qx) / _H_M, (vy - qy) / _H_M
        # u·ds - v·dt = q
        det = -ux * vy + uy * vx
        parallel = np.abs(det) < 1e-12
        with np.errstate(divide="ignore", invalid="ignore"):
            ds = (-qx * vy + qy * vx) / det
            dt = (ux * qy - uy * qx) / det
        big = np.maximum(np.abs(ds), np.abs(dt))
        scale = np.where(big > _MAX_STEP_M, _MAX_STEP_M / np.where(big > 0, big, 1.0), 1.0)
        bad = parallel | ~np.isfinite(ds) | ~np.isfinite(dt)
        active[k[bad]] = False
        good = ~bad & (~done | (big <= TOL_M * 1e3))
        s[k[good]] += (ds * scale)[good]
        t[k[good]] += (dt * scale)[good]
    return s, t, ok
