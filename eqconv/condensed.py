"""Pure condensed phases at unit activity: which are present at equilibrium (pure array layer).

A pure solid or liquid (graphite in ``2 CO = C(s) + CO2``, ``CH4 = C(s) + 2 H2``) has
activity 1 while it exists and amount 0 when it does not. Whether it exists is part of the
answer: it is present only where forming it lowers the Gibbs energy. This module decides that
at every grid point, vectorized, on top of :func:`eqconv.extent_solver.solve_extents`.

Method (active set over phase assignments, points grouped by assignment)
----------------------------------------------------------------------------
For an assignment (which condensed species are present), the *absent* species are removed
from the problem: Gauss–Jordan elimination on the stoichiometric matrix gives, for each
absent species c, one pivot combination of reactions that contains c (and no other absent
species) and nr − n_absent combinations free of every absent species. The free ones are
solved by the extent solver with the amounts of the absent species fixed at zero (a fed
absent species is first converted by its pivot combination, or by a linear-programming
feasible point where that would drive another amount negative). The pivot combination then
gives the activity that c *would* have in equilibrium with that gas,

    ln a_c* = −(Σ_i M_pi ln a_i − ln K_p) / M_pc      (i ≠ c, ln a of condensed species 0),

and the assignment is consistent when every present species has n ≥ 0 with its reactions at
equilibrium and every absent one has ln a_c* ≤ tol (it would not form). These are the
Karush–Kuhn–Tucker conditions of min G subject to n ≥ 0: −ln a_c* is the multiplier of the
bound n_c ≥ 0. For an ideal gas G is convex, so exactly one assignment is consistent.

Order of trials at each point: the given start (or "all absent", whose gas-only problem is
the fast one), then "present where ln a* > tol" from that trial, then every other
assignment by decreasing number of present species. Each trial is one vectorized solve of
the points still open with that assignment; at most 2^n_condensed trials (n_condensed ≤
:data:`MAX_CONDENSED`). A point with no consistent assignment is reported as not converged;
so is a point where no gas would be left at equilibrium (e.g. CO2 + 2 H2 → C + 2 H2O to
completion with all the water condensed), which a gas-phase model cannot represent.

A present species acts as a reservoir of unit activity: its column is dropped and the
gas-only problem is solved by the fast paths of the extent solver, its amount following from
the extents. Where that leaves a reaction with gas on one side only (a pure phase change
such as H2O = H2O(l)), the columns are kept and the extent solver's safety-net path is used.

References
----------
.. [1] W. R. Smith and R. W. Missen, *Chemical Reaction Equilibrium Analysis: Theory and
   Algorithms*, Wiley (1982), ch. 2 and 6 (condensed phases of unit activity; existence
   tests by the affinity of formation).
.. [2] J. Nocedal and S. J. Wright, *Numerical Optimization*, 2nd ed., Springer (2006),
   §12.3 (KKT conditions) and §16.5 (active-set methods).
"""

from __future__ import annotations

from dataclasses import dataclass
from functools import cache
from typing import Any

import numpy as np
from numpy.typing import ArrayLike, NDArray

from .errors import InputError
from .extent_solver import BALANCE_TOL, ExtentSolution, check_independent, solve_extents

__all__ = ["MAX_CONDENSED", "PhaseSolution", "phase_residuals", "solve_phases"]

FloatArray = NDArray[np.float64]
BoolArray = NDArray[np.bool_]
IntArray = NDArray[np.int64]

#: Largest number of reacting condensed species handled (2^n assignments).
MAX_CONDENSED = 4


@dataclass(frozen=True)
class PhaseSolution:
    """Equilibrium with pure condensed phases; flat or grid leading dimensions.

    Attributes
    ----------
    solution : ExtentSolution
        Extents, amounts (0 for an absent condensed species), convergence, iterations,
        residual ln Q − ln K of every reaction with unit activity for every condensed species
        (so a reaction of an absent species shows how far from forming it the gas is), balance
        error and blocked flags.
    condensed : tuple of int
        Species indices of the reacting condensed species, in the order of the last axis of
        `present` and `ln_activity`.
    present : ndarray (..., nc) of bool
        True where the species exists at equilibrium (amount > 0).
    ln_activity : ndarray (..., nc)
        ln a of each condensed species: 0 where present; where absent, the activity it would
        have in equilibrium with the gas, ln a* ≤ tol (−inf if it cannot form at all); NaN
        where not converged.
    codes : ndarray (...) of int
        Assignment used (bit k set: condensed species k treated as present); −1 if none was
        consistent.
    """

    solution: ExtentSolution
    condensed: tuple[int, ...]
    present: BoolArray
    ln_activity: FloatArray
    codes: IntArray


# ----------------------------------------------------------------------- reduced systems
@dataclass(frozen=True)
class _Reduced:
    """Elimination of the absent species of one assignment."""

    absent: tuple[int, ...]
    keep: IntArray  # species kept in the reduced problem
    D: FloatArray  # (nr, nr'): reduced reaction r' = Σ_j D[j, r'] (reaction j)
    S: FloatArray  # (nr', ns): stoichiometry of the reduced reactions (absent columns 0)
    pivots: tuple[tuple[int, FloatArray, FloatArray] | None, ...]  # per absent: (c, E, M)


@cache
def _reduce_cached(nu_bytes: bytes, shape: tuple[int, int], absent: tuple[int, ...]) -> _Reduced:
    nu = np.frombuffer(nu_bytes, dtype=float).reshape(shape)
    nr, ns = shape
    E = np.eye(nr)
    M = nu.copy()
    free = list(range(nr))
    piv_row: dict[int, int | None] = {}
    scale = float(np.abs(nu).max(initial=1.0))
    for c in absent:
        cand = [r for r in free if abs(M[r, c]) > 1e-12 * scale]
        if not cand:
            piv_row[c] = None
            continue
        p = max(cand, key=lambda r: abs(M[r, c]))
        for r in range(nr):
            if r != p and M[r, c] != 0.0:
                f = M[r, c] / M[p, c]
                M[r] -= f * M[p]
                E[r] -= f * E[p]
                M[r, c] = 0.0
        free.remove(p)
        piv_row[c] = p
    M[np.abs(M) < 1e-12 * scale] = 0.0
    E[np.abs(E) < 1e-12] = 0.0
    pivots = tuple(
        None if piv_row[c] is None else (c, E[piv_row[c]].copy(), M[piv_row[c]].copy())
        for c in absent
    )
    keep = np.array([i for i in range(ns) if i not in absent], dtype=np.int64)
    return _Reduced(absent, keep, E[free].T.copy(), M[free].copy(), pivots)


def _reduce(nu: FloatArray, absent: tuple[int, ...]) -> _Reduced:
    a = np.ascontiguousarray(nu, dtype=float)
    return _reduce_cached(a.tobytes(), (int(a.shape[0]), int(a.shape[1])), absent)


def _bits(code: int, nc: int) -> BoolArray:
    return (int(code) >> np.arange(nc)) & 1 == 1


# ----------------------------------------------------------------------- residuals
def _log_activity(
    n: FloatArray, gas: BoolArray, lnP: FloatArray, lnphi: FloatArray | None
) -> tuple[FloatArray, BoolArray]:
    """ln a of every species (gas: ln y + ln φ + ln P/p°; condensed: 0) and the mask of gas
    species with zero amount (their ln a is −∞; 0 is stored)."""
    g = gas.astype(float)
    ng = n @ g
    with np.errstate(divide="ignore", invalid="ignore"):
        lna = np.log(np.where(gas & (n > 0.0), n, 1.0)) - np.log(ng)[:, None] + lnP[:, None]
    if lnphi is not None:
        lna = lna + lnphi
    zero = gas & ~(n > 0.0)
    lna = np.where(gas & ~zero, lna, 0.0)
    return lna, zero


def _residual(
    S: FloatArray, lnK_S: FloatArray, lna: FloatArray, zero: BoolArray
) -> tuple[FloatArray, BoolArray]:
    """ln Q − ln K of the reactions S (k, ns) and whether each involves a zero-amount gas."""
    r = lna @ S.T - lnK_S
    blocked = (zero.astype(float) @ (S != 0.0).T.astype(float)) > 0.0
    return np.where(blocked, 0.0, r), blocked


def _formation_log_activity(
    piv: tuple[int, FloatArray, FloatArray] | None,
    lnK: FloatArray,
    lna: FloatArray,
    zero: BoolArray,
) -> FloatArray:
    """ln a* of an absent species from its pivot combination (see the module notes)."""
    m = lna.shape[0]
    if piv is None:  # no reaction left that changes it: it cannot form
        return np.full(m, -np.inf)
    c, E, M = piv
    r = lna @ M - lnK @ E
    out = -r / M[c]
    # a zero-amount gas species in the combination: consumed when c forms -> c cannot form
    # (−∞); formed together with c -> its ln a = −∞ drives the formation (+∞); both: NaN
    side = -np.sign(M) * np.sign(M[c])  # +1 for species consumed when c forms
    zc = (zero & (side > 0.0)[None, :]).any(axis=1)
    zp = (zero & (side < 0.0)[None, :] & (M != 0.0)[None, :]).any(axis=1)
    out = np.where(zc, -np.inf, out)
    out = np.where(zp, np.inf, out)
    return np.where(zc & zp, np.nan, out)


def phase_residuals(
    nu: FloatArray,
    ln_K: FloatArray,
    amounts: FloatArray,
    ln_P_ratio: FloatArray,
    gas_mask: BoolArray,
    ln_phi: FloatArray | None,
    codes: IntArray,
    condensed: tuple[int, ...],
    tol: float,
    check_reduced: bool = True,
) -> tuple[BoolArray, FloatArray, BoolArray, FloatArray]:
    """Check the equilibrium conditions of a given phase assignment at flat points.

    Parameters
    ----------
    nu : ndarray (nr, ns)
        Stoichiometric matrix [-].
    ln_K : ndarray (m, nr)
        ln K at p° [-].
    amounts : ndarray (m, ns)
        Amounts [mol] (0 for absent condensed species).
    ln_P_ratio : ndarray (m,)
        ln(P/p°) [-].
    gas_mask : ndarray (ns,) of bool
        True for gas species.
    ln_phi : ndarray (m, ns) or None
        ln φ evaluated at `amounts` [-] (None: ideal gas).
    codes : ndarray (m,) of int
        Assignment per point (bit k: ``condensed[k]`` present).
    condensed : tuple of int
        Reacting condensed species indices.
    tol : float
        Tolerance on |ln Q − ln K| and on ln a* [-].
    check_reduced : bool
        Also require |ln Q − ln K| ≤ `tol` of the reactions at equilibrium (False when the
        caller's solver has just certified them in its own variables).

    Returns
    -------
    ok : ndarray (m,) of bool
        Every reaction of the reduced set within `tol` (blocked ones excepted), every absent
        species with ln a* ≤ `tol`, all amounts ≥ 0 and finite.
    residual : ndarray (m, nr)
        ln Q − ln K of every original reaction, condensed activities 1 (0 where blocked).
    blocked : ndarray (m, nr) of bool
        Reactions that involve a gas species of zero amount.
    ln_activity : ndarray (m, nc)
        0 for present species, ln a* for absent ones.
    """
    m = amounts.shape[0]
    nc = len(condensed)
    lna, zero = _log_activity(amounts, gas_mask, ln_P_ratio, ln_phi)
    r_full, blk = _residual(nu, ln_K, lna, zero)
    ok: BoolArray = np.asarray(
        np.isfinite(amounts).all(axis=1) & (amounts >= 0.0).all(axis=1), dtype=bool
    )
    lnact = np.zeros((m, nc))
    full = (1 << nc) - 1
    for code in np.unique(codes):
        sel = np.flatnonzero(codes == code)
        absent = tuple(condensed[k] for k in range(nc) if not _bits(int(code), nc)[k])
        if code == full or not absent:
            if check_reduced:
                ok[sel] &= np.abs(r_full[sel]).max(axis=1, initial=0.0) <= tol
            continue
        red = _reduce(nu, absent)
        if red.S.shape[0] and check_reduced:
            rr, _ = _residual(red.S, ln_K[sel] @ red.D, lna[sel], zero[sel])
            ok[sel] &= np.abs(rr).max(axis=1, initial=0.0) <= tol
        for c, piv in zip(absent, red.pivots, strict=True):
            la = _formation_log_activity(piv, ln_K[sel], lna[sel], zero[sel])
            lnact[sel, condensed.index(c)] = la
            ok[sel] &= la <= tol  # NaN fails
            ok[sel] &= amounts[sel, c] == 0.0
    return ok, r_full, blk, lnact


# ----------------------------------------------------------------------- one assignment
def _feasible_shift(nu: FloatArray, red: _Reduced, n0: FloatArray) -> tuple[FloatArray, BoolArray]:
    """Feed with the absent species converted (amounts ≥ 0) and where that is possible."""
    n = n0.copy()
    ok = np.ones(n0.shape[0], dtype=bool)
    for c, piv in zip(red.absent, red.pivots, strict=True):
        fed = n0[:, c] > 0.0
        if not np.any(fed):
            continue
        if piv is None:
            ok &= ~fed
            continue
        _, _, M = piv
        n = n + (-n0[:, c] / M[c])[:, None] * M[None, :]
        n[:, c] = 0.0
    tot = np.abs(n0).sum(axis=1)
    tiny = (n < 0.0) & (n > -1e-14 * tot[:, None])
    n = np.where(tiny, 0.0, n)
    neg = np.flatnonzero(ok & np.any(n < 0.0, axis=1))
    if neg.size:
        _lp_repair(red, n, ok, neg)
    return n, ok


def _lp_repair(red: _Reduced, n: FloatArray, ok: BoolArray, rows: IntArray) -> None:
    """Move shifted feeds with a negative amount to a feasible point of the reduced problem
    by linear programming, once per distinct feed row (in place); infeasible rows -> ok False."""
    from scipy.optimize import linprog

    S = red.S[:, red.keep]
    uniq, inv = np.unique(n[rows], axis=0, return_inverse=True)
    for u in range(uniq.shape[0]):  # a loop over distinct feeds, not over grid points
        row = uniq[u]
        hit = rows[np.ravel(inv) == u]
        if S.shape[0] == 0:
            ok[hit] = False
            continue
        b = row[red.keep]
        sol = linprog(
            np.zeros(S.shape[0]),
            A_ub=-S.T,
            b_ub=b,
            bounds=[(None, None)] * S.shape[0],
            method="highs",
        )
        if sol.status != 0:
            ok[hit] = False
            continue
        new = row.copy()
        new[red.keep] = b + S.T @ sol.x
        new[np.abs(new) < 1e-14 * np.abs(row).sum()] = 0.0
        if np.any(new < 0.0):
            ok[hit] = False
            continue
        n[hit] = new


@dataclass
class _Attempt:
    n: FloatArray
    conv: BoolArray
    iters: IntArray
    res: FloatArray
    blocked: BoolArray
    lnact: FloatArray


def _solve_assignment(
    nu: FloatArray,
    lnK: FloatArray,
    n0: FloatArray,
    lnP: FloatArray,
    gas: BoolArray,
    lnphi: FloatArray | None,
    condensed: tuple[int, ...],
    code: int,
    tol: float,
    opts: dict[str, Any],
) -> _Attempt:
    """Solve the points of one assignment and check it (flat arrays of those points).

    Absent species are eliminated (see :func:`_reduce`). Present ones act as reservoirs of
    unit activity: their columns are dropped, the gas-only problem is solved (the fast
    paths of the extent solver), and their amounts follow from the extents; a negative
    amount makes the assignment inconsistent. Where dropping the columns would leave a
    reaction with gas on one side only (or dependent gas parts), the problem is solved with
    those columns kept (the extent solver's safety-net path).
    """
    m, ns = n0.shape
    nc = len(condensed)
    codes = np.full(m, code, dtype=np.int64)
    absent = tuple(condensed[k] for k in range(nc) if not _bits(code, nc)[k])
    present = [c for c in condensed if c not in absent]
    red = _reduce(nu, absent)
    nr_red = red.S.shape[0]
    feed, feas = _feasible_shift(nu, red, n0)
    feas &= feed[:, gas] @ np.ones(int(gas.sum())) > 0.0
    n = np.full((m, ns), np.nan)
    iters = np.zeros(m, dtype=np.int64)
    conv = np.zeros(m, dtype=bool)
    idx = np.flatnonzero(feas)
    if idx.size and nr_red == 0:
        n[idx] = feed[idx]
        conv[idx] = True
    elif idx.size:
        S_all = red.S[:, red.keep]
        if not np.all(np.any(S_all[:, gas[red.keep]] != 0.0, axis=1)):
            raise InputError(
                "with the condensed species "
                f"{list(absent)} absent, a combination of the reactions involves no gas "
                "species; reactions among condensed species only are not handled"
            )
        solve_idx = np.array([i for i in red.keep if i not in present], dtype=np.int64)
        Sg = red.S[:, solve_idx]
        gpart = Sg[:, gas[solve_idx]]
        two_sided = bool(np.all((gpart > 0.0).any(axis=1) & (gpart < 0.0).any(axis=1)))
        independent = np.linalg.matrix_rank(Sg) == nr_red
        if not (two_sided and independent):
            solve_idx = red.keep  # keep the present columns: safety-net path
            Sg = S_all
        sub = solve_extents(
            Sg,
            lnK[idx] @ red.D,
            feed[idx][:, solve_idx],
            lnP[idx],
            gas_mask=gas[solve_idx],
            ln_phi=None if lnphi is None else lnphi[idx][:, solve_idx],
            tol=tol,
            **opts,
        )
        full = np.zeros((idx.size, ns))
        full[:, solve_idx] = sub.amounts
        ok = sub.converged.copy()
        for c in present:
            if c in solve_idx:
                continue
            nc_amount = feed[idx, c] + sub.extents @ red.S[:, c]
            tiny = np.abs(nc_amount) <= 1e-15 * np.abs(feed[idx]).sum(axis=1)
            nc_amount = np.where(tiny, 0.0, nc_amount)
            ok &= nc_amount >= 0.0  # a present phase cannot have a negative amount
            full[:, c] = nc_amount
        n[idx] = np.where(ok[:, None], full, np.nan)
        conv[idx] = ok
        iters[idx] = sub.iterations
    # the reduced solve met tol in its own variables: only the absent species are checked
    ok_all, res, blk, lnact = phase_residuals(
        nu,
        lnK,
        np.where(conv[:, None], n, 0.0),
        lnP,
        gas,
        lnphi,
        codes,
        condensed,
        tol,
        check_reduced=False,
    )
    ok_all &= conv
    return _Attempt(n, ok_all, iters, res, blk, np.where(conv[:, None], lnact, np.nan))


# ----------------------------------------------------------------------- public
def _balance_error(nu: FloatArray, n0: FloatArray, n: FloatArray) -> FloatArray:
    nr = nu.shape[0]
    cons = np.linalg.svd(nu)[2][nr:].T  # (ns, ns - nr)
    if cons.size == 0:
        return np.zeros(n.shape[0])
    now, ref = n @ cons, n0 @ cons
    size = n0 @ np.abs(cons) + 1e-300
    return np.max(np.abs(now - ref) / size, axis=1)


def reacting_condensed(nu: ArrayLike, gas_mask: ArrayLike) -> tuple[int, ...]:
    """Indices of condensed species (gas_mask False) that take part in a reaction."""
    nu_a = np.asarray(nu, dtype=float)
    gas = np.asarray(gas_mask, dtype=bool)
    return tuple(int(i) for i in np.flatnonzero(~gas & np.any(nu_a != 0.0, axis=0)))


def solve_phases(
    nu: ArrayLike,
    ln_K: ArrayLike,
    n0: ArrayLike,
    ln_P_ratio: ArrayLike,
    *,
    gas_mask: ArrayLike,
    ln_phi: ArrayLike | None = None,
    tol: float = 1e-10,
    start: ArrayLike | None = None,
    max_iter: int = 200,
    chunk: int = 16384,
) -> PhaseSolution:
    """Equilibrium with pure condensed phases whose presence is decided at every point.

    Parameters
    ----------
    nu : array_like (nr, ns)
        Stoichiometric matrix, products > 0 [-]; independent rows.
    ln_K : array_like (..., nr)
        ln K at p° [-], condensed species in their pure standard state.
    n0 : array_like (..., ns)
        Feed amounts [mol], ≥ 0 (a condensed species may be fed).
    ln_P_ratio : array_like (...)
        ln(P/p°) [-].
    gas_mask : array_like (ns,) of bool
        False for a pure condensed species (activity 1 while present).
    ln_phi : array_like (..., ns), optional
        Fixed ln φ of the gas species [-] (default 0, ideal gas).
    tol : float
        Required |ln Q − ln K| of the reactions at equilibrium and bound on ln a* of an
        absent species [-].
    start : array_like (...) of int, optional
        Assignment to try first (bit k: k-th reacting condensed species present), e.g. from
        a previous solve (default: all absent).
    max_iter, chunk : int
        Passed to :func:`~eqconv.extent_solver.solve_extents`.

    Returns
    -------
    PhaseSolution
        Grid shape of the broadcast inputs.

    Raises
    ------
    InputError
        More than :data:`MAX_CONDENSED` reacting condensed species, or bad arrays (see
        :func:`~eqconv.extent_solver.solve_extents`).

    Notes
    -----
    See the module notes: an assignment is accepted at a point when its reactions are at
    equilibrium, every present species has n ≥ 0 and every absent one has ln a* ≤ tol,
    the Karush–Kuhn–Tucker conditions of minimum Gibbs energy with n ≥ 0. Without reacting
    condensed species this is :func:`~eqconv.extent_solver.solve_extents`.

    Examples
    --------
    Boudouard reaction 2 CO = C(s) + CO2 from pure CO at 1 bar with an invented
    ln K = 2: carbon forms (ideal gas: y_CO2 / y_CO² = e²).

    >>> ps = solve_phases([[-2.0, 1.0, 1.0]], [2.0], [1.0, 0.0, 0.0], 0.0,
    ...                   gas_mask=[True, False, True])
    >>> bool(ps.present[0]), bool(ps.solution.converged)
    (True, True)

    From CO:CO2 = 1:1 with ln K = −2 it does not (Q = y_CO2 / y_CO² = 2 > K): nothing
    reacts, and the carbon activity the gas would support is K/Q = e⁻²/2.

    >>> ps = solve_phases([[-2.0, 1.0, 1.0]], [-2.0], [1.0, 0.0, 1.0], 0.0,
    ...                   gas_mask=[True, False, True])
    >>> bool(ps.present[0]), ps.solution.amounts.tolist()
    (False, [1.0, 0.0, 1.0])
    >>> round(float(ps.ln_activity[0]), 6), round(-2.0 - float(np.log(2.0)), 6)
    (-2.693147, -2.693147)
    """
    nu_a = np.asarray(nu, dtype=float)
    if nu_a.ndim != 2:
        raise InputError(f"nu must be a (n_reactions, n_species) matrix; got shape {nu_a.shape}")
    check_independent(nu_a)
    nr, ns = nu_a.shape
    gas = np.asarray(gas_mask, dtype=bool)
    if gas.shape != (ns,):
        raise InputError(f"gas_mask must have shape ({ns},); got {gas.shape}")
    condensed = reacting_condensed(nu_a, gas)
    nc = len(condensed)
    if nc > MAX_CONDENSED:
        raise InputError(f"{nc} reacting condensed species; at most {MAX_CONDENSED} are handled")
    opts = {"max_iter": max_iter, "chunk": chunk}
    if nc == 0:
        sol = solve_extents(
            nu_a, ln_K, n0, ln_P_ratio, gas_mask=gas, ln_phi=ln_phi, tol=tol, **opts
        )
        shape = sol.shape
        return PhaseSolution(
            sol,
            (),
            np.zeros((*shape, 0), dtype=bool),
            np.zeros((*shape, 0)),
            np.zeros(shape, dtype=np.int64),
        )
    lnK = np.asarray(ln_K, dtype=float)
    feed = np.asarray(n0, dtype=float)
    lnP = np.asarray(ln_P_ratio, dtype=float)
    phi = None if ln_phi is None else np.asarray(ln_phi, dtype=float)
    shapes = [lnK.shape[:-1], feed.shape[:-1], lnP.shape]
    if phi is not None:
        shapes.append(phi.shape[:-1])
    if start is not None:
        shapes.append(np.shape(start))
    try:
        shape = np.broadcast_shapes(*shapes)
    except ValueError as exc:
        raise InputError(f"grid shapes do not broadcast: {shapes}") from exc
    if lnK.shape[-1:] != (nr,) or feed.shape[-1:] != (ns,):
        raise InputError(f"ln_K must end in {nr} and n0 in {ns}; got {lnK.shape} and {feed.shape}")
    N = int(np.prod(shape))
    lnK_f = np.ascontiguousarray(np.broadcast_to(lnK, (*shape, nr)).reshape(N, nr))
    n0_f = np.ascontiguousarray(np.broadcast_to(feed, (*shape, ns)).reshape(N, ns))
    lnP_f = np.ascontiguousarray(np.broadcast_to(lnP, shape).reshape(N))
    phi_f = None if phi is None else np.broadcast_to(phi, (*shape, ns)).reshape(N, ns)
    if not np.all(np.isfinite(n0_f)) or np.any(n0_f < 0.0):
        raise InputError("feed amounts n0 must be finite and >= 0 mol")
    if not (np.all(np.isfinite(lnK_f)) and np.all(np.isfinite(lnP_f))):
        raise InputError("ln_K and ln_P_ratio must be finite")
    first = (
        np.zeros(N, dtype=np.int64)
        if start is None
        else np.broadcast_to(np.asarray(start, dtype=np.int64), shape).reshape(N)
    )
    if np.any((first < 0) | (first >= (1 << nc))):
        first = np.where((first < 0) | (first >= (1 << nc)), 0, first)

    n = np.full((N, ns), np.nan)
    conv = np.zeros(N, dtype=bool)
    iters = np.zeros(N, dtype=np.int64)
    res = np.full((N, nr), np.nan)
    blk = np.zeros((N, nr), dtype=bool)
    lnact = np.full((N, nc), np.nan)
    codes = np.full(N, -1, dtype=np.int64)
    tried = np.zeros((N, 1 << nc), dtype=bool)

    def attempt(idx: IntArray, code_of: IntArray) -> BoolArray:
        """Solve the points `idx` with their assignment codes; store the consistent ones."""
        got = np.zeros(idx.size, dtype=bool)
        hint = np.zeros(idx.size, dtype=np.int64)
        for code in np.unique(code_of):
            k = np.flatnonzero(code_of == code)
            p = idx[k]
            at = _solve_assignment(
                nu_a,
                lnK_f[p],
                n0_f[p],
                lnP_f[p],
                gas,
                None if phi_f is None else phi_f[p],
                condensed,
                int(code),
                tol,
                opts,
            )
            tried[p, code] = True
            iters[p] += at.iters
            good = at.conv
            q = p[good]
            n[q], conv[q], res[q], blk[q] = at.n[good], True, at.res[good], at.blocked[good]
            lnact[q], codes[q] = at.lnact[good], code
            fresh = ~good & np.isnan(res[p]).all(axis=1)
            res[p[fresh]] = at.res[fresh]
            got[k] = good
            # next hint: present where the gas would form the species
            with np.errstate(invalid="ignore"):
                la = _hint_activity(nu_a, lnK_f[p], at, lnP_f[p], gas, phi_f, p, condensed)
            want = np.where(la > tol, 1, 0) @ (1 << np.arange(nc))
            hint[k] = int(code) | want
        return np.where(got, -1, hint).astype(np.int64)

    all_idx = np.arange(N)
    hint = attempt(all_idx, first)
    open_ = np.flatnonzero(~conv)
    if open_.size:
        h = hint[open_]
        fresh = (h >= 0) & ~tried[open_, np.maximum(h, 0)]
        if np.any(fresh):
            attempt(open_[fresh], np.asarray(h[fresh], dtype=np.int64))
    order = sorted(range(1 << nc), key=lambda c: (-bin(c).count("1"), c))
    for code in order:
        open_ = np.flatnonzero(~conv & ~tried[:, code])
        if open_.size:
            attempt(open_, np.full(open_.size, code, dtype=np.int64))

    bad = ~conv
    berr = np.where(bad, np.nan, 0.0)
    if np.any(conv):
        c_idx = np.flatnonzero(conv)
        berr[c_idx] = _balance_error(nu_a, n0_f[c_idx], n[c_idx])
        late = c_idx[~(berr[c_idx] <= BALANCE_TOL)]
        conv[late] = False
        n[late] = np.nan
        bad = ~conv
    Lp = np.linalg.pinv(nu_a.T)
    xi = (n - n0_f) @ Lp.T
    present = np.zeros((N, nc), dtype=bool)
    for k, c in enumerate(condensed):
        present[:, k] = conv & (n[:, c] > 0.0)
    lnact = np.where(bad[:, None], np.nan, lnact)
    codes[bad] = -1
    sol = ExtentSolution(
        extents=xi.reshape(*shape, nr),
        amounts=n.reshape(*shape, ns),
        converged=conv.reshape(shape),
        iterations=iters.reshape(shape),
        residual=res.reshape(*shape, nr),
        balance_error=berr.reshape(shape),
        blocked=blk.reshape(*shape, nr),
    )
    return PhaseSolution(
        sol,
        condensed,
        present.reshape(*shape, nc),
        lnact.reshape(*shape, nc),
        codes.reshape(shape),
    )


def _hint_activity(
    nu: FloatArray,
    lnK: FloatArray,
    at: _Attempt,
    lnP: FloatArray,
    gas: BoolArray,
    phi_f: FloatArray | None,
    p: IntArray,
    condensed: tuple[int, ...],
) -> FloatArray:
    """ln a* of every condensed species in the gas of an attempt (for the next trial);
    −inf where that attempt failed."""
    nc = len(condensed)
    out = np.full((p.size, nc), -np.inf)
    ok = at.conv | np.isfinite(at.n).all(axis=1)
    if not np.any(ok):
        return out
    # treat every condensed species as absent: one pivot per species from the full system
    red = _reduce(nu, condensed)
    lna, zero = _log_activity(
        np.where(ok[:, None], at.n, 1.0), gas, lnP, None if phi_f is None else phi_f[p]
    )
    for k, piv in enumerate(red.pivots):
        la = _formation_log_activity(piv, lnK, lna, zero)
        out[:, k] = np.where(ok, la, -np.inf)
    return out
