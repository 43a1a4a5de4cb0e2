"""Equilibrium of a species list by Gibbs-energy minimisation (element potentials).

The non-stoichiometric formulation: no reactions are chosen. Given the atom matrix of the
species, their standard chemical potentials and a feed, find the amounts that minimise the
Gibbs energy of an ideal-gas mixture (fixed fugacity coefficients allowed) subject to the
element balances. Pure array functions vectorized over a grid; the species-aware wrapper
is :func:`eqconv.gibbs_api.gibbs_equilibrium`.

Method
------
At the minimum every gas obeys μ_i/(R T) = Σ_j a_ij λ_j (λ: element potentials), so
``ln n_i = ln N + Σ_j a_ij λ_j − g_i`` with ``g_i = μ°_i/(R T) + ln(P/p°) + ln φ_i`` and N
the total amount. The state is (λ, ln N): every amount is positive by construction and
stationarity holds at every iterate; what remains are the element balances and Σ n_i = N,
solved per point by damped Newton, vectorized over the grid in chunks:

* start: the optimal dual of the linear programme min Σ g_i n_i (the K → ∞ limit, found
  by enumerating bases), or the solution interpolated (quadratically) between neighbouring
  points solved before where that is closer: every 16th point of each row of the grid (its
  last axis, when that has 64 points or more and the whole grid shares one species set)
  and the row's last point are solved first; otherwise the flattened grid is one row;
* fast path: Newton on ln(Σ_i a_ij n_i) = ln b_j and ln Σ n_i = ln N; the matrix
  [[Aᵀ D A, Aᵀ n], [nᵀ A, 0]] (D = diag n) is solved by a Cholesky factorisation of its
  leading block and the Schur complement; Armijo backtracking on the squared residuals;
  steps keep every amount below the number of atoms (or let it fall, if it is above);
* trace check and careful path: the balances in a *component basis* B of the most
  abundant species, ``Σ_i c_ij n_i = Σ_i c_ij n°_i`` with ``c = A B⁻¹`` exact rationals,
  each side a sum of positive terms (the feed side resolved exactly), so that a balance
  decided by trace species (a reaction driven to completion, K ~ 1e±100) is closed
  relative to its own terms, not swamped by the major species. Points that fail it are
  solved by Gauss-Newton on the logarithms of both sides of these balances and of the
  element balances together (Levenberg-Marquardt where it stalls).

Elements absent from the feed are removed first with the species containing them, then
the species that the element balances force to zero (a feed on an edge of the composition
space); element columns that are combinations of others are dropped (rank reduction).

References
----------
.. [1] W. B. White, S. M. Johnson, G. B. Dantzig, "Chemical equilibrium in complex
   mixtures", J. Chem. Phys. 28, 751 (1958) (citation from memory).
.. [2] W. R. Smith, R. W. Missen, *Chemical Reaction Equilibrium Analysis: Theory and
   Algorithms*, Wiley (1982), ch. 3 and 6 (element potentials, optimal component basis;
   citation from memory).
"""

from __future__ import annotations

from collections.abc import Iterator
from dataclasses import dataclass
from typing import Any

import numpy as np
from numpy.typing import ArrayLike, NDArray

from ._gibbs_newton import (
    Problem,
    build,
    lp_start,
    phase1,
    phase1_state,
    phase3,
    trace_residual,
)
from .errors import InputError
from .reaction_basis import independent_reactions

__all__ = ["GibbsSolution", "minimize_gibbs"]

FloatArray = NDArray[np.float64]
IntArray = NDArray[np.intp]
Warm = tuple[FloatArray, FloatArray, NDArray[np.bool_]]

_PHASE1_ITER = 15  # the fast path hands a point over after this many iterations
_STRIDE = 16  # coarse points first: every 16th of each grid row (see _coarse_plan)
_WARM_MERIT = 10.0  # a start from those is taken where its squared log residuals are below


@dataclass(frozen=True)
class GibbsSolution:
    """Equilibrium state from :func:`minimize_gibbs`, per grid point.

    Attributes
    ----------
    amounts, ln_amounts : ndarray, shape (..., ns)
        Equilibrium amounts [mol] and their logarithms; exactly 0 (−inf) for species that
        cannot be present (an element absent from the feed, or forced to zero by the element
        balances); amounts below ~1e-308 mol underflow to 0 (`ln_amounts` keeps them). NaN
        where the point did not converge.
    mole_fractions : ndarray, shape (..., ns)
        Gas mole fractions [-], summing to 1 (NaN where not converged).
    total : ndarray, shape (...)
        Total gas amount [mol] (NaN where not converged).
    converged : ndarray of bool, shape (...)
        True where every tolerance below is met.
    iterations : ndarray of int, shape (...)
        Newton iterations used.
    balance_residual : ndarray, shape (...)
        max_j |Σ_i a_ij n_i − b_j| / b_j over the elements in the feed [-].
    trace_balance_residual : ndarray, shape (...)
        Largest balance residual in the component basis of the most abundant species,
        relative to the larger side of that balance (an upper bound) [-]: the check that
        trace species are balanced too.
    stationarity_residual : ndarray, shape (...)
        max |ln Q − ln K| = max |Σ_i ν_i μ_i/(R T)| over an independent reaction set of the
        species present [-].
    present : ndarray of bool, shape (..., ns)
        Species allowed to be non-zero at that point.
    reactions : ndarray of int, shape (ns − rank(A), ns)
        An independent reaction set of the full species list (for reference).
    tol, balance_tol : float
        Tolerances the points had to meet.
    """

    amounts: FloatArray
    ln_amounts: FloatArray
    mole_fractions: FloatArray
    total: FloatArray
    converged: NDArray[np.bool_]
    iterations: NDArray[np.int64]
    balance_residual: FloatArray
    trace_balance_residual: FloatArray
    stationarity_residual: FloatArray
    present: NDArray[np.bool_]
    reactions: NDArray[np.int64]
    tol: float
    balance_tol: float

    @property
    def all_converged(self) -> bool:
        """True if every point converged."""
        return bool(np.all(self.converged))

    def failure_summary(self, limit: int = 5) -> str:
        """Plain-text list of the points that did not converge (empty if none)."""
        conv = np.atleast_1d(self.converged)
        bad = np.argwhere(~conv)
        if not len(bad):
            return ""
        lines = [
            f"{len(bad)} of {conv.size} points did not converge (tolerances: "
            f"|ln Q − ln K| ≤ {self.tol:g}, element balances ≤ {self.balance_tol:g} "
            "relative):"
        ]
        for idx in bad[:limit]:
            i = tuple(int(v) for v in idx) if np.ndim(self.converged) else ()
            lines.append(
                f"  point {i}: |ln Q − ln K| = {float(self.stationarity_residual[i]):.3g}, "
                f"element balance {float(self.balance_residual[i]):.3g}, trace balance "
                f"{float(self.trace_balance_residual[i]):.3g}, {int(self.iterations[i])} "
                "iterations"
            )
        return "\n".join(lines)


# ---------------------------------------------------------------------- one chunk of points
def _solve_chunk(
    prob: Problem,
    g: FloatArray,
    frows: FloatArray,
    finv: IntArray,
    b: FloatArray,
    elements: bool,
    warm: Warm | None,
    vtable: tuple[FloatArray, NDArray[np.bool_]] | None = None,
    *,
    max_iter: int,
    tol: float,
    balance_tol: float,
) -> dict[str, FloatArray]:
    """Solve one chunk of points sharing the species set of `prob`.

    frows (u, nf) are the distinct feed rows of the chunk, finv (m,) maps points to them,
    b (m, ne) the element totals; `warm` offers another start (λ (r, m), ln N, usable),
    taken where it leaves small residuals; `vtable`: ``prob.vertices(frows, elements)[:2]``
    if already known. Returns species-major ln n, mole fractions, totals, residuals,
    iterations and the fast path's (λ, ln N, usable).
    """
    m, nS = len(g), len(prob.species)
    rows = np.arange(m)
    gT = np.ascontiguousarray((g if nS == g.shape[1] else g[:, prob.species]).T)
    bT = np.ascontiguousarray(b[:, prob.cb.cols].T)
    V, feas = vtable if vtable is not None else prob.vertices(frows, elements)[:2]
    if not np.all(np.any(feas, axis=1)):
        bad = int(np.flatnonzero(~np.any(feas[finv], axis=1))[0])
        raise InputError(
            f"the feed at point {bad} cannot be made from the species "
            f"(element totals {b[bad].tolist()} lie outside their span)"
        )
    lam0, nu0 = np.full((prob.r, m), np.nan), np.full(m, np.nan)

    def start_lp(cols: IntArray) -> FloatArray:  # the linear-programme start where missing
        cols = cols[np.isnan(nu0[cols])]
        vert = np.empty((0, nS))
        if len(cols):
            lam0[:, cols], nu0[cols], vert = lp_start(
                prob, gT[:, cols], V, feas, finv[cols], bT[:, cols]
            )
        return vert

    if nS == prob.r:  # no reaction possible: the single vertex is the answer
        vert = start_lp(rows)
        iters, comp = np.zeros(m, dtype=np.int64), np.zeros(m)
        lnT, conv = (
            np.log(np.maximum(vert.T, 0.0), where=vert.T > 0, out=np.full((nS, m), -np.inf)),
            np.zeros(m, dtype=bool),
        )
    else:
        with np.errstate(all="ignore"):
            use, lam, nu = np.zeros(m, dtype=bool), np.zeros((prob.r, m)), np.zeros(m)
            lnb, state0 = np.log(bT), None
            if warm:  # a neighbours' solution, where it is already close
                wl, wn, wok = warm
                state0 = phase1_state(prob, gT, lnb, wl, wn)
                use = wok & (state0[6] < _WARM_MERIT)
                lam, nu = wl.copy(), wn.copy()
            if not np.all(use):
                cold = rows[~use]
                start_lp(cold)
                lam, nu = np.where(use, lam, lam0), np.where(use, nu, nu0)
                if state0 is not None:  # the state at the other start, where it is taken
                    fresh = phase1_state(prob, gT[:, cold], lnb[:, cold], lam[:, cold], nu[cold])
                    for arr, val in zip(state0, fresh, strict=True):
                        arr[..., cold] = val
            conv, iters = phase1(
                prob, gT, bT, lam, nu, min(max_iter, _PHASE1_ITER), tol, balance_tol, state0
            )
        lam1, nu1 = lam.copy(), nu.copy()
        lnT = prob.Ared @ lam + nu - gT  # (nS, m)
        # trace check in the max-min component basis: a rigorous bound, then exactly
        score = np.empty((len(prob.bases), m))  # (nb, m): smallest ln n of each basis
        for k_, basis in enumerate(prob.bases.tolist()):
            np.minimum(lnT[basis[0]], lnT[basis[-1]], out=score[k_])
            for i_ in basis[1:-1]:
                np.minimum(score[k_], lnT[i_], out=score[k_])
        # argmax over the bases (axis 0), row by row (a NaN score is never chosen; scores
        # are NaN only where the fast path failed, and those points are redone anyway)
        bid = np.zeros(m, dtype=np.intp)
        top = score[0].copy()
        for k_ in range(1, len(score)):
            better = score[k_] > top
            bid[better] = k_
            np.maximum(top, score[k_], out=top)
        with np.errstate(over="ignore", invalid="ignore"):
            n = np.exp(lnT)
            Rsum = np.abs(prob.AredT @ n - bT).sum(axis=0)
            comp = prob.Kmax[bid] * Rsum / np.exp(score[bid, rows])
        comp = np.where(conv & np.isfinite(comp), comp, np.inf)
        check = np.flatnonzero(conv & ~(comp <= 0.5 * balance_tol))
        if len(check):
            comp[check] = trace_residual(
                prob, lnT[:, check].T, V[finv[check]], b[check], bid[check]
            )
        hard = np.flatnonzero(~(comp <= 0.5 * balance_tol))
        for attempt in range(2):  # from the fast path's state, then from the start
            if not len(hard):
                break
            start_lp(hard)
            lnh, nuh = lnT[:, hard].T.copy(), nu[hard]
            bad = ~(np.all(np.isfinite(lnh), axis=1) & np.isfinite(nuh)) | (attempt == 1)
            lnh[bad] = (prob.Ared @ lam0[:, hard[bad]] + nu0[hard[bad]] - gT[:, hard[bad]]).T
            nuh[bad] = nu0[hard[bad]]
            Vp, bh = V[finv[hard]], bid[hard]
            iters[hard] += phase3(
                prob, gT[:, hard].T, Vp, b[hard], lnh, nuh, bh, max_iter, tol, balance_tol
            )
            lnT[:, hard], nu[hard], bid[hard] = lnh.T, nuh, bh
            with np.errstate(over="ignore"):
                n[:, hard] = np.exp(lnh.T)
            comp[hard] = trace_residual(prob, lnh, Vp, b[hard], bh)
            hard = hard[~(comp[hard] <= balance_tol)]
    # outputs, species-major: mole fractions, total, element balances, stationarity
    mx = lnT.max(axis=0)
    e = np.exp(lnT - mx)
    se = e.sum(axis=0)
    with np.errstate(invalid="ignore", over="ignore", divide="ignore"):
        if nS == prob.r:
            n = np.exp(lnT)
        bal = np.where(b.T > 0, np.abs(prob.A.T @ n - b.T) / b.T, 0.0).max(axis=0)
        stat = np.zeros(m)
        if len(prob.nu):
            stat = np.abs(prob.nu.astype(float) @ (gT + lnT - mx - np.log(se))).max(axis=0)
    out = {
        "lnn": lnT,
        "x": e / se,
        "total": n.sum(axis=0),
        "iters": iters,
        "comp": comp,
        "bal": np.nan_to_num(bal, nan=np.inf),
        "stat": np.nan_to_num(stat, nan=np.inf),
    }
    if nS > prob.r:
        out.update(lam=lam1, nu=nu1, ok=(conv & (comp <= 0.5 * balance_tol)).astype(float))
    return out


# ---------------------------------------------------------------------- driver
def minimize_gibbs(
    A: ArrayLike,
    mu0_RT: ArrayLike,
    b_or_n0: ArrayLike,
    ln_P_ratio: ArrayLike,
    *,
    gas_mask: ArrayLike | None = None,
    ln_phi: ArrayLike | None = None,
    tol: float = 1e-10,
    balance_tol: float = 1e-12,
    max_iter: int = 100,
    feed: str = "auto",
    chunk_size: int = 8192,
) -> GibbsSolution:
    """Minimise the Gibbs energy of an ideal-gas species list subject to element balances.

    Parameters
    ----------
    A : array_like, shape (ns, ne)
        Atom matrix: atoms of element j in species i, >= 0 (integers give exact trace
        balances).
    mu0_RT : array_like, shape (..., ns)
        Standard chemical potentials μ°_i/(R T) at p° on a common (formation) scale [-].
    b_or_n0 : array_like, shape (..., ns) or (..., ne)
        Feed amounts n°_i [mol] (element totals b = n° A), or element totals b_j [mol].
    ln_P_ratio : array_like, shape (...)
        ln(P/p°), P the absolute pressure and p° the standard pressure of `mu0_RT` [-].
    gas_mask : array_like of bool, shape (ns,), optional
        True for gas species; condensed species (False) are not supported yet.
    ln_phi : array_like, shape (..., ns), optional
        Fixed fugacity coefficients, ln φ_i [-]; default 0 (ideal gas).
    tol : float
        Required max |ln Q − ln K| over an independent reaction set [-].
    balance_tol : float
        Required relative closure of every element balance and trace balance [-].
    max_iter : int
        Newton iterations per point and path.
    feed : {"auto", "amounts", "elements"}
        How to read `b_or_n0`; ``"auto"`` decides by its last dimension (ns or ne).
    chunk_size : int
        Points solved together (5-20 thousand keep the temporaries in cache).

    Returns
    -------
    GibbsSolution
        Leading shape: the broadcast of the leading shapes of the inputs. Amounts, mole
        fractions and totals are NaN where a point did not converge.

    Raises
    ------
    InputError
        Bad shapes, negative or non-finite values, an empty feed, element totals that the
        species cannot make (or that contradict fixed element ratios of the species), a
        species without atoms.
    NotImplementedError
        Condensed species (`gas_mask` with False), or too many species for the basis
        enumeration (more than 20000 candidate bases).

    Notes
    -----
    Minimises G/(R T) = Σ_i n_i [g_i + ln(n_i/N)], g_i = μ°_i/(R T) + ln(P/p°) + ln φ_i,
    subject to Σ_i a_ij n_i = b_j and n_i >= 0 (see the module docstring for the method).
    With an ideal gas and fixed φ the problem is convex: the minimum is unique. A point
    that misses a tolerance is reported with ``converged=False``, never left out silently.

    Examples
    --------
    >>> import numpy as np
    >>> A = [[2, 0], [0, 2], [1, 3]]                      # N2, H2, NH3 (elements N, H)
    >>> mu0 = np.array([0.0, 0.0, -5.0])                   # invented potentials
    >>> sol = minimize_gibbs(A, mu0, [1.0, 3.0, 0.0], 0.0)
    >>> bool(sol.converged), float(np.round(sol.amounts @ np.array(A), 12)[0])
    (True, 2.0)
    """
    A, fd, elements, batch, g = _parse(A, mu0_RT, b_or_n0, ln_P_ratio, gas_mask, ln_phi, feed)
    if not (tol > 0 and balance_tol > 0 and max_iter >= 1 and chunk_size >= 1):
        raise InputError("tol and balance_tol must be > 0, max_iter and chunk_size >= 1")
    ns, npts = A.shape[0], len(g)
    frows = fd.reshape(-1, fd.shape[-1])
    findex = np.broadcast_to(np.arange(len(frows)).reshape(fd.shape[:-1]), batch).reshape(-1)
    brows = frows if elements else frows @ A
    out: dict[str, FloatArray] = {
        "lnn": np.full((npts, ns), -np.inf),
        "x": np.zeros((npts, ns)),
        "present": np.zeros((npts, ns)),
    }
    out.update({k: np.zeros(npts) for k in ("bal", "total", "iters", "comp", "stat")})
    for prob, pts in _groups(A, elements, frows, brows, findex, chunk_size):
        _solve_points(
            prob,
            pts,
            g,
            frows,
            brows,
            findex,
            elements,
            out,
            chunk_size,
            row=batch[-1] if batch else 1,
            max_iter=max_iter,
            tol=tol,
            balance_tol=balance_tol,
        )
    ok = (out["bal"] <= balance_tol) & (out["comp"] <= balance_tol) & (out["stat"] <= tol)
    lnn, x, total = out["lnn"], out["x"], out["total"]
    lnn[~ok], x[~ok], total[~ok] = np.nan, np.nan, np.nan
    integral = bool(np.all(A == np.round(A)))
    full_nu = reactions_of(A.astype(np.int64) if integral else A, "first")
    return GibbsSolution(
        amounts=np.exp(lnn).reshape(*batch, ns),
        ln_amounts=lnn.reshape(*batch, ns),
        mole_fractions=x.reshape(*batch, ns),
        total=total.reshape(batch),
        converged=ok.reshape(batch),
        iterations=out["iters"].astype(np.int64).reshape(batch),
        balance_residual=out["bal"].reshape(batch),
        trace_balance_residual=out["comp"].reshape(batch),
        stationarity_residual=out["stat"].reshape(batch),
        present=(out["present"] > 0).reshape(*batch, ns),
        reactions=full_nu,
        tol=float(tol),
        balance_tol=float(balance_tol),
    )


_NU_CACHE: dict[tuple[str, tuple[int, ...], bytes, str], NDArray[np.int64]] = {}


def reactions_of(A: NDArray[Any], components: str) -> NDArray[np.int64]:
    """:func:`eqconv.reaction_basis.independent_reactions` of `A`, cached by its contents.

    The exact (rational) elimination costs milliseconds; repeated calls with the same atom
    matrix get a copy of the stored set.
    """
    key = (A.dtype.str, A.shape, A.tobytes(), components)
    if key not in _NU_CACHE:
        if len(_NU_CACHE) > 64:
            _NU_CACHE.clear()
        _NU_CACHE[key] = independent_reactions(A, components=components)
    return _NU_CACHE[key].copy()


def _as_float(x: ArrayLike, name: str) -> FloatArray:
    arr = np.asarray(x, dtype=float)
    if not np.all(np.isfinite(arr)):
        raise InputError(
            f"{name} must be finite; got a non-finite value "
            f"({int(np.count_nonzero(~np.isfinite(arr)))} of {arr.size})"
        )
    return arr


def _parse(
    A_in: ArrayLike,
    mu0_RT: ArrayLike,
    b_or_n0: ArrayLike,
    ln_P_ratio: ArrayLike,
    gas_mask: ArrayLike | None,
    ln_phi: ArrayLike | None,
    feed: str,
) -> tuple[FloatArray, FloatArray, bool, tuple[int, ...], FloatArray]:
    """Check the inputs; return A, the feed, feed-is-elements, grid shape, g (npts, ns)."""
    A = _as_float(A_in, "A")
    if A.ndim != 2 or A.shape[0] < 1 or A.shape[1] < 1:
        raise InputError(f"A must be a 2-D (species × elements) matrix; got shape {A.shape}")
    ns, ne = A.shape
    if np.any(A < 0):
        raise InputError("atom counts in A must be >= 0 (ions and electrons are not supported)")
    if np.any(A.sum(axis=1) <= 0):
        raise InputError(f"species {int(np.flatnonzero(A.sum(axis=1) <= 0)[0])} has no atoms")
    if gas_mask is not None:
        gm = np.asarray(gas_mask, dtype=bool)
        if gm.shape != (ns,):
            raise InputError(f"gas_mask must have shape ({ns},); got {gm.shape}")
        if not np.all(gm):
            raise NotImplementedError(
                "condensed species (gas_mask False) are not supported by minimize_gibbs yet; "
                "a later version adds phase presence"
            )
    mu0 = _as_float(mu0_RT, "mu0_RT")
    if mu0.ndim < 1 or mu0.shape[-1] != ns:
        raise InputError(f"mu0_RT must have last dimension ns = {ns}; got shape {mu0.shape}")
    fd = _as_float(b_or_n0, "b_or_n0")
    last = fd.shape[-1] if fd.ndim else -1
    if feed == "auto":
        if ns == ne and last == ns:
            raise InputError(
                f"b_or_n0 has last dimension {ns} = ns = ne: pass feed='amounts' or feed='elements'"
            )
        feed = {ns: "amounts", ne: "elements"}.get(last, "?")
    if feed not in ("amounts", "elements") or last != (ns if feed == "amounts" else ne):
        raise InputError(
            f"b_or_n0 must have last dimension ns = {ns} (feed='amounts') or ne "
            f"= {ne} (feed='elements'); got shape {fd.shape}, feed={feed!r}"
        )
    if np.any(fd < 0):
        raise InputError(f"feed amounts must be >= 0 mol; got {float(fd[fd < 0].flat[0])!r}")
    lnP = _as_float(ln_P_ratio, "ln_P_ratio")
    lnphi = None if ln_phi is None else _as_float(ln_phi, "ln_phi")
    if lnphi is not None and (lnphi.ndim < 1 or lnphi.shape[-1] != ns):
        raise InputError(f"ln_phi must have last dimension ns = {ns}; got {lnphi.shape}")
    shapes = [mu0.shape[:-1], fd.shape[:-1], lnP.shape]
    if lnphi is not None:
        shapes.append(lnphi.shape[:-1])
    try:
        batch = np.broadcast_shapes(*shapes)
    except ValueError as exc:
        raise InputError(f"grid shapes do not broadcast: {shapes}") from exc
    g = mu0 + lnP[..., None] + (0.0 if lnphi is None else lnphi)
    g = np.ascontiguousarray(np.broadcast_to(g, (*batch, ns))).reshape(-1, ns)
    b = fd.reshape(-1, last) if feed == "elements" else fd.reshape(-1, last) @ A
    if np.any(b.sum(axis=1) <= 0):
        raise InputError("the feed contains no atoms (all amounts are zero) at some point")
    if feed == "elements" and np.any((b > 0) & ~np.any(A > 0, axis=0)):
        raise InputError("an element in the feed is in none of the species")
    return A, fd, feed == "elements", batch, g


def _groups(
    A: FloatArray,
    elements: bool,
    frows: FloatArray,
    brows: FloatArray,
    findex: IntArray,
    chunk: int,
) -> Iterator[tuple[Problem, IntArray]]:
    """Points grouped by the species that may be present there, with their tables.

    First the elements absent from the feed (and their species), then the species that
    every feasible composition lacks (from the vertices of the feasible set).
    """
    pat_codes, pat_inv = np.unique(brows <= 0, axis=0, return_inverse=True)
    for p, pat in enumerate(pat_codes):
        prow = np.flatnonzero(pat_inv.reshape(-1) == p)
        S0 = np.flatnonzero(~np.any(A[:, pat] > 0, axis=1)).astype(np.intp)
        if not len(S0):
            raise InputError("no species can be formed from the elements in the feed")
        prob0 = build(A, S0)
        if elements:  # fixed element ratios of the species must hold in the feed
            kept = np.flatnonzero(~pat)
            X = np.linalg.lstsq(prob0.Ared, prob0.A[:, kept], rcond=None)[0]
            b = brows[prow][:, kept]
            if np.any(np.abs(b[:, prob0.cb.cols] @ X - b) > 1e-9 * b.sum(axis=1)[:, None]):
                raise InputError(
                    "the element totals contradict fixed element ratios of the species"
                )
        fcols0 = prob0.cb.cols if elements else S0
        support = np.zeros((len(prow), len(S0)), dtype=bool)
        for lo in range(0, len(prow), chunk):
            _, feas, support[lo : lo + chunk] = prob0.vertices(
                frows[prow[lo : lo + chunk]][:, fcols0], elements
            )
            if not np.all(np.any(feas, axis=1)):
                raise InputError(
                    "the feed cannot be made from the species (element totals "
                    f"{brows[prow[lo : lo + chunk]][~np.any(feas, axis=1)][0].tolist()} lie "
                    "outside their span)"
                )
        sup_codes, sup_inv = np.unique(support, axis=0, return_inverse=True)
        row_group = np.full(len(frows), -1)
        row_group[prow] = sup_inv.reshape(-1)
        point_group = row_group[findex]
        for s_, sup in enumerate(sup_codes):
            prob = prob0 if np.all(sup) else build(A, S0[sup])
            yield prob, np.flatnonzero(point_group == s_)


def _coarse_plan(
    npts: int, row: int, stride: int
) -> tuple[IntArray, IntArray, FloatArray, IntArray]:
    """Coarse positions and, for every position, three coarse neighbours and their weights.

    The positions 0 … npts−1 are read as rows of length `row` (the last grid axis) when
    they divide into such rows of at least 4·stride points, else as one row (npts must be
    at least 4·stride). Coarse points: every `stride`-th point of each row and its last
    point, so that no start is interpolated across two rows. Returns
    the coarse positions (nc,), the indices into them of the neighbours (3, npts), the
    quadratic (Lagrange) weights (3, npts) of each position in its row, and which of the
    three neighbours is the nearest (npts,).
    """
    R = row if (row >= 4 * stride and npts % row == 0) else npts
    cc = np.unique(np.r_[np.arange(0, R, stride), R - 1])  # coarse columns of a row
    nc, nrow = len(cc), npts // R
    col = np.arange(R)
    if nc < 3:
        raise ValueError(f"a row of {R} points is too short for coarse starts (stride {stride})")
    k = np.minimum(np.searchsorted(cc, col, side="right") - 1, nc - 2)  # left neighbour
    first = np.minimum(np.maximum(k - 1, 0), nc - 3)  # three nodes around each point
    nodes = np.stack([first, first + 1, first + 2])
    t, x = cc[nodes].astype(float), col.astype(float)
    w = np.empty_like(t)
    for a in range(3):
        b_, c_ = (a + 1) % 3, (a + 2) % 3
        w[a] = (x - t[b_]) * (x - t[c_]) / ((t[a] - t[b_]) * (t[a] - t[c_]))
    near = np.argmin(np.abs(t - x), axis=0)
    coarse = (np.arange(nrow)[:, None] * R + cc).reshape(-1)
    offset = np.arange(nrow)[:, None] * nc
    nodes_all = (nodes[:, None, :] + offset[None]).reshape(3, -1)
    return coarse, nodes_all, np.tile(w, nrow), np.tile(near, nrow)


def _interpolate(coarse: FloatArray, nodes: IntArray, w: FloatArray, near: IntArray) -> Warm:
    """Start (λ, ln N, usable) from the coarse solutions at three neighbours.

    `coarse` (r + 2, nc): rows λ, ln N and converged (1.0 or 0.0) of the coarse points.
    Quadratic where all three neighbours converged; otherwise the nearest one, usable if it
    converged.
    """
    r = coarse.shape[0] - 2
    G = [coarse.take(nodes[a], axis=1) for a in range(3)]  # (r + 2, m) each
    good = [G[a][-1] > 0 for a in range(3)]
    quad = good[0] & good[1] & good[2]
    st = w[0] * G[0][:-1]
    st += w[1] * G[1][:-1]
    st += w[2] * G[2][:-1]
    ok = quad
    if not np.all(quad):  # the nearest neighbour's own values (a failed one may hold NaN)
        lone = np.flatnonzero(~quad)
        st[:, lone] = np.stack(G)[near[lone], :-1, lone].T
        ok = quad | np.stack(good)[near, np.arange(len(near))]
    return st[:r], st[r], ok


def _solve_points(
    prob: Problem,
    pts: IntArray,
    g: FloatArray,
    frows: FloatArray,
    brows: FloatArray,
    findex: IntArray,
    elements: bool,
    out: dict[str, FloatArray],
    chunk: int,
    row: int = 1,
    **kw: Any,
) -> None:
    """Solve the points `pts` of one group in chunks and fill `out`.

    Coarse to fine (:func:`_coarse_plan` with stride _STRIDE, then every point): each
    point is offered the solution interpolated between the coarse points around it in its
    row (`row`: the length of the last grid axis) as a start.
    """
    S, ns = prob.species, out["lnn"].shape[1]
    fcols = prob.cb.cols if elements else S
    last: list[tuple[bytes, tuple[FloatArray, NDArray[np.bool_]]]] = []  # vertex table kept

    def run(idx: IntArray, warm: Warm | None) -> dict[str, FloatArray]:
        sel: IntArray | slice = idx
        if idx[-1] - idx[0] == len(idx) - 1:  # contiguous: views, not copies
            sel = slice(int(idx[0]), int(idx[-1]) + 1)
        fi = findex[sel]
        if len(frows) == 1:
            urow, uinv = np.zeros(1, dtype=np.intp), np.zeros(len(idx), dtype=np.intp)
        else:
            urow, uinv = np.unique(fi, return_inverse=True)
        fr = frows[urow][:, fcols]
        key = fr.tobytes() + str(fr.shape).encode()
        if not last or last[0][0] != key:  # consecutive chunks usually share their feed rows
            last[:] = [(key, prob.vertices(fr, elements)[:2])]
        return _solve_chunk(
            prob, g[sel], fr, uinv.reshape(-1), brows[fi], elements, warm, last[0][1], **kw
        )

    iters = np.zeros(len(pts))
    coarse: FloatArray | None = None  # rows λ, ln N, usable at the coarse points
    stride = _STRIDE
    if len(pts) >= 4 * stride and len(S) > prob.r:
        cpos, nodes, wts, near = _coarse_plan(len(pts), row if len(pts) == len(g) else 1, stride)
        parts = []
        for lo in range(0, len(cpos), chunk):
            pos = cpos[lo : lo + chunk]
            res = run(pts[pos], None)
            iters[pos] += res["iters"]
            parts.append(res)
        coarse = np.vstack(
            [np.concatenate([q[k] for q in parts], axis=-1) for k in ("lam", "nu", "ok")]
        )
    for lo in range(0, len(pts), chunk):
        pos = np.arange(lo, min(lo + chunk, len(pts)))
        idx = pts[pos]
        sl = slice(lo, lo + len(pos))
        warm = None if coarse is None else _interpolate(coarse, nodes[:, sl], wts[:, sl], near[sl])
        res = run(idx, warm)
        iters[pos] += res["iters"]
        cols: tuple[IntArray, ...] | slice = (
            (idx,) if idx[-1] - idx[0] != len(idx) - 1 else slice(int(idx[0]), int(idx[-1]) + 1)
        )
        if len(S) < ns:
            cols = (idx[:, None], S[None, :])
        out["lnn"][cols], out["x"][cols], out["present"][cols] = res["lnn"].T, res["x"].T, 1
        rows = cols if isinstance(cols, slice) else idx
        for key in ("bal", "total", "comp", "stat"):
            out[key][rows] = res[key]
        out["iters"][rows] = iters[pos]
