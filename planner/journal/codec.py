"""Entries to plain JSON values and back, strictly.

:func:`encode` turns an :class:`~planner.journal.entries.Entry` (or any of
its parts) into dicts, lists, strings and numbers: datetimes as ISO 8601 UTC
with ``Z``, tuples as lists, each details object tagged with its ``type``; a
field added after journals were first written is left out while at its
default, so older entries encode exactly as they were stored.
:func:`decode_entry` is the inverse and refuses anything else: unknown or
missing keys, wrong types, and every value the dataclasses' own checks
refuse. ``decode_entry(encode(e)) == e`` for every valid entry.
"""

from __future__ import annotations

import functools
import types
import typing
from dataclasses import MISSING, Field, fields, is_dataclass
from datetime import UTC, datetime

from planner.journal.details_kinds import DETAIL_TYPES
from planner.journal.entries import Entry


class DecodeError(ValueError):
    """Stored content that is not a valid entry (the message names the field)."""


def encode(obj: object) -> object:
    """Plain JSON values for an entry or any part of one."""
    if is_dataclass(obj) and not isinstance(obj, type):
        out: dict[str, object] = {f.name: encode(getattr(obj, f.name)) for f in fields(obj)
                                  if not _left_out(f, getattr(obj, f.name))}
        tag = getattr(type(obj), "TYPE", None)
        if tag is not None:
            out["type"] = tag
        return out
    if isinstance(obj, datetime):
        return iso(obj)
    if isinstance(obj, tuple | list):
        return [encode(x) for x in obj]
    return obj


def _left_out(f: Field, value: object) -> bool:
    """A field added later (``metadata`` ``omit_default``) at its default is not stored."""
    return bool(f.metadata.get("omit_default")) and value == f.default


def iso(moment: datetime) -> str:
    """``2027-06-02T14:05:00Z``: ISO 8601 UTC (microseconds only when present)."""
    return moment.astimezone(UTC).isoformat().replace("+00:00", "Z")


def decode_entry(data: object) -> Entry:
    """The :class:`Entry` of plain JSON values; :class:`DecodeError` if it is not one."""
    try:
        return _decode(Entry, data, "entry")
    except DecodeError:
        raise
    except (ValueError, TypeError) as exc:
        raise DecodeError(str(exc)) from None


@functools.cache
def _hints(cls: type) -> dict[str, object]:
    return typing.get_type_hints(cls)


def _decode(hint: object, value: object, where: str) -> object:
    origin = typing.get_origin(hint)
    if origin in (typing.Union, types.UnionType):
        options = typing.get_args(hint)
        if value is None and type(None) in options:
            return None
        rest = [o for o in options if o is not type(None)]
        if len(rest) == 1:
            return _decode(rest[0], value, where)
        if not isinstance(value, dict) or value.get("type") not in DETAIL_TYPES:
            raise DecodeError(f"{where}: expected details tagged with one of "
                              f"{sorted(DETAIL_TYPES)}, got {value!r}")
        return _decode(DETAIL_TYPES[value["type"]], value, where)
    if origin is tuple:
        item = typing.get_args(hint)[0]
        if not isinstance(value, list):
            raise DecodeError(f"{where}: expected a list, got {value!r}")
        return tuple(_decode(item, v, f"{where}[{i}]") for i, v in enumerate(value))
    if isinstance(hint, type) and is_dataclass(hint):
        return _dataclass(hint, value, where)
    if hint is datetime:
        if not isinstance(value, str) or not value.endswith("Z"):
            raise DecodeError(f"{where}: expected an ISO 8601 UTC time ending in Z, got {value!r}")
        try:
            return datetime.fromisoformat(value).astimezone(UTC)
        except ValueError:
            raise DecodeError(f"{where}: not a time: {value!r}") from None
    if hint is float:
        if isinstance(value, bool) or not isinstance(value, int | float):
            raise DecodeError(f"{where}: expected a number, got {value!r}")
        return float(value)
    if hint in (int, str, bool):
        if type(value) is not hint:
            raise DecodeError(f"{where}: expected {hint.__name__}, got {value!r}")
        return value
    raise DecodeError(f"{where}: cannot decode type {hint!r}")


def _dataclass(cls: type, value: object, where: str) -> object:
    if not isinstance(value, dict):
        raise DecodeError(f"{where}: expected an object, got {value!r}")
    hints = _hints(cls)
    known = {f.name: f for f in fields(cls)}
    tag = getattr(cls, "TYPE", None)
    extra = set(value) - set(known) - ({"type"} if tag else set())
    if extra:
        raise DecodeError(f"{where}: unknown key(s) {sorted(extra)}")
    kwargs = {}
    for name, f in known.items():
        if name in value:
            kwargs[name] = _decode(hints[name], value[name], f"{where}.{name}")
        elif f.default is MISSING and f.default_factory is MISSING:
            raise DecodeError(f"{where}: missing key {name!r}")
    try:
        return cls(**kwargs)
    except (ValueError, TypeError) as exc:
        raise DecodeError(f"{where}: {exc}") from None
