"""Item: the fuel for a stretch is judged by its delivery-note sulphur; the plan says why.

Constructed voyages (fictional, copied from ``tests/data/voyages`` into a temporary
folder and edited): the T1 ship (one stirred volume, fuels of equal density and
Q_net) due east along 50°N from 2°E to 6°E at 12 kn. The rule checked is MARPOL Annex
VI regulation 14 ([MARPOL-VI] [P]): the 0.50 % global cap from 2020-01-01 applies to
the fuel's sulphur content as the delivery note states it (regulation 18, [M]); a
0.48 % fuel is legal outside an ECA. Hand figures: the propeller law ([PROPELLER-LAW],
common practice) for the main engine's rate and the parallel arc on the ellipsoid
([WGS84] [D]) for the hours sailed (``tests.helpers.plan``).
"""

from __future__ import annotations

import shutil

import pytest

from geo.errors import InputError
from planner.voyage.fuel_choice import choose_fuels
from planner.voyage.report import SAMPLE_CAUTION
from planner.voyage.voyage_file import load_voyage
from tests.helpers.paths import ROOT
from tests.helpers.plan import VOYAGES, hours, mass_rate_t_h, parallel_m, plan_doc

HFO_048 = 'sulphur_pct = 0.48'  # a VLSFO near the cap, under the 0.50 % global cap


def voyage(tmp_path, base: str, *edits: tuple[str, str], extra: str = "",
           route: str | None = None):
    """A copy of ``tests/data/voyages/<base>.toml`` with its files, edited."""
    for f in VOYAGES.iterdir():
        if f.suffix in (".csv", ".geojson") or f.name.startswith("ship_"):
            shutil.copy(f, tmp_path / f.name)
    text = (VOYAGES / f"{base}.toml").read_text()
    for old, new in edits:
        assert old in text, old
        text = text.replace(old, new, 1)
    if route is not None:
        (tmp_path / "route.csv").write_text(route)
        text = text.replace('route = "parallel_east.csv"', 'route = "route.csv"')
    p = tmp_path / "v.toml"
    p.write_text(text + extra)
    return p


def test_a_legal_fuel_near_the_cap_is_burnt_outside_the_areas(tmp_path):
    # hfo at 0.48 %: under the 0.50 % cap by its delivery note, over 90 % of it (0.45 %);
    # the old rule used the flushing target fraction for the choice and burnt mgo throughout
    p = voyage(tmp_path, "future_before", ("sulphur_pct = 0.40", HFO_048))
    _, doc = plan_doc(p)
    assert [s["fuel"] for s in doc["stretches"]] == ["hfo"]
    assert doc["changeovers"] == []
    assert doc["fuel_totals"]["hfo"]["needed_t"] > 0 and "mgo" not in doc["fuel_totals"]
    assert not [w for w in doc["warnings"] if "passes it over" in w]
    assert "within the 0.50 % limit by its delivery note" in doc["stretches"][0]["fuel_choice"]
    # no changeover, and exactly why: the area is entered before it comes into force
    reason = doc["no_changeover_reason"]
    assert reason == ("No changeover: the route enters Future Five ECA (in force from "
                      "2030-07-01) only while it is not in force.")
    assert reason in doc["notes"]


def test_a_fuel_choice_margin_passes_the_legal_fuel_over_and_says_what_it_costs(tmp_path):
    p = voyage(tmp_path, "future_before", ("sulphur_pct = 0.40", HFO_048),
               ("sulphur_target_fraction = 0.9",
                "sulphur_target_fraction = 0.9\nfuel_choice_margin = 0.1"))
    plan, doc = plan_doc(p)
    assert doc["voyage"]["fuel_choice_margin"] == 0.1
    assert [s["fuel"] for s in doc["stretches"]] == ["mgo"]
    (warn,) = [w for w in plan.warnings if w.kind == "fuel_passed_over"]
    assert warn.text in doc["warnings"]
    # the cost by hand: the whole voyage on mgo, main engine at 12 kn (equal Q_net: the
    # mass rate is the same for both fuels), 2°E to 6°E
    extra = mass_rate_t_h(12.0) * hours(parallel_m(2.0, 6.0), 12.0)
    assert doc["fuel_totals"]["mgo"]["needed_t"] == pytest.approx(extra, rel=1e-9)
    assert warn.text.startswith("hfo (0.480 % by its delivery note) meets the 0.50 % limit")
    assert "fuel-choice margin 10 % passes it over" in warn.text
    assert f"{extra:.1f} t more mgo" in warn.text


def test_the_flushing_target_keeps_its_fraction(tmp_path):
    # the choice no longer uses the target fraction, the flush still does: closed_form with
    # hfo at 0.48 % still flushes to 0.9 × 0.10 % = 0.09 % before the 0.10 % area
    p = voyage(tmp_path, "future_after", ("sulphur_pct = 0.40", HFO_048))
    _, doc = plan_doc(p)
    (row,) = doc["changeovers"]
    assert row["target_pct"] == pytest.approx(0.09, abs=1e-12)
    assert [s["fuel"] for s in doc["stretches"]] == ["hfo", "mgo"]


def test_no_changeover_when_the_route_enters_no_area(tmp_path):
    route = "name,lat,lon,leg,speed_kn\nWest Point,50.0,2.0,,\nMid Point,50.0,4.0,rhumb,12.0\n"
    p = voyage(tmp_path, "future_after", route=route)
    _, doc = plan_doc(p)
    assert doc["changeovers"] == []
    assert doc["no_changeover_reason"] == (
        "No changeover: the route enters none of the areas (Future Five ECA).")


def test_no_changeover_when_the_fuel_meets_every_limit(tmp_path):
    # every tank holds mgo (0.05 %): it meets the 0.10 % area in force, so nothing changes
    p = voyage(tmp_path, "closed_form", ('[tank.hfo_service]\nfuel = "hfo"',
                                         '[tank.hfo_service]\nfuel = "mgo"'))
    _, doc = plan_doc(p)
    assert doc["changeovers"] == []
    assert doc["no_changeover_reason"] == (
        "No changeover: mgo (0.050 % by its delivery note) is burnt throughout and meets "
        "every limit on the route, the strictest 0.10 % in Meridian Five ECA.")


def test_a_plan_with_changeovers_has_no_reason():
    _, doc = plan_doc("closed_form")
    assert doc["no_changeover_reason"] is None


def test_no_fuel_for_a_stretch_names_the_limit_not_the_target(tmp_path):
    from geo.compliance import Stretch
    from planner.fuels import Fuel

    hfo = Fuel(name="hfo", grade="RMG 380", sulphur_pct=0.52, density_kg_m3=980.0,
               viscosity_cst=380.0, viscosity_ref_c=50.0)
    with pytest.raises(InputError) as e:
        choose_fuels([Stretch(0.0, 1852.0, 0.50, ())], [hfo], 0.0, "v.toml")
    assert "expected a fuel at or under the 0.50 % m/m limit" in str(e.value)


@pytest.mark.parametrize("key, value, place", [
    ("fuel_choice_margin", "0.6", "margins.fuel_choice_margin"),
    ("min_time_on_regular_h", "-1", "margins.min_time_on_regular_h"),
    ("fuel_choise_margin", "0.1", "margins.fuel_choise_margin"),
])
def test_bad_margins_are_refused(tmp_path, key, value, place):
    p = voyage(tmp_path, "closed_form", ("sulphur_target_fraction = 0.8",
                                         f"sulphur_target_fraction = 0.8\n{key} = {value}"))
    with pytest.raises(InputError) as e:
        load_voyage(p)
    assert f"v.toml: {place}:" in str(e.value)
    if key == "fuel_choise_margin":
        assert "did you mean 'fuel_choice_margin'?" in str(e.value)


def test_unknown_keys_in_the_voyage_tables_are_refused(tmp_path):
    p = voyage(tmp_path, "closed_form", ("speed_kn = 12.0", "speed_kts = 12.0"))
    with pytest.raises(InputError) as e:
        load_voyage(p)
    assert "v.toml: voyage.speed_kts: 'speed_kts'" in str(e.value)
    assert "did you mean 'speed_kn'?" in str(e.value)
    p = voyage(tmp_path, "closed_form", extra="\n[port]\narival_hours = 3.0\n")
    with pytest.raises(InputError) as e:
        load_voyage(p)
    assert "did you mean 'arrival_hours'?" in str(e.value)


def test_the_sample_caution_only_for_the_sample_areas():
    # item 10: the caution that the sample areas are fictional belongs to plans that use them
    _, doc = plan_doc("closed_form")  # constructed test areas, not the sample's
    assert SAMPLE_CAUTION not in doc["cautions"]
    assert any("MARPOL Annex VI and national law" in c for c in doc["cautions"])
    assert not any("sample" in c for c in doc["cautions"])
    _, sample = plan_doc(ROOT / "areas_sample" / "voyage.toml")
    assert SAMPLE_CAUTION in sample["cautions"]


@pytest.mark.parametrize("table, place, expected", [
    ('departure_fuel = { boilr = "mgo" }', "port.departure_fuel.boilr", "a circuit of the ship"),
    ('departure_load_pct = { dg9 = 50.0 }', "port.departure_load_pct.dg9", "a consumer of the"),
    ('departure_load_pct = { main_engine = 150.0 }', "port.departure_load_pct.main_engine",
     "a number from 0.0 to 110.0"),
    ('arrival_hours = -2.0', "port.arrival_hours", "a number from 0.0"),
])
def test_bad_port_tables_are_refused_naming_the_key(tmp_path, table, place, expected):
    from planner.voyage.onboard import ship_for_voyage
    from planner.voyage.port import port_state

    p = voyage(tmp_path, "closed_form", extra=f"\n[port]\n{table}\n")
    with pytest.raises(InputError) as e:
        v = load_voyage(p)
        port_state(v, ship_for_voyage(v))
    assert f"v.toml: {place}:" in str(e.value) and expected in str(e.value)


@pytest.mark.requires_poppler
def test_the_pdf_says_why_there_is_no_changeover(tmp_path):
    # the old PDF said "the route crosses no control area in force" whatever the reason:
    # false for a route that enters an area before its date
    import subprocess
    import sys

    pdf = tmp_path / "p.pdf"
    r = subprocess.run([sys.executable, "-m", "planner", "plan",
                        str(VOYAGES / "future_before.toml"), "--pdf", str(pdf)], cwd=ROOT,
                       capture_output=True, text=True, timeout=120)
    assert r.returncode == 0, r.stderr
    text = " ".join(subprocess.run(["pdftotext", str(pdf), "-"], capture_output=True,
                                   text=True, check=True).stdout.split())
    assert "crosses no control area" not in text
    assert ("No changeover: the route enters Future Five ECA (in force from 2030-07-01) only "
            "while it is not in force.") in text
