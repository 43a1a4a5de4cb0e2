"""Single-reaction path of :mod:`eqconv.extent_solver`: Newton on the logit of the extent.

Private module (the public entry point is :func:`eqconv.extent_solver.solve_extents`).
"""

from __future__ import annotations

from typing import Any

import numpy as np
from numpy.typing import NDArray

from .errors import InputError

FloatArray = NDArray[np.float64]
BoolArray = NDArray[np.bool_]

_U_MAX = 700.0  # |logit| bound: e^-700 is still a normal double


def _one_setup(nu: FloatArray, n0: FloatArray, gas: BoolArray) -> dict[str, Any]:
    """Feasible interval and slacks of one reaction for feeds ``n0`` (m, ns).

    ξ_lo = −min over products of n0_i/ν_i, ξ_hi = min over reactants of n0_i/|ν_i|; the
    slack of a species is its distance (in extent units) beyond the limiting one.
    """
    prod = [int(i) for i in np.flatnonzero(nu > 0)]
    reac = [int(i) for i in np.flatnonzero(nu < 0)]
    if not prod or not reac:
        raise InputError("a reaction needs at least one reactant and one product")
    ratio = {i: n0[:, i] / abs(nu[i]) for i in prod + reac}
    lo_t = ratio[prod[0]].copy()
    for i in prod[1:]:
        np.minimum(lo_t, ratio[i], out=lo_t)
    hi_t = ratio[reac[0]].copy()
    for i in reac[1:]:
        np.minimum(hi_t, ratio[i], out=hi_t)
    slack = {i: ratio[i] - (lo_t if nu[i] > 0 else hi_t) for i in prod + reac}
    W = lo_t + hi_t
    live_slack = [i for i in prod + reac if np.any(slack[i] != 0.0)]
    inert = gas & (nu == 0.0)
    K0 = n0 @ inert.astype(float) if np.any(inert) else np.zeros(n0.shape[0])
    for i in live_slack:
        if gas[i]:
            K0 += abs(nu[i]) * slack[i]
    with np.errstate(divide="ignore"):
        U = np.minimum(_U_MAX, _U_MAX + np.log(W))
    return {
        "prod": prod,
        "reac": reac,
        "lo_t": lo_t,
        "hi_t": hi_t,
        "slack": slack,
        "W": W,
        "K0": K0,
        "U": U,
        "live_slack": live_slack,
        "dn": float(nu[gas].sum()),
        # gas moles = K0 + Sp W σ(u) + Sr W σ(−u): a sum of non-negative terms
        "Sp": float(sum(nu[i] for i in prod if gas[i])),
        "Sr": float(sum(-nu[i] for i in reac if gas[i])),
        # species without slack share ln(ξ − ξ_lo) or ln(ξ_hi − ξ); the others get a term
        "Vp": float(sum(nu[i] for i in prod if gas[i] and i not in live_slack)),
        "Vr": float(sum(nu[i] for i in reac if gas[i] and i not in live_slack)),
        "terms": [(float(nu[i]), bool(nu[i] > 0), i) for i in live_slack if gas[i]],
    }


def _one_f(
    k: dict[str, Any], u: FloatArray, W: Any, K0: Any, c: Any, slack: dict[int, Any]
) -> tuple[FloatArray, tuple[Any, ...]]:
    """f(u) = ln Q − ln K of one reaction at logit ``u``, and the terms df/du reuses."""
    e = np.exp(-u)
    s = e + 1.0
    np.divide(1.0, s, out=s)  # σ(u)
    xp = W * s  # ξ − ξ_lo
    xr = e * xp  # ξ_hi − ξ
    dn = k["dn"]
    ng = None
    if dn != 0.0:
        ng = xp * k["Sp"]
        ng += K0
        if k["Sr"]:
            ng += xr * k["Sr"]
        f = np.log(ng)
        f *= -dn
        f += c
    else:
        f = np.zeros_like(u) + c
    if k["Vp"]:
        f += k["Vp"] * np.log(xp)
    if k["Vr"]:
        f += k["Vr"] * np.log(xr)
    xs = []
    for v, isprod, i in k["terms"]:
        x = (xp if isprod else xr) + slack[i]
        f += v * np.log(x)
        xs.append((v, x))
    return f, (s, xp, xr, ng, xs)


def _one_df(k: dict[str, Any], u: FloatArray, parts: tuple[Any, ...]) -> FloatArray:
    """df/du of one reaction from the terms of :func:`_one_f` at the same ``u``."""
    s, xp, xr, ng, xs = parts
    dn = k["dn"]
    curv = np.divide(-(dn * dn), ng) if ng is not None else np.zeros_like(u)
    if k["Vp"]:
        curv += k["Vp"] / xp
    if k["Vr"]:
        curv -= k["Vr"] / xr
    for v, x in xs:
        curv += abs(v) / x
    curv *= xr
    curv *= s  # df/du = W σ(u) σ(−u) d(ln Q)/dξ
    return curv


def _one_eval(
    k: dict[str, Any], u: FloatArray, W: Any, K0: Any, c: Any, slack: dict[int, Any]
) -> tuple[FloatArray, FloatArray]:
    """f(u) = ln Q − ln K and df/du of one reaction at logit ``u``."""
    f, parts = _one_f(k, u, W, K0, c, slack)
    return f, _one_df(k, u, parts)


def _one_c(
    nu: FloatArray, lnK: FloatArray, lnP: FloatArray, lnphi: FloatArray | None, gas: BoolArray
) -> FloatArray:
    """The part of f that does not depend on the extent: Δn ln(P/p°) + Σν ln φ − ln K."""
    gm = gas & (nu != 0.0)
    c = float(nu[gas].sum()) * lnP - lnK + float(nu[gm] @ np.log(np.abs(nu[gm])))
    if lnphi is not None:
        c = c + lnphi[:, gm] @ nu[gm]
    return c


def _one_table(
    nu: FloatArray, n0: FloatArray, gas: BoolArray, t: FloatArray
) -> tuple[float, float, FloatArray] | None:
    """Start table for one feed row: the inverse u(g) of g = f − c over t = −c, as cubics.

    With one feed on the whole grid, the equilibrium logit depends on T and P only through
    c, so cubic Hermite interpolation of u(g) (values and slopes du/dg at equally spaced
    nodes) gives every point a start whose residual is typically already below 1e-12
    (Newton still checks and polishes it). The nodes are themselves solved by
    :func:`_solve_one`. Returns (g0, h, coefficients (nodes − 1, 4) of u on each interval
    in powers of τ = (g − g_j)/h).
    """
    lo, hi = float(t.min()), float(t.max())
    pad = 1e-3 * (hi - lo) + 1e-9
    g = np.linspace(lo - pad, hi + pad, 1025)
    gm = gas & (nu != 0.0)
    lnK = g + float(nu[gm] @ np.log(np.abs(nu[gm])))  # so that c = −g at ln(P/p°) = 0
    feed = np.broadcast_to(n0, (g.size, n0.size))
    res = _solve_one(nu, lnK, feed, np.zeros(g.size), None, gas, 1e-12, 100)
    if not np.all(res[2]) or np.any(res[5]):
        return None
    k = _one_setup(nu, feed, gas)
    u = res[6]
    dg = _one_eval(k, u, k["W"], k["K0"], -g, k["slack"])[1]
    if not np.all(dg > 0.0):
        return None
    h = float(g[1] - g[0])
    m = h / dg  # slope in τ units
    du = u[1:] - u[:-1]
    coef = np.stack(
        [u[:-1], m[:-1], 3.0 * du - 2.0 * m[:-1] - m[1:], m[:-1] + m[1:] - 2.0 * du], axis=1
    )
    return float(g[0]), h, coef


def _hermite(table: tuple[float, float, FloatArray], t: FloatArray) -> FloatArray:
    """Evaluate the cubic of :func:`_one_table` on the interval holding each t."""
    g0, h, coef = table
    x = t - g0
    x /= h
    np.clip(x, 0.0, float(coef.shape[0]), out=x)
    j = x.astype(np.intp)
    np.minimum(j, coef.shape[0] - 1, out=j)
    tau = x - j
    c = coef.take(j, axis=0)
    out = c[:, 3] * tau
    out += c[:, 2]
    out *= tau
    out += c[:, 1]
    out *= tau
    out += c[:, 0]
    return out


def _solve_one(
    nu: FloatArray,
    lnK: FloatArray,
    n0: FloatArray,
    lnP: FloatArray,
    lnphi: FloatArray | None,
    gas: BoolArray,
    tol: float,
    max_iter: int,
    table: tuple[float, float, FloatArray] | None = None,
) -> tuple[Any, ...]:
    """Single reaction: Newton on the logit u of the extent, bracketed if slow.

    With ξ = ξ_lo + W σ(u), W = ξ_hi − ξ_lo, every amount is ν_i (W σ(u) + a_i) for a
    product and |ν_i| (W σ(−u) + b_i) for a reactant with a_i, b_i ≥ 0 (0 for the
    limiting species), so no amount is the difference of two large numbers. The residual
    f(u) = ln Q − ln K increases strictly with u and is asymptotically linear in both tails.
    Newton steps are clipped to |Δu| ≤ 100 for 12 iterations; after that a bracket of the
    root is kept and steps that leave it are replaced by bisection. Arrays are kept one per
    species (structure of arrays). ``table`` (from :func:`_one_table`) gives the start;
    default u = 0, the middle of the feasible interval.
    """
    m = n0.shape[0]
    uniform = table is not None  # one feed row for the whole block: scalar setup
    k = _one_setup(nu, n0[:1] if uniform else n0, gas)
    if uniform:
        k.update({key: k[key][0] for key in ("W", "K0", "U", "lo_t", "hi_t")})
        k["slack"] = {i: v[0] for i, v in k["slack"].items()}
    W, U, slack = k["W"], k["U"], k["slack"]
    blocked = np.broadcast_to(W <= 0.0, (m,))
    c = _one_c(nu, lnK, lnP, lnphi, gas)
    u_start = np.zeros(m) if table is None else _hermite(table, -c)
    st: dict[Any, Any] = {"u": u_start, "lo": -U, "hi": U, "W": W, "c": c, "K0": k["K0"]}
    st.update({("s", i): slack[i] for i in k["live_slack"]})
    idx = np.arange(m)
    if np.any(blocked):
        idx = idx[~blocked]
        st = {key: val[~blocked] if np.ndim(val) else val for key, val in st.items()}
    live = np.ones(idx.size, dtype=bool)
    u_out = np.zeros(m)
    f_out = np.zeros(m)
    iters = np.zeros(m, dtype=np.int64)
    done = blocked.copy()
    u = f = np.zeros(0)
    plain = min(12, max_iter)  # Newton with a clipped step first, bracketed after that
    for it in range(1, max_iter + 1):
        if idx.size == 0:
            break
        u = st["u"]
        f, parts = _one_f(
            k, u, st["W"], st["K0"], st["c"], {i: st["s", i] for i in k["live_slack"]}
        )
        new = np.abs(f) <= tol
        new &= live
        if idx.size == m and np.all(new):  # every point at once (typical from the table)
            done[:] = True
            f_out, u_out = f, u
            iters[:] = it
            idx = idx[:0]
            break
        if np.any(new):
            pts = idx[new]
            done[pts] = True
            f_out[pts], u_out[pts], iters[pts] = f[new], u[new], it
            live &= ~new
            if not np.any(live):
                idx = idx[live]
                break
        df = _one_df(k, u, parts)  # not needed once every point has converged
        with np.errstate(divide="ignore", invalid="ignore"):
            step = f / df
        if it < plain:
            np.maximum(step, -100.0, out=step)
            np.minimum(step, 100.0, out=step)
            un = u - step
            np.fmax(un, st["lo"], out=un)  # NaN -> bound (then bracketed later)
            np.fmin(un, st["hi"], out=un)
            st["u"] = un
        else:  # keep a bracket [lo, hi] of the root; bisect when Newton leaves it
            st["lo"] = lo = np.where(f < 0.0, u, st["lo"])
            st["hi"] = hi = np.where(f > 0.0, u, st["hi"])  # arrays from here on
            un = u - step
            inside = un > lo
            inside &= un < hi  # False for NaN
            st["u"] = np.where(inside, un, 0.5 * (lo + hi))
        if 2 * np.count_nonzero(live) < idx.size:  # compact the active set
            idx = idx[live]
            st = {key: val[live] if np.ndim(val) else val for key, val in st.items()}
            f, u = f[live], u[live]
            live = np.ones(idx.size, dtype=bool)
    if idx.size:  # not converged within max_iter: last residual, flagged
        rest = idx[live]
        f_out[rest], u_out[rest], iters[rest] = f[live], u[live], max_iter
    e = np.exp(-u_out)
    s = 1.0 / (1.0 + e)
    xp = W * s
    xr = e * xp
    xi = np.where(s <= 0.5, xp - k["lo_t"], k["hi_t"] - xr)
    n = n0.copy()
    for i in k["prod"] + k["reac"]:
        n[:, i] = ((xp if nu[i] > 0 else xr) + slack[i]) * abs(nu[i])
    f_out[blocked] = 0.0
    return xi[:, None], n, done, iters, f_out[:, None], blocked[:, None].copy(), u_out
