"""Load a ship file (TOML) into a :class:`planner.ship.system.FuelSystem`.

The format is documented in the README ("The ship file") and annotated in
``areas_sample/ship.toml``. Tables: ``[ship]``, ``[fuels.NAME]``,
``[tanks.NAME]``, ``[consumers.NAME]``, ``[volumes.NAME]``,
``[circuits.NAME]`` (chain form: ``chain``, optional ``loop``; or general
form: ``links``), ``[scrubbers.NAME]`` (:mod:`planner.ship.scrubber_file`).
Every problem is one :class:`geo.errors.InputError` naming the file and the
key (``circuits.main.links[2].flow``).
"""

from __future__ import annotations

from dataclasses import replace
from pathlib import Path
from typing import Any

import numpy as np

from geo.errors import InputError
from planner.common.imo import check_imo
from planner.common.input_files import MAX_TOML_BYTES, read_toml
from planner.fuels import Fuel
from planner.ship import plausible as pl
from planner.ship._reader import Reader
from planner.ship.consumers import CONSUMER_KINDS, Consumer, MainEngine, iso_demand_t_h
from planner.ship.inlet_limits import WINDOW_KEYS, consumer_window
from planner.ship.scrubber_file import parse_scrubbers, partial_circuit_warnings
from planner.ship.system import (
    VALVE,
    Circuit,
    Flow,
    FuelSystem,
    FuelSystemError,
    Link,
    Pipe,
    ShipIdentity,
    Stirred,
    Tank,
)
from planner.ship.thermal import InletWindow

MAX_FILE_BYTES = MAX_TOML_BYTES

_FUEL_KEYS = ("grade", "bdn_ref", "sulphur_pct", "density_kg_m3", "viscosity_cst",
              "viscosity_ref_c", "viscosity2_cst", "viscosity2_ref_c", "water_pct", "ash_pct",
              "q_net_mj_kg", "flash_point_c")
_CONSUMER_KEYS = {
    "main_engine": ("mcr_kw", "sfoc_g_kwh", "ref_speed_kn", "ref_load_pct", "sfoc_curve"),
    "generator": ("power_kw", "sfoc_g_kwh", "rated_kw"),
    "boiler": ("fuel_t_h", "q_net_ref_mj_kg"),
}
_CONSUMER_RANGES = {"mcr_kw": pl.MCR, "sfoc_g_kwh": pl.SFOC, "ref_speed_kn": pl.SPEED,
                    "power_kw": pl.POWER, "rated_kw": pl.POWER, "fuel_t_h": pl.BOILER_RATE}
_CHAIN_KEYS = ("tanks", "consumers", "chain", "loop", "loop_flow_m3h", "loop_factor", "loop_return")
_LINK_KEYS = ("from", "to", "flow", "flow_m3h", "factor", "consumers")


def load_ship(path: str | Path) -> FuelSystem:
    """Load the fuel system of a ship file (TOML).

    Parameters
    ----------
    path : str or Path
        The ship file, UTF-8 TOML of at most :data:`MAX_FILE_BYTES` bytes;
        the format is in the README ("The ship file").

    Returns
    -------
    FuelSystem
        The checked fuel system; a ``[ship] journal`` path is made absolute,
        relative to the file; values outside their usual range are in its
        ``input_warnings``.

    Raises
    ------
    geo.errors.InputError
        On any fault, as one line naming the file and the key: a missing
        path, a folder or special file, more than :data:`MAX_FILE_BYTES`,
        non-UTF-8 bytes, invalid TOML, NaN or infinite numbers
        (:func:`planner.common.input_files.read_toml`), an unknown key (with
        the nearest valid key), a number outside its accepted range
        (:mod:`planner.ship.plausible`), a bad IMO check digit.

    Examples
    --------
    >>> try:
    ...     load_ship("no_such_ship.toml")
    ... except InputError as e:
    ...     print(e)
    no_such_ship.toml: missing: expected an existing ship file (TOML)
    """
    file = str(path)
    return parse_ship(read_toml(path, "ship file", MAX_FILE_BYTES), file)


def parse_ship(data: dict[str, Any], file: str = "<ship>") -> FuelSystem:
    """The fuel system of an already-parsed ship file.

    Parameters
    ----------
    data : dict
        The ship file's tables, as ``tomllib`` returns them.
    file : str, default "<ship>"
        Name of the file, for the messages.

    Returns
    -------
    FuelSystem
        The checked fuel system.

    Raises
    ------
    geo.errors.InputError
        On any fault; besides the checks of :class:`FuelSystem`, every link
        flow must be ≥ 0 with the main engines at 100 % MCR on the lightest
        fuel the valve offers.

    Examples
    --------
    >>> hfo = {"grade": "RMG 380", "sulphur_pct": 0.48, "density_kg_m3": 991.0,
    ...        "viscosity_cst": 380.0, "viscosity_ref_c": 50.0}
    >>> ship = parse_ship({
    ...     "ship": {"name": "MV Example", "fictional": True},
    ...     "fuels": {"hfo": hfo},
    ...     "tanks": {"hfo_service": {"capacity_m3": 60.0, "fuel": "hfo", "volume_m3": 50.0}},
    ...     "consumers": {"me": {"kind": "main_engine", "mcr_kw": 9000.0, "sfoc_g_kwh": 171.0,
    ...                          "ref_speed_kn": 14.0, "ref_load_pct": 85.0}},
    ...     "volumes": {"mixing": {"kind": "stirred", "volume_m3": 0.5}},
    ...     "circuits": {"main": {"tanks": ["hfo_service"], "consumers": ["me"],
    ...                           "chain": ["mixing"]}}})
    >>> [(link.source, link.target) for link in ship.circuits["main"].links]
    [('valve', 'mixing'), ('mixing', 'me')]
    """
    r = Reader(file)
    r.keys(data, ("ship", "fuels", "tanks", "consumers", "volumes", "circuits", "inlet",
                  "uncertainty", "scrubbers"), "")
    ship_t = r.table(data, "ship", "ship")
    r.keys(ship_t, ("name", "imo", "fictional", "notes", "journal"), "ship")
    fictional = ship_t.get("fictional", False)
    if not isinstance(fictional, bool):
        raise r.fail("ship.fictional", fictional, "true or false")
    imo = ship_t.get("imo", "")
    if not isinstance(imo, str | int) or isinstance(imo, bool):
        raise r.fail("ship.imo", imo, "the IMO number as a string")
    if str(imo).strip():
        imo = check_imo(str(imo), file, "ship.imo")
    journal = ""
    if "journal" in ship_t:
        journal = str(Path(file).resolve().parent / r.text(ship_t, "journal", "ship"))
    ship = ShipIdentity(
        r.text(ship_t, "name", "ship"), str(imo), fictional, str(ship_t.get("notes", "")), journal
    )
    ship_wide = _window_keys(r, data.get("inlet", {}), "inlet")
    inlet = _window(r, "inlet", ship_wide)
    fuels = {n: _fuel(r, n, t) for n, t in _tables(r, data, "fuels").items()}
    tanks = {n: _tank(r, n, t) for n, t in _tables(r, data, "tanks").items()}
    consumer_tables = _tables(r, data, "consumers")
    consumers = {n: _consumer(r, n, t) for n, t in consumer_tables.items()}
    inlets = {n: _window(r, f"consumers.{n}.inlet", ship_wide, c,
                         _window_keys(r, consumer_tables[n].get("inlet", {}),
                                      f"consumers.{n}.inlet"))
              for n, c in consumers.items()}
    volumes = {n: _volume(r, n, t) for n, t in _tables(r, data, "volumes").items()}
    circuits = {n: _circuit(r, n, t) for n, t in _tables(r, data, "circuits").items()}
    scrubbers = parse_scrubbers(r, data.get("scrubbers"), consumers)
    try:
        system = FuelSystem(ship, fuels, tanks, volumes, consumers, circuits, inlet,
                            inlets=inlets, scrubbers=scrubbers)
    except FuelSystemError as e:
        raise InputError(file, e.place, e.value, e.expected) from None
    _check_pumps(r, system)
    r.warnings += partial_circuit_warnings(file, scrubbers, system.circuits)
    return replace(system, input_warnings=tuple(r.warnings)) if r.warnings else system


_INLET_RANGES = {"target_cst": pl.VISCOSITY, "min_cst": pl.VISCOSITY, "max_cst": pl.VISCOSITY,
                 "max_rate_c_per_min": pl.RATE_C_PER_MIN, "supply_temperature_c": pl.TEMPERATURE,
                 "max_temperature_c": pl.TEMPERATURE}


def _window_keys(r: Reader, t: object, place: str) -> dict[str, float]:
    """The keys of an inlet table (``[inlet]`` or a consumer's ``inlet``), checked."""
    if not isinstance(t, dict):
        raise r.fail(place, t, "an inlet table (target_cst, min_cst, max_cst, ...)")
    r.keys(t, WINDOW_KEYS, place)
    return {k: r.number(t, k, place, plausible=_INLET_RANGES[k])  # type: ignore[misc]
            for k in WINDOW_KEYS if k in t}


def _window(r: Reader, place: str, ship_wide: dict[str, float],
            consumer: Consumer | None = None, own: dict[str, float] | None = None
            ) -> InletWindow:
    """The ship-wide window (no consumer: two-stroke defaults), or a consumer's own."""
    try:
        if consumer is None:
            return InletWindow(**ship_wide)
        return consumer_window(consumer, ship_wide, own)
    except ValueError as e:
        raise r.fail(place, {**ship_wide, **(own or {})}, str(e)) from None


def _tables(r: Reader, data: dict, key: str) -> dict[str, dict]:
    group = r.table(data, key, key)
    if not group:
        raise r.fail(key, None, f"at least one [{key}.NAME] table")
    for name, t in group.items():
        if not isinstance(t, dict):
            raise r.fail(f"{key}.{name}", t, "a table")
    return group


def _fuel(r: Reader, name: str, t: dict) -> Fuel:
    place = f"fuels.{name}"
    r.keys(t, _FUEL_KEYS, place)
    kw: dict[str, Any] = {
        "name": name,
        "grade": r.text(t, "grade", place),
        "bdn_ref": str(t.get("bdn_ref", "")),
    }
    for key in _FUEL_KEYS[2:]:
        required = key in ("sulphur_pct", "density_kg_m3", "viscosity_cst", "viscosity_ref_c")
        value = r.number(t, key, place, required)
        if value is not None:
            kw[key] = value
    try:
        return Fuel(**kw)
    except ValueError as e:
        raise r.fail(place, name, f"valid fuel data ({e})") from None


def _tank(r: Reader, name: str, t: dict) -> Tank:
    place = f"tanks.{name}"
    r.keys(t, ("capacity_m3", "fuel", "volume_m3", "content"), place)
    capacity = r.number(t, "capacity_m3", place, plausible=pl.TANK_CAPACITY)
    if "content" in t:
        if "fuel" in t or "volume_m3" in t:
            raise r.fail(f"{place}.content", "content", "either content or fuel + volume_m3")
        content = r.table(t, "content", f"{place}.content")
        for fuel in content:
            r.number(content, fuel, f"{place}.content", plausible=pl.TANK_VOLUME)
    else:
        content = {r.text(t, "fuel", place): r.number(t, "volume_m3", place,
                                                      plausible=pl.TANK_VOLUME)}
    try:
        return Tank(name, capacity, content)  # type: ignore[arg-type]
    except FuelSystemError as e:
        raise r.fail(e.place, e.value, e.expected) from None


def _consumer(r: Reader, name: str, t: dict) -> Consumer:
    place = f"consumers.{name}"
    kind = t.get("kind")
    if kind not in CONSUMER_KINDS:
        raise r.fail(f"{place}.kind", kind, f"one of {', '.join(CONSUMER_KINDS)}")
    allowed = _CONSUMER_KEYS[kind]
    r.keys(t, ("kind", "inlet") + allowed, place)
    kw: dict[str, Any] = {"name": name}
    for key in allowed:
        if key == "sfoc_curve":
            curve = t.get(key, [])
            if not isinstance(curve, list) or not all(
                isinstance(p, list) and len(p) == 2 for p in curve
            ):
                raise r.fail(f"{place}.sfoc_curve", curve, "a list of [load_pct, sfoc_g_kwh] pairs")
            kw[key] = tuple(
                (r.value(load, f"{place}.sfoc_curve[{i + 1}]"),
                 r.value(sfoc, f"{place}.sfoc_curve[{i + 1}]", plausible=pl.SFOC))
                for i, (load, sfoc) in enumerate(curve))
            continue
        optional = key in ("rated_kw", "q_net_ref_mj_kg")
        value = r.number(t, key, place, required=not optional,
                         plausible=_CONSUMER_RANGES.get(key))
        if value is not None:
            kw[key] = value
    try:
        return CONSUMER_KINDS[kind](**kw)
    except (ValueError, TypeError) as e:
        raise r.fail(place, name, f"valid {kind} data ({e})") from None


def _volume(r: Reader, name: str, t: dict) -> Pipe | Stirred:
    place = f"volumes.{name}"
    kind = t.get("kind")
    if kind not in ("pipe", "stirred"):
        raise r.fail(f"{place}.kind", kind, "pipe or stirred")
    try:
        if kind == "stirred":
            r.keys(t, ("kind", "volume_m3"), place)
            return Stirred(name, r.number(t, "volume_m3", place,  # type: ignore[arg-type]
                                          plausible=pl.STIRRED_VOLUME))
        r.keys(t, ("kind", "volume_m3", "length_m", "bore_mm"), place)
        if "volume_m3" in t:
            if "length_m" in t or "bore_mm" in t:
                raise r.fail(
                    f"{place}.volume_m3", t["volume_m3"], "either volume_m3 or length_m + bore_mm"
                )
            return Pipe(name, r.number(t, "volume_m3", place,  # type: ignore[arg-type]
                                       plausible=pl.PIPE_VOLUME))
        pipe = Pipe.from_length(
            name,
            r.number(t, "length_m", place, plausible=pl.PIPE_LENGTH),  # type: ignore[arg-type]
            r.number(t, "bore_mm", place, plausible=pl.PIPE_BORE),  # type: ignore[arg-type]
        )
        if not pl.PIPE_VOLUME.accepts(pipe.volume_m3):
            raise r.fail(f"{place}.bore_mm", t["bore_mm"],
                         f"a bore and length giving {pl.PIPE_VOLUME.expected()} "
                         f"(they give {pipe.volume_m3:.3g} m³)")
        return pipe
    except FuelSystemError as e:
        raise r.fail(e.place, e.value, e.expected) from None


def _circuit(r: Reader, name: str, t: dict) -> Circuit:
    place = f"circuits.{name}"
    tanks = r.names(t, "tanks", place)
    who = r.names(t, "consumers", place)
    if "links" in t:
        if "chain" in t:
            raise r.fail(f"{place}.links", "links", "either chain (with loop) or links")
        r.keys(t, ("tanks", "consumers", "links"), place)
        raw = t["links"]
        if not isinstance(raw, list) or not raw:
            raise r.fail(f"{place}.links", raw, "a list of links {from, to, flow}")
        links = tuple(_link(r, f"{place}.links[{i}]", x) for i, x in enumerate(raw))
        return Circuit(name, tuple(tanks), tuple(who), links)
    r.keys(t, _CHAIN_KEYS, place)
    chain = r.names(t, "chain", place)
    if not chain:
        raise r.fail(f"{place}.chain", chain, "a list of volumes from the valve (or links)")
    at = f"{place}.chain"
    links = [Link(VALVE, chain[0], Flow.consumption(), at)]
    links += [Link(a, b, Flow.balance(), at) for a, b in zip(chain, chain[1:], strict=False)]
    loop = r.names(t, "loop", place, required=False)
    if loop:
        at = f"{place}.loop"
        rate = r.number(t, "loop_flow_m3h", place, required=False, positive=True,
                        plausible=pl.FLOW_RATE)
        factor = r.number(t, "loop_factor", place, required=False, plausible=pl.LOOP_FACTOR)
        if (rate is None) == (factor is None):
            raise r.fail(f"{place}.loop_flow_m3h", rate, "one of loop_flow_m3h or loop_factor")
        flow = Flow.fixed(rate) if rate is not None else Flow.consumption(factor)  # type: ignore
        back = r.names(t, "loop_return", place, required=False)
        links.append(Link(chain[-1], loop[0], flow, at))
        path = loop + back + [chain[-1]]
        links += [Link(a, b, Flow.balance(), at) for a, b in zip(path, path[1:], strict=False)]
        end = loop[-1]
    else:
        for key in ("loop_flow_m3h", "loop_factor", "loop_return"):
            if key in t:
                raise r.fail(f"{place}.{key}", t[key], "no loop settings without a loop")
        end = chain[-1]
    links += [Link(end, c, None, f"{place}.consumers") for c in who]
    return Circuit(name, tuple(tanks), tuple(who), tuple(links))


def _link(r: Reader, place: str, x: object) -> Link:
    if not isinstance(x, dict):
        raise r.fail(place, x, "a table {from = ..., to = ..., flow = ...}")
    r.keys(x, _LINK_KEYS, place)
    source, target = r.text(x, "from", place), r.text(x, "to", place)
    kinds = [k for k in ("flow", "flow_m3h") if k in x]
    if not kinds:
        return Link(source, target, None, place)  # type: ignore[arg-type]
    word = x.get("flow")
    rate = r.number(x, "flow_m3h", place, required=False, plausible=pl.FLOW_RATE)
    factor = r.number(x, "factor", place, required=False, plausible=pl.LINK_FACTOR)
    if word is not None and word not in ("consumption", "rest"):
        raise r.fail(f"{place}.flow", word, "'consumption' or 'rest' (or give flow_m3h)")
    if word == "rest":
        if rate is not None or factor is not None or "consumers" in x:
            raise r.fail(f"{place}.flow", word, "'rest' alone, without flow_m3h or factor")
        return Link(source, target, Flow.balance(), place)  # type: ignore[arg-type]
    if word is None and (factor is not None or "consumers" in x):
        raise r.fail(
            f"{place}.factor", factor, "factor and consumers only with flow = 'consumption'"
        )
    who = tuple(r.names(x, "consumers", place)) if "consumers" in x else None
    flow = Flow(
        constant_m3h=rate or 0.0,
        factor=(1.0 if factor is None else factor) if word == "consumption" else 0.0,
        consumers=who,
    )
    return Link(source, target, flow, place)  # type: ignore[arg-type]


def _check_pumps(r: Reader, system: FuelSystem) -> None:
    """Every link flow must be >= 0 with main engines at 100 % MCR on the lightest valve fuel."""
    from planner.ship.flows import circuit_flows

    for circuit in system.circuits.values():
        fuels = {f for t in circuit.tanks for f in system.tanks[t].content_m3}
        rho = min(system.fuels[f].density_kg_m3 for f in fuels)
        v = np.array([iso_demand_t_h(system.consumers[c], load_pct=100.0 if isinstance(
            system.consumers[c], MainEngine) else None) * 1000.0 / rho
            for c in circuit.consumers])
        flows = circuit_flows(system, circuit)
        q = flows.rates_m3h(v)
        for i in np.flatnonzero(q < -1e-9):
            link = circuit.links[i]
            place = link.place or f"circuits.{circuit.name}.links[{i}]"
            raise r.fail(
                f"{place}.flow",
                link.flow.describe() if link.flow else "consumption",
                f"a flow >= 0 with main engines at 100 % MCR (it would be {q[i]:.3g} m³/h"
                f" on {link.source} → {link.target})",
            )
