"""``changeover plan`` on the scrubber sample (areas_sample/egcs_voyage.toml) and its refusals.

The sample (fictional) must plan: the whole ship's fuel choice never picks the
high-sulphur fuel (2.60 % m/m is above every limit on the route, 0.50 % global cap and
0.10 % in the areas, [MARPOL-VI] regulation 14 [P]); only the scrubber's circuit burns it
(tests/cli/test_plan_scrubbers.py), and the tanks hold enough of every fuel.
Each bad scrubber input is one line, exit 2, nothing written (README "What input is
refused").
"""

from __future__ import annotations

import json
from pathlib import Path

import pytest

from tests.helpers.cli import changeover, changeover_ok
from tests.helpers.paths import ROOT

SAMPLE = ROOT / "areas_sample"
VOYAGE = SAMPLE / "egcs_voyage.toml"
SHIP = SAMPLE / "ship_egcs.toml"
ZONES = SAMPLE / "discharge" / "aldmere_discharge.geojson"
OUTAGE = ('\n[[scrubber_outage]]\nscrubber = "{name}"\nfrom = "2027-05-31T02:00+12:00"\n'
          'reason = "test"\n')


def _voyage(folder: Path, *, ship: Path = SHIP, zones: Path = ZONES, extra: str = "") -> Path:
    text = VOYAGE.read_text()
    text = text.replace('"ship_egcs.toml"', json.dumps(str(ship)))
    text = text.replace('"discharge/aldmere_discharge.geojson"', json.dumps(str(zones)))
    for name in ("aldmere_to_skarvik.csv", "corran_sea.geojson", "meridian_reach.geojson",
                 "skarvik_basin.geojson", "cautions/aldmere_cautions.geojson"):
        text = text.replace(f'"{name}"', json.dumps(str(SAMPLE / name)))
    p = folder / "bad_voyage.toml"
    p.write_text(text + extra)
    return p


def test_the_scrubber_sample_plans() -> None:
    doc = json.loads(changeover_ok("plan", str(VOYAGE), "--json").stdout)
    assert doc["changeovers"]
    assert {st["fuel"] for st in doc["stretches"]} == {"vlsfo", "mgo"}
    assert doc["regular_fuel"] == "vlsfo"
    first = doc["stretches"][0]  # under the 0.50 % global cap
    assert first["limit_pct"] == 0.5 and first["fuel_choice"].endswith(
        "hsfo would exceed the limit")
    assert not any("Short of" in w for w in doc["warnings"])


def _refused(folder: Path, voyage: Path, *words: str) -> str:
    out = folder / "out"
    out.mkdir()
    r = changeover("plan", str(voyage), "--json", "--pdf", str(out / "p.pdf"),
                   "--geojson", str(out / "p.geojson"))
    assert r.returncode == 2, (r.stdout, r.stderr)
    lines = r.stderr.strip().splitlines()
    assert len(lines) == 1 and lines[0].startswith("changeover: error: "), r.stderr
    for w in words:
        assert w in lines[0], lines[0]
    assert r.stdout == "" and list(out.iterdir()) == []
    return lines[0]


def test_a_bad_scrubber_in_the_ship_file(tmp_path: Path) -> None:
    ship = tmp_path / "ship.toml"
    ship.write_text(SHIP.read_text().replace("max_sulphur_pct = 3.50", "max_sulphur_pct = 5.0"))
    _refused(tmp_path, _voyage(tmp_path, ship=ship), str(ship),
             "scrubbers.egcs.max_sulphur_pct: 5.0: expected a number above 0 to 4.5 % m/m")


def test_an_outage_of_an_unknown_scrubber(tmp_path: Path) -> None:
    v = _voyage(tmp_path, extra=OUTAGE.format(name="egcs_aft"))
    _refused(tmp_path, v, str(v), "scrubber_outage[1].scrubber: 'egcs_aft'",
             "one of the ship file's scrubbers: egcs")


@pytest.mark.parametrize("old, new, words", [
    ('"allows": "closed"', '"allows": "open"', "property allows: 'open'"),
    ('"name": "Skarvik harbour waters"', '"name": "Corran Sea coastal waters"',
     "not already used"),
])
def test_a_bad_discharge_zone_file(tmp_path: Path, old: str, new: str, words: str) -> None:
    zones = tmp_path / "zones.geojson"
    zones.write_text(ZONES.read_text().replace(old, new, 1))
    _refused(tmp_path, _voyage(tmp_path, zones=zones), str(zones), words)


def test_the_commented_out_outage_of_the_sample_is_valid(tmp_path: Path) -> None:
    text = VOYAGE.read_text()
    example = [line for line in text.splitlines() if line.startswith("# [[scrubber_outage]]")
               or line.startswith("# scrubber =") or line.startswith("# from =")
               or line.startswith("# until =") or line.startswith("# reason =")]
    assert len(example) == 5
    extra = "\n" + "\n".join(line[2:].split("  #")[0] for line in example) + "\n"
    v = _voyage(tmp_path, extra=extra)
    doc = json.loads(changeover_ok("plan", str(v), "--json").stdout)
    assert doc["changeovers"]
