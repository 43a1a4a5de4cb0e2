"""Result of :func:`eqconv.equilibrium`: composition, conversion, yields and diagnostics.

Every array has the broadcast grid shape of T, P and the feed (a scalar T and P give 0-d
arrays). Points that did not converge hold NaN amounts together with ``converged = False``.

Trade definitions used here (common practice):

* conversion of a fed species A: X_A = (n_A,0 − n_A) / n_A,0;
* molar yield of a product P on a fed species A: Y = (n_P − n_P,0) / n_A,0 (mol of P formed per
  mol of A fed); with ``element="C"`` the element yield: atoms of C that end up in the P
  formed per atom of C fed as A;
* selectivity of P relative to a reference species R: S = (n_P − n_P,0) / |n_R − n_R,0| —
  mol of P formed per mol of R formed (R a product, e.g. CO2 against CO) or consumed (R a
  reactant, e.g. H2 against CH4 consumed).

With a pure condensed species in the reactions, :meth:`EquilibriumResult.present` says where
it exists; with a fugacity model, :attr:`EquilibriumResult.fugacity_coefficients` and
:attr:`EquilibriumResult.gas_model_report` (also in :meth:`EquilibriumResult.data_report`)
describe the gas; :meth:`EquilibriumResult.gas_phase_check` says where the gas would
condense.
"""

from __future__ import annotations

import warnings
from dataclasses import dataclass, field
from functools import cached_property
from typing import TYPE_CHECKING, Any

import numpy as np
from numpy.typing import NDArray

from .errors import InputError
from .extent_solver import ExtentSolution
from .reaction import Reaction

if TYPE_CHECKING:
    from .fugacity import GasModelReport
    from .phase_check import GasPhaseCheck
    from .report import DataReport
    from .species import Species

__all__ = ["DIAGNOSTIC_REL", "EquilibriumResult"]

FloatArray = NDArray[np.float64]

#: Relative amount [-] below which a reactant counts as exhausted (reaction effectively
#: complete) or an extent as negligible, relative to the total amount at that point.
DIAGNOSTIC_REL = 1e-9


@dataclass(frozen=True, eq=False)
class EquilibriumResult:
    """Equilibrium state of a set of reactions on a grid.

    Attributes
    ----------
    reactions : tuple of Reaction
        The reactions, in the order of the extents and residuals.
    species : tuple of str
        Species keys: those of the reactions in order of appearance, then inert feed species.
    phases : tuple of str
        Phase of each species ("g", "s" or "l").
    T, P : ndarray
        Temperature [K] and absolute pressure [Pa], broadcast to the grid shape.
    feed : dict of str to ndarray
        Feed amounts [mol] (0 for species not fed), grid shape.
    solution : ExtentSolution
        The array-level result of :func:`eqconv.extent_solver.solve_extents`.
    ln_K : ndarray (..., nr)
        ln K of each reaction at standard pressure p° [-].
    standard_pressure : float
        p° [Pa] of `ln_K`.
    element_balance_error : ndarray
        Largest relative error of an element balance at each point [-].
    atoms : tuple of dict
        Element counts of each species (for element yields).
    gas_model : str
        ``"ideal"``, ``"peng-robinson"`` or ``"srk"``.
    gas_model_report : GasModelReport or None
        Critical constants and k_ij of a fugacity model, with their sources and the pairs
        missing from the database (None for the ideal gas).
    ln_phi : ndarray (..., ns) or None
        ln φ of each species at the final composition [-] (0 for condensed species).
    eos_flags : dict of str to ndarray of bool
        Root flags of the cubic at the final state: ``"liquid_like"``, ``"three_roots"``,
        ``"gas_metastable"`` (see :class:`eqconv.eos.FugacityResult`).
    outer_iterations : ndarray or None
        φ updates used at each point (fugacity models).
    phase_present : dict of str to ndarray of bool
        Reacting condensed species → True where it exists at equilibrium.
    condensed_ln_activity : dict of str to ndarray
        ln a of each reacting condensed species: 0 where present; where absent, the
        activity it would have in equilibrium with the gas (≤ 0: it would not form).
    species_data : tuple of Species
        The species objects (for the data report and the gas-phase check).
    gas_check : GasPhaseCheck or None
        Condensation check run after the solve (None if it was skipped).
    """

    reactions: tuple[Reaction, ...]
    species: tuple[str, ...]
    phases: tuple[str, ...]
    T: FloatArray
    P: FloatArray
    feed: dict[str, FloatArray]
    solution: ExtentSolution
    ln_K: FloatArray
    standard_pressure: float
    element_balance_error: FloatArray
    atoms: tuple[dict[str, int], ...] = ()
    gas_model: str = "ideal"
    gas_model_report: GasModelReport | None = None
    ln_phi: FloatArray | None = None
    eos_flags: dict[str, NDArray[np.bool_]] = field(default_factory=dict)
    outer_iterations: NDArray[np.int64] | None = None
    phase_present: dict[str, NDArray[np.bool_]] = field(default_factory=dict)
    condensed_ln_activity: dict[str, FloatArray] = field(default_factory=dict)
    species_data: tuple[Species, ...] = ()
    gas_check: GasPhaseCheck | None = None

    # ------------------------------------------------------------------ arrays
    @property
    def shape(self) -> tuple[int, ...]:
        """Grid shape."""
        return self.solution.shape

    @cached_property
    def converged(self) -> NDArray[np.bool_]:
        """Per-point convergence: every residual ≤ tol and every balance closed."""
        return self.solution.converged & (self.element_balance_error <= 1e-12)

    @cached_property
    def _n(self) -> FloatArray:
        n = self.solution.amounts
        return n if bool(np.all(self.converged)) else np.where(self.converged[..., None], n, np.nan)

    @cached_property
    def amounts(self) -> dict[str, FloatArray]:
        """Equilibrium amounts [mol] by species (NaN where not converged)."""
        return {k: self._n[..., i] for i, k in enumerate(self.species)}

    @cached_property
    def total_gas(self) -> FloatArray:
        """Total amount of gas [mol]."""
        return self._n @ np.array([ph == "g" for ph in self.phases], dtype=float)

    @cached_property
    def mole_fractions(self) -> dict[str, FloatArray]:
        """Gas-phase mole fractions y_i = n_i / Σ_gas n [-] (gas species only)."""
        tot = self.total_gas
        return {
            k: self._n[..., i] / tot
            for i, (k, ph) in enumerate(zip(self.species, self.phases, strict=True))
            if ph == "g"
        }

    @property
    def extents(self) -> tuple[FloatArray, ...]:
        """Extent of each reaction from the feed [mol] (NaN where not converged)."""
        xi = np.where(self.converged[..., None], self.solution.extents, np.nan)
        return tuple(xi[..., j] for j in range(xi.shape[-1]))

    @property
    def residuals(self) -> FloatArray:
        """ln Q − ln K of each reaction (..., nr) [-] (last iterate where not converged)."""
        return self.solution.residual

    @property
    def approach(self) -> FloatArray:
        """Approach to equilibrium Q/K of each reaction (..., nr) [-]: 1 at equilibrium."""
        return np.exp(self.solution.residual)

    @property
    def iterations(self) -> NDArray[np.int64]:
        """Newton iterations per point (summed over φ updates for a fugacity model)."""
        return self.solution.iterations

    # ------------------------------------------------------------------ phases, gas model
    def present(self, species: str) -> NDArray[np.bool_]:
        """True where the pure condensed `species` exists at equilibrium (grid shape).

        Raises
        ------
        InputError
            If `species` is not a reacting condensed species of this result.
        """
        if species not in self.phase_present:
            raise InputError(
                f"{species!r} is not a reacting condensed species here; condensed species: "
                f"{sorted(self.phase_present) or 'none'}"
            )
        return np.broadcast_to(self.phase_present[species], self.shape)

    @property
    def fugacity_coefficients(self) -> dict[str, FloatArray]:
        """φ_i of each gas species at the equilibrium state [-] (1 for the ideal gas)."""
        out = {}
        for i, (k, ph) in enumerate(zip(self.species, self.phases, strict=True)):
            if ph != "g":
                continue
            if self.ln_phi is None:
                out[k] = np.where(self.converged, 1.0, np.nan)
            else:
                out[k] = np.exp(np.where(self.converged, self.ln_phi[..., i], np.nan))
        return out

    def gas_phase_check(self) -> GasPhaseCheck:
        """Raoult's-law condensation check of the equilibrium gas (see
        :func:`eqconv.equilibrium`): the stored one, or computed now (without a warning) if
        the solve skipped it."""
        if self.gas_check is not None:
            return self.gas_check
        from .phase_check import check_gas_phase

        gas_sp = [s for s in self.species_data if s.phase == "g"]
        return check_gas_phase(gas_sp, self.mole_fractions, self.T, self.P, warn=False)

    def data_report(self) -> DataReport:
        """Data of every species (reactions and inerts) with the gas-model report as notes."""
        from .report import data_report

        notes = [] if self.gas_model_report is None else self.gas_model_report.lines()
        items: list[Reaction | Species] = [*self.species_data] or [*self.reactions]
        return data_report(items, notes=notes)

    # ------------------------------------------------------------------ trade quantities
    def _check(self, key: str) -> None:
        if key not in self.species:
            raise InputError(f"unknown species {key!r}; species are {list(self.species)}")

    def _fed(self, key: str, what: str) -> FloatArray:
        self._check(key)
        n0 = self.feed[key]
        if not np.any(n0 > 0.0):
            raise InputError(f"{key} is not in the feed; its {what} is undefined")
        if np.any(n0 <= 0.0):
            warnings.warn(
                f"{what} on {key} is undefined where {key} is not fed "
                f"({int(np.count_nonzero(n0 <= 0.0))} point(s)): NaN there",
                stacklevel=3,
            )
        return np.where(n0 > 0.0, n0, np.nan)

    def conversion(self, species: str) -> FloatArray:
        """Fraction of the fed `species` consumed, X = (n_0 − n) / n_0 [-].

        Raises
        ------
        InputError
            If `species` is unknown or not fed at any point (NaN, with a warning, at the
            points of a feed sweep where it is not fed).
        """
        n0 = self._fed(species, "conversion")
        return (n0 - self.amounts[species]) / n0

    def yield_(self, product: str, basis: str, *, element: str | None = None) -> FloatArray:
        """Yield of `product` on the fed species `basis` [-] (see module notes).

        Parameters
        ----------
        product : str
            Species formed.
        basis : str
            Fed species the yield refers to.
        element : str, optional
            Give an element yield instead of a molar one, e.g. ``element="C"``: atoms of
            the element in the product formed per atom fed as `basis` (1 = all of it).
        """
        self._check(product)
        n0 = self._fed(basis, "yield")
        formed = self.amounts[product] - self.feed[product]
        if element is None:
            return formed / n0
        a_p, a_b = (self.atoms[self.species.index(k)].get(element, 0) for k in (product, basis))
        if a_p == 0 or a_b == 0:
            raise InputError(f"{element} is not in both {product} and {basis}")
        return formed * a_p / (n0 * a_b)

    def selectivity(self, product: str, reference: str) -> FloatArray:
        """Selectivity S = (n_P − n_P,0) / |n_R − n_R,0| of `product` to `reference` [-].

        With a product as `reference` this is mol of `product` formed per mol of
        `reference` formed; with a reactant, per mol of it consumed. NaN (with a warning)
        where the reference does not change.
        """
        for k in (product, reference):
            self._check(k)
        d_ref = np.abs(self.amounts[reference] - self.feed[reference])
        still = d_ref == 0.0
        if np.any(still):
            warnings.warn(
                f"selectivity undefined where {reference} does not change "
                f"({int(np.count_nonzero(still))} point(s)): NaN there",
                stacklevel=2,
            )
        return (self.amounts[product] - self.feed[product]) / np.where(still, np.nan, d_ref)

    # ------------------------------------------------------------------ diagnostics
    def reaction_status(self) -> NDArray[np.str_]:
        """Per reaction and point: "equilibrium", "complete", "complete (reverse)",
        "negligible", "blocked" or "not converged" (..., nr).

        *complete*: the reaction moved and a reactant of it is exhausted (below
        :data:`DIAGNOSTIC_REL` of the total amount) because K is large; *negligible*: the
        extent is below :data:`DIAGNOSTIC_REL` of the total amount and a product (or, in
        reverse, a reactant) stays at trace level because K is small (large); *blocked*: a
        species it needs cannot be formed from this feed; *phase absent*: it involves a pure
        condensed species that does not exist at this point (it would not form), so the
        reaction cannot proceed and is not at equilibrium.
        """
        sol = self.solution
        n = sol.amounts
        tot = np.sum(np.abs(n), axis=-1)
        small = n <= DIAGNOSTIC_REL * tot[..., None]
        out = np.full((*self.shape, len(self.reactions)), "equilibrium", dtype="<U18")
        absent = {k: ~np.broadcast_to(v, self.shape) for k, v in self.phase_present.items()}
        for j, rxn in enumerate(self.reactions):
            idx = [self.species.index(k) for k in rxn.keys]
            reac = [i for i, v in zip(idx, rxn.nu, strict=True) if v < 0]
            prod = [i for i, v in zip(idx, rxn.nu, strict=True) if v > 0]
            xi = sol.extents[..., j]
            r_out, p_out = np.any(small[..., reac], axis=-1), np.any(small[..., prod], axis=-1)
            moved = np.abs(xi) > DIAGNOSTIC_REL * tot
            out[..., j] = np.select(
                [moved & r_out & (xi > 0.0), moved & p_out & (xi < 0.0), ~moved & (r_out | p_out)],
                ["complete", "complete (reverse)", "negligible"],
                "equilibrium",
            )
        out[sol.blocked] = "blocked"
        for j, rxn in enumerate(self.reactions):
            for k in rxn.keys:
                if k in absent:
                    out[..., j] = np.where(absent[k], "phase absent", out[..., j])
        out[~self.converged] = "not converged"
        return out

    def diagnostics(self, index: tuple[int, ...] | int | None = None) -> list[str]:
        """Plain statements per reaction: over the grid, or at one grid point ``index``.

        Examples of statements: "at equilibrium at 40000 of 40000 points (ln K −9.3 …
        −4.1)"; "effectively complete at 12 points: a reactant is exhausted because K is
        large (ln K up to 115), so the composition no longer moves with T or P".
        """
        status = self.reaction_status()
        out = []
        if index is not None:
            ix = index if isinstance(index, tuple) else (index,)
            for j, rxn in enumerate(self.reactions):
                st = str(status[(*ix, j)])
                lnk = float(self.ln_K[(*ix, j)])
                res = float(self.solution.residual[(*ix, j)])
                text = {
                    "equilibrium": "at equilibrium",
                    "complete": "effectively complete: a reactant is exhausted because K is large",
                    "complete (reverse)": "effectively complete in reverse: a product is "
                    "exhausted because K is small",
                    "negligible": "negligible: the extent is ~0 because K is so small "
                    "(or, in reverse, so large) that it cannot proceed",
                    "blocked": "blocked: a species it needs is absent and cannot form",
                    "phase absent": "cannot proceed: a pure condensed species of it is "
                    "absent here (it would not form)",
                    "not converged": "NOT CONVERGED",
                }[st]
                out.append(
                    f"{rxn.equation}: {text} (ln K = {lnk:.4g}, ln Q − ln K = "
                    f"{res:.2e}, Q/K = {np.exp(res):.12g})"
                )
            return out
        size = int(np.prod(self.shape))
        for j, rxn in enumerate(self.reactions):
            st_j = status[..., j]
            lnk_j = self.ln_K[..., j]
            parts = []
            for code, text in (
                ("equilibrium", "at equilibrium"),
                (
                    "complete",
                    "effectively complete (a reactant exhausted because K is "
                    "large, so the composition no longer moves with T or P)",
                ),
                (
                    "complete (reverse)",
                    "effectively complete in reverse (a product exhausted because K is small)",
                ),
                ("negligible", "negligible (extent ~0: K too small to proceed)"),
                ("blocked", "blocked (needs a species this feed cannot form)"),
                (
                    "phase absent",
                    "not proceeding (a pure condensed species of it is absent: it would not form)",
                ),
                ("not converged", "NOT CONVERGED"),
            ):
                sel = st_j == code
                k = int(np.count_nonzero(sel))
                if k:
                    lo, hi = float(np.min(lnk_j[sel])), float(np.max(lnk_j[sel]))
                    parts.append(f"{text} at {k} of {size} point(s) (ln K {lo:.4g} … {hi:.4g})")
            out.append(f"{rxn.equation}: " + "; ".join(parts))
        return out

    # ------------------------------------------------------------------ export
    def to_dict(self) -> dict[str, Any]:
        """Flat mapping column → array (grid shape): T, P, amounts, mole fractions, extents,
        ln K, residuals and convergence; units in the column names."""
        d: dict[str, Any] = {"T [K]": self.T, "P [Pa]": self.P}
        for k, v in self.feed.items():
            d[f"feed {k} [mol]"] = v
        for k, v in self.amounts.items():
            d[f"n {k} [mol]"] = v
        for k, v in self.mole_fractions.items():
            d[f"y {k} [-]"] = v
        for j, (rxn, xi) in enumerate(zip(self.reactions, self.extents, strict=True)):
            d[f"extent {j + 1} [mol] ({rxn.equation})"] = xi
            d[f"ln K {j + 1} [-]"] = self.ln_K[..., j]
            d[f"ln Q - ln K {j + 1} [-]"] = self.residuals[..., j]
        for k, pres in self.phase_present.items():
            d[f"present {k} [-]"] = np.broadcast_to(pres, self.shape)
        if self.ln_phi is not None:
            for k, phi in self.fugacity_coefficients.items():
                d[f"phi {k} [-]"] = phi
        d["converged"] = self.converged
        return d

    def to_dataframe(self) -> Any:
        """The columns of :meth:`to_dict` as a pandas DataFrame, one row per grid point.

        Raises
        ------
        ImportError
            If pandas is not installed (``pip install "eqconv[studies]"``).
        """
        try:
            import pandas as pd
        except ImportError as exc:  # pragma: no cover - pandas is in the test extras
            raise ImportError('to_dataframe needs pandas: pip install "eqconv[studies]"') from exc
        cols = {k: np.broadcast_to(v, self.shape).ravel() for k, v in self.to_dict().items()}
        return pd.DataFrame(cols)
