"""Fit the circuit's uncertain parameters to logged blend curves by least squares.

Method:

1. each reading becomes the new content's mass share ``w`` at the inlet
   (:mod:`planner.calibration.blend`); several trends (several changeovers of
   the same circuit, each with its own switch time) fit together, their
   residuals side by side;
2. the noise of the readings is measured from the data alone, before any
   model: ``σ_d = 1.4826·MAD(Δw)/√2`` over successive readings (the median
   absolute deviation, robust to spikes; a difference of two readings carries
   twice the variance);
3. **information check** at the ship file's values: a trend whose readings
   never reach a fifth of the way to the new fuel, or whose sensitivity matrix
   ``J`` gives a parameter a standard error above :data:`MAX_SD_LOG` (its 95 %
   range wider than a factor of about 2 either way), cannot determine it.
   With the default parameters the least determined one is left at the ship
   file's value (and said so) until the rest are determined; parameters named
   by the caller are refused with one line instead;
4. ``scipy.optimize.least_squares`` ([SCIPY-LSQ] [P]: trust-region
   reflective, bounds of a factor 5 either way) with the robust loss
   ``soft_l1`` and ``f_scale = 3·σ_d``: a spike (a viscometer glitch, an air
   bubble) weighs linearly rather than quadratically, so a few of them do not
   pull the fit, while ordinary readings are fitted as in plain least squares;
5. the covariance from the Jacobian at the solution ([BATES-WATTS-1988] [P]):
   ``C = s²·(JᵀJ)⁻¹`` with ``s² = Σr²/(n − p)`` over the readings whose
   residual is within 5 robust standard deviations (the spikes the loss
   down-weighted are left out of ``s²`` and ``J`` too); ``J`` by central
   differences of ±0.02 in each log-factor; 95 % intervals ``û ± t₀.₉₇₅,ₙ₋ₚ·√Cⱼⱼ``
   (Student's t), as factors ``exp(û ± ...)``. The intervals are those of the
   linearised model (exact for a model linear in u, approximate otherwise);
6. a parameter left at the ship file's value is not known exactly either: its
   spread (``prior_sd``, from the ship file's ``[uncertainty]`` table) enters
   as a *consider* parameter, first-order: the fitted ``û`` moves by
   ``A·δ`` when a kept one is off by ``δ``, ``A = (JᵀJ)⁻¹·Jᵀ·J_k``, so
   ``C ← C + A·diag(σ_k²)·Aᵀ`` [D]. Without it a kept volume that is off would
   bias the fitted ones outside their intervals.
"""

from __future__ import annotations

import math
from collections.abc import Mapping, Sequence
from dataclasses import dataclass

import numpy as np
from scipy.optimize import least_squares
from scipy.stats import t as student_t

from planner.calibration.blend import content_mass_fractions, share_of_b
from planner.calibration.model import (
    Changeover,
    Parameter,
    apply,
    inlet_share,
)
from planner.calibration.trend import Trend
from planner.ship.system import FuelSystem

MAX_SD_LOG = 0.35  # largest standard error of a fitted log-factor [-] (95 % ≈ ×/÷ 2)
MIN_MOVED_SHARE = 0.2  # the blend must move at least this far towards the new fuel [-]
MAX_CONDITION = 1e10  # of JᵀJ, beyond which the parameters are not separable
BOUND_LOG = math.log(5.0)
DIFF_LOG = 0.02
SPIKE_SIGMAS = 5.0
MIN_NOISE = 1e-3  # floor of the noise estimate [-] (the readings' rounding)
_HORIZON_PAD_H = 0.05


class CalibrationError(ValueError):
    """The trend(s) cannot calibrate the parameters (message, one line, says why)."""


@dataclass(frozen=True)
class Fitted:
    """A fitted parameter: the factor on the ship file [-], its 95 % range [-] and standard
    error of ln(factor) [-]."""

    parameter: Parameter
    factor: float
    factor_low: float
    factor_high: float
    sd_log: float

    @property
    def value(self) -> float:
        """Fitted value, in the parameter's unit."""
        return self.parameter.ship_value * self.factor

    @property
    def low(self) -> float:
        """Lower end of the 95 % interval, in the parameter's unit."""
        return self.parameter.ship_value * self.factor_low

    @property
    def high(self) -> float:
        """Upper end of the 95 % interval, in the parameter's unit."""
        return self.parameter.ship_value * self.factor_high


@dataclass(frozen=True, eq=False)
class Series:
    """One trend's measured share [-] at its reading times [h], the modelled shares [-]
    (ship file, fitted) on the simulator's times [h], and which readings were spikes."""

    trend: Trend
    measured: np.ndarray
    model_time_h: np.ndarray
    ship_share: np.ndarray
    fitted_share: np.ndarray
    spike: np.ndarray


@dataclass(frozen=True, eq=False)
class Calibration:
    """The result: fitted parameters, the ones left at the ship file's value (with why),
    each trend's curves, the residual standard deviation [-], the covariance of the
    log-factors [-], readings used and spikes left out."""

    fitted: tuple[Fitted, ...]
    kept: tuple[tuple[Parameter, str], ...]
    series: tuple[Series, ...]
    residual_sd: float
    noise_sd: float
    covariance: np.ndarray
    readings: int
    spikes: int
    evaluations: int

    @property
    def u(self) -> np.ndarray:
        """The fitted log-factors [-]."""
        return np.array([np.log(f.factor) for f in self.fitted])

    @property
    def parameters(self) -> tuple[Parameter, ...]:
        """The fitted parameters, in order."""
        return tuple(f.parameter for f in self.fitted)


def _noise(shares: Sequence[np.ndarray]) -> float:
    d = np.concatenate([np.diff(s) for s in shares if len(s) > 1])
    mad = float(np.median(np.abs(d - np.median(d))))
    return max(1.4826 * mad / math.sqrt(2.0), MIN_NOISE)


def measured_shares(system: FuelSystem, changes: Sequence[Changeover],
                    trends: Sequence[Trend]) -> list[np.ndarray]:
    """Each trend's readings as the to-tank content's mass share.

    Parameters
    ----------
    system : FuelSystem
        The tanks' contents and the fuels' delivery-note viscosities.
    changes : sequence of Changeover
        The tanks of each trend's changeover.
    trends : sequence of Trend
        Temperatures [°C] and viscosities [cSt].

    Returns
    -------
    list of ndarray [-]
        One per trend (:func:`planner.calibration.blend.share_of_b`); BlendError
        when the two contents cannot be told apart by viscosity.
    """
    fuels = list(system.fuels.values())
    out = []
    for c, tr in zip(changes, trends, strict=True):
        ma = content_mass_fractions(system.tanks[c.from_tank].content_m3, fuels)
        mb = content_mass_fractions(system.tanks[c.to_tank].content_m3, fuels)
        out.append(share_of_b(tr.viscosity_cst, tr.temperature_c, ma, mb, fuels))
    return out


class _Model:
    """The modelled shares at every reading for a vector of log-factors, counting runs."""

    def __init__(self, system: FuelSystem, changes: Sequence[Changeover],
                 trends: Sequence[Trend], params: Sequence[Parameter]) -> None:
        self.system, self.changes, self.trends, self.params = system, changes, trends, params
        self.runs = 0

    def curves(self, u: np.ndarray) -> list[tuple[np.ndarray, np.ndarray]]:
        out = []
        for c, tr in zip(self.changes, self.trends, strict=True):
            sys_, sched = apply(self.system, c.schedule, self.params, u)
            change = Changeover(c.circuit, c.from_tank, c.to_tank, c.inlet, sched)
            out.append(inlet_share(sys_, change, tr.end_h + _HORIZON_PAD_H))
            self.runs += 1
        return out

    def at_readings(self, u: np.ndarray) -> np.ndarray:
        return np.concatenate([np.interp(tr.time_h, t, s) for (t, s), tr in
                               zip(self.curves(u), self.trends, strict=True)])

    def jacobian(self, u: np.ndarray, central: bool) -> np.ndarray:
        base = None if central else self.at_readings(u)
        cols = []
        for j in range(len(u)):
            e = np.zeros(len(u))
            e[j] = DIFF_LOG
            hi = self.at_readings(u + e)
            lo = self.at_readings(u - e) if central else base
            cols.append((hi - lo) / (2.0 * DIFF_LOG if central else DIFF_LOG))
        return np.column_stack(cols) if cols else np.zeros((0, 0))


def _covariance(jac: np.ndarray, s2: float) -> tuple[np.ndarray, float]:
    jtj = jac.T @ jac
    w = np.linalg.eigvalsh(jtj)
    cond = float(w[-1] / w[0]) if w[0] > 0.0 else math.inf
    if not math.isfinite(cond) or cond > MAX_CONDITION:
        return np.full(jtj.shape, np.inf), cond
    return s2 * np.linalg.inv(jtj), cond


def _not_moved(trends: Sequence[Trend], shares: Sequence[np.ndarray]) -> str | None:
    top = max(float(np.percentile(s, 95)) for s in shares)
    if top >= MIN_MOVED_SHARE:
        return None
    end_min = max(tr.end_h for tr in trends) * 60.0
    return (f"too little information: the trend ends {end_min:.0f} min after the switch with "
            f"at most {100 * max(top, 0.0):.0f} % of the new fuel at the inlet, before the "
            "blend moves; log until the viscosity settles on the new fuel")


def _why(sd: float) -> str:
    """Why a parameter with standard error ``sd`` of its log-factor [-] is not determined."""
    if not math.isfinite(sd):
        return ("the trend cannot tell it from the others (only their combination moves "
                "the curve)")
    wide = math.exp(1.96 * sd)
    if wide > 10.0:
        return "the trend cannot tell it (its 95 % range would exceed a factor of 10)"
    return f"the trend cannot tell it (its 95 % range would be ×/÷ {wide:.1f})"


def _select(model: _Model, params: list[Parameter], sigma: float, explicit: bool,
            kept: list[tuple[Parameter, str]]) -> list[Parameter]:
    """The parameters the trends can determine (explicit: all, or CalibrationError)."""
    jac = model.jacobian(np.zeros(len(params)), central=False)
    while params:
        cov, cond = _covariance(jac, sigma * sigma)
        sd = np.sqrt(np.diag(cov))
        worst = int(np.argmax(sd))
        if sd[worst] <= MAX_SD_LOG:
            return params
        why = _why(float(sd[worst]))
        if explicit:
            raise CalibrationError(f"too little information for {params[worst].label}: {why}; "
                                   "fit fewer parameters (--fit)")
        kept.append((params[worst], why))
        params = params[:worst] + params[worst + 1:]
        jac = np.delete(jac, worst, axis=1)
    raise CalibrationError("too little information: the trend determines none of the "
                           "parameters; " + "; ".join(f"{p.name}: {w}" for p, w in kept))


def calibrate(system: FuelSystem, changes: Sequence[Changeover], trends: Sequence[Trend],
              params: Sequence[Parameter], explicit: bool = False,
              prior_sd: Mapping[str, float] | None = None,
              fixed: Sequence[Parameter] = ()) -> Calibration:
    """Fit ``params`` to the trends of the changeovers ``changes`` (one per trend).

    Parameters
    ----------
    system : FuelSystem
        The ship file's system (the fit's starting point, ``u = 0``).
    changes : sequence of Changeover
        The changeover each trend records (circuit, tanks, inlet, consumption [t/h]).
    trends : sequence of Trend
        The readings [h after each switch, °C, cSt].
    params : sequence of Parameter
        What to fit (:func:`planner.calibration.model.parameters`).
    explicit : bool, default False
        The caller named the parameters: refuse rather than leave out one the
        trends cannot determine.
    prior_sd : mapping of str to float, optional [-]
        Standard deviation of ln(factor) of each parameter by name, as the ship
        file states it (:func:`planner.calibration.model.prior_sd`); a kept
        parameter's widens the fitted intervals (step 6 of the module notes).
    fixed : sequence of Parameter, optional
        Parameters not fitted, held at the ship file's value, whose ``prior_sd``
        widens the intervals too (those the trends cannot determine are added).

    Returns
    -------
    Calibration
        Fitted factors [-] with 95 % intervals, the parameters kept at the ship
        file's value and why, the curves and the residual statistics.

    Raises
    ------
    CalibrationError
        Too little information (the blend never moves, or no parameter
        determined), or a parameter the caller named that cannot be determined.
    BlendError
        When the two fuels cannot be told apart by viscosity.
    """
    if len(changes) != len(trends) or not trends:
        raise ValueError("one changeover per trend, at least one")
    shares = measured_shares(system, changes, trends)
    why = _not_moved(trends, shares)
    if why:
        raise CalibrationError(why)
    sigma = _noise(shares)
    kept: list[tuple[Parameter, str]] = []
    chosen = _select(_Model(system, changes, trends, list(params)), list(params), sigma,
                     explicit, kept)
    model = _Model(system, changes, trends, chosen)
    y = np.concatenate(shares)
    fit = least_squares(lambda u: model.at_readings(u) - y, np.zeros(len(chosen)),
                        bounds=(-BOUND_LOG, BOUND_LOG), loss="soft_l1",
                        f_scale=3.0 * sigma, diff_step=DIFF_LOG, x_scale=1.0)
    u = fit.x
    r = model.at_readings(u) - y
    robust = max(1.4826 * float(np.median(np.abs(r - np.median(r)))), MIN_NOISE)
    inlier = np.abs(r) <= SPIKE_SIGMAS * robust
    n_in, p = int(inlier.sum()), len(chosen)
    if n_in <= p + 1:
        raise CalibrationError(f"too little information: {n_in} readings fit the model for "
                               f"{p} parameters")
    s2 = float(r[inlier] @ r[inlier]) / (n_in - p)
    jac = model.jacobian(u, central=True)[inlier]
    cov, cond = _covariance(jac, s2)
    held = [q for q, _ in kept] + [q for q in fixed if q not in chosen]
    if held and prior_sd and math.isfinite(cond):
        cov = cov + _consider(system, changes, trends, chosen, held, u, jac, inlier, prior_sd)
    sd = np.sqrt(np.diag(cov))
    bad = [k for k in range(p) if not sd[k] <= MAX_SD_LOG]
    if bad:
        k = bad[0]
        raise CalibrationError(f"too little information for {chosen[k].label} at the fitted "
                               f"values (standard error ±{100 * sd[k]:.0f} % or JᵀJ "
                               f"condition {cond:.1e}); fit fewer parameters (--fit)")
    q = float(student_t.ppf(0.975, n_in - p))
    fitted = tuple(Fitted(par, float(np.exp(x)), float(np.exp(x - q * s)),
                          float(np.exp(x + q * s)), float(s))
                   for par, x, s in zip(chosen, u, sd, strict=True))
    return Calibration(fitted, tuple(kept), _series(model, trends, shares, u, inlier),
                       math.sqrt(s2), sigma, cov, n_in, int((~inlier).sum()), model.runs)


def _consider(system: FuelSystem, changes: Sequence[Changeover], trends: Sequence[Trend],
              chosen: list[Parameter], kept: list[Parameter], u: np.ndarray, jac: np.ndarray,
              inlier: np.ndarray, prior_sd: Mapping[str, float]) -> np.ndarray:
    """``A·diag(σ_k²)·Aᵀ``: the fitted log-factors' covariance [-] from the kept ones' spread."""
    full = _Model(system, changes, trends, chosen + kept)
    x = np.concatenate([u, np.zeros(len(kept))])
    cols = []
    for j in range(len(chosen), len(chosen) + len(kept)):
        e = np.zeros(len(x))
        e[j] = DIFF_LOG
        cols.append((full.at_readings(x + e) - full.at_readings(x - e)) / (2.0 * DIFF_LOG))
    jk = np.column_stack(cols)[inlier]
    a = np.linalg.solve(jac.T @ jac, jac.T @ jk)
    sk = np.array([prior_sd.get(q.name, 0.0) for q in kept])
    return (a * sk * sk) @ a.T


def _series(model: _Model, trends: Sequence[Trend], shares: Sequence[np.ndarray],
            u: np.ndarray, inlier: np.ndarray) -> tuple[Series, ...]:
    ship = model.curves(np.zeros(len(u)))
    fitted = model.curves(u)
    out, k = [], 0
    for tr, y, (t0, s0), (t1, s1) in zip(trends, shares, ship, fitted, strict=True):
        n = len(y)
        out.append(Series(tr, y, t1, np.interp(t1, t0, s0), s1, ~inlier[k:k + n]))
        k += n
    return tuple(out)
