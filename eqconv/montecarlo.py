"""Monte Carlo propagation of data uncertainty to equilibrium conversion and composition.

This module holds

* :class:`EquilibriumSystem` and :func:`build_system`: the nominal equilibrium on a grid
  and the arrays to re-solve it with other ln K (shared with :mod:`eqconv.sensitivity`),
  with :func:`conversion_index` and :func:`state` to read conversion and mole fractions
  off the amounts;
* :func:`monte_carlo_equilibrium`: Monte Carlo bands (:class:`Band`) of equilibrium
  conversion, composition and extents at every grid point, gathered in a
  :class:`MonteCarloResult`. The samples are one more array dimension of the vectorized
  solver (:func:`eqconv.extent_solver.solve_extents`), chunked, with progress reporting,
  clean interruption (:class:`MonteCarloInterrupted`) and a seed.

The data-uncertainty model (:func:`~eqconv.uncertainty.data_uncertainty`) and the
propagation to ln K (:func:`~eqconv.uncertainty.ln_K_uncertainty`) that this module draws
on are in :mod:`eqconv.uncertainty`, which also re-exports the names defined here.

Notes
-----
Sample s draws correlated data errors θ_s (:meth:`~eqconv.uncertainty.DataUncertainty.draw`)
and sets ln K_s(T) = ln K(T) + θ_s · ∂ln K/∂θ, which is exact because ln K is linear in
θ; the equilibrium conversion is non-linear in ln K, and the Monte Carlo bands carry that
non-linearity where the first-order propagation cannot [1]_, [2]_. Mean and standard
deviation are merged chunk by chunk with the pairwise update of [3]_, so memory does not
grow with the number of samples unless percentiles or samples are asked for.

References
----------
.. [1] JCGM 100:2008, Evaluation of measurement data - Guide to the expression of
   uncertainty in measurement (GUM), §5 (law of propagation of uncertainty).
.. [2] JCGM 101:2008, Propagation of distributions using a Monte Carlo method.
.. [3] T. F. Chan, G. H. Golub and R. J. LeVeque, Updating formulae and a pairwise
   algorithm for computing sample variances, Stanford University report STAN-CS-79-773
   (1979).
"""

from __future__ import annotations

import sys
import time
import warnings
from collections.abc import Callable, Iterable, Mapping, Sequence
from dataclasses import dataclass
from typing import TYPE_CHECKING, Any, Literal

import numpy as np
from numpy.typing import ArrayLike, NDArray

from ._validate import as_temperature
from .constants import P_BAR
from .errors import InputError
from .reaction import Reaction

if TYPE_CHECKING:
    from .uncertainty import DataUncertainty

__all__ = [
    "Band",
    "MonteCarloInterrupted",
    "MonteCarloResult",
    "monte_carlo_equilibrium",
]

FloatArray = NDArray[np.float64]


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

    # eqconv.uncertainty re-exports this module's names, so it is imported here, not at the top
    from .uncertainty import _check_keys, _nu_matrix, data_uncertainty, ln_K_uncertainty

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
    from .uncertainty import _n_samples, as_generator

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
