"""From a viscosity reading at its temperature to the new fuel's share of the inlet blend.

The inlet holds a blend of two contents: A, what the circuit held before the
switch (the from-tank's content), and B, the to-tank's content. Each content
may itself be a mix of fuels. At the reading's temperature T every fuel's
viscosity comes from its ASTM D341 line ([ASTM-D341] [P],
:meth:`planner.fuels.Fuel.viscosity_at`: the delivery-note viscosity and the
line's slope), and the Refutas blending numbers mix linearly by mass
([MAPLES-2000] [P], :func:`planner.fuels.refutas.viscosity_blending_number`)::

    VBN(ν_measured) = (1 − w)·VBN_A(T) + w·VBN_B(T),  VBN_X(T) = Σᵢ mₓᵢ·VBN(νᵢ(T))

so the mass share of B is ``w = (VBN(ν) − VBN_A) / (VBN_B − VBN_A)`` exactly:
the inverse of the rule by which the planner computes the inlet viscosity of
a blend (:mod:`planner.ship.thermal`). Working at the reading's own
temperature needs no D341 line of the blend itself, which nobody measured.
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence

import numpy as np

from planner.fuels import Fuel
from planner.fuels.blending import mass_fractions_from_volumes
from planner.fuels.refutas import viscosity_blending_number

MIN_VBN_STEP = 0.5  # below this the two contents' viscosities cannot tell the blend apart [-]


class BlendError(ValueError):
    """The two contents cannot be told apart by viscosity (message says why)."""


def content_mass_fractions(content_m3: Mapping[str, float], fuels: Sequence[Fuel]) -> np.ndarray:
    """Mass fractions of a tank content, in ``fuels`` order.

    Parameters
    ----------
    content_m3 : mapping of str to float [m³ at 15 °C]
        Volume of each fuel by name.
    fuels : sequence of Fuel
        The order of the result (densities at 15 °C).

    Returns
    -------
    ndarray [-]
        Mass fractions (mixing by mass, [LEVENSPIEL-1999] [D]).
    """
    v = np.array([content_m3.get(f.name, 0.0) for f in fuels])
    rho = np.array([f.density_kg_m3 for f in fuels])
    return np.asarray(mass_fractions_from_volumes(v, rho), dtype=float)


def content_vbn(mass_fr: np.ndarray, fuels: Sequence[Fuel],
                temperature_c: np.ndarray) -> np.ndarray:
    """Refutas blending number of a content at each temperature.

    Parameters
    ----------
    mass_fr : ndarray [-]
        The content's mass fractions, in ``fuels`` order.
    fuels : sequence of Fuel
    temperature_c : ndarray [°C]
        Temperatures.

    Returns
    -------
    ndarray [-]
        ``Σ wᵢ·VBN(νᵢ(T))``: [MAPLES-2000] [P], each fuel's viscosity at T by
        [ASTM-D341] [P].
    """
    t = np.asarray(temperature_c, dtype=float)
    out = np.zeros(t.shape)
    for w, f in zip(mass_fr, fuels, strict=True):
        if w > 0.0:
            out = out + w * np.asarray(viscosity_blending_number(f.viscosity_at(t)))
    return out


def share_of_b(viscosity_cst: np.ndarray, temperature_c: np.ndarray, mass_a: np.ndarray,
               mass_b: np.ndarray, fuels: Sequence[Fuel]) -> np.ndarray:
    """The mass share of content B in the blend read by a viscometer.

    Parameters
    ----------
    viscosity_cst : ndarray [cSt]
        The readings, above 0.2 cSt.
    temperature_c : ndarray [°C]
        The temperature of each reading.
    mass_a, mass_b : ndarray [-]
        Mass fractions of the two contents, in ``fuels`` order.
    fuels : sequence of Fuel

    Returns
    -------
    ndarray [-]
        ``w``, 0 for content A and 1 for content B; a reading outside the
        two contents' viscosities gives a value outside 0 to 1 (noise, or a
        spike), kept as it is for the fit to weigh.

    Raises
    ------
    BlendError
        When the two contents' blending numbers differ by less than 0.5 at a
        reading's temperature (about 10 % in viscosity near 10 cSt): the
        viscosity then says nothing of the blend.

    Examples
    --------
    Equal masses of a 380 cSt and a 3 cSt fuel at one temperature blend to
    15.9 cSt by Refutas ([MAPLES-2000], as in
    :func:`planner.fuels.refutas.blend_viscosity_cst`); back, the share is one half:

    >>> from planner.fuels import Fuel
    >>> a = Fuel(name="a", grade="RMG 380", sulphur_pct=0.5, density_kg_m3=980.0,
    ...          viscosity_cst=380.0, viscosity_ref_c=50.0)
    >>> b = Fuel(name="b", grade="DMA", sulphur_pct=0.1, density_kg_m3=850.0,
    ...          viscosity_cst=3.0, viscosity_ref_c=50.0)
    >>> from planner.fuels.refutas import blend_viscosity_cst
    >>> nu = blend_viscosity_cst([1.0, 1.0], [380.0, 3.0])
    >>> round(float(share_of_b(np.array([nu]), np.array([50.0]), np.array([1.0, 0.0]),
    ...                        np.array([0.0, 1.0]), [a, b])[0]), 9)
    0.5
    """
    t = np.asarray(temperature_c, dtype=float)
    vbn_a = content_vbn(mass_a, fuels, t)
    vbn_b = content_vbn(mass_b, fuels, t)
    step = vbn_b - vbn_a
    if np.any(np.abs(step) < MIN_VBN_STEP):
        k = int(np.argmin(np.abs(step)))
        raise BlendError(f"at {t[k]:.1f} °C the two fuels' viscosities are too close "
                         f"(blending numbers {vbn_a[k]:.2f} and {vbn_b[k]:.2f}) to tell the "
                         "blend from the viscosity")
    vbn = np.asarray(viscosity_blending_number(np.asarray(viscosity_cst, dtype=float)))
    return (vbn - vbn_a) / step
