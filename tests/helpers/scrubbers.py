"""A sample plan that relies on a scrubber, for the tests of the plan's outputs.

The sample voyage (areas_sample/voyage.toml, fictional) with scrubber spans and
events put in by hand at distances along its own route and at the moments its
own schedule gives there (``Schedule.epoch_at``), as the plan would hold them:
scrubber ``EGCS 1`` serving circuit ``main`` on a fictional ``hsfo``; open loop,
closed loop through a fictional washwater zone, open loop again, stopped
inside Meridian Reach ECA. Not a conftest: a plain module the tests import.
"""

from __future__ import annotations

import dataclasses

from planner.voyage.scrubber_events import ScrubberEvent, ScrubberSpan
from tests.helpers.paths import ROOT

VOYAGE = ROOT / "areas_sample" / "voyage.toml"
SCRUBBER = "EGCS 1"
ZONE = "Tarn Roads washwater zone"
# where the spans begin and end, metres along the sample route (its length is 2 258 787 m;
# Corran Sea ECA is entered at 345 930 m, Meridian Reach ECA left at 1 561 585 m)
START_M, CLOSED_M, OPEN_M, STOP_M = 60_000.0, 700_000.0, 900_000.0, 1_500_000.0
EVENTS = (("start", "open", START_M, "main to hsfo after leaving Port Aldmere"),
          ("mode_change", "closed", CLOSED_M, f"enter {ZONE} (closed loop only)"),
          ("mode_change", "open", OPEN_M, f"leave {ZONE}"),
          ("stop", None, STOP_M, "main back on mgo inside Meridian Reach ECA"))


def scrubbed(plan):
    """``plan`` with the spans and events above (a copy: :func:`dataclasses.replace`)."""
    sched = plan.timeline.schedule

    def at(m: float) -> float:
        return float(sched.epoch_at([m])[0])

    def span(mode: str, a: float, b: float, limit: float, areas: tuple[str, ...]):
        return ScrubberSpan(SCRUBBER, ("main",), "hsfo", "mgo" if limit < 0.5 else "vlsfo",
                            limit, mode, a, b, at(a), at(b), areas)

    spans = (span("open", START_M, CLOSED_M, 0.10, ("Corran Sea ECA",)),
             span("closed", CLOSED_M, OPEN_M, 0.10, (ZONE,)),
             span("open", OPEN_M, STOP_M, 0.10, ("Meridian Reach ECA",)))
    events = tuple(ScrubberEvent(SCRUBBER, kind, mode, at(m), m, why)
                   for kind, mode, m, why in EVENTS)
    # the SO₂ of each span is not what these tests read: none is claimed (0 kg)
    return dataclasses.replace(plan, scrubber_spans=spans, scrubber_events=events,
                               scrubber_so2_kg=tuple((0.0, 0.0) for _ in spans))
