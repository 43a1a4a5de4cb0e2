"""Ideal-gas (and pure condensed) heat-capacity models, evaluated with numpy.

Every model gives, vectorized over temperature,

* ``cp(T)``     the molar heat capacity Cp° [J/(mol K)],
* ``h_int(T)``  the enthalpy increment  ∫_{298.15 K}^{T} Cp° dT      [J/mol],
* ``s_int(T)``  the entropy increment   ∫_{298.15 K}^{T} Cp°/T dT    [J/(mol K)],

from the raw coefficients, so that the Kirchhoff integration of a reaction's ΔrCp° is
analytic wherever the correlation allows it. Models carry their valid range
``(T_min, T_max)`` [K] and a ``method`` tag naming the correlation and its origin; range
checks are done one layer up (:mod:`eqconv.species`), where the species is known.

Models
------
:class:`PowerSeriesCp`
    Cp = Σ a_k T^p_k. Covers a constant, ordinary polynomials, the Shomate equation, NASA
    7- and 9-term polynomials (times R) and the Maier–Kelley form a + bT + c/T².
:class:`TRCCp`
    The TRC ideal-gas correlation (integrated by Gauss–Legendre quadrature).
:class:`TabulatedCp`
    A table of Cp, H − H(298.15) and S (NIST-JANAF style), interpolated by cubic Hermite
    splines whose end slopes are the tabulated Cp and Cp/T, so H and S match the table
    exactly at its nodes.
:class:`PiecewiseCp`
    Several models joined at break temperatures (e.g. two Shomate ranges).

References
----------
.. [1] M. W. Chase, NIST-JANAF Thermochemical Tables, 4th ed., J. Phys. Chem. Ref. Data
   Monograph 9 (1998): Shomate form of the heat-capacity equation.
.. [2] B. J. McBride, M. J. Zehe, S. Gordon, NASA Glenn Coefficients for Calculating
   Thermodynamic Properties of Individual Species, NASA/TP-2002-211556 (2002).
.. [3] B. E. Poling, J. M. Prausnitz, J. P. O'Connell, The Properties of Gases and Liquids,
   5th ed., McGraw-Hill (2001), appendix A (ideal-gas Cp polynomial).
.. [4] TRC Thermodynamic Tables, Hydrocarbons / Non-hydrocarbons, Thermodynamics Research
   Center (ideal-gas heat-capacity correlation).
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass, field
from typing import Any, Protocol, runtime_checkable

import numpy as np
from numpy.typing import ArrayLike, NDArray

from .constants import T_REF, R
from .errors import InputError

FloatArray = NDArray[np.float64]

__all__ = [
    "CpModel",
    "PiecewiseCp",
    "PowerSeriesCp",
    "TRCCp",
    "TabulatedCp",
    "constant_cp",
    "maier_kelley_cp",
    "nasa7_cp",
    "nasa9_cp",
    "polynomial_cp",
    "shomate_cp",
]


@runtime_checkable
class CpModel(Protocol):
    """What every heat-capacity model provides (all temperatures in K)."""

    @property
    def T_min(self) -> float:
        """Lowest valid temperature [K]."""
        ...

    @property
    def T_max(self) -> float:
        """Highest valid temperature [K]."""
        ...

    @property
    def method(self) -> str:
        """Name and origin of the correlation."""
        ...

    def cp(self, T: ArrayLike) -> FloatArray:
        """Heat capacity Cp° [J/(mol K)]."""
        ...

    def h_int(self, T: ArrayLike) -> FloatArray:
        """∫_{298.15}^{T} Cp° dT [J/mol]."""
        ...

    def s_int(self, T: ArrayLike) -> FloatArray:
        """∫_{298.15}^{T} Cp°/T dT [J/(mol K)]."""
        ...


def _check_range_args(T_min: float, T_max: float) -> None:
    if not (np.isfinite(T_min) and np.isfinite(T_max) and 0.0 < T_min < T_max):
        raise InputError(
            f"a heat-capacity range needs 0 < T_min < T_max [K]; got ({T_min!r}, {T_max!r})"
        )


@dataclass(frozen=True)
class PowerSeriesCp:
    """Cp° = Σ_k a_k T^(p_k) [J/(mol K)], T in K.

    Parameters
    ----------
    coeffs : sequence of float
        Coefficients a_k, in units that make each term J/(mol K).
    exponents : sequence of float
        Powers p_k of T (any real numbers, e.g. -2 for the Shomate E/t² term).
    T_min, T_max : float
        Valid range of the correlation [K].
    method : str
        Name of the correlation and where its coefficients come from.

    Notes
    -----
    Antiderivatives used for the Kirchhoff integrals:
    ∫ a T^p dT = a T^(p+1)/(p+1)  (a ln T for p = −1),
    ∫ a T^(p−1) dT = a T^p / p      (a ln T for p = 0).

    Examples
    --------
    >>> m = PowerSeriesCp((29.1,), (0.0,), 200.0, 3000.0, "constant")
    >>> round(float(m.h_int(398.15)), 6)
    2910.0
    """

    coeffs: tuple[float, ...]
    exponents: tuple[float, ...]
    T_min: float
    T_max: float
    method: str

    def __post_init__(self) -> None:
        if len(self.coeffs) != len(self.exponents) or not self.coeffs:
            raise InputError(
                f"PowerSeriesCp needs as many coefficients as exponents (got "
                f"{len(self.coeffs)} and {len(self.exponents)})"
            )
        if not all(np.isfinite(self.coeffs)):
            raise InputError(f"heat-capacity coefficients must be finite; got {self.coeffs!r}")
        _check_range_args(self.T_min, self.T_max)
        object.__setattr__(self, "coeffs", tuple(float(c) for c in self.coeffs))
        object.__setattr__(self, "exponents", tuple(float(p) for p in self.exponents))

    def cp(self, T: ArrayLike) -> FloatArray:
        """Heat capacity Cp° [J/(mol K)] at T [K]."""
        T = np.asarray(T, dtype=float)
        out = np.zeros_like(T)
        for a, p in zip(self.coeffs, self.exponents, strict=True):
            out = out + (a if p == 0.0 else a * T**p)
        return np.where(np.isnan(T), np.nan, out)

    def _h_anti(self, T: FloatArray) -> FloatArray:
        out = np.zeros_like(T)
        for a, p in zip(self.coeffs, self.exponents, strict=True):
            out = out + (a * np.log(T) if p == -1.0 else a * T ** (p + 1.0) / (p + 1.0))
        return out

    def _s_anti(self, T: FloatArray) -> FloatArray:
        out = np.zeros_like(T)
        for a, p in zip(self.coeffs, self.exponents, strict=True):
            out = out + (a * np.log(T) if p == 0.0 else a * T**p / p)
        return out

    def h_int(self, T: ArrayLike) -> FloatArray:
        """Enthalpy increment ∫_{298.15}^{T} Cp° dT [J/mol]."""
        T = np.asarray(T, dtype=float)
        return self._h_anti(T) - self._h_anti(np.asarray(T_REF))

    def s_int(self, T: ArrayLike) -> FloatArray:
        """Entropy increment ∫_{298.15}^{T} Cp°/T dT [J/(mol K)]."""
        T = np.asarray(T, dtype=float)
        return self._s_anti(T) - self._s_anti(np.asarray(T_REF))


def constant_cp(
    value: float, T_min: float = 100.0, T_max: float = 6000.0, method: str = "constant (user)"
) -> PowerSeriesCp:
    """Constant heat capacity `value` [J/(mol K)]."""
    return PowerSeriesCp((value,), (0.0,), T_min, T_max, method)


def polynomial_cp(
    coeffs: Sequence[float], T_min: float, T_max: float, method: str = "polynomial (user)"
) -> PowerSeriesCp:
    """Cp° = a0 + a1 T + a2 T² + … [J/(mol K)], coefficients in ascending powers of T [K]."""
    return PowerSeriesCp(
        tuple(coeffs), tuple(float(k) for k in range(len(coeffs))), T_min, T_max, method
    )


def maier_kelley_cp(
    a: float, b: float, c: float, T_min: float, T_max: float, method: str = "Maier-Kelley (user)"
) -> PowerSeriesCp:
    """Cp° = a + b T + c / T² [J/(mol K)], the textbook form for solids and gases."""
    return PowerSeriesCp((a, b, c), (0.0, 1.0, -2.0), T_min, T_max, method)


def shomate_cp(
    A: float,
    B: float,
    C: float,
    D: float,
    E: float,
    T_min: float,
    T_max: float,
    method: str = "Shomate (user)",
) -> PowerSeriesCp:
    """Shomate equation Cp° = A + B t + C t² + D t³ + E/t², t = T/1000 K [J/(mol K)].

    References
    ----------
    .. [1] NIST Chemistry WebBook, SRD 69: Shomate equation and parameter convention.
    """
    return PowerSeriesCp(
        (A, B * 1e-3, C * 1e-6, D * 1e-9, E * 1e6), (0.0, 1.0, 2.0, 3.0, -2.0), T_min, T_max, method
    )


def nasa7_cp(
    a: Sequence[float], T_min: float, T_max: float, method: str = "NASA 7-term (user)"
) -> PowerSeriesCp:
    """NASA 7-term polynomial: Cp°/R = a1 + a2 T + a3 T² + a4 T³ + a5 T⁴.

    Only a1…a5 set Cp; a6 and a7 (enthalpy and entropy constants) may be passed and are
    ignored here, because formation data are carried separately.
    """
    if len(a) not in (5, 7):
        raise InputError(f"NASA 7-term polynomials take 5 or 7 coefficients; got {len(a)}")
    return PowerSeriesCp(
        tuple(R * float(x) for x in a[:5]), (0.0, 1.0, 2.0, 3.0, 4.0), T_min, T_max, method
    )


def nasa9_cp(
    a: Sequence[float], T_min: float, T_max: float, method: str = "NASA 9-term (user)"
) -> PowerSeriesCp:
    """NASA 9-term polynomial: Cp°/R = a1/T² + a2/T + a3 + a4 T + … + a7 T⁴ (a8, a9 ignored)."""
    if len(a) not in (7, 9):
        raise InputError(f"NASA 9-term polynomials take 7 or 9 coefficients; got {len(a)}")
    return PowerSeriesCp(
        tuple(R * float(x) for x in a[:7]),
        (-2.0, -1.0, 0.0, 1.0, 2.0, 3.0, 4.0),
        T_min,
        T_max,
        method,
    )


_GL_X, _GL_W = np.polynomial.legendre.leggauss(24)


@dataclass(frozen=True)
class TRCCp:
    """TRC ideal-gas heat-capacity correlation [J/(mol K)].

    Cp°/R = a0 + (a1/T²) exp(−a2/T) + a3 y² + (a4 − a5/(T − a7)²) y⁸,
    y = (T − a7)/(T + a6) for T > a7, else y = 0.

    Notes
    -----
    The integrals are evaluated by 24-point Gauss–Legendre quadrature between 298.15 K
    and T, vectorized over T; for this smooth integrand that reaches machine precision
    over 50–3000 K.
    """

    a: tuple[float, ...]
    T_min: float
    T_max: float
    method: str = "TRC ideal-gas correlation"

    def __post_init__(self) -> None:
        if len(self.a) != 8:
            raise InputError(f"the TRC correlation takes 8 coefficients a0..a7; got {len(self.a)}")
        if not all(np.isfinite(self.a)):
            raise InputError(f"TRC coefficients must be finite; got {self.a!r}")
        _check_range_args(self.T_min, self.T_max)

    def cp(self, T: ArrayLike) -> FloatArray:
        """Heat capacity Cp° [J/(mol K)] at T [K]."""
        T = np.asarray(T, dtype=float)
        a0, a1, a2, a3, a4, a5, a6, a7 = self.a
        above = T > a7
        y = np.where(above, (T - a7) / (T + a6), 0.0)
        y2 = y * y
        dT = np.where(above, T - a7, 1.0)
        tail = np.where(above, (a4 - a5 / (dT * dT)) * y2 * y2 * y2 * y2, 0.0)
        return R * (a0 + (a1 / (T * T)) * np.exp(-a2 / T) + a3 * y2 + tail)

    def _gl(self, lo: FloatArray, hi: FloatArray, over_T: bool) -> FloatArray:
        half = 0.5 * (hi - lo)
        mid = 0.5 * (hi + lo)
        nodes = mid[..., None] + half[..., None] * _GL_X
        f = self.cp(nodes)
        if over_T:
            f = f / nodes
        return half * np.sum(f * _GL_W, axis=-1)

    def _quad(self, T: FloatArray, over_T: bool) -> FloatArray:
        # the correlation has a kink at T = a7 (y switches on): integrate each side apart
        ref = np.full_like(T, T_REF)
        kink = np.clip(self.a[7], np.minimum(T, ref), np.maximum(T, ref))
        return self._gl(ref, kink, over_T) + self._gl(kink, T, over_T)

    def h_int(self, T: ArrayLike) -> FloatArray:
        """Enthalpy increment ∫_{298.15}^{T} Cp° dT [J/mol]."""
        return self._quad(np.asarray(T, dtype=float), over_T=False)

    def s_int(self, T: ArrayLike) -> FloatArray:
        """Entropy increment ∫_{298.15}^{T} Cp°/T dT [J/(mol K)]."""
        return self._quad(np.asarray(T, dtype=float), over_T=True)


@dataclass(frozen=True)
class TabulatedCp:
    """Tabulated Cp°, H° − H°(298.15 K) and S° interpolated by cubic Hermite splines.

    Parameters
    ----------
    T_nodes : sequence of float
        Table temperatures [K], strictly increasing, > 0, bracketing 298.15 K.
    cp_nodes : sequence of float
        Cp° at the nodes [J/(mol K)].
    h_nodes : sequence of float
        H° − H°(298.15 K) at the nodes [J/mol].
    s_nodes : sequence of float
        S° at the nodes [J/(mol K)].
    method : str
        Name of the table.

    Notes
    -----
    H is interpolated with slopes dH/dT = Cp and S with slopes dS/dT = Cp/T, so the
    interpolants reproduce the table at every node and are C¹ between nodes. The heat
    capacity returned between nodes is the derivative of the H interpolant. H and S are
    separate splines, so between nodes dS/dT equals Cp/T only approximately (within about
    0.1 J/(mol K) for JANAF's 100 K spacing); values match the table at the nodes.
    """

    T_nodes: tuple[float, ...]
    cp_nodes: tuple[float, ...]
    h_nodes: tuple[float, ...]
    s_nodes: tuple[float, ...]
    method: str
    # scipy.interpolate.CubicHermiteSpline (imported when a table is built: import time)
    _h: Any = field(init=False, repr=False, compare=False)
    _s: Any = field(init=False, repr=False, compare=False)
    _s_ref: float = field(init=False, repr=False, compare=False)

    def __post_init__(self) -> None:
        T = np.asarray(self.T_nodes, dtype=float)
        cp = np.asarray(self.cp_nodes, dtype=float)
        h = np.asarray(self.h_nodes, dtype=float)
        s = np.asarray(self.s_nodes, dtype=float)
        if not (T.ndim == 1 and T.size >= 2 and cp.shape == h.shape == s.shape == T.shape):
            raise InputError("a heat-capacity table needs >= 2 rows of equal-length T, Cp, H, S")
        if not (
            np.all(np.isfinite(T))
            and np.all(np.isfinite(cp))
            and np.all(np.isfinite(h))
            and np.all(np.isfinite(s))
        ):
            raise InputError(f"a heat-capacity table must hold finite numbers ({self.method})")
        if np.any(T <= 0) or np.any(np.diff(T) <= 0):
            raise InputError("table temperatures must be > 0 K and strictly increasing")
        if not T[0] <= T_REF <= T[-1]:
            raise InputError(
                f"a heat-capacity table must bracket 298.15 K; it spans {T[0]}–{T[-1]} K"
            )
        from scipy.interpolate import CubicHermiteSpline

        object.__setattr__(self, "_h", CubicHermiteSpline(T, h, cp, extrapolate=True))
        object.__setattr__(self, "_s", CubicHermiteSpline(T, s, cp / T, extrapolate=True))
        object.__setattr__(self, "_s_ref", float(self._s(T_REF)))

    @property
    def T_min(self) -> float:
        """Lowest table temperature [K]."""
        return float(self.T_nodes[0])

    @property
    def T_max(self) -> float:
        """Highest table temperature [K]."""
        return float(self.T_nodes[-1])

    def cp(self, T: ArrayLike) -> FloatArray:
        """Heat capacity Cp° [J/(mol K)] at T [K]."""
        return np.asarray(self._h(np.asarray(T, dtype=float), 1), dtype=float)

    def h_int(self, T: ArrayLike) -> FloatArray:
        """Enthalpy increment H°(T) − H°(298.15 K) [J/mol]."""
        return np.asarray(self._h(np.asarray(T, dtype=float)), dtype=float) - float(self._h(T_REF))

    def s_int(self, T: ArrayLike) -> FloatArray:
        """Entropy increment S°(T) − S°(298.15 K) [J/(mol K)]."""
        return np.asarray(self._s(np.asarray(T, dtype=float)), dtype=float) - self._s_ref


@dataclass(frozen=True)
class PiecewiseCp:
    """Several heat-capacity models joined end to end at break temperatures.

    Parameters
    ----------
    pieces : sequence of CpModel
        Models in increasing temperature order; piece k is used on
        [pieces[k].T_min, pieces[k+1].T_min) and the last one up to its T_max.
    method : str
        Name of the combined correlation.

    Notes
    -----
    The increments are integrated across the breaks piece by piece:
    ∫_{298.15}^{T} = Σ over the pieces between 298.15 K and T, so H and S are continuous
    even where the fitted Cp jumps slightly at a break.
    """

    pieces: tuple[CpModel, ...]
    method: str
    _breaks: FloatArray = field(init=False, repr=False, compare=False)
    _off_h: FloatArray = field(init=False, repr=False, compare=False)
    _off_s: FloatArray = field(init=False, repr=False, compare=False)

    def __post_init__(self) -> None:
        if len(self.pieces) < 1:
            raise InputError("PiecewiseCp needs at least one piece")
        lows = np.array([p.T_min for p in self.pieces])
        if np.any(np.diff(lows) <= 0):
            raise InputError(f"PiecewiseCp pieces must be ordered by T_min; got {lows.tolist()}")
        for lower, upper in zip(self.pieces[:-1], self.pieces[1:], strict=True):
            if lower.T_max < upper.T_min:
                raise InputError(
                    f"PiecewiseCp pieces leave a gap: {lower.method} ends at {lower.T_max:g} K, "
                    f"{upper.method} starts at {upper.T_min:g} K"
                )
        object.__setattr__(self, "_breaks", lows[1:])
        object.__setattr__(self, "_off_h", self._offsets("h"))
        object.__setattr__(self, "_off_s", self._offsets("s"))

    @property
    def T_min(self) -> float:
        """Lowest valid temperature [K]."""
        return float(self.pieces[0].T_min)

    @property
    def T_max(self) -> float:
        """Highest valid temperature [K]."""
        return float(self.pieces[-1].T_max)

    def _index(self, T: FloatArray) -> NDArray[np.intp]:
        return np.searchsorted(self._breaks, T, side="right")

    def cp(self, T: ArrayLike) -> FloatArray:
        """Heat capacity Cp° [J/(mol K)] at T [K]."""
        T = np.asarray(T, dtype=float)
        idx = self._index(T)
        out = np.zeros_like(T)
        for k, piece in enumerate(self.pieces):
            out = np.where(idx == k, piece.cp(T), out)
        return out

    def _offsets(self, which: str) -> FloatArray:
        """Offsets so that piece k's increment plus offset_k is measured from 298.15 K."""

        def inc(piece: CpModel, x: float) -> float:
            return float(piece.h_int(x) if which == "h" else piece.s_int(x))

        k_ref = int(self._index(np.asarray(T_REF)))
        offsets = np.zeros(len(self.pieces))
        for k in range(k_ref + 1, len(self.pieces)):
            b = float(self._breaks[k - 1])
            offsets[k] = offsets[k - 1] + inc(self.pieces[k - 1], b) - inc(self.pieces[k], b)
        for k in range(k_ref - 1, -1, -1):
            b = float(self._breaks[k])
            offsets[k] = offsets[k + 1] + inc(self.pieces[k + 1], b) - inc(self.pieces[k], b)
        return offsets

    def _integral(self, T: FloatArray, which: str) -> FloatArray:
        offsets = self._off_h if which == "h" else self._off_s
        idx = self._index(T)
        out = np.zeros_like(T)
        for k, piece in enumerate(self.pieces):
            part = piece.h_int(T) if which == "h" else piece.s_int(T)
            out = np.where(idx == k, part + offsets[k], out)
        return out

    def h_int(self, T: ArrayLike) -> FloatArray:
        """Enthalpy increment ∫_{298.15}^{T} Cp° dT [J/mol]."""
        return self._integral(np.asarray(T, dtype=float), "h")

    def s_int(self, T: ArrayLike) -> FloatArray:
        """Entropy increment ∫_{298.15}^{T} Cp°/T dT [J/(mol K)]."""
        return self._integral(np.asarray(T, dtype=float), "s")
