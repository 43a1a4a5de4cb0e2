"""Damped Newton solvers behind :func:`eqconv.gibbs.minimize_gibbs` (private).

Two paths share the element-potential state (λ, ln N), in which every amount is
``n_i = N exp(Σ_j a_ij λ_j − g_i)``:

* :func:`phase1`, the fast path: the element balances on their own (element) basis, in
  logarithms, species-major arrays and an unrolled Cholesky solve per point;
* :func:`phase3`, the careful path: Gauss-Newton on the logarithms of both sides of the
  balances in the component basis of the most abundant species and of the element
  balances together (a consistent, over-determined system), Levenberg-Marquardt where it
  stalls (see :mod:`eqconv.gibbs` for why).

:func:`lp_start` gives the start from the linear programme that neglects mixing.

References
----------
.. [1] J. Nocedal, S. J. Wright, *Numerical Optimization*, 2nd ed., Springer (2006),
   §3.1 (Armijo backtracking) and §10.3 (Levenberg-Marquardt) (citation from memory).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray

from .reaction_basis import ComponentBases, component_bases, independent_reactions

__all__ = ["Problem", "build", "lp_start", "phase1", "phase1_state", "phase3", "trace_residual"]

FloatArray = NDArray[np.float64]
IntArray = NDArray[np.intp]

MAX_BASES = 20000  # largest number of candidate component bases, C(ns, rank)
_ARMIJO = 1e-4
_MAX_HALVINGS = 40
_MAX_DLN = 200.0  # largest change of any ln n_i in one step
_SWITCH = 1.0  # change basis when another one's smallest ln n is larger by this much


@dataclass
class Problem:
    """Tables for one set of species that may be present."""

    species: IntArray  # (nS,) indices into the full species list
    A: FloatArray  # (nS, ne) atom matrix, all element columns
    cb: ComponentBases  # every component basis (cb.cols: independent element columns)
    Ared: FloatArray  # (nS, r) atom matrix on cb.cols
    AredT: FloatArray  # its transpose, contiguous
    WA: FloatArray  # (r*r, nS) rows: products a_ij a_ik
    lnCpos: FloatArray  # (nb, nS, r) ln of the positive part of C (−inf where C <= 0)
    lnCneg: FloatArray  # ln of |negative part| of C (−inf where C >= 0)
    lnA: FloatArray  # (nS, ne) ln of the atom matrix (−inf where 0)
    Kmax: FloatArray  # (nb,) largest |entry| of Binv
    Lmap: FloatArray  # (nb*r, nS): λ of basis k (B_k λ = g_B) is Lmap[k*r:(k+1)*r] @ g
    Rmap: FloatArray  # (nb*nS, nS): reduced costs g − C_k g_B of basis k
    nu: NDArray[np.int64]  # (nr, nS) independent reactions
    dn_max: float  # largest |Σ ν| over those reactions

    @property
    def r(self) -> int:
        return len(self.cb.cols)

    @property
    def bases(self) -> IntArray:
        return self.cb.bases

    def vertices(
        self, f: FloatArray, elements: bool
    ) -> tuple[FloatArray, NDArray[np.bool_], NDArray[np.bool_]]:
        """Vertex amounts (u, nb, r), feasible bases (u, nb), possible species (u, nS)."""
        V, T = self.cb.vertex_amounts(f, elements=elements)
        return (V, *self.cb.feasible(V, T))


_CACHE: dict[tuple[bytes, tuple[int, ...], bytes], Problem] = {}


def build(A_full: FloatArray, species: IntArray) -> Problem:
    """Tables for a species subset (cached: they depend only on the atom matrix)."""
    key = (A_full.tobytes(), A_full.shape, np.asarray(species, dtype=np.intp).tobytes())
    if key not in _CACHE:
        if len(_CACHE) > 64:
            _CACHE.clear()
        A = A_full[species]
        nS = len(species)
        cb = component_bases(A, max_bases=MAX_BASES)
        r, nb, C = len(cb.cols), len(cb.bases), cb.C
        Ared = np.ascontiguousarray(A[:, cb.cols])
        integral = bool(np.all(A == np.round(A)))
        nu = independent_reactions(A.astype(np.int64) if integral else A, components="first")
        Lmap = np.zeros((nb, r, nS))
        Rmap = np.tile(np.eye(nS), (nb, 1, 1))
        for k, basis in enumerate(cb.bases):
            Lmap[k][:, basis] = cb.Binv[k]
            Rmap[k][:, basis] -= C[k]
        with np.errstate(divide="ignore"):
            _CACHE[key] = Problem(
                species=np.asarray(species, dtype=np.intp),
                A=A,
                cb=cb,
                Ared=Ared,
                AredT=np.ascontiguousarray(Ared.T),
                WA=np.einsum("ij,ik->jki", Ared, Ared).reshape(r * r, nS),
                lnCpos=np.log(np.maximum(C, 0.0)),
                lnCneg=np.log(np.maximum(-C, 0.0)),
                lnA=np.log(A),
                Kmax=np.max(np.abs(cb.Binv), axis=(1, 2)),
                Lmap=Lmap.reshape(nb * r, nS),
                Rmap=Rmap.reshape(nb * nS, nS),
                nu=nu,
                dn_max=float(np.max(np.abs(nu.sum(axis=1)), initial=0.0)),
            )
    return _CACHE[key]


# ---------------------------------------------------------------------- element-basis Newton
def _step_to_cap(lnn: FloatArray, dln: FloatArray, cap: FloatArray, axis: int) -> FloatArray:
    """Largest t <= 1 with every ln n_i + t Δln n_i <= cap and |t Δln n_i| <= 200.

    The second limit ignores species below e^-700 of the cap before and after the step
    (their amounts are zero in double precision and do not matter).
    """
    capx = np.expand_dims(cap, axis)
    new = lnn + dln
    adl = np.abs(dln)
    if adl.max(initial=0.0) <= _MAX_DLN:  # the usual case: no step is limited by its size
        t = np.ones(cap.shape)
    else:
        size = np.where(np.maximum(lnn, new) > capx - 700.0, adl, 0.0)
        t = np.minimum(1.0, _MAX_DLN / np.maximum(size.max(axis=axis), 1e-300))
    over = new > capx
    if not np.any(over):
        return t
    with np.errstate(divide="ignore", invalid="ignore"):
        ti = np.where(over, (capx - lnn) / dln, 1.0)
    return np.clip(np.minimum(np.min(ti, axis=axis), t), 0.0, 1.0)


def _solve_bordered(
    M: FloatArray, v: FloatArray, R: FloatArray, R0: FloatArray
) -> tuple[FloatArray, FloatArray]:
    """Solve [[M, v], [vᵀ, 0]] [x; y] = −[R; R0] per point; M (r, r, m) SPD, v, R (r, m).

    Cholesky factorisation of M, unrolled over the small dimension and vectorized over the
    points (insensitive to the scaling of M), then the Schur complement −vᵀM⁻¹v. Only the
    lower triangle of M is read; M is overwritten with the factor.
    """
    r = v.shape[0]
    inv = np.empty((r, len(R0)))  # 1 / L_jj
    tmp = np.empty(len(R0))
    for j in range(r):
        acc = M[j, j]
        floor = 1e-14 * acc
        for k in range(j):
            np.multiply(M[j, k], M[j, k], out=tmp)
            acc -= tmp
        np.maximum(acc, floor, out=acc)
        acc += 1e-300
        np.sqrt(acc, out=acc)
        np.divide(1.0, acc, out=inv[j])
        for i in range(j + 1, r):
            acc = M[i, j]
            for k in range(j):
                np.multiply(M[i, k], M[j, k], out=tmp)
                acc -= tmp
            acc *= inv[j]
    ya = R.copy()  # L⁻¹R and L⁻¹v, in place
    yw = v.copy()
    for j in range(r):
        for k in range(j):
            np.multiply(M[j, k], ya[k], out=tmp)
            ya[j] -= tmp
            np.multiply(M[j, k], yw[k], out=tmp)
            yw[j] -= tmp
        ya[j] *= inv[j]
        yw[j] *= inv[j]
    vw = np.einsum("jm,jm->m", yw, yw)
    va = np.einsum("jm,jm->m", ya, yw)
    dnu = R0 - va
    dnu /= np.maximum(vw, 1e-300)
    x = ya  # Lᵀ x = −(L⁻¹R + L⁻¹v dν), overwriting L⁻¹R from the last row up
    for j in reversed(range(r)):
        acc = x[j]
        np.multiply(yw[j], dnu, out=tmp)
        acc += tmp
        np.negative(acc, out=acc)
        for k in range(j + 1, r):
            np.multiply(M[k, j], x[k], out=tmp)
            acc -= tmp
        acc *= inv[j]
    return x, dnu


def phase1_state(
    prob: Problem, gT: FloatArray, lnb: FloatArray, lam: FloatArray, nu: FloatArray
) -> tuple[FloatArray, ...]:
    """Element-basis state (nS, m): ln n, n, Σ_i a_ij n_i, Σ n, the log residuals
    F_j = ln(Σ_i a_ij n_i / b_j) and F0 = ln(Σ n / N), and the merit Σ F_j² + F0²."""
    lnn = prob.Ared @ lam + nu - gT
    n = np.exp(lnn)
    P, sn = prob.AredT @ n, n.sum(axis=0)
    F, F0 = np.log(P) - lnb, np.log(sn) - nu
    return lnn, n, P, sn, F, F0, np.sum(F * F, axis=0) + F0 * F0


def phase1(
    prob: Problem,
    gT: FloatArray,
    bT: FloatArray,
    lam: FloatArray,
    nu: FloatArray,
    max_iter: int,
    tol: float,
    balance_tol: float,
    state0: tuple[FloatArray, ...] | None = None,
) -> tuple[NDArray[np.bool_], NDArray[np.int64]]:
    """Damped Newton on ln(Σ_i a_ij n_i) = ln b_j and ln Σ n_i = ln N (the fast path).

    Species-major layout (nS, m): every product is a small dense matrix product. Updates
    `lam` (r, m) and `nu` (m,) in place (NaN where no acceptable step was found) and returns
    (converged, iterations). `state0`: :func:`phase1_state` at the start, if known.
    Finished points stay in the working arrays (their further iterates are discarded)
    until a quarter of them is finished.
    """
    Ar, WA = prob.Ared, prob.WA
    r, m = lam.shape
    conv_out = np.zeros(m, dtype=bool)
    iters = np.full(m, max_iter, dtype=np.int64)
    idx, G, L, V, lnb = np.arange(m), gT, lam.copy(), nu.copy(), np.log(bT)
    cap = np.log(bT.sum(axis=0)) + 1.0  # no amount exceeds the number of atoms
    etol, stol, floor = 0.099 * balance_tol, 0.1 * tol, (0.1 * balance_tol) ** 2

    def trial(
        L: FloatArray, V: FloatArray, G: FloatArray, lnb: FloatArray
    ) -> tuple[FloatArray, ...]:
        return phase1_state(prob, G, lnb, L, V)

    lnn, n, P, sn, F, F0, f0 = state0 if state0 is not None else trial(L, V, G, lnb)
    recorded = np.zeros(m, dtype=bool)
    e_prev = np.full(m, np.inf)
    for it in range(max_iter + 1):
        e = np.maximum(np.abs(F).max(axis=0), np.abs(F0) * max(prob.dn_max, 1.0) * etol / stol)
        conv = (e <= etol) & ((e <= 1e-15) | (e_prev <= 1e-7))  # met, at the rounding floor
        e_prev = e
        fin = (conv | ~np.isfinite(V) | (it == max_iter)) & ~recorded
        if np.any(fin):
            gi = idx[fin]
            lam[:, gi], nu[gi], conv_out[gi], iters[gi] = L[:, fin], V[fin], conv[fin], it
            recorded |= fin
            if np.all(recorded):
                break
            if np.count_nonzero(recorded) > len(recorded) // 4:
                k = ~recorded
                idx, G, L, V, lnb, cap, e_prev = (
                    idx[k],
                    G[:, k],
                    L[:, k],
                    V[k],
                    lnb[:, k],
                    cap[k],
                    e_prev[k],
                )
                lnn, n, P, sn, F, F0, f0 = lnn[:, k], n[:, k], P[:, k], sn[k], F[:, k], F0[k], f0[k]
                recorded = recorded[k]
        dlam, dnu = _solve_bordered((WA @ n).reshape(r, r, -1), P, P * F, sn * F0)
        dln = Ar @ dlam + dnu
        capn = np.maximum(cap, lnn.max(axis=0) + 1.0)  # a point above the cap may move
        t = _step_to_cap(lnn, dln, capn, axis=0)
        # first trial on the whole array, then backtrack only where it was rejected
        Lt, Vt = L + t * dlam, V + t * dnu
        new = trial(Lt, Vt, G, lnb)
        # (t keeps lnn + t dln <= capn: lnn and lnn + dln are, or t was cut to it)
        good = (new[6] <= (1.0 - 2.0 * _ARMIJO * t) * f0) | (new[6] <= floor)
        if np.all(good):
            L, V, (lnn, n, P, sn, F, F0, f0) = Lt, Vt, new
            continue
        L, V = np.where(good, Lt, L), np.where(good, Vt, V)
        lnn, n, P, sn, F, F0, f0 = (
            np.where(good, a, b) for a, b in zip(new, (lnn, n, P, sn, F, F0, f0), strict=True)
        )
        pend = np.flatnonzero(~good)
        t = t[pend]
        f_old = f0[pend]
        for _ in range(_MAX_HALVINGS):
            t *= 0.5
            Lt, Vt = L[:, pend] + t * dlam[:, pend], V[pend] + t * dnu[pend]
            tr = trial(Lt, Vt, G[:, pend], lnb[:, pend])
            ok = (tr[6] <= (1.0 - 2.0 * _ARMIJO * t) * f_old) | (tr[6] <= floor)
            acc = pend[ok]
            L[:, acc], V[acc] = Lt[:, ok], Vt[ok]
            for arr, val in zip((lnn, n, P, sn, F, F0, f0), tr, strict=True):
                arr[..., acc] = val[..., ok]
            pend, t, f_old = pend[~ok], t[~ok], f_old[~ok]
            if not len(pend):
                break
        V[pend] = np.nan  # no acceptable step: leave these points to the careful path
    return conv_out, iters


# ---------------------------------------------------------------------- component-basis Newton
def _side(T: FloatArray, feed: FloatArray) -> tuple[FloatArray, FloatArray]:
    """ln(Σ_i exp T_i + feed) over axis 1 (T (m, nS, q), feed (m, q)) and the shares."""
    with np.errstate(divide="ignore", invalid="ignore"):
        lf = np.log(feed)
        mx = np.maximum(T.max(axis=1), lf)
        mx = np.where(np.isfinite(mx), mx, 0.0)
        e = np.exp(T - mx[:, None, :])
        tot = e.sum(axis=1) + np.exp(lf - mx)
        return mx + np.log(tot), e / tot[:, None, :]


def _evaluate(
    prob: Problem, k: int, lnn: FloatArray, bp: FloatArray, b: FloatArray
) -> tuple[FloatArray, ...]:
    """A state (m, nS) in basis k, in the log domain (no underflow).

    Returns F (m, r + ne + 1) = [ln positive side − ln negative side of each component
    balance; ln(Σ_i a_ij n_i / b_j) of each element in the feed; ln Σn (the −ln N is left
    to the caller)], the shares of each species in those sums (wp − wn (m, nS, r) and we
    (m, nS, ne)), the mole fractions x (m, nS) and the amounts n.
    """
    lnP, wp = _side(lnn[:, :, None] + prob.lnCpos[k], np.maximum(-bp, 0.0))
    lnM, wn = _side(lnn[:, :, None] + prob.lnCneg[k], np.maximum(bp, 0.0))
    lnE, we = _side(lnn[:, :, None] + prob.lnA, np.zeros_like(b))
    mx = lnn.max(axis=1)
    e = np.exp(lnn - mx[:, None])
    tot = e.sum(axis=1)
    with np.errstate(over="ignore", invalid="ignore", divide="ignore"):
        FE = np.where(b > 0, lnE - np.log(b), 0.0)
        F = np.concatenate([lnP - lnM, FE, (mx + np.log(tot))[:, None]], axis=1)
        return F, wp - wn, np.where((b > 0)[:, None, :], we, 0.0), e / tot[:, None], np.exp(lnn)


def _criteria(
    prob: Problem, F: FloatArray, n: FloatArray, nu: FloatArray, b: FloatArray
) -> tuple[FloatArray, FloatArray, FloatArray, FloatArray]:
    """Trace-balance, element-balance and stationarity residuals, and the merit |F|²."""
    with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
        comp = np.abs(np.expm1(-np.abs(F[:, : prob.r]))).max(axis=1, initial=0.0)
        el = np.where(b > 0, np.abs(n @ prob.A - b) / b, 0.0).max(axis=1, initial=0.0)
        F0 = F[:, -1] - nu
        f = np.sum(F[:, :-1] ** 2, axis=1) + F0**2
    return (
        np.nan_to_num(comp, nan=np.inf),
        el,
        np.abs(F0) * prob.dn_max,
        np.nan_to_num(f, nan=np.inf),
    )


def phase3(
    prob: Problem,
    g: FloatArray,
    Vp: FloatArray,
    b: FloatArray,
    lnn: FloatArray,
    nu: FloatArray,
    bid: IntArray,
    max_iter: int,
    tol: float,
    balance_tol: float,
) -> NDArray[np.int64]:
    """Damped Gauss-Newton on ln(positive side) = ln(negative side) of each balance.

    The careful path: the component balances in the basis of the most abundant species
    (max-min, updated as the composition changes) and the element balances, each relative
    to its own terms; Levenberg-Marquardt steps where Gauss-Newton's fail. Layout (m, nS);
    updates lnn, nu, bid in place and returns the iterations. Vp (m, nb, r): component feed
    amounts of every basis.
    """
    m, r = len(g), prob.r
    done, stalled = np.zeros(m, dtype=bool), np.zeros(m, dtype=bool)
    iters = np.zeros(m, dtype=np.int64)
    ln_cap = np.log(b.sum(axis=1)) + 1.0
    floor = (0.1 * balance_tol) ** 2
    for it in range(max_iter + 1):
        act = np.flatnonzero(~done & ~stalled)
        if not len(act):
            break
        score = lnn[act][:, prob.bases].min(axis=2)  # (a, nb)
        best, ar = np.argmax(score, axis=1), np.arange(len(act))
        switch = score[ar, best] > score[ar, bid[act]] + _SWITCH
        bid[act[switch]] = best[switch]
        for k in np.unique(bid[act]):
            J = act[bid[act] == k]
            F, dw, we, x, n = _evaluate(prob, int(k), lnn[J], Vp[J, k], b[J])
            comp, el, stat, f0 = _criteria(prob, F, n, nu[J], b[J])
            ok = (comp <= 0.1 * balance_tol) & (el <= 0.1 * balance_tol) & (stat <= 0.1 * tol)
            done[J[ok]] = True
            if it == max_iter or np.all(ok):
                continue
            J, F, dw, we, x, f0 = J[~ok], F[~ok], dw[~ok], we[~ok], x[~ok], f0[~ok]
            F[:, -1] -= nu[J]
            C, bp = prob.cb.C[k], Vp[J, k]
            # rows: component balances, element balances, total; columns: φ, ln N
            Jac = np.zeros((len(J), F.shape[1], r + 1))
            Jac[:, :r, :r] = np.einsum("mij,ik->mjk", dw, C)
            Jac[:, :r, r] = dw.sum(axis=1)
            Jac[:, r:-1, :r] = np.einsum("mij,ik->mjk", we, C)
            Jac[:, r:-1, r] = we.sum(axis=1)
            Jac[:, -1, :r] = x @ C
            finite = np.all(np.isfinite(Jac), axis=(1, 2)) & np.isfinite(f0)
            d = np.zeros((len(J), r + 1))
            if np.any(finite):  # Gauss-Newton: least squares on the consistent system
                d[finite] = -(np.linalg.pinv(Jac[finite]) @ F[finite][:, :, None])[:, :, 0]
            dln = d[:, r:] + d[:, :r] @ C.T
            lnJ, nuJ = lnn[J], nu[J]
            capJ = np.maximum(ln_cap[J], lnJ.max(axis=1) + 1.0)
            t = _step_to_cap(lnJ, dln, capJ, axis=1)
            pend = np.flatnonzero(finite)
            for h in range(_MAX_HALVINGS):
                if not len(pend):
                    break
                if h == 8:  # Newton is not making progress: Levenberg-Marquardt steps
                    Jp = Jac[pend]
                    H = np.einsum("mji,mjk->mik", Jp, Jp)
                    gr = np.einsum("mji,mj->mi", Jp, F[pend])
                    dH = np.einsum("mii->mi", H) + 1e-300
                    mu_lm = np.full(len(pend), 1e-4)
                if h >= 8:
                    dd = -np.linalg.solve(
                        H + (mu_lm[:, None] * dH)[:, :, None] * np.eye(r + 1), gr[:, :, None]
                    )[:, :, 0]
                    d[pend], dln[pend] = dd, dd[:, r:] + dd[:, :r] @ C.T
                    t[pend] = _step_to_cap(lnJ[pend], dln[pend], capJ[pend], axis=1)
                    slope, mu_lm = 2.0 * np.sum(gr * dd, axis=1), mu_lm * 10.0
                else:
                    slope = 2.0 * np.einsum("mji,mj,mi->m", Jac[pend], F[pend], d[pend])
                tp = t[pend]
                tl, tn = lnJ[pend] + tp[:, None] * dln[pend], nuJ[pend] + tp * d[pend, r]
                Ft, _, _, _, nt = _evaluate(prob, int(k), tl, bp[pend], b[J[pend]])
                f1 = _criteria(prob, Ft, nt, tn, b[J[pend]])[3]
                good = (
                    (tl.max(axis=1) <= capJ[pend])
                    & (tp > 0)
                    & ((f1 <= f0[pend] + _ARMIJO * tp * slope) | (f1 <= floor))
                )
                lnJ[pend[good]], nuJ[pend[good]] = tl[good], tn[good]
                pend = pend[~good]
                if h >= 8:
                    H, gr, dH, mu_lm = H[~good], gr[~good], dH[~good], mu_lm[~good]
                else:
                    t[pend] *= 0.5
            bad = ~finite
            bad[pend] = True
            stalled[J[bad]] = True
            lnn[J], nu[J] = lnJ, nuJ
            iters[J] += 1
    return iters


def trace_residual(
    prob: Problem, lnn: FloatArray, Vp: FloatArray, b: FloatArray, bid: IntArray
) -> FloatArray:
    out = np.empty(len(lnn))
    for k in np.unique(bid):
        J = np.flatnonzero(bid == k)
        F, _, _, _, n = _evaluate(prob, int(k), lnn[J], Vp[J, k], b[J])
        out[J] = _criteria(prob, F, n, F[:, -1], b[J])[0]
    return out


def lp_start(
    prob: Problem,
    gT: FloatArray,
    V: FloatArray,
    feas: NDArray[np.bool_],
    finv: IntArray,
    bT: FloatArray,
) -> tuple[FloatArray, FloatArray, FloatArray]:
    """Start from the linear programme that neglects the mixing terms (the K → ∞ limit).

    min Σ g_i n_i subject to the element balances: its optimal vertex (the cheapest feasible
    basis) and its optimal dual λ (g_i − a_i·λ >= 0 for every species, so no amount exceeds
    N). V (u, nb, r) and feas (u, nb) are per distinct feed row, finv maps points to rows.
    Returns (λ (r, m), ln N (m,), the optimal vertex (m, nS)).
    """
    nb, nS = len(prob.bases), len(prob.species)
    Vfull = np.zeros((len(V), nb, nS))  # vertex of every basis as a species vector
    for k, basis in enumerate(prob.bases):
        Vfull[:, k, basis] = np.maximum(V[:, k], 0.0)
    cost = np.einsum("mkn,nm->km", Vfull[finv], gT) if len(V) > 1 else Vfull[0] @ gT
    kp = np.argmin(np.where(feas[finv].T, cost, np.inf), axis=0)
    vert = Vfull[finv, kp]
    lam = np.einsum("mij,jm->im", prob.cb.Binv[kp], gT[prob.bases[kp].T, np.arange(len(kp))])
    tol = 1e-9 * (1.0 + np.abs(gT).max(axis=0))
    bad = np.flatnonzero((gT - prob.Ared @ lam).min(axis=0) < -tol)
    if len(bad):  # a degenerate vertex: search every basis for the dual-feasible optimum
        g2 = gT[:, bad]
        lam_all = (prob.Lmap @ g2).reshape(nb, -1, len(bad))  # λ of every basis
        ok = (prob.Rmap @ g2).reshape(nb, nS, -1).min(axis=1) >= -tol[bad]
        kd = np.argmax(np.where(ok, np.sum(lam_all * bT[:, bad], axis=1), -np.inf), axis=0)
        found = np.flatnonzero(np.any(ok, axis=0))
        lam[:, bad[found]] = lam_all[kd[found], :, found].T
    return np.ascontiguousarray(lam), np.log(vert.sum(axis=1)), vert
