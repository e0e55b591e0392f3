"""The scrubber-trip leads as a JSON document: the one the table and the chart show.

``{"scrubber_trip": {"step_h", "spans", "boundaries", "samples"}}``: every moment in
UTC (ISO 8601 to the second) and in ship's time (to the minute, with its offset),
every position in degrees (WGS84) and nautical miles along the route, every
duration in hours (None where the flush never gets the inlets to the target, with
the reason in ``problem``). See :mod:`planner.voyage.scrubber_trip`.
"""

from __future__ import annotations

from geo.ellipsoid import NM_M
from planner.common.timefmt import format_offset, iso_utc
from planner.voyage.plan import Plan
from planner.voyage.scrubber_trip import TripLead, TripLeads


def _ship_time(plan: Plan, epoch_s: float | None) -> str | None:
    """Ship's time of a moment (seconds since 1970-01-01 UTC), to the minute with its offset."""
    if epoch_s is None:
        return None
    utc = plan.timeline.utc(epoch_s)
    tz = plan.voyage.ship_tz_at(utc)
    return utc.astimezone(tz).strftime("%Y-%m-%dT%H:%M") + format_offset(tz)


def _utc(plan: Plan, epoch_s: float | None) -> str | None:
    return None if epoch_s is None else iso_utc(plan.timeline.utc(epoch_s))


def lead_row(plan: Plan, leads: TripLeads, lead: TripLead) -> dict:
    """One lead as a JSON object (the span's scrubber, fuels and limit with it).

    Parameters
    ----------
    plan : Plan
        The plan (its timeline and ship's time zones).
    leads : TripLeads
        The leads (their spans).
    lead : TripLead
        The lead.
    """
    span = leads.spans[lead.span]
    return {"scrubber": span.scrubber, "span": lead.span, "circuit": lead.circuit,
            "fuel": span.fuel, "fallback_fuel": span.fallback_fuel,
            "limit_pct": span.limit_pct, "target_pct": lead.target_pct, "kind": lead.kind,
            "utc": _utc(plan, lead.fail_epoch_s),
            "ship_time": _ship_time(plan, lead.fail_epoch_s),
            "lat": lead.lat, "lon": lead.lon, "distance_nm": lead.distance_m / NM_M,
            "time_to_compliant_h": lead.time_to_compliant_h,
            "out_of_compliance_h": lead.out_of_compliance_h,
            "compliant_utc": _utc(plan, lead.compliant_epoch_s),
            "compliant_ship_time": _ship_time(plan, lead.compliant_epoch_s),
            "problem": lead.problem}


def _longest(leads: TripLeads, span: int, circuit: str) -> TripLead | None:
    """The lead of the span and circuit with the longest time out of compliance, to the
    second, the earliest of equals (a lead that never completes counts as longest)."""
    got = leads.series(span, circuit)
    if not got:
        return None
    return max(got, key=lambda x: (x.out_of_compliance_h is None,
                                   round((x.out_of_compliance_h or 0.0) * 3600.0),
                                   -x.fail_epoch_s))  # to the second, the earliest


def trip_json(plan: Plan, leads: TripLeads) -> dict:
    """The scrubber-trip document.

    Parameters
    ----------
    plan : Plan
        The plan the leads are of.
    leads : TripLeads
        :func:`planner.voyage.scrubber_trip.trip_leads` of its spans.

    Returns
    -------
    dict
        ``{"scrubber_trip": {"step_h": f, "spans": [...], "boundaries": [...],
        "samples": [...]}}``; a span lists its circuits' longest time out of compliance
        (``worst``: the lead's row); a boundary row has ``area`` and ``event``
        (``enter``, ``inside_at_start``, ``comes_into_force``) before the lead's keys.
    """
    spans = []
    for i, s in enumerate(leads.spans):
        worst = [_longest(leads, i, c) for c in s.circuits]
        spans.append({"scrubber": s.scrubber, "circuits": list(s.circuits), "fuel": s.fuel,
                      "fallback_fuel": s.fallback_fuel, "limit_pct": s.limit_pct,
                      "mode": s.mode, "areas": list(s.areas),
                      "from_utc": _utc(plan, s.from_epoch_s),
                      "from_ship_time": _ship_time(plan, s.from_epoch_s),
                      "to_utc": _utc(plan, s.to_epoch_s),
                      "to_ship_time": _ship_time(plan, s.to_epoch_s),
                      "from_nm": s.from_m / NM_M, "to_nm": s.to_m / NM_M,
                      "worst": [lead_row(plan, leads, w) for w in worst if w is not None]})
    rows = [{"area": b.area, "event": b.event, **lead_row(plan, leads, b.lead)}
            for b in leads.boundaries]
    return {"scrubber_trip": {"step_h": leads.step_h, "spans": spans, "boundaries": rows,
                              "samples": [lead_row(plan, leads, x) for x in leads.samples]}}
