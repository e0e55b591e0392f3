"""A fuel as bunkered: the delivery-note data the planner works from.

:class:`Fuel` holds what the bunker delivery note (BDN) and the fuel analysis
give: sulphur, density at 15 °C, one or two kinematic viscosities, and
optionally water, ash and net specific energy. Values are checked on
construction; a bad value raises ``ValueError`` naming the fuel, the field and
the value.

Residual or distillate (:attr:`Fuel.is_residual`), the rule used:

1. grade starting ``RM`` (ISO 8217 residual marine, [ISO-8217]) → residual;
2. grade starting ``DM`` (ISO 8217 distillate marine, [ISO-8217]), or named
   ``MGO`` / ``MDO`` (trade names, common practice) → distillate;
3. anything else (``VLSFO``, ``ULSFO``, ``HSFO``, free text) by its
   properties: residual if density at 15 °C is above 900 kg/m³ or the
   viscosity at 40 °C is above 11 cSt, the largest limits of the ISO 8217
   distillate grades (DMB; [ISO-8217] [M], limits from memory); otherwise
   distillate. The viscosity at 40 °C comes from the fuel's own D341 line,
   or with one point from the distillate default slope (the question asked
   is "could this be a distillate?").

Grade matching ignores case and surrounding spaces.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from numbers import Real

from numpy.typing import ArrayLike

from planner.fuels._arrays import FloatOrArray
from planner.fuels.combustion import carbon_class
from planner.fuels.energy import net_specific_energy_mj_kg
from planner.fuels.flash_point import grade_min_flash_point_c
from planner.fuels.viscosity import (
    DEFAULT_SLOPE_DISTILLATE,
    MIN_VISCOSITY_CST,
    d341_fit,
    d341_intercept,
    d341_viscosity_cst,
    default_slope,
    temperature_for_viscosity,
)

DISTILLATE_MAX_DENSITY_KG_M3 = 900.0
"""Largest density at 15 °C of an ISO 8217 distillate grade (DMB), kg/m³ ([ISO-8217] [M])."""

DISTILLATE_MAX_VISCOSITY_40_CST = 11.0
"""Largest viscosity at 40 °C of an ISO 8217 distillate grade (DMB), cSt ([ISO-8217] [M])."""

MAX_SULPHUR_PCT = 4.50
"""Highest sulphur content accepted, % m/m: the highest global limit there has been
(4.50 % before 2012, MARPOL Annex VI regulation 14.1, [MARPOL-VI] [P]); a
higher figure is a typing error."""

MIN_VISCOSITY_POINT_SEPARATION_C = 5.0
"""Two viscosity points closer than this (°C) give an ill-conditioned D341 line; refused."""

_REF_TEMPERATURE_RANGE_C = (-40.0, 200.0)
_FLASH_POINT_RANGE_C = (0.0, 300.0)
_Q_NET_RANGE_MJ_KG = (30.0, 50.0)
_WATER_ASH_MAX_PCT = 10.0
_CARBON_RANGE_PCT = (70.0, 92.0)
_DISTILLATE_NAMES = ("MGO", "MDO")


def _number(fuel: str, field: str, value: object) -> float:
    if isinstance(value, bool) or not isinstance(value, Real):
        raise ValueError(f"fuel {fuel!r}: {field} must be a number, got {value!r}")
    x = float(value)
    if not math.isfinite(x):
        raise ValueError(f"fuel {fuel!r}: {field} must be finite, got {value!r}")
    return x


def _in_range(fuel: str, field: str, x: float, low: float, high: float, unit: str) -> None:
    if not low <= x <= high:
        raise ValueError(
            f"fuel {fuel!r}: {field} must be between {low:g} and {high:g} {unit}, got {x!r}"
        )


@dataclass(frozen=True, kw_only=True)
class Fuel:
    """A fuel as bunkered (construct with keywords).

    Attributes
    ----------
    name : str
        The ship's name for this fuel (non-empty), e.g. ``"HFO port bunker"``.
    grade : str
        ISO 8217 grade or trade name (non-empty free text): ``"RMG 380"``,
        ``"DMA"``, ``"VLSFO"``...
    bdn_ref : str
        Bunker delivery note reference; may be empty.
    sulphur_pct : float
        Sulphur, % m/m, 0-4.50 (:data:`MAX_SULPHUR_PCT`).
    density_kg_m3 : float
        Density at 15 °C, kg/m³, 700-1100.
    viscosity_cst : float
        Kinematic viscosity, cSt (mm²/s), ≥ 0.21, at ``viscosity_ref_c``.
    viscosity_ref_c : float
        Temperature of ``viscosity_cst``, °C, −40 to 200 (50 for residual, 40
        for distillate grades by ISO 8217 convention, [ISO-8217] [M]).
    viscosity2_cst, viscosity2_ref_c : float or None
        Optional second viscosity point (both or neither), at least 5 °C from
        the first, with lower viscosity at the higher temperature. Without it
        the [ASTM-D341] slope is assumed (:mod:`planner.fuels.viscosity`).
    water_pct, ash_pct : float or None
        Water and ash, % m/m, 0-10; used by the ISO 8217 specific-energy
        estimate (taken as 0 when not given).
    q_net_mj_kg : float or None
        Net specific energy, MJ/kg, 30-50, when measured or stated; otherwise
        estimated by the ISO 8217 annex formula ([ISO-8217], :attr:`q_net`).
    flash_point_c : float or None
        Flash point, °C, 0-300, from the delivery note; otherwise the ISO 8217
        minimum for the grade (:attr:`flash_point`, [ISO-8217] [M]).
    carbon_pct : float or None
        Carbon, % m/m, 70-92 (marine distillates and residuals lie at about 84-88 %,
        bio-blends lower: common practice), from the fuel analysis; otherwise the
        typical value of its class (:attr:`carbon`, [MEPC-308] [M]). Carbon, sulphur,
        water and ash together may not exceed 100 %.

    Examples
    --------
    >>> hfo = Fuel(name="HFO", grade="RMG 380", sulphur_pct=0.48,
    ...            density_kg_m3=991.0, viscosity_cst=380.0, viscosity_ref_c=50.0)
    >>> hfo.is_residual, hfo.viscosity_slope_assumed
    (True, True)
    >>> round(float(hfo.viscosity_at(50.0)), 6)
    380.0
    """

    name: str
    grade: str
    bdn_ref: str = ""
    sulphur_pct: float
    density_kg_m3: float
    viscosity_cst: float
    viscosity_ref_c: float
    viscosity2_cst: float | None = None
    viscosity2_ref_c: float | None = None
    water_pct: float | None = None
    ash_pct: float | None = None
    q_net_mj_kg: float | None = None
    flash_point_c: float | None = None
    carbon_pct: float | None = None

    def __post_init__(self) -> None:
        if not isinstance(self.name, str) or not self.name.strip():
            raise ValueError(f"fuel name must be a non-empty string, got {self.name!r}")
        n = self.name
        if not isinstance(self.grade, str) or not self.grade.strip():
            raise ValueError(f"fuel {n!r}: grade must be a non-empty string, got {self.grade!r}")
        if not isinstance(self.bdn_ref, str):
            raise ValueError(
                f"fuel {n!r}: bdn_ref must be a string (may be empty), got {self.bdn_ref!r}"
            )

        def put(field: str, value: float | None) -> None:
            object.__setattr__(self, field, value)

        put("sulphur_pct", _number(n, "sulphur_pct", self.sulphur_pct))
        _in_range(n, "sulphur_pct", self.sulphur_pct, 0.0, MAX_SULPHUR_PCT,
                  "% m/m (the highest global limit there has been, 4.50 %)")
        put("density_kg_m3", _number(n, "density_kg_m3", self.density_kg_m3))
        _in_range(n, "density_kg_m3", self.density_kg_m3, 700.0, 1100.0, "kg/m³ (at 15 °C)")
        put("viscosity_cst", _number(n, "viscosity_cst", self.viscosity_cst))
        if self.viscosity_cst < MIN_VISCOSITY_CST:
            raise ValueError(
                f"fuel {n!r}: viscosity_cst must be at least {MIN_VISCOSITY_CST} cSt "
                f"(ASTM D341 range), got {self.viscosity_cst!r}"
            )
        put("viscosity_ref_c", _number(n, "viscosity_ref_c", self.viscosity_ref_c))
        _in_range(n, "viscosity_ref_c", self.viscosity_ref_c, *_REF_TEMPERATURE_RANGE_C, "°C")
        self._check_second_point()
        for field in ("water_pct", "ash_pct"):
            value = getattr(self, field)
            if value is not None:
                put(field, _number(n, field, value))
                _in_range(n, field, getattr(self, field), 0.0, _WATER_ASH_MAX_PCT, "% m/m")
        if self.q_net_mj_kg is not None:
            put("q_net_mj_kg", _number(n, "q_net_mj_kg", self.q_net_mj_kg))
            _in_range(n, "q_net_mj_kg", self.q_net_mj_kg, *_Q_NET_RANGE_MJ_KG, "MJ/kg")
        if self.flash_point_c is not None:
            put("flash_point_c", _number(n, "flash_point_c", self.flash_point_c))
            _in_range(n, "flash_point_c", self.flash_point_c, *_FLASH_POINT_RANGE_C, "°C")
        if self.carbon_pct is not None:
            self._check_carbon()

    def _check_carbon(self) -> None:
        n = self.name
        c = _number(n, "carbon_pct", self.carbon_pct)
        object.__setattr__(self, "carbon_pct", c)
        _in_range(n, "carbon_pct", c, *_CARBON_RANGE_PCT, "% m/m")
        total = c + self.sulphur_pct + (self.water_pct or 0.0) + (self.ash_pct or 0.0)
        if total > 100.0:
            raise ValueError(f"fuel {n!r}: carbon_pct, sulphur_pct, water_pct and ash_pct add "
                             f"up to {total:g} % m/m, more than 100 %")

    def _check_second_point(self) -> None:
        n = self.name
        nu2, t2 = self.viscosity2_cst, self.viscosity2_ref_c
        if nu2 is None and t2 is None:
            return
        if nu2 is None or t2 is None:
            raise ValueError(
                f"fuel {n!r}: give both viscosity2_cst and viscosity2_ref_c, or neither "
                f"(got viscosity2_cst={nu2!r}, viscosity2_ref_c={t2!r})"
            )
        nu2 = _number(n, "viscosity2_cst", nu2)
        t2 = _number(n, "viscosity2_ref_c", t2)
        object.__setattr__(self, "viscosity2_cst", nu2)
        object.__setattr__(self, "viscosity2_ref_c", t2)
        if nu2 < MIN_VISCOSITY_CST:
            raise ValueError(
                f"fuel {n!r}: viscosity2_cst must be at least {MIN_VISCOSITY_CST} cSt "
                f"(ASTM D341 range), got {nu2!r}"
            )
        _in_range(n, "viscosity2_ref_c", t2, *_REF_TEMPERATURE_RANGE_C, "°C")
        t1, nu1 = self.viscosity_ref_c, self.viscosity_cst
        if abs(t2 - t1) < MIN_VISCOSITY_POINT_SEPARATION_C:
            raise ValueError(
                f"fuel {n!r}: the two viscosity points must be at least "
                f"{MIN_VISCOSITY_POINT_SEPARATION_C:g} °C apart, got {t1!r} and {t2!r} °C"
            )
        if (t2 - t1) * (nu2 - nu1) >= 0.0:
            raise ValueError(
                f"fuel {n!r}: viscosity must fall as temperature rises, got {nu1!r} cSt at "
                f"{t1!r} °C and {nu2!r} cSt at {t2!r} °C"
            )

    @property
    def has_two_viscosity_points(self) -> bool:
        """True when a second viscosity point fixes the D341 slope (no assumption)."""
        return self.viscosity2_cst is not None

    @property
    def viscosity_slope_assumed(self) -> bool:
        """True when the D341 slope is the assumed default (one viscosity point only)."""
        return not self.has_two_viscosity_points

    def _line(self, slope_if_one_point: float) -> tuple[float, float]:
        if self.viscosity2_cst is not None and self.viscosity2_ref_c is not None:
            a, b = d341_fit(
                self.viscosity_cst, self.viscosity_ref_c, self.viscosity2_cst, self.viscosity2_ref_c
            )
            return float(a), float(b)
        a = d341_intercept(self.viscosity_cst, self.viscosity_ref_c, slope_if_one_point)
        return float(a), slope_if_one_point

    @property
    def is_residual(self) -> bool:
        """Residual (True) or distillate (False) fuel; the rule is in the module docstring."""
        grade = self.grade.strip().upper()
        if grade.startswith("RM"):
            return True
        if grade.startswith("DM") or grade in _DISTILLATE_NAMES:
            return False
        if self.density_kg_m3 > DISTILLATE_MAX_DENSITY_KG_M3:
            return True
        a, b = self._line(DEFAULT_SLOPE_DISTILLATE)
        return float(d341_viscosity_cst(40.0, a, b)) > DISTILLATE_MAX_VISCOSITY_40_CST

    @property
    def d341_coefficients(self) -> tuple[float, float]:
        """ASTM D341 ``(A, B)`` of this fuel: fitted to two points, or one point and the
        assumed default slope (:func:`planner.fuels.viscosity.default_slope`)."""
        return self._line(default_slope(self.is_residual))

    def viscosity_at(self, temperature_c: ArrayLike) -> FloatOrArray:
        """Kinematic viscosity, cSt, at ``temperature_c`` °C by ASTM D341.

        With one viscosity point the slope is an assumption
        (:attr:`viscosity_slope_assumed`).
        """
        a, b = self.d341_coefficients
        return d341_viscosity_cst(temperature_c, a, b)

    def temperature_for_viscosity(self, viscosity_cst: ArrayLike) -> FloatOrArray:
        """Temperature, °C, at which this fuel has ``viscosity_cst`` cSt (ASTM D341)."""
        a, b = self.d341_coefficients
        return temperature_for_viscosity(viscosity_cst, a, b)

    @property
    def flash_point(self) -> float:
        """Flash point, °C: ``flash_point_c`` when the delivery note gives it, else the
        ISO 8217 minimum for the grade (60 °C, 43 °C for DMX; [ISO-8217] [M], from memory,
        :func:`planner.fuels.flash_point.grade_min_flash_point_c`)."""
        if self.flash_point_c is not None:
            return self.flash_point_c
        return grade_min_flash_point_c(self.grade)

    @property
    def flash_point_source(self) -> str:
        """Where :attr:`flash_point` comes from, for the messages."""
        if self.flash_point_c is not None:
            return "delivery note"
        return f"ISO 8217 minimum for {self.grade.strip()}, from memory"

    @property
    def carbon(self) -> float:
        """Carbon, % m/m: ``carbon_pct`` when the analysis gives it, else the typical
        content of its class (:func:`planner.fuels.combustion.carbon_class`, [MEPC-308]
        [M], from memory)."""
        if self.carbon_pct is not None:
            return self.carbon_pct
        return carbon_class(self.grade, self.is_residual).carbon_pct

    @property
    def carbon_source(self) -> str:
        """Where :attr:`carbon` comes from, for the messages and the JSON."""
        if self.carbon_pct is not None:
            return "delivery note"
        k = carbon_class(self.grade, self.is_residual)
        return (f"typical for {k.name} ({k.grades}), IMO CO2 conversion factors "
                "MEPC.308(73), from memory")

    @property
    def q_net(self) -> float:
        """Net specific energy, MJ/kg: ``q_net_mj_kg`` when given, else the ISO 8217
        annex estimate (:func:`planner.fuels.energy.net_specific_energy_mj_kg`) with
        missing water and ash taken as 0 % m/m."""
        if self.q_net_mj_kg is not None:
            return self.q_net_mj_kg
        return float(
            net_specific_energy_mj_kg(
                self.density_kg_m3,
                self.sulphur_pct,
                self.water_pct if self.water_pct is not None else 0.0,
                self.ash_pct if self.ash_pct is not None else 0.0,
            )
        )
