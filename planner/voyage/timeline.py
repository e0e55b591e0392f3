"""The voyage against time: where the ship is, how fast, and what each consumer burns.

Built on the route's schedule (:mod:`geo.schedule`): constant speed on each
leg, stops where an ETD follows an ETA. The main engine follows the propeller
law from its reference point (power ∝ speed³, [PROPELLER-LAW], common practice)
and is stopped when the ship is; generators and boilers run at their constant
rates throughout the voyage. Before departure and after arrival every consumer
burns at its rate alongside (:mod:`planner.voyage.port`: by default the main
engine stopped and the rest as at sea). Rates are at the ISO reference net specific energy
(42.7 MJ/kg, [ISO-3046] [M]); the flushing model and :meth:`Timeline.burnt_t`
scale them to the fuel actually burnt.

Moments are epoch seconds inside (``*_epoch_s``: seconds since 1970-01-01 UTC),
hours relative to a start where a flushing schedule needs them.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass
from datetime import datetime

import numpy as np

from geo.ellipsoid import NM_M
from geo.schedule import Schedule, from_epoch
from planner.flushing import ConsumptionSchedule
from planner.fuels import ISO_REFERENCE_Q_NET_MJ_KG, Fuel
from planner.ship.consumers import MainEngine
from planner.ship.system import FuelSystem
from planner.voyage.port import PortState, default_port_state


@dataclass(frozen=True, eq=False)
class Timeline:
    """Speed and consumption of every consumer against time for one voyage.

    Parameters
    ----------
    schedule : Schedule
        The route's schedule: distance [m] against epoch seconds at its knots.
    system : FuelSystem
        The ship as she sails the voyage (her consumers and their ratings).
    port : PortState, optional
        The consumption alongside before departure and after arrival (default: the ship
        file's, :func:`planner.voyage.port.default_port_state`).
    """

    schedule: Schedule
    system: FuelSystem
    port: PortState | None = None

    def __post_init__(self) -> None:
        if self.port is None:
            object.__setattr__(self, "port", default_port_state(self.system))

    @property
    def start_epoch_s(self) -> float:
        """Departure, seconds since 1970-01-01 UTC."""
        return float(self.schedule.knot_epoch_s[0])

    @property
    def end_epoch_s(self) -> float:
        """Arrival, seconds since 1970-01-01 UTC."""
        return float(self.schedule.knot_epoch_s[-1])

    def breaks_epoch_s(self) -> np.ndarray:
        """Moments where the speed changes (the schedule's knots), seconds since
        1970-01-01 UTC, sorted and unique."""
        return np.unique(self.schedule.knot_epoch_s)

    def speed_kn(self, epoch_s: float) -> float:
        """Speed over ground at a moment, kn (0 while stopped, before departure and after
        arrival).

        Parameters
        ----------
        epoch_s : float [s]
            The moment, seconds since 1970-01-01 UTC.
        """
        k = self.schedule.knot_epoch_s
        if epoch_s < k[0] or epoch_s >= k[-1]:
            return 0.0
        i = int(np.searchsorted(k, epoch_s, side="right")) - 1
        i = min(i, len(k) - 2)
        dt = k[i + 1] - k[i]
        dd = self.schedule.knot_m[i + 1] - self.schedule.knot_m[i]
        return float(dd / NM_M / (dt / 3600.0)) if dt > 0 else 0.0

    def rates_iso_t_h(self, epoch_s: float,
                      consumers: Sequence[str] | None = None) -> dict[str, float]:
        """Each consumer's fuel rate at the ISO reference energy, t/h, at a moment.

        Before departure and after arrival, each consumer's rate alongside
        (:attr:`port`).

        Parameters
        ----------
        epoch_s : float [s]
            The moment, seconds since 1970-01-01 UTC.
        consumers : sequence of str, optional
            The consumers to give (default: all of the ship's).
        """
        names = consumers if consumers is not None else list(self.system.consumers)
        port = self.port if self.port is not None else default_port_state(self.system)
        if epoch_s < self.start_epoch_s:
            return {n: port.departure_iso_t_h[n] for n in names}
        if epoch_s >= self.end_epoch_s:
            return {n: port.arrival_iso_t_h[n] for n in names}
        v = self.speed_kn(epoch_s)
        out = {}
        for n in names:
            c = self.system.consumers[n]
            if isinstance(c, MainEngine):
                out[n] = c.iso_demand_t_h(speed_kn=v) if v > 0 else 0.0
            else:
                out[n] = c.iso_demand_t_h()
        return out

    def consumption_from(self, start_epoch_s: float, horizon_h: float,
                         consumers: Sequence[str] | None = None) -> ConsumptionSchedule:
        """The consumption schedule seen by a changeover starting at ``start_epoch_s``.

        Parameters
        ----------
        start_epoch_s : float [s]
            The valve switch, seconds since 1970-01-01 UTC: hour 0 of the schedule.
        horizon_h : float [h]
            How far ahead the schedule's steps are taken.
        consumers : sequence of str, optional
            The consumers to give (default: all of the ship's).
        """
        end = start_epoch_s + horizon_h * 3600.0
        br = self.breaks_epoch_s()
        inner = br[(br > start_epoch_s) & (br < end)]
        starts = np.concatenate([[start_epoch_s], inner])
        rates = [self.rates_iso_t_h(float(s), consumers) for s in starts]
        times_h = [float((s - start_epoch_s) / 3600.0) for s in starts]
        # merge equal neighbours (a stop-free leg change of speed keeps the same rates)
        keep_t, keep_r = [times_h[0]], [rates[0]]
        for t, r in zip(times_h[1:], rates[1:], strict=True):
            if r != keep_r[-1]:
                keep_t.append(t)
                keep_r.append(r)
        return ConsumptionSchedule.steps(keep_t, keep_r)

    def position(self, epoch_s: float) -> tuple[float, float, float]:
        """``(lat [deg], lon [deg], distance [m])`` of the ship at a moment, WGS84, clamped
        to the voyage.

        Parameters
        ----------
        epoch_s : float [s]
            The moment, seconds since 1970-01-01 UTC.
        """
        d = float(self.schedule.distance_at_epoch([epoch_s])[0])
        lat, lon = self.schedule.path.position([d])
        return float(lat[0]), float((lon[0] + 180.0) % 360.0 - 180.0), d

    def burnt_t(self, from_epoch_s: float, to_epoch_s: float, fuel: Fuel,
                consumers: Sequence[str] | None = None) -> float:
        """Mass of ``fuel`` the consumers burn between two moments, t (scaled by 42.7/Q_net).

        Parameters
        ----------
        from_epoch_s, to_epoch_s : float [s]
            The moments, seconds since 1970-01-01 UTC (none burnt if not in order).
        fuel : Fuel
            The fuel burnt (its net specific energy scales the ISO rates).
        consumers : sequence of str, optional
            The consumers to count (default: all of the ship's).
        """
        if to_epoch_s <= from_epoch_s:
            return 0.0
        br = self.breaks_epoch_s()
        inner = br[(br > from_epoch_s) & (br < to_epoch_s)]
        edges = np.unique(np.concatenate([[from_epoch_s, to_epoch_s], inner]))
        total = 0.0
        for a, b in zip(edges[:-1], edges[1:], strict=True):
            rate = sum(self.rates_iso_t_h(0.5 * (a + b), consumers).values())
            total += rate * (b - a) / 3600.0
        return total * ISO_REFERENCE_Q_NET_MJ_KG / fuel.q_net

    def utc(self, epoch_s: float) -> datetime:
        """The moment as an aware UTC datetime.

        Parameters
        ----------
        epoch_s : float [s]
            Seconds since 1970-01-01 UTC.
        """
        return from_epoch(epoch_s)
