"""A hand-made scrubber span on the sample voyage, for the scrubber-trip output tests.

Built by hand over Meridian Reach ECA (areas_sample, fictional) so that two circuits share a
span (the egcs sample's own spans, ``Plan.scrubber_spans``, serve main only): both circuits
on vlsfo with mgo as the fallback, from 20 km before the entry to the exit.
"""

from __future__ import annotations

from functools import lru_cache

from tests.helpers.paths import ROOT

BEFORE_M = 20_000.0


@lru_cache(maxsize=1)
def sample_trip():
    """``(plan, span, leads, doc)`` of the sample voyage and the hand-made span."""
    from planner.voyage.run import build_plan
    from planner.voyage.scrubber_events import ScrubberSpan
    from planner.voyage.scrubber_trip import plan_trip_leads
    from planner.voyage.scrubber_trip_json import trip_json

    plan = build_plan(ROOT / "areas_sample" / "voyage.toml")
    st = next(s for s in plan.check.stretches if s.areas == ("Meridian Reach ECA",))
    a, b = (float(x) for x in plan.timeline.schedule.epoch_at([st.from_m - BEFORE_M,
                                                                st.to_m]))
    span = ScrubberSpan("egcs", ("main", "boiler"), "vlsfo", "mgo", 0.10, "open",
                        st.from_m - BEFORE_M, st.to_m, a, b, st.areas)
    leads = plan_trip_leads(plan, [span])
    return plan, span, leads, trip_json(plan, leads)
