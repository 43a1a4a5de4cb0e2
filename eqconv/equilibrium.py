"""Equilibrium composition of simultaneous gas-phase reactions on a T × P × feed grid.

:func:`equilibrium` gathers the species of the reactions (shared by key) and the inert feed
species, builds the stoichiometric matrix and ln K(T) of every reaction, and calls the
extent solver :func:`eqconv.extent_solver.solve_extents` — through
:func:`eqconv.condensed.solve_phases` when a pure condensed species reacts (its presence is
decided at every point) and through :func:`eqconv.fugacity.solve_fugacity` for a non-ideal
gas (Peng–Robinson or SRK fugacity coefficients). After the solve the gas is checked for
condensation (:func:`eqconv.phase_check.check_gas_phase`). The result,
:class:`eqconv.result.EquilibriumResult`, gives mole fractions, conversions, yields,
selectivities, residuals, per-reaction diagnostics, phase presence and the gas-model report.

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

import warnings
from collections.abc import Mapping, Sequence
from dataclasses import dataclass
from typing import Any

import numpy as np
from numpy.typing import ArrayLike, NDArray

from ._validate import as_amount, as_pressure, as_temperature
from .condensed import PhaseSolution, reacting_condensed, solve_phases
from .constants import P_BAR
from .errors import ConvergenceError, DataWarning, InputError, PhaseWarning
from .extent_solver import ExtentSolution, check_independent, solve_extents
from .fugacity import MAX_OUTER, EosSetup, eos_setup, solve_fugacity
from .phase_check import GasPhaseCheck, check_gas_phase, vapour_pressure_model
from .reaction import Model, Reaction
from .result import EquilibriumResult
from .species import Species, get_species

__all__ = ["GAS_MODELS", "equilibrium"]

#: Gas models accepted by :func:`equilibrium`: the ideal gas, and fugacity coefficients from
#: the Peng–Robinson or Soave–Redlich–Kwong cubic equation of state (outer loop over fixed
#: ln φ, :mod:`eqconv.fugacity`).
GAS_MODELS = ("ideal", "peng-robinson", "srk")


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


@dataclass(frozen=True)
class _Solved:
    """What a solve returns besides the amounts: phases and the gas model's state."""

    solution: ExtentSolution
    condensed: tuple[int, ...] = ()
    present: NDArray[np.bool_] | None = None
    ln_activity: NDArray[np.float64] | None = None
    ln_phi: NDArray[np.float64] | None = None
    eos_flags: dict[str, NDArray[np.bool_]] | None = None
    outer_iterations: NDArray[np.int64] | None = None


def _solve_with_phi(
    nu: np.ndarray,
    lnK: np.ndarray,
    n0: np.ndarray,
    T: np.ndarray,
    P: np.ndarray,
    standard_pressure: float,
    gas_mask: np.ndarray,
    eos: EosSetup | None,
    tol: float,
    max_outer: int,
) -> _Solved:
    """Solve with the gas model: the hook for non-ideal gases and condensed phases.

    Ideal gas without reacting condensed species: one call of the extent solver. Reacting
    condensed species: :func:`eqconv.condensed.solve_phases` (presence decided per point).
    A cubic EOS (`eos` given): :func:`eqconv.fugacity.solve_fugacity`, which iterates
    solve-at-fixed-ln φ / update ln φ(T, P, y) until the equilibrium conditions hold with
    the φ of the final composition.
    """
    lnP = np.log(P / standard_pressure)
    if eos is None:
        if not reacting_condensed(nu, gas_mask):
            return _Solved(solve_extents(nu, lnK, n0, lnP, gas_mask=gas_mask, tol=tol))
        ps: PhaseSolution = solve_phases(nu, lnK, n0, lnP, gas_mask=gas_mask, tol=tol)
        return _Solved(ps.solution, ps.condensed, ps.present, ps.ln_activity)
    fs = solve_fugacity(
        nu,
        lnK,
        n0,
        T,
        P,
        standard_pressure,
        gas_mask=gas_mask,
        eos=eos,
        tol=tol,
        max_outer=max_outer,
    )
    ps = fs.phases
    flags = {
        "liquid_like": fs.liquid_like,
        "three_roots": fs.three_roots,
        "gas_metastable": fs.gas_metastable,
    }
    return _Solved(
        ps.solution,
        ps.condensed,
        ps.present,
        ps.ln_activity,
        fs.ln_phi,
        flags,
        fs.outer_iterations,
    )


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
    kij: Mapping[tuple[str, str], float] | None = None,
    critical: Mapping[str, tuple[float, float, float]] | None = None,
    check_phase: bool = True,
    max_outer: int = MAX_OUTER,
) -> EquilibriumResult:
    """Equilibrium composition of independent reactions at every T, P (and feed) point.

    Parameters
    ----------
    reactions : Reaction, str or sequence of them
        Independent reactions; equations given as text are built with ``data``. Species
        are shared by key. A pure solid or liquid (e.g. ``"2 CO = C(s) + CO2"``) may take
        part: whether it is present is decided at every point.
    feed : mapping
        Species (key, formula, name or CAS) → feed amount [mol], ≥ 0; scalars or arrays
        that broadcast with `T` and `P` (e.g. a swept feed ratio). Species in no reaction
        are inerts (resolved with :func:`eqconv.get_species`).
    T : array_like
        Temperature [K], > 0.
    P : array_like
        Absolute pressure [Pa], > 0.
    gas : {"ideal", "peng-robinson", "srk"}
        Gas model: ideal gas (φ = 1), or fugacity coefficients of the gas mixture from the
        Peng–Robinson (1976) or Soave–Redlich–Kwong (1972) cubic equation of state with van
        der Waals mixing (Tc, Pc, ω from ``chemicals``; k_ij from ``thermo``'s database where
        a pair exists, else 0, with a :class:`~eqconv.DataWarning` naming the pairs).
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
        Required |ln Q − ln K| of every reaction at equilibrium [-] (≥ 1e-13; ≥ 4e-13 with
        a fugacity model, where it is met with φ evaluated at the final composition).
    kij : mapping of (str, str) to float, optional
        Binary interaction parameters that replace the database ones [-], e.g.
        ``{("H2", "NH3"): 0.0}``; species by key or CAS number, each value in (−1, 1).
        Fugacity models only; reported in ``result.gas_model_report``.
    critical : mapping of str to (float, float, float), optional
        (Tc [K], Pc [Pa], ω [-]) replacing the ``chemicals`` values of a gas species (e.g.
        effective constants of H2; a user species without a CAS number needs them).
        Fugacity models only.
    check_phase : bool
        Check after the solve whether the gas would partly condense (Raoult's law, see
        Notes) and warn; False skips the check (faster for large studies).
    max_outer : int
        Limit of φ updates of a fugacity model; points still open are not converged.

    Returns
    -------
    EquilibriumResult
        Arrays of the broadcast shape of T, P and the feed; 0-d for scalar input. With a
        condensed species, ``result.present(key)`` says where it exists; with a fugacity
        model, ``result.fugacity_coefficients`` and ``result.gas_model_report``; and
        ``result.gas_phase_check()`` gives the condensation check.

    Raises
    ------
    InputError
        Bad T, P, amounts, options, or `kij`/`critical` with the ideal gas.
    DependentReactionsError
        If one reaction is a combination of the others (the message gives it).
    MissingDataError
        A fugacity model and a gas species without critical constants.
    ConvergenceError
        With ``on_failure="raise"``, if any point misses the tolerance.

    Warns
    -----
    PhaseWarning
        Where the gas-phase assumption fails: the ideal-solution dew index of the equilibrium
        gas reaches 1 (one warning summarising the points), or the cubic EOS finds only a
        liquid-like root or a metastable gas root for the equilibrium mixture.
    DataWarning
        A fugacity model uses k_ij = 0 for a pair missing from the database (once per call,
        naming the pairs).

    Notes
    -----
    With extents ξ_j the amounts are n_i = n_i,0 + Σ_j ν_ji ξ_j and each reaction satisfies
    Σ_gas ν_ji ln(y_i φ_i P/p°) = ln K_j(T) (ideal gas: φ = 1; pure condensed species have
    activity 1 while present). The solution is the minimum of the Gibbs energy over the
    extents, unique for an ideal gas. A pure condensed species is present only where
    forming it lowers G: where it is absent its amount is 0, the reactions that involve it
    are not at equilibrium, and the activity it would have in equilibrium with the gas,
    a* ≤ 1, is reported (:mod:`eqconv.condensed`).

    Gas-phase check (an approximation, stated): Raoult's law with ideal liquid and vapour.
    Component i alone would condense if y_i P > p_sat,i(T); the mixture is at or below its
    dew point when Σ_i y_i P/p_sat,i(T) ≥ 1 (vapour pressures from ``thermo``/DIPPR; a
    component above its critical temperature cannot condense). This is a screening
    estimate, not a phase-equilibrium calculation: non-ideal liquids (water–ammonia,
    water–methanol) and non-ideal gases at high pressure condense somewhat earlier or
    later; near a flag, check with a vapour–liquid calculation.

    References
    ----------
    .. [1] J. M. Smith, H. C. Van Ness and M. M. Abbott, *Introduction to Chemical
       Engineering Thermodynamics*, 7th ed., McGraw-Hill (2005), ch. 13.
    .. [2] W. R. Smith and R. W. Missen, *Chemical Reaction Equilibrium Analysis*, Wiley
       (1982), ch. 6 (condensed phases).

    Examples
    --------
    Ammonia from 3:1 H2:N2 at 400 °C and 300 atm with Peng–Robinson fugacity coefficients
    (the H2–NH3 k_ij, missing from the database, set to 0 explicitly); REFERENCES.md §2
    gives 46.70 mol % (Gillespie's fit of Larson's data), the ideal gas about 42:

    >>> res = equilibrium("1/2 N2 + 3/2 H2 = NH3", {"N2": 1, "H2": 3}, T=673.15,
    ...                   P=300 * 101325.0, gas="peng-robinson", kij={("H2", "NH3"): 0.0})
    >>> round(100 * float(res.mole_fractions["NH3"]), 1)
    46.9

    Graphite by the Boudouard reaction at 1000 K: it forms from CO, not from a CO2-rich gas:

    >>> res = equilibrium("2 CO = C(s) + CO2", {"CO": 1.0, "CO2": [0.0, 5.0]}, T=1000.0,
    ...                   P=1e5, data="janaf")
    >>> res.present("C(s)").tolist()
    [True, False]
    """
    if gas not in GAS_MODELS:
        raise InputError(f"gas must be one of {GAS_MODELS}; got {gas!r}")
    if on_failure not in ("raise", "flag"):
        raise InputError(f"on_failure must be 'raise' or 'flag'; got {on_failure!r}")
    if not (isinstance(standard_pressure, int | float) and standard_pressure > 0.0):
        raise InputError(
            f"standard_pressure must be a positive number [Pa]; got {standard_pressure!r}"
        )
    if gas == "ideal" and (kij is not None or critical is not None):
        raise InputError(
            "kij and critical are inputs of a fugacity model; pass gas='peng-robinson' or "
            f"gas='srk' (got gas={gas!r})"
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
    eos = None
    if gas != "ideal":
        eos = eos_setup(gas, keys, [s.cas for s in species], gas_mask, kij=kij, critical=critical)
        _warn_missing_pairs(eos)
    solved = _solve_with_phi(
        nu, lnK, n0, Ta, Pa, float(standard_pressure), gas_mask, eos, tol, max_outer
    )
    sol = solved.solution
    atoms = tuple(dict(s.atoms) for s in species)
    feed_out = {k: np.broadcast_to(n0[..., i], shape) for i, k in enumerate(keys)}
    present = {
        keys[c]: np.broadcast_to(solved.present[..., k], shape)
        for k, c in enumerate(solved.condensed)
        if solved.present is not None
    }
    ln_act = {
        keys[c]: np.broadcast_to(solved.ln_activity[..., k], shape)
        for k, c in enumerate(solved.condensed)
        if solved.ln_activity is not None
    }
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
        gas_model=gas,
        gas_model_report=None if eos is None else eos.report,
        ln_phi=None if solved.ln_phi is None else np.broadcast_to(solved.ln_phi, sol.amounts.shape),
        eos_flags={} if solved.eos_flags is None else dict(solved.eos_flags),
        outer_iterations=solved.outer_iterations,
        phase_present=present,
        condensed_ln_activity=ln_act,
        species_data=tuple(species),
    )
    if eos is not None:
        _warn_eos_roots(res)
    if check_phase:
        check = _gas_check(res, species)
        object.__setattr__(res, "gas_check", check)
        if np.any(check.condenses):
            warnings.warn(_phase_message(res, check), PhaseWarning, stacklevel=2)
    bad = ~res.converged
    if on_failure == "raise" and np.any(bad):
        raise ConvergenceError(_failure_message(res, bad))
    return res


def _warn_missing_pairs(eos: EosSetup) -> None:
    rep = eos.report
    if not rep.missing_pairs:
        return
    pairs = ", ".join(f"{a}–{b}" for a, b in rep.missing_pairs)
    where = (
        f"thermo's interaction-parameter database has no {rep.kind} table"
        if rep.interactions.table is None
        else f"not in thermo's interaction-parameter database ({rep.kind} table)"
    )
    a, b = rep.missing_pairs[0]
    warnings.warn(
        f"{rep.kind}: binary interaction parameter k_ij = 0 used for {pairs} ({where}); "
        f"pass kij={{({a!r}, {b!r}): value}} to set one",
        DataWarning,
        stacklevel=3,
    )


def _points(res: EquilibriumResult, sel: np.ndarray, limit: int = 3) -> str:
    idx = np.argwhere(sel) if sel.ndim else np.zeros((1, 0), dtype=int)
    T, P = res.T[sel], res.P[sel]
    first = "; ".join(
        f"T = {float(res.T[tuple(i)]):.6g} K, P = {float(res.P[tuple(i)]):.6g} Pa"
        for i in idx[:limit]
    )
    return (
        f"{int(np.count_nonzero(sel))} of {sel.size} point(s) (T {float(T.min()):.6g}–"
        f"{float(T.max()):.6g} K, P {float(P.min()):.6g}–{float(P.max()):.6g} Pa; first: "
        f"{first})"
    )


def _warn_eos_roots(res: EquilibriumResult) -> None:
    fl = res.eos_flags
    for name, text in (
        ("liquid_like", "has a single, liquid-like root of the cubic"),
        (
            "gas_metastable",
            "has a metastable gas root (the liquid-like root has the lower Gibbs energy)",
        ),
    ):
        sel = np.broadcast_to(fl.get(name, np.zeros(res.shape, dtype=bool)), res.shape)
        sel = sel & res.converged
        if np.any(sel):
            warnings.warn(
                f"{res.gas_model}: the equilibrium mixture {text} at {_points(res, sel)}: "
                "the gas may not be gas there (result.eos_flags has the points)",
                PhaseWarning,
                stacklevel=3,
            )


def _gas_check(res: EquilibriumResult, species: list[Species]) -> GasPhaseCheck:
    """Raoult's-law check of the equilibrium gas, skipping species that cannot condense
    anywhere on the grid (above their critical temperature at every point)."""
    t_min = float(np.min(res.T)) if res.T.size else 0.0
    cand = []
    for sp in species:
        if sp.phase != "g":
            continue
        tc = sp.Tc
        if tc is not None and tc <= t_min:
            continue  # supercritical everywhere: cannot condense
        if vapour_pressure_model(sp.cas) is None:
            continue
        cand.append(sp)
    if not cand:
        z = np.zeros(res.shape)
        return GasPhaseCheck({}, z, np.zeros(res.shape, dtype=bool), {})
    y = res.mole_fractions
    return check_gas_phase(cand, {s.key: y[s.key] for s in cand}, res.T, res.P, warn=False)


def _phase_message(res: EquilibriumResult, check: GasPhaseCheck) -> str:
    worst = max(check.saturation, key=lambda k: float(np.nanmax(check.saturation[k])))
    return (
        f"gas-phase assumption fails at {_points(res, check.condenses)}: the ideal-solution "
        f"dew index Σ y_i P / p_sat,i reaches {float(np.nanmax(check.dew_index)):.3g} "
        f"({worst} up to {float(np.nanmax(check.saturation[worst])):.3g} × its vapour "
        "pressure; Raoult's-law estimate) — a liquid would form there, so this gas-phase "
        "equilibrium does not apply; result.gas_phase_check() has the points"
    )


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
