"""Shared pieces of the voyage plan tests: the fixtures' hand figures and a plan runner.

Outside sources for the hand figures (never the code under test), by their
keys in ``docs/references.md``:

- [WGS84] the ellipsoid a = 6 378 137 m, f = 1/298.257223563 [P], and the
  parallel arc N(φ)·cos φ·Δλ, N = a / sqrt(1 − e² sin² φ) [D], which is the
  length of an east-west rhumb line ([RHUMB-TEXTS] [P]);
- [NM-1852] 1 nautical mile = 1852 m exactly [P];
- [PROPELLER-LAW] shaft power ∝ speed³ (common practice), and fuel mass =
  power × SFOC;
- [ISO-3046] the reference net specific energy 42.7 MJ/kg that SFOC is quoted
  at [M] (from memory and not verified here: the planner uses the same
  constant, so these tests check the scaling by 42.7 / Q_net, not the constant
  itself);
- [LEVENSPIEL-1999] the well-stirred (CSTR) washout
  S(t) = S₁ + (S₀ − S₁)·exp(−∫q dt / V) [D].

The fixtures are in ``tests/data/voyages`` (all fictional, see its README).
Not a conftest: a plain module imported by the plan tests.
"""

from __future__ import annotations

import math
from datetime import UTC, datetime
from pathlib import Path

from tests.helpers.paths import ROOT

VOYAGES = ROOT / "tests" / "data" / "voyages"

NM_M = 1852.0  # [NM-1852] exact [P]
WGS84_A = 6378137.0  # [WGS84] semi-major axis, m [P]
WGS84_F = 1.0 / 298.257223563  # [WGS84] flattening [P]
WGS84_E2 = WGS84_F * (2.0 - WGS84_F)
ISO_Q_NET = 42.7  # [ISO-3046] reference net specific energy, MJ/kg [M], from memory

# ship_t1.toml and the voyage files (fictional): one stirred volume, flat SFOC
V_M3 = 1.0
MCR_KW, SFOC_G_KWH, REF_SPEED_KN, REF_LOAD_PCT = 9000.0, 171.0, 14.0, 85.0
Q_NET = 40.0  # both fuels, set with q_net_mj_kg
RHO = 880.0  # both fuels, kg/m³ at 15 °C
S_HFO, S_MGO = 0.40, 0.05  # % m/m
LAT = 50.0  # every route sails along this parallel


def parallel_m(lon_from: float, lon_to: float, lat: float = LAT) -> float:
    """Length of the rhumb line along a parallel, m: N(φ)·cos φ·Δλ ([WGS84] [D])."""
    phi = math.radians(lat)
    n = WGS84_A / math.sqrt(1.0 - WGS84_E2 * math.sin(phi) ** 2)
    return n * math.cos(phi) * math.radians(abs(lon_to - lon_from))


def lon_back(lon: float, distance_m: float, lat: float = LAT) -> float:
    """Longitude ``distance_m`` due west of ``lon`` along the parallel (closed form)."""
    phi = math.radians(lat)
    n = WGS84_A / math.sqrt(1.0 - WGS84_E2 * math.sin(phi) ** 2)
    return lon - math.degrees(distance_m / (n * math.cos(phi)))


def hours(distance_m: float, speed_kn: float) -> float:
    return distance_m / NM_M / speed_kn


def mass_rate_t_h(speed_kn: float) -> float:
    """Main engine fuel, t/h of a fuel of Q_NET: P = P_ref (v/v_ref)³ ([PROPELLER-LAW]),
    m = P·SFOC·42.7/Q ([ISO-3046] [M])."""
    load_pct = REF_LOAD_PCT * (speed_kn / REF_SPEED_KN) ** 3
    iso = MCR_KW * load_pct / 100.0 * SFOC_G_KWH / 1e6
    return iso * ISO_Q_NET / Q_NET


# ship_t1g.toml: the same with a generator on the circuit (1500 kW at 200 g/kWh)
DG_KW, DG_SFOC_G_KWH = 1500.0, 200.0


def dg_rate_t_h() -> float:
    """Generator fuel, t/h of a fuel of Q_NET: P·SFOC·42.7/Q ([ISO-3046] [M])."""
    return DG_KW * DG_SFOC_G_KWH / 1e6 * ISO_Q_NET / Q_NET


def dg_flow_m3_h() -> float:
    """The generator's volumetric draw through the stirred volume, m³/h (alongside, main
    engine stopped)."""
    return dg_rate_t_h() * 1000.0 / RHO


def flow_m3_h(speed_kn: float) -> float:
    """Volumetric draw through the stirred volume, m³/h (equal densities: blend-independent)."""
    return mass_rate_t_h(speed_kn) * 1000.0 / RHO


def washout_log(target_pct: float, s0: float = S_HFO, s1: float = S_MGO) -> float:
    """ln((S₀ − S₁)/(S_t − S₁)): volumes of throughput (× V) needed to reach the target
    ([LEVENSPIEL-1999] CSTR washout [D])."""
    return math.log((s0 - s1) / (target_pct - s1))


def utc(text: str) -> datetime:
    return datetime.fromisoformat(text.replace("Z", "+00:00")).astimezone(UTC)


def seconds(a: datetime | str, b: datetime | str) -> float:
    """``a − b`` in seconds (ISO texts or datetimes)."""
    aa, bb = (utc(x) if isinstance(x, str) else x for x in (a, b))
    return (aa - bb).total_seconds()


def plan_doc(name_or_path: str | Path):
    """``(plan, plan_json(plan))`` of a voyage file (a fixture name or a path)."""
    from planner.voyage.report import plan_json
    from planner.voyage.run import build_plan

    p = Path(name_or_path)
    if not p.suffix:
        p = VOYAGES / f"{name_or_path}.toml"
    plan = build_plan(p)
    return plan, plan_json(plan)
