"""Shared helpers for the flushing tests: small fuel systems built in code.

Not a conftest: other test modules are written concurrently, so this is a
plain module imported by the flushing tests only.
"""

from __future__ import annotations

from planner.fuels import Fuel
from planner.ship.consumers import Boiler, MainEngine
from planner.ship.system import Circuit, Flow, FuelSystem, Link, Pipe, ShipIdentity, Stirred, Tank
from tests.helpers.paths import DATA

SHIPS = DATA / "ships"


def fuel(name: str, sulphur_pct: float, density_kg_m3: float) -> Fuel:
    """A fuel with made-up viscosity (irrelevant to flushing)."""
    residual = density_kg_m3 > 900.0
    return Fuel(
        name=name,
        grade="RMG 380" if residual else "DMA",
        sulphur_pct=sulphur_pct,
        density_kg_m3=density_kg_m3,
        viscosity_cst=380.0 if residual else 3.0,
        viscosity_ref_c=50.0 if residual else 40.0,
    )


HFO = fuel("hfo", 0.50, 991.0)
MGO = fuel("mgo", 0.05, 845.0)
HFO_EQ = fuel("hfo", 0.50, 900.0)  # equal densities: volume and mass fractions coincide
MGO_EQ = fuel("mgo", 0.05, 900.0)

ENGINE = MainEngine(name="me", mcr_kw=9000, sfoc_g_kwh=170, ref_speed_kn=14, ref_load_pct=85)


def system(
    volumes: dict,
    links: list[Link],
    *,
    fuels: tuple[Fuel, Fuel] = (HFO, MGO),
    tanks: dict | None = None,
    consumers: tuple = (ENGINE,),
    valve: tuple[str, ...] = ("A", "B"),
    extra_circuits: dict | None = None,
) -> FuelSystem:
    """A one-circuit system: valve tanks A (first fuel) and B (second fuel), 500 m³ each."""
    tanks = tanks or {
        "A": Tank("A", 600.0, {fuels[0].name: 500.0}),
        "B": Tank("B", 600.0, {fuels[1].name: 500.0}),
    }
    names = tuple(c.name for c in consumers)
    circuits = {"main": Circuit("main", valve, names, tuple(links))}
    circuits.update(extra_circuits or {})
    return FuelSystem(
        ShipIdentity("test (fictional)"),
        {f.name: f for f in fuels},
        tanks,
        volumes,
        {c.name: c for c in consumers},
        circuits,
    )


def series(volumes_m3: list[float], kinds: str, **kw) -> FuelSystem:
    """valve → v0 → v1 → … → consumer ``me``; ``kinds`` one letter per volume (s/p)."""
    vols, links, prev = {}, [], "valve"
    for i, (v, k) in enumerate(zip(volumes_m3, kinds, strict=True)):
        name = f"v{i}"
        vols[name] = Stirred(name, v) if k == "s" else Pipe(name, v)
        links.append(Link(prev, name, Flow.consumption() if prev == "valve" else Flow.balance()))
        prev = name
    links.append(Link(prev, "me"))
    return system(vols, links, **kw)


def loop_system(mixing_m3: float, loop_m3: list[float], kinds: str, circulation_m3h: float, **kw):
    """valve → mixing (stirred) → loop volumes → engine, rest back to mixing."""
    vols = {"mix": Stirred("mix", mixing_m3)}
    links = [Link("valve", "mix", Flow.consumption())]
    prev = "mix"
    for i, (v, k) in enumerate(zip(loop_m3, kinds, strict=True)):
        name = f"l{i}"
        vols[name] = Stirred(name, v) if k == "s" else Pipe(name, v)
        flow = Flow.fixed(circulation_m3h) if prev == "mix" else Flow.balance()
        links.append(Link(prev, name, flow))
        prev = name
    links += [Link(prev, "me"), Link(prev, "mix", Flow.balance())]
    return system(vols, links, **kw)


BOILER = Boiler(name="boiler", fuel_t_h=0.3)
