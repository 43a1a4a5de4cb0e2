"""Several-reaction path of :mod:`eqconv.extent_solver`: feed patterns, starts, adapted Newton.

Private module. Feed patterns (which species are present) decide by linear programming which
species can be formed at all; starts come from the combined reaction along an interior ray
and Gauss-Seidel sweeps (the last ones in an abundance-adapted basis), or, for one feed on a
large grid, from a table over c = Δn ln(P/p°) + Σν ln φ − ln K; Newton then runs in an
abundance-adapted basis, with :mod:`eqconv._extent_robust` as the safety net.
"""

from __future__ import annotations

import itertools
from dataclasses import dataclass
from typing import Any

import numpy as np
from numpy.typing import NDArray

from ._extent_one import _solve_one
from ._extent_robust import _FRACTION_TO_BOUNDARY, _chol_solve, _gas_terms, _solve_robust

FloatArray = NDArray[np.float64]
BoolArray = NDArray[np.bool_]


_PATTERNS: dict[tuple[bytes, tuple[int, ...], bytes], tuple[Any, Any, Any]] = {}
#: Cold start: sweeps in the adapted basis after the first one, each only at the points
#: where some reaction is still off by more than _RESWEEP in |ln Q − ln K| (a factor e^10);
#: the others are left to Newton, which needs a few iterations from there anyway.
_SWEEPS = 2
_RESWEEP = 10.0


def _feed_pattern(nu: FloatArray, present: BoolArray) -> tuple[FloatArray, BoolArray, FloatArray]:
    """Cached :func:`_pattern_lp` (the same reactions and feed pattern recur in sweeps)."""
    key = (nu.tobytes(), nu.shape, present.tobytes())
    if key not in _PATTERNS:
        if len(_PATTERNS) > 256:
            _PATTERNS.clear()
        _PATTERNS[key] = _pattern_lp(nu, present)
    d, never, basis = _PATTERNS[key]
    return d.copy(), never.copy(), basis.copy()


def _pattern_lp(nu: FloatArray, present: BoolArray) -> tuple[FloatArray, BoolArray, FloatArray]:
    """Interior direction, never-formable species and allowed extents for one feed pattern.

    Returns ``d`` (nr,) with (νᵀd)_i > 0 for every absent species that some feasible
    extent can form and (νᵀd)_i = 0 for the others; the mask of species that stay zero at
    every feasible point (one small LP per absent species: the species can be formed iff
    some direction keeps every absent species ≥ 0 and makes it > 0); and an orthonormal
    basis B (nr, k) of the extents that keep those species at zero.
    """
    nr, ns = nu.shape
    reacting = np.any(nu != 0.0, axis=0)
    absent = np.flatnonzero(reacting & ~present)
    d = np.zeros(nr)
    never = np.zeros(ns, dtype=bool)
    if absent.size == 0:
        return d, never, np.eye(nr)
    from scipy.optimize import linprog  # (imported here: scipy.optimize is slow to import)

    A_ub = -nu[:, absent].T
    for s in absent:
        res = linprog(
            -nu[:, s],
            A_ub=A_ub,
            b_ub=np.zeros(absent.size),
            bounds=[(-1.0, 1.0)] * nr,
            method="highs",
        )
        if res.status == 0 and -res.fun > 1e-7:
            d += res.x
        else:
            never[s] = True
    if np.any(never):
        M = nu[:, never].T
        rank = np.linalg.matrix_rank(M)
        basis = np.linalg.svd(M)[2][rank:].T  # (nr, k), null space of M
        d = basis @ (basis.T @ d)
    else:
        basis = np.eye(nr)
    return d, never, basis


def _interior_start(nu: FloatArray, n0: FloatArray, d: FloatArray, never: BoolArray) -> FloatArray:
    """Amounts (m, ns) half-way along d to the first bound (strictly positive start)."""
    dn = d @ nu
    dn[never] = 0.0
    neg = np.flatnonzero(dn < 0.0)
    if not np.any(dn != 0.0):
        return n0.copy()
    if neg.size:
        t = n0[:, neg[0]] / -dn[neg[0]]
        for i in neg[1:]:
            np.minimum(t, n0[:, i] / -dn[i], out=t)
        t *= 0.5
    else:
        t = n0.sum(axis=1) / np.max(np.abs(dn))
    n = n0 + t[:, None] * dn
    n[:, never] = 0.0
    return n


def _cold_start(
    nu: FloatArray,
    n0: FloatArray,
    pattern: tuple[FloatArray, BoolArray, Any],
    lnK: FloatArray,
    gconst: FloatArray,
    gas: BoolArray,
) -> FloatArray:
    """Cold start: the combined reaction dᵀν along the ray n0 + t νᵀd, then sweeps.

    G is convex along the ray and its slope there is the residual of the combined reaction,
    so a few single-reaction iterations give a strictly positive start of the right order
    of magnitude even when K is 1e-100 (every product tiny) or 1e100. Gauss-Seidel sweeps
    (each reaction alone to its rough equilibrium, the others frozen) follow: one over the
    reactions as given, then up to :data:`_SWEEPS` more where a reaction is still far from
    equilibrium, in the abundance-adapted basis of each point (:func:`_sweep_basis`). There
    each of the scarcest species is made by one reaction only, so no reaction of the sweep
    is held back by a trace that another reaction would first have to make: with CH4 + CO2,
    a trace of H2 and no H2O, reforming and shift alone are each limited by a trace, while
    their difference, dry reforming CH4 + CO2 = 2 CO + 2 H2, is limited by the CO2 only.
    All single-reaction moves keep every amount a sum of positive terms.
    """
    d, never, _ = pattern
    react = np.any(nu != 0.0, axis=0)

    def rough(v: FloatArray, lk: FloatArray, x: FloatArray, gc: FloatArray) -> FloatArray:
        gm = gas & (v != 0.0)
        if not (np.any(v > 0.0) and np.any(v < 0.0) and np.any(gm)):
            return x
        lk = lk - gc[:, gm] @ v[gm]  # folds ln(P/p°) and ln φ into ln K
        y = _solve_one(v, lk, x, np.zeros(x.shape[0]), None, gas, 1e-3, 12)[1]
        ok = np.all(np.isfinite(y), axis=1) & np.all(y[:, react & ~never] > 0.0, axis=1)
        return np.where(ok[:, None], y, x)

    if np.any(never):
        return _interior_start(nu, n0, d, never)
    x = n0.copy()
    if np.any(d != 0.0):
        x = rough(d @ nu, lnK @ d, x, gconst)  # exact combination: conserves what ν conserves
        bad = ~np.all(x[:, react] > 0.0, axis=1)
        if np.any(bad):
            x[bad] = _interior_start(nu, n0[bad], d, never)
    for j in range(nu.shape[0]):  # one sweep over the reactions as given
        x = rough(nu[j], lnK[:, j], x, gconst)
    bases = _bases(nu, gas)
    todo = np.arange(x.shape[0])
    for _ in range(_SWEEPS if len(bases) > 1 else 0):
        g, _ = _gas_terms(x[todo], gas, react, gconst[todo])
        near = np.abs(g @ nu.T - lnK[todo]).max(axis=1) <= _RESWEEP  # False for NaN
        todo = todo[~near]
        if todo.size == 0:
            break
        ids = _sweep_basis(bases, x[todo][:, react])
        for b in np.unique(ids).tolist():
            rows = todo[ids == b]
            nub = _basis_nu(bases[b], react)
            lkb = lnK[rows] @ bases[b].minv.T  # r' = M⁻¹ r, so ln K' = M⁻¹ ln K
            xb, gb = x[rows], gconst[rows]
            for j in range(nub.shape[0]):
                xb = rough(nub[j], lkb[:, j], xb, gb)
            x[rows] = xb
    return x


def _sweep_basis(bases: list[_Basis], xr: FloatArray) -> NDArray[np.intp]:
    """Per point, the basis whose pivots have the smallest Σ ln n (xr: reacting amounts)."""
    L = np.log(np.maximum(xr, 1e-300)).T  # (n_react, m); floor: 0·(−inf) would give NaN
    wts = np.array([B.pick for B in bases]) @ L
    ids = np.zeros(xr.shape[0], dtype=np.intp)
    best = wts[0].copy()
    for b in range(1, len(bases)):
        better = wts[b] < best
        ids[better] = b
        np.minimum(best, wts[b], out=best)
    return ids


def _basis_nu(B: _Basis, react: BoolArray) -> FloatArray:
    """The basis reactions ν' (nr, ns) on all species, exactly 1 and 0 on the pivots."""
    nr = B.piv.size
    nup = np.zeros((nr, int(np.count_nonzero(react))))
    nup[:, B.piv] = np.eye(nr)
    nup[:, B.rest] = B.rest_t.T
    out = np.zeros((nr, react.size))
    out[:, react] = nup
    return out


def _solve_small(
    H: list[list[FloatArray]], r: list[FloatArray]
) -> tuple[list[FloatArray], BoolArray]:
    """Solve H x = −r for symmetric positive definite H; closed form up to 2 × 2."""
    if len(r) == 2:
        h00, h01, h11 = H[0][0], H[0][1], H[1][1]
        det = h00 * h11
        ok = det > 0.0
        det -= h01 * h01
        ok &= det > 1e-14 * (h00 * h11)
        with np.errstate(divide="ignore", invalid="ignore"):
            inv = -1.0 / det
        return [(h11 * r[0] - h01 * r[1]) * inv, (h00 * r[1] - h01 * r[0]) * inv], ok
    return _chol_solve(H, [-x for x in r])


@dataclass(frozen=True)
class _Basis:
    """A reaction basis in which reacting species ``piv[k]`` is made by reaction k alone.

    Indices refer to the reacting species only; matrices act on species-major arrays.
    """

    piv: NDArray[np.intp]  # (nr,) pivot positions
    rest: NDArray[np.intp]  # the other reacting species
    minv: FloatArray  # (nr, nr): ν' = minv @ ν and r' = minv @ r
    rest_t: FloatArray  # (n_rest, nr): ν'ᵀ on the other species
    A: FloatArray  # (n_pairs, n_react): ν'_j ν'_k on gas species, for the Hessian
    DD: FloatArray  # (n_pairs,): Δn'_j Δn'_k
    pick: FloatArray  # (n_react,): 1 on the pivots (selection weight Σ ln n over pivots)


_BASES: dict[tuple[bytes, tuple[int, ...], bytes], list[_Basis]] = {}
_MAX_BASES = 40


def _bases(nu: FloatArray, gas: BoolArray) -> list[_Basis]:
    """All reaction bases with one gas pivot per reaction (none if more than 40)."""
    key = (nu.tobytes(), nu.shape, gas.tobytes())
    if key in _BASES:
        return _BASES[key]
    nr = nu.shape[0]
    react = np.flatnonzero(np.any(nu != 0.0, axis=0))
    nur, gr = nu[:, react], gas[react]
    pairs = [(j, k) for j in range(nr) for k in range(j, nr)]
    out: list[_Basis] = []
    for piv in itertools.combinations(np.flatnonzero(gr).tolist(), nr):
        M = nur[:, piv]
        if abs(np.linalg.det(M)) < 1e-9 * max(1.0, float(np.abs(M).max()) ** nr):
            continue
        if len(out) == _MAX_BASES:
            out = []
            break
        minv = np.asarray(np.linalg.inv(M), dtype=float)
        nup = minv @ nur
        nup[np.abs(nup) < 1e-13] = 0.0
        nup[:, piv] = np.eye(nr)
        rest = np.array([i for i in range(react.size) if i not in piv], dtype=np.intp)
        D = (nup * gr).sum(axis=1)
        out.append(
            _Basis(
                np.array(piv, dtype=np.intp),
                rest,
                minv,
                np.ascontiguousarray(nup[:, rest].T),
                np.array([nup[j] * nup[k] * gr for j, k in pairs]),
                np.array([D[j] * D[k] for j, k in pairs]),
                np.isin(np.arange(react.size), piv).astype(float),
            )
        )
    if len(_BASES) > 64:
        _BASES.clear()
    _BASES[key] = out
    return out


def _solve_adapted(
    nu: FloatArray,
    lnK: FloatArray,
    n: FloatArray,
    gconst: FloatArray,
    gas: BoolArray,
    tol: float,
    max_iter: int,
    warm: bool = False,
) -> tuple[FloatArray, BoolArray, NDArray[np.int64], FloatArray]:
    """Several reactions, every reacting species present: Newton in an adapted basis.

    At each iterate the basis whose pivot species have the smallest product of amounts is
    chosen per point (the matroid-greedy choice: the scarcest independent species become
    pivots). Each pivot is made by one reaction only, so its amount follows its own extent:
    it moves multiplicatively, n_p ← n_p exp(α δ_p), when Newton asks it to fall, and no
    amount is the difference of two extents. The other (abundant) species follow additively
    with a fraction-to-boundary cut. No line search here: points that do not converge within
    ``max_iter`` go to :func:`_solve_robust`. Points are kept sorted by basis so that each
    basis works on a contiguous slice of species-major arrays. ``n`` (m, ns) is updated in
    place. From a ``warm`` start (close to the solution) the basis is chosen once every
    four iterations, otherwise at each of the first four.
    """
    nr = nu.shape[0]
    m = n.shape[0]
    react = np.flatnonzero(np.any(nu != 0.0, axis=0))
    bases = _bases(nu, gas)
    conv_all = np.zeros(m, dtype=bool)
    iters = np.zeros(m, dtype=np.int64)
    res = np.full((m, nr), np.nan)
    if not bases or np.any(~gas[react]):  # condensed species: safety net only
        return n, conv_all, iters, res
    nur = nu[:, react]
    dn = nu[:, gas].sum(axis=1)[:, None]
    pairs = [(j, k) for j in range(nr) for k in range(j, nr)]
    pick = np.array([B.pick for B in bases])
    X = np.ascontiguousarray(n[:, react].T)  # (n_react, m), species-major
    C = np.ascontiguousarray((gconst[:, react] @ nur.T - lnK).T)  # (nr, m)
    no = n @ (gas & ~np.any(nu != 0.0, axis=0)).astype(float)
    idx = np.arange(m)
    ids = np.zeros(m, dtype=np.intp)
    done: list[tuple[NDArray[np.intp], FloatArray, FloatArray]] = []
    for it in range(1, max_iter + 1):
        ng = X.sum(axis=0)
        ng += no
        L = np.log(X)
        r = nur @ L
        r -= dn * np.log(ng)
        r += C
        conv = np.abs(r).max(axis=0) <= tol
        iters[idx] = it
        if np.any(conv):
            conv_all[idx[conv]] = True
            if np.all(conv):
                break
            cc = np.flatnonzero(conv)
            done.append((idx[cc], X.take(cc, axis=1), r.take(cc, axis=1)))
            kc = np.flatnonzero(~conv)
            X, C, r, L = (A_.take(kc, axis=1) for A_ in (X, C, r, L))
            no, ng, idx, ids = no[kc], ng[kc], idx[kc], ids[kc]
        if len(bases) > 1 and (it % 4 == 1 or (it <= 4 and not warm)):  # smallest Σ ln n
            wts = pick @ L
            best = wts[0].copy()
            ids = np.zeros(idx.size, dtype=np.intp)
            for b in range(1, len(bases)):
                better = wts[b] < best
                ids[better] = b
                np.minimum(best, wts[b], out=best)
            if np.any(ids[1:] < ids[:-1]):
                perm = np.argsort(ids, kind="stable")
                X, C, r = (A_.take(perm, axis=1) for A_ in (X, C, r))
                no, ng, idx, ids = no[perm], ng[perm], idx[perm], ids[perm]
        counts = np.bincount(ids, minlength=len(bases))
        ends = np.cumsum(counts)
        failed = np.zeros(idx.size, dtype=bool)
        for bi in np.flatnonzero(counts).tolist():
            B = bases[bi]
            sl = slice(int(ends[bi] - counts[bi]), int(ends[bi]))
            Xs, ngs = X[:, sl], ng[sl]
            Hf = B.A @ (1.0 / Xs)
            Hf -= B.DD[:, None] / ngs
            H = [[np.zeros(0)] * nr for _ in range(nr)]
            for q, (j, k) in enumerate(pairs):
                H[j][k] = H[k][j] = Hf[q]
            dxi_l, ok = _solve_small(H, list(B.minv @ r[:, sl]))
            dxi = np.array(dxi_l)
            Xp, Xn = Xs[B.piv], Xs[B.rest]
            with np.errstate(divide="ignore", invalid="ignore"):
                delta = dxi / Xp
                worst = np.minimum((B.rest_t @ dxi / Xn).min(axis=0), 0.0)
            # α = min(1, 0.99 / largest relative fall of an abundant species)
            alpha = _FRACTION_TO_BOUNDARY / np.maximum(-worst, _FRACTION_TO_BOUNDARY)
            ok &= np.isfinite(delta).all(axis=0) & np.isfinite(alpha)
            alpha[~ok] = 0.0
            delta[:, ~ok] = 0.0
            for _ in range(30):  # halve α where an abundant species would reach <= 0
                ad = alpha * delta
                xm = np.minimum(ad, 0.0)
                newp = Xp * (np.exp(xm) + (ad - xm))
                newn = Xn + B.rest_t @ (newp - Xp)
                pos = newn.min(axis=0) > 0.0
                if np.all(pos):
                    break
                alpha[~pos] *= 0.5
            ok &= pos
            X[B.piv, sl] = newp
            X[B.rest, sl] = np.where(pos, newn, Xn)
            failed[sl] = ~ok
        if np.any(failed):  # leave these to the safety net
            fc = np.flatnonzero(failed)
            done.append((idx[fc], X.take(fc, axis=1), np.full((nr, fc.size), np.nan)))
            kc = np.flatnonzero(~failed)
            X, C = X.take(kc, axis=1), C.take(kc, axis=1)
            no, idx, ids = no[kc], idx[kc], ids[kc]
            if idx.size == 0:
                break
    done.append((idx, X, r if r.shape[1] == idx.size else np.full((nr, idx.size), np.nan)))
    rows = np.concatenate([d[0] for d in done])
    inv = np.empty(m, dtype=np.intp)
    inv[rows] = np.arange(m)
    n[:, react] = np.concatenate([d[1] for d in done], axis=1).take(inv, axis=1).T
    res[:] = np.concatenate([d[2] for d in done], axis=1).take(inv, axis=1).T
    res[~conv_all] = np.nan
    return n, conv_all, iters, res


def _multi_table(
    nu: FloatArray,
    n0: FloatArray,
    gas: BoolArray,
    c: FloatArray,
    pattern: tuple[FloatArray, BoolArray, FloatArray],
    tol: float,
    max_iter: int,
) -> tuple[FloatArray, FloatArray, FloatArray, BoolArray] | None:
    """Equilibrium amounts on a grid of nodes spanning the points' c = (c_1 … c_nr).

    With one feed on the whole grid the equilibrium depends on T and P only through
    c_j = Δn_j ln(P/p°) + Σ_i ν_ji ln φ_i − ln K_j; a convex combination of the node states
    around a point is a strictly feasible start that conserves every element exactly.
    Returns (lo, h, node amounts (K^nr, ns), node converged) or None (more than 3 reactions).
    """
    nr = nu.shape[0]
    if nr > 3:
        return None
    K = {2: 64, 3: 12}.get(nr, 4)
    lo = np.array([c[:, j].min() for j in range(nr)])  # (column loops: axis=0 on a
    hi = np.array([c[:, j].max() for j in range(nr)])  # short inner axis is slow)
    pad = 1e-6 * (hi - lo) + 1e-9
    lo, hi = lo - pad, hi + pad
    h = (hi - lo) / (K - 1)
    axes = [np.linspace(lo[j], hi[j], K) for j in range(nr)]
    nodes = np.stack(np.meshgrid(*axes, indexing="ij"), axis=-1).reshape(-1, nr)
    # solve only the corners of cells that hold points (a T × P grid fills a band of c)
    cell = np.zeros(c.shape[0], dtype=np.intp)
    for j in range(nr):
        cell *= K
        cell += np.minimum(((c[:, j] - lo[j]) / h[j]).astype(np.intp), K - 2)
    used = np.zeros(nodes.shape[0], dtype=bool)
    used[cell] = True
    cells = np.flatnonzero(used)
    need = np.zeros(nodes.shape[0], dtype=bool)
    for corner in itertools.product((0, 1), repeat=nr):
        need[cells + int(np.array(corner) @ K ** np.arange(nr - 1, -1, -1))] = True
    sel = np.flatnonzero(need)
    feed = np.ascontiguousarray(np.broadcast_to(n0, (sel.size, n0.size)))
    x = _cold_start(nu, feed, pattern, -nodes[sel], np.zeros_like(feed), gas)
    x, ok_sel, _, _ = _multi_block(
        nu, feed, -nodes[sel], np.zeros_like(feed), gas, pattern, tol, max_iter, x
    )
    xn = np.zeros((nodes.shape[0], n0.size))
    ok = np.zeros(nodes.shape[0], dtype=bool)
    xn[sel], ok[sel] = x, ok_sel
    return lo, h, xn, ok


def _table_start(
    table: tuple[FloatArray, FloatArray, FloatArray, BoolArray], c: FloatArray
) -> tuple[FloatArray, BoolArray]:
    """Multilinear interpolation of the node amounts at c (m, nr); also 'all corners ok'."""
    lo, h, xn, okn = table
    nr = lo.size
    K = round(xn.shape[0] ** (1.0 / nr))
    base = np.zeros(c.shape[0], dtype=np.intp)  # node of the lower corner of each cell
    wts = []  # (weight of the lower node, of the upper node) along each axis
    for j in range(nr):
        pos = c[:, j] - lo[j]
        pos /= h[j]
        np.clip(pos, 0.0, K - 1.0, out=pos)
        ij = np.minimum(pos.astype(np.intp), K - 2)
        base *= K
        base += ij
        tau = pos - ij
        wts.append((1.0 - tau, tau))
    xt = np.ascontiguousarray(xn.T)
    start = np.zeros((xn.shape[1], c.shape[0]))
    ok = np.ones(c.shape[0], dtype=bool)
    for corner in itertools.product((0, 1), repeat=nr):
        node = base + int(np.array(corner) @ K ** np.arange(nr - 1, -1, -1))
        w = wts[0][corner[0]]
        for j in range(1, nr):
            w = w * wts[j][corner[j]]
        start += w * xt.take(node, axis=1)
        ok &= okn[node]
    return start.T, ok


def _multi_block(
    nu: FloatArray,
    n0: FloatArray,
    lnK: FloatArray,
    gconst: FloatArray,
    gas: BoolArray,
    pattern: tuple[FloatArray, BoolArray, FloatArray],
    tol: float,
    max_iter: int,
    x: FloatArray,
    warm: bool = False,
) -> tuple[FloatArray, BoolArray, NDArray[np.int64], FloatArray]:
    """Several reactions on one block from start ``x``: adapted Newton, then the safety net.

    Returns amounts, converged, iterations and the residual ln Q − ln K (m, nr).
    """
    d, never, basis = pattern
    react = np.any(nu != 0.0, axis=0)
    blk = np.any(nu[:, never] != 0.0, axis=1)
    ok = np.zeros(x.shape[0], dtype=bool)
    it = np.zeros(x.shape[0], dtype=np.int64)
    res = np.full((x.shape[0], nu.shape[0]), np.nan)
    if basis.shape[1] == 0:  # nothing can react at this feed pattern
        ok[:] = True
        res[:] = 0.0
        return x, ok, it, res
    if not np.any(never):
        # the residual of the last evaluation is reported as is: the full tolerance applies
        x, ok, it, res = _solve_adapted(nu, lnK, x, gconst, gas, tol, min(max_iter, 30), warm)
    bad = np.flatnonzero(~ok)
    if bad.size:
        xb = x[bad]
        fresh = ~np.all(np.where(react & ~never, xb > 0.0, True) & np.isfinite(xb), axis=1)
        if np.any(fresh):
            xb[fresh] = _interior_start(nu, n0[bad[fresh]], d, never)
        xb, okb, itb = _solve_robust(
            nu, basis, never, xb, n0[bad], lnK[bad], gconst[bad], gas, blk, 0.5 * tol, max_iter
        )
        x[bad], ok[bad], it[bad] = xb, okb, it[bad] + itb
        # species fixed at zero stay out of ln a (0·ln 0 would make every residual NaN)
        xf = np.where(np.isfinite(xb), xb, 1.0)
        g, _ = _gas_terms(xf, gas, react & ~never, gconst[bad])
        rb = g @ nu.T - lnK[bad]
        rb[:, blk] = 0.0
        res[bad] = rb
    return x, ok, it, res
