"""How the plan document's values print: text the fonts have, times, positions, numbers.

The standard PDF fonts cover Windows-1252 only: :func:`plain` makes any text
from the document fit (``→`` becomes ``to``, ``SO₂`` becomes ``SO2``). Times
come as ISO 8601 texts from the ``--json`` document and print to the minute,
in UTC or in ship's time with its offset; positions print in degrees and
minutes (WGS84); a missing value prints as an em dash. reportlab is imported
inside the functions.
"""

from __future__ import annotations

import re
import unicodedata
from collections.abc import Iterable, Sequence
from datetime import UTC, datetime, timedelta

from geo.position import format_lat, format_lon
from planner.common.timefmt import format_utc
from planner.documents.pdf_common import Markup, esc

WARN_FILL = "#fde9e7"
WARN_RULE = "#a4281b"

# Characters outside Windows-1252 that the documents are known to use, and their stand-ins.
_PLAIN = {"→": " to ", "←": " from ", "⇒": " so ", "≤": "<=", "≥": ">=", "≈": "~",
          "−": "-", "‑": "-", "₂": "2", "₃": "3", "₀": "0", "²": "2", "Δ": "delta ",
          "σ": "sd", "μ": "u", "κ": "k", "τ": "tau", "ε": "e", "√": "sqrt "}


def plain(text: object) -> str:
    """``text`` in characters the standard PDF fonts have (Windows-1252)."""
    s = str(text)
    try:
        s.encode("cp1252")
        return s
    except UnicodeEncodeError:
        pass
    out = []
    for ch in s:
        try:
            ch.encode("cp1252")
            out.append(ch)
            continue
        except UnicodeEncodeError:
            pass
        if ch in _PLAIN:
            out.append(_PLAIN[ch])
            continue
        folded = unicodedata.normalize("NFKD", ch).encode("cp1252", "ignore").decode("cp1252")
        out.append(folded or "?")
    return re.sub(" {2,}", " ", "".join(out))


def markup(text: str) -> Markup:
    """Cell markup from already-escaped text."""
    return Markup(text)


def parse_iso(iso: str | None) -> datetime | None:
    """The moment of an ISO 8601 text with its offset (None for none or a bad text)."""
    if not iso:
        return None
    try:
        return datetime.fromisoformat(iso.replace("Z", "+00:00"))
    except ValueError:
        return None


def utc_text(iso: str | None) -> str:
    """``2027-05-30 04:47Z`` (to the minute, as the terminal table), or an em dash."""
    t = parse_iso(iso)
    return "—" if t is None else format_utc(t)


def utc_lines(iso: str | None) -> list[str]:
    """UTC as two lines: the date, then ``HH:MMZ``."""
    t = parse_iso(iso)
    if t is None:
        return ["—"]
    t = t.astimezone(UTC)
    return [t.strftime("%Y-%m-%d"), t.strftime("%H:%MZ")]


def offset_text(t: datetime) -> str:
    """The UTC offset of an aware datetime: ``+12:00``, ``-03:30``."""
    off = t.utcoffset() or timedelta(0)
    sign = "-" if off < timedelta(0) else "+"
    minutes = abs(int(off.total_seconds())) // 60
    return f"{sign}{minutes // 60:02d}:{minutes % 60:02d}"


def ship_lines(iso: str | None) -> list[str]:
    """Ship's time as two lines: the date, then the time and its UTC offset."""
    t = parse_iso(iso)
    if t is None:
        return ["—"]
    return [t.strftime("%Y-%m-%d"), f"{t.strftime('%H:%M')} ({offset_text(t)})"]


def ship_text(iso: str | None) -> str:
    """Ship's time on one line: ``2027-05-30 16:47 (UTC+12:00)``."""
    t = parse_iso(iso)
    return "—" if t is None else f"{t.strftime('%Y-%m-%d %H:%M')} (UTC{offset_text(t)})"


def pos_lines(lat: float | None, lon: float | None) -> list[str]:
    """A position as two lines, latitude then longitude, degrees and minutes."""
    if lat is None or lon is None:
        return ["—"]
    return [format_lat(lat), format_lon(lon)]


def pos_text(lat: float | None, lon: float | None) -> str:
    """A position on one line."""
    return " ".join(pos_lines(lat, lon))


def num(x: float | None, fmt: str = ",.1f") -> str:
    """A number in ``fmt``, or an em dash."""
    return "—" if x is None else format(x, fmt)


def lines(parts: Iterable[str], bold_first: bool = False) -> Markup:
    """Lines of text in one cell (escaped), the first in bold if asked."""
    parts = [esc(plain(p)) for p in parts]
    if bold_first and parts:
        parts[0] = f"<b>{parts[0]}</b>"
    return markup("<br/>".join(parts))


def pct(fraction: float) -> str:
    """A fraction as a percentage to four figures: ``0.9`` → ``90 %``."""
    return f"{fraction * 100:.4g} %"


def is_num(x: object) -> bool:
    """A JSON number (not a boolean)."""
    return isinstance(x, int | float) and not isinstance(x, bool)


def groups(rows: Sequence[dict]) -> list[list[dict]]:
    """Changeover rows of one changeover (one boundary) together, in the document's order."""
    out: list[list[dict]] = []
    last = None
    for r in rows:
        key = r.get("number", (r.get("area"), r.get("direction"), r.get("boundary_utc")))
        if out and key == last:
            out[-1].append(r)
        else:
            out.append([r])
        last = key
    return out


def keep(parts: list) -> list:
    """``parts`` kept together on one page (nothing for none)."""
    from reportlab.platypus import KeepTogether

    return [KeepTogether(parts)] if parts else []
