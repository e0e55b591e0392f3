"""Read an area boundary written as a numbered list of positions, as a regulation prints it.

MARPOL Annex VI Appendix VII and national laws give an area as a list of
positions joined in order, the last joined back to the first [MARPOL-VI] [P].
One position a line, with or without its point number, in any of:

- degrees and decimal minutes with the mark before the decimals, as printed:
  ``1  58°30'.00 N  044°00'.00 W``;
- degrees and decimal minutes without marks: ``58 30.00N 044 00.00W``,
  ``58°30.00'N 044°00.00'W``, ``N58 30.00 W044 00.00``;
- degrees, minutes and seconds: ``58°30'15" N 044°00'00" W``;
- decimal degrees, signed (``58.5 -44.0``) or with the letters (``58.5N 44.0W``).

A ``.csv`` file is read the same way with its fields joined (``1,58°30.00'N,
044°00.00'W``); a first row without digits is taken as its header. Blank
lines and lines starting with ``#`` are skipped.

Reading is strict: latitude first; the hemisphere letters required with
minutes or seconds (N or S for the latitude, E or W for the longitude);
minutes and seconds below 60, only the last part with decimals; latitude at
most 90°, longitude at most 180°; both halves of a line in the same notation;
point numbers, when given, on every line and counting up by one. Numbers are
read exactly (as fractions) so that one position written in any notation gives
the same degrees, bit for bit. A line that follows a coast or another line not
in the list ("thence along the coast to point 7") is refused with the points
it lies between. Every refusal is one :class:`InputError` naming the file, the
line and the value.
"""

from __future__ import annotations

import csv
import io
import re
from dataclasses import dataclass
from fractions import Fraction
from pathlib import Path

from geo.area_checks import Text
from geo.errors import InputError

EXAMPLES = "1  58°30'.00 N  044°00'.00 W, 58 30.00N 044 00.00W or 58.5 -44.0"
"""Written forms the refusals quote."""

_POSITION_EXPECTED = (f"a position, latitude then longitude, such as {EXAMPLES} (minutes and "
                      "seconds need the letters N or S and E or W; a '#' starts a comment)")

_FOLD = str.maketrans({"º": "°", "˚": "°", "′": "'", "’": "'", "ʹ": "'", "´": "'", "″": '"',
                       "”": '"', "ʺ": '"', "−": "-", "\t": " "})
_NUM = r"\d+(?:\.\d+)?"
# one coordinate: a hemisphere letter before or after, up to three parts with their marks
_COORD = (rf"(?P<{{p}}pre>[NSEW])?\s*(?P<{{p}}sign>[-+])?"
          rf"(?P<{{p}}d>{_NUM})\s*(?P<{{p}}dm>°)?"
          rf"(?:\s*(?P<{{p}}m>{_NUM})\s*(?P<{{p}}mm>')?"
          rf"(?:\s*(?P<{{p}}s>{_NUM})\s*(?P<{{p}}sm>\"|'')?)?)?"
          rf"(?({{p}}pre)|(?:\s*(?P<{{p}}post>[NSEW]))?)")
_BODY = rf"{_COORD.format(p='a')}(?:\s*[,;]\s*|\s+|(?<=[NSEW°'\"]))" + _COORD.format(p="b")
_NUMBERED = re.compile(rf"\s*\(?(?P<n>\d+)\s*[.):]?\s+{_BODY}\s*")
_PLAIN = re.compile(rf"\s*{_BODY}\s*")
_MARK_BEFORE_DECIMALS = re.compile(r"(\d)\s*(['\"])\s*\.(\d+)")
_OFF_LIST = re.compile(r"\b(?:COAST|SHORE|THENCE|ALONG|FOLLOW|BASELINE|LOW.?WATER|BOUNDAR|"
                       r"BORDER|RIVER|ARC|PARALLEL|MERIDIAN|CIRCLE)\w*")


@dataclass(frozen=True)
class ListedPoint:
    """One position of the list.

    Attributes
    ----------
    number : the point number as written, or its place in the list (from 1)
    lat_deg : latitude [deg], north positive
    lon_deg : longitude [deg], east positive, within ±180
    line : the line of the file it was read from (from 1)
    """

    number: int
    lat_deg: float
    lon_deg: float
    line: int

    def __post_init__(self) -> None:
        if not (abs(self.lat_deg) <= 90.0 and abs(self.lon_deg) <= 180.0):
            raise ValueError(f"point {self.number}: position off the globe")


@dataclass(frozen=True)
class PointList:
    """The points of a list, in order, open (a closing repeat of the first point removed).

    Attributes
    ----------
    points : the distinct points in order
    read : how many positions the file held (the closing repeat included)
    closed_in_file : whether the file repeated the first point at the end
    numbered : whether the file gave point numbers
    """

    points: tuple[ListedPoint, ...]
    read: int
    closed_in_file: bool
    numbered: bool

    def __post_init__(self) -> None:
        if len(self.points) < 3:
            raise ValueError("an area needs at least three distinct points")


@dataclass(frozen=True)
class _Coord:
    parts: tuple[str, ...]
    hemi: str | None
    sign: str | None
    marks: bool
    text: str


def read_point_list(path: str | Path) -> PointList:
    """The points of a ``.txt`` or ``.csv`` list file (see the module notes)."""
    path = Path(path)
    try:
        text = path.read_bytes().decode("utf-8-sig")
    except UnicodeDecodeError as e:
        raise InputError(path, f"byte {e.start + 1}", Text("not UTF-8"), "UTF-8 text") from None
    except OSError as e:
        raise InputError(path, "", Text(e.strerror or "unreadable"),
                         "a readable list of positions (.txt or .csv)") from None
    return parse_point_list(text, path, csv_fields=path.suffix.lower() == ".csv")


def parse_point_list(text: str, file: str | Path = "", *, csv_fields: bool = False) -> PointList:
    """The points of a list given as text; ``csv_fields`` reads each line as CSV fields."""
    lines = _lines(text, csv_fields)
    points: list[ListedPoint] = []
    numbered: bool | None = None
    pending: tuple[int, str] | None = None  # a line off the list, waiting for the next point
    for k, (line_no, raw) in enumerate(lines):
        folded = _fold(raw)
        if csv_fields and k == 0 and not re.search(r"\d", folded) and not _OFF_LIST.search(folded):
            continue  # the header row
        parsed = _parse_line(folded, raw)
        if parsed is None and _OFF_LIST.search(folded):
            parsed = _parse_prefix(folded, raw)  # a position followed by "thence along the coast"
            if pending is None:
                pending = (line_no, raw)
            if parsed is None:
                continue
        if parsed is None:
            raise InputError(file, f"line {line_no}", raw.strip(), _POSITION_EXPECTED)
        if pending is not None and pending[0] != line_no:
            _refuse_off_list(file, pending, points, parsed[0], len(points) + 1)
        number, a, b = parsed
        if numbered is None:
            numbered = number is not None
        elif numbered != (number is not None):
            raise InputError(file, f"line {line_no}", raw.strip(),
                             "point numbers on every line or on none")
        expected = len(points) + 1 if number is None or not points else points[-1].number + 1
        if number is not None and points and number != expected:
            raise InputError(file, f"line {line_no}", Text(f"point {number}"),
                             f"point {expected} (the points in order, none left out or "
                             "repeated)")
        lat, lon = _position(a, b, file, line_no)
        points.append(ListedPoint(expected if number is None else number, lat, lon, line_no))
    if pending is not None:
        _refuse_off_list(file, pending, points, points[0].number if points else None, None)
    return _close(points, file, bool(numbered))


def _lines(text: str, csv_fields: bool) -> list[tuple[int, str]]:
    """(line number, text) of every line that is not blank or a comment."""
    out = []
    for n, line in enumerate(text.splitlines(), start=1):
        s = line.strip()
        if not s or s.startswith("#"):
            continue
        if csv_fields:
            fields = next(csv.reader(io.StringIO(s)))
            s = "  ".join(f.strip() for f in fields if f.strip())
        out.append((n, s))
    return out


def _fold(raw: str) -> str:
    s = raw.translate(_FOLD).upper()
    return _MARK_BEFORE_DECIMALS.sub(r"\1.\3\2", s)  # 30'.00 -> 30.00'


def _coord(m: re.Match, p: str, raw: str) -> _Coord | None:
    """One coordinate of a match; its text is cut from the line as written."""
    pre, post = m[f"{p}pre"], m[f"{p}post"]
    if pre and post:
        return None
    parts = tuple(x for x in (m[f"{p}d"], m[f"{p}m"], m[f"{p}s"]) if x is not None)
    marks = [m[f"{p}dm"], m[f"{p}mm"], m[f"{p}sm"]][: len(parts)]
    if any(x is not None for x in marks[len(parts):]):
        return None
    spans = [m.span(f"{p}{g}") for g in ("pre", "sign", "d", "dm", "m", "mm", "s", "sm", "post")
             if m[f"{p}{g}"] is not None]
    start, end = spans[0][0], spans[-1][1]
    text = raw[start:end] if len(raw) == len(m.string) else m.string[start:end]
    return _Coord(parts, pre or post, m[f"{p}sign"], any(marks), text)


def _readings(folded: str, raw: str) -> list[tuple[int | None, _Coord, _Coord]]:
    """Every consistent reading of a line: both halves in the same notation."""
    out = []
    for pattern in (_NUMBERED, _PLAIN):
        m = pattern.fullmatch(folded)
        if m is None:
            continue
        a, b = _coord(m, "a", raw), _coord(m, "b", raw)
        if a is None or b is None or len(a.parts) != len(b.parts):
            continue
        if (a.hemi is None) != (b.hemi is None):
            continue
        if a.hemi is None and len(a.parts) > 1:
            continue  # minutes need the hemisphere letters
        number = int(m["n"]) if pattern is _NUMBERED else None
        out.append((number, a, b))
    return out


def _parse_line(folded: str, raw: str) -> tuple[int | None, _Coord, _Coord] | None:
    found = _readings(folded, raw)
    return found[0] if len(found) == 1 else None


def _parse_prefix(folded: str, raw: str) -> tuple[int | None, _Coord, _Coord] | None:
    """The position at the start of a line that goes on in words, if there is one."""
    words = _OFF_LIST.search(folded)
    head = folded[: words.start()].rstrip(" ,;:-") if words else ""
    return _parse_line(head, raw[: len(head)]) if head else None


def _position(a: _Coord, b: _Coord, file: str | Path, line: int) -> tuple[float, float]:
    where = f"line {line}"
    if a.hemi in ("E", "W") and b.hemi in ("N", "S"):
        raise InputError(file, where, f"{a.text} {b.text}",
                         "the latitude first, then the longitude")
    lat = _degrees(a, "lat", file, where)
    lon = _degrees(b, "lon", file, where)
    return float(lat), float(lon)


def _degrees(c: _Coord, axis: str, file: str | Path, where: str) -> Fraction:
    """Exact degrees of one coordinate, every rule checked."""
    name, letters, limit = ("latitude", "NS", 90) if axis == "lat" else ("longitude", "EW", 180)
    shown = c.text

    def fail(expected: str) -> InputError:
        return InputError(file, f"{where}, {name}", shown, expected)

    if c.hemi is not None and c.hemi not in letters:
        raise fail(f"{' or '.join(letters)} for the {name}, not {c.hemi}")
    if c.hemi is not None and c.sign is not None:
        raise fail("a sign or a hemisphere letter, not both")
    if any("." in p for p in c.parts[:-1]):
        raise fail("decimals on the last part only (whole degrees when minutes follow, "
                   "whole minutes when seconds follow)")
    values = [Fraction(p) for p in c.parts]
    for v, unit in zip(values[1:], ("minutes", "seconds"), strict=False):
        if v >= 60:
            raise fail(f"{unit} below 60")
    total = sum((v / 60**i for i, v in enumerate(values)), Fraction(0))
    if total > limit:
        raise fail(f"a {name} of at most {limit}°")
    return -total if c.sign == "-" or c.hemi in ("S", "W") else total


def _refuse_off_list(file: str | Path, pending: tuple[int, str], points: list[ListedPoint],
                     next_number: int | None, next_place: int | None) -> None:
    """Refuse a line that is not a position, naming the points it lies between."""
    line_no, raw = pending
    after = f"point {points[-1].number}" if points else "the start"
    nxt = next_number if next_number is not None else next_place
    before = f"point {nxt}" if nxt is not None else "the end"
    raise InputError(file, f"line {line_no}, between {after} and {before}", raw.strip(),
                     "positions only: a coast or other line is not in the list; give "
                     "that stretch as its own points")


def _close(points: list[ListedPoint], file: str | Path, numbered: bool) -> PointList:
    """Drop a closing repeat of the first point; refuse other repeats and short lists."""
    read = len(points)
    closed = read > 1 and (points[-1].lat_deg, points[-1].lon_deg) == (
        points[0].lat_deg, points[0].lon_deg)
    ring = points[:-1] if closed else points
    for p, q in zip(ring, ring[1:], strict=False):
        if (p.lat_deg, p.lon_deg) == (q.lat_deg, q.lon_deg):
            raise InputError(file, f"line {q.line}", Text(f"point {q.number} repeats point "
                                                             f"{p.number}"),
                             "distinct consecutive points")
    if len(ring) < 3:
        raise InputError(file, "", Text(f"{len(ring)} distinct point(s)"),
                         "at least three positions, one a line")
    return PointList(tuple(ring), read, closed, numbered)
