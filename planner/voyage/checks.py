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
- Flash point: a distillate held within 10 °C of its flash point in a heated
  tank (SOLAS II-2 regulation 4.2.2.5, [SOLAS-1974] [M]) or, during a
  changeover, in the heater and the lines after it (the same margin, applied
  by us as a caution: :mod:`planner.ship.flash_margin`).
- Input taken although unusual: ship-file values outside their usual range
  (:mod:`planner.ship.plausible`) and route waypoints that look like latitude
  and longitude exchanged (:mod:`geo.swapped`).

Pure functions of the plan's parts: nothing here builds or changes a plan;
:func:`planner.voyage.plan.plan_voyage` puts :func:`plan_warnings` after its
own departure warning. Moments are epoch seconds (``*_epoch_s``: seconds since
1970-01-01 UTC).
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass
from typing import Literal

import numpy as np

from geo.area_files import load_caution_zones
from geo.plane import AreaShape, area_shape
from geo.swapped import swapped_waypoints
from planner.common.timefmt import format_utc
from planner.fuels import FLASH_POINT_MARGIN_C
from planner.ship.flash_margin import flash_margin_span
from planner.ship.system import FuelSystem
from planner.voyage.changeovers import plan_to_compliant
from planner.voyage.flush_cache import FlushCache
from planner.voyage.fuel_choice import FuelChoice
from planner.voyage.quantities import Quantities
from planner.voyage.runs import Change
from planner.voyage.timeline import Timeline
from planner.voyage.voyage_file import Voyage

_ZONE_STEP_S = 60.0

WarningKind = Literal["departs_inside", "quantity", "caution_zone", "viscosity",
                      "start_before_departure", "unusual_input", "swapped_lat_lon",
                      "flash_point", "fuel_passed_over"]


@dataclass(frozen=True)
class PlanWarning:
    """One warning of the plan.

    Parameters
    ----------
    kind : WarningKind
        ``"departs_inside"`` (be on compliant fuel before departure),
        ``"quantity"`` (short of a fuel), ``"caution_zone"``, ``"viscosity"``,
        ``"start_before_departure"``, ``"unusual_input"`` (a ship-file value
        outside its usual range), ``"swapped_lat_lon"`` (a route waypoint),
        ``"flash_point"`` (a distillate near its flash point) or ``"fuel_passed_over"``
        (a fuel within the limit by its delivery note that the fuel-choice margin passes
        over).
    text : str
        The warning as printed (JSON ``warnings``, terminal, PDF).
    """

    kind: WarningKind
    text: str


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


def _flash_text(fuel_name: str, fp: float, source: str) -> str:
    return f"{fuel_name} (flash point {fp:g} °C, {source})"


def flash_point_warnings(voyage: Voyage, timeline: Timeline,
                         changes: Sequence[Change]) -> list[PlanWarning]:
    """A distillate within 10 °C of its flash point in a heated tank or a heated volume.

    Tanks: each sounding's temperature against its distillate's flash point
    (SOLAS II-2 regulation 4.2.2.5, [SOLAS-1974] [M]). Changeovers: each
    consumer's inlet temperature path while the fuel there is mainly
    distillate (:func:`planner.ship.flash_margin.flash_margin_span`; the margin
    applied to heaters and lines as a caution). One warning per circuit, kind
    of changeover and fuel, naming its consumers and every boundary.

    Parameters
    ----------
    voyage : Voyage
        The voyage (its tank soundings and their temperatures).
    timeline : Timeline
        Its timeline (the ship with the voyage's fuels).
    changes : sequence of Change
        The plan's changes (each circuit's study has the temperature paths).
    """
    system, margin = timeline.system, FLASH_POINT_MARGIN_C
    out = []
    for tank, content in voyage.tanks.items():
        fuel = system.fuels.get(content.fuel)
        if fuel is None or fuel.is_residual:
            continue
        if content.temperature_c > fuel.flash_point - margin:
            out.append(PlanWarning("flash_point", (
                f"Tank {tank}: {_flash_text(fuel.name, fuel.flash_point, fuel.flash_point_source)}"
                f" is at {content.temperature_c:g} °C, within {margin:g} °C of its flash point; "
                f"SOLAS II-2 regulation 4.2.2.5 does not allow heating fuel in a tank above "
                f"{fuel.flash_point - margin:g} °C.")))
    found: dict[tuple, list] = {}
    for ch in changes:
        for part in ch.circuits:
            curves = {c.consumer: c for c in part.study.result.circuit_inlets(part.circuit)}
            for consumer, path in part.study.paths.items():
                curve = curves.get(consumer)
                if curve is None:
                    continue
                span = flash_margin_span(curve.fuels, curve.mass_fractions, curve.time_h,
                                         path.temperature_c, path.time_h, margin)
                if span is not None:
                    key = (part.circuit, ch.direction, part.to_fuel, span.fuel.name)
                    found.setdefault(key, []).append((ch.area, consumer, span))
    for (circuit, _, to_fuel, _), hits in found.items():
        areas = ", ".join(dict.fromkeys(h[0] for h in hits))
        consumers = ", ".join(dict.fromkeys(h[1] for h in hits))
        span = max((h[2] for h in hits), key=lambda s: s.max_temperature_c)
        f = span.fuel
        burners = all(getattr(system.consumers.get(h[1]), "kind", "") == "boiler" for h in hits)
        if burners:
            fix = ("switch the burner heater off (or bypass it) before the distillate arrives")
        else:
            fix = (f"the inlet temperature, changing no faster than its limit, is at or below "
                   f"{span.limit_c:g} °C only after {span.to_h:.2f} h: blend the distillate in "
                   "more slowly, so that the fuel is mainly distillate only from then on")
        out.append(PlanWarning("flash_point", (
            f"Circuit {circuit} ({consumers}), changeover to {to_fuel} ({areas}): the heated fuel "
            f"is mainly {_flash_text(f.name, f.flash_point, f.flash_point_source)} at up to "
            f"{span.max_temperature_c:.0f} °C {span.from_h:.2f}-{span.to_h:.2f} h after the "
            f"switch, within {margin:g} °C of its flash point; {fix}. The {margin:g} °C margin "
            "is SOLAS II-2 regulation 4.2.2.5's for heated fuel tanks, applied here to the "
            "heaters and lines as a caution.")))
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
    flash point, unusual input.

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
                 + input_warnings(timeline))


def passed_over_warnings(timeline: Timeline, choices: Sequence[FuelChoice],
                         choice_margin: float) -> list[PlanWarning]:
    """A fuel within a stretch's limit by its delivery note that the fuel-choice margin passes
    over, with the extra lower-sulphur fuel it costs.

    One warning per run of neighbouring stretches with the same passed-over fuel and the
    same fuel chosen instead. The cost is the mass of the chosen fuel burnt on those
    stretches (:meth:`~planner.voyage.timeline.Timeline.burnt_t`, every consumer).

    Parameters
    ----------
    timeline : Timeline
        The voyage's timeline.
    choices : sequence of FuelChoice
        The fuel choice of every stretch, in route order.
    choice_margin : float [-]
        The voyage's fuel-choice margin (named in the text).
    """
    groups: list[list[FuelChoice]] = []
    for c in choices:
        if not c.passed_over:
            continue
        prev = groups[-1][-1] if groups else None
        if (prev is not None and prev.stretch.to_m == c.stretch.from_m
                and prev.fuel.name == c.fuel.name
                and prev.passed_over[0].name == c.passed_over[0].name):
            groups[-1].append(c)
        else:
            groups.append([c])
    out = []
    sched = timeline.schedule
    for g in groups:
        legal = g[0].passed_over[0]
        pick = g[0].fuel
        a, b = g[0].stretch, g[-1].stretch
        t0, t1 = (float(x) for x in sched.epoch_at([a.from_m, b.to_m]))
        mass = timeline.burnt_t(t0, t1, pick)
        limit = min(c.stretch.limit_pct for c in g)
        where = ", ".join(dict.fromkeys(x for c in g for x in c.stretch.areas)) or "global cap"
        out.append(PlanWarning("fuel_passed_over", (
            f"{legal.name} ({legal.sulphur_pct:.3f} % by its delivery note) meets the "
            f"{limit:.2f} % limit on {a.from_nm:.1f}-{b.to_nm:.1f} nm ({where}) but the "
            f"fuel-choice margin {choice_margin * 100:g} % passes it over ([margins] "
            f"fuel_choice_margin): {pick.name} is burnt there instead, {mass:.1f} t more "
            f"{pick.name}.")))
    return out
