"""The ship alongside: what burns before departure and after arrival.

A changeover made alongside (the voyage departs inside an area, or a start
falls before departure) flushes the service system at the consumption in
port, not at sea: with the main engine stopped only the generators and the
boiler draw fuel, so the flush takes many times longer (a well-stirred volume
V at a flow q empties as exp(−q·t/V), [LEVENSPIEL-1999] [D]: the time scales
as 1/q). The voyage file's ``[port]`` table says which consumers run
alongside and at what load; by default (from the ship file) every generator
and boiler runs at its sea rate and the main engine is stopped (common
practice). A load is a per cent of the consumer's sea rate; for the main
engine a per cent of its MCR.

After arrival the ship may stay alongside inside an area for
``arrival_hours`` (for example the EU's 0.10 % at berth, [EU-2016-802] [P]):
the compliant fuel that burns then is counted with the voyage's needs.

The table also says which fuel each circuit is on at departure (default: the
regular fuel); a circuit already on compliant fuel needs no changeover
before departure.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass, field
from types import MappingProxyType

from geo.errors import InputError
from planner.ship.consumers import Consumer, MainEngine
from planner.ship.system import FuelSystem, FuelSystemError
from planner.voyage.voyage_file import Voyage


def default_load_pct(consumer: Consumer) -> float:
    """The ship file's default load alongside, %: the main engine stopped (0 % MCR),
    every other consumer at its sea rate (100 %) (common practice).

    Parameters
    ----------
    consumer : Consumer
        A consumer of the ship file.
    """
    return 0.0 if isinstance(consumer, MainEngine) else 100.0


def alongside_iso_t_h(consumer: Consumer, load_pct: float) -> float:
    """A consumer's fuel rate alongside at the ISO reference energy, t/h.

    Parameters
    ----------
    consumer : Consumer
        The consumer.
    load_pct : float [%]
        Its load: % MCR for a main engine (its SFOC at that load), else % of its sea rate.

    Returns
    -------
    float [t/h]
        ``mcr × load/100 × SFOC(load) / 10⁶`` for a main engine, else the sea rate ×
        load/100.

    Examples
    --------
    A 420 kW generator at 205 g/kWh, alongside at 50 % of its sea load: 0.0861/2 t/h.

    >>> from planner.ship.consumers import Generator
    >>> round(alongside_iso_t_h(Generator(name="dg", power_kw=420.0, sfoc_g_kwh=205.0), 50.0), 5)
    0.04305
    """
    if load_pct < 0.0:
        raise ValueError(f"load_pct must be >= 0, got {load_pct}")
    if isinstance(consumer, MainEngine):
        return consumer.iso_demand_t_h(load_pct=load_pct) if load_pct > 0.0 else 0.0
    return consumer.iso_demand_t_h() * load_pct / 100.0


@dataclass(frozen=True)
class PortState:
    """The consumption alongside, resolved against the ship.

    Parameters
    ----------
    departure_iso_t_h : mapping of str to float [t/h]
        Every consumer's rate alongside before departure (ISO reference energy).
    arrival_iso_t_h : mapping of str to float [t/h]
        The same after arrival.
    departure_load_pct : mapping of str to float [%]
        Every consumer's load before departure (as rated above), for the plan's words.
    arrival_hours : float [h]
        Hours alongside after arrival.
    departure_fuel : mapping of str to str
        The fuel each circuit is on at departure, for the circuits the voyage names.
    """

    departure_iso_t_h: Mapping[str, float]
    arrival_iso_t_h: Mapping[str, float]
    departure_load_pct: Mapping[str, float] = field(default_factory=dict)
    arrival_hours: float = 0.0
    departure_fuel: Mapping[str, str] = field(default_factory=dict)

    def __post_init__(self) -> None:
        for name in ("departure_iso_t_h", "arrival_iso_t_h", "departure_load_pct",
                     "departure_fuel"):
            object.__setattr__(self, name, MappingProxyType(dict(getattr(self, name))))
        if not self.arrival_hours >= 0.0:
            raise ValueError(f"arrival_hours must be >= 0, got {self.arrival_hours}")

    def describe_departure(self) -> str:
        """The load alongside in words (``"dg1 100 %, main_engine stopped"``)."""
        parts = [f"{n} stopped" if p == 0 else f"{n} {p:g} %"
                 for n, p in self.departure_load_pct.items()]
        return ", ".join(parts)


def _loads(system: FuelSystem, given: Mapping[str, float], file: str, key: str
           ) -> dict[str, float]:
    for name in given:
        if name not in system.consumers:
            raise InputError(file, f"port.{key}.{name}", name,
                             f"a consumer of the ship file: {', '.join(system.consumers)}")
        c = system.consumers[name]
        if not isinstance(c, MainEngine) and given[name] > 100.0 + 1e-9:
            raise InputError(file, f"port.{key}.{name}", given[name],
                             "at most 100 (% of its sea rate)")
    return {n: float(given.get(n, default_load_pct(c))) for n, c in system.consumers.items()}


def default_port_state(system: FuelSystem) -> PortState:
    """The ship file's default port state: main engine stopped, the rest as at sea.

    Parameters
    ----------
    system : FuelSystem
        The ship.
    """
    loads = {n: default_load_pct(c) for n, c in system.consumers.items()}
    rates = {n: alongside_iso_t_h(c, loads[n]) for n, c in system.consumers.items()}
    return PortState(rates, rates, loads)


def port_state(voyage: Voyage, system: FuelSystem) -> PortState:
    """The voyage's ``[port]`` table resolved against the ship (defaults filled in).

    Parameters
    ----------
    voyage : Voyage
        The voyage (its :class:`~planner.voyage.voyage_file.PortSpec`).
    system : FuelSystem
        The ship as she sails it.

    Raises
    ------
    InputError
        For a consumer or circuit the ship file lacks, a load above 100 % of a sea rate, or
        a departure fuel no tank at the circuit's valve holds.
    """
    spec = voyage.port
    dep = _loads(system, spec.departure_load_pct, voyage.file, "departure_load_pct")
    arr = (dep if spec.arrival_load_pct is None else
           _loads(system, spec.arrival_load_pct, voyage.file, "arrival_load_pct"))
    for circuit, fuel in spec.departure_fuel.items():
        if circuit not in system.circuits:
            raise InputError(voyage.file, f"port.departure_fuel.{circuit}", circuit,
                             f"a circuit of the ship file: {', '.join(system.circuits)}")
        try:
            system.tank_for(circuit, fuel)
        except FuelSystemError:
            tanks = ", ".join(system.circuits[circuit].tanks)
            raise InputError(voyage.file, f"port.departure_fuel.{circuit}", fuel,
                             f"the fuel of one tank at the circuit's valve ({tanks})") from None
    cons = system.consumers
    return PortState({n: alongside_iso_t_h(cons[n], p) for n, p in dep.items()},
                     {n: alongside_iso_t_h(cons[n], p) for n, p in arr.items()},
                     dep, spec.arrival_hours, spec.departure_fuel)
