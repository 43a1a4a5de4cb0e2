"""Carbon-formation boundary of a steam reformer feed.

Solid carbon (graphite) is thermodynamically stable in a reformer gas where its activity in
equilibrium with the gas reaches one. With the gas at equilibrium by steam reforming and
shift (CH4 + H2O = CO + 3 H2, CO + H2O = CO2 + H2), the carbon activity follows from either
carbon-forming reaction [1]_:

    Boudouard            2 CO = C(s) + CO2:   a_C = K_B f_CO² / (f_CO2 p°)
    methane cracking     CH4  = C(s) + 2 H2:  a_C = K_M f_CH4 p° / f_H2²

with fugacities f_i = y_i φ_i P (φ = 1 for the ideal gas). Carbon is stable where a_C ≥ 1 by
either. Because cracking = reforming + Boudouard − shift, the two activities are *equal* once
the gas is at equilibrium (they differ only in a gas that is not, e.g. a feed or a
kinetically frozen gas); both are computed and the larger is used. The same boundary
follows from solving with C(s) allowed (:func:`eqconv.equilibrium` decides where it is
present); the tests cross-check the two.

* :func:`carbon_activity` — ln a_C of the equilibrated gas at given T, P and S/C;
* :func:`minimum_steam_to_carbon` — the smallest S/C at which no carbon is stable, at every
  T (and P): an exact root of ln a_C = 0 on the S/C ratio, vectorized over the points;
* :func:`carbon_free_temperatures` — the temperature intervals without carbon at a given
  S/C and P (the boundary need not be monotonic in T: there can be two intervals).

S/C is mol H2O per mol of carbon in the hydrocarbon (common practice: carbon fed as CO or
CO2 is not counted, so co-fed CO2 adds carbon as well as oxygen and can raise the limit).

What the equilibrated gas gives (ideal gas, default data; see tests/test_carbon.py): the
limit is about 1.0-1.5 at 1 bar (a maximum near 850 K, then a fall toward 1 as the hot gas
tends to CO + H2, i.e. O/C = 1) and 0.35-0.85 at 30 bar (rising with T to about 1000 K):
pressure lowers it, because methane cracking (Δn > 0) is suppressed.

Equilibrium is a thermodynamic ceiling: carbon may form kinetically (whisker carbon on
nickel, heavier hydrocarbons) where it is not stable at equilibrium, which is one reason
industrial reformers run at S/C well above the thermodynamic limit (common practice:
2.5–3.5 for natural gas).

References
----------
.. [1] J. R. Rostrup-Nielsen, "Catalytic steam reforming", in *Catalysis: Science and
   Technology*, vol. 5, Springer (1984), §5 (principle of equilibrated gas, carbon limits).

Examples
--------
Invented reformer at 30 bar: the thermodynamic carbon limit at 900 K and 1100 K.

>>> res = minimum_steam_to_carbon([900.0, 1100.0], 30e5)
>>> bool(np.all(res.steam_to_carbon < 1.0)), res.status.tolist()
(True, ['limit', 'limit'])
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass
from typing import Any

import numpy as np
from numpy.typing import ArrayLike, NDArray

from .._validate import as_amount, as_pressure, as_temperature
from ..constants import P_BAR
from ..errors import ConvergenceError, InputError
from ..reaction import Reaction
from ._roots import illinois

__all__ = [
    "CarbonActivity",
    "CarbonLimitResult",
    "CarbonRangeResult",
    "carbon_activity",
    "carbon_free_temperatures",
    "minimum_steam_to_carbon",
]

FloatArray = NDArray[np.float64]
BoolArray = NDArray[np.bool_]

REFORMING = ("CH4 + H2O = CO + 3 H2", "CO + H2O = CO2 + H2")
BOUDOUARD = "2 CO = C(s) + CO2"
CRACKING = "CH4 = C(s) + 2 H2"


@dataclass(frozen=True)
class CarbonActivity:
    """Carbon activity of the equilibrated reformer gas.

    Attributes
    ----------
    ln_a_boudouard, ln_a_cracking : ndarray
        ln a_C from 2 CO = C + CO2 and from CH4 = C + 2 H2 [-].
    ln_a : ndarray
        The larger of the two [-]; carbon is stable where it is ≥ 0.
    converged : ndarray of bool
        Gas equilibrium converged (NaN activities elsewhere).
    """

    ln_a_boudouard: FloatArray
    ln_a_cracking: FloatArray
    ln_a: FloatArray
    converged: BoolArray

    @property
    def carbon_stable(self) -> BoolArray:
        """True where a_C ≥ 1 (carbon can form at equilibrium)."""
        return np.asarray(self.ln_a >= 0.0)


def _others(others: Mapping[str, ArrayLike] | None) -> dict[str, FloatArray]:
    out: dict[str, FloatArray] = {}
    for k, v in (others or {}).items():
        if k in ("CH4", "H2O"):
            raise InputError(f"others must not contain {k!r}: CH4 is 1 mol, H2O follows S/C")
        out[k] = as_amount(v, k)
    return out


def _reactions(data: str) -> tuple[tuple[Reaction, ...], Reaction, Reaction]:
    return (
        tuple(Reaction(e, data=data) for e in REFORMING),
        Reaction(BOUDOUARD, data=data),
        Reaction(CRACKING, data=data),
    )


def carbon_activity(
    T: ArrayLike,
    P: ArrayLike,
    steam_to_carbon: ArrayLike,
    *,
    others: Mapping[str, ArrayLike] | None = None,
    gas: str = "ideal",
    data: str = "default",
    **options: Any,
) -> CarbonActivity:
    """ln a_C of the reformer gas at equilibrium by reforming and shift (no carbon formed).

    Parameters
    ----------
    T : array_like
        Temperature [K], > 0.
    P : array_like
        Absolute pressure [Pa], > 0.
    steam_to_carbon : array_like
        mol H2O per mol CH4 [-], > 0.
    others : mapping, optional
        Further feed species per mol CH4 [mol] (CO2, H2, N2, Ar, ...); arrays broadcast.
    gas : {"ideal", "peng-robinson", "srk"}
        Gas model of :func:`eqconv.equilibrium` (φ enter the fugacities).
    data : {"default", "janaf"}
        Thermochemical data of every species, graphite included.
    **options
        Further keywords of :func:`eqconv.equilibrium` (e.g. ``kij``, ``tol``).

    Returns
    -------
    CarbonActivity
        Arrays of the broadcast shape of T, P, S/C and `others`.

    Notes
    -----
    ln a_C = ln K_B + 2 ln(f_CO/p°) − ln(f_CO2/p°) = ln K_M + ln(f_CH4/p°) − 2 ln(f_H2/p°),
    f_i = y_i φ_i P; see the module notes.
    """
    sc = np.asarray(steam_to_carbon, dtype=float)
    if np.any(~np.isfinite(sc) | (sc <= 0.0)):
        raise InputError(f"steam_to_carbon must be finite and > 0; got {sc!r}")
    Ta, Pa = as_temperature(T), as_pressure(P)
    rx, rb, rm = _reactions(data)
    feed: dict[str, ArrayLike] = {"CH4": 1.0, "H2O": sc, **_others(others)}
    opts = {"check_phase": False, **options}
    res = _equilibrium(rx, feed, Ta, Pa, gas, opts)
    y, phi = res.mole_fractions, res.fugacity_coefficients
    lnP = np.log(res.P / P_BAR)

    def lnf(k: str) -> FloatArray:
        with np.errstate(divide="ignore"):
            return np.asarray(np.log(y[k]) + np.log(phi[k]) + lnP)

    a_b = rb.ln_K(res.T) + 2.0 * lnf("CO") - lnf("CO2")
    a_m = rm.ln_K(res.T) + lnf("CH4") - 2.0 * lnf("H2")
    return CarbonActivity(a_b, a_m, np.fmax(a_b, a_m), np.asarray(res.converged))


def _equilibrium(
    rx: tuple[Reaction, ...],
    feed: Mapping[str, ArrayLike],
    T: ArrayLike,
    P: ArrayLike,
    gas: str,
    options: Mapping[str, Any],
) -> Any:
    """One flagged call of :func:`eqconv.equilibrium` (NaN and ``converged`` False where a
    point fails; the callers check)."""
    from ..equilibrium import equilibrium

    return equilibrium(list(rx), dict(feed), T, P, gas=gas, on_failure="flag", **options)


# --------------------------------------------------------------------------- S/C limit
@dataclass(frozen=True)
class CarbonLimitResult:
    """Minimum steam-to-carbon ratio without stable carbon.

    Attributes
    ----------
    T, P : ndarray
        Temperature [K] and absolute pressure [Pa], broadcast.
    steam_to_carbon : ndarray
        The limit S/C* [mol/mol]: carbon is stable below it and not above it; NaN where
        :attr:`status` is not ``"limit"``.
    status : ndarray of str
        ``"limit"``; ``"free in bracket"`` (no carbon even at the lower end of the bracket:
        the limit lies below it); ``"carbon in bracket"`` (carbon even at the upper end).
    ln_a_at_limit : ndarray
        ln a_C at S/C* [-] (|·| ≤ the root tolerance).
    bracket : tuple of float
        S/C range searched.
    iterations : int
        Root iterations (each one vectorized equilibrium call).
    """

    T: FloatArray
    P: FloatArray
    steam_to_carbon: FloatArray
    status: NDArray[np.str_]
    ln_a_at_limit: FloatArray
    bracket: tuple[float, float]
    iterations: int


def minimum_steam_to_carbon(
    T: ArrayLike,
    P: ArrayLike,
    *,
    others: Mapping[str, float] | None = None,
    bracket: tuple[float, float] = (0.05, 10.0),
    gas: str = "ideal",
    data: str = "default",
    xtol: float = 1e-9,
    **options: Any,
) -> CarbonLimitResult:
    """Smallest S/C at which no carbon is thermodynamically stable, at every T and P.

    Parameters
    ----------
    T : array_like
        Temperature [K], > 0.
    P : array_like
        Absolute pressure [Pa], > 0; broadcasts with `T`.
    others : mapping, optional
        Fixed feed amounts per mol CH4 [mol] (CO2, H2, inerts).
    bracket : (float, float)
        S/C range searched [mol/mol], 0 < low < high.
    gas : {"ideal", "peng-robinson", "srk"}
        Gas model.
    data : {"default", "janaf"}
        Thermochemical data.
    xtol : float
        Absolute tolerance on S/C [mol/mol].
    **options
        Further keywords of :func:`eqconv.equilibrium`.

    Returns
    -------
    CarbonLimitResult

    Raises
    ------
    InputError
        Bad T, P or bracket.
    ConvergenceError
        If the gas equilibrium fails at a point of the search.

    Notes
    -----
    Root of g(S/C) = ln a_C(T, P, S/C) = 0 by vectorized Illinois iterations
    (:func:`eqconv.studies._roots.illinois`), each a single equilibrium call over all open
    points. More steam oxidises the gas, so g falls with S/C (a single crossing in the
    bracket is assumed; the ends are checked).
    """
    lo, hi = (float(b) for b in bracket)
    if not (0.0 < lo < hi and np.isfinite(hi)):
        raise InputError(f"bracket must be (low, high) with 0 < low < high; got {bracket!r}")
    Ta, Pa = as_temperature(T), as_pressure(P)
    shape = np.broadcast_shapes(Ta.shape, Pa.shape)
    Tf = np.broadcast_to(Ta, shape).ravel()
    Pf = np.broadcast_to(Pa, shape).ravel()
    n = Tf.size
    oth = {k: float(v) for k, v in (others or {}).items()}

    def g(x: FloatArray, i: NDArray[np.intp]) -> FloatArray:
        act = carbon_activity(Tf[i], Pf[i], x, others=oth, gas=gas, data=data, **options)
        if not np.all(act.converged):
            j = int(np.flatnonzero(~act.converged)[0])
            raise ConvergenceError(
                f"reformer gas equilibrium failed at T = {Tf[i][j]:g} K, P = {Pf[i][j]:g} Pa, "
                f"S/C = {x[j]:g}"
            )
        return act.ln_a

    idx = np.arange(n)
    both = g(np.concatenate([np.full(n, lo), np.full(n, hi)]), np.concatenate([idx, idx]))
    glo, ghi = both[:n], both[n:]
    status = np.where(
        glo < 0.0, "free in bracket", np.where(ghi >= 0.0, "carbon in bracket", "limit")
    )
    sc = np.full(n, np.nan)
    ga = np.full(n, np.nan)
    it = 0
    sel = np.flatnonzero(status == "limit")
    if sel.size:

        def gs(x: FloatArray, i: NDArray[np.intp]) -> FloatArray:
            return g(x, sel[i])

        root = illinois(
            gs,
            np.full(sel.size, lo),
            np.full(sel.size, hi),
            glo[sel],
            ghi[sel],
            xtol=xtol,
            ftol=1e-10,
        )
        sc[sel], ga[sel], it = root.x, root.fx, root.iterations
    return CarbonLimitResult(
        np.broadcast_to(Ta, shape).copy(),
        np.broadcast_to(Pa, shape).copy(),
        sc.reshape(shape),
        status.reshape(shape),
        ga.reshape(shape),
        (lo, hi),
        it,
    )


# --------------------------------------------------------------------------- T range
@dataclass(frozen=True)
class CarbonRangeResult:
    """Temperatures without stable carbon at a fixed S/C and P.

    Attributes
    ----------
    steam_to_carbon, P : float
        The feed ratio [mol/mol] and pressure [Pa].
    T_bounds : tuple of float
        Temperature range searched [K].
    boundaries : ndarray
        Temperatures where a_C = 1 inside the range [K], ascending.
    intervals : list of (float, float)
        Sub-ranges of `T_bounds` without stable carbon [K] (a_C < 1), ascending.
    """

    steam_to_carbon: float
    P: float
    T_bounds: tuple[float, float]
    boundaries: FloatArray
    intervals: list[tuple[float, float]]

    def carbon_free(self, T: ArrayLike) -> BoolArray:
        """True at temperatures [K] inside one of the carbon-free intervals."""
        t = np.asarray(T, dtype=float)
        out = np.zeros(t.shape, dtype=bool)
        for a, b in self.intervals:
            out |= (t >= a) & (t <= b)
        return out


def carbon_free_temperatures(
    steam_to_carbon: float,
    P: float,
    T_bounds: tuple[float, float] = (600.0, 1400.0),
    *,
    others: Mapping[str, float] | None = None,
    n_scan: int = 81,
    gas: str = "ideal",
    data: str = "default",
    xtol: float = 1e-6,
    **options: Any,
) -> CarbonRangeResult:
    """Temperature intervals without thermodynamically stable carbon at one S/C and P.

    Parameters
    ----------
    steam_to_carbon : float
        mol H2O per mol CH4 [-], > 0.
    P : float
        Absolute pressure [Pa], > 0.
    T_bounds : (float, float)
        Range searched [K].
    others : mapping, optional
        Fixed feed amounts per mol CH4 [mol].
    n_scan : int
        Scan points over `T_bounds` (≥ 3) used to bracket the boundaries; a carbon window
        narrower than the scan step may be missed.
    gas, data, **options
        As :func:`minimum_steam_to_carbon`.
    xtol : float
        Absolute tolerance of each boundary temperature [K].

    Returns
    -------
    CarbonRangeResult

    Notes
    -----
    ln a_C(T) is evaluated on the scan in one equilibrium call; every sign change is then
    refined by vectorized Illinois iterations on T, all brackets at once.
    """
    lo, hi = (float(b) for b in T_bounds)
    if not (0.0 < lo < hi and np.isfinite(hi)):
        raise InputError(f"T_bounds must be (low, high) with 0 < low < high; got {T_bounds!r}")
    if not (isinstance(n_scan, int) and n_scan >= 3):
        raise InputError(f"n_scan must be an integer >= 3; got {n_scan!r}")
    sc = float(steam_to_carbon)
    Pv = float(as_pressure(P))
    oth = {k: float(v) for k, v in (others or {}).items()}
    grid = np.linspace(lo, hi, n_scan)

    def g(t: FloatArray, i: NDArray[np.intp] | None = None) -> FloatArray:
        act = carbon_activity(t, Pv, sc, others=oth, gas=gas, data=data, **options)
        if not np.all(act.converged):
            raise ConvergenceError(
                f"reformer gas equilibrium failed at S/C = {sc:g}, P = {Pv:g} Pa, "
                f"T = {float(np.asarray(t)[~act.converged][0]):g} K"
            )
        return act.ln_a

    ga = g(grid)
    stable = ga >= 0.0
    cross = np.flatnonzero(stable[1:] != stable[:-1])
    bounds = np.empty(0)
    if cross.size:
        root = illinois(
            lambda t, i: g(t, i),
            grid[cross],
            grid[cross + 1],
            ga[cross],
            ga[cross + 1],
            xtol=xtol,
            ftol=1e-12,
        )
        bounds = np.sort(root.x)
    edges = np.concatenate([[lo], bounds, [hi]])
    free = g(0.5 * (edges[:-1] + edges[1:])) < 0.0  # one call for every sub-range
    intervals = [
        (float(a), float(b))
        for a, b, f in zip(edges[:-1], edges[1:], free, strict=True)
        if f and b > a
    ]
    return CarbonRangeResult(sc, Pv, (lo, hi), bounds, intervals)
