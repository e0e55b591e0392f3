"""Reading trend files, and a viscosity reading as the new fuel's share of the blend.

The share is checked against the published rules applied forwards: each fuel's
viscosity at the reading's temperature by [ASTM-D341] (``Fuel.viscosity_at``)
and the blend by [MAPLES-2000] Refutas (``blend_viscosity_cst``); and against
the Refutas worked value quoted in ``planner.fuels.refutas`` (equal masses of
380 and 3 cSt: 15.9 cSt).
"""

from __future__ import annotations

from datetime import UTC, datetime, timedelta, timezone

import numpy as np
import pytest

from geo.errors import InputError
from planner.calibration import BlendError, TrendColumns, read_trend, share_of_b
from planner.calibration.blend import content_mass_fractions
from planner.fuels import Fuel
from planner.fuels.refutas import blend_viscosity_cst
from planner.ship.ship_file import load_ship
from tests.helpers.paths import ROOT

SWITCH = datetime(2027, 5, 30, 4, 0, tzinfo=UTC)
HEADER = "time,temperature_c,viscosity_cst"


def _write(tmp_path, body: str, name: str = "t.csv"):
    p = tmp_path / name
    p.write_text(body, encoding="utf-8")
    return p


def _lines(n: int = 8, start_min: int = 0, naive: bool = False) -> str:
    zone = timezone(timedelta(hours=12))
    out = []
    for k in range(n):
        m = (SWITCH + timedelta(minutes=start_min + k)).astimezone(zone)
        stamp = m.replace(tzinfo=None).isoformat() if naive else m.isoformat()
        out.append(f"{stamp},120.0,13.0")
    return "\n".join(out)


def test_times_are_placed_against_the_switch_in_any_zone(tmp_path):
    # 16:05 at UTC+12 is 04:05Z: 5 min = 0.0833 h after a 04:00Z switch (hand calculation)
    p = _write(tmp_path, f"{HEADER}\n{_lines(8, -2)}\n")
    tr = read_trend(p, SWITCH)
    assert tr.before_switch == 2 and len(tr.time_h) == 6
    assert tr.time_h[0] == pytest.approx(0.0) and tr.time_h[5] == pytest.approx(5 / 60)
    naive = _write(tmp_path, f"{HEADER}\n{_lines(8, 0, naive=True)}\n", "n.csv")
    tr2 = read_trend(naive, SWITCH, tz=timezone(timedelta(hours=12)))
    np.testing.assert_allclose(tr2.time_h, np.arange(8) / 60.0)


def test_gaps_dropouts_separators_and_mapped_columns(tmp_path):
    body = _lines(8).replace(",", ";")
    rows = body.splitlines()
    rows[2] = rows[2].split(";")[0] + ";;"          # blank cells: a gap
    rows[3] = rows[3].split(";")[0] + ";120.0;0.0"  # viscometer dropout (0 cSt)
    p = _write(tmp_path, "Zeit;T_in;Visc\n" + "\n".join(rows) + "\n")
    tr = read_trend(p, SWITCH, TrendColumns("Zeit", "T_in", "Visc"))
    assert tr.skipped == 2 and len(tr.time_h) == 6


@pytest.mark.parametrize("body, needle", [
    ("time,temperature_c,visc\n" + _lines(), "a viscosity column"),
    (HEADER + "\n" + _lines().replace("13.0", "thirteen", 1), "a number"),
    (HEADER + "\n" + _lines(naive=True), "with its UTC offset"),
    ("", "a header line and readings"),
    (HEADER + "\n" + _lines(3), "at least 5 readings"),
    (HEADER + "\n" + "yesterday,120,13\n" + _lines(), "an ISO 8601 time"),
])
def test_bad_trend_files_are_one_line_naming_the_place(tmp_path, body, needle):
    p = _write(tmp_path, body)
    with pytest.raises(InputError) as e:
        read_trend(p, SWITCH)
    msg = str(e.value)
    assert needle in msg and str(p) in msg and "\n" not in msg


def test_share_inverts_refutas_at_each_temperature():
    ship = load_ship(ROOT / "areas_sample" / "ship.toml")
    fuels = list(ship.fuels.values())
    ma = content_mass_fractions(ship.tanks["vlsfo_service"].content_m3, fuels)
    mb = content_mass_fractions(ship.tanks["mgo_service"].content_m3, fuels)
    w = np.linspace(0.0, 1.0, 11)
    temp = np.linspace(135.0, 50.0, 11)
    # forwards: [ASTM-D341] for each fuel at T, [MAPLES-2000] Refutas by mass
    masses = np.outer(ma, 1.0 - w) + np.outer(mb, w)
    nu = blend_viscosity_cst(masses, np.array([f.viscosity_at(temp) for f in fuels]))
    np.testing.assert_allclose(share_of_b(nu, temp, ma, mb, fuels), w, atol=1e-9)


def test_share_of_the_refutas_worked_blend_and_indistinct_fuels():
    a = Fuel(name="a", grade="RMG 380", sulphur_pct=0.5, density_kg_m3=980.0,
             viscosity_cst=380.0, viscosity_ref_c=50.0)
    b = Fuel(name="b", grade="DMA", sulphur_pct=0.1, density_kg_m3=850.0, viscosity_cst=3.0,
             viscosity_ref_c=50.0)
    # [MAPLES-2000] equal masses of 380 and 3 cSt at one temperature: 15.9 cSt (to 0.1)
    w = share_of_b(np.array([15.9]), np.array([50.0]), np.array([1.0, 0.0]),
                   np.array([0.0, 1.0]), [a, b])
    assert w[0] == pytest.approx(0.5, abs=0.002)
    c = Fuel(name="c", grade="DMA", sulphur_pct=0.05, density_kg_m3=845.0, viscosity_cst=3.1,
             viscosity_ref_c=50.0)
    with pytest.raises(BlendError, match="too close"):
        share_of_b(np.array([3.0]), np.array([50.0]), np.array([0.0, 1.0]),
                   np.array([1.0, 0.0]), [c, b])
