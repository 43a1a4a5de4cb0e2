"""Does the gas stay gas? Vapour pressures and a dew-point check after a solve.

A "gas-phase" equilibrium is worthless where a product would condense (methanol and water at
low T and high P are the usual cases). After a solve, each condensable component's partial
pressure y_i P is compared with its vapour pressure p_sat,i(T), and the ideal-solution dew
point of the whole mixture is checked.

Notes
-----
Approximation (stated, not hidden): Raoult's law with ideal liquid and vapour. Component i
alone would condense if y_i P > p_sat,i(T). The mixture is at or below its dew point when
Σ_i y_i P / p_sat,i(T) ≥ 1 (ideal-solution dew-point condition); this is the quantity used
for the flag. Above a component's critical temperature it cannot condense (p_sat = +∞).
Non-ideal liquids (water–methanol, water–ammonia) condense somewhat earlier or later; near
a flag, check with a proper vapour–liquid calculation.

Vapour pressures: the DIPPR equation 101 coefficients (Perry's Handbook, 8th ed.) through
``thermo``, else the Wagner equation (VDI / Poling), evaluated with numpy.

References
----------
.. [1] D. W. Green, R. H. Perry, Perry's Chemical Engineers' Handbook, 8th ed. (2008),
   table 2-8 (DIPPR 101 vapour-pressure coefficients).
.. [2] B. E. Poling, J. M. Prausnitz, J. P. O'Connell, The Properties of Gases and Liquids,
   5th ed. (2001), ch. 7 (Wagner equation).
"""

from __future__ import annotations

import warnings
from collections.abc import Mapping, Sequence
from dataclasses import dataclass
from functools import cache

import numpy as np
from numpy.typing import ArrayLike, NDArray

from ._validate import as_pressure, as_temperature
from .errors import PhaseWarning
from .species import Species

__all__ = ["GasPhaseCheck", "VapourPressure", "check_gas_phase", "vapour_pressure_model"]

FloatArray = NDArray[np.float64]


@dataclass(frozen=True)
class VapourPressure:
    """Vapour-pressure correlation of one component, vectorized over T.

    Attributes
    ----------
    form : str
        ``"dippr101"``: ln p = A + B/T + C ln T + D T^E [Pa];
        ``"wagner"``: ln(p/Pc) = (a τ + b τ^1.5 + c τ^2.5 + d τ^5) / Tr, τ = 1 − Tr.
    coeffs : tuple of float
    Tc : float
        Critical temperature [K]; above it p_sat = +∞ (no condensation).
    T_min : float
        Lowest temperature of the fit [K] (extrapolated below it).
    source : str
    """

    form: str
    coeffs: tuple[float, ...]
    Tc: float
    T_min: float
    source: str

    def __call__(self, T: ArrayLike) -> FloatArray:
        """Vapour pressure p_sat(T) [Pa]; +∞ at and above Tc."""
        T = np.asarray(T, dtype=float)
        Tb = np.minimum(T, self.Tc * (1 - 1e-9))
        if self.form == "dippr101":
            A, B, C, D, E = self.coeffs
            p = np.exp(A + B / Tb + C * np.log(Tb) + D * Tb**E)
        else:
            Pc, a, b, c, d = self.coeffs
            tr = Tb / self.Tc
            tau = 1.0 - tr
            p = Pc * np.exp((a * tau + b * tau**1.5 + c * tau**2.5 + d * tau**5) / tr)
        return np.where(T >= self.Tc, np.inf, p)


@cache
def vapour_pressure_model(cas: str) -> VapourPressure | None:
    """Vapour-pressure correlation for a CAS number (None if it has none)."""
    if not cas:
        return None
    from thermo import VaporPressure

    obj = VaporPressure(CASRN=cas)
    from chemicals.critical import Tc as tc_of

    Tc = tc_of(cas)
    p101 = (getattr(obj, "DIPPR101_parameters", None) or {}).get("DIPPR_PERRY_8E")
    if p101 and Tc:
        return VapourPressure(
            "dippr101",
            tuple(float(p101[k]) for k in "ABCDE"),
            float(Tc),
            float(p101["Tmin"]),
            "DIPPR 101, Perry's 8th ed. (via thermo)",
        )
    for key in ("WAGNER_POLING", "VDI_PPDS"):
        w = (getattr(obj, "Wagner_parameters", None) or {}).get(key)
        if w:
            return VapourPressure(
                "wagner",
                (float(w["Pc"]), float(w["a"]), float(w["b"]), float(w["c"]), float(w["d"])),
                float(w["Tc"]),
                float(w["Tmin"]),
                f"Wagner equation, {key} (via thermo)",
            )
    return None


@dataclass(frozen=True)
class GasPhaseCheck:
    """Result of :func:`check_gas_phase`.

    Attributes
    ----------
    saturation : dict[str, ndarray]
        y_i P / p_sat,i(T) per condensable component (0 where it cannot condense).
    dew_index : ndarray
        Σ_i y_i P / p_sat,i(T); ≥ 1 means the mixture is at or below its dew point.
    condenses : ndarray of bool
        Points where the gas-phase assumption fails (dew_index ≥ 1).
    sources : dict[str, str]
        Vapour-pressure correlation used per component.
    """

    saturation: dict[str, FloatArray]
    dew_index: FloatArray
    condenses: NDArray[np.bool_]
    sources: dict[str, str]

    def summary(self) -> str:
        """One line: how many points fail and the worst component."""
        n_bad = int(np.count_nonzero(self.condenses))
        if n_bad == 0:
            return "gas-phase check: no component reaches its vapour pressure"
        worst = max(self.saturation, key=lambda k: float(np.max(self.saturation[k])))
        return (
            f"gas-phase assumption fails at {n_bad} of {self.condenses.size} point(s): "
            f"ideal-solution dew index up to {float(np.max(self.dew_index)):.3g}; "
            f"{worst} reaches {float(np.max(self.saturation[worst])):.3g} × its vapour "
            "pressure (Raoult's-law estimate)"
        )


def check_gas_phase(
    species: Sequence[Species],
    mole_fractions: Mapping[str, ArrayLike],
    T: ArrayLike,
    P: ArrayLike,
    warn: bool = True,
) -> GasPhaseCheck:
    """Flag points where a component would condense from the equilibrium gas.

    Parameters
    ----------
    species : sequence of Species
        Gas species of the mixture (condensed species are skipped).
    mole_fractions : mapping
        Species key -> gas mole fraction y_i [-], arrays broadcasting with T and P.
    T : array_like
        Temperature [K].
    P : array_like
        Pressure [Pa, absolute].
    warn : bool
        Emit one :class:`~eqconv.errors.PhaseWarning` summarising the failing points.

    Returns
    -------
    GasPhaseCheck
    """
    T = as_temperature(T)
    P = as_pressure(P)
    sat: dict[str, FloatArray] = {}
    sources: dict[str, str] = {}
    shape = np.broadcast_shapes(
        T.shape,
        P.shape,
        *(np.shape(mole_fractions[s.key]) for s in species if s.key in mole_fractions),
    )
    dew = np.zeros(shape)
    for sp in species:
        if sp.phase != "g" or sp.key not in mole_fractions:
            continue
        model = vapour_pressure_model(sp.cas)
        if model is None:
            continue
        ratio = np.asarray(mole_fractions[sp.key], dtype=float) * P / model(T)
        ratio = np.broadcast_to(ratio, shape)
        sat[sp.key] = ratio
        sources[sp.key] = model.source
        dew = dew + ratio
    condenses = dew >= 1.0
    check = GasPhaseCheck(saturation=sat, dew_index=dew, condenses=condenses, sources=sources)
    if warn and np.any(condenses):
        warnings.warn(check.summary(), PhaseWarning, stacklevel=2)
    return check
