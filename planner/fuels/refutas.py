"""Viscosity of blends: the Refutas viscosity blending number.

The Refutas method ([MAPLES-2000] [P])::

    VBN = 14.534·ln(ln(ν + 0.8)) + 10.975          (natural logs, ν in cSt)
    VBN_blend = Σ wᵢ·VBNᵢ                          (mass fractions wᵢ)
    ν = exp(exp((VBN − 10.975)/14.534)) − 0.8

with every ν at one and the same temperature. Defined for ν above 0.2 cSt
(where ln(ν + 0.8) > 0, [D]); like any blending index it ignores
incompatibility: check compatibility before mixing fuels.

Array conventions as :mod:`planner.fuels.blending`: the component axis is the
**first** axis; further axes broadcast.
"""

from __future__ import annotations

import numpy as np
from numpy.typing import ArrayLike

from planner.fuels._arrays import FloatOrArray, component_amounts, f64, out, per_component, require

_VBN_SCALE = 14.534
_VBN_OFFSET = 10.975


def viscosity_blending_number(viscosity_cst: ArrayLike) -> FloatOrArray:
    """Refutas viscosity blending number of a kinematic viscosity.

    ``VBN = 14.534·ln(ln(ν + 0.8)) + 10.975`` (natural logarithms)

    Parameters
    ----------
    viscosity_cst : array_like [cSt]
        Kinematic viscosity (mm²/s), > 0.2 cSt.

    Returns
    -------
    VBN : float or ndarray [-]
        Viscosity blending number.

    Notes
    -----
    The Refutas method ([MAPLES-2000] [P]) for blending petroleum oils: blend
    numbers of viscosities at one temperature mix linearly by mass fraction.
    Defined for ν > 0.2 cSt, where ln(ν + 0.8) > 0 ([D]).

    Examples
    --------
    Check value ([MAPLES-2000] formula; check value [D]): 2.234 cSt gives
    VBN 12.49.

    >>> round(viscosity_blending_number(2.234), 2)
    12.49
    """
    nu = f64(viscosity_cst)
    require(
        np.isfinite(nu) & (nu > 0.2),
        lambda: f"viscosity_cst must be > 0.2 cSt, got {viscosity_cst!r}",
    )
    return out(_VBN_SCALE * np.log(np.log(nu + 0.8)) + _VBN_OFFSET)


def viscosity_from_blending_number(vbn: ArrayLike) -> FloatOrArray:
    """Kinematic viscosity of a Refutas viscosity blending number.

    ``ν = exp(exp((VBN − 10.975)/14.534)) − 0.8``, the inverse of
    :func:`viscosity_blending_number`.

    Parameters
    ----------
    vbn : array_like [-]
        Viscosity blending number, finite.

    Returns
    -------
    nu : float or ndarray [cSt]
        Kinematic viscosity (mm²/s), at the temperature the blend numbers
        refer to.

    Notes
    -----
    Refutas method, [MAPLES-2000] [P].

    Examples
    --------
    The inverse of the check value ([MAPLES-2000] formula; check value [D]):

    >>> round(viscosity_from_blending_number(12.49), 3)
    2.234
    """
    x = f64(vbn)
    require(np.isfinite(x), lambda: f"vbn must be finite, got {vbn!r}")
    return out(np.exp(np.exp((x - _VBN_OFFSET) / _VBN_SCALE)) - 0.8)


def blend_viscosity_cst(masses: ArrayLike, viscosity_cst: ArrayLike) -> FloatOrArray:
    """Kinematic viscosity of a blend by the Refutas method, with mass fractions.

    ``ν = VBN⁻¹(Σ wᵢ·VBN(νᵢ))``, ``wᵢ = mᵢ / Σ mⱼ``

    Parameters
    ----------
    masses : array_like [t, or any one mass unit]
        Mass of each component along the first axis (only fractions matter).
    viscosity_cst : array_like [cSt]
        Each component's kinematic viscosity, > 0.2 cSt, **all at one
        temperature**.

    Returns
    -------
    nu : float or ndarray [cSt]
        The blend's kinematic viscosity at that temperature.

    Notes
    -----
    [MAPLES-2000] Refutas blending [P], for petroleum oils at one
    temperature; it ignores incompatibility of the components.

    Examples
    --------
    Equal masses of 380 cSt and 3 cSt fuel (both at 50 °C):

    >>> round(blend_viscosity_cst([1.0, 1.0], [380.0, 3.0]), 1)
    15.9
    """
    m = component_amounts(masses, "masses")
    nu = per_component(viscosity_cst, m, "viscosity_cst")
    w = m / np.sum(m, axis=0)
    vbn = np.sum(w * f64(viscosity_blending_number(nu)), axis=0)
    return viscosity_from_blending_number(vbn)
