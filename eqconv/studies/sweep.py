"""Sweeps of the equilibrium state over T × P × one feed parameter, as an xarray Dataset.

A sweep is the first thing a screening study does: the equilibrium composition and the
conversion of a key reactant everywhere on a grid of temperature, pressure and (optionally)
a feed ratio built by :mod:`eqconv.studies.feeds`. The grid is solved chunk by chunk, so
memory stays bounded by ``chunk_size`` points plus the output; given dask-backed
``xarray.DataArray`` inputs the same code runs block by block on a dask scheduler (local or
a cluster) through :func:`xarray.apply_ufunc` with ``dask="parallelized"``.

Examples
--------
Invented case: water-gas shift of an equimolar CO/H2O feed (Δn = 0, so conversion does not
depend on P).

>>> from eqconv import Reaction
>>> ds = sweep(Reaction("CO + H2O = CO2 + H2", data="janaf"), {"CO": 1.0, "H2O": 1.0},
...            T=[700.0, 900.0], P=[1e5, 1e6])
>>> ds["conversion"].dims
('T', 'P')
>>> bool(ds["conversion"].sel(T=700.0).std() < 1e-12)
True
"""

from __future__ import annotations

import dataclasses
import importlib.metadata
from collections.abc import Callable, Iterable, Mapping
from dataclasses import dataclass
from typing import Any

import numpy as np
from numpy.typing import ArrayLike, NDArray

from .._validate import as_pressure, as_temperature
from ..errors import InputError
from ..reaction import Reaction
from ..species import Species
from ._solve import (
    Reactions,
    as_reactions,
    conversion_of,
    default_key,
    feed_arrays,
    gas_fractions,
    gas_mask,
    keyed,
    require,
    solve,
    species_key,
    species_list,
)
from .feeds import FeedParameter

__all__ = ["Progress", "sweep"]

FloatArray = NDArray[np.float64]
#: Progress callback: called as ``progress(points_done, points_total)``.
Progress = Callable[[int, int], None]

_UNITS = {
    "mole_fraction": "1",
    "amount": "mol",
    "extent": "mol",
    "residual": "1",
    "conversion": "1",
    "converged": "",
    "ln_K": "1",
    "feed_amount": "mol",
}
_LONG = {
    "mole_fraction": "equilibrium gas-phase mole fraction (0 for a condensed species)",
    "amount": "equilibrium amount per feed basis",
    "extent": "extent of reaction",
    "residual": "ln Q - ln K at the solution",
    "conversion": "equilibrium conversion of the key species",
    "converged": "solver met its tolerance at this point",
    "ln_K": "ln K at p° = 1 bar",
    "feed_amount": "feed amount",
}


@dataclass(frozen=True)
class _Context:
    reactions: tuple[Reaction, ...]
    species: tuple[Species, ...]
    keys: tuple[str, ...]
    fixed: dict[str, FloatArray] | None
    parameter: FeedParameter | None
    key: str
    gas: str
    chunk_size: int
    on_failure: str
    options: dict[str, Any]
    progress: Progress | None

    def feed(self, values: FloatArray | None) -> dict[str, FloatArray]:
        if self.parameter is None:
            assert self.fixed is not None
            return self.fixed
        assert values is not None
        return keyed(self.reactions, self.parameter.feed(values), self.species)


def _solve_block(
    ctx: _Context, T: FloatArray, P: FloatArray, values: FloatArray | None = None
) -> tuple[FloatArray, ...]:
    """Solve the broadcast block (T, P[, values]) in chunks; outputs shaped like the block."""
    arrays = [np.asarray(T, dtype=float), np.asarray(P, dtype=float)]
    if values is not None:
        arrays.append(np.asarray(values, dtype=float))
    shape = np.broadcast_shapes(*(a.shape for a in arrays))
    flat = [np.broadcast_to(a, shape).ravel() for a in arrays]
    n = flat[0].size
    ns, nr = len(ctx.keys), len(ctx.reactions)
    amounts = np.empty((n, ns))
    extents = np.empty((n, nr))
    residual = np.empty((n, nr))
    converged = np.empty(n, dtype=bool)
    basis = np.empty(n)
    step = max(1, int(ctx.chunk_size))
    for start in range(0, n, step):
        sl = slice(start, min(n, start + step))
        v = flat[2][sl] if values is not None else None
        feed = ctx.feed(v)
        sol = solve(
            ctx.reactions,
            ctx.species,
            feed,
            flat[0][sl],
            flat[1][sl],
            gas=ctx.gas,
            on_failure=ctx.on_failure,
            **ctx.options,
        )
        m = sl.stop - sl.start
        amounts[sl] = np.broadcast_to(sol.amounts, (m, ns))
        extents[sl] = np.broadcast_to(sol.extents, (m, nr))
        residual[sl] = np.broadcast_to(sol.residual, (m, nr))
        converged[sl] = np.broadcast_to(sol.converged, (m,))
        basis[sl] = np.broadcast_to(feed[ctx.key], (m,))
        if ctx.progress is not None:
            ctx.progress(sl.stop, n)
    x = gas_fractions(amounts, gas_mask(ctx.species))
    conv = conversion_of(amounts[:, ctx.keys.index(ctx.key)], basis)
    return (
        x.reshape(*shape, ns),
        amounts.reshape(*shape, ns),
        extents.reshape(*shape, nr),
        residual.reshape(*shape, nr),
        conv.reshape(shape),
        converged.reshape(shape),
    )


def _as_dataarray(xr: Any, value: Any, dim: str, check: Callable[[Any], Any]) -> Any:
    """A DataArray for one grid input; arrays become a 1-D coordinate named `dim`."""
    if isinstance(value, xr.DataArray):
        if not _is_dask(value):
            check(value.values)
        return value
    arr = np.atleast_1d(np.asarray(check(value), dtype=float))
    if arr.ndim != 1:
        raise InputError(
            f"{dim} must be a scalar or 1-D array (or an xarray.DataArray); got shape {arr.shape}"
        )
    return xr.DataArray(arr, dims=(dim,), coords={dim: arr})


def _is_dask(da: Any) -> bool:
    return type(da.data).__module__.startswith("dask")


def sweep(
    reactions: Reactions,
    feed: Mapping[str, float] | FeedParameter,
    T: ArrayLike | Any,
    P: ArrayLike | Any,
    *,
    values: ArrayLike | Any | None = None,
    key: str | None = None,
    gas: str = "ideal",
    chunk_size: int = 20_000,
    progress: Progress | None = None,
    on_failure: str = "raise",
    species: Mapping[str, Species] | Iterable[Species] | None = None,
    **solver_options: Any,
) -> Any:
    """Equilibrium state on the grid T × P (× a feed parameter), as an ``xarray.Dataset``.

    Parameters
    ----------
    reactions : Reaction or sequence of Reaction
        Independent reactions.
    feed : mapping or FeedParameter
        Fixed feed (species key -> amount [mol], scalars), or a :class:`FeedParameter`
        whose `values` span the third dimension.
    T : array_like or xarray.DataArray
        Temperatures [K], > 0: a scalar or 1-D array gives dimension ``"T"``; a DataArray
        (numpy- or dask-backed) keeps its own dims.
    P : array_like or xarray.DataArray
        Absolute pressures [Pa], > 0; dimension ``"P"``.
    values : array_like or xarray.DataArray, optional
        Values of the feed parameter (required iff `feed` is a FeedParameter); dimension
        ``feed.name``.
    key : str, optional
        Species whose conversion is reported (default: first reactant of the first
        reaction in the feed).
    gas : str
        Gas model of :func:`eqconv.equilibrium`.
    chunk_size : int
        Grid points per solver call, > 0 (memory is bounded by a few kB per point of a
        chunk plus the output).
    progress : callable, optional
        ``progress(done, total)`` after each chunk (in-memory inputs; with dask use dask's
        own diagnostics).
    on_failure : {"raise", "flag"}
        ``"raise"`` (default): :class:`~eqconv.ConvergenceError` naming the first failed
        point; ``"flag"``: ``converged`` is False and the state NaN there.
    species : mapping, optional
        Species objects for inert feed species (default: resolved from the reactions'
        data source).
    **solver_options
        Passed to :func:`eqconv.equilibrium`.

    Returns
    -------
    xarray.Dataset
        Variables ``mole_fraction``, ``amount`` (grid + ``species``), ``extent``,
        ``residual`` (grid + ``reaction``), ``conversion``, ``converged`` (grid), ``ln_K``
        (T dims + ``reaction``), ``feed_amount``; units in each variable's attrs. Lazy
        (dask-backed) when any input is.

    Raises
    ------
    InputError
        Bad T, P, feed, values, key or chunk size.
    ConvergenceError
        With ``on_failure="raise"`` if any point fails.
    ImportError
        If xarray (or dask, for dask inputs) is not installed.

    Notes
    -----
    Conversion X = (n_key,feed − n_key)/n_key,feed. The Dataset's grid dims are the
    broadcast of the inputs' dims, in the order T, P, parameter for 1-D inputs.
    """
    xr = require("xarray")
    rxns = as_reactions(reactions)
    if int(chunk_size) <= 0:
        raise InputError(f"chunk_size must be a positive number of points; got {chunk_size!r}")
    if isinstance(feed, FeedParameter):
        if values is None:
            raise InputError(f"feed parameter {feed.name!r} needs values=")
        parameter: FeedParameter | None = feed
        if isinstance(values, xr.DataArray):
            probe_values = (
                np.asarray(values.values) if not _is_dask(values) else np.mean(_finite_bounds(feed))
            )
        else:
            probe_values = np.asarray(values, dtype=float)
        probe = keyed(rxns, feed.feed(np.atleast_1d(probe_values)), species)
        fixed = None
        feed_keys = list(probe)
    else:
        if values is not None:
            raise InputError("values= is only used with a FeedParameter feed")
        parameter = None
        fixed = feed_arrays(feed, rxns, species)
        for k, a in fixed.items():
            if a.ndim != 0:
                raise InputError(
                    f"feed[{k!r}] must be a scalar in a sweep; vary a feed "
                    "through a FeedParameter and values="
                )
        probe = fixed
        feed_keys = list(fixed)
    k = species_key(rxns, key, species) if key else default_key(rxns, probe)
    if k not in probe:
        raise InputError(f"key species {k!r} is not in the feed {sorted(probe)}")
    sp = species_list(rxns, feed_keys, species)
    keys = tuple(s.key for s in sp)
    ctx = _Context(
        rxns,
        sp,
        keys,
        fixed,
        parameter,
        k,
        gas,
        int(chunk_size),
        on_failure,
        dict(solver_options),
        progress,
    )

    Tda = _as_dataarray(xr, T, "T", as_temperature)
    Pda = _as_dataarray(xr, P, "P", as_pressure)
    inputs = [Tda, Pda]
    if parameter is not None:
        pname = parameter.name
        Vda = _as_dataarray(xr, values, pname, parameter.check)
        inputs.append(Vda)
    lazy = any(_is_dask(a) for a in inputs)
    if lazy:
        require("dask", extra="dask")
        ctx = dataclasses.replace(ctx, progress=None)  # per-block counts would mislead
    ns, nr = len(keys), len(rxns)
    reaction_labels = [r.equation for r in rxns]

    def block(*arrays: FloatArray) -> tuple[FloatArray, ...]:
        return _solve_block(ctx, *arrays)

    outs = xr.apply_ufunc(
        block,
        *inputs,
        input_core_dims=[[] for _ in inputs],
        output_core_dims=[["species"], ["species"], ["reaction"], ["reaction"], [], []],
        dask="parallelized" if lazy else "forbidden",
        output_dtypes=[float, float, float, float, float, bool],
        dask_gufunc_kwargs={"output_sizes": {"species": ns, "reaction": nr}},
    )
    names = ("mole_fraction", "amount", "extent", "residual", "conversion", "converged")
    data = dict(zip(names, outs, strict=True))

    def ln_k_block(t: FloatArray) -> FloatArray:
        t = np.asarray(t, dtype=float)
        return np.stack([np.broadcast_to(r.ln_K(t), t.shape) for r in rxns], axis=-1)

    data["ln_K"] = xr.apply_ufunc(
        ln_k_block,
        Tda,
        output_core_dims=[["reaction"]],
        dask="parallelized" if _is_dask(Tda) else "forbidden",
        output_dtypes=[float],
        dask_gufunc_kwargs={"output_sizes": {"reaction": nr}},
    )
    if parameter is not None:

        def feed_block(v: FloatArray) -> FloatArray:
            v = np.asarray(v, dtype=float)
            f = ctx.feed(v)
            return np.stack([np.broadcast_to(f.get(s, 0.0), v.shape) for s in keys], -1)

        data["feed_amount"] = xr.apply_ufunc(
            feed_block,
            inputs[2],
            output_core_dims=[["species"]],
            dask="parallelized" if _is_dask(inputs[2]) else "forbidden",
            output_dtypes=[float],
            dask_gufunc_kwargs={"output_sizes": {"species": ns}},
        )
    elif fixed is not None:
        data["feed_amount"] = xr.DataArray(
            [float(fixed.get(s, 0.0)) for s in keys], dims=("species",)
        )
    ds = xr.Dataset(data)
    ds = ds.assign_coords(species=list(keys), reaction=reaction_labels)
    order = [d for d in ("T", "P", parameter.name if parameter else "") if d in ds.dims]
    rest = [d for d in ds.dims if d not in order and d not in ("species", "reaction")]
    ds = ds.transpose(*order, *rest, ...)
    for name, var in ds.data_vars.items():
        var.attrs["units"] = _UNITS[str(name)]
        var.attrs["long_name"] = _LONG[str(name)]
    ds["conversion"].attrs["key"] = k
    if "T" in ds.coords:
        ds["T"].attrs.update(units="K", long_name="temperature")
    if "P" in ds.coords:
        ds["P"].attrs.update(units="Pa", long_name="absolute pressure")
    if parameter is not None and parameter.name in ds.coords:
        ds[parameter.name].attrs.update(units=parameter.unit, long_name=parameter.description)
    ds.attrs.update(
        key=k,
        gas=gas,
        reactions=reaction_labels,
        parameter=parameter.name if parameter else "",
        parameter_definition=parameter.description if parameter else "",
        eqconv_version=_version(),
    )
    return ds


def _finite_bounds(p: FeedParameter) -> tuple[float, float]:
    lo, hi = p.bounds
    lo = lo if np.isfinite(lo) else -1.0
    hi = hi if np.isfinite(hi) else lo + 2.0
    return (lo, hi)


def _version() -> str:
    try:
        return importlib.metadata.version("eqconv")
    except importlib.metadata.PackageNotFoundError:  # pragma: no cover
        return "unknown"
