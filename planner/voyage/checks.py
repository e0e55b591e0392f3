"""Where the plan falls short or is risky: the plan's warnings, as typed results.

- Quantity: a fuel the voyage needs more of than the tanks hold
  (:mod:`planner.voyage.quantities`).
- Caution zones: a changeover under way (valve switched, inlet not yet at the
  target) inside a zone of confined or congested water is a warning, with the
  latest start that completes before the zone ([USCG-MSA-03-09]: complete the
  switch well offshore, before restricted waters).
- Inlet viscosity: any time outside the consumer's own window
  (:mod:`planner.ship.inlet_limits`) is a warning with a fix that consumer
  can do: an engine starts the temperature change earlier or switches more
  slowly; a boiler burner also may be stopped for the switch (common
  practice), which an engine under way may not.
- A changeover to compliant fuel that would have to start before departure.
- Input taken although unusual: ship-file values outside their usual range
  (:mod:`planner.ship.plausible`) and route waypoints that look like latitude
  and longitude exchanged (:mod:`geo.swapped`).
- Flash point, a tank running dry after the flush and a legal fuel passed over:
  :mod:`planner.voyage.fuel_checks`.
- The carriage ban: fuel above 0.50 % on board a ship without a scrubber (or above what
  its scrubbers are approved for), from 2020-03-01 ([MEPC-305]): :mod:`planner.voyage.carriage`.

Pure functions of the plan's parts: nothing here builds or changes a plan;
:func:`planner.voyage.plan.plan_voyage` puts :func:`plan_warnings` after its
own departure warning. Moments are epoch seconds (``*_epoch_s``: seconds since
1970-01-01 UTC).
"""

from __future__ import annotations

from collections.abc import Sequence

import numpy as np

from geo.area_files import load_caution_zones
from geo.plane import AreaShape, area_shape
from geo.swapped import swapped_waypoints
from planner.common.timefmt import format_utc
from planner.ship.system import FuelSystem
from planner.voyage.carriage import carriage_warnings
from planner.voyage.changeovers import plan_to_compliant
from planner.voyage.flush_cache import FlushCache
from planner.voyage.fuel_checks import (
    SERVICE_ENDURANCE_H,
    flash_point_warnings,
    passed_over_warnings,
    tank_dry_warnings,
)
from planner.voyage.quantities import Quantities
from planner.voyage.runs import Change
from planner.voyage.timeline import Timeline
from planner.voyage.voyage_file import Voyage
from planner.voyage.warning import PlanWarning, WarningKind

_ZONE_STEP_S = 60.0

__all__ = ["SERVICE_ENDURANCE_H", "PlanWarning", "WarningKind", "flash_point_warnings",
           "passed_over_warnings", "tank_dry_warnings", "plan_warnings", "quantity_warnings",
           "zone_warnings", "viscosity_warnings", "start_before_departure_warnings",
           "input_warnings", "caution_zone_shapes", "carriage_warnings"]


def quantity_warnings(system: FuelSystem, quantities: Quantities) -> list[PlanWarning]:
    """A fuel the voyage needs more of than the tanks hold, with the shortfall.

    Parameters
    ----------
    system : FuelSystem
        The ship as she sails the voyage (fuel densities at 15 °C).
    quantities : Quantities
        The plan's fuel figures.
    """
    out = []
    for fuel, need in quantities.totals_t.items():
        held = quantities.on_board_t.get(fuel, 0.0)
        if need > held:
            m3 = need * 1000 / system.fuels[fuel].density_kg_m3
            out.append(PlanWarning("quantity", (
                f"Short of {fuel}: the voyage needs {need:.1f} t ({m3:.1f} m³ at 15 °C) but the "
                f"tanks hold {held:.1f} t: {need - held:.1f} t short.")))
    return out


def caution_zone_shapes(voyage: Voyage) -> list[AreaShape]:
    """The voyage's caution zones as united plane shapes (empty when it names none).

    Parameters
    ----------
    voyage : Voyage
        The voyage (its ``caution_zones`` file, if any).
    """
    if voyage.caution_zones is None:
        return []
    return [area_shape(z) for z in load_caution_zones([voyage.caution_zones])]


def _inside(shape: AreaShape, timeline: Timeline, times: np.ndarray) -> np.ndarray:
    d = timeline.schedule.distance_at_epoch(times)
    lat, lon = timeline.schedule.path.position(d)
    return shape.covers(lat, lon)


def zone_warnings(timeline: Timeline, changes: Sequence[Change], shapes: Sequence[AreaShape],
                  flushes: FlushCache | None = None) -> list[PlanWarning]:
    """Changeovers under way inside a caution zone, with the start that clears it.

    Each changeover is sampled every minute from its valve switch to done.

    Parameters
    ----------
    timeline : Timeline
        The voyage's timeline (positions against time, and the ship).
    changes : sequence of Change
        The plan's changes, in time order.
    shapes : sequence of AreaShape
        The caution zones (:func:`caution_zone_shapes`).
    flushes : FlushCache, optional
        The plan's flushes, for the alternative starts (default: a new cache).
    """
    out = []
    start, end = timeline.start_epoch_s, timeline.end_epoch_s
    flushes = flushes if flushes is not None else FlushCache()
    for ch in changes:
        for part in ch.circuits:
            if part.done_epoch_s is None or ch.before_departure:
                continue
            times = np.arange(part.start_epoch_s, part.done_epoch_s + _ZONE_STEP_S, _ZONE_STEP_S)
            for shape in shapes:
                hit = _inside(shape, timeline, times)
                if not hit.any():
                    continue
                first = float(times[np.argmax(hit)])
                name = shape.area.name
                if ch.direction == "to_compliant":
                    back = np.arange(first, start - 1, -_ZONE_STEP_S)
                    outside = ~_inside(shape, timeline, back)
                    entry = float(back[np.argmax(outside)]) if outside.any() else None
                    advice = "start before departure"
                    if entry is not None and entry > start:
                        alt = plan_to_compliant(timeline.system, timeline, part.circuit,
                                                part.from_tank, part.to_tank, entry, 0.0,
                                                ch.limit_pct, ch.target_pct, flushes,
                                                thermal=False)
                        advice = (f"start at or before "
                                  f"{format_utc(timeline.utc(alt.start_epoch_s))} to complete "
                                  f"before entering it at {format_utc(timeline.utc(entry))}")
                    text = (f"Circuit {part.circuit}: the changeover to {part.to_fuel} for "
                            f"{ch.area} would be under way inside the caution zone {name} "
                            f"from {format_utc(timeline.utc(first))}; {advice}.")
                else:
                    ahead = np.arange(first, end, _ZONE_STEP_S)
                    outside = ~_inside(shape, timeline, ahead)
                    leave = float(ahead[np.argmax(outside)]) if outside.any() else None
                    when = (f"commence it after leaving the zone at "
                            f"{format_utc(timeline.utc(leave))}" if leave else
                            "stay on compliant fuel")
                    text = (f"Circuit {part.circuit}: the switch back to {part.to_fuel} after "
                            f"{ch.area} would be under way inside the caution zone {name}; "
                            f"{when}.")
                out.append(PlanWarning("caution_zone", text))
    return out


def _viscosity_fix(burner: bool, lead: float | None, direction: str) -> str:
    """The fix a consumer can do: an engine's, or a boiler burner's (common practice)."""
    if burner:
        if lead is not None:
            return f"start changing the burner heater's temperature {lead * 60:.0f} min before " \
                   "the valve"
        if direction == "to_compliant":
            return ("switch the burner heater off (or bypass it) before the distillate arrives, "
                    "or stop the burner for the changeover and restart it on distillate with "
                    "the burner maker's light-fuel settings")
        return ("stop the burner for the switch back and restart it when its heater has "
                "brought the residual fuel to the atomising viscosity, or blend the residual "
                "fuel in more slowly")
    if lead is not None:
        return f"start changing the inlet temperature {lead * 60:.0f} min before the valve"
    if direction == "to_compliant":
        return ("switch more slowly (blend over a longer time) or cool the distillate: "
                "changing the temperature earlier alone does not keep it in the window")
    return ("switch back more slowly (blend the residual fuel in gradually) and heat "
            "as it arrives: pre-heating the distillate alone does not keep it in the window")


def viscosity_warnings(changes: Sequence[Change],
                       system: FuelSystem | None = None) -> list[PlanWarning]:
    """Inlet viscosity outside the consumer's own window during any changeover, with the fix.

    One warning per circuit, consumer and kind of changeover, naming every
    boundary where it happens.

    Parameters
    ----------
    changes : sequence of Change
        The plan's changes, in time order (each circuit's study has the viscosity paths,
        each against its consumer's window).
    system : FuelSystem, optional
        The ship: a boiler's warning gives a burner's fix (without it, an engine's).
    """
    found: dict[tuple, list] = {}
    for ch in changes:
        for part in ch.circuits:
            st = part.study
            for consumer, path in st.paths.items():
                spans = path.outside()
                if not spans:
                    continue
                a, b, kind = spans[0]
                key = (part.circuit, consumer, ch.direction, part.to_fuel, kind)
                found.setdefault(key, []).append((ch.area, path, a, b, st.lead_h.get(consumer)))
    out = []
    for (circuit, consumer, direction, to_fuel, kind), hits in found.items():
        areas = ", ".join(dict.fromkeys(h[0] for h in hits))
        _, path, a, b, lead = hits[0]
        w = path.window
        who = system.consumers.get(consumer) if system is not None else None
        fix = _viscosity_fix(getattr(who, "kind", "") == "boiler", lead, direction)
        limit = f"{w.min_cst:g} cSt minimum" if kind == "below" else f"{w.max_cst:g} cSt maximum"
        out.append(PlanWarning("viscosity", (
            f"Circuit {circuit}, {consumer}, changeover to {to_fuel} ({areas}): inlet "
            f"viscosity {path.min_viscosity_cst:.1f}-{path.max_viscosity_cst:.1f} cSt goes "
            f"{kind} the {limit} {a:.2f}-{b:.2f} h after the switch; {fix}.")))
    return out


def start_before_departure_warnings(timeline: Timeline,
                                    changes: Sequence[Change]) -> list[PlanWarning]:
    """Changeovers to compliant fuel (not the before-departure one) that must start before
    departure.

    Parameters
    ----------
    timeline : Timeline
        The voyage's timeline (departure).
    changes : sequence of Change
        The plan's changes, in time order.
    """
    out = []
    for ch in changes:
        for part in ch.circuits:
            if ch.direction == "to_compliant" and part.start_epoch_s < timeline.start_epoch_s \
                    and not ch.before_departure:
                out.append(PlanWarning("start_before_departure", (
                    f"Circuit {part.circuit}: the changeover for {ch.area} must start before "
                    "departure.")))
    return out


def input_warnings(timeline: Timeline) -> list[PlanWarning]:
    """Input taken although unusual: ship-file values outside their usual range, and route
    waypoints that look like latitude and longitude exchanged.

    Parameters
    ----------
    timeline : Timeline
        The voyage's timeline (its ship and its route).
    """
    out = [PlanWarning("unusual_input", text) for text in timeline.system.input_warnings]
    route = timeline.schedule.path.route
    out += [PlanWarning("swapped_lat_lon", w.text(route.source))
            for w in swapped_waypoints(route)]
    return out


def plan_warnings(voyage: Voyage, timeline: Timeline, changes: Sequence[Change],
                  quantities: Quantities,
                  flushes: FlushCache | None = None) -> tuple[PlanWarning, ...]:
    """Every check's warnings in print order: quantity, caution zone, viscosity, early start,
    flash point, unusual input, tank dry, carriage ban.

    Parameters
    ----------
    voyage : Voyage
        The voyage (its caution zones).
    timeline : Timeline
        Its timeline (with the ship as she sails it).
    changes : sequence of Change
        The plan's changes, in time order.
    quantities : Quantities
        The plan's fuel figures.
    flushes : FlushCache, optional
        The plan's flushes (default: a new cache).
    """
    return tuple(quantity_warnings(timeline.system, quantities)
                 + zone_warnings(timeline, changes, caution_zone_shapes(voyage), flushes)
                 + viscosity_warnings(changes, timeline.system)
                 + start_before_departure_warnings(timeline, changes)
                 + flash_point_warnings(voyage, timeline, changes)
                 + input_warnings(timeline)
                 + tank_dry_warnings(timeline, changes)
                 + carriage_warnings(timeline.system, voyage.depart_utc))
