"""Equilibrium extents of simultaneous reactions over whole grids (pure array layer).

This module knows nothing of species names: it takes a stoichiometric matrix, ln K, feed
amounts and ln(P/p°) as arrays and returns the equilibrium extents and amounts at every
point, with a per-point convergence flag. :func:`eqconv.equilibrium.equilibrium` builds
those arrays from :class:`~eqconv.Reaction` objects.

All paths are vectorized over blocks of points and share one contract: |ln Q − ln K| ≤ tol
for every reaction and every conserved combination closed to 1e-12 relative, or
``converged = False`` with NaN amounts at that point.

* One reaction (:mod:`eqconv._extent_one`): Newton on the logit u of the extent scaled to
  its feasible interval, so that every amount is a sum of non-negative terms (no digits lost
  near a bound; K from 1e-100 to 1e100 alike); bracketed bisection if Newton is slow. With
  one feed on a large grid the root depends on T and P only through
  c = Δn ln(P/p°) − ln K, and a cubic Hermite table of u(c) starts every point at its root.
* Several reactions (:mod:`eqconv._extent_multi`): Newton on the extents in a reaction basis
  re-chosen from the abundances, in which each of the scarcest species is made by one
  reaction only and moves multiplicatively; starts from the combined reaction along an
  interior ray, or from a table over c for one feed on a large grid.
* Safety net (:mod:`eqconv._extent_robust`): the same basis with an Armijo line search on
  the convex Gibbs energy G(ξ), for the points the fast path leaves.

Species that no feasible extent can form (their feed and every route to them are empty)
are found by linear programming once per feed pattern and fixed at zero; a reaction that
needs them is reported as ``blocked`` (its extent is then fixed by the others; residual 0).

References
----------
.. [1] W. R. Smith and R. W. Missen, *Chemical Reaction Equilibrium Analysis: Theory and
   Algorithms*, Wiley (1982), ch. 3-6 (extent formulation, convexity of G, stoichiometric
   basis chosen from the most abundant species).
.. [2] J. Nocedal and S. J. Wright, *Numerical Optimization*, 2nd ed., Springer (2006),
   §3.1 (Armijo backtracking) and §19.2 (fraction-to-boundary rule).
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

import numpy as np
from numpy.typing import ArrayLike, NDArray

from ._extent_multi import _cold_start, _feed_pattern, _multi_block, _multi_table, _table_start
from ._extent_one import _one_c, _one_table, _solve_one
from .errors import DependentReactionsError, InputError

__all__ = ["BALANCE_TOL", "ExtentSolution", "check_independent", "solve_extents"]

FloatArray = NDArray[np.float64]
BoolArray = NDArray[np.bool_]

#: Relative closure required of every conserved quantity (element balance) [-].
BALANCE_TOL = 1e-12


def _rmin(A: FloatArray) -> FloatArray:
    """Row minimum of a short (m, k) array (column loop: far faster than axis=1)."""
    out = A[:, 0].copy()
    for j in range(1, A.shape[1]):
        np.minimum(out, A[:, j], out=out)
    return out


def _rmax(A: FloatArray) -> FloatArray:
    """Row maximum of a short (m, k) array (NaN propagates)."""
    out = A[:, 0].copy()
    for j in range(1, A.shape[1]):
        np.maximum(out, A[:, j], out=out)
    return out


@dataclass(frozen=True)
class ExtentSolution:
    """Equilibrium state on a grid; leading dimensions are the broadcast grid shape.

    Attributes
    ----------
    extents : ndarray (..., nr)
        Extent of each reaction from the feed [mol]; NaN where not converged. With several
        reactions they are recovered from the amounts, to an absolute precision of about
        1e-16 of the total amount (the amounts themselves keep full relative precision).
    amounts : ndarray (..., ns)
        Equilibrium amounts [mol]; NaN where not converged.
    converged : ndarray (...) of bool
        True where every reaction meets ``tol`` and the balances close to
        :data:`BALANCE_TOL` relative.
    iterations : ndarray (...) of int
        Newton iterations used at each point (all paths together).
    residual : ndarray (..., nr)
        ln Q − ln K of each reaction [-] (at the last iterate where not converged; 0 for
        a blocked reaction).
    balance_error : ndarray (...)
        Largest relative error of a conserved quantity (combination of amounts that no
        reaction changes, e.g. an element) [-].
    blocked : ndarray (..., nr) of bool
        True where a reaction involves a species that no feasible extent can form.
    """

    extents: FloatArray
    amounts: FloatArray
    converged: BoolArray
    iterations: NDArray[np.int64]
    residual: FloatArray
    balance_error: FloatArray
    blocked: BoolArray

    @property
    def shape(self) -> tuple[int, ...]:
        """Grid shape (leading dimensions of every array)."""
        return tuple(self.converged.shape)

    @property
    def n_failed(self) -> int:
        """Number of grid points that did not converge."""
        return int(np.count_nonzero(~self.converged))


def check_independent(nu: ArrayLike, labels: list[str] | None = None, rtol: float = 1e-9) -> None:
    """Raise if the rows of a stoichiometric matrix are linearly dependent.

    Parameters
    ----------
    nu : array_like (nr, ns)
        Stoichiometric coefficients, products > 0 [-].
    labels : list of str, optional
        Names of the reactions, used in the message (default "reaction 1", ...).
    rtol : float
        Singular values below ``rtol`` times the largest count as zero [-].

    Raises
    ------
    DependentReactionsError
        With the combination that makes one reaction redundant, e.g.
        ``"reaction 3 = 1·(reaction 1) + 1·(reaction 2)"`` (the last reaction involved is
        named redundant).
    """
    nu = np.atleast_2d(np.asarray(nu, dtype=float))
    nr = nu.shape[0]
    names = labels or [f"reaction {j + 1}" for j in range(nr)]
    _, s, _ = np.linalg.svd(nu)
    big = s[0] if s.size else 0.0
    rank = int(np.count_nonzero(s > rtol * max(big, 1e-300)))
    if rank == nr:
        return
    c = np.linalg.svd(nu)[0][:, -1]  # left singular vector of the smallest: c @ nu ≈ 0
    j = int(np.flatnonzero(np.abs(c) > 1e-9 * np.abs(c).max())[-1])  # the last one involved
    terms = [
        f"{-c[k] / c[j]:.6g}·({names[k]})"
        for k in range(nr)
        if k != j and abs(c[k]) > 1e-9 * abs(c[j])
    ]
    combo = " + ".join(terms) if terms else "0 (all coefficients zero)"
    raise DependentReactionsError(
        f"the {nr} reactions are linearly dependent (rank {rank}): {names[j]} = {combo}; "
        f"remove {names[j]} (its equilibrium follows from the others) or replace it by an "
        f"independent reaction"
    )


# --------------------------------------------------------------------------- driver
class _Outputs:
    """Output arrays filled chunk by chunk; checks the balances as each chunk lands."""

    def __init__(
        self, N: int, nr: int, ns: int, nu: FloatArray, tol: float, feed_row: Any = None
    ) -> None:
        # every row is written exactly once by store() (blocks cover all points), so the
        # arrays need not be initialised: that would touch every page twice
        self.xi = np.empty((N, nr))
        self.n = np.empty((N, ns))
        self.conv = np.empty(N, dtype=bool)
        self.iters = np.empty(N, dtype=np.int64)
        self.res = np.empty((N, nr))
        self.berr = np.empty(N)
        self.blocked = np.empty((N, nr), dtype=bool)
        self.cons = np.linalg.svd(nu)[2][nr:].T  # conserved combinations (ns, ns - nr)
        self.tol = tol
        self.feed_row = feed_row

    def store(
        self,
        p: NDArray[np.intp] | slice,
        n0: FloatArray,
        xi: FloatArray,
        n: FloatArray,
        conv: BoolArray,
        iters: NDArray[np.int64],
        res: FloatArray,
        blocked: BoolArray,
    ) -> None:
        """Check balances, residuals and signs of one block and write it at rows ``p``.

        The balance error of a conserved combination c·n is |c·(n − n0)| / (|c|·n0), i.e.
        relative to the feed's content of it (the same at equilibrium by conservation).
        """
        if self.cons.size:
            # conserved-combination-major, so that row operations stay contiguous
            now = self.cons.T @ n.T
            if self.feed_row is not None:  # one feed everywhere: scalars per combination
                ref = self.cons.T @ self.feed_row
                size = np.abs(self.cons.T) @ self.feed_row
            else:
                ref = self.cons.T @ n0.T
                size = np.abs(self.cons.T) @ n0.T
            berr = np.zeros(n.shape[0])
            for k in range(now.shape[0]):
                d = np.abs(now[k] - ref[k])
                d /= size[k] + 1e-300
                np.maximum(berr, d, out=berr)  # NaN propagates
        else:
            berr = np.zeros(n.shape[0])
        ok = conv & (berr <= BALANCE_TOL)
        if not np.abs(res).max(initial=0.0) <= self.tol:  # whole-block checks first
            ok &= _rmax(np.abs(res)) <= self.tol
        if not n.min(initial=0.0) >= 0.0:
            ok &= _rmin(n) >= 0.0
        bad = ~ok
        if np.any(bad):
            xi, n = xi.copy(), n.copy()
            xi[bad] = np.nan
            n[bad] = np.nan
        self.xi[p], self.n[p], self.conv[p], self.iters[p] = xi, n, ok, iters
        self.res[p], self.berr[p], self.blocked[p] = res, berr, blocked


def _solve_multi(
    nu: FloatArray,
    lnK_f: FloatArray,
    n0_f: FloatArray,
    lnP_f: FloatArray,
    phi_f: FloatArray | None,
    gas: BoolArray,
    tol: float,
    max_iter: int,
    chunk: int,
    out: _Outputs,
    uniform_feed: bool,
) -> None:
    """Several reactions: group points by feed pattern, then solve block by block."""
    ns = nu.shape[1]
    react = np.any(nu != 0.0, axis=0)
    Lp = np.linalg.pinv(nu.T)
    codes = np.zeros(n0_f.shape[0], dtype=np.int64)
    for i in np.flatnonzero(react):
        codes |= (n0_f[:, i] > 0.0).astype(np.int64) << int(i)
    one = codes.min() == codes.max()
    for code in [codes[0]] if one else np.unique(codes):
        pts = np.arange(codes.size) if one else np.flatnonzero(codes == code)
        present = (int(code) >> np.arange(ns)) & 1 == 1
        pattern = _feed_pattern(nu, present)
        never = pattern[1]
        blk = np.any(nu[:, never] != 0.0, axis=1)
        sel: Any = slice(None) if one else pts
        c_all = lnP_f[sel][:, None] * nu[:, gas].sum(axis=1) - lnK_f[sel]
        if phi_f is not None:
            c_all += phi_f[sel][:, gas] @ nu[:, gas].T
        table = None
        if uniform_feed and not np.any(never) and pts.size >= 8192:
            table = _multi_table(nu, n0_f[pts[0]], gas, c_all, pattern, tol, max_iter)
        for a in range(0, pts.size, chunk):
            q = slice(a, a + chunk)
            p: Any = slice(a, min(a + chunk, pts.size)) if one else pts[q]
            n0, lnK = n0_f[p], lnK_f[p]
            gconst = lnP_f[p][:, None] * gas  # ln(P/p°) + ln φ on gas species, 0 elsewhere
            if phi_f is not None:
                gconst = gconst + np.where(gas, phi_f[p], 0.0)
            if table is not None:
                x, okt = _table_start(table, c_all[q])
                if not np.all(okt):
                    x[~okt] = _cold_start(nu, n0[~okt], pattern, lnK[~okt], gconst[~okt], gas)
            else:
                x = _cold_start(nu, n0, pattern, lnK, gconst, gas)
            x, ok, it, res = _multi_block(
                nu, n0, lnK, gconst, gas, pattern, tol, max_iter, x, table is not None
            )
            ref = (n0 if out.feed_row is None else out.feed_row) @ Lp.T
            out.store(p, n0, x @ Lp.T - ref, x, ok, it, res, np.broadcast_to(blk, res.shape))


def _solve_all(
    nu: FloatArray,
    lnK_f: FloatArray,
    n0_f: FloatArray,
    lnP_f: FloatArray,
    phi_f: FloatArray | None,
    gas: BoolArray,
    tol: float,
    max_iter: int,
    chunk: int,
    out: _Outputs,
    uniform_feed: bool,
) -> None:
    """Dispatch: one reaction (logit path, start table for one feed) or several."""
    N, nr = lnK_f.shape
    if nr == 1:
        table = None
        if N >= 1024 and uniform_feed:
            table = _one_table(nu[0], n0_f[0], gas, -_one_c(nu[0], lnK_f[:, 0], lnP_f, phi_f, gas))
        block = 4 * chunk  # one reaction keeps few arrays per point: larger blocks fit
        for a in range(0, N, block):
            sl = slice(a, min(a + block, N))
            res = _solve_one(
                nu[0],
                lnK_f[sl, 0],
                n0_f[sl],
                lnP_f[sl],
                None if phi_f is None else phi_f[sl],
                gas,
                tol,
                max_iter,
                table,
            )
            out.store(sl, n0_f[sl], *res[:6])
    else:
        _solve_multi(nu, lnK_f, n0_f, lnP_f, phi_f, gas, tol, max_iter, chunk, out, uniform_feed)


# --------------------------------------------------------------------------- public
def solve_extents(
    nu: ArrayLike,
    ln_K: ArrayLike,
    n0: ArrayLike,
    ln_P_ratio: ArrayLike,
    *,
    gas_mask: ArrayLike | None = None,
    ln_phi: ArrayLike | None = None,
    tol: float = 1e-10,
    max_iter: int = 200,
    chunk: int = 16384,
) -> ExtentSolution:
    """Equilibrium extents of independent reactions at every point of a grid.

    Parameters
    ----------
    nu : array_like (nr, ns)
        Stoichiometric matrix, products > 0 [-]; rows must be linearly independent.
        Species with an all-zero column are inerts.
    ln_K : array_like (..., nr)
        ln K of each reaction at standard pressure p° [-].
    n0 : array_like (..., ns)
        Feed amounts [mol], ≥ 0, with a positive total of gas species at every point.
    ln_P_ratio : array_like (...)
        ln(P/p°) [-], P the absolute pressure.
    gas_mask : array_like (ns,) of bool, optional
        False for a pure condensed species (activity 1, not counted in the gas moles).
        Whether such a phase is present is not decided here: a point where it would vanish
        is reported as not converged. Default: all gas.
    ln_phi : array_like (..., ns), optional
        ln of fixed fugacity coefficients [-] (default 0, ideal gas).
    tol : float
        Required |ln Q − ln K| of every reaction [-], ≥ 1e-13.
    max_iter : int
        Iteration limit of the safety-net path (the fast paths stop earlier and hand over).
    chunk : int
        Points per vectorized block of several reactions (5-20 thousand keep the
        temporaries in cache); one reaction uses blocks four times larger.

    Returns
    -------
    ExtentSolution
        Broadcast grid shape of ``ln_K[..., 0]``, ``n0[..., 0]``, ``ln_P_ratio`` and
        ``ln_phi[..., 0]``.

    Raises
    ------
    DependentReactionsError
        If the rows of `nu` are linearly dependent.
    InputError
        For shapes that do not match, non-finite ln K, negative or non-finite amounts, a
        point without gas, or a reaction without gas species.

    Notes
    -----
    With n_i = n0_i + Σ_j ν_ji ξ_j and y_i = n_i / Σ_gas n, reaction j is at equilibrium when
    r_j = Σ_gas ν_ji [ln y_i + ln φ_i + ln(P/p°)] − ln K_j = 0 (condensed species add
    nothing). r = ∂(G/RT)/∂ξ, and for an ideal gas G/RT is strictly convex in ξ on the
    feasible set {ξ : n(ξ) ≥ 0}, so the equilibrium is unique and damped Newton on G with a
    feasibility-preserving step converges from any interior start. A point whose answer is
    not representable in double precision (e.g. a limiting reactant fed at 1e-200 mol that
    would have to end near 1e-400 mol) is reported as not converged.

    Examples
    --------
    Equimolar water-gas shift with K = 1: ξ = √K / (1 + √K) = 0.5.

    >>> sol = solve_extents([[-1, -1, 1, 1]], [0.0], [1.0, 1.0, 0.0, 0.0], 0.0)
    >>> round(float(sol.extents[0]), 12)
    0.5
    """
    nu = np.asarray(nu, dtype=float)
    if nu.ndim != 2 or not np.all(np.isfinite(nu)):
        raise InputError(f"nu must be a finite (n_reactions, n_species) matrix; got {nu!r}")
    nr, ns = nu.shape
    check_independent(nu)
    if not (isinstance(max_iter, int | np.integer) and max_iter >= 1):
        raise InputError(f"max_iter must be an integer >= 1; got {max_iter!r}")
    if not tol >= 1e-13:
        raise InputError(f"tol must be >= 1e-13 (double precision); got {tol!r}")
    lnK = np.asarray(ln_K, dtype=float)
    if lnK.ndim == 0 or lnK.shape[-1] != nr or not np.all(np.isfinite(lnK)):
        raise InputError(f"ln_K must be finite with last dimension {nr}; got shape {lnK.shape}")
    feed = np.asarray(n0, dtype=float)
    if feed.ndim == 0 or feed.shape[-1] != ns:
        raise InputError(f"n0 must have last dimension {ns}; got shape {feed.shape}")
    if np.any(~np.isfinite(feed) | (feed < 0.0)):
        raise InputError("feed amounts n0 must be finite and >= 0 mol")
    lnP = np.asarray(ln_P_ratio, dtype=float)
    if not np.all(np.isfinite(lnP)):
        raise InputError("ln_P_ratio must be finite")
    gas = np.ones(ns, dtype=bool) if gas_mask is None else np.asarray(gas_mask, dtype=bool)
    if gas.shape != (ns,):
        raise InputError(f"gas_mask must have shape ({ns},); got {gas.shape}")
    shapes = [lnK.shape[:-1], feed.shape[:-1], lnP.shape]
    phi = None if ln_phi is None else np.asarray(ln_phi, dtype=float)
    if phi is not None:
        if phi.ndim == 0 or phi.shape[-1] != ns or not np.all(np.isfinite(phi)):
            raise InputError(f"ln_phi must be finite with last dimension {ns}")
        shapes.append(phi.shape[:-1])
    try:
        shape = np.broadcast_shapes(*shapes)
    except ValueError as exc:
        raise InputError(f"grid shapes do not broadcast: {shapes}") from exc
    N = int(np.prod(shape))
    lnK_f = np.broadcast_to(lnK, (*shape, nr)).reshape(N, nr)
    n0_f = np.broadcast_to(feed, (*shape, ns)).reshape(N, ns)  # a view for one feed
    lnP_f = np.broadcast_to(lnP, shape).reshape(N)
    phi_f = None if phi is None else np.broadcast_to(phi, (*shape, ns)).reshape(N, ns)
    if np.any(n0_f @ gas.astype(float) <= 0.0):
        raise InputError("every point needs a positive total amount of gas species in the feed")
    for j in range(nr):
        if not np.any(nu[j, gas] != 0.0):
            raise InputError(f"reaction {j + 1} involves no gas species; not handled")
    uniform = feed.ndim == 1 or bool(np.all(n0_f == n0_f[0]))
    out = _Outputs(N, nr, ns, nu, tol, n0_f[0] if uniform else None)
    with np.errstate(all="ignore"):  # failures are caught by the per-point checks
        _solve_all(nu, lnK_f, n0_f, lnP_f, phi_f, gas, tol, max_iter, chunk, out, uniform)
    return ExtentSolution(
        extents=out.xi.reshape(*shape, nr),
        amounts=out.n.reshape(*shape, ns),
        converged=out.conv.reshape(shape),
        iterations=out.iters.reshape(shape),
        residual=out.res.reshape(*shape, nr),
        balance_error=out.berr.reshape(shape),
        blocked=out.blocked.reshape(*shape, nr),
    )
