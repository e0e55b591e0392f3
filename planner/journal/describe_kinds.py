"""Scrubber events and documents made, in words (units on every figure).

Plain text for the terminal, the listing, the CSV export and the printed record: an event
with its scrubber and washwater mode, a reading with SO₂ [ppm], CO₂ [% v/v], the ratio
[ppm/% v/v] and the limit in force ([MEPC-340] Table 1), an over-limit reading said in
capitals (never only by colour); a document with its kind, title, file, size and SHA-256.
"""

from __future__ import annotations

from geo.position import format_position
from planner.common.timefmt import format_utc
from planner.journal.details_kinds import EVENT_WORDS, ScrubberDetails

OVER_WORDS = "OVER THE LIMIT"
WITHIN_WORDS = "within the limit"


def ratio_shown(ratio: float, limit: float | None) -> str:
    """The ratio to 2 decimals, or more when that would print an over-limit ratio as the
    limit itself (4.3004 over 4.3 is ``4.3004``, not ``4.30``)."""
    for places in range(2, 7):
        text = f"{ratio:.{places}f}"
        if limit is None or ratio <= limit or float(text) > limit:
            return text
    return f"{ratio:.6f}"


def event_head(d: ScrubberDetails) -> str:
    """``SCRUBBER FAILURE: EGCS 1``, ``washwater mode changed: EGCS 1, to closed loop``,
    ``scrubber started: EGCS 1, open loop``."""
    head = f"{EVENT_WORDS[d.event]}: {d.scrubber}"
    if d.mode is not None:
        head += f", {'to ' if d.event == 'mode_change' else ''}{d.mode} loop"
    return head


def reading_text(d: ScrubberDetails) -> str:
    """``SO₂ 12.5 ppm, CO₂ 4.20 % v/v, ratio 2.98 ppm/% v/v; limit 4.3 (0.10 % m/m
    sulphur, MEPC.340(77) Table 1): within the limit`` (``""`` without a reading)."""
    if d.ratio is None:
        return ""
    text = (f"SO₂ {d.so2_ppm:.1f} ppm, CO₂ {d.co2_pct:.2f} % v/v, ratio "
            f"{ratio_shown(d.ratio, d.ratio_limit)} ppm/% v/v")
    if d.ratio_limit is None:
        return text + "; no limit given"
    basis = (f" ({d.limit_sulphur_pct:.2f} % m/m sulphur, MEPC.340(77) Table 1)"
             if d.limit_sulphur_pct is not None else " (as typed)")
    return (f"{text}; limit {d.ratio_limit:g} ppm/% v/v{basis}: "
            f"{OVER_WORDS if d.over_limit else WITHIN_WORDS}")


def planned_text(d: ScrubberDetails) -> list[str]:
    """What the plan said for this event, and what was confirmed from it."""
    if not d.plan_source:
        return []
    parts = [f"planned ({d.plan_source}, scrubber event {d.plan_event})"]
    if d.planned_utc is not None:
        parts.append(format_utc(d.planned_utc))
    if d.planned_lat_deg is not None:
        parts.append(format_position(d.planned_lat_deg, d.planned_lon_deg))
    out = [", ".join(parts[:1]) + (": " + ", ".join(parts[1:]) if parts[1:] else "")]
    if d.planned_reason:
        out.append(f"plan's reason: {d.planned_reason}")
    if d.from_plan:
        out.append(f"{' and '.join(d.from_plan)} confirmed from the plan, not typed")
    return out


def scrubber_text(d: object) -> list[str]:
    """A scrubber event in words (``[]`` for other details); the remarks are left to
    :func:`planner.journal.describe.sample_and_text`."""
    if not isinstance(d, ScrubberDetails):
        return []
    out = [event_head(d)]
    reading = reading_text(d)
    if reading:
        out.append(reading)
    return out + planned_text(d)


def report_text(d: object) -> list[str]:
    """A document made in words: ``nonavailability report "Fuel oil ..."``, ``file
    NAR.pdf, 48213 bytes, SHA-256 …`` (``[]`` for other details)."""
    if getattr(d, "report_kind", None) is None:
        return []
    return [f"{d.report_kind} report \u201c{d.title}\u201d",
            f"file {d.file_name}, {d.size_bytes} bytes, SHA-256 {d.sha256}"]
