"""How much the data matter: uncertainty of ln K(T) and of equilibrium conversion.

Every species datum carries a standard uncertainty (fields ``u_hf298`` [J/mol],
``u_s298`` [J/(mol K)] and ``u_cp_rel`` [-] of :class:`~eqconv.species.Species`). This
module holds the data-uncertainty model and its propagation to ln K(T):

* a parameter vector θ = (δΔfH°_1…δΔfH°_ns, δS°_1…δS°_ns, c_1…c_ns) with a covariance
  built from a documented correlation model (:func:`data_uncertainty`);
* the first-order (exact, see Notes) uncertainty of ln K(T) (:func:`ln_K_uncertainty`) and
  Monte Carlo samples of ln K(T) (:func:`sample_ln_K`).

Monte Carlo bands of equilibrium conversion and composition at every grid point
(:func:`~eqconv.montecarlo.monte_carlo_equilibrium`) are in :mod:`eqconv.montecarlo`; its
public names are re-exported here, so ``from eqconv.uncertainty import
monte_carlo_equilibrium`` keeps working. Sensitivity coefficients ∂X/∂ΔfH° and the
comparison of whole data sources are in :mod:`eqconv.sensitivity`.

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

from collections.abc import Iterable, Sequence
from dataclasses import dataclass, field
from typing import Any, Literal

import numpy as np
from numpy.typing import ArrayLike, NDArray

from ._validate import as_temperature
from .constants import P_BAR, R
from .errors import InputError

# Monte Carlo propagation to equilibrium lives in eqconv.montecarlo and is re-exported here
# (eqconv.montecarlo imports this module only inside its functions: no import cycle).
from .montecarlo import Band, MonteCarloInterrupted, MonteCarloResult, monte_carlo_equilibrium
from .montecarlo import EquilibriumSystem as EquilibriumSystem
from .montecarlo import build_system as build_system
from .montecarlo import conversion_index as conversion_index
from .montecarlo import state as state
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
