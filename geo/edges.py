"""The edges of area rings as plain arrays; exact curves only where they are needed.

An area of many vertices has many short edges. Their exact lengths and start
azimuths (the inverse problem, :meth:`geo.curves.Curves.between`) matter
only where an edge is sampled between its vertices or solved for a meeting
with the route. :class:`Edges` keeps the ends and an upper bound of each
length: an edge whose bound is within the sampling step has its two ends as
its only samples, exactly as :meth:`geo.curves.Curves.sample` would give; only
the longer edges, and the edges a route meets, get their exact curves.

The bound (common practice): no curve between two points is shorter than the
geodesic, and the path along the meridian, then along the parallel, is at
most R·|Δφ| + R·cos φ₀·|Δλ| [m], with R = a/√(1 − e²) the largest radius of
curvature of the ellipsoid (at the poles) [WGS84] [D] and φ₀ the latitude
nearest the equator on the edge. A rhumb line of constant course has
s² = Δm² + (∫N cos φ dλ)² (Δm the meridian arc), within the same bound; a
lonlat edge's length is the geodesic distance between its ends (a scale).
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from functools import cached_property

import numpy as np
from numpy.typing import ArrayLike, NDArray

from geo.curves import Curves, concat
from geo.ellipsoid import A_M, E2

R_MAX_M = A_M / math.sqrt(1.0 - E2)
"""The largest radius of curvature of WGS84, at the poles [m] [D]."""
_SAFETY = 1e-6
"""Relative margin on the bound before an edge counts as short [-]."""


@dataclass(frozen=True, eq=False)
class Edges:
    """Edges as parallel arrays: the kind codes of :mod:`geo.curves`, the ends [deg].

    ``lon2`` is continuous from ``lon1`` (as in :class:`geo.curves.Curves`
    built with ``literal_lon=True``).
    """

    kind: NDArray[np.int8]
    lat1: NDArray[np.float64]
    lon1: NDArray[np.float64]
    lat2: NDArray[np.float64]
    lon2: NDArray[np.float64]

    def __len__(self) -> int:
        return len(self.kind)

    @cached_property
    def curves(self) -> Curves:
        """The exact curves of every edge (built on first use)."""
        return Curves.between(self.kind, self.lat1, self.lon1, self.lat2, self.lon2,
                              literal_lon=True)

    def subset_curves(self, idx: ArrayLike) -> Curves:
        """The exact curves of the edges at ``idx`` only, in that order."""
        i = np.asarray(idx, dtype=np.int64)
        if "curves" in self.__dict__:
            return self.curves.subset(i)
        return Curves.between(self.kind[i], self.lat1[i], self.lon1[i], self.lat2[i],
                              self.lon2[i], literal_lon=True)

    def length_bound_m(self) -> NDArray[np.float64]:
        """An upper bound of each edge's length [m] (see the module notes)."""
        phi1, phi2 = np.radians(self.lat1), np.radians(self.lat2)
        nearest = np.where(phi1 * phi2 <= 0.0, 0.0, np.minimum(np.abs(phi1), np.abs(phi2)))
        dlam = np.abs(np.radians(self.lon2 - self.lon1))
        return R_MAX_M * (np.abs(phi2 - phi1) + np.cos(nearest) * dlam)

    def _exact(self, max_step_m: float) -> NDArray[np.bool_]:
        """Edges to sample on their exact curves: maybe longer than the step, or closed on
        themselves (both ends on a pole, or the same point a whole turn apart)."""
        bound = self.length_bound_m() * (1.0 + _SAFETY) + 1e-3
        poles = (np.abs(self.lat1) == 90.0) & (np.abs(self.lat2) == 90.0)
        closed = (self.lat1 == self.lat2) & (np.mod(self.lon2 - self.lon1, 360.0) == 0.0)
        return (bound >= max_step_m) | poles | closed

    def sample_fractions(self, max_step_m: float
                         ) -> tuple[NDArray, NDArray, NDArray, NDArray, NDArray]:
        """The samples, edge indices, fractions and offsets that
        :meth:`geo.curves.Curves.sample_fractions` (``max_step_m`` [m]) gives on these
        edges' exact curves, bit for bit; curves are computed only for the edges
        sampled between their ends.
        """
        exact = self._exact(max_step_m)
        if exact.all():
            return self.curves.sample_fractions(max_step_m)
        n = len(self)
        counts = np.full(n, 2, dtype=np.int64)
        long = np.flatnonzero(exact)
        if len(long):
            s_lat, s_lon, _, s_frac, s_off = self.subset_curves(long).sample_fractions(max_step_m)
            counts[long] = np.diff(s_off)
        offsets = np.concatenate([[0], np.cumsum(counts)])
        lat, lon, frac = np.empty(offsets[-1]), np.empty(offsets[-1]), np.empty(offsets[-1])
        short = np.flatnonzero(~exact)
        at = offsets[short]
        lat[at], lon[at], frac[at] = self.lat1[short], self.lon1[short], 0.0
        lat[at + 1], lon[at + 1], frac[at + 1] = self.lat2[short], self.lon2[short], 1.0
        if len(long):
            c = counts[long]
            dest = np.repeat(offsets[long], c) + (np.arange(len(s_lat)) - np.repeat(s_off[:-1], c))
            lat[dest], lon[dest], frac[dest] = s_lat, s_lon, s_frac
        return lat, lon, np.repeat(np.arange(n), counts), frac, offsets


def concat_edges(parts: list[Edges]) -> Edges:
    """All edges of several batches, in order, as one batch (exact curves kept if all have them).

    Parameters
    ----------
    parts : list of Edges
        The batches.

    Returns
    -------
    Edges
        Every edge of ``parts[0]``, then of ``parts[1]``, and so on.
    """
    out = Edges(*(np.concatenate([getattr(p, f) for p in parts])
                  for f in Edges.__dataclass_fields__))
    if parts and all("curves" in p.__dict__ for p in parts):
        out.__dict__["curves"] = concat([p.curves for p in parts])  # the cached property
    return out
