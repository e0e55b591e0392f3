"""The uncertain inputs of one circuit and their random samples (seeded, reproducible).

Each input is drawn from its own column of one standard-normal (or uniform)
matrix, so the same seed gives the same numbers, and setting one input's
spread to zero leaves every other input's samples unchanged (common random
numbers when comparing settings).

Input keys: ``volume:NODE``, ``stagnant:NODE``, ``bypass:NODE`` (stirred
volumes), ``tank:NODE``, ``consumption``, ``sulphur:FUEL``, ``boundary``.
Values: factors (volumes, tanks, consumption), fractions (mixing), % m/m
(sulphur), hours (boundary: positive = the ship reaches the boundary that
much **earlier** than planned, so the changeover needs that much more lead).
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np

from planner.fuels import Fuel
from planner.uncertainty.inputs import Z95, UncertaintySpec
from planner.uncertainty.model import CircuitNodes

_MIN_FACTOR = 0.05


@dataclass(frozen=True)
class InputDef:
    """One uncertain input: its key, label, distribution and 95 % range.

    ``dist`` is ``"normal"`` (``spread`` = standard deviation) or ``"uniform"``
    (from 0 to ``spread``); ``low``/``high`` are the 2.5 % and 97.5 % points
    (normal) or the ends (uniform), in the input's unit.
    """

    key: str
    label: str
    kind: str
    node: str | None
    nominal: float
    spread: float
    dist: str
    unit: str

    @property
    def low(self) -> float:
        """The 2.5 % point (normal) or 0 (uniform), in the input's unit."""
        if self.dist == "uniform":
            return 0.0
        return self.nominal - Z95 * self.spread

    @property
    def high(self) -> float:
        """The 97.5 % point (normal) or the upper end (uniform), in the input's unit."""
        if self.dist == "uniform":
            return self.spread
        return self.nominal + Z95 * self.spread

    @property
    def uncertain(self) -> bool:
        """Whether the input has any spread."""
        return self.spread > 0.0


def input_defs(nodes: CircuitNodes, fuels: Sequence[Fuel],
               spec: UncertaintySpec) -> tuple[InputDef, ...]:
    """The uncertain inputs of a circuit, in sampling order (normal first, then uniform).

    Parameters
    ----------
    nodes : CircuitNodes
        The circuit's volumes, stirred volumes and receiving tanks.
    fuels : sequence of Fuel
        The distinct fuels of the changeover.
    spec : UncertaintySpec
        The spreads: ± values [%] are 95 % half-widths, so the standard
        deviation of a factor is ``value / 100 / 1.96`` [-]; sulphur standard
        deviations [% m/m]; the boundary time ± [min] becomes [h].

    Returns
    -------
    tuple of InputDef
        Volume factors, tank factors, consumption factor (normal, [-]); each
        fuel's sulphur (normal, [% m/m]); the boundary offset (normal, [h]);
        the stagnant and bypass parts of each stirred volume (uniform, [-]).
    """
    out = []
    for n in nodes.volumes:
        out.append(InputDef(f"volume:{n}", f"volume {n}", "volume", n, 1.0,
                            spec.volume_pct(n) / 100.0 / Z95, "normal", "×"))
    for n in nodes.tanks:
        out.append(InputDef(f"tank:{n}", f"sounding {n}", "tank", n, 1.0,
                            spec.tank_pct(n) / 100.0 / Z95, "normal", "×"))
    out.append(InputDef("consumption", "consumption", "consumption", None, 1.0,
                        spec.consumption_pct / 100.0 / Z95, "normal", "×"))
    for f in fuels:
        out.append(InputDef(f"sulphur:{f.name}", f"sulphur {f.name}", "sulphur", f.name,
                            f.sulphur_pct, spec.sulphur_sd(f.name, f.sulphur_pct), "normal",
                            "% m/m"))
    out.append(InputDef("boundary", "time of arrival at the boundary", "boundary", None, 0.0,
                        spec.boundary_time_min / 60.0 / Z95, "normal", "h"))
    for n in nodes.stirred:
        out.append(InputDef(f"stagnant:{n}", f"stagnant part {n}", "stagnant", n, 0.0,
                            spec.mixing_stagnant, "uniform", ""))
    for n in nodes.stirred:
        out.append(InputDef(f"bypass:{n}", f"bypass part {n}", "bypass", n, 0.0,
                            spec.mixing_bypass, "uniform", ""))
    return tuple(out)


@dataclass(frozen=True, eq=False)
class Samples:
    """``n`` samples of every input (``values[key]``, shape (n,)), with the seed used."""

    defs: tuple[InputDef, ...]
    values: dict[str, np.ndarray]
    n: int
    seed: int | None

    def sulphur(self, fuels: Sequence[Fuel]) -> np.ndarray:
        """Sulphur of each fuel (n, F), % m/m, in the order of ``fuels``."""
        return np.column_stack([self.values[f"sulphur:{f.name}"] for f in fuels])

    @property
    def early_h(self) -> np.ndarray:
        """How much earlier than planned the boundary is reached, h (n,)."""
        return self.values["boundary"]

    def log_factor(self, node: str | None, kind: str) -> np.ndarray:
        """ln of the factor on a node's volume in the flushing model (n,) [-]: its volume
        factor times, for a stirred volume, the effective-volume factor (1 − d) / (1 − b);
        ``kind`` ``"consumption"`` (``node`` ignored), ``"tank"`` or ``"volume"``."""
        if kind == "consumption":
            return np.log(self.values["consumption"])
        if kind == "tank":
            return np.log(self.values[f"tank:{node}"])
        u = np.log(self.values[f"volume:{node}"])
        if f"stagnant:{node}" in self.values:
            u = u + np.log1p(-self.values[f"stagnant:{node}"])
            u = u - np.log1p(-self.values[f"bypass:{node}"])
        return u


def draw(defs: tuple[InputDef, ...], n: int, seed: int | None) -> Samples:
    """``n`` samples of ``defs`` from ``numpy.random.default_rng(seed)``.

    Normal inputs from one standard-normal matrix (factors kept at or above
    0.05, sulphur at or above 0), uniform ones from one uniform matrix, one
    column per input: the same seed gives the same numbers, and an input
    without spread leaves the others' samples unchanged.
    """
    if n < 1:
        raise ValueError(f"samples must be >= 1, got {n}")
    rng = np.random.default_rng(seed)
    normal = [d for d in defs if d.dist == "normal"]
    uniform = [d for d in defs if d.dist == "uniform"]
    z = rng.standard_normal((n, len(normal)))
    w = rng.random((n, len(uniform)))
    values: dict[str, np.ndarray] = {}
    for j, d in enumerate(normal):
        x = d.nominal + d.spread * z[:, j]
        if d.unit == "×":
            x = np.maximum(x, _MIN_FACTOR)
        elif d.kind == "sulphur":
            x = np.maximum(x, 0.0)
        values[d.key] = x
    for j, d in enumerate(uniform):
        values[d.key] = d.spread * w[:, j]
    return Samples(defs, values, n, seed)


def one_at_a_time(defs: tuple[InputDef, ...], key: str, value: float) -> Samples:
    """A single sample: every input at its nominal value but ``key`` at ``value`` (its unit)."""
    values = {d.key: np.array([value if d.key == key else d.nominal]) for d in defs}
    return Samples(defs, values, 1, None)


def fit_points(d_volume: InputDef, stagnant: InputDef | None = None,
               bypass: InputDef | None = None) -> tuple[float, float]:
    """ln-factor points (low < 0 < high) [-] at which the surrogate simulates a node.

    The 95 % ends of its volume factor combined with the mixing ends (stirred
    volumes: the stagnant end lowers the effective volume, the bypass end
    raises it); an input spread on one side only gets a point at half the
    other side's, mirrored. ValueError when there is no spread at all.
    """
    lo = math.log(max(d_volume.low, _MIN_FACTOR))
    hi = math.log(d_volume.high)
    if stagnant is not None:
        lo += math.log1p(-stagnant.spread)
    if bypass is not None:
        hi -= math.log1p(-bypass.spread)
    if lo >= 0.0 and hi <= 0.0:
        raise ValueError("no spread to fit")
    if lo >= 0.0:
        lo = -0.5 * hi
    if hi <= 0.0:
        hi = -0.5 * lo
    return lo, hi
