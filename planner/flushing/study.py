"""One circuit's changeover studied whole: sulphur, viscosity path, and the load table.

Joins the flushing simulation (:mod:`planner.flushing`) with the inlet
temperature and viscosity path (:mod:`planner.ship.thermal`). Pure computation;
the ``flush`` command and the voyage plan print it.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from planner.flushing import CircuitSummary, FlushResult, flush, schedule_at
from planner.flushing.schedule import ConsumptionSchedule
from planner.ship.system import FuelSystem
from planner.ship.thermal import InletPath, inlet_path, lead_needed_h

TABLE_LOADS_PCT = (25.0, 50.0, 75.0, 100.0)
CURVE_POINTS = 400


@dataclass(frozen=True, eq=False)
class FlushStudy:
    """A circuit's changeover: the simulation, its summary, each inlet's viscosity path."""

    result: FlushResult
    summary: CircuitSummary
    paths: dict[str, InletPath]
    lead_h: dict[str, float | None]

    @property
    def min_viscosity_cst(self) -> float:
        return min(p.min_viscosity_cst for p in self.paths.values())

    @property
    def max_viscosity_cst(self) -> float:
        return max(p.max_viscosity_cst for p in self.paths.values())

    def worst_curve(self, n: int = CURVE_POINTS) -> list[list[float]]:
        """``[[t_h, sulphur_pct], ...]`` at the circuit's worst inlet (highest sulphur when
        going to compliant fuel, lowest going back), at most about ``n`` points."""
        inlets = self.result.circuit_inlets(self.summary.circuit)
        s = np.array([c.sulphur_pct for c in inlets])
        worst = s.max(axis=0) if self.summary.direction == "to_compliant" else s.min(axis=0)
        t = self.result.time_h
        step = max(1, len(t) // n)
        keep = np.unique(np.concatenate([np.arange(0, len(t), step), [len(t) - 1]]))
        return [[float(t[k]), float(worst[k])] for k in keep]


def default_tanks(system: FuelSystem, circuit: str) -> tuple[str, str]:
    """The changeover a circuit is studied for when none is named.

    Parameters
    ----------
    system : FuelSystem
    circuit : str
        A circuit of ``system``.

    Returns
    -------
    from_tank, to_tank : str
        The valve's tank whose main fuel (largest volume) has the highest
        sulphur, and the one whose main fuel has the lowest.
    """

    def sulphur(tank: str) -> float:
        content = system.tanks[tank].content_m3
        fuel = max(content.items(), key=lambda kv: kv[1])[0]
        return system.fuels[fuel].sulphur_pct

    tanks = sorted(system.circuits[circuit].tanks, key=sulphur, reverse=True)
    return tanks[0], tanks[-1]


def study(system: FuelSystem, circuit: str, from_: str, to: str, schedule: ConsumptionSchedule,
          limit_pct: float, target_pct: float, *, thermal: bool = True,
          dry_within_h: float | None = None) -> FlushStudy:
    """Simulate a circuit's changeover and follow each inlet's viscosity path.

    Parameters
    ----------
    system : FuelSystem
    circuit : str
        The circuit whose valve is switched.
    from_, to : str
        Tank or fuel names.
    schedule : ConsumptionSchedule
        The consumers' rates [t/h] from the switch.
    limit_pct : float [% m/m]
        Sulphur limit.
    target_pct : float [% m/m]
        Planning target.
    thermal : bool, default True
        Also each inlet's temperature and viscosity path and the lead it
        needs (:mod:`planner.ship.thermal`); False leaves them out.
    dry_within_h : float, optional [h]
        How long after the switch to look for tanks running dry
        (:func:`~planner.flushing.summary.flush`).

    Returns
    -------
    FlushStudy
        The simulation (:func:`~planner.flushing.summary.flush`), its summary,
        and per consumer the viscosity path (blended by mass, [MAPLES-2000]
        Refutas, at the inlet temperature by [ASTM-D341]; see
        :mod:`planner.ship.thermal`) and the lead needed [h] (0 when the path
        stays inside the engine's window).
    """
    result, summary = flush(system, circuit, from_, to, schedule, limit_pct=limit_pct,
                            target_pct=target_pct, dry_within_h=dry_within_h)
    paths: dict[str, InletPath] = {}
    leads: dict[str, float | None] = {}
    if thermal:
        for curve in result.circuit_inlets(circuit):
            window = system.window_for(curve.consumer)
            paths[curve.consumer] = inlet_path(result.fuels, curve.mass_fractions, result.time_h,
                                               window)
            leads[curve.consumer] = (0.0 if not paths[curve.consumer].outside() else
                                     lead_needed_h(result.fuels, curve.mass_fractions,
                                                   result.time_h, window))
    return FlushStudy(result, summary, paths, leads)


@dataclass(frozen=True)
class TableRow:
    """Duration of a changeover at one main-engine load."""

    load_pct: float
    speed_kn: float | None
    time_to_limit_h: float | None
    time_to_target_h: float | None
    burnt_t: dict[str, float]


def duration_table(system: FuelSystem, circuit: str, from_: str, to: str, limit_pct: float,
                   target_pct: float,
                   loads_pct: tuple[float, ...] = TABLE_LOADS_PCT) -> list[TableRow]:
    """The changeover duration against main-engine load (the table posted in the engine room).

    Parameters
    ----------
    system : FuelSystem
    circuit : str
        The circuit whose valve is switched.
    from_, to : str
        Tank or fuel names.
    limit_pct : float [% m/m]
        Sulphur limit.
    target_pct : float [% m/m]
        Planning target.
    loads_pct : tuple of float, default (25, 50, 75, 100) [% MCR]
        Main-engine loads, one row each.

    Returns
    -------
    list of TableRow
        Per load: the speed [kn] by the propeller law (None without a main
        engine), the times to limit and target [h] and the fuel burnt [t].
    """
    from planner.ship.consumers import MainEngine

    mains = [c for c in system.consumers.values() if isinstance(c, MainEngine)]
    rows = []
    for load in loads_pct:
        sched = schedule_at(system, load_pct=load)
        _, s = flush(system, circuit, from_, to, sched, limit_pct=limit_pct,
                     target_pct=target_pct)
        speed = mains[0].speed_at_load(load) if mains else None
        rows.append(TableRow(load, speed, s.time_to_limit_h, s.time_to_target_h, s.burnt_t))
    return rows


def flush_json(studies: list[FlushStudy], load_pct: float | None) -> dict:
    """The ``changeover flush --json`` document.

    Parameters
    ----------
    studies : list of FlushStudy
        One per circuit.
    load_pct : float or None [% MCR]
        The main-engine load studied (None: the schedule's own).

    Returns
    -------
    dict
        Plain data: the keys of docs/json-contract.md, and more (times [h],
        masses [t], viscosities [cSt], the worst-inlet curve
        ``[[t_h, sulphur_pct], ...]``).
    """
    out = []
    for st in studies:
        s = st.summary
        out.append({
            "name": s.circuit,
            "from_fuel": s.from_fuel,
            "to_fuel": s.to_fuel,
            "from_tank": s.from_tank,
            "to_tank": s.to_tank,
            "direction": s.direction,
            "limit_pct": s.limit_pct,
            "target_pct": s.target_pct,
            "time_to_limit_h": s.time_to_limit_h,
            "time_to_target_h": s.time_to_target_h,
            "consumer_time_to_limit_h": s.consumer_times_h,
            "burnt_t": s.burnt_t,
            "compliant_burnt_t": s.compliant_burnt_t,
            "min_viscosity_cst": st.min_viscosity_cst if st.paths else None,
            "max_viscosity_cst": st.max_viscosity_cst if st.paths else None,
            "outside_window": {k: [list(x) for x in p.outside()] for k, p in st.paths.items()},
            "lead_needed_h": st.lead_h,
            "curve": st.worst_curve(),
        })
    return {"main_engine_load_pct": load_pct, "circuits": out}
