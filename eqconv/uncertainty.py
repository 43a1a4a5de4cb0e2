"""How much the data matter: uncertainty of ln K(T) and of equilibrium conversion.

Every species datum carries a standard uncertainty (fields ``u_hf298`` [J/mol],
``u_s298`` [J/(mol K)] and ``u_cp_rel`` [-] of :class:`~eqconv.species.Species`). This
module turns them into

* a parameter vector θ = (δΔfH°_1…δΔfH°_ns, δS°_1…δS°_ns, c_1…c_ns) with a covariance
  built from a documented correlation model (:func:`data_uncertainty`);
* the first-order (exact, see Notes) uncertainty of ln K(T) (:func:`ln_K_uncertainty`) and
  Monte Carlo samples of ln K(T) (:func:`sample_ln_K`);
* Monte Carlo bands of equilibrium conversion and composition at every grid point
  (:func:`monte_carlo_equilibrium`), with the samples as one more array dimension of the
  vectorized solver (:func:`eqconv.extent_solver.solve_extents`), chunked, with progress
  reporting, clean interruption and a seed.

Sensitivity coefficients ∂X/∂ΔfH° and the comparison of whole data sources are in
:mod:`eqconv.sensitivity`.

Uncertainties and correlation model
-----------------------------------
The uncertainties are the Species fields, set per source where the species is built
(:mod:`eqconv.source_default`: ATcT 0.1, NIST WebBook 0.4, CRC 0.5, JANAF 0.4, Yaws
2.0 kJ/mol for ΔfH°; WebBook/JANAF 0.2, CRC 0.3, Yaws 1.0 J/(mol K) for S°; Cp 0.2 %
Shomate, 1 % TRC, 2 % Poling; :mod:`eqconv.source_janaf`: 0.4 kJ/mol, 0.2 J/(mol K),
0.5 % - this project's documented defaults where a source prints none). A user sets them
with ``species.replace(u_hf298=..., note=...)`` or :func:`eqconv.user_species`. ΔfH° of
an element in its reference state (one element, ΔfH° = 0: N2, H2, O2, ...) is zero by
definition and is taken as exact (``reference_elements_exact=False`` keeps the field).

Default correlations: ΔfH° independent between species; S° independent; the Cp error
fully correlated among the species whose Cp comes from one compilation (one systematic
error of a table's method moves all its species the same way), compilations being
recognised by :func:`source_group` ("NIST-JANAF", "NIST WebBook Shomate", "TRC", ...).
Each block may instead be ``"independent"``, ``"source"`` or a user matrix, or the whole
(3 ns × 3 ns) matrix may be given (:func:`data_uncertainty`).

Notes
-----
With μ°_i/(RT) = [ΔfH°_i + (1 + c_i) ∫Cp_i dT]/(RT) − [S°_i + (1 + c_i) ∫Cp_i/T dT]/R
(integrals from 298.15 K to T) and ln K_j = −Σ_i ν_ij μ°_i/(RT):

    ∂ln K_j/∂ΔfH°_i = −ν_ij/(R T),   ∂ln K_j/∂S°_i = ν_ij/R,
    ∂ln K_j/∂c_i = −ν_ij [∫Cp_i dT/(R T) − ∫Cp_i/T dT/R].

ln K is *linear* in θ, so the first-order covariance of ln K is exact and Monte Carlo
samples of ln K are exactly normal; first order is an approximation only for the
conversion, which is non-linear in ln K.

References
----------
.. [1] JCGM 100:2008, Evaluation of measurement data - Guide to the expression of
   uncertainty in measurement (GUM), §5 (law of propagation of uncertainty).
.. [2] JCGM 101:2008, Propagation of distributions using a Monte Carlo method.
.. [3] B. Ruscic et al., Active Thermochemical Tables, J. Phys. Chem. A 108, 9979 (2004).
"""

from __future__ import annotations

import sys
import time
import warnings
from collections.abc import Callable, Iterable, Mapping, Sequence
from dataclasses import dataclass, field
from typing import Any, Literal

import numpy as np
from numpy.typing import ArrayLike, NDArray

from ._validate import as_temperature
from .constants import P_BAR, R
from .errors import InputError
from .reaction import Reaction
from .species import Species

__all__ = [
    "Band",
    "DataUncertainty",
    "LnKUncertainty",
    "MonteCarloInterrupted",
    "MonteCarloResult",
    "as_generator",
    "data_uncertainty",
    "ln_K_jacobian",
    "ln_K_uncertainty",
    "monte_carlo_equilibrium",
    "sample_ln_K",
    "source_group",
]

FloatArray = NDArray[np.float64]
Kind = Literal["hf298", "s298", "cp"]
CorrSpec = str | ArrayLike
_KINDS: tuple[Kind, ...] = ("hf298", "s298", "cp")
_SYMBOL = {"hf298": "ΔfH°", "s298": "S°", "cp": "Cp°"}
_SOURCE_FIELD = {"hf298": "hf298", "s298": "s298", "cp": "cp"}
_GROUPS = (  # (substring of the recorded source, compilation); first match wins
    ("JANAF", "NIST-JANAF"),
    ("Active Thermochemical Tables", "ATcT"),
    ("Shomate", "NIST WebBook Shomate"),
    ("WebBook", "NIST WebBook"),
    ("TRC", "TRC"),
    ("Poling", "Poling"),
    ("CRC", "CRC Handbook"),
    ("Yaws", "Yaws"),
)


def source_group(label: str) -> str:
    """Name of the compilation a recorded source label belongs to.

    Parameters
    ----------
    label : str
        A source string as stored in ``Species.sources`` (e.g.
        ``"NIST-JANAF 4th ed. (1998), table H-083"``).

    Returns
    -------
    str
        ``"NIST-JANAF"``, ``"ATcT"``, ``"NIST WebBook Shomate"``, ``"NIST WebBook"``,
        ``"TRC"``, ``"Poling"``, ``"CRC Handbook"``, ``"Yaws"``, or the label itself.

    Examples
    --------
    >>> source_group("NIST-JANAF 4th ed. (1998), table H-083")
    'NIST-JANAF'
    >>> source_group("NIST WebBook Shomate (piecewise)")
    'NIST WebBook Shomate'
    """
    for needle, group in _GROUPS:
        if needle in label:
            return group
    return label


def _collect_species(
    items: Species | Reaction | Iterable[Species | Reaction],
) -> tuple[Species, ...]:
    """Distinct species (by key, in order of appearance) of species and reactions."""
    seq: Iterable[Any] = [items] if isinstance(items, Species | Reaction) else items
    out: dict[str, Species] = {}
    for item in seq:
        if isinstance(item, Reaction):
            group: Iterable[Any] = item.species
        elif isinstance(item, Species):
            group = [item]
        else:
            raise InputError(f"expected Species or Reaction objects; got {type(item).__name__}")
        for sp in group:
            old = out.get(sp.key)
            if old is None:
                out[sp.key] = sp
            elif old is not sp and (old.hf298, old.s298, old.cp_model) != (
                sp.hf298,
                sp.s298,
                sp.cp_model,
            ):
                raise InputError(
                    f"two different data sets carry the key {sp.key!r} ({old!r} and {sp!r}); "
                    "build every reaction from the same species"
                )
    if not out:
        raise InputError("no species given")
    return tuple(out.values())


def _is_reference_element(sp: Species) -> bool:
    return len(sp.atoms) == 1 and sp.hf298 == 0.0


def _block(spec: CorrSpec, kind: str, groups: Sequence[str]) -> FloatArray:
    ns = len(groups)
    if isinstance(spec, str):
        if spec == "independent":
            return np.eye(ns)
        if spec == "source":
            g = np.asarray(groups, dtype=object)
            return (g[:, None] == g[None, :]).astype(float)
        raise InputError(
            f"{kind} correlation must be 'independent', 'source' or an ({ns}, {ns}) matrix; "
            f"got {spec!r}"
        )
    mat = np.asarray(spec, dtype=float)
    if mat.shape != (ns, ns):
        raise InputError(f"{kind} correlation matrix must have shape ({ns}, {ns}); got {mat.shape}")
    return mat


def _check_correlation(C: FloatArray) -> FloatArray:
    n = C.shape[0]
    if C.shape != (n, n) or not np.all(np.isfinite(C)):
        raise InputError(f"a correlation matrix must be finite and square; got shape {C.shape}")
    if not np.allclose(C, C.T, rtol=0.0, atol=1e-12):
        raise InputError("the correlation matrix must be symmetric")
    if not np.allclose(np.diag(C), 1.0, rtol=0.0, atol=1e-12):
        raise InputError(f"the correlation matrix needs ones on its diagonal; got {np.diag(C)}")
    if np.any(np.abs(C) > 1.0 + 1e-12):
        raise InputError("correlation coefficients must lie in [-1, 1]")
    lam = np.linalg.eigvalsh(C)
    if lam[0] < -1e-9:
        raise InputError(
            f"the correlation matrix is not positive semi-definite "
            f"(smallest eigenvalue {lam[0]:.3g})"
        )
    return C


@dataclass(frozen=True)
class DataUncertainty:
    """Standard uncertainties and correlations of the data of a set of species.

    The parameter vector is θ = (δΔfH°_1…ns [J/mol], δS°_1…ns [J/(mol K)], c_1…ns [-]),
    c_i the relative error of species i's whole Cp° curve.

    Attributes
    ----------
    species : tuple of Species
        The species, in parameter order.
    u : ndarray (3 ns,)
        Standard uncertainties of θ [J/mol, J/(mol K), -].
    correlation : ndarray (3 ns, 3 ns)
        Correlation matrix of θ [-].
    groups : tuple of str
        Source compilation of each parameter (:func:`source_group`).
    """

    species: tuple[Species, ...]
    u: FloatArray
    correlation: FloatArray
    groups: tuple[str, ...]
    _factor: FloatArray = field(init=False, repr=False, compare=False)

    def __post_init__(self) -> None:
        cov = self.covariance
        lam, vec = np.linalg.eigh(cov)
        object.__setattr__(self, "_factor", vec * np.sqrt(np.clip(lam, 0.0, None)))

    @property
    def keys(self) -> tuple[str, ...]:
        """Species keys in parameter order."""
        return tuple(sp.key for sp in self.species)

    @property
    def n_params(self) -> int:
        """Number of parameters, 3 ns."""
        return 3 * len(self.species)

    @property
    def kinds(self) -> tuple[Kind, ...]:
        """Quantity of each parameter: ``"hf298"``, ``"s298"`` or ``"cp"``."""
        return tuple(k for k in _KINDS for _ in self.species)

    @property
    def labels(self) -> tuple[str, ...]:
        """Readable name of each parameter, e.g. ``"ΔfH°(NH3)"``."""
        return tuple(f"{_SYMBOL[k]}({sp.key})" for k in _KINDS for sp in self.species)

    @property
    def covariance(self) -> FloatArray:
        """Covariance of θ, u_p ρ_pq u_q (units of the parameters squared)."""
        return self.u[:, None] * self.correlation * self.u[None, :]

    def components(self) -> list[tuple[str, NDArray[np.intp]]]:
        """Mutually independent groups of correlated parameters with non-zero uncertainty.

        Returns
        -------
        list of (label, indices)
            E.g. ``("ΔfH°(NH3)", [2])`` or ``("Cp°[NIST-JANAF](N2, H2, NH3)", [6, 7, 8])``.
            Their variance contributions add up to the total (no cross terms).
        """
        from scipy.sparse.csgraph import connected_components

        active = np.flatnonzero(self.u > 0.0)
        link = np.abs(self.correlation[np.ix_(active, active)]) > 0.0
        _, comp = connected_components(link, directed=False)
        out: list[tuple[str, NDArray[np.intp]]] = []
        for c in dict.fromkeys(comp):  # in order of first parameter
            params = active[comp == c]
            tags = {(self.kinds[p], self.groups[p]) for p in params}
            if params.size == 1:
                label = self.labels[params[0]]
            elif len(tags) == 1:
                keys = ", ".join(self.keys[p % len(self.species)] for p in params)
                label = f"{_SYMBOL[self.kinds[params[0]]]}[{self.groups[params[0]]}]({keys})"
            else:
                label = " + ".join(self.labels[p] for p in params)
            out.append((label, params))
        return out

    def variance_shares(self, coefficients: FloatArray) -> tuple[tuple[str, ...], FloatArray]:
        """Share of the first-order variance from each independent component.

        Parameters
        ----------
        coefficients : ndarray (3 ns, ...)
            Sensitivity coefficients ∂y/∂θ of some quantity y.

        Returns
        -------
        labels : tuple of str
            Component labels (:meth:`components`).
        shares : ndarray (n_components, ...)
            s_cᵀ Σ_cc s_c / var y, in [0, 1] and summing to 1 (0 where var y = 0).
        """
        comps = self.components()
        cov = self.covariance
        out = np.zeros((len(comps), *coefficients.shape[1:]))
        for c, (_, idx) in enumerate(comps):
            s = coefficients[idx]
            out[c] = np.einsum("p...,pq,q...->...", s, cov[np.ix_(idx, idx)], s)
        total = out.sum(axis=0)
        with np.errstate(invalid="ignore", divide="ignore"):
            out = np.where(total > 0.0, out / np.where(total > 0.0, total, 1.0), 0.0)
        return tuple(c[0] for c in comps), out

    def scaled(self, factor: float) -> DataUncertainty:
        """The same data with every uncertainty multiplied by `factor` (>= 0)."""
        if not (np.isfinite(factor) and factor >= 0.0):
            raise InputError(f"factor must be finite and >= 0; got {factor!r}")
        return DataUncertainty(
            species=self.species,
            u=self.u * float(factor),
            correlation=self.correlation,
            groups=self.groups,
        )

    def from_standard_normal(self, z: ArrayLike) -> FloatArray:
        """Map standard-normal draws z (..., 3 ns) to correlated parameter errors θ."""
        return np.asarray(z, dtype=float) @ self._factor.T

    def draw(self, n: int, rng: np.random.Generator) -> FloatArray:
        """Draw `n` correlated parameter vectors θ (n, 3 ns) from a normal distribution."""
        return self.from_standard_normal(rng.standard_normal((int(n), self.n_params)))


def data_uncertainty(
    items: Species | Reaction | Iterable[Species | Reaction],
    *,
    hf: CorrSpec = "independent",
    s: CorrSpec = "independent",
    cp: CorrSpec = "source",
    correlation: ArrayLike | None = None,
    reference_elements_exact: bool = True,
) -> DataUncertainty:
    """Collect the uncertainties of the species data and build their correlation.

    Parameters
    ----------
    items : Species, Reaction, or iterable of them
        The species (reactions contribute theirs; shared keys must carry the same data).
    hf, s, cp : {"independent", "source"} or array_like (ns, ns)
        Correlation of the ΔfH° errors, the S° errors and the relative Cp errors between
        species: independent, fully correlated within one source compilation
        (:func:`source_group`), or a given correlation matrix. Default: independent ΔfH°
        and S°, Cp correlated within a compilation.
    correlation : array_like (3 ns, 3 ns), optional
        Whole correlation matrix of θ (overrides `hf`, `s`, `cp`), parameter order as in
        :class:`DataUncertainty`.
    reference_elements_exact : bool
        Treat ΔfH° of elements in their reference state (one element, ΔfH° = 0) as exact.

    Returns
    -------
    DataUncertainty

    Raises
    ------
    InputError
        A matrix of the wrong shape, not symmetric, without unit diagonal or not positive
        semi-definite; a negative uncertainty; conflicting species under one key.

    Examples
    --------
    >>> from eqconv import Reaction
    >>> du = data_uncertainty(Reaction("N2 + 3 H2 = 2 NH3", data="janaf"))
    >>> [c[0] for c in du.components()][:2]
    ['ΔfH°(NH3)', 'S°(N2)']
    """
    species = _collect_species(items)
    ns = len(species)
    u = np.zeros(3 * ns)
    groups: list[str] = []
    for k, kind in enumerate(_KINDS):
        for i, sp in enumerate(species):
            value = float(
                getattr(sp, {"hf298": "u_hf298", "s298": "u_s298", "cp": "u_cp_rel"}[kind])
            )
            if not (np.isfinite(value) and value >= 0.0):
                raise InputError(
                    f"uncertainty of {_SYMBOL[kind]} of {sp.key} must be finite "
                    f"and >= 0; got {value!r}"
                )
            if kind == "hf298" and reference_elements_exact and _is_reference_element(sp):
                value = 0.0
            u[k * ns + i] = value
            groups.append(source_group(sp.sources.get(_SOURCE_FIELD[kind], sp.data)))
    if correlation is not None:
        C = np.asarray(correlation, dtype=float)
        if C.shape != (3 * ns, 3 * ns):
            raise InputError(
                f"correlation must have shape ({3 * ns}, {3 * ns}) for {ns} species; got {C.shape}"
            )
    else:
        C = np.zeros((3 * ns, 3 * ns))
        for k, (kind, spec) in enumerate(zip(_KINDS, (hf, s, cp), strict=True)):
            sl = slice(k * ns, (k + 1) * ns)
            C[sl, sl] = _block(spec, kind, groups[sl])
    return DataUncertainty(
        species=species, u=u, correlation=_check_correlation(C.copy()), groups=tuple(groups)
    )


# --------------------------------------------------------------------------- ln K
def _as_reactions(reactions: Reaction | Iterable[Reaction]) -> list[Reaction]:
    out = [reactions] if isinstance(reactions, Reaction) else list(reactions)
    if not out or not all(isinstance(r, Reaction) for r in out):
        raise InputError("reactions must be an eqconv.Reaction or a non-empty list of them")
    return out


def _nu_matrix(rxns: Sequence[Reaction], keys: Sequence[str]) -> FloatArray:
    nu = np.zeros((len(rxns), len(keys)))
    pos = {k: i for i, k in enumerate(keys)}
    for j, r in enumerate(rxns):
        for k, v in r.coefficients.items():
            nu[j, pos[k]] = v
    return nu


def ln_K_jacobian(
    reactions: Reaction | Iterable[Reaction], T: ArrayLike, data: DataUncertainty | None = None
) -> FloatArray:
    """Derivatives of ln K of each reaction with respect to every parameter.

    Parameters
    ----------
    reactions : Reaction or list of Reaction
        The reactions (nr of them).
    T : array_like
        Temperature [K], > 0.
    data : DataUncertainty, optional
        Parameter set (default: :func:`data_uncertainty` of the reactions).

    Returns
    -------
    ndarray (3 ns, *T.shape, nr)
        ∂ln K_j/∂θ_p: [mol/J] for ΔfH°, [mol K/J] for S°, [-] for the Cp scale.

    Notes
    -----
    ∂ln K_j/∂ΔfH°_i = −ν_ij/(R T); ∂ln K_j/∂S°_i = ν_ij/R;
    ∂ln K_j/∂c_i = −ν_ij [∫_{298.15}^{T} Cp_i dT/(R T) − ∫_{298.15}^{T} Cp_i/T dT/R].
    """
    rxns = _as_reactions(reactions)
    du = data if data is not None else data_uncertainty(rxns)
    T = as_temperature(T)
    nu = _nu_matrix(rxns, du.keys)  # raises KeyError if a species is missing
    ns = len(du.species)
    g = np.empty((ns, *T.shape))
    for i, sp in enumerate(du.species):
        if np.any(nu[:, i] != 0.0):
            sp.check_range(T)
        g[i] = sp.cp_model.h_int(T) / (R * T) - sp.cp_model.s_int(T) / R
    J = np.empty((3 * ns, *T.shape, len(rxns)))
    J[:ns] = -nu.T.reshape(ns, *([1] * T.ndim), -1) / (R * T)[..., None]
    J[ns : 2 * ns] = np.broadcast_to(
        nu.T.reshape(ns, *([1] * T.ndim), -1) / R, J[ns : 2 * ns].shape
    )
    J[2 * ns :] = -nu.T.reshape(ns, *([1] * T.ndim), -1) * g[..., None]
    return J


def _check_keys(rxns: Sequence[Reaction], du: DataUncertainty) -> None:
    missing = sorted({k for r in rxns for k in r.keys} - set(du.keys))
    if missing:
        raise InputError(f"the uncertainty data lack species {missing} of the reactions")


@dataclass(frozen=True)
class LnKUncertainty:
    """First-order (here exact) uncertainty of ln K(T) of a set of reactions.

    Attributes
    ----------
    T : ndarray
        Temperature [K].
    equations : tuple of str
        The reactions.
    ln_K : ndarray (*T.shape, nr)
        Nominal ln K at p° = 1 bar [-].
    std : ndarray (*T.shape, nr)
        Standard uncertainty of ln K [-] (u(K)/K to first order).
    covariance : ndarray (*T.shape, nr, nr)
        Covariance of the ln K of the reactions [-].
    jacobian : ndarray (3 ns, *T.shape, nr)
        ∂ln K/∂θ (see :func:`ln_K_jacobian`).
    data : DataUncertainty
        The parameter set used.
    """

    T: FloatArray
    equations: tuple[str, ...]
    ln_K: FloatArray
    std: FloatArray
    covariance: FloatArray
    jacobian: FloatArray
    data: DataUncertainty

    def band(self, coverage: float = 0.95) -> tuple[FloatArray, FloatArray]:
        """Normal coverage interval of ln K, (lower, upper) [-]."""
        from scipy.stats import norm

        if not 0.0 < coverage < 1.0:
            raise InputError(f"coverage must lie in (0, 1); got {coverage!r}")
        k = float(norm.ppf(0.5 + coverage / 2.0))
        return self.ln_K - k * self.std, self.ln_K + k * self.std

    def shares(self) -> tuple[tuple[str, ...], FloatArray]:
        """Fraction of the variance of ln K from each independent component.

        Returns
        -------
        labels : tuple of str
            Component labels (:meth:`DataUncertainty.components`).
        shares : ndarray (n_components, *T.shape, nr)
            Shares in [0, 1] summing to 1 over components (0 where the variance is 0).
        """
        return self.data.variance_shares(self.jacobian)


def ln_K_uncertainty(
    reactions: Reaction | Iterable[Reaction],
    T: ArrayLike,
    data: DataUncertainty | None = None,
    standard_pressure: float = P_BAR,
) -> LnKUncertainty:
    """Propagate the data uncertainties to ln K(T) (law of propagation, GUM §5).

    Parameters
    ----------
    reactions : Reaction or list of Reaction
        The reactions.
    T : array_like
        Temperature [K], > 0.
    data : DataUncertainty, optional
        Uncertainties and correlations (default :func:`data_uncertainty` of the reactions).
    standard_pressure : float
        Standard pressure p° of the nominal ln K [Pa] (does not change the uncertainty).

    Returns
    -------
    LnKUncertainty

    Notes
    -----
    cov(ln K) = Jᵀ Σ J with J = ∂ln K/∂θ (:func:`ln_K_jacobian`) and Σ the covariance of θ.
    ln K is linear in θ, so this is exact for normal θ.

    Examples
    --------
    >>> from eqconv import Reaction
    >>> res = ln_K_uncertainty(Reaction("1/2 N2 + 3/2 H2 = NH3", data="janaf"), 700.0)
    >>> bool(res.std[0] > 0)
    True
    """
    rxns = _as_reactions(reactions)
    du = data if data is not None else data_uncertainty(rxns)
    _check_keys(rxns, du)
    T = as_temperature(T)
    J = ln_K_jacobian(rxns, T, du)
    cov = np.einsum("p...j,pq,q...k->...jk", J, du.covariance, J)
    std = np.sqrt(np.clip(np.diagonal(cov, axis1=-2, axis2=-1), 0.0, None))
    ln_K = np.stack([r.ln_K(T, standard_pressure=standard_pressure) for r in rxns], axis=-1)
    return LnKUncertainty(
        T=T,
        equations=tuple(r.equation for r in rxns),
        ln_K=ln_K,
        std=std,
        covariance=cov,
        jacobian=J,
        data=du,
    )


def as_generator(seed: int | np.random.Generator | None) -> np.random.Generator:
    """A numpy Generator from a seed (int), a Generator (used as is) or None (fresh)."""
    if isinstance(seed, np.random.Generator):
        return seed
    if seed is None or isinstance(seed, int | np.integer):
        return np.random.default_rng(seed)
    raise InputError(f"seed must be an int, a numpy Generator or None; got {seed!r}")


def sample_ln_K(
    reactions: Reaction | Iterable[Reaction],
    T: ArrayLike,
    n_samples: int,
    *,
    seed: int | np.random.Generator | None = None,
    data: DataUncertainty | None = None,
    standard_pressure: float = P_BAR,
) -> FloatArray:
    """Monte Carlo samples of ln K(T) with correlated parameter draws.

    Parameters
    ----------
    reactions : Reaction or list of Reaction
        The reactions (nr).
    T : array_like
        Temperature [K], > 0.
    n_samples : int
        Number of samples, >= 1.
    seed : int, numpy.random.Generator or None
        Makes the draws reproducible.
    data : DataUncertainty, optional
        Uncertainties and correlations (default :func:`data_uncertainty`).
    standard_pressure : float
        Standard pressure p° [Pa].

    Returns
    -------
    ndarray (n_samples, *T.shape, nr)
        ln K samples [-]: ln K_nominal(T) + θ_s · ∂ln K/∂θ(T).
    """
    n = _n_samples(n_samples)
    lk = ln_K_uncertainty(reactions, T, data, standard_pressure)
    theta = lk.data.draw(n, as_generator(seed))
    return lk.ln_K[None] + np.tensordot(theta, lk.jacobian, axes=(1, 0))


def _n_samples(n: int) -> int:
    if isinstance(n, bool) or not isinstance(n, int | np.integer) or n < 1:
        raise InputError(f"n_samples must be an integer >= 1; got {n!r}")
    return int(n)


# --------------------------------------------------------------------------- equilibrium
@dataclass(frozen=True)
class EquilibriumSystem:
    """The nominal equilibrium on a grid and the arrays to re-solve it with sampled ln K.

    Built by :func:`build_system` from :func:`eqconv.equilibrium` (which resolves the feed
    and inerts), so both share one definition of species, feed and grid.

    Attributes
    ----------
    nominal : EquilibriumResult
        Equilibrium with the nominal data.
    keys : tuple of str
        Species (those of the reactions, then inerts), ns.
    nu : ndarray (nr, ns)
        Stoichiometric matrix, products > 0 [-].
    n0 : ndarray (*shape, ns)
        Feed amounts [mol].
    gas : ndarray (ns,) of bool
        True for gas species.
    T, P : ndarray
        Temperature [K] and pressure [Pa] in their given shapes, left-padded with
        length-1 axes to the grid's number of dimensions.
    ln_K : ndarray (..., nr)
        Nominal ln K at p° = 1 bar on the padded T [-].
    jacobian : ndarray (3 ns, ..., nr)
        ∂ln K/∂θ on the padded T (:func:`ln_K_jacobian`).
    """

    nominal: Any
    keys: tuple[str, ...]
    nu: FloatArray
    n0: FloatArray
    gas: NDArray[np.bool_]
    T: FloatArray
    P: FloatArray
    ln_K: FloatArray
    jacobian: FloatArray

    @property
    def shape(self) -> tuple[int, ...]:
        """Grid shape."""
        return tuple(self.nominal.shape)

    @property
    def reactions(self) -> tuple[Reaction, ...]:
        """The reactions."""
        return tuple(self.nominal.reactions)

    def index(self, key: str) -> int:
        """Position of a species key (InputError naming the known keys)."""
        if key not in self.keys:
            raise InputError(f"{key!r} is not a species of this system; known: {self.keys}")
        return self.keys.index(key)

    def solve(self, ln_K: FloatArray, what: str, tol: float = 1e-10) -> Any:
        """Re-solve with other ln K (..., nr) [-]; raise ConvergenceError if a point fails."""
        from . import extent_solver
        from .errors import ConvergenceError

        sol = extent_solver.solve_extents(
            self.nu, ln_K, self.n0, np.log(self.P / P_BAR), gas_mask=self.gas, tol=tol
        )
        if sol.n_failed:
            where = tuple(int(b) for b in np.argwhere(~sol.converged)[0])
            raise ConvergenceError(
                f"{what}: {sol.n_failed} equilibrium solve(s) failed, first at index {where} "
                f"(T = {float(np.broadcast_to(self.T, sol.shape)[where]):g} K, "
                f"P = {float(np.broadcast_to(self.P, sol.shape)[where]):g} Pa)"
            )
        return sol


def build_system(
    reactions: Reaction | str | Sequence[Reaction | str],
    feed: Mapping[str, ArrayLike],
    T: ArrayLike,
    P: ArrayLike,
    data: DataUncertainty | None = None,
    tol: float = 1e-10,
) -> tuple[EquilibriumSystem, DataUncertainty]:
    """Solve the nominal equilibrium and assemble the arrays for sampled re-solves.

    Parameters are those of :func:`eqconv.equilibrium` (ideal gas); `data` defaults to
    :func:`data_uncertainty` of the reactions.

    Raises
    ------
    InputError, ConvergenceError
        As :func:`eqconv.equilibrium`; InputError also if `data` lacks a species.
    """
    from .equilibrium import equilibrium

    nominal = equilibrium(reactions, feed, T, P, tol=tol)
    rxns = list(nominal.reactions)
    du = data if data is not None else data_uncertainty(rxns)
    _check_keys(rxns, du)
    keys = tuple(nominal.species)
    Ta, Pa = as_temperature(T), np.asarray(P, dtype=float)
    lk = ln_K_uncertainty(rxns, Ta, du)
    nd = len(nominal.shape)
    pad = (1,) * (nd - Ta.ndim)
    system = EquilibriumSystem(
        nominal=nominal,
        keys=keys,
        nu=_nu_matrix(rxns, keys),
        n0=np.stack([np.asarray(nominal.feed[k], dtype=float) for k in keys], axis=-1),
        gas=np.array([ph == "g" for ph in nominal.phases], dtype=bool),
        T=np.reshape(Ta, pad + Ta.shape),
        P=np.reshape(Pa, (1,) * (nd - Pa.ndim) + Pa.shape),
        ln_K=np.reshape(lk.ln_K, pad + lk.ln_K.shape),
        jacobian=np.reshape(lk.jacobian, (du.n_params, *pad, *lk.ln_K.shape)),
    )
    return system, du


@dataclass(frozen=True)
class Band:
    """Mean, standard deviation and percentiles of a quantity at every grid point.

    Attributes
    ----------
    mean, std : ndarray
        Sample mean and standard deviation (ddof = 1) over the Monte Carlo samples.
    percentiles : dict[float, ndarray]
        Percentile [%] -> value at each grid point (empty when none were asked for).
    """

    mean: FloatArray
    std: FloatArray
    percentiles: dict[float, FloatArray]

    def _edge(self, pick: Callable[[Iterable[float]], float]) -> FloatArray:
        if not self.percentiles:
            raise InputError("no percentiles were computed; pass percentiles=(2.5, 97.5)")
        return self.percentiles[pick(self.percentiles)]

    @property
    def lower(self) -> FloatArray:
        """Lowest requested percentile (the lower edge of the band)."""
        return self._edge(min)

    @property
    def upper(self) -> FloatArray:
        """Highest requested percentile (the upper edge of the band)."""
        return self._edge(max)


@dataclass(frozen=True)
class MonteCarloResult:
    """Monte Carlo distribution of the equilibrium state over a grid.

    Attributes
    ----------
    equations : tuple of str
        The reactions.
    keys : tuple of str
        Species of the system (reaction species, then inerts).
    conversion_of : str
        Species whose conversion is reported.
    shape : tuple of int
        Grid shape (broadcast of T, P and the feed).
    n_requested, n_samples : int
        Samples asked for and samples completed (smaller only after an interruption).
    interrupted : bool
        True when the run was stopped by KeyboardInterrupt; statistics then use the
        ``n_samples`` completed samples (whole chunks only).
    seed : int or None
        The integer seed, when one was given.
    nominal_conversion : ndarray
        Conversion with the nominal data [-].
    nominal_mole_fractions : dict[str, ndarray]
        Mole fractions with the nominal data [-] (gas species).
    conversion : Band
        Conversion of ``conversion_of`` [-].
    mole_fractions : dict[str, Band]
        Gas-phase mole fractions [-].
    extents : tuple of Band
        Extent of each reaction [mol].
    conversion_samples : ndarray (n_samples, *shape) or None
        The sampled conversions (kept when percentiles were asked for or keep_samples).
    mole_fraction_samples : ndarray (n_samples, *shape, ns) or None
        The sampled mole fractions.
    data : DataUncertainty
        Uncertainties and correlations used.
    elapsed : float
        Wall time of the sampling [s].
    """

    equations: tuple[str, ...]
    keys: tuple[str, ...]
    conversion_of: str
    shape: tuple[int, ...]
    n_requested: int
    n_samples: int
    interrupted: bool
    seed: int | None
    nominal_conversion: FloatArray
    nominal_mole_fractions: dict[str, FloatArray]
    conversion: Band
    mole_fractions: dict[str, Band]
    extents: tuple[Band, ...]
    conversion_samples: FloatArray | None
    mole_fraction_samples: FloatArray | None
    data: DataUncertainty
    elapsed: float


class MonteCarloInterrupted(KeyboardInterrupt):
    """Raised (``on_interrupt="raise"``) when a Monte Carlo run is interrupted.

    Attributes
    ----------
    result : MonteCarloResult
        Statistics of the samples completed before the interruption.
    n_completed : int
        Number of completed samples.
    """

    def __init__(self, result: MonteCarloResult) -> None:
        super().__init__(
            f"Monte Carlo run interrupted after {result.n_samples} of {result.n_requested} samples"
        )
        self.result = result
        self.n_completed = result.n_samples


@dataclass(frozen=True)
class _Moments:
    """Count, mean and sum of squared deviations over axis 0, merged chunk by chunk."""

    n: int
    mean: FloatArray
    m2: FloatArray

    def merged(self, x: FloatArray) -> _Moments:
        # pairwise update of Chan, Golub & LeVeque (1979); returns a new object so that
        # an interruption never leaves a half-updated state
        nb = x.shape[0]
        mb = x.mean(axis=0)
        n = self.n + nb
        delta = mb - self.mean
        return _Moments(
            n,
            self.mean + delta * (nb / n),
            self.m2 + ((x - mb) ** 2).sum(axis=0) + delta**2 * (self.n * nb / n),
        )

    def std(self) -> FloatArray:
        return np.sqrt(self.m2 / max(self.n - 1, 1))


def _lerp(a: FloatArray, b: FloatArray, t: float) -> FloatArray:
    # the same two-sided form numpy's "linear" percentile uses
    return a + (b - a) * t if t < 0.5 else b - (b - a) * (1.0 - t)


def _percentiles(
    samples: Sequence[FloatArray], pct: Sequence[float], order_by: FloatArray | None
) -> list[FloatArray]:
    """Percentiles ("linear" method) over axis 0 of each array in `samples`.

    With `order_by` (n, *grid), every array must be a monotone function of it at each
    point (one reaction: conversion and mole fractions are monotone in the extent), and
    its order statistics are read at the sample indices that order `order_by` (one
    argpartition instead of one partition per quantity). Returns one (len(pct), ...) array
    per input.
    """
    n = samples[0].shape[0]
    if order_by is None:
        return [np.percentile(a, pct, axis=0) for a in samples]
    pos = [(n - 1) * q / 100.0 for q in pct]
    lo = [int(np.floor(h)) for h in pos]
    hi = [min(j + 1, n - 1) for j in lo]
    kth = sorted({0, n - 1, *lo, *hi, *(n - 1 - j for j in lo), *(n - 1 - j for j in hi)})
    idx = np.argpartition(order_by, kth, axis=0)
    out = []
    for a in samples:
        extra = (1,) * (a.ndim - order_by.ndim)

        def at(j: int, a: FloatArray = a, extra: tuple[int, ...] = extra) -> FloatArray:
            return np.take_along_axis(a, idx[j][None].reshape(1, *idx.shape[1:], *extra), axis=0)[0]

        first, last = at(0), at(n - 1)
        rising = last >= first
        vals = []
        for h, j, k in zip(pos, lo, hi, strict=True):
            t = h - j
            up = _lerp(at(j), at(k), t)
            down = _lerp(at(n - 1 - j), at(n - 1 - k), t)
            vals.append(np.where(rising, up, down))
        out.append(np.stack(vals))
    return out


def _progress_printer(total: int) -> Callable[[int, int], None]:
    start = time.perf_counter()

    def show(done: int, _total: int) -> None:
        t = time.perf_counter() - start
        end = "\n" if done >= total else ""
        sys.stderr.write(
            f"\rMonte Carlo: {done}/{total} samples ({100 * done / total:.0f} %), {t:.1f} s{end}"
        )
        sys.stderr.flush()

    return show


def conversion_index(system: EquilibriumSystem, conversion_of: str | None) -> int:
    """Index of the species whose conversion is reported (default: first reactant).

    Raises
    ------
    InputError
        Unknown species, or a zero feed of it somewhere (conversion undefined).
    """
    if conversion_of is None:
        k = int(np.flatnonzero(system.nu[0] < 0.0)[0])
    else:
        k = system.index(conversion_of)
    if np.any(system.n0[..., k] <= 0.0):
        raise InputError(
            f"conversion of {system.keys[k]!r} needs a positive feed of it at "
            "every point; choose another species with conversion_of="
        )
    return k


def state(system: EquilibriumSystem, n: FloatArray, k: int) -> tuple[FloatArray, FloatArray]:
    """Conversion of species k [-] and gas mole fractions (..., ns) [-] from amounts."""
    n0k = system.n0[..., k]
    conv = (n0k - n[..., k]) / n0k
    y = n / (n @ system.gas.astype(float))[..., None]
    if not np.all(system.gas):
        y = y * system.gas
    return conv, y


def monte_carlo_equilibrium(
    reactions: Reaction | str | Sequence[Reaction | str],
    feed: Mapping[str, ArrayLike],
    T: ArrayLike,
    P: ArrayLike,
    *,
    n_samples: int = 1000,
    seed: int | np.random.Generator | None = None,
    data: DataUncertainty | None = None,
    conversion_of: str | None = None,
    percentiles: Sequence[float] = (2.5, 50.0, 97.5),
    keep_samples: bool = False,
    chunk_points: int = 250_000,
    progress: bool | Callable[[int, int], None] | None = None,
    on_interrupt: Literal["return", "raise"] = "return",
    tol: float = 1e-10,
    memory_limit: float = 768 * 2**20,
) -> MonteCarloResult:
    """Monte Carlo propagation of data uncertainty to equilibrium conversion and composition.

    Parameters
    ----------
    reactions : Reaction, str or sequence of them
        Independent reactions (as for :func:`eqconv.equilibrium`).
    feed : mapping
        Species -> feed amount [mol] (scalars or arrays that broadcast with T and P;
        species in no reaction are inerts).
    T : array_like
        Temperature [K], > 0.
    P : array_like
        Absolute pressure [Pa], > 0; broadcasts with T (e.g. ``T[:, None]``, ``P[None, :]``).
    n_samples : int
        Number of Monte Carlo samples, >= 1.
    seed : int, numpy.random.Generator or None
        Seed of the draws: the same seed gives the same data draws whatever `chunk_points`
        (and, with the same `chunk_points`, bit-identical results).
    data : DataUncertainty, optional
        Uncertainties and correlations (default :func:`data_uncertainty` of the reactions).
    conversion_of : str, optional
        Species whose conversion (n0 − n)/n0 is reported (default: the first reactant of
        the first reaction).
    percentiles : sequence of float
        Percentiles [%] in [0, 100] at every point; ``()`` for mean and std only (no
        samples kept, memory independent of `n_samples`).
    keep_samples : bool
        Return the sampled conversions and mole fractions.
    chunk_points : int
        Equilibrium solves per vectorized call (samples × grid points); bounds the memory.
    progress : bool or callable, optional
        ``True`` writes a progress line to stderr; a callable ``f(done, total)`` is called
        after every chunk (it may raise KeyboardInterrupt to stop the run).
    on_interrupt : {"return", "raise"}
        On KeyboardInterrupt during or between chunks: ``"return"`` (default) returns the
        statistics of the completed chunks with ``interrupted=True``, ``n_samples`` = the
        completed count, and a RuntimeWarning; ``"raise"`` raises
        :class:`MonteCarloInterrupted` carrying that partial result. An interruption
        before the first chunk completes re-raises the KeyboardInterrupt.
    tol : float
        Equilibrium tolerance |ln Q − ln K| of every solve [-].
    memory_limit : float
        Largest size of the kept samples [bytes]; above it an InputError says what to cut.

    Returns
    -------
    MonteCarloResult

    Raises
    ------
    InputError
        Bad arguments, or kept samples that would exceed `memory_limit`.
    ConvergenceError
        If any equilibrium solve fails (never a silent NaN); the message names the point.

    Notes
    -----
    Sample s draws correlated data errors θ_s (:meth:`DataUncertainty.draw`), sets
    ln K_s(T) = ln K(T) + θ_s · ∂ln K/∂θ (exact: ln K is linear in θ) and solves the
    equilibrium at every grid point; the samples are the leading array dimension of one
    vectorized solve per chunk (ln K of shape (n_chunk, *grid, nr)). Ideal gas,
    activities y_i P/p° with p° = 1 bar. Percentiles use numpy's "linear" definition.

    Examples
    --------
    >>> from eqconv import Reaction
    >>> rxn = Reaction("N2 + 3 H2 = 2 NH3", data="janaf")
    >>> mc = monte_carlo_equilibrium(rxn, {"N2": 1, "H2": 3}, 700.0, 100e5, n_samples=200,
    ...                              seed=1)
    >>> bool(mc.conversion.lower < mc.nominal_conversion < mc.conversion.upper)
    True
    """
    n_total = _n_samples(n_samples)
    if on_interrupt not in ("return", "raise"):
        raise InputError(f"on_interrupt must be 'return' or 'raise'; got {on_interrupt!r}")
    if isinstance(chunk_points, bool) or not isinstance(chunk_points, int) or chunk_points < 1:
        raise InputError(f"chunk_points must be an integer >= 1; got {chunk_points!r}")
    pct = tuple(float(q) for q in percentiles)
    if any(not 0.0 <= q <= 100.0 for q in pct):
        raise InputError(f"percentiles must lie in [0, 100] %; got {pct}")
    system, du = build_system(reactions, feed, T, P, data, tol)
    rxns = list(system.reactions)
    shape = system.shape
    k = conversion_index(system, conversion_of)
    ns, nr = len(system.keys), len(rxns)
    npts = int(np.prod(shape))
    keep = keep_samples or bool(pct)
    need = n_total * npts * (2 + ns) * 8.0
    if keep and need > memory_limit:
        raise InputError(
            f"keeping {n_total} samples x {npts} points x {2 + ns} quantities needs "
            f"{need / 2**20:.0f} MiB > memory_limit {memory_limit / 2**20:.0f} MiB; use "
            "fewer samples or points, or percentiles=() with keep_samples=False"
        )
    lnK0, Jp = system.ln_K, system.jacobian
    conv0, y0 = state(system, system.nominal.solution.amounts, k)

    rng = as_generator(seed)
    per_chunk = max(1, chunk_points // max(npts, 1))
    conv_s = np.empty((n_total, *shape)) if keep else None
    y_s = np.empty((n_total, *shape, ns)) if keep else None
    xi_s = np.empty((n_total, *shape)) if keep and nr == 1 else None
    zero = [_Moments(0, np.zeros(sh), np.zeros(sh)) for sh in (shape, (*shape, ns), (*shape, nr))]
    # (samples done, moments of X, y, ξ), replaced in one assignment per chunk
    acc: tuple[int, _Moments, _Moments, _Moments] = (0, zero[0], zero[1], zero[2])
    report = (
        _progress_printer(n_total)
        if progress is True
        else (progress if callable(progress) else None)
    )
    interrupted = False
    start = time.perf_counter()
    try:
        while acc[0] < n_total:
            done = acc[0]
            m = min(per_chunk, n_total - done)
            lnK = lnK0 + np.tensordot(du.draw(m, rng), Jp, axes=(1, 0))
            sol = system.solve(lnK, f"samples {done}-{done + m - 1}", tol)
            conv, y = state(system, sol.amounts, k)
            conv = np.broadcast_to(conv, (m, *shape))
            y = np.broadcast_to(y, (m, *shape, ns))
            xi = np.broadcast_to(sol.extents, (m, *shape, nr))
            if conv_s is not None and y_s is not None:  # rows past acc[0] are not yet valid
                conv_s[done : done + m] = conv
                y_s[done : done + m] = y
            if xi_s is not None:
                xi_s[done : done + m] = xi[..., 0]
            acc = (done + m, acc[1].merged(conv), acc[2].merged(y), acc[3].merged(xi))
            if report is not None:
                report(acc[0], n_total)
    except KeyboardInterrupt:
        if acc[0] == 0:
            raise
        interrupted = acc[0] < n_total
    elapsed = time.perf_counter() - start
    done, mom_c, mom_y, mom_x = acc
    qc = qy = np.zeros((len(pct), *shape, ns))
    if conv_s is not None and y_s is not None:
        conv_s, y_s = conv_s[:done], y_s[:done]
        if pct:
            qc, qy = _percentiles([conv_s, y_s], pct, None if xi_s is None else xi_s[:done])
    sy, sx = mom_y.std(), mom_x.std()
    gas = [key for key, is_gas in zip(system.keys, system.gas, strict=True) if is_gas]
    result = MonteCarloResult(
        equations=tuple(r.equation for r in rxns),
        keys=system.keys,
        conversion_of=system.keys[k],
        shape=tuple(shape),
        n_requested=n_total,
        n_samples=done,
        interrupted=interrupted,
        seed=int(seed) if isinstance(seed, int | np.integer) else None,
        nominal_conversion=np.broadcast_to(conv0, shape).copy(),
        nominal_mole_fractions={
            key: np.broadcast_to(y0[..., system.index(key)], shape).copy() for key in gas
        },
        conversion=Band(mom_c.mean, mom_c.std(), {q: qc[a] for a, q in enumerate(pct)}),
        mole_fractions={
            key: Band(mom_y.mean[..., i], sy[..., i], {q: qy[a][..., i] for a, q in enumerate(pct)})
            for i, key in enumerate(system.keys)
            if key in gas
        },
        extents=tuple(Band(mom_x.mean[..., j], sx[..., j], {}) for j in range(nr)),
        conversion_samples=conv_s if keep_samples else None,
        mole_fraction_samples=y_s if keep_samples else None,
        data=du,
        elapsed=elapsed,
    )
    if interrupted:
        if on_interrupt == "raise":
            raise MonteCarloInterrupted(result)
        warnings.warn(
            f"Monte Carlo run interrupted: statistics use {done} of {n_total} samples",
            RuntimeWarning,
            stacklevel=2,
        )
    return result
