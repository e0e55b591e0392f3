"""The WGS84 ellipsoid, the nautical mile, and the one shared ``pyproj.Geod``.

Geodesics come from pyproj's bindings to GeographicLib (Karney 2013,
"Algorithms for geodesics", J. Geodesy 87), exact to round-off
(REFERENCE.md section 5). PROJ must be 9.2 or newer: :func:`check_proj`.
"""

from __future__ import annotations

import math

import pyproj

A_M = 6378137.0
"""WGS84 semi-major axis, metres."""
F = 1.0 / 298.257223563
"""WGS84 flattening."""
E2 = F * (2.0 - F)
"""First eccentricity squared."""
E = math.sqrt(E2)
N3 = F / (2.0 - F)
"""Third flattening n = (a - b)/(a + b)."""
NM_M = 1852.0
"""One international nautical mile in metres, exactly."""

MIN_PROJ = (9, 2)

GEOD = pyproj.Geod(ellps="WGS84")
"""The shared WGS84 geodesic solver (create once: construction is not free)."""


def proj_version() -> tuple[int, int]:
    """PROJ's (major, minor) version as linked by pyproj."""
    major, minor = pyproj.proj_version_str.split(".")[:2]
    return int(major), int(minor)


def check_proj() -> None:
    """Raise ``RuntimeError`` when the PROJ library is older than 9.2."""
    if proj_version() < MIN_PROJ:
        raise RuntimeError(
            f"PROJ {pyproj.proj_version_str} is too old: changeover needs PROJ >= 9.2 "
            "(install a newer pyproj wheel)"
        )
