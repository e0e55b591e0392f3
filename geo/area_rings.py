"""Rings of a GeoJSON area file: positions read, checked and closed (RFC 7946 [RFC-7946] [P]).

Used by :mod:`geo.area_files`. A ring is a list of ``[lon, lat]`` positions
(an altitude, if any, is ignored), closed (the last equal to the first). A
ring whose positions are all good is read at once with numpy; otherwise it
is read position by position, so that the first bad one is refused with its
vertex number and value, as written.
"""

from __future__ import annotations

import json
import math
from itertools import chain
from numbers import Real
from pathlib import Path

import numpy as np
from numpy.typing import NDArray

from geo.area import Ring
from geo.area_checks import Text
from geo.errors import InputError


def read_ring(path: Path, where: str, ring: object) -> tuple[Ring, NDArray[np.int64], NDArray]:
    """Read one closed GeoJSON ring; refuse it with an :class:`InputError` if it is bad.

    Parameters
    ----------
    path : Path
        The file, for messages.
    where : str
        The place, for messages (``"feature 1 'A', polygon 1, ring 2"``).
    ring : object
        The ring as parsed from JSON.

    Returns
    -------
    vertices : Ring
        The open ring of (lon, lat) [deg]: the closing position removed, repeated
        consecutive positions dropped.
    numbers : ndarray of int [-]
        Each kept vertex's number in the file (1-based).
    xy : ndarray of float [deg]
        The kept vertices as an (n, 2) array.
    """
    if not isinstance(ring, list):
        raise InputError(path, where, Text(type(ring).__name__), "a list of [lon, lat] positions")
    points, same = _fast_positions(ring)
    if points is None:  # something to refuse (or unusual positions): read one by one
        read = [_position(path, f"{where}, vertex {k}", p) for k, p in enumerate(ring, start=1)]
        points = np.array(read, dtype=np.float64).reshape(-1, 2)
    if len(points) < 4 or np.any(points[0] != points[-1]):
        shown = Text(
            f"{len(points)} positions"
            if len(points) < 4
            else f"first {points[0].tolist()}, last {points[-1].tolist()}"
        )
        raise InputError(
            path, where, shown, "a closed ring: at least 4 positions, the last equal to the first"
        )
    open_ = points[:-1]
    keep = np.ones(len(open_), dtype=bool)
    keep[1:] = _differ(open_[1:], open_[:-1])  # repeated consecutive vertices
    kept = np.flatnonzero(keep)
    if len(kept) > 1 and np.all(open_[kept[-1]] == open_[0]):
        kept = kept[:-1]  # at most one: consecutive kept vertices differ
    xy = open_[kept]
    if len(xy) < 3 or not np.any(_differ(xy, xy[:1]) & _differ(xy, xy[1:2])):
        distinct = len(set(map(tuple, xy.tolist())))
        raise InputError(
            path,
            where,
            Text(f"{distinct} distinct vertices"),
            "a ring of at least 3 distinct vertices",
        )
    if same:  # the positions are the file's own [lon, lat] float pairs: keep those objects
        vertices = tuple(map(tuple, ring[: len(open_)] if len(kept) == len(open_)
                             else (ring[k] for k in kept.tolist())))
    else:
        vertices = tuple(map(tuple, xy.tolist()))
    return vertices, kept + 1, xy


def _differ(a: NDArray, b: NDArray) -> NDArray[np.bool_]:
    """Whether (lon, lat) rows differ (broadcasting; faster than a reduction over two columns)."""
    return (a[:, 0] != b[:, 0]) | (a[:, 1] != b[:, 1])


def _fast_positions(ring: list) -> tuple[NDArray | None, bool]:
    """All positions as an (n, 2) array when every one is valid, else None (read one by one).

    Also whether every position is exactly two floats (then they can be kept as read).
    """
    try:
        pairs = set(map(len, ring)) == {2}
        if pairs:  # the usual [lon, lat]: straight from the numbers (bool and int checked below)
            arr = np.fromiter(chain.from_iterable(ring), np.float64, 2 * len(ring))
            arr = arr.reshape(-1, 2)
    except (TypeError, ValueError, OverflowError):  # not lists, or not numbers
        return None, False
    # a bool or an int reads as a whole number: only then look at the types
    whole = not pairs or bool(np.any(arr == np.trunc(arr)))
    if whole:
        try:
            kinds = set(map(type, chain.from_iterable(ring)))
        except TypeError:  # a position that is not a list
            return None, False
        if not kinds <= {float, int}:  # bool, text, null: refused or ignored one by one
            return None, False
    if not pairs:
        try:
            arr = np.array(ring, dtype=np.float64)
        except (ValueError, OverflowError):  # positions of different lengths, huge numbers
            return None, False
        if arr.ndim != 2 or arr.shape[1] < 2:
            return None, False
    xy = arr[:, :2]
    ok = np.isfinite(xy).all() and np.all(np.abs(xy[:, 1]) <= 90.0)
    if not (ok and np.all(np.abs(xy[:, 0]) <= 540.0)):
        return None, False
    return np.ascontiguousarray(xy), pairs and (not whole or kinds == {float})


def _position(path: Path, where: str, p: object) -> tuple[float, float]:
    ok = (
        isinstance(p, list)
        and len(p) >= 2
        and all(isinstance(v, Real) and not isinstance(v, bool) and math.isfinite(v) for v in p[:2])
    )
    if not ok:
        raise InputError(path, where, Text(json.dumps(p)), "a position [lon, lat] of two numbers")
    lon, lat = float(p[0]), float(p[1])
    if abs(lat) > 90.0:
        raise InputError(path, where, Text(json.dumps(p)), "a latitude within ±90° (second number)")
    if abs(lon) > 540.0:
        raise InputError(
            path,
            where,
            Text(json.dumps(p)),
            "a longitude within ±540° (first number; at most one turn past ±180)",
        )
    return lon, lat
