"""The voyage file's scrubber inputs: the discharge-zone file and the scrubber outages.

Keys (the README's "Scrubbers on a voyage")::

    [voyage]
    discharge_zones = "discharge/zones.geojson"   # optional: washwater discharge zones

    [[scrubber_outage]]                 # optional, any number
    scrubber = "egcs"                   # a scrubber of the ship file
    from = "2027-05-31T02:00+12:00"     # out of service from (ISO 8601 with offset)
    until = "2027-05-31T20:00+12:00"    # optional: back in service (default: never)
    reason = "washwater pump repair"    # optional text

Parsed by :func:`planner.voyage.voyage_file.load_voyage` (into
``Voyage.discharge_zones`` and ``Voyage.scrubber_outages``); the scrubber
names are checked against the ship file, and the zone file loaded, by
:func:`check_scrubber_inputs` when the ship is loaded for the voyage
(:func:`planner.voyage.onboard.ship_for_voyage`), so that a bad zone file or an
unknown scrubber is refused before anything long runs. Every fault is one
:class:`geo.errors.InputError` naming the file and the key.
"""

from __future__ import annotations

from collections.abc import Mapping
from datetime import datetime
from pathlib import Path
from typing import TYPE_CHECKING

from geo.errors import InputError
from geo.schedule import to_epoch
from planner.common.keys import check_keys
from planner.common.timefmt import parse_moment
from planner.voyage.scrubber_events import ScrubberOutage

if TYPE_CHECKING:
    from planner.ship.scrubbers import Scrubber
    from planner.voyage.voyage_file import Voyage

OUTAGE_KEYS = ("scrubber", "from", "until", "reason")
"""The keys of a ``[[scrubber_outage]]`` table."""
_ZONE_SUFFIXES = (".geojson", ".json")


def discharge_zones_path(v: Mapping[str, object], base: Path, file: str) -> Path | None:
    """The ``[voyage] discharge_zones`` file, absolute (None when not given).

    Parameters
    ----------
    v : mapping
        The ``[voyage]`` table.
    base : Path
        The voyage file's folder (the path is relative to it).
    file : str
        The voyage file, for the messages.
    """
    text = v.get("discharge_zones")
    if text is None:
        return None
    place = "voyage.discharge_zones"
    if not isinstance(text, str) or not text.strip():
        raise InputError(file, place, text, "the path of a GeoJSON file of washwater "
                         "discharge zones (relative to the voyage file)")
    path = (base / text.strip()).resolve()
    if not path.is_file():
        raise InputError(file, place, text, "an existing GeoJSON file (relative to the "
                         "voyage file)")
    if path.suffix.lower() not in _ZONE_SUFFIXES:
        raise InputError(file, place, text, "a discharge-zone file named *.geojson or *.json")
    return path


def parse_outages(raw: object, file: str) -> tuple[ScrubberOutage, ...]:
    """The ``[[scrubber_outage]]`` tables, in file order.

    Parameters
    ----------
    raw : object
        The parsed ``scrubber_outage`` array of tables (None: no outage).
    file : str
        The voyage file, for the messages.

    Returns
    -------
    tuple of ScrubberOutage
        Moments in epoch seconds [s since 1970-01-01 UTC].

    Raises
    ------
    InputError
        A table that is not one, an unknown key (nearest key suggested), a missing or
        empty scrubber name, a time without its UTC offset, ``until`` not after
        ``from``, a reason that is not text, or two outages of one scrubber that
        overlap.
    """
    if raw is None:
        return ()
    if not isinstance(raw, list):
        raise InputError(file, "[[scrubber_outage]]", raw, "tables [[scrubber_outage]] with "
                         "scrubber and from")
    out: list[ScrubberOutage] = []
    for i, t in enumerate(raw, start=1):
        place = f"scrubber_outage[{i}]"
        if not isinstance(t, dict):
            raise InputError(file, place, t, "a table with scrubber and from")
        check_keys(t, OUTAGE_KEYS, file, place)
        name = t.get("scrubber")
        if not isinstance(name, str) or not name.strip():
            raise InputError(file, f"{place}.scrubber", name,
                             "the name of a scrubber of the ship file ([scrubbers.NAME])")
        start = _moment(t, "from", file, place, required=True)
        until = _moment(t, "until", file, place, required=False)
        if until is not None and until <= start:  # type: ignore[operator]
            raise InputError(file, f"{place}.until", _shown(t["until"]),
                             f"a time after from ({_shown(t['from'])})")
        reason = t.get("reason", "")
        if not isinstance(reason, str):
            raise InputError(file, f"{place}.reason", reason, "text")
        outage = ScrubberOutage(name.strip(), start, until, reason.strip())  # type: ignore[arg-type]
        for j, other in enumerate(out, start=1):
            if other.scrubber == outage.scrubber and _overlap(other, outage):
                raise InputError(file, f"{place}.from", _shown(t["from"]),
                                 f"an outage of {outage.scrubber!r} not overlapping "
                                 f"scrubber_outage[{j}]")
        out.append(outage)
    return tuple(out)


def _moment(t: Mapping[str, object], key: str, file: str, place: str,
            required: bool) -> float | None:
    """An ISO 8601 time with its UTC offset (text, or a TOML offset date-time), epoch s."""
    value = t.get(key)
    where = f"{place}.{key}"
    if value is None:
        if required:
            raise InputError(file, where, None, "an ISO 8601 time with its UTC offset, "
                             "such as 2027-05-31T02:00+12:00")
        return None
    if isinstance(value, datetime):
        if value.tzinfo is None:
            raise InputError(file, where, value.isoformat(),
                             "a time with its UTC offset (add Z or +hh:mm)")
        return to_epoch(value)
    if not isinstance(value, str):
        raise InputError(file, where, value, "an ISO 8601 time with its UTC offset, "
                         "such as 2027-05-31T02:00+12:00")
    return to_epoch(parse_moment(value, file=file, place=where))


def _shown(value: object) -> str:
    """A time as the file wrote it (a TOML date-time in ISO 8601)."""
    return value.isoformat() if isinstance(value, datetime) else str(value)


def _overlap(a: ScrubberOutage, b: ScrubberOutage) -> bool:
    inf = float("inf")
    a1 = inf if a.until_epoch_s is None else a.until_epoch_s
    b1 = inf if b.until_epoch_s is None else b.until_epoch_s
    return a.from_epoch_s < b1 and b.from_epoch_s < a1


def check_scrubber_inputs(voyage: Voyage, scrubbers: Mapping[str, Scrubber]) -> None:
    """Refuse a voyage's scrubber inputs that do not fit its ship, or a bad zone file.

    Parameters
    ----------
    voyage : Voyage
        The voyage: its ``scrubber_outages`` and ``discharge_zones``.
    scrubbers : mapping of str to Scrubber
        The ship file's scrubbers, by name.

    Raises
    ------
    InputError
        An outage naming a scrubber the ship file lacks (naming ``scrubber_outage[n].scrubber``
        of the voyage file), or any fault of the discharge-zone file
        (:func:`geo.discharge_zones.load_discharge_zones`).
    """
    for i, outage in enumerate(voyage.scrubber_outages, start=1):
        if outage.scrubber not in scrubbers:
            have = (f"one of the ship file's scrubbers: {', '.join(scrubbers)}" if scrubbers
                    else "a scrubber of the ship file, which has none ([scrubbers.NAME])")
            raise InputError(voyage.file, f"scrubber_outage[{i}].scrubber", outage.scrubber,
                             have)
    zones = voyage.discharge_zones
    if zones is not None:
        from geo.discharge_zones import load_discharge_zones

        load_discharge_zones([zones])
