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

from planner.flushing.flows import FlushError
from planner.flushing.network import Switch, make_switch
from planner.flushing.result import FlushResult
from planner.flushing.schedule import ConsumptionSchedule
from planner.flushing.simulate import simulate
from planner.flushing.until import Until
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
        each: dict[str, float | None] = {}
        by_trace: dict[int, float | None] = {}  # consumers fed by one source share its trace
        for c in inlets:
            key = id(c.trace_fractions)
            if key not in by_trace:
                by_trace[key] = (c.time_at_or_below_h if down else c.time_at_or_above_h)(
                    level, settled)
            each[c.consumer] = by_trace[key]
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


SETTLE_FRACTION = 1e-3
"""A flush is recorded until every inlet is within 0.1 % of the fuels' sulphur difference of
the new fuel (our choice: past every target, so the viscosity path reaches the new fuel; the
steps there are long and few)."""


class NeverReached(FlushError):
    """The new fuel itself is over the limit: no flush can bring the inlets to it."""


def expected_for(exc: FlushError, tanks_and_pumps: str) -> str:
    """What a refusal's "expected" part says for a flush that cannot run.

    Parameters
    ----------
    exc : FlushError
        Why the flush cannot run.
    tanks_and_pumps : str
        The caller's words for tanks that hold enough and pumps that cover the consumption.

    Returns
    -------
    str
        A fuel within the limit when the new fuel is itself over it
        (:class:`NeverReached`), else ``tanks_and_pumps``.
    """
    if isinstance(exc, NeverReached):
        return "a compliant fuel whose own sulphur is within the limit"
    return tanks_and_pumps


def _content_sulphur_pct(system: FuelSystem, tank: str) -> tuple[float, str]:
    """Sulphur of a tank's content by mass, % m/m, and what it is (a fuel's name or a blend)."""
    content = system.tanks[tank].content_m3
    mass = {f: v * system.fuels[f].density_kg_m3 for f, v in content.items() if v > 0.0}
    total = sum(mass.values())
    s = sum(m * system.fuels[f].sulphur_pct for f, m in mass.items()) / total
    what = f"fuel {next(iter(mass))!r}" if len(mass) == 1 else "the blend"
    return s, what


def stop_level_pct(system: FuelSystem, sw: Switch, limit_pct: float,
                   target_pct: float) -> float | None:
    """The level a flush runs until: the target, else the limit when only that is reachable.

    Parameters
    ----------
    system : FuelSystem
    sw : Switch
        The changeover (its tanks).
    limit_pct : float [% m/m]
        Sulphur limit.
    target_pct : float [% m/m]
        Planning target.

    Returns
    -------
    float or None [% m/m]
        None when neither is reachable going back to a fuel (the flush then runs to
        its longest horizon, as it has no end to wait for).

    Raises
    ------
    NeverReached
        Going to a lower-sulphur fuel whose tank content is over the limit: one line
        naming the fuel, its sulphur and the limit.
    """
    s_to, what = _content_sulphur_pct(system, sw.to_tank)
    s_from, _ = _content_sulphur_pct(system, sw.from_tank)
    if s_to <= s_from:
        if s_to > limit_pct:
            raise NeverReached(
                f"{what} in tank {sw.to_tank!r} has {s_to:.2f} % m/m sulphur: it can never "
                f"bring the inlets of circuit {sw.circuit!r} to the {limit_pct:.2f} % m/m limit")
        return target_pct if s_to < target_pct else limit_pct if s_to < limit_pct else None
    return target_pct if s_to > target_pct else limit_pct if s_to > limit_pct else None


def flush(
    system: FuelSystem,
    circuit: str,
    from_: str,
    to: str,
    schedule: ConsumptionSchedule,
    *,
    limit_pct: float,
    target_pct: float,
    horizon_h: float = 0.0,
    max_horizon_h: float = 96.0,
    others: Sequence[Switch] = (),
    tail_factor: float = 0.0,
    tail_h: float = 0.0,
    settle_fraction: float = SETTLE_FRACTION,
    dry_within_h: float | None = None,
    **options: float,
) -> tuple[FlushResult, CircuitSummary]:
    """Simulate ``circuit``'s changeover until its target is reached for good, and summarise it.

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
    horizon_h : float, default 0 [h]
        Simulate at least this long.
    max_horizon_h : float, default 96 [h]
        Simulate at most this long.
    others : sequence of Switch
        More switches simulated alongside (other circuits sharing tanks).
    tail_factor : float, default 0 [-]
        Go on to ``(1 + tail_factor)·t₁ + tail_h`` after the inlets first
        reached the target at ``t₁`` (a chart's context).
    tail_h : float, default 0 [h]
        See ``tail_factor``.
    settle_fraction : float, default :data:`SETTLE_FRACTION` [-]
        The record goes on until every inlet is also this close to the new fuel's
        sulphur (a fraction of the two tanks' difference), so the viscosity path
        read from it reaches the new fuel (0: stop at the target).
    dry_within_h : float, optional [h]
        Look for tanks running dry after the stop only this long after the switch
        (None: to ``max_horizon_h``); the schedule is read no further.
    **options : float
        ``output_step_s`` [s], ``tolerance`` [-], ``max_step_h`` [h] of
        :func:`~planner.flushing.simulate.simulate`.

    Returns
    -------
    result : FlushResult
        The simulation, ended at the first output time at which every inlet of
        the circuit is at the target (or at the limit when the target is out
        of reach), and nothing still flowing is beyond it, and (waited for up
        to three times as long) the same within ``settle_fraction`` of the new
        fuel
        (:mod:`planner.flushing.until`; provably for good), or at
        ``max_horizon_h``. A tank that runs dry only after the inlets reached
        the target ends it there and is given in ``result.tank_dry_h``, with
        every tank that would run dry later along ``schedule``.
    summary : CircuitSummary
        Its summary for ``circuit``; ``time_to_target_h`` None when the target
        is not reached by ``max_horizon_h``. The models are the simulator's
        ([LEVENSPIEL-1999] well-stirred washout and plug flow): exact for plug
        flow, and within a second of the closed forms at the default tolerance
        in the tests.

    Raises
    ------
    NeverReached
        The new fuel is itself over the limit (:func:`stop_level_pct`).
    FlushError
        A tank runs dry before the inlets reach the target, or a pump cannot
        cover the consumption.
    """
    sw = make_switch(system, circuit, from_, to)
    level = stop_level_pct(system, sw, limit_pct, target_pct)
    s_to, s_from = (_content_sulphur_pct(system, t)[0] for t in (sw.to_tank, sw.from_tank))
    down = s_to <= s_from
    record = None
    if level is not None and settle_fraction > 0.0:
        near = s_to + settle_fraction * (s_from - s_to)
        record = min(level, near) if down else max(level, near)
    until = None if level is None else Until(circuit, level, down, tail_factor, tail_h,
                                             horizon_h, record, dry_within_h)
    result = simulate(system, (sw, *others), schedule, max(max_horizon_h, horizon_h),
                      until=until, **options)
    return result, summarize(system, result, circuit, limit_pct, target_pct)
