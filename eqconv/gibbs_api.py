"""Equilibrium of a species list by Gibbs-energy minimisation: the species-aware layer.

:func:`gibbs_equilibrium` resolves species, evaluates their standard chemical potentials
over the grid and calls :func:`eqconv.gibbs.minimize_gibbs`. No reactions are chosen by
the user; an independent set (:mod:`eqconv.reaction_basis`) is only used to report the
residuals ln Q − ln K.

Examples
--------
Invented scenario: a pilot reformer fed with steam and methane at steam:carbon 3.

>>> res = gibbs_equilibrium(["CH4", "H2O", "CO", "CO2", "H2"], {"CH4": 1.0, "H2O": 3.0},
...                         T=1000.0, P=20e5, data="janaf")
>>> bool(res.converged), round(float(res.conversion("CH4")), 3)
(True, 0.546)
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence
from dataclasses import dataclass

import numpy as np
from numpy.typing import ArrayLike, NDArray

from ._validate import as_amount, as_pressure, as_temperature
from .constants import P_BAR
from .errors import ConvergenceError, InputError
from .gibbs import GibbsSolution, minimize_gibbs
from .reaction_basis import atom_matrix, reaction_equations
from .species import Species, get_species

__all__ = ["GibbsResult", "gibbs_equilibrium"]

FloatArray = NDArray[np.float64]


@dataclass(frozen=True)
class GibbsResult:
    """Equilibrium state of a species list on a grid (from :func:`gibbs_equilibrium`).

    Attributes
    ----------
    species : tuple of str
        Species keys, in the order given.
    elements : tuple of str
        Elements, in order of first appearance.
    T, P : ndarray
        Temperature [K] and absolute pressure [Pa], broadcast to the grid shape.
    feed : dict of str to ndarray
        Feed amounts [mol] (0 for species not fed).
    amounts : dict of str to ndarray
        Equilibrium amounts [mol]; NaN where the point did not converge.
    mole_fractions : dict of str to ndarray
        Gas mole fractions [-]; NaN where the point did not converge.
    total : ndarray
        Total amount of gas [mol].
    converged : ndarray of bool
        Per-point convergence (every tolerance met).
    iterations : ndarray of int
        Newton iterations per point.
    balance_residual, trace_balance_residual, stationarity_residual : ndarray
        As in :class:`eqconv.gibbs.GibbsSolution` [-].
    reactions : tuple of str
        An independent reaction set of the species (the one the residuals refer to).
    solution : GibbsSolution
        The array-level result (ln amounts, presence flags).
    """

    species: tuple[str, ...]
    elements: tuple[str, ...]
    T: FloatArray
    P: FloatArray
    feed: dict[str, FloatArray]
    amounts: dict[str, FloatArray]
    mole_fractions: dict[str, FloatArray]
    total: FloatArray
    converged: NDArray[np.bool_]
    iterations: NDArray[np.int64]
    balance_residual: FloatArray
    trace_balance_residual: FloatArray
    stationarity_residual: FloatArray
    reactions: tuple[str, ...]
    solution: GibbsSolution

    def conversion(self, species: str) -> FloatArray:
        """Fraction of the fed `species` consumed, (n°_i − n_i)/n°_i [-].

        Raises
        ------
        InputError
            If `species` is unknown or not in the feed at some point.
        """
        if species not in self.amounts:
            raise InputError(f"unknown species {species!r}; species are {list(self.species)}")
        n0 = self.feed[species]
        if np.any(n0 <= 0):
            raise InputError(
                f"{species} is not in the feed (at some grid point); its conversion is undefined"
            )
        return (n0 - self.amounts[species]) / n0

    def yield_of(self, product: str, reactant: str, per: float = 1.0) -> FloatArray:
        """Moles of `product` formed per mole of `reactant` fed, divided by `per` [-]."""
        for k in (product, reactant):
            if k not in self.amounts:
                raise InputError(f"unknown species {k!r}; species are {list(self.species)}")
        n0 = self.feed[reactant]
        if np.any(n0 <= 0):
            raise InputError(f"{reactant} is not in the feed (at some grid point)")
        return (self.amounts[product] - self.feed[product]) / (n0 * per)


def _resolve(species: Sequence[str | Species], data: str) -> list[Species]:
    if isinstance(species, str) or not len(species):
        raise InputError(f"species must be a non-empty list of species; got {species!r}")
    out = [get_species(s, data=data) for s in species]
    keys = [s.key for s in out]
    dup = sorted({k for k in keys if keys.count(k) > 1})
    if dup:
        raise InputError(f"species listed more than once: {dup}")
    return out


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
) -> GibbsResult:
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
    GibbsResult

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
    it gives the same state as the extent formulation with any independent reaction set.
    """
    if gas != "ideal":
        raise InputError(f"gas must be 'ideal' for the Gibbs formulation; got {gas!r}")
    if on_failure not in ("raise", "flag"):
        raise InputError(f"on_failure must be 'raise' or 'flag'; got {on_failure!r}")
    sps = _resolve(species, data)
    keys = tuple(s.key for s in sps)
    by_text = {}
    for text, sp in zip(species, sps, strict=True):
        by_text[sp.key] = sp.key
        if isinstance(text, str):
            by_text[text] = sp.key
    if not isinstance(feed, Mapping) or not feed:
        raise InputError(f"feed must be a non-empty mapping species -> amount; got {feed!r}")
    fed: dict[str, ArrayLike] = {}
    for name, amount in feed.items():
        key = by_text.get(name)
        if key is None:
            try:
                key = get_species(name, data=data).key
            except Exception as exc:
                raise InputError(
                    f"feed species {name!r} is not in the species list {list(keys)}"
                ) from exc
            if key not in keys:
                raise InputError(f"feed species {name!r} is not in the species list {list(keys)}")
        fed[key] = as_amount(amount, name)
    gas_mask = np.array([s.phase == "g" for s in sps])
    if not np.all(gas_mask):
        raise NotImplementedError(
            "condensed species ("
            + ", ".join(s.key for s in sps if s.phase != "g")
            + ") are not supported by the Gibbs formulation yet"
        )
    Tarr = as_temperature(T)
    Parr = as_pressure(P)
    shape = np.broadcast_shapes(Tarr.shape, Parr.shape, *(np.shape(v) for v in fed.values()))
    A, elements = atom_matrix([s.atoms for s in sps])
    mu0 = np.stack([np.broadcast_to(s.mu0_over_RT(Tarr), Tarr.shape) for s in sps], axis=-1)
    n0 = np.stack(
        [np.broadcast_to(np.asarray(fed.get(k, 0.0), dtype=float), shape) for k in keys], axis=-1
    )
    sol = minimize_gibbs(A, mu0, n0, np.log(Parr / P_BAR), tol=tol)
    if on_failure == "raise" and not sol.all_converged:
        bad = np.argwhere(~np.atleast_1d(sol.converged))[:3]
        Tb, Pb = np.broadcast_to(Tarr, shape), np.broadcast_to(Parr, shape)
        where = "; ".join(
            f"T = {float(np.atleast_1d(Tb)[tuple(i)]):g} K, P = "
            f"{float(np.atleast_1d(Pb)[tuple(i)]):g} Pa"
            for i in bad
        )
        raise ConvergenceError(
            sol.failure_summary() + f"\nfirst failing conditions: {where}"
            "\n(pass on_failure='flag' to get the other points)"
        )
    amounts = np.broadcast_to(sol.amounts, (*shape, len(keys)))
    x = np.broadcast_to(sol.mole_fractions, (*shape, len(keys)))
    return GibbsResult(
        species=keys,
        elements=elements,
        T=np.broadcast_to(Tarr, shape).copy(),
        P=np.broadcast_to(Parr, shape).copy(),
        feed={k: n0[..., i] for i, k in enumerate(keys)},
        amounts={k: amounts[..., i] for i, k in enumerate(keys)},
        mole_fractions={k: x[..., i] for i, k in enumerate(keys)},
        total=np.broadcast_to(sol.total, shape),
        converged=sol.converged,
        iterations=sol.iterations,
        balance_residual=sol.balance_residual,
        trace_balance_residual=sol.trace_balance_residual,
        stationarity_residual=sol.stationarity_residual,
        reactions=tuple(reaction_equations(sol.reactions, keys)) if len(sol.reactions) else (),
        solution=sol,
    )
