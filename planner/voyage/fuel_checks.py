"""Warnings about the fuels themselves: flash point, a tank running dry, a fuel passed over.

- Flash point: a distillate held within 10 °C of its flash point in a heated
  tank (SOLAS II-2 regulation 4.2.2.5, [SOLAS-1974] [M]) or, during a
  changeover, in the heater and the lines after it (the same margin, applied
  by us as a caution: :mod:`planner.ship.flash_margin`).
- A tank at a changeover valve that runs dry, after the flush is complete, within
  :data:`SERVICE_ENDURANCE_H` of the valve switch and before the circuit's next
  changeover or the arrival (the flush's
  :attr:`~planner.flushing.FlushResult.tank_dry_h`; no transfer into it is modelled).
- A fuel within a stretch's limit by its delivery note that the optional
  fuel-choice margin passes over, with the extra compliant fuel it costs.

Pure functions of the plan's parts, like :mod:`planner.voyage.checks`.
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence
from datetime import datetime, timedelta

from planner.common.defaults import SERVICE_ENDURANCE_H
from planner.common.timefmt import format_utc
from planner.fuels import FLASH_POINT_MARGIN_C
from planner.ship.flash_margin import FlashSpan, inlet_flash_spans, precool_path
from planner.ship.system import FuelSystem
from planner.voyage.fuel_choice import FuelChoice
from planner.voyage.runs import Change
from planner.voyage.timeline import Timeline
from planner.voyage.voyage_file import Voyage
from planner.voyage.warning import PlanWarning


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
            spans = inlet_flash_spans(part.study.result, part.circuit, part.study.paths, margin)
            for consumer, span in spans.items():
                key = (part.circuit, ch.direction, part.to_fuel, span.fuel.name)
                found.setdefault(key, []).append((ch.area, consumer, span, part))
    for (circuit, _, to_fuel, _), hits in found.items():
        areas = ", ".join(dict.fromkeys(h[0] for h in hits))
        area, _, _, part = max(hits, key=lambda h: h[2].max_temperature_c)  # the worst one
        spans = {h[1]: h[2] for h in hits if h[3] is part}
        out.append(PlanWarning("flash_point", changeover_flash_text(
            system, circuit, to_fuel, part.study, spans, areas,
            timeline.utc(part.start_epoch_s), area if len(hits) > len(spans) else "")))
    return out


def _clock(switch: datetime | None, after_h: float) -> str:
    """`` (05:12Z)`` for a time ``after_h`` h after the switch (nothing without a clock)."""
    return "" if switch is None else f" ({(switch + timedelta(hours=after_h)):%H:%MZ})"


def changeover_flash_text(system: FuelSystem, circuit: str, to_fuel: str, study,
                          spans: Mapping[str, FlashSpan], where: str = "",
                          switch: datetime | None = None, named: str = "") -> str:
    """The caution for a changeover that holds distillate near its flash point, with the fix.

    One text for ``changeover plan`` and ``changeover flush``: which consumers,
    how hot and when (:func:`planner.ship.flash_margin.flash_margin_span`), and
    what the chief engineer can do, worked out on the consumers' own inlet path
    (:func:`planner.ship.flash_margin.precool_path`): for engines, when to start
    lowering the heater set point before the switch, to what temperature (the
    old fuel at the engine's maximum viscosity), and when the fuel is then
    cool enough; for boiler burners, stop the burner for the switch, or lower
    the burner heater and switch it off as the distillate arrives.

    Parameters
    ----------
    system : FuelSystem
        The ship (each consumer's kind and window).
    circuit, to_fuel : str
        The circuit switched and the fuel it changes to.
    study : FlushStudy
        Its flush (the inlet compositions and temperature paths).
    spans : mapping of str to FlashSpan
        The consumers within the margin and their spans.
    where : str
        The areas of the changeovers named (empty: none named).
    switch : datetime, optional
        When the valve is moved (UTC); without it times are after the switch.
    named : str
        The area of the changeover the figures are for, when ``where`` names several.
    """
    margin = FLASH_POINT_MARGIN_C
    worst = max(spans, key=lambda c: spans[c].max_temperature_c)
    span = spans[worst]
    f = span.fuel
    curve = next(c for c in study.result.circuit_inlets(circuit) if c.consumer == worst)
    window = system.window_for(worst)
    pre = precool_path(curve.fuels, curve.mass_fractions, curve.time_h, window, margin)
    old = study.summary.from_fuel
    burner = all(getattr(system.consumers.get(c), "kind", "") == "boiler" for c in spans)
    rate = window.max_rate_c_per_min
    at = "" if switch is None else (f" (the valve moved at {format_utc(switch)}"
                                    + (f" for {named}" if named else "") + ")")
    flash = _flash_text(f.name, f.flash_point, f.flash_point_source)
    head = (f"Circuit {circuit} ({', '.join(spans)}), changeover to {to_fuel}"
            + (f" ({where})" if where else "") + ": "
            + ("firing through the switch, " if burner else "with the heater set point "
               "following the fuel from the switch, ")
            + f"the heated fuel is mainly {flash} at up to {span.max_temperature_c:.0f} °C "
            f"{span.from_h:.2f}-{span.to_h:.2f} h after the switch{at}, within {margin:g} °C "
            "of its flash point. ")
    lower = (f"lower the {'burner ' if burner else ''}heater set point from "
             f"{pre.set_point_c:.0f} °C to {pre.precool_c:.0f} °C ({old} at {worst}'s "
             f"maximum of {window.max_cst:g} cSt) at {rate:g} °C/min, starting "
             f"{pre.lead_h * 60:.0f} min before the switch{_clock(switch, -pre.lead_h)}, "
             "and hold it there until the fuel arriving needs less")
    cool = ("" if pre.at_limit_h is None else
            f"at or below {span.limit_c:g} °C from {pre.at_limit_h:.2f} h after the switch"
            f"{_clock(switch, pre.at_limit_h)}")
    if pre.span is None:
        left = (f"the {f.name} then stays at least {margin:g} °C below its flash point"
                + (f" ({cool})" if cool else ""))
    else:
        left = (f"even so it is mainly {f.name} at up to {pre.span.max_temperature_c:.0f} °C "
                f"{pre.span.from_h:.2f}-{pre.span.to_h:.2f} h after the switch"
                f"{_clock(switch, pre.span.from_h)}" + (f", and {cool}" if cool else "")
                + f"; {old} may not be cooler before the switch")
    if burner:
        fix = (f"Stop the burner for the switch: move the valve with the burner stopped, "
               f"circulate {to_fuel} through the burner line with the heater off or bypassed "
               f"until the fuel at the burner is at or below {span.limit_c:g} °C, and relight "
               f"on {to_fuel}. If the steam demand does not allow it, {lower}, and switch the "
               f"heater off as {to_fuel} arrives: {left}.")
    else:
        fix = (f"To shorten it, {lower}; then let it follow the fuel down at {rate:g} °C/min: "
               f"{left}. Until then keep the circuit closed and pressurised and watch for "
               "leaks of hot distillate.")
    return (head + fix + f" The {margin:g} °C margin is SOLAS II-2 regulation 4.2.2.5's for "
            "heated fuel tanks, applied here to the heaters and lines as a caution.")


def tank_dry_warnings(timeline: Timeline, changes: Sequence[Change]) -> list[PlanWarning]:
    """A tank that runs dry after a changeover's flush, within :data:`SERVICE_ENDURANCE_H`
    of the switch and before the circuit's next changeover or the arrival, with its time.

    Parameters
    ----------
    timeline : Timeline
        The voyage's timeline (its end is the arrival).
    changes : sequence of Change
        The plan's changes, in time order (each circuit's flush gives when each of its
        tanks runs dry, h after the valve switch, the draw held at the final blend).
    """
    starts: dict[str, list[float]] = {}
    for ch in changes:
        for part in ch.circuits:
            starts.setdefault(part.circuit, []).append(part.start_epoch_s)
    out = []
    for ch in changes:
        for part in ch.circuits:
            later = [t for t in starts[part.circuit] if t > part.start_epoch_s]
            until = min(later, default=timeline.end_epoch_s)
            for tank, dry_h in part.study.result.tank_dry_h.items():
                dry = part.start_epoch_s + dry_h * 3600.0
                if dry >= until or dry_h >= SERVICE_ENDURANCE_H:
                    continue
                done = "" if part.duration_h is None else (
                    f"; the flush is complete {part.duration_h * 60:.0f} min after the switch")
                out.append(PlanWarning("tank_dry", (
                    f"Circuit {part.circuit}: tank {tank} runs dry at "
                    f"{format_utc(timeline.utc(dry))}, {dry_h:.1f} h after the valve is "
                    f"switched for {ch.area}{done}; refill it by transfer before then.")))
    return out


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
