"""Species data from the NIST-JANAF Thermochemical Tables (read offline by ``janaf``).

The tables give, at 1 bar, Cp°, S°, H° − H°(298.15 K), ΔfH° and log Kf from 0 to (usually)
6000 K. eqconv takes ΔfH°(298.15 K) and S°(298.15 K) from the 298.15 K row and builds a
:class:`~eqconv.cp.TabulatedCp` from the Cp, H − H298 and S columns (rows from 100 K up),
so every species' enthalpy and entropy reproduce the printed table at its nodes.

References
----------
.. [1] M. W. Chase, NIST-JANAF Thermochemical Tables, 4th ed., J. Phys. Chem. Ref. Data
   Monograph 9 (1998).
"""

from __future__ import annotations

from dataclasses import dataclass
from functools import cache

import numpy as np

from .cp import TabulatedCp
from .errors import MissingDataError
from .identify import Identity, parse_formula

__all__ = ["JanafRecord", "janaf_record"]

#: Standard uncertainties assumed for JANAF data where a table prints none (documented
#: default of this project: typical of the tables' stated reliability for small molecules).
U_HF_DEFAULT = 0.4e3  # J/mol
U_S_DEFAULT = 0.2  # J/(mol K)
U_CP_REL_DEFAULT = 0.005


@dataclass(frozen=True)
class JanafRecord:
    """What one JANAF table contributes to a species (SI units)."""

    table: str
    title: str
    hf298: float
    s298: float
    cp: TabulatedCp


@cache
def _catalogue() -> list[tuple[str, str, str, dict[str, int]]]:
    import janaf

    rows = []
    for display, index, formula, phase in janaf.db.select(
        ["display", "index", "formula", "phase"]
    ).iter_rows():
        try:
            atoms = parse_formula(formula)
        except Exception:  # formulas with charges or odd notation are not ours
            continue
        rows.append((index, display, phase, atoms))
    return rows


def _pick_table(ident: Identity) -> tuple[str, str]:
    matches = [(i, d, p) for i, d, p, a in _catalogue() if a == ident.atoms]
    if ident.phase == "g":
        wanted = [m for m in matches if m[2] == "g"] or [
            m for m in matches if m[2] == "ref" and _ref_is_gas(m[0])
        ]
    else:
        phase_tag = "cr" if ident.phase == "s" else "l"
        wanted = [m for m in matches if m[2] == "ref" and not _ref_is_gas(m[0])] or [
            m for m in matches if m[2] == phase_tag
        ]
    if not wanted:
        raise MissingDataError(
            f"NIST-JANAF has no {ident.phase!r}-phase table for {ident.key} "
            f"({ident.formula}); use data='default' or supply the species yourself"
        )
    if len(wanted) > 1:
        listing = "; ".join(f"{i}: {d}" for i, d, _ in wanted)
        raise MissingDataError(
            f"NIST-JANAF has several tables for {ident.key}: {listing}; supply the species "
            "yourself to choose one"
        )
    return wanted[0][0], wanted[0][1]


@cache
def _ref_is_gas(index: str) -> bool:
    import janaf

    # a reference-state table is a gas when its entropy at 298.15 K is gas-like; the
    # display string does not say. Solids and liquids of the elements have S° < 80 J/(mol K)
    # at 298.15 K, gases > 120 (common practice).
    df = janaf.Table(index).df
    s = df.filter(df["T(K)"] == 298.15)["S"].to_numpy()
    return bool(s.size and s[0] > 100.0)


@cache
def janaf_record(ident: Identity) -> JanafRecord:
    """Read the JANAF table for a resolved species.

    Raises
    ------
    MissingDataError
        If JANAF has no (or more than one) table for that formula and phase.
    """
    import janaf

    index, title = _pick_table(ident)
    df = janaf.Table(index).df
    T = df["T(K)"].to_numpy()
    cp = df["Cp"].to_numpy()
    s = df["S"].to_numpy()
    h = df["H-H(Tr)"].to_numpy() * 1e3
    dfh = df["delta-f H"].to_numpy()
    ref = np.flatnonzero(np.isclose(T, 298.15))
    if ref.size != 1:
        raise MissingDataError(f"JANAF table {index} has no 298.15 K row")
    keep = (T >= 100.0) & np.isfinite(cp) & np.isfinite(s) & np.isfinite(h)
    hf = float(dfh[ref[0]]) * 1e3
    if not np.isfinite(hf):
        raise MissingDataError(f"JANAF table {index} prints no ΔfH° at 298.15 K")
    model = TabulatedCp(
        tuple(T[keep]),
        tuple(cp[keep]),
        tuple(h[keep]),
        tuple(s[keep]),
        method=f"NIST-JANAF table {index} (cubic Hermite in H and S)",
    )
    return JanafRecord(table=index, title=title, hf298=hf, s298=float(s[ref[0]]), cp=model)
