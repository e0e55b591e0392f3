"""The WGS84 ellipsoid, the nautical mile, and the one shared ``pyproj.Geod``.

The ellipsoid is WGS84 [WGS84] [P]: a = 6 378 137 m, f = 1/298.257223563.
The nautical mile is 1852 m exactly [NM-1852] [P]. Geodesics come from
pyproj's bindings to GeographicLib [KARNEY-2013] [P], exact to round-off.
PROJ must be 9.2 or newer: :func:`check_proj`.

>>> NM_M  # [NM-1852] [P]: 1 nm = 1852 m
1852.0
>>> round(A_M * math.pi / 180.0, 6)  # 1° of the equator [m]; RhumbSolve -i -p 9 [KARNEY-RHUMB]
111319.490793
"""

from __future__ import annotations

import math

import pyproj

A_M = 6378137.0
"""WGS84 semi-major axis a [m] [WGS84] [P]."""
F = 1.0 / 298.257223563
"""WGS84 flattening f [-] [WGS84] [P]."""
E2 = F * (2.0 - F)
"""First eccentricity squared e² = f(2 − f) [-] [D]."""
E = math.sqrt(E2)
"""First eccentricity e [-] [D]."""
N3 = F / (2.0 - F)
"""Third flattening n = (a − b)/(a + b) = f/(2 − f) [-] [D]."""
NM_M = 1852.0
"""One international nautical mile [m], exactly [NM-1852] [P]."""

MIN_PROJ = (9, 2)

GEOD = pyproj.Geod(ellps="WGS84")
"""The shared WGS84 geodesic solver (create once: construction is not free)."""


def proj_version() -> tuple[int, int]:
    """PROJ's (major, minor) version as linked by pyproj.

    Returns
    -------
    version : tuple of (int, int) [-]
        Major and minor version numbers of the PROJ library.
    """
    major, minor = pyproj.proj_version_str.split(".")[:2]
    return int(major), int(minor)


def check_proj() -> None:
    """Refuse a PROJ library older than 9.2.

    Raises
    ------
    RuntimeError
        When :func:`proj_version` is below ``MIN_PROJ``.
    """
    if proj_version() < MIN_PROJ:
        raise RuntimeError(
            f"PROJ {pyproj.proj_version_str} is too old: changeover needs PROJ >= 9.2 "
            "(install a newer pyproj wheel)"
        )
