"""Typed values out of a parsed ship file, each fault an InputError naming the key.

Used by :mod:`planner.ship.ship_file` only.
"""

from __future__ import annotations

import math
from numbers import Real

from geo.errors import InputError


class Reader:
    """Reads the tables of ship file ``file``; every fault is an InputError naming the key."""

    def __init__(self, file: str) -> None:
        self.file = file

    def fail(self, place: str, value: object, expected: str) -> InputError:
        return InputError(self.file, place, value, expected)

    def table(self, data: dict, key: str, place: str, required: bool = True) -> dict:
        value = data.get(key)
        if value is None and not required:
            return {}
        if not isinstance(value, dict):
            raise self.fail(place, value, "a table")
        return value

    def keys(self, data: dict, allowed: tuple[str, ...], place: str) -> None:
        for k in data:
            if k not in allowed:
                raise self.fail(f"{place}.{k}", k, f"one of the keys {', '.join(allowed)}")

    def number(
        self, data: dict, key: str, place: str, required: bool = True, positive: bool = False
    ) -> float | None:
        value = data.get(key)
        if value is None:
            if required:
                raise self.fail(f"{place}.{key}", None, "a number")
            return None
        if isinstance(value, bool) or not isinstance(value, Real) or not math.isfinite(value):
            raise self.fail(f"{place}.{key}", value, "a number")
        if positive and value <= 0:
            raise self.fail(f"{place}.{key}", value, "a number above 0")
        return float(value)

    def text(self, data: dict, key: str, place: str, required: bool = True) -> str | None:
        value = data.get(key)
        if value is None and not required:
            return None
        if not isinstance(value, str) or not value.strip():
            raise self.fail(f"{place}.{key}", value, "a non-empty string")
        return value

    def names(self, data: dict, key: str, place: str, required: bool = True) -> list[str]:
        value = data.get(key)
        if value is None and not required:
            return []
        if not isinstance(value, list) or not all(isinstance(v, str) and v for v in value):
            raise self.fail(f"{place}.{key}", value, "a list of names")
        return value
