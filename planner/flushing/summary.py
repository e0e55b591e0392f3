"""Per-circuit summary of a flush: times to limit and target, fuel burnt, compliant fuel used.

A changeover *to* compliant fuel is done when every inlet of the circuit is
at or below the limit (and the target under it, the planning margin) and
stays so to the horizon. One *back* to regular fuel (the new fuel above the
limit) is done when every inlet is at or above the target given (e.g. 95 % of
the way to the new fuel's sulphur); either way the times are h after the
switch of the valve.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np

from planner.flushing.network import Switch, make_switch
from planner.flushing.result import FlushResult
from planner.flushing.schedule import ConsumptionSchedule
from planner.flushing.simulate import simulate
from planner.ship.system import FuelSystem


@dataclass(frozen=True)
class CircuitSummary:
    """The headline figures of one circuit's changeover.

    Attributes
    ----------
    circuit, from_tank, to_tank, from_fuel, to_fuel : str
        ``from_fuel``/``to_fuel``: the main fuel of each tank.
    direction : str
        ``"to_compliant"`` when the new fuel's sulphur is lower, else ``"to_regular"``.
    limit_pct, target_pct : float
        Sulphur limit and the target under it (to_compliant), % m/m.
    time_to_limit_h, time_to_target_h : float or None
        When every inlet is, and stays, at or below (to_compliant) or at or
        above (to_regular) that level; None if not by the horizon.
    first_time_to_limit_h : float or None
        When every inlet has first reached the limit (it may leave it again).
    burnt_t : dict
        Mass of each fuel burnt by the circuit's consumers from the switch to
        ``time_to_target_h`` (or the horizon), t.
    compliant_burnt_t : float
        Of that, the mass of fuels at or below the limit, t.
    horizon_h : float
    consumer_times_h : dict
        Each consumer's time to the limit (None: not by the horizon).
    """

    circuit: str
    from_tank: str
    to_tank: str
    from_fuel: str
    to_fuel: str
    direction: str
    limit_pct: float
    target_pct: float
    time_to_limit_h: float | None
    time_to_target_h: float | None
    first_time_to_limit_h: float | None
    burnt_t: dict[str, float]
    compliant_burnt_t: float
    horizon_h: float
    consumer_times_h: dict[str, float | None]


def _main_fuel(system: FuelSystem, tank: str) -> str:
    return max(system.tanks[tank].content_m3.items(), key=lambda kv: kv[1])[0]


def summarize(
    system: FuelSystem, result: FlushResult, circuit: str, limit_pct: float, target_pct: float
) -> CircuitSummary:
    """The headline figures of one circuit's changeover in a simulation.

    Parameters
    ----------
    system : FuelSystem
        The system simulated (for the tanks' main fuels).
    result : FlushResult
        The simulation, which switched ``circuit``.
    circuit : str
        The circuit summarised.
    limit_pct : float [% m/m]
        Sulphur limit.
    target_pct : float [% m/m]
        Planning target: under the limit going to compliant fuel, near the new
        fuel's sulphur going back.

    Returns
    -------
    CircuitSummary
        Times [h after the switch] found on the recorded trace (exact for
        its linear interpolant, :mod:`planner.flushing.result`); fuel burnt [t]
        by linear interpolation between step ends.
    """
    sw = next(s for s in result.switches if s.circuit == circuit)
    from_fuel, to_fuel = _main_fuel(system, sw.from_tank), _main_fuel(system, sw.to_tank)
    down = system.fuels[to_fuel].sulphur_pct <= system.fuels[from_fuel].sulphur_pct
    inlets = result.circuit_inlets(circuit)

    def when(level: float, settled: bool = True) -> tuple[float | None, dict[str, float | None]]:
        each = {
            c.consumer: (c.time_at_or_below_h if down else c.time_at_or_above_h)(level, settled)
            for c in inlets
        }
        vals = list(each.values())
        return (None if any(v is None for v in vals) else max(vals)), each  # type: ignore

    t_limit, each = when(limit_pct)
    t_target, _ = when(target_pct)
    t_first, _ = when(limit_pct, settled=False)
    until = t_target if t_target is not None else float(result.time_h[-1])
    burnt = np.sum([c.burnt_until_t(until) for c in inlets], axis=0)
    compliant = sum(
        b for b, f in zip(burnt, result.fuels, strict=True) if f.sulphur_pct <= limit_pct
    )
    return CircuitSummary(
        circuit=circuit,
        from_tank=sw.from_tank,
        to_tank=sw.to_tank,
        from_fuel=from_fuel,
        to_fuel=to_fuel,
        direction="to_compliant" if down else "to_regular",
        limit_pct=float(limit_pct),
        target_pct=float(target_pct),
        time_to_limit_h=t_limit,
        time_to_target_h=t_target,
        first_time_to_limit_h=t_first,
        burnt_t={f.name: float(b) for f, b in zip(result.fuels, burnt, strict=True)},
        compliant_burnt_t=float(compliant),
        horizon_h=float(result.time_h[-1]),
        consumer_times_h=each,
    )


def flush(
    system: FuelSystem,
    circuit: str,
    from_: str,
    to: str,
    schedule: ConsumptionSchedule,
    *,
    limit_pct: float,
    target_pct: float,
    horizon_h: float = 6.0,
    max_horizon_h: float = 96.0,
    others: Sequence[Switch] = (),
    **options: float,
) -> tuple[FlushResult, CircuitSummary]:
    """Simulate ``circuit``'s changeover until its target is reached, and summarise it.

    Parameters
    ----------
    system : FuelSystem
    circuit : str
        The circuit whose valve is switched.
    from_, to : str
        Tank or fuel names (:func:`~planner.flushing.network.make_switch`).
    schedule : ConsumptionSchedule
        The consumers' rates [t/h] from the switch.
    limit_pct : float [% m/m]
        Sulphur limit.
    target_pct : float [% m/m]
        Planning target (:func:`summarize`).
    horizon_h : float, default 6 [h]
        First horizon; it doubles until the target is reached, or
    max_horizon_h : float, default 96 [h]
        this longest horizon is simulated.
    others : sequence of Switch
        More switches simulated alongside (other circuits sharing tanks).
    **options : float
        ``output_step_s`` [s], ``tolerance`` [-], ``max_step_h`` [h] of
        :func:`~planner.flushing.simulate.simulate`.

    Returns
    -------
    result : FlushResult
        The last simulation.
    summary : CircuitSummary
        Its summary for ``circuit``; ``time_to_target_h`` None when the target
        is not reached by ``max_horizon_h``. The models are the simulator's
        ([LEVENSPIEL-1999] well-stirred washout and plug flow): exact for plug
        flow, and within a second of the closed forms at the default tolerance
        in the tests.
    """
    sw = make_switch(system, circuit, from_, to)
    while True:
        result = simulate(system, (sw, *others), schedule, horizon_h, **options)
        summary = summarize(system, result, circuit, limit_pct, target_pct)
        if summary.time_to_target_h is not None or horizon_h >= max_horizon_h:
            return result, summary
        horizon_h = min(2.0 * horizon_h, max_horizon_h)
