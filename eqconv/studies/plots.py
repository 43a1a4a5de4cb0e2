"""Plots of screening studies (matplotlib, imported only when a plot is drawn).

Every function draws on the Axes it is given (``ax=``) or on a new figure, and returns that
Axes, so plots compose into an engineer's own figures. Inputs are SI (T [K], P [Pa]); the
units shown are chosen by `temperature_unit` and `pressure_unit` and converted only for
display, and every axis label carries its unit.

* :func:`vant_hoff_plot` — ln K against 1000/T for a reaction, Kirchhoff and constant-ΔrH°
  models, with the least-squares straight line whose slope is read out as ΔrH°.
* :func:`conversion_vs_temperature` — equilibrium conversion against T at several pressures.
* :func:`conversion_map` — the conversion map on the T–P plane with target contours.
* :func:`staging_diagram` — conversion against temperature for adiabatic beds with interstage
  cooling, with the equilibrium curve.

Matplotlib is an optional dependency (``pip install "eqconv[plots]"``).
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence
from typing import TYPE_CHECKING, Any

import numpy as np
from numpy.typing import ArrayLike, NDArray

from .._validate import as_temperature
from ..constants import R
from ..errors import InputError
from ..reaction import Reaction

if TYPE_CHECKING:
    from matplotlib.axes import Axes

__all__ = [
    "PRESSURE_UNITS",
    "TEMPERATURE_UNITS",
    "conversion_map",
    "conversion_vs_temperature",
    "staging_diagram",
    "vant_hoff_plot",
]

#: Display units of temperature: label text, and (a, b) with T [K] = a × shown + b.
TEMPERATURE_UNITS: dict[str, tuple[str, float, float]] = {
    "K": ("K", 1.0, 0.0),
    "degC": ("°C", 1.0, 273.15),
}
#: Display units of absolute pressure: label text and Pa per unit.
PRESSURE_UNITS: dict[str, tuple[str, float]] = {
    "bar": ("bar", 1e5),
    "MPa": ("MPa", 1e6),
    "kPa": ("kPa", 1e3),
    "atm": ("atm", 101325.0),
    "psia": ("psia", 6894.757293168361),
    "Pa": ("Pa", 1.0),
}

FloatArray = NDArray[np.float64]


def _pyplot() -> Any:
    try:
        import matplotlib.pyplot as plt
    except ImportError as exc:  # pragma: no cover - the test environment has matplotlib
        raise ImportError(
            'plots need the optional package matplotlib: pip install "eqconv[plots]"'
        ) from exc
    return plt


def _axes(ax: Axes | None) -> Axes:
    if ax is not None:
        return ax
    _, new = _pyplot().subplots(figsize=(7.0, 4.8), layout="constrained")
    return new


def _t_show(T: ArrayLike, unit: str) -> FloatArray:
    if unit not in TEMPERATURE_UNITS:
        raise InputError(f"temperature_unit must be one of {list(TEMPERATURE_UNITS)}; got {unit!r}")
    _, a, b = TEMPERATURE_UNITS[unit]
    return (np.asarray(T, dtype=float) - b) / a


def _p_show(P: ArrayLike, unit: str) -> FloatArray:
    if unit not in PRESSURE_UNITS:
        raise InputError(f"pressure_unit must be one of {list(PRESSURE_UNITS)}; got {unit!r}")
    return np.asarray(P, dtype=float) / PRESSURE_UNITS[unit][1]


def _t_label(unit: str) -> str:
    return f"T [{TEMPERATURE_UNITS[unit][0]}]"


def _p_label(unit: str) -> str:
    return f"P [{PRESSURE_UNITS[unit][0]}]"


def _conversion_label(key: str) -> str:
    return f"equilibrium conversion of {key} [-]"


# --------------------------------------------------------------------------- van 't Hoff
def vant_hoff_plot(
    reaction: Reaction,
    T: ArrayLike,
    *,
    ax: Axes | None = None,
    models: Sequence[str] = ("kirchhoff", "vant_hoff"),
    fit: bool = True,
) -> Axes:
    """Van 't Hoff plot: ln K against 1000/T, with the fitted straight line and its ΔrH°.

    Parameters
    ----------
    reaction : Reaction
        The reaction; K on p° = 1 bar.
    T : array_like, shape (n,)
        Temperatures [K], > 0, n >= 3 when `fit` is True.
    ax : matplotlib Axes, optional
        Where to draw; a new figure when omitted.
    models : sequence of {"kirchhoff", "vant_hoff"}
        K models drawn: ΔrCp° integrated (Kirchhoff), or ΔrH°, ΔrS° held at 298.15 K.
    fit : bool
        Draw the least-squares line through the Kirchhoff ln K
        (:func:`eqconv.vanthoff.fit_vant_hoff`) and read its slope out as ΔrH° in the legend.

    Returns
    -------
    matplotlib Axes
        Lines are labelled ``"Kirchhoff (ΔrCp° integrated)"``, ``"van 't Hoff (ΔrH°, ΔrS° at
        298.15 K)"`` and ``"fit: ΔrH° = ... kJ/mol"``; a top axis shows T [K].

    Notes
    -----
    The integrated van 't Hoff equation with a constant ΔrH°,
    ln K = −ΔrH°/(R T) + ΔrS°/R, is a straight line in 1/T of slope −ΔrH°/R; the fitted
    ΔrH° is the mean over the plotted range, and curvature of the Kirchhoff line shows
    where ΔrCp° matters.

    References
    ----------
    .. [1] J. M. Smith, H. C. Van Ness, M. M. Abbott, *Introduction to Chemical Engineering
       Thermodynamics*, 7th ed., McGraw-Hill (2005), ch. 13.
    """
    from ..vanthoff import fit_vant_hoff

    t = np.sort(as_temperature(np.atleast_1d(T)))
    if t.ndim != 1 or t.size < 2:
        raise InputError(f"T must be a 1-D array of at least 2 temperatures; got shape {t.shape}")
    labels = {
        "kirchhoff": "Kirchhoff (ΔrCp° integrated)",
        "vant_hoff": "van 't Hoff (ΔrH°, ΔrS° at 298.15 K)",
    }
    styles = {"kirchhoff": "-", "vant_hoff": "--"}
    ax = _axes(ax)
    x = 1000.0 / t
    ln_k_kirchhoff = reaction.ln_K(t, model="kirchhoff")
    for model in models:
        if model not in labels:
            raise InputError(f"models must be among {list(labels)}; got {model!r}")
        y = ln_k_kirchhoff if model == "kirchhoff" else reaction.ln_K(t, model="vant_hoff")
        ax.plot(x, y, styles[model], lw=2.0, label=labels[model])
    if fit:
        with np.errstate(over="raise"):
            try:
                K = np.exp(ln_k_kirchhoff)
            except FloatingPointError:
                raise InputError("K overflows over this T range; narrow the range") from None
        result = fit_vant_hoff(t, K)
        line = -result.delta_H / (R * t) + result.delta_S / R
        ax.plot(
            x,
            line,
            ":",
            color="k",
            lw=1.5,
            label=f"fit: ΔrH° = {result.delta_H / 1e3:.1f} kJ/mol ({t.min():.0f}–{t.max():.0f} K)",
        )
    ax.set_xlabel("1000 / T [1/K]")
    ax.set_ylabel("ln K [-] (p° = 1 bar)")
    ax.set_title(reaction.equation)
    top = ax.secondary_xaxis("top", functions=(_inverse_kilo, _inverse_kilo))
    top.set_xlabel("T [K]")
    ax.grid(True, alpha=0.3)
    ax.legend(loc="best", fontsize="small")
    return ax


def _inverse_kilo(x: ArrayLike) -> FloatArray:
    """1000/x, safe at 0 (used for the secondary T axis)."""
    arr = np.asarray(x, dtype=float)
    with np.errstate(divide="ignore"):
        return np.where(arr == 0.0, np.inf, 1000.0 / np.where(arr == 0.0, 1.0, arr))


# ---------------------------------------------------------------------- sweep datasets
def _select(ds: Any, select: Mapping[str, float] | None, keep: tuple[str, ...]) -> Any:
    """Pick one value (nearest) of every dimension not in `keep`."""
    conv = ds["conversion"]
    choose = dict(select or {})
    for dim in conv.dims:
        if dim in keep or dim in choose:
            continue
        if conv.sizes[dim] == 1:
            choose[dim] = float(conv[dim].values[0])
        else:
            raise InputError(
                f"the sweep has a dimension {dim!r} of size {conv.sizes[dim]}; choose a value "
                f"with select={{{dim!r}: ...}}"
            )
    unknown = set(choose) - set(conv.dims)
    if unknown:
        raise InputError(f"select names {sorted(unknown)}, not dimensions of {list(conv.dims)}")
    return conv.sel(choose, method="nearest") if choose else conv


def _describe_selection(conv: Any, keep: tuple[str, ...]) -> str:
    parts = []
    for name, coord in conv.coords.items():
        if name in keep or coord.ndim != 0 or name == "species":
            continue
        unit = coord.attrs.get("units", "")
        parts.append(f"{name} = {float(coord.values):g} {unit}".strip())
    return ", ".join(parts)


def conversion_vs_temperature(
    ds: Any,
    *,
    pressures: ArrayLike | None = None,
    select: Mapping[str, float] | None = None,
    ax: Axes | None = None,
    temperature_unit: str = "degC",
    pressure_unit: str = "bar",
) -> Axes:
    """Equilibrium conversion against temperature, one line per pressure.

    Parameters
    ----------
    ds : xarray.Dataset
        A sweep (:func:`eqconv.studies.sweep`) with dims ``"T"`` and ``"P"``.
    pressures : array_like, optional
        Pressures to draw [Pa absolute] (nearest grid values); default all, or at most
        eight spread over the grid.
    select : mapping, optional
        Value of every further dimension (e.g. ``{"H2_to_N2": 3.0}``), nearest grid value.
    ax : matplotlib Axes, optional
    temperature_unit : {"K", "degC"}
    pressure_unit : {"bar", "MPa", "kPa", "atm", "psia", "Pa"}

    Returns
    -------
    matplotlib Axes
        One line per pressure, labelled e.g. ``"150 bar"``.
    """
    conv = _select(ds, select, ("T", "P"))
    P_grid = np.asarray(conv["P"].values, dtype=float)
    if pressures is None:
        idx = np.unique(np.linspace(0, P_grid.size - 1, min(P_grid.size, 8)).round().astype(int))
    else:
        want = np.atleast_1d(np.asarray(pressures, dtype=float))
        idx = np.unique(np.abs(np.log(P_grid)[None, :] - np.log(want)[:, None]).argmin(axis=1))
    ax = _axes(ax)
    T_show = _t_show(conv["T"].values, temperature_unit)
    for i in idx:
        line = conv.isel(P=int(i)).transpose("T").values
        p_show = float(_p_show(P_grid[i], pressure_unit))
        ax.plot(T_show, line, "-", lw=2.0, label=f"{p_show:.4g} {PRESSURE_UNITS[pressure_unit][0]}")
    key = ds.attrs.get("key", conv.attrs.get("key", "key species"))
    ax.set_xlabel(_t_label(temperature_unit))
    ax.set_ylabel(_conversion_label(key))
    extra = _describe_selection(conv, ("T", "P"))
    ax.set_title(
        f"Equilibrium conversion ({ds.attrs.get('gas', 'ideal')} gas)"
        + (f", {extra}" if extra else "")
    )
    ax.set_ylim(0.0, 1.0)
    ax.grid(True, alpha=0.3)
    ax.legend(title="P", fontsize="small")
    return ax


def conversion_map(
    ds: Any,
    *,
    targets: Sequence[float] = (),
    exact: Sequence[tuple[ArrayLike, Any]] = (),
    select: Mapping[str, float] | None = None,
    ax: Axes | None = None,
    temperature_unit: str = "degC",
    pressure_unit: str = "bar",
    log_pressure: bool | None = None,
) -> Axes:
    """Conversion map on the T–P plane (filled contours) with target-conversion contours.

    Parameters
    ----------
    ds : xarray.Dataset
        A sweep with dims ``"T"`` and ``"P"`` (at least 2 values each).
    targets : sequence of float
        Target conversions (0–1) drawn as labelled black contour lines of the grid.
    exact : sequence of (array_like, TargetResult)
        Exact target roots drawn as dashed white lines over the map: for a result with
        ``quantity == "P"`` (from :func:`eqconv.studies.conversion_contour`) the array is the
        temperatures [K] it was solved at; for ``quantity == "T"`` the pressures [Pa].
    select : mapping, optional
        Value of every further dimension (nearest grid value).
    ax : matplotlib Axes, optional
    temperature_unit : {"K", "degC"}
    pressure_unit : {"bar", "MPa", "kPa", "atm", "psia", "Pa"}
    log_pressure : bool, optional
        Logarithmic pressure axis; default when the grid spans more than a factor of 10.

    Returns
    -------
    matplotlib Axes
        The filled map, its colour bar, one contour set at `targets` (labelled
        ``"X = 0.30"``) and one line per exact result.
    """
    conv = _select(ds, select, ("T", "P")).transpose("P", "T")
    T = np.asarray(conv["T"].values, dtype=float)
    P = np.asarray(conv["P"].values, dtype=float)
    if T.size < 2 or P.size < 2:
        raise InputError(
            f"a map needs at least 2 temperatures and 2 pressures; got {T.size} and {P.size}"
        )
    levels_t = sorted(float(x) for x in targets)
    if any(not 0.0 < x < 1.0 for x in levels_t):
        raise InputError(f"targets must be conversions between 0 and 1; got {levels_t}")
    ax = _axes(ax)
    X, Y = np.meshgrid(_t_show(T, temperature_unit), _p_show(P, pressure_unit))
    Z = np.ma.masked_invalid(np.asarray(conv.values, dtype=float))
    from matplotlib.ticker import MaxNLocator

    finite = np.asarray(Z.compressed(), dtype=float)
    if finite.size == 0:
        raise InputError("the sweep has no converged point to map")
    lo, hi = float(finite.min()), float(finite.max())
    if hi - lo < 1e-6:
        lo, hi = max(lo - 0.005, 0.0), min(hi + 0.005, 1.0)
    levels = MaxNLocator(nbins=20).tick_values(lo, hi)
    filled = ax.contourf(X, Y, Z, levels=levels, cmap="viridis", extend="neither")
    key = ds.attrs.get("key", "key species")
    ax.figure.colorbar(filled, ax=ax, label=_conversion_label(key))
    if levels_t:
        lines = ax.contour(X, Y, Z, levels=levels_t, colors="k", linewidths=1.5)
        ax.clabel(lines, fmt={lv: f"X = {lv:.2f}" for lv in lines.levels}, fontsize="small")
    for coord, res in exact:
        value = np.asarray(res.value, dtype=float)
        other = np.broadcast_to(np.asarray(coord, dtype=float), value.shape)
        target = float(np.ravel(res.target)[0])
        if res.quantity == "P":
            xs, ys = _t_show(other, temperature_unit), _p_show(value, pressure_unit)
        elif res.quantity == "T":
            xs, ys = _t_show(value, temperature_unit), _p_show(other, pressure_unit)
        else:
            raise InputError(f"exact results must solve for 'T' or 'P'; got {res.quantity!r}")
        ax.plot(xs, ys, "--", color="w", lw=1.8, label=f"exact root, X = {target:.2f}")
    if log_pressure is None:
        log_pressure = P.max() / P.min() > 10.0
    if log_pressure:
        ax.set_yscale("log")
    ax.set_xlim(float(X.min()), float(X.max()))  # the map, not the exact lines, sets the frame
    ax.set_ylim(float(Y.min()), float(Y.max()))
    ax.set_xlabel(_t_label(temperature_unit))
    ax.set_ylabel(_p_label(pressure_unit) + " (absolute)")
    extra = _describe_selection(conv, ("T", "P"))
    ax.set_title(
        f"Equilibrium conversion map ({ds.attrs.get('gas', 'ideal')} gas)"
        + (f", {extra}" if extra else "")
    )
    if exact:
        ax.legend(loc="best", fontsize="small", facecolor="0.7")
    return ax


# ---------------------------------------------------------------------------- staging
def staging_diagram(
    result: Any,
    reactions: Reaction | Sequence[Reaction],
    feed: Mapping[str, float],
    *,
    T: ArrayLike | None = None,
    gas: str = "ideal",
    ax: Axes | None = None,
    temperature_unit: str = "degC",
    points: int = 50,
    **solver_options: Any,
) -> Axes:
    """Conversion–temperature diagram of adiabatic beds with interstage cooling.

    Parameters
    ----------
    result : StagingResult
        From :func:`eqconv.studies.stage_beds`.
    reactions, feed
        The reactions and the fresh feed [mol] the staging was computed for; they give the
        equilibrium curve X_eq(T) at the staging pressure.
    T : array_like, optional
        Temperatures of the equilibrium curve [K]; default from 60 K below the coldest inlet
        to 80 K above the hottest outlet.
    gas : str
        Gas model of the equilibrium curve (as in the staging).
    ax : matplotlib Axes, optional
    temperature_unit : {"K", "degC"}
    points : int
        Points per adiabatic line.
    **solver_options
        Passed to :func:`eqconv.studies.equilibrium_conversion`.

    Returns
    -------
    matplotlib Axes
        Lines labelled ``"equilibrium"``, ``"bed 1"``, ``"bed 2"``, ... (adiabatic paths)
        and ``"interstage cooling"``.

    Notes
    -----
    With interstage cooling the composition does not change between beds, so the cumulative
    conversion against temperature of every bed lies under the one equilibrium curve of the
    fresh feed; each adiabatic line rises with slope 1/ΔT_ad toward it.
    """
    from ._solve import equilibrium_conversion

    T_in = np.asarray(result.T_in, dtype=float)
    T_out = np.asarray(result.T_out, dtype=float)
    if T is None:
        lo = max(float(T_in.min()) - 60.0, 200.0)
        T_curve = np.linspace(lo, float(T_out.max()) + 80.0, 200)
    else:
        T_curve = np.sort(as_temperature(np.atleast_1d(T)))
    x_eq = equilibrium_conversion(
        reactions, feed, T_curve, result.P, key=result.key, gas=gas, **solver_options
    )
    ax = _axes(ax)
    ax.plot(_t_show(T_curve, temperature_unit), x_eq, "-", color="k", lw=2.0, label="equilibrium")
    x_out = np.asarray(result.conversion_out, dtype=float)
    for k, (conv, temps) in enumerate(result.lines(points)):
        ax.plot(_t_show(temps, temperature_unit), conv, "-", lw=2.0, label=f"bed {k + 1}")
    for k in range(result.n_beds - 1):
        label = "interstage cooling" if k == 0 else None
        ax.plot(
            _t_show([T_out[k], T_in[k + 1]], temperature_unit),
            [x_out[k], x_out[k]],
            ":",
            color="tab:blue",
            lw=1.5,
            label=label,
        )
    ax.plot(_t_show(T_out, temperature_unit), x_out, "o", color="k", ms=4)
    p_bar = float(result.P) / 1e5
    ax.set_xlabel(_t_label(temperature_unit))
    ax.set_ylabel(f"conversion of {result.key} [-] (cumulative)")
    ax.set_title(f"Adiabatic beds with interstage cooling, P = {p_bar:.4g} bar")
    ax.set_ylim(0.0, 1.0)
    ax.grid(True, alpha=0.3)
    ax.legend(loc="best", fontsize="small")
    return ax
