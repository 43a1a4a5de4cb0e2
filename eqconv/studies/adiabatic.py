"""Adiabatic operation: enthalpy balances with ideal-gas enthalpies, equilibrium outlets.

Enthalpies are absolute, on the formation scale: H_i(T) = ΔfH°_i(298.15 K) + ∫Cp°_i dT
(:meth:`eqconv.Species.enthalpy`), the same data that give K(T), so heat of reaction and
equilibrium constant never disagree. For an ideal gas the enthalpy does not depend on P.

* :func:`adiabatic_line` — the adiabatic operating line of one reaction in
  conversion–temperature space: outlet T at each conversion, no heat exchanged.
* :func:`adiabatic_equilibrium` — where that line meets equilibrium: the outlet temperature
  and composition of an adiabatic bed run to equilibrium (or to a fixed approach ΔT).

Examples
--------
Invented SO2 converter feed (10 % SO2, 11 % O2, 79 % N2) entering at 700 K:

>>> from eqconv import Reaction
>>> rxn = Reaction("SO2 + 1/2 O2 = SO3", data="janaf")
>>> feed = {"SO2": 0.10, "O2": 0.11, "N2": 0.79}
>>> rise = adiabatic_rise(rxn, feed, 700.0, 0.5)   # [K] at 50 % SO2 conversion
>>> bool(130.0 < float(rise) < 150.0)
True
"""

from __future__ import annotations

from collections.abc import Iterable, Mapping, Sequence
from dataclasses import dataclass
from typing import Any

import numpy as np
from numpy.typing import ArrayLike, NDArray

from .._validate import as_pressure, as_temperature
from ..errors import ConvergenceError, InputError
from ..species import Species
from ._roots import illinois
from ._solve import (
    Reactions,
    as_reactions,
    conversion_of,
    default_key,
    feed_arrays,
    gas_fractions,
    gas_mask,
    solve,
    species_key,
    species_list,
)

__all__ = [
    "AdiabaticResult",
    "adiabatic_equilibrium",
    "adiabatic_line",
    "adiabatic_rise",
    "mixture_enthalpy",
]

FloatArray = NDArray[np.float64]
SpeciesArg = Mapping[str, Species] | Iterable[Species] | None


def mixture_enthalpy(species: Sequence[Species], amounts: ArrayLike, T: ArrayLike) -> FloatArray:
    """Enthalpy of an ideal-gas mixture, Σ n_i H_i(T) [J per amount basis].

    Parameters
    ----------
    species : sequence of Species
        The species, in the order of the last axis of `amounts`.
    amounts : array_like (..., ns)
        Amounts [mol] (or flows [mol/s], giving W).
    T : array_like
        Temperature [K], broadcast with ``amounts[..., 0]``.

    Returns
    -------
    ndarray
        H [J] on the formation scale (elements at 298.15 K have H = 0).

    Notes
    -----
    H = Σ_i n_i [ΔfH°_i(298.15 K) + ∫_{298.15}^{T} Cp°_i dT]; ideal gas, so no pressure term.
    """
    n = np.asarray(amounts, dtype=float)
    if n.shape[-1] != len(species):
        raise InputError(
            f"amounts have {n.shape[-1]} species on the last axis; expected {len(species)}"
        )
    T = as_temperature(T)
    H = np.zeros(np.broadcast_shapes(n.shape[:-1], T.shape))
    for i, s in enumerate(species):
        H = H + n[..., i] * s.enthalpy(T)
    return H


def _mixture_cp(species: Sequence[Species], n: FloatArray, T: FloatArray) -> FloatArray:
    cp = np.zeros(np.broadcast_shapes(n.shape[:-1], T.shape))
    for i, s in enumerate(species):
        cp = cp + n[..., i] * s.cp(T)
    return cp


def _vector(
    species: Sequence[Species], amounts: Mapping[str, FloatArray], shape: tuple[int, ...]
) -> FloatArray:
    return np.stack([np.broadcast_to(amounts.get(s.key, 0.0), shape) for s in species], -1)


def _temperature_for_enthalpy(
    species: Sequence[Species], n: FloatArray, H: FloatArray, T0: FloatArray, xtol: float = 1e-9
) -> FloatArray:
    """T at which Σ n_i H_i(T) = H for fixed amounts (Newton; H is monotonic in T)."""
    T = np.array(np.broadcast_to(T0, H.shape), dtype=float)
    for _ in range(60):
        g = mixture_enthalpy(species, n, T) - H
        step = g / _mixture_cp(species, n, T)
        T_new = np.where(T - step > 0.0, T - step, 0.5 * T)
        if np.all(np.abs(T_new - T) <= xtol * np.maximum(1.0, T)):
            return T_new
        T = T_new
    raise ConvergenceError("enthalpy balance for the outlet temperature did not converge")


def _prepare_line(
    reactions: Reactions,
    feed: Mapping[str, ArrayLike],
    reaction: int,
    key: str | None,
    basis: Mapping[str, ArrayLike] | None,
    species: SpeciesArg,
) -> tuple[tuple[Species, ...], FloatArray, FloatArray, FloatArray, str, float]:
    rxns = as_reactions(reactions)
    if not 0 <= reaction < len(rxns):
        raise InputError(f"reaction index must be in 0..{len(rxns) - 1}; got {reaction!r}")
    f = feed_arrays(feed, rxns, species)
    b = feed_arrays(basis, rxns, species) if basis is not None else f
    k = species_key(rxns, key, species) if key else default_key(rxns[reaction : reaction + 1], b)
    sp = species_list(rxns, [*f, *b], species)
    keys = [s.key for s in sp]
    nu = np.zeros(len(sp))
    for s, v in zip(rxns[reaction].keys, rxns[reaction].nu, strict=True):
        nu[keys.index(s)] = v
    ki = keys.index(k) if k in keys else -1
    if ki < 0 or nu[ki] >= 0.0:
        raise InputError(f"key species {k!r} must be a reactant of {rxns[reaction].equation}")
    n_in = np.array([float(np.asarray(f.get(s, 0.0))) for s in keys])
    n_basis = np.array([float(np.asarray(b.get(s, 0.0))) for s in keys])
    if n_basis[ki] <= 0.0:
        raise InputError(f"key species {k!r} needs a positive amount in the basis feed")
    return sp, nu, n_in, n_basis, k, float(n_basis[ki])


def adiabatic_line(
    reactions: Reactions,
    feed: Mapping[str, float],
    T_in: ArrayLike,
    conversion: ArrayLike,
    *,
    reaction: int = 0,
    key: str | None = None,
    basis: Mapping[str, float] | None = None,
    species: SpeciesArg = None,
) -> FloatArray:
    """Adiabatic operating line: outlet temperature at each conversion of `key`.

    Parameters
    ----------
    reactions : Reaction or sequence of Reaction
    feed : mapping
        Inlet amounts of the bed [mol] (scalars).
    T_in : array_like
        Inlet temperature [K], > 0.
    conversion : array_like
        Conversion of `key` [-] counted against `basis`; broadcast with `T_in`.
    reaction : int
        Index of the reaction that advances (the others stay at zero extent).
    key : str, optional
        A reactant of that reaction (default: its first reactant in the basis).
    basis : mapping, optional
        Feed against which conversion is counted [mol] (default `feed`); pass the fresh
        feed to draw a later bed's line in cumulative conversion.
    species : mapping or iterable of Species, optional
        Species for inert feed components (default: resolved from the reactions' data).

    Returns
    -------
    ndarray
        Outlet temperature [K], shape ``broadcast(T_in, conversion)``.

    Raises
    ------
    InputError
        If a conversion would need more of a reactant than the inlet holds.

    Notes
    -----
    n(X) = n_in + ν ξ with ξ = (n_in,key − n_basis,key (1 − X))/(−ν_key), and T_out solves
    Σ n_i(X) H_i(T_out) = Σ n_in,i H_i(T_in) (Newton on T, dH/dT = Σ n_i Cp_i > 0).
    """
    sp, nu, n_in, _, k, nb = _prepare_line(reactions, feed, reaction, key, basis, species)
    T_in = as_temperature(T_in, "T_in")
    X = np.asarray(conversion, dtype=float)
    if not np.all(np.isfinite(X)):
        raise InputError("conversion must be finite")
    ki = [s.key for s in sp].index(k)
    shape = np.broadcast_shapes(T_in.shape, X.shape)
    xi = (n_in[ki] - nb * (1.0 - X)) / (-nu[ki])
    n = n_in + np.asarray(xi)[..., None] * nu
    scale = max(float(np.sum(n_in)), 1e-300)
    if np.any(n < -1e-12 * scale):
        worst = float(np.broadcast_to(X, shape).flat[int(np.argmin(np.min(n, axis=-1)))])
        raise InputError(
            f"conversion {worst:g} of {k} is outside what the inlet allows "
            "(an amount would become negative)"
        )
    n = np.maximum(n, 0.0)
    H_in = mixture_enthalpy(sp, n_in, T_in)
    n_b = np.broadcast_to(n, (*shape, len(sp)))
    return _temperature_for_enthalpy(
        sp, n_b, np.broadcast_to(H_in, shape), np.broadcast_to(T_in, shape)
    )


def adiabatic_rise(
    reactions: Reactions,
    feed: Mapping[str, float],
    T_in: ArrayLike,
    conversion: ArrayLike,
    *,
    reaction: int = 0,
    key: str | None = None,
    basis: Mapping[str, float] | None = None,
    species: SpeciesArg = None,
) -> FloatArray:
    """Adiabatic temperature change T_out − T_in [K] at each conversion (see
    :func:`adiabatic_line`; positive for an exothermic reaction)."""
    T_in_arr = as_temperature(T_in, "T_in")
    return (
        adiabatic_line(
            reactions,
            feed,
            T_in_arr,
            conversion,
            reaction=reaction,
            key=key,
            basis=basis,
            species=species,
        )
        - T_in_arr
    )


@dataclass(frozen=True)
class AdiabaticResult:
    """Outlet of adiabatic beds run to equilibrium (arrays on the broadcast input shape).

    Attributes
    ----------
    T_in : ndarray
        Inlet temperature [K].
    P : ndarray
        Absolute pressure [Pa].
    T_out : ndarray
        Adiabatic outlet temperature [K].
    conversion : ndarray
        Conversion of :attr:`key` at the outlet, counted against the basis feed [-].
    amounts : dict[str, ndarray]
        Outlet amounts [mol per feed basis].
    mole_fractions : dict[str, ndarray]
        Outlet gas-phase mole fractions [-] (0 for a pure condensed species).
    key : str
        Species whose conversion is reported.
    approach_T : float
        Approach to equilibrium [K] used (0: equilibrium at the outlet T).
    iterations : int
        Root-finding iterations (each one vectorized solver call).
    """

    T_in: FloatArray
    P: FloatArray
    T_out: FloatArray
    conversion: FloatArray
    amounts: dict[str, FloatArray]
    mole_fractions: dict[str, FloatArray]
    key: str
    approach_T: float
    iterations: int


def adiabatic_equilibrium(
    reactions: Reactions,
    feed: Mapping[str, ArrayLike],
    T_in: ArrayLike,
    P: ArrayLike,
    *,
    key: str | None = None,
    basis: Mapping[str, ArrayLike] | None = None,
    gas: str = "ideal",
    approach_T: float = 0.0,
    species: SpeciesArg = None,
    xtol: float = 1e-6,
    T_bounds: tuple[float, float] = (200.0, 4000.0),
    **solver_options: Any,
) -> AdiabaticResult:
    """Outlet temperature and composition of an adiabatic bed at equilibrium.

    Parameters
    ----------
    reactions : Reaction or sequence of Reaction
    feed : mapping
        Inlet amounts [mol] (or flows [mol/s]); arrays broadcast with `T_in` and `P`.
    T_in : array_like
        Inlet temperature [K], > 0.
    P : array_like
        Absolute pressure [Pa], > 0.
    key : str, optional
        Species whose conversion is reported (default: first reactant in the feed).
    basis : mapping, optional
        Feed against which conversion is counted (default `feed`).
    gas : str
        Gas model of :func:`eqconv.equilibrium` (the enthalpy stays ideal-gas).
    approach_T : float
        Approach to equilibrium [K]: the outlet composition is the equilibrium at
        T_out + approach_T (positive values lower the conversion of an exothermic
        reaction; common practice for screening real beds). Default 0.
    species : mapping or iterable of Species, optional
        Species for inert feed components.
    xtol : float
        Tolerance on the outlet temperature [K].
    T_bounds : (float, float)
        Temperatures [K] the search may not leave.
    **solver_options
        Passed to :func:`eqconv.equilibrium`.

    Returns
    -------
    AdiabaticResult

    Raises
    ------
    ConvergenceError
        If no outlet temperature is found inside `T_bounds`, or a solve fails.
    InputError
        Bad inputs.

    Notes
    -----
    Solves g(T) = Σ n_eq,i(T + ΔT_app) H_i(T) − Σ n_in,i H_i(T_in) = 0. With ΔT_app = 0,
    dg/dT is the equilibrium heat capacity of the mixture, which is positive, so the root is
    unique. It is bracketed by T_in and the temperature at which the equilibrium composition
    at T_in would balance the enthalpy (stepping outward if that ever fails), then found by
    vectorized regula falsi iterations, each a single call of the equilibrium solver on all
    open points.
    """
    rxns = as_reactions(reactions)
    f = feed_arrays(feed, rxns, species)
    b = feed_arrays(basis, rxns, species) if basis is not None else f
    k = species_key(rxns, key, species) if key else default_key(rxns, b)
    if k not in b:
        raise InputError(f"key species {k!r} is not in the basis feed {sorted(b)}")
    sp = species_list(rxns, [*f, *b], species)
    keys = tuple(s.key for s in sp)
    T_in = as_temperature(T_in, "T_in")
    P = as_pressure(P)
    a = float(approach_T)
    if not np.isfinite(a):
        raise InputError(f"approach_T must be finite; got {approach_T!r}")
    lo_b, hi_b = float(T_bounds[0]), float(T_bounds[1])
    shape = np.broadcast_shapes(
        T_in.shape, P.shape, *(v.shape for v in f.values()), *(v.shape for v in b.values())
    )
    Tf = np.broadcast_to(T_in, shape).ravel().copy()
    Pf = np.broadcast_to(P, shape).ravel().copy()
    n0 = _vector(sp, f, shape).reshape(-1, len(sp))
    nb_key = np.broadcast_to(b[k], shape).ravel()
    if np.any(nb_key <= 0.0):
        raise InputError(f"key species {k!r} needs a positive amount in the basis feed")
    if np.any((Tf + min(a, 0.0) <= lo_b) | (Tf >= hi_b)):
        raise InputError(f"T_in must lie inside T_bounds = ({lo_b:g}, {hi_b:g}) K")
    H_in = mixture_enthalpy(sp, n0, Tf)
    feed_flat = {s: n0[:, j] for j, s in enumerate(keys)}

    def state(T: FloatArray, i: NDArray[np.intp]) -> FloatArray:
        sol = solve(
            rxns,
            sp,
            {s: v[i] for s, v in feed_flat.items()},
            T + a,
            Pf[i],
            gas=gas,
            **solver_options,
        )
        return sol.amounts

    def g(T: FloatArray, i: NDArray[np.intp]) -> FloatArray:
        return mixture_enthalpy(sp, state(T, i), T) - H_in[i]

    idx = np.arange(Tf.size)
    n_at_in = state(Tf, idx)
    g0 = mixture_enthalpy(sp, n_at_in, Tf) - H_in
    # First bracket: T_in and the temperature T* at which the composition of equilibrium at
    # T_in would balance the enthalpy. Along the equilibrium the reaction heat moves the
    # other way (dξ_eq/dT has the sign of ΔrH), so g changes sign between them.
    T_star = np.clip(
        _temperature_for_enthalpy(sp, n_at_in, H_in, Tf), lo_b + max(-a, 0.0) + 1e-9, hi_b
    )
    g_star = g(T_star, idx)
    rising = g0 < 0.0
    lo = np.where(rising, Tf, T_star)
    hi = np.where(rising, T_star, Tf)
    glo = np.where(rising, g0, g_star)
    ghi = np.where(rising, g_star, g0)
    step = 50.0
    for _ in range(12):  # fallback: step outward where the first bracket missed
        up = ghi < 0.0
        down = glo > 0.0
        if not np.any(up | down):
            break
        lo[up], glo[up] = hi[up], ghi[up]
        hi[down], ghi[down] = lo[down], glo[down]
        hi[up] = np.minimum(hi[up] + step, hi_b)
        lo[down] = np.maximum(lo[down] - step, lo_b + max(-a, 0.0) + 1e-9)
        j = np.concatenate([np.flatnonzero(up), np.flatnonzero(down)])
        x = np.concatenate([hi[up], lo[down]])
        gv = g(x, j)
        ghi[up] = gv[: int(np.count_nonzero(up))]
        glo[down] = gv[int(np.count_nonzero(up)) :]
        step *= 2.0
    stuck = (ghi < 0.0) | (glo > 0.0)
    if np.any(stuck):
        jj = int(np.flatnonzero(stuck)[0])
        raise ConvergenceError(
            f"no adiabatic outlet temperature inside T_bounds = ({lo_b:g}, {hi_b:g}) K for "
            f"T_in = {Tf[jj]:g} K, P = {Pf[jj]:g} Pa; widen T_bounds"
        )
    scale = np.maximum(np.sum(n0, axis=-1), 1e-300)
    root = illinois(g, lo, hi, glo, ghi, xtol=xtol, ftol=1e-9 * float(np.max(scale)))
    T_out = root.x
    n = state(T_out, idx)
    x = gas_fractions(n, gas_mask(sp))
    conv = conversion_of(n[:, keys.index(k)], nb_key)
    return AdiabaticResult(
        T_in=Tf.reshape(shape),
        P=Pf.reshape(shape),
        T_out=T_out.reshape(shape),
        conversion=conv.reshape(shape),
        amounts={s: n[:, j].reshape(shape) for j, s in enumerate(keys)},
        mole_fractions={s: x[:, j].reshape(shape) for j, s in enumerate(keys)},
        key=k,
        approach_T=a,
        iterations=root.iterations,
    )
