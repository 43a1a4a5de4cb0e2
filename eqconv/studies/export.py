"""Tables and files from a sweep: a tidy DataFrame, CSV with units in the header, JSON.

A colleague who opens the CSV in a spreadsheet sees ``T [K]``, ``P [Pa]``, ``x_NH3 [1]`` ...;
:func:`read_sweep_csv` turns those headers back into plain column names with the units in
``DataFrame.attrs["units"]``. The JSON file holds the whole Dataset (coordinates,
attributes, units) and :func:`read_sweep_json` rebuilds it. Existing files are never
overwritten unless ``overwrite=True``.
"""

from __future__ import annotations

import json
import math
import re
from pathlib import Path
from typing import Any

import numpy as np

from ..errors import InputError
from ._solve import require

__all__ = [
    "read_sweep_csv",
    "read_sweep_json",
    "sweep_dataframe",
    "write_sweep_csv",
    "write_sweep_json",
]

_FORMAT = "eqconv-sweep/1"
_HEADER = re.compile(r"^(?P<name>.*?) \[(?P<unit>[^\]]*)\]$")


def _grid(ds: Any) -> list[str]:
    return [str(d) for d in ds["conversion"].dims]


def sweep_dataframe(ds: Any) -> Any:
    """Tidy table of a sweep: one row per grid point.

    Parameters
    ----------
    ds : xarray.Dataset
        Result of :func:`eqconv.studies.sweep` (lazy results are computed).

    Returns
    -------
    pandas.DataFrame
        Columns: the grid dims (``T`` [K], ``P`` [Pa], the feed parameter), ``x_<species>``
        [1], ``n_<species>`` [mol], ``feed_<species>`` [mol], ``extent_<j>`` [mol],
        ``residual_<j>`` [1], ``ln_K_<j>`` [1] (j = 1, 2, ... in reaction order),
        ``conversion`` [1], ``converged``. ``attrs``: ``units`` (column -> unit),
        ``reactions``, ``key``, ``parameter``.
    """
    pd = require("pandas")
    ds = ds.compute()
    grid = _grid(ds)
    species = [str(s) for s in ds["species"].values]
    reactions = [str(r) for r in ds["reaction"].values]
    shape = tuple(ds.sizes[d] for d in grid)
    cols: dict[str, Any] = {}
    units: dict[str, str] = {}
    mesh = np.meshgrid(*[ds[d].values for d in grid], indexing="ij")
    for d, m in zip(grid, mesh, strict=True):
        cols[d] = m.ravel()
        units[d] = str(ds[d].attrs.get("units", ""))

    def spread(var: str, prefix: str, labels: list[str], dim: str, unit: str) -> None:
        da = ds[var].broadcast_like(ds["conversion"]).transpose(*grid, dim)
        values = da.values.reshape(-1, len(labels))
        for i, lab in enumerate(labels):
            cols[f"{prefix}{lab}"] = values[:, i]
            units[f"{prefix}{lab}"] = unit

    spread("mole_fraction", "x_", species, "species", "1")
    spread("amount", "n_", species, "species", "mol")
    if "feed_amount" in ds:
        spread("feed_amount", "feed_", species, "species", "mol")
    idx = [str(j + 1) for j in range(len(reactions))]
    spread("extent", "extent_", idx, "reaction", "mol")
    spread("residual", "residual_", idx, "reaction", "1")
    spread("ln_K", "ln_K_", idx, "reaction", "1")
    cols["conversion"] = ds["conversion"].transpose(*grid).values.reshape(-1)
    units["conversion"] = "1"
    cols["converged"] = ds["converged"].transpose(*grid).values.reshape(-1)
    units["converged"] = ""
    assert all(np.size(v) == int(np.prod(shape)) for v in cols.values())
    df = pd.DataFrame(cols)
    df.attrs.update(
        units=units,
        reactions=reactions,
        key=str(ds.attrs.get("key", "")),
        parameter=str(ds.attrs.get("parameter", "")),
    )
    return df


def _target(path: str | Path, overwrite: bool) -> Path:
    p = Path(path)
    if p.exists() and not overwrite:
        raise InputError(f"{p} exists; pass overwrite=True to replace it")
    if not p.parent.exists():
        raise InputError(f"folder {p.parent} does not exist")
    return p


def write_sweep_csv(data: Any, path: str | Path, *, overwrite: bool = False) -> Path:
    """Write a sweep (Dataset or its :func:`sweep_dataframe`) as CSV, units in the header.

    Parameters
    ----------
    data : xarray.Dataset or pandas.DataFrame
    path : str or Path
        Output file; its folder must exist.
    overwrite : bool
        Replace an existing file.

    Returns
    -------
    Path

    Raises
    ------
    InputError
        If the file exists and `overwrite` is False.
    """
    pd = require("pandas")
    df = data if isinstance(data, pd.DataFrame) else sweep_dataframe(data)
    units = df.attrs.get("units", {})
    p = _target(path, overwrite)
    out = df.rename(columns={c: f"{c} [{units[c]}]" if units.get(c) else c for c in df.columns})
    out.to_csv(p, index=False, float_format="%.17g")
    return p


def read_sweep_csv(path: str | Path) -> Any:
    """Read a CSV written by :func:`write_sweep_csv` (units back into ``attrs["units"]``).

    Returns
    -------
    pandas.DataFrame
    """
    pd = require("pandas")
    df = pd.read_csv(path)
    names: dict[str, str] = {}
    units: dict[str, str] = {}
    for c in df.columns:
        m = _HEADER.match(str(c))
        name, unit = (m.group("name"), m.group("unit")) if m else (str(c), "")
        names[str(c)] = name
        units[name] = unit
    df = df.rename(columns=names)
    if "converged" in df:
        df["converged"] = df["converged"].astype(bool)
    df.attrs["units"] = units
    return df


def _clean(obj: Any) -> Any:
    """JSON-safe copy: NaN -> None, numpy scalars -> Python."""
    if isinstance(obj, dict):
        return {str(k): _clean(v) for k, v in obj.items()}
    if isinstance(obj, list | tuple):
        return [_clean(v) for v in obj]
    if isinstance(obj, np.generic):
        obj = obj.item()
    if isinstance(obj, float) and not math.isfinite(obj):
        return None if math.isnan(obj) else ("inf" if obj > 0 else "-inf")
    if isinstance(obj, np.ndarray):
        return _clean(obj.tolist())
    return obj


def write_sweep_json(ds: Any, path: str | Path, *, overwrite: bool = False) -> Path:
    """Write a sweep Dataset as JSON (data, coordinates, attributes, dtypes).

    NaN (a flagged point) is written as ``null``, infinities as ``"inf"`` / ``"-inf"``.

    Raises
    ------
    InputError
        If the file exists and `overwrite` is False.
    """
    p = _target(path, overwrite)
    ds = ds.compute()
    d = ds.to_dict(data="list")
    d["format"] = _FORMAT
    d["dtypes"] = {str(k): str(v.dtype) for k, v in ds.variables.items()}
    p.write_text(json.dumps(_clean(d), indent=1), encoding="utf-8")
    return p


def _restore(values: Any, dtype: str) -> Any:
    if dtype.startswith("float"):
        arr = np.array(values, dtype=object)
        arr[arr == None] = np.nan  # noqa: E711 - elementwise comparison on an object array
        arr[arr == "inf"] = np.inf
        arr[arr == "-inf"] = -np.inf
        return arr.astype(float)
    if dtype == "bool":
        return np.array(values, dtype=bool)
    if dtype.startswith("<U") or dtype == "object":
        return np.array(values, dtype=str)
    return np.array(values, dtype=dtype)


def read_sweep_json(path: str | Path) -> Any:
    """Rebuild the Dataset written by :func:`write_sweep_json`.

    Raises
    ------
    InputError
        If the file is not an eqconv sweep.
    """
    xr = require("xarray")
    d = json.loads(Path(path).read_text(encoding="utf-8"))
    if d.pop("format", None) != _FORMAT:
        raise InputError(f"{path} is not an eqconv sweep file (format {_FORMAT!r} expected)")
    dtypes = d.pop("dtypes")
    for group in ("coords", "data_vars"):
        for name, var in d.get(group, {}).items():
            var["data"] = _restore(var["data"], dtypes[name])
    return xr.Dataset.from_dict(d)
