"""The plan as plain data: the ``--json`` contract, GeoJSON, and what the tables print.

Keys follow docs/json-contract.md; keys may be added, never renamed.
Every time is given in UTC (ISO 8601, ``Z``) and in ship's time with its
offset; positions in decimal degrees (tables show degrees and minutes).
"""

from __future__ import annotations

from geo.area import Area
from geo.ellipsoid import NM_M
from planner.common.timefmt import format_offset, iso_utc
from planner.voyage.emission_ratio import ServedRatio, plan_ratios, served_ratios
from planner.voyage.fuel_choice import FuelChoice, regular_fuel
from planner.voyage.plan import Plan
from planner.voyage.quantities import so2_by_area, sulphur_by_area
from planner.voyage.route_report import force_event_rows
from planner.voyage.scrubbing_plan import not_relied_reasons

CAUTIONS = (
    "Advisory only: the engine and boiler makers' instructions and the ship's safety "
    "management system come first.",
    "A changeover can cause loss of propulsion or power: avoid starting one in confined or "
    "congested waters, traffic lanes or pilotage areas, and keep the engine room manned.",
    "Check the compatibility of the fuels before mixing them.",
    "Official area boundaries and limits are those in MARPOL Annex VI and national law; "
    "check the area files against them.",
)
"""The plan's cautions, always printed ([MARPOL-VI]; [USCG-MSA-03-09] on loss of propulsion)."""

SAMPLE_CAUTION = ("The sample areas (areas_sample/) are fictional, drawn for the demo only: "
                  "they are not legal boundaries.")
"""Added when any area loaded is one of the sample's (:func:`is_sample_area`)."""

SAMPLE_SOURCE = "changeover demo scenario"
"""The ``source`` property every sample area file carries (``areas_sample/*.geojson``)."""


def is_sample_area(area: Area) -> bool:
    """Whether an area is one of the fictional sample's: its GeoJSON ``source`` property
    starts with :data:`SAMPLE_SOURCE`.

    Parameters
    ----------
    area : Area
        A loaded area.
    """
    return area.source.strip().lower().startswith(SAMPLE_SOURCE)


def plan_cautions(plan: Plan) -> list[str]:
    """The cautions of a plan: :data:`CAUTIONS`, and :data:`SAMPLE_CAUTION` when it uses a
    sample area.

    Parameters
    ----------
    plan : Plan
        The plan.
    """
    out = list(CAUTIONS)
    if any(is_sample_area(t.area) for t in plan.check.tracks):
        out.append(SAMPLE_CAUTION)
    return out


def _ship_time(plan: Plan, epoch_s: float | None) -> str | None:
    """Ship's time of a moment (seconds since 1970-01-01 UTC), to the minute with its offset."""
    if epoch_s is None:
        return None
    utc = plan.timeline.utc(epoch_s)
    tz = plan.voyage.ship_tz_at(utc)
    return utc.astimezone(tz).strftime("%Y-%m-%dT%H:%M") + format_offset(tz)


def _point(plan: Plan, epoch_s: float | None) -> tuple[float | None, float | None]:
    """``(lat, lon)`` in degrees of the ship at a moment (seconds since 1970-01-01 UTC)."""
    if epoch_s is None:
        return None, None
    lat, lon, _ = plan.timeline.position(epoch_s)
    return lat, lon


def changeover_rows(plan: Plan) -> list[dict]:
    """One row per circuit and changeover, in time order (the contract's keys and more).

    Parameters
    ----------
    plan : Plan
        The plan.

    Returns
    -------
    list of dict
        Times as ISO 8601 UTC (``*_utc``) and ship's time, positions in degrees
        (WGS84), ``boundary_nm`` in nautical miles, ``margin_h`` and
        ``duration_h`` in hours, sulphur in % m/m, viscosity in cSt.
    """
    rows = []
    for n, ch in enumerate(plan.changes, start=1):
        blat, blon, _ = plan.timeline.position(ch.boundary_epoch_s)
        for part in ch.circuits:
            start, done = part.start_epoch_s, part.done_epoch_s
            slat, slon = _point(plan, start)
            dlat, dlon = _point(plan, done)
            down = ch.direction == "to_compliant"
            compliant = done if down else None
            margin = (ch.boundary_epoch_s - done) / 3600.0 if down and done else 0.0
            st = part.study
            rows.append({
                "number": n,
                "area": ch.area,
                "circuit": part.circuit,
                "direction": ch.direction,
                "from_fuel": part.from_fuel,
                "to_fuel": part.to_fuel,
                "from_tank": part.from_tank,
                "to_tank": part.to_tank,
                "limit_pct": ch.limit_pct,
                "target_pct": ch.target_pct if down else None,
                "start_utc": iso_utc(plan.timeline.utc(start)),
                "start_ship_time": _ship_time(plan, start),
                "start_lat": slat,
                "start_lon": slon,
                "compliant_utc": iso_utc(plan.timeline.utc(compliant)) if compliant else None,
                "compliant_ship_time": _ship_time(plan, compliant),
                "compliant_lat": dlat if down else None,
                "compliant_lon": dlon if down else None,
                "complete_utc": (iso_utc(plan.timeline.utc(done))
                                 if done is not None else None),
                "complete_lat": dlat,
                "complete_lon": dlon,
                "at_limit_utc": (iso_utc(plan.timeline.utc(part.at_limit_epoch_s))
                                 if part.at_limit_epoch_s is not None else None),
                "boundary_utc": iso_utc(plan.timeline.utc(ch.boundary_epoch_s)),
                "boundary_ship_time": _ship_time(plan, ch.boundary_epoch_s),
                "boundary_lat": blat,
                "boundary_lon": blon,
                "boundary_nm": ch.boundary_m / NM_M,
                "margin_h": margin,
                "duration_h": part.duration_h,
                "before_departure": ch.before_departure,
                "boundary_event": ch.boundary_event,
                "clock_deadline": ch.clock_deadline,
                "min_viscosity_cst": st.min_viscosity_cst if st.paths else None,
                "max_viscosity_cst": st.max_viscosity_cst if st.paths else None,
            })
    return rows


def plan_json(plan: Plan) -> dict:
    """The ``changeover plan --json`` document.

    Parameters
    ----------
    plan : Plan
        The plan.

    Returns
    -------
    dict
        The documented keys (docs/json-contract.md): times ISO 8601 UTC,
        distances nm, masses t, volumes m³ at 15 °C, SO₂ kg, sulphur % m/m.
    """
    q = plan.quantities
    regular = regular_fuel(plan.choices)
    needs = q.needs
    total = q.totals_t
    have = q.on_board_t
    # the fuels chosen for stretches inside an area (not "all but the regular one": a voyage
    # that never leaves an area burns only its compliant fuel)
    compliant = {c.fuel.name for c in plan.choices if c.stretch.areas}
    so2 = q.so2
    port = q.so2_alongside
    so2_all = list(so2) + ([port] if port is not None else [])
    sched = plan.timeline.schedule
    return {
        "voyage": {
            "name": plan.voyage.name,
            "file": plan.voyage.file,
            "ship": plan.system.ship.name,
            "imo": plan.system.ship.imo,
            "route": plan.check.path.route.name,
            "distance_nm": plan.check.path.length_nm,
            "depart_utc": iso_utc(sched.depart_utc),
            "arrive_utc": iso_utc(sched.arrive_utc),
            "ship_utc_offset": format_offset(plan.voyage.ship_tz),
            "time_margin_h": plan.voyage.time_margin_h,
            "sulphur_target_fraction": plan.voyage.sulphur_target_fraction,
            "fuel_choice_margin": plan.voyage.fuel_choice_margin,
            "min_time_on_regular_h": plan.voyage.min_time_on_regular_h,
        },
        "port": _port(plan),
        "changeovers": changeover_rows(plan),
        "force_events": force_event_rows(plan.check),
        "stretches": [
            {"from_nm": c.stretch.from_nm, "to_nm": c.stretch.to_nm,
             "limit_pct": c.stretch.limit_pct, "areas": list(c.stretch.areas),
             "fuel": _run_fuel(plan, c.stretch.from_m), "fuel_choice": _why(plan, c),
             "from_utc": iso_utc(c.stretch.from_utc), "to_utc": iso_utc(c.stretch.to_utc),
             **r.json(),  # the emission ratio (planner.voyage.emission_ratio)
             "scrubbed": [x.json() for x in served]}
            for c, r, served in zip(plan.choices, plan_ratios(plan.choices, plan.runs),
                                    _served_ratios(plan), strict=True)
        ],
        "fuel_needed": [
            {"fuel": n.fuel, "from_utc": iso_utc(plan.timeline.utc(n.from_epoch_s)),
             "to_utc": iso_utc(plan.timeline.utc(n.to_epoch_s)), "mass_t": n.mass_t,
             "volume_m3_15c": n.volume_m3, "circuit": n.circuit, "alongside_h": n.alongside_h}
            for n in needs if n.mass_t > 0
        ],
        "fuel_totals": {f: {"needed_t": t, "on_board_t": have.get(f, 0.0),
                            "needed_m3_15c": t * 1000.0 / plan.system.fuels[f].density_kg_m3}
                        for f, t in total.items()},
        "compliant_fuel_needed_t": float(sum(total.get(f, 0.0) for f in compliant)),
        "compliant_fuel_on_board_t": float(sum(have.get(f, 0.0) for f in compliant)),
        "regular_fuel": regular.name,
        "so2": {
            "stretches": [{"from_nm": r.from_m / NM_M, "to_nm": r.to_m / NM_M,
                           "areas": list(r.areas), "fuel": r.fuel, "fuel_t": r.fuel_t,
                           "so2_kg": r.so2_kg, "so2_on_regular_kg": r.so2_regular_kg,
                           "sulphur_kg": r.sulphur_kg, "burnt_t": dict(r.burnt_t or {})}
                          for r in so2],
            "areas": {a: {"so2_kg": p, "so2_on_regular_kg": q,
                          "sulphur_kg": sulphur_by_area(so2_all).get(a, 0.0)}
                      for a, (p, q) in so2_by_area(so2_all).items()},
            "alongside": None if port is None else {
                "areas": list(port.areas), "hours": _alongside_hours(plan),
                "fuel": port.fuel, "fuel_t": port.fuel_t, "so2_kg": port.so2_kg,
                "so2_on_regular_kg": port.so2_regular_kg, "sulphur_kg": port.sulphur_kg},
            "total_kg": sum(r.so2_kg for r in so2_all),
        },
        **(scrubber_json(plan) if plan.system.scrubbers else {}),
        "notes": list(plan.notes),
        "no_changeover_reason": plan.no_changeover_reason,
        "warnings": [w.text for w in plan.warnings],
        "cautions": plan_cautions(plan),
    } | _shortfall(plan)


def _served_ratios(plan: Plan) -> list[list[ServedRatio]]:
    """Each stretch's served circuits relying on a scrubber, with their fuel's emission-ratio
    figures (:func:`planner.voyage.emission_ratio.served_ratios`)."""
    names = {s.scrubber.name: s.names for s in plan.scrubbed}
    return served_ratios(plan.choices, plan.scrubber_spans, plan.system.fuels, names)


def _shortfall(plan: Plan) -> dict:
    """``{"shortfall": ...}``: where the compliant fuel runs out and the alternatives, or
    None when there is enough (:mod:`planner.voyage.shortfall_report`)."""
    from planner.voyage.shortfall_report import shortfall_json

    return {"shortfall": shortfall_json(plan)}


def _alongside_hours(plan: Plan) -> float:
    """The hours alongside after arrival the plan counts, h."""
    return plan.timeline.port.arrival_hours if plan.timeline.port is not None else 0.0


def _port(plan: Plan) -> dict:
    """The port state the plan used: loads and rates alongside, hours after arrival."""
    port = plan.timeline.port
    if port is None:
        return {}
    return {"departure_load_pct": dict(port.departure_load_pct),
            "departure_iso_t_h": dict(port.departure_iso_t_h),
            "arrival_iso_t_h": dict(port.arrival_iso_t_h),
            "arrival_hours": port.arrival_hours,
            "departure_fuel": dict(port.departure_fuel)}


def _why(plan: Plan, choice: FuelChoice) -> str:
    """Why the stretch burns its fuel: the choice, or the plan's note for staying compliant."""
    fuel = _run_fuel(plan, choice.stretch.from_m)
    if fuel == choice.fuel.name:
        return choice.reason
    stay = [n for n in plan.notes if n.startswith(f"Stay on {fuel} ")]
    return stay[0] if stay else choice.reason


def _run_fuel(plan: Plan, from_m: float) -> str:
    """The fuel of the run that a stretch starting at ``from_m`` (m) belongs to."""
    for r in plan.runs:
        if r.from_m - 1e-6 <= from_m < r.to_m - 1e-6 or (r is plan.runs[-1]):
            return r.fuel.name
    return plan.runs[-1].fuel.name


def plan_geojson(plan: Plan, doc: dict | None = None) -> dict:
    """The route check's GeoJSON plus each changeover's start, compliant and boundary points.

    Parameters
    ----------
    plan : Plan
        The plan.
    doc : dict, optional
        Its :func:`plan_json` document, if already made (with any uncertainty rows).
    """
    from planner.voyage.route_report import route_geojson

    gj = route_geojson(plan.check)
    for row in (doc or plan_json(plan))["changeovers"]:
        for kind in ("start", "compliant", "boundary"):
            lat, lon = row.get(f"{kind}_lat"), row.get(f"{kind}_lon")
            if lat is None:
                continue
            gj["features"].append({
                "type": "Feature",
                "geometry": {"type": "Point", "coordinates": [lon, lat]},
                "properties": {"kind": f"changeover_{kind}", "number": row["number"],
                               "area": row["area"], "circuit": row["circuit"],
                               "direction": row["direction"], "time_utc": row[f"{kind}_utc"]},
            })
    for e in (doc or plan_json(plan)).get("scrubber_events", []):
        gj["features"].append({
            "type": "Feature",
            "geometry": {"type": "Point", "coordinates": [e["lon"], e["lat"]]},
            "properties": {"kind": "scrubber_event", "number": e["number"],
                           "scrubber": e["scrubber"], "event": e["event"], "mode": e["mode"],
                           "time_utc": e["utc"], "distance_nm": e["distance_nm"],
                           "reason": e["reason"]},
        })
    return gj


def scrubber_json(plan: Plan) -> dict:
    """The plan's scrubber keys: ``scrubbers`` (each with the circuits it serves whole),
    ``scrubber_spans`` and ``scrubber_events`` (numbered from 1, in time order); each
    scrubber's ``not_relied_on`` says why the plan relies on it nowhere (null when it does
    somewhere, :func:`planner.voyage.scrubbing_plan.not_relied_reasons`). The plan's
    document carries them only when the ship file has a scrubber (a plan without one is
    byte for byte as before).

    Parameters
    ----------
    plan : Plan
        The plan.

    Returns
    -------
    dict
        Times ISO 8601 UTC (``*_utc``) and ship's time, positions in degrees (WGS84),
        distances nm, durations h, sulphur % m/m, SO₂ kg (a span's served circuits: formed,
        and after cleaning at most, :func:`planner.voyage.scrubbing_spans.span_so2`).
    """
    t = plan.timeline
    why_not = not_relied_reasons(plan.system, plan.scrubbed)
    scrubbers = [{"name": s.name, "consumers": list(s.consumers),
                  "circuits": [c for g in plan.scrubbed if s.name in g.names
                               for c in g.circuits],
                  "mode": s.mode_word, "max_sulphur_pct": s.max_sulphur_pct,
                  "min_load_pct": s.min_load_pct, "max_load_pct": s.max_load_pct,
                  "load_range_applied": True, "approval": s.approval,
                  "not_relied_on": why_not.get(s.name)}
                 for s in plan.system.scrubbers.values()]
    spans = []
    for x, (formed, cleaned) in zip(plan.scrubber_spans, plan.scrubber_so2_kg, strict=True):
        (alat, alon), (blat, blon) = _point(plan, x.from_epoch_s), _point(plan, x.to_epoch_s)
        spans.append({"scrubber": x.scrubber, "circuits": list(x.circuits), "fuel": x.fuel,
                      "fallback_fuel": x.fallback_fuel, "limit_pct": x.limit_pct,
                      "mode": x.mode, "from_nm": x.from_m / NM_M, "to_nm": x.to_m / NM_M,
                      "from_utc": iso_utc(t.utc(x.from_epoch_s)),
                      "to_utc": iso_utc(t.utc(x.to_epoch_s)),
                      "from_ship_time": _ship_time(plan, x.from_epoch_s),
                      "to_ship_time": _ship_time(plan, x.to_epoch_s),
                      "from_lat": alat, "from_lon": alon, "to_lat": blat, "to_lon": blon,
                      "areas": list(x.areas), "duration_h": x.duration_h,
                      "so2_formed_kg": formed, "so2_after_cleaning_max_kg": cleaned})
    events = []
    for n, e in enumerate(plan.scrubber_events, start=1):
        lat, lon = _point(plan, e.epoch_s)
        events.append({"number": n, "scrubber": e.scrubber, "event": e.kind, "mode": e.mode,
                       "utc": iso_utc(t.utc(e.epoch_s)), "ship_time": _ship_time(plan, e.epoch_s),
                       "lat": lat, "lon": lon, "distance_nm": e.distance_m / NM_M,
                       "reason": e.reason})
    return {"scrubbers": scrubbers, "scrubber_spans": spans, "scrubber_events": events}
