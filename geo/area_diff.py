"""What changed between two versions of an area set: areas, properties, vertices.

Areas are matched by name (ignoring case; a change of case is reported as a
rename); an area whose name is gone and the one new area with the very same
rings are reported as renamed. For each matched
area the properties (limit, dates in force, edges, source) are compared, then
the polygons in order and, in each, the exterior and the holes in order. Two
rings with the same vertices in the same cyclic order, either way round and
from any starting vertex, are the same ring (the same boundary on the Earth:
an area is the smaller side of its ring). Otherwise the new ring is turned to
start where the old one does and the vertices are lined up in order
(:class:`difflib.SequenceMatcher`): a vertex replaced one for one is reported
moved, with the geodesic distance between its two places [KARNEY-2013] (pyproj,
GeographicLib), others added or removed. Positions are compared to 1e-9° (about
0.1 mm) with longitudes taken modulo 360°.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass
from difflib import SequenceMatcher

from geo.area import Area, Ring

KINDS = ("added", "removed", "renamed", "limit", "effective_from", "effective_until", "edges",
         "source", "polygon added", "polygon removed", "ring added", "ring removed",
         "vertex moved", "vertex added", "vertex removed")
"""The kinds of change, in the order they are listed within an area."""

_DIGITS = 9


@dataclass(frozen=True)
class Change:
    """One change in one area.

    Attributes
    ----------
    area : the area's name (the new one when renamed)
    kind : one of :data:`KINDS`
    place : where in the area (``"polygon 1, ring 2 (hole 1), vertex 5"``), or ``""``
    old, new : the value before and after: a number [% m/m], a date or text, a
        position ``(lat, lon)`` [deg], a vertex count, an added or removed area's
        summary (a dict), or None where there is none
    moved_m : for a moved vertex, the geodesic distance between its places [m]
    """

    area: str
    kind: str
    place: str
    old: object
    new: object
    moved_m: float | None = None

    def __post_init__(self) -> None:
        if self.kind not in KINDS:
            raise ValueError(f"change kind {self.kind!r} not one of {KINDS}")


@dataclass(frozen=True)
class AreaDiff:
    """The changes between two area sets.

    Attributes
    ----------
    changes : every change, area by area (old set's order, then the added areas)
    unchanged : names of the areas found the same in both
    old_count, new_count : how many areas each set holds
    """

    changes: tuple[Change, ...]
    unchanged: tuple[str, ...]
    old_count: int
    new_count: int

    @property
    def changed_areas(self) -> tuple[str, ...]:
        """Names of the areas with any change, in order, each once."""
        return tuple(dict.fromkeys(c.area for c in self.changes))


def diff_areas(old: Sequence[Area], new: Sequence[Area]) -> AreaDiff:
    """The changes from the areas ``old`` to the areas ``new`` (see the module notes)."""
    new_by = {a.name.casefold(): a for a in new}
    old_keys = {a.name.casefold() for a in old}
    gone = [a for a in old if a.name.casefold() not in new_by]
    fresh = [a for a in new if a.name.casefold() not in old_keys]
    renamed = _renames(gone, fresh)
    changes: list[Change] = []
    unchanged: list[str] = []
    for a in old:
        b = new_by.get(a.name.casefold()) or renamed.get(a.name)
        if b is None:
            changes.append(Change(a.name, "removed", "", _summary(a), None))
            continue
        found = _area_changes(a, b)
        if b.name != a.name:
            found.insert(0, Change(b.name, "renamed", "", a.name, b.name))
        changes.extend(found)
        if not found:
            unchanged.append(b.name)
    taken = {b.name for b in renamed.values()}
    changes.extend(Change(b.name, "added", "", None, _summary(b)) for b in fresh
                   if b.name not in taken)
    return AreaDiff(tuple(changes), tuple(unchanged), len(old), len(new))


def _summary(a: Area) -> dict:
    """What an added or removed area is: limit [% m/m], dates, size of its rings, edges."""
    return {"limit_pct": a.sulphur_limit_pct, "effective_from": a.effective_from.isoformat(),
            "effective_until": _plain(a.effective_until), "polygons": len(a.polygons),
            "vertices": a.n_vertices, "edges": a.edges}


def _key(p: tuple[float, float]) -> tuple[float, float]:
    lon, lat = p
    return (round((lon + 180.0) % 360.0 - 180.0, _DIGITS) % 360.0, round(lat, _DIGITS))


def _shape_key(a: Area) -> tuple:
    return tuple(tuple(_ring_key(r) for r in (p.exterior, *p.holes)) for p in a.polygons)


def _ring_key(ring: Ring) -> tuple:
    """The ring's vertices from the smallest, either way round: one key per cyclic ring."""
    keys = [_key(p) for p in ring]
    best = None
    for seq in (keys, keys[::-1]):
        i = seq.index(min(seq))
        turned = tuple(seq[i:] + seq[:i])
        best = turned if best is None or turned < best else best
    return best


def _renames(gone: Sequence[Area], fresh: Sequence[Area]) -> dict[str, Area]:
    """Old name -> new area, where the rings of one gone area are those of one new area only."""
    from collections import Counter

    old_keys, new_keys = [_shape_key(a) for a in gone], [_shape_key(b) for b in fresh]
    once = {k for k, n in Counter(old_keys).items() if n == 1} & {
        k for k, n in Counter(new_keys).items() if n == 1}
    by_shape = {k: b for k, b in zip(new_keys, fresh, strict=True) if k in once}
    return {a.name: by_shape[k] for k, a in zip(old_keys, gone, strict=True) if k in once}


def _area_changes(a: Area, b: Area) -> list[Change]:
    out = []
    for kind, x, y in (("limit", a.sulphur_limit_pct, b.sulphur_limit_pct),
                       ("effective_from", a.effective_from, b.effective_from),
                       ("effective_until", a.effective_until, b.effective_until),
                       ("edges", a.edges, b.edges), ("source", a.source, b.source)):
        if x != y:
            out.append(Change(b.name, kind, "", _plain(x), _plain(y)))
    for k in range(max(len(a.polygons), len(b.polygons))):
        where = f"polygon {k + 1}"
        if k >= len(a.polygons):
            out.append(Change(b.name, "polygon added", where, None, b.polygons[k].n_vertices))
        elif k >= len(b.polygons):
            out.append(Change(b.name, "polygon removed", where, a.polygons[k].n_vertices, None))
        else:
            p, q = a.polygons[k], b.polygons[k]
            old_rings, new_rings = (p.exterior, *p.holes), (q.exterior, *q.holes)
            for r in range(max(len(old_rings), len(new_rings))):
                here = f"{where}, ring {r + 1}" + (f" (hole {r})" if r else "")
                if r >= len(old_rings):
                    out.append(Change(b.name, "ring added", here, None, len(new_rings[r])))
                elif r >= len(new_rings):
                    out.append(Change(b.name, "ring removed", here, len(old_rings[r]), None))
                else:
                    out.extend(ring_changes(b.name, here, old_rings[r], new_rings[r]))
    return out


def _plain(v: object) -> object:
    return v.isoformat() if hasattr(v, "isoformat") else v


def ring_changes(area: str, place: str, old: Ring, new: Ring) -> list[Change]:
    """The vertex changes from ring ``old`` to ring ``new`` (open rings of (lon, lat) [deg]).

    Vertex numbers are those of each ring as stored (from 1): an added
    vertex is named by its number in the new ring, the others by their
    number in the old ring.
    """
    if _ring_key(old) == _ring_key(new):
        return []
    ok = [_key(p) for p in old]
    best = None
    for reverse in (False, True):
        order = list(range(len(new)))[::-1] if reverse else list(range(len(new)))
        nk = [_key(new[j]) for j in order]
        shift = nk.index(ok[0]) if ok[0] in nk else 0
        order = order[shift:] + order[:shift]
        nk = nk[shift:] + nk[:shift]
        matcher = SequenceMatcher(None, ok, nk, autojunk=False)
        score = sum(block.size for block in matcher.get_matching_blocks())
        if best is None or score > best[0]:
            best = (score, order, matcher)
    _, order, matcher = best
    out = []
    for tag, i1, i2, j1, j2 in matcher.get_opcodes():
        if tag == "equal":
            continue
        pairs = min(i2 - i1, j2 - j1) if tag == "replace" else 0
        for n in range(pairs):
            out.append(_moved(area, place, i1 + n, old[i1 + n], new[order[j1 + n]]))
        for i in range(i1 + pairs, i2):
            out.append(Change(area, "vertex removed", f"{place}, vertex {i + 1}",
                              _latlon(old[i]), None))
        for j in range(j1 + pairs, j2):
            out.append(Change(area, "vertex added", f"{place}, vertex {order[j] + 1}", None,
                              _latlon(new[order[j]])))
    return out


def _latlon(p: tuple[float, float]) -> tuple[float, float]:
    return (p[1], (p[0] + 180.0) % 360.0 - 180.0)


def _moved(area: str, place: str, i: int, p: tuple[float, float],
           q: tuple[float, float]) -> Change:
    from geo.ellipsoid import GEOD

    _, _, dist_m = GEOD.inv(p[0], p[1], q[0], q[1])
    return Change(area, "vertex moved", f"{place}, vertex {i + 1}", _latlon(p), _latlon(q),
                  float(dist_m))
