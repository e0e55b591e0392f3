"""The facts of the ship's written changeover procedure (MARPOL Annex VI regulation 14.6,
[MARPOL-VI]).

Pure computation over a :class:`planner.ship.system.FuelSystem`: what the printed
procedure (:mod:`planner.documents.procedure_pdf`) and ``changeover procedure
--json`` show, gathered in plain dataclasses so it is testable without
reportlab.

- the fuels, with the inlet temperatures the ship-wide window asks of each
  (ASTM D341 line of the delivery-note viscosity, [ASTM-D341], :mod:`planner.fuels`);
- each consumer's own inlet window and heating rule
  (:meth:`planner.ship.system.FuelSystem.window_for`, defaults by kind in
  :mod:`planner.ship.inlet_limits`), consumers with the same window and the
  same kind of advice (engine or burner) grouped, with the temperatures that
  window asks of each fuel;
- the tanks, each circuit's changeover valve positions, its pipes and stirred
  volumes in flow order with the flow through each at the reference load
  (on the regular fuel) and the time that volume holds, V / q;
- for every circuit with a main engine, the changeover duration against
  engine load (:func:`planner.flushing.study.duration_table`) with the viscosity
  path at each load (:func:`planner.flushing.study.study`); for any other
  circuit (boiler, generators) its one duration at its running rate;
- the rule for the start: at least the time to the sulphur target at the
  load to be run, plus the planning margin, before the boundary;
- the carriage ban: a fuel of the ship above 0.50 % with no scrubber (or above what its
  scrubbers are approved for) is a caution of its own ([MEPC-305],
  :mod:`planner.voyage.carriage`), whether or not a tank holds it now.

Units: volumes m³ at 15 °C, flows m³/h, times h (``*_min``: minutes),
speeds kn, distances nm, temperatures °C, viscosities cSt, masses t,
sulphur % m/m.
"""

from __future__ import annotations

from dataclasses import asdict, dataclass, field, replace

from planner.common.defaults import DEFAULT_LIMIT_PCT, DEFAULT_MARGIN_H, DEFAULT_TARGET_FRACTION
from planner.flushing import schedule_at
from planner.flushing.study import TABLE_LOADS_PCT, default_tanks, duration_table, study
from planner.procedure.windows import WindowFacts, temperatures, window_groups
from planner.ship.consumers import Boiler, Generator, MainEngine, fuel_rate_t_h, iso_demand_t_h
from planner.ship.flows import circuit_flows
from planner.ship.system import TANK_IN_USE, FuelSystem, ShipIdentity
from planner.ship.thermal import InletWindow


@dataclass(frozen=True)
class FuelFacts:
    """A fuel of the ship file and the inlet temperatures the window asks of it (°C, cSt)."""

    name: str
    grade: str
    bdn_ref: str
    sulphur_pct: float
    density_kg_m3: float
    viscosity_cst: float
    viscosity_ref_c: float
    residual: bool
    compliant: bool
    set_point_c: float           # the inlet temperature for the target viscosity, within limits
    viscosity_at_set_point_cst: float
    thins_to_min_c: float        # above this temperature it is thinner than the minimum
    thickens_to_max_c: float     # below this temperature it is thicker than the maximum
    slope_assumed: bool          # one viscosity point only: the D341 slope is assumed


@dataclass(frozen=True)
class TankFacts:
    """A tank: capacity and content (m³ at 15 °C), its sulphur, the valves that select it."""

    name: str
    capacity_m3: float
    content_m3: dict[str, float]
    main_fuel: str
    sulphur_pct: float           # of the content, by mass
    compliant: bool
    circuits: tuple[str, ...]

    @property
    def volume_m3(self) -> float:
        return sum(self.content_m3.values())


@dataclass(frozen=True)
class VolumeFacts:
    """A pipe or stirred volume of a circuit, the flow through it and the time it holds."""

    name: str
    kind: str                    # "pipe" or "stirred"
    volume_m3: float
    length_m: float | None
    bore_mm: float | None
    flow_m3h: float              # at the reference load on the regular fuel
    fed_from: tuple[str, ...]

    @property
    def holds_min(self) -> float | None:
        """V / q, min: a pipe's transit time, a stirred volume's mean residence time."""
        return None if self.flow_m3h <= 0 else self.volume_m3 / self.flow_m3h * 60.0


@dataclass(frozen=True)
class ConsumerFacts:
    """A consumer of a circuit, its rating in words and its fuel rate at the reference, t/h."""

    name: str
    kind: str
    rating: str
    rate_t_h: float


@dataclass(frozen=True)
class ViscosityCheck:
    """The modelled inlet viscosity path: range (cSt), and the fix when it leaves the window.

    ``lead_h``: 0 when inside; h before the valve switch to start the temperature
    change; None when no lead up to 4 h keeps it inside (change over more slowly).
    ``outside``: spans ``(from_h, to_h, "below"|"above")`` after the switch at the
    worst inlet, with ``consumer`` the inlet named.
    """

    min_cst: float
    max_cst: float
    inside: bool
    lead_h: float | None
    consumer: str = ""
    outside: tuple[tuple[float, float, str], ...] = ()


@dataclass(frozen=True)
class DurationRow:
    """How long one changeover takes at a main-engine load (None: a circuit without one)."""

    load_pct: float | None
    speed_kn: float | None
    time_to_limit_h: float | None
    time_to_target_h: float | None
    start_before_h: float | None      # time to target + margin
    start_before_nm: float | None     # that time at this speed
    burnt_t: dict[str, float]
    viscosity: ViscosityCheck
    flash_caution: str = ""           # distillate within 10 °C of its flash point, and the fix


@dataclass(frozen=True)
class CircuitFacts:
    """A circuit: valve positions, consumers, volumes, and its changeover durations."""

    name: str
    tanks: tuple[str, ...]
    consumers: tuple[ConsumerFacts, ...]
    volumes: tuple[VolumeFacts, ...]
    from_tank: str
    to_tank: str
    from_fuel: str
    to_fuel: str
    has_main_engine: bool
    reference_load_pct: float | None
    rows: tuple[DurationRow, ...]
    returns_to: tuple[str, ...]       # volumes that take back fuel not burnt
    returns_to_tank: bool             # a return line follows the valve to the tank in use
    alongside: DurationRow | None = None  # alongside, main engine stopped (None: nothing burns)
    windows: tuple[WindowFacts, ...] = ()  # its consumers' own inlet windows, grouped

    def window_of(self, consumer: str) -> WindowFacts | None:
        """The window group of one of its consumers (None: not one of them)."""
        return next((w for w in self.windows if consumer in w.consumers), None)

    @property
    def pipe_m3(self) -> float:
        return sum(v.volume_m3 for v in self.volumes if v.kind == "pipe")

    @property
    def stirred_m3(self) -> float:
        return sum(v.volume_m3 for v in self.volumes if v.kind == "stirred")

    @property
    def total_m3(self) -> float:
        """Everything between the valve and the inlets that holds the old fuel, m³."""
        return self.pipe_m3 + self.stirred_m3

    @property
    def reference_row(self) -> DurationRow | None:
        """The row at the main engine's reference load, else the only row."""
        for r in self.rows:
            if r.load_pct == self.reference_load_pct:
                return r
        return self.rows[0] if self.rows else None


@dataclass(frozen=True)
class ProcedureFacts:
    """Everything the written procedure prints about the ship."""

    ship: ShipIdentity
    limit_pct: float
    target_pct: float
    margin_h: float
    inlet: InletWindow
    fuels: tuple[FuelFacts, ...]
    tanks: tuple[TankFacts, ...]
    circuits: tuple[CircuitFacts, ...]
    swing_c: float                 # regular fuel's set point less the compliant fuel's, °C
    voyage: str = ""
    warnings: tuple[str, ...] = field(default=())
    windows: tuple[WindowFacts, ...] = ()  # every consumer's own inlet window, grouped
    carriage: tuple[str, ...] = ()  # carriage-ban cautions (CarriedFuel.body, voyage.carriage)
    carriage_fuels: tuple[str, ...] = ()  # the fuels they name

    @property
    def swing_min(self) -> float:
        """Least time for that temperature change at the rate limit, min."""
        return self.swing_c / self.inlet.max_rate_c_per_min

    def fuel(self, name: str) -> FuelFacts:
        return next(f for f in self.fuels if f.name == name)


def _fuel_facts(system: FuelSystem, limit_pct: float) -> tuple[FuelFacts, ...]:
    out = []
    for f in system.fuels.values():
        sp, nu, thin, thick = temperatures(f, system.inlet)
        out.append(FuelFacts(
            f.name, f.grade, f.bdn_ref, f.sulphur_pct, f.density_kg_m3, f.viscosity_cst,
            f.viscosity_ref_c, f.is_residual, f.sulphur_pct <= limit_pct + 1e-12, sp, nu, thin,
            thick, f.viscosity_slope_assumed))
    return tuple(out)


def _tank_facts(system: FuelSystem, limit_pct: float) -> tuple[TankFacts, ...]:
    out = []
    for t in system.tanks.values():
        mass = {f: v * system.fuels[f].density_kg_m3 for f, v in t.content_m3.items()}
        total = sum(mass.values())
        s = sum(m * system.fuels[f].sulphur_pct for f, m in mass.items()) / total
        main = max(t.content_m3.items(), key=lambda kv: kv[1])[0]
        used = tuple(n for n, c in system.circuits.items() if t.name in c.tanks)
        out.append(TankFacts(t.name, t.capacity_m3, dict(t.content_m3), main, s,
                             s <= limit_pct + 1e-12, used))
    return tuple(out)


def _rating(c) -> str:
    if isinstance(c, MainEngine):
        return (f"{c.mcr_kw:,.0f} kW MCR; {c.ref_load_pct:g} % MCR at {c.ref_speed_kn:g} kn; "
                f"SFOC {c.sfoc_at(c.ref_load_pct):g} g/kWh there")
    if isinstance(c, Generator):
        rated = f" of {c.rated_kw:,.0f} kW rated" if c.rated_kw else ""
        return f"{c.power_kw:,.0f} kW running{rated}; SFOC {c.sfoc_g_kwh:g} g/kWh"
    if isinstance(c, Boiler):
        return f"{c.fuel_t_h:g} t/h at {c.q_net_ref_mj_kg:g} MJ/kg"
    return ""


def _volumes(system: FuelSystem, name: str, from_fuel: str) -> tuple[VolumeFacts, ...]:
    """The circuit's pipes and stirred volumes in first-seen order, with their flow (m³/h) at
    the reference load burning ``from_fuel``."""
    circuit = system.circuits[name]
    fuel = system.fuels[from_fuel]
    v = [fuel_rate_t_h(iso_demand_t_h(system.consumers[c]), fuel) * 1000.0 / fuel.density_kg_m3
         for c in circuit.consumers]
    q = circuit_flows(system, circuit).rates_m3h(v)
    out = []
    for n in circuit.volume_names:
        vol = system.volumes.get(n)
        if vol is None:
            continue
        into = [i for i, lk in enumerate(circuit.links) if lk.target == n]
        out.append(VolumeFacts(n, vol.kind, vol.volume_m3, getattr(vol, "length_m", None),
                               getattr(vol, "bore_mm", None), float(sum(q[i] for i in into)),
                               tuple(circuit.links[i].source for i in into)))
    return tuple(out)


def _returns(system: FuelSystem, name: str) -> tuple[tuple[str, ...], bool]:
    """Volumes fed by more than one link (where unburnt fuel comes back), and whether a
    return goes to the tank in use."""
    circuit = system.circuits[name]
    into: dict[str, int] = {}
    for lk in circuit.links:
        into[lk.target] = into.get(lk.target, 0) + 1
    back = tuple(n for n in circuit.volume_names if into.get(n, 0) > 1 and n in system.volumes)
    return back, any(lk.target == TANK_IN_USE for lk in circuit.links)


def _viscosity(st) -> ViscosityCheck:
    bad = {k: p.outside() for k, p in st.paths.items() if p.outside()}
    if not bad:
        return ViscosityCheck(st.min_viscosity_cst, st.max_viscosity_cst, True, 0.0)
    leads = [st.lead_h[k] for k in bad]
    lead = None if any(x is None for x in leads) else max(leads)
    worst = min(bad, key=lambda k: st.paths[k].min_viscosity_cst)
    return ViscosityCheck(st.min_viscosity_cst, st.max_viscosity_cst, False, lead, worst,
                          tuple(bad[worst]))


def _row(system, name, a, b, load, speed, limit, target, margin, table_row=None) -> DurationRow:
    st = study(system, name, a, b, schedule_at(system, load_pct=load), limit, target)
    s = st.summary
    t_limit = s.time_to_limit_h if table_row is None else table_row.time_to_limit_h
    t_target = s.time_to_target_h if table_row is None else table_row.time_to_target_h
    burnt = s.burnt_t if table_row is None else table_row.burnt_t
    before = None if t_target is None else t_target + margin
    nm = None if before is None or speed is None else before * speed
    return DurationRow(load, speed, t_limit, t_target, before, nm,
                       {k: float(v) for k, v in burnt.items()}, _viscosity(st),
                       _flash(system, name, st))


def _flash(system: FuelSystem, name: str, st) -> str:
    """The plan's flash-point caution for this changeover, with its fix (empty: none)."""
    from planner.ship.flash_margin import inlet_flash_spans
    from planner.voyage.fuel_checks import changeover_flash_text

    spans = inlet_flash_spans(st.result, name, st.paths)
    return (changeover_flash_text(system, name, st.summary.to_fuel, st, spans) if spans
            else "")


def table_loads(system: FuelSystem) -> tuple[float, ...]:
    """The loads of the duration table, % MCR: 25, 50, 75, 100 and the reference load."""
    refs = [c.ref_load_pct for c in system.consumers.values() if isinstance(c, MainEngine)]
    return tuple(sorted(set(TABLE_LOADS_PCT) | set(refs[:1])))


def circuit_facts(system: FuelSystem, name: str, limit_pct: float, target_pct: float,
                  margin_h: float) -> CircuitFacts:
    """One circuit's facts; its changeover runs from its highest- to lowest-sulphur tank.

    Raises :class:`planner.flushing.FlushError` if the system cannot run the changeover.
    """
    circuit = system.circuits[name]
    a, b = default_tanks(system, name)
    main = lambda t: max(system.tanks[t].content_m3.items(), key=lambda kv: kv[1])[0]  # noqa: E731
    mains = [c for c in circuit.consumers if isinstance(system.consumers[c], MainEngine)]
    engine = system.consumers[mains[0]] if mains else None
    consumers = tuple(ConsumerFacts(c, system.consumers[c].kind, _rating(system.consumers[c]),
                                    iso_demand_t_h(system.consumers[c]))
                      for c in circuit.consumers)
    rows: list[DurationRow] = []
    if a != b and engine is not None:
        loads = table_loads(system)
        table = duration_table(system, name, a, b, limit_pct, target_pct, loads)
        rows = [_row(system, name, a, b, r.load_pct, r.speed_kn, limit_pct, target_pct,
                     margin_h, r) for r in table]
    elif a != b:
        rows = [_row(system, name, a, b, None, None, limit_pct, target_pct, margin_h)]
    back, to_tank = _returns(system, name)
    port = _alongside(system, name, a, b, limit_pct, target_pct, margin_h) if a != b else None
    return CircuitFacts(name, circuit.tanks, consumers, _volumes(system, name, main(a)), a, b,
                        main(a), main(b), engine is not None,
                        engine.ref_load_pct if engine is not None else None, tuple(rows),
                        back, to_tank, port, window_groups(system, circuit.consumers, limit_pct))


def _alongside(system: FuelSystem, name: str, a: str, b: str, limit: float, target: float,
               margin: float) -> DurationRow | None:
    """The changeover alongside at the ship file's port state (main engine stopped, the rest
    as at sea, :func:`planner.voyage.port.default_port_state`); None if the circuit then
    burns nothing."""
    from planner.flushing import ConsumptionSchedule
    from planner.voyage.port import default_port_state

    rates = default_port_state(system).departure_iso_t_h
    mine = {c: rates[c] for c in system.circuits[name].consumers}
    if sum(mine.values()) <= 0.0:
        return None
    st = study(system, name, a, b, ConsumptionSchedule.constant(mine), limit, target)
    s = st.summary
    before = None if s.time_to_target_h is None else s.time_to_target_h + margin
    return DurationRow(0.0, 0.0, s.time_to_limit_h, s.time_to_target_h, before, None,
                       {k: float(v) for k, v in s.burnt_t.items()}, _viscosity(st))


def _warnings(facts: ProcedureFacts) -> tuple[str, ...]:
    out = []
    for c in facts.circuits:
        if c.from_tank == c.to_tank:
            out.append(f"Circuit {c.name}: its valve has one fuel only; no changeover to study.")
            continue
        if not next(t for t in facts.tanks if t.name == c.to_tank).compliant:
            out.append(f"Circuit {c.name}: no tank at its valve holds fuel at or below "
                       f"{facts.limit_pct:.2f} % m/m sulphur.")
        if any(r.time_to_target_h is None for r in c.rows):
            out.append(f"Circuit {c.name}: at some load the model does not reach the target "
                       f"{facts.target_pct:.3f} % m/m within 96 h.")
        for r in c.rows:
            if not r.viscosity.inside:
                at = "" if r.load_pct is None else f" at {r.load_pct:g} % MCR"
                g = c.window_of(r.viscosity.consumer)
                w = facts.inlet if g is None else g.window
                who = "" if g is None else f" of the {g.label}"
                out.append(f"Circuit {c.name}{at}: modelled inlet viscosity "
                           f"{r.viscosity.min_cst:.1f}-{r.viscosity.max_cst:.1f} cSt leaves the "
                           f"window{who}, {w.min_cst:g}-{w.max_cst:g} cSt.")
    for f in facts.fuels:
        if f.slope_assumed:
            out.append(f"Fuel {f.name}: one viscosity point only; its temperatures rest on an "
                       "assumed viscosity-temperature slope (give a second point).")
    return tuple(out)


def gather(system: FuelSystem, *, limit_pct: float = DEFAULT_LIMIT_PCT,
           target_pct: float | None = None, margin_h: float = DEFAULT_MARGIN_H,
           voyage: str = "") -> ProcedureFacts:
    """The facts of ``system``'s changeover procedure for the sulphur limit ``limit_pct``.

    ``target_pct`` (default 90 % of the limit) is the sulphur aimed at; ``margin_h`` h is
    the time to be compliant before the boundary.
    """
    target = DEFAULT_TARGET_FRACTION * limit_pct if target_pct is None else target_pct
    fuels = _fuel_facts(system, limit_pct)
    tanks = _tank_facts(system, limit_pct)
    circuits = tuple(circuit_facts(system, n, limit_pct, target, margin_h)
                     for n in system.circuits)
    regular = [f.set_point_c for f in fuels if not f.compliant]
    compliant = [f.set_point_c for f in fuels if f.compliant]
    swing = max(regular) - min(compliant) if regular and compliant else 0.0
    everyone = [n for c in system.circuits.values() for n in c.consumers]
    facts = ProcedureFacts(system.ship, limit_pct, target, margin_h, system.inlet, fuels, tanks,
                           circuits, max(swing, 0.0), voyage,
                           windows=window_groups(system, list(dict.fromkeys(everyone)),
                                                 limit_pct))
    from planner.voyage.carriage import carried_over_limit

    # the procedure is a standing document: every fuel listed counts, held or not
    over = carried_over_limit(system, held_only=False)
    return replace(facts, warnings=_warnings(facts), carriage=tuple(c.body() for c in over),
                   carriage_fuels=tuple(c.fuel for c in over))


def facts_json(facts: ProcedureFacts) -> dict:
    """``changeover procedure --json``: the facts as plain JSON values."""
    doc = asdict(facts)
    doc["swing_min"] = facts.swing_min
    for g, gj in zip(facts.windows, doc["windows"], strict=True):
        gj.update(burner=g.burner, label=g.label, swing_min=g.swing_min)
    for c, cj in zip(facts.circuits, doc["circuits"], strict=True):
        cj.update(pipe_m3=c.pipe_m3, stirred_m3=c.stirred_m3, total_m3=c.total_m3)
        for g, gj in zip(c.windows, cj["windows"], strict=True):
            gj.update(burner=g.burner, label=g.label, swing_min=g.swing_min)
        for v, vj in zip(c.volumes, cj["volumes"], strict=True):
            vj["holds_min"] = v.holds_min
    for t, tj in zip(facts.tanks, doc["tanks"], strict=True):
        tj["volume_m3"] = t.volume_m3
    return doc
