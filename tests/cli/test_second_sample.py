"""``changeover plan`` end to end on the second sample voyage (fictional, areas_sample/).

``areas_sample/skarvik_to_tarrow.toml``: MV Kestrel Bay departs Skarvik, inside the
Skarvik Basin ECA, with the boiler circuit already on mgo ([port] departure_fuel) and
the main circuit on vlsfo; the Tarrow Approaches ECA comes into force at 00:00 UTC on
2027-06-12 while she is inside it; she stays 18 h alongside at Port Tarrow, inside it.
The rules: MARPOL Annex VI regulation 14 ([MARPOL-VI] [P]: on compliant fuel before
departure inside an area; the limit in force from the area's date), the plan's stated
rules (README: port state, fuel choice, in-force events). Positions are checked with
GeographicLib's RhumbSolve and GeodSolve ([KARNEY-RHUMB], [KARNEY-2013]).
"""

from __future__ import annotations

import json
import subprocess
import sys
from datetime import datetime, timedelta

import pytest

from tests.helpers.geo import gap_m, geodsolve_direct, geodsolve_inverse, rhumbsolve_inverse
from tests.helpers.paths import ROOT

VOYAGE = ROOT / "areas_sample" / "skarvik_to_tarrow.toml"
NM_M = 1852.0  # [NM-1852] exact [P]


def t(text: str) -> datetime:
    return datetime.fromisoformat(text.replace("Z", "+00:00"))


@pytest.fixture(scope="module")
def doc(tmp_path_factory):
    out = tmp_path_factory.mktemp("second")
    r = subprocess.run([sys.executable, "-m", "planner", "plan", str(VOYAGE), "--json",
                        "--pdf", str(out / "plan.pdf"), "--geojson", str(out / "plan.geojson")],
                       cwd=ROOT, capture_output=True, text=True, timeout=300)
    assert r.returncode == 0, r.stderr
    assert (out / "plan.pdf").read_bytes()[:5] == b"%PDF-"
    return json.loads(r.stdout)


def test_departs_inside_flushes_the_main_circuit_alongside(doc):
    first = doc["changeovers"][0]
    assert (first["circuit"], first["before_departure"], first["boundary_event"]) == (
        "main", True, "departure")
    assert first["boundary_utc"] == doc["voyage"]["depart_utc"] == "2027-06-10T17:00:00Z"
    # compliant 1 h (the margin) before departure; the boiler was on mgo in port
    assert t(first["compliant_utc"]) == t(first["boundary_utc"]) - timedelta(hours=1)
    assert [r["circuit"] for r in doc["changeovers"] if r["number"] == first["number"]] == [
        "main"]
    assert doc["port"]["departure_fuel"] == {"boiler": "mgo"}
    assert doc["port"]["departure_load_pct"]["main_engine"] == 0.0
    (warn,) = [w for w in doc["warnings"] if "departs inside" in w]
    assert "Skarvik Basin ECA" in warn and "main_engine stopped, dg1 90 %, dg2 90 %" in warn


def test_the_legal_vlsfo_is_burnt_between_the_areas(doc):
    # 0.48 % by its delivery note, within the 0.50 % global cap ([MARPOL-VI] reg. 14 [P])
    fuels = [(s["areas"], s["fuel"]) for s in doc["stretches"]]
    assert fuels == [(["Skarvik Basin ECA"], "mgo"), ([], "vlsfo"),
                     (["Tarrow Approaches ECA"], "mgo")]


@pytest.mark.requires_rhumbsolve
@pytest.mark.requires_geodsolve
def test_the_area_comes_into_force_on_the_clock_where_the_ship_is(doc):
    (ev,) = doc["force_events"]
    assert (ev["area"], ev["event"], ev["time_utc"]) == (
        "Tarrow Approaches ECA", "comes_into_force", "2027-06-12T00:00:00Z")
    # where she is 31 h after the 17:00Z departure on 06-10, by hand: leg 1 rhumb at 10 kn, leg 2
    # rhumb at 14 kn (RhumbSolve lengths), then along the leg 3 great circle at 14 kn
    # (GeodSolve direct from Basin East on the geodesic to Tarrow Bank)
    pts = [(-38.5, -168.0), (-38.6, -(167 + 20 / 60)), (-(38 + 10 / 60), -163.0),
           (-(37 + 20 / 60), -157.0)]
    _, d1 = rhumbsolve_inverse(*pts[0], *pts[1])
    _, d2 = rhumbsolve_inverse(*pts[1], *pts[2])
    rest_h = 31.0 - d1[0] / NM_M / 10.0 - d2[0] / NM_M / 14.0
    azi, _, _ = geodsolve_inverse(*pts[2], *pts[3])
    lat, lon, _ = geodsolve_direct(*pts[2], azi[0], rest_h * 14.0 * NM_M)
    assert ev["leg"] == 3
    assert float(gap_m(ev["lat"], ev["lon"], lat[0], lon[0])) < 1.0
    # the changeover for it is for that moment, not an entry at a position: compliant 1 h
    # before it; the boundary crossing (before the date) stays a crossing
    rows = [r for r in doc["changeovers"] if r["area"] == "Tarrow Approaches ECA"]
    assert {r["circuit"] for r in rows} == {"main", "boiler"}
    for r in rows:
        assert (r["direction"], r["boundary_event"], r["clock_deadline"]) == (
            "to_compliant", "comes_into_force", True)
        assert r["boundary_utc"] == "2027-06-12T00:00:00Z"
        assert t(r["compliant_utc"]) <= t("2027-06-11T23:00:00Z")
        assert abs(r["boundary_lat"] - ev["lat"]) < 1e-9


def test_the_hours_alongside_at_the_arrival_are_on_compliant_fuel(doc):
    last = {r["circuit"]: r for r in doc["fuel_needed"]}  # each circuit's last valve period
    arrive = t(doc["voyage"]["arrive_utc"])
    for circuit in ("main", "boiler"):
        assert last[circuit]["fuel"] == "mgo" and last[circuit]["alongside_h"] == 18.0
        assert abs((t(last[circuit]["to_utc"]) - arrive).total_seconds() - 18 * 3600) <= 1.0
    assert doc["no_changeover_reason"] is None
    assert any("sample areas" in c and "fictional" in c for c in doc["cautions"])
