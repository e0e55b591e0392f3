"""The flushing model as the Monte Carlo sees it: uncertain nodes, perturbed systems, blend curves.

Uncertain nodes of a circuit:

- every pipe and stirred volume it passes (a volume factor each);
- each stirred volume's mixing: a stagnant part ``d`` of its volume takes no
  part in the flow, and a part ``b`` of the flow short-circuits it. The model
  (Cholette and Cloutier's dead zone and bypass, one of the compartment models
  of non-ideal flow in [LEVENSPIEL-1999] [M]) has the transfer function
  ``b + (1 − b)/(1 + τ·s)`` with ``τ = (1 − d)·V / ((1 − b)·q)``: its tail,
  which sets the time to a level near the new fuel's, decays with ``τ``. The
  flushing model has no zero-volume bypass, so the volume is replaced by a
  well-stirred one of the **effective volume** ``(1 − d)·V / (1 − b)``: exact
  for the tail's time constant, and conservative (later, by at most
  ``τ·ln(1/(1 − b))``) for the time to a level of one isolated volume, since
  the bypass's immediate share is left out (tested against the closed form);
- tanks that receive flow after the switch (a return line to the tank in use
  or a named tank): their sounding. Other tanks' volumes do not enter the
  inlet's composition (a tank only drawn down is not diluted: [LEVENSPIEL-1999]
  mass balance [D]);
- consumption: one factor on every consumer's rate (pump rates stay).

Sulphur of each fuel changes nothing in the flows (its effect on Q_net, about
−0.31 MJ/kg per % m/m by the [ISO-8217] annex formula [D], is left out: below 0.02 % of
the consumption for a standard deviation of 0.02 % m/m). So the inlet's
composition after the switch is a blend ``φ(t) = φ_A + θ(t)·(φ_B − φ_A)`` of
the from-tank's content A (the whole system before the switch) and the
to-tank's content B, and the sulphur condition ``Σ φᵢρᵢ(Sᵢ − L) ≤ 0`` is
``θ(t) ≥ θ*(S, L)``: one simulation gives the time to any level and any
sulphur exactly (:class:`BlendCurve`), matching
:meth:`planner.flushing.InletCurve.time_at_or_below_h` to round-off.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass, replace

import numpy as np

from planner.flushing import ConsumptionSchedule, FlushResult
from planner.fuels import Fuel
from planner.ship.system import TANK_IN_USE, Flow, FuelSystem, Link, Pipe, Stirred, Tank

_LINE_TOL = 1e-6  # largest departure of an inlet composition from the A-B line


class UncertaintyError(ValueError):
    """The uncertainty analysis cannot be done for this circuit (message says why)."""


@dataclass(frozen=True)
class CircuitNodes:
    """The nodes of a circuit whose uncertainty reaches the inlets."""

    volumes: tuple[str, ...]  # pipes and stirred volumes, in the circuit's order
    stirred: tuple[str, ...]  # of those, the stirred ones
    tanks: tuple[str, ...]  # tanks receiving flow after the switch


def circuit_nodes(system: FuelSystem, circuit: str, to_tank: str) -> CircuitNodes:
    """The nodes of ``circuit`` switched to ``to_tank`` whose uncertainty reaches the inlets.

    Parameters
    ----------
    system : FuelSystem
    circuit : str
    to_tank : str
        The tank the valve goes to (``tank_in_use`` returns go there).

    Returns
    -------
    CircuitNodes
    """
    c = system.circuits[circuit]
    volumes = tuple(n for n in c.volume_names if n in system.volumes)
    stirred = tuple(n for n in volumes if isinstance(system.volumes[n], Stirred))
    fed: dict[str, None] = {}
    for link in c.links:
        if link.target == TANK_IN_USE:
            fed.setdefault(to_tank)
        elif link.target in system.tanks:
            fed.setdefault(link.target)
    return CircuitNodes(volumes, stirred, tuple(fed))


def _scaled_tank(t: Tank, factor: float, capacity_too: bool) -> Tank:
    content = {f: v * factor for f, v in t.content_m3.items()}
    capacity = t.capacity_m3 * factor if capacity_too else t.capacity_m3
    return Tank(t.name, max(capacity, sum(content.values())), content)


def perturbed(system: FuelSystem, factors: Mapping[str, float],
              capacity_too: bool = False) -> FuelSystem:
    """A copy of ``system`` with volumes and tank contents scaled.

    Parameters
    ----------
    system : FuelSystem
    factors : mapping of str to float [-]
        Factor per pipe, stirred volume or tank (its content, every fuel alike).
    capacity_too : bool, default False
        Scale a tank's capacity too; else it is raised only as far as the
        content needs.

    Returns
    -------
    FuelSystem

    Raises
    ------
    KeyError
        A name that is no volume or tank of ``system``.
    """
    volumes = dict(system.volumes)
    tanks = dict(system.tanks)
    for name, f in factors.items():
        if f == 1.0:
            continue
        if name in volumes:
            v = volumes[name]
            volumes[name] = (Pipe(name, v.volume_m3 * f) if isinstance(v, Pipe)
                             else Stirred(name, v.volume_m3 * f))
        elif name in tanks:
            tanks[name] = _scaled_tank(tanks[name], f, capacity_too)
        else:
            raise KeyError(name)
    return replace(system, volumes=volumes, tanks=tanks)


def scaled_schedule(schedule: ConsumptionSchedule, factor: float) -> ConsumptionSchedule:
    """Every consumer's rate [t/h] times ``factor`` [-] (same segments, same basis)."""
    if factor == 1.0:
        return schedule
    rates = {k: tuple(r * factor for r in v) for k, v in schedule.rates_t_h.items()}
    return ConsumptionSchedule(schedule.times_h, rates, schedule.basis)


def scale_all(system: FuelSystem, schedule: ConsumptionSchedule, volume_factor: float,
              flow_factor: float) -> tuple[FuelSystem, ConsumptionSchedule]:
    """Every volume and tank times ``volume_factor`` [-]; every flow (consumption and pump
    rates) times ``flow_factor`` [-]; schedule segment times [h] scale by their ratio.

    Returns the scaled system and schedule. The flushing model then runs the
    same course on a time axis stretched by
    ``κ = volume_factor / flow_factor``: every time to a level is κ times the
    original (exact in the model; in the simulator to round-off when its
    output step and longest step are scaled by κ too, else to its tolerance).
    """
    lam, mu = float(volume_factor), float(flow_factor)
    scaled = perturbed(system, {n: lam for n in (*system.volumes, *system.tanks)}, True)
    circuits = {}
    for name, c in scaled.circuits.items():
        links = []
        for link in c.links:
            flow = link.flow
            if flow is not None and not flow.rest and flow.constant_m3h:
                flow = Flow(flow.constant_m3h * mu, flow.factor, flow.consumers)
            links.append(Link(link.source, link.target, flow, link.place))
        circuits[name] = replace(c, links=tuple(links))
    kappa = lam / mu
    sched = ConsumptionSchedule(tuple(t * kappa for t in schedule.times_h),
                                {k: tuple(r * mu for r in v) for k, v in
                                 schedule.rates_t_h.items()}, schedule.basis)
    return replace(scaled, circuits=circuits), sched


@dataclass(frozen=True, eq=False)
class BlendCurve:
    """θ(t), the to-tank's share of the inlet blend (volume), at each distinct inlet of a circuit.

    ``phi_a``, ``phi_b``: compositions (volume fractions, in ``fuels`` order) of
    the from-tank and to-tank contents at the switch. ``time_h`` (h) and ``theta`` [-]
    are per distinct inlet (consumers fed from one node share a curve).
    """

    fuels: tuple[Fuel, ...]
    phi_a: np.ndarray
    phi_b: np.ndarray
    time_h: tuple[np.ndarray, ...]
    theta: tuple[np.ndarray, ...]
    envelope: tuple[np.ndarray, ...]  # suffix minimum of theta
    horizon_h: float

    @classmethod
    def from_result(cls, result: FlushResult, circuit: str, from_tank: str,
                    to_tank: str) -> BlendCurve:
        """The blend curves of ``circuit`` in ``result`` (UncertaintyError if an inlet
        is not a blend of the two tanks' contents)."""
        phi_a = result.tanks[from_tank].fractions[:, 0].copy()
        phi_b = result.tanks[to_tank].fractions[:, 0].copy()
        d = phi_b - phi_a
        dd = float(d @ d)
        if dd <= 1e-18:
            raise UncertaintyError(f"tanks {from_tank!r} and {to_tank!r} hold the same fuel")
        times, theta, env = [], [], []
        seen: list[np.ndarray] = []
        for curve in result.circuit_inlets(circuit):
            fr = curve.trace_fractions
            if any(s.shape == fr.shape and np.array_equal(s, fr) for s in seen):
                continue
            seen.append(fr)
            rel = fr - phi_a[:, None]
            th = (d @ rel) / dd
            off = np.abs(rel - np.outer(d, th)).max() if th.size else 0.0
            if off > _LINE_TOL:
                raise UncertaintyError(
                    f"the inlet of {curve.consumer!r} is not a blend of the contents of "
                    f"{from_tank!r} and {to_tank!r} (a third source feeds the circuit)")
            times.append(curve.trace_time_h)
            theta.append(th)
            env.append(np.minimum.accumulate(th[::-1])[::-1])
        return cls(result.fuels, phi_a, phi_b, tuple(times), tuple(theta), tuple(env),
                   float(result.time_h[-1]))

    def levels(self, sulphur_pct: np.ndarray, level_pct: float, down: bool) -> np.ndarray:
        """θ* [-] for sulphur samples ``sulphur_pct`` (N, F) [% m/m] and a level [% m/m].

        The share of B at which the inlet is at or below (``down``) or at or
        above ``level_pct``, from ``Σ φᵢρᵢ(Sᵢ − L) ≤ 0`` (sulphur mixes by mass,
        [LEVENSPIEL-1999] [D]); 0: from the start; inf: never.
        """
        rho = np.array([f.density_kg_m3 for f in self.fuels])
        s = np.atleast_2d(np.asarray(sulphur_pct, dtype=float)) - level_pct
        sign = 1.0 if down else -1.0
        h_a = sign * (s @ (self.phi_a * rho))
        h_b = sign * (s @ (self.phi_b * rho))
        with np.errstate(divide="ignore", invalid="ignore"):
            theta = h_a / (h_a - h_b)
        theta = np.where(h_a <= 0.0, 0.0, theta)
        return np.where(h_b > 0.0, np.inf, theta)

    def time_at_h(self, theta_level: np.ndarray) -> np.ndarray:
        """When every inlet's θ reaches and stays at or above each level θ* [-], h (inf: not
        by the horizon); the settled crossing of the flushing results
        (:meth:`planner.flushing.InletCurve.time_at_or_below_h`)."""
        lv = np.asarray(theta_level, dtype=float)
        out = np.zeros(lv.shape)
        for t, th, env in zip(self.time_h, self.theta, self.envelope, strict=True):
            k = np.searchsorted(env, lv, side="left")
            inside = (k > 0) & (k < len(th))
            kk = np.clip(k, 1, len(th) - 1)
            t0, t1, th0, th1 = t[kk - 1], t[kk], th[kk - 1], th[kk]
            with np.errstate(divide="ignore", invalid="ignore"):
                cross = np.where(t1 <= t0, t1, t0 + (t1 - t0) * (lv - th0) / (th1 - th0))
            each = np.where(inside, cross, np.where(k == 0, t[0], np.inf))
            out = np.maximum(out, each)
        return np.where(lv <= 0.0, 0.0, out)

    def time_to_h(self, sulphur_pct: np.ndarray, level_pct: float, down: bool) -> np.ndarray:
        """Time to ``level_pct`` [% m/m] for sulphur samples (N, F) [% m/m], h (inf: not by
        the horizon)."""
        return self.time_at_h(self.levels(sulphur_pct, level_pct, down))
