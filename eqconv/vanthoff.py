"""Van 't Hoff analysis: from measured equilibria back to thermochemistry.

Pure array functions (no species or reaction objects): two-point van 't Hoff forms, the
temperature at which K reaches a target, and a van 't Hoff regression with a heat-capacity
test. K from measured partial pressures (:func:`K_from_partial_pressures`) and
Clausius-Clapeyron enthalpies (:func:`enthalpy_from_vapour_pressure`) are in
:mod:`eqconv.measured` and re-exported here. Units: T [K], pressures [Pa absolute], ΔrH°
[J/mol], ΔrS° and ΔrCp° [J/(mol K)]; K is dimensionless on p° (1 bar unless stated). Main
reference: J. M. Smith, H. C. Van Ness, M. M. Abbott, *Introduction to Chemical
Engineering Thermodynamics*, 7th ed., McGraw-Hill, 2005, ch. 13.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass

import numpy as np
from numpy.typing import ArrayLike, NDArray

from ._validate import as_temperature
from .constants import T_REF, R
from .errors import ConvergenceError, InputError

# K from partial pressures and Clausius-Clapeyron enthalpies live in eqconv.measured and are
# re-exported here (eqconv.measured imports this module only inside its functions: no cycle).
from .measured import K_from_partial_pressures, enthalpy_from_vapour_pressure

__all__ = [
    "HeatCapacityFit",
    "K_at_T2",
    "K_from_partial_pressures",
    "VantHoffFit",
    "delta_H_from_two_K",
    "delta_S_from_K",
    "enthalpy_from_vapour_pressure",
    "fit_vant_hoff",
    "temperature_for_K",
    "temperature_for_K_vant_hoff",
]

FloatArray = NDArray[np.float64]
_EPS = float(np.finfo(float).eps)
_TINY = float(np.finfo(float).tiny)
_LN_MAX = float(np.log(np.finfo(float).max))


def _first(arr: FloatArray, bad: NDArray[np.bool_]) -> float:
    return float(arr[bad].flat[0])


def _finite(x: ArrayLike, name: str, unit: str, positive: bool = False) -> FloatArray:
    arr = np.asarray(x, dtype=float)
    bad = ~np.isfinite(arr) | ((arr <= 0.0) if positive else False)
    if np.any(bad):
        raise InputError(
            f"{name} must be finite{' and > 0' if positive else ''} [{unit}]; got "
            f"{_first(arr, bad)!r} ({int(np.count_nonzero(bad))} bad value(s))"
        )
    return arr


def _positive(x: ArrayLike, name: str) -> FloatArray:
    return _finite(x, name, "-", positive=True)


def _fraction(x: float, name: str) -> float:
    if not 0.0 < float(x) < 1.0:
        raise InputError(f"{name} must lie strictly between 0 and 1; got {x!r}")
    return float(x)


def _out(x: FloatArray) -> FloatArray:
    """Scalar-shaped input gives a numpy scalar back, arrays stay arrays."""
    return x[()] if x.ndim == 0 else x


def _exp_checked(ln_x: FloatArray, name: str) -> FloatArray:
    """exp() that raises instead of returning inf, a denormal or zero."""
    bad = (ln_x > _LN_MAX) | (ln_x < np.log(_TINY))
    if np.any(bad):
        raise InputError(
            f"{name} is outside the floating-point range: ln {name} = "
            f"{_first(ln_x, bad)!r}; work with ln K instead"
        )
    return np.exp(ln_x)


def _inv_T_diff(T1: FloatArray, T2: FloatArray) -> FloatArray:
    """1/T2 - 1/T1 [1/K], written to avoid cancellation when T1 is close to T2."""
    return (T1 - T2) / (T1 * T2)


def _ln_ratio(num: FloatArray, den: FloatArray) -> FloatArray:
    """ln(num/den) with a single rounding in the ratio whenever it is representable."""
    with np.errstate(over="ignore", under="ignore"):
        ratio = num / den
    ok = np.isfinite(ratio) & (ratio >= _TINY)
    return np.where(ok, np.log(np.where(ok, ratio, 1.0)), np.log(num) - np.log(den))


def delta_H_from_two_K(T1: ArrayLike, K1: ArrayLike, T2: ArrayLike, K2: ArrayLike) -> FloatArray:
    """Standard reaction enthalpy from K at two temperatures (constant-ΔrH° van 't Hoff).

    Parameters
    ----------
    T1, T2 : array_like
        Temperatures [K], > 0, T1 != T2.
    K1, K2 : array_like
        Equilibrium constants at T1 and T2 [-], > 0.

    Returns
    -------
    ndarray
        ΔrH° [J/mol], broadcast shape of the inputs.

    Raises
    ------
    InputError
        If a T or K is not > 0, or T1 == T2.

    Notes
    -----
    Integral of d ln K/dT = ΔrH°/(R T²) at constant ΔrH° [1]_:
    :math:`\\ln(K_2/K_1) = -(\\Delta_r H^\\circ/R)(1/T_2 - 1/T_1)`. Inverse of
    :func:`K_at_T2`; the relative rounding error is a few ulp / |ln(K2/K1)|, all the
    information a float K carries.

    References
    ----------
    .. [1] Smith, Van Ness & Abbott (2005), ch. 13.

    Examples
    --------
    Invented measurements: K falls from 10 to 1 between 500 K and 600 K.

    >>> round(float(delta_H_from_two_K(500.0, 10.0, 600.0, 1.0)))
    -57434
    """
    t1, t2 = as_temperature(T1, "T1"), as_temperature(T2, "T2")
    t1, t2, k1, k2 = np.broadcast_arrays(t1, t2, _positive(K1, "K1"), _positive(K2, "K2"))
    same = t1 == t2
    if np.any(same):
        raise InputError(f"T1 and T2 must differ; both are {_first(t1, same)!r} K")
    return _out(-R * _ln_ratio(k2, k1) / _inv_T_diff(t1, t2))


def K_at_T2(K1: ArrayLike, T1: ArrayLike, T2: ArrayLike, delta_H: ArrayLike) -> FloatArray:
    """Equilibrium constant at T2 from K at T1 with a constant ΔrH° (van 't Hoff).

    Parameters
    ----------
    K1, T1, T2, delta_H : array_like
        K at T1 [-] > 0, temperatures [K] > 0, ΔrH° [J/mol]; broadcast.

    Returns
    -------
    ndarray
        K at T2 [-], broadcast shape of the inputs.

    Raises
    ------
    InputError
        If a T or K is not > 0, ΔrH° is not finite, or K2 overflows the float range.

    Notes
    -----
    :math:`K_2 = K_1 \\exp[-(\\Delta_r H^\\circ/R)(1/T_2 - 1/T_1)]`, ΔrCp° = 0 [1]_.
    Inverse of :func:`delta_H_from_two_K`.

    References
    ----------
    .. [1] Smith, Van Ness & Abbott (2005), ch. 13.

    Examples
    --------
    >>> round(float(K_at_T2(10.0, 500.0, 600.0, -57434.27)), 4)
    1.0
    """
    k1 = _positive(K1, "K1")
    t1, t2 = as_temperature(T1, "T1"), as_temperature(T2, "T2")
    k1, t1, t2, dh = np.broadcast_arrays(k1, t1, t2, _finite(delta_H, "delta_H", "J/mol"))
    x = -dh / R * _inv_T_diff(t1, t2)
    with np.errstate(over="ignore", under="ignore"):
        k2 = k1 * np.exp(x)
    ok = np.isfinite(k2) & (k2 >= _TINY)
    if not np.all(ok):  # exp(x) alone over/underflowed, or K2 really is out of range
        k2 = np.where(ok, k2, _exp_checked(np.where(ok, 0.0, np.log(k1) + x), "K2"))
    return _out(k2)


def delta_S_from_K(T: ArrayLike, K: ArrayLike, delta_H: ArrayLike) -> FloatArray:
    """Standard reaction entropy [J/(mol K)] from K [-] and ΔrH° [J/mol] at T [K].

    Parameters
    ----------
    T, K, delta_H : array_like
        Temperature [K] > 0, equilibrium constant [-] > 0 and ΔrH° [J/mol] at T.

    Returns
    -------
    ndarray
        ΔrS° [J/(mol K)].

    Raises
    ------
    InputError
        If T or K is not > 0 or ΔrH° is not finite.

    Notes
    -----
    From ΔrG° = -R T ln K = ΔrH° - T ΔrS° [1]_:
    :math:`\\Delta_r S^\\circ = \\Delta_r H^\\circ / T + R \\ln K`.

    References
    ----------
    .. [1] Smith, Van Ness & Abbott (2005), ch. 13.

    Examples
    --------
    >>> round(float(delta_S_from_K(500.0, 10.0, -57434.27)), 3)
    -95.724
    """
    dh = _finite(delta_H, "delta_H", "J/mol")
    return _out(dh / as_temperature(T) + R * np.log(_positive(K, "K")))


def temperature_for_K_vant_hoff(
    K_target: ArrayLike, delta_H: ArrayLike, delta_S: ArrayLike
) -> FloatArray:
    """Temperature [K] at which K reaches `K_target` for constant ΔrH°, ΔrS° (closed form).

    Parameters
    ----------
    K_target, delta_H, delta_S : array_like
        Target K [-] > 0 (1: the ΔrG° = 0 crossover), ΔrH° [J/mol], ΔrS° [J/(mol K)].

    Returns
    -------
    ndarray
        T [K].

    Raises
    ------
    InputError
        If no finite T > 0 gives K = K_target (ΔrH° and ΔrS° - R ln K of opposite sign).

    Notes
    -----
    :math:`T = \\Delta_r H^\\circ / (\\Delta_r S^\\circ - R \\ln K)` [1]_.

    References
    ----------
    .. [1] Smith, Van Ness & Abbott (2005), ch. 13.

    Examples
    --------
    >>> round(float(temperature_for_K_vant_hoff(10.0, -57434.27, -95.7238)), 2)
    500.0
    """
    k = _positive(K_target, "K_target")
    dh = _finite(delta_H, "delta_H", "J/mol")
    k, dh, ds = np.broadcast_arrays(k, dh, _finite(delta_S, "delta_S", "J/(mol K)"))
    den = ds - R * np.log(k)
    with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
        t = dh / den
    bad = ~np.isfinite(t) | (t <= 0.0)
    if np.any(bad):
        i = np.flatnonzero(bad.ravel())[0]
        raise InputError(
            f"no T > 0 gives K = {k.flat[i]:g} with delta_H = {dh.flat[i]:g} J/mol, delta_S = "
            f"{ds.flat[i]:g} J/(mol K) (delta_S - R ln K = {den.flat[i]:g} J/(mol K))"
        )
    return _out(t)


def _eval_ln_K(ln_K: Callable[[FloatArray], ArrayLike], T: FloatArray) -> FloatArray:
    raw = np.asarray(ln_K(T), dtype=float)
    try:
        val = np.broadcast_to(raw, T.shape)
    except ValueError:
        raise InputError(
            f"ln_K must be vectorized; for T of shape {T.shape} it returned shape {raw.shape}"
        ) from None
    bad = ~np.isfinite(val)
    if np.any(bad):
        raise InputError(
            f"ln_K returned {_first(val, bad)!r} at T = {_first(T, bad)!r} K (non-finite); "
            "narrow T_bounds to the callable's valid range"
        )
    return val


def _bracket(f: FloatArray, grid: FloatArray, k: FloatArray, where: str) -> FloatArray:
    """Scan interval holding each target's one crossing (-1 - i: exact zero at grid[i])."""
    zero = f == 0.0
    change = np.sign(f[:-1]) * np.sign(f[1:]) < 0.0
    count = zero.sum(axis=0) + change.sum(axis=0)
    if np.any(count != 1):
        j = int(np.flatnonzero(count != 1)[0])
        ln_k = float(np.log(k.flat[j]))
        head = f"K_target = {float(k.flat[j])!r} (ln K = {ln_k:.6g}) {where}"
        if count[j] == 0:
            lo, hi = float(f[:, j].min() + ln_k), float(f[:, j].max() + ln_k)
            raise InputError(
                f"no crossing of {head}: ln K runs from {lo:.6g} to {hi:.6g} there; "
                "widen T_bounds or check K_target"
            )
        near = grid[np.flatnonzero(zero[:, j] | np.r_[change[:, j], False])]
        raise InputError(
            f"{int(count[j])} crossings of {head} (near T = {np.round(near, 1).tolist()} K); "
            "narrow T_bounds to bracket one"
        )
    return np.where(zero.any(axis=0), -1 - np.argmax(zero, axis=0), np.argmax(change, axis=0))


def temperature_for_K(
    ln_K: Callable[[FloatArray], ArrayLike],
    K_target: ArrayLike = 1.0,
    T_bounds: tuple[float, float] = (200.0, 2000.0),
    *,
    n_scan: int = 64,
    xtol: float = 1e-9,
    rtol: float = 4.0 * _EPS,
    max_iter: int = 200,
) -> FloatArray:
    """Temperature at which ln K(T) reaches ln `K_target`, by bracketed root finding.

    Parameters
    ----------
    ln_K : callable
        Vectorized T [K] (ndarray) -> ln K [-] of the same shape, e.g. a bound method
        ``reaction.ln_K``.
    K_target : array_like, optional
        Target equilibrium constant(s) [-], > 0. Default 1 (ΔrG° = 0).
    T_bounds : (float, float), optional
        Search interval (T_lo, T_hi) [K], 0 < T_lo < T_hi. Default (200, 2000).
    n_scan, xtol, rtol, max_iter : optional
        Scan points (uniform in 1/T, >= 2) used to bracket the crossing; absolute [K] and
        relative [-] tolerance on T; iteration limit.

    Returns
    -------
    ndarray
        T [K] with ln K(T) = ln K_target, shape of `K_target`.

    Raises
    ------
    InputError
        If `T_bounds` hold no crossing or more than one (the message names the bounds and
        the ln K range there), or `ln_K` returns non-finite values.
    ConvergenceError
        If a target misses the tolerance within `max_iter` iterations.

    Notes
    -----
    Solves ln K(T) - ln K_target = 0 to |ΔT| <= xtol + rtol T. A scan at `n_scan` points
    must find exactly one sign change (two crossings within one scan step go unnoticed);
    all targets are then refined together, one call of `ln_K` per iteration, by the
    Illinois regula falsi (bracketing, superlinear), safeguarded by bisection [1]_.

    References
    ----------
    .. [1] M. Dowell, P. Jarratt, "A modified regula falsi method for computing the root
       of an equation", BIT 11 (1971) 168-174.

    Examples
    --------
    Invented reaction with ln K = 6900/T - 11.5:

    >>> round(float(temperature_for_K(lambda T: 6900.0 / T - 11.5)), 6)
    600.0
    """
    t_lo, t_hi = (float(v) for v in T_bounds)
    if not (np.isfinite(t_lo) and np.isfinite(t_hi) and 0.0 < t_lo < t_hi):
        raise InputError(f"T_bounds must satisfy 0 < T_lo < T_hi [K]; got {T_bounds!r}")
    if n_scan < 2:
        raise InputError(f"n_scan must be >= 2; got {n_scan!r}")
    k = _positive(K_target, "K_target")
    target = np.log(k).ravel()
    grid = 1.0 / np.linspace(1.0 / t_lo, 1.0 / t_hi, n_scan)
    grid[0], grid[-1] = t_lo, t_hi
    f = _eval_ln_K(ln_K, grid)[:, None] - target[None, :]
    idx = _bracket(f, grid, k, f"between T_lo = {t_lo:g} K and T_hi = {t_hi:g} K")
    i, cols = np.maximum(idx, 0), np.arange(target.size)
    a, b, fa, fb = grid[i], grid[i + 1], f[i, cols], f[i + 1, cols]
    done = idx < 0
    a[done] = b[done] = grid[-1 - idx[done]]
    for _ in range(max_iter):
        live = np.flatnonzero(~done & (np.abs(b - a) > xtol + rtol * np.abs(b)))
        if live.size == 0:
            break
        a_, b_, fa_, fb_ = a[live], b[live], fa[live], fb[live]
        m = b_ - fb_ * (b_ - a_) / (fb_ - fa_)
        inside = (m - a_) * (m - b_) < 0.0
        m = np.where(inside, m, 0.5 * (a_ + b_))  # safeguard: bisect
        fm = _eval_ln_K(ln_K, m) - target[live]
        flip = np.sign(fm) != np.sign(fb_)  # root between b and m: b becomes the far end
        a[live] = np.where(flip, b_, a_)
        fa[live] = np.where(flip, fb_, np.where(inside, 0.5, 1.0) * fa_)  # Illinois step
        b[live], fb[live] = m, fm
        hit = live[fm == 0.0]
        a[hit], done[hit] = b[hit], True
    else:
        bad = ~done & (np.abs(b - a) > xtol + rtol * np.abs(b))
        if np.any(bad):
            raise ConvergenceError(
                f"{int(bad.sum())} target(s) missed the tolerance after {max_iter} iterations "
                f"(first: K_target = {float(k.ravel()[bad][0])!r})"
            )
    return _out(np.where(np.abs(fb) <= np.abs(fa), b, a).reshape(k.shape))


@dataclass(frozen=True, eq=False)
class _LinFit:
    beta: FloatArray
    cov_unit: FloatArray  # (X^T W X)^-1
    resid: FloatArray  # y - X beta, unweighted
    rss: float  # Σ w r²
    r2: float
    dof: int


def _wls(X: FloatArray, y: FloatArray, w: FloatArray) -> _LinFit | None:
    """Weighted linear least squares by SVD of the column-scaled design; None if singular."""
    sw = np.sqrt(w)
    Xw, yw = X * sw[:, None], y * sw
    scale = np.linalg.norm(Xw, axis=0)
    U, s, Vt = np.linalg.svd(Xw / scale, full_matrices=False)
    if s[-1] <= 1e-11 * s[0]:
        return None
    beta = (Vt.T @ ((U.T @ yw) / s)) / scale
    cov_unit = ((Vt.T / s**2) @ Vt) / np.outer(scale, scale)
    resid = y - X @ beta
    rss = float(np.sum(w * resid**2))
    tss = float(np.sum(w * (y - np.sum(w * y) / np.sum(w)) ** 2))
    r2 = 1.0 - rss / tss if tss > 0.0 else 1.0
    return _LinFit(beta, cov_unit, resid, rss, r2, X.shape[0] - X.shape[1])


def _ci(value: float, se: float, q: float) -> tuple[float, float]:
    return (value - q * se, value + q * se)


@dataclass(frozen=True, eq=False)
class HeatCapacityFit:
    """Constant-ΔrCp° fit, ln K = -ΔrH°₀/(RT) + ΔrS°₀/R + ΔrCp°/R (ln(T/T0) + T0/T - 1)."""

    T_ref: float  #: reference temperature T0 of delta_H and delta_S [K]
    delta_H: float  #: ΔrH° at T_ref [J/mol]
    delta_S: float  #: ΔrS° at T_ref [J/(mol K)]
    delta_Cp: float  #: constant ΔrCp° [J/(mol K)]
    se_delta_H: float  #: standard error of delta_H [J/mol]
    se_delta_S: float  #: standard error of delta_S [J/(mol K)]
    se_delta_Cp: float  #: standard error of delta_Cp [J/(mol K)]
    ci_delta_H: tuple[float, float]  #: confidence interval of delta_H [J/mol]
    ci_delta_S: tuple[float, float]  #: confidence interval of delta_S [J/(mol K)]
    ci_delta_Cp: tuple[float, float]  #: confidence interval of delta_Cp [J/(mol K)]
    covariance: FloatArray  #: (3, 3) covariance of (delta_H, delta_S, delta_Cp)
    residuals: FloatArray  #: ln K data minus fitted ln K [-]
    r_squared: float  #: (weighted) coefficient of determination [-]
    dof: int  #: residual degrees of freedom, n - 3

    def ln_K(self, T: ArrayLike) -> FloatArray:
        """ln K [-] of the fitted model at T [K]."""
        t, t0 = as_temperature(T), self.T_ref
        curv = np.log(t / t0) + t0 / t - 1.0
        return _out(-self.delta_H / (R * t) + self.delta_S / R + self.delta_Cp / R * curv)


@dataclass(frozen=True, eq=False)
class VantHoffFit:
    """Result of :func:`fit_vant_hoff`, model ln K = -ΔrH°/(R T) + ΔrS°/R.

    Intervals use Student t with `dof` (the normal quantile when `absolute_sigma`). The
    curvature fields are None when the ΔrCp° term cannot be tested (fewer than 4 points
    or 3 distinct temperatures); `cp_fit` is given only when the term is needed.
    """

    delta_H: float  #: ΔrH°, constant over the data range [J/mol]
    delta_S: float  #: ΔrS°, constant over the data range [J/(mol K)]
    se_delta_H: float  #: standard error of delta_H [J/mol]
    se_delta_S: float  #: standard error of delta_S [J/(mol K)]
    ci_delta_H: tuple[float, float]  #: confidence interval of delta_H [J/mol]
    ci_delta_S: tuple[float, float]  #: confidence interval of delta_S [J/(mol K)]
    covariance: FloatArray  #: (2, 2) covariance of (delta_H, delta_S)
    residuals: FloatArray  #: ln K data minus fitted ln K [-], input order
    r_squared: float  #: (weighted) coefficient of determination [-]
    n: int  #: number of points
    dof: int  #: residual degrees of freedom, n - 2
    confidence: float  #: level of the intervals
    significance: float  #: significance level of the curvature test
    weighted: bool  #: sigma_lnK was given
    absolute_sigma: bool  #: sigma_lnK taken as absolute
    T_min: float  #: lowest temperature of the data [K]
    T_max: float  #: highest temperature of the data [K]
    curvature_statistic: float | None  #: F (chi-square difference if absolute_sigma)
    curvature_p_value: float | None  #: p-value of adding the ΔrCp° term
    cp_term_needed: bool | None  #: curvature_p_value < significance
    verdict: str  #: plain-language conclusion of the curvature test
    cp_fit: HeatCapacityFit | None  #: three-parameter fit, when the term is needed

    def ln_K(self, T: ArrayLike) -> FloatArray:
        """ln K [-] of the constant-ΔrH° model at T [K] (vectorized)."""
        return _out(-self.delta_H / (R * as_temperature(T)) + self.delta_S / R)


def _weights(sigma: ArrayLike | None, shape: tuple[int, ...], name: str) -> FloatArray:
    if sigma is None:
        return np.ones(shape)
    sig = _finite(np.broadcast_to(np.asarray(sigma, dtype=float), shape), name, "-", True)
    return 1.0 / sig**2


def _curvature_p(fit2: _LinFit, fit3: _LinFit, floor: float, absolute: bool) -> list[float]:
    """Statistic and p-value of the ΔrCp° term (F test, or chi-square with known sigma)."""
    from scipy import stats  # (imported here: scipy.stats is slow to import)

    drop = max(fit2.rss - fit3.rss, 0.0)
    if fit2.rss <= floor:  # a straight line to rounding precision
        return [0.0, 1.0]
    if absolute:
        return [drop, float(stats.chi2.sf(drop, 1))]
    if fit3.rss <= floor:
        return [float("inf"), 0.0]
    stat = drop / (fit3.rss / fit3.dof)
    return [stat, float(stats.f.sf(stat, 1, fit3.dof))]


def fit_vant_hoff(
    T: ArrayLike,
    K: ArrayLike,
    *,
    sigma_lnK: ArrayLike | None = None,
    absolute_sigma: bool = False,
    confidence: float = 0.95,
    significance: float = 0.05,
    T_ref: float = T_REF,
) -> VantHoffFit:
    """Least-squares van 't Hoff regression of ln K on 1/T, with a heat-capacity test.

    Parameters
    ----------
    T, K : array_like, shape (n,)
        Temperatures [K] > 0 (2 or more distinct), equilibrium constants [-] > 0; n >= 3.
    sigma_lnK : array_like, optional
        Standard uncertainty of each ln K [-], > 0, scalar or (n,): weighted least squares
        with weights 1/sigma². Default unweighted.
    absolute_sigma : bool, optional
        If True, `sigma_lnK` is absolute: covariances are not rescaled by the residuals,
        intervals use the normal quantile and the curvature test a chi-square difference.
        Default False: residual scale, Student t, F test.
    confidence, significance : float, optional
        Levels of the intervals (0.95) and of the curvature test (0.05), in (0, 1).
    T_ref : float, optional
        Reference temperature of the three-parameter fit [K]. Default 298.15.

    Returns
    -------
    VantHoffFit
        Frozen result with estimates, errors, intervals and the curvature verdict.

    Raises
    ------
    InputError
        Fewer than 3 points, shapes that differ, T or K not > 0, sigma not > 0, fewer than
        2 distinct temperatures, or a level outside (0, 1).

    Notes
    -----
    Model :math:`\\ln K = -\\Delta_r H^\\circ/(R T) + \\Delta_r S^\\circ/R` [1]_. The
    curvature test also fits a constant ΔrCp° (integrated Kirchhoff form ln K =
    a + b/T + c ln T, c = ΔrCp°/R), written about T0 = `T_ref`,

    .. math:: \\ln K = -\\frac{\\Delta_r H^\\circ_0}{R T} + \\frac{\\Delta_r S^\\circ_0}{R}
              + \\frac{\\Delta_r C_p^\\circ}{R}
              \\left(\\ln\\frac{T}{T_0} + \\frac{T_0}{T} - 1\\right)

    and refers F = (RSS₂ - RSS₃) / (RSS₃ / (n - 3)) to F(1, n - 3) [2]_; the term is
    needed when p < `significance`. ΔrH°(T0) far outside the data range is an
    extrapolation, and its standard error shows it.

    References
    ----------
    .. [1] Smith, Van Ness & Abbott (2005), ch. 13.
    .. [2] Draper & Smith, *Applied Regression Analysis*, 3rd ed. (1998).

    Examples
    --------
    Invented data on an exact line, ΔrH° = -50 kJ/mol, ΔrS° = -100 J/(mol K):

    >>> import numpy as np
    >>> T = np.array([400.0, 450.0, 500.0, 550.0, 600.0])
    >>> fit = fit_vant_hoff(T, np.exp(50e3 / (8.314462618 * T) - 100 / 8.314462618))
    >>> round(fit.delta_H), round(fit.delta_S, 6), fit.cp_term_needed
    (-50000, -100.0, False)
    """
    conf, alpha = _fraction(confidence, "confidence"), _fraction(significance, "significance")
    if np.ndim(T) != 1:
        raise InputError(f"T must be one-dimensional; got shape {np.shape(T)}")
    t, k = as_temperature(T), _positive(K, "K")
    if k.shape != t.shape:
        raise InputError(f"T and K must have the same shape; got {t.shape} and {k.shape}")
    n, n_distinct = t.size, np.unique(t).size
    if n < 3:
        raise InputError(f"fit_vant_hoff needs at least 3 points; got {n}")
    if n_distinct < 2:
        raise InputError(f"T must hold at least 2 distinct temperatures; all are {t[0]:g} K")
    t0 = float(as_temperature(T_ref, "T_ref"))
    w = _weights(sigma_lnK, t.shape, "sigma_lnK")
    absolute = bool(absolute_sigma) and sigma_lnK is not None
    y = np.log(k)

    from scipy import stats  # (imported here: scipy.stats is slow to import)

    def errors(fit: _LinFit) -> tuple[FloatArray, list[float], float]:
        scale = 1.0 if absolute else fit.rss / fit.dof
        q = stats.norm.ppf(0.5 + conf / 2) if absolute else stats.t.ppf(0.5 + conf / 2, fit.dof)
        cov = fit.cov_unit * scale
        return cov, [float(v) for v in np.sqrt(np.diag(cov))], float(q)

    X2 = np.column_stack([-1.0 / (R * t), np.full(n, 1.0 / R)])
    fit2 = _wls(X2, y, w)
    if fit2 is None:
        raise InputError(f"temperatures {t.min():g}-{t.max():g} K too close to fit a slope")
    cov2, se2, q2 = errors(fit2)
    dh, ds = float(fit2.beta[0]), float(fit2.beta[1])

    X3 = np.column_stack([X2, (np.log(t / t0) + t0 / t - 1.0) / R])
    fit3 = _wls(X3, y, w) if n >= 4 else None
    stat: float | None = None
    p: float | None = None
    cp_fit: HeatCapacityFit | None = None
    span = f"{t.min():g}-{t.max():g} K"
    if fit3 is None:
        verdict = (
            "The heat-capacity term cannot be tested: it needs at least 4 points at 3 or "
            f"more well-separated temperatures (got {n} points at {n_distinct})."
        )
    else:
        floor = n * (16.0 * _EPS * float(np.max(np.abs(y * np.sqrt(w))))) ** 2
        stat, p = _curvature_p(fit2, fit3, floor, absolute)
        test = f"({'chi-square difference' if absolute else 'F'} = {stat:.4g}, p = {p:.3g})"
        if p < alpha:
            cov3, e, q3 = errors(fit3)
            b = [float(v) for v in fit3.beta]
            cp_fit = HeatCapacityFit(
                T_ref=t0, delta_H=b[0], delta_S=b[1], delta_Cp=b[2], se_delta_H=e[0],
                se_delta_S=e[1], se_delta_Cp=e[2], ci_delta_H=_ci(b[0], e[0], q3),
                ci_delta_S=_ci(b[1], e[1], q3), ci_delta_Cp=_ci(b[2], e[2], q3),
                covariance=cov3, residuals=fit3.resid, r_squared=fit3.r2, dof=fit3.dof,
            )  # fmt: skip
            verdict = (
                f"A heat-capacity term is needed at the {alpha:g} significance level {test}: "
                f"ln K is curved in 1/T, so ΔrH° is not constant over {span}. Use cp_fit "
                f"(ΔrCp° = {b[2]:.4g} ± {e[2]:.2g} J/(mol K))."
            )
        else:
            verdict = (
                f"No heat-capacity term is needed at the {alpha:g} significance level {test}: "
                f"the data are consistent with a constant ΔrH° over {span}."
            )
    return VantHoffFit(
        delta_H=dh, delta_S=ds, se_delta_H=se2[0], se_delta_S=se2[1],
        ci_delta_H=_ci(dh, se2[0], q2), ci_delta_S=_ci(ds, se2[1], q2), covariance=cov2,
        residuals=fit2.resid, r_squared=fit2.r2, n=n, dof=fit2.dof, confidence=conf,
        significance=alpha, weighted=sigma_lnK is not None, absolute_sigma=absolute,
        T_min=float(t.min()), T_max=float(t.max()), curvature_statistic=stat,
        curvature_p_value=p, cp_term_needed=None if p is None else p < alpha,
        verdict=verdict, cp_fit=cp_fit,
    )  # fmt: skip
