"""Operating windows: the T, P or feed ratio at which an equilibrium conversion target is met.

These are exact roots of the equilibrium solver, not read off a grid: at every point the
conversion of the key species is driven to the target by vectorized Illinois iterations
(:mod:`eqconv.studies._roots`), each iteration one vectorized call of
:func:`eqconv.equilibrium` on all points still open. Typical questions:

* the highest temperature at which an exothermic reaction can still reach 20 % conversion
  at 150 bar (:func:`temperature_for_conversion`);
* the lowest pressure that reaches it at 700 K (:func:`pressure_for_conversion`), and the
  whole target contour P(T) on the T–P plane (:func:`conversion_contour`);
* the steam-to-carbon ratio that reaches a methane conversion
  (:func:`feed_ratio_for_conversion`).

Each bracket is checked first: its ends must give conversions on opposite sides of the
target; otherwise :class:`UnreachableTargetError` names the conversions reached at the ends
(or, with ``on_unreachable="mask"``, the point is flagged ``reachable=False``). A single
crossing inside the bracket is assumed; conversion that is monotonic in the swept variable
(Le Chatelier, for one reaction) guarantees it.

Examples
--------
Invented case: stoichiometric ammonia synthesis at 700 K; the identity of
REFERENCES.md §3 gives the ideal-gas extent, here we only check the root is met.

>>> from eqconv import Reaction
>>> rxn = Reaction("N2 + 3 H2 = 2 NH3", data="janaf")
>>> res = pressure_for_conversion(rxn, {"N2": 1.0, "H2": 3.0}, 0.3, 700.0, (1e5, 1e8))
>>> bool(abs(res.conversion - 0.3) < 1e-9)
True
"""

from __future__ import annotations

from collections.abc import Callable, Mapping
from dataclasses import dataclass
from typing import Any

import numpy as np
from numpy.typing import ArrayLike, NDArray

from .._validate import as_pressure, as_temperature
from ..errors import InputError
from ._roots import illinois
from ._solve import (
    Reactions,
    as_reactions,
    conversion_of,
    default_key,
    feed_arrays,
    keyed,
    solve,
    species_key,
    species_list,
)
from .errors import UnreachableTargetError
from .feeds import FeedParameter

__all__ = [
    "TargetResult",
    "UnreachableTargetError",
    "conversion_contour",
    "feed_ratio_for_conversion",
    "pressure_for_conversion",
    "temperature_for_conversion",
]

FloatArray = NDArray[np.float64]
BoolArray = NDArray[np.bool_]


@dataclass(frozen=True)
class TargetResult:
    """Where a conversion target is met.

    Attributes
    ----------
    quantity : str
        ``"T"``, ``"P"`` or the feed parameter's name.
    unit : str
        Unit of :attr:`value` (``"K"``, ``"Pa"``, the parameter's unit).
    value : ndarray
        The root; NaN only where :attr:`reachable` is False.
    reachable : ndarray of bool
        False where the target is not crossed inside the bracket.
    conversion : ndarray
        Equilibrium conversion at :attr:`value` [-] (within ``ftol`` of the target, or the
        bracket narrower than its tolerance); NaN where unreachable.
    target : ndarray
        The targets, broadcast [-].
    iterations : int
        Root-finding iterations (each one vectorized solver call).
    """

    quantity: str
    unit: str
    value: FloatArray
    reachable: BoolArray
    conversion: FloatArray
    target: FloatArray
    iterations: int


def _check_target(target: ArrayLike) -> FloatArray:
    t = np.asarray(target, dtype=float)
    bad = ~np.isfinite(t) | (t <= 0.0) | (t >= 1.0)
    if np.any(bad):
        raise InputError(f"target conversion must lie in (0, 1); got {t[bad].flat[0]!r}")
    return t


def _check_on_unreachable(mode: str) -> None:
    if mode not in ("raise", "mask"):
        raise InputError(f"on_unreachable must be 'raise' or 'mask'; got {mode!r}")


def _solve_target(
    *,
    quantity: str,
    unit: str,
    fmt: Callable[[float], str],
    target: FloatArray,
    lo: FloatArray,
    hi: FloatArray,
    xtol: FloatArray,
    ftol: float,
    conv: Callable[[FloatArray, NDArray[np.intp]], FloatArray],
    to_x: Callable[[FloatArray], FloatArray],
    from_x: Callable[[FloatArray], FloatArray],
    on_unreachable: str,
    where: Callable[[int], str],
) -> TargetResult:
    """Bracket check and Illinois iterations on flat points (x = to_x(value))."""
    n = target.size
    idx = np.arange(n)
    xlo, xhi = to_x(lo), to_x(hi)

    def f(x: FloatArray, i: NDArray[np.intp]) -> FloatArray:
        return conv(from_x(x), i) - target[i]

    both = f(np.concatenate([xlo, xhi]), np.concatenate([idx, idx]))
    flo, fhi = both[:n], both[n:]
    ok = (np.sign(flo) != np.sign(fhi)) | (np.abs(flo) <= ftol) | (np.abs(fhi) <= ftol)
    if not np.all(ok) and on_unreachable == "raise":
        j = int(np.flatnonzero(~ok)[0])
        raise UnreachableTargetError(
            f"target conversion {target[j]:g} is not crossed for {quantity} in "
            f"[{fmt(lo[j])}, {fmt(hi[j])}] {where(j)}: the equilibrium conversion is "
            f"{flo[j] + target[j]:.6g} at {fmt(lo[j])} and {fhi[j] + target[j]:.6g} at "
            f"{fmt(hi[j])} ({int(np.count_nonzero(~ok))} of {n} point(s) unreachable); "
            "widen the bracket or change the target"
        )
    value = np.full(n, np.nan)
    achieved = np.full(n, np.nan)
    iterations = 0
    sel = np.flatnonzero(ok)
    if sel.size:

        def g(x: FloatArray, i: NDArray[np.intp]) -> FloatArray:
            return f(x, sel[i])

        root = illinois(g, xlo[sel], xhi[sel], flo[sel], fhi[sel], xtol=xtol[sel], ftol=ftol)
        value[sel] = from_x(root.x)
        achieved[sel] = root.fx + target[sel]
        iterations = root.iterations
    return TargetResult(quantity, unit, value, ok, achieved, target, iterations)


@dataclass(frozen=True)
class _Problem:
    """Flat, broadcast inputs of a target search."""

    shape: tuple[int, ...]
    target: FloatArray
    fixed: FloatArray  # the other of T/P, flat
    feed: dict[str, FloatArray]  # flat
    key: str


def _prepare(
    reactions: Reactions,
    feed: Mapping[str, ArrayLike],
    target: ArrayLike,
    other: FloatArray,
    bracket: tuple[ArrayLike, ArrayLike],
    key: str | None,
) -> tuple[_Problem, FloatArray, FloatArray]:
    rxns = as_reactions(reactions)
    f = feed_arrays(feed, rxns)
    t = _check_target(target)
    lo, hi = (np.asarray(b, dtype=float) for b in bracket)
    shape = np.broadcast_shapes(
        t.shape, other.shape, lo.shape, hi.shape, *(a.shape for a in f.values())
    )
    k = species_key(rxns, key) if key else default_key(rxns, f)
    if k not in f:
        raise InputError(f"key species {k!r} is not in the feed {sorted(f)}")

    def flat(a: ArrayLike) -> FloatArray:
        return np.broadcast_to(np.asarray(a, dtype=float), shape).ravel().copy()

    if np.any(flat(f[k]) <= 0.0):
        raise InputError(f"key species {k!r} needs a positive feed amount at every point")
    prob = _Problem(shape, flat(t), flat(other), {s: flat(a) for s, a in f.items()}, k)
    return prob, flat(lo), flat(hi)


def _converter(
    reactions: Reactions, prob: _Problem, gas: str, options: dict[str, Any], what: str
) -> Callable[[FloatArray, NDArray[np.intp], dict[str, FloatArray]], FloatArray]:
    rxns = as_reactions(reactions)
    sp = species_list(rxns, prob.feed)
    ki = [s.key for s in sp].index(prob.key)

    def conv(x: FloatArray, i: NDArray[np.intp], feed: dict[str, FloatArray]) -> FloatArray:
        T, P = (x, prob.fixed[i]) if what == "T" else (prob.fixed[i], x)
        sol = solve(rxns, sp, feed, T, P, gas=gas, **options)
        return conversion_of(sol.amounts[..., ki], feed[prob.key])

    return conv


def _shape_result(res: TargetResult, shape: tuple[int, ...]) -> TargetResult:
    return TargetResult(
        res.quantity,
        res.unit,
        res.value.reshape(shape),
        res.reachable.reshape(shape),
        res.conversion.reshape(shape),
        res.target.reshape(shape),
        res.iterations,
    )


def temperature_for_conversion(
    reactions: Reactions,
    feed: Mapping[str, ArrayLike],
    target: ArrayLike,
    P: ArrayLike,
    T_bracket: tuple[ArrayLike, ArrayLike],
    *,
    key: str | None = None,
    gas: str = "ideal",
    xtol: float = 1e-6,
    ftol: float = 1e-10,
    on_unreachable: str = "raise",
    **solver_options: Any,
) -> TargetResult:
    """Temperature at which the equilibrium conversion of `key` crosses `target`.

    For an exothermic reaction conversion falls with T, so this is the highest temperature
    at which the target is still reachable at pressure `P`.

    Parameters
    ----------
    reactions : Reaction or sequence of Reaction
    feed : mapping
        Species key -> amount [mol]; arrays broadcast with `target` and `P`.
    target : array_like
        Target conversion of `key` [-], in (0, 1).
    P : array_like
        Absolute pressure [Pa], > 0.
    T_bracket : (array_like, array_like)
        Temperatures [K] that bracket the crossing (either order).
    key : str, optional
        Species whose conversion is meant (default: first reactant in the feed).
    gas : str
        Gas model of :func:`eqconv.equilibrium`.
    xtol : float
        Absolute tolerance on T [K].
    ftol : float
        Absolute tolerance on the conversion [-].
    on_unreachable : {"raise", "mask"}
        What to do where the bracket ends do not straddle the target.
    **solver_options
        Passed to :func:`eqconv.equilibrium`.

    Returns
    -------
    TargetResult
        ``quantity="T"``, ``unit="K"``, broadcast shape of the inputs.

    Raises
    ------
    UnreachableTargetError
        If the target is not crossed in the bracket at some point (``"raise"``).
    InputError
        Bad target, T, P or feed.

    Notes
    -----
    Solves X_eq(T; P, feed) − X* = 0 by the Illinois method on all points at once.
    """
    _check_on_unreachable(on_unreachable)
    P = as_pressure(P)
    lo, hi = (as_temperature(b, "T_bracket") for b in T_bracket)
    prob, flo, fhi = _prepare(reactions, feed, target, P, (lo, hi), key)
    conv = _converter(reactions, prob, gas, solver_options, "T")
    res = _solve_target(
        quantity="T",
        unit="K",
        fmt=lambda v: f"{v:g} K",
        target=prob.target,
        lo=flo,
        hi=fhi,
        xtol=np.full(prob.target.size, float(xtol)),
        ftol=ftol,
        conv=lambda x, i: conv(x, i, {s: a[i] for s, a in prob.feed.items()}),
        to_x=lambda v: v,
        from_x=lambda x: x,
        on_unreachable=on_unreachable,
        where=lambda j: f"at P = {prob.fixed[j]:g} Pa",
    )
    return _shape_result(res, prob.shape)


def pressure_for_conversion(
    reactions: Reactions,
    feed: Mapping[str, ArrayLike],
    target: ArrayLike,
    T: ArrayLike,
    P_bracket: tuple[ArrayLike, ArrayLike],
    *,
    key: str | None = None,
    gas: str = "ideal",
    rtol: float = 1e-9,
    ftol: float = 1e-10,
    on_unreachable: str = "raise",
    **solver_options: Any,
) -> TargetResult:
    """Pressure at which the equilibrium conversion of `key` crosses `target`.

    For Δn < 0 conversion rises with P, so this is the lowest pressure that reaches the
    target at temperature `T`.

    Parameters
    ----------
    reactions : Reaction or sequence of Reaction
    feed : mapping
        Species key -> amount [mol]; arrays broadcast with `target` and `T`.
    target : array_like
        Target conversion [-], in (0, 1).
    T : array_like
        Temperature [K], > 0.
    P_bracket : (array_like, array_like)
        Absolute pressures [Pa] that bracket the crossing.
    key, gas, ftol, on_unreachable, **solver_options
        As in :func:`temperature_for_conversion`.
    rtol : float
        Relative tolerance on P [-] (the iteration runs on ln P).

    Returns
    -------
    TargetResult
        ``quantity="P"``, ``unit="Pa"``.

    Raises
    ------
    UnreachableTargetError, InputError

    Notes
    -----
    Solves X_eq(ln P; T, feed) − X* = 0 in ln P (conversion is smooth in ln P).
    """
    _check_on_unreachable(on_unreachable)
    T = as_temperature(T)
    lo, hi = (as_pressure(b, "P_bracket") for b in P_bracket)
    prob, flo, fhi = _prepare(reactions, feed, target, T, (lo, hi), key)
    conv = _converter(reactions, prob, gas, solver_options, "P")
    res = _solve_target(
        quantity="P",
        unit="Pa",
        fmt=lambda v: f"{v:g} Pa",
        target=prob.target,
        lo=flo,
        hi=fhi,
        xtol=np.full(prob.target.size, float(rtol)),
        ftol=ftol,
        conv=lambda x, i: conv(x, i, {s: a[i] for s, a in prob.feed.items()}),
        to_x=np.log,
        from_x=np.exp,
        on_unreachable=on_unreachable,
        where=lambda j: f"at T = {prob.fixed[j]:g} K",
    )
    return _shape_result(res, prob.shape)


def conversion_contour(
    reactions: Reactions,
    feed: Mapping[str, ArrayLike],
    target: ArrayLike,
    T: ArrayLike,
    P_bracket: tuple[ArrayLike, ArrayLike],
    *,
    key: str | None = None,
    gas: str = "ideal",
    rtol: float = 1e-9,
    ftol: float = 1e-10,
    **solver_options: Any,
) -> TargetResult:
    """The target-conversion contour on the T–P plane: P on the contour at every T.

    All temperatures are solved at once. Where the target is not crossed inside
    `P_bracket` the point is flagged (``reachable`` False, ``value`` NaN) instead of raising.

    Parameters
    ----------
    reactions, feed, target, key, gas, rtol, ftol, **solver_options
        As in :func:`pressure_for_conversion`; pass ``target[:, None]`` and ``T[None, :]``
        for several contour levels.
    T : array_like
        Temperatures [K] along the contour.
    P_bracket : (array_like, array_like)
        Pressure range [Pa] searched at every T.

    Returns
    -------
    TargetResult
        ``value`` = P [Pa] on the contour, shaped like ``broadcast(target, T)``.
    """
    return pressure_for_conversion(
        reactions,
        feed,
        target,
        T,
        P_bracket,
        key=key,
        gas=gas,
        rtol=rtol,
        ftol=ftol,
        on_unreachable="mask",
        **solver_options,
    )


def feed_ratio_for_conversion(
    reactions: Reactions,
    parameter: FeedParameter,
    target: ArrayLike,
    T: ArrayLike,
    P: ArrayLike,
    bracket: tuple[ArrayLike, ArrayLike],
    *,
    key: str | None = None,
    gas: str = "ideal",
    rtol: float = 1e-9,
    ftol: float = 1e-10,
    on_unreachable: str = "raise",
    **solver_options: Any,
) -> TargetResult:
    """Value of a feed parameter (ratio, excess, inert fraction) that meets `target`.

    Parameters
    ----------
    reactions : Reaction or sequence of Reaction
    parameter : FeedParameter
        The feed rule (e.g. :func:`~eqconv.studies.steam_to_carbon`).
    target : array_like
        Target conversion of `key` [-], in (0, 1).
    T : array_like
        Temperature [K].
    P : array_like
        Absolute pressure [Pa].
    bracket : (array_like, array_like)
        Parameter values that bracket the crossing, inside ``parameter.bounds``.
    key : str, optional
        Species whose conversion is meant; its feed must stay positive over the bracket.
    rtol : float
        Tolerance on the parameter, relative to the bracket width [-].
    gas, ftol, on_unreachable, **solver_options
        As in :func:`temperature_for_conversion`.

    Returns
    -------
    TargetResult
        ``quantity=parameter.name``, ``unit=parameter.unit``.

    Raises
    ------
    UnreachableTargetError, InputError
    """
    _check_on_unreachable(on_unreachable)
    rxns = as_reactions(reactions)
    T = as_temperature(T)
    P = as_pressure(P)
    lo, hi = (parameter.check(b) for b in bracket)
    t = _check_target(target)
    shape = np.broadcast_shapes(t.shape, T.shape, P.shape, lo.shape, hi.shape)

    def flat(a: ArrayLike) -> FloatArray:
        return np.broadcast_to(np.asarray(a, dtype=float), shape).ravel().copy()

    Tf, Pf, lof, hif, tf = flat(T), flat(P), flat(lo), flat(hi), flat(t)
    probe = keyed(rxns, parameter.feed(np.concatenate([lof, hif])))
    k = species_key(rxns, key) if key else default_key(rxns, probe)
    if k not in probe or np.any(probe[k] <= 0.0):
        raise InputError(f"key species {k!r} needs a positive feed over the whole bracket")
    sp = species_list(rxns, probe)
    ki = [s.key for s in sp].index(k)

    def conv(v: FloatArray, i: NDArray[np.intp]) -> FloatArray:
        feed = keyed(rxns, parameter.feed(v))
        sol = solve(rxns, sp, feed, Tf[i], Pf[i], gas=gas, **solver_options)
        return conversion_of(sol.amounts[..., ki], feed[k])

    res = _solve_target(
        quantity=parameter.name,
        unit=parameter.unit,
        fmt=lambda v: f"{v:g} {parameter.unit}",
        target=tf,
        lo=lof,
        hi=hif,
        xtol=float(rtol) * np.maximum(np.abs(hif - lof), 1e-300),
        ftol=ftol,
        conv=conv,
        to_x=lambda v: v,
        from_x=lambda x: x,
        on_unreachable=on_unreachable,
        where=lambda j: f"at T = {Tf[j]:g} K, P = {Pf[j]:g} Pa",
    )
    return _shape_result(res, shape)
