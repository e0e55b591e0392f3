"""Where the plan may rely on a scrubber: the circuits it serves and where it is available.

The rules (a ship's officer's; README, "Scrubbers in the plan"):

1. A circuit carries one fuel, so it may burn fuel above the limit in force only
   if scrubbers serve *every* consumer on it (:func:`served_groups`: several at
   once when its consumers are on different scrubbers, relied on together); a
   scrubber serving only part of a circuit is not relied on (the ship file's
   loader warns of it). Every other circuit changes over as without a scrubber.
2. Along the route and in time a scrubber is *available* in a mode
   (:func:`availability`) where
   - it is not out of service (the voyage file's outages, :class:`ScrubberOutage`);
   - in a washwater discharge zone, only in a mode the zone allows and the scrubber
     has (``allows = none``: not at all);
   - outside every zone a hybrid runs open loop (common practice: less power and no
     chemicals), an open-only or closed-only scrubber in its one mode.
   - the served engines run within its load range (``min_load_pct`` to
     ``max_load_pct``, % MCR, its ends included), leg by leg: a main engine's load by the
     propeller law at the leg's speed, a generator's its power over its rating
     (:mod:`planner.voyage.scrubber_load`). Where a leg's load is outside the range the
     scrubber is not available, like an outage, and the served circuits change over
     against the real limit. What the plan cannot check (a generator without
     ``rated_kw``, a boiler) it warns of (``scrubber_load_range``).
3. Where available, the served circuits' fuel is chosen against the scrubber's
   ``max_sulphur_pct`` instead of the limit (the higher of the two): a 2.60 %
   fuel is chosen everywhere the scrubber is available, inside control areas
   too. Where it is not, against the real limit. :func:`scrubbed_stretches` gives
   the route check's stretches cut where the availability changes, with that
   limit, so the plan's own fuel choice and runs serve the circuits
   (:mod:`planner.voyage.plan`).

Distances are metres along the route from departure; moments epoch seconds
(``*_epoch_s``: seconds since 1970-01-01 UTC). An outage's moment is placed on
the route where the ship then is (at a stop, where she stops).
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence
from dataclasses import dataclass, replace

from geo.compliance import Stretch
from geo.schedule import from_epoch
from planner.ship.scrubbers import CLOSED, MODES, OPEN, Scrubber
from planner.ship.scrubbers import served_circuits as circuits_served
from planner.ship.system import FuelSystem
from planner.voyage.scrubber_events import ScrubberOutage, ZonePassage
from planner.voyage.scrubber_load import LoadStretch, load_at, load_stretches, unchecked
from planner.voyage.timeline import Timeline
from planner.voyage.warning import PlanWarning

_CUT_M = 1e-3  # cuts closer than 1 mm are one


@dataclass(frozen=True)
class Availability:
    """One piece of the route with one availability of a scrubber.

    Parameters
    ----------
    from_m, to_m : float [m]
        The piece, along the route from departure.
    mode : str or None
        The washwater mode the scrubber works in here (None: not available).
    zones : tuple of str
        The discharge zones the piece lies in, in route order.
    why : str
        Why not available (or why this mode), in words.
    out_of_service : bool
        Not available because the scrubber is out of service (an outage).
    out_of_range : bool
        Not available because a served engine's load is outside the scrubber's load range
        on this leg (``why`` says which, at what load).
    """

    from_m: float
    to_m: float
    mode: str | None
    zones: tuple[str, ...] = ()
    why: str = ""
    out_of_service: bool = False
    out_of_range: bool = False


def served_groups(system: FuelSystem) -> list[tuple[tuple[str, ...], Scrubber,
                                                     tuple[str, ...]]]:
    """The circuits the ship's scrubbers serve whole, grouped by the scrubbers serving them:
    ``(scrubber names, the scrubber relied on, circuits)`` in the ship file's order
    (:func:`planner.ship.scrubbers.served_circuits`). A circuit whose consumers are on two
    scrubbers relies on both at once (:func:`joint_scrubber`); one whose scrubbers share no
    washwater mode is left out (planned on compliant fuel).

    Parameters
    ----------
    system : FuelSystem
        The ship (its circuits and scrubbers).
    """
    by: dict[tuple[str, ...], list[str]] = {}
    for circuit, names in circuits_served(system.scrubbers, system.circuits).items():
        by.setdefault(tuple(names), []).append(circuit)
    out = []
    for names, circuits in by.items():
        s = joint_scrubber(system.scrubbers, names)
        if s is not None:
            out.append((names, s, tuple(circuits)))
    return out


def joint_scrubber(scrubbers: Mapping[str, Scrubber], names: Sequence[str]) -> Scrubber | None:
    """The scrubber ``names`` make together for a circuit whose consumers they share: itself
    for one; for several, named ``"a + b"``, the modes they all have, the lowest approved
    sulphur, the narrowest load range (None when they share no mode).

    Parameters
    ----------
    scrubbers : mapping of str to Scrubber
        The ship's scrubbers.
    names : sequence of str
        The scrubbers serving one circuit.
    """
    ss = [scrubbers[n] for n in names]
    if len(ss) == 1:
        return ss[0]
    modes = tuple(m for m in MODES if all(m in s.modes for s in ss))
    if not modes:
        return None
    low, high = max(s.min_load_pct for s in ss), min(s.max_load_pct for s in ss)
    low, high = (low, high) if low < high else (0.0, 110.0)
    return Scrubber(" + ".join(names), tuple(c for s in ss for c in s.consumers), modes,
                    min(s.max_sulphur_pct for s in ss), low, high)


def joint_outages(outages: Sequence[ScrubberOutage], names: Sequence[str],
                  joint: Scrubber) -> tuple[ScrubberOutage, ...]:
    """The outages of any of ``names``, as outages of ``joint`` (out of service when one of
    them is).

    Parameters
    ----------
    outages : sequence of ScrubberOutage
        The voyage file's outages.
    names : sequence of str
        The scrubbers ``joint`` is made of.
    joint : Scrubber
        Their :func:`joint_scrubber`.
    """
    return tuple(o if o.scrubber == joint.name else replace(o, scrubber=joint.name)
                 for o in outages if o.scrubber in names)


def load_range_warnings(system: FuelSystem) -> list[PlanWarning]:
    """A ``scrubber_load_range`` warning for each scrubber relied on (serving a circuit whole)
    whose load range the plan cannot hold some served consumer to
    (:func:`planner.voyage.scrubber_load.unchecked`: a generator without ``rated_kw``, a
    boiler). The range is applied to every other served engine. (A scrubber serving part of
    a circuit is warned of by the ship file's loader.)

    Parameters
    ----------
    system : FuelSystem
        The ship (its circuits and scrubbers).
    """
    out = []
    relied = {n for names, _, _ in served_groups(system) for n in names}
    for s in system.scrubbers.values():
        missing = unchecked(s, system) if s.name in relied else []
        if missing:
            out.append(PlanWarning("scrubber_load_range", (
                f"Scrubber {s.name}: the plan applies its load range "
                f"{s.min_load_pct:g}-{s.max_load_pct:g} % MCR to the engines whose load it "
                f"knows, not to {', '.join(missing)}; check that load on every span where "
                "the plan relies on the scrubber.")))
    return out


def _zone_modes(scrubber: Scrubber, zones: Sequence[ZonePassage]) -> tuple[str, ...]:
    """The modes the scrubber may work in among ``zones`` (all of them at once)."""
    modes = tuple(scrubber.modes)
    for z in zones:
        modes = tuple(m for m in modes if m in z.allows)
    return modes


def _cuts(length_m: float, stretches: Sequence[Stretch], passages: Sequence[ZonePassage],
          outage_m: Sequence[float], loads: Sequence[LoadStretch] = ()) -> list[float]:
    raw = sorted({0.0, length_m, *(s.from_m for s in stretches), *(s.to_m for s in stretches),
                  *(p.from_m for p in passages), *(p.to_m for p in passages), *outage_m,
                  *(x.from_m for x in loads[1:])})
    out: list[float] = []
    for x in raw:
        x = min(max(x, 0.0), length_m)
        if not out or x - out[-1] > _CUT_M:
            out.append(x)
    return out


def availability(scrubber: Scrubber, timeline: Timeline, stretches: Sequence[Stretch],
                 passages: Sequence[ZonePassage],
                 outages: Sequence[ScrubberOutage],
                 ranges: Sequence[Scrubber] | None = None) -> list[Availability]:
    """The scrubber's availability along the route, piece by piece (see the module notes).

    Parameters
    ----------
    scrubber : Scrubber
        The scrubber.
    timeline : Timeline
        The voyage's timeline (its schedule places outages on the route).
    stretches : sequence of Stretch
        The route check's stretches (cut there too, so each piece has one limit).
    passages : sequence of ZonePassage
        The route's passages through washwater discharge zones.
    outages : sequence of ScrubberOutage
        The voyage file's outages (those of other scrubbers are ignored).
    ranges : sequence of Scrubber, optional
        The ship file's scrubbers whose load ranges apply, each to its own consumers
        (default: ``scrubber`` itself; the scrubbers a joint one stands for).

    Returns
    -------
    list of Availability
        In route order, neighbours cut where the stretches, the zones, an outage or the
        served engines' load verdict begin or end.
    """
    sched = timeline.schedule
    mine = [o for o in outages if o.scrubber == scrubber.name]
    moments = [o.from_epoch_s for o in mine] + [o.until_epoch_s for o in mine
                                                 if o.until_epoch_s is not None]
    outage_m = [float(x) for x in sched.distance_at_epoch(moments)] if moments else []
    length = stretches[-1].to_m if stretches else sched.path.length_m
    loads = load_stretches(ranges if ranges is not None else (scrubber,), timeline.system,
                           sched)
    cuts = _cuts(length, stretches, passages, outage_m, loads)
    out: list[Availability] = []
    for a, b in zip(cuts[:-1], cuts[1:], strict=True):
        mid = 0.5 * (a + b)
        t = float(sched.epoch_at([mid])[0])
        zones = [p for p in passages if p.from_m - _CUT_M <= a and b <= p.to_m + _CUT_M]
        down = next((o for o in mine if o.covers(t)), None)
        names = tuple(dict.fromkeys(p.zone for p in zones))
        if down is not None:
            why = f"out of service from {from_epoch(down.from_epoch_s):%Y-%m-%d %H:%MZ}"
            out.append(Availability(a, b, None, names, why + (f" ({down.reason})" if down.reason
                                                               else ""), True))
            continue
        load = load_at(loads, mid)
        if load is not None and load.out_of_range:
            out.append(Availability(a, b, None, names, load.why, False, True))
            continue
        modes = _zone_modes(scrubber, zones)
        if not modes:
            allowed = "; ".join(f"{p.zone} allows {' or '.join(p.allows) or 'no discharge'}"
                                for p in zones)
            out.append(Availability(a, b, None, names,
                                    f"{allowed}: scrubber {scrubber.name} "
                                    f"({scrubber.mode_word}) cannot work there"))
            continue
        mode = OPEN if OPEN in modes else CLOSED
        why = (f"in {', '.join(names)}: {mode} loop" if zones else
               f"outside discharge zones: {mode} loop")
        out.append(Availability(a, b, mode, names, why))
    return out


def scrubbed_stretches(stretches: Sequence[Stretch], pieces: Sequence[Availability],
                       scrubber: Scrubber, timeline: Timeline) -> list[Stretch]:
    """The stretches as the served circuits see them: cut at every availability piece, with
    the scrubber's ``max_sulphur_pct`` as the limit where it is available (the higher of the
    two), the real limit elsewhere.

    Parameters
    ----------
    stretches : sequence of Stretch
        The route check's stretches.
    pieces : sequence of Availability
        The scrubber's availability (:func:`availability`; its cuts include the stretches').
    scrubber : Scrubber
        The scrubber.
    timeline : Timeline
        The voyage's timeline (the moments of the new ends).
    """
    sched = timeline.schedule
    out = []
    for p in pieces:
        st = next((s for s in stretches if s.from_m - _CUT_M <= p.from_m < s.to_m - _CUT_M),
                  stretches[-1])
        limit = st.limit_pct if p.mode is None else max(st.limit_pct, scrubber.max_sulphur_pct)
        t0, t1 = (from_epoch(float(x)) for x in sched.epoch_at([p.from_m, p.to_m]))
        out.append(Stretch(p.from_m, p.to_m, limit, st.areas, t0, t1))
    return out


def piece_at(pieces: Sequence[Availability], distance_m: float) -> Availability:
    """The availability piece holding ``distance_m`` [m] (the first at a cut)."""
    for p in pieces:
        if distance_m < p.to_m - _CUT_M:
            return p
    return pieces[-1]


def real_stretch_at(stretches: Sequence[Stretch], distance_m: float) -> Stretch:
    """The route check's stretch holding ``distance_m`` [m] (the first at a cut)."""
    for s in stretches:
        if distance_m < s.to_m - _CUT_M:
            return s
    return stretches[-1]
