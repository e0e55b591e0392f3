"""The words of the written changeover procedure, built from the ship's facts (pure text).

Each function returns the numbered steps of one section of the procedure as
plain strings (not yet escaped for reportlab), with the ship's own names and
figures from :class:`planner.procedure.facts.ProcedureFacts` written in: tanks,
circuits, fuels, the inlet limits, the modelled durations and viscosity path.
:mod:`planner.documents.procedure_pdf` lays them out. Durations in running
text are ``1 h 05 min``; in tables ``h:mm``.

The advice rests on: the record of regulation 14.6 ([MARPOL-VI]); thermal shock
as the hazard, hence the inlet's rate limit ([TC-SSB-04-2015]); completing the
switch in open water, clear of restricted waters ([USCG-MSA-03-09]); and each
consumer's own viscosity window and heating rule (:mod:`planner.ship.inlet_limits`:
[ENGINE-GUIDANCE] for the engines, a burner's from memory). Advice fits the
consumer: an engine's temperature follows the fuel within its rate limit (never
"stop the engine"); a boiler burner's heater is switched off or bypassed for the
distillate, or the burner is stopped for the switch. The figures are the ship file's.
"""

from __future__ import annotations

from collections.abc import Sequence

from planner.procedure.facts import CircuitFacts, ProcedureFacts
from planner.procedure.windows import WindowFacts


def hm(hours: float | None) -> str:
    """Hours as h:mm (``1:19``), or a dash."""
    if hours is None:
        return "—"
    m = round(hours * 60.0)
    return f"{m // 60}:{m % 60:02d}"


def celsius(x: float) -> str:
    """A temperature to the degree: ``130 °C``."""
    return f"{x:.0f} °C"


def names(items: Sequence[str]) -> str:
    """``a``, ``a and b``, ``a, b and c`` (empty for none)."""
    items = list(items)
    if len(items) < 2:
        return "".join(items)
    return ", ".join(items[:-1]) + " and " + items[-1]


def dur(hours: float) -> str:
    """Hours in words for running text: ``1 h 05 min``, ``45 min``."""
    m = round(hours * 60.0)
    return f"{m} min" if m < 60 else f"{m // 60} h {m % 60:02d} min"


def changing(f: ProcedureFacts) -> list[CircuitFacts]:
    """Circuits with a changeover, the longest (at the reference load) first."""
    cs = [c for c in f.circuits if c.rows]
    return sorted(cs, key=lambda c: -(c.reference_row.time_to_target_h or 1e9))


def purpose(f: ProcedureFacts) -> list[str]:
    """Section 1: what the procedure is for, who decides and who does what."""
    name = f.ship.name
    return [
        f"This is how {name} changes her fuel oil service system over to fuel of at most "
        f"{f.limit_pct:.2f} % m/m sulphur before entering an emission control area, and back to "
        "regular fuel after leaving it (MARPOL Annex VI regulation 14.6). The fuel changed to "
        "must be fully flushed through to every consumer before the boundary.",
        "The figures come from the ship file and the changeover planner's model of this "
        "ship's fuel system. They are estimates to plan with; the readings in the engine room "
        "decide.",
        "The master decides when and where the changeover starts, from the voyage plan and "
        "the table in section 3, and keeps the ship clear of confined and congested waters "
        "until it is complete. The chief engineer is in charge of the changeover in the "
        "engine room, which stays manned from the first step to the last.",
        "The officer of the watch is told before any valve is moved, when each circuit is "
        "complete, and at once of any trouble.",
    ]


def checks(f: ProcedureFacts) -> list[str]:
    """Section 5: the checklist before every changeover, one line per check."""
    to = sorted({c.to_fuel for c in f.circuits if c.rows})
    frm = sorted({c.from_fuel for c in f.circuits if c.rows})
    comp = [t.name for t in f.tanks if t.compliant] or ["(no compliant tank in the ship file)"]
    svc = sorted({c.to_tank for c in f.circuits if c.rows})
    burnt = sum(c.reference_row.burnt_t.get(c.to_fuel, 0.0) for c in f.circuits if c.rows)
    longest = changing(f)[0] if changing(f) else None
    items = [
        f"Compliant fuel: the delivery note of {names(to)} shows at most {f.limit_pct:.2f} % "
        "m/m sulphur, and its sample is kept on board.",
        f"Compatibility: {names(frm)} and {names(to)} will mix in the pipes, mixing tank and "
        "heaters. Confirm they are compatible (a spot test of a blend on board, or the fuel "
        "laboratory's report) before starting.",
        f"Soundings: sound {names(comp)}. There must be enough compliant fuel for the passage "
        f"inside the area and a reserve, besides about {burnt:.1f} t burnt while changing "
        "over. Note the soundings.",
        f"Service tank {names(svc)}: full enough for the changeover and the passage, settled, "
        "and drained of water.",
        *[_heater_check(g, to) for g in f.windows],
        "Alarms: inlet viscosity (" + "; ".join(
            f"{g.label} {g.window.min_cst:g} and {g.window.max_cst:g} cSt" for g in f.windows)
        + "), inlet temperature, filter differential pressure, fuel leakage and boiler flame "
        "failure alarms tested; viscosimeter reading true.",
        "Pumps and filters: supply and booster pumps and their standbys ready; a clean filter "
        "element in reserve.",
        "Manning: the chief engineer, or an engineer officer he names, at the controls; the "
        "engine room manned (not unattended) from now until the plant runs steady on the new "
        "fuel.",
        "Position and time: the master has agreed the start"
        + (f", at least {dur(longest.reference_row.start_before_h)} before the boundary at the "
           f"reference load (section 3, circuit {longest.name}), more at a lower load"
           if longest and longest.reference_row.start_before_h is not None else "")
        + ". The ship will stay in open water, clear of confined or congested waters, until "
        "the changeover is complete.",
        "Bridge: the officer of the watch knows the changeover is starting, that propulsion or "
        "power may be lost, and the emergency steps if it is.",
    ]
    if f.carriage_fuels:
        items.append(f"Carriage: {names(list(f.carriage_fuels))} is above what the ship may "
                     "carry for use on board (the carriage ban in the cautions); the master "
                     "and the company decide what is done with it.")
    port = [c for c in f.circuits if c.rows]
    if port:
        parts = [(f"circuit {c.name} {dur(c.alongside.time_to_target_h)}"
                  if c.alongside is not None and c.alongside.time_to_target_h is not None
                  else f"circuit {c.name} cannot be flushed (nothing it feeds burns fuel)")
                 for c in port]
        items.append(
            "Alongside: with the main engine stopped (generators and boiler as at sea) the "
            f"changeover takes {names(parts)}, far longer than at sea. Departing from a port "
            f"inside an area, start it at least that long plus {dur(f.margin_h)} before "
            "departure.")
    return items


def _heater_check(g: WindowFacts, to: list[str]) -> str:
    """The check of the heaters (and cooler) of one window group before the changeover."""
    w = g.window
    hot = min((g.fuel(n).thins_to_min_c for n in to), default=w.max_temperature_c)
    if g.burner:
        return (f"Burner heater of the {g.label}: its control and temperature read-out working, "
                "and the way to switch it off or bypass it for the distillate known; "
                f"{names(to)} at the burner stays below {celsius(hot)}, where it would thin "
                f"below the burner's {w.min_cst:g} cSt.")
    return (f"Heaters and cooler for the {g.label}: heater control and its temperature "
            f"read-out working; fuel cooler (if fitted) ready with cooling water, to keep "
            f"{names(to)} below {celsius(hot)} at the inlet, where it would thin below "
            f"{w.min_cst:g} cSt.")


def _circuit_visc(c: CircuitFacts, f: ProcedureFacts) -> str:
    """What the modelled viscosity path of circuit ``c`` asks for."""
    bad = [r for r in c.rows if not r.viscosity.inside]
    if not bad:
        lo = min(r.viscosity.min_cst for r in c.rows)
        hi = max(r.viscosity.max_cst for r in c.rows)
        return (f"Circuit {c.name}: with the temperature following the fuel at the rate limit, "
                f"the model keeps the inlet between {lo:.1f} and {hi:.1f} cSt"
                + (" at every load in section 3" if len(c.rows) > 1 else "") +
                ": no cooling ahead of the valve is needed.")
    r = min(bad, key=lambda x: x.viscosity.min_cst)
    v = r.viscosity
    g = c.window_of(v.consumer) or c.windows[0]
    w = g.window
    at = "" if r.load_pct is None else f" at {r.load_pct:g} % MCR"
    span = (f" from {hm(v.outside[0][0])} to {hm(v.outside[-1][1])} after the valve is moved"
            if v.outside else "")
    low = not v.outside or v.outside[0][2] == "below"
    how = (f"falling to {v.min_cst:.1f} cSt, below its {w.min_cst:g} cSt minimum," if low
           else f"rising to {v.max_cst:.1f} cSt, above its {w.max_cst:g} cSt maximum,")
    head = (f"Circuit {c.name}{at}: the new fuel reaches the {g.label} faster than the "
            f"temperature may change, and the model has the viscosity {how}{span}. ")
    old = g.fuel(c.from_fuel)
    if g.burner:
        return head + (f"Stop the burner for the switch: move the valve with the burner off, "
                       f"let {c.to_fuel} fill the burner line, switch the burner heater off "
                       f"(or bypass it) and relight on {c.to_fuel}. Or, if the steam demand "
                       "does not allow it, follow the burner maker's changeover method and "
                       "watch the flame and the viscosity throughout.")
    if v.lead_h is None:
        return head + ("Cooling earlier does not cure it: change this circuit over more slowly "
                       "(in steps, as far as the valve allows) or by the engine maker's own "
                       "method, with the engine running, and watch the viscosity throughout.")
    return head + (f"Start lowering the heater set point {v.lead_h * 60:.0f} min before moving "
                   f"the valve, no faster than {w.max_rate_c_per_min:g} °C/min, but not below "
                   f"{celsius(old.thickens_to_max_c)}, where {c.from_fuel} would be thicker "
                   f"than {w.max_cst:g} cSt.")


def _window_temperature(g: WindowFacts, f: ProcedureFacts) -> list[str]:
    """What the temperature of one window group does over the changeover."""
    w = g.window
    reg = [x for x in f.fuels if not x.compliant]
    comp = [x for x in f.fuels if x.compliant]
    if not (reg and comp):
        return []
    hi = max((g.fuel(x.name) for x in reg), key=lambda x: x.set_point_c)
    lo = min((g.fuel(x.name) for x in comp), key=lambda x: x.set_point_c)
    swing = (f"From {hi.name} at about {celsius(hi.set_point_c)} ({w.target_cst:g} cSt) to "
             f"{lo.name} at about {celsius(lo.set_point_c)} the temperature falls about "
             f"{g.swing_c:.0f} °C")
    cool = (f"Keep {lo.name} below {celsius(lo.thins_to_min_c)}, where it would thin below "
            f"{w.min_cst:g} cSt")
    if g.burner:
        return [f"{g.label[0].upper()}{g.label[1:]}: its heater follows the viscosity "
                f"controller, at most {w.max_rate_c_per_min:g} °C/min here (no injection pump "
                f"to protect, so no thermal-shock limit). {swing}. As {lo.name} arrives at the "
                f"burner, switch the burner heater off or bypass it: {lo.name} is not heated. "
                f"{cool}. Or stop the burner for the switch and relight on {lo.name} with the "
                "heater off, if the steam demand allows."]
    not_heated = ("is not heated: once the inlet is on it alone, shut the steam to the fuel "
                  "heaters and the trace heating of the circuit" if not lo.heated else
                  f"is heated to about {celsius(lo.set_point_c)}")
    return [f"{g.label[0].upper()}{g.label[1:]}: the inlet temperature must never change "
            f"faster than {w.max_rate_c_per_min:g} °C/min, going down or up. {swing}: at that "
            f"rate at least {dur(g.swing_min / 60.0)}. Let it follow the fuel actually "
            "arriving, and do not hold it back; run it ahead of the fuel only as far as the "
            "old fuel's maximum viscosity allows, where the flash-point caution below says so. "
            f"{lo.name} {not_heated}. {cool}; put the fuel cooler in service if it runs "
            "warmer."]


def temperature(f: ProcedureFacts) -> list[str]:
    """Section 6: each consumer's rate limit, viscosity window and heating, and the model's
    path per circuit."""
    items = ["Each consumer has its own inlet limits (section 4): "
             + "; ".join(f"{g.label} {g.window.min_cst:g}-{g.window.max_cst:g} cSt, at most "
                         f"{g.window.max_rate_c_per_min:g} °C/min" for g in f.windows) + "."]
    for g in f.windows:
        items += _window_temperature(g, f)
    engines = [g for g in f.windows if not g.burner]
    if engines:
        rate = min(g.window.max_rate_c_per_min for g in engines)
        items.append("A viscosity controller chasing a fast-changing blend can move the "
                     f"temperature faster than {rate:g} °C/min. Unless it has its own rate "
                     "limit, run it in temperature mode, or by hand, during the changeover.")
    items += [_circuit_visc(c, f) for c in changing(f)]
    items += ["Flash point: " + c.reference_row.flash_caution for c in changing(f)
              if c.reference_row.flash_caution]
    for g in f.windows:
        w = g.window
        if g.burner:
            items.append(f"If the viscosity at the {g.label} leaves {w.min_cst:g}-"
                         f"{w.max_cst:g} cSt or the flame becomes unsteady, stop the burner, "
                         "tell the chief engineer, and relight only when the fuel at the "
                         "burner is right for it.")
        else:
            items.append(f"If the inlet viscosity of the {g.label} falls towards "
                         f"{w.min_cst:g} cSt, bring in the cooler or slow the temperature "
                         f"change; if it rises towards {w.max_cst:g} cSt, heat, within the "
                         "rate limit. If neither holds it, tell the chief engineer and the "
                         "bridge before the engine is affected.")
    return items


def valves(f: ProcedureFacts) -> list[str]:
    """Section 7: moving each circuit's changeover valve, in order."""
    order = changing(f)
    items = ["Confirm the checks of section 5 are done and the master agrees. Note the time "
             "(UTC and ship's time) and position of the start; in the journal: changeover log "
             "start."]
    if len(order) > 1:
        items.append(f"Change the circuits over in this order: {names([c.name for c in order])}.")
    for c in order:
        slow = any(not r.viscosity.inside for r in c.rows)
        items.append(
            f"Circuit {c.name}: open the suction from {c.to_tank} before closing that from "
            f"{c.from_tank}, so the pumps are never starved, and move the changeover valve "
            + ("in steps (section 6)" if slow else "in one movement") + ". Note the time: the "
            "durations in section 3 count from it. Check that supply and booster pressures and "
            "the flow settle.")
    back = sorted({n for c in order for n in c.returns_to})
    if back:
        items.append(f"Leave the returns to {names(back)} as they are.")
    to_tank = [c for c in order if c.returns_to_tank]
    for c in to_tank:
        items.append(f"Circuit {c.name}: its return goes to the tank in use, so after the switch "
                     f"it carries old fuel into {c.to_tank} for a while (the model counts it). "
                     "Sample that tank once the changeover is complete.")
    if not to_tank:
        items.append("Do not send returns to a tank during the changeover: they would carry "
                     "old fuel into it.")
    items.append("No transfers into or out of the service tanks in use during the changeover.")
    return items


def monitoring(f: ProcedureFacts) -> list[str]:
    """Section 8: what to watch and note until the changeover is complete."""
    tanks = sorted({t for c in changing(f) for t in (c.from_tank, c.to_tank)})
    expect = [f"circuit {c.name} at limit after {hm(c.reference_row.time_to_limit_h)} and at "
              f"target after {hm(c.reference_row.time_to_target_h)}" for c in changing(f)]
    items = [
        "Until the changeover is complete an engineer officer stays with the circuit being "
        "changed over.",
        "Every 15 minutes, and at once on any alarm, read and note: inlet temperature and "
        "viscosity, heater set point, supply and booster pressures, filter differential "
        f"pressure, main engine load and speed, and the levels of {names(tanks) or 'the tanks'}.",
    ]
    if expect:
        items.append("Expect, at the reference load, " + "; ".join(expect) + ".")
    items += [
        "Watch for: the viscosity or temperature leaving its window, or the temperature moving "
        "faster than its rate limit ("
        + "; ".join(f"{g.label} {g.window.max_rate_c_per_min:g} °C/min" for g in f.windows)
        + "); filters blocking quickly (a sign of "
        "incompatible fuels: change over the filter and tell the chief engineer); leaks at "
        "flanges and pumps as the temperature falls; fuel pumps or injectors sticking; "
        "unsteady engine speed, a generator shedding load, or a boiler flame failure.",
        "If propulsion or power is lost, follow the ship's emergency procedures at once and "
        "tell the bridge. The master decides whether to go on towards the area.",
    ]
    if any(c.has_main_engine for c in f.circuits):
        items.append("Main engine cylinder oil: follow the engine maker's advice for the "
                     "cylinder lubricating oil when running on low-sulphur fuel for long.")
    return items


def completion(f: ProcedureFacts) -> list[str]:
    """Section 9: when it is complete, and the regulation 14.6 record."""
    comp = [t.name for t in f.tanks if t.compliant]
    to = sorted({c.to_fuel for c in changing(f)})
    items = [
        "A circuit is complete when the time to target in section 3, for the load actually run, "
        "has passed since its valve was moved, the inlet runs steady on "
        f"{names(to) or 'the new fuel'} at its temperature and viscosity, and the alarms are "
        f"clear. Every circuit is complete at least {dur(f.margin_h)} before the boundary.",
        "Record at once, as regulation 14.6 requires, in the log-book or electronic record book "
        "the flag accepts: the date and time (UTC and ship's time) the changeover was completed, "
        "the ship's position (latitude and longitude), and the volume of compliant fuel in each "
        f"tank: sound {names(comp) or 'each tank of compliant fuel'} for it.",
        "Enter the same in the ship's changeover journal: changeover log complete with --pos and "
        "one --tank NAME=VOLUME@TEMP for each tank. The chief engineer and the master sign the "
        "printed record (changeover log print).",
        "The engine room returns to its normal manning when the chief engineer is satisfied "
        "that the plant runs steady on the new fuel.",
    ]
    return items


def _back_heat(g: WindowFacts, fuel: str) -> str:
    """How one window group's heater brings ``fuel`` back to its set point."""
    w, old = g.window, g.fuel(fuel)
    if g.burner:
        return (f"for the {g.label} switch the burner heater on (or out of bypass) as {fuel} "
                f"arrives, towards {celsius(old.set_point_c)} ({w.target_cst:g} cSt), keeping "
                f"the burner below {w.max_cst:g} cSt; or stop the burner for the switch and "
                f"relight once {fuel} at the burner is at its temperature")
    return (f"for the {g.label} raise the heater set point towards {celsius(old.set_point_c)} "
            f"({w.target_cst:g} cSt) no faster than {w.max_rate_c_per_min:g} °C/min, keeping "
            f"the inlet below {w.max_cst:g} cSt as {fuel} arrives")


def back(f: ProcedureFacts) -> list[str]:
    """Section 10: the changeover back to regular fuel after leaving the area."""
    order = changing(f)
    items = [
        "Do not move any valve back before the ship has left the area: check the position "
        "against the boundary first.",
        "The checks of section 5 apply again, above all the ship's position clear of confined "
        "or congested waters and the engine room manned.",
        "Record, as regulation 14.6 requires, the date and time (UTC and ship's time) and "
        "position when the changeover to regular fuel was commenced, and the volume of "
        "compliant fuel in each tank then; in the journal: changeover log back.",
    ]
    groups: dict[tuple[str, str, str], list[str]] = {}
    for c in order:
        groups.setdefault((c.to_tank, c.from_tank, c.from_fuel), []).append(c.name)
    for (now, then, fuel), who in groups.items():
        gs = [g for c in order if c.name in who for g in c.windows]
        heat = "; ".join(dict.fromkeys(_back_heat(g, fuel) for g in gs))
        items.append(
            f"Circuit{'s' if len(who) > 1 else ''} {names(who)}: put the heaters and trace "
            f"heating back in service, move the valve from {now} to {then}, and {heat}.")
    items.append("When every inlet is steady at its viscosity on the regular fuel, note the "
                 "time: changeover log back-complete.")
    return items
