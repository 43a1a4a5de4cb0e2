"""Species: formation data, entropy and heat capacity with their provenance.

A :class:`Species` holds ΔfH°(298.15 K), S°(298.15 K) and a heat-capacity model, each with
the source it came from, and evaluates the standard-state enthalpy, entropy and chemical
potential vectorized over T. Species come from :func:`get_species` (data sources
``"default"`` and ``"janaf"``) or from the user (:func:`user_species`).

Standard state: ideal gas at p° = 1 bar for gases; the pure phase at p° for condensed
species (activity 1).
"""

from __future__ import annotations

import dataclasses
import warnings
from dataclasses import dataclass, field
from functools import cache
from typing import Any

import numpy as np
from numpy.typing import ArrayLike, NDArray

from ._validate import as_temperature
from .constants import R
from .cp import CpModel
from .errors import InputError, OutOfRangeError, RangeWarning
from .identify import Identity, resolve

__all__ = ["DATA_SOURCES", "Species", "get_species"]

FloatArray = NDArray[np.float64]

#: Names of the built-in data sources.
DATA_SOURCES = ("default", "janaf")

_WARNED: set[tuple[str, str, str]] = set()


@dataclass(frozen=True, eq=False)
class Species:
    """One chemical species with standard-state thermochemistry and provenance.

    Attributes
    ----------
    key : str
        Label used in reactions and results (e.g. ``"NH3"``, ``"C(s)"``).
    cas : str
        CAS registry number ("" for a user species without one).
    name : str
        Common name.
    formula : str
        Formula (Hill order).
    atoms : dict[str, int]
        Element counts.
    phase : str
        ``"g"`` (ideal gas), ``"s"`` or ``"l"`` (pure condensed phase, unit activity).
    hf298 : float
        Standard enthalpy of formation at 298.15 K [J/mol].
    s298 : float
        Standard entropy at 298.15 K and p° = 1 bar [J/(mol K)].
    cp_model : CpModel
        Heat-capacity model with its valid range.
    data : str
        Data set the species came from (``"default"``, ``"janaf"``, ``"user"``).
    sources : dict[str, str]
        Source of each datum: keys ``"hf298"``, ``"s298"``, ``"cp"``.
    u_hf298, u_s298 : float
        Standard uncertainties of ΔfH° [J/mol] and S° [J/(mol K)].
    u_cp_rel : float
        Relative standard uncertainty of Cp° [-].
    """

    key: str
    cas: str
    name: str
    formula: str
    atoms: dict[str, int]
    phase: str
    hf298: float
    s298: float
    cp_model: CpModel
    data: str
    sources: dict[str, str] = field(default_factory=dict)
    u_hf298: float = 0.0
    u_s298: float = 0.0
    u_cp_rel: float = 0.0

    def __post_init__(self) -> None:
        if self.phase not in ("g", "s", "l"):
            raise InputError(f"phase of {self.key} must be 'g', 's' or 'l'; got {self.phase!r}")
        for name in ("hf298", "s298", "u_hf298", "u_s298", "u_cp_rel"):
            value = getattr(self, name)
            if not np.isfinite(value):
                raise InputError(f"{name} of {self.key} must be finite; got {value!r}")
        if self.s298 <= 0.0:
            raise InputError(f"S° of {self.key} must be > 0 J/(mol K); got {self.s298!r}")

    def __repr__(self) -> str:
        return (
            f"Species({self.key!r}, data={self.data!r}, ΔfH°={self.hf298 / 1e3:.3f} kJ/mol, "
            f"S°={self.s298:.3f} J/(mol K), Cp: {self.cp_model.method})"
        )

    # ------------------------------------------------------------------ range checks
    @property
    def T_range(self) -> tuple[float, float]:
        """Valid temperature range of the heat-capacity model [K]."""
        return float(self.cp_model.T_min), float(self.cp_model.T_max)

    def check_range(self, T: ArrayLike, strict: bool = False) -> None:
        """Warn once (or raise if `strict`) when T leaves the Cp model's valid range.

        Raises
        ------
        OutOfRangeError
            If `strict` and any T lies outside the range.
        """
        T = np.asarray(T, dtype=float)
        lo, hi = self.T_range
        for side, bad in (("below", T < lo), ("above", T > hi)):
            if np.any(bad):
                worst = float(T[bad].min() if side == "below" else T[bad].max())
                msg = (
                    f"{self.key}: T = {worst:g} K is {side} the valid range "
                    f"{lo:g}–{hi:g} K of its Cp model ({self.cp_model.method})"
                )
                if strict:
                    raise OutOfRangeError(msg)
                tag = (self.key, self.cp_model.method, side)
                if tag not in _WARNED:
                    _WARNED.add(tag)
                    warnings.warn(msg + "; extrapolating", RangeWarning, stacklevel=3)

    # ------------------------------------------------------------------ properties
    def cp(self, T: ArrayLike, strict: bool = False) -> FloatArray:
        """Standard heat capacity Cp° [J/(mol K)] at T [K]."""
        T = as_temperature(T)
        self.check_range(T, strict)
        return self.cp_model.cp(T)

    def enthalpy(self, T: ArrayLike, strict: bool = False) -> FloatArray:
        """Standard molar enthalpy on the formation scale, ΔfH°(298.15) + ∫Cp° dT [J/mol]."""
        T = as_temperature(T)
        self.check_range(T, strict)
        return self.hf298 + self.cp_model.h_int(T)

    def entropy(self, T: ArrayLike, strict: bool = False) -> FloatArray:
        """Standard molar entropy S°(298.15) + ∫Cp°/T dT at p° = 1 bar [J/(mol K)]."""
        T = as_temperature(T)
        self.check_range(T, strict)
        return self.s298 + self.cp_model.s_int(T)

    def mu0_over_RT(self, T: ArrayLike, strict: bool = False) -> FloatArray:
        """Standard chemical potential over RT, (H° − T S°)/(R T) at p° = 1 bar [-].

        Notes
        -----
        Enthalpies are on the formation scale (elements in their reference states have
        H°(298.15 K) = 0), so for any balanced reaction ln K = −Σ ν_i μ°_i/(R T).
        """
        T = as_temperature(T)
        self.check_range(T, strict)
        h = self.hf298 + self.cp_model.h_int(T)
        s = self.s298 + self.cp_model.s_int(T)
        return h / (R * T) - s / R

    # ------------------------------------------------------------------ critical data
    @property
    def Tc(self) -> float | None:
        """Critical temperature [K] from ``chemicals`` (None if unknown)."""
        return _critical(self.cas)[0]

    @property
    def Pc(self) -> float | None:
        """Critical pressure [Pa] from ``chemicals`` (None if unknown)."""
        return _critical(self.cas)[1]

    @property
    def omega(self) -> float | None:
        """Acentric factor [-] from ``chemicals`` (None if unknown)."""
        return _critical(self.cas)[2]

    @property
    def molar_mass(self) -> float:
        """Molar mass [kg/mol] from the element counts."""
        from chemicals.elements import molecular_weight

        return float(molecular_weight(self.atoms)) * 1e-3

    def replace(self, *, note: str = "user override", **changes: Any) -> Species:
        """Return a copy with some data replaced, recording `note` as their source.

        Examples
        --------
        >>> nh3 = get_species("NH3")
        >>> nh3.replace(hf298=-45898.0, note="NIST-JANAF 1998").sources["hf298"]
        'NIST-JANAF 1998'
        """
        allowed = {"hf298", "s298", "cp_model", "u_hf298", "u_s298", "u_cp_rel"}
        unknown = set(changes) - allowed
        if unknown:
            raise InputError(f"cannot override {sorted(unknown)}; overridable: {sorted(allowed)}")
        sources = dict(self.sources)
        for name in changes:
            target = {"cp_model": "cp"}.get(name, name)
            if target in ("hf298", "s298", "cp"):
                sources[target] = note
        return dataclasses.replace(self, sources=sources, **changes)


@cache
def _critical(cas: str) -> tuple[float | None, float | None, float | None]:
    if not cas:
        return None, None, None
    from chemicals.acentric import omega
    from chemicals.critical import Pc, Tc

    def f(fn: Any) -> float | None:
        try:
            v = fn(cas)
        except Exception:
            return None
        return None if v is None else float(v)

    return f(Tc), f(Pc), f(omega)


def _from_identity(ident: Identity, data: str) -> Species:
    from .source_janaf import U_CP_REL_DEFAULT, U_HF_DEFAULT, U_S_DEFAULT, janaf_record

    if data == "janaf" or ident.phase != "g":
        rec = janaf_record(ident)
        u_hf = 0.0 if rec.hf298 == 0.0 and len(ident.atoms) == 1 else U_HF_DEFAULT
        label = f"NIST-JANAF 4th ed. (1998), table {rec.table}"
        if data != "janaf":
            label += " (condensed phases come from NIST-JANAF in the default set)"
        return Species(
            key=ident.key,
            cas=ident.cas,
            name=ident.name,
            formula=ident.formula,
            atoms=dict(ident.atoms),
            phase=ident.phase,
            hf298=rec.hf298,
            s298=rec.s298,
            cp_model=rec.cp,
            data=data,
            sources={"hf298": label, "s298": label, "cp": label},
            u_hf298=u_hf,
            u_s298=U_S_DEFAULT,
            u_cp_rel=U_CP_REL_DEFAULT,
        )
    from .source_default import default_record

    drec = default_record(ident)
    return Species(
        key=ident.key,
        cas=ident.cas,
        name=ident.name,
        formula=ident.formula,
        atoms=dict(ident.atoms),
        phase=ident.phase,
        hf298=drec.hf298,
        s298=drec.s298,
        cp_model=drec.cp,
        data=data,
        sources={"hf298": drec.hf_source, "s298": drec.s_source, "cp": drec.cp.method},
        u_hf298=drec.u_hf298,
        u_s298=drec.u_s298,
        u_cp_rel=drec.u_cp_rel,
    )


@cache
def _cached(ident: Identity, data: str) -> Species:
    return _from_identity(ident, data)


def get_species(identifier: str | Species, data: str = "default") -> Species:
    """Resolve a species and collect its data from a built-in source.

    Parameters
    ----------
    identifier : str or Species
        Formula (``"NH3"``), name (``"ammonia"``) or CAS number (``"7664-41-7"``); a phase
        suffix ``(s)`` / ``(l)`` selects a pure condensed phase. A :class:`Species` is
        returned unchanged.
    data : {"default", "janaf"}
        ``"default"``: ranked chemicals/thermo sources (see :mod:`eqconv.source_default`);
        ``"janaf"``: NIST-JANAF tables.

    Returns
    -------
    Species
        The same object for the same chemical, phase and data set.

    Raises
    ------
    UnknownSpeciesError, AmbiguousSpeciesError, MissingDataError, InputError

    Examples
    --------
    >>> round(get_species("NH3", data="janaf").hf298)
    -45898
    """
    if isinstance(identifier, Species):
        return identifier
    if data not in DATA_SOURCES:
        raise InputError(f"data must be one of {DATA_SOURCES}; got {data!r}")
    return _cached(resolve(identifier), data)
