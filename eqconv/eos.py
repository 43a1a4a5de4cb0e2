"""Fugacity coefficients of gas mixtures from cubic equations of state (pure array layer).

Two classical two-parameter cubics are available, both with van der Waals one-fluid mixing
rules: Peng-Robinson (1976) and Soave-Redlich-Kwong (1972). Every function here is vectorized
over a grid of states: the cubic in the compressibility factor ``Z`` is solved in closed form
for all points at once (trigonometric / Cardano formulae) and each root is polished with
guarded Newton steps. The module knows nothing of species names or data sources; critical
constants and interaction parameters come from :mod:`eqconv.eos_data` or from the caller.

This is a **gas-phase solver**: where the cubic has three physical roots it returns the largest
``Z`` (the vapour-like root) and says so per point; where it has one root it returns that root
and flags points where that root is liquid-like. It is not a phase-stability test; a mixture
can condense where the one-fluid cubic reports a single gas-like root.

References
----------
.. [1] D.-Y. Peng and D. B. Robinson, "A New Two-Constant Equation of State",
   Ind. Eng. Chem. Fundam. 15, 59-64 (1976). doi:10.1021/i160057a011
.. [2] G. Soave, "Equilibrium constants from a modified Redlich-Kwong equation of state",
   Chem. Eng. Sci. 27, 1197-1203 (1972). doi:10.1016/0009-2509(72)80096-4
.. [3] B. E. Poling, J. M. Prausnitz and J. P. O'Connell, *The Properties of Gases and
   Liquids*, 5th ed., McGraw-Hill (2001), ch. 4-5 (generic cubic, fugacity coefficients).
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Literal

import numpy as np
from numpy.typing import ArrayLike, NDArray

from ._validate import as_pressure, as_temperature
from .constants import R
from .errors import ConvergenceError, InputError

__all__ = [
    "EOS_KINDS",
    "CubicForm",
    "FugacityResult",
    "cubic_form",
    "ln_phi_mixture",
    "ln_phi_pure",
]

EosKind = Literal["peng-robinson", "srk"]

#: Accepted values of the ``kind`` argument.
EOS_KINDS: tuple[str, ...] = ("peng-robinson", "srk")


@dataclass(frozen=True)
class CubicForm:
    """Constants of a generic two-parameter cubic ``P = RT/(V-b) - a/((V+d1 b)(V+d2 b))``.

    Attributes
    ----------
    kind : str
        ``"peng-robinson"`` or ``"srk"``.
    omega_a, omega_b : float
        ``a_c = omega_a R^2 Tc^2 / Pc`` [J m^3/mol^2] and ``b = omega_b R Tc / Pc`` [m^3/mol].
    z_c : float
        Critical compressibility factor of the cubic [-].
    d1, d2 : float
        Roots of the attractive-term denominator in units of ``b`` [-].
    m0, m1, m2 : float
        Alpha-function slope ``m = m0 + m1 omega + m2 omega^2`` [-] in
        ``alpha = (1 + m (1 - sqrt(T/Tc)))^2``.
    """

    kind: str
    omega_a: float
    omega_b: float
    z_c: float
    d1: float
    d2: float
    m0: float
    m1: float
    m2: float


_SQRT2 = math.sqrt(2.0)
# Peng-Robinson: omega_b is the real root of 64 x^3 + 6 x^2 + 12 x - 1 = 0, Zc = (1 - omega_b)/3,
# omega_a = 3 Zc^2 + 3 omega_b^2 + 2 omega_b (the triple-root conditions at the critical point).
_PR = CubicForm(
    kind="peng-robinson",
    omega_a=0.4572355289213821893834601962251837888504,
    omega_b=0.0777960739038884559718447100373331839711,
    z_c=0.3074013086987038480093850966542222720096,
    d1=1.0 + _SQRT2,
    d2=1.0 - _SQRT2,
    m0=0.37464,
    m1=1.54226,
    m2=-0.26992,
)
# Soave-Redlich-Kwong: omega_b = (2^(1/3) - 1)/3, omega_a = 1/(9 (2^(1/3) - 1)), Zc = 1/3.
_CBRT2_M1 = 2.0 ** (1.0 / 3.0) - 1.0
_SRK = CubicForm(
    kind="srk",
    omega_a=1.0 / (9.0 * _CBRT2_M1),
    omega_b=_CBRT2_M1 / 3.0,
    z_c=1.0 / 3.0,
    d1=1.0,
    d2=0.0,
    m0=0.480,
    m1=1.574,
    m2=-0.176,
)
_FORMS = {"peng-robinson": _PR, "srk": _SRK}


def cubic_form(kind: str) -> CubicForm:
    """Return the constants of the cubic named `kind` (``"peng-robinson"`` or ``"srk"``).

    Raises
    ------
    InputError
        If `kind` is not one of :data:`EOS_KINDS`.
    """
    try:
        return _FORMS[kind]
    except (KeyError, TypeError):
        raise InputError(f"kind must be one of {EOS_KINDS}; got {kind!r}") from None


@dataclass(frozen=True)
class FugacityResult:
    """Gas-root solution of a cubic equation of state on a grid of states.

    Attributes
    ----------
    ln_phi : ndarray, shape (..., nc) (shape (...) from :func:`ln_phi_pure`)
        Natural logarithm of the fugacity coefficient of each component [-].
    Z : ndarray, shape (...)
        Compressibility factor ``P V / (R T)`` of the chosen (largest) root [-].
    liquid_like : ndarray of bool, shape (...)
        True where the cubic has a single physical root and that root is liquid-like
        (criterion in the Notes of :func:`ln_phi_mixture`). The caller should warn there.
    three_roots : ndarray of bool, shape (...)
        True where the cubic has three physical roots (``Z > B``); the largest was taken.
    gas_metastable : ndarray of bool, shape (...)
        True where three roots exist and the smallest has the lower molar Gibbs energy at
        this composition, i.e. the returned gas root is metastable (the fluid of this
        composition would rather be liquid).
    """

    ln_phi: NDArray[np.float64]
    Z: NDArray[np.float64]
    liquid_like: NDArray[np.bool_]
    three_roots: NDArray[np.bool_]
    gas_metastable: NDArray[np.bool_]


# ----------------------------------------------------------------------------------- checks


def _component_vector(x: ArrayLike, name: str, positive: bool) -> NDArray[np.float64]:
    arr = np.asarray(x, dtype=float)
    if arr.ndim != 1 or arr.size == 0:
        raise InputError(
            f"{name} must be a non-empty 1-D array (one value per component); got shape {arr.shape}"
        )
    bad = ~np.isfinite(arr) | (arr <= 0.0) if positive else ~np.isfinite(arr)
    if np.any(bad):
        what = "finite and > 0" if positive else "finite"
        raise InputError(
            f"{name} must be {what}; got {arr[bad][0]!r} at index {int(np.flatnonzero(bad)[0])}"
        )
    return arr


def _check_kij(kij: ArrayLike | None, nc: int) -> NDArray[np.float64]:
    if kij is None:
        return np.zeros((nc, nc))
    k = np.asarray(kij, dtype=float)
    if k.shape != (nc, nc):
        raise InputError(f"kij must have shape ({nc}, {nc}); got {k.shape}")
    if not np.all(np.isfinite(k)):
        raise InputError("kij must be finite; got a NaN or infinite entry")
    if np.any(np.diag(k) != 0.0):
        raise InputError(f"kij must have a zero diagonal; got diagonal {np.diag(k).tolist()}")
    asym = np.abs(k - k.T)
    if np.any(asym > 1e-12):
        i, j = np.unravel_index(int(np.argmax(asym)), k.shape)
        raise InputError(
            f"kij must be symmetric; got kij[{i},{j}]={k[i, j]!r} but kij[{j},{i}]={k[j, i]!r}"
        )
    return k


def _check_fractions(y: ArrayLike, nc: int) -> NDArray[np.float64]:
    arr = np.asarray(y, dtype=float)
    if arr.ndim == 0 or arr.shape[-1] != nc:
        raise InputError(
            f"y must have shape (..., {nc}) (last axis = components); got shape {arr.shape}"
        )
    if arr.size and not arr.min() >= 0.0:  # also catches NaN
        bad = ~(arr >= 0.0)
        raise InputError(f"mole fractions y must be finite and >= 0; got {arr[bad][0]!r}")
    total = arr @ np.ones(nc)
    off = ~(np.abs(total - 1.0) <= 1e-9)  # also catches inf
    if np.any(off):
        raise InputError(
            f"mole fractions y must sum to 1 along the last axis (within 1e-9); "
            f"got a sum of {np.atleast_1d(total)[np.atleast_1d(off)][0]!r}"
        )
    return arr


# ----------------------------------------------------------------------------- cubic solver

#: Target number of (component x point) values per block of the vectorized kernel. Blocks
#: keep the working set in cache and spare the allocator; the loop runs over blocks of
#: thousands of points, never over single points.
_BLOCK_VALUES = 16384


def _poly(
    z: NDArray[np.float64],
    c2: NDArray[np.float64],
    c1: NDArray[np.float64],
    c0: NDArray[np.float64],
) -> NDArray[np.float64]:
    return ((z + c2) * z + c1) * z + c0


def _newton_polish(
    z: NDArray[np.float64],
    c2: NDArray[np.float64],
    c1: NDArray[np.float64],
    c0: NDArray[np.float64],
    steps: int,
) -> tuple[NDArray[np.float64], NDArray[np.float64]]:
    """Guarded Newton steps on ``z^3 + c2 z^2 + c1 z + c0`` (in place on `z`); a step is kept
    only where it lowers the residual. Returns the polished roots and their residuals."""
    f = _poly(z, c2, c1, c0)
    for _ in range(steps):
        df = (3.0 * z + 2.0 * c2) * z + c1
        with np.errstate(divide="ignore", invalid="ignore"):
            z_new = z - f / df
        f_new = _poly(z_new, c2, c1, c0)
        keep = np.abs(f_new) < np.abs(f)  # False for NaN / inf steps
        np.copyto(z, z_new, where=keep)
        np.copyto(f, f_new, where=keep)
    return z, f


def _solve_cubic(
    c2: NDArray[np.float64],
    c1: NDArray[np.float64],
    c0: NDArray[np.float64],
) -> tuple[NDArray[np.float64], NDArray[np.float64], NDArray[np.float64], NDArray[np.intp]]:
    """Largest real root of ``z^3 + c2 z^2 + c1 z + c0`` at every point, and the smallest
    real root where there are three.

    Returns ``(z_max, f_max, z_min3, idx3)``: the polished largest root and its residual at
    every point, and the smallest root ``z_min3`` (unpolished) at the points ``idx3`` (flat
    indices) with three real roots. The depressed cubic ``t^3 + p t + q`` (``z = t - c2/3``)
    is solved with the cancellation-free Cardano form ``t = w - p/(3w)``,
    ``w = cbrt(-q/2 - sign(q) sqrt(D))`` where its discriminant ``D = (q/2)^2 + (p/3)^3`` is
    >= 0 (one real root) and with the trigonometric form
    ``t = 2 sqrt(-p/3) cos(arccos(-q/(2 (-p/3)^(3/2)))/3)`` where ``D < 0``; there the two
    smaller roots follow from the deflated quadratic ``t^2 + t_max t + t_max^2 + p = 0``.
    One guarded Newton step polishes the largest root.
    """
    shift = c2 / 3.0
    p3 = c2 * shift
    np.subtract(c1, p3, out=p3)
    p3 /= 3.0  # p/3
    q = (2.0 / 9.0) * c2 * c2
    q -= c1
    q *= shift
    q += c0
    disc = 0.25 * q * q
    disc += p3 * p3 * p3
    t = np.empty_like(c2)
    one = disc >= 0.0
    idx1 = np.flatnonzero(one)
    idx3 = np.flatnonzero(~one)
    if idx1.size:  # one real root (Cardano)
        q1, p1 = q[idx1], p3[idx1]
        w = np.sqrt(disc[idx1])
        np.copysign(w, q1, out=w)
        w += 0.5 * q1
        np.negative(w, out=w)
        np.cbrt(w, out=w)
        with np.errstate(divide="ignore", invalid="ignore"):
            t1 = w - p1 / w
        np.copyto(t1, 0.0, where=w == 0.0)  # p = q = 0: triple root t = 0
        t[idx1] = t1
    z_min3 = np.empty(0)
    if idx3.size:  # three real roots (trigonometric), p < 0
        m_p3 = -p3[idx3]
        r = np.sqrt(m_p3)
        x = -0.5 * q[idx3]
        x /= r * m_p3
        np.clip(x, -1.0, 1.0, out=x)
        theta = np.arccos(x)
        theta /= 3.0
        t3 = np.cos(theta)
        t3 *= 2.0 * r
        t[idx3] = t3
        # smallest root from the deflated quadratic: t^2 + t3 t + (t3^2 + 3 p3) = 0
        disc2 = -0.75 * t3 * t3
        disc2 += 3.0 * m_p3
        np.maximum(disc2, 0.0, out=disc2)
        z_min3 = -0.5 * t3
        z_min3 -= np.sqrt(disc2)
        z_min3 -= shift[idx3]
    t -= shift
    z_max, f_max = _newton_polish(t, c2, c1, c0, steps=1)
    return z_max, f_max, z_min3, idx3


# ----------------------------------------------------------------------------- main routine


def _g_res(
    z: NDArray[np.float64], A: NDArray[np.float64], B: NDArray[np.float64], form: CubicForm
) -> NDArray[np.float64]:
    """Residual molar Gibbs energy ``G_res/(R T) = sum_i y_i ln phi_i`` of root `z` [-]."""
    log_ratio = np.log1p((form.d1 - form.d2) * B / (z + form.d2 * B))
    return (z - 1.0) - np.log(z - B) - A / ((form.d1 - form.d2) * B) * log_ratio


def _kernel(
    T: NDArray[np.float64],
    P: NDArray[np.float64],
    yt: NDArray[np.float64],
    s0: NDArray[np.float64],
    s1: NDArray[np.float64],
    b: NDArray[np.float64],
    one_minus_k: NDArray[np.float64],
    form: CubicForm,
    out_ln_phi: NDArray[np.float64],
    out_Z: NDArray[np.float64],
    out_flags: NDArray[np.bool_],
) -> None:
    """Solve one block of points; `yt` is component-major (nc, n). Writes into the outputs
    (``out_ln_phi`` (n, nc), ``out_Z`` (n,), ``out_flags`` (3, n)); raises on a failed root."""
    n = T.size
    # s_i = sqrt(a_i alpha_i(T)) = |s0_i - s1_i sqrt(T)|
    s = s1[:, None] * np.sqrt(T)
    np.subtract(s0[:, None], s, out=s)
    np.abs(s, out=s)
    ys = yt * s
    qv = one_minus_k @ ys  # q_i = sum_j (1 - k_ij) y_j s_j, so sum_j y_j a_ij = s_i q_i
    a_m = np.einsum("in,in->n", ys, qv)
    del ys
    b_m = b @ yt
    sq = s
    sq *= qv  # s_i q_i = sum_j y_j a_ij
    del qv

    rt_inv = 1.0 / (R * T)
    p_rt = P * rt_inv
    p_rt2 = p_rt * rt_inv
    A = a_m * p_rt2
    B = b_m * p_rt
    u = form.d1 + form.d2
    w = form.d1 * form.d2
    c2 = (u - 1.0) * B
    c2 -= 1.0
    c1 = (w - u) * B
    c1 -= u
    c1 *= B
    c1 += A
    c0 = (1.0 + B) * B
    c0 *= w
    c0 += A
    c0 *= B
    np.negative(c0, out=c0)
    Z, f, z_min3, idx3 = _solve_cubic(c2, c1, c0)

    # residual check: never return a number from a failed solve
    aZ = np.abs(Z)
    scale = ((aZ + np.abs(c2)) * aZ + np.abs(c1)) * aZ + np.abs(c0)
    bad = ~(np.abs(f) <= 1e-10 * scale) | ~(Z > B)
    if np.any(bad):
        i = int(np.flatnonzero(bad)[0])
        raise ConvergenceError(
            f"cubic EOS root failed its check at {int(bad.sum())} point(s); first at "
            f"T={float(T[i])!r} K, P={float(P[i])!r} Pa, y={yt[:, i].tolist()}"
        )

    # root flags: liquid_like, three_roots, gas_metastable
    three = out_flags[1]
    three[:] = False
    out_flags[2] = False
    if idx3.size:
        B3 = B[idx3]
        phys = z_min3 > B3  # the number of roots with Z > B is odd: 1 or 3
        if np.any(phys):
            i3 = idx3[phys]
            A3, B3 = A[i3], B3[phys]
            z_lo, _ = _newton_polish(z_min3[phys], c2[i3], c1[i3], c0[i3], steps=2)
            three[i3] = True
            out_flags[2, i3] = _g_res(z_lo, A3, B3, form) < _g_res(Z[i3], A3, B3, form)
    np.greater(A, (form.omega_a / form.omega_b) * B, out=out_flags[0])
    out_flags[0] &= Z < (form.z_c / form.omega_b) * B
    out_flags[0] &= ~three

    # ln phi_i = b_i g1 - g0 - g2 s_i q_i (the Notes' formula regrouped)
    dd = form.d1 - form.d2
    ddB = dd * B
    coef = Z + form.d2 * B
    np.divide(ddB, coef, out=coef)
    np.log1p(coef, out=coef)
    coef /= ddB  # ln((Z + d1 B)/(Z + d2 B)) / ((d1 - d2) B)
    g1 = coef * A
    g1 += Z
    g1 -= 1.0
    g1 /= b_m
    g0 = np.subtract(Z, B, out=ddB)
    np.log(g0, out=g0)
    g2 = coef
    g2 *= 2.0 * p_rt2
    ln_phi = sq
    ln_phi *= -g2
    ln_phi -= g0
    ln_phi += b[:, None] * g1
    out_ln_phi[:n] = ln_phi.T
    out_Z[:n] = Z


def ln_phi_mixture(
    T: ArrayLike,
    P: ArrayLike,
    y: ArrayLike,
    Tc: ArrayLike,
    Pc: ArrayLike,
    omega: ArrayLike,
    kij: ArrayLike | None = None,
    *,
    kind: EosKind = "peng-robinson",
) -> FugacityResult:
    r"""Fugacity coefficients of every component of a gas mixture from a cubic EOS.

    Parameters
    ----------
    T : array_like, shape (...)
        Temperature [K], > 0.
    P : array_like, shape (...)
        Absolute pressure [Pa], > 0.
    y : array_like, shape (..., nc)
        Mole fractions [-], >= 0, summing to 1 (within 1e-9) along the last axis.
        `T`, `P` and ``y[..., 0]`` broadcast against each other.
    Tc : array_like, shape (nc,)
        Critical temperatures [K], > 0.
    Pc : array_like, shape (nc,)
        Critical pressures [Pa], > 0.
    omega : array_like, shape (nc,)
        Acentric factors [-].
    kij : array_like, shape (nc, nc), optional
        Binary interaction parameters [-], symmetric with a zero diagonal. None means zeros.
    kind : {"peng-robinson", "srk"}, keyword-only
        Which cubic: Peng-Robinson (1976) [1]_ or Soave-Redlich-Kwong (1972) [2]_.

    Returns
    -------
    FugacityResult
        ``ln_phi`` shape (..., nc), ``Z`` shape (...), and boolean arrays ``liquid_like``,
        ``three_roots``, ``gas_metastable`` shape (...) (see :class:`FugacityResult`).
        ``...`` is the broadcast shape of `T`, `P` and ``y[..., 0]``.

    Raises
    ------
    InputError
        If a temperature, pressure, mole fraction, critical constant or `kij` entry is out of
        range or malformed, or `kind` is unknown.
    ConvergenceError
        If a polished root fails its residual check (not expected; reported, never hidden).

    Notes
    -----
    Generic two-parameter cubic with ``(d1, d2) = (1 + sqrt 2, 1 - sqrt 2)`` for PR and
    ``(1, 0)`` for SRK:

    .. math::

        P = \frac{RT}{V - b} - \frac{a(T)}{(V + d_1 b)(V + d_2 b)},\qquad
        a_i = \Omega_a \frac{R^2 T_{c,i}^2}{P_{c,i}}\alpha_i(T),\quad
        b_i = \Omega_b \frac{R T_{c,i}}{P_{c,i}},

    ``alpha_i = (1 + m_i (1 - sqrt(T/Tc_i)))^2`` with
    ``m = 0.37464 + 1.54226 ω - 0.26992 ω^2`` (PR 1976, at every ω) or
    ``m = 0.480 + 1.574 ω - 0.176 ω^2`` (SRK). Van der Waals one-fluid mixing rules:
    ``a_m = sum_i sum_j y_i y_j (1 - k_ij) sqrt(a_i a_j)``, ``b_m = sum_i y_i b_i``.
    With ``A = a_m P/(RT)^2`` and ``B = b_m P/(RT)`` the compressibility factor solves

    .. math::

        Z^3 + ((u-1)B - 1) Z^2 + (A + wB^2 - uB - uB^2) Z - (AB + wB^2 + wB^3) = 0,

    ``u = d1 + d2``, ``w = d1 d2``, and the fugacity coefficients are [3]_

    .. math::

        \ln\phi_i = \frac{b_i}{b_m}(Z - 1) - \ln(Z - B)
        - \frac{A}{(d_1 - d_2) B}\left(\frac{2\sum_j y_j a_{ij}}{a_m} - \frac{b_i}{b_m}\right)
          \ln\frac{Z + d_1 B}{Z + d_2 B}.

    Root choice (gas-phase solver): with three physical roots (all ``Z > B``) the largest is
    returned (``three_roots``); ``gas_metastable`` compares the residual Gibbs energies of the
    largest and smallest roots at this composition. With one root it is returned, and it is
    flagged ``liquid_like`` by a pseudo-critical comparison: the one-fluid mixture behaves at
    fixed T as a pure fluid with parameters ``a_m(T)`` and ``b_m``, whose isotherm has a
    vapour-liquid loop only if ``A/B = a_m/(b_m R T) > Omega_a/Omega_b`` (T below the
    pseudo-critical temperature); on such an isotherm the liquid and vapour spinodals lie on
    either side of the pseudo-critical volume ``V_c = (Z_c/Omega_b) b_m``, so a single root is
    on the liquid branch exactly when ``Z < (Z_c/Omega_b) B`` (factor 3.951 for PR, 3.847 for
    SRK). A dense supercritical fluid (``A/B`` below the critical ratio) is never flagged.
    For pure fluids below Tc this agrees with the phase identification parameter that thermo
    uses; above Tc thermo may call a hot dense gas "liquid" where this flag does not. The
    flag is not a phase-stability test: a mixture can condense (dew point) where the one-fluid
    cubic shows a single gas-like root.

    The classical alpha function passes through zero and rises again at very high reduced
    temperature (``T/Tc = (1 + 1/m)^2``, about 11 for N2, i.e. 1390 K); that is the published
    model and is kept as is.

    Solution: the cubic is solved in closed form at every point (Cardano where it has one
    real root, the trigonometric form where it has three; the smaller roots from the deflated
    quadratic), then the returned root gets one guarded Newton step (kept only where it lowers
    the residual) and the smallest root, where it is physical, two. Every returned root is
    checked: ``Z > B`` and a residual below 1e-10 of the sum of the magnitudes of the cubic's
    terms, else :class:`~eqconv.errors.ConvergenceError`. Near a double root (the edge of the
    three-root region) the closed-form root is accurate only to about sqrt(machine epsilon) of
    ``Z``; elsewhere it is accurate to a few ulp.

    References
    ----------
    .. [1] Peng & Robinson, Ind. Eng. Chem. Fundam. 15, 59 (1976). doi:10.1021/i160057a011
    .. [2] Soave, Chem. Eng. Sci. 27, 1197 (1972). doi:10.1016/0009-2509(72)80096-4
    .. [3] Poling, Prausnitz & O'Connell, *The Properties of Gases and Liquids*, 5th ed. (2001).

    Examples
    --------
    An invented 3:1 H2:N2 feed at 700 K and 30 MPa with round critical constants:

    >>> r = ln_phi_mixture(700.0, 3.0e7, [0.75, 0.25], Tc=[33.2, 126.2],
    ...                    Pc=[1.297e6, 3.39e6], omega=[-0.22, 0.04])
    >>> r.ln_phi.shape, r.Z.shape, bool(r.Z > 1.0), bool(r.liquid_like)
    ((2,), (), True, False)
    """
    form = cubic_form(kind)
    Tc_a = _component_vector(Tc, "Tc", positive=True)
    nc = Tc_a.size
    Pc_a = _component_vector(Pc, "Pc", positive=True)
    om_a = _component_vector(omega, "omega", positive=False)
    if Pc_a.size != nc or om_a.size != nc:
        raise InputError(
            f"Tc, Pc and omega must have the same length; got {nc}, {Pc_a.size} and {om_a.size}"
        )
    k = _check_kij(kij, nc)
    T_a = as_temperature(T)
    P_a = as_pressure(P)
    y_a = _check_fractions(y, nc)

    shape = np.broadcast_shapes(T_a.shape, P_a.shape, y_a.shape[:-1])
    n = math.prod(shape)
    Tf = np.broadcast_to(T_a, shape).reshape(n)
    Pf = np.broadcast_to(P_a, shape).reshape(n)
    yf = np.broadcast_to(y_a, (*shape, nc)).reshape(n, nc)

    # pure-component constants: sqrt(a_i alpha_i) = sqrt(a_c,i) |1 + m_i (1 - sqrt(T/Tc_i))|
    sqrt_ac = math.sqrt(form.omega_a) * R * Tc_a / np.sqrt(Pc_a)
    b = form.omega_b * R * Tc_a / Pc_a  # [m^3/mol]
    m = form.m0 + om_a * (form.m1 + form.m2 * om_a)
    s0 = sqrt_ac * (1.0 + m)
    s1 = sqrt_ac * m / np.sqrt(Tc_a)
    one_minus_k = 1.0 - k

    ln_phi = np.empty((n, nc))
    Z = np.empty(n)
    flags = np.empty((3, n), dtype=bool)
    block = min(4096, max(1024, _BLOCK_VALUES // nc))
    for i0 in range(0, n, block):  # a loop over blocks of points, not over points
        i1 = min(i0 + block, n)
        _kernel(
            Tf[i0:i1],
            Pf[i0:i1],
            np.ascontiguousarray(yf[i0:i1].T),
            s0,
            s1,
            b,
            one_minus_k,
            form,
            ln_phi[i0:i1],
            Z[i0:i1],
            flags[:, i0:i1],
        )

    return FugacityResult(
        ln_phi=ln_phi.reshape((*shape, nc)),
        Z=Z.reshape(shape),
        liquid_like=flags[0].reshape(shape),
        three_roots=flags[1].reshape(shape),
        gas_metastable=flags[2].reshape(shape),
    )


def ln_phi_pure(
    T: ArrayLike,
    P: ArrayLike,
    Tc: float,
    Pc: float,
    omega: float,
    *,
    kind: EosKind = "peng-robinson",
) -> FugacityResult:
    """Fugacity coefficient of a pure gas from a cubic EOS (gas root).

    Parameters
    ----------
    T : array_like, shape (...)
        Temperature [K], > 0.
    P : array_like, shape (...)
        Absolute pressure [Pa], > 0; broadcasts against `T`.
    Tc : float
        Critical temperature [K], > 0.
    Pc : float
        Critical pressure [Pa], > 0.
    omega : float
        Acentric factor [-].
    kind : {"peng-robinson", "srk"}, keyword-only
        Which cubic (see :func:`ln_phi_mixture`).

    Returns
    -------
    FugacityResult
        As from :func:`ln_phi_mixture` with one component, except that ``ln_phi`` has the
        broadcast shape of `T` and `P` (no component axis).

    Raises
    ------
    InputError
        If an argument is out of range or `kind` is unknown.

    Notes
    -----
    Same equations as :func:`ln_phi_mixture` with ``y = [1]``; for a pure fluid the
    ``liquid_like`` flag reduces to "single root, ``alpha(T) > T/Tc`` (i.e. T < Tc for the
    usual m > 0 at moderate reduced temperature) and V < Vc of the cubic".

    Examples
    --------
    Nitrogen with round constants at 700 K and 30 MPa is a repulsion-dominated gas:

    >>> r = ln_phi_pure(700.0, 3.0e7, Tc=126.2, Pc=3.39e6, omega=0.04)
    >>> bool(r.ln_phi > 0.0)
    True
    """
    for name, val in (("Tc", Tc), ("Pc", Pc), ("omega", omega)):
        if np.ndim(val) != 0:
            raise InputError(
                f"{name} must be a scalar for a pure component; got shape {np.shape(val)}"
            )
    res = ln_phi_mixture(T, P, np.ones(1), [Tc], [Pc], [omega], kind=kind)
    return FugacityResult(
        ln_phi=res.ln_phi[..., 0],
        Z=res.Z,
        liquid_like=res.liquid_like,
        three_roots=res.three_roots,
        gas_metastable=res.gas_metastable,
    )
