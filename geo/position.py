"""Positions: parsing and formatting latitudes and longitudes.

All values are in degrees (WGS84 latitude and longitude; north and east
positive). The written forms are decimal degrees (``54.205``, ``-3.5``) and the
nautical forms with minutes, and optionally seconds, of arc (1' = 1/60 degree,
1" = 1/60 minute): ``54°12.3'N``, ``54 12.3 N``, ``N54°12.3'``,
``003°30.0'W``, ``12°30'15"E``.
"""

from __future__ import annotations

import math
import re
from numbers import Real

from geo.errors import InputError

LAT_EXPECTED = "a latitude such as 54°12.3'N or 54.205"
LON_EXPECTED = "a longitude such as 003°30.0'W or -3.5"

# Characters people type for the marks, folded to ° ' " before matching.
# (degree sign, masculine ordinal, ring above; prime, right single quote,
# modifier prime, acute; double prime, right double quote, modifier double prime)
_FOLD = str.maketrans(
    {
        "º": "°",
        "˚": "°",
        "′": "'",
        "’": "'",
        "ʹ": "'",
        "´": "'",
        "″": '"',
        "”": '"',
        "ʺ": '"',
        "−": "-",  # U+2212 minus sign
    }
)

_NUM = r"\d+(?:\.\d*)?"
# A plain decimal number, also in the exponent form a spreadsheet or a program writes
# (``1e-05``, ``-3.5E+01``): read as signed decimal degrees.
_PLAIN = re.compile(r"[-+]?\d+(?:\.\d*)?(?:E[-+]?\d+)?")
_POSITION = re.compile(
    rf"""
    (?P<pre>[NSEW])?\s*
    (?P<sign>[-+])?\s*
    (?P<deg>{_NUM})
    (?:\s*(?P<dmark>°))?
    (?:
        (?:(?<=°)\s*|\s+)
        (?P<min>{_NUM})
        (?:\s*(?P<mmark>'))?
        (?:
            (?:(?<=')\s*|\s+)
            (?P<sec>{_NUM})
            (?:\s*(?P<smark>"))?
        )?
    )?
    \s*(?P<post>[NSEW])?
    """,
    re.VERBOSE,
)


def parse_lat(value: object, *, file: str = "", place: str = "") -> float:
    """Latitude in degrees (north positive) from a number or a written position.

    Raises :class:`InputError` naming ``file`` and ``place`` unless the value
    is a latitude within ±90°.
    """
    return _parse(value, "lat", file, place)


def parse_lon(value: object, *, file: str = "", place: str = "") -> float:
    """Longitude in degrees (east positive) from a number or a written position.

    A plain number may be any finite value (sailings take the shorter way); a
    written form with minutes, a degree mark or a hemisphere letter must be
    within 180°. Raises :class:`InputError` naming ``file`` and ``place``.
    """
    return _parse(value, "lon", file, place)


def _parse(value: object, axis: str, file: str, place: str) -> float:
    expected = LAT_EXPECTED if axis == "lat" else LON_EXPECTED
    limit = 90.0 if axis == "lat" else 180.0

    def fail(reason: str = "") -> InputError:
        return InputError(file, place, value, f"{expected} ({reason})" if reason else expected)

    if isinstance(value, bool) or not isinstance(value, Real | str):
        raise fail()
    folded = "" if isinstance(value, Real) else value.strip().translate(_FOLD).replace(
        "''", '"').upper()
    if isinstance(value, Real) or _PLAIN.fullmatch(folded):
        number = float(value) if isinstance(value, Real) else float(folded)
        if not math.isfinite(number):
            raise fail("a finite number")
        if axis == "lat" and abs(number) > 90.0:
            raise fail("within ±90°")
        return number
    m = _POSITION.fullmatch(folded)
    if m is None:
        raise fail()
    pre, post, sign = m["pre"], m["post"], m["sign"]
    if pre and post:
        raise fail("one hemisphere letter, not two")
    hemi = pre or post
    if hemi and sign:
        raise fail("a sign or a hemisphere letter, not both")
    if hemi and hemi not in ("NS" if axis == "lat" else "EW"):
        raise fail(f"{'N or S' if axis == 'lat' else 'E or W'}, not {hemi}")
    deg = float(m["deg"])
    plain = not (hemi or m["dmark"] or m["min"] is not None)
    if plain:  # signed decimal degrees
        number = -deg if sign == "-" else deg
        if axis == "lat" and deg > 90.0:
            raise fail("within ±90°")
        return number
    if m["min"] is not None and "." in m["deg"]:
        raise fail("whole degrees when minutes follow")
    minutes = float(m["min"] or 0.0)
    if m["sec"] is not None and "." in m["min"]:
        raise fail("whole minutes when seconds follow")
    seconds = float(m["sec"] or 0.0)
    if minutes >= 60.0:
        raise fail("minutes below 60")
    if seconds >= 60.0:
        raise fail("seconds below 60")
    total = deg + minutes / 60.0 + seconds / 3600.0
    if total > limit:
        raise fail(f"at most {limit:.0f}°")
    return -total if (sign == "-" or hemi in ("S", "W")) else total


def format_lat(lat_deg: float, decimals: int = 1) -> str:
    """``54°12.3'N``: degrees (2 digits), minutes to ``decimals`` places, hemisphere.

    Minutes are rounded once, carrying into the degrees (59.96' gives the next
    degree, never 60.0'). Raises ValueError outside ±90°.
    """
    if not (math.isfinite(lat_deg) and abs(lat_deg) <= 90.0):
        raise ValueError(f"latitude {lat_deg} outside -90..90")
    return _format(lat_deg, "NS", 2, decimals)


def format_lon(lon_deg: float, decimals: int = 1) -> str:
    """``003°30.0'W``: longitude wrapped to [-180, 180), degrees (3 digits), minutes."""
    if not math.isfinite(lon_deg):
        raise ValueError(f"longitude {lon_deg} is not a finite number")
    wrapped = (lon_deg + 180.0) % 360.0 - 180.0
    return _format(wrapped, "EW", 3, decimals)


def format_position(lat_deg: float, lon_deg: float, decimals: int = 1) -> str:
    """``54°12.3'N 003°30.0'W``."""
    return f"{format_lat(lat_deg, decimals)} {format_lon(lon_deg, decimals)}"


def _format(value: float, hemispheres: str, width: int, decimals: int) -> str:
    if isinstance(decimals, bool) or not isinstance(decimals, int) or decimals < 0:
        raise ValueError(f"decimals {decimals!r} must be a whole number >= 0")
    scale = 10**decimals
    units = round(abs(value) * 60.0 * scale)  # whole units of 10**-decimals minutes
    deg, rem = divmod(units, 60 * scale)
    hemi = hemispheres[1] if value < 0 and units else hemispheres[0]
    if decimals:
        minutes = f"{rem // scale:02d}.{rem % scale:0{decimals}d}"
    else:
        minutes = f"{rem:02d}"
    return f"{deg:0{width}d}°{minutes}'{hemi}"
