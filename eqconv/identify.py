"""Resolve what a user typed (formula, name or CAS number) to exactly one chemical.

Formula look-ups in general-purpose databases pick one isomer silently ("C2H6O" gives
dimethyl ether) and an empty string can resolve to a metal; here a formula with isomers
and anything unknown are rejected with an error that says what to type instead.
"""

from __future__ import annotations

import re
from dataclasses import dataclass
from functools import cache

from chemicals import identifiers as _ids
from chemicals.elements import atoms_to_Hill, nested_formula_parser

from .errors import AmbiguousSpeciesError, UnknownSpeciesError

__all__ = ["Identity", "parse_formula", "resolve"]

_PHASE_SUFFIX = re.compile(r"\s*\((g|gas|s|solid|cr|gr|graphite|l|liq|liquid)\)\s*$", re.IGNORECASE)
_PHASES = {
    "g": "g",
    "gas": "g",
    "s": "s",
    "solid": "s",
    "cr": "s",
    "gr": "s",
    "graphite": "s",
    "l": "l",
    "liq": "l",
    "liquid": "l",
}
_CAS = re.compile(r"^\d{2,7}-\d{2}-\d$")
_FORMULA = re.compile(r"^(?:[A-Z][a-z]?\d*|\((?:[A-Z][a-z]?\d*)+\)\d*)+$")

# Common species of gas-phase reaction engineering, keyed by the formula engineers write.
# The CAS numbers are the registry's (common practice); they spare a full database load
# and fix the conventional display formula used as the result key.
_COMMON: dict[str, tuple[str, str]] = {
    "H2": ("1333-74-0", "hydrogen"),
    "N2": ("7727-37-9", "nitrogen"),
    "O2": ("7782-44-7", "oxygen"),
    "NH3": ("7664-41-7", "ammonia"),
    "H2O": ("7732-18-5", "water"),
    "CO": ("630-08-0", "carbon monoxide"),
    "CO2": ("124-38-9", "carbon dioxide"),
    "CH4": ("74-82-8", "methane"),
    "CH3OH": ("67-56-1", "methanol"),
    "SO2": ("7446-09-5", "sulfur dioxide"),
    "SO3": ("7446-11-9", "sulfur trioxide"),
    "NO": ("10102-43-9", "nitric oxide"),
    "NO2": ("10102-44-0", "nitrogen dioxide"),
    "N2O": ("10024-97-2", "nitrous oxide"),
    "H2S": ("7783-06-4", "hydrogen sulfide"),
    "COS": ("463-58-1", "carbonyl sulfide"),
    "CS2": ("75-15-0", "carbon disulfide"),
    "HCl": ("7647-01-0", "hydrogen chloride"),
    "Cl2": ("7782-50-5", "chlorine"),
    "HCN": ("74-90-8", "hydrogen cyanide"),
    "C2H2": ("74-86-2", "acetylene"),
    "C2H4": ("74-85-1", "ethylene"),
    "C2H6": ("74-84-0", "ethane"),
    "C3H8": ("74-98-6", "propane"),
    "C3H6": ("115-07-1", "propylene"),
    "Ar": ("7440-37-1", "argon"),
    "He": ("7440-59-7", "helium"),
    "Ne": ("7440-01-9", "neon"),
    "C": ("7440-44-0", "carbon"),
}
_COMMON_BY_CAS = {cas: key for key, (cas, _) in _COMMON.items()}
_COMMON_BY_NAME = {name: key for key, (_, name) in _COMMON.items()}


@dataclass(frozen=True)
class Identity:
    """One resolved chemical.

    Attributes
    ----------
    key : str
        Label used in results: the conventional formula for common species, otherwise the
        formula or name the user typed; condensed phases carry "(s)" or "(l)".
    cas : str
        CAS registry number.
    name : str
        Common name.
    formula : str
        Formula in Hill order.
    atoms : dict[str, int]
        Element counts.
    phase : str
        "g" (ideal-gas standard state), "s" or "l" (pure condensed phase).
    """

    key: str
    cas: str
    name: str
    formula: str
    atoms: dict[str, int]
    phase: str

    def __hash__(self) -> int:
        return hash((self.cas, self.phase))


def parse_formula(formula: str) -> dict[str, int]:
    """Element counts of a formula such as ``"CH3OH"`` or ``"Ca(OH)2"``.

    Raises
    ------
    UnknownSpeciesError
        If the text is not a formula of known elements.
    """
    if not _FORMULA.match(formula):
        raise UnknownSpeciesError(f"{formula!r} is not a chemical formula")
    atoms = nested_formula_parser(formula)
    symbols = {e.symbol for e in _ids.periodic_table}
    bad = [el for el in atoms if el not in symbols]
    if bad or not atoms:
        raise UnknownSpeciesError(f"{formula!r} contains unknown element(s) {bad}")
    return {el: int(n) for el, n in atoms.items()}


@cache
def _formula_counts() -> dict[str, list[tuple[str, str]]]:
    """Hill formula -> [(CAS, name)] over the whole bundled database (loads it once)."""
    db = _ids.get_pubchem_db()
    if not db.loaded_main_db:
        db.autoload_main_db()
    table: dict[str, list[tuple[str, str]]] = {}
    for meta in db.CAS_index.values():
        table.setdefault(meta.formula, []).append((meta.CASs, meta.common_name))
    return table


def _split_phase(text: str) -> tuple[str, str | None]:
    m = _PHASE_SUFFIX.search(text)
    if not m:
        return text.strip(), None
    return text[: m.start()].strip(), _PHASES[m.group(1).lower()]


def _identity(cas: str, name: str, key: str, phase: str) -> Identity:
    meta = _ids.search_chemical(cas)
    atoms = parse_formula(meta.formula) if meta.formula else {}
    if not atoms:
        raise UnknownSpeciesError(f"no formula is known for CAS {cas} ({name})")
    if phase != "g":
        key = f"{key}({phase})"
    return Identity(
        key=key, cas=cas, name=name, formula=atoms_to_Hill(atoms), atoms=atoms, phase=phase
    )


@cache
def resolve(identifier: str) -> Identity:
    """Resolve a formula, name or CAS number to exactly one chemical.

    Parameters
    ----------
    identifier : str
        ``"NH3"``, ``"ammonia"``, ``"7664-41-7"``; a phase suffix ``(g)``, ``(s)``, ``(l)``,
        ``(cr)`` or ``(gr)`` selects a pure condensed phase (``"C(s)"`` is graphite).

    Returns
    -------
    Identity

    Raises
    ------
    UnknownSpeciesError
        Empty text, or nothing matches.
    AmbiguousSpeciesError
        A formula shared by several chemicals (isomers); the message lists them and asks
        for a name or CAS number.

    Examples
    --------
    >>> resolve("ammonia").key, resolve("NH3").cas
    ('NH3', '7664-41-7')
    """
    if not isinstance(identifier, str) or not identifier.strip():
        raise UnknownSpeciesError(
            f"a species must be a non-empty formula, name or CAS number; got {identifier!r}"
        )
    text, phase = _split_phase(identifier)
    if not text:
        raise UnknownSpeciesError(f"{identifier!r} names a phase but no species")
    phase = phase or "g"
    if text in _COMMON:
        cas, name = _COMMON[text]
        return _identity(cas, name, text, phase)
    if _CAS.match(text):
        if not _ids.check_CAS(text):
            raise UnknownSpeciesError(f"{text!r} is not a valid CAS number (check digit fails)")
        try:
            meta = _ids.search_chemical(text)
        except ValueError:
            raise UnknownSpeciesError(f"no chemical with CAS number {text}") from None
        return _identity(meta.CASs, meta.common_name, _key_for(meta), phase)
    atoms = None
    if _FORMULA.match(text):
        try:
            atoms = parse_formula(text)
        except UnknownSpeciesError:  # e.g. "AMMONIA": letters, but not elements
            atoms = None
    if atoms is not None:
        hill = atoms_to_Hill(atoms)
        hits = _formula_counts().get(hill, [])
        if len(hits) > 1:
            listing = ", ".join(f"{n} ({c})" for c, n in sorted(hits)[:6])
            more = "" if len(hits) <= 6 else f" and {len(hits) - 6} more"
            raise AmbiguousSpeciesError(
                f"formula {text!r} matches {len(hits)} chemicals: {listing}{more}; "
                "give a name or CAS number instead"
            )
        if hits:
            cas, name = hits[0]
            return _identity(cas, name, _COMMON_BY_CAS.get(cas, text), phase)
        # fall through: could still be a name that looks like a formula (rare)
    lowered = text.lower()
    if lowered in _COMMON_BY_NAME:
        key = _COMMON_BY_NAME[lowered]
        cas, name = _COMMON[key]
        return _identity(cas, name, key, phase)
    try:
        meta = _ids.search_chemical(text)
    except ValueError:
        raise UnknownSpeciesError(
            f"no chemical named {text!r}; give a formula, a name or a CAS number"
        ) from None
    # guard against fuzzy matches: the name, a synonym or the formula must match exactly
    names = {meta.common_name.lower(), *(s.lower() for s in (meta.synonyms or []))}
    if lowered not in names and text != meta.formula:
        raise UnknownSpeciesError(
            f"{text!r} did not match a chemical exactly (nearest: {meta.common_name}, "
            f"CAS {meta.CASs}); give the CAS number to be sure"
        )
    return _identity(meta.CASs, meta.common_name, _key_for(meta), phase)


def _key_for(meta: object) -> str:
    """Result key of a chemical found by name or CAS: conventional formula, else its formula
    when it has no isomers in the database, else its name."""
    cas = str(getattr(meta, "CASs", ""))
    formula = str(getattr(meta, "formula", ""))
    if cas in _COMMON_BY_CAS:
        return _COMMON_BY_CAS[cas]
    if len(_formula_counts().get(formula, [])) <= 1:
        return formula
    return str(getattr(meta, "common_name", formula))
