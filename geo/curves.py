"""Batches of curves on the ellipsoid: geodesics, rhumb lines and lon/lat straights.

One representation serves route legs (geodesic = great circle, rhumb) and
area edges (geodesic, rhumb, lonlat), so the crossing solver treats every
leg type × edge type alike. Each curve is evaluated at a parameter ``t``:

- geodesic and rhumb: ``t`` is the distance from the start in metres, exact
  to round-off (pyproj.Geod for geodesics [KARNEY-2013] [P], :mod:`geo.rhumb`
  for rhumb lines [KARNEY-RHUMB] [P]);
- lonlat: longitude and latitude linear in ``t`` over ``[0, length_m]``,
  where ``length_m`` is the geodesic distance between the ends (only a scale).

Longitudes are unwrapped: ``lon2`` is written continuously from ``lon1``
(geodesic and rhumb edges take the shorter way; lonlat takes the
coordinates literally, as RFC 7946 does [RFC-7946] [P]), and points along a
curve are returned continuous between its ends, never folded into ±180.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from numpy.typing import ArrayLike, NDArray

from geo import rhumb
from geo.ellipsoid import GEOD

GEODESIC, RHUMB, LONLAT = 0, 1, 2
_CHUNK = 1 << 16
"""Samples evaluated at once [-]."""
KIND_CODES = {"geodesic": GEODESIC, "great_circle": GEODESIC, "rhumb": RHUMB, "lonlat": LONLAT}


def _arr(x: ArrayLike, dtype: type = np.float64) -> NDArray:
    return np.atleast_1d(np.asarray(x, dtype=dtype))


def unwrap_near(lon_deg: ArrayLike, ref_deg: ArrayLike) -> NDArray[np.float64]:
    """The longitude equal to ``lon_deg`` modulo 360 that lies within 180° of ``ref_deg``.

    Parameters
    ----------
    lon_deg : array_like of float [deg]
        Longitude, any turn.
    ref_deg : array_like of float [deg]
        Reference longitude, unwrapped (any value).

    Returns
    -------
    ndarray of float [deg]
        ``ref_deg + wrap180(lon_deg - ref_deg)``, in [ref_deg − 180, ref_deg + 180).

    Examples
    --------
    >>> float(unwrap_near(-175.0, 170.0)), float(unwrap_near(10.0, -350.0))
    (185.0, -350.0)
    """
    ref = np.asarray(ref_deg, dtype=np.float64)
    return ref + rhumb.wrap180(np.asarray(lon_deg, dtype=np.float64) - ref)


@dataclass(frozen=True, eq=False)
class Curves:
    """``n`` curves as parallel arrays. Build with :meth:`between`.

    ``kind`` holds the codes ``GEODESIC``, ``RHUMB``, ``LONLAT``; ``lat1``,
    ``lon1``, ``lat2``, ``lon2`` the ends [deg] (``lon2`` continuous from
    ``lon1``); ``azi_deg`` the azimuth at the start [deg] (the constant course
    of a rhumb line, NaN for lonlat); ``length_m`` the length [m] (for lonlat,
    the geodesic distance between the ends, a scale for ``t``).
    """

    kind: NDArray[np.int8]
    lat1: NDArray[np.float64]
    lon1: NDArray[np.float64]
    lat2: NDArray[np.float64]
    lon2: NDArray[np.float64]
    azi_deg: NDArray[np.float64]
    length_m: NDArray[np.float64]

    def __len__(self) -> int:
        return len(self.kind)

    @classmethod
    def between(cls, kind: ArrayLike, lat1: ArrayLike, lon1: ArrayLike, lat2: ArrayLike,
                lon2: ArrayLike, *, literal_lon: bool = False) -> Curves:
        """Curves from point 1 to point 2 of the given kinds.

        Parameters
        ----------
        kind : array_like of int or str [-]
            Codes (``GEODESIC``, ``RHUMB``, ``LONLAT``) or names (keys of
            ``KIND_CODES``), one per curve or one for all.
        lat1, lon1, lat2, lon2 : array_like of float [deg]
            The ends on WGS84.
        literal_lon : bool
            Take ``lon2`` as written for geodesic and rhumb curves too (it must
            then be continuous from ``lon1``); otherwise they take the shorter
            way in longitude. Lonlat curves always take the longitudes as written.

        Returns
        -------
        Curves
            Lengths and start azimuths from pyproj.Geod [KARNEY-2013] and
            :func:`geo.rhumb.inverse`, exact to round-off.
        """
        kind = np.asarray(kind)
        if kind.dtype.kind in "US":
            kind = np.vectorize(KIND_CODES.__getitem__, otypes=[np.int8])(kind)
        lat1, lon1, lat2, lon2 = (_arr(v) for v in (lat1, lon1, lat2, lon2))
        kind = np.broadcast_to(kind, lat1.shape).astype(np.int8)
        if not literal_lon:
            lon2 = np.where(kind == LONLAT, lon2, lon1 + rhumb.wrap180(lon2 - lon1))
        az_g, _, len_g = GEOD.inv(lon1, lat1, lon2, lat2)
        len_g = np.asarray(len_g, dtype=np.float64)
        azi = np.asarray(az_g, dtype=np.float64)
        length = len_g.copy()
        is_r = kind == RHUMB
        if np.any(is_r):
            s_r, az_r = rhumb.inverse(lat1[is_r], lon1[is_r], lat2[is_r], lon2[is_r])
            length[is_r] = s_r
            azi[is_r] = az_r
        azi = np.where(kind == LONLAT, np.nan, azi)
        return cls(kind, lat1, lon1, lat2, lon2, azi, length)

    def subset(self, idx: ArrayLike) -> Curves:
        """The curves at ``idx`` (an index array [-]), in that order."""
        i = np.asarray(idx)
        return Curves(*(getattr(self, f)[i] for f in self.__dataclass_fields__))

    def point(self, idx: ArrayLike, t_m: ArrayLike) -> tuple[NDArray, NDArray]:
        """Points on the curves at a parameter.

        Parameters
        ----------
        idx : array_like of int [-]
            Curve index of each point.
        t_m : array_like of float [m]
            Parameter along the curve: distance from its start (geodesic,
            rhumb), or that fraction of ``length_m`` (lonlat).

        Returns
        -------
        lat, lon : ndarray of float [deg]
            Latitude, and longitude unwrapped near the curve's own longitudes;
            the ends are the vertices exactly as written.
        """
        idx = np.asarray(idx)
        t = np.asarray(t_m, dtype=np.float64)
        idx, t = np.broadcast_arrays(idx, t)
        shape = t.shape
        idx, t = idx.ravel(), t.ravel()
        lat1, lon1 = self.lat1[idx], self.lon1[idx]
        length = self.length_m[idx]
        # the end points are the vertices as written, never recomputed (t = 0 wins on a
        # curve of zero length); only the points between are evaluated
        at_start = t == 0.0
        at_end = (t == length) & ~at_start
        lat = np.where(at_start, lat1, np.where(at_end, self.lat2[idx], 0.0))
        lon = np.where(at_start, lon1, np.where(at_end, self.lon2[idx], 0.0))
        inner = np.flatnonzero(~(at_start | at_end))
        if len(inner):
            lat[inner], lon[inner] = self._between(idx[inner], t[inner])
        return lat.reshape(shape), lon.reshape(shape)

    def _between(self, idx: NDArray, t: NDArray) -> tuple[NDArray, NDArray]:
        """Points at parameters strictly inside the curves (1-d arrays)."""
        kind = self.kind[idx]
        lat1, lon1 = self.lat1[idx], self.lon1[idx]
        lat2, lon2 = self.lat2[idx], self.lon2[idx]
        length = self.length_m[idx]
        with np.errstate(divide="ignore", invalid="ignore"):
            frac = np.where(length > 0, t / length, 0.0)
        ref = lon1 + frac * (lon2 - lon1)
        lat = lat1 + frac * (lat2 - lat1)
        lon = ref.copy()
        g = np.nonzero(kind == GEODESIC)[0]
        if len(g):
            lon_g, lat_g, _ = GEOD.fwd(lon1[g], lat1[g], self.azi_deg[idx[g]], t[g])
            lat[g] = lat_g
            lon[g] = unwrap_near(lon_g, ref[g])
        r = np.nonzero(kind == RHUMB)[0]
        if len(r):
            lat[r], lon[r] = rhumb.direct(lat1[r], lon1[r], self.azi_deg[idx[r]], t[r])
        # a meridian keeps its longitude exactly (seams of split areas must match)
        return lat, np.where(lon1 == lon2, lon1, lon)

    def sample(self, max_step_m: float) -> tuple[NDArray, NDArray, NDArray, NDArray, NDArray]:
        """Points along every curve at most ``max_step_m`` apart, ends included.

        Parameters
        ----------
        max_step_m : float [m]
            Largest parameter step between samples.

        Returns
        -------
        lat, lon : ndarray of float [deg]
            The samples, flat, curve after curve.
        curve_index : ndarray of int [-]
            The curve of each sample.
        t_m : ndarray of float [m]
            The parameter of each sample.
        offsets : ndarray of int [-]
            Curve ``i`` owns ``[offsets[i], offsets[i+1])`` of the flat arrays.
        """
        lat, lon, idx, frac, offsets = self.sample_fractions(max_step_m)
        return lat, lon, idx, self.length_m[idx] * frac, offsets

    def sample_fractions(self, max_step_m: float
                         ) -> tuple[NDArray, NDArray, NDArray, NDArray, NDArray]:
        """As :meth:`sample` (``max_step_m`` [m]), with each sample's ``fraction`` [-] of its
        curve's length in place of ``t_m``: ``k / n`` for the k-th of n steps, so that
        ``t_m = length_m * fraction``.
        """
        n_seg = np.maximum(1, np.ceil(self.length_m / max_step_m).astype(np.int64))
        counts = n_seg + 1
        offsets = np.concatenate([[0], np.cumsum(counts)])
        idx = np.repeat(np.arange(len(self)), counts)
        k = np.arange(offsets[-1]) - offsets[idx]
        frac = k / n_seg[idx]
        # ends are the vertices (as in point); only the samples between are evaluated
        first, last = offsets[:-1], offsets[1:] - 1
        zero = self.length_m == 0.0
        lat = np.empty(len(frac))
        lon = np.empty(len(frac))
        lat[first], lon[first] = self.lat1, self.lon1
        lat[last] = np.where(zero, self.lat1, self.lat2)
        lon[last] = np.where(zero, self.lon1, self.lon2)
        inner = np.flatnonzero((k > 0) & (k < n_seg[idx]))
        for c in range(0, len(inner), _CHUNK):  # in chunks: the solvers' scratch stays small
            i = inner[c:c + _CHUNK]
            lat[i], lon[i] = self.point(idx[i], self.length_m[idx[i]] * frac[i])
        return lat, lon, idx, frac, offsets


def concat(parts: list[Curves]) -> Curves:
    """All curves of several batches, in order, as one batch.

    Parameters
    ----------
    parts : list of Curves
        The batches.

    Returns
    -------
    Curves
        Every curve of ``parts[0]``, then of ``parts[1]``, and so on.

    Examples
    --------
    >>> both = concat([Curves.between("geodesic", [0.0], [0.0], [1.0], [1.0]),
    ...                Curves.between("rhumb", [5.0], [5.0], [5.0], [6.0])])
    >>> both.kind.tolist(), len(both)
    ([0, 1], 2)
    """
    fields = Curves.__dataclass_fields__
    return Curves(*(np.concatenate([getattr(p, f) for p in parts]) for f in fields))
