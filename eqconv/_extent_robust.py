"""Safety-net path of :mod:`eqconv.extent_solver`: damped Newton on the convex Gibbs energy.

Private module. At every iterate each point's reaction basis is re-chosen so that the least
abundant species are pivots (each made by one reaction only); pivots that fall move
multiplicatively, the step keeps every amount positive (fraction to the boundary) and an
Armijo test on G/RT guards it. G/RT includes the inert gas species (through −n_inert ln n_gas),
so that its slope along every reaction is exactly ln Q − ln K.
"""

from __future__ import annotations

from typing import Any

import numpy as np
from numpy.typing import NDArray

FloatArray = NDArray[np.float64]
BoolArray = NDArray[np.bool_]

_FRACTION_TO_BOUNDARY = 0.99


def _chol_solve(
    H: list[list[FloatArray]], b: list[FloatArray]
) -> tuple[list[FloatArray], BoolArray]:
    """Solve H x = b for many small SPD matrices at once (H[j][k] are (m,) arrays).

    The system is scaled to unit diagonal first; a pivot ≤ 1e-14 marks the point bad.
    """
    k = len(b)
    d = [np.sqrt(np.maximum(H[j][j], 1e-300)) for j in range(k)]
    A = [[H[i][j] / (d[i] * d[j]) for j in range(k)] for i in range(k)]
    L: list[list[Any]] = [[None] * k for _ in range(k)]
    ok = np.ones(b[0].shape, dtype=bool)
    for j in range(k):
        s = A[j][j] - sum((L[j][p] ** 2 for p in range(j)), np.zeros_like(b[0]))
        good = s > 1e-14
        ok &= good
        L[j][j] = np.sqrt(np.where(good, s, 1.0))
        for i in range(j + 1, k):
            t = A[i][j] - sum((L[i][p] * L[j][p] for p in range(j)), np.zeros_like(b[0]))
            L[i][j] = t / L[j][j]
    y: list[Any] = [None] * k
    for i in range(k):
        y[i] = b[i] / d[i] - sum((L[i][p] * y[p] for p in range(i)), np.zeros_like(b[0]))
        y[i] = y[i] / L[i][i]
    x: list[Any] = [None] * k
    for i in reversed(range(k)):
        t = y[i] - sum((L[p][i] * x[p] for p in range(i + 1, k)), np.zeros_like(b[0]))
        x[i] = t / L[i][i]
    return [x[i] / d[i] for i in range(k)], ok


def _gas_terms(
    n: FloatArray, gas: BoolArray, reacting: BoolArray, gconst: FloatArray
) -> tuple[FloatArray, FloatArray]:
    """ln a_i of reacting gas species (0 elsewhere) and total gas moles; n is (m, ns)."""
    ng = n @ gas.astype(float)
    sel = gas & reacting
    g = np.zeros_like(n)
    with np.errstate(divide="ignore", invalid="ignore"):
        g[:, sel] = np.log(n[:, sel]) - np.log(ng)[:, None] + gconst[:, sel]
    return g, ng


def _adapted_basis(A: FloatArray, key: FloatArray, ns: int) -> tuple[FloatArray, NDArray[np.intp]]:
    """Row-reduce each point's [ν | ln K] so the least abundant species are pivots.

    A is (m, k, ns + 1); key (m, ns) ranks columns (smallest first, inf = never a pivot).
    On return each row has coefficient 1 on its pivot species and 0 on the other pivots.
    """
    m, k, _ = A.shape
    ar = np.arange(m)
    remaining = np.ones((m, k), dtype=bool)
    piv = np.zeros((m, k), dtype=np.intp)
    chosen = np.zeros((m, ns), dtype=bool)
    for _ in range(k):
        mag = np.where(remaining[:, :, None], np.abs(A[:, :, :ns]), 0.0).max(axis=1)
        kk = np.where((mag > 1e-9) & ~chosen, key, np.inf)
        col = np.argmin(kk, axis=1)
        cv = np.where(remaining, np.abs(A[ar, :, col]), -1.0)
        row = np.argmax(cv, axis=1)
        pv = A[ar, row, col]
        pv = np.where(pv == 0.0, 1.0, pv)
        A[ar, row, :] /= pv[:, None]
        A[ar, row, col] = 1.0
        fac = A[ar, :, col].copy()
        fac[ar, row] = 0.0
        A -= fac[:, :, None] * A[ar, row, :][:, None, :]
        A[ar, :, col] = 0.0
        A[ar, row, col] = 1.0
        remaining[ar, row] = False
        chosen[ar, col] = True
        piv[ar, row] = col
    return A, piv


def _solve_robust(
    nu: FloatArray,
    basis: FloatArray,
    never: BoolArray,
    n: FloatArray,
    n0: FloatArray,
    lnK: FloatArray,
    gconst: FloatArray,
    gas: BoolArray,
    blocked: BoolArray,
    tol: float,
    max_iter: int,
) -> tuple[FloatArray, BoolArray, NDArray[np.int64]]:
    """Damped Newton on convex G(ξ) in an abundance-adapted reaction basis (see module).

    ``basis`` (nr, k) spans the extents allowed once the ``never`` species are fixed at
    zero; ``n`` (m, ns) is a strictly positive start (zero on ``never``).
    """
    m, ns = n.shape
    nu_eff = basis.T @ nu
    nu_eff[:, never] = 0.0
    k = nu_eff.shape[0]
    react = np.any(nu_eff != 0.0, axis=0) & ~never
    Lp = np.linalg.pinv(nu.T)  # extents from amount changes
    kappa = lnK @ Lp  # (m, ns): ln K · ξ(n) = κ · (n − n0)
    lnK_eff = lnK @ basis
    gmask = (gas & react).astype(float)
    inert = (gas & ~react).astype(float)  # gas species that no allowed extent changes
    conv_all = np.zeros(m, dtype=bool)
    iters = np.zeros(m, dtype=np.int64)
    idx = np.arange(m)
    stall = np.zeros(m, dtype=int)

    def phi(
        nn: FloatArray, g: FloatArray, ng: FloatArray, kap: FloatArray, nn0: FloatArray
    ) -> FloatArray:
        # G/RT up to a constant: Σ_reacting n_i ln a_i − n_inert ln n_gas − ln K·ξ. The inert
        # gas term makes ∂φ/∂ξ equal the residual when Δn ≠ 0; without it the slope is off
        # by Δn·y_inert and the Armijo test rejects good steps near the solution.
        return np.sum(nn * g * gmask - kap * (nn - nn0), axis=1) - (nn @ inert) * np.log(ng)

    for it in range(1, max_iter + 1):
        x, x0, gc, kap = n[idx], n0[idx], gconst[idx], kappa[idx]
        g, ng = _gas_terms(x, gas, react, gc)
        A = np.concatenate(
            [np.broadcast_to(nu_eff, (idx.size, k, ns)), lnK_eff[idx][:, :, None]], axis=2
        ).copy()
        with np.errstate(divide="ignore"):
            key = np.where(react, np.log(np.where(react, x, 1.0)) + np.where(gas, 0.0, 1e4), np.inf)
        A, piv = _adapted_basis(A, key, ns)
        nup = A[:, :, :ns]
        rp = np.einsum("mki,mi->mk", nup, g) - A[:, :, ns]
        ru = g @ nu.T - lnK[idx]
        ru[:, blocked] = 0.0
        conv = (np.max(np.abs(rp), axis=1) <= tol) & (np.max(np.abs(ru), axis=1) <= tol)
        iters[idx] = it
        conv_all[idx[conv]] = True
        live = ~conv & (stall[idx] < 3)
        if not np.any(live):
            break
        idx, x, x0, g, ng = idx[live], x[live], x0[live], g[live], ng[live]
        gc, kap = gc[live], kap[live]
        nup, rp, piv = nup[live], rp[live], piv[live]
        w = np.where(gas & react, 1.0 / np.where(react, x, 1.0), 0.0)
        D = nup @ gmask
        H = (
            np.einsum("mki,mli,mi->mkl", nup, nup, w)
            - D[:, :, None] * D[:, None, :] / ng[:, None, None]
        )
        dxi_l, ok = _chol_solve(
            [[H[:, a, b] for b in range(k)] for a in range(k)], [-rp[:, a] for a in range(k)]
        )
        dxi = np.stack(dxi_l, axis=1)
        ar = np.arange(idx.size)[:, None]
        npiv = x[ar, piv]
        delta = dxi / npiv
        dn_lin = np.einsum("mki,mk->mi", nup, dxi)
        nonpiv = react.copy()[None, :] & np.ones((idx.size, 1), dtype=bool)
        nonpiv[ar, piv] = False
        with np.errstate(divide="ignore", invalid="ignore"):
            lim = np.where(nonpiv & (dn_lin < 0.0), -_FRACTION_TO_BOUNDARY * x / dn_lin, 1.0)
        alpha = np.where(ok, np.minimum(1.0, lim.min(axis=1)), 0.0)
        f0 = phi(x, g, ng, kap, x0)
        pred = np.sum(rp * dxi, axis=1)
        scale = np.sum(np.abs(x * g * gmask) + np.abs(kap * (x - x0)), axis=1)
        scale += np.abs((x @ inert) * np.log(ng)) + 1e-300
        tiny = np.abs(pred) <= 1e-12 * scale
        accepted = np.zeros(idx.size, dtype=bool)
        newx = x.copy()
        todo = np.flatnonzero(ok & (alpha > 0.0))
        for _ in range(40):
            if todo.size == 0:
                break
            al = alpha[todo][:, None]
            de, npv = delta[todo], npiv[todo]
            ad = al * de
            xm = np.minimum(ad, 0.0)
            newp = npv * (np.exp(xm) + (ad - xm))  # falling pivots: exactly n_p e^(α δ)
            xt = x[todo] + np.einsum("mki,mk->mi", nup[todo], newp - npv)
            xt[np.arange(todo.size)[:, None], piv[todo]] = newp
            xt[:, never] = 0.0
            feas = np.all(np.where(react, xt > 0.0, True), axis=1) & np.all(np.isfinite(xt), axis=1)
            gt, ngt = _gas_terms(np.where(feas[:, None], xt, x[todo]), gas, react, gc[todo])
            ft = phi(xt, gt, ngt, kap[todo], x0[todo])
            good = feas & ((ft <= f0[todo] + 1e-4 * alpha[todo] * pred[todo]) | tiny[todo])
            newx[todo[good]] = xt[good]
            accepted[todo[good]] = True
            todo = todo[~good]
            alpha[todo] *= 0.5
        stall[idx] = np.where(accepted, 0, stall[idx] + 1)
        n[idx] = newx
    return n, conv_all, iters
