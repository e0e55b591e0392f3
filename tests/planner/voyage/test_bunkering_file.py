"""The voyage file's ``[[bunker_port]]`` and ``[[purchase_attempt]]`` tables: read as
written, and every bad value refused as one line naming the file, the place, the value
and what is expected."""

from __future__ import annotations

from datetime import UTC, date, datetime

import pytest

from geo.errors import InputError
from planner.voyage.bunkering_file import BunkerPort, PurchaseAttempt, load_bunkering
from planner.voyage.voyage_file import load_voyage
from tests.helpers.plan import VOYAGES

GOOD_PORT = {"name": "Port Fennick (fictional)", "distance_nm": 150.0}
GOOD_TRY = {"port": "Aldmere (fictional)", "supplier": "Harbour Fuels (fictional)",
            "date": "2030-03-01", "fuel": "DMA 0.10 %", "quantity_t": 20.0}


def test_the_test_voyage_reads_back():
    v = load_voyage(VOYAGES / "short_mgo_t1.toml")
    fennick, deep, west = v.bunkering.ports
    assert fennick == BunkerPort("Port Fennick (fictional)", None, 150.0, ("DMA",), None,
                                 "bunker_port[1]")
    assert deep.waypoint == "Deep Point" and deep.fuels is None
    assert west.waypoint == 1
    assert west.eta_utc == datetime(2030, 3, 10, 6, 0, tzinfo=UTC)
    (a,) = v.bunkering.attempts
    assert a == PurchaseAttempt("West Point (fictional)", "Westmark Fuel Co. (fictional)",
                                date(2030, 3, 8), "DMA", 10.0, "no distillate in stock")
    assert west.offers("mgo", "DMA") is False and fennick.offers("MGO", "dma") is True
    assert deep.offers("mgo", "DMA") is None


def test_no_tables_no_bunkering():
    b = load_bunkering({}, "v.toml")
    assert b.ports == () and b.attempts == ()


def test_a_toml_date_is_taken():
    b = load_bunkering({"purchase_attempt": [{**GOOD_TRY, "date": date(2030, 3, 1)}]}, "v.toml")
    assert b.attempts[0].on == date(2030, 3, 1)


BAD = [
    ({"bunker_port": {"name": "x"}}, "bunker_port", "[[bunker_port]] tables"),
    ({"bunker_port": ["x"]}, "bunker_port[1]", "a [[bunker_port]] table"),
    ({"bunker_port": [{"distance_nm": 3.0}]}, "bunker_port[1].name", "non-empty text"),
    ({"bunker_port": [{"name": "P"}]}, "bunker_port[1]", "exactly one of waypoint"),
    ({"bunker_port": [{"name": "P", "waypoint": 2, "distance_nm": 1.0}]}, "bunker_port[1]",
     "exactly one of waypoint"),
    ({"bunker_port": [{"name": "P", "waypoint": 0}]}, "bunker_port[1].waypoint",
     "a waypoint number (1 = the first)"),
    ({"bunker_port": [{"name": "P", "waypoint": True}]}, "bunker_port[1].waypoint",
     "a waypoint number"),
    ({"bunker_port": [{"name": "P", "distance_nm": -1.0}]}, "bunker_port[1].distance_nm",
     "0 or more"),
    ({"bunker_port": [{**GOOD_PORT, "fuels": "mgo"}]}, "bunker_port[1].fuels",
     "a list of fuel names"),
    ({"bunker_port": [{**GOOD_PORT, "fuels": []}]}, "bunker_port[1].fuels",
     "a list of fuel names"),
    ({"bunker_port": [{**GOOD_PORT, "eta": "tomorrow"}]}, "bunker_port[1].eta", ""),
    ({"bunker_port": [{**GOOD_PORT, "price": 700}]}, "bunker_port[1].price", "one of"),
    ({"purchase_attempt": [{**GOOD_TRY, "supplier": ""}]}, "purchase_attempt[1].supplier",
     "non-empty text"),
    ({"purchase_attempt": [{k: v for k, v in GOOD_TRY.items() if k != "port"}]},
     "purchase_attempt[1].port", "non-empty text"),
    ({"purchase_attempt": [{**GOOD_TRY, "date": "1 March"}]}, "purchase_attempt[1].date", ""),
    ({"purchase_attempt": [{**GOOD_TRY, "date": 20300301}]}, "purchase_attempt[1].date",
     "YYYY-MM-DD"),
    ({"purchase_attempt": [{**GOOD_TRY, "quantity_t": 0}]}, "purchase_attempt[1].quantity_t",
     "above 0"),
    ({"purchase_attempt": [{**GOOD_TRY, "quantity_t": "20 t"}]},
     "purchase_attempt[1].quantity_t", "above 0"),
    ({"purchase_attempt": [GOOD_TRY, {**GOOD_TRY, "answer": 3}]},
     "purchase_attempt[2].answer", "non-empty text"),
    ({"purchase_attempt": [{**GOOD_TRY, "reason": "none"}]}, "purchase_attempt[1].reason",
     "one of"),
]


@pytest.mark.parametrize(("doc", "place", "expected"), BAD)
def test_refusals_name_file_place_value_and_what_is_expected(doc, place, expected):
    with pytest.raises(InputError) as exc:
        load_bunkering(doc, "v.toml")
    e = exc.value
    assert e.file == "v.toml"
    assert e.place == place
    assert expected in e.expected
    assert "\n" not in str(e)


def test_a_port_off_the_route_is_refused_even_with_enough_fuel(tmp_path):
    from planner.voyage.report import plan_json
    from planner.voyage.run import build_plan

    text = (VOYAGES / "short_mgo_t1.toml").read_text(encoding="utf-8")
    for name in ("ship_t1.toml", "short_east.csv", "meridian_5e.geojson"):
        text = text.replace(f'"{name}"', f'"{(VOYAGES / name).as_posix()}"')
    text = text.replace("volume_m3 = 12.0", "volume_m3 = 100.0")
    text = text.replace('waypoint = "Deep Point"', 'waypoint = "Far Point"')
    p = tmp_path / "v.toml"
    p.write_text(text, encoding="utf-8")
    plan = build_plan(p)
    assert plan.quantities.totals_t["mgo"] < plan.quantities.on_board_t["mgo"]
    with pytest.raises(InputError) as exc:
        plan_json(plan)
    assert exc.value.place == "bunker_port[2].waypoint" and exc.value.value == "Far Point"
    assert "West Point, Deep Point" in exc.value.expected
