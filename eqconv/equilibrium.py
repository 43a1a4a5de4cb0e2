"""Equilibrium composition of simultaneous gas-phase reactions on a T × P × feed grid.

:func:`equilibrium` gathers the species of the reactions (shared by key) and the inert feed
species, builds the stoichiometric matrix and ln K(T) of every reaction, and calls the
extent solver :func:`eqconv.extent_solver.solve_extents`. The result,
:class:`eqconv.result.EquilibriumResult`, gives mole fractions, conversions, yields,
selectivities, residuals and per-reaction diagnostics.

Examples
--------
Invented scenario: a small ammonia loop at 450 °C and 150 bar, feed H2:N2 = 3:1 with 5 % Ar.

>>> from eqconv import Reaction
>>> res = equilibrium([Reaction("N2 + 3 H2 = 2 NH3", data="janaf")],
...                   {"N2": 0.2375, "H2": 0.7125, "Ar": 0.05}, T=723.15, P=150e5)
>>> bool(res.converged), res.shape
(True, ())
>>> round(float(res.mole_fractions["NH3"]), 4)
0.1913
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence
from typing import Any

import numpy as np
from numpy.typing import ArrayLike

from ._validate import as_amount, as_pressure, as_temperature
from .constants import P_BAR
from .errors import ConvergenceError, InputError
from .extent_solver import check_independent, solve_extents
from .reaction import Model, Reaction
from .result import EquilibriumResult
from .species import Species, get_species

__all__ = ["GAS_MODELS", "equilibrium"]

#: Gas models accepted by :func:`equilibrium`. Fugacity models ("peng-robinson", "srk")
#: will enter through an outer loop over fixed ln φ (see ``_solve_with_phi``).
GAS_MODELS = ("ideal",)
_PLANNED = ("peng-robinson", "srk")


def _as_reactions(
    reactions: Reaction | str | Sequence[Reaction | str], data: str | None
) -> tuple[Reaction, ...]:
    items = [reactions] if isinstance(reactions, Reaction | str) else list(reactions)
    if not items:
        raise InputError("at least one reaction is needed; got an empty list")
    out = []
    for r in items:
        if isinstance(r, str):
            r = Reaction(r, data=data or "default")
        elif not isinstance(r, Reaction):
            raise InputError(
                f"reactions must be eqconv.Reaction objects or equations; got {type(r).__name__}"
            )
        out.append(r)
    return tuple(out)


def _species(
    reactions: tuple[Reaction, ...], feed: Mapping[str, Any], data: str
) -> tuple[list[Species], dict[str, str]]:
    """Species union by key (reactions first, then inerts) and feed label → key."""
    union: dict[str, Species] = {}
    for rxn in reactions:
        for sp in rxn.species:
            old = union.setdefault(sp.key, sp)
            if old is not sp and (old.phase != sp.phase or old.data != sp.data):
                raise InputError(
                    f"species {sp.key!r} has different data in two reactions ({old.data!r} "
                    f"phase {old.phase!r} vs {sp.data!r} phase {sp.phase!r}); build the "
                    "reactions with the same data source"
                )
    labels: dict[str, str] = {}
    for label in feed:
        if not isinstance(label, str):
            raise InputError(f"feed keys must be species names or formulas; got {label!r}")
        sp = union.get(label) or get_species(label, data=data)
        union.setdefault(sp.key, sp)
        if sp.key in labels.values():
            raise InputError(f"feed names {sp.key!r} twice (as {label!r})")
        labels[label] = sp.key
    return list(union.values()), labels


def _label(j: int, rxn: Reaction) -> str:
    return f'reaction {j + 1} ("{rxn.equation}")'


def _solve_with_phi(
    nu: np.ndarray,
    lnK: np.ndarray,
    n0: np.ndarray,
    lnP: np.ndarray,
    gas_mask: np.ndarray,
    gas: str,
    tol: float,
) -> Any:
    """Solve at fixed fugacity coefficients; the hook for non-ideal gas models.

    For ``gas="ideal"`` ln φ = 0 and one solve is exact. A fugacity model will iterate here:
    solve at fixed ln φ, update ln φ(T, P, y) from the equation of state, repeat until ln φ
    stops moving (the extent solver takes ``ln_phi`` per point).
    """
    if gas != "ideal":  # pragma: no cover - guarded in equilibrium()
        raise InputError(f"gas model {gas!r} is not available")
    return solve_extents(nu, lnK, n0, lnP, gas_mask=gas_mask, tol=tol)


def equilibrium(
    reactions: Reaction | str | Sequence[Reaction | str],
    feed: Mapping[str, ArrayLike],
    T: ArrayLike,
    P: ArrayLike,
    gas: str = "ideal",
    *,
    data: str | None = None,
    model: str = "kirchhoff",
    standard_pressure: float = P_BAR,
    on_failure: str = "raise",
    tol: float = 1e-10,
) -> EquilibriumResult:
    """Equilibrium composition of independent reactions at every T, P (and feed) point.

    Parameters
    ----------
    reactions : Reaction, str or sequence of them
        Independent reactions; equations given as text are built with ``data``. Species
        are shared by key.
    feed : mapping
        Species (key, formula, name or CAS) → feed amount [mol], ≥ 0; scalars or arrays
        that broadcast with `T` and `P` (e.g. a swept feed ratio). Species in no reaction
        are inerts (resolved with :func:`eqconv.get_species`).
    T : array_like
        Temperature [K], > 0.
    P : array_like
        Absolute pressure [Pa], > 0.
    gas : {"ideal"}
        Gas model. Fugacity models are planned and raise :class:`~eqconv.InputError` now.
    data : {"default", "janaf"}, optional
        Data source for inerts and for equations given as text (default: the data of the
        first reaction).
    model : {"kirchhoff", "vant_hoff"}
        ln K(T) model of :meth:`eqconv.Reaction.ln_K`.
    standard_pressure : float
        p° [Pa] of K (1e5 default; 101325 for atm-based K); the result does not depend on it.
    on_failure : {"raise", "flag"}
        ``"raise"``: :class:`~eqconv.ConvergenceError` naming the failed conditions;
        ``"flag"``: return, with ``converged`` False and NaN amounts at those points.
    tol : float
        Required |ln Q − ln K| of every reaction [-] (≥ 1e-13).

    Returns
    -------
    EquilibriumResult
        Arrays of the broadcast shape of T, P and the feed; 0-d for scalar input.

    Raises
    ------
    InputError
        Bad T, P, amounts, options, or a gas model that is not available.
    DependentReactionsError
        If one reaction is a combination of the others (the message gives it).
    ConvergenceError
        With ``on_failure="raise"``, if any point misses the tolerance.

    Notes
    -----
    With extents ξ_j the amounts are n_i = n_i,0 + Σ_j ν_ji ξ_j and each reaction satisfies
    Σ_gas ν_ji ln(y_i φ_i P/p°) = ln K_j(T) (ideal gas: φ = 1; pure condensed species have
    activity 1 while present). The solution is the minimum of the Gibbs energy over the
    extents, unique for an ideal gas. Pure condensed species are accepted, but a point where
    one would be used up is reported as not converged (no phase-presence decision yet).

    References
    ----------
    .. [1] J. M. Smith, H. C. Van Ness and M. M. Abbott, *Introduction to Chemical
       Engineering Thermodynamics*, 7th ed., McGraw-Hill (2005), ch. 13.
    """
    if gas not in GAS_MODELS:
        if gas in _PLANNED:
            raise InputError(
                f"gas={gas!r} (fugacity model) is not available yet; only "
                f"{GAS_MODELS} is implemented"
            )
        raise InputError(f"gas must be one of {GAS_MODELS}; got {gas!r}")
    if on_failure not in ("raise", "flag"):
        raise InputError(f"on_failure must be 'raise' or 'flag'; got {on_failure!r}")
    if not (isinstance(standard_pressure, int | float) and standard_pressure > 0.0):
        raise InputError(
            f"standard_pressure must be a positive number [Pa]; got {standard_pressure!r}"
        )
    rxns = _as_reactions(reactions, data)
    if not isinstance(feed, Mapping) or not feed:
        raise InputError(f"feed must be a non-empty mapping species -> amount [mol]; got {feed!r}")
    species, labels = _species(rxns, feed, data or rxns[0].data)
    keys = tuple(s.key for s in species)
    col = {k: i for i, k in enumerate(keys)}
    nu = np.zeros((len(rxns), len(keys)))
    for j, rxn in enumerate(rxns):
        for k, v in zip(rxn.keys, rxn.nu, strict=True):
            nu[j, col[k]] = v
    check_independent(nu, [_label(j, r) for j, r in enumerate(rxns)])
    Ta, Pa = as_temperature(T), as_pressure(P)
    amounts = {labels[k]: as_amount(v, k) for k, v in feed.items()}
    try:
        shape = np.broadcast_shapes(Ta.shape, Pa.shape, *(a.shape for a in amounts.values()))
    except ValueError as exc:
        raise InputError(
            f"T {Ta.shape}, P {Pa.shape} and the feed arrays do not broadcast"
        ) from exc
    grid_T = np.broadcast_to(Ta, shape)
    grid_P = np.broadcast_to(Pa, shape)
    fshape = np.broadcast_shapes(*(a.shape for a in amounts.values()))
    n0 = np.zeros((*fshape, len(keys)))
    for k, a in amounts.items():
        n0[..., col[k]] = a
    if model not in ("kirchhoff", "vant_hoff"):
        raise InputError(f"model must be 'kirchhoff' or 'vant_hoff'; got {model!r}")
    m: Model = "kirchhoff" if model == "kirchhoff" else "vant_hoff"
    lnK = np.stack(
        [r.ln_K(Ta, model=m, standard_pressure=float(standard_pressure)) for r in rxns], axis=-1
    )
    gas_mask = np.array([s.phase == "g" for s in species])
    sol = _solve_with_phi(nu, lnK, n0, np.log(Pa / standard_pressure), gas_mask, gas, tol)
    atoms = tuple(dict(s.atoms) for s in species)
    feed_out = {k: np.broadcast_to(n0[..., i], shape) for i, k in enumerate(keys)}
    res = EquilibriumResult(
        reactions=rxns,
        species=keys,
        phases=tuple(s.phase for s in species),
        T=grid_T,
        P=grid_P,
        feed=feed_out,
        solution=sol,
        ln_K=np.broadcast_to(lnK, (*shape, len(rxns))),
        standard_pressure=float(standard_pressure),
        element_balance_error=_element_error(atoms, n0, sol.amounts, shape),
        atoms=atoms,
    )
    bad = ~res.converged
    if on_failure == "raise" and np.any(bad):
        raise ConvergenceError(_failure_message(res, bad))
    return res


def _element_error(
    atoms: tuple[dict[str, int], ...], n0: np.ndarray, n: np.ndarray, shape: tuple[int, ...]
) -> np.ndarray:
    """max over elements of |Σ a_ei (n_i − n_i,0)| / Σ a_ei n_i,0 [-] at each point."""
    elements = sorted({e for a in atoms for e in a})
    A = np.array([[at.get(e, 0) for e in elements] for at in atoms], dtype=float)  # (ns, ne)
    out = np.zeros(shape)
    if A.size == 0:
        return out
    size = np.moveaxis(n0 @ A, -1, 0)  # (ne, ...): a scalar per element for one feed
    dev = np.moveaxis(n @ A, -1, 0)  # element-major, so that row operations are contiguous
    for e in range(len(elements)):
        d = np.abs(dev[e] - size[e])
        d /= np.where(size[e] > 0.0, size[e], 1.0)
        np.maximum(out, d, out=out)  # NaN (failed point) propagates
    return out


def _failure_message(res: EquilibriumResult, bad: np.ndarray) -> str:
    idx = np.argwhere(bad) if bad.ndim else np.zeros((1, 0), dtype=int)
    lines = []
    for ix in map(tuple, idx[:5]):
        feed = ", ".join(f"{k}={float(v[ix]):.6g}" for k, v in res.feed.items() if np.any(v > 0.0))
        r = np.abs(res.residuals[ix]).max()
        lines.append(
            f"  T = {float(res.T[ix]):.6g} K, P = {float(res.P[ix]):.6g} Pa, feed "
            f"{{{feed}}} mol: max |ln Q − ln K| = {r:.3g} at the last iterate"
        )
    more = f"\n  … and {int(bad.sum()) - 5} more" if bad.sum() > 5 else ""
    return (
        f"equilibrium not reached at {int(bad.sum())} of {bad.size} point(s):\n"
        + "\n".join(lines)
        + more
        + "\npass on_failure='flag' to get the other points (converged=False, NaN there)"
    )
