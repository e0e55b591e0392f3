"""Rhumb lines (loxodromes) on the WGS84 ellipsoid: distance, course, point at distance.

A rhumb line crosses every meridian at the same course; it is a straight line
in the ellipsoidal Mercator plane (x = a·λ, y = a·ψ(φ), ψ the isometric
latitude). Its length is the change in meridian arc divided by the cosine of
the course, or the parallel arc when sailing east-west [RHUMB-TEXTS] [P].

Numerics, all exact to round-off on the ellipsoid [WGS84]:

- meridian arc M(φ): Helmert's series in the third flattening n to n⁴
  [HELMERT-1880] [S]; the first neglected term is ~a·n⁵ ≈ 1e-7 m;
- its inverse by Newton's method on M(φ) with dM/dφ = ρ (meridional radius);
- the divided difference ΔM/Δψ, which is the distance per radian of
  longitude-or-isometric-latitude along the line, by 8-point Gauss-Legendre
  quadrature [GAUSS-LEGENDRE] [P] of dM and dψ when the latitudes are close
  (the ratio stays exact as Δψ → 0 and becomes the parallel radius N·cos φ),
  by plain differences otherwise.

The outside reference is GeographicLib's ``RhumbSolve`` [KARNEY-RHUMB] [P]
(elliptic integrals, exact to round-off); the tests agree with it to 1e-6 m
and 1e-9° (tests/geo/test_rhumb.py).

Longitudes returned are *unwrapped*: the end longitude is the start plus the
signed change, never folded into ±180, so a route keeps a continuous
longitude across the antimeridian.

Arrays in, arrays out (numpy broadcasting); degrees and metres.
"""

from __future__ import annotations

import numpy as np
from numpy.typing import ArrayLike, NDArray

from geo.ellipsoid import A_M, E2, N3, E

_N = N3
_ARC_A = A_M / (1.0 + _N) * (1.0 + _N**2 / 4.0 + _N**4 / 64.0)
_ARC_C2 = -(3.0 / 2.0) * (_N - _N**3 / 8.0)
_ARC_C4 = (15.0 / 16.0) * (_N**2 - _N**4 / 4.0)
_ARC_C6 = -(35.0 / 48.0) * _N**3
_ARC_C8 = (315.0 / 512.0) * _N**4
_ARC_B = A_M / (1.0 + _N)

QUARTER_MERIDIAN_M = _ARC_A * np.pi / 2.0
"""Meridian arc from the equator to a pole [m]: 10 001 965.729 m for WGS84.

``RhumbSolve -i -p 9`` [KARNEY-RHUMB] from 0°N 0°E to 90°N 0°E: 10001965.729312725 m.
"""

_GL_X, _GL_W = np.polynomial.legendre.leggauss(8)
_CLOSE_RAD = 0.05  # latitude difference below which quadrature is used


def _f64(x: ArrayLike) -> NDArray[np.float64]:
    return np.asarray(x, dtype=np.float64)


def wrap180(lon_deg: ArrayLike) -> NDArray[np.float64]:
    """Fold a longitude, or a longitude difference, into [-180, 180).

    Parameters
    ----------
    lon_deg : array_like of float [deg]
        Longitude or longitude difference, any value.

    Returns
    -------
    ndarray of float [deg]
        ``lon_deg`` modulo 360 in [-180, 180): +180 becomes -180.

    Examples
    --------
    >>> wrap180([190.0, 180.0, -180.0, 359.5]).tolist()
    [-170.0, -180.0, -180.0, -0.5]
    """
    x = _f64(lon_deg)
    return (x + 180.0) % 360.0 - 180.0


def meridian_arc_m(lat_deg: ArrayLike) -> NDArray[np.float64]:
    """Meridian arc from the equator to a latitude, signed.

    Parameters
    ----------
    lat_deg : array_like of float [deg]
        Geodetic latitude on WGS84, -90 to 90.

    Returns
    -------
    ndarray of float [m]
        Distance along the meridian from the equator, negative south of it.

    Notes
    -----
    Helmert's series in the third flattening n [HELMERT-1880] [S]::

        M(φ) = a/(1 + n)·[(1 + n²/4 + n⁴/64)·φ + c₂ sin 2φ + c₄ sin 4φ
                          + c₆ sin 6φ + c₈ sin 8φ]
        c₂ = −(3/2)(n − n³/8), c₄ = (15/16)(n² − n⁴/4),
        c₆ = −(35/48)n³,       c₈ = (315/512)n⁴

    Valid at every latitude; truncated after n⁴, the error is below 1e-7 m
    (the tests agree with quadrature of ρ and with ``RhumbSolve`` to 1e-6 m).

    Examples
    --------
    ``RhumbSolve -i -p 9`` [KARNEY-RHUMB] from 0°N 0°E gives 10001965.729312725 m
    to 90°N (the quarter meridian) and 4984944.377977745 m to 45°N:

    >>> round(float(meridian_arc_m(90.0)), 6), round(float(meridian_arc_m(45.0)), 6)
    (10001965.729313, 4984944.377978)
    """
    phi = np.radians(_f64(lat_deg))
    return _ARC_A * phi + _ARC_B * (
        _ARC_C2 * np.sin(2 * phi)
        + _ARC_C4 * np.sin(4 * phi)
        + _ARC_C6 * np.sin(6 * phi)
        + _ARC_C8 * np.sin(8 * phi)
    )


def _rho(phi: NDArray[np.float64]) -> NDArray[np.float64]:
    """Meridional radius of curvature at latitude phi (radians), metres."""
    w2 = 1.0 - E2 * np.sin(phi) ** 2
    return A_M * (1.0 - E2) / (w2 * np.sqrt(w2))


def _nu_cos(phi: NDArray[np.float64]) -> NDArray[np.float64]:
    """Radius of the parallel at latitude phi (radians), metres: N(φ)·cos φ."""
    return A_M * np.cos(phi) / np.sqrt(1.0 - E2 * np.sin(phi) ** 2)


def latitude_from_arc(arc_m: ArrayLike) -> NDArray[np.float64]:
    """Latitude reached by a meridian arc from the equator: the inverse of :func:`meridian_arc_m`.

    Parameters
    ----------
    arc_m : array_like of float [m]
        Signed meridian arc from the equator; beyond a quarter meridian it is
        clipped to the pole.

    Returns
    -------
    ndarray of float [deg]
        Geodetic latitude on WGS84.

    Notes
    -----
    Newton's method on M(φ) − arc = 0 with dM/dφ = ρ(φ) = a(1 − e²)/(1 − e² sin² φ)^(3/2),
    six steps from the rectifying latitude arc/A (within 0.2° of the answer):
    converged to round-off, 1e-11° against quadrature in the tests.

    Examples
    --------
    The arc to 45°N by ``RhumbSolve -i -p 9`` [KARNEY-RHUMB] (see :func:`meridian_arc_m`):

    >>> round(float(latitude_from_arc(4984944.377977745)), 9)
    45.0
    """
    m = np.clip(_f64(arc_m), -QUARTER_MERIDIAN_M, QUARTER_MERIDIAN_M)
    phi = m / _ARC_A  # rectifying latitude: within 0.2° of the answer
    for _ in range(6):
        step = (meridian_arc_m(np.degrees(phi)) - m) / _rho(phi)
        phi = phi - step
    return np.degrees(phi)


def isometric_latitude(lat_deg: ArrayLike) -> NDArray[np.float64]:
    """Isometric latitude ψ, the northing of the ellipsoidal Mercator plane divided by a.

    Parameters
    ----------
    lat_deg : array_like of float [deg]
        Geodetic latitude on WGS84, strictly between -90 and 90 (ψ is
        infinite at the poles).

    Returns
    -------
    ndarray of float [rad]
        ψ(φ) = asinh(tan φ) − e·atanh(e·sin φ) [RHUMB-TEXTS] [P], closed form,
        exact to round-off.

    Examples
    --------
    ψ(45°) = 0.8766346534346 [D]: ``RhumbSolve -i -p 12`` [KARNEY-RHUMB] from 0°N 0°E
    to 45°N 10°E sails 11.260024526999082°, and ψ = Δλ / tan(course) on a rhumb line:

    >>> round(float(isometric_latitude(45.0)), 10)
    0.8766346534
    """
    phi = np.radians(_f64(lat_deg))
    return np.arcsinh(np.tan(phi)) - E * np.arctanh(E * np.sin(phi))


def latitude_from_isometric(psi: ArrayLike) -> NDArray[np.float64]:
    """Geodetic latitude from the isometric latitude: the inverse of :func:`isometric_latitude`.

    Parameters
    ----------
    psi : array_like of float [rad]
        Isometric latitude ψ.

    Returns
    -------
    ndarray of float [deg]
        Geodetic latitude on WGS84.

    Notes
    -----
    Newton's method from the spherical value atan(sinh ψ) with
    dψ/dφ = (1 − e²)/((1 − e² sin² φ)·cos φ), six steps: converged to round-off,
    1e-11° in the tests.

    Examples
    --------
    >>> round(float(latitude_from_isometric(0.8766346534346)), 9)  # see isometric_latitude
    45.0
    """
    psi = _f64(psi)
    phi = np.arctan(np.sinh(psi))
    for _ in range(6):
        s = np.sin(phi)
        dpsi_dphi = (1.0 - E2) / ((1.0 - E2 * s * s) * np.cos(phi))
        phi = phi - (isometric_latitude(np.degrees(phi)) - psi) / dpsi_dphi
    return np.degrees(phi)


def _arc_per_psi(lat1_deg: NDArray[np.float64],
                 lat2_deg: NDArray[np.float64]) -> tuple[NDArray[np.float64], NDArray[np.float64]]:
    """ΔM/Δψ between two latitudes, metres per radian, and Δψ in radians.

    Exact to round-off including Δψ → 0 (then the parallel radius N cos φ).
    """
    p1 = np.radians(lat1_deg)
    p2 = np.radians(lat2_deg)
    dpsi = isometric_latitude(lat2_deg) - isometric_latitude(lat1_deg)
    darc = meridian_arc_m(lat2_deg) - meridian_arc_m(lat1_deg)
    with np.errstate(divide="ignore", invalid="ignore"):
        ratio = darc / dpsi
    close = np.abs(p2 - p1) < _CLOSE_RAD
    if np.any(close):
        half = 0.5 * (p2 - p1)[..., None]
        mid = 0.5 * (p2 + p1)[..., None]
        nodes = mid + half * _GL_X
        rho = _rho(nodes)
        int_m = np.sum(_GL_W * rho, axis=-1)  # ∫ρ dφ / half
        int_psi = np.sum(_GL_W * rho / _nu_cos(nodes), axis=-1)  # ∫dψ / half
        ratio = np.where(close, int_m / int_psi, ratio)
    return ratio, dpsi


def inverse(lat1: ArrayLike, lon1: ArrayLike, lat2: ArrayLike,
            lon2: ArrayLike) -> tuple[NDArray[np.float64], NDArray[np.float64]]:
    """Length and course of the rhumb line from point 1 to point 2, the shorter way in longitude.

    Parameters
    ----------
    lat1, lon1 : array_like of float [deg]
        Start point on WGS84.
    lat2, lon2 : array_like of float [deg]
        End point on WGS84; the longitudes may be written in any turn.

    Returns
    -------
    distance_m : ndarray of float [m]
        Length of the rhumb line.
    course_deg : ndarray of float [deg]
        Its constant course, clockwise from north, in [-180, 180].

    Notes
    -----
    With Δλ = wrap180(λ₂ − λ₁) and Δψ = ψ(φ₂) − ψ(φ₁) (both in radians), the
    course is atan2(Δλ, Δψ) and the length hypot(Δλ, Δψ)·ΔM/Δψ, which is
    ΔM/cos(course), or the parallel arc N·cos φ·|Δλ| when Δψ = 0
    [RHUMB-TEXTS] [P]. Exact to round-off: within 1e-6 m (or 1e-12 relative)
    and 1e-9° of ``RhumbSolve`` [KARNEY-RHUMB] on several hundred lines up to
    3000 nm. A longitude change of exactly 180° has no shorter way: callers
    refuse such a leg (:func:`check_leg`), as they refuse legs within 1° of a pole.

    Examples
    --------
    The published ``RhumbSolve`` example [KARNEY-RHUMB], New York JFK to
    Singapore Changi (103:34:58.2, 18523563 m at ``-p 0``); ``RhumbSolve -i -p 9``
    gives 103.58283300341095° and 18523563.042377431 m:

    >>> s_m, course_deg = inverse(40 + 38/60 + 23/3600, -(73 + 46/60 + 44/3600),
    ...                           1 + 21/60 + 33/3600, 103 + 59/60 + 22/3600)
    >>> round(float(s_m), 3), round(float(course_deg), 9)
    (18523563.042, 103.582833003)

    A parallel arc: 1° of longitude along 60°N, 55800.001572436 m by
    ``RhumbSolve -i -p 9`` and by the closed form N·cos φ·Δλ [WGS84] [D]:

    >>> s_m, course_deg = inverse(60.0, 0.0, 60.0, 1.0)
    >>> round(float(s_m), 6), float(course_deg)
    (55800.001572, 90.0)
    """
    lat1, lat2 = _f64(lat1), _f64(lat2)
    dlon = np.radians(wrap180(_f64(lon2) - _f64(lon1)))
    ratio, dpsi = _arc_per_psi(lat1, lat2)
    course = np.degrees(np.arctan2(dlon, dpsi))
    return np.hypot(dlon, dpsi) * ratio, course


def direct(lat1: ArrayLike, lon1: ArrayLike, course_deg: ArrayLike,
           distance_m: ArrayLike) -> tuple[NDArray[np.float64], NDArray[np.float64]]:
    """Point at a distance along the rhumb line from point 1 at a course.

    Parameters
    ----------
    lat1, lon1 : array_like of float [deg]
        Start point on WGS84.
    course_deg : array_like of float [deg]
        Constant course, clockwise from north.
    distance_m : array_like of float [m]
        Distance sailed along the line, 0 or more.

    Returns
    -------
    lat_deg : ndarray of float [deg]
        Latitude reached.
    lon_deg : ndarray of float [deg]
        Longitude reached, unwrapped: the start plus the signed change, never
        folded into ±180.

    Notes
    -----
    φ₂ = M⁻¹(M(φ₁) + s·cos α) and Δλ = s·sin α / (ΔM/Δψ) [RHUMB-TEXTS] [P], exact
    to round-off: within 1e-9° of ``RhumbSolve`` [KARNEY-RHUMB] up to 3000 nm. A
    line that would reach a pole is clipped there: callers refuse legs that come
    within 1° of a pole.

    Examples
    --------
    2000 km from New York JFK on the published ``RhumbSolve`` example's course
    103:34:58.2 [KARNEY-RHUMB]: 36:24:30.3N 051:28:26.4W, and with
    ``RhumbSolve -L 40:38:23N 073:46:44W 103:34:58.2 -p 9`` 36.40842377223995°
    -51.47399897137938°:

    >>> lat_deg, lon_deg = direct(40 + 38/60 + 23/3600, -(73 + 46/60 + 44/3600),
    ...                           103 + 34/60 + 58.2/3600, 2.0e6)
    >>> round(float(lat_deg), 9), round(float(lon_deg), 9)
    (36.408423772, -51.473998971)

    Two degrees of the equator east from 179°E, 2 × 111319.490793274 m
    (``RhumbSolve -i -p 9``), end at 181°, not -179°:

    >>> lat_deg, lon_deg = direct(0.0, 179.0, 90.0, 2 * 111319.490793274)
    >>> round(float(lat_deg), 9), round(float(lon_deg), 9)
    (0.0, 181.0)
    """
    lat1 = _f64(lat1)
    alpha = np.radians(_f64(course_deg))
    s = _f64(distance_m)
    lat2 = latitude_from_arc(meridian_arc_m(lat1) + s * np.cos(alpha))
    ratio, _ = _arc_per_psi(np.broadcast_to(lat1, lat2.shape), lat2)
    dlon = s * np.sin(alpha) / ratio
    return lat2, _f64(lon1) + np.degrees(dlon)


def check_leg(lat1: float, lon1: float, lat2: float, lon2: float) -> str | None:
    """Why a rhumb leg cannot be sailed here, or None when it can.

    Parameters
    ----------
    lat1, lon1 : float [deg]
        Start of the leg on WGS84.
    lat2, lon2 : float [deg]
        End of the leg on WGS84.

    Returns
    -------
    str or None
        The reason, or None for a sailable leg. Refused: a longitude change of
        exactly 180° (no shorter way) and a leg that comes within 1° of a pole
        (latitude is monotonic along a rhumb line, so the end points decide).

    Examples
    --------
    >>> check_leg(10.0, 0.0, 20.0, 180.0)
    'the longitude change is exactly 180°, so the leg has no shorter way'
    >>> check_leg(89.5, 0.0, 80.0, 10.0)
    'the leg comes within 1° of a pole'
    >>> check_leg(89.0, 0.0, 10.0, 179.999) is None
    True
    """
    if abs(float(wrap180(lon2 - lon1))) == 180.0:
        return "the longitude change is exactly 180°, so the leg has no shorter way"
    if max(abs(lat1), abs(lat2)) > 89.0:
        return "the leg comes within 1° of a pole"
    return None
