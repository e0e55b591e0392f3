"""Flushing results of one plan, remembered by their inputs.

A plan simulates the same changeover many times over: the fixed point of
:func:`planner.voyage.changeovers.plan_to_compliant` evaluates the flush at the
due time and at each iterate, checks the last and runs it once more with the
thermal path; the plan is rebuilt after each needless switch back is dropped;
the caution-zone check plans alternatives; the confidence study starts from the
plan's own flushes. A :class:`FlushCache` runs each distinct one once.

A result is keyed on everything it depends on, compared exactly (float bits):

- the fuel system: a frozen fingerprint of every fuel, tank and its content,
  volume, consumer, circuit and the inlet window (:func:`system_fingerprint`);
- the switch (circuit, tank left, tank taken), the limit and the target (for
  :meth:`FlushCache.study`) or the horizon asked for (:meth:`FlushCache.simulate`);
- the consumption schedule from the valve switch **as the simulation sees it**:
  the basis, the segment starts before the end of the simulated time and the
  rates of the circuit's own consumers in those segments.

The last item rests on two properties of :func:`planner.flushing.simulate`:
it is causal (the result to its end depends on no segment starting after it),
and it reads the rates of the switched circuit's consumers only. Since the end
is known only once simulated, entries are grouped by it: a lookup compares the
new schedule's segments before each stored end with those of the entries that
end there. A flush that doubles its horizon saw nothing past its last end, so
a hit is the result the call would have returned, bit for bit. Both properties
and the hits are tested in ``tests/planner/voyage/test_flush_cache.py``.

``FlushCache(enabled=False)`` computes every call (the baseline of
``tests/bench/bench_plan.py``), counting them all as misses.
"""

from __future__ import annotations

import bisect
import dataclasses
import struct
from collections import Counter
from collections.abc import Callable, Hashable, Mapping, Sequence
from typing import TypeVar

import numpy as np

from planner.common.defaults import SERVICE_ENDURANCE_H
from planner.flushing import ConsumptionSchedule, FlushResult, Switch, flush, simulate
from planner.flushing.study import FlushStudy
from planner.ship.system import FuelSystem
from planner.ship.thermal import InletPath, inlet_path, lead_needed_h

T = TypeVar("T")

_EDGE_H = 1e-6
"""A segment starting this little after the simulated end counts as seen, h (the key then
holds a segment the simulation may not have read: at worst a miss, never a wrong hit)."""


Parts = dict[int, tuple[object, Hashable]]
"""Fingerprints of frozen parts by ``id``, each with its part (held, so the id stays its own)."""


def system_fingerprint(system: FuelSystem, parts: Parts | None = None) -> Hashable:
    """A hashable value equal for two systems exactly when every part of them is.

    Parameters
    ----------
    system : FuelSystem
        The fuel system (fuels, tanks and their content, volumes, consumers,
        circuits, inlet window).
    parts : dict, optional
        Fingerprints of frozen dataclass parts already seen, by ``id`` (filled in;
        a perturbed copy of a system shares most of its parts).

    Returns
    -------
    tuple
        Nested tuples of the dataclasses' fields in order (mappings keep their
        order, floats their bits).
    """
    return _freeze(system, {} if parts is None else parts)


def _freeze(obj: object, parts: Parts) -> Hashable:
    """``obj`` as nested tuples of exact values (TypeError for an unknown kind)."""
    if obj is None or isinstance(obj, str):
        return obj
    if isinstance(obj, bool | int):
        return (type(obj).__name__, obj)
    if isinstance(obj, float):
        return ("float", obj.hex())
    if dataclasses.is_dataclass(obj) and not isinstance(obj, type):
        known = parts.get(id(obj))
        if known is not None and known[0] is obj:
            return known[1]
        out = (type(obj).__qualname__,
               tuple(_freeze(getattr(obj, f.name), parts) for f in dataclasses.fields(obj)))
        if type(obj).__dataclass_params__.frozen:  # type: ignore[attr-defined]
            parts[id(obj)] = (obj, out)
        return out
    if isinstance(obj, Mapping):
        return ("map", tuple((_freeze(k, parts), _freeze(v, parts)) for k, v in obj.items()))
    if isinstance(obj, tuple | list):
        return ("seq", tuple(_freeze(x, parts) for x in obj))
    if isinstance(obj, frozenset | set):
        return ("set", frozenset(_freeze(x, parts) for x in obj))
    if isinstance(obj, np.ndarray):
        return ("array", obj.dtype.str, obj.shape, obj.tobytes())
    if isinstance(obj, np.generic):
        return _freeze(obj.item(), parts)
    raise TypeError(f"cannot fingerprint a {type(obj).__name__}")


def _bits(values: Sequence[float]) -> bytes:
    """The exact bits of ``values`` (``-0.0`` and ``0.0`` differ)."""
    return struct.pack(f"<{len(values)}d", *values)


def schedule_window(schedule: ConsumptionSchedule, consumers: Sequence[str],
                    end_h: float) -> Hashable:
    """What a simulation to ``end_h`` [h] reads of ``schedule``, as an exact key.

    Parameters
    ----------
    schedule : ConsumptionSchedule
        Rates [t/h] from the valve switch.
    consumers : sequence of str
        The switched circuit's consumers (a missing one is kept as None: the
        simulation then refuses, as it does uncached).
    end_h : float [h]
        The end of the simulated time.

    Returns
    -------
    tuple
        The basis, the segment starts before ``end_h`` (plus ``_EDGE_H``) and
        each consumer's rates in them, as float bits.
    """
    times = schedule.times_h
    n = bisect.bisect_left(times, end_h + _EDGE_H)
    rates = schedule.rates_t_h
    return (schedule.basis, _bits(times[:n]),
            tuple(_bits(rates[c][:n]) if c in rates else None for c in consumers))


def simulated_end_h(result: FlushResult) -> float:
    """The last moment a simulation computed or read of its schedule, h after the switch (its
    output grid's end, a later trace point, or how far it extended the tanks' levels)."""
    ends = [float(result.time_h[-1]), float(result.schedule_read_h)]
    ends += [float(c.trace_time_h[-1]) for c in result.inlets.values() if c.trace_time_h.size]
    return max(ends)


def thermal_study(system: FuelSystem, base: FlushStudy) -> FlushStudy:
    """``base`` with each inlet's viscosity path and the lead it needs, as
    :func:`planner.flushing.study.study` adds them with ``thermal=True``.

    Consumers whose inlet blends are equal (fed from one node) share one path: it is a
    function of the blend, the times and the window only.

    Parameters
    ----------
    system : FuelSystem
        The system simulated (each consumer's inlet window).
    base : FlushStudy
        A study without the thermal path.
    """
    result = base.result
    paths, leads = {}, {}
    found: dict[Hashable, tuple[InletPath, float | None]] = {}
    for curve in result.circuit_inlets(base.summary.circuit):
        blend = np.asarray(curve.mass_fractions)
        window = system.window_for(curve.consumer)
        key = (blend.dtype.str, blend.shape, blend.tobytes(), window)
        if key not in found:
            path = inlet_path(result.fuels, blend, result.time_h, window)
            found[key] = (path, 0.0 if not path.outside() else
                          lead_needed_h(result.fuels, blend, result.time_h, window))
        paths[curve.consumer], leads[curve.consumer] = found[key]
    return FlushStudy(result, base.summary, paths, leads)


def _consumers(system: FuelSystem, circuit: str) -> tuple[str, ...]:
    """The circuit's consumers (none for an unknown circuit: the flush then refuses it)."""
    c = system.circuits.get(circuit)
    return () if c is None else tuple(c.consumers)


class FlushCache:
    """Flush studies and simulations remembered by their inputs (see the module notes).

    Parameters
    ----------
    enabled : bool, default True
        False: compute every call (each counted as a miss).
    """

    def __init__(self, enabled: bool = True) -> None:
        self.enabled = enabled
        self.hits: Counter[str] = Counter()
        self.misses: Counter[str] = Counter()
        self._systems: dict[int, tuple[FuelSystem, int]] = {}
        self._tokens: dict[Hashable, int] = {}
        self._parts: Parts = {}
        self._entries: dict[tuple, dict[float, dict[Hashable, object]]] = {}
        self._thermal: dict[tuple[int, int], tuple[FlushStudy, FlushStudy]] = {}

    def _token(self, system: FuelSystem) -> int:
        """A small integer per distinct system (its fingerprint computed once per object)."""
        known = self._systems.get(id(system))
        if known is not None and known[0] is system:
            return known[1]
        token = self._tokens.setdefault(system_fingerprint(system, self._parts),
                                        len(self._tokens))
        self._systems[id(system)] = (system, token)  # held, so the id is not reused
        return token

    def _remember(self, kind: str, base: tuple, schedule: ConsumptionSchedule,
                  consumers: Sequence[str], compute: Callable[[], T],
                  end_of: Callable[[T], float]) -> T:
        """The stored value whose key and schedule window match, else ``compute()`` stored."""
        if not self.enabled:
            self.misses[kind] += 1
            return compute()
        groups = self._entries.setdefault((kind, *base), {})
        for end_h, found in groups.items():
            hit = found.get(schedule_window(schedule, consumers, end_h))
            if hit is not None:
                self.hits[kind] += 1
                return hit  # type: ignore[return-value]
        value = compute()
        end_h = end_of(value)
        groups.setdefault(end_h, {})[schedule_window(schedule, consumers, end_h)] = value
        self.misses[kind] += 1
        return value

    def study(self, system: FuelSystem, circuit: str, from_tank: str, to_tank: str,
              schedule: ConsumptionSchedule, limit_pct: float, target_pct: float, *,
              thermal: bool = True) -> FlushStudy:
        """:func:`planner.flushing.study.study` of one changeover, remembered.

        Parameters
        ----------
        system : FuelSystem
        circuit : str
            The circuit whose valve is switched.
        from_tank, to_tank : str
            The tanks at its valve, before and after.
        schedule : ConsumptionSchedule
            The consumers' rates [t/h] from the switch.
        limit_pct : float [% m/m]
            Sulphur limit.
        target_pct : float [% m/m]
            Planning target (or the switch back's completion level).
        thermal : bool, default True
            Add the inlets' viscosity paths (remembered per flush too).

        Returns
        -------
        FlushStudy
            The flush (:func:`planner.flushing.flush`, default horizons) and,
            with ``thermal``, the viscosity paths.
        """
        base = (self._token(system), Switch(circuit, from_tank, to_tank),
                float(limit_pct).hex(), float(target_pct).hex())

        def compute() -> FlushStudy:
            result, summary = flush(system, circuit, from_tank, to_tank, schedule,
                                    limit_pct=limit_pct, target_pct=target_pct,
                                    dry_within_h=SERVICE_ENDURANCE_H)
            return FlushStudy(result, summary, {}, {})

        st = self._remember("flush", base, schedule, _consumers(system, circuit), compute,
                            lambda s: simulated_end_h(s.result))
        return self.with_thermal(system, st) if thermal else st

    def with_thermal(self, system: FuelSystem, study: FlushStudy) -> FlushStudy:
        """``study`` with the thermal path (:func:`thermal_study`), computed once per study.

        Parameters
        ----------
        system : FuelSystem
            The system simulated (its inlet window).
        study : FlushStudy
            A study of this cache, without the thermal path.
        """
        if study.paths:
            return study
        if not self.enabled:
            self.misses["thermal"] += 1
            return thermal_study(system, study)
        key = (id(study), self._token(system))
        known = self._thermal.get(key)
        if known is not None and known[0] is study:
            self.hits["thermal"] += 1
            return known[1]
        full = thermal_study(system, study)
        self._thermal[key] = (study, full)
        self.misses["thermal"] += 1
        return full

    def simulate(self, system: FuelSystem, switch: Switch, schedule: ConsumptionSchedule,
                 horizon_h: float) -> FlushResult:
        """:func:`planner.flushing.simulate` with its default options, remembered.

        Parameters
        ----------
        system : FuelSystem
        switch : Switch
            The one circuit switched.
        schedule : ConsumptionSchedule
            The consumers' rates [t/h] from the switch.
        horizon_h : float [h]
            Simulated time after the switch.

        Returns
        -------
        FlushResult
        """
        base = (self._token(system), switch, float(horizon_h).hex())
        return self._remember("simulate", base, schedule, _consumers(system, switch.circuit),
                              lambda: simulate(system, switch, schedule, horizon_h),
                              simulated_end_h)

    def counts(self) -> dict[str, tuple[int, int]]:
        """``{kind: (hits, misses)}`` for ``"flush"``, ``"thermal"`` and ``"simulate"``."""
        return {k: (self.hits[k], self.misses[k]) for k in ("flush", "thermal", "simulate")}
