"""Vectorized bracketed root finding (Illinois / Anderson–Björck regula falsi, bisection
safeguard).

All points are solved at once: each iteration evaluates the function on the points still
active, so every call into the equilibrium solver is one vectorized call.

References
----------
.. [1] M. Dowell and P. Jarratt, "A modified regula falsi method for computing the root of
   an equation", BIT 11 (1971) 168-174 (the Illinois method).
.. [2] N. Anderson and Å. Björck, "A new high order method of regula falsi type for
   computing a root of an equation", BIT 13 (1973) 253-264.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass

import numpy as np
from numpy.typing import ArrayLike, NDArray

from ..errors import ConvergenceError

__all__ = ["RootResult", "illinois"]

FloatArray = NDArray[np.float64]
IntArray = NDArray[np.intp]
#: f(x, idx) -> values at the points idx (x has the shape of idx).
PointFunction = Callable[[FloatArray, IntArray], FloatArray]


@dataclass(frozen=True)
class RootResult:
    """Roots of a bracketed problem on flat points."""

    x: FloatArray
    fx: FloatArray
    iterations: int


def illinois(
    f: PointFunction,
    a: ArrayLike,
    b: ArrayLike,
    fa: ArrayLike,
    fb: ArrayLike,
    *,
    xtol: ArrayLike,
    ftol: float,
    max_iter: int = 200,
) -> RootResult:
    """Roots of f in the brackets [a, b] at every point, all points at once.

    Parameters
    ----------
    f : callable
        ``f(x, idx)`` returns f at the points `idx` for the abscissae `x`.
    a, b : array_like (n,)
        Bracket ends.
    fa, fb : array_like (n,)
        f at the bracket ends, of opposite signs (or one of them within `ftol` of 0).
    xtol : array_like
        Absolute tolerance on x (scalar or (n,)).
    ftol : float
        Absolute tolerance on f.
    max_iter : int
        Iteration limit.

    Returns
    -------
    RootResult
        ``x`` with |f(x)| ≤ ftol, or the bracket end with the smaller |f| once the bracket
        is narrower than `xtol`.

    Raises
    ------
    ConvergenceError
        If a point is neither within `ftol` nor `xtol` after `max_iter` iterations.

    Notes
    -----
    Regula falsi step c = b − f_b (b − a)/(f_b − f_a); when c lands on the same side as b
    the stored f_a is scaled by m = 1 − f_c/f_b (Anderson–Björck; m = ½ when that is not
    positive, the Illinois rule), which restores superlinear convergence where plain
    regula falsi stalls. A bisection step replaces the secant whenever the bracket failed to
    halve in three successive steps or the secant leaves the bracket.
    """
    a = np.array(a, dtype=float)
    b = np.array(b, dtype=float)
    fa_true = np.array(fa, dtype=float)
    fb = np.array(fb, dtype=float)
    fa = fa_true.copy()
    n = a.size
    tol = np.broadcast_to(np.asarray(xtol, dtype=float), (n,))
    x = np.where(np.abs(fa_true) < np.abs(fb), a, b)
    fx = np.where(np.abs(fa_true) < np.abs(fb), fa_true, fb)
    done = (np.abs(fx) <= ftol) | (np.abs(b - a) <= tol)
    slow = np.zeros(n, dtype=np.int8)
    it = 0
    while np.any(~done):
        if it >= max_iter:
            bad = np.flatnonzero(~done)
            raise ConvergenceError(
                f"root finding did not converge at {bad.size} point(s) in {max_iter} "
                f"iterations; first bracket [{a[bad[0]]:g}, {b[bad[0]]:g}]"
            )
        it += 1
        i = np.flatnonzero(~done)
        A, B, FA, FB = a[i], b[i], fa[i], fb[i]
        with np.errstate(divide="ignore", invalid="ignore"):
            c = B - FB * (B - A) / (FB - FA)
        lo, hi = np.minimum(A, B), np.maximum(A, B)
        bisect = (slow[i] >= 3) | ~np.isfinite(c) | (c <= lo) | (c >= hi)
        c = np.where(bisect, 0.5 * (A + B), c)
        fc = np.asarray(f(c, i), dtype=float)
        width_old = hi - lo
        flip = np.sign(fc) != np.sign(FB)
        # the end kept opposite to c: old b when the sign flipped, else a (Illinois halving)
        newA = np.where(flip, B, A)
        with np.errstate(divide="ignore", invalid="ignore"):
            m = 1.0 - fc / FB
        m = np.where(np.isfinite(m) & (m > 0.0), m, 0.5)
        newFA = np.where(flip, FB, np.where(bisect, FA, m * FA))
        newFA_true = np.where(flip, FB, fa_true[i])
        # after a bisection, fa keeps its true value (no halving needed)
        newFA = np.where(bisect & ~flip, fa_true[i], newFA)
        a[i], fa[i], fa_true[i] = newA, newFA, newFA_true
        b[i], fb[i] = c, fc
        width = np.abs(c - newA)
        slow[i] = np.where(width > 0.5 * width_old, slow[i] + 1, 0)
        slow[i] = np.where(bisect, 0, slow[i])
        better = np.abs(fc) <= np.abs(newFA_true)
        x[i] = np.where(better, c, newA)
        fx[i] = np.where(better, fc, newFA_true)
        done[i] = (np.abs(fx[i]) <= ftol) | (width <= tol[i])
    return RootResult(x, fx, it)
