"""Rhumb lines on WGS84 (geo.rhumb) against outside references, and leg refusals.

References, named beside every table and check:

- GeographicLib ``RhumbSolve`` [KARNEY-RHUMB] (geographiclib-tools 2.1.2, exact
  elliptic-integral rhumb lines): pinned values of ``RhumbSolve -i -p 9``
  (inverse) and ``RhumbSolve -p 9`` (direct) in the tables below, among them
  the man page's published example (New York JFK to Singapore Changi); and a
  few hundred seeded random cases in one call each, run live;
- closed forms from the WGS84 definition [WGS84] (a = 6378137 m,
  f = 1/298.257223563, NIMA TR8350.2) [D]: meridian arc M(φ) = ∫ρ dφ with
  ρ = a(1−e²)/(1−e²sin²φ)^1.5 (scipy.integrate.quad [SCIPY-2020]); parallel
  arc N·cosφ·Δλ with N = a/√(1−e²sin²φ); rhumb length ΔM / cos(course) and
  course atan2(Δλ, Δψ) with the isometric latitude ψ [RHUMB-TEXTS] [P].

Each table row is (inputs, expected, source); a live test checks that the
pinned RhumbSolve values are still what RhumbSolve prints.
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from geo import rhumb
from geo.errors import InputError
from geo.path import route_path
from tests.helpers.geo import (
    NM,
    WGS84_E2,
    isometric_lat_rad,
    make_route,
    meridian_arc_quad_m,
    parallel_arc_m,
    rhumbsolve_direct,
    rhumbsolve_inverse,
    wrap180,
)

needs_rhumbsolve = pytest.mark.requires_rhumbsolve

DIST_ABS_M = 1e-6
DIST_REL = 1e-12
ANGLE_DEG = 1e-9
MAX_S = 3000 * NM


INVERSE = "[KARNEY-RHUMB] RhumbSolve -i -p 9"
DIRECT = "[KARNEY-RHUMB] RhumbSolve -p 9"
ARC = "closed form [D]: M(φ) = ∫ρ dφ by scipy.integrate.quad [SCIPY-2020], [WGS84]"

# the published example of the RhumbSolve man page [KARNEY-RHUMB]
JFK = (40 + 38 / 60 + 23 / 3600, -(73 + 46 / 60 + 44 / 3600))  # 40:38:23N 073:46:44W
CHANGI = (1 + 21 / 60 + 33 / 3600, 103 + 59 / 60 + 22 / 3600)  # 01:21:33N 103:59:22E
JFK_CHANGI_COURSE = 103 + 34 / 60 + 58.2 / 3600  # 103:34:58.2, the man page's course

# ---------------------------------------------------------------------------
# pinned reference values: (inputs, expected, source)

# (lat1, lon1, lat2, lon2) [deg] -> (course [deg], distance [m])
INVERSE_PINNED = [
    pytest.param((*JFK, *CHANGI), (103.58283300341095, 18523563.04237743),
                 INVERSE + ", the man page example (103:34:58.2, 18523563 m at -p 0)",
                 id="JFK to Changi"),
    pytest.param((0.0, 0.0, 90.0, 0.0), (0.0, 10001965.729312725),
                 INVERSE + "; 10 001 965.729 m from memory [M]", id="quarter meridian"),
    pytest.param((0.0, 0.0, 45.0, 0.0), (0.0, 4984944.377977745), INVERSE, id="equator to 45N"),
    pytest.param((50.0, 5.0, 20.0, 5.0), (180.0, 3328480.787512515), INVERSE, id="due south"),
    pytest.param((60.0, 0.0, 60.0, 1.0), (90.0, 55800.001572436), INVERSE, id="1 deg at 60N"),
    pytest.param((0.0, 0.0, 0.0, 1.0), (90.0, 111319.490793274), INVERSE, id="1 deg of equator"),
    pytest.param((5.0, -5.0, 5.0, 0.0), (90.0, 554493.531160637), INVERSE, id="5 deg at 5N"),
    pytest.param((-30.0, 170.0, -20.0, -170.0), (61.20400638272004, 2299698.208624045),
                 INVERSE, id="east across 180"),
]

# (lat1, lon1, course [deg], distance [m]) -> (lat2, lon2 unwrapped near lon1) [deg]
DIRECT_PINNED = [
    pytest.param((*JFK, JFK_CHANGI_COURSE, 2e6), (36.40842377223995, -51.47399897137937),
                 DIRECT + ", the man page -L example: 36:24:30.3N 051:28:26.4W", id="JFK 2000 km"),
    pytest.param((*JFK, JFK_CHANGI_COURSE, 4e6), (32.17412382648023, -30.349238746387115),
                 DIRECT + ", the man page -L example: 32:10:26.8N 030:20:57.3W", id="JFK 4000 km"),
    pytest.param((0.0, 10.0, 90.0, 1e6), (0.0, 18.98315284119522), DIRECT, id="E on equator"),
    pytest.param((0.0, 179.0, 90.0, 5e5), (0.0, 183.4915764205976), DIRECT, id="E across 180"),
    pytest.param((60.0, -5.0, -90.0, 2e6), (60.0, -40.84229289677927), DIRECT, id="W at 60N"),
    pytest.param((-60.0, 178.5, 90.0, 3e5), (-60.0, 183.87634393451685), DIRECT, id="E at 60S"),
    pytest.param((10.0, 0.0, 0.0, 4e6), (46.08788767839663, 0.0), DIRECT, id="due N"),
    pytest.param((-33.0, 20.0, 180.0, 3e6), (-59.98810923332275, 20.0), DIRECT, id="due S"),
    pytest.param((84.0, 100.0, 90.0, 2e5), (84.0, 117.13095817590735), DIRECT, id="E at 84N"),
    pytest.param((0.0, -179.5, -90.0, 1e5), (0.0, -180.39831528411946), DIRECT, id="W past 180"),
]


@pytest.mark.parametrize(("inputs", "expected", "source"), INVERSE_PINNED)
def test_inverse_pinned(inputs: tuple[float, ...], expected: tuple[float, float],
                        source: str) -> None:
    course_ref, s_ref = expected
    s, course = rhumb.inverse(*inputs)
    err = abs(float(s) - s_ref)
    assert err <= DIST_ABS_M or err <= DIST_REL * s_ref, (source, err)
    assert abs(float(wrap180(float(course) - course_ref))) <= ANGLE_DEG, source


@pytest.mark.parametrize(("inputs", "expected", "source"), DIRECT_PINNED)
def test_direct_pinned(inputs: tuple[float, ...], expected: tuple[float, float],
                       source: str) -> None:
    lat1, lon1, course, _ = inputs
    lat, lon = rhumb.direct(*inputs)
    assert abs(float(lat) - expected[0]) <= ANGLE_DEG, source
    assert abs(float(lon) - expected[1]) <= ANGLE_DEG, source  # both unwrapped near the start
    # definition: east-west keeps the latitude, meridians keep the longitude
    if abs(course) == 90.0:
        assert abs(float(lat) - lat1) <= 1e-12
    elif course in (0.0, 180.0):
        assert abs(float(lon) - lon1) <= 1e-12


@needs_rhumbsolve
def test_pinned_values_are_rhumbsolves() -> None:
    # [KARNEY-RHUMB] RhumbSolve -i -p 9 and -p 9, live: the tables above hold its output,
    # and the code agrees with the live output as with the pinned one
    inputs = np.array([p.values[0] for p in INVERSE_PINNED])
    pinned = np.array([p.values[1] for p in INVERSE_PINNED])
    course_ref, s_ref = rhumbsolve_inverse(*inputs.T)
    assert np.max(np.abs(wrap180(course_ref - pinned[:, 0]))) <= 1e-12
    assert np.max(np.abs(s_ref - pinned[:, 1])) <= 1e-9
    inputs = np.array([p.values[0] for p in DIRECT_PINNED])
    pinned = np.array([p.values[1] for p in DIRECT_PINNED])
    lat_ref, lon_ref = rhumbsolve_direct(*inputs.T)
    assert np.max(np.abs(lat_ref - pinned[:, 0])) <= 1e-12
    assert np.max(np.abs(lon_ref - pinned[:, 1])) <= 1e-12
    lat, lon = rhumb.direct(*inputs.T)
    assert np.max(np.abs(lat - lat_ref)) <= ANGLE_DEG
    assert np.max(np.abs(lon - lon_ref)) <= ANGLE_DEG


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
def test_inverse_against_rhumbsolve(group: str) -> None:
    # [KARNEY-RHUMB] GeographicLib RhumbSolve -i -p 9 (geographiclib-tools), live
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
def test_direct_against_rhumbsolve(group: str) -> None:
    # [KARNEY-RHUMB] GeographicLib RhumbSolve -p 9 (geographiclib-tools), live, fed the
    # course and distance that RhumbSolve -i gives for the same cases
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
def test_direct_random_courses_against_rhumbsolve() -> None:
    # [KARNEY-RHUMB] GeographicLib RhumbSolve -p 9 (geographiclib-tools), live: random course
    # and distance
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
def test_quarter_meridian() -> None:
    # WGS84 quarter meridian 10 001 965.729 m (from memory [M], confirmed here by
    # [KARNEY-RHUMB] RhumbSolve -i -p 9 from the equator to the pole, and by quadrature)
    _, s_ref = rhumbsolve_inverse(0.0, 0.0, 90.0, 0.0)
    assert s_ref[0] == pytest.approx(10_001_965.729, abs=1e-3)
    assert rhumb.QUARTER_MERIDIAN_M == pytest.approx(s_ref[0], abs=1e-6)
    assert float(rhumb.meridian_arc_m(90.0)) == pytest.approx(s_ref[0], abs=1e-6)
    assert float(rhumb.meridian_arc_m(-90.0)) == pytest.approx(-s_ref[0], abs=1e-6)
    # closed form [D]: ∫ρ dφ from 0 to π/2 (scipy.integrate.quad [SCIPY-2020])
    assert meridian_arc_quad_m(90.0) == pytest.approx(s_ref[0], abs=1e-6)


# ---------------------------------------------------------------------------
# closed forms: (inputs, expected, source)

# latitude [deg] -> meridian arc from the equator [m]
MERIDIAN_ARCS = [
    pytest.param(lat, meridian_arc_quad_m(lat), ARC, id=f"{lat}")
    for lat in (0.0, 1e-7, 0.5, 12.3, 30.0, 45.0, 60.0, 72.5, 85.0, 89.0, -47.1)
]

# meridian arc [m] -> latitude [deg]
ARC_LATITUDES = [
    pytest.param(meridian_arc_quad_m(lat), lat, ARC, id=f"{lat}")
    for lat in (-80.0, -45.0, -1.0, 0.0, 3.3, 37.5, 60.0, 84.9)
]

# (lat, lon1, lon2) [deg] -> (parallel arc [m], course [deg]): N·cosφ·Δλ, Δλ the shorter way
PARALLEL = "closed form [D]: parallel arc N·cosφ·Δλ, [WGS84]"
PARALLEL_ARCS = [
    pytest.param((lat, lon1, lon2), (parallel_arc_m(lat, float(wrap180(lon2 - lon1))),
                                     90.0 if float(wrap180(lon2 - lon1)) > 0 else -90.0),
                 PARALLEL, id=f"{lat} {lon1} {lon2}")
    for lat, lon1, lon2 in ((0.0, 0.0, 1.0), (0.0, -179.0, 179.0), (60.0, 10.0, 70.0),
                            (-60.0, 170.0, -170.0), (45.0, 0.0, -30.0), (84.0, -100.0, 50.0),
                            (-30.0, 0.0, 1e-6))
]

# (lat1, lat2, Δlon) [deg], starting at 0°E -> (ΔM [m], course [deg])
LENGTH = ("closed form [D]: s = ΔM / cos(course), ΔM by quadrature of ρ [SCIPY-2020], "
          "course atan2(Δλ, Δψ) [RHUMB-TEXTS]")
RHUMB_LENGTHS = [
    pytest.param((lat1, lat2, dlon),
                 (meridian_arc_quad_m(lat2) - meridian_arc_quad_m(lat1),
                  math.degrees(math.atan2(math.radians(dlon),
                                          isometric_lat_rad(lat2) - isometric_lat_rad(lat1)))),
                 LENGTH, id=f"{lat1} {lat2} {dlon}")
    for lat1, lat2, dlon in ((10.0, 40.0, 25.0), (-60.0, -20.0, -50.0), (50.0, 50.5, 30.0),
                             (0.0, -70.0, 100.0))
]


@pytest.mark.parametrize(("lat", "expected_m", "source"), MERIDIAN_ARCS)
def test_meridian_arc_against_quadrature(lat: float, expected_m: float, source: str) -> None:
    assert float(rhumb.meridian_arc_m(lat)) == pytest.approx(expected_m, abs=1e-6), source


@pytest.mark.parametrize(("arc_m", "expected_deg", "source"), ARC_LATITUDES)
def test_latitude_from_arc_inverts_quadrature(arc_m: float, expected_deg: float,
                                              source: str) -> None:
    # the latitude whose quadrature arc is given comes back to 1e-11°
    assert float(rhumb.latitude_from_arc(arc_m)) == pytest.approx(expected_deg, abs=1e-11), source


@pytest.mark.parametrize(("inputs", "expected", "source"), PARALLEL_ARCS)
def test_parallel_arc_closed_form(inputs: tuple[float, float, float],
                                  expected: tuple[float, float], source: str) -> None:
    lat, lon1, lon2 = inputs
    s, course = rhumb.inverse(lat, lon1, lat, lon2)
    assert float(s) == pytest.approx(expected[0], rel=1e-12, abs=1e-6), source
    assert float(course) == expected[1], source


@pytest.mark.parametrize(("inputs", "expected", "source"), RHUMB_LENGTHS)
def test_rhumb_length_closed_form(inputs: tuple[float, float, float],
                                  expected: tuple[float, float], source: str) -> None:
    lat1, lat2, dlon = inputs
    d_arc, course_ref = expected
    s, course = rhumb.inverse(lat1, 0.0, lat2, dlon)
    assert float(course) == pytest.approx(course_ref, abs=ANGLE_DEG), source
    assert float(s) == pytest.approx(d_arc / math.cos(math.radians(float(course))), abs=1e-6)
    assert float(s) == pytest.approx(d_arc / math.cos(math.radians(course_ref)), abs=1e-6)
    lat_end, lon_end = rhumb.direct(lat1, 0.0, course, s)
    assert float(lat_end) == pytest.approx(lat2, abs=1e-11)
    assert float(lon_end) == pytest.approx(dlon, abs=1e-11)


def test_isometric_latitude_round_trip() -> None:
    # closed form [RHUMB-TEXTS]: ψ = asinh(tanφ) − e·atanh(e·sinφ), and its inverse returns φ
    lat = np.linspace(-85, 85, 35)
    e = math.sqrt(WGS84_E2)
    phi = np.radians(lat)
    psi = np.arcsinh(np.tan(phi)) - e * np.arctanh(e * np.sin(phi))
    assert np.allclose(rhumb.isometric_latitude(lat), psi, rtol=0, atol=1e-14)
    assert np.allclose(rhumb.latitude_from_isometric(psi), lat, rtol=0, atol=1e-11)


def test_meridian_and_parallel_directions() -> None:
    # closed form [D]: due north/south courses are 0/180, the distance is ΔM (quadrature)
    s, c = rhumb.inverse(20.0, 5.0, 50.0, 5.0)
    assert float(c) == 0.0
    assert float(s) == pytest.approx(meridian_arc_quad_m(50.0) - meridian_arc_quad_m(20.0),
                                     abs=1e-6)
    s, c = rhumb.inverse(50.0, 5.0, 20.0, 5.0)
    assert abs(float(c)) == 180.0


# ---------------------------------------------------------------------------
# refusals: (inputs, expected, source); expected is a word of the reason, or None

EXACT_180 = "definition: a longitude change of exactly 180° has two equal ways round"
NEAR_POLE = "rule of the tool: no leg within 1° of a pole (rhumb latitude is monotonic)"
SAILABLE = "rule of the tool: 1° from the pole exactly and just short of 180° are sailable"
CHECK_LEG_CASES = [
    *(pytest.param(leg, "180", EXACT_180, id=f"180 {leg}") for leg in (
        (10.0, 0.0, 20.0, 180.0), (10.0, -90.0, 20.0, 90.0), (0.0, 170.0, 0.0, -10.0),
        (-40.0, 200.0, -30.0, 20.0))),
    *(pytest.param((lat1, 0.0, lat2, 10.0), "pole", NEAR_POLE, id=f"pole {lat1} {lat2}")
      for lat1, lat2 in ((89.5, 80.0), (70.0, 89.01), (-89.9, -85.0), (90.0, 85.0))),
    *(pytest.param(leg, None, SAILABLE, id=f"ok {leg}") for leg in (
        (89.0, 0.0, 80.0, 10.0), (10.0, 0.0, 20.0, 179.999), (10.0, 0.0, 20.0, -179.999),
        (0.0, 170.0, 0.0, -170.0), (-89.0, 0.0, -88.0, 100.0))),
]


@pytest.mark.parametrize(("inputs", "expected", "source"), CHECK_LEG_CASES)
def test_check_leg(inputs: tuple[float, float, float, float], expected: str | None,
                   source: str) -> None:
    why = rhumb.check_leg(*inputs)
    if expected is None:
        assert why is None, source
    else:
        assert expected in why, source


def test_route_path_refusals() -> None:
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
        # ([KARNEY-2013] GeodSolve -p 9: 89.956°N at mid-distance)
        route_path(make_route([(85, 0), (85, 179)], legs="great_circle"))
    # the same leg as a rhumb line stays on the 85th parallel and is accepted
    assert route_path(make_route([(85, 0), (85, 179)])).n_legs == 1
