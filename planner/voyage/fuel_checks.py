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

from collections.abc import Sequence

from planner.common.defaults import SERVICE_ENDURANCE_H
from planner.common.timefmt import format_utc
from planner.fuels import FLASH_POINT_MARGIN_C
from planner.ship.flash_margin import flash_margin_span
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
