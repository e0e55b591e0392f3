"""Prefilling an entry from a plan: the planned time and place of one changeover step.

The plan is the JSON of ``changeover plan VOYAGE --json`` (keys per
docs/json-contract.md): ``changeovers`` is a list of ``{"area", "circuit", "direction":
"to_compliant" | "to_regular", "start_utc", "start_lat", "start_lon",
"compliant_utc" (or null), "boundary_utc", "boundary_lat", "boundary_lon",
"margin_h", "boundary_event", "clock_deadline"}``; ``--changeover N`` picks the N-th
(from 1). ``boundary_event`` (absent in plans made before it existed: a crossing) says
whether the boundary is a crossing or a moment on the clock, such as the area coming into
force while the ship is inside it (:mod:`planner.journal.events`).

What each step takes from it (:func:`planned_for`):

=========================  ==================  ============================
step                       direction           planned time and position
=========================  ==================  ============================
started                    to_compliant        start_utc, start_lat/lon
completed                  to_compliant        compliant_utc, compliant_lat/lon
commenced                  to_regular          start_utc, start_lat/lon
back completed             to_regular          complete_utc, complete_lat/lon
=========================  ==================  ============================

(a completion's position only when the plan gives it), and every step keeps the area,
circuit, boundary (time, position, event) and margin.

The ship's time the plan gives for the step (``start_ship_time``, ``compliant_ship_time``,
``complete_ship_time``: ISO 8601 with the UTC offset in force on board then, such as
``2027-06-01T16:35-11:00`` after the clocks were put back at the date line) gives the
offset of an entry whose time is taken from the plan (:func:`planned_step`,
:func:`ship_offset_min`); a plan without it leaves the journal's offset.
"""

from __future__ import annotations

import json
import math
from datetime import datetime
from pathlib import Path

from geo.errors import InputError
from planner.common.timefmt import parse_moment
from planner.journal.entries import (
    BACK_COMMENCED,
    BOUNDARY_EVENTS,
    DIRECTION,
    STARTED,
    Planned,
    Position,
)
from planner.journal.inputs import is_real_offset, written_position

MAX_PLAN_BYTES = 64 * 2**20
"""Largest plan JSON read, bytes (a plan of a long voyage is well under a megabyte)."""


def load_changeovers(path: str | Path) -> list[dict]:
    """The ``changeovers`` list of a plan JSON file (each item checked when used)."""
    doc = load_json(path)
    items = doc.get("changeovers") if isinstance(doc, dict) else None
    if not isinstance(items, list):
        raise InputError(str(path), "changeovers", None, "a plan with a list of changeovers")
    return items


def load_json(path: str | Path) -> object:
    """The document of a plan JSON file (at most :data:`MAX_PLAN_BYTES`), as parsed."""
    file = str(path)
    p = Path(path)
    try:
        if not p.is_file():
            raise InputError(file, "", None, "an existing plan JSON file "
                                             "(from changeover plan VOYAGE --json)")
        with p.open("rb") as f:
            data = f.read(MAX_PLAN_BYTES + 1)
    except OSError as exc:
        raise InputError(file, "", exc.strerror or str(exc), "a plan JSON file you may "
                                                              "read") from None
    if len(data) > MAX_PLAN_BYTES:
        raise InputError(file, "file size", f"over {MAX_PLAN_BYTES} bytes",
                         f"a plan JSON file of at most {MAX_PLAN_BYTES} bytes")
    try:
        doc = json.loads(data.decode("utf-8"))
    except (ValueError, UnicodeDecodeError, RecursionError) as exc:
        raise InputError(file, "", str(exc)[:200], "valid JSON (UTF-8)") from None
    return doc


def _pick(items: list, number: int, circuit: str | None, file: str) -> tuple[int, object]:
    """The plan row of changeover ``number`` (and ``circuit``): rows carry the plan's own
    ``number`` (one row per circuit); a plan without numbers is counted row by row."""
    numbered = [i for i, it in enumerate(items) if isinstance(it, dict) and "number" in it]
    if not numbered:
        if not 1 <= number <= len(items):
            raise InputError("--changeover", "", number,
                             f"a changeover of {file} (1 to {len(items)})")
        return number - 1, items[number - 1]
    rows = [i for i in numbered if items[i]["number"] == number]
    if not rows:
        top = max(items[i]["number"] for i in numbered)
        raise InputError("--changeover", "", number, f"a changeover of {file} (1 to {top})")
    if circuit is not None:
        match = [i for i in rows if items[i].get("circuit") == circuit]
        if not match:
            names = ", ".join(str(items[i].get("circuit")) for i in rows)
            raise InputError("--circuit", "", circuit,
                             f"a circuit of changeover {number} in {file}: {names}")
        rows = match
    return rows[0], items[rows[0]]


def planned_for(kind: str, path: str | Path, number: int | None,
                circuit: str | None = None) -> Planned:
    """The :class:`Planned` values of changeover ``number`` (from 1) for a step of ``kind``;
    with several circuits in that changeover, ``circuit`` (default the plan's first)."""
    return planned_step(kind, path, number, circuit)[0]


SHIP_TIME_KEYS = {"to_compliant": ("start_ship_time", "compliant_ship_time"),
                  "to_regular": ("start_ship_time", "complete_ship_time")}
"""The plan's ship's time of a changeover's start and of its completion, by direction."""


def planned_step(kind: str, path: str | Path, number: int | None,
                 circuit: str | None = None) -> tuple[Planned, int | None]:
    """:func:`planned_for`'s values, and the ship's UTC offset [min east of UTC] the plan
    gives for the step's planned time (None when the plan gives no ship's time for it)."""
    file = str(path)
    items = load_changeovers(path)
    if number is None:
        raise InputError("--changeover", "", None,
                         f"which changeover of the plan (1 to {len(items)})")
    index, item = _pick(items, number, circuit, file)
    place = f"changeovers[{index}]"
    if not isinstance(item, dict):
        raise InputError(file, place, item, "a changeover object")
    direction = item.get("direction")
    if direction not in ("to_compliant", "to_regular"):
        raise InputError(file, f"{place}.direction", direction, "to_compliant or to_regular")
    if direction != DIRECTION[kind]:
        steps = "start or complete" if direction == "to_compliant" else "back or back-complete"
        raise InputError("--changeover", "", number,
                         f"a {DIRECTION[kind]} changeover of the plan (number {number} is "
                         f"{direction}: use it with log {steps})")
    starts = kind in (STARTED, BACK_COMMENCED)
    done_key = "compliant_utc" if direction == "to_compliant" else "complete_utc"
    time_key = "start_utc" if starts else done_key
    t0 = _time(item, "start_utc", file, place, required=False)
    t1 = _time(item, done_key, file, place, required=False)
    flush_h = (t1 - t0).total_seconds() / 3600.0 if t0 and t1 and t1 >= t0 else None
    offset = ship_offset_min(item, SHIP_TIME_KEYS[direction][0 if starts else 1], file, place)
    return Planned(
        source=Path(path).name,
        changeover=number,
        direction=direction,
        area=_text(item, "area", file, place),
        circuit=_text(item, "circuit", file, place, required=False),
        time_utc=_time(item, time_key, file, place, required=starts),
        position=_position(item, "start", file, place) if starts else _position(
            item, done_key.removesuffix("_utc"), file, place, required=False),
        boundary_utc=_time(item, "boundary_utc", file, place, required=False),
        boundary=_position(item, "boundary", file, place, required=False),
        margin_h=_number(item, "margin_h", file, place),
        flush_h=flush_h,
        event=_event(item, file, place),
        clock_deadline=_flag(item, "clock_deadline", file, place),
    ), offset


def ship_offset_min(item: dict, key: str, file: str, place: str) -> int | None:
    """The UTC offset [min east of UTC] of the plan's ship's time ``item[key]``
    (``2027-06-01T19:25-11:00``); None when the plan gives none."""
    v = item.get(key)
    if v is None:
        return None
    expected = "the ship's time with its UTC offset, e.g. 2027-06-01T19:25-11:00"
    try:
        moment = datetime.fromisoformat(v) if isinstance(v, str) else None
    except ValueError:
        moment = None
    off = moment.utcoffset() if moment is not None else None
    if off is None:
        raise InputError(file, f"{place}.{key}", v, expected)
    minutes = off.total_seconds() / 60.0
    if not is_real_offset(minutes):
        raise InputError(file, f"{place}.{key}", v, expected + " (a real offset: -12:00 to "
                                                     "+14:00, in steps of 15 minutes)")
    return int(minutes)


def plan_circuits(path: str | Path, number: int) -> list[str]:
    """The circuits of changeover ``number`` of the plan, in the plan's order."""
    items = load_changeovers(path)
    rows = [it for it in items if isinstance(it, dict) and it.get("number") == number]
    if not rows:
        _pick(items, number, None, str(path))  # refuses a number the plan does not have
        rows = [items[number - 1]] if isinstance(items[number - 1], dict) else []
    return [str(it["circuit"]) for it in rows if it.get("circuit")]


def plan_areas(path: str | Path) -> set[str]:
    """The area names the plan's changeovers name."""
    return {it["area"].strip() for it in load_changeovers(path)
            if isinstance(it, dict) and isinstance(it.get("area"), str)}


def _text(item: dict, key: str, file: str, place: str, required: bool = True) -> str | None:
    v = item.get(key)
    if v is None and not required:
        return None
    if not isinstance(v, str) or not v.strip():
        raise InputError(file, f"{place}.{key}", v, "a name")
    return v.strip()


def _time(item: dict, key: str, file: str, place: str, required: bool) -> datetime | None:
    v = item.get(key)
    if v is None:
        if required:
            raise InputError(file, f"{place}.{key}", None, "an ISO 8601 UTC time")
        return None
    if not isinstance(v, str):
        raise InputError(file, f"{place}.{key}", v, "an ISO 8601 UTC time")
    return parse_moment(v, file=file, place=f"{place}.{key}")


def _event(item: dict, file: str, place: str) -> str | None:
    v = item.get("boundary_event")
    if v is None:
        return None
    if v not in BOUNDARY_EVENTS:
        raise InputError(file, f"{place}.boundary_event", v, "one of " + ", ".join(
            BOUNDARY_EVENTS))
    return v


def _flag(item: dict, key: str, file: str, place: str) -> bool:
    v = item.get(key, False)
    if not isinstance(v, bool):
        raise InputError(file, f"{place}.{key}", v, "true or false")
    return v


def _number(item: dict, key: str, file: str, place: str) -> float | None:
    v = item.get(key)
    if v is None:
        return None
    if isinstance(v, bool) or not isinstance(v, int | float) or not math.isfinite(v):
        raise InputError(file, f"{place}.{key}", v, "a number")
    return float(v)


def _position(item: dict, prefix: str, file: str, place: str,
              required: bool = True) -> Position | None:
    lat, lon = item.get(f"{prefix}_lat"), item.get(f"{prefix}_lon")
    if lat is None and lon is None and not required:
        return None
    for key, v, limit in ((f"{prefix}_lat", lat, 90.0), (f"{prefix}_lon", lon, math.inf)):
        if isinstance(v, bool) or not isinstance(v, int | float) or not math.isfinite(v) \
                or abs(v) > limit:
            raise InputError(file, f"{place}.{key}", v, "degrees" + (
                " within ±90" if limit == 90.0 else ""))
    lon = float(lon)
    if abs(lon) > 180.0:  # a plan may unwrap longitudes past ±180
        lon = (lon + 180.0) % 360.0 - 180.0
    return written_position(float(lat), lon)
