"""The carriage-ban warning on every output, and the carbon content read from the files.

``carriage_ban.toml`` (fictional, tests/data/voyages) holds 40 m³ of a 2.60 % m/m fuel in
a storage tank of a ship without a scrubber: since 2020-03-01 it may not be carried for
use on board ([MEPC-305] [P]; MARPOL Annex VI regulation 14.1.3, the number from
memory). Before this warning the plan said nothing at all about it. The sample voyage
(areas_sample/, fictional) carries nothing above 0.45 % and gets no such warning.
"""

from __future__ import annotations

import json
import re

import pytest

from tests.helpers.cli import changeover, changeover_ok
from tests.helpers.paths import ROOT
from tests.helpers.pdf import pdf_flat
from tests.helpers.plan import VOYAGES

BAN = str(VOYAGES / "carriage_ban.toml")
SHIP_T1H = str(VOYAGES / "ship_t1h.toml")
SAMPLE = str(ROOT / "areas_sample" / "voyage.toml")
SAMPLE_SHIP = str(ROOT / "areas_sample" / "ship.toml")
PARTS = ("Carriage ban", "hsfo (2.60 % m/m sulphur)", "hsfo_storage", "0.50 % m/m",
         "regulation 14.1.3")


def _flat(text: str) -> str:
    return " ".join(text.split())


def test_plan_json_and_terminal():
    doc = json.loads(changeover_ok("plan", BAN, "--json").stdout)
    ban = [w for w in doc["warnings"] if w.startswith("Carriage ban:")]
    assert len(ban) == 1 and all(p in ban[0] for p in PARTS)
    text = _flat(changeover_ok("plan", BAN).stdout)
    assert all(p in text for p in PARTS)


def test_flush_json_and_terminal():
    for path in (BAN, SHIP_T1H):
        doc = json.loads(changeover_ok("flush", path, "--json").stdout)
        assert doc["warning_kinds"].count("carriage_ban") == 1
        text = [w for w, k in zip(doc["warnings"], doc["warning_kinds"], strict=True)
                if k == "carriage_ban"][0]
        assert all(p in text for p in PARTS)
    out = _flat(changeover_ok("flush", BAN).stdout)
    assert "Warning: Carriage ban: hsfo" in out


@pytest.mark.requires_poppler
def test_procedure_pdf_and_json(tmp_path):
    pdf = tmp_path / "procedure.pdf"
    r = changeover_ok("procedure", SHIP_T1H, "--pdf", str(pdf))
    assert "caution: carriage ban: hsfo" in _flat(r.stdout)
    text = pdf_flat(pdf)
    assert "Carriage ban. hsfo (2.60 % m/m sulphur) is held in tank hsfo_storage" in text
    assert "regulation 14.1.3" in text
    assert "Carriage: hsfo is above what the ship may carry for use on board" in text
    doc = json.loads(changeover_ok("procedure", SHIP_T1H, "--json").stdout)
    assert len(doc["carriage"]) == 1 and doc["carriage"][0].startswith("hsfo (2.60 %")
    assert doc["carriage_fuels"] == ["hsfo"]


@pytest.mark.requires_poppler
def test_the_sample_has_no_carriage_warning(tmp_path):
    doc = json.loads(changeover_ok("plan", SAMPLE, "--json").stdout)
    assert not [w for w in doc["warnings"] if "Carriage ban" in w]
    flush = json.loads(changeover_ok("flush", SAMPLE_SHIP, "--json").stdout)
    assert "carriage_ban" not in flush["warning_kinds"]
    pdf = tmp_path / "procedure.pdf"
    changeover_ok("procedure", SAMPLE_SHIP, "--pdf", str(pdf))
    assert "Carriage ban" not in pdf_flat(pdf)


def _copy(tmp_path, file: str, old: str, new: str) -> str:
    """The carriage-ban voyage copied to ``tmp_path`` with ``old`` replaced in ``file``."""
    for name in ("carriage_ban.toml", "ship_t1h.toml", "short_east.csv", "meridian_5e.geojson"):
        (tmp_path / name).write_text((VOYAGES / name).read_text(encoding="utf-8"),
                                     encoding="utf-8")
    p = tmp_path / file
    text = p.read_text(encoding="utf-8")
    assert old in text, old
    p.write_text(text.replace(old, new, 1), encoding="utf-8")
    return str(p)


def test_carbon_in_the_ship_file_is_read(tmp_path):
    ship = _copy(tmp_path, "ship_t1h.toml", 'grade = "DMA"\n',
                 'grade = "DMA"\ncarbon_pct = 86.2\n')
    from planner.ship.ship_file import load_ship

    fuel = load_ship(ship).fuels["mgo"]
    assert fuel.carbon == 86.2 and fuel.carbon_source == "delivery note"


@pytest.mark.parametrize("where", ["voyage", "ship"])
def test_carbon_out_of_range_is_refused(tmp_path, where):
    if where == "voyage":
        path = _copy(tmp_path, "carriage_ban.toml", "carbon_pct = 86.9", "carbon_pct = 99.0")
    else:
        path = _copy(tmp_path, "ship_t1h.toml", 'grade = "DMA"\n',
                     'grade = "DMA"\ncarbon_pct = 99.0\n')
    r = changeover("flush", path)
    assert r.returncode == 2, r.stdout + r.stderr
    lines = [x for x in r.stderr.splitlines() if x.strip()]
    assert len(lines) == 1, r.stderr
    assert re.search(r"carbon_pct must be between 70 and 92 % m/m, got 99\.0", lines[0])
    assert ("carriage_ban.toml" if where == "voyage" else "ship_t1h.toml") in lines[0]
