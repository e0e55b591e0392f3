"""The flushing model as the calibration sees it: fitted parameters and the modelled blend.

A parameter is a log-factor ``u`` on part of the ship file, so ``u = 0`` is the
ship file and every parameter has the same scale (a tenth is about 10 %), which
keeps the least-squares problem well conditioned:

- ``pipes``: one factor on every pipe of the circuit. Pipes are plug flow, pure
  delays ([LEVENSPIEL-1999] [P]); delays in series add, so one trend can only
  tell their sum, never how it divides between the pipes;
- a volume's name: a factor on that pipe or stirred volume. For a stirred
  volume this is its **effective** volume ``(1 − d)·V / (1 − b)``: a stagnant
  part ``d`` and a bypass ``b`` enter the flushing model only through it
  (:mod:`planner.uncertainty.model`), so the fitted factor includes both and
  the trend cannot tell them apart;
- ``consumption``: a factor on every consumer's rate (pump rates stay).

The modelled quantity is the mass share of the to-tank's content at the inlet
the viscometer reads, from :func:`planner.flushing.simulate`.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np

from planner.flushing import ConsumptionSchedule, make_switch, simulate
from planner.ship.system import FuelSystem, Pipe, Stirred
from planner.uncertainty.inputs import Z95, UncertaintySpec
from planner.uncertainty.model import perturbed, scaled_schedule

PIPES = "pipes"
CONSUMPTION = "consumption"
OUTPUT_STEP_S = 10.0


@dataclass(frozen=True)
class Parameter:
    """One fitted parameter: ``name`` (``pipes``, ``consumption`` or a volume), the nodes its
    factor scales, the ship-file value and its unit, and a label for people."""

    name: str
    nodes: tuple[str, ...]
    ship_value: float
    unit: str
    label: str

    def __post_init__(self) -> None:
        if not self.ship_value > 0.0:
            raise ValueError(f"parameter {self.name!r}: ship-file value must be > 0")


@dataclass(frozen=True)
class Changeover:
    """The changeover a trend records: circuit, tanks, the inlet read, the consumption."""

    circuit: str
    from_tank: str
    to_tank: str
    inlet: str
    schedule: ConsumptionSchedule


def parameters(system: FuelSystem, circuit: str,
               names: Sequence[str] | None) -> tuple[Parameter, ...]:
    """The parameters to fit, by name (None: ``pipes`` and each stirred volume).

    Parameters
    ----------
    system : FuelSystem
    circuit : str
    names : sequence of str, optional
        ``pipes``, ``consumption`` or volumes of the circuit.

    Returns
    -------
    tuple of Parameter
        Volumes [m³] (pipes: their sum), consumption [-] (factor 1).

    Raises
    ------
    ValueError
        A name that is none of these, named twice, or a pipe named beside ``pipes``.
    """
    c = system.circuits[circuit]
    vols = [n for n in c.volume_names if n in system.volumes]
    pipes = tuple(n for n in vols if isinstance(system.volumes[n], Pipe))
    if names is None:
        names = ([PIPES] if pipes else []) + [n for n in vols
                                              if isinstance(system.volumes[n], Stirred)]
    out, used = [], set()
    for n in names:
        if n in used:
            raise ValueError(f"{n!r} is named twice")
        used.add(n)
        if n == PIPES:
            if not pipes:
                raise ValueError(f"circuit {circuit!r} has no pipes")
            total = sum(system.volumes[p].volume_m3 for p in pipes)
            out.append(Parameter(PIPES, pipes, total, "m³", "pipes (sum of " +
                                 ", ".join(pipes) + ")"))
        elif n == CONSUMPTION:
            out.append(Parameter(CONSUMPTION, (), 1.0, "×", "consumption factor"))
        elif n in vols:
            v = system.volumes[n]
            kind = "effective volume" if isinstance(v, Stirred) else "pipe volume"
            out.append(Parameter(n, (n,), v.volume_m3, "m³", f"{n} ({kind})"))
        else:
            raise ValueError(f"{n!r} is not a parameter; expected {PIPES}, {CONSUMPTION} or a "
                             f"volume of circuit {circuit!r}: {', '.join(vols)}")
    if PIPES in used and used & set(pipes):
        raise ValueError(f"a pipe is named beside {PIPES!r} (which already scales every pipe)")
    return tuple(out)


def prior_sd(system: FuelSystem, spec: UncertaintySpec,
             params: Sequence[Parameter]) -> dict[str, float]:
    """Standard deviation of each parameter's ln(factor) as the ship file states it.

    Parameters
    ----------
    system : FuelSystem
    spec : UncertaintySpec
        The ship file's ``[uncertainty]`` table: ± (95 %) [%], mixing parts [-].
    params : sequence of Parameter

    Returns
    -------
    dict of str to float [-]
        By parameter name.

    Notes
    -----
    A volume's ± (95 %) [%] over 1.96 (:mod:`planner.uncertainty.inputs`); for a
    stirred volume the mixing adds the variance of ``ln(1 − d)`` and
    ``ln(1 − b)``, about ``s²/12`` each for ``d``, ``b`` uniform from 0 to ``s``
    [D]; ``pipes``: the spread of the sum of independent pipes; consumption:
    its ± over 1.96.
    """
    out = {}
    for p in params:
        if p.name == CONSUMPTION:
            out[p.name] = spec.consumption_pct / 100.0 / Z95
            continue
        v = np.array([system.volumes[n].volume_m3 for n in p.nodes])
        sd = np.array([spec.volume_pct(n) / 100.0 / Z95 for n in p.nodes])
        var = float(np.sum((v * sd) ** 2) / np.sum(v) ** 2)
        if len(p.nodes) == 1 and isinstance(system.volumes[p.nodes[0]], Stirred):
            var += (spec.mixing_stagnant ** 2 + spec.mixing_bypass ** 2) / 12.0
        out[p.name] = float(np.sqrt(var))
    return out


SEGMENT_H = 1.0 / 6.0  # the logged load is averaged over 10-minute segments [h]


def logged_schedule(system: FuelSystem, circuit: str, time_h: np.ndarray,
                    load_pct: np.ndarray) -> ConsumptionSchedule:
    """The circuit's consumption following a logged main-engine load.

    Parameters
    ----------
    system : FuelSystem
    circuit : str
    time_h : ndarray [h]
        Reading times after the switch.
    load_pct : ndarray [% MCR]
        The load at each reading (NaN: not logged).

    Returns
    -------
    ConsumptionSchedule
        Segments of :data:`SEGMENT_H` with the mean logged load of each (a
        segment without readings keeps the one before; the first, the first
        logged); main engines at that load, other consumers at their rates
        [t/h at 42.7 MJ/kg]. ValueError when no load is logged.
    """
    ok = np.isfinite(load_pct)
    if not ok.any():
        raise ValueError("the load column holds no value")
    n = max(1, int(np.ceil((float(time_h[-1]) + 1e-9) / SEGMENT_H)))
    loads, last = [], float(load_pct[ok][0])
    for k in range(n):
        inside = ok & (time_h >= k * SEGMENT_H) & (time_h < (k + 1) * SEGMENT_H)
        last = float(np.mean(load_pct[inside])) if inside.any() else last
        loads.append(last)
    names = system.circuits[circuit].consumers
    rates = [{c: system.consumers[c].iso_demand_t_h(load_pct=x) for c in names} for x in loads]
    return ConsumptionSchedule.steps([k * SEGMENT_H for k in range(n)], rates)


def apply(system: FuelSystem, schedule: ConsumptionSchedule, params: Sequence[Parameter],
          u: np.ndarray) -> tuple[FuelSystem, ConsumptionSchedule]:
    """The system and schedule with each parameter's factor applied.

    Parameters
    ----------
    system : FuelSystem
    schedule : ConsumptionSchedule
        Rates [t/h].
    params : sequence of Parameter
    u : ndarray [-]
        ln(factor) of each parameter.

    Returns
    -------
    system, schedule : FuelSystem, ConsumptionSchedule
        Volumes times ``exp(u)`` (:func:`planner.uncertainty.model.perturbed`),
        rates times the consumption factor.
    """
    factors: dict[str, float] = {}
    consumption = 1.0
    for p, x in zip(params, np.asarray(u, dtype=float), strict=True):
        if p.name == CONSUMPTION:
            consumption = float(np.exp(x))
        for n in p.nodes:
            factors[n] = float(np.exp(x))
    sys_ = perturbed(system, factors) if factors else system
    return sys_, scaled_schedule(schedule, consumption)


def inlet_share(system: FuelSystem, change: Changeover,
                horizon_h: float) -> tuple[np.ndarray, np.ndarray]:
    """Simulated mass share of the to-tank's content at the inlet against time.

    Parameters
    ----------
    system : FuelSystem
    change : Changeover
        Circuit, tanks, the inlet read and the rates [t/h].
    horizon_h : float [h]
        Simulated time after the switch.

    Returns
    -------
    time_h, share : ndarray [h], ndarray [-]
        On the simulator's fine record (:func:`planner.flushing.simulate`).

    Notes
    -----
    The inlet's volume fractions are projected on the line from the from-tank's
    content to the to-tank's (the circuit holds only those two), and the volume
    share turned into a mass share with the contents' densities.
    """
    sw = make_switch(system, change.circuit, change.from_tank, change.to_tank)
    result = simulate(system, sw, change.schedule, horizon_h, output_step_s=OUTPUT_STEP_S)
    curve = result.inlets[change.inlet]
    phi_a = result.tanks[change.from_tank].fractions[:, 0]
    phi_b = result.tanks[change.to_tank].fractions[:, 0]
    d = phi_b - phi_a
    theta = d @ (curve.trace_fractions - phi_a[:, None]) / float(d @ d)
    rho = np.array([f.density_kg_m3 for f in result.fuels])
    ra, rb = float(phi_a @ rho), float(phi_b @ rho)
    share = theta * rb / (theta * rb + (1.0 - theta) * ra)
    return curve.trace_time_h, share
