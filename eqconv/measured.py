"""From measured equilibria and vapour pressures back to thermochemistry.

Pure array functions (no species or reaction objects): the equilibrium constant from
measured equilibrium partial pressures (:func:`K_from_partial_pressures`) and the enthalpy
of vaporisation or sublimation from vapour pressures by Clausius-Clapeyron regression
(:func:`enthalpy_from_vapour_pressure`, built on :func:`eqconv.vanthoff.fit_vant_hoff`).
Both are re-exported by :mod:`eqconv.vanthoff`. Units: T [K], pressures [Pa absolute],
ΔH [J/mol]; K is dimensionless on p° (1 bar unless stated). Main reference: J. M. Smith,
H. C. Van Ness, M. M. Abbott, *Introduction to Chemical Engineering Thermodynamics*, 7th
ed., McGraw-Hill, 2005, ch. 13.
"""

from __future__ import annotations

from collections.abc import Iterable, Mapping
from typing import TYPE_CHECKING

import numpy as np
from numpy.typing import ArrayLike, NDArray

from ._validate import as_pressure
from .constants import P_BAR
from .errors import InputError

if TYPE_CHECKING:
    from .vanthoff import VantHoffFit

__all__ = ["K_from_partial_pressures", "enthalpy_from_vapour_pressure"]

FloatArray = NDArray[np.float64]


def K_from_partial_pressures(
    partial_pressures: Mapping[str, ArrayLike],
    coefficients: Mapping[str, float],
    *,
    condensed: Iterable[str] = (),
    standard_pressure: float = P_BAR,
) -> FloatArray:
    """Equilibrium constant from measured equilibrium partial pressures (ideal gas).

    Parameters
    ----------
    partial_pressures : mapping of str to array_like
        Equilibrium partial pressure of each gas species [Pa absolute], > 0; broadcast.
        Entries not in `coefficients` (inerts) are ignored.
    coefficients : mapping of str to float
        Stoichiometric coefficients ν_i [-], negative for reactants.
    condensed : iterable of str, optional
        Pure condensed species (solids, liquids) among `coefficients`: unit activity, no
        pressure needed (and none may be given).
    standard_pressure : float, optional
        Standard pressure p° [Pa], > 0. Default 1e5 (1 bar).

    Returns
    -------
    ndarray
        K [-], broadcast shape of the pressures.

    Raises
    ------
    InputError
        A gas species without a pressure > 0; a condensed name missing from
        `coefficients` or given a pressure; p° not > 0.

    Notes
    -----
    Ideal-gas activities p_i/p°, pure condensed phases at unit activity [1]_:
    :math:`K = \\prod_{i \\in \\mathrm{gas}} (p_i / p^\\circ)^{\\nu_i}`.

    References
    ----------
    .. [1] Smith, Van Ness & Abbott (2005), ch. 13.

    Examples
    --------
    Invented measurement for C(s) + CO2 = 2 CO: p_CO = 2 bar, p_CO2 = 0.5 bar.

    >>> K = K_from_partial_pressures({"CO": 2e5, "CO2": 0.5e5},
    ...                              {"C": -1, "CO2": -1, "CO": 2}, condensed=["C"])
    >>> round(float(K), 12)
    8.0
    """
    # eqconv.vanthoff re-exports this module's names, so it is imported here, not at the top
    from .vanthoff import _exp_checked, _finite, _out

    ln_p0 = float(np.log(as_pressure(standard_pressure, "standard_pressure")))
    solid = set(condensed)
    unknown = sorted(solid - set(coefficients))
    if unknown:
        raise InputError(f"condensed species {unknown!r} do not appear in coefficients")
    given = sorted(solid & set(partial_pressures))
    if given:
        raise InputError(f"condensed species {given!r} have unit activity; give no pressure")
    gas = [s for s in coefficients if s not in solid]
    missing = [s for s in gas if s not in partial_pressures]
    if missing:
        raise InputError(f"no partial pressure [Pa] given for gas species {missing!r}")
    ln_k: FloatArray = np.zeros(())
    for s in gas:
        nu = float(_finite(coefficients[s], f"coefficient of {s}", "-"))
        ln_p = np.log(as_pressure(partial_pressures[s], f"partial pressure of {s}"))
        ln_k = ln_k + nu * (ln_p - ln_p0)
    return _out(_exp_checked(np.asarray(ln_k), "K"))


def enthalpy_from_vapour_pressure(
    T: ArrayLike,
    p_sat: ArrayLike,
    *,
    sigma_ln_p: ArrayLike | None = None,
    absolute_sigma: bool = False,
    confidence: float = 0.95,
    significance: float = 0.05,
) -> VantHoffFit:
    """Enthalpy of vaporisation or sublimation by Clausius-Clapeyron regression.

    Parameters
    ----------
    T : array_like, shape (n,)
        Temperatures [K], > 0, n >= 3.
    p_sat : array_like, shape (n,)
        Vapour (or sublimation) pressure at each T [Pa absolute], > 0.
    sigma_ln_p : array_like, optional
        Standard uncertainty of ln p_sat [-] (relative pressure uncertainty), as weights.
    absolute_sigma, confidence, significance : optional
        As in :func:`fit_vant_hoff`.

    Returns
    -------
    VantHoffFit
        Fit of ln(p_sat/p°) on 1/T: `delta_H`, `se_delta_H`, `ci_delta_H` give ΔH [J/mol];
        `delta_S` is the entropy change to vapour at 1 bar; the curvature test flags a
        temperature-dependent ΔH.

    Raises
    ------
    InputError
        As :func:`fit_vant_hoff`, with p_sat in place of K.

    Notes
    -----
    The Clapeyron equation dp/dT = ΔH / (T ΔV) with three assumptions, an ideal vapour
    (ΔV = R T / p), a negligible condensed-phase volume and a constant ΔH, integrates to
    ln(p_sat/p°) = -ΔH/(R T) + const [1]_, so ΔH = -R × slope of ln p on 1/T; the slope
    refers to the harmonic-mean temperature of the data. Without the first two assumptions
    the slope gives ΔH/ΔZ, ΔZ = p ΔV/(R T): near 1 atm a real vapour has Z ≈ 0.98-0.99,
    so the regressed value runs 1-2 % above the calorimetric ΔH (water at 360-373 K:
    +1.4 %).

    References
    ----------
    .. [1] Smith, Van Ness & Abbott (2005), latent heats of pure substances (Clapeyron
       equation).

    Examples
    --------
    Invented liquid with p_sat = exp(25 - 4000/T) Pa:

    >>> import numpy as np
    >>> T = np.linspace(300.0, 340.0, 5)
    >>> res = enthalpy_from_vapour_pressure(T, np.exp(25.0 - 4000.0 / T))
    >>> round(res.delta_H / 8.314462618, 6)
    4000.0
    """
    from .vanthoff import fit_vant_hoff

    p = as_pressure(p_sat, "p_sat")
    return fit_vant_hoff(
        T, p / P_BAR, sigma_lnK=sigma_ln_p, absolute_sigma=absolute_sigma,
        confidence=confidence, significance=significance,
    )  # fmt: skip
