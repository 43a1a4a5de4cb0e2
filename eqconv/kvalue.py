"""Equilibrium constants from reaction thermochemistry: pure array functions.

These functions know nothing of species; :class:`eqconv.Reaction` gathers the data and
calls them.

References
----------
.. [1] J. M. Smith, H. C. Van Ness, M. M. Abbott, Introduction to Chemical Engineering
   Thermodynamics, 7th ed., McGraw-Hill (2005), ch. 4 and 13.
"""

from __future__ import annotations

import numpy as np
from numpy.typing import ArrayLike, NDArray

from ._validate import as_pressure, as_temperature
from .constants import T_REF, R

FloatArray = NDArray[np.float64]

__all__ = [
    "cp_correction_index",
    "ln_k_from_increments",
    "ln_k_vant_hoff",
    "standard_pressure_shift",
]


def ln_k_vant_hoff(T: ArrayLike, delta_H0: float, delta_S0: float) -> FloatArray:
    """ln K with ΔrH° and ΔrS° held at their 298.15 K values (integrated van 't Hoff).

    Parameters
    ----------
    T : array_like
        Temperature [K], > 0.
    delta_H0 : float
        Standard reaction enthalpy at 298.15 K [J/mol].
    delta_S0 : float
        Standard reaction entropy at 298.15 K [J/(mol K)].

    Returns
    -------
    ndarray
        ln K [-], same shape as `T`.

    Notes
    -----
    ln K(T) = −ΔrH°/(R T) + ΔrS°/R, equivalent to
    ln K(T) = ln K(T0) − (ΔrH°/R)(1/T − 1/T0). Exact only when ΔrCp° = 0.

    Examples
    --------
    >>> round(float(ln_k_vant_hoff(298.15, -45898.0, -99.0)), 4)
    6.6081
    """
    T = as_temperature(T)
    return -delta_H0 / (R * T) + delta_S0 / R


def ln_k_from_increments(
    T: ArrayLike, delta_H0: float, delta_S0: float, dh_int: ArrayLike, ds_int: ArrayLike
) -> FloatArray:
    """ln K with the Kirchhoff heat-capacity correction.

    Parameters
    ----------
    T : array_like
        Temperature [K], > 0.
    delta_H0, delta_S0 : float
        ΔrH° [J/mol] and ΔrS° [J/(mol K)] at 298.15 K.
    dh_int : array_like
        ∫_{298.15}^{T} ΔrCp° dT [J/mol], same shape as `T`.
    ds_int : array_like
        ∫_{298.15}^{T} ΔrCp°/T dT [J/(mol K)], same shape as `T`.

    Returns
    -------
    ndarray
        ln K [-].

    Notes
    -----
    ΔrH°(T) = ΔrH°(T0) + ∫ΔrCp° dT,  ΔrS°(T) = ΔrS°(T0) + ∫ΔrCp°/T dT,
    ln K = −ΔrG°(T)/(R T) = −ΔrH°(T)/(R T) + ΔrS°(T)/R.
    """
    T = as_temperature(T)
    return -(delta_H0 + np.asarray(dh_int)) / (R * T) + (delta_S0 + np.asarray(ds_int)) / R


def standard_pressure_shift(delta_n_gas: float, p_from: float, p_to: float) -> float:
    """Add this to ln K to change the standard pressure from `p_from` to `p_to` [Pa].

    Notes
    -----
    μ°_i(p_to) = μ°_i(p_from) + R T ln(p_to/p_from) for each ideal gas, so
    ln K(p_to) = ln K(p_from) − Δn_gas ln(p_to/p_from).

    Examples
    --------
    >>> round(float(standard_pressure_shift(-1.0, 1e5, 101325.0) / np.log(10)), 4)
    0.0057
    """
    p_from = float(as_pressure(p_from, "p_from"))
    p_to = float(as_pressure(p_to, "p_to"))
    return float(-delta_n_gas * np.log(p_to / p_from))


def cp_correction_index(T: ArrayLike, delta_cp_over_R: float, T0: float = T_REF) -> FloatArray:
    """Size of the Kirchhoff correction to ln K for a constant ΔrCp°.

    Parameters
    ----------
    T : array_like
        Temperature [K].
    delta_cp_over_R : float
        ΔrCp°/R [-] (e.g. a mean over the range).
    T0 : float
        Reference temperature [K].

    Returns
    -------
    ndarray
        ΔrCp°/R · (ln(T/T0) + T0/T − 1): the change in ln K that the constant-ΔH° model
        misses. Screening rule (common practice): the correction matters when its magnitude
        exceeds about 0.1.
    """
    T = as_temperature(T)
    return delta_cp_over_R * (np.log(T / T0) + T0 / T - 1.0)
