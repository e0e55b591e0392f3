"""Rhumb lines on WGS84 (geo.rhumb) against outside references, and leg refusals.

References:

- GeographicLib ``RhumbSolve`` (geographiclib-tools, exact elliptic-integral
  rhumb lines, Karney 2014): ``RhumbSolve -i -p 9`` (inverse) and
  ``RhumbSolve -p 9`` (direct), a few hundred seeded random cases in one call
  each;
- closed forms from the WGS84 definition (a = 6378137 m, f = 1/298.257223563,
  NIMA TR8350.2): meridian arc M(φ) = ∫ρ dφ with ρ = a(1−e²)/(1−e²sin²φ)^1.5
  (scipy.integrate.quad); parallel arc N·cosφ·Δλ with N = a/√(1−e²sin²φ);
  rhumb length ΔM / cos(course) (REFERENCE.md section 5).
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from scipy.integrate import quad

from geo import rhumb
from geo.errors import InputError
from geo.path import route_path
from tests.helpers.geo import (
    NM,
    WGS84_A,
    WGS84_E2,
    make_route,
    rhumbsolve_direct,
    rhumbsolve_inverse,
    wrap180,
)

needs_rhumbsolve = pytest.mark.requires_rhumbsolve

DIST_ABS_M = 1e-6
DIST_REL = 1e-12
ANGLE_DEG = 1e-9
MAX_S = 3000 * NM


def _rho(phi: float) -> float:
    """Meridional radius of curvature, WGS84 definition (closed form)."""
    return WGS84_A * (1 - WGS84_E2) / (1 - WGS84_E2 * math.sin(phi) ** 2) ** 1.5


def _arc_quad(lat_deg: float) -> float:
    """Meridian arc by quadrature of ρ(φ) (scipy.integrate.quad)."""
    val, err = quad(_rho, 0.0, math.radians(lat_deg), epsabs=1e-9, epsrel=1e-13, limit=200)
    assert err < 1e-6
    return val


def _parallel_arc(lat_deg: float, dlon_deg: float) -> float:
    """Closed form: parallel arc N·cosφ·Δλ."""
    phi = math.radians(lat_deg)
    return WGS84_A * math.cos(phi) / math.sqrt(1 - WGS84_E2 * math.sin(phi) ** 2) * abs(
        math.radians(dlon_deg))


# ---------------------------------------------------------------------------
# random cases, grouped by kind, all (lat1, lon1, lat2, lon2)


def _inverse_cases() -> dict[str, np.ndarray]:
    rng = np.random.default_rng(20240611)
    out = {}
    n = 160
    # general: end points anywhere up to |lat| 85, at most 3000 nm apart (filtered below)
    lat1 = rng.uniform(-85, 85, n)
    lat2 = np.clip(lat1 + rng.uniform(-45, 45, n), -85, 85)
    lon1 = rng.uniform(-180, 180, n)
    lon2 = lon1 + rng.uniform(-60, 60, n) / np.maximum(np.cos(np.radians(lat1)), 0.2)
    out["general"] = np.column_stack([lat1, lon1, lat2, wrap180(lon2)])
    # near east-west: Δlat 1e-9..1e-3 degrees, either sign
    n = 80
    lat1 = rng.uniform(-85, 85, n)
    dlat = 10 ** rng.uniform(-9, -3, n) * rng.choice([-1.0, 1.0], n)
    lat2 = lat1 + dlat
    lon1 = rng.uniform(-180, 180, n)
    lon2 = lon1 + rng.uniform(-40, 40, n) * np.cos(np.radians(40)) / np.maximum(
        np.cos(np.radians(lat1)), 0.1)
    out["near_east_west"] = np.column_stack([lat1, lon1, lat2, wrap180(lon2)])
    # across 180°: start east of 170°E, end written west of 180 (folded)
    n = 40
    lat1 = rng.uniform(-70, 70, n)
    lat2 = np.clip(lat1 + rng.uniform(-10, 10, n), -85, 85)
    lon1 = rng.uniform(170, 180, n)
    lon2 = wrap180(lon1 + rng.uniform(1, 20, n))
    west = rng.random(n) < 0.5  # half of them the other way, west across 180°
    l1, l2 = np.where(west, lon2, lon1), np.where(west, lon1, lon2)
    out["across_180"] = np.column_stack([lat1, l1, lat2, l2])
    # exact meridians, north- and southbound
    n = 30
    lat1 = rng.uniform(-85, 85, n)
    lat2 = np.clip(lat1 + rng.uniform(-45, 45, n), -85, 85)
    lon1 = rng.uniform(-180, 180, n)
    out["meridian"] = np.column_stack([lat1, lon1, lat2, lon1])
    # pure east-west on the equator and at ±60°
    n = 24
    lat = np.repeat([0.0, 60.0, -60.0], n // 3)
    lon1 = rng.uniform(-180, 180, n)
    lon2 = wrap180(lon1 + rng.uniform(-90, 90, n) * np.cos(np.radians(lat)))
    out["parallel"] = np.column_stack([lat, lon1, lat, lon2])
    return out


INVERSE_CASES = _inverse_cases()


@needs_rhumbsolve
@pytest.mark.parametrize("group", sorted(INVERSE_CASES))
def test_inverse_against_rhumbsolve(group):
    # GeographicLib RhumbSolve -i -p 9 (geographiclib-tools)
    c = INVERSE_CASES[group]
    course_ref, s_ref = rhumbsolve_inverse(*c.T)
    keep = s_ref <= MAX_S
    assert keep.sum() >= 0.5 * len(c)
    c, course_ref, s_ref = c[keep], course_ref[keep], s_ref[keep]
    s, course = rhumb.inverse(*c.T)
    err = np.abs(s - s_ref)
    assert np.all((err <= DIST_ABS_M) | (err <= DIST_REL * s_ref)), err.max()
    assert np.max(np.abs(wrap180(course - course_ref))) <= ANGLE_DEG


@needs_rhumbsolve
@pytest.mark.parametrize("group", sorted(INVERSE_CASES))
def test_direct_against_rhumbsolve(group):
    # GeographicLib RhumbSolve -p 9 (geographiclib-tools), fed the course and distance
    # that RhumbSolve -i gives for the same cases
    c = INVERSE_CASES[group]
    course_ref, s_ref = rhumbsolve_inverse(*c.T)
    keep = s_ref <= MAX_S
    c, course_ref, s_ref = c[keep], course_ref[keep], s_ref[keep]
    lat_ref, lon_ref = rhumbsolve_direct(c[:, 0], c[:, 1], course_ref, s_ref)
    lat, lon = rhumb.direct(c[:, 0], c[:, 1], course_ref, s_ref)
    assert np.max(np.abs(lat - lat_ref)) <= ANGLE_DEG
    # unwrapped: the start plus the signed change, equal to RhumbSolve's modulo 360
    assert np.max(np.abs(wrap180(lon - lon_ref))) <= ANGLE_DEG
    assert np.max(np.abs(lon - c[:, 1])) <= 180.0


@needs_rhumbsolve
def test_direct_random_courses_against_rhumbsolve():
    # GeographicLib RhumbSolve -p 9 (geographiclib-tools): random course and distance
    rng = np.random.default_rng(7)
    n = 200
    lat1 = rng.uniform(-85, 85, n)
    lon1 = rng.uniform(-180, 180, n)
    course = rng.uniform(-180, 180, n)
    s = rng.uniform(0, MAX_S, n)
    lat_ref, lon_ref = rhumbsolve_direct(lat1, lon1, course, s)
    # lines that would reach a pole are refused anyway (RhumbSolve: NaN longitude)
    keep = (np.abs(lat_ref) <= 85.0) & np.isfinite(lon_ref)
    assert keep.sum() > 100
    lat, lon = rhumb.direct(lat1, lon1, course, s)
    assert np.max(np.abs(lat - lat_ref)[keep]) <= ANGLE_DEG
    assert np.max(np.abs(wrap180(lon - lon_ref))[keep]) <= ANGLE_DEG
    # and back: the inverse recovers the distance (RhumbSolve's end point as input)
    s_back, c_back = rhumb.inverse(lat1[keep], lon1[keep], lat_ref[keep], lon_ref[keep])
    dlon = np.abs(lon - lon1)[keep]  # unwrapped change, equal to RhumbSolve's mod 360 (above)
    sane = dlon < 179.0  # beyond 180° of longitude the shorter way is another line
    assert sane.sum() > 80
    err = np.abs(s_back - s[keep])[sane]
    assert np.all((err <= 1e-6) | (err <= 1e-12 * s[keep][sane]))
    assert np.max(np.abs(wrap180(c_back - course[keep]))[sane]) <= ANGLE_DEG


@needs_rhumbsolve
def test_special_directions_against_rhumbsolve():
    # GeographicLib RhumbSolve -p 9 (geographiclib-tools): due N/S/E/W, on the equator, at 60°
    lat1 = np.array([0.0, 0.0, 60.0, -60.0, 10.0, -33.0, 84.0, 0.0])
    lon1 = np.array([10.0, 179.0, -5.0, 178.5, 0.0, 20.0, 100.0, -179.5])
    course = np.array([90.0, 90.0, -90.0, 90.0, 0.0, 180.0, 90.0, -90.0])
    s = np.array([1e6, 5e5, 2e6, 3e5, 4e6, 3e6, 2e5, 1e5])
    lat_ref, lon_ref = rhumbsolve_direct(lat1, lon1, course, s)
    lat, lon = rhumb.direct(lat1, lon1, course, s)
    assert np.max(np.abs(lat - lat_ref)) <= ANGLE_DEG
    assert np.max(np.abs(lon - lon_ref)) <= ANGLE_DEG  # both unwrapped near the start
    # east-west keeps the latitude, meridians keep the longitude
    ew = np.abs(course) == 90.0
    assert np.max(np.abs(lat[ew] - lat1[ew])) <= 1e-12
    assert np.max(np.abs(lon[~ew] - lon1[~ew])) <= 1e-12


@needs_rhumbsolve
def test_quarter_meridian():
    # WGS84 quarter meridian 10 001 965.729 m (from memory [M], confirmed here by
    # GeographicLib RhumbSolve -i -p 9 from the equator to the pole, and by quadrature)
    _, s_ref = rhumbsolve_inverse(0.0, 0.0, 90.0, 0.0)
    assert s_ref[0] == pytest.approx(10_001_965.729, abs=1e-3)
    assert rhumb.QUARTER_MERIDIAN_M == pytest.approx(s_ref[0], abs=1e-6)
    assert float(rhumb.meridian_arc_m(90.0)) == pytest.approx(s_ref[0], abs=1e-6)
    assert float(rhumb.meridian_arc_m(-90.0)) == pytest.approx(-s_ref[0], abs=1e-6)
    # closed form: ∫ρ dφ from 0 to π/2 (scipy.integrate.quad)
    assert _arc_quad(90.0) == pytest.approx(s_ref[0], abs=1e-6)


@pytest.mark.parametrize("lat", [0.0, 1e-7, 0.5, 12.3, 30.0, 45.0, 60.0, 72.5, 85.0, 89.0, -47.1])
def test_meridian_arc_against_quadrature(lat):
    # closed form: M(φ) = ∫₀^φ a(1−e²)/(1−e²sin²φ)^1.5 dφ (scipy.integrate.quad)
    assert float(rhumb.meridian_arc_m(lat)) == pytest.approx(_arc_quad(lat), abs=1e-6)


@pytest.mark.parametrize("lat", [-80.0, -45.0, -1.0, 0.0, 3.3, 37.5, 60.0, 84.9])
def test_latitude_from_arc_inverts_quadrature(lat):
    # closed form: the latitude whose quadrature arc is given comes back to 1e-11°
    assert float(rhumb.latitude_from_arc(_arc_quad(lat))) == pytest.approx(lat, abs=1e-11)


@pytest.mark.parametrize(("lat", "lon1", "lon2"), [
    (0.0, 0.0, 1.0), (0.0, -179.0, 179.0), (60.0, 10.0, 70.0), (-60.0, 170.0, -170.0),
    (45.0, 0.0, -30.0), (84.0, -100.0, 50.0), (-30.0, 0.0, 1e-6),
])
def test_parallel_arc_closed_form(lat, lon1, lon2):
    # closed form: parallel arc N·cosφ·Δλ (Δλ the shorter way)
    s, course = rhumb.inverse(lat, lon1, lat, lon2)
    dlon = float(wrap180(lon2 - lon1))
    expected = _parallel_arc(lat, dlon)
    assert float(s) == pytest.approx(expected, rel=1e-12, abs=1e-6)
    assert float(course) == (90.0 if dlon > 0 else -90.0)


@pytest.mark.parametrize(("lat1", "lat2", "dlon"), [
    (10.0, 40.0, 25.0), (-60.0, -20.0, -50.0), (50.0, 50.5, 30.0), (0.0, -70.0, 100.0),
])
def test_rhumb_length_closed_form(lat1, lat2, dlon):
    # closed form (REFERENCE.md section 5): s = ΔM / cos(course), ΔM by quadrature of ρ
    s, course = rhumb.inverse(lat1, 0.0, lat2, dlon)
    d_arc = _arc_quad(lat2) - _arc_quad(lat1)
    assert float(s) == pytest.approx(d_arc / math.cos(math.radians(float(course))), abs=1e-6)
    lat_end, lon_end = rhumb.direct(lat1, 0.0, course, s)
    assert float(lat_end) == pytest.approx(lat2, abs=1e-11)
    assert float(lon_end) == pytest.approx(dlon, abs=1e-11)


def test_isometric_latitude_round_trip():
    # closed form: ψ = asinh(tanφ) − e·atanh(e·sinφ), and its inverse returns φ
    lat = np.linspace(-85, 85, 35)
    e = math.sqrt(WGS84_E2)
    phi = np.radians(lat)
    psi = np.arcsinh(np.tan(phi)) - e * np.arctanh(e * np.sin(phi))
    assert np.allclose(rhumb.isometric_latitude(lat), psi, rtol=0, atol=1e-14)
    assert np.allclose(rhumb.latitude_from_isometric(psi), lat, rtol=0, atol=1e-11)


def test_meridian_and_parallel_directions():
    # closed form: due north/south courses are 0/180, the distance is ΔM
    s, c = rhumb.inverse(20.0, 5.0, 50.0, 5.0)
    assert float(c) == 0.0
    assert float(s) == pytest.approx(_arc_quad(50.0) - _arc_quad(20.0), abs=1e-6)
    s, c = rhumb.inverse(50.0, 5.0, 20.0, 5.0)
    assert abs(float(c)) == 180.0


# ---------------------------------------------------------------------------
# refusals


@pytest.mark.parametrize(("lat1", "lon1", "lat2", "lon2"), [
    (10.0, 0.0, 20.0, 180.0), (10.0, -90.0, 20.0, 90.0), (0.0, 170.0, 0.0, -10.0),
    (-40.0, 200.0, -30.0, 20.0),
])
def test_check_leg_refuses_exact_180(lat1, lon1, lat2, lon2):
    # definition: a longitude change of exactly 180° has two equal ways round
    assert "180" in rhumb.check_leg(lat1, lon1, lat2, lon2)


@pytest.mark.parametrize(("lat1", "lat2"), [(89.5, 80.0), (70.0, 89.01), (-89.9, -85.0),
                                            (90.0, 85.0)])
def test_check_leg_refuses_near_pole(lat1, lat2):
    # rule of the tool: no leg within 1° of a pole (rhumb latitude is monotonic)
    assert "pole" in rhumb.check_leg(lat1, 0.0, lat2, 10.0)


@pytest.mark.parametrize(("lat1", "lon1", "lat2", "lon2"), [
    (89.0, 0.0, 80.0, 10.0), (10.0, 0.0, 20.0, 179.999), (10.0, 0.0, 20.0, -179.999),
    (0.0, 170.0, 0.0, -170.0), (-89.0, 0.0, -88.0, 100.0),
])
def test_check_leg_accepts(lat1, lon1, lat2, lon2):
    # rule of the tool: 1° from the pole exactly and just short of 180° are sailable
    assert rhumb.check_leg(lat1, lon1, lat2, lon2) is None


def test_route_path_refusals():
    # rule of the tool (geo.path.route_path): 180° legs, near-pole legs, zero length,
    # great circles passing within 1° of a pole
    with pytest.raises(InputError, match="180"):
        route_path(make_route([(10, 0), (12, 5), (20, 185)]))
    with pytest.raises(InputError, match="pole"):
        route_path(make_route([(80, 0), (89.5, 10)]))
    with pytest.raises(InputError, match="zero length"):
        route_path(make_route([(10, 0), (11, 1), (11, 1)]))
    with pytest.raises(InputError, match="leg 1"):
        # two points at 85°N 179° apart: the great circle passes within 0.5° of the pole
        route_path(make_route([(85, 0), (85, 179)], legs="great_circle"))
    # the same leg as a rhumb line stays on the 85th parallel and is accepted
    assert route_path(make_route([(85, 0), (85, 179)])).n_legs == 1
