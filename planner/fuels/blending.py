"""Blending fuels: sulphur and density on a mass basis, viscosity by the Refutas method.

- Sulphur (% m/m) blends linearly by **mass**: ``S = Σ mᵢ·Sᵢ / Σ mᵢ``
  (REFERENCE.md section 3, [D]). Volumes must first become masses with each
  fuel's density (:func:`mass_fractions_from_volumes`).
- Density of a blend = total mass / total volume, assuming ideal mixing (no
  volume change on mixing; an assumption: real blends may contract slightly,
  which this ignores).
- Viscosity: Refutas viscosity blending number (REFERENCE.md section 4, [P];
  Maples, *Petroleum Refinery Process Economics*)::

      VBN = 14.534·ln(ln(ν + 0.8)) + 10.975          (natural logs, ν in cSt)
      VBN_blend = Σ wᵢ·VBNᵢ                          (mass fractions wᵢ)
      ν = exp(exp((VBN − 10.975)/14.534)) − 0.8

  with every ν at one and the same temperature. Valid for ν above about
  0.2 cSt (where ln(ν + 0.8) > 0); like any blending index it ignores
  incompatibility: check compatibility before mixing fuels.

Array conventions: the component axis is the **first** axis; further axes
broadcast (e.g. masses of shape (n_components, n_times)).
"""

from __future__ import annotations

from collections.abc import Sequence

import numpy as np
from numpy.typing import ArrayLike, NDArray

from planner.fuels._arrays import FloatOrArray, f64, out, require
from planner.fuels.fuel import Fuel

_VBN_SCALE = 14.534
_VBN_OFFSET = 10.975


def _weights(amounts: ArrayLike, label: str) -> NDArray[np.float64]:
    w = f64(amounts)
    require(w.ndim >= 1 and w.shape[0] >= 1, lambda: f"{label} needs at least one component")
    require(
        np.isfinite(w) & (w >= 0.0), lambda: f"{label} must be finite and >= 0, got {amounts!r}"
    )
    require(np.sum(w, axis=0) > 0.0, lambda: f"{label} must not all be zero")
    return w


def _pair(values: ArrayLike, weights: NDArray[np.float64], label: str) -> NDArray[np.float64]:
    v = f64(values)
    require(
        v.ndim >= 1 and v.shape[0] == weights.shape[0], lambda: f"{label}: one value per component"
    )
    return v


def mass_fractions(masses: ArrayLike) -> FloatOrArray:
    """Mass fractions ``mᵢ / Σ m`` (dimensionless) of components of masses ``masses`` (any unit)."""
    m = _weights(masses, "masses")
    return out(m / np.sum(m, axis=0))


def mass_fractions_from_volumes(volumes_m3: ArrayLike, densities_kg_m3: ArrayLike) -> FloatOrArray:
    """Mass fractions (dimensionless) of components given as volumes.

    ``wᵢ = Vᵢ·ρᵢ / Σ Vⱼ·ρⱼ``. Volumes and densities must refer to the same
    temperature (normally volumes at 15 °C with densities at 15 °C; see
    :func:`planner.fuels.volume.standard_volume_m3`).

    Parameters
    ----------
    volumes_m3 : array
        Volume of each component, m³ (≥ 0, not all zero).
    densities_kg_m3 : array
        Density of each component, kg/m³ (> 0).
    """
    v = _weights(volumes_m3, "volumes_m3")
    rho = _pair(densities_kg_m3, v, "densities_kg_m3")
    require(
        np.isfinite(rho) & (rho > 0.0),
        lambda: f"densities_kg_m3 must be positive, got {densities_kg_m3!r}",
    )
    return mass_fractions(v * rho)


def blend_sulphur_pct(masses: ArrayLike, sulphur_pct: ArrayLike) -> FloatOrArray:
    """Sulphur of a blend, % m/m: ``Σ mᵢ·Sᵢ / Σ mᵢ`` (masses in any one unit)."""
    m = _weights(masses, "masses")
    s = _pair(sulphur_pct, m, "sulphur_pct")
    require(np.isfinite(s) & (s >= 0.0), lambda: f"sulphur_pct must be >= 0, got {sulphur_pct!r}")
    return out(np.sum(m * s, axis=0) / np.sum(m, axis=0))


def blend_density_kg_m3(volumes_m3: ArrayLike, densities_kg_m3: ArrayLike) -> FloatOrArray:
    """Density of a blend of volumes, kg/m³: total mass / total volume (ideal mixing).

    ``ρ = Σ Vᵢ·ρᵢ / Σ Vᵢ``, volumes and densities at one temperature (15 °C).
    """
    v = _weights(volumes_m3, "volumes_m3")
    rho = _pair(densities_kg_m3, v, "densities_kg_m3")
    require(
        np.isfinite(rho) & (rho > 0.0),
        lambda: f"densities_kg_m3 must be positive, got {densities_kg_m3!r}",
    )
    return out(np.sum(v * rho, axis=0) / np.sum(v, axis=0))


def blend_density_from_masses_kg_m3(masses: ArrayLike, densities_kg_m3: ArrayLike) -> FloatOrArray:
    """Density of a blend of masses, kg/m³: ``Σ mᵢ / Σ (mᵢ/ρᵢ)`` (ideal mixing)."""
    m = _weights(masses, "masses")
    rho = _pair(densities_kg_m3, m, "densities_kg_m3")
    require(
        np.isfinite(rho) & (rho > 0.0),
        lambda: f"densities_kg_m3 must be positive, got {densities_kg_m3!r}",
    )
    return out(np.sum(m, axis=0) / np.sum(m / rho, axis=0))


def viscosity_blending_number(viscosity_cst: ArrayLike) -> FloatOrArray:
    """Refutas viscosity blending number (dimensionless) of ``viscosity_cst`` cSt.

    ``VBN = 14.534·ln(ln(ν + 0.8)) + 10.975``; ν > 0.2 cSt.
    """
    nu = f64(viscosity_cst)
    require(
        np.isfinite(nu) & (nu > 0.2),
        lambda: f"viscosity_cst must be > 0.2 cSt, got {viscosity_cst!r}",
    )
    return out(_VBN_SCALE * np.log(np.log(nu + 0.8)) + _VBN_OFFSET)


def viscosity_from_blending_number(vbn: ArrayLike) -> FloatOrArray:
    """Kinematic viscosity, cSt, of Refutas blending number ``vbn``.

    ``ν = exp(exp((VBN − 10.975)/14.534)) − 0.8``.
    """
    x = f64(vbn)
    require(np.isfinite(x), lambda: f"vbn must be finite, got {vbn!r}")
    return out(np.exp(np.exp((x - _VBN_OFFSET) / _VBN_SCALE)) - 0.8)


def blend_viscosity_cst(masses: ArrayLike, viscosity_cst: ArrayLike) -> FloatOrArray:
    """Viscosity of a blend, cSt, by Refutas with mass fractions.

    Parameters
    ----------
    masses : array
        Mass of each component (any one unit; only fractions matter).
    viscosity_cst : array
        Each component's kinematic viscosity, cSt, **all at one temperature**;
        the result is the blend's viscosity at that temperature.
    """
    m = _weights(masses, "masses")
    nu = _pair(viscosity_cst, m, "viscosity_cst")
    w = m / np.sum(m, axis=0)
    vbn = np.sum(w * f64(viscosity_blending_number(nu)), axis=0)
    return viscosity_from_blending_number(vbn)


def blend(
    fuels: Sequence[Fuel],
    masses: Sequence[float] | ArrayLike,
    *,
    name: str = "blend",
    temperatures_c: tuple[float, float] | None = None,
) -> Fuel:
    """The fuel formed by mixing ``masses`` of ``fuels``, as a :class:`Fuel`.

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
    masses : sequence of float
        Mass of each component (any one unit, e.g. tonnes), ≥ 0, not all 0.
    name : str, default "blend"
        Name of the resulting fuel.
    temperatures_c : (float, float), optional
        The two common temperatures for viscosity blending, °C.
    """
    fuels = list(fuels)
    require(len(fuels) >= 1, "blend needs at least one fuel")
    m = _weights(masses, "masses")
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
    """:func:`blend` of volumes at 15 °C, m³ (masses ``Vᵢ·ρ15ᵢ``)."""
    fuels = list(fuels)
    v = _weights(volumes15_m3, "volumes15_m3")
    require(v.ndim == 1 and v.shape[0] == len(fuels), "blend_by_volume: one volume per fuel")
    masses = v * np.array([f.density_kg_m3 for f in fuels])
    return blend(fuels, masses, name=name, temperatures_c=temperatures_c)
