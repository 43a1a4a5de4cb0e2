"""Quantities with units in case files: parse ``"450 degC"``, ``"30 bar"``, ``"1200 kmol/h"``.

Every dimensional value in a case file carries its unit as text and is converted to SI once,
here, when the file is read; past this module only floats in K, Pa, mol/s, mol, J/mol and
J/(mol K) flow on. A bare number for a dimensional quantity is refused (``450`` could be K or
°C), so nothing is guessed.

The converter is small and self-contained (no units library is needed at run time). The
accepted spellings of each kind are in :data:`UNITS`.

Notes
-----
Offset scales are converted explicitly, T[K] = (T[°C] + 273.15) and
T[K] = (T[°F] + 459.67) × 5/9. Gauge pressures (``barg``, ``psig``, ``kPag``, ``MPag``) are
taken relative to the standard atmosphere, P = P_gauge + 101325 Pa (common practice; a plant
at altitude should give absolute pressures instead). Normal cubic metres (``Nm3``) are gas at
0 °C and 101.325 kPa: 1 Nm3 = 101325 / (R × 273.15) mol = 44.615 mol (ideal gas, common
practice; other "standard" conditions exist, e.g. 15 °C, and are not accepted to avoid
confusion).

References
----------
.. [1] BIPM, *The International System of Units (SI)*, 9th ed. (2019): definitions of the
   kelvin, the degree Celsius and the pascal.
.. [2] NIST Special Publication 811 (2008), *Guide for the Use of the International System of
   Units*, appendix B: factors for psi (6894.757 Pa), atm (101325 Pa), torr (101325/760 Pa),
   kgf/cm² (98066.5 Pa), lb (0.45359237 kg), thermochemical calorie (4.184 J).

Examples
--------
>>> to_si("450 degC", "temperature")
723.15
>>> to_si("3.5 MPa", "pressure")
3500000.0
>>> round(to_si("3600 kmol/h", "molar_flow"), 9)
1000.0
"""

from __future__ import annotations

import math
import re
from typing import Literal

import numpy as np
from numpy.typing import ArrayLike, NDArray

from ..constants import P_ATM, R
from ..errors import InputError

__all__ = ["KINDS", "UNITS", "Kind", "from_si", "parse_number_unit", "to_si", "unit_factor"]

Kind = Literal[
    "temperature",
    "temperature_difference",
    "pressure",
    "molar_flow",
    "amount",
    "molar_energy",
    "molar_entropy",
]

#: SI unit of each kind, as written in messages and descriptions.
KINDS: dict[str, str] = {
    "temperature": "K",
    "temperature_difference": "K",
    "pressure": "Pa (absolute)",
    "molar_flow": "mol/s",
    "amount": "mol",
    "molar_energy": "J/mol",
    "molar_entropy": "J/(mol K)",
}

_PSI = 6894.757293168361  # Pa per lbf/in² (NIST SP 811, exact from lb and in)
_LBMOL = 453.59237  # mol per lb-mol (exact from the avoirdupois pound)
_NM3 = P_ATM / (R * 273.15)  # mol per normal cubic metre (0 °C, 101.325 kPa, ideal gas)


def _lin(factor: float, offset: float = 0.0) -> tuple[float, float]:
    """x_SI = factor * x + offset."""
    return (factor, offset)


_TEMPERATURE: dict[str, tuple[float, float]] = {
    "K": _lin(1.0),
    "kelvin": _lin(1.0),
    "degC": _lin(1.0, 273.15),
    "°C": _lin(1.0, 273.15),
    "C": _lin(1.0, 273.15),
    "degF": _lin(5.0 / 9.0, 459.67 * 5.0 / 9.0),
    "°F": _lin(5.0 / 9.0, 459.67 * 5.0 / 9.0),
    "F": _lin(5.0 / 9.0, 459.67 * 5.0 / 9.0),
    "degR": _lin(5.0 / 9.0),
    "°R": _lin(5.0 / 9.0),
}
_TEMPERATURE_DIFFERENCE: dict[str, tuple[float, float]] = {
    "K": _lin(1.0),
    "degC": _lin(1.0),
    "°C": _lin(1.0),
    "C": _lin(1.0),
    "degF": _lin(5.0 / 9.0),
    "°F": _lin(5.0 / 9.0),
    "F": _lin(5.0 / 9.0),
    "degR": _lin(5.0 / 9.0),
}
_PRESSURE: dict[str, tuple[float, float]] = {
    "Pa": _lin(1.0),
    "kPa": _lin(1e3),
    "MPa": _lin(1e6),
    "bar": _lin(1e5),
    "bara": _lin(1e5),
    "mbar": _lin(1e2),
    "atm": _lin(P_ATM),
    "psi": _lin(_PSI),
    "psia": _lin(_PSI),
    "torr": _lin(P_ATM / 760.0),
    "mmHg": _lin(133.322387415),
    "kgf/cm2": _lin(98066.5),
    "barg": _lin(1e5, P_ATM),
    "kPag": _lin(1e3, P_ATM),
    "MPag": _lin(1e6, P_ATM),
    "psig": _lin(_PSI, P_ATM),
}
_MOLAR_FLOW: dict[str, tuple[float, float]] = {
    "mol/s": _lin(1.0),
    "mol/min": _lin(1.0 / 60.0),
    "mol/h": _lin(1.0 / 3600.0),
    "kmol/s": _lin(1e3),
    "kmol/min": _lin(1e3 / 60.0),
    "kmol/h": _lin(1e3 / 3600.0),
    "lbmol/h": _lin(_LBMOL / 3600.0),
    "Nm3/h": _lin(_NM3 / 3600.0),
}
_AMOUNT: dict[str, tuple[float, float]] = {
    "mol": _lin(1.0),
    "kmol": _lin(1e3),
    "mmol": _lin(1e-3),
    "lbmol": _lin(_LBMOL),
}
_MOLAR_ENERGY: dict[str, tuple[float, float]] = {
    "J/mol": _lin(1.0),
    "kJ/mol": _lin(1e3),
    "cal/mol": _lin(4.184),
    "kcal/mol": _lin(4184.0),
}
_MOLAR_ENTROPY: dict[str, tuple[float, float]] = {
    "J/(mol K)": _lin(1.0),
    "J/mol/K": _lin(1.0),
    "J/(mol*K)": _lin(1.0),
    "cal/(mol K)": _lin(4.184),
    "cal/mol/K": _lin(4.184),
}

#: Accepted unit spellings of each kind (case-sensitive: "mbar" is not "Mbar").
UNITS: dict[str, dict[str, tuple[float, float]]] = {
    "temperature": _TEMPERATURE,
    "temperature_difference": _TEMPERATURE_DIFFERENCE,
    "pressure": _PRESSURE,
    "molar_flow": _MOLAR_FLOW,
    "amount": _AMOUNT,
    "molar_energy": _MOLAR_ENERGY,
    "molar_entropy": _MOLAR_ENTROPY,
}

_ALIASES = {"°K": "K", "℃": "°C", "℉": "°F", "kgf/cm²": "kgf/cm2", "Nm³/h": "Nm3/h"}
_QUANTITY = re.compile(
    r"^\s*(?P<num>[+-]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?)\s*(?P<unit>\S.*?)?\s*$"
)


def _examples(kind: str) -> str:
    return ", ".join(f"'{u}'" for u in UNITS[kind])


def _check_kind(kind: str) -> dict[str, tuple[float, float]]:
    try:
        return UNITS[kind]
    except KeyError:
        raise InputError(f"unknown quantity kind {kind!r}; expected one of {list(UNITS)}") from None


def parse_number_unit(text: str) -> tuple[float, str]:
    """Split ``"450 degC"`` into ``(450.0, "degC")`` (unit ``""`` when there is none).

    Raises
    ------
    InputError
        If the text does not start with a number.
    """
    m = _QUANTITY.match(text) if isinstance(text, str) else None
    if m is None:
        raise InputError(f"expected a number followed by a unit, e.g. '450 degC'; got {text!r}")
    unit = " ".join((m.group("unit") or "").split())
    return float(m.group("num")), _ALIASES.get(unit, unit)


def unit_factor(unit: str, kind: Kind) -> tuple[float, float]:
    """Return ``(a, b)`` with value_SI = a × value + b for `unit` of `kind`.

    Raises
    ------
    InputError
        If `unit` is not an accepted spelling for `kind`; the message lists those.
    """
    table = _check_kind(kind)
    u = _ALIASES.get(unit.strip(), unit.strip())
    if u not in table:
        raise InputError(
            f"unit {unit!r} is not a {kind.replace('_', ' ')} unit; expected one of "
            f"{_examples(kind)}"
        )
    return table[u]


def from_si(value: ArrayLike, unit: str, kind: Kind) -> NDArray[np.float64]:
    """Express SI values of `kind` in `unit` (for display: plots, tables).

    Examples
    --------
    >>> float(from_si(723.15, "degC", "temperature"))
    450.0
    """
    a, b = unit_factor(unit, kind)
    return (np.asarray(value, dtype=float) - b) / a


def to_si(value: str | float | int, kind: Kind) -> float:
    """Convert a quantity written with its unit to the SI unit of `kind`.

    Parameters
    ----------
    value : str
        A number and a unit, e.g. ``"450 degC"``, ``"30 bar"``, ``"3.5 MPa"``,
        ``"1200 kmol/h"``. A bare number is refused for every kind (the unit would be a
        guess).
    kind : {"temperature", "temperature_difference", "pressure", "molar_flow", "amount", \
"molar_energy", "molar_entropy"}
        What the value is; sets the accepted units and the SI unit of the result
        (K, K, Pa absolute, mol/s, mol, J/mol, J/(mol K)).

    Returns
    -------
    float
        The value in SI units.

    Raises
    ------
    InputError
        No unit, an unknown unit for `kind`, a non-finite number, an absolute temperature
        ≤ 0 K or an absolute pressure ≤ 0 Pa.

    Examples
    --------
    >>> to_si("30 barg", "pressure")
    3101325.0
    >>> round(to_si("932 degF", "temperature"), 2)
    773.15
    """
    table = _check_kind(kind)
    if isinstance(value, bool) or not isinstance(value, (str, int, float)):
        raise InputError(
            f"expected a {kind.replace('_', ' ')} as text such as "
            f"'{_example_value(kind)}'; got {value!r}"
        )
    if not isinstance(value, str):
        raise InputError(
            f"{value!r} has no unit; write the {kind.replace('_', ' ')} with one, e.g. "
            f"'{_example_value(kind)}' (accepted units: {_examples(kind)})"
        )
    number, unit = parse_number_unit(value)
    if not unit:
        raise InputError(
            f"{value!r} has no unit; write the {kind.replace('_', ' ')} with one, e.g. "
            f"'{_example_value(kind)}' (accepted units: {_examples(kind)})"
        )
    if unit not in table:
        raise InputError(
            f"unit {unit!r} in {value!r} is not a {kind.replace('_', ' ')} unit; expected one "
            f"of {_examples(kind)}"
        )
    a, b = table[unit]
    out = float(a * number + b)
    if not math.isfinite(out):
        raise InputError(f"{value!r} is not a finite {kind.replace('_', ' ')}")
    if kind == "temperature" and out <= 0.0:
        raise InputError(f"{value!r} is {out:g} K, not an absolute temperature > 0 K")
    if kind == "pressure" and out <= 0.0:
        raise InputError(f"{value!r} is {out:g} Pa absolute; expected an absolute pressure > 0")
    return out


def _example_value(kind: str) -> str:
    return {
        "temperature": "450 degC",
        "temperature_difference": "20 K",
        "pressure": "30 bar",
        "molar_flow": "1200 kmol/h",
        "amount": "10 kmol",
        "molar_energy": "-45.9 kJ/mol",
        "molar_entropy": "192.8 J/(mol K)",
    }[kind]
