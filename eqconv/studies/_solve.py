"""The one place where the study layer calls the equilibrium solver.

Everything in :mod:`eqconv.studies` goes through :func:`solve`, which calls
:func:`eqconv.equilibrium` on flat arrays of points and returns plain arrays in a fixed
species order, so that sweeps, target finders and adiabatic balances share one set of
conventions: species keys of the reactions in order of appearance, then inert feed species
in feed order; conversion of a key species counted against a basis feed.
"""

from __future__ import annotations

from collections.abc import Iterable, Mapping, Sequence
from dataclasses import dataclass
from typing import Any

import numpy as np
from numpy.typing import ArrayLike, NDArray

from .._validate import as_amount, as_pressure, as_temperature
from ..errors import ConvergenceError, InputError
from ..reaction import Reaction
from ..species import Species, get_species

__all__ = [
    "Solved",
    "as_reactions",
    "default_key",
    "equilibrium_conversion",
    "feed_arrays",
    "gas_fractions",
    "gas_mask",
    "keyed",
    "require",
    "solve",
    "species_key",
    "species_list",
]

FloatArray = NDArray[np.float64]
BoolArray = NDArray[np.bool_]
Reactions = Reaction | Sequence[Reaction]


def require(module: str, extra: str = "studies") -> Any:
    """Import an optional dependency or raise an ImportError naming the extra to install."""
    import importlib

    try:
        return importlib.import_module(module)
    except ImportError as exc:  # pragma: no cover - the test environment has them all
        raise ImportError(
            f'this study needs the optional package {module!r}: pip install "eqconv[{extra}]"'
        ) from exc


def as_reactions(reactions: Reactions) -> tuple[Reaction, ...]:
    """Return `reactions` as a non-empty tuple of :class:`~eqconv.Reaction`.

    Raises
    ------
    InputError
        If it is empty or holds something else than reactions.
    """
    out = (reactions,) if isinstance(reactions, Reaction) else tuple(reactions)
    if not out:
        raise InputError("at least one reaction is needed; got an empty list")
    for r in out:
        if not isinstance(r, Reaction):
            raise InputError(f"reactions must be eqconv.Reaction objects; got {type(r).__name__}")
    return out


def species_list(
    reactions: Sequence[Reaction],
    feed_keys: Iterable[str],
    species: Mapping[str, Species] | Iterable[Species] | None = None,
) -> tuple[Species, ...]:
    """Species of the reactions (order of appearance) followed by the inert feed species.

    Inerts are taken from `species` when given there, else from ``get_species(key,
    data=reactions[0].data)``.
    """
    given: dict[str, Species] = {}
    if species is not None:
        items = species.items() if isinstance(species, Mapping) else ((s.key, s) for s in species)
        for k, s in items:
            if not isinstance(s, Species):
                raise InputError(f"species[{k!r}] must be a Species; got {type(s).__name__}")
            given[k] = s
            given[s.key] = s
    out: dict[str, Species] = {}
    for r in reactions:
        for s in r.species:
            out.setdefault(s.key, s)
    for k in feed_keys:
        if k not in out:
            s = given.get(k) or get_species(k, data=reactions[0].data)
            out.setdefault(s.key, s)
    return tuple(out.values())


def default_key(reactions: Sequence[Reaction], feed: Mapping[str, Any]) -> str:
    """First reactant of the first reaction that has a positive feed somewhere."""
    for r in reactions:
        for k, nu in zip(r.keys, r.nu, strict=True):
            if nu < 0 and k in feed and np.any(np.asarray(feed[k], dtype=float) > 0):
                return k
    raise InputError("no reactant of the reactions is in the feed; pass key= explicitly")


def species_key(
    reactions: Sequence[Reaction],
    label: str,
    species: Mapping[str, Species] | Iterable[Species] | None = None,
) -> str:
    """The species key a user label (key, formula, name or CAS) stands for."""
    for r in reactions:
        if label in r.keys:
            return label
    if isinstance(species, Mapping) and label in species:
        return species[label].key
    if species is not None and not isinstance(species, Mapping):
        for s in species:
            if s.key == label:
                return label
    return get_species(label, data=reactions[0].data).key


def keyed(
    reactions: Sequence[Reaction],
    mapping: Mapping[str, Any],
    species: Mapping[str, Species] | Iterable[Species] | None = None,
) -> dict[str, Any]:
    """`mapping` with every label replaced by its species key.

    Raises
    ------
    InputError
        If two labels name the same species.
    """
    out: dict[str, Any] = {}
    for label, v in mapping.items():
        k = species_key(reactions, str(label), species)
        if k in out:
            raise InputError(f"the feed names {k!r} twice (as {label!r})")
        out[k] = v
    return out


def feed_arrays(
    feed: Mapping[str, ArrayLike],
    reactions: Sequence[Reaction],
    species: Mapping[str, Species] | Iterable[Species] | None = None,
) -> dict[str, FloatArray]:
    """Validated float arrays of a feed mapping (amounts >= 0 [mol]), keyed by species key."""
    if not isinstance(feed, Mapping) or not feed:
        raise InputError(f"feed must be a non-empty mapping species -> amount [mol]; got {feed!r}")
    return keyed(reactions, {str(k): as_amount(v, str(k)) for k, v in feed.items()}, species)


@dataclass(frozen=True)
class Solved:
    """Equilibrium on flat (or broadcast) points, species in :func:`species_list` order."""

    species: tuple[str, ...]
    amounts: FloatArray  # (..., ns) [mol]
    extents: FloatArray  # (..., nr) [mol]
    residual: FloatArray  # (..., nr) ln Q - ln K [-]
    converged: BoolArray  # (...)
    gas: BoolArray  # (ns,) True for gas species

    @property
    def mole_fractions(self) -> FloatArray:
        """Gas-phase mole fractions (..., ns) [-]; pure condensed species get 0."""
        return gas_fractions(self.amounts, self.gas)


def gas_mask(species: Sequence[Species]) -> BoolArray:
    """True for gas species, False for pure condensed ones (shape (ns,))."""
    return np.array([s.phase == "g" for s in species], dtype=bool)


def gas_fractions(amounts: FloatArray, gas: BoolArray) -> FloatArray:
    """Gas-phase mole fractions y_i = n_i / Σ_gas n [-]; 0 for condensed species."""
    n_gas = np.where(gas, amounts, 0.0)
    return n_gas / np.sum(n_gas, axis=-1, keepdims=True)


def _stack(mapping: Any, keys: Sequence[str], shape: tuple[int, ...]) -> FloatArray:
    return np.stack(
        [np.broadcast_to(np.asarray(mapping[k], dtype=float), shape) for k in keys], axis=-1
    )


def solve(
    reactions: Sequence[Reaction],
    species: Sequence[Species],
    feed: Mapping[str, FloatArray],
    T: ArrayLike,
    P: ArrayLike,
    *,
    gas: str = "ideal",
    on_failure: str = "raise",
    **options: Any,
) -> Solved:
    """Call :func:`eqconv.equilibrium` and return arrays in the order of `species`.

    Parameters
    ----------
    reactions : sequence of Reaction
    species : sequence of Species
        Order of the species axis of the output (see :func:`species_list`).
    feed : mapping
        Amounts [mol], arrays that broadcast with `T` and `P`.
    T, P : array_like
        Temperature [K] and absolute pressure [Pa].
    gas : str
        Gas model passed through.
    on_failure : {"raise", "flag"}
        ``"raise"``: :class:`~eqconv.ConvergenceError` if any point fails; ``"flag"``:
        ``converged`` False and NaN amounts there.
    **options
        Further keywords of :func:`eqconv.equilibrium`.

    Returns
    -------
    Solved
    """
    from ..equilibrium import equilibrium

    if on_failure not in ("raise", "flag"):
        raise InputError(f"on_failure must be 'raise' or 'flag'; got {on_failure!r}")
    T = as_temperature(T)
    P = as_pressure(P)
    res = equilibrium(list(reactions), dict(feed), T, P, gas=gas, on_failure="flag", **options)
    conv = np.asarray(res.converged, dtype=bool)
    shape = conv.shape
    keys = tuple(s.key for s in species)
    amounts = _stack(res.amounts, keys, shape)
    extents = np.stack(
        [np.broadcast_to(np.asarray(e, dtype=float), shape) for e in res.extents], axis=-1
    )
    residual = np.broadcast_to(np.asarray(res.residuals, dtype=float), (*shape, len(reactions)))
    bad = ~conv
    if np.any(bad):
        amounts = np.where(bad[..., None], np.nan, amounts)
        extents = np.where(bad[..., None], np.nan, extents)
        if on_failure == "raise":
            Tb = np.broadcast_to(T, shape)[bad]
            Pb = np.broadcast_to(P, shape)[bad]
            raise ConvergenceError(
                f"equilibrium did not converge at {int(bad.sum())} of {conv.size} point(s), "
                f"first at T = {float(Tb[0]):g} K, P = {float(Pb[0]):g} Pa; pass "
                "on_failure='flag' to keep the others"
            )
    return Solved(keys, amounts, extents, residual, conv, gas_mask(species))


def conversion_of(amounts: FloatArray, basis: FloatArray) -> FloatArray:
    """Conversion (basis − n)/basis [-] of one species (arrays broadcast)."""
    return (basis - amounts) / basis


def equilibrium_conversion(
    reactions: Reactions,
    feed: Mapping[str, ArrayLike],
    T: ArrayLike,
    P: ArrayLike,
    *,
    key: str | None = None,
    gas: str = "ideal",
    **solver_options: Any,
) -> FloatArray:
    """Equilibrium conversion of `key` [-] (fraction of its feed consumed).

    Parameters
    ----------
    reactions : Reaction or sequence of Reaction
    feed : mapping
        Species key -> amount [mol]; arrays broadcast with `T` and `P`.
    T : array_like
        Temperature [K], > 0.
    P : array_like
        Absolute pressure [Pa], > 0.
    key : str, optional
        Species whose conversion is returned (default: first reactant of the first
        reaction present in the feed).
    gas : str
        Gas model of :func:`eqconv.equilibrium`.

    Returns
    -------
    ndarray
        Conversion [-] on the broadcast shape of `T`, `P` and the feed arrays.

    Raises
    ------
    ConvergenceError
        If any point fails to converge.
    InputError
        If `key` has no feed.
    """
    rxns = as_reactions(reactions)
    f = feed_arrays(feed, rxns)
    k = species_key(rxns, key) if key else default_key(rxns, f)
    if k not in f or np.any(f[k] <= 0.0):
        raise InputError(f"key species {k!r} needs a positive feed amount at every point")
    sp = species_list(rxns, f)
    sol = solve(rxns, sp, f, T, P, gas=gas, **solver_options)
    i = sol.species.index(k)
    return conversion_of(sol.amounts[..., i], f[k])
