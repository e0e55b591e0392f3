"""The voyage file (TOML): what this voyage is, and what is on board.

Format (ours; an annotated example is ``areas_sample/voyage.toml``)::

    [voyage]
    name = "..."                         # free text
    ship = "ship.toml"                   # paths are relative to this file
    route = "aldmere_to_skarvik.csv"
    areas = ["."]                        # files or folders of .geojson
    depart = "2027-05-30T06:00+12:00"    # with its UTC offset
    ship_time = "+12:00"                 # ship's time zone (default: depart's offset)
    speed_kn = 14.0                      # legs without their own speed or ETA
    caution_zones = "cautions.geojson"   # optional: confined or congested waters
    discharge_zones = "discharge.geojson"  # optional: washwater discharge zones (scrubbers)

    [[voyage.zone_change]]               # optional: ship's clocks changed on the way
    at_utc = "2027-06-01T12:00Z"
    ship_time = "-11:00"

    [[fuel]]                             # one per delivery note
    name = "VLSFO"  grade = "RMK 380"  bdn_ref = "..."  sulphur_pct = 0.48
    density_kg_m3 = 991.0  viscosity_cst = 380.0  viscosity_ref_c = 50.0

    [tank."HFO service"]                 # the content of every tank now
    fuel = "VLSFO"  volume_m3 = 38.0  temperature_c = 60.0

    [[scrubber_outage]]                  # optional: planner.voyage.scrubber_voyage
    scrubber = "egcs"  from = "2027-05-31T02:00+12:00"  until = "..."  reason = "..."

    [margins]
    time_before_boundary_h = 1.0         # default 1 h (common practice)
    sulphur_target_fraction = 0.9        # flush to 90 % of the limit (default)
    fuel_choice_margin = 0.0             # fuel chosen at or under limit × (1 − this); default 0
    min_time_on_regular_h = 4.0          # shorter than this on regular fuel: stay compliant

    [port]                               # optional: the ship alongside (planner.voyage.port)
    departure_load_pct = { dg1 = 80.0 }  # % of the sea rate (main engine: % MCR)
    arrival_load_pct = { dg1 = 80.0 }    # default: as at departure
    arrival_hours = 12.0                 # alongside after arrival (default 0)
    departure_fuel = { boiler = "mgo" }  # each circuit's fuel at departure (default regular)

Every bad or missing value is one :class:`geo.errors.InputError` naming the
file and the key.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from datetime import datetime, timezone
from pathlib import Path

from geo.errors import InputError
from planner.common.defaults import (
    DEFAULT_MARGIN_H,
    DEFAULT_TARGET_FRACTION,
    MAX_CONFIDENCE,
    MIN_CONFIDENCE,
)
from planner.common.input_files import read_toml
from planner.common.keys import check_keys
from planner.common.timefmt import parse_moment, parse_offset
from planner.fuels import Fuel
from planner.voyage.bunkering_file import BUNKERING_KEYS, Bunkering, load_bunkering
from planner.voyage.scrubber_events import ScrubberOutage
from planner.voyage.scrubber_voyage import discharge_zones_path, parse_outages

FUEL_KEYS = ("name", "grade", "bdn_ref", "sulphur_pct", "density_kg_m3", "viscosity_cst",
             "viscosity_ref_c", "viscosity2_cst", "viscosity2_ref_c", "water_pct", "ash_pct",
             "q_net_mj_kg", "flash_point_c", "carbon_pct")
TOP_KEYS = ("voyage", "fuel", "tank", "margins", "port", "uncertainty",
            "scrubber_outage") + BUNKERING_KEYS
VOYAGE_KEYS = ("name", "ship", "route", "areas", "caution_zones", "depart", "ship_time",
               "speed_kn", "zone_change", "discharge_zones")
ZONE_CHANGE_KEYS = ("at_utc", "ship_time")
TANK_KEYS = ("fuel", "volume_m3", "temperature_c")
MARGIN_KEYS = ("time_before_boundary_h", "sulphur_target_fraction", "fuel_choice_margin",
               "min_time_on_regular_h", "confidence")
PORT_KEYS = ("departure_load_pct", "arrival_load_pct", "arrival_hours", "departure_fuel")

DEFAULT_MIN_TIME_ON_REGULAR_H = 4.0
"""Shorter than this fully on regular fuel between two areas, the ship stays on compliant
fuel [h]: each changeover carries a loss-of-propulsion risk ([USCG-MSA-03-09]), not worth
taking for a few hours of cheaper fuel (our choice, common practice)."""


@dataclass(frozen=True)
class PortSpec:
    """The voyage file's ``[port]`` table as written (checked against the ship later).

    Parameters
    ----------
    departure_load_pct : dict of str to float [%]
        Consumers named for alongside before departure: % of the sea rate (main engine:
        % MCR); consumers not named keep the ship file's default.
    arrival_load_pct : dict of str to float [%] or None
        The same after arrival (None: as before departure).
    arrival_hours : float [h]
        Hours alongside after arrival (their compliant fuel is counted when the arrival
        port is inside an area).
    departure_fuel : dict of str to str
        The fuel each named circuit is on at departure (others: the regular fuel).
    """

    departure_load_pct: dict[str, float] = field(default_factory=dict)
    arrival_load_pct: dict[str, float] | None = None
    arrival_hours: float = 0.0
    departure_fuel: dict[str, str] = field(default_factory=dict)


@dataclass(frozen=True)
class TankContent:
    """What a tank holds now, as sounded.

    Parameters
    ----------
    fuel : str
        The fuel, by its ``[[fuel]]`` name.
    volume_m3 : float [m3]
        The observed volume at ``temperature_c``.
    temperature_c : float [degC]
        The temperature of the fuel in the tank (default 15 °C: standard volume).
    """

    fuel: str
    volume_m3: float
    temperature_c: float = 15.0


@dataclass(frozen=True)
class Voyage:
    """A loaded voyage file; paths are absolute.

    Parameters
    ----------
    file : str
        The voyage file as named (errors and the JSON name it).
    name : str
        The voyage's name (default: the file's stem).
    ship_file, route_file : Path
        The ship and route files.
    area_paths : tuple of Path
        Area files or folders of them.
    depart_utc : datetime
        Departure, aware, UTC.
    ship_tz : timezone
        Ship's time at departure (a fixed UTC offset).
    speed_kn : float or None [kn]
        Speed for legs without their own speed or ETA.
    fuels : tuple of Fuel
        The delivery-note fuels, in file order.
    tanks : dict of str to TankContent
        The sounding of each tank named, by tank.
    zone_changes : tuple of (datetime, timezone)
        Changes of ship's time: from each moment (aware, UTC) on, the new offset.
    caution_zones : Path or None
        Confined or congested waters (GeoJSON), if any.
    time_margin_h : float [h]
        Compliant this long before each boundary.
    sulphur_target_fraction : float [-]
        Aim at this share of each limit.
    confidence : float or None [-]
        The confidence of the starts to add (Monte Carlo), if any.
    fuel_choice_margin : float [-]
        A fuel is chosen for a stretch if its sulphur is at or under limit × (1 − this).
    min_time_on_regular_h : float [h]
        Less than this fully on regular fuel between two areas: stay on compliant fuel.
    port : PortSpec
        The ship alongside before departure and after arrival.
    discharge_zones : Path or None
        Washwater discharge zones (GeoJSON, :mod:`geo.discharge_zones`), if any.
    scrubber_outages : tuple of ScrubberOutage
        Scrubbers out of service on the voyage (:mod:`planner.voyage.scrubber_voyage`).
    bunkering : Bunkering
        Bunker ports on the way and attempts to buy compliant fuel
        (:mod:`planner.voyage.bunkering_file`).
    """

    file: str
    name: str
    ship_file: Path
    route_file: Path
    area_paths: tuple[Path, ...]
    depart_utc: datetime
    ship_tz: timezone
    speed_kn: float | None
    fuels: tuple[Fuel, ...]
    tanks: dict[str, TankContent] = field(default_factory=dict)
    zone_changes: tuple[tuple[datetime, timezone], ...] = ()
    caution_zones: Path | None = None
    time_margin_h: float = DEFAULT_MARGIN_H
    sulphur_target_fraction: float = DEFAULT_TARGET_FRACTION
    confidence: float | None = None
    fuel_choice_margin: float = 0.0
    min_time_on_regular_h: float = DEFAULT_MIN_TIME_ON_REGULAR_H
    port: PortSpec = field(default_factory=PortSpec)
    discharge_zones: Path | None = None
    scrubber_outages: tuple[ScrubberOutage, ...] = ()
    bunkering: Bunkering = field(default_factory=Bunkering)

    def fuel(self, name: str) -> Fuel:
        """The delivery-note fuel called ``name``.

        Parameters
        ----------
        name : str
            The fuel's ``[[fuel]]`` name (KeyError if none).
        """
        for f in self.fuels:
            if f.name == name:
                return f
        raise KeyError(name)

    def ship_tz_at(self, moment: datetime) -> timezone:
        """The ship's time zone in force at a moment (after any zone changes).

        Parameters
        ----------
        moment : datetime
            An aware datetime (compared in UTC with the zone changes).
        """
        tz = self.ship_tz
        for at, zone in self.zone_changes:
            if moment >= at:
                tz = zone
        return tz


def _table(doc: dict, key: str, file: str, required: bool = True) -> dict:
    v = doc.get(key)
    if v is None and not required:
        return {}
    if not isinstance(v, dict):
        raise InputError(file, f"[{key}]", None if v is None else v, f"a [{key}] table")
    return v


def _number(tab: dict, key: str, file: str, place: str, *, required: bool = True,
            default: float | None = None, low: float | None = None,
            high: float | None = None) -> float | None:
    v = tab.get(key)
    if v is None:
        if required:
            raise InputError(file, f"{place}.{key}", None, "a number")
        return default
    if isinstance(v, bool) or not isinstance(v, int | float):
        raise InputError(file, f"{place}.{key}", v, "a number")
    x = float(v)
    if (low is not None and x < low) or (high is not None and x > high):
        raise InputError(file, f"{place}.{key}", v, f"a number from {low} to {high}")
    return x


def _text(tab: dict, key: str, file: str, place: str, required: bool = True) -> str | None:
    v = tab.get(key)
    if v is None:
        if required:
            raise InputError(file, f"{place}.{key}", None, "a text value")
        return None
    if not isinstance(v, str) or not v.strip():
        raise InputError(file, f"{place}.{key}", v, "a non-empty text value")
    return v.strip()


def _path(base: Path, text: str, file: str, place: str) -> Path:
    p = (base / text).resolve()
    if not p.exists():
        raise InputError(file, place, text, "an existing file (relative to the voyage file)")
    return p


def _fuel(tab: object, file: str, place: str) -> Fuel:
    if not isinstance(tab, dict):
        raise InputError(file, place, tab, "a [[fuel]] table")
    for k in tab:
        if k not in FUEL_KEYS:
            raise InputError(file, f"{place}.{k}", tab[k],
                             f"one of the keys {', '.join(FUEL_KEYS)}")
    kw = {k: tab[k] for k in FUEL_KEYS if k in tab}
    for k in ("name", "grade"):
        _text(tab, k, file, place)
    for k in ("sulphur_pct", "density_kg_m3", "viscosity_cst", "viscosity_ref_c"):
        _number(tab, k, file, place)
    try:
        return Fuel(**kw)
    except (TypeError, ValueError) as exc:
        raise InputError(file, place, kw.get("name"), f"valid delivery-note data ({exc})") from None


def load_voyage(path: str | Path) -> Voyage:
    """Read and check a voyage file.

    Parameters
    ----------
    path : str or Path
        The voyage file (TOML; format in the module notes).

    Raises
    ------
    InputError
        For any bad or missing value, naming the file and the key.
    """
    file = str(path)
    p = Path(path)
    doc = read_toml(path, "voyage file")
    base = p.resolve().parent
    check_keys(doc, TOP_KEYS, file, "")
    v = _table(doc, "voyage", file)
    check_keys(v, VOYAGE_KEYS, file, "voyage")
    ship = _path(base, _text(v, "ship", file, "voyage"), file, "voyage.ship")
    route = _path(base, _text(v, "route", file, "voyage"), file, "voyage.route")
    areas_raw = v.get("areas")
    if isinstance(areas_raw, str):
        areas_raw = [areas_raw]
    if not isinstance(areas_raw, list) or not areas_raw or not all(isinstance(a, str)
                                                                     for a in areas_raw):
        raise InputError(file, "voyage.areas", areas_raw, "a list of area files or folders")
    areas = tuple(_path(base, a, file, "voyage.areas") for a in areas_raw)
    depart_text = _text(v, "depart", file, "voyage")
    depart = parse_moment(depart_text, file=file, place="voyage.depart")
    tz_text = _text(v, "ship_time", file, "voyage", required=False)
    if tz_text:
        tz = parse_offset(tz_text, file=file, place="voyage.ship_time")
    else:
        written = datetime.fromisoformat(depart_text.replace("z", "Z")).tzinfo
        tz = written if isinstance(written, timezone) else parse_offset("Z")
    changes = []
    for i, zc in enumerate(v.get("zone_change", []) or []):
        place = f"voyage.zone_change[{i + 1}]"
        if not isinstance(zc, dict):
            raise InputError(file, place, zc, "a table with at_utc and ship_time")
        check_keys(zc, ZONE_CHANGE_KEYS, file, place)
        at = parse_moment(_text(zc, "at_utc", file, place), file=file, place=f"{place}.at_utc")
        zone = parse_offset(_text(zc, "ship_time", file, place), file=file,
                            place=f"{place}.ship_time")
        changes.append((at, zone))
    speed = _number(v, "speed_kn", file, "voyage", required=False, low=0.1, high=60.0)
    cz = _text(v, "caution_zones", file, "voyage", required=False)
    cautions = _path(base, cz, file, "voyage.caution_zones") if cz else None
    fuels_raw = doc.get("fuel")
    if not isinstance(fuels_raw, list) or not fuels_raw:
        raise InputError(file, "[[fuel]]", None, "at least one [[fuel]] from a delivery note")
    fuels = tuple(_fuel(f, file, f"fuel[{i + 1}]") for i, f in enumerate(fuels_raw))
    names = [f.name for f in fuels]
    for n in names:
        if names.count(n) > 1:
            raise InputError(file, "[[fuel]].name", n, "a different name for each fuel")
    tanks = {}
    for tname, t in _table(doc, "tank", file, required=False).items():
        place = f'tank."{tname}"'
        if not isinstance(t, dict):
            raise InputError(file, place, t, "a table with fuel and volume_m3")
        check_keys(t, TANK_KEYS, file, place)
        fuel = _text(t, "fuel", file, place)
        if fuel not in names:
            raise InputError(file, f"{place}.fuel", fuel, f"one of the fuels: {', '.join(names)}")
        vol = _number(t, "volume_m3", file, place, low=0.0, high=1e5)
        temp = _number(t, "temperature_c", file, place, required=False, default=15.0,
                       low=-10.0, high=150.0)
        tanks[tname] = TankContent(fuel, vol, temp)
    m = _table(doc, "margins", file, required=False)
    check_keys(m, MARGIN_KEYS, file, "margins")
    margin_h = _number(m, "time_before_boundary_h", file, "margins", required=False,
                       default=DEFAULT_MARGIN_H, low=0.0, high=48.0)
    frac = _number(m, "sulphur_target_fraction", file, "margins", required=False,
                   default=DEFAULT_TARGET_FRACTION, low=0.1, high=1.0)
    conf = _number(m, "confidence", file, "margins", required=False, low=MIN_CONFIDENCE,
                   high=MAX_CONFIDENCE)
    choice = _number(m, "fuel_choice_margin", file, "margins", required=False, default=0.0,
                     low=0.0, high=0.5)
    regular_h = _number(m, "min_time_on_regular_h", file, "margins", required=False,
                        default=DEFAULT_MIN_TIME_ON_REGULAR_H, low=0.0, high=240.0)
    port = _port(_table(doc, "port", file, required=False), file, names)
    return Voyage(file, _text(v, "name", file, "voyage", required=False) or p.stem, ship, route,
                  areas, depart, tz, speed, fuels, tanks, tuple(changes), cautions, margin_h,
                  frac, conf, choice, regular_h, port,
                  discharge_zones=discharge_zones_path(v, base, file),
                  scrubber_outages=parse_outages(doc.get("scrubber_outage"), file),
                  bunkering=load_bunkering(doc, file))


def _loads(tab: dict, key: str, file: str) -> dict[str, float] | None:
    raw = tab.get(key)
    if raw is None:
        return None
    if not isinstance(raw, dict):
        raise InputError(file, f"port.{key}", raw, "a table of consumer = load % "
                         "(e.g. { dg1 = 80.0 })")
    return {str(k): _number(raw, k, file, f"port.{key}", low=0.0, high=110.0) for k in raw}


def _port(tab: dict, file: str, fuels: list[str]) -> PortSpec:
    """The ``[port]`` table; consumer and circuit names are checked against the ship in
    :func:`planner.voyage.port.port_state`."""
    check_keys(tab, PORT_KEYS, file, "port")
    dep = _loads(tab, "departure_load_pct", file) or {}
    arr = _loads(tab, "arrival_load_pct", file)
    hours = _number(tab, "arrival_hours", file, "port", required=False, default=0.0, low=0.0,
                    high=24.0 * 60)
    raw = tab.get("departure_fuel") or {}
    if not isinstance(raw, dict):
        raise InputError(file, "port.departure_fuel", raw, 'a table of circuit = fuel name '
                         '(e.g. { boiler = "mgo" })')
    dep_fuel = {}
    for circuit, name in raw.items():
        if name not in fuels:
            raise InputError(file, f"port.departure_fuel.{circuit}", name,
                             f"one of the fuels: {', '.join(fuels)}")
        dep_fuel[str(circuit)] = name
    return PortSpec(dep, arr, hours, dep_fuel)
