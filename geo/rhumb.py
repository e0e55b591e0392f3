"""Rhumb lines (loxodromes) on the WGS84 ellipsoid: distance, course, point at distance.

A rhumb line crosses every meridian at the same course; it is a straight line
in the ellipsoidal Mercator plane (x = a·λ, y = a·ψ(φ), ψ the isometric
latitude). Its length is the change in meridian arc divided by the cosine of
the course, or the parallel arc when sailing east-west (REFERENCE.md section 5,
standard navigation texts).

Numerics, all exact to round-off on the ellipsoid:

- meridian arc M(φ): Helmert's series in the third flattening n to n⁴; the
  first neglected term is ~a·n⁵ ≈ 1e-7 m;
- its inverse by Newton's method on M(φ) with dM/dφ = ρ (meridional radius);
- the divided difference ΔM/Δψ, which is the distance per radian of
  longitude-or-isometric-latitude along the line, by 8-point Gauss-Legendre
  quadrature of dM and dψ when the latitudes are close (the ratio stays exact
  as Δψ → 0 and becomes the parallel radius N·cos φ), by plain differences
  otherwise.

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
"""Meridian arc from the equator to a pole, metres (10 001 965.729 m for WGS84)."""

_GL_X, _GL_W = np.polynomial.legendre.leggauss(8)
_CLOSE_RAD = 0.05  # latitude difference below which quadrature is used


def _f64(x: ArrayLike) -> NDArray[np.float64]:
    return np.asarray(x, dtype=np.float64)


def wrap180(lon_deg: ArrayLike) -> NDArray[np.float64]:
    """Longitude difference folded into [-180, 180), degrees."""
    x = _f64(lon_deg)
    return (x + 180.0) % 360.0 - 180.0


def meridian_arc_m(lat_deg: ArrayLike) -> NDArray[np.float64]:
    """Meridian arc from the equator to latitude ``lat_deg``, metres (signed).

    Helmert's series (e.g. Deakin & Hunter, "Geometric geodesy"), truncated
    after n⁴: error below 1e-7 m anywhere.
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
    """Inverse of :func:`meridian_arc_m`: latitude in degrees for an arc in metres.

    Newton's method on M(φ) - arc = 0 (dM/dφ = ρ), converged to round-off.
    Arcs beyond a quarter meridian are clipped to the pole.
    """
    m = np.clip(_f64(arc_m), -QUARTER_MERIDIAN_M, QUARTER_MERIDIAN_M)
    phi = m / _ARC_A  # rectifying latitude: within 0.2° of the answer
    for _ in range(6):
        step = (meridian_arc_m(np.degrees(phi)) - m) / _rho(phi)
        phi = phi - step
    return np.degrees(phi)


def isometric_latitude(lat_deg: ArrayLike) -> NDArray[np.float64]:
    """Isometric latitude ψ(φ) = asinh(tan φ) − e·atanh(e·sin φ), radians."""
    phi = np.radians(_f64(lat_deg))
    return np.arcsinh(np.tan(phi)) - E * np.arctanh(E * np.sin(phi))


def latitude_from_isometric(psi: ArrayLike) -> NDArray[np.float64]:
    """Inverse of :func:`isometric_latitude`, degrees; Newton from the spherical value."""
    psi = _f64(psi)
    phi = np.arctan(np.sinh(psi))
    for _ in range(6):
        s = np.sin(phi)
        dpsi_dphi = (1.0 - E2) / ((1.0 - E2 * s * s) * np.cos(phi))
        phi = phi - (isometric_latitude(np.degrees(phi)) - psi) / dpsi_dphi
    return np.degrees(phi)


def _arc_per_psi(lat1_deg: NDArray[np.float64], lat2_deg: NDArray[np.float64]):
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


def inverse(lat1: ArrayLike, lon1: ArrayLike, lat2: ArrayLike, lon2: ArrayLike):
    """Rhumb line from point 1 to point 2 the shorter way in longitude.

    Returns ``(distance_m, course_deg)``; course clockwise from north in
    [-180, 180]. A longitude change of exactly 180° has no shorter way: the
    caller refuses such a leg (:func:`check_leg`).
    """
    lat1, lat2 = _f64(lat1), _f64(lat2)
    dlon = np.radians(wrap180(_f64(lon2) - _f64(lon1)))
    ratio, dpsi = _arc_per_psi(lat1, lat2)
    course = np.degrees(np.arctan2(dlon, dpsi))
    return np.hypot(dlon, dpsi) * ratio, course


def direct(lat1: ArrayLike, lon1: ArrayLike, course_deg: ArrayLike, distance_m: ArrayLike):
    """Point at ``distance_m`` along the rhumb line from point 1 at ``course_deg``.

    Returns ``(lat_deg, lon_deg)`` with the longitude unwrapped (start plus
    the signed change). A line that would reach a pole is clipped there:
    callers refuse legs that come within 1° of a pole.
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

    Refused: a longitude change of exactly 180° (no shorter way) and a leg
    that comes within 1° of a pole (latitude is monotonic along a rhumb
    line, so the end points decide).
    """
    if abs(float(wrap180(lon2 - lon1))) == 180.0:
        return "the longitude change is exactly 180°, so the leg has no shorter way"
    if max(abs(lat1), abs(lat2)) > 89.0:
        return "the leg comes within 1° of a pole"
    return None
