"""When the ship stays on compliant fuel between two areas instead of switching back.

A switch back after an area's exit is dropped, and the ship stays on the
compliant fuel until the next area, when

- the switch back would not complete before the next changeover to compliant
  fuel must start, or
- it would leave the ship fully on regular fuel for less than the voyage's
  minimum time on regular fuel (``[margins] min_time_on_regular_h``, default
  :data:`~planner.voyage.voyage_file.DEFAULT_MIN_TIME_ON_REGULAR_H`): two
  changeovers, each with the loss-of-propulsion risk operators are warned
  about ([USCG-MSA-03-09] [P]), are not worth a few hours of cheaper fuel.

The note says why, and what staying costs: the compliant fuel burnt between
the exit (where the switch back would have been commenced) and the next
changeover's start, circuit by circuit, instead of the regular fuel
(:meth:`planner.voyage.timeline.Timeline.burnt_t`). Moments are epoch seconds
(``*_epoch_s``: seconds since 1970-01-01 UTC).
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import replace

from geo.schedule import from_epoch
from planner.common.timefmt import format_utc
from planner.ship.system import FuelSystem
from planner.voyage.flush_cache import FlushCache
from planner.voyage.runs import Change, Run, changes_between, merge_same_fuel, simulated
from planner.voyage.timeline import Timeline
from planner.voyage.voyage_file import Voyage


def extra_compliant_t(timeline: Timeline, back: Change, fwd: Change) -> float:
    """Compliant fuel burnt by staying on it from the switch back's start to the next
    changeover's start, every circuit, t.

    Parameters
    ----------
    timeline : Timeline
        The voyage's timeline (consumption against time).
    back : Change
        The switch back that would be dropped.
    fwd : Change
        The next changeover to compliant fuel.
    """
    fuels = timeline.system.fuels
    total = 0.0
    for part in back.circuits:
        nxt = next((c for c in fwd.circuits if c.circuit == part.circuit), None)
        end = nxt.start_epoch_s if nxt is not None else fwd.boundary_epoch_s
        consumers = timeline.system.circuits[part.circuit].consumers
        total += timeline.burnt_t(part.start_epoch_s, end, fuels[part.from_fuel], consumers)
    return total


def needless_switch_back(changes: Sequence[Change], timeline: Timeline,
                         min_regular_h: float) -> tuple[int, str] | None:
    """The first switch back to drop: ``(index of the switch back in changes, why)``, or None.

    Parameters
    ----------
    changes : sequence of Change
        The changes between the plan's runs, in time order (change k lies between runs
        k and k + 1).
    timeline : Timeline
        The voyage's timeline.
    min_regular_h : float [h]
        The minimum time fully on regular fuel between a switch back's completion and the
        next changeover's start.
    """
    for k in range(len(changes) - 1):
        back, fwd = changes[k], changes[k + 1]
        if back.direction != "to_regular" or fwd.direction != "to_compliant":
            continue
        done = [c.done_epoch_s for c in back.circuits]
        next_start = min(c.start_epoch_s for c in fwd.circuits)
        fuel = back.circuits[0].from_fuel
        regular = back.circuits[0].to_fuel
        end = max((d for d in done if d is not None), default=None)
        head = f"Stay on {fuel} from the exit of {back.area} to {fwd.area}: "
        if any(d is None for d in done) or max(done) > next_start:  # type: ignore[type-var]
            why = (f"switching back would complete at {format_utc(_utc(end))} but the next "
                   f"changeover must start by {format_utc(_utc(next_start))}")
        elif (next_start - end) / 3600.0 < min_regular_h:  # type: ignore[operator]
            why = (f"switching back would leave the ship fully on {regular} for only "
                   f"{(next_start - end) / 3600.0:.1f} h (complete at "  # type: ignore[operator]
                   f"{format_utc(_utc(end))}, next changeover by "
                   f"{format_utc(_utc(next_start))}), less than the minimum "
                   f"{min_regular_h:g} h on regular fuel ([margins] min_time_on_regular_h)")
        else:
            continue
        extra = extra_compliant_t(timeline, back, fwd)
        return k, f"{head}{why}; staying costs about {extra:.1f} t more {fuel}."
    return None


def _utc(epoch_s: float | None):
    return None if epoch_s is None else from_epoch(epoch_s)


def group_plan(flushes: FlushCache, system: FuelSystem, timeline: Timeline, voyage: Voyage,
                runs: list[Run], circuits: tuple[str, ...] | None
                ) -> tuple[list[Run], list[Change], list[str]]:
    """The runs and changes of ``circuits`` (None: every circuit) after the stay-compliant
    rule, and its notes; no circuit: the runs as given, no change."""
    notes: list[str] = []
    if circuits is not None and not circuits:
        return runs, [], notes
    while True:
        changes = simulated(voyage, changes_between, flushes, system, timeline, voyage, runs,
                             circuits)
        stay = needless_switch_back(changes, timeline, voyage.min_time_on_regular_h)
        if stay is None:
            return runs, changes, notes
        k, why = stay
        keep = runs[k]
        runs[k + 1] = replace(runs[k + 1], fuel=keep.fuel,
                              reasons=runs[k + 1].reasons + (why,))
        notes.append(why)
        runs = merge_same_fuel(runs)
