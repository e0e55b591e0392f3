"""What the plan needs and where it is risky: fuel quantities, SO₂, caution zones, viscosity.

- Quantities: each circuit draws the fuel its changeover valve is set to, from
  the moment the valve is switched (a changeover's start) to the next
  switch; the mass is the timeline's consumption scaled to the fuel's net
  specific energy (:meth:`planner.voyage.timeline.Timeline.burnt_t`), and m³ at
  15 °C is mass / density at 15 °C. Compared with what the tanks hold.
- SO₂: 64.066/32.06 kg per kg of sulphur burnt (REFERENCE.md section 4 [D])
  on every stretch, against what the regular fuel would have formed for the
  same energy.
- Caution zones: a changeover under way (valve switched, inlet not yet at
  the target) inside a zone of confined or congested water is a warning,
  with the latest start that completes before the zone.
- Inlet viscosity: any time outside the engine's window is a warning with
  the fix (start the temperature change earlier, or switch more slowly).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from planner.common.timefmt import format_utc
from planner.fuels import so2_from_fuel_kg

_ZONE_STEP_S = 60.0


@dataclass(frozen=True)
class FuelNeed:
    """Fuel drawn while the valves are set to one fuel (one run, valve-switch to valve-switch)."""

    fuel: str
    from_s: float
    to_s: float
    mass_t: float
    volume_m3: float


@dataclass(frozen=True)
class StretchSO2:
    """SO₂ formed on one stretch, kg, and on the regular fuel for the same energy."""

    from_m: float
    to_m: float
    areas: tuple[str, ...]
    fuel: str
    fuel_t: float
    so2_kg: float
    so2_regular_kg: float


def valve_periods(plan) -> list[tuple[str, float, float, object]]:
    """``(circuit, from_s, to_s, fuel)`` while each circuit's valve is set to one fuel."""
    out = []
    t_end = plan.timeline.end_s
    for circuit in plan.system.circuits:
        t = plan.timeline.start_s
        fuel = plan.runs[0].fuel
        for ch in plan.changes:
            part = next(c for c in ch.circuits if c.circuit == circuit)
            if ch.before_departure:  # on the compliant fuel from its (earlier) start on
                t = min(t, part.start_s)
            else:
                out.append((circuit, t, part.start_s, fuel))
                t = part.start_s
            fuel = plan.voyage.fuel(part.to_fuel)
        out.append((circuit, t, t_end, fuel))
    return out


def fuel_needs(plan) -> list[FuelNeed]:
    """Fuel drawn per valve period, all circuits together, in time order."""
    needs: list[FuelNeed] = []
    for circuit, a, b, fuel in valve_periods(plan):
        consumers = plan.system.circuits[circuit].consumers
        m = plan.timeline.burnt_t(a, b, fuel, consumers)
        needs.append(FuelNeed(fuel.name, a, b, m, m * 1000.0 / fuel.density_kg_m3))
    return needs


def on_board_t(plan) -> dict[str, float]:
    """Mass of each fuel in the tanks, t (standard volume × density at 15 °C)."""
    out: dict[str, float] = {}
    for tank in plan.system.tanks.values():
        for name, v in tank.content_m3.items():
            fuel = plan.system.fuels[name]
            out[name] = out.get(name, 0.0) + v * fuel.density_kg_m3 / 1000.0
    return out


def totals_t(needs: list[FuelNeed]) -> dict[str, float]:
    out: dict[str, float] = {}
    for n in needs:
        out[n.fuel] = out.get(n.fuel, 0.0) + n.mass_t
    return out


def stretch_so2(plan) -> list[StretchSO2]:
    """SO₂ on each stretch of the route check, on the planned fuel and on the regular one."""
    regular = max((c.fuel for c in plan.choices), key=lambda f: f.sulphur_pct)
    sched = plan.timeline.schedule
    out = []
    for c in plan.choices:
        st = c.stretch
        fuel = next((r.fuel for r in plan.runs if r.from_m <= st.from_m + 1e-6 <= r.to_m),
                    c.fuel)
        t0, t1 = (float(x) for x in sched.epoch_at([st.from_m, st.to_m]))
        mass = plan.timeline.burnt_t(t0, t1, fuel)
        mass_reg = mass * fuel.q_net / regular.q_net
        out.append(StretchSO2(st.from_m, st.to_m, st.areas, fuel.name, mass,
                              float(so2_from_fuel_kg(mass * 1000.0, fuel.sulphur_pct)),
                              float(so2_from_fuel_kg(mass_reg * 1000.0, regular.sulphur_pct))))
    return out


def so2_by_area(rows: list[StretchSO2]) -> dict[str, tuple[float, float]]:
    """SO₂ formed inside each area, kg: (as planned, on regular fuel)."""
    out: dict[str, tuple[float, float]] = {}
    for r in rows:
        for a in r.areas:
            p, q = out.get(a, (0.0, 0.0))
            out[a] = (p + r.so2_kg, q + r.so2_regular_kg)
    return out


def caution_zone_shapes(plan) -> list:
    """The voyage's caution zones as united plane shapes (empty when it names none)."""
    if plan.voyage.caution_zones is None:
        return []
    from geo.area_files import load_caution_zones
    from geo.plane import area_shape

    return [area_shape(z) for z in load_caution_zones([plan.voyage.caution_zones])]


def _inside(shape, plan, times: np.ndarray) -> np.ndarray:
    d = plan.timeline.schedule.distance_at_epoch(times)
    lat, lon = plan.timeline.schedule.path.position(d)
    return shape.covers(lat, lon)


def zone_warnings(plan) -> list[str]:
    """Changeovers under way inside a caution zone, with the start that clears it."""
    from planner.voyage.changeovers import plan_to_compliant

    out = []
    shapes = caution_zone_shapes(plan)
    for ch in plan.changes:
        for part in ch.circuits:
            if part.done_s is None or ch.before_departure:
                continue
            times = np.arange(part.start_s, part.done_s + _ZONE_STEP_S, _ZONE_STEP_S)
            for shape in shapes:
                hit = _inside(shape, plan, times)
                if not hit.any():
                    continue
                first = float(times[np.argmax(hit)])
                name = shape.area.name
                if ch.direction == "to_compliant":
                    back = np.arange(first, plan.timeline.start_s - 1, -_ZONE_STEP_S)
                    outside = ~_inside(shape, plan, back)
                    entry = float(back[np.argmax(outside)]) if outside.any() else None
                    advice = "start before departure"
                    if entry is not None and entry > plan.timeline.start_s:
                        alt = plan_to_compliant(plan.system, plan.timeline, part.circuit,
                                                part.from_tank, part.to_tank, entry, 0.0,
                                                ch.limit_pct, ch.target_pct)
                        advice = (f"start at or before {format_utc(plan.timeline.utc(alt.start_s))}"
                                  f" to complete before entering it at "
                                  f"{format_utc(plan.timeline.utc(entry))}")
                    out.append(f"Circuit {part.circuit}: the changeover to {part.to_fuel} for "
                               f"{ch.area} would be under way inside the caution zone {name} "
                               f"from {format_utc(plan.timeline.utc(first))}; {advice}.")
                else:
                    ahead = np.arange(first, plan.timeline.end_s, _ZONE_STEP_S)
                    outside = ~_inside(shape, plan, ahead)
                    leave = float(ahead[np.argmax(outside)]) if outside.any() else None
                    when = (f"commence it after leaving the zone at "
                            f"{format_utc(plan.timeline.utc(leave))}" if leave else
                            "stay on compliant fuel")
                    out.append(f"Circuit {part.circuit}: the switch back to {part.to_fuel} after "
                               f"{ch.area} would be under way inside the caution zone {name}; "
                               f"{when}.")
    return out


def viscosity_warnings(plan) -> list[str]:
    """Inlet viscosity outside the engine's window during any changeover, with the fix.

    One warning per circuit, consumer and kind of changeover, naming every
    boundary where it happens.
    """
    found: dict[tuple, list] = {}
    for ch in plan.changes:
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
        if lead is not None:
            fix = f"start changing the inlet temperature {lead * 60:.0f} min before the valve"
        elif direction == "to_compliant":
            fix = ("switch more slowly (blend over a longer time) or cool the distillate: "
                   "changing the temperature earlier alone does not keep it in the window")
        else:
            fix = ("switch back more slowly (blend the residual fuel in gradually) and heat "
                   "as it arrives: pre-heating the distillate alone does not keep it in the window")
        limit = f"{w.min_cst:g} cSt minimum" if kind == "below" else f"{w.max_cst:g} cSt maximum"
        out.append(f"Circuit {circuit}, {consumer}, changeover to {to_fuel} ({areas}): inlet "
                   f"viscosity {path.min_viscosity_cst:.1f}-{path.max_viscosity_cst:.1f} cSt goes "
                   f"{kind} the {limit} {a:.2f}-{b:.2f} h after the switch; {fix}.")
    return out


def run_checks(plan) -> None:
    """Add the quantity, zone and viscosity warnings to the plan (in place)."""
    needs = totals_t(fuel_needs(plan))
    have = on_board_t(plan)
    for fuel, need in needs.items():
        held = have.get(fuel, 0.0)
        if need > held:
            m3 = need * 1000 / plan.system.fuels[fuel].density_kg_m3
            plan.warnings.append(
                f"Short of {fuel}: the voyage needs {need:.1f} t ({m3:.1f} m³ at 15 °C) but the "
                f"tanks hold {held:.1f} t: {need - held:.1f} t short.")
    plan.warnings.extend(zone_warnings(plan))
    plan.warnings.extend(viscosity_warnings(plan))
    for ch in plan.changes:
        for part in ch.circuits:
            if ch.direction == "to_compliant" and part.start_s < plan.timeline.start_s and \
                    not ch.before_departure:
                plan.warnings.append(f"Circuit {part.circuit}: the changeover for {ch.area} must "
                                     "start before departure.")
