"""Helpers shared by the fuel-property modules: floats in, floats out; arrays in, arrays out."""

from __future__ import annotations

from collections.abc import Callable
from typing import TypeAlias

import numpy as np
from numpy.typing import ArrayLike, NDArray

FloatOrArray: TypeAlias = float | NDArray[np.float64]
"""A plain float for scalar input, a float64 array for array input."""


def f64(x: ArrayLike) -> NDArray[np.float64]:
    """``x`` as a float64 array (0-d for a scalar)."""
    return np.asarray(x, dtype=np.float64)


def out(x: ArrayLike) -> FloatOrArray:
    """A 0-d result as a Python float, anything else as a float64 array."""
    arr = np.asarray(x, dtype=np.float64)
    if arr.ndim == 0:
        return float(arr)
    return arr


def require(condition: ArrayLike, message: str | Callable[[], str]) -> None:
    """Raise ``ValueError(message)`` unless ``condition`` holds everywhere.

    ``message`` may be a function giving the text, so that a message quoting an
    array is only formatted when it is needed (formatting arrays is slow).
    """
    if not bool(np.all(condition)):
        raise ValueError(message() if callable(message) else message)


def component_amounts(amounts: ArrayLike, label: str) -> NDArray[np.float64]:
    """``amounts`` of each component (first axis) as float64, checked: finite, >= 0, not all 0."""
    w = f64(amounts)
    require(w.ndim >= 1 and w.shape[0] >= 1, lambda: f"{label} needs at least one component")
    require(
        np.isfinite(w) & (w >= 0.0), lambda: f"{label} must be finite and >= 0, got {amounts!r}"
    )
    require(np.sum(w, axis=0) > 0.0, lambda: f"{label} must not all be zero")
    return w


def per_component(
    values: ArrayLike, weights: NDArray[np.float64], label: str
) -> NDArray[np.float64]:
    """``values`` as float64, checked to give one value per component of ``weights``."""
    v = f64(values)
    require(
        v.ndim >= 1 and v.shape[0] == weights.shape[0], lambda: f"{label}: one value per component"
    )
    return v
