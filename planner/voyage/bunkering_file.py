"""The voyage file's bunkering tables: ports on the way that may sell fuel, and the attempts
made to buy compliant fuel.

Format (ours; an example is ``tests/data/voyages/short_mgo.toml``)::

    [[bunker_port]]                      # a port on the way where fuel may be bought
    name = "Port Fennick"                # free text
    waypoint = 2                         # where: the route's waypoint number (1 = the first)
    # waypoint = "Fennick Roads"         #   or its name as in the route file,
    # distance_nm = 120.0                #   or the distance along the route, nm
    fuels = ["mgo", "DMA"]               # optional: fuels offered (names or grades)
    eta = "2030-03-10T14:00+01:00"       # optional: expected arrival, with its UTC offset

    [[purchase_attempt]]                 # one per supplier asked (regulation 18.2 [MARPOL-VI])
    port = "Aldmere"
    supplier = "Harbour Fuels Ltd"
    date = "2030-03-01"
    fuel = "DMA 0.10 %"                  # the fuel asked for
    quantity_t = 20.0
    answer = "no DMA until April"        # optional: the supplier's answer

Regulation 18.2 ([MARPOL-VI], [MEPC-320], from memory): a ship that cannot buy compliant
fuel under its voyage plan records its attempts to buy it (ports, suppliers, dates,
quantities, answers) and notifies its Administration and the next port's authority. The
tables are read here as written; a waypoint name or number is checked against the route
when the plan is made (:func:`planner.voyage.shortfall_bunker.port_distance_m`). Every bad
value is one :class:`geo.errors.InputError` naming the file and the key.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from datetime import date, datetime

from geo.errors import InputError
from planner.common.keys import check_keys
from planner.common.timefmt import parse_day, parse_moment

BUNKERING_KEYS = ("bunker_port", "purchase_attempt")
"""The voyage file's top-level keys read here."""

BUNKER_PORT_KEYS = ("name", "waypoint", "distance_nm", "fuels", "eta")
PURCHASE_KEYS = ("port", "supplier", "date", "fuel", "quantity_t", "answer")
MAX_QUANTITY_T = 1e5
"""Largest quantity asked for that is taken [t] (a typing slip beyond)."""


@dataclass(frozen=True)
class BunkerPort:
    """A port on the way where fuel may be bought, as the voyage file gives it.

    Parameters
    ----------
    name : str
        The port's name.
    waypoint : int or str or None
        Where on the route: the waypoint's number (1 = the first) or its name.
    distance_nm : float or None [nm]
        Or where on the route as the distance from departure.
    fuels : tuple of str or None
        The fuels offered (names or grades); None: not stated.
    eta_utc : datetime or None
        The expected arrival (aware, UTC), if given; else the schedule's.
    place : str
        Where in the voyage file (``bunker_port[2]``), for messages.
    """

    name: str
    waypoint: int | str | None = None
    distance_nm: float | None = None
    fuels: tuple[str, ...] | None = None
    eta_utc: datetime | None = None
    place: str = "bunker_port"

    def __post_init__(self) -> None:
        if not self.name.strip():
            raise ValueError("BunkerPort.name must not be empty")
        if (self.waypoint is None) == (self.distance_nm is None):
            raise ValueError("BunkerPort needs exactly one of waypoint and distance_nm")
        if self.distance_nm is not None and not (math.isfinite(self.distance_nm)
                                                 and self.distance_nm >= 0.0):
            raise ValueError(f"BunkerPort.distance_nm must be >= 0, got {self.distance_nm!r}")
        if self.eta_utc is not None and self.eta_utc.utcoffset() is None:
            raise ValueError("BunkerPort.eta_utc must be timezone-aware")

    def offers(self, name: str, grade: str) -> bool | None:
        """Whether the port offers a fuel of this name or grade (case does not matter);
        None when its fuels are not stated.

        Parameters
        ----------
        name, grade : str
            The fuel's name in the voyage file and its grade (ISO 8217).
        """
        if self.fuels is None:
            return None
        want = {name.strip().lower(), grade.strip().lower()}
        return any(f.strip().lower() in want for f in self.fuels)


@dataclass(frozen=True)
class PurchaseAttempt:
    """One attempt to buy compliant fuel: who was asked, when, for what, and the answer.

    Parameters
    ----------
    port : str
        The port where the fuel was asked for.
    supplier : str
        The supplier asked.
    on : date
        The day it was asked.
    fuel : str
        The fuel asked for (grade, sulphur), free text.
    quantity_t : float [t]
        The quantity asked for.
    answer : str
        The supplier's answer ("" when not typed: the report leaves a line for it).
    """

    port: str
    supplier: str
    on: date
    fuel: str
    quantity_t: float
    answer: str = ""

    def __post_init__(self) -> None:
        for name in ("port", "supplier", "fuel"):
            if not getattr(self, name).strip():
                raise ValueError(f"PurchaseAttempt.{name} must not be empty")
        if not (math.isfinite(self.quantity_t) and 0.0 < self.quantity_t <= MAX_QUANTITY_T):
            raise ValueError(f"PurchaseAttempt.quantity_t must be in (0, {MAX_QUANTITY_T:g}], "
                             f"got {self.quantity_t!r}")


@dataclass(frozen=True)
class Bunkering:
    """The voyage file's bunker ports and purchase attempts, in file order.

    Parameters
    ----------
    ports : tuple of BunkerPort
        The ``[[bunker_port]]`` tables.
    attempts : tuple of PurchaseAttempt
        The ``[[purchase_attempt]]`` tables.
    """

    ports: tuple[BunkerPort, ...] = field(default=())
    attempts: tuple[PurchaseAttempt, ...] = field(default=())


def _tables(doc: dict, key: str, file: str) -> list[dict]:
    raw = doc.get(key)
    if raw is None:
        return []
    if not isinstance(raw, list):
        raise InputError(file, key, raw, f"[[{key}]] tables")
    for i, t in enumerate(raw):
        if not isinstance(t, dict):
            raise InputError(file, f"{key}[{i + 1}]", t, f"a [[{key}]] table")
    return raw


def _text(tab: dict, key: str, file: str, place: str, required: bool = True) -> str:
    v = tab.get(key)
    if v is None and not required:
        return ""
    if not isinstance(v, str) or not v.strip():
        raise InputError(file, f"{place}.{key}", v, "a non-empty text value")
    return v.strip()


def _bunker_port(tab: dict, file: str, place: str) -> BunkerPort:
    check_keys(tab, BUNKER_PORT_KEYS, file, place)
    name = _text(tab, "name", file, place)
    wp, dist = tab.get("waypoint"), tab.get("distance_nm")
    if (wp is None) == (dist is None):
        raise InputError(file, place, name, "exactly one of waypoint (number or name) and "
                         "distance_nm")
    if wp is not None:
        if isinstance(wp, bool) or not isinstance(wp, int | str) or (
                isinstance(wp, int) and wp < 1) or (isinstance(wp, str) and not wp.strip()):
            raise InputError(file, f"{place}.waypoint", wp, "a waypoint number (1 = the first) "
                             "or a waypoint name of the route")
        wp = wp.strip() if isinstance(wp, str) else wp
    if dist is not None:
        if isinstance(dist, bool) or not isinstance(dist, int | float) or not (
                math.isfinite(float(dist)) and dist >= 0):
            raise InputError(file, f"{place}.distance_nm", dist, "a distance along the route, "
                             "nm, 0 or more")
        dist = float(dist)
    fuels = tab.get("fuels")
    if fuels is not None:
        if not isinstance(fuels, list) or not fuels or not all(
                isinstance(f, str) and f.strip() for f in fuels):
            raise InputError(file, f"{place}.fuels", fuels, 'a list of fuel names or grades, '
                             'e.g. ["mgo", "DMA"]')
        fuels = tuple(f.strip() for f in fuels)
    eta_text = _text(tab, "eta", file, place, required=False)
    eta = parse_moment(eta_text, file=file, place=f"{place}.eta") if eta_text else None
    return BunkerPort(name, wp, dist, fuels, eta, place)


def _attempt(tab: dict, file: str, place: str) -> PurchaseAttempt:
    check_keys(tab, PURCHASE_KEYS, file, place)
    port = _text(tab, "port", file, place)
    supplier = _text(tab, "supplier", file, place)
    raw_day = tab.get("date")
    if isinstance(raw_day, date) and not isinstance(raw_day, datetime):
        day = raw_day
    elif isinstance(raw_day, str):
        day = parse_day(raw_day, file=file, place=f"{place}.date")
    else:
        raise InputError(file, f"{place}.date", raw_day, "the day asked, YYYY-MM-DD")
    fuel = _text(tab, "fuel", file, place)
    q = tab.get("quantity_t")
    if isinstance(q, bool) or not isinstance(q, int | float) or not (
            math.isfinite(float(q)) and 0 < q <= MAX_QUANTITY_T):
        raise InputError(file, f"{place}.quantity_t", q, f"the quantity asked for, t, above 0 "
                         f"and at most {MAX_QUANTITY_T:g}")
    answer = _text(tab, "answer", file, place, required=False)
    return PurchaseAttempt(port, supplier, day, fuel, float(q), answer)


def load_bunkering(doc: dict, file: str) -> Bunkering:
    """The ``[[bunker_port]]`` and ``[[purchase_attempt]]`` tables of a voyage file.

    Parameters
    ----------
    doc : dict
        The voyage file as read (TOML).
    file : str
        The voyage file's name, for messages.

    Raises
    ------
    InputError
        For a bad or missing value, naming the file and the key.
    """
    ports = tuple(_bunker_port(t, file, f"bunker_port[{i + 1}]")
                  for i, t in enumerate(_tables(doc, "bunker_port", file)))
    attempts = tuple(_attempt(t, file, f"purchase_attempt[{i + 1}]")
                     for i, t in enumerate(_tables(doc, "purchase_attempt", file)))
    return Bunkering(ports, attempts)
