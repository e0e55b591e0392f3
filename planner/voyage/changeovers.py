"""When and where each changeover starts, on the voyage's own timeline.

Going to compliant fuel (a step down in limit at a boundary), per circuit:
the latest valve switch ``t_start`` such that every inlet of the circuit is at
or under the sulphur target by the boundary time minus the time margin,

    t_start + D(t_start) = t_boundary − margin,

where ``D(t_start)`` is the flushing time to the target *with the consumption
that really applies from t_start on* (speed changes and stops on the timeline
included). Solved by fixed-point iteration on ``t_start`` (D changes slowly
with t_start), checked, and stepped back a minute at a time if the last step
overshot. The iteration converges only while |dD/dt_start| < 1: a speed cut
during the flush to less than half the flow (e.g. 14 kn to 10 kn by the
propeller law [PROPELLER-LAW]) makes it oscillate, so when it has not converged
the root of ``t_start + D(t_start) = t_boundary − margin`` is bracketed and
bisected instead (``t_start + D(t_start)`` never decreases with ``t_start``: a
later switch leaves more old fuel in the system at every moment). Going back to
regular fuel (a step up at an exit): commenced at the exit, never before;
complete when every inlet is within :data:`SWITCH_BACK_COMPLETE` of the regular
fuel's sulphur.

Every flush goes through a :class:`~planner.voyage.flush_cache.FlushCache`
(the plan's, or one for the call): an iterate, the check after the fixed point
and the final run with the thermal path reuse the flush already simulated for
the same inputs, and each start's ``D`` is computed once per search.

Moments are epoch seconds (``*_epoch_s``: seconds since 1970-01-01 UTC);
durations are seconds (``*_s``) or hours (``*_h``).
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass

from planner.flushing.study import FlushStudy
from planner.ship.system import FuelSystem
from planner.voyage.flush_cache import FlushCache
from planner.voyage.timeline import Timeline

SWITCH_BACK_COMPLETE = 0.05
"""A switch back is complete when the inlet is within 5 % of the fuels' sulphur difference
from the regular fuel (common practice for 'fully changed over'; our choice)."""
_TOL_S = 10.0
_MAX_ITER = 12
_HORIZON_H = 96.0  # the consumption schedule a flush is given, h from its start


class TargetUnreachable(ValueError):
    """The inlet never gets to the sulphur target (the new fuel is at or above it)."""


@dataclass(frozen=True, eq=False)
class CircuitChange:
    """One circuit's changeover.

    Parameters
    ----------
    circuit : str
        The circuit (a name of the ship file's ``[circuits]``).
    direction : str
        ``"to_compliant"`` or ``"to_regular"``.
    from_fuel, to_fuel : str
        The main fuel of the tank left and of the tank taken.
    from_tank, to_tank : str
        The tanks at the changeover valve, before and after.
    start_epoch_s : float [s]
        The valve switch, seconds since 1970-01-01 UTC.
    done_epoch_s : float or None [s]
        Every inlet at the sulphur target (to compliant) or within
        :data:`SWITCH_BACK_COMPLETE` of the regular fuel (back), seconds since
        1970-01-01 UTC; None if never within the simulated horizon.
    at_limit_epoch_s : float or None [s]
        Every inlet at or under the limit (to compliant), or the first inlet
        over it (back), seconds since 1970-01-01 UTC; None if never.
    boundary_epoch_s : float [s]
        The boundary the changeover is for, seconds since 1970-01-01 UTC.
    study : FlushStudy
        The flushing simulation from the valve switch, with the thermal path.
    """

    circuit: str
    direction: str
    from_fuel: str
    to_fuel: str
    from_tank: str
    to_tank: str
    start_epoch_s: float
    done_epoch_s: float | None
    at_limit_epoch_s: float | None
    boundary_epoch_s: float
    study: FlushStudy

    @property
    def duration_h(self) -> float | None:
        """Valve switch to done, h (None if never done)."""
        if self.done_epoch_s is None:
            return None
        return (self.done_epoch_s - self.start_epoch_s) / 3600.0


def _run(flushes: FlushCache, system: FuelSystem, timeline: Timeline, circuit: str,
         from_tank: str, to_tank: str, start_epoch_s: float, limit_pct: float,
         level_pct: float, thermal: bool) -> FlushStudy:
    sched = timeline.consumption_from(start_epoch_s, _HORIZON_H)
    return flushes.study(system, circuit, from_tank, to_tank, sched, limit_pct, level_pct,
                         thermal=thermal)


def plan_to_compliant(system: FuelSystem, timeline: Timeline, circuit: str, from_tank: str,
                      to_tank: str, boundary_epoch_s: float, margin_h: float, limit_pct: float,
                      target_pct: float, flushes: FlushCache | None = None,
                      thermal: bool = True) -> CircuitChange:
    """Latest start for one circuit so its inlets are at the target by boundary − margin.

    Parameters
    ----------
    system : FuelSystem
        The ship as she sails the voyage.
    timeline : Timeline
        The voyage's consumption against time.
    circuit : str
        The circuit to change over.
    from_tank, to_tank : str
        The tanks at its valve: the one in use and the compliant one.
    boundary_epoch_s : float [s]
        The boundary, seconds since 1970-01-01 UTC.
    margin_h : float [h]
        Compliant this long before the boundary.
    limit_pct : float [% m/m]
        The sulphur limit inside the area.
    target_pct : float [% m/m]
        The sulphur the inlets must be at or under by boundary − margin.
    flushes : FlushCache, optional
        Where the flushes are remembered (default: a cache for this call).
    thermal : bool, default True
        Follow the inlets' viscosity paths in the final study (False: leave them
        for :meth:`FlushCache.with_thermal`).

    Returns
    -------
    CircuitChange
        The changeover, simulated (with the thermal path) from its start.

    Raises
    ------
    TargetUnreachable
        If the inlets never get to ``target_pct``.
    """
    due = boundary_epoch_s - margin_h * 3600.0
    flushes = flushes if flushes is not None else FlushCache()
    known: dict[float, float] = {}

    def duration_s(t: float) -> float:
        if t in known:
            return known[t]
        st = _run(flushes, system, timeline, circuit, from_tank, to_tank, t, limit_pct,
                  target_pct, False)
        d = st.summary.time_to_target_h
        if d is None:
            raise TargetUnreachable(f"circuit {circuit}: the target {target_pct:.3f} % is never "
                             "reached (check the fuels and tanks)")
        known[t] = d * 3600.0
        return known[t]

    first = duration_s(due)
    start = due - first
    tried = [(due, first)]
    for _ in range(_MAX_ITER):
        d = duration_s(start)
        tried.append((start, start + d - due))
        new = due - d
        if abs(new - start) < _TOL_S:
            start = min(new, start)
            break
        start = new
    else:
        start = _bisect_latest_start(duration_s, due, tried)
    while start + duration_s(start) > due + 1.0:  # the fixed point overshot: step back
        start -= 60.0
    final = _run(flushes, system, timeline, circuit, from_tank, to_tank, start, limit_pct,
                 target_pct, thermal)
    s = final.summary
    done = start + s.time_to_target_h * 3600.0
    at_limit = None if s.time_to_limit_h is None else start + s.time_to_limit_h * 3600.0
    return CircuitChange(circuit, "to_compliant", s.from_fuel, s.to_fuel, from_tank, to_tank,
                         start, done, at_limit, boundary_epoch_s, final)


def _bisect_latest_start(duration_s: Callable[[float], float], due: float,
                         tried: list[tuple[float, float]]) -> float:
    """The latest start whose flush is done by ``due`` (to 1 s), by bisection.

    ``tried`` holds ``(t_start, t_start + D(t_start) − due)`` pairs already computed
    (the first entry is ``due`` itself with ``D(due)`` > 0: too late); moments are epoch
    seconds, ``duration_s(t_start)`` is D in seconds.
    """
    late = [p for p in tried[1:] if p[1] > 0.0]
    early = [p for p in tried[1:] if p[1] <= 0.0]
    hi = min(late)[0] if late else due
    if early:
        lo = max(early)[0]
    else:
        step = max(tried[0][1], 600.0)
        for _ in range(_MAX_ITER):
            t = hi - step
            if t + duration_s(t) <= due:
                lo = t
                break
            hi, step = t, 2.0 * step
        else:
            raise ValueError("no start found that completes the changeover in time")
    while hi - lo > 1.0:
        mid = 0.5 * (lo + hi)
        if mid + duration_s(mid) <= due:
            lo = mid
        else:
            hi = mid
    return lo


def plan_to_regular(system: FuelSystem, timeline: Timeline, circuit: str, from_tank: str,
                    to_tank: str, exit_epoch_s: float, limit_pct: float,
                    flushes: FlushCache | None = None, thermal: bool = True) -> CircuitChange:
    """Switch back commenced at the exit; complete near the regular fuel's sulphur.

    Parameters
    ----------
    system : FuelSystem
        The ship as she sails the voyage.
    timeline : Timeline
        The voyage's consumption against time.
    circuit : str
        The circuit to change back.
    from_tank, to_tank : str
        The tanks at its valve: the compliant one in use and the regular one.
    exit_epoch_s : float [s]
        The exit from the area, seconds since 1970-01-01 UTC: the valve switch.
    limit_pct : float [% m/m]
        The limit of the area left (its first excess is ``at_limit_epoch_s``).
    flushes : FlushCache, optional
        Where the flushes are remembered (default: a cache for this call).
    thermal : bool, default True
        Follow the inlets' viscosity paths (False: leave them for
        :meth:`FlushCache.with_thermal`).

    Returns
    -------
    CircuitChange
        The switch back, simulated (with the thermal path) from the exit.
    """
    level = back_on_regular_pct(_main_fuel_sulphur(system, from_tank),
                                _main_fuel_sulphur(system, to_tank))
    flushes = flushes if flushes is not None else FlushCache()
    final = _run(flushes, system, timeline, circuit, from_tank, to_tank, exit_epoch_s,
                 limit_pct, level, thermal)
    s = final.summary
    done = None if s.time_to_target_h is None else exit_epoch_s + s.time_to_target_h * 3600.0
    over = (None if s.first_time_to_limit_h is None
            else exit_epoch_s + s.first_time_to_limit_h * 3600.0)
    return CircuitChange(circuit, "to_regular", s.from_fuel, s.to_fuel, from_tank, to_tank,
                         exit_epoch_s, done, over, exit_epoch_s, final)


def switch_back_level_pct(system: FuelSystem, from_tank: str, to_tank: str) -> float | None:
    """The level every inlet must reach for a switch back to count as complete, or None
    when ``to_tank``'s main fuel is not the higher-sulphur one (not a switch back).

    Parameters
    ----------
    system : FuelSystem
    from_tank, to_tank : str
        The compliant fuel's tank and the regular fuel's.

    Returns
    -------
    float or None [% m/m]
        Within :data:`SWITCH_BACK_COMPLETE` of the fuels' difference from the regular fuel.
    """
    s_old = _main_fuel_sulphur(system, from_tank)
    s_new = _main_fuel_sulphur(system, to_tank)
    return None if s_new <= s_old else back_on_regular_pct(s_old, s_new)


def back_on_regular_pct(compliant_pct: float, regular_pct: float) -> float:
    """The sulphur every inlet must reach for a switch back to be complete [% m/m]: within
    :data:`SWITCH_BACK_COMPLETE` of the two fuels' difference from the regular fuel.

    Parameters
    ----------
    compliant_pct, regular_pct : float [% m/m]
        The fuel switched from and the fuel switched back to.

    >>> round(back_on_regular_pct(0.08, 0.45), 4)
    0.4315
    """
    return regular_pct - SWITCH_BACK_COMPLETE * (regular_pct - compliant_pct)


def _main_fuel_sulphur(system: FuelSystem, tank: str) -> float:
    content = system.tanks[tank].content_m3
    fuel = max(content.items(), key=lambda kv: kv[1])[0]
    return system.fuels[fuel].sulphur_pct
