"""Blending fuels: sulphur and density on a mass basis, viscosity by the Refutas method.

- Sulphur (% m/m) blends linearly by **mass**: ``S = Σ mᵢ·Sᵢ / Σ mᵢ``
  (a mass balance, [LEVENSPIEL-1999] [D]). Volumes must first become masses
  with each fuel's density (:func:`mass_fractions_from_volumes`).
- Density of a blend = total mass / total volume, assuming ideal mixing (no
  volume change on mixing; an assumption: real blends may contract slightly,
  which this ignores).
- Viscosity: Refutas viscosity blending number ([MAPLES-2000] [P]), in
  :mod:`planner.fuels.refutas`, with every ν at one and the same temperature.

Array conventions: the component axis is the **first** axis; further axes
broadcast (e.g. masses of shape (n_components, n_times)).
"""

from __future__ import annotations

from collections.abc import Sequence

import numpy as np
from numpy.typing import ArrayLike

from planner.fuels._arrays import FloatOrArray, component_amounts, out, per_component, require
from planner.fuels.fuel import Fuel
from planner.fuels.refutas import blend_viscosity_cst


def mass_fractions(masses: ArrayLike) -> FloatOrArray:
    """Mass fractions of the components of a blend.

    ``wᵢ = mᵢ / Σ mⱼ``

    Parameters
    ----------
    masses : array_like [t, or any one mass unit]
        Mass of each component along the first axis, ≥ 0, not all zero;
        further axes broadcast.

    Returns
    -------
    w : float or ndarray [-]
        Mass fraction of each component; they sum to 1 along the first axis.

    Notes
    -----
    A mass balance ([LEVENSPIEL-1999] [D]); valid for any components.

    Examples
    --------
    >>> mass_fractions([3.0, 1.0])
    array([0.75, 0.25])
    """
    m = component_amounts(masses, "masses")
    return out(m / np.sum(m, axis=0))


def mass_fractions_from_volumes(volumes_m3: ArrayLike, densities_kg_m3: ArrayLike) -> FloatOrArray:
    """Mass fractions of the components of a blend given as volumes.

    ``wᵢ = Vᵢ·ρᵢ / Σ Vⱼ·ρⱼ``

    Parameters
    ----------
    volumes_m3 : array_like [m³]
        Volume of each component, ≥ 0, not all zero.
    densities_kg_m3 : array_like [kg/m³]
        Density of each component, > 0, at the temperature of the volumes.

    Returns
    -------
    w : float or ndarray [-]
        Mass fraction of each component.

    Notes
    -----
    A mass balance ([LEVENSPIEL-1999] [D]). Volumes and densities must refer
    to the same temperature (normally volumes at 15 °C with densities at
    15 °C; see :func:`planner.fuels.volume.standard_volume_m3`). Equal volumes
    of a 991 and an 845 kg/m³ fuel weigh 991:845, not 1:1.

    Examples
    --------
    >>> mass_fractions_from_volumes([1.0, 1.0], [991.0, 845.0]).round(4)
    array([0.5398, 0.4602])
    """
    v = component_amounts(volumes_m3, "volumes_m3")
    rho = per_component(densities_kg_m3, v, "densities_kg_m3")
    require(
        np.isfinite(rho) & (rho > 0.0),
        lambda: f"densities_kg_m3 must be positive, got {densities_kg_m3!r}",
    )
    return mass_fractions(v * rho)


def blend_sulphur_pct(masses: ArrayLike, sulphur_pct: ArrayLike) -> FloatOrArray:
    """Sulphur content of a blend, by mass.

    ``S = Σ mᵢ·Sᵢ / Σ mᵢ``

    Parameters
    ----------
    masses : array_like [t, or any one mass unit]
        Mass of each component along the first axis, ≥ 0, not all zero.
    sulphur_pct : array_like [% m/m]
        Sulphur content of each component, ≥ 0.

    Returns
    -------
    S : float or ndarray [% m/m]
        Sulphur content of the blend.

    Notes
    -----
    Sulphur mixes linearly by mass, a mass balance ([LEVENSPIEL-1999] [D]);
    never average sulphur by volume.

    Examples
    --------
    >>> round(blend_sulphur_pct([3.0, 1.0], [0.5, 0.1]), 6)
    0.4
    """
    m = component_amounts(masses, "masses")
    s = per_component(sulphur_pct, m, "sulphur_pct")
    require(np.isfinite(s) & (s >= 0.0), lambda: f"sulphur_pct must be >= 0, got {sulphur_pct!r}")
    return out(np.sum(m * s, axis=0) / np.sum(m, axis=0))


def blend_density_kg_m3(volumes_m3: ArrayLike, densities_kg_m3: ArrayLike) -> FloatOrArray:
    """Density of a blend of volumes: total mass over total volume.

    ``ρ = Σ Vᵢ·ρᵢ / Σ Vᵢ``

    Parameters
    ----------
    volumes_m3 : array_like [m³]
        Volume of each component, ≥ 0, not all zero.
    densities_kg_m3 : array_like [kg/m³]
        Density of each component, > 0, at the temperature of the volumes
        (normally 15 °C).

    Returns
    -------
    rho : float or ndarray [kg/m³]
        Density of the blend at that temperature.

    Notes
    -----
    Mass balance ([D]) with ideal mixing: no volume change on mixing, an
    assumption (real blends may contract slightly).

    Examples
    --------
    >>> round(blend_density_kg_m3([1.0, 1.0], [991.0, 845.0]), 6)
    918.0
    """
    v = component_amounts(volumes_m3, "volumes_m3")
    rho = per_component(densities_kg_m3, v, "densities_kg_m3")
    require(
        np.isfinite(rho) & (rho > 0.0),
        lambda: f"densities_kg_m3 must be positive, got {densities_kg_m3!r}",
    )
    return out(np.sum(v * rho, axis=0) / np.sum(v, axis=0))


def blend_density_from_masses_kg_m3(masses: ArrayLike, densities_kg_m3: ArrayLike) -> FloatOrArray:
    """Density of a blend of masses: total mass over total volume.

    ``ρ = Σ mᵢ / Σ (mᵢ/ρᵢ)``

    Parameters
    ----------
    masses : array_like [t, or any one mass unit]
        Mass of each component, ≥ 0, not all zero.
    densities_kg_m3 : array_like [kg/m³]
        Density of each component, > 0 (normally at 15 °C).

    Returns
    -------
    rho : float or ndarray [kg/m³]
        Density of the blend at the temperature of the densities.

    Notes
    -----
    Mass balance ([D]) with ideal mixing (no volume change on mixing, an
    assumption).

    Examples
    --------
    >>> round(blend_density_from_masses_kg_m3([991.0, 845.0], [991.0, 845.0]), 6)
    918.0
    """
    m = component_amounts(masses, "masses")
    rho = per_component(densities_kg_m3, m, "densities_kg_m3")
    require(
        np.isfinite(rho) & (rho > 0.0),
        lambda: f"densities_kg_m3 must be positive, got {densities_kg_m3!r}",
    )
    return out(np.sum(m, axis=0) / np.sum(m / rho, axis=0))


def blend(
    fuels: Sequence[Fuel],
    masses: Sequence[float] | ArrayLike,
    *,
    name: str = "blend",
    temperatures_c: tuple[float, float] | None = None,
) -> Fuel:
    """The fuel formed by mixing masses of fuels, as a :class:`Fuel`.

    - sulphur, water, ash and net specific energy: mass-weighted (water and
      ash only when every component gives them, else None);
    - density at 15 °C: total mass / total volume (ideal mixing);
    - viscosity: Refutas at two common temperatures, so the result carries a
      two-point ASTM D341 line and can be evaluated at any temperature. The
      defaults are 50 and 100 °C when any component is residual, else 40 and
      100 °C. A component with one viscosity point is evaluated there on its
      assumed-slope line, so the blend inherits that assumption.
    - grade: the common grade, else ``"blend (G1 + G2 ...)"``; ``bdn_ref``:
      the components' non-empty references joined with ``" + "``.

    Parameters
    ----------
    fuels : sequence of Fuel
        The components.
    masses : sequence of float [t, or any one mass unit]
        Mass of each component, ≥ 0, not all 0.
    name : str, default "blend"
        Name of the resulting fuel.
    temperatures_c : (float, float) or None [°C]
        The two common temperatures for viscosity blending; None for the
        defaults above.

    Returns
    -------
    Fuel
        The blend, with a two-point viscosity line.

    Notes
    -----
    Sulphur by mass balance ([LEVENSPIEL-1999] [D]); viscosity by Refutas
    ([MAPLES-2000] [P]) and the [ASTM-D341] line through the two blended
    points.

    Examples
    --------
    >>> hfo = Fuel(name="HFO", grade="RMG 380", sulphur_pct=0.50,
    ...            density_kg_m3=991.0, viscosity_cst=380.0, viscosity_ref_c=50.0)
    >>> mgo = Fuel(name="MGO", grade="DMA", sulphur_pct=0.10,
    ...            density_kg_m3=845.0, viscosity_cst=3.0, viscosity_ref_c=40.0)
    >>> mix = blend([hfo, mgo], [3.0, 1.0])
    >>> mix.grade, round(mix.sulphur_pct, 2)
    ('blend (RMG 380 + DMA)', 0.4)
    """
    fuels = list(fuels)
    require(len(fuels) >= 1, "blend needs at least one fuel")
    m = component_amounts(masses, "masses")
    require(m.ndim == 1 and m.shape[0] == len(fuels), "blend: one mass per fuel")
    w = m / np.sum(m)
    if temperatures_c is None:
        temperatures_c = (50.0, 100.0) if any(f.is_residual for f in fuels) else (40.0, 100.0)
    t1, t2 = (float(t) for t in temperatures_c)
    nu1 = float(blend_viscosity_cst(m, [float(f.viscosity_at(t1)) for f in fuels]))
    nu2 = float(blend_viscosity_cst(m, [float(f.viscosity_at(t2)) for f in fuels]))

    def mass_weighted(values: list[float]) -> float:
        return float(np.sum(w * np.asarray(values, dtype=np.float64)))

    water = ash = None
    if all(f.water_pct is not None for f in fuels):
        water = mass_weighted([f.water_pct for f in fuels])  # type: ignore[misc]
    if all(f.ash_pct is not None for f in fuels):
        ash = mass_weighted([f.ash_pct for f in fuels])  # type: ignore[misc]

    grades = list(dict.fromkeys(f.grade for f in fuels))
    grade = grades[0] if len(grades) == 1 else "blend (" + " + ".join(grades) + ")"
    refs = list(dict.fromkeys(f.bdn_ref for f in fuels if f.bdn_ref))
    return Fuel(
        name=name,
        grade=grade,
        bdn_ref=" + ".join(refs),
        sulphur_pct=float(blend_sulphur_pct(m, [f.sulphur_pct for f in fuels])),
        density_kg_m3=float(blend_density_from_masses_kg_m3(m, [f.density_kg_m3 for f in fuels])),
        viscosity_cst=nu1,
        viscosity_ref_c=t1,
        viscosity2_cst=nu2,
        viscosity2_ref_c=t2,
        water_pct=water,
        ash_pct=ash,
        q_net_mj_kg=mass_weighted([f.q_net for f in fuels]),
    )


def blend_by_volume(
    fuels: Sequence[Fuel],
    volumes15_m3: Sequence[float] | ArrayLike,
    *,
    name: str = "blend",
    temperatures_c: tuple[float, float] | None = None,
) -> Fuel:
    """The fuel formed by mixing volumes at 15 °C of fuels: :func:`blend` by volume.

    The masses are ``mᵢ = Vᵢ·ρ15ᵢ`` (each fuel's density at 15 °C).

    Parameters
    ----------
    fuels : sequence of Fuel
        The components.
    volumes15_m3 : sequence of float [m³]
        Volume at 15 °C of each component, ≥ 0, not all 0.
    name : str, default "blend"
        Name of the resulting fuel.
    temperatures_c : (float, float) or None [°C]
        The two common temperatures for viscosity blending (see :func:`blend`).

    Returns
    -------
    Fuel
        The blend.

    Notes
    -----
    As :func:`blend`; volumes become masses first (mass balance, [D]).

    Examples
    --------
    >>> hfo = Fuel(name="HFO", grade="RMG 380", sulphur_pct=0.50,
    ...            density_kg_m3=991.0, viscosity_cst=380.0, viscosity_ref_c=50.0)
    >>> mgo = Fuel(name="MGO", grade="DMA", sulphur_pct=0.10,
    ...            density_kg_m3=845.0, viscosity_cst=3.0, viscosity_ref_c=40.0)
    >>> mix = blend_by_volume([hfo, mgo], [50.0, 50.0])
    >>> round(mix.sulphur_pct, 4), round(mix.density_kg_m3, 6)
    (0.3159, 918.0)
    """
    fuels = list(fuels)
    v = component_amounts(volumes15_m3, "volumes15_m3")
    require(v.ndim == 1 and v.shape[0] == len(fuels), "blend_by_volume: one volume per fuel")
    masses = v * np.array([f.density_kg_m3 for f in fuels])
    return blend(fuels, masses, name=name, temperatures_c=temperatures_c)
