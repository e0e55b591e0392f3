"""Scrubber events from what the crew typed, optionally prefilled from a plan's event.

:func:`scrubber_entry` builds a ``scrubber`` entry inside the append, like
:mod:`planner.journal.compose`: the time (``--at``, else with ``--as-planned`` the plan's,
else now), the ship's offset, the position (``--pos``, else with ``--as-planned`` the
plan's; required), the voyage and area; the scrubber, the event, the washwater mode and
for a reading SO₂ [ppm] and CO₂ [% v/v], the ratio computed and the limit in force (typed
as a ratio, or looked up from the sulphur limit, [MEPC-340] Table 1).

A plan JSON's ``scrubber_events`` (``[{"number", "scrubber", "event", "mode", "utc",
"ship_time", "lat", "lon", "distance_nm", "reason"}]``) prefills one event by its
``number`` (``--from-plan PLAN.json --event N``): the scrubber, the mode, and the planned
time, position and reason, kept in the entry. The plan's ``out_of_service`` is the
journal's ``failure``. With the planned time taken (``--as-planned``, no ``--at``) the
entry's ship's offset is that of the plan's ``ship_time`` (the offset in force on board at
that moment of the plan: after a zone change, not the journal's last), unless ``--tz``.

:func:`scrubber_changes` is what a correction of a scrubber entry changes (the ratio and
the over-limit flag worked out again).
"""

from __future__ import annotations

import dataclasses
import math
from collections.abc import Callable

from geo.errors import InputError
from planner.journal.compose import Builder, Typed, _confirmed, _entry, _when, _who
from planner.journal.details_kinds import (
    CO2_RANGE_PCT,
    NEEDS_MODE,
    RATIO_LIMIT_RANGE,
    RATIO_LIMITS,
    SCRUBBER_EVENTS,
    SCRUBBER_MODES,
    SO2_RANGE_PPM,
    ScrubberDetails,
)
from planner.journal.entries import SCRUBBER, Entry, Record
from planner.journal.inputs import POS_EXPECTED, parse_position, written_position, written_time
from planner.journal.plan_link import load_json
from planner.journal.state import JournalState

PLAN_EVENTS = {"start": "start", "stop": "stop", "mode_change": "mode_change",
               "out_of_service": "failure", "failure": "failure", "restored": "restored"}
"""A plan's scrubber event → the journal's event."""

LIMITS_TEXT = ", ".join(f"{p:.2f}" for p in RATIO_LIMITS)


def parse_event(text: str, option: str = "EVENT") -> str:
    """The event as stored (``mode-change`` and ``mode_change`` are the same)."""
    word = (text or "").strip().lower().replace("-", "_")
    if word not in SCRUBBER_EVENTS:
        raise InputError(option, "", text, "one of " + ", ".join(
            e.replace("_", "-") for e in SCRUBBER_EVENTS))
    return word


def parse_mode(text: str | None, option: str = "--mode") -> str | None:
    """``open`` or ``closed`` (None: not given)."""
    if text is None:
        return None
    word = text.strip().lower()
    if word not in SCRUBBER_MODES:
        raise InputError(option, "", text, "the washwater mode: open or closed")
    return word


def _reading(option: str, value: float | None, low: float, high: float, unit: str,
             low_open: bool = False) -> float | None:
    if value is None:
        return None
    if isinstance(value, bool) or not isinstance(value, int | float) or not math.isfinite(value) \
            or not low <= value <= high:
        raise InputError(option, "", value, f"a reading from {low:g} to {high:g} {unit}")
    return float(value)


def check_readings(so2_ppm: float | None, co2_pct: float | None, limit_pct: float | None,
                   ratio_limit: float | None) -> tuple:
    """The typed readings and limit, each checked (one :class:`InputError` naming its
    option): SO₂ [ppm], CO₂ [% v/v], the sulphur limit [% m/m] of [MEPC-340] Table 1, a
    typed ratio limit [ppm/% v/v]."""
    so2 = _reading("--so2-ppm", so2_ppm, *SO2_RANGE_PPM, "ppm")
    co2 = _reading("--co2-pct", co2_pct, *CO2_RANGE_PCT, "% v/v")
    if limit_pct is not None and (isinstance(limit_pct, bool) or not isinstance(
            limit_pct, int | float) or not any(math.isclose(limit_pct, p, abs_tol=1e-9)
                                              for p in RATIO_LIMITS)):
        raise InputError("--limit-pct", "", limit_pct, f"the sulphur limit in force, one of "
                         f"{LIMITS_TEXT} % m/m (MEPC.340(77) Table 1)")
    ratio = _reading("--ratio-limit", ratio_limit, *RATIO_LIMIT_RANGE, "ppm/% v/v")
    if limit_pct is not None and ratio is not None:
        raise InputError("--ratio-limit", "", ratio, "either --ratio-limit or --limit-pct, "
                                                     "not both")
    return so2, co2, limit_pct, ratio


def _details(name: str, event: str, mode: str | None, readings: tuple, remarks: str,
             **plan: object) -> ScrubberDetails:
    so2, co2, limit_pct, ratio_limit = readings
    if event in NEEDS_MODE and mode is None:
        raise InputError("--mode", "", None, f"the washwater mode, open or closed (a "
                                             f"{event.replace('_', '-')} names it)")
    if (so2 is None) != (co2 is None):
        raise InputError("--so2-ppm" if so2 is None else "--co2-pct", "", None,
                         "both readings: --so2-ppm and --co2-pct")
    if event == "ratio_reading" and so2 is None:
        raise InputError("--so2-ppm", "", None, "the readings of a ratio-reading: "
                                                "--so2-ppm and --co2-pct")
    if so2 is None and (limit_pct is not None or ratio_limit is not None):
        raise InputError("--limit-pct" if limit_pct is not None else "--ratio-limit", "",
                         limit_pct if limit_pct is not None else ratio_limit,
                         "a limit with a reading (--so2-ppm and --co2-pct)")
    if not name or not name.strip():
        raise InputError("--scrubber", "", None, "the scrubber's name, e.g. \"EGCS 1\"")
    try:
        return ScrubberDetails.make(name.strip(), event, mode, so2, co2, ratio_limit,
                                    limit_pct, remarks, **plan)
    except ValueError as exc:
        raise InputError("scrubber", "", event, str(exc)) from None


def planned_event(path: str, number: int | None) -> dict:
    """Scrubber event ``number`` of the plan JSON at ``path`` (checked when used)."""
    doc = load_json(path)
    items = doc.get("scrubber_events") if isinstance(doc, dict) else None
    if not isinstance(items, list):
        raise InputError(path, "scrubber_events", None, "a plan with a list of scrubber events")
    numbers = [it.get("number") for it in items if isinstance(it, dict)]
    if number is None:
        raise InputError("--event", "", None, f"which scrubber event of the plan "
                                              f"({', '.join(map(str, numbers)) or 'none'})")
    for i, it in enumerate(items):
        if isinstance(it, dict) and it.get("number") == number and not isinstance(number, bool):
            return {"place": f"scrubber_events[{i}]", **it}
    raise InputError("--event", "", number, f"a scrubber event of {path} "
                                            f"({', '.join(map(str, numbers)) or 'none'})")


def _plan_values(path: str, number: int | None, event: str) -> dict:
    """The planned values of the plan's event, checked against the event typed."""
    from planner.journal.plan_link import _number, _text, _time, ship_offset_min

    it = planned_event(path, number)
    place = it["place"]
    planned = PLAN_EVENTS.get(it.get("event"))
    if planned is None:
        raise InputError(path, f"{place}.event", it.get("event"),
                         "one of " + ", ".join(PLAN_EVENTS))
    if planned != event:
        raise InputError("--event", "", number, f"a {event.replace('_', '-')} event of the "
                         f"plan (number {number} is a {planned.replace('_', '-')}: use it "
                         f"with log scrubber {planned.replace('_', '-')})")
    lat, lon = _number(it, "lat", path, place), _number(it, "lon", path, place)
    if (lat is None) != (lon is None) or (lat is not None and (abs(lat) > 90.0)):
        raise InputError(path, f"{place}.lat", lat, "degrees within ±90, with lon")
    pos = None
    if lat is not None:
        pos = written_position(lat, (lon + 180.0) % 360.0 - 180.0 if abs(lon) > 180 else lon)
    mode = it.get("mode")
    if mode is not None and mode not in SCRUBBER_MODES:
        raise InputError(path, f"{place}.mode", mode, "open, closed or null")
    reason = it.get("reason") or ""
    if not isinstance(reason, str):
        raise InputError(path, f"{place}.reason", reason, "text")
    return {"scrubber": _text(it, "scrubber", path, place), "mode": mode,
            "utc": _time(it, "utc", path, place, required=False), "position": pos,
            "offset_min": ship_offset_min(it, "ship_time", path, place),
            "reason": " ".join(reason.split())}


def scrubber_entry(t: Typed, name: str | None, event: str, mode: str | None = None,
                   so2_ppm: float | None = None, co2_pct: float | None = None,
                   limit_pct: float | None = None, ratio_limit: float | None = None,
                   plan_event: int | None = None) -> Builder:
    """A ``scrubber`` entry (see the module docstring); ``t.plan`` with ``plan_event``
    prefills it from the plan's scrubber event of that number."""
    event = parse_event(event)
    mode = parse_mode(mode)
    readings = check_readings(so2_ppm, co2_pct, limit_pct, ratio_limit)
    if t.plan is None and (plan_event is not None or t.as_planned):
        raise InputError("--from-plan", "", None, "the plan JSON to take the scrubber event "
                                                  "from")
    plan = _plan_values(t.plan, plan_event, event) if t.plan else None
    if plan is not None and name and name.strip() != plan["scrubber"]:
        raise InputError("--scrubber", "", name, f"the plan's scrubber for event {plan_event} "
                                                 f"({plan['scrubber']}), or none")

    def make(state: JournalState) -> Entry:
        who = _who(t)
        taken: list[str] = []
        typed = t
        if plan is not None and not t.at and t.as_planned:
            if plan["utc"] is None:
                raise InputError("--at", "", None, "the time: the plan has none for this event")
            typed = dataclasses.replace(t, at=written_time(plan["utc"]).isoformat())
            taken.append("time")
        moment, offset, _ = _when(typed, state, None)
        if taken and not t.tz and plan is not None and plan["offset_min"] is not None:
            offset = plan["offset_min"]  # the ship's time of the plan at that moment
        if t.pos:
            position = parse_position(t.pos)
        elif plan is not None and t.as_planned and plan["position"] is not None:
            position = plan["position"]
            taken.append("position")
        else:
            hint = " (or --as-planned to confirm the planned one)" if (
                plan is not None and plan["position"] is not None) else ""
            raise InputError("--pos", "", None, POS_EXPECTED + hint)
        extra: dict[str, object] = {}
        if plan is not None:
            pos = plan["position"]
            extra = {"plan_source": _file_name(t.plan), "plan_event": plan_event,
                     "planned_utc": plan["utc"], "planned_reason": plan["reason"],
                     "planned_lat_deg": pos.lat_deg if pos else None,
                     "planned_lon_deg": pos.lon_deg if pos else None,
                     "from_plan": tuple(taken)}
        details = _details(name or (plan["scrubber"] if plan else ""), event,
                           mode or (plan["mode"] if plan else None), readings,
                           (t.remarks or "").strip(), **extra)
        record = Record(moment, offset, position, t.area, t.voyage or state.last_voyage,
                        None, (), details)
        return _entry(SCRUBBER, who, _confirmed(SCRUBBER, record, state,
                                                dataclasses.replace(t, plan=None)))
    return make


def _file_name(path: str) -> str:
    from pathlib import Path

    return Path(path).name


def scrubber_changes(name: str | None = None, mode: str | None = None,
                     so2_ppm: float | None = None, co2_pct: float | None = None,
                     limit_pct: float | None = None, ratio_limit: float | None = None
                     ) -> Callable[[object], object] | None:
    """What a correction changes in a scrubber entry's details (None: nothing typed): the
    values typed replace the entry's, the ratio and the over-limit flag are worked out
    again (a new sulphur limit looks its ratio limit up again)."""
    mode = parse_mode(mode)
    so2, co2, pct, ratio = check_readings(so2_ppm, co2_pct, limit_pct, ratio_limit)
    if all(v is None for v in (name, mode, so2, co2, pct, ratio)):
        return None

    def change(d: object) -> object:
        if not isinstance(d, ScrubberDetails):
            raise InputError("correct", "", "--mode/--so2-ppm/--co2-pct/--limit-pct",
                             "values of a scrubber entry (this entry is not one)")
        if pct is not None:
            limits = (pct, None)
        elif ratio is not None:
            limits = (None, ratio)
        else:
            limits = (d.limit_sulphur_pct, None if d.limit_sulphur_pct is not None
                      else d.ratio_limit)
        plan = {f: getattr(d, f) for f in ("plan_source", "plan_event", "planned_utc",
                                           "planned_lat_deg", "planned_lon_deg",
                                           "planned_reason", "from_plan")}
        return _details(name or d.scrubber, d.event, mode or d.mode,
                        (d.so2_ppm if so2 is None else so2, d.co2_pct if co2 is None else co2,
                         *limits), d.remarks, **plan)
    return change
