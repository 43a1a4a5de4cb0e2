"""Which datum matters: sensitivity of equilibrium conversion to the data, and sources side by side.

* :func:`conversion_sensitivity` — ∂X/∂θ for every datum θ (ΔfH°, S° and the Cp scale of
  each species) at every grid point, analytic (implicit function theorem on the
  equilibrium conditions) or by vectorized central differences; the first-order variance
  of X and the share of it from each independent datum, with the dominant one per point.
* :func:`compare_sources` — the same reactions, feed and grid with several data sets
  (``"default"``, ``"janaf"``, or a user's species) in one call: Monte Carlo bands for each,
  a table (pandas DataFrame when pandas is installed, else a list of dicts) and a plot of
  conversion against T with bands (matplotlib, optional).

Notes
-----
At equilibrium r_j(ξ, θ) = Σ_i ν_ji ln a_i(ξ) − ln K_j(θ) = 0 for every reaction j. For an
ideal gas (a_i = y_i P/p°)

    A_jl = ∂r_j/∂ξ_l = Σ_i ν_ji ν_li / n_i − Δn_j Δn_l / n_gas   (gas species i),

so dξ/dθ = A⁻¹ ∂ln K/∂θ and, for species k with n_k = n0_k + Σ_j ν_jk ξ_j, the conversion
X_k = (n0_k − n_k)/n0_k has ∂X_k/∂θ = −Σ_j ν_jk (dξ_j/dθ) / n0_k. To first order
var X = sᵀ Σ s with s = ∂X/∂θ and Σ the data covariance; the share of an independent
component c (a datum, or a block of fully correlated data) is s_cᵀ Σ_cc s_c / var X.

References
----------
.. [1] JCGM 100:2008 (GUM), §5.1 (sensitivity coefficients, law of propagation).
.. [2] W. R. Smith and R. W. Missen, *Chemical Reaction Equilibrium Analysis*, Wiley (1982),
   ch. 6 (sensitivity of equilibrium compositions).
"""

from __future__ import annotations

from collections.abc import Iterable, Mapping, Sequence
from dataclasses import dataclass
from typing import Any, Literal

import numpy as np
from numpy.typing import ArrayLike, NDArray

from ._validate import as_pressure, as_temperature
from .errors import InputError
from .montecarlo import (
    MonteCarloResult,
    build_system,
    conversion_index,
    monte_carlo_equilibrium,
    state,
)
from .reaction import Reaction
from .species import Species
from .uncertainty import DataUncertainty, data_uncertainty, ln_K_uncertainty

__all__ = ["ConversionSensitivity", "SourceComparison", "compare_sources", "conversion_sensitivity"]

FloatArray = NDArray[np.float64]
#: Central-difference step where a datum has no uncertainty [J/mol, J/(mol K), -].
_DEFAULT_STEP = {"hf298": 10.0, "s298": 0.01, "cp": 1e-3}


@dataclass(frozen=True)
class ConversionSensitivity:
    """Sensitivity of equilibrium conversion to every datum at every grid point.

    Attributes
    ----------
    equations : tuple of str
        The reactions.
    conversion_of : str
        Species whose conversion X is differentiated.
    shape : tuple of int
        Grid shape.
    conversion : ndarray
        X with the nominal data [-].
    coefficients : ndarray (n_params, *shape)
        ∂X/∂θ_p: [mol/J] for ΔfH°, [mol K/J] for S°, [-] for the relative Cp scale.
    method : str
        ``"analytic"`` or ``"central"``.
    data : DataUncertainty
        The parameters, their uncertainties and correlation.
    """

    equations: tuple[str, ...]
    conversion_of: str
    shape: tuple[int, ...]
    conversion: FloatArray
    coefficients: FloatArray
    method: str
    data: DataUncertainty

    @property
    def labels(self) -> tuple[str, ...]:
        """Parameter labels, e.g. ``"ΔfH°(NH3)"``."""
        return self.data.labels

    def wrt_hf298(self) -> dict[str, FloatArray]:
        """∂X/∂ΔfH°_i [mol/J] for each species key."""
        ns = len(self.data.species)
        return {key: self.coefficients[i] for i, key in enumerate(self.data.keys[:ns])}

    @property
    def std(self) -> FloatArray:
        """First-order standard uncertainty of X, √(sᵀ Σ s) [-]."""
        var = np.einsum(
            "p...,pq,q...->...", self.coefficients, self.data.covariance, self.coefficients
        )
        return np.sqrt(np.clip(var, 0.0, None))

    def shares(self) -> tuple[tuple[str, ...], FloatArray]:
        """Share of the first-order variance of X from each independent component.

        Returns
        -------
        labels : tuple of str
            Component labels (:meth:`DataUncertainty.components`).
        shares : ndarray (n_components, *shape)
            In [0, 1], summing to 1 over components where var X > 0.
        """
        return self.data.variance_shares(self.coefficients)

    def dominant(self) -> NDArray[np.str_]:
        """Label of the component with the largest variance share at each point."""
        labels, shares = self.shares()
        if not labels:
            raise InputError("no datum carries an uncertainty; nothing dominates")
        return np.asarray(labels)[np.argmax(shares, axis=0)]

    def ranking(self, index: tuple[int, ...] = ()) -> list[tuple[str, float]]:
        """Components ordered by their variance share at one grid point.

        Parameters
        ----------
        index : tuple of int
            Grid index (``()`` for a scalar grid).

        Returns
        -------
        list of (label, share)
            Largest share first.
        """
        labels, shares = self.shares()
        at = shares[(slice(None), *(int(i) for i in index))]  # type: ignore[arg-type]
        if at.ndim != 1:
            raise InputError(f"index {index} does not select one point of the grid {self.shape}")
        order = np.argsort(-at, kind="stable")
        return [(labels[i], float(at[i])) for i in order]


def _check_method(method: str) -> None:
    if method not in ("analytic", "central"):
        raise InputError(f"method must be 'analytic' or 'central'; got {method!r}")


def conversion_sensitivity(
    reactions: Reaction | str | Sequence[Reaction | str],
    feed: Mapping[str, ArrayLike],
    T: ArrayLike,
    P: ArrayLike,
    *,
    conversion_of: str | None = None,
    data: DataUncertainty | None = None,
    method: Literal["analytic", "central"] = "analytic",
    rel_step: float = 0.1,
) -> ConversionSensitivity:
    """Sensitivity coefficients ∂X/∂θ of equilibrium conversion to every datum.

    Parameters
    ----------
    reactions : Reaction, str or sequence of them
        Independent reactions (as for :func:`eqconv.equilibrium`).
    feed : mapping
        Species -> feed amount [mol] (arrays broadcast with T and P).
    T : array_like
        Temperature [K], > 0.
    P : array_like
        Absolute pressure [Pa], > 0; broadcasts with T.
    conversion_of : str, optional
        Species whose conversion is differentiated (default: first reactant of the first
        reaction).
    data : DataUncertainty, optional
        Parameters with uncertainties (default :func:`~eqconv.uncertainty.data_uncertainty`).
    method : {"analytic", "central"}
        Implicit function theorem (ideal gas, one linear solve per point) or central
        differences, all 2 × 3 ns perturbed data sets solved in one vectorized call.
    rel_step : float
        Central-difference step as a fraction of each datum's uncertainty (where it is 0:
        10 J/mol, 0.01 J/(mol K), 1e-3 for the Cp scale).

    Returns
    -------
    ConversionSensitivity

    Raises
    ------
    InputError
        Bad arguments.
    ConvergenceError
        If an equilibrium solve fails.

    Examples
    --------
    >>> from eqconv import Reaction
    >>> rxn = Reaction("N2 + 3 H2 = 2 NH3", data="janaf")
    >>> sens = conversion_sensitivity(rxn, {"N2": 1, "H2": 3}, 700.0, 100e5)
    >>> bool(sens.wrt_hf298()["NH3"] < 0)   # a more stable NH3 raises the conversion
    True
    """
    _check_method(method)
    if not (np.isfinite(rel_step) and rel_step > 0.0):
        raise InputError(f"rel_step must be > 0; got {rel_step!r}")
    system, du = build_system(reactions, feed, T, P, data, tol=1e-12)
    rxns = list(system.reactions)
    shape, lnK0, J = system.shape, system.ln_K, system.jacobian
    k = conversion_index(system, conversion_of)
    sol = system.nominal.solution
    conv0 = np.broadcast_to(state(system, sol.amounts, k)[0], shape)
    n0k = np.broadcast_to(system.n0[..., k], shape)
    if method == "analytic":
        n = np.broadcast_to(sol.amounts, (*shape, len(system.keys)))
        nu_g = system.nu[:, system.gas]
        w = 1.0 / np.maximum(n[..., system.gas], 1e-300)
        dn = nu_g.sum(axis=1)
        ng = n[..., system.gas].sum(axis=-1)
        A = (
            np.einsum("ji,...i,li->...jl", nu_g, w, nu_g)
            - (dn[:, None] * dn[None, :]) / ng[..., None, None]
        )
        b = np.moveaxis(np.broadcast_to(J, (du.n_params, *shape, len(rxns))), 0, -1)
        dxi = np.linalg.solve(A, b)  # (*shape, nr, n_params)
        coef = np.moveaxis(
            -np.einsum("j,...jp->...p", system.nu[:, k], dxi) / n0k[..., None], -1, 0
        )
    else:
        steps = np.array(
            [
                rel_step * u if u > 0.0 else _DEFAULT_STEP[kind]
                for u, kind in zip(du.u, du.kinds, strict=True)
            ]
        )
        h = steps.reshape(-1, *([1] * (J.ndim - 1)))
        lnK = np.concatenate([lnK0 + h * J, lnK0 - h * J])  # (2 n_params, ..., nr)
        pert = system.solve(lnK, "perturbed data", tol=1e-12)
        conv = np.broadcast_to(state(system, pert.amounts, k)[0], (2 * du.n_params, *shape))
        coef = (conv[: du.n_params] - conv[du.n_params :]) / steps.reshape(-1, *([1] * len(shape)))
        coef = coef / 2.0
    if not np.all(np.isfinite(coef)):
        from .errors import ConvergenceError

        where = tuple(int(i) for i in np.argwhere(~np.isfinite(coef))[0][1:])
        raise ConvergenceError(
            f"the {method} sensitivities are not finite at grid index {where}; try method='central'"
        )
    return ConversionSensitivity(
        equations=tuple(r.equation for r in rxns),
        conversion_of=system.keys[k],
        shape=tuple(shape),
        conversion=np.array(conv0),
        coefficients=np.array(coef),
        method=method,
        data=du,
    )


# --------------------------------------------------------------------------- sources
SourceSpec = (
    str
    | tuple[str, Iterable[Species] | Mapping[str, Species]]
    | tuple[str, Iterable[Species] | Mapping[str, Species], str]
)


def _source_reactions(
    reactions: Sequence[Reaction | str], spec: SourceSpec
) -> tuple[str, list[Reaction]]:
    if isinstance(spec, str):
        label, species, base = spec, None, spec
    elif isinstance(spec, tuple) and len(spec) in (2, 3) and isinstance(spec[0], str):
        label, species = spec[0], spec[1]
        base = spec[2] if len(spec) == 3 else "default"
    else:
        raise InputError(
            "a data source is a data-set name ('default', 'janaf'), "
            f"(label, species) or (label, species, data); got {spec!r}"
        )
    out = []
    for r in reactions:
        eq = r.coefficients if isinstance(r, Reaction) else r
        out.append(Reaction(eq, data=base, species=species))
    return label, out


@dataclass(frozen=True)
class SourceComparison:
    """Equilibrium conversion with several data sets, each with its Monte Carlo band.

    Attributes
    ----------
    labels : tuple of str
        Data-set labels; the first is the reference of the differences.
    T : ndarray (nT,)
        Temperatures [K].
    P : ndarray (nP,)
        Absolute pressures [Pa].
    equations : tuple of str
        The reactions.
    reactions : dict[str, list of Reaction]
        The reactions built from each data set.
    results : dict[str, MonteCarloResult]
        Monte Carlo result on the (nT, nP) grid for each data set.
    ln_K, ln_K_std : dict[str, ndarray (nT, nr)]
        Nominal ln K and its standard uncertainty for each data set [-].
    """

    labels: tuple[str, ...]
    T: FloatArray
    P: FloatArray
    equations: tuple[str, ...]
    reactions: dict[str, list[Reaction]]
    results: dict[str, MonteCarloResult]
    ln_K: dict[str, FloatArray]
    ln_K_std: dict[str, FloatArray]

    def rows(self) -> list[dict[str, Any]]:
        """One dict per data set, T and P (see :meth:`table` for the columns)."""
        ref = self.results[self.labels[0]]
        out = []
        for label in self.labels:
            res = self.results[label]
            band = res.conversion
            for a, T in enumerate(self.T):
                for b, P in enumerate(self.P):
                    row: dict[str, Any] = {"source": label, "T [K]": float(T), "P [Pa]": float(P)}
                    for j, eq in enumerate(self.equations):
                        row[f"ln K ({eq})"] = float(self.ln_K[label][a, j])
                        row[f"u(ln K) ({eq})"] = float(self.ln_K_std[label][a, j])
                        row[f"K/K_ref ({eq})"] = float(
                            np.exp(self.ln_K[label][a, j] - self.ln_K[self.labels[0]][a, j])
                        )
                    x, s = float(res.nominal_conversion[a, b]), float(band.std[a, b])
                    row["X nominal"] = x
                    row["X mean"] = float(band.mean[a, b])
                    row["u(X)"] = s
                    for q, v in band.percentiles.items():
                        row[f"X p{q:g}"] = float(v[a, b])
                    xr, sr = float(ref.nominal_conversion[a, b]), float(ref.conversion.std[a, b])
                    row["X - X_ref"] = x - xr
                    comb = np.hypot(s, sr)
                    row["(X - X_ref)/u"] = (x - xr) / comb if comb > 0 else 0.0
                    out.append(row)
        return out

    def table(self) -> Any:
        """Side-by-side table: a pandas DataFrame when pandas is installed, else a list.

        Columns: source, T [K], P [Pa], ln K, u(ln K) and K/K_ref of each reaction, the
        nominal conversion, its Monte Carlo mean, standard uncertainty and percentiles,
        and the difference from the reference data set, also in units of the combined
        standard uncertainty.
        """
        rows = self.rows()
        try:
            import pandas as pd
        except ImportError:
            return rows
        return pd.DataFrame(rows)

    def data_rows(self) -> list[dict[str, Any]]:
        """The data behind the comparison: ΔfH°, S° and their uncertainties per data set."""
        out = []
        for label in self.labels:
            for sp in self.results[label].data.species:
                out.append(
                    {
                        "source": label,
                        "species": sp.key,
                        "ΔfH° [J/mol]": sp.hf298,
                        "u(ΔfH°) [J/mol]": sp.u_hf298,
                        "S° [J/(mol K)]": sp.s298,
                        "u(S°) [J/(mol K)]": sp.u_s298,
                        "u(Cp)/Cp [-]": sp.u_cp_rel,
                        "ΔfH° source": sp.sources.get("hf298"),
                        "Cp source": sp.sources.get("cp"),
                    }
                )
        return out

    def plot(self, ax: Any = None, P: float | None = None) -> Any:
        """Conversion against T at one pressure: nominal line and band for each data set.

        Parameters
        ----------
        ax : matplotlib Axes, optional
            Axes to draw on (default: a new figure).
        P : float, optional
            Pressure [Pa]; the nearest grid pressure is used (default: the first).

        Returns
        -------
        matplotlib.axes.Axes

        Raises
        ------
        ImportError
            If matplotlib is not installed (``pip install eqconv[plots]``).
        """
        try:
            import matplotlib.pyplot as plt
        except ImportError as exc:  # pragma: no cover - depends on the environment
            raise ImportError("plotting needs matplotlib: pip install 'eqconv[plots]'") from exc
        b = 0 if P is None else int(np.argmin(np.abs(self.P - float(P))))
        if ax is None:
            _, ax = plt.subplots()
        for label in self.labels:
            res = self.results[label]
            (line,) = ax.plot(self.T, res.nominal_conversion[:, b], label=label)
            if res.conversion.percentiles:
                lo, hi = min(res.conversion.percentiles), max(res.conversion.percentiles)
                ax.fill_between(
                    self.T,
                    res.conversion.lower[:, b],
                    res.conversion.upper[:, b],
                    color=line.get_color(),
                    alpha=0.25,
                    linewidth=0,
                    label=f"{label}: {lo:g}-{hi:g} % band",
                )
        ax.set_xlabel("T [K]")
        ax.set_ylabel(f"equilibrium conversion of {self.results[self.labels[0]].conversion_of}")
        ax.set_title(f"{'; '.join(self.equations)} at {self.P[b] / 1e5:g} bar")
        ax.legend()
        return ax


def compare_sources(
    reactions: str | Reaction | Sequence[str | Reaction],
    feed: Mapping[str, ArrayLike],
    T: ArrayLike,
    P: ArrayLike,
    *,
    sources: Sequence[SourceSpec] = ("default", "janaf"),
    n_samples: int = 500,
    seed: int | np.random.Generator | None = None,
    conversion_of: str | None = None,
    percentiles: Sequence[float] = (2.5, 97.5),
    **options: Any,
) -> SourceComparison:
    """Equilibrium conversion with several data sets side by side, each with its band.

    Parameters
    ----------
    reactions : str, Reaction, or a list of them
        Equations (``"N2 + 3 H2 = 2 NH3"``) or reactions; each data set rebuilds them from
        their coefficients.
    feed : mapping
        Species -> feed amount [mol], scalars.
    T : array_like (nT,)
        Temperatures [K], > 0.
    P : float or array_like (nP,)
        Absolute pressures [Pa], > 0; the grid is every T with every P.
    sources : sequence
        Each a data-set name (``"default"``, ``"janaf"``), ``(label, species)`` with
        Species to use on top of ``"default"``, or ``(label, species, data)``. The first
        is the reference.
    n_samples : int
        Monte Carlo samples per data set.
    seed : int, numpy.random.Generator or None
        With an int, every data set uses the same standard-normal draws (common random
        numbers, so differences between data sets are not blurred by sampling noise).
    conversion_of : str, optional
        Species whose conversion is compared.
    percentiles : sequence of float
        Band edges [%].
    **options
        Further keywords of :func:`~eqconv.montecarlo.monte_carlo_equilibrium` (e.g.
        ``progress``, ``chunk_points``); ``hf``, ``s``, ``cp``, ``correlation`` go to
        :func:`~eqconv.uncertainty.data_uncertainty`.

    Returns
    -------
    SourceComparison
        With :meth:`~SourceComparison.table` and :meth:`~SourceComparison.plot`.

    Raises
    ------
    InputError
        Fewer than one source, repeated labels, T or P not 1-D, or bad feed.

    Examples
    --------
    >>> cmp = compare_sources("1/2 N2 + 3/2 H2 = NH3", {"N2": 1, "H2": 3}, [600.0, 700.0],
    ...                       100e5, n_samples=100, seed=1)
    >>> cmp.labels
    ('default', 'janaf')
    """
    eqs: list[str | Reaction] = (
        [reactions] if isinstance(reactions, str | Reaction) else list(reactions)
    )
    if not eqs:
        raise InputError("no reactions given")
    T = np.atleast_1d(as_temperature(T))
    P = np.atleast_1d(as_pressure(P))
    if T.ndim != 1 or P.ndim != 1:
        raise InputError(f"T and P must be scalars or 1-D; got shapes {T.shape}, {P.shape}")
    if not sources:
        raise InputError("give at least one data source")
    corr = {key: options.pop(key) for key in ("hf", "s", "cp", "correlation") if key in options}
    labels, rxn_sets, results, lnk, lnk_u = [], {}, {}, {}, {}
    for spec in sources:
        label, rxns = _source_reactions(eqs, spec)
        if label in rxn_sets:
            raise InputError(f"data source label {label!r} appears twice")
        du = data_uncertainty(rxns, **corr)
        rng_seed = seed if not isinstance(seed, int | np.integer) else int(seed)
        res = monte_carlo_equilibrium(
            rxns,
            feed,
            T[:, None],
            P[None, :],
            n_samples=n_samples,
            seed=rng_seed,
            data=du,
            conversion_of=conversion_of,
            percentiles=percentiles,
            **options,
        )
        lk = ln_K_uncertainty(rxns, T, du)
        labels.append(label)
        rxn_sets[label], results[label] = rxns, res
        lnk[label], lnk_u[label] = lk.ln_K, lk.std
    first = rxn_sets[labels[0]]
    return SourceComparison(
        labels=tuple(labels),
        T=T,
        P=P,
        equations=tuple(r.equation for r in first),
        reactions=rxn_sets,
        results=results,
        ln_K=lnk,
        ln_K_std=lnk_u,
    )
