"""Multi-bed adiabatic converters with interstage cooling (SO2 converters, ammonia beds).

Each bed runs adiabatically to equilibrium (or to a fixed approach ΔT); between beds the
gas is cooled back to the next bed's inlet temperature with its composition unchanged.
For an exothermic reversible reaction every bed climbs its adiabatic line until it meets
the equilibrium curve; cooling moves the state left at constant conversion, and the next
bed climbs again. The cumulative conversion approaches the equilibrium conversion at the
inlet temperature, so a target above that asymptote cannot be reached by any number of
beds.

Examples
--------
Invented four-bed SO2 converter, 10 % SO2 / 11 % O2 / 79 % N2, 1.2 bar, 690 K inlets:

>>> from eqconv import Reaction
>>> rxn = Reaction("SO2 + 1/2 O2 = SO3", data="janaf")
>>> res = stage_beds(rxn, {"SO2": 0.10, "O2": 0.11, "N2": 0.79}, 690.0, 1.2e5, n_beds=4)
>>> bool(res.conversion_out[-1] > 0.97), res.n_beds
(True, 4)
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence
from dataclasses import dataclass, field
from pathlib import Path
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
    default_key,
    feed_arrays,
    require,
    species_key,
    species_list,
)
from .adiabatic import SpeciesArg, adiabatic_equilibrium, adiabatic_line, mixture_enthalpy
from .errors import UnreachableTargetError

__all__ = ["StagingResult", "stage_beds"]

FloatArray = NDArray[np.float64]


@dataclass(frozen=True)
class StagingResult:
    """Beds of an intercooled adiabatic converter, one entry per bed.

    Attributes
    ----------
    species : tuple of str
        Species keys (order of the amount columns).
    key : str
        Species whose conversion is reported.
    P : float
        Absolute pressure [Pa].
    T_in, T_out : ndarray (n_beds,)
        Bed inlet and outlet temperatures [K].
    conversion_in, conversion_out : ndarray (n_beds,)
        Cumulative conversion of :attr:`key` against the fresh feed at bed inlet / outlet [-].
    bed_conversion : ndarray (n_beds,)
        ``conversion_out − conversion_in`` [-].
    amounts_in, amounts_out : ndarray (n_beds, n_species)
        Amounts at bed inlet / outlet [mol per feed basis].
    heat_removed : ndarray (n_beds − 1,)
        Heat taken out by the cooler after bed k [J per feed basis; W if the feed is in
        mol/s]; negative for an interstage heater.
    heat_removed_per_mol : ndarray (n_beds − 1,)
        The same per mol of total fresh feed [J/mol].
    feed_total : float
        Total fresh feed [mol per feed basis].
    target : float or None
        Target cumulative conversion, if one was asked for.
    reached : bool
        Whether the last bed reaches :attr:`target` (True when no target).
    approach_T : float
        Approach to equilibrium used in every bed [K].
    """

    species: tuple[str, ...]
    key: str
    P: float
    T_in: FloatArray
    T_out: FloatArray
    conversion_in: FloatArray
    conversion_out: FloatArray
    bed_conversion: FloatArray
    amounts_in: FloatArray
    amounts_out: FloatArray
    heat_removed: FloatArray
    heat_removed_per_mol: FloatArray
    feed_total: float
    target: float | None
    reached: bool
    approach_T: float
    reactions: tuple[Reaction, ...] = field(repr=False, default=())
    species_data: tuple[Species, ...] = field(repr=False, default=())

    @property
    def n_beds(self) -> int:
        """Number of beds."""
        return int(self.T_in.size)

    def _rows(self) -> tuple[list[str], list[str], list[list[float]]]:
        cols = [
            "bed",
            "T_in",
            "T_out",
            "conversion_in",
            "conversion_out",
            "bed_conversion",
            "heat_removed",
            "heat_removed_per_mol",
        ]
        units = ["", "K", "K", "1", "1", "1", "J", "J/mol"]
        rows = []
        for k in range(self.n_beds):
            q = self.heat_removed[k] if k < self.n_beds - 1 else 0.0
            qm = self.heat_removed_per_mol[k] if k < self.n_beds - 1 else 0.0
            rows.append(
                [
                    k + 1,
                    self.T_in[k],
                    self.T_out[k],
                    self.conversion_in[k],
                    self.conversion_out[k],
                    self.bed_conversion[k],
                    q,
                    qm,
                ]
            )
        return cols, units, rows

    def to_dataframe(self) -> Any:
        """One row per bed; ``heat_removed`` is for the cooler after the bed (0 after the
        last). Units in ``attrs["units"]``; outlet mole fractions as ``x_<species>``."""
        pd = require("pandas")
        cols, units, rows = self._rows()
        df = pd.DataFrame(rows, columns=cols)
        df["bed"] = df["bed"].astype(int)
        x = self.amounts_out / np.sum(self.amounts_out, axis=1, keepdims=True)
        for j, s in enumerate(self.species):
            df[f"x_out_{s}"] = x[:, j]
        df.attrs["units"] = dict(zip(cols, units, strict=True)) | {
            f"x_out_{s}": "1" for s in self.species
        }
        df.attrs.update(key=self.key, P=self.P, target=self.target, reached=self.reached)
        return df

    def to_text(self) -> str:
        """Aligned table with units (for the screen)."""
        rows = self._rows()[2]
        head = [
            "bed",
            "T in [K]",
            "T out [K]",
            "X in [-]",
            "X out [-]",
            "ΔX bed [-]",
            "Q cooler [J]",
            "Q [J/mol feed]",
        ]
        lines = [
            f"key species {self.key}, P = {self.P:g} Pa, approach ΔT = "
            f"{self.approach_T:g} K"
            + (
                f", target {self.target:g}: {'reached' if self.reached else 'not reached'}"
                if self.target is not None
                else ""
            ),
            " ".join(f"{h:>14}" for h in head),
        ]
        for j, r in enumerate(rows):
            heat = f"{r[6]:14.5g} {r[7]:14.5g}" if j < len(rows) - 1 else f"{'—':>14} {'—':>14}"
            lines.append(
                f"{int(r[0]):>14d} {r[1]:14.2f} {r[2]:14.2f} {r[3]:14.5f} "
                f"{r[4]:14.5f} {r[5]:14.5f} {heat}"
            )
        return "\n".join(lines)

    def __str__(self) -> str:
        return self.to_text()

    def write_csv(self, path: str | Path, *, overwrite: bool = False) -> Path:
        """Write :meth:`to_dataframe` as CSV with units in the header cells.

        Raises
        ------
        InputError
            If the file exists and `overwrite` is False.
        """
        p = Path(path)
        if p.exists() and not overwrite:
            raise InputError(f"{p} exists; pass overwrite=True to replace it")
        df = self.to_dataframe()
        u = df.attrs["units"]
        df.rename(columns={c: f"{c} [{u[c]}]" if u.get(c) else c for c in df.columns}).to_csv(
            p, index=False, float_format="%.10g"
        )
        return p

    def lines(self, points: int = 50) -> list[tuple[FloatArray, FloatArray]]:
        """Adiabatic path of every bed in (cumulative conversion, T [K]) coordinates.

        With one reaction the path is the adiabatic line of that reaction; with several,
        only the end points are determined by thermodynamics and a straight segment
        between them is returned.
        """
        if points < 2:
            raise InputError(f"points must be >= 2; got {points!r}")
        out = []
        fresh = {s: float(a) for s, a in zip(self.species, self._fresh(), strict=True)}
        for k in range(self.n_beds):
            X = np.linspace(self.conversion_in[k], self.conversion_out[k], points)
            if len(self.reactions) == 1:
                inlet = {s: float(a) for s, a in zip(self.species, self.amounts_in[k], strict=True)}
                T = adiabatic_line(
                    self.reactions,
                    inlet,
                    self.T_in[k],
                    X,
                    key=self.key,
                    basis=fresh,
                    species=self.species_data,
                )
            else:
                T = np.linspace(self.T_in[k], self.T_out[k], points)
            out.append((X, T))
        return out

    def _fresh(self) -> FloatArray:
        return np.asarray(self.amounts_in[0], dtype=float)


def _inlet_temperatures(T_in: float | Sequence[float] | ArrayLike) -> FloatArray:
    arr = np.atleast_1d(as_temperature(T_in, "T_in"))
    if arr.ndim != 1:
        raise InputError(
            f"T_in must be a scalar or a sequence of bed inlet temperatures; got shape {arr.shape}"
        )
    return arr


def stage_beds(
    reactions: Reactions,
    feed: Mapping[str, float],
    T_in: float | Sequence[float] | ArrayLike,
    P: float,
    *,
    n_beds: int | None = None,
    target: float | None = None,
    max_beds: int = 12,
    key: str | None = None,
    gas: str = "ideal",
    approach_T: float = 0.0,
    species: SpeciesArg = None,
    **solver_options: Any,
) -> StagingResult:
    """Adiabatic equilibrium beds in series with cooling back to each bed's inlet T.

    Parameters
    ----------
    reactions : Reaction or sequence of Reaction
    feed : mapping
        Fresh feed [mol] or [mol/s] (scalars).
    T_in : float or sequence of float
        Inlet temperature of every bed [K]; a sequence gives beds 1, 2, ... and its last
        value repeats for further beds.
    P : float
        Absolute pressure [Pa] (no pressure drop).
    n_beds : int, optional
        Number of beds. Without it, `target` decides.
    target : float, optional
        Cumulative conversion of `key` to reach [-]: beds are added until it is met.
    max_beds : int
        Most beds tried with `target` (default 12).
    key : str, optional
        Species whose conversion is counted (default: first reactant in the feed).
    gas : str
        Gas model of :func:`eqconv.equilibrium`.
    approach_T : float
        Approach to equilibrium of every bed [K] (see :func:`adiabatic_equilibrium`).
    species : mapping or iterable of Species, optional
        Species for inert feed components.
    **solver_options
        Passed to :func:`eqconv.equilibrium`.

    Returns
    -------
    StagingResult

    Raises
    ------
    UnreachableTargetError
        If `target` is not reached within the beds allowed, or lies above the equilibrium
        conversion at the last inlet temperature (the asymptote of infinitely many beds).
    InputError
        Neither or a bad `n_beds` / `target`, or other bad input.

    Notes
    -----
    Bed k: H(n_out,k, T_out,k) = H(n_in,k, T_in,k) with n_out,k at equilibrium at
    T_out,k (+ approach). Cooler k: Q_k = H(n_out,k, T_out,k) − H(n_out,k, T_in,k+1),
    n_in,k+1 = n_out,k.
    """
    rxns = as_reactions(reactions)
    f = feed_arrays(feed, rxns, species)
    for s, v in f.items():
        if v.ndim != 0:
            raise InputError(f"feed[{s!r}] must be a scalar in a staging calculation")
    P = float(as_pressure(P))
    Ts = _inlet_temperatures(T_in)
    if n_beds is None and target is None:
        raise InputError("give n_beds or target")
    if n_beds is not None and (int(n_beds) != n_beds or n_beds < 1):
        raise InputError(f"n_beds must be a positive integer; got {n_beds!r}")
    if target is not None and not 0.0 < float(target) < 1.0:
        raise InputError(f"target conversion must lie in (0, 1); got {target!r}")
    if int(max_beds) < 1:
        raise InputError(f"max_beds must be >= 1; got {max_beds!r}")
    k = species_key(rxns, key, species) if key else default_key(rxns, f)
    sp = species_list(rxns, f, species)
    keys = tuple(s.key for s in sp)
    n_fresh = np.array([float(f.get(s, 0.0)) for s in keys])
    total = float(np.sum(n_fresh))
    limit = int(n_beds) if n_beds is not None else int(max_beds)

    if target is not None and n_beds is None:
        last = Ts[-1]
        asym = adiabatic_free_limit(rxns, f, float(last), P, k, gas, approach_T, sp, solver_options)
        if float(target) >= asym:
            raise UnreachableTargetError(
                f"target conversion {target:g} of {k} cannot be reached with inlets at "
                f"{last:g} K and {P:g} Pa: the equilibrium conversion there, the limit of "
                f"infinitely many beds, is {asym:.6g}"
            )

    rows_in: list[FloatArray] = []
    rows_out: list[FloatArray] = []
    t_in: list[float] = []
    t_out: list[float] = []
    q: list[float] = []
    n_in = n_fresh.copy()
    for bed in range(limit):
        T_bed = float(Ts[min(bed, Ts.size - 1)])
        if bed > 0:
            q.append(
                float(mixture_enthalpy(sp, n_in, t_out[-1]) - mixture_enthalpy(sp, n_in, T_bed))
            )
        res = adiabatic_equilibrium(
            rxns,
            dict(zip(keys, n_in, strict=True)),
            T_bed,
            P,
            key=k,
            basis=dict(zip(keys, n_fresh, strict=True)),
            gas=gas,
            approach_T=approach_T,
            species=sp,
            **solver_options,
        )
        n_out = np.array([float(res.amounts[s]) for s in keys])
        rows_in.append(n_in)
        rows_out.append(n_out)
        t_in.append(T_bed)
        t_out.append(float(res.T_out))
        n_in = n_out
        if target is not None and n_beds is None and float(res.conversion) >= float(target):
            break
    ki = keys.index(k)
    A_in, A_out = np.array(rows_in), np.array(rows_out)
    X_in = (n_fresh[ki] - A_in[:, ki]) / n_fresh[ki]
    X_out = (n_fresh[ki] - A_out[:, ki]) / n_fresh[ki]
    reached = target is None or bool(X_out[-1] >= float(target))
    if target is not None and n_beds is None and not reached:
        raise UnreachableTargetError(
            f"target conversion {target:g} of {k} not reached in {limit} beds (reached "
            f"{X_out[-1]:.6g}); raise max_beds"
        )
    heat = np.array(q)
    return StagingResult(
        species=keys,
        key=k,
        P=P,
        T_in=np.array(t_in),
        T_out=np.array(t_out),
        conversion_in=X_in,
        conversion_out=X_out,
        bed_conversion=X_out - X_in,
        amounts_in=A_in,
        amounts_out=A_out,
        heat_removed=heat,
        heat_removed_per_mol=heat / total,
        feed_total=total,
        target=None if target is None else float(target),
        reached=reached,
        approach_T=float(approach_T),
        reactions=rxns,
        species_data=sp,
    )


def adiabatic_free_limit(
    reactions: tuple[Reaction, ...],
    feed: Mapping[str, FloatArray],
    T: float,
    P: float,
    key: str,
    gas: str,
    approach_T: float,
    species: Sequence[Species],
    options: dict[str, Any],
) -> float:
    """Equilibrium conversion of `key` at the inlet temperature (+ approach) [-]: the
    limit of infinitely many beds cooled back to T."""
    from ._solve import conversion_of, solve

    sol = solve(reactions, species, dict(feed), T + approach_T, P, gas=gas, **options)
    i = [s.key for s in species].index(key)
    return float(conversion_of(sol.amounts[..., i], np.asarray(feed[key])))
