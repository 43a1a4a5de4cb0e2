"""Write the results of a case run: CSV and JSON tables, the sweep files, PNG plots.

Every file states its units in its column names or keys; ``summary.txt`` and
``results.json`` carry the caution. Optional packages are used when present: xarray and
pandas for the sweep files, matplotlib for the plots (drawn on figures of their own, without
pyplot, so the caller's plotting backend is left alone).
"""

from __future__ import annotations

import csv
import importlib.util
import io
import json
from pathlib import Path
from typing import TYPE_CHECKING, Any

import numpy as np
from numpy.typing import NDArray

from .. import __version__
from ..errors import InputError
from . import CAUTION

if TYPE_CHECKING:
    from .result import CaseResult, Progress

__all__ = ["have", "result_dict", "write_result"]

FloatArray = NDArray[np.float64]


def have(module: str) -> bool:
    """Whether an optional package can be imported (without importing it)."""
    try:
        return importlib.util.find_spec(module) is not None
    except (ImportError, ValueError):  # blocked, or a None entry in sys.modules
        return False


def write_result(
    res: CaseResult,
    out_dir: str | Path,
    *,
    overwrite: bool = False,
    progress: Progress | None = None,
) -> list[Path]:
    """Write the results into the folder `out_dir` and return the files written.

    Files: ``summary.txt`` (the screen table), ``case.json`` (the validated case in SI
    units), ``data_report.csv`` (every datum and its source), ``grid.csv``,
    ``targets.csv``, ``staging.csv``, ``results.json``; with xarray and pandas
    ``sweep.csv`` and ``sweep.json``; with matplotlib the PNG plots. CSV and JSON are
    written as ``case.output`` asks.

    Raises
    ------
    InputError
        If `out_dir` exists and `overwrite` is False (nothing is written then).
    """
    out = Path(out_dir)
    if out.exists() and not overwrite:
        raise InputError(f"output folder {out} exists; choose another or allow overwriting")
    if out.exists() and not out.is_dir():
        raise InputError(f"{out} exists and is not a folder")
    out.mkdir(parents=True, exist_ok=True)
    say = progress or (lambda _msg: None)
    opts = res.case.output
    notes = list(res.notes)
    files: list[Path] = []

    def text(name: str, content: str) -> None:
        p = out / name
        p.write_text(content, encoding="utf-8")
        files.append(p)

    from ..report import data_report

    say("writing tables")
    report = data_report([*res.reactions, *res.species], notes=_gas_model_notes(res))
    if opts.write_csv:
        text("data_report.csv", report.to_csv())
        text("data_report.txt", report.to_text() + "\n")
        if res.conversion is not None:
            text("grid.csv", _grid_csv(res))
        if res.temperature_limits or res.pressure_limits or res.feed_ratio:
            text("targets.csv", _targets_csv(res))
        if res.staging is not None:
            text("staging.csv", _staging_csv(res))
    if opts.write_json:
        text(
            "case.json",
            json.dumps(res.case.model_dump(mode="json"), indent=2, ensure_ascii=False) + "\n",
        )
        text("results.json", json.dumps(result_dict(res), indent=2, ensure_ascii=False) + "\n")
    if res.sweep is not None:
        from ..studies import write_sweep_csv, write_sweep_json

        say("writing the sweep")
        if opts.write_csv:
            files.append(write_sweep_csv(res.sweep, out / "sweep.csv", overwrite=True))
        if opts.write_json:
            files.append(write_sweep_json(res.sweep, out / "sweep.json", overwrite=True))
    elif res.case.grid is not None:
        notes.append(
            "sweep.csv and sweep.json need xarray and pandas "
            '(pip install "eqconv[studies]"); not written'
        )
    if opts.write_plots:
        if have("matplotlib"):
            say("drawing plots")
            files += _plots(res, out)
        else:
            notes.append('plots need matplotlib (pip install "eqconv[plots]"); not drawn')
    if notes != list(res.notes):
        extra = "\n".join(f"Note: {n}" for n in notes[len(res.notes) :])
        text("summary.txt", res.summary() + "\n" + extra + "\n")
    else:
        text("summary.txt", res.summary() + "\n")
    return files


def result_dict(res: CaseResult) -> dict[str, Any]:
    """Results as plain JSON-ready data (SI units, stated in the keys)."""
    d: dict[str, Any] = {
        "eqconv_version": __version__,
        "title": res.case.title,
        "caution": CAUTION,
        "data": res.case.data,
        "gas": res.case.gas,
        "key": res.key,
        "reactions": [r.equation for r in res.reactions],
        "feed": res.feed,
        "feed_basis": res.case.feed.basis,
        "notes": list(res.notes),
    }
    if res.conversion is not None and res.case.grid is not None:
        d["grid"] = {
            "T [K]": list(res.case.grid.temperature),
            "P [Pa]": list(res.case.grid.pressure),
            "conversion [1]": _jsonable(res.conversion),
        }
    d["targets"] = [_target_dict(r, at) for r, at in _targets_with_coords(res)]
    if res.staging is not None:
        s = res.staging
        d["staging"] = {
            "P [Pa]": s.P,
            "key": s.key,
            "target": s.target,
            "reached": s.reached,
            "approach [K]": s.approach_T,
            "T_in [K]": _jsonable(s.T_in),
            "T_out [K]": _jsonable(s.T_out),
            "conversion_in [1]": _jsonable(s.conversion_in),
            "conversion_out [1]": _jsonable(s.conversion_out),
            f"heat_removed [{'W' if res.case.feed.basis == 'mol/s' else 'J'}]": _jsonable(
                s.heat_removed
            ),
            "heat_removed_per_mol [J/mol]": _jsonable(s.heat_removed_per_mol),
        }
    return d


def _targets_with_coords(res: CaseResult) -> list[tuple[Any, tuple[str, FloatArray]]]:
    out: list[tuple[Any, tuple[str, FloatArray]]] = []
    g = res.case.grid
    for r in res.temperature_limits:
        assert g is not None
        out.append((r, ("P [Pa]", np.asarray(g.pressure))))
    for r in res.pressure_limits:
        assert g is not None
        out.append((r, ("T [K]", np.asarray(g.temperature))))
    t = res.case.targets
    for r in res.feed_ratio:
        assert t is not None and t.feed_ratio is not None
        out.append(
            (r, ("T [K], P [Pa]", np.array([t.feed_ratio.temperature, t.feed_ratio.pressure])))
        )
    return out


def _grid_csv(res: CaseResult) -> str:
    assert res.conversion is not None and res.case.grid is not None
    buf = io.StringIO()
    w = csv.writer(buf)
    w.writerow(["T [K]", "P [Pa]", f"conversion of {res.key} [1]"])
    for i, t in enumerate(res.case.grid.temperature):
        for j, p in enumerate(res.case.grid.pressure):
            w.writerow([f"{t:.10g}", f"{p:.10g}", f"{res.conversion[i, j]:.10g}"])
    return buf.getvalue()


def _targets_csv(res: CaseResult) -> str:
    buf = io.StringIO()
    w = csv.writer(buf)
    w.writerow(
        [
            "target conversion [1]",
            "solved for",
            "unit",
            "at",
            "at value",
            "value",
            "reachable",
            "conversion there [1]",
        ]
    )
    for tr, (name, coord) in _targets_with_coords(res):
        value = np.ravel(tr.value)
        at = (
            np.broadcast_to(coord, value.shape)
            if coord.size != 2 or value.size != 1
            else [" ".join(f"{c:.10g}" for c in coord)]
        )
        for v, a, ok, x, tg in zip(
            value,
            at,
            np.ravel(tr.reachable),
            np.ravel(tr.conversion),
            np.ravel(tr.target),
            strict=True,
        ):
            a_text = a if isinstance(a, str) else f"{float(a):.10g}"
            w.writerow(
                [
                    f"{tg:.10g}",
                    tr.quantity,
                    tr.unit,
                    name,
                    a_text,
                    f"{v:.10g}" if ok else "",
                    bool(ok),
                    f"{x:.10g}" if ok else "",
                ]
            )
    return buf.getvalue()


def _staging_csv(res: CaseResult) -> str:
    s = res.staging
    buf = io.StringIO()
    w = csv.writer(buf)
    q_unit = "W" if res.case.feed.basis == "mol/s" else "J"
    w.writerow(
        [
            "bed",
            "T_in [K]",
            "T_out [K]",
            "conversion_in [1]",
            "conversion_out [1]",
            "bed_conversion [1]",
            f"heat_removed_after [{q_unit}]",
            "heat_removed_after_per_mol_feed [J/mol]",
        ]
    )
    for k in range(s.n_beds):
        last = k == s.n_beds - 1
        w.writerow(
            [
                k + 1,
                f"{s.T_in[k]:.10g}",
                f"{s.T_out[k]:.10g}",
                f"{s.conversion_in[k]:.10g}",
                f"{s.conversion_out[k]:.10g}",
                f"{s.bed_conversion[k]:.10g}",
                "" if last else f"{s.heat_removed[k]:.10g}",
                "" if last else f"{s.heat_removed_per_mol[k]:.10g}",
            ]
        )
    return buf.getvalue()


def _plots(res: CaseResult, out: Path) -> list[Path]:
    from matplotlib.figure import Figure  # no pyplot: the user's backend is left alone

    from ..studies import plots

    def new_axes() -> Any:
        return Figure(figsize=(7.0, 4.8), layout="constrained").subplots()

    tu, pu = res.case.output.temperature_unit, res.case.output.pressure_unit
    files: list[Path] = []

    def save(name: str, ax: Any) -> None:
        p = out / name
        ax.figure.savefig(p, dpi=110)
        files.append(p)

    g = res.case.grid
    if g is not None and len(g.temperature) >= 3:
        for j, r in enumerate(res.reactions):
            name = "vant_hoff.png" if len(res.reactions) == 1 else f"vant_hoff_{j + 1}.png"
            save(name, plots.vant_hoff_plot(r, np.asarray(g.temperature), ax=new_axes()))
    if res.design_sweep is not None and g is not None:
        if len(g.temperature) >= 2:
            save(
                "conversion_vs_T.png",
                plots.conversion_vs_temperature(
                    res.design_sweep,
                    temperature_unit=tu,
                    pressure_unit=pu,
                    ax=new_axes(),
                ),
            )
        if len(g.temperature) >= 2 and len(g.pressure) >= 2:
            targets = res.case.targets.conversion if res.case.targets else ()
            exact = [(np.asarray(g.temperature), r) for r in res.pressure_limits]
            save(
                "conversion_map.png",
                plots.conversion_map(
                    res.design_sweep,
                    targets=targets,
                    exact=exact,
                    temperature_unit=tu,
                    pressure_unit=pu,
                    ax=new_axes(),
                ),
            )
    if res.staging is not None:
        save(
            "staging.png",
            plots.staging_diagram(
                res.staging,
                res.reactions,
                res.feed,
                gas=res.case.gas,
                temperature_unit=tu,
                ax=new_axes(),
            ),
        )
    return files


def _jsonable(a: Any) -> Any:
    arr = np.asarray(a, dtype=float)
    return np.where(np.isfinite(arr), arr, np.nan).tolist() if arr.ndim else float(arr)


def _target_dict(tr: Any, at: tuple[str, FloatArray]) -> dict[str, Any]:
    ok = np.asarray(tr.reachable, dtype=bool)
    value = np.where(ok, np.asarray(tr.value, dtype=float), np.nan)
    return {
        "target conversion [1]": float(np.ravel(tr.target)[0]),
        "solved for": tr.quantity,
        "unit": tr.unit,
        "at": at[0],
        "at values": at[1].tolist(),
        "value": [None if not np.isfinite(v) else float(v) for v in np.ravel(value)],
        "reachable": [bool(v) for v in np.ravel(ok)],
    }


def _gas_model_notes(res: Any) -> list[str]:
    """Interaction parameters and missing pairs of the case's gas model, for the report."""
    kind = res.case.gas
    if kind == "ideal":
        return ["gas model: ideal gas (fugacity coefficients 1)"]
    from ..fugacity import eos_setup

    species = list({sp.key: sp for r in res.reactions for sp in r.species}.values())
    species += [sp for sp in res.species if sp.key not in {s.key for s in species}]
    setup = eos_setup(
        kind, [s.key for s in species], [s.cas for s in species], [s.phase == "g" for s in species]
    )
    return [f"gas model: {kind}", *setup.report.lines()]
