"""Journal entries: checked dataclasses, canonical JSON and hashing, typed inputs, plan prefill.

Sources beside each check: [TABLE-54B] for the volume correction factor
(published bunker worked examples [P]); the IMO check-digit rule is from
memory [M] and is tested only against itself and one number computed by hand.
"""

from __future__ import annotations

import hashlib
import json
from datetime import UTC, datetime

import pytest

from geo.errors import InputError
from planner.journal.canonical import GENESIS_HASH, canonical_json, entry_hash, is_canonical
from planner.journal.codec import DecodeError, decode_entry, encode
from planner.journal.details import (
    ChangeoverDetails,
    FuelSpec,
    FuelUse,
    NoteDetails,
    SetupDetails,
    TankReading,
    imo_check_digit,
    valid_imo,
)
from planner.journal.entries import (
    BACK_COMMENCED,
    COMPLETED,
    STARTED,
    Correction,
    Entry,
    Person,
    Position,
    Record,
)
from planner.journal.inputs import parse_position, parse_tank
from planner.journal.plan_link import planned_for
from tests.helpers.paths import DATA

PLAN = DATA / "journal" / "plan_sample.json"
T0 = datetime(2027, 5, 31, 10, 5, tzinfo=UTC)
MGO = FuelSpec("MGO", "DMA", 0.07, 848.5, "ALD-0528-01")


def completed_entry(**over) -> Entry:
    tank = TankReading.measure("MGO service", "MGO", 24.6, 38.0, 848.5)
    rec = dict(time_utc=T0, ship_offset_min=720, position=Position(-39.19, 178.0),
               area="Meridian Reach ECA", voyage="V1", circuit="main engine",
               fuels=(FuelUse("to", MGO),), details=ChangeoverDetails((tank,), "", 4))
    rec.update(over)
    return Entry(COMPLETED, Person("Chief Engineer", "R. Halvorsen"), T0, Record(**rec))


# -- IMO number [M] -------------------------------------------------------------------------

def test_imo_check_digit_rule_from_memory():
    # 1*7 + 2*6 + 3*5 + 4*4 + 5*3 + 6*2 = 77 -> 7 (worked by hand from the [M] rule)
    assert imo_check_digit("123456") == 7
    assert valid_imo("1234567")
    assert not valid_imo("1234568")
    assert not valid_imo("123456")
    assert not valid_imo("12345678")
    assert not valid_imo("12345a7")
    with pytest.raises(ValueError):
        SetupDetails("MV Test", "1234568")


# -- Tank readings: [TABLE-54B] published bunker worked examples [P] ----------------------

@pytest.mark.parametrize(("rho", "t", "vcf"), [(992.0, 36.0, 0.9857), (990.3, 34.0, 0.9870)])
def test_tank_reading_vcf_matches_published_bunker_examples(rho, t, vcf):
    r = TankReading.measure("HFO settling", "VLSFO", 100.0, t, rho)
    assert round(r.vcf, 4) == vcf
    assert r.volume15_m3 == pytest.approx(100.0 * r.vcf, rel=1e-12)
    assert r.mass_t == pytest.approx(r.volume15_m3 * rho / 1000.0, rel=1e-12)


def test_tank_reading_refuses_bad_values():
    with pytest.raises(ValueError, match="volume_m3"):
        TankReading.measure("A", "MGO", -1.0, 20.0, 850.0)
    with pytest.raises(ValueError, match="temperature_c"):
        TankReading.measure("A", "MGO", 1.0, 200.0, 850.0)
    good = TankReading.measure("A", "MGO", 10.0, 30.0, 850.0)
    with pytest.raises(ValueError, match="volume15_m3"):
        TankReading("A", "MGO", 10.0, 30.0, 850.0, good.vcf, 9.0, good.mass_t)


# -- Entry rules -------------------------------------------------------------------------

def test_position_must_be_on_the_globe():
    with pytest.raises(ValueError):
        Position(90.5, 0.0)
    with pytest.raises(ValueError):
        Position(0.0, 180.01)
    assert Position(-90, 180).lat_deg == -90.0


def test_reg14_entries_need_tanks_position_area_and_fuel():
    with pytest.raises(ValueError, match="each tank"):
        completed_entry(details=ChangeoverDetails((), "", None))
    with pytest.raises(ValueError, match="position"):
        completed_entry(position=None)
    with pytest.raises(ValueError, match="fuel changed to"):
        completed_entry(fuels=())
    with pytest.raises(ValueError, match="ChangeoverDetails"):
        completed_entry(details=NoteDetails("x"))
    with pytest.raises(ValueError, match="UTC"):
        completed_entry(time_utc=datetime(2027, 5, 31, 10, 5))


def test_correction_rules():
    e = completed_entry()
    c = Entry("correction", e.who, T0, e.record, Correction(5, COMPLETED, "typo"))
    assert c.subject_kind == COMPLETED
    with pytest.raises(ValueError, match="reason"):
        Correction(5, COMPLETED, " ")
    with pytest.raises(ValueError):
        Entry("correction", e.who, T0, None, Correction(5, COMPLETED, "x", void=False))
    with pytest.raises(ValueError):
        Correction(1, "setup", "x")


# -- Codec and canonical JSON ------------------------------------------------------------

def test_codec_round_trip_and_canonical_text():
    e = completed_entry()
    doc = encode(e)
    text = canonical_json(doc)
    assert is_canonical(text)
    assert decode_entry(json.loads(text)) == e
    assert canonical_json(json.loads(text)) == text
    assert '"type":"changeover"' in text and "°" not in text  # no escapes needed here
    assert canonical_json({"b": 1, "a": "Ä"}) == '{"a":"Ä","b":1}'


def test_codec_refuses_unknown_and_missing_keys():
    doc = encode(completed_entry())
    doc["record"]["extra"] = 1
    with pytest.raises(DecodeError, match="unknown key"):
        decode_entry(doc)
    doc = encode(completed_entry())
    del doc["record"]["area"]
    with pytest.raises(DecodeError, match="area"):
        decode_entry(doc)
    doc = encode(completed_entry())
    doc["record"]["details"]["tanks"][0]["volume_m3"] = -5.0
    with pytest.raises(DecodeError, match="volume_m3"):
        decode_entry(doc)


def test_hash_rule_is_sha256_of_prev_seq_and_body():
    body = canonical_json(encode(completed_entry()))
    want = hashlib.sha256(f"{GENESIS_HASH}\n1\n{body}".encode()).hexdigest()
    assert entry_hash(GENESIS_HASH, 1, body) == want
    assert entry_hash(GENESIS_HASH, 2, body) != want


# -- What the crew types -------------------------------------------------------------------

@pytest.mark.parametrize(("text", "lat", "lon"), [
    ("54°12.3'N 003°30.0'W", 54.205, -3.5),
    ("54 12.3 N 3 30 W", 54.205, -3.5),
    ("N54°12.3' W003°30.0'", 54.205, -3.5),
    ("54.205, -3.5", 54.205, -3.5),
    ("-39.5 178.25", -39.5, 178.25),
    ("39°11.6'S 178°00.4'E", -(39 + 11.6 / 60), 178 + 0.4 / 60),
])
def test_positions_in_degrees_and_minutes_or_decimal(text, lat, lon):
    p = parse_position(text)
    assert p.lat_deg == pytest.approx(lat, abs=1e-12)
    assert p.lon_deg == pytest.approx(lon, abs=1e-12)


@pytest.mark.parametrize("text", ["94°12.3'N 003°30.0'W", "54°12.3'N 183°00.0'E", "54.2 190",
                                  "-91, 3", "somewhere", "54°12.3'N"])
def test_positions_off_the_globe_or_unreadable_are_refused(text):
    with pytest.raises(InputError) as e:
        parse_position(text)
    assert str(e.value).startswith("--pos: ")


def test_tank_syntax():
    t = parse_tank("MGO service=12.5@32")
    assert (t.tank, t.volume_m3, t.temperature_c, t.fuel) == ("MGO service", 12.5, 32.0, None)
    t = parse_tank(" LS settling = 40 m³ @ 55 °C / ULSFO ")
    assert (t.tank, t.volume_m3, t.temperature_c, t.fuel) == ("LS settling", 40.0, 55.0, "ULSFO")
    for bad, why in (("MGO service=-1@30", "0 m³ or more"), ("MGO service=12.5", "temperature"),
                     ("=12@30", "NAME=VOLUME"), ("MGO service", "NAME=VOLUME")):
        with pytest.raises(InputError, match=why):
            parse_tank(bad)


# -- Plan prefill -------------------------------------------------------------------------

def test_planned_values_per_step():
    start = planned_for(STARTED, PLAN, 1)
    assert start.time_utc == datetime(2027, 5, 31, 5, 30, tzinfo=UTC)
    # planned positions are kept as the crew writes them, to 0.1' (hand calculation):
    # 39.3301° = 39°19.806' -> 39°19.8' = 39.33°; 176.4107° = 176°24.642' -> 24.6' = 176.41°
    assert start.position == Position(-39.33, 176.41)
    assert start.area == "Meridian Reach ECA" and start.circuit == "main engine"
    done = planned_for(COMPLETED, PLAN, 1)
    assert done.time_utc == datetime(2027, 5, 31, 10, 20, tzinfo=UTC) and done.position is None
    # 39.151662° = 39°09.09972' -> 39°09.1' = 39.151667° (6 decimals)
    assert done.boundary == Position(-39.151667, 178.5) and done.margin_h == 1.44
    back = planned_for(BACK_COMMENCED, PLAN, 2)
    assert back.direction == "to_regular"
    assert back.position.lon_deg == -175.938333  # 175°56.346' -> 56.3'
    assert back.position.lat_deg == -38.89  # 38.8904° = 38°53.424' -> 53.4' = 38.89°


def test_plan_refusals(tmp_path):
    with pytest.raises(InputError, match="to_regular"):
        planned_for(STARTED, PLAN, 2)
    with pytest.raises(InputError, match="1 to 3"):
        planned_for(STARTED, PLAN, 4)
    bad = tmp_path / "plan.json"
    bad.write_text('{"changeovers": [{"area": "A", "direction": "to_compliant", '
                   '"start_utc": "2027-05-31T05:30", "start_lat": 1, "start_lon": 2}]}')
    with pytest.raises(InputError, match=r"changeovers\[0\]\.start_utc"):
        planned_for(STARTED, bad, 1)
    with pytest.raises(InputError, match="existing plan"):
        planned_for(STARTED, tmp_path / "none.json", 1)


def test_the_journal_sulphur_ceiling_is_the_fuel_files():
    """One ceiling, 4.50 % m/m (the highest global limit, MARPOL Annex VI reg. 14.1
    [MARPOL-VI]), shared with the ship and voyage files."""
    from planner.fuels.fuel import MAX_SULPHUR_PCT
    from planner.journal.compose import Typed
    from planner.journal.compose_setup import fuel_entry
    from planner.journal.details import STORED_MAX_SULPHUR_PCT

    assert MAX_SULPHUR_PCT == 4.50
    assert FuelSpec("HSFO", "RMG 380", 4.50, 990.0, "B-1").sulphur_pct == 4.50
    # a new fuel entry above 4.50 % is refused as it is typed ...
    with pytest.raises(InputError, match="--sulphur"):
        fuel_entry(Typed(), "HSFO", "RMG 380", 4.51, 990.0, "B-1")
    # ... but an entry stored when the ceiling was 5.0 % still reads: nothing is lost
    assert FuelSpec("HSFO", "RMG 380", 4.80, 990.0, "B-1").sulphur_pct == 4.80
    assert STORED_MAX_SULPHUR_PCT == 5.0
    with pytest.raises(ValueError, match="sulphur_pct"):
        FuelSpec("HSFO", "RMG 380", 5.01, 990.0, "B-1")
