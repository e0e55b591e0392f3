"""Where the compliant fuel on board runs out, and what then cannot be sailed compliant.

The plan counts each fuel drawn while a circuit's valve is set to it
(:func:`planner.voyage.quantities.valve_periods`; the mass is the timeline's
consumption scaled to the fuel's net specific energy,
:meth:`planner.voyage.timeline.Timeline.burnt_t`). Summed over the circuits,
the mass drawn of one fuel grows piecewise linearly with time: the rates are
constant between the schedule's knots and the valve switches. So the moment
the tanks' content is used up is found exactly inside one such piece:
``t = t₀ + (on board − drawn by t₀) / rate`` (with a constant rate over a
stretch: distance = on board / rate × speed).

From that moment on, every stretch inside an area that the plan sails on the
fuel, and the hours alongside after an arrival inside an area, cannot be
sailed compliant. A compliant fuel is one the plan chooses for a stretch
inside an area (as the plan's ``compliant_fuel_needed_t`` counts it).

Pure functions of a built plan; moments are epoch seconds (``*_epoch_s``:
seconds since 1970-01-01 UTC), distances metres along the route (``*_m``).
"""

from __future__ import annotations

import bisect
from dataclasses import dataclass
from typing import TYPE_CHECKING

import numpy as np

from planner.voyage.quantities import ValvePeriod, alongside_h, valve_periods

if TYPE_CHECKING:
    from planner.voyage.plan import Plan

SHORT_TOLERANCE_T = 1e-6
"""A fuel is short when the voyage needs more than this above what is on board [t]."""


@dataclass(frozen=True)
class BurnCurve:
    """The mass of one fuel drawn from departure's first valve switch on, against time.

    Parameters
    ----------
    edges_epoch_s : tuple of float [s]
        The pieces' ends, increasing, seconds since 1970-01-01 UTC.
    drawn_t : tuple of float [t]
        The mass drawn by each edge (0 at the first), non-decreasing.
    """

    edges_epoch_s: tuple[float, ...]
    drawn_t: tuple[float, ...]

    def __post_init__(self) -> None:
        if len(self.edges_epoch_s) != len(self.drawn_t) or len(self.drawn_t) < 1:
            raise ValueError("BurnCurve needs one mass per edge, at least one edge")
        if any(b < a for a, b in zip(self.edges_epoch_s, self.edges_epoch_s[1:], strict=False)):
            raise ValueError("BurnCurve edges must increase")
        if any(b < a - 1e-12 for a, b in zip(self.drawn_t, self.drawn_t[1:], strict=False)):
            raise ValueError("BurnCurve masses must not decrease")

    @property
    def total_t(self) -> float:
        """The mass drawn over the whole voyage [t]."""
        return self.drawn_t[-1]

    def drawn_by(self, epoch_s: float) -> float:
        """The mass drawn by a moment [t] (linear inside a piece).

        Parameters
        ----------
        epoch_s : float [s]
            The moment, seconds since 1970-01-01 UTC.
        """
        return float(np.interp(epoch_s, self.edges_epoch_s, self.drawn_t))

    def moment_of(self, mass_t: float) -> float | None:
        """The first moment the drawn mass reaches ``mass_t`` [s since 1970-01-01 UTC];
        None when the voyage never draws that much.

        Parameters
        ----------
        mass_t : float [t]
            The mass (what the tanks hold).
        """
        if mass_t > self.total_t:
            return None
        k = max(1, bisect.bisect_left(self.drawn_t, mass_t))
        if k >= len(self.drawn_t):
            return self.edges_epoch_s[-1]
        m0, m1 = self.drawn_t[k - 1], self.drawn_t[k]
        t0, t1 = self.edges_epoch_s[k - 1], self.edges_epoch_s[k]
        if m1 <= m0:
            return t0
        return t0 + (mass_t - m0) / (m1 - m0) * (t1 - t0)



def fuel_periods(plan: Plan, fuel: str) -> list[ValvePeriod]:
    """Every circuit's periods with its valve on ``fuel`` (each circuit from its own fuel
    at departure, :attr:`planner.voyage.plan.Plan.first_fuels`).

    Parameters
    ----------
    plan : Plan
        The built plan.
    fuel : str
        The fuel's name.
    """
    return [p for p in valve_periods(plan.voyage, plan.timeline, plan.runs, plan.changes,
                                     plan.first_fuels) if p[3].name == fuel]

def burn_curve(plan: Plan, fuel: str) -> BurnCurve:
    """The mass of ``fuel`` every circuit draws, summed, against time (see the module notes).

    Parameters
    ----------
    plan : Plan
        The built plan.
    fuel : str
        The fuel's name.
    """
    tl = plan.timeline
    periods = [p for p in fuel_periods(plan, fuel) if p[2] > p[1]]
    if not periods:
        return BurnCurve((tl.start_epoch_s,), (0.0,))
    lo, hi = min(p[1] for p in periods), max(p[2] for p in periods)
    knots = [float(k) for k in tl.breaks_epoch_s() if lo < k < hi]
    edges = sorted({lo, hi, *knots, *(p[1] for p in periods), *(p[2] for p in periods)})
    f = plan.system.fuels[fuel]
    drawn = [0.0]
    for a, b in zip(edges[:-1], edges[1:], strict=True):
        m = 0.0
        for circuit, p0, p1, _, _ in periods:
            x0, x1 = max(a, p0), min(b, p1)
            if x1 > x0:
                m += tl.burnt_t(x0, x1, f, tl.system.circuits[circuit].consumers)
        drawn.append(drawn[-1] + m)
    return BurnCurve(tuple(edges), tuple(drawn))


@dataclass(frozen=True)
class RunOut:
    """Where and when the tanks' content of a fuel is used up.

    Parameters
    ----------
    epoch_s : float [s]
        The moment, seconds since 1970-01-01 UTC.
    distance_m : float [m]
        Along the route from departure (the berth before departure or after arrival).
    lat, lon : float [deg]
        The ship's position, WGS84.
    where : str
        ``"at_sea"``, ``"before_departure"`` or ``"after_arrival"`` (alongside).
    """

    epoch_s: float
    distance_m: float
    lat: float
    lon: float
    where: str = "at_sea"

    def __post_init__(self) -> None:
        if self.where not in ("at_sea", "before_departure", "after_arrival"):
            raise ValueError(f"RunOut.where must be at_sea, before_departure or after_arrival, "
                             f"got {self.where!r}")


@dataclass(frozen=True)
class ShortStretch:
    """A part of a stretch inside an area that cannot be sailed compliant (no fuel left).

    Parameters
    ----------
    areas : tuple of str
        The areas it lies in.
    limit_pct : float [% m/m]
        The limit in force on it.
    from_m, to_m : float [m]
        Along the route from departure.
    from_epoch_s, to_epoch_s : float [s]
        When the ship sails it, seconds since 1970-01-01 UTC.
    """

    areas: tuple[str, ...]
    limit_pct: float
    from_m: float
    to_m: float
    from_epoch_s: float
    to_epoch_s: float

    def __post_init__(self) -> None:
        if not self.to_m >= self.from_m or not self.to_epoch_s >= self.from_epoch_s:
            raise ValueError("ShortStretch must end after it starts")


@dataclass(frozen=True)
class FuelShortage:
    """A compliant fuel the voyage needs more of than the tanks hold.

    Parameters
    ----------
    fuel : str
        The fuel's name.
    needed_t, on_board_t : float [t]
        What the plan draws of it, and what the tanks hold at departure.
    density_kg_m3 : float [kg/m3]
        Its density at 15 °C (for the volumes).
    run_out : RunOut
        Where the tanks' content is used up.
    stretches : tuple of ShortStretch
        What cannot be sailed compliant, in route order.
    alongside_h : float [h]
        Hours alongside after arrival inside an area with none of it left.
    curve : BurnCurve
        The mass drawn against time.
    """

    fuel: str
    needed_t: float
    on_board_t: float
    density_kg_m3: float
    run_out: RunOut
    stretches: tuple[ShortStretch, ...]
    alongside_h: float
    curve: BurnCurve

    @property
    def short_t(self) -> float:
        """How much is short [t]."""
        return self.needed_t - self.on_board_t

    @property
    def short_m3(self) -> float:
        """How much is short as standard volume at 15 °C [m3]."""
        return self.short_t * 1000.0 / self.density_kg_m3


def compliant_fuels(plan: Plan) -> list[str]:
    """The fuels the plan burns inside an area, in the order of first use.

    Parameters
    ----------
    plan : Plan
        The built plan.
    """
    names = [r.fuel.name for r in plan.runs if r.areas]
    names += [c.fuel.name for c in plan.choices if c.stretch.areas]
    return list(dict.fromkeys(names))


def run_out_at(plan: Plan, epoch_s: float) -> RunOut:
    """The :class:`RunOut` at a moment (position clamped to the voyage).

    Parameters
    ----------
    plan : Plan
        The built plan.
    epoch_s : float [s]
        The moment, seconds since 1970-01-01 UTC.
    """
    tl = plan.timeline
    lat, lon, d = tl.position(epoch_s)
    where = ("before_departure" if epoch_s < tl.start_epoch_s
             else "after_arrival" if epoch_s > tl.end_epoch_s else "at_sea")
    return RunOut(float(epoch_s), float(d), float(lat), float(lon), where)


def short_stretches(plan: Plan, fuel: str, run_out: RunOut) -> list[ShortStretch]:
    """The parts of the stretches inside an area that the plan sails on ``fuel`` after it
    runs out, in route order.

    Parameters
    ----------
    plan : Plan
        The built plan.
    fuel : str
        The fuel's name.
    run_out : RunOut
        Where it runs out.
    """
    sched = plan.timeline.schedule
    out = []
    for c in plan.choices:
        st = c.stretch
        if not st.areas or not _run_fuel_is(plan, st.from_m, st.to_m, fuel):
            continue
        t1 = float(sched.epoch_at([st.to_m])[0])
        if t1 <= run_out.epoch_s:
            continue
        a = max(st.from_m, run_out.distance_m)
        t0 = max(float(sched.epoch_at([a])[0]), min(run_out.epoch_s, t1))
        if st.to_m - a > 1e-6 or t1 - t0 > 1e-6:
            out.append(ShortStretch(tuple(st.areas), float(st.limit_pct), float(a),
                                    float(st.to_m), float(t0), float(t1)))
    return out


def _run_fuel_is(plan: Plan, from_m: float, to_m: float, fuel: str) -> bool:
    """Whether the run covering the middle of the stretch burns ``fuel``."""
    mid = 0.5 * (from_m + to_m)
    for r in plan.runs:
        if r.from_m - 1e-6 <= mid <= r.to_m + 1e-6:
            return r.fuel.name == fuel
    return False


def fuel_shortages(plan: Plan) -> list[FuelShortage]:
    """Every compliant fuel the voyage needs more of than the tanks hold (empty: enough).

    Parameters
    ----------
    plan : Plan
        The built plan.
    """
    q = plan.quantities
    out = []
    tl = plan.timeline
    for name in compliant_fuels(plan):
        need, held = q.totals_t.get(name, 0.0), q.on_board_t.get(name, 0.0)
        if need <= held + SHORT_TOLERANCE_T:
            continue
        curve = burn_curve(plan, name)
        moment = curve.moment_of(held)
        if moment is None:  # the plan's own sum and the curve's differ only by round-off
            moment = curve.edges_epoch_s[-1]
        ro = run_out_at(plan, moment)
        port_h = 0.0
        if plan.runs[-1].areas and plan.runs[-1].fuel.name == name:
            end = tl.end_epoch_s + alongside_h(tl, plan.runs) * 3600.0
            port_h = max(0.0, end - max(moment, tl.end_epoch_s)) / 3600.0
        density = plan.system.fuels[name].density_kg_m3
        out.append(FuelShortage(name, float(need), float(held), density, ro,
                                tuple(short_stretches(plan, name, ro)), port_h, curve))
    return out
