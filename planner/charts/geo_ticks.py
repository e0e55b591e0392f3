"""Longitude and latitude ticks for the maps: round steps, labels that say exactly where.

A tick is put only where its label is exact: whole degrees (``58°E``) when the
step is a whole number of degrees, degrees and minutes (``57°30'E``) when the
map is zoomed in to steps of minutes. Pure functions (no matplotlib): the map
sets the ticks and labels these return.
"""

from __future__ import annotations

import math

STEPS_MIN = (1, 2, 5, 10, 15, 20, 30, 60, 120, 300, 600, 900, 1200, 1800, 2700, 3600, 5400)
"""Candidate tick steps, whole minutes of arc (1' to 90°)."""


def tick_step_min(span_deg: float, most: int = 8) -> int:
    """The smallest candidate step [minutes of arc] giving at most ``most`` ticks over
    ``span_deg`` [°]."""
    if not (span_deg > 0 and math.isfinite(span_deg)):
        raise ValueError(f"span {span_deg!r} must be a positive number of degrees")
    for step in STEPS_MIN:
        if span_deg * 60.0 / step <= most:
            return step
    return STEPS_MIN[-1]


def ticks_deg(lo_deg: float, hi_deg: float, most: int = 8) -> list[float]:
    """Tick positions [°] from ``lo_deg`` to ``hi_deg`` on multiples of the step."""
    step = tick_step_min(hi_deg - lo_deg, most)
    first = math.ceil(lo_deg * 60.0 / step - 1e-9)
    last = math.floor(hi_deg * 60.0 / step + 1e-9)
    return [k * step / 60.0 for k in range(first, last + 1)]


def _dm(value_deg: float, hemispheres: str) -> str:
    minutes = round(abs(value_deg) * 60.0)
    deg, rem = divmod(minutes, 60)
    bare = minutes == 0 or (hemispheres == "EW" and minutes == 180 * 60)
    hemi = "" if bare else hemispheres[1] if value_deg < 0 else hemispheres[0]
    return f"{deg}°{hemi}" if rem == 0 else f"{deg}°{rem:02d}'{hemi}"


def lon_label(lon_deg: float) -> str:
    """``170°E``, ``176°W``, ``57°30'E``, ``180°``, ``0°``: the longitude folded into
    (−180, 180], to the whole minute."""
    w = (lon_deg + 180.0) % 360.0 - 180.0
    if abs(w + 180.0) < 1e-9:
        w = 180.0
    return _dm(w, "EW")


def lat_label(lat_deg: float) -> str:
    """``39°S``, ``39°30'S``, ``0°``: the latitude to the whole minute."""
    return _dm(lat_deg, "NS")
