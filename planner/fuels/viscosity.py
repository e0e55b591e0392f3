"""Kinematic viscosity against temperature: the ASTM D341 Walther-type line.

ASTM D341 ([ASTM-D341] [P]) puts a petroleum liquid's kinematic
viscosity on a straight line in these coordinates::

    log10(log10(Z)) = A - B * log10(T)
    Z = nu + 0.7 + exp(-1.47 - 1.84*nu - 0.51*nu**2)

with ``nu`` in cSt (mm²/s) and ``T`` in kelvin. Two measured points fix ``A``
and ``B``; the line then gives the viscosity at any temperature, or the
temperature at which a target viscosity is reached (the heating or cooling
needed for the injection viscosity).

Validity
--------
- Petroleum liquids (fuel oils, gas oils, lubricating oils) in the liquid
  range, away from wax appearance (below the cloud/pour point the line does
  not hold) and from boiling.
- This form of ``Z`` holds for viscosities of about 0.21 cSt and above
  ([ASTM-D341] [M]: the range is from memory, not checked against the
  standard). Inputs below 0.21 cSt are refused; computed values that fall
  below it (extreme heating of a light distillate) are returned but are
  outside the method.
- The line is best between the two measured points; extrapolating far beyond
  them (e.g. from 40/100 °C data to 150 °C) adds error that ASTM D341 does not
  quantify.

Default slopes (assumption)
---------------------------
A bunker delivery note usually gives one viscosity only (at 50 °C for residual
grades, at 40 °C for distillates). A line through one point needs an assumed
slope ``B``. The defaults below are an **assumption**, not part of ASTM D341:
they are the slopes of typical fuels, derived here from typical pairs of
values (common practice, the pairs themselves [M]):

- residual, ``B = 3.5``: RMG 380 at 380 cSt/50 °C with about 35 cSt/100 °C
  gives ``B ≈ 3.53``;
- distillate, ``B = 4.0``: gas oil at 3 cSt/40 °C with about 1.2 cSt/100 °C
  gives ``B ≈ 4.01``.

Where a second measured point is available, use it (:func:`d341_fit`).
"""

from __future__ import annotations

import numpy as np
from numpy.typing import ArrayLike

from planner.fuels._arrays import FloatOrArray, f64, out, require

KELVIN_OFFSET = 273.15
"""Celsius to kelvin offset."""

MIN_VISCOSITY_CST = 0.21
"""Lowest kinematic viscosity, cSt, for which this form of Z is used ([ASTM-D341] [M])."""

DEFAULT_SLOPE_RESIDUAL = 3.5
"""Assumed D341 slope B for residual fuels with one known point (assumption, see module doc)."""

DEFAULT_SLOPE_DISTILLATE = 4.0
"""Assumed D341 slope B for distillate fuels with one known point (assumption, see module doc)."""

_NEWTON_MAX_STEPS = 50


def default_slope(is_residual: bool) -> float:
    """The assumed ASTM D341 slope ``B`` for a fuel with only one viscosity point.

    Parameters
    ----------
    is_residual : bool
        True for residual fuels, False for distillates.

    Returns
    -------
    B : float [-]
        :data:`DEFAULT_SLOPE_RESIDUAL` (3.5) or :data:`DEFAULT_SLOPE_DISTILLATE`
        (4.0).

    Notes
    -----
    An assumption, not part of [ASTM-D341]: the slopes of typical fuels
    (common practice; the typical pairs behind them [M], see the module
    docstring).

    Examples
    --------
    >>> default_slope(True), default_slope(False)
    (3.5, 4.0)
    """
    return DEFAULT_SLOPE_RESIDUAL if is_residual else DEFAULT_SLOPE_DISTILLATE


def _kelvin(temperature_c: ArrayLike) -> np.ndarray:
    t_k = f64(temperature_c) + KELVIN_OFFSET
    require(
        np.isfinite(t_k) & (t_k > 0.0),
        lambda: f"temperature_c must be above -273.15 °C, got {temperature_c!r}",
    )
    return t_k


def d341_z(viscosity_cst: ArrayLike) -> FloatOrArray:
    """The ASTM D341 variable Z of a kinematic viscosity.

    ``Z = ν + 0.7 + exp(−1.47 − 1.84ν − 0.51ν²)``

    Parameters
    ----------
    viscosity_cst : float or array_like [cSt]
        Kinematic viscosity ν (mm²/s).

    Returns
    -------
    Z : float or ndarray [cSt]
        The D341 variable (in cSt, like ν).

    Notes
    -----
    [ASTM-D341] [P], for petroleum liquids; this form holds for ν ≥ about
    0.21 cSt (:data:`MIN_VISCOSITY_CST`, [M]).

    Examples
    --------
    >>> round(d341_z(2.0), 4)
    2.7008
    """
    nu = f64(viscosity_cst)
    return out(nu + 0.7 + np.exp(-1.47 - 1.84 * nu - 0.51 * nu * nu))


def d341_viscosity_from_z(z: ArrayLike) -> FloatOrArray:
    """The kinematic viscosity whose ASTM D341 variable is Z: the inverse of :func:`d341_z`.

    Solves ``ν + 0.7 + exp(−1.47 − 1.84ν − 0.51ν²) = Z`` by Newton's method
    from ``ν₀ = Z − 0.7``; the left side rises monotonically for ν ≥ 0, so the
    iteration converges in a few steps to round-off.

    Parameters
    ----------
    z : float or array_like [cSt]
        ASTM D341 Z, must be > 1 (any point on a D341 line has Z > 1); an
        infinite Z (overflow) gives an infinite viscosity.

    Returns
    -------
    nu : float or ndarray [cSt]
        Kinematic viscosity.

    Notes
    -----
    [ASTM-D341] [P] gives Z of ν; the inversion is exact to round-off ([D]).

    Examples
    --------
    >>> round(d341_viscosity_from_z(d341_z(2.0)), 12)
    2.0
    """
    z_in = f64(z)
    require(~np.isnan(z_in) & (z_in > 1.0), lambda: f"Z must be > 1, got {z!r}")
    huge = np.isinf(z_in)  # overflowed upstream: the viscosity is infinite too
    zz = np.where(huge, 2.0, z_in)
    nu = zz - 0.7
    for _ in range(_NEWTON_MAX_STEPS):
        corr = np.exp(-1.47 - 1.84 * nu - 0.51 * nu * nu)
        f = nu + 0.7 + corr - zz
        df = 1.0 - (1.84 + 1.02 * nu) * corr
        step = f / df
        nu = nu - step
        if np.all(np.abs(step) <= 4.0 * np.finfo(float).eps * np.maximum(np.abs(nu), 1.0)):
            break
    return out(np.where(huge, np.inf, nu))


def d341_fit(
    viscosity1_cst: ArrayLike,
    temperature1_c: ArrayLike,
    viscosity2_cst: ArrayLike,
    temperature2_c: ArrayLike,
) -> tuple[FloatOrArray, FloatOrArray]:
    """ASTM D341 constants ``(A, B)`` of the line through two measured points.

    ``B = (W₁ − W₂) / (log10 T₂ − log10 T₁)``, ``A = W₁ + B·log10 T₁``, with
    ``W = log10 log10 Z(ν)`` and T in kelvin.

    Parameters
    ----------
    viscosity1_cst, viscosity2_cst : float or array_like [cSt]
        Kinematic viscosities (mm²/s), each ≥ 0.21 cSt.
    temperature1_c, temperature2_c : float or array_like [°C]
        Temperatures of the two measurements; must differ.

    Returns
    -------
    (A, B) : tuple of float or ndarray [-]
        Constants of ``log10 log10 Z = A − B·log10 T`` (T in K).
        For petroleum fuels ``B`` is positive (viscosity falls as temperature
        rises).

    Notes
    -----
    [ASTM-D341] [P], for petroleum liquids in their liquid range, away from
    wax appearance and boiling; best between the two points.

    Examples
    --------
    RMG 380 with a typical 35 cSt at 100 °C (a typical pair, [M]):

    >>> a, b = d341_fit(380.0, 50.0, 35.0, 100.0)
    >>> round(b, 2)
    3.53
    """
    nu1, nu2 = f64(viscosity1_cst), f64(viscosity2_cst)
    for nu in (nu1, nu2):
        require(
            np.isfinite(nu) & (nu >= MIN_VISCOSITY_CST),
            lambda nu=nu: f"viscosity must be finite and >= {MIN_VISCOSITY_CST} cSt, got {nu!r}",
        )
    lt1, lt2 = np.log10(_kelvin(temperature1_c)), np.log10(_kelvin(temperature2_c))
    require(lt1 != lt2, "the two viscosity points must be at different temperatures")
    w1 = np.log10(np.log10(f64(d341_z(nu1))))
    w2 = np.log10(np.log10(f64(d341_z(nu2))))
    b = (w1 - w2) / (lt2 - lt1)
    a = w1 + b * lt1
    return out(a), out(b)


def d341_intercept(
    viscosity_cst: ArrayLike, temperature_c: ArrayLike, slope_b: ArrayLike
) -> FloatOrArray:
    """ASTM D341 constant ``A`` of the line of slope ``slope_b`` through one point.

    Use with :func:`default_slope` when only one viscosity is known; the slope
    is then an assumption and results away from ``temperature_c`` carry it.

    ``A = log10 log10 Z(ν) + B·log10 T`` (T in kelvin)

    Parameters
    ----------
    viscosity_cst : float or array_like [cSt]
        Kinematic viscosity, ≥ 0.21 cSt.
    temperature_c : float or array_like [°C]
        Temperature of that viscosity.
    slope_b : float or array_like [-]
        D341 slope ``B``.

    Returns
    -------
    A : float or ndarray [-]
        D341 constant of the line.

    Notes
    -----
    The line is [ASTM-D341] [P]; the slope, when assumed, is not.

    Examples
    --------
    >>> a = d341_intercept(380.0, 50.0, default_slope(True))
    >>> round(d341_viscosity_cst(50.0, a, 3.5), 6)
    380.0
    """
    nu = f64(viscosity_cst)
    require(
        np.isfinite(nu) & (nu >= MIN_VISCOSITY_CST),
        lambda: f"viscosity must be finite and >= {MIN_VISCOSITY_CST} cSt, got {viscosity_cst!r}",
    )
    w = np.log10(np.log10(f64(d341_z(nu))))
    return out(w + f64(slope_b) * np.log10(_kelvin(temperature_c)))


def d341_viscosity_cst(temperature_c: ArrayLike, a: ArrayLike, b: ArrayLike) -> FloatOrArray:
    """Kinematic viscosity at a temperature on an ASTM D341 line.

    ``Z = 10**10**(A − B·log10 T)`` (T in kelvin), then ν from Z exactly
    (:func:`d341_viscosity_from_z`).

    Parameters
    ----------
    temperature_c : float or array_like [°C]
        Temperature, above −273.15 °C.
    a, b : float or array_like [-]
        D341 constants of the line (:func:`d341_fit`, :func:`d341_intercept`).

    Returns
    -------
    nu : float or ndarray [cSt]
        Kinematic viscosity; inf where Z overflows (beyond about 1e308 cSt).

    Notes
    -----
    [ASTM-D341] [P]; see the module docstring for validity (liquid range,
    best between the measured points).

    Examples
    --------
    >>> a, b = d341_fit(380.0, 50.0, 35.0, 100.0)
    >>> round(d341_viscosity_cst(100.0, a, b), 6)
    35.0
    """
    log_t = np.log10(_kelvin(temperature_c))
    with np.errstate(over="ignore"):  # beyond ~1e308 cSt: returned as inf
        z = 10.0 ** (10.0 ** (f64(a) - f64(b) * log_t))
    return d341_viscosity_from_z(z)


def temperature_for_viscosity(viscosity_cst: ArrayLike, a: ArrayLike, b: ArrayLike) -> FloatOrArray:
    """Temperature at which an ASTM D341 line reaches a kinematic viscosity.

    ``T = 10**((A − log10 log10 Z)/B)`` kelvin, ``Z`` from :func:`d341_z`.

    Parameters
    ----------
    viscosity_cst : float or array_like [cSt]
        Target kinematic viscosity, ≥ 0.21 cSt.
    a, b : float or array_like [-]
        D341 constants of the line; ``b`` non-zero.

    Returns
    -------
    t : float or ndarray [°C]
        Temperature.

    Notes
    -----
    [ASTM-D341] [P]; residual fuel is heated to about 13-17 cSt at the
    injectors ([ENGINE-GUIDANCE] [P]), which this finds.

    Examples
    --------
    The temperature giving 15 cSt for RMG 380 with 35 cSt at 100 °C:

    >>> a, b = d341_fit(380.0, 50.0, 35.0, 100.0)
    >>> round(temperature_for_viscosity(15.0, a, b), 1)
    128.6
    """
    nu = f64(viscosity_cst)
    require(
        np.isfinite(nu) & (nu >= MIN_VISCOSITY_CST),
        lambda: f"viscosity must be finite and >= {MIN_VISCOSITY_CST} cSt, got {viscosity_cst!r}",
    )
    bb = f64(b)
    require(bb != 0.0, "D341 slope B must be non-zero")
    w = np.log10(np.log10(f64(d341_z(nu))))
    t_k = 10.0 ** ((f64(a) - w) / bb)
    return out(t_k - KELVIN_OFFSET)
