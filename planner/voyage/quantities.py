"""What the plan needs: fuel drawn per valve period, fuel on board, SO₂ per stretch.

- Fuel: each circuit draws the fuel its changeover valve is set to, from the
  moment the valve is switched (a changeover's start) to the next switch; the
  mass is the timeline's consumption scaled to the fuel's net specific energy
  (:meth:`planner.voyage.timeline.Timeline.burnt_t`), and m³ at 15 °C is
  mass / density at 15 °C. Compared with what the tanks hold (their standard
  volume × density at 15 °C).
  After arrival inside an area, the hours alongside of the voyage file's
  ``[port] arrival_hours`` are counted on the fuel the valve is then set to,
  at the consumption alongside (:mod:`planner.voyage.port`).
- SO₂: 64.066/32.06 kg per kg of sulphur burnt ([IUPAC-2021] [D]) on every
  stretch, from the blend that actually reaches each inlet during a flush
  (:mod:`planner.voyage.so2`), against what the regular fuel would have formed
  for the same energy.

Pure functions of the plan's parts; :func:`plan_quantities` gathers them for
:func:`planner.voyage.plan.plan_voyage`. Moments are epoch seconds
(``*_epoch_s``: seconds since 1970-01-01 UTC).
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence
from dataclasses import dataclass

from planner.fuels import Fuel, so2_formed_kg, so2_from_fuel_kg
from planner.ship.system import FuelSystem
from planner.voyage.changeovers import CircuitChange
from planner.voyage.flush_cache import FlushCache
from planner.voyage.fuel_choice import FuelChoice, regular_fuel
from planner.voyage.runs import Change, Run
from planner.voyage.so2 import stretch_burnt_t, sulphur_burnt_t
from planner.voyage.timeline import Timeline
from planner.voyage.voyage_file import Voyage


@dataclass(frozen=True)
class FuelNeed:
    """Fuel drawn while one circuit's valve is set to one fuel (valve switch to valve switch).

    Parameters
    ----------
    fuel : str
        The fuel's name.
    from_epoch_s, to_epoch_s : float [s]
        The valve period, seconds since 1970-01-01 UTC.
    mass_t : float [t]
        The mass burnt in it.
    volume_m3 : float [m3]
        That mass as standard volume at 15 °C.
    circuit : str
        The circuit whose valve it is.
    alongside_h : float [h]
        Of the period, the hours alongside after arrival (``[port] arrival_hours``).
    """

    fuel: str
    from_epoch_s: float
    to_epoch_s: float
    mass_t: float
    volume_m3: float
    circuit: str = ""
    alongside_h: float = 0.0


@dataclass(frozen=True)
class StretchSO2:
    """SO₂ formed on one stretch, and on the regular fuel for the same energy.

    Parameters
    ----------
    from_m, to_m : float [m]
        The stretch, along the route from departure.
    areas : tuple of str
        The control areas it lies in (empty: global cap only).
    fuel : str
        The fuel burnt on it (its run's).
    fuel_t : float [t]
        The mass burnt (every fuel reaching the inlets: during a flush, the blend).
    so2_kg : float [kg]
        SO₂ formed as planned, from the blend at the inlets.
    so2_regular_kg : float [kg]
        SO₂ the regular fuel would have formed for the same energy.
    sulphur_kg : float [kg]
        Sulphur burnt, from the blend at the inlets.
    burnt_t : dict of str to float [t]
        The mass of each fuel burnt, by name.
    """

    from_m: float
    to_m: float
    areas: tuple[str, ...]
    fuel: str
    fuel_t: float
    so2_kg: float
    so2_regular_kg: float
    sulphur_kg: float = 0.0
    burnt_t: dict[str, float] | None = None


@dataclass(frozen=True)
class Quantities:
    """The plan's fuel and SO₂ figures.

    Parameters
    ----------
    needs : tuple of FuelNeed
        Fuel drawn per valve period, circuit by circuit, each in time order.
    totals_t : dict of str to float [t]
        Fuel needed for the voyage by fuel name, in order of first need.
    on_board_t : dict of str to float [t]
        Fuel in the tanks at departure by fuel name.
    so2 : tuple of StretchSO2
        SO₂ on every stretch of the route check, in route order.
    so2_alongside : StretchSO2 or None
        SO₂ alongside after an arrival inside an area (``[port] arrival_hours``; a row at
        the route's end, ``from_m == to_m``), or None.
    """

    needs: tuple[FuelNeed, ...]
    totals_t: dict[str, float]
    on_board_t: dict[str, float]
    so2: tuple[StretchSO2, ...]
    so2_alongside: StretchSO2 | None = None


ValvePeriod = tuple[str, float, float, Fuel, CircuitChange | None]
"""``(circuit, from_epoch_s, to_epoch_s, fuel, change)``: a circuit's valve set to one fuel,
by the switch ``change`` (None: since departure)."""


def valve_periods(voyage: Voyage, timeline: Timeline, runs: Sequence[Run],
                  changes: Sequence[Change],
                  first_fuels: Mapping[str, Fuel] | None = None) -> list[ValvePeriod]:
    """Each circuit's periods with its valve set to one fuel, departure to arrival.

    A change before departure puts the circuit on the compliant fuel from its
    (earlier) start on; a change that leaves a circuit out does not move its valve.
    When the voyage arrives inside an area, the last period runs on for the hours
    alongside (``[port] arrival_hours``).

    Parameters
    ----------
    voyage : Voyage
        The voyage (its fuels by name).
    timeline : Timeline
        The voyage's timeline (departure, arrival and the ship).
    runs : sequence of Run
        The plan's runs (the first gives the fuel at departure).
    changes : sequence of Change
        The plan's changes, in time order.
    first_fuels : mapping of str to Fuel, optional
        Each circuit's fuel at departure when they differ (circuits a scrubber serves burn
        their own runs' fuel, :attr:`planner.voyage.plan.Plan.scrubbed`); default: the
        first run's, every circuit.

    Returns
    -------
    list of ValvePeriod
        Circuit by circuit in the ship file's order, each in time order.
    """
    out: list[ValvePeriod] = []
    t_end = timeline.end_epoch_s + alongside_h(timeline, runs) * 3600.0
    for circuit in timeline.system.circuits:
        t = timeline.start_epoch_s
        fuel = runs[0].fuel if first_fuels is None else first_fuels[circuit]
        last: CircuitChange | None = None
        for ch in changes:
            part = next((c for c in ch.circuits if c.circuit == circuit), None)
            if part is None:
                continue
            if ch.before_departure:  # on the compliant fuel from its (earlier) start on
                t = min(t, part.start_epoch_s)
            else:
                out.append((circuit, t, part.start_epoch_s, fuel, last))
                t = part.start_epoch_s
            fuel = voyage.fuel(part.to_fuel)
            last = part
        out.append((circuit, t, t_end, fuel, last))
    return out


def alongside_h(timeline: Timeline, runs: Sequence[Run]) -> float:
    """Hours alongside after arrival that the plan counts, h: the voyage's ``[port]
    arrival_hours`` when it arrives inside an area, else 0.

    Parameters
    ----------
    timeline : Timeline
        The voyage's timeline (its port state).
    runs : sequence of Run
        The plan's runs (the last says whether the arrival is inside an area).
    """
    port = timeline.port
    if port is None or not runs[-1].areas:
        return 0.0
    return port.arrival_hours


def fuel_needs(voyage: Voyage, timeline: Timeline, runs: Sequence[Run],
               changes: Sequence[Change],
               first_fuels: Mapping[str, Fuel] | None = None) -> list[FuelNeed]:
    """Fuel drawn per valve period, in the order of :func:`valve_periods`.

    Parameters
    ----------
    voyage : Voyage
        The voyage (its fuels by name).
    timeline : Timeline
        The voyage's timeline (consumption against time, and the ship's circuits).
    runs : sequence of Run
        The plan's runs.
    changes : sequence of Change
        The plan's changes, in time order.
    first_fuels : mapping of str to Fuel, optional
        Each circuit's fuel at departure (:func:`valve_periods`).
    """
    needs: list[FuelNeed] = []
    end = timeline.end_epoch_s
    for circuit, a, b, fuel, _ in valve_periods(voyage, timeline, runs, changes, first_fuels):
        consumers = timeline.system.circuits[circuit].consumers
        m = timeline.burnt_t(a, b, fuel, consumers)
        port_h = max(0.0, b - max(a, end)) / 3600.0
        needs.append(FuelNeed(fuel.name, a, b, m, m * 1000.0 / fuel.density_kg_m3, circuit,
                              port_h))
    return needs


def on_board_t(system: FuelSystem) -> dict[str, float]:
    """Mass of each fuel in the tanks, t (standard volume × density at 15 °C).

    Parameters
    ----------
    system : FuelSystem
        The ship as she sails the voyage (tank contents in m³ at 15 °C).
    """
    out: dict[str, float] = {}
    for tank in system.tanks.values():
        for name, v in tank.content_m3.items():
            fuel = system.fuels[name]
            out[name] = out.get(name, 0.0) + v * fuel.density_kg_m3 / 1000.0
    return out


def totals_t(needs: Sequence[FuelNeed]) -> dict[str, float]:
    """Mass needed of each fuel, t, in order of first need.

    Parameters
    ----------
    needs : sequence of FuelNeed
        The valve periods' needs.
    """
    out: dict[str, float] = {}
    for n in needs:
        out[n.fuel] = out.get(n.fuel, 0.0) + n.mass_t
    return out


def stretch_so2(timeline: Timeline, choices: Sequence[FuelChoice], runs: Sequence[Run],
                periods: Sequence[ValvePeriod], flushes: FlushCache) -> list[StretchSO2]:
    """SO₂ on each stretch of the route check, from the inlet blends, and on the regular fuel.

    Parameters
    ----------
    timeline : Timeline
        The voyage's timeline.
    choices : sequence of FuelChoice
        The fuel choice of every stretch (the highest-sulphur one is the regular fuel).
    runs : sequence of Run
        The plan's runs: a stretch is named by its run's fuel.
    periods : sequence of ValvePeriod
        Every circuit's valve periods (:func:`valve_periods`).
    flushes : FlushCache
        The plan's flushes (their inlet records; a longer one is simulated through it).
    """
    regular = regular_fuel(choices)
    sched = timeline.schedule
    by_circuit = _by_circuit(periods)
    out = []
    for c in choices:
        st = c.stretch
        fuel = next((r.fuel for r in runs if r.from_m <= st.from_m + 1e-6 <= r.to_m), c.fuel)
        t0, t1 = (float(x) for x in sched.epoch_at([st.from_m, st.to_m]))
        out.append(_so2_row(timeline, flushes, by_circuit, regular, t0, t1, st.from_m, st.to_m,
                            st.areas, fuel.name))
    return out


def _by_circuit(periods: Sequence[ValvePeriod]) -> list:
    return [(p[0], (p[1], p[2], p[3], p[4])) for p in periods]


def _so2_row(timeline: Timeline, flushes: FlushCache, by_circuit: list, regular: Fuel,
             t0: float, t1: float, from_m: float, to_m: float, areas: tuple[str, ...],
             fuel: str) -> StretchSO2:
    """The SO₂ row of the moments ``t0`` to ``t1`` (epoch seconds)."""
    fuels = dict(timeline.system.fuels)
    burnt = stretch_burnt_t(timeline, flushes, by_circuit, t0, t1)
    mass = sum(burnt.values())
    energy = sum(m * fuels[n].q_net for n, m in burnt.items())
    sulphur_kg = sulphur_burnt_t(burnt, fuels) * 1000.0
    mass_reg = energy / regular.q_net
    return StretchSO2(from_m, to_m, areas, fuel, mass, float(so2_formed_kg(sulphur_kg)),
                      float(so2_from_fuel_kg(mass_reg * 1000.0, regular.sulphur_pct)),
                      sulphur_kg, burnt)


def alongside_so2(timeline: Timeline, choices: Sequence[FuelChoice], runs: Sequence[Run],
                  periods: Sequence[ValvePeriod], flushes: FlushCache) -> StretchSO2 | None:
    """SO₂ alongside after an arrival inside an area, from the inlet blends (None: the
    arrival is outside every area, or no hours alongside are given).

    Parameters
    ----------
    timeline : Timeline
        The voyage's timeline (its port state).
    choices : sequence of FuelChoice
        The fuel choice of every stretch (the last stretch's areas, the regular fuel).
    runs : sequence of Run
        The plan's runs.
    periods : sequence of ValvePeriod
        Every circuit's valve periods (:func:`valve_periods`), the last ones run on alongside.
    flushes : FlushCache
        The plan's flushes.
    """
    hours = alongside_h(timeline, runs)
    if hours <= 0.0:
        return None
    end = timeline.end_epoch_s
    length = choices[-1].stretch.to_m
    return _so2_row(timeline, flushes, _by_circuit(periods), regular_fuel(choices), end,
                    end + hours * 3600.0, length, length, choices[-1].stretch.areas,
                    runs[-1].fuel.name)


def so2_by_area(rows: Sequence[StretchSO2]) -> dict[str, tuple[float, float]]:
    """SO₂ formed inside each area, kg: ``(as planned, on regular fuel)``.

    Parameters
    ----------
    rows : sequence of StretchSO2
        The stretches' SO₂.
    """
    out: dict[str, tuple[float, float]] = {}
    for r in rows:
        for a in r.areas:
            p, q = out.get(a, (0.0, 0.0))
            out[a] = (p + r.so2_kg, q + r.so2_regular_kg)
    return out


def sulphur_by_area(rows: Sequence[StretchSO2]) -> dict[str, float]:
    """Sulphur burnt inside each area, kg, from the inlet blends.

    Parameters
    ----------
    rows : sequence of StretchSO2
        The stretches' SO₂.
    """
    out: dict[str, float] = {}
    for r in rows:
        for a in r.areas:
            out[a] = out.get(a, 0.0) + r.sulphur_kg
    return out


def plan_quantities(voyage: Voyage, timeline: Timeline, choices: Sequence[FuelChoice],
                    runs: Sequence[Run], changes: Sequence[Change],
                    flushes: FlushCache | None = None,
                    first_fuels: Mapping[str, Fuel] | None = None) -> Quantities:
    """Every fuel and SO₂ figure of the plan.

    Parameters
    ----------
    voyage : Voyage
        The voyage.
    timeline : Timeline
        Its timeline (with the ship as she sails it).
    choices : sequence of FuelChoice
        The fuel choice of every stretch.
    runs : sequence of Run
        The plan's runs.
    changes : sequence of Change
        The plan's changes, in time order.
    flushes : FlushCache, optional
        The plan's flushes (default: a new cache).
    first_fuels : mapping of str to Fuel, optional
        Each circuit's fuel at departure (:func:`valve_periods`; default the first run's).
    """
    flushes = flushes if flushes is not None else FlushCache()
    needs = fuel_needs(voyage, timeline, runs, changes, first_fuels)
    periods = valve_periods(voyage, timeline, runs, changes, first_fuels)
    return Quantities(tuple(needs), totals_t(needs), on_board_t(timeline.system),
                      tuple(stretch_so2(timeline, choices, runs, periods, flushes)),
                      alongside_so2(timeline, choices, runs, periods, flushes))
