"""Washwater discharge zones: where a scrubber may not discharge, read from GeoJSON.

Some ports and coastal states restrict the washwater of exhaust gas cleaning
systems: no open-loop discharge (closed loop, with little or no discharge, is
allowed), or no discharge at all (the scrubber cannot run). The washwater
criteria themselves are in [MEPC-340]; the restricted waters are local rules,
which the user copies into a file of this format.

The file is GeoJSON (RFC 7946 [RFC-7946] [P]) read exactly as the areas and
caution zones are (:mod:`geo.area_files`: Polygon or MultiPolygon features,
holes allowed, every geometry check and refusal of the area loader), with the
properties:

- ``name`` (required, non-empty text, unique among the zones loaded together,
  compared ignoring case);
- ``allows`` (required): ``"closed"`` (no open-loop discharge; closed loop
  allowed) or ``"none"`` (no washwater discharge: no scrubbing at all);
- optional ``edges`` (``geodesic`` default | ``rhumb`` | ``lonlat``), ``note``
  and ``source`` (text);
- optional ``effective_from``, ``effective_until`` (dates ``YYYY-MM-DD``, UTC;
  by default always in force).

Every refusal is one :class:`geo.errors.InputError` naming the file, the
feature and the property. ``geo`` knows nothing of scrubbers: a zone is an
:class:`geo.area.Area` (with no sulphur limit) and the washwater modes it
allows, as words.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass
from pathlib import Path

from geo.area import Area
from geo.area_files import NO_LIMIT_PCT, _area, _features, _files, _gc_paused
from geo.errors import InputError
from geo.progress import Progress, Throttle

ALLOWS_WORDS = {"closed": ("closed",), "none": ()}
"""The ``allows`` property: the washwater modes allowed inside, by word."""
_TEXT_PROPERTIES = ("note", "source")
_DEFAULTS = {"sulphur_limit_pct": NO_LIMIT_PCT, "effective_from": "1900-01-01"}


@dataclass(frozen=True)
class DischargeZone:
    """One washwater discharge zone.

    Parameters
    ----------
    area : Area
        Its outline, dates in force and source (its limit is :data:`NO_LIMIT_PCT`:
        a zone restricts washwater, not fuel).
    allows : tuple of str
        The washwater modes allowed inside: ``("closed",)`` or ``()`` (none).
    note : str
        The file's ``note`` property (may be empty).
    """

    area: Area
    allows: tuple[str, ...]
    note: str = ""

    def __post_init__(self) -> None:
        if self.allows not in ALLOWS_WORDS.values():
            raise ValueError(f"zone {self.area.name!r}: allows must be one of "
                             f"{tuple(ALLOWS_WORDS.values())}, got {self.allows!r}")

    @property
    def name(self) -> str:
        """The zone's name."""
        return self.area.name

    @property
    def allows_word(self) -> str:
        """``"closed"`` or ``"none"``, as the file says it."""
        return next(w for w, modes in ALLOWS_WORDS.items() if modes == self.allows)


def load_discharge_zones(paths: Sequence[str | Path], *,
                         progress: Progress | None = None) -> list[DischargeZone]:
    """Every washwater discharge zone of the given files and folders, in file then feature order.

    Parameters
    ----------
    paths : sequence of str or Path
        GeoJSON files (``.geojson``, ``.json``) or folders of ``*.geojson``.
    progress : callable, optional
        Called with a short text (``"reading discharge zones 1/2"``) at most a
        few times a second.

    Returns
    -------
    list of DischargeZone
        The zones, checked as the area loader checks areas.

    Raises
    ------
    InputError
        Every refusal of :func:`geo.area_files.load_areas` (files, JSON, geometry,
        names, dates, edges), and a missing or unknown ``allows`` or a ``note``
        that is not text.
    """
    say = Throttle(progress)
    zones: list[DischargeZone] = []
    seen: dict[str, str] = {}
    files = _files(paths)
    with _gc_paused():
        for n, path in enumerate(files, start=1):
            say(lambda n=n: f"reading discharge zones {n}/{len(files)}")
            for i, feature in enumerate(_features(path), start=1):
                zones.append(_zone(path, i, feature, seen))
    return zones


def _zone(path: Path, i: int, feature: object, seen: dict[str, str]) -> DischargeZone:
    """The zone of feature ``i`` (1-based): the area loader's checks, then ``allows``."""
    props = feature.get("properties") if isinstance(feature, dict) else None
    if isinstance(feature, dict) and isinstance(props, dict):
        feature = {**feature, "properties": {**_DEFAULTS, **props}}
    area = _area(path, i, feature, seen)
    place = f"feature {i} {area.name!r}"
    props = props if isinstance(props, dict) else {}  # _area refused any other
    allows = props.get("allows")
    if not isinstance(allows, str) or allows not in ALLOWS_WORDS:
        raise InputError(path, f"{place}, property allows", allows,
                         '"closed" (no open-loop discharge) or "none" (no washwater '
                         "discharge: no scrubbing)")
    for key in _TEXT_PROPERTIES:
        value = props.get(key)
        if value is not None and not isinstance(value, str):
            raise InputError(path, f"{place}, property {key}", value, "text")
    return DischargeZone(area, ALLOWS_WORDS[allows], (props.get("note") or "").strip())
