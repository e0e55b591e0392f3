"""The served engines' load against a scrubber's load range, leg by leg.

A scrubber may be relied on only while the engines it serves run within its load range
(``min_load_pct`` to ``max_load_pct``, % MCR; :class:`planner.ship.scrubbers.Scrubber`),
its ends included. The plan knows the load of

- a **main engine** on every leg sailed: the propeller law from its reference point at the
  leg's speed over ground (:meth:`planner.ship.consumers.MainEngine.load_pct_at_speed`,
  [PROPELLER-LAW], common practice), the same load the plan's consumption uses
  (:class:`planner.voyage.timeline.Timeline`);
- a **generator** with a rating: its constant running power over its rating
  (``power_kw / rated_kw``), the same on every leg.

It does not know the load of a generator without ``rated_kw`` in the ship file, and a
boiler has no load in % MCR: neither is checked (:func:`unchecked`). At a stop the main
engine is stopped and burns nothing (no exhaust to clean), so the range is applied on the
legs sailed; alongside before departure and after arrival, and while manoeuvring (which the
schedule does not model), it is not. A load within ``LOAD_TOL_PCT`` of an end counts as at
that end (the leg's speed comes from distance over time, to the last bit).

Distances are metres along the route from departure.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass

from geo.ellipsoid import NM_M
from geo.schedule import Schedule
from planner.ship.consumers import Boiler, Generator, MainEngine
from planner.ship.scrubbers import Scrubber
from planner.ship.system import FuelSystem

LOAD_TOL_PCT = 1e-6
"""A load this close to an end of the range [% MCR] is at that end (inside the range)."""

_CUT_M = 1e-3  # legs shorter than 1 mm (a stop repeats a distance) are not legs


def has_range(scrubber: Scrubber) -> bool:
    """The scrubber sets a load range narrower than the whole 0-110 % MCR."""
    return scrubber.min_load_pct > 0.0 or scrubber.max_load_pct < 110.0


@dataclass(frozen=True)
class LoadStretch:
    """A part of the route on which the served engines' load is in or out of range.

    Parameters
    ----------
    from_m, to_m : float [m]
        The part, along the route from departure.
    out_of_range : bool
        Some served engine's load is outside its scrubber's range here.
    why : str
        Which engine, at what load, against which end of the range (empty when in range).
    """

    from_m: float
    to_m: float
    out_of_range: bool
    why: str = ""

    def __post_init__(self) -> None:
        if self.to_m < self.from_m:
            raise ValueError("load stretch: it must not end before it begins")
        if self.out_of_range != bool(self.why):
            raise ValueError("load stretch: out of range exactly when it says why")


def engine_load_pct(system: FuelSystem, consumer: str, speed_kn: float) -> float | None:
    """The load of a served consumer at ``speed_kn`` [kn], % MCR (a generator: % of its
    rating); None when the plan does not know it (a generator without ``rated_kw``, a
    boiler).

    Parameters
    ----------
    system : FuelSystem
        The ship.
    consumer : str
        The consumer's name.
    speed_kn : float [kn]
        The ship's speed over ground on the leg.
    """
    c = system.consumers[consumer]
    if isinstance(c, MainEngine):
        return c.load_pct_at_speed(speed_kn)
    if isinstance(c, Generator) and c.rated_kw:
        return 100.0 * c.power_kw / c.rated_kw
    return None


def _pct(x: float, end: float) -> str:
    """``x`` to 0.1 %, or to 0.001 % when 0.1 % would print it at ``end``."""
    text = f"{x:.1f}"
    return f"{x:.3f}" if float(text) == end else text


def load_why(scrubbers: Sequence[Scrubber], system: FuelSystem, speed_kn: float) -> str:
    """Why the served engines' load at ``speed_kn`` [kn] is outside a scrubber's range, in
    words (empty when every known load is within its scrubber's range).

    Parameters
    ----------
    scrubbers : sequence of Scrubber
        The ship file's scrubbers relied on together (their own ranges and consumers).
    system : FuelSystem
        The ship.
    speed_kn : float [kn]
        The speed over ground on the leg.
    """
    out = []
    for s in (s for s in scrubbers if has_range(s)):
        for name in s.consumers:
            load = engine_load_pct(system, name, speed_kn)
            if load is None:
                continue
            unit = "% MCR" if isinstance(system.consumers[name], MainEngine) else \
                "% of its rating"
            at = f" at {speed_kn:.1f} kn" if unit == "% MCR" else ""
            if load < s.min_load_pct - LOAD_TOL_PCT:
                out.append(f"{name} load {_pct(load, s.min_load_pct)} {unit}{at}, below "
                           f"scrubber {s.name}'s {s.min_load_pct:g} % minimum")
            elif load > s.max_load_pct + LOAD_TOL_PCT:
                out.append(f"{name} load {_pct(load, s.max_load_pct)} {unit}{at}, above "
                           f"scrubber {s.name}'s {s.max_load_pct:g} % maximum")
    return "; ".join(out)


def load_stretches(scrubbers: Sequence[Scrubber], system: FuelSystem,
                   schedule: Schedule) -> list[LoadStretch]:
    """The route in parts of one load verdict, leg by leg (see the module notes); empty
    when no scrubber of ``scrubbers`` sets a range.

    Parameters
    ----------
    scrubbers : sequence of Scrubber
        The ship file's scrubbers relied on together.
    system : FuelSystem
        The ship.
    schedule : Schedule
        The voyage's schedule (its legs' speeds).

    Returns
    -------
    list of LoadStretch
        In route order, neighbours with the same verdict and reason joined.
    """
    if not any(has_range(s) for s in scrubbers):
        return []
    km, kt = schedule.knot_m, schedule.knot_epoch_s
    out: list[LoadStretch] = []
    for i in range(len(km) - 1):
        dd, dt = float(km[i + 1] - km[i]), float(kt[i + 1] - kt[i])
        if dd <= _CUT_M or dt <= 0.0:
            continue  # a stop: the main engine stopped
        why = load_why(scrubbers, system, dd / NM_M / (dt / 3600.0))
        a, b = float(km[i]), float(km[i + 1])
        if out and out[-1].why == why:
            out[-1] = LoadStretch(out[-1].from_m, b, bool(why), why)
        else:
            out.append(LoadStretch(a, b, bool(why), why))
    return out


def load_at(stretches: Sequence[LoadStretch], distance_m: float) -> LoadStretch | None:
    """The load stretch holding ``distance_m`` [m] (None when there are none)."""
    for s in stretches:
        if distance_m < s.to_m:
            return s
    return stretches[-1] if stretches else None


def unchecked(scrubber: Scrubber, system: FuelSystem) -> list[str]:
    """The served consumers whose load the plan cannot hold against ``scrubber``'s range,
    each with why (empty when it sets no range).

    Parameters
    ----------
    scrubber : Scrubber
        A ship file's scrubber.
    system : FuelSystem
        The ship.
    """
    if not has_range(scrubber):
        return []
    out = []
    for name in scrubber.consumers:
        c = system.consumers.get(name)
        if isinstance(c, Generator) and not c.rated_kw:
            out.append(f"{name} (no rated_kw in the ship file: its load is not known)")
        elif isinstance(c, Boiler):
            out.append(f"{name} (a boiler: no load in % MCR)")
    return out
