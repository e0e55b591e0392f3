"""Unknown keys in an input file are refused, with the nearest valid key suggested.

A typo'd key (``speed_kts`` for ``speed_kn``, ``volume_l`` for ``volume_m3``) must never
be ignored in silence: the value the user meant would be replaced by a default. Every
reader of a TOML table calls :func:`check_keys` with the keys that table may hold.
"""

from __future__ import annotations

import difflib
from collections.abc import Iterable, Mapping

from geo.errors import InputError


def nearest_key(key: str, allowed: Iterable[str]) -> str | None:
    """The allowed key closest to ``key`` in spelling, or None when none is close.

    >>> nearest_key("speed_kts", ("speed_kn", "depart", "route"))
    'speed_kn'
    >>> nearest_key("colour", ("speed_kn", "depart")) is None
    True
    """
    choices = list(allowed)
    found = difflib.get_close_matches(key, choices, n=1, cutoff=0.6)
    if not found:
        lowered = {c.lower(): c for c in choices}
        found = difflib.get_close_matches(key.lower(), list(lowered), n=1, cutoff=0.6)
        found = [lowered[f] for f in found]
    return found[0] if found else None


def check_keys(table: Mapping[str, object], allowed: Iterable[str], file: object,
               place: str) -> None:
    """Refuse the first key of ``table`` that is not in ``allowed``.

    Parameters
    ----------
    table : the parsed TOML table
    allowed : the keys this table may hold
    file : the input file, for the message
    place : the table's place in the file (``"voyage"``, ``'tank."HFO 1"'``); empty
        for the top level

    Raises
    ------
    InputError
        ``file: place.key: 'key': expected one of the keys a, b, c (did you mean 'b'?)``.
    """
    names = tuple(allowed)
    for key in table:
        if key in names:
            continue
        hint = nearest_key(str(key), names)
        expected = f"one of the keys {', '.join(names)}"
        if hint:
            expected += f" (did you mean {hint!r}?)"
        where = f"{place}.{key}" if place else str(key)
        raise InputError(file, where, str(key), expected)
