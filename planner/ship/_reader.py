"""Typed values out of a parsed ship file, each fault an InputError naming the key.

Used by :mod:`planner.ship.ship_file` only. A number may carry a
:class:`planner.ship.plausible.Plausible` range: outside its accepted range it
is refused, outside its usual range it is kept and a warning is collected in
:attr:`Reader.warnings`.
"""

from __future__ import annotations

import math
from numbers import Real

from geo.errors import InputError
from planner.common.keys import check_keys
from planner.ship.plausible import Plausible


class Reader:
    """Reads the tables of ship file ``file``; every fault is an InputError naming the key."""

    def __init__(self, file: str) -> None:
        self.file = file
        self.warnings: list[str] = []

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
        check_keys(data, allowed, self.file, place)

    def number(
        self, data: dict, key: str, place: str, required: bool = True, positive: bool = False,
        plausible: Plausible | None = None,
    ) -> float | None:
        value = data.get(key)
        where = f"{place}.{key}" if place else key
        if value is None:
            if required:
                raise self.fail(where, None, "a number")
            return None
        return self.value(value, where, positive, plausible)

    def value(self, value: object, where: str, positive: bool = False,
              plausible: Plausible | None = None) -> float:
        """A number found at ``where``, checked against its ranges."""
        if isinstance(value, bool) or not isinstance(value, Real) or not math.isfinite(value):
            raise self.fail(where, value, "a finite number")
        x = float(value)
        if positive and x <= 0:
            raise self.fail(where, value, "a number above 0")
        if plausible is not None:
            self.check_plausible(x, where, plausible)
        return x

    def check_plausible(self, x: float, where: str, plausible: Plausible) -> None:
        """Refuse ``x`` outside the accepted range; warn outside the usual range."""
        if not plausible.accepts(x):
            raise self.fail(where, x, plausible.expected())
        if not plausible.usual(x):
            hint = f" ({plausible.hint})" if plausible.hint else ""
            self.warnings.append(
                f"{self.file}: {where} = {x:g} {plausible.unit} is outside the usual "
                f"{plausible.usual_low:g}-{plausible.usual_high:g} {plausible.unit}{hint}; "
                "check the ship file.")

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
