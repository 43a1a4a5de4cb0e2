"""The result of a case run and its screen table.

:class:`CaseResult` holds what :func:`eqconv.case.run.run_case` computed (SI units) and
prints it as aligned tables in the units the case asks for (:meth:`CaseResult.summary`);
:meth:`CaseResult.write` writes the files (:mod:`eqconv.case.output`).
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

import numpy as np
from numpy.typing import NDArray

from .. import __version__
from ..reaction import Reaction
from ..species import Species
from . import CAUTION
from .model import Case

__all__ = ["CaseResult", "Progress"]

#: A progress callback: called with a short message before each stage.
Progress = Callable[[str], None]
FloatArray = NDArray[np.float64]

_T_SHOW = {"K": ("K", 0.0), "degC": ("°C", 273.15)}
_P_SHOW = {"bar": 1e5, "MPa": 1e6, "kPa": 1e3, "atm": 101325.0, "psia": 6894.757293168361}


@dataclass(frozen=True)
class CaseResult:
    """Everything a case run computed (SI units), ready to print or write.

    Attributes
    ----------
    case : Case
        The validated case.
    reactions : tuple of Reaction
    feed : dict of str to float
        Design feed, canonical species keys -> amount [mol] or molar flow [mol/s]
        (see ``case.feed.basis``).
    key : str
        Species whose conversion is reported.
    species : tuple of Species
        Every species of the feed and the reactions (for the data report and balances).
    conversion : ndarray (nT, nP) or None
        Equilibrium conversion of `key` for the design feed on the grid [-].
    sweep : xarray.Dataset or None
        The full sweep (with the feed parameter as a third dimension if there is one);
        None without xarray or when not asked for.
    design_sweep : xarray.Dataset or None
        The T × P sweep of the design feed (the same Dataset as `sweep` without a feed
        parameter); the plots and `conversion` come from it.
    temperature_limits, pressure_limits : tuple of TargetResult
        One per target conversion: T crossing at each grid pressure; P crossing at each
        grid temperature.
    feed_ratio : tuple of TargetResult
        One per target conversion: the feed-parameter value meeting it.
    staging : StagingResult or None
    parameter : FeedParameter or None
        The swept feed parameter, if any.
    falls_with_T, rises_with_P : bool
        Whether conversion falls with T over the temperature bracket and rises with P over
        the pressure bracket (read from the solver at the bracket ends; they word the target
        tables as "reached at or below" or "at or above").
    T_bracket, P_bracket : tuple of float or None
        Brackets of the temperature [K] and pressure [Pa] searches.
    T_bracket_conversion : ndarray (nP, 2) or None
        Conversion at the two ends of `T_bracket` at every grid pressure [-].
    P_bracket_conversion : ndarray (nT, 2) or None
        Conversion at the two ends of `P_bracket` at every grid temperature [-].
    notes : tuple of str
        Plain statements about the run (skipped outputs, an unreached staging target, the
        gas model at high pressure).
    """

    case: Case
    reactions: tuple[Reaction, ...]
    feed: dict[str, float]
    key: str
    species: tuple[Species, ...]
    conversion: FloatArray | None = None
    sweep: Any = None
    design_sweep: Any = None
    temperature_limits: tuple[Any, ...] = ()
    pressure_limits: tuple[Any, ...] = ()
    feed_ratio: tuple[Any, ...] = ()
    staging: Any = None
    parameter: Any = None
    falls_with_T: bool = True
    rises_with_P: bool = True
    T_bracket: tuple[float, float] | None = None
    T_bracket_conversion: FloatArray | None = None
    P_bracket: tuple[float, float] | None = None
    P_bracket_conversion: FloatArray | None = None
    notes: tuple[str, ...] = field(default=())

    # ------------------------------------------------------------------ display units
    def _t(self, T: Any) -> FloatArray:
        return np.asarray(T, dtype=float) - _T_SHOW[self.case.output.temperature_unit][1]

    def _p(self, P: Any) -> FloatArray:
        return np.asarray(P, dtype=float) / _P_SHOW[self.case.output.pressure_unit]

    @property
    def _tu(self) -> str:
        return _T_SHOW[self.case.output.temperature_unit][0]

    @property
    def _pu(self) -> str:
        return self.case.output.pressure_unit

    # ------------------------------------------------------------------ text
    def summary(self, max_rows: int = 15, max_cols: int = 8) -> str:
        """The screen table: reactions, feed, grid conversions, targets, beds, caution."""
        c = self.case
        out = [f"eqconv {__version__}: {c.title}"]
        if c.description:
            out.append(c.description.strip())
        out.append(f"data: {c.data}, gas model: {c.gas}, conversion of {self.key}")
        out.append("")
        out.append("Reactions (ΔrH° at 298.15 K):")
        for r in self.reactions:
            out.append(f"  {r.equation:<40} ΔrH° = {r.delta_H0 / 1e3:9.2f} kJ/mol")
        total = sum(self.feed.values())
        basis = c.feed.basis
        out.append(f"Design feed ({basis}; mole %):")
        out.append(
            "  " + ", ".join(f"{k} {v:.6g} ({100 * v / total:.2f} %)" for k, v in self.feed.items())
        )
        if self.parameter is not None and c.feed.parameter is not None:
            vals = c.feed.parameter.values
            out.append(
                f"Swept feed parameter {self.parameter.name} [{self.parameter.unit}]: "
                f"{len(vals)} values, {vals[0]:g} to {vals[-1]:g} "
                f"({self.parameter.description})"
            )
        if self.conversion is not None and c.grid is not None:
            out += ["", *self._grid_table(max_rows, max_cols)]
        for res in self.temperature_limits:
            out += ["", *self._t_limit_table(res)]
        for res in self.pressure_limits:
            out += ["", *self._p_limit_table(res, max_rows)]
        if self.feed_ratio:
            out += ["", *self._ratio_table()]
        if self.staging is not None:
            out += ["", *self._staging_table()]
        if self.notes:
            out += ["", *[f"Note: {n}" for n in self.notes]]
        out += ["", CAUTION]
        return "\n".join(out)

    def _grid_table(self, max_rows: int, max_cols: int) -> list[str]:
        assert self.conversion is not None and self.case.grid is not None
        T = np.asarray(self.case.grid.temperature)
        P = np.asarray(self.case.grid.pressure)
        ri = _picks(T.size, max_rows)
        ci = _picks(P.size, max_cols)
        head = f"{'T [' + self._tu + '] / P [' + self._pu + ']':>18}"
        lines = [
            f"Equilibrium conversion of {self.key} [-], design feed:",
            head + "".join(f"{p:>10.4g}" for p in self._p(P[ci])),
        ]
        for i in ri:
            lines.append(
                f"{float(self._t(T[i])):>18.1f}" + "".join(_cell(self.conversion[i, j]) for j in ci)
            )
        if ri.size < T.size or ci.size < P.size:
            lines.append(
                f"({ri.size} of {T.size} temperatures and {ci.size} of {P.size} "
                "pressures shown; the files hold the whole grid)"
            )
        return lines

    def _t_limit_table(self, res: Any) -> list[str]:
        target = float(np.ravel(res.target)[0])
        side = "at or below" if self.falls_with_T else "at or above"
        lines = [
            f"Target conversion {target:g} of {self.key}: reached {side} this temperature "
            f"(exact root):",
            f"{'P [' + self._pu + ']':>14}{'T [' + self._tu + ']':>12}",
        ]
        assert self.case.grid is not None
        lo, hi = (float(v) for v in self._t(self.T_bracket or (np.nan, np.nan)))
        for j, (p, t, ok) in enumerate(
            zip(self.case.grid.pressure, np.ravel(res.value), np.ravel(res.reachable), strict=True)
        ):
            if ok:
                cell = f"{float(self._t(t)):>12.1f}"
            else:
                ends = self.T_bracket_conversion
                met = ends is not None and bool(np.min(ends[j]) >= target)
                cell = f"  {'met across' if met else 'not met anywhere in'} {lo:.1f}–{hi:.1f}"
            lines.append(f"{float(self._p(p)):>14.4g}{cell}")
        return lines

    def _p_limit_table(self, res: Any, max_rows: int) -> list[str]:
        target = float(np.ravel(res.target)[0])
        side = "at or above" if self.rises_with_P else "at or below"
        lines = [
            f"Target conversion {target:g} of {self.key}: reached {side} this pressure "
            f"(exact root):",
            f"{'T [' + self._tu + ']':>14}{'P [' + self._pu + ']':>14}",
        ]
        assert self.case.grid is not None
        T = np.asarray(self.case.grid.temperature)
        value, ok = np.ravel(res.value), np.ravel(res.reachable)
        lo, hi = (float(v) for v in self._p(self.P_bracket or (np.nan, np.nan)))
        for i in _picks(T.size, max_rows):
            if ok[i]:
                cell = f"{float(self._p(value[i])):>14.4g}"
            else:
                ends = self.P_bracket_conversion
                met = ends is not None and bool(np.min(ends[i]) >= target)
                cell = f"  {'met across' if met else 'not met anywhere in'} {lo:.4g}–{hi:.4g}"
            lines.append(f"{float(self._t(T[i])):>14.1f}{cell}")
        return lines

    def _ratio_table(self) -> list[str]:
        spec = self.case.targets.feed_ratio if self.case.targets else None
        assert spec is not None and self.parameter is not None
        lines = [
            f"Feed parameter {self.parameter.name} [{self.parameter.unit}] meeting each "
            f"target at {float(self._t(spec.temperature)):.1f} {self._tu}, "
            f"{float(self._p(spec.pressure)):.4g} {self._pu} (exact root):"
        ]
        for res in self.feed_ratio:
            target = float(np.ravel(res.target)[0])
            ok = bool(np.ravel(res.reachable)[0])
            val = (
                f"{float(np.ravel(res.value)[0]):.4g}"
                if ok
                else (f"not reachable in {spec.low:g}–{spec.high:g}")
            )
            lines.append(f"  conversion {target:g}: {self.parameter.name} = {val}")
        return lines

    def _staging_table(self) -> list[str]:
        s = self.staging
        basis = "W" if self.case.feed.basis == "mol/s" else "J"
        head = (
            f"{'bed':>4}{'T in':>10}{'T out':>10}{'X in':>9}{'X out':>9}{'ΔX':>9}"
            f"{'cooler duty':>14}{'per mol feed':>14}"
        )
        units = (
            f"{'':>4}{'[' + self._tu + ']':>10}{'[' + self._tu + ']':>10}{'[-]':>9}"
            f"{'[-]':>9}{'[-]':>9}{'[' + basis + ']':>14}{'[kJ/mol]':>14}"
        )
        lines = [
            f"Adiabatic beds with interstage cooling, P = {float(self._p(s.P)):.4g} "
            f"{self._pu}, approach {s.approach_T:g} K, conversion of {s.key}"
            + (
                f", target {s.target:g} {'reached' if s.reached else 'NOT reached'}"
                if s.target is not None
                else ""
            )
            + ":",
            head,
            units,
        ]
        for k in range(s.n_beds):
            q = f"{s.heat_removed[k]:>14.4g}" if k < s.n_beds - 1 else f"{'-':>14}"
            qm = f"{s.heat_removed_per_mol[k] / 1e3:>14.3f}" if k < s.n_beds - 1 else (f"{'-':>14}")
            lines.append(
                f"{k + 1:>4}{float(self._t(s.T_in[k])):>10.1f}"
                f"{float(self._t(s.T_out[k])):>10.1f}{s.conversion_in[k]:>9.4f}"
                f"{s.conversion_out[k]:>9.4f}{s.bed_conversion[k]:>9.4f}{q}{qm}"
            )
        return lines

    # ------------------------------------------------------------------ files

    # ------------------------------------------------------------------ files
    def write(
        self, out_dir: str | Path, *, overwrite: bool = False, progress: Progress | None = None
    ) -> list[Path]:
        """Write the results into the new folder `out_dir`; return the files written.

        See :func:`eqconv.case.output.write_result` for the files.

        Raises
        ------
        InputError
            If `out_dir` exists and `overwrite` is False (nothing is written then).
        """
        from .output import write_result

        return write_result(self, out_dir, overwrite=overwrite, progress=progress)

    def to_dict(self) -> dict[str, Any]:
        """Results as plain JSON-ready data (SI units, stated in the keys)."""
        from .output import result_dict

        return result_dict(self)


def _picks(n: int, most: int) -> NDArray[np.intp]:
    return np.unique(np.linspace(0, n - 1, min(n, most)).round().astype(np.intp))


def _cell(x: float) -> str:
    return f"{x:>10.4f}" if np.isfinite(x) else f"{'failed':>10}"
