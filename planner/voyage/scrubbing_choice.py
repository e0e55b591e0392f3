"""The served circuits' fuel choice, and what each of their changes is for.

A scrubber's circuits (:func:`planner.voyage.scrubbing.served_groups`) get the
plan's own fuel choice (:func:`planner.voyage.fuel_choice.choose_fuels`) on the
route check's stretches cut where the scrubber's availability changes, with its
``max_sulphur_pct`` as the limit where it is available
(:func:`planner.voyage.scrubbing.scrubbed_stretches`), among the fuels every one
of their valves can select. Their runs and changes are then made as the
whole ship's (:mod:`planner.voyage.plan`): the same latest-start search, time
margin, stay-compliant rule and flushing targets.

A change of served circuits is for one of these boundaries (:attr:`Change.event`):

- a planned outage (the voyage file's): ``scrubber_out_of_service``, compliant by
  its moment (a clock deadline, like an area coming into force);
  ``scrubber_in_service`` when it ends (commenced at its moment);
- a washwater discharge zone the scrubber cannot work in: ``zone_enter`` /
  ``zone_exit`` with the zone as the area (a crossing of the zone's boundary, a
  place the ship reaches);
- a leg on which a served engine's load is outside the scrubber's load range
  (:mod:`planner.voyage.scrubber_load`): ``load_out_of_range`` before it (compliant
  before the ship reaches the leg's start, a place like an area's entry),
  ``load_in_range`` where the load is back within the range; the area is the one
  whose limit the circuits then meet;
- else what the whole ship's change would be (an area's boundary or date, the global
  cap, a departure).

Distances are metres along the route; moments epoch seconds (``*_epoch_s``:
seconds since 1970-01-01 UTC).
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import replace

from geo.compliance import RouteCheck
from planner.fuels import Fuel
from planner.ship.scrubbers import Scrubber
from planner.ship.system import FuelSystem
from planner.voyage.fuel_choice import FuelChoice, choose_fuels
from planner.voyage.runs import (
    LOAD_IN,
    LOAD_OUT,
    SCRUBBER_BACK,
    SCRUBBER_OUT,
    ZONE_ENTER,
    ZONE_EXIT,
    Change,
)
from planner.voyage.scrubber_events import ScrubberOutage, ZonePassage
from planner.voyage.scrubbing import Availability, piece_at, scrubbed_stretches
from planner.voyage.timeline import Timeline

LOAD_EVENTS = (LOAD_OUT, LOAD_IN)
"""The served circuits' boundary events of the load range (places, not clock moments)."""

_SAME_S = 1.0  # a boundary is an outage's moment within 1 s
_SAME_M = 1.0  # a boundary is a zone's or a crossing's within 1 m


def valve_fuels(system: FuelSystem, circuits: Sequence[str], fuels: Sequence[Fuel]) -> list[Fuel]:
    """The fuels of ``fuels`` that every circuit's changeover valve can select (a tank of
    it holds mostly that fuel), in the given order.

    Parameters
    ----------
    system : FuelSystem
        The ship as she sails the voyage.
    circuits : sequence of str
        The circuits.
    fuels : sequence of Fuel
        The fuels on board.
    """
    def main_fuel(tank: str) -> str:
        return max(system.tanks[tank].content_m3.items(), key=lambda kv: kv[1])[0]

    return [f for f in fuels
            if all(any(main_fuel(t) == f.name for t in system.circuits[c].tanks)
                   for c in circuits)]


def served_choices(check: RouteCheck, timeline: Timeline, scrubber: Scrubber,
                   pieces: Sequence[Availability], fuels: Sequence[Fuel], choice_margin: float,
                   file: str) -> list[FuelChoice]:
    """The served circuits' fuel on every piece of the route (see the module notes).

    Parameters
    ----------
    check : RouteCheck
        The route check (its stretches and limits).
    timeline : Timeline
        The voyage's timeline.
    scrubber : Scrubber
        The scrubber serving the circuits.
    pieces : sequence of Availability
        Its availability along the route (:func:`planner.voyage.scrubbing.availability`).
    fuels : sequence of Fuel
        The fuels the circuits' valves can select (:func:`valve_fuels`).
    choice_margin : float [-]
        The voyage's fuel-choice margin.
    file : str
        The voyage file (named by the error when no fuel meets a piece's limit).
    """
    stretches = scrubbed_stretches(check.stretches, pieces, scrubber, timeline)
    out = []
    for c, p in zip(choose_fuels(stretches, fuels, choice_margin, file), pieces, strict=True):
        if p.mode is not None:
            why = (f"{c.fuel.name} ({c.fuel.sulphur_pct:.3f} %) is the highest-sulphur fuel on "
                   f"board within scrubber {scrubber.name}'s {scrubber.max_sulphur_pct:.2f} % "
                   f"(available here, {p.why})")
        else:
            why = f"{c.reason} (scrubber {scrubber.name} not available here: {p.why})"
        out.append(replace(c, reason=why))
    return out


def served_event(ch: Change, check: RouteCheck, timeline: Timeline, scrubber: Scrubber,
                 pieces: Sequence[Availability], passages: Sequence[ZonePassage],
                 outages: Sequence[ScrubberOutage]) -> Change:
    """A served change with what its boundary is (see the module notes); a change whose
    boundary is the whole ship's kind is returned as it is (its event set later, as the
    whole ship's).

    Parameters
    ----------
    ch : Change
        The change of the served circuits.
    check : RouteCheck
        The route check (its crossings).
    timeline : Timeline
        The voyage's timeline (where an outage's moment is on the route).
    scrubber : Scrubber
        The scrubber serving the circuits.
    pieces : sequence of Availability
        Its availability along the route.
    passages : sequence of ZonePassage
        The route's passages through discharge zones.
    outages : sequence of ScrubberOutage
        The voyage file's outages.
    """
    if ch.before_departure or ch.area == "departure":
        return ch
    down = ch.direction == "to_compliant"
    sched = timeline.schedule
    for o in (o for o in outages if o.scrubber == scrubber.name):
        moment = o.from_epoch_s if down else o.until_epoch_s
        if moment is None:
            continue
        where = float(sched.distance_at_epoch([moment])[0])
        if abs(moment - ch.boundary_epoch_s) < _SAME_S or abs(where - ch.boundary_m) < _SAME_M:
            return replace(ch, event=SCRUBBER_OUT if down else SCRUBBER_BACK)
    if any(abs(tc.crossing.distance_m - ch.boundary_m) < _SAME_M for tc in check.crossings):
        return ch  # an area's boundary: the whole ship's kind
    side = piece_at(pieces, ch.boundary_m + (_SAME_M if down else -_SAME_M))
    for p in passages:
        edge = p.from_m if down else p.to_m
        if abs(edge - ch.boundary_m) < _SAME_M and (not down or side.mode is None):
            return replace(ch, area=p.zone, event=ZONE_ENTER if down else ZONE_EXIT)
    other = piece_at(pieces, ch.boundary_m - (_SAME_M if down else -_SAME_M))
    if side.out_of_range and not other.out_of_range:  # side: the compliant one
        return replace(ch, event=LOAD_OUT if down else LOAD_IN)
    return ch
