"""Equilibrium of a species list by Gibbs-energy minimisation: the species-aware layer.

:func:`gibbs_equilibrium` resolves species, evaluates their standard chemical potentials
over the grid and calls :func:`eqconv.gibbs.minimize_gibbs`. The user chooses no reactions;
the result is the same :class:`eqconv.result.EquilibriumResult` as from
:func:`eqconv.equilibrium`, written in terms of an independent reaction set derived from the
species (:mod:`eqconv.reaction_basis`), so conversions, yields, selectivities, residuals
ln Q − ln K and per-reaction diagnostics work the same way.

Examples
--------
Invented scenario: a pilot reformer fed with steam and methane at steam:carbon 3.

>>> res = gibbs_equilibrium(["CH4", "H2O", "CO", "CO2", "H2"], {"CH4": 1.0, "H2O": 3.0},
...                         T=1000.0, P=20e5, data="janaf")
>>> bool(res.converged), round(float(res.conversion("CH4")), 3)
(True, 0.546)
>>> [r.equation for r in res.reactions]
['CO + 3 H2 = CH4 + H2O', 'H2O + CO = CO2 + H2']
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence

import numpy as np
from numpy.typing import ArrayLike, NDArray

from ._validate import as_amount, as_pressure, as_temperature
from .constants import P_BAR
from .errors import ConvergenceError, InputError
from .extent_solver import ExtentSolution
from .gibbs import GibbsSolution, minimize_gibbs, reactions_of
from .reaction import Reaction
from .reaction_basis import atom_matrix
from .result import EquilibriumResult
from .species import Species, get_species

__all__ = ["GibbsResult", "gibbs_equilibrium"]

FloatArray = NDArray[np.float64]

#: Result type of :func:`gibbs_equilibrium`: the shared :class:`~eqconv.result.EquilibriumResult`
#: (kept under this name for code written against an earlier version).
GibbsResult = EquilibriumResult


def _resolve(species: Sequence[str | Species], data: str) -> list[Species]:
    if isinstance(species, str) or not len(species):
        raise InputError(f"species must be a non-empty list of species; got {species!r}")
    out = [get_species(s, data=data) for s in species]
    keys = [s.key for s in out]
    dup = sorted({k for k in keys if keys.count(k) > 1})
    if dup:
        raise InputError(f"species listed more than once: {dup}")
    return out


def _feed(
    feed: Mapping[str, ArrayLike],
    species: Sequence[str | Species],
    sps: list[Species],
    data: str,
) -> dict[str, FloatArray]:
    keys = [s.key for s in sps]
    by_text = {s.key: s.key for s in sps}
    by_text.update({t: s.key for t, s in zip(species, sps, strict=True) if isinstance(t, str)})
    if not isinstance(feed, Mapping) or not feed:
        raise InputError(f"feed must be a non-empty mapping species -> amount; got {feed!r}")
    fed: dict[str, FloatArray] = {}
    for name, amount in feed.items():
        key = by_text.get(name)
        if key is None:
            try:
                key = get_species(name, data=data).key
            except Exception as exc:
                raise InputError(
                    f"feed species {name!r} is not in the species list {keys}"
                ) from exc
            if key not in keys:
                raise InputError(f"feed species {name!r} is not in the species list {keys}")
        fed[key] = fed.get(key, 0.0) + as_amount(amount, name)
    return fed


def _as_result(
    sol: GibbsSolution,
    sps: list[Species],
    n0: FloatArray,
    mu0: FloatArray,
    lnP: FloatArray,
    T: FloatArray,
    P: FloatArray,
) -> EquilibriumResult:
    """Express the state through an independent reaction set of the species."""
    keys = tuple(s.key for s in sps)
    A, _ = atom_matrix([s.atoms for s in sps])
    nu = reactions_of(np.asarray(A), "auto").astype(float)  # the smallest coefficients
    rxns = tuple(
        Reaction({k: c for k, c in zip(keys, row, strict=True) if c}, species=sps) for row in nu
    )
    shape = sol.converged.shape
    nr = len(nu)
    n = np.broadcast_to(sol.amounts, (*shape, len(keys)))
    extents = (n - n0) @ np.linalg.pinv(nu) if nr else np.zeros((*shape, 0))
    present = np.broadcast_to(sol.present, n.shape)
    # residual of reaction j: Σ_i ν_ji μ_i/(R T) over its species; zero where it needs a
    # species that cannot be present (blocked)
    blocked = np.zeros((*shape, nr), dtype=bool)
    with np.errstate(invalid="ignore"):
        mu = mu0 + lnP[..., None]
        mu += sol.ln_amounts
        mu -= np.log(sol.total)[..., None]
        if not np.all(present):  # ln n = −inf there: 0·(−inf) would spoil every product
            blocked = (~present).astype(float) @ (nu != 0).T.astype(float) > 0
            mu = np.where(present, mu, 0.0)
        residual = mu @ nu.T
        residual[blocked] = 0.0
    ext = ExtentSolution(
        extents=np.where(sol.converged[..., None], extents, np.nan),
        amounts=n,
        converged=sol.converged,
        iterations=sol.iterations,
        residual=residual,
        balance_error=sol.balance_residual,
        blocked=blocked,
    )
    return EquilibriumResult(
        reactions=rxns,
        species=keys,
        phases=tuple(s.phase for s in sps),
        T=np.broadcast_to(T, shape),
        P=np.broadcast_to(P, shape),
        feed={k: np.broadcast_to(n0[..., i], shape) for i, k in enumerate(keys)},
        solution=ext,
        ln_K=np.broadcast_to(-(mu0 @ nu.T), (*shape, nr)),
        standard_pressure=P_BAR,
        element_balance_error=sol.balance_residual,
        atoms=tuple(dict(s.atoms) for s in sps),
    )


def gibbs_equilibrium(
    species: Sequence[str | Species],
    feed: Mapping[str, ArrayLike],
    T: ArrayLike,
    P: ArrayLike,
    *,
    data: str = "default",
    gas: str = "ideal",
    on_failure: str = "raise",
    tol: float = 1e-10,
) -> EquilibriumResult:
    """Equilibrium composition of a species list, without choosing reactions.

    Parameters
    ----------
    species : sequence of str or Species
        Every species that may be present (formulas, names, CAS numbers or Species).
    feed : mapping
        Species → feed amount [mol], >= 0; scalars or arrays broadcasting with `T` and `P`
        (a feed ratio can be swept). Species not listed are not fed.
    T : array_like
        Temperature [K], > 0.
    P : array_like
        Absolute pressure [Pa], > 0.
    data : {"default", "janaf"}
        Data source for species given as text.
    gas : {"ideal"}
        Gas model; only the ideal gas for now.
    on_failure : {"raise", "flag"}
        ``"raise"``: a point that misses a tolerance raises :class:`ConvergenceError`;
        ``"flag"``: it is returned with ``converged=False`` and NaN amounts.
    tol : float
        Required |ln Q − ln K| of every reaction of an independent set [-].

    Returns
    -------
    EquilibriumResult
        With the reactions of an independent set of the species (smallest coefficients;
        p° = 1 bar); a reaction that needs a species that cannot be present at a point is
        reported as blocked there.

    Raises
    ------
    InputError
        Bad T, P or amounts, a feed species not in `species`, an unknown option.
    ConvergenceError
        A point did not converge and ``on_failure="raise"``.
    NotImplementedError
        A condensed species in the list.

    Notes
    -----
    Minimises G/(R T) = Σ_i n_i [μ°_i(T)/(R T) + ln(P/p°) + ln(n_i/N)] (p° = 1 bar)
    subject to the element balances; see :mod:`eqconv.gibbs`. With the same species data
    it gives the state of the extent formulation with any independent reaction set.
    """
    if gas != "ideal":
        raise InputError(f"gas must be 'ideal' for the Gibbs formulation; got {gas!r}")
    if on_failure not in ("raise", "flag"):
        raise InputError(f"on_failure must be 'raise' or 'flag'; got {on_failure!r}")
    sps = _resolve(species, data)
    fed = _feed(feed, species, sps, data)
    condensed = [s.key for s in sps if s.phase != "g"]
    if condensed:
        raise NotImplementedError(
            f"condensed species ({', '.join(condensed)}) are not supported by the Gibbs "
            "formulation yet"
        )
    Tarr, Parr = as_temperature(T), as_pressure(P)
    shape = np.broadcast_shapes(Tarr.shape, Parr.shape, *(np.shape(v) for v in fed.values()))
    A, _ = atom_matrix([s.atoms for s in sps])
    mu0 = np.stack([np.broadcast_to(s.mu0_over_RT(Tarr), Tarr.shape) for s in sps], axis=-1)
    # the feed keeps its own (often scalar) shape: minimize_gibbs resolves each distinct
    # feed row once, not once per grid point
    fshape = np.broadcast_shapes(*(np.shape(v) for v in fed.values()))
    n0 = np.stack(
        [np.broadcast_to(np.asarray(fed.get(s.key, 0.0), dtype=float), fshape) for s in sps],
        axis=-1,
    )
    lnP = np.log(Parr / P_BAR)
    sol = minimize_gibbs(A, mu0, n0, lnP, tol=tol)
    if on_failure == "raise" and not sol.all_converged:
        bad = np.argwhere(~np.atleast_1d(sol.converged))[:3]
        Tb, Pb = (
            np.atleast_1d(np.broadcast_to(Tarr, shape)),
            np.atleast_1d(np.broadcast_to(Parr, shape)),
        )
        where = "; ".join(
            f"T = {float(Tb[tuple(i)]):g} K, P = {float(Pb[tuple(i)]):g} Pa" for i in bad
        )
        raise ConvergenceError(
            sol.failure_summary() + f"\nfirst failing conditions: {where}"
            "\n(pass on_failure='flag' to get the other points)"
        )
    return _as_result(sol, sps, n0, mu0, np.broadcast_to(lnP, shape), Tarr, Parr)
