"""What a watch sheet states, computed from the plan: steps with clock times and readings.

One :class:`WatchSheet` per changeover (its number in the plan): the boundary,
and for every circuit the steps with their clock times (the temperature change
started before the switch when the engine's viscosity window needs it, the
valve switch, every inlet at the limit, the target reached or back on regular
fuel), then the expected readings at regular clock times from the first switch
to the last completion: the worst inlet's sulphur [% m/m], the inlets'
viscosity range [cSt] and temperature [°C] from the flushing model and the
inlet temperature path (:mod:`planner.ship.thermal`). Where the plan relies on a
scrubber, the scrubber events near a changeover are steps of its sheet, and a
:class:`ScrubberSheet` lists every scrubber event by the ship's watch (four
hours of ship's time) with its action, numbered ``S1``, ``S2`` ... as the
plan's scrubber table. Times are aware UTC
datetimes with the ship's zone at that moment. Pure computation (no reportlab).
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from datetime import datetime, timedelta, timezone

import numpy as np

from geo.ellipsoid import NM_M
from planner.voyage.plan import Plan

SCRUBBER_WINDOW_H = 1.0
"""A scrubber event this close [h] to a changeover's first or last step is on its sheet."""
WATCH_H = 4
"""The ship's watches: four hours of ship's time each, from 00:00."""

INTERVALS_MIN = (5, 10, 15, 20, 30, 60, 120)
"""Candidate reading intervals, minutes; the smallest giving at most :data:`MAX_READINGS`."""
MAX_READINGS = 11


@dataclass(frozen=True)
class Moment:
    """A clock time in UTC with the ship's zone then, and the ship's position [°]."""

    utc: datetime
    ship_tz: timezone
    lat: float
    lon: float

    def __post_init__(self) -> None:
        if self.utc.tzinfo is None:
            raise ValueError("a watch-sheet moment must be timezone-aware")


@dataclass(frozen=True)
class Step:
    """One thing to do or to see, at a moment (None: not reached in the simulation)."""

    when: Moment | None
    circuit: str
    what: str
    record: bool = False
    record_as: str = ""
    """The step's short name in the record's table (empty: from :attr:`what`)."""


@dataclass(frozen=True)
class Reading:
    """Expected values at a clock time: per circuit ``(sulphur_pct, viscosity_lo_cst,
    viscosity_hi_cst, temperature_c, window)`` (window: ``"low"`` or ``"high"`` when the
    viscosity leaves the engine's window, else ``""``), or None before its switch."""

    when: Moment
    values: dict[str, tuple[float, float | None, float | None, float | None, str] | None]


@dataclass(frozen=True)
class WatchSheet:
    """A changeover's sheet: its number, area, direction, boundary, steps and readings."""

    number: int
    area: str
    direction: str
    boundary: Moment
    boundary_nm: float
    limit_pct: float
    target_pct: float | None
    circuits: tuple[str, ...]
    changes: tuple[str, ...]
    steps: tuple[Step, ...]
    readings: tuple[Reading, ...]
    interval_min: int
    tanks: tuple[tuple[str, str], ...]
    event: str = ""
    """What the boundary is (the plan's ``boundary_event``: ``enter``, ``exit``,
    ``comes_into_force``, ``ceases``, ``departure``, ``cap_change``); empty: by direction."""

    @property
    def boundary_event(self) -> str:
        """:attr:`event`, or ``enter`` / ``exit`` by direction."""
        return self.event or ("enter" if self.direction == "to_compliant" else "exit")


def _moment(plan: Plan, epoch_s: float | None) -> Moment | None:
    if epoch_s is None:
        return None
    utc = plan.timeline.utc(epoch_s)
    lat, lon, _ = plan.timeline.position(epoch_s)
    return Moment(utc, plan.voyage.ship_tz_at(utc), float(lat), float(lon))


def interval_min(span_h: float) -> int:
    """The reading interval [min] giving at most :data:`MAX_READINGS` over ``span_h`` [h]."""
    for step in INTERVALS_MIN:
        if span_h * 60.0 / step + 1 <= MAX_READINGS:
            return step
    return INTERVALS_MIN[-1]


def _steps(plan: Plan, part, limit_pct: float, down: bool) -> list[Step]:
    st = part.study
    c = part.circuit
    out = []
    leads = [x for x in st.lead_h.values() if x]
    heat = ""
    if st.paths:
        first = min(p.set_point_c[0] for p in st.paths.values())
        last = max(p.set_point_c[-1] for p in st.paths.values())
        rate = next(iter(st.paths.values())).window.max_rate_c_per_min
        if leads:
            lead = max(leads)
            out.append(Step(_moment(plan, part.start_epoch_s - lead * 3600.0), c,
                            f"start moving the inlet temperature from {first:.0f} °C towards "
                            f"{last:.0f} °C, at most {rate:g} °C/min ({lead * 60:.0f} min "
                            "before the switch, for the viscosity window)"))
        elif abs(last - first) >= 1.0:
            heat = f"; heaters follow the blend, {first:.0f} to {last:.0f} °C, ≤ {rate:g} °C/min"
    out.append(Step(_moment(plan, part.start_epoch_s), c,
                    f"switch the valve: {part.from_tank} ({part.from_fuel}) to {part.to_tank} "
                    f"({part.to_fuel}){heat}", record=True))
    at_limit = _moment(plan, part.at_limit_epoch_s)
    if down:
        out.append(Step(at_limit, c, f"every inlet ≤ the limit {limit_pct:.2f} %"))
        out.append(Step(_moment(plan, part.done_epoch_s), c,
                        "compliant: every inlet ≤ the target; record time, position, tanks",
                        record=True))
    else:
        out.append(Step(at_limit, c, f"inlets pass above {limit_pct:.2f} % (outside the "
                        "area: allowed)"))
        out.append(Step(_moment(plan, part.done_epoch_s), c,
                        "complete: back on regular fuel; record time and position",
                        record=True))
    return out


def _reading(parts, epoch_s: float) -> dict:
    out = {}
    for part in parts:
        t_h = (epoch_s - part.start_epoch_s) / 3600.0
        st = part.study
        if -1.0 / 3600.0 < t_h < 0.0:  # the first reading, rounded to the second
            t_h = 0.0
        if t_h < 0:
            out[part.circuit] = None
            continue
        inlets = st.result.circuit_inlets(part.circuit)
        time_h = st.result.time_h
        s = [float(np.interp(t_h, time_h, c.sulphur_pct)) for c in inlets]
        worst = max(s) if part.direction == "to_compliant" else min(s)
        if st.paths:
            v = [float(np.interp(t_h, p.time_h, p.viscosity_cst)) for p in st.paths.values()]
            temp = [float(np.interp(t_h, p.time_h, p.temperature_c)) for p in st.paths.values()]
            w = next(iter(st.paths.values())).window
            flag = "low" if min(v) < w.min_cst - 1e-9 else "high" if max(v) > w.max_cst + 1e-9 \
                else ""
            out[part.circuit] = (worst, min(v), max(v), max(temp), flag)
        else:
            out[part.circuit] = (worst, None, None, None, "")
    return out


def _readings(plan: Plan, parts) -> tuple[list[Reading], int]:
    t0 = min(p.start_epoch_s for p in parts)
    ends = [p.done_epoch_s for p in parts if p.done_epoch_s is not None]
    t1 = max(ends) if ends else t0 + 3600.0
    step = interval_min((t1 - t0) / 3600.0)
    first = math.ceil(t0 / (step * 60.0)) * step * 60.0
    times = [t0] + [first + k * step * 60.0 for k in range(MAX_READINGS)
                    if first + k * step * 60.0 <= t1 + step * 60.0]
    times = sorted({round(t) for t in times})
    return [Reading(_moment(plan, t), _reading(parts, t)) for t in times], step


def watch_sheets(plan: Plan) -> list[WatchSheet | ScrubberSheet]:
    """One sheet per changeover of the plan, numbered as in its ``--json`` document; then,
    when the plan relies on a scrubber, its sheet (:class:`ScrubberSheet`). A scrubber
    event within :data:`SCRUBBER_WINDOW_H` of a changeover's steps is a step of that
    changeover's sheet too."""
    out = []
    tanks = tuple((name, max(t.content_m3.items(), key=lambda kv: kv[1])[0])
                  for name, t in plan.system.tanks.items())
    for n, ch in enumerate(plan.changes, start=1):
        down = ch.direction == "to_compliant"
        steps: list[Step] = []
        for part in ch.circuits:
            steps += _steps(plan, part, ch.limit_pct, down)
        boundary = _moment(plan, ch.boundary_epoch_s)
        assert boundary is not None
        steps.append(Step(boundary, "", _boundary_step(ch.boundary_event, ch.area, down),
                          record=True))
        steps = _scrubber_steps(plan, steps) + steps  # a start before the switch it allows
        steps.sort(key=lambda s: (s.when is None, s.when.utc if s.when else 0))
        readings, step = _readings(plan, ch.circuits)
        out.append(WatchSheet(
            n, ch.area, ch.direction, boundary, ch.boundary_m / NM_M, ch.limit_pct,
            ch.target_pct if down else None, tuple(p.circuit for p in ch.circuits),
            tuple(f"{p.from_fuel} → {p.to_fuel}" for p in ch.circuits), tuple(steps),
            tuple(readings), step, tanks, ch.boundary_event))
    if plan.scrubber_events:
        out.append(scrubber_sheet(plan))
    return out


@dataclass(frozen=True)
class ScrubberDue:
    """A scrubber event as the watch acts on it: its label (``S2``), the scrubber, the
    kind, the mode from then on (or None), the moment, the action and why, and the
    ship's watch it falls in (``08-12``, ship's time)."""

    label: str
    scrubber: str
    kind: str
    mode: str | None
    when: Moment
    distance_nm: float
    action: str
    reason: str
    watch: str


@dataclass(frozen=True)
class ScrubberSheet:
    """The scrubber's sheet: every scrubber event of the voyage, by the ship's watch."""

    events: tuple[ScrubberDue, ...]

    @property
    def watches(self) -> list[tuple[str, list[ScrubberDue]]]:
        """``(ship's date and watch, events)`` in time order: ``("2027-05-30 08-12", [..])``."""
        out: list[tuple[str, list[ScrubberDue]]] = []
        for e in self.events:
            day = e.when.utc.astimezone(e.when.ship_tz).strftime("%Y-%m-%d")
            key = f"{day} {e.watch}"
            if out and out[-1][0] == key:
                out[-1][1].append(e)
            else:
                out.append((key, [e]))
        return out


def watch_of(m: Moment) -> str:
    """The ship's watch of a moment, by ship's time: ``00-04``, ``04-08`` ... ``20-24``."""
    hour = m.utc.astimezone(m.ship_tz).hour // WATCH_H * WATCH_H
    return f"{hour:02d}-{hour + WATCH_H:02d}"


def _scrubber_due(plan: Plan) -> list[ScrubberDue]:
    """The plan's scrubber events in time order, numbered as its rows (``S1`` ...)."""
    from planner.charts.scrubber_marks import event_rows
    from planner.voyage.report import scrubber_json

    rows = event_rows(scrubber_json(plan))
    out = []
    for e, r in zip(plan.scrubber_events, rows, strict=True):  # numbered in the plan's order
        m = _moment(plan, e.epoch_s)
        assert m is not None
        out.append(ScrubberDue(r["label"], e.scrubber, e.kind, e.mode, m, r["distance_nm"],
                               r["action"], e.reason, watch_of(m)))
    return out


def scrubber_sheet(plan: Plan) -> ScrubberSheet:
    """The scrubber's sheet of the plan: every scrubber event with its watch."""
    return ScrubberSheet(tuple(_scrubber_due(plan)))


def _scrubber_steps(plan: Plan, steps: list[Step]) -> list[Step]:
    """The scrubber events near a changeover's steps, as steps of its sheet."""
    if not plan.scrubber_events:
        return []
    timed = [s.when.utc for s in steps if s.when is not None]
    lo = min(timed) - timedelta(hours=SCRUBBER_WINDOW_H)
    hi = max(timed) + timedelta(hours=SCRUBBER_WINDOW_H)
    return [Step(d.when, d.scrubber, f"{d.label}: {d.action}", record=True,
                 record_as=f"{d.label} {d.kind.replace('_', ' ')}")
            for d in _scrubber_due(plan) if lo <= d.when.utc <= hi]


def _boundary_step(event: str, area: str, down: bool) -> str:
    """The bridge's step at the boundary's moment, in the words of its event."""
    if event == "departure":
        return (f"departure inside {area}: every inlet compliant before departure" if down
                else "departure: the switch back may begin")
    if event in ("comes_into_force", "cap_change"):
        name = f"{area} comes into force" if event == "comes_into_force" else \
            "the global cap changes"
        return (f"in force: {name} now, wherever the ship is (every inlet compliant by "
                "now; note the position)")
    if event == "ceases":
        return (f"ceases: {area} ceases to apply now, wherever the ship is (the switch back "
                "may begin; note the position)")
    if event == "scrubber_out_of_service":
        return ("scrubber out: the scrubber is out of service from now (every inlet it served "
                "compliant by now; note the position)")
    if event == "load_out_of_range":
        return ("leg begins: a served engine's load is outside the scrubber's range from here "
                "(every inlet it served compliant by now; note the position)")
    if event == "load_in_range":
        return ("leg begins: the served engines' load is back within the scrubber's range (the "
                "switch back to the high-sulphur fuel may begin; note the position)")
    if event == "scrubber_in_service":
        return ("scrubber back: the scrubber is back in service from now (the switch back to "
                "the high-sulphur fuel may begin; note the position)")
    return f"boundary: {'enter' if down else 'exit'} {area} (" + (
        "every inlet compliant by now" if down else "the switch back may begin") + ")"


def offset(m: Moment) -> str:
    """The ship's UTC offset at the moment: ``+12:00``."""
    off = m.utc.astimezone(m.ship_tz).utcoffset() or timedelta(0)
    sign = "-" if off < timedelta(0) else "+"
    mins = abs(int(off.total_seconds())) // 60
    return f"{sign}{mins // 60:02d}:{mins % 60:02d}"
