"""Helpers shared by the route loaders: reading files safely, leg kinds, speeds, XML.

Speeds are in knots. Every failure is an :class:`InputError` naming the file,
the place, the value and what was expected.
"""

from __future__ import annotations

import math
import re
from numbers import Real
from pathlib import Path
from xml.etree.ElementTree import Element, ParseError

import defusedxml.ElementTree as SafeET
from defusedxml import DefusedXmlException, DTDForbidden, EntitiesForbidden

from geo.errors import InputError

# A route file is a few kilobytes; anything this large is not one (and refusing
# it early keeps a hostile file from tying the program up).
MAX_FILE_BYTES = 20 * 1024 * 1024

LEG_WORDS = {
    "rhumb": "rhumb",
    "loxodrome": "rhumb",
    "great_circle": "great_circle",
    "orthodrome": "great_circle",
}
LEG_EXPECTED = "a leg type: rhumb or great_circle (or loxodrome / orthodrome), or blank for rhumb"
SPEED_EXPECTED = "a speed in knots, a number above 0, or blank"

_DECIMAL = re.compile(r"[+-]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?")


def read_bytes(path: str | Path) -> bytes:
    """The whole file, or InputError if it is missing, unreadable or implausibly large."""
    p = Path(path)
    if not p.is_file():
        raise InputError(path, "", None, "an existing route file")
    size = p.stat().st_size
    if size > MAX_FILE_BYTES:
        raise InputError(path, "file size", f"{size} bytes", f"at most {MAX_FILE_BYTES} bytes")
    try:
        return p.read_bytes()
    except OSError as e:
        raise InputError(path, "", e.strerror or str(e), "a readable route file") from None


def decode_text(data: bytes | str, file: str) -> str:
    """UTF-8 text (a leading byte-order mark is dropped), or InputError naming the line."""
    if isinstance(data, str):
        return data.removeprefix("\ufeff")
    try:
        return data.decode("utf-8-sig")
    except UnicodeDecodeError as e:
        line = data[: e.start].count(b"\n") + 1
        bad = data[e.start : e.start + 4]
        raise InputError(file, f"line {line}", repr(bad), "UTF-8 text") from None


def leg_kind(
    value: object,
    file: str,
    place: str,
    words: dict[str, str] = LEG_WORDS,
    expected: str = LEG_EXPECTED,
) -> str:
    """``"rhumb"`` or ``"great_circle"`` from a word in ``words`` (case-insensitive).

    Blank or None gives the default, ``"rhumb"``.
    """
    if value is None or (isinstance(value, str) and not value.strip()):
        return "rhumb"
    if isinstance(value, str) and value.strip().lower() in words:
        return words[value.strip().lower()]
    raise InputError(file, place, value, expected)


def speed_kn(
    value: object, file: str, place: str, *, strings: bool = True, expected: str = SPEED_EXPECTED
) -> float | None:
    """Speed in knots (> 0, finite) from a number or, if ``strings``, a decimal text.

    Blank or None gives None (no planned speed).
    """
    if value is None or (isinstance(value, str) and not value.strip()):
        return None
    number: float | None = None
    if isinstance(value, Real) and not isinstance(value, bool):
        number = float(value)
    elif strings and isinstance(value, str) and _DECIMAL.fullmatch(value.strip()):
        number = float(value)
    if number is None or not math.isfinite(number) or number <= 0.0:
        raise InputError(file, place, value, expected)
    return number


def waypoint_place(n: int, name: str = "", wid: str | None = None) -> str:
    """``waypoint 3 'Skaw'`` or ``waypoint 3 (id 7, 'Skaw')``: n counts from 1."""
    if wid is not None:
        return f"waypoint {n} (id {wid}" + (f", {name!r})" if name else ")")
    return f"waypoint {n}" + (f" {name!r}" if name else "")


def too_few(file: str, count: int) -> InputError:
    """The error for a route with fewer than two waypoints."""
    return InputError(file, "route", f"{count} waypoint(s)", "a route of at least two waypoints")


def route_name(name: str | None, file: str) -> str:
    """The name given in the file, else the file name without its extension."""
    if name and name.strip():
        return name.strip()
    return Path(file).stem if file else ""


def parse_xml(data: bytes | str, file: str) -> Element:
    """The root element, parsed with defusedxml: DTDs and entities are refused.

    A document type declaration is refused outright (``forbid_dtd``): that is
    where entity-expansion ("billion laughs") and external-entity attacks live,
    and no GPX or RTZ file needs one.
    """
    try:
        return SafeET.fromstring(data, forbid_dtd=True)
    except DTDForbidden as e:
        raise InputError(
            file,
            "document type declaration",
            f"<!DOCTYPE {e.name}>",
            "XML without a DTD (refused for safety: no route file needs one)",
        ) from None
    except EntitiesForbidden as e:
        raise InputError(
            file,
            "entity declaration",
            f"<!ENTITY {e.name}>",
            "XML without entity declarations (refused for safety)",
        ) from None
    except DefusedXmlException as e:
        raise InputError(
            file,
            "XML",
            str(e),
            "XML without DTDs, entities or external references (refused for safety)",
        ) from None
    except ParseError as e:
        line, col = e.position
        reason = str(e).split(": line")[0]
        raise InputError(
            file, f"line {line}, column {col + 1}", reason, "well-formed XML"
        ) from None


def namespace(tag: str) -> str:
    """The namespace URI of an ElementTree tag (``""`` when none)."""
    return tag[1:].split("}", 1)[0] if tag.startswith("{") else ""


def local_name(tag: str) -> str:
    """The tag without its namespace."""
    return tag.rsplit("}", 1)[-1]
