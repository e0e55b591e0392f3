"""The crossing search: pairs of chords close in the plane, found run by run.

Route legs and area edges are sampled every :data:`STEP_M` along their true
curves (:meth:`geo.curves.Curves.sample`) and joined into chords, straight in
the unwrapped lon/lat plane. Consecutive chords are grouped in runs
(:data:`ROUTE_RUN` of the route's, :data:`AREA_RUN` of an area's); an
STR-tree [STR-1997] (``shapely.STRtree``) over the boxes of an area's runs
(built once per area) gives the route runs whose boxes, widened by the pad,
meet one. Inside those, each route chord is kept only if its box meets the
area run's, then every pair of chords is measured exactly (the plane
distance of two straight segments) and kept when within the pad. These are
the pairs a tree over every chord would give, from a tree of ``AREA_RUN``
times fewer boxes and no shape built per chord.
"""

from __future__ import annotations

from collections.abc import Iterable
from dataclasses import dataclass, field
from functools import cached_property

import numpy as np
import shapely
from numpy.typing import NDArray

from geo.curves import Curves
from geo.edges import Edges

STEP_M = 1000.0
"""Sampling step of the search [m]."""
ROUTE_RUN, AREA_RUN = 8, 16
"""Chords per run of the route and of an area [-]."""
_CHUNK = 1 << 12
"""Run pairs measured at once [-] (bounds the memory of one step)."""


@dataclass(frozen=True, eq=False)
class Chords:
    """The chords of a batch of curves, kept as their samples, with their runs' boxes.

    ``lon``, ``lat`` [deg], ``curve`` [-] and ``frac`` [-] are the samples
    (:meth:`geo.curves.Curves.sample_fractions`: the parameter is the curve's
    ``length_m`` times ``frac``); chord ``c`` joins samples ``start[c]`` and
    ``start[c] + 1`` of one curve. ``run`` [-] is the chords per run and
    ``run_box`` [deg] the box (lon_min, lat_min, lon_max, lat_max) of each run.
    """

    lon: NDArray[np.float64]
    lat: NDArray[np.float64]
    curve: NDArray[np.int64]
    frac: NDArray[np.float64]
    start: NDArray[np.int64]
    run: int
    run_box: NDArray[np.float64]
    queries: dict = field(default_factory=dict, repr=False)
    """Diagonals of the padded, shifted run boxes already built, by (pad, shift)."""

    def __len__(self) -> int:
        return len(self.start)

    def xy(self, c: NDArray[np.int64]) -> NDArray[np.float64]:
        """The ends of chords ``c``: (chord, end, lon/lat) [deg]."""
        j = self.start[c]
        out = np.empty((len(j), 2, 2))
        out[:, 0, 0], out[:, 0, 1] = self.lon[j], self.lat[j]
        out[:, 1, 0], out[:, 1, 1] = self.lon[j + 1], self.lat[j + 1]
        return out

    @cached_property
    def tree(self) -> shapely.STRtree:
        """STR-tree over the runs' boxes (each box drawn as its diagonal)."""
        return shapely.STRtree(_diagonals(self.run_box))

    def query_shapes(self, pad_deg: float, shift_deg: float) -> NDArray:
        """The runs' boxes widened by ``pad_deg`` and moved by ``shift_deg`` in lon, as shapes."""
        key = (pad_deg, shift_deg)
        if key not in self.queries:
            move = np.array([shift_deg - pad_deg, -pad_deg, shift_deg + pad_deg, pad_deg])
            self.queries[key] = _diagonals(self.run_box + move)
        return self.queries[key]

    def lon_range(self) -> tuple[float, float]:
        """Least and greatest longitude of the chords [deg]."""
        return float(self.run_box[:, 0].min()), float(self.run_box[:, 2].max())


def chords(curves: Curves | Edges, step_m: float = STEP_M, run: int = ROUTE_RUN) -> Chords:
    """Sample curves and join consecutive samples of each curve into chords.

    Parameters
    ----------
    curves : Curves or Edges
        The curves (route legs, or area edges: exact curves only where needed).
    step_m : float [m]
        Largest step between samples along a curve.
    run : int [-]
        Chords per run.

    Returns
    -------
    Chords
        One chord between each two consecutive samples of a curve; a curve
        no longer than ``step_m`` is one chord between its end points.
    """
    lat, lon, idx, frac, _ = curves.sample_fractions(step_m)
    j = np.flatnonzero(idx[:-1] == idx[1:])
    run_box = np.zeros((0, 4))
    if len(j):
        # the samples of a run are contiguous, from its first chord's start to its last
        # chord's end (which may start the next run: taken in once more)
        first, last = j[::run], j[np.minimum(np.arange(run, len(j) + run, run), len(j)) - 1] + 1
        run_box = np.column_stack([
            np.minimum(np.minimum.reduceat(lon, first), lon[last]),
            np.minimum(np.minimum.reduceat(lat, first), lat[last]),
            np.maximum(np.maximum.reduceat(lon, first), lon[last]),
            np.maximum(np.maximum.reduceat(lat, first), lat[last])])
    return Chords(lon, lat, idx, frac, j, run, run_box)


def close_pairs(route: Chords, area: Chords, pad_deg: float,
                shifts_deg: Iterable[float]) -> tuple[NDArray, NDArray, NDArray]:
    """Every pair of a route chord and an area chord within ``pad_deg`` in the plane.

    Parameters
    ----------
    route : Chords
        The route's chords.
    area : Chords
        An area's chords (its run tree is built once and kept), taken at each
        shift in longitude.
    pad_deg : float [deg]
        Largest plane distance between the chords of a pair.
    shifts_deg : iterable of float [deg]
        Shifts in longitude of the area (multiples of 360°).

    Returns
    -------
    i_route, i_area : ndarray of int [-]
        The chords of each pair.
    shift_deg : ndarray of float [deg]
        The shift of the area's chord in that pair.
    """
    found: list[tuple[NDArray, NDArray, NDArray]] = []
    for k in shifts_deg:
        r_route, r_area = area.tree.query(route.query_shapes(pad_deg, -k))
        for c in range(0, len(r_area), _CHUNK):
            ia, ib = _chord_pairs(route, r_route[c:c + _CHUNK], area, r_area[c:c + _CHUNK],
                                  k, pad_deg)
            found.append((ia, ib, np.full(len(ia), float(k))))
    if not found:
        return np.zeros(0, np.int64), np.zeros(0, np.int64), np.zeros(0)
    return tuple(np.concatenate(parts) for parts in zip(*found, strict=True))


def _diagonals(box: NDArray[np.float64]) -> NDArray:
    """A two-point line from corner to corner of each box: its extent is the box."""
    return shapely.linestrings(box.reshape(-1, 2, 2))


def _boxes(xy: NDArray[np.float64]) -> NDArray[np.float64]:
    """The box (lon_min, lat_min, lon_max, lat_max) of each chord."""
    return np.concatenate([np.minimum(xy[:, 0], xy[:, 1]), np.maximum(xy[:, 0], xy[:, 1])],
                          axis=1)


def _in_runs(ch: Chords, run: NDArray[np.int64]) -> tuple[NDArray, NDArray]:
    """For each run, its chords: (position in ``run``, chord index)."""
    owner = np.repeat(np.arange(len(run)), ch.run)
    chord = (run[:, None] * ch.run + np.arange(ch.run)).reshape(-1)
    ok = chord < len(ch)
    return owner[ok], chord[ok]


def _meet(box: NDArray, other: NDArray, pad_deg: float) -> NDArray[np.bool_]:
    """Whether boxes (rows of lon_min, lat_min, lon_max, lat_max) come within the pad."""
    return ((box[:, 0] <= other[:, 2] + pad_deg) & (other[:, 0] <= box[:, 2] + pad_deg)
            & (box[:, 1] <= other[:, 3] + pad_deg) & (other[:, 1] <= box[:, 3] + pad_deg))


def _chord_pairs(a: Chords, ra: NDArray, b: Chords, rb: NDArray, shift: float,
                 pad_deg: float) -> tuple[NDArray, NDArray]:
    """Chord pairs within the pad, inside the run pairs (ra[i], rb[i]); b shifted in lon."""
    move = np.array([shift, 0.0, shift, 0.0])
    # chords of a whose box meets the other run's box
    pa, ca = _in_runs(a, ra)
    p = a.xy(ca)
    box_a = _boxes(p)
    keep = _meet(box_a, b.run_box[rb[pa]] + move, pad_deg)
    pa, ca, p, box_a = pa[keep], ca[keep], p[keep], box_a[keep]
    # then each chord of the other run, box against box
    owner, cb = _in_runs(b, rb[pa])
    ca, p, box_a = ca[owner], p[owner], box_a[owner]
    q = b.xy(cb) + np.array([shift, 0.0])
    keep = _meet(box_a, _boxes(q), pad_deg)
    ca, cb, p, q = ca[keep], cb[keep], p[keep], q[keep]
    near = segment_distance(p, q) <= pad_deg
    return ca[near], cb[near]


def segment_distance(p: NDArray[np.float64], q: NDArray[np.float64]) -> NDArray[np.float64]:
    """Plane distance between straight segments p[:, 0]-p[:, 1] and q[:, 0]-q[:, 1].

    Parameters
    ----------
    p, q : ndarray of float [deg]
        Segments as (n, 2, 2) arrays: segment, end, (x, y).

    Returns
    -------
    ndarray of float [deg]
        Zero where they cross, else the least distance from an end of one to
        the other (common practice); a segment may be a single point.

    Examples
    --------
    >>> p = np.array([[[0.0, 0.0], [2.0, 0.0]], [[0.0, 0.0], [2.0, 0.0]]])
    >>> q = np.array([[[1.0, -1.0], [1.0, 1.0]], [[3.0, 0.5], [3.0, 2.0]]])
    >>> [round(float(d), 6) for d in segment_distance(p, q)]
    [0.0, 1.118034]
    """
    p0, p1, q0, q1 = p[:, 0], p[:, 1], q[:, 0], q[:, 1]
    dist = np.minimum(np.minimum(_to_segment(p0, q0, q1), _to_segment(p1, q0, q1)),
                      np.minimum(_to_segment(q0, p0, p1), _to_segment(q1, p0, p1)))
    o1, o2 = _cross(p1 - p0, q0 - p0), _cross(p1 - p0, q1 - p0)
    o3, o4 = _cross(q1 - q0, p0 - q0), _cross(q1 - q0, p1 - q0)
    crossing = (o1 * o2 < 0.0) & (o3 * o4 < 0.0)
    return np.where(crossing, 0.0, dist)


def _cross(u: NDArray, v: NDArray) -> NDArray:
    return u[:, 0] * v[:, 1] - u[:, 1] * v[:, 0]


def _to_segment(x: NDArray, a: NDArray, b: NDArray) -> NDArray:
    """Distance from points x to segments a-b (all (n, 2))."""
    d = b - a
    length2 = np.einsum("ij,ij->i", d, d)
    with np.errstate(divide="ignore", invalid="ignore"):
        u = np.einsum("ij,ij->i", x - a, d) / length2
    u = np.where(length2 > 0.0, np.clip(u, 0.0, 1.0), 0.0)
    return np.hypot(*(x - a - u[:, None] * d).T)
