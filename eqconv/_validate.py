"""Input checks shared by every layer: convert once, raise a clear error, never guess."""

from __future__ import annotations

import numpy as np
from numpy.typing import ArrayLike, NDArray

from .errors import InputError


def as_temperature(T: ArrayLike, name: str = "T") -> NDArray[np.float64]:
    """Return `T` as a float array after checking that it is finite and > 0 [K].

    Raises
    ------
    InputError
        If any value is not finite or not strictly positive.
    """
    arr = np.asarray(T, dtype=float)
    bad = ~np.isfinite(arr) | (arr <= 0.0)
    if np.any(bad):
        first = arr[bad].flat[0]
        raise InputError(
            f"{name} must be a finite absolute temperature > 0 K; got {first!r} "
            f"({int(np.count_nonzero(bad))} bad value(s))"
        )
    return arr


def as_pressure(P: ArrayLike, name: str = "P") -> NDArray[np.float64]:
    """Return `P` as a float array after checking that it is finite and > 0 [Pa, absolute].

    Raises
    ------
    InputError
        If any value is not finite or not strictly positive.
    """
    arr = np.asarray(P, dtype=float)
    bad = ~np.isfinite(arr) | (arr <= 0.0)
    if np.any(bad):
        first = arr[bad].flat[0]
        raise InputError(
            f"{name} must be a finite absolute pressure > 0 Pa; got {first!r} "
            f"({int(np.count_nonzero(bad))} bad value(s))"
        )
    return arr


def as_amount(n: ArrayLike, name: str) -> NDArray[np.float64]:
    """Return amounts `n` [mol] as a float array after checking finite and >= 0.

    Raises
    ------
    InputError
        If any value is negative or not finite.
    """
    arr = np.asarray(n, dtype=float)
    bad = ~np.isfinite(arr) | (arr < 0.0)
    if np.any(bad):
        first = arr[bad].flat[0]
        raise InputError(f"amount of {name} must be finite and >= 0 mol; got {first!r}")
    return arr
