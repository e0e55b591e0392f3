"""The voyage file's scrubber inputs: discharge_zones and [[scrubber_outage]], every refusal.

The expected behaviour is ours (README "Scrubbers"); times are ISO 8601 [ISO-8601] with
their UTC offset, as the voyage's ``depart``; epoch seconds are checked against
``datetime.timestamp`` of the standard library.
"""

from __future__ import annotations

from datetime import UTC, datetime
from pathlib import Path

import pytest

from geo.area_files import load_areas
from geo.compliance import check_route
from geo.discharge_zones import load_discharge_zones
from geo.errors import InputError
from geo.path import route_path
from geo.route_loader import load_route
from geo.schedule import make_schedule
from planner.voyage.discharge import discharge_passages, zone_passages
from planner.voyage.onboard import ship_for_voyage
from planner.voyage.scrubber_voyage import OUTAGE_KEYS
from planner.voyage.voyage_file import load_voyage
from tests.helpers.paths import ROOT

SAMPLE = ROOT / "areas_sample"
VOYAGE = SAMPLE / "egcs_voyage.toml"
ZONES = SAMPLE / "discharge" / "aldmere_discharge.geojson"
TEXT = VOYAGE.read_text()
OUTAGE = """[[scrubber_outage]]
scrubber = "egcs"
from = "2027-05-31T02:00+12:00"
until = "2027-05-31T20:00+12:00"
reason = "washwater pump repair (fictional)"
"""


def _write(tmp_path: Path, text: str, extra: str = "") -> Path:
    """The sample voyage, edited, in ``tmp_path`` (its relative paths made absolute)."""
    for name in ("ship_egcs.toml", "aldmere_to_skarvik.csv", "corran_sea.geojson",
                 "meridian_reach.geojson", "skarvik_basin.geojson",
                 "cautions/aldmere_cautions.geojson", "discharge/aldmere_discharge.geojson"):
        text = text.replace(f'"{name}"', f'"{SAMPLE / name}"')
    p = tmp_path / "voyage.toml"
    p.write_text(text + extra)
    return p


def _refused(call, path: Path) -> str:
    with pytest.raises(InputError) as err:
        call(path)
    text = str(err.value)
    assert "\n" not in text and text.startswith(str(path)), text
    return text


def _epoch(*args: int, hours: int = 12) -> float:
    from datetime import timedelta, timezone
    return datetime(*args, tzinfo=timezone(timedelta(hours=hours))).timestamp()


def test_sample_voyage_names_its_zones_and_no_outage() -> None:
    v = load_voyage(VOYAGE)
    assert v.discharge_zones == ZONES.resolve() and v.scrubber_outages == ()
    assert "# [[scrubber_outage]]" in TEXT  # the commented-out example
    assert {f.name: f.sulphur_pct for f in v.fuels} == {"hsfo": 2.6, "vlsfo": 0.47, "mgo": 0.07}
    assert "fictional" in v.fuel("hsfo").bdn_ref and v.fuel("hsfo").grade == "RMG 380"
    assert ship_for_voyage(v).scrubbers["egcs"].max_sulphur_pct == 3.5


def test_the_same_route_and_areas_as_the_first_sample() -> None:
    first, second = load_voyage(SAMPLE / "voyage.toml"), load_voyage(VOYAGE)
    assert (first.route_file, first.area_paths, first.depart_utc) == (
        second.route_file, second.area_paths, second.depart_utc)
    assert first.discharge_zones is None and first.scrubber_outages == ()


def test_an_outage_is_read(tmp_path: Path) -> None:
    extra = OUTAGE + '\n[[scrubber_outage]]\nscrubber = "egcs"\nfrom = 2027-06-01T20:00:00Z\n'
    v = load_voyage(_write(tmp_path, TEXT, "\n" + extra))
    a, b = v.scrubber_outages
    assert (a.scrubber, a.from_epoch_s, a.until_epoch_s) == (
        "egcs", _epoch(2027, 5, 31, 2), _epoch(2027, 5, 31, 20))
    assert a.reason == "washwater pump repair (fictional)"
    # a TOML offset date-time is taken too; no until: for the rest of the voyage
    assert b.from_epoch_s == datetime(2027, 6, 1, 20, tzinfo=UTC).timestamp()
    assert b.until_epoch_s is None and b.reason == "" and b.covers(1e12)
    ship_for_voyage(v)  # the scrubber is the ship's


@pytest.mark.parametrize("old, new, place, words", [
    ('scrubber = "egcs"', 'scrubber = ""', "scrubber_outage[1].scrubber", "a scrubber"),
    ('scrubber = "egcs"\n', "", "scrubber_outage[1].scrubber", "missing"),
    ('from = "2027-05-31T02:00+12:00"\n', "", "scrubber_outage[1].from", "missing"),
    ('from = "2027-05-31T02:00+12:00"', 'from = "2027-05-31T02:00"',
     "scrubber_outage[1].from", "with its UTC offset"),
    ('from = "2027-05-31T02:00+12:00"', "from = 2027-05-31T02:00:00",
     "scrubber_outage[1].from", "with its UTC offset"),
    ('from = "2027-05-31T02:00+12:00"', 'from = "31 May"', "scrubber_outage[1].from",
     "ISO 8601"),
    ('from = "2027-05-31T02:00+12:00"', "from = 5", "scrubber_outage[1].from", "ISO 8601"),
    ('until = "2027-05-31T20:00+12:00"', 'until = "2027-05-31T02:00+12:00"',
     "scrubber_outage[1].until", "a time after from"),
    ('until = "2027-05-31T20:00+12:00"', 'until = "2027-05-30T14:00Z"',
     "scrubber_outage[1].until", "a time after from"),
    ('reason = "washwater pump repair (fictional)"', "reason = 1",
     "scrubber_outage[1].reason", "text"),
    ('reason = "washwater', 'reasons = "washwater', "scrubber_outage[1].reasons",
     "did you mean 'reason'?"),
    ('until = "2027', 'untill = "2027', "scrubber_outage[1].untill", "did you mean 'until'?"),
])
def test_outage_refusals(tmp_path: Path, old: str, new: str, place: str, words: str) -> None:
    assert old in OUTAGE
    text = _refused(load_voyage, _write(tmp_path, TEXT, "\n" + OUTAGE.replace(old, new)))
    assert f": {place}: " in text and words in text, text


def test_overlapping_outages_of_one_scrubber_are_refused(tmp_path: Path) -> None:
    second = OUTAGE.replace("2027-05-31T02:00+12:00", "2027-05-31T19:00+12:00").replace(
        'until = "2027-05-31T20:00+12:00"\n', "")
    text = _refused(load_voyage, _write(tmp_path, TEXT, "\n" + OUTAGE + "\n" + second))
    assert ": scrubber_outage[2].from: " in text and "not overlapping scrubber_outage[1]" in text
    # one after the other is fine
    after = second.replace("2027-05-31T19:00+12:00", "2027-05-31T20:00+12:00")
    assert len(load_voyage(_write(tmp_path, TEXT, "\n" + OUTAGE + "\n" + after))
               .scrubber_outages) == 2


def test_outage_tables_must_be_tables(tmp_path: Path) -> None:
    text = _refused(load_voyage, _write(tmp_path, 'scrubber_outage = "egcs"\n' + TEXT))
    assert ": [[scrubber_outage]]: 'egcs': " in text
    text = _refused(load_voyage, _write(tmp_path, "scrubber_outage = [1]\n" + TEXT))
    assert ": scrubber_outage[1]: 1: " in text


def test_an_unknown_scrubber_is_refused_with_the_ship(tmp_path: Path) -> None:
    path = _write(tmp_path, TEXT, "\n" + OUTAGE.replace('"egcs"', '"egcs2"'))
    v = load_voyage(path)  # the voyage alone cannot know the ship's scrubbers
    text = _refused(lambda p: ship_for_voyage(load_voyage(p)), path)
    assert ": scrubber_outage[1].scrubber: 'egcs2': expected one of the ship file's " \
           "scrubbers: egcs" in text
    assert v.scrubber_outages[0].scrubber == "egcs2"


def test_an_outage_on_a_ship_without_scrubbers_is_refused(tmp_path: Path) -> None:
    path = _write(tmp_path, TEXT.replace('"ship_egcs.toml"', '"ship.toml"').replace(
        '"ship.toml"', f'"{SAMPLE / "ship.toml"}"'), "\n" + OUTAGE)
    text = _refused(lambda p: ship_for_voyage(load_voyage(p)), path)
    assert "which has none ([scrubbers.NAME])" in text


@pytest.mark.parametrize("value, words", [
    ('"no_such.geojson"', "an existing GeoJSON file"),
    ('"."', "an existing GeoJSON file"),
    ("3", "the path of a GeoJSON file"),
    ('"ship_egcs.toml"', "*.geojson or *.json"),
])
def test_discharge_zones_path_refusals(tmp_path: Path, value: str, words: str) -> None:
    old = 'discharge_zones = "discharge/aldmere_discharge.geojson"'
    assert old in TEXT
    edited = TEXT.replace(old, f"discharge_zones = {value}")
    text = _refused(load_voyage, _write(tmp_path, edited.replace(
        '"ship_egcs.toml"\n', f'"{SAMPLE / "ship_egcs.toml"}"\n', 1)))
    assert ": voyage.discharge_zones: " in text and words in text, text


def test_a_misspelt_voyage_key_is_refused(tmp_path: Path) -> None:
    edited = TEXT.replace("discharge_zones =", "discharge_zone =")
    text = _refused(load_voyage, _write(tmp_path, edited))
    assert ": voyage.discharge_zone: " in text and "did you mean 'discharge_zones'?" in text


def test_a_bad_zone_file_is_refused_when_the_ship_is_loaded(tmp_path: Path) -> None:
    bad = tmp_path / "zones.geojson"
    bad.write_text(ZONES.read_text().replace('"allows": "none"', '"allows": "open"', 1))
    edited = TEXT.replace('"discharge/aldmere_discharge.geojson"', f'"{bad}"')
    v = load_voyage(_write(tmp_path, edited))
    with pytest.raises(InputError) as err:
        ship_for_voyage(v)
    assert str(err.value).startswith(f"{bad}: feature 1 'Port Aldmere harbour waters', "
                                     "property allows: 'open'")


def test_all_outage_keys_are_in_the_sample_example() -> None:
    for key in OUTAGE_KEYS:
        assert f"# {key} = " in TEXT, key


def test_discharge_passages_of_the_sample_voyage() -> None:
    voyage = load_voyage(SAMPLE / "egcs_voyage.toml")
    assert voyage.discharge_zones == ZONES.resolve()
    path = route_path(load_route(voyage.route_file))
    sched = make_schedule(path, voyage.depart_utc, voyage.speed_kn)
    check = check_route(path, load_areas(voyage.area_paths), sched, voyage.depart_utc.date())
    got = discharge_passages(voyage, check)
    assert got == zone_passages(path, load_discharge_zones([ZONES]), sched)
    assert [p.zone for p in got] == ["Port Aldmere harbour waters", "Corran Sea coastal waters",
                                     "Brannoch Passage washwater zone", "Skarvik harbour waters"]
    # the closed-loop zones lie inside control areas the route passes
    corran = next(st for st in check.stretches if "Corran Sea ECA" in st.areas)
    assert corran.from_m < got[1].from_m
    plain = load_voyage(SAMPLE / "voyage.toml")
    assert plain.discharge_zones is None and discharge_passages(plain, check) == ()
