"""Critical constants and binary interaction parameters for the cubic equations of state.

Data come from the property libraries ``chemicals`` (critical constants, acentric factors)
and ``thermo`` (its interaction-parameter database ``thermo.interaction_parameters.IPDB``).
Every value is returned with the method or table it came from, missing data raise
:class:`~eqconv.errors.MissingDataError`, and interaction parameters absent from the database
are listed explicitly (they are set to zero, never guessed). Species are keyed by CAS number
strings; integer CAS numbers are rejected because the libraries may resolve them to a
different source.

The math lives in :mod:`eqconv.eos`; this module only gathers its inputs.
"""

from __future__ import annotations

import math
import warnings
from collections.abc import Mapping, Sequence
from dataclasses import dataclass
from typing import Any

import numpy as np
from numpy.typing import NDArray

from .errors import DataWarning, InputError, MissingDataError

_TABLE_LABEL = "Peng-Robinson kij table"

__all__ = [
    "QUANTUM_GASES",
    "CriticalConstants",
    "CriticalSource",
    "InteractionReport",
    "PairParameter",
    "critical_constants",
    "interaction_parameters",
]

#: What each ``chemicals`` method key stands for (from the ``chemicals`` documentation).
METHOD_DESCRIPTIONS: dict[str, str] = {
    "HEOS": "high-accuracy reference equation of state (NIST REFPROP collection, "
    "Huber et al. 2022)",
    "IUPAC": "IUPAC critically evaluated experimental data (Ambrose et al. series)",
    "MATTHEWS": "critically evaluated data for inorganic compounds (Mathews 1972)",
    "CRC": "CRC Handbook, critically evaluated data",
    "PSRK": "PSRK compilation, experimental and estimated (Horstmann et al. 2005)",
    "PD": "Passut & Danner (1973) compilation",
    "WEBBOOK": "NIST Chemistry WebBook",
    "PINAMARTINES": "Pina-Martinez, Privat & Jaubert, AIChE J., supporting data",
    "YAWS": "Yaws compilation",
    "JOBACK": "Joback group-contribution ESTIMATE",
    "WILSON_JASPERSON": "Wilson-Jasperson ESTIMATE",
    "ACENTRIC_DEFINITION": "derived from the definition of omega with thermo's vapour "
    "pressure and chemicals' critical constants",
}

_ESTIMATES = frozenset({"JOBACK", "WILSON_JASPERSON"})

#: CAS numbers of quantum gases (H2, D2, He, Ne) for which effective critical constants are
#: common practice in cubic equations of state; eqconv uses the classical values unchanged.
QUANTUM_GASES: dict[str, str] = {
    "1333-74-0": "H2",
    "7782-39-0": "D2",
    "7440-59-7": "He",
    "7440-01-9": "Ne",
}

_KIND_TO_IP_TYPE = {"peng-robinson": "PR kij", "srk": "SRK kij"}


def _check_cas_list(cas_list: Sequence[str]) -> tuple[str, ...]:
    from chemicals.identifiers import check_CAS

    if isinstance(cas_list, str):
        raise InputError(
            f"cas_list must be a sequence of CAS strings, not one string; got {cas_list!r}"
        )
    cas = tuple(cas_list)
    if not cas:
        raise InputError("cas_list must name at least one species; got an empty sequence")
    for c in cas:
        if not isinstance(c, str):
            raise InputError(
                f"CAS numbers must be strings such as '7727-37-9'; got {c!r} ({type(c).__name__})"
            )
        if not check_CAS(c):
            raise InputError(f"{c!r} is not a valid CAS number (format or check digit)")
    dup = sorted({c for c in cas if cas.count(c) > 1})
    if dup:
        raise InputError(f"cas_list must not repeat a species; repeated: {dup}")
    return cas


# ----------------------------------------------------------------------- critical constants


@dataclass(frozen=True)
class CriticalSource:
    """Which ``chemicals`` method supplied each critical datum of one species.

    Attributes
    ----------
    cas : str
        CAS number of the species.
    Tc_method, Pc_method, omega_method : str
        ``chemicals`` method keys (see :data:`METHOD_DESCRIPTIONS`).
    estimated : bool
        True if any of the three data is a group-contribution estimate.
    """

    cas: str
    Tc_method: str
    Pc_method: str
    omega_method: str
    estimated: bool

    def describe(self) -> str:
        """One line naming the source of each datum."""
        methods = (("Tc", self.Tc_method), ("Pc", self.Pc_method), ("omega", self.omega_method))
        if len({m for _, m in methods}) == 1:
            m = self.Tc_method
            text = f"Tc, Pc, omega from {m} ({METHOD_DESCRIPTIONS.get(m, 'see chemicals')})"
        else:
            text = "; ".join(
                f"{name} from {m} ({METHOD_DESCRIPTIONS.get(m, 'see chemicals')})"
                for name, m in methods
            )
        flag = " [contains an ESTIMATE]" if self.estimated else ""
        return f"{self.cas}: {text}{flag}"


@dataclass(frozen=True)
class CriticalConstants:
    """Critical constants of a list of species, in the order given.

    Attributes
    ----------
    cas : tuple of str
        CAS numbers, in the order of the arrays.
    Tc : ndarray, shape (nc,)
        Critical temperatures [K] (read-only).
    Pc : ndarray, shape (nc,)
        Critical pressures [Pa] (read-only).
    omega : ndarray, shape (nc,)
        Acentric factors [-] (read-only).
    sources : tuple of CriticalSource
        Method used for each species.
    notes : tuple of str
        Remarks a user should see (quantum gases, estimates).
    """

    cas: tuple[str, ...]
    Tc: NDArray[np.float64]
    Pc: NDArray[np.float64]
    omega: NDArray[np.float64]
    sources: tuple[CriticalSource, ...]
    notes: tuple[str, ...]


def _first_value(cas: str, prop: str, get: Any, methods: Any) -> tuple[float, str]:
    available = list(methods(cas))
    for method in available:
        value = get(cas, method=method)
        if value is not None and math.isfinite(float(value)):
            return float(value), method
    raise MissingDataError(
        f"no {prop} for species {cas!r} in chemicals (methods tried: {available or 'none'})"
    )


def critical_constants(cas_list: Sequence[str]) -> CriticalConstants:
    """Critical temperature, critical pressure and acentric factor of each species.

    Parameters
    ----------
    cas_list : sequence of str
        CAS numbers (strings, e.g. ``"7727-37-9"``), no repeats.

    Returns
    -------
    CriticalConstants
        Arrays ``Tc`` [K], ``Pc`` [Pa], ``omega`` [-] in the order of `cas_list`, the
        ``chemicals`` method behind each value and notes.

    Raises
    ------
    InputError
        If a CAS number is malformed, not a string, or repeated.
    MissingDataError
        If ``chemicals`` has no value of Tc, Pc or omega for a species (the message names it).

    Warns
    -----
    DataWarning
        If a value is a group-contribution estimate (only used when nothing else exists).

    Notes
    -----
    For each datum the first method ``chemicals`` lists for the species is used
    (``chemicals.critical.Tc_methods`` / ``Pc_methods``, ``chemicals.acentric.omega_methods``),
    which is the value ``chemicals`` itself returns by default; it is called by name so that
    the method is recorded. For hydrogen and helium many engineers use effective
    (quantum-corrected, temperature-dependent) critical constants in cubic equations of state
    (common practice); eqconv does not change data silently and uses the classical values,
    recording a note for such species.

    Examples
    --------
    >>> cc = critical_constants(["7727-37-9"])  # nitrogen
    >>> round(float(cc.Tc[0]), 3), cc.sources[0].Tc_method
    (126.192, 'HEOS')
    """
    from chemicals.acentric import omega, omega_methods
    from chemicals.critical import Pc, Pc_methods, Tc, Tc_methods

    cas = _check_cas_list(cas_list)
    tc = np.empty(len(cas))
    pc = np.empty(len(cas))
    om = np.empty(len(cas))
    sources: list[CriticalSource] = []
    notes: list[str] = []
    for i, c in enumerate(cas):
        tc[i], m_t = _first_value(c, "critical temperature Tc", Tc, Tc_methods)
        pc[i], m_p = _first_value(c, "critical pressure Pc", Pc, Pc_methods)
        om[i], m_o = _first_value(c, "acentric factor omega", omega, omega_methods)
        estimated = bool({m_t, m_p, m_o} & _ESTIMATES)
        sources.append(CriticalSource(c, m_t, m_p, m_o, estimated))
        if estimated:
            msg = (
                f"critical constants of {c} include a group-contribution estimate "
                f"(Tc: {m_t}, Pc: {m_p}, omega: {m_o})"
            )
            warnings.warn(msg, DataWarning, stacklevel=2)
            notes.append(msg)
        if c in QUANTUM_GASES:
            notes.append(
                f"{QUANTUM_GASES[c]} ({c}) is a quantum gas: classical critical constants "
                f"Tc={tc[i]:g} K, Pc={pc[i]:g} Pa from chemicals are used unchanged; effective "
                "(quantum-corrected) constants are common practice in cubic EOS but not applied"
            )
    for arr in (tc, pc, om):
        arr.flags.writeable = False
    return CriticalConstants(cas, tc, pc, om, tuple(sources), tuple(notes))


# --------------------------------------------------------------------- interaction parameters


@dataclass(frozen=True)
class PairParameter:
    """One binary interaction parameter and where it came from.

    Attributes
    ----------
    cas_a, cas_b : str
        The two species (in `cas_list` order).
    kij : float
        Value used [-].
    source : str
        ``"database"``, ``"override"`` or ``"missing"`` (set to 0).
    detail : str
        Table name, the overridden database value, or why the pair is missing.
    """

    cas_a: str
    cas_b: str
    kij: float
    source: str
    detail: str


@dataclass(frozen=True)
class InteractionReport:
    """Where every binary interaction parameter came from.

    Attributes
    ----------
    kind : str
        Equation of state (``"peng-robinson"`` or ``"srk"``).
    table : str or None
        Internal key of the thermo IPDB table used (not printed: reports say
        "thermo's interaction-parameter database"), None if thermo has none for this `kind`.
    pairs : tuple of PairParameter
        Every pair ``i < j``, in `cas_list` order.
    missing : tuple of (str, str)
        Pairs absent from the database and not overridden (their kij is 0).
    """

    kind: str
    table: str | None
    pairs: tuple[PairParameter, ...]
    missing: tuple[tuple[str, str], ...]

    def __str__(self) -> str:
        head = (
            f"{self.kind} kij from thermo's interaction-parameter database ({_TABLE_LABEL})"
            if self.table
            else f"{self.kind} kij: thermo's IPDB has no table of this type; all pairs 0 "
            "unless overridden"
        )
        lines = [head]
        for p in self.pairs:
            lines.append(f"  {p.cas_a} / {p.cas_b}: kij = {p.kij:+.4f}  [{p.source}] {p.detail}")
        if self.missing:
            lines.append(
                "  missing from the database (set to 0): "
                + ", ".join(f"{a} / {b}" for a, b in self.missing)
            )
        return "\n".join(lines)


def _resolve_overrides(
    overrides: Mapping[tuple[str, str], float] | None,
    cas: tuple[str, ...],
    keys: Sequence[str] | None,
) -> dict[tuple[int, int], float]:
    index: dict[str, int] = {c: i for i, c in enumerate(cas)}
    if keys is not None:
        if isinstance(keys, str) or len(keys) != len(cas):
            raise InputError(
                f"keys must be a sequence of {len(cas)} labels, one per species; got {keys!r}"
            )
        for i, key in enumerate(keys):
            if not isinstance(key, str) or not key:
                raise InputError(f"keys must be non-empty strings; got {key!r}")
            if key in index and index[key] != i:
                raise InputError(f"key {key!r} is ambiguous: it names two species")
            index[key] = i
    out: dict[tuple[int, int], float] = {}
    for pair, value in (overrides or {}).items():
        if not isinstance(pair, tuple) or len(pair) != 2:
            raise InputError(f"override keys must be pairs (a, b); got {pair!r}")
        try:
            i, j = index[pair[0]], index[pair[1]]
        except (KeyError, TypeError):
            raise InputError(
                f"override {pair!r} names a species not in the list; accepted: {sorted(index)}"
            ) from None
        if i == j:
            raise InputError(f"override {pair!r} pairs a species with itself (kii is 0)")
        v = float(value)
        if not (math.isfinite(v) and -1.0 < v < 1.0):
            raise InputError(
                f"override kij for {pair!r} must be finite and in (-1, 1); got {value!r}"
            )
        ij = (min(i, j), max(i, j))
        if ij in out and out[ij] != v:
            raise InputError(
                f"override for pair {pair!r} given twice with different values "
                f"({out[ij]!r} and {v!r})"
            )
        out[ij] = v
    return out


def interaction_parameters(
    cas_list: Sequence[str],
    kind: str = "peng-robinson",
    *,
    overrides: Mapping[tuple[str, str], float] | None = None,
    keys: Sequence[str] | None = None,
) -> tuple[NDArray[np.float64], InteractionReport]:
    """Binary interaction parameters ``k_ij`` for the van der Waals mixing rule.

    Parameters
    ----------
    cas_list : sequence of str
        CAS numbers (strings), no repeats.
    kind : {"peng-robinson", "srk"}
        Equation of state the parameters are for.
    overrides : mapping of (str, str) to float, optional, keyword-only
        User values ``{(a, b): kij}`` [-], each in (-1, 1); ``a`` and ``b`` are CAS numbers
        from `cas_list` or labels from `keys`; order within a pair does not matter.
    keys : sequence of str, optional, keyword-only
        Labels of the species (e.g. formulas), one per entry of `cas_list`, accepted in
        `overrides`.

    Returns
    -------
    kij : ndarray, shape (nc, nc)
        Symmetric matrix with a zero diagonal [-].
    report : InteractionReport
        Each pair with its value and source, and the pairs missing from the database.

    Raises
    ------
    InputError
        If a CAS number, `kind`, a key or an override is malformed.

    Notes
    -----
    Values come from thermo's interaction-parameter database
    (``thermo.interaction_parameters.IPDB``), from the first table of type ``"PR kij"`` for
    Peng-Robinson; they are temperature-independent constants. thermo 0.6 has no table of
    type ``"SRK kij"``, so for SRK every pair is 0 unless overridden (the report says so).
    A pair absent from the table (e.g. H2-NH3 in the PR table) is set to 0 and listed in
    ``report.missing``; thermo itself would return 0 for it silently.

    Examples
    --------
    >>> k, rep = interaction_parameters(["7727-37-9", "1333-74-0", "7664-41-7"])
    >>> rep.missing  # H2-NH3 has no PR kij in the database
    (('1333-74-0', '7664-41-7'),)
    """
    from thermo.interaction_parameters import IPDB

    if kind not in _KIND_TO_IP_TYPE:
        raise InputError(f"kind must be one of {tuple(_KIND_TO_IP_TYPE)}; got {kind!r}")
    cas = _check_cas_list(cas_list)
    user = _resolve_overrides(overrides, cas, keys)
    tables = IPDB.get_tables_with_type(_KIND_TO_IP_TYPE[kind])
    table: str | None = tables[0] if tables else None

    nc = len(cas)
    kij = np.zeros((nc, nc))
    pairs: list[PairParameter] = []
    missing: list[tuple[str, str]] = []
    for i in range(nc):
        for j in range(i + 1, nc):
            a, b = cas[i], cas[j]
            in_db = table is not None and IPDB.has_ip_specific(table, [a, b], "kij")
            db_value = float(IPDB.get_ip_specific(table, [a, b], "kij")) if in_db else None
            if (i, j) in user:
                value = user[(i, j)]
                detail = (
                    f"replaces database value {db_value:+.4f}"
                    if db_value is not None
                    else "pair not in the database"
                )
                pairs.append(PairParameter(a, b, value, "override", detail))
            elif db_value is not None:
                value = db_value
                pairs.append(
                    PairParameter(
                        a,
                        b,
                        value,
                        "database",
                        f"thermo interaction-parameter database ({_TABLE_LABEL})",
                    )
                )
            else:
                value = 0.0
                why = (
                    f"not in thermo's interaction-parameter database ({_TABLE_LABEL})"
                    if table is not None
                    else f"thermo IPDB has no {_KIND_TO_IP_TYPE[kind]!r} table"
                )
                pairs.append(PairParameter(a, b, 0.0, "missing", why))
                missing.append((a, b))
            kij[i, j] = kij[j, i] = value
    kij.flags.writeable = False
    return kij, InteractionReport(kind, table, tuple(pairs), tuple(missing))
