"""A scrubber failure during the changeover into the high-sulphur fuel: the circuit not yet full.

:mod:`planner.voyage.scrubber_trip` flushes a circuit from the span's fuel filling it. That is
true once the changeover into that fuel is complete, but a failure at (or shortly after) the
valve switch into it finds the inlets still on the fuel left: at the switch itself the
circuit is full of the fuel it is changed back to, and nothing needs flushing.

The flush models (washout of the well-stirred volumes, plug flow in the pipes,
[LEVENSPIEL-1999]) are linear in the fuel fractions for given flows, so the fraction of each
fuel at an inlet is the sum of the responses to each step of the valve. With ``P`` the fuel
left at the valve switch ``s`` into ``H`` (the span's fuel) and ``F`` the fallback taken at the
failure ``t``, the fractions at an inlet ``τ`` after the failure are::

    x(τ) = T(τ) + C(τ + t − s) − e_H

where ``T`` are the fractions of the trip flush (``H`` to ``F`` from ``t``, the circuit full of
``H``), ``C`` those of the plan's changeover flush (``P`` to ``H`` from ``s``) and ``e_H`` the
circuit full of ``H``: ``x(0) = C(t − s)``, the state the changeover has reached. Past the end
of the changeover's record (every inlet within 0.1 % of ``H``,
:data:`planner.flushing.summary.SETTLE_FRACTION`) ``C`` is taken as ``e_H`` and ``x = T``.

What is approximated: the flows of the two flushes are each those of their own blends (the
consumption is by mass, a blend's volume flow follows its density), not those of the real
blend; with the sample fuels (976 and 988 kg/m³) a part in a hundred of the flow. A failure
for which the sum does not settle under the target within the trip flush's record keeps the
trip flush's own figure (the circuit full of ``H``: conservative).

Moments are epoch seconds (``*_epoch_s``: seconds since 1970-01-01 UTC).
"""

from __future__ import annotations

from collections.abc import Sequence
from typing import TYPE_CHECKING

import numpy as np

from planner.flushing.result import crossing_h

if TYPE_CHECKING:
    from planner.flushing import FlushResult
    from planner.voyage.changeovers import CircuitChange

_EARLIER_S = 0.5  # a valve switch this little after the failure is before it, s


def change_under_way(changes: Sequence[CircuitChange], circuit: str, fuel: str,
                     fail_epoch_s: float) -> CircuitChange | None:
    """The changeover into ``fuel`` that ``circuit`` is still flushing at ``fail_epoch_s``.

    Parameters
    ----------
    changes : sequence of CircuitChange
        The plan's circuit changeovers (any order).
    circuit : str
        The circuit.
    fuel : str
        The span's fuel (the one changed into).
    fail_epoch_s : float [s]
        The failure, seconds since 1970-01-01 UTC.

    Returns
    -------
    CircuitChange or None
        The circuit's last valve switch at or before the failure, when it was into ``fuel``
        and its flush record runs past the failure; None otherwise (the circuit is then full
        of ``fuel``, as far as the plan knows).
    """
    own = [c for c in changes
           if c.circuit == circuit and c.start_epoch_s <= fail_epoch_s + _EARLIER_S]
    if not own:
        return None
    last = max(own, key=lambda c: c.start_epoch_s)
    if last.to_fuel != fuel:
        return None
    record_h = float(last.study.result.time_h[-1])
    return last if fail_epoch_s - last.start_epoch_s < record_h * 3600.0 else None


def partial_time_to_target_h(trip: FlushResult, change: CircuitChange, circuit: str,
                             fail_epoch_s: float, target_pct: float) -> float | None:
    """Failure to every inlet of ``circuit`` at ``target_pct``, the changeover under way.

    Parameters
    ----------
    trip : FlushResult
        The trip flush from the failure (span's fuel to the fallback, the circuit full of the
        span's fuel).
    change : CircuitChange
        The changeover into the span's fuel under way at the failure
        (:func:`change_under_way`).
    circuit : str
        The circuit.
    fail_epoch_s : float [s]
        The failure, seconds since 1970-01-01 UTC.
    target_pct : float [% m/m]
        The sulphur every inlet must reach.

    Returns
    -------
    float or None [h]
        From the failure until every inlet is, and stays to the end of the trip flush's
        record, at or below the target, with the fractions of the module notes; None if
        an inlet of the trip flush has no counterpart in the changeover's or the sum is
        above the target at the record's end (the caller keeps the trip flush's figure).
    """
    before = change.study.result.inlets
    shift_h = (fail_epoch_s - change.start_epoch_s) / 3600.0
    worst: float | None = 0.0
    for tc in trip.circuit_inlets(circuit):
        cc = before.get(tc.consumer)
        if cc is None:
            return None
        names = list(dict.fromkeys([f.name for f in tc.fuels] + [f.name for f in cc.fuels]))
        fuel = {f.name: f for f in (*tc.fuels, *cc.fuels)}
        if change.to_fuel not in names:
            return None
        t_h = tc.trace_time_h
        x = np.zeros((len(names), t_h.size))
        for row, f in enumerate(tc.fuels):
            x[names.index(f.name)] += tc.trace_fractions[row]
        tau_h = t_h + shift_h
        inside = tau_h <= cc.trace_time_h[-1]
        for row, f in enumerate(cc.fuels):
            c = np.interp(tau_h, cc.trace_time_h, cc.trace_fractions[row])
            x[names.index(f.name)] += np.where(inside, c, 1.0 if f.name == change.to_fuel
                                               else 0.0)
        x[names.index(change.to_fuel)] -= 1.0
        rho = np.array([fuel[n].density_kg_m3 for n in names])
        s = np.array([fuel[n].sulphur_pct for n in names])
        # the sulphur mass over the target's, as InletCurve.time_at_or_below_h measures it
        got = crossing_h(t_h, ((s - target_pct) * rho) @ np.clip(x, 0.0, None), settled=True)
        if got is None:
            return None
        worst = max(worst, got)
    return worst
