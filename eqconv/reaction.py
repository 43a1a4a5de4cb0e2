"""Reactions: equation parsing, atom balance, and ΔrH°, ΔrS°, ΔrG°, ΔrCp°, ln K over T.

Examples
--------
>>> rxn = Reaction("N2 + 3 H2 = 2 NH3", data="janaf")
>>> rxn.coefficients
{'N2': -1.0, 'H2': -3.0, 'NH3': 2.0}
>>> round(float(rxn.ln_K(700.0) / np.log(10)), 3)   # NIST-JANAF: 2 x (-2.029)
-4.058
"""

from __future__ import annotations

import re
from collections.abc import Iterable, Mapping
from fractions import Fraction
from typing import Literal

import numpy as np
from numpy.typing import ArrayLike, NDArray

from ._validate import as_temperature
from .constants import P_BAR, R
from .errors import InputError, ReactionSyntaxError, UnbalancedReactionError
from .kvalue import ln_k_vant_hoff, standard_pressure_shift
from .species import Species, get_species

__all__ = ["Model", "Reaction", "atom_imbalance", "parse_equation"]

FloatArray = NDArray[np.float64]
Model = Literal["kirchhoff", "vant_hoff"]
_MODELS = ("kirchhoff", "vant_hoff")

_ARROW = re.compile(r"\s*(?:<=>|<->|⇌|->|→|=)\s*")
_NUM = r"(\d+(?:\.\d*)?(?:/\d+)?|\.\d+)"
_TERM_FORMS = (
    re.compile(rf"^{_NUM}\s*\*\s*(\S.*)$"),  # "3*H2", "3 * H2"
    re.compile(rf"^{_NUM}\s+(\S.*)$"),  # "3 H2"
    re.compile(rf"^{_NUM}([A-Z(].*)$"),  # "3H2" (a CAS number continues with '-')
)
_BAD_TOKEN = re.compile(r"(^|\s)[+*/=<>]|[+*/=<>](\s|$)|^[<>=*/]")


def _coefficient(text: str) -> float:
    try:
        value = float(Fraction(text)) if "/" in text else float(text)
    except (ZeroDivisionError, ValueError):
        raise ReactionSyntaxError(f"cannot read coefficient {text!r}") from None
    if not np.isfinite(value) or value <= 0:
        raise ReactionSyntaxError(f"a stoichiometric coefficient must be > 0; got {text!r}")
    return value


def _parse_side(side: str, sign: float, equation: str) -> list[tuple[str, float]]:
    if not side.strip():
        raise ReactionSyntaxError(f"one side of {equation!r} is empty")
    terms: list[tuple[str, float]] = []
    # species are separated by '+' with whitespace around it (so 'C(s)' or 'H+' stay whole)
    # '+' separates terms when a term follows it ("N2 + 3 H2", also "N2+3H2")
    for raw in re.split(r"\s*\+\s*(?=[\d.A-Za-z(])", side.strip()):
        raw = raw.strip()
        for form in _TERM_FORMS:
            m = form.match(raw)
            if m:
                coef, name = _coefficient(m.group(1)), m.group(2).strip()
                break
        else:
            coef, name = 1.0, raw
        if not name or _BAD_TOKEN.search(name):
            raise ReactionSyntaxError(f"cannot read term {raw!r} of {equation!r}")
        terms.append((name, sign * coef))
    return terms


def parse_equation(equation: str) -> dict[str, float]:
    """Parse ``"N2 + 3 H2 = 2 NH3"`` into signed coefficients (products > 0).

    Accepts ``=``, ``->``, ``<=>``, ``⇌`` and ``→``; coefficients may be integers, decimals
    or fractions (``1/2 N2``); species are written as formulas, names or CAS numbers,
    separated by ``" + "``. A species on both sides is netted.

    Raises
    ------
    ReactionSyntaxError
        Not exactly one arrow, an empty side, a bad coefficient, or nothing left after
        netting.

    Examples
    --------
    >>> parse_equation("1/2 N2 + 3/2 H2 -> NH3")
    {'N2': -0.5, 'H2': -1.5, 'NH3': 1.0}
    """
    if not isinstance(equation, str) or not equation.strip():
        raise ReactionSyntaxError(f"a reaction equation must be non-empty text; got {equation!r}")
    sides = _ARROW.split(equation)
    if len(sides) != 2:
        raise ReactionSyntaxError(
            f"{equation!r} must contain exactly one of '=', '->', '<=>' between reactants and "
            f"products (found {len(sides) - 1})"
        )
    out: dict[str, float] = {}
    for sp, nu in _parse_side(sides[0], -1.0, equation) + _parse_side(sides[1], 1.0, equation):
        out[sp] = out.get(sp, 0.0) + nu
    out = {sp: nu for sp, nu in out.items() if abs(nu) > 1e-12}
    if not out:
        raise ReactionSyntaxError(f"{equation!r} has no net change")
    return out


def atom_imbalance(
    coefficients: Mapping[str, float], atoms: Mapping[str, Mapping[str, int]]
) -> dict[str, float]:
    """Net element change Σ ν_i a_ij for every element that does not balance.

    Parameters
    ----------
    coefficients : mapping
        Species key -> signed coefficient (products > 0).
    atoms : mapping
        Species key -> element counts.

    Returns
    -------
    dict
        Element -> (products − reactants) atoms, only where |imbalance| > 1e-9.
    """
    net: dict[str, float] = {}
    for sp, nu in coefficients.items():
        for el, n in atoms[sp].items():
            net[el] = net.get(el, 0.0) + nu * n
    return {el: v for el, v in net.items() if abs(v) > 1e-9}


def _fmt(nu: float) -> str:
    """Coefficient as text that parses back to the same float (1 is left out)."""
    f = Fraction(nu).limit_denominator(1000)
    if float(f) == nu:
        return "" if f == 1 else str(f)
    return repr(float(nu))


class Reaction:
    """A balanced chemical reaction and its standard thermochemistry over T.

    Parameters
    ----------
    equation : str or mapping
        ``"N2 + 3 H2 = 2 NH3"`` (also ``->``, ``<=>``, fractional coefficients, names or
        CAS numbers), or a mapping species -> signed coefficient (products > 0).
    data : {"default", "janaf"}
        Built-in data source for species not given in `species`.
    species : iterable of Species or mapping, optional
        Species objects to use instead of the built-in ones, matched by the text used in
        the equation or by key (user species, overrides).

    Raises
    ------
    ReactionSyntaxError, UnbalancedReactionError, UnknownSpeciesError,
    AmbiguousSpeciesError, MissingDataError

    Notes
    -----
    Coefficients are positive for products. With μ°_i(T) the standard chemical potential on
    the formation scale, ΔrG°(T) = Σ ν_i μ°_i(T) and ln K = −ΔrG°/(R T); the standard
    state of a gas is the ideal gas at p° (1 bar unless asked otherwise), of a condensed
    species the pure phase (activity 1).
    """

    def __init__(
        self,
        equation: str | Mapping[str, float],
        data: str = "default",
        species: Iterable[Species] | Mapping[str, Species] | None = None,
    ) -> None:
        if isinstance(equation, Mapping):
            raw = {str(k): float(v) for k, v in equation.items() if float(v) != 0.0}
            if not raw:
                raise ReactionSyntaxError("a reaction needs at least one non-zero coefficient")
            if not all(np.isfinite(v) for v in raw.values()):
                raise ReactionSyntaxError(f"coefficients must be finite; got {equation!r}")
        else:
            raw = parse_equation(equation)
        given: dict[str, Species] = {}
        if species is not None:
            items = (
                species.items() if isinstance(species, Mapping) else ((s.key, s) for s in species)
            )
            for name, sp in items:
                if not isinstance(sp, Species):
                    raise InputError(f"species[{name!r}] must be a Species; got {type(sp)}")
                given[name] = sp
                given[sp.key] = sp
        resolved: dict[str, Species] = {}
        coefficients: dict[str, float] = {}
        for text, nu in raw.items():
            sp = given.get(text) or get_species(text, data=data)
            if sp.key in coefficients:  # 'NH3' and 'ammonia' in one equation
                coefficients[sp.key] += nu
            else:
                coefficients[sp.key] = nu
            resolved[sp.key] = sp
        coefficients = {k: v for k, v in coefficients.items() if abs(v) > 1e-12}
        if not coefficients:
            raise ReactionSyntaxError(
                f"{equation!r} has no net change once its species are resolved (the same "
                "species on both sides?)"
            )
        bad = atom_imbalance(coefficients, {k: resolved[k].atoms for k in coefficients})
        if bad:
            detail = ", ".join(f"{el}: {v:+g}" for el, v in sorted(bad.items()))
            raise UnbalancedReactionError(
                f"{self._text(coefficients)} does not balance (products − reactants: {detail})"
            )
        self.data = data
        self.coefficients: dict[str, float] = coefficients
        self.species: tuple[Species, ...] = tuple(resolved[k] for k in coefficients)
        self.keys: tuple[str, ...] = tuple(coefficients)
        self.nu: FloatArray = np.array([coefficients[k] for k in self.keys])
        self.delta_n_gas: float = float(
            sum(nu for sp, nu in zip(self.species, self.nu, strict=True) if sp.phase == "g")
        )
        self.equation: str = self._text(coefficients)

    @staticmethod
    def _text(coefficients: Mapping[str, float]) -> str:
        left = " + ".join(f"{_fmt(-v)} {k}".strip() for k, v in coefficients.items() if v < 0)
        right = " + ".join(f"{_fmt(v)} {k}".strip() for k, v in coefficients.items() if v > 0)
        return f"{left} = {right}"

    def __repr__(self) -> str:
        return f"Reaction({self.equation!r}, data={self.data!r})"

    # ------------------------------------------------------------------ helpers
    def _check_model(self, model: str) -> None:
        if model not in _MODELS:
            raise InputError(f"model must be one of {_MODELS}; got {model!r}")

    def _sum(self, attr: str, T: FloatArray, strict: bool) -> FloatArray:
        out = np.zeros_like(T)
        for sp, nu in zip(self.species, self.nu, strict=True):
            out = out + nu * getattr(sp, attr)(T, strict)
        return out

    @property
    def delta_H0(self) -> float:
        """Standard reaction enthalpy at 298.15 K [J/mol]."""
        return float(sum(nu * sp.hf298 for sp, nu in zip(self.species, self.nu, strict=True)))

    @property
    def delta_S0(self) -> float:
        """Standard reaction entropy at 298.15 K, p° = 1 bar [J/(mol K)]."""
        return float(sum(nu * sp.s298 for sp, nu in zip(self.species, self.nu, strict=True)))

    def _p_shift(self, standard_pressure: float) -> float:
        return standard_pressure_shift(self.delta_n_gas, P_BAR, standard_pressure)

    # ------------------------------------------------------------------ public API
    def ln_K(
        self,
        T: ArrayLike,
        model: Model = "kirchhoff",
        standard_pressure: float = P_BAR,
        strict: bool = False,
    ) -> FloatArray:
        """Natural logarithm of the equilibrium constant K(T).

        Parameters
        ----------
        T : array_like
            Temperature [K], > 0.
        model : {"kirchhoff", "vant_hoff"}
            ``"kirchhoff"`` integrates ΔrCp°(T) from 298.15 K (default);
            ``"vant_hoff"`` holds ΔrH° and ΔrS° at their 298.15 K values.
        standard_pressure : float
            Standard pressure p° [Pa]: 1e5 (1 bar, default) or 101325 (1 atm) or any other.
        strict : bool
            Raise :class:`~eqconv.errors.OutOfRangeError` instead of warning when T leaves
            a Cp correlation's range.

        Returns
        -------
        ndarray
            ln K [-], K = Π a_i^ν_i with gas activities p_i/p°.

        Notes
        -----
        Kirchhoff: ln K = −Σ ν_i μ°_i(T)/(R T); van 't Hoff: ln K = −ΔrH°(298.15)/(R T) +
        ΔrS°(298.15)/R. Changing p° adds −Δn_gas ln(p°/1 bar).
        """
        self._check_model(model)
        T = as_temperature(T)
        if model == "vant_hoff":
            for sp in self.species:
                sp.check_range(np.asarray(298.15), strict)
            out = ln_k_vant_hoff(T, self.delta_H0, self.delta_S0)
        else:
            out = -self._sum("mu0_over_RT", T, strict)
        return out + self._p_shift(standard_pressure)

    def K(
        self,
        T: ArrayLike,
        model: Model = "kirchhoff",
        standard_pressure: float = P_BAR,
        strict: bool = False,
    ) -> FloatArray:
        """Equilibrium constant K(T) [-] (see :meth:`ln_K`)."""
        return np.exp(self.ln_K(T, model, standard_pressure, strict))

    def delta_H(self, T: ArrayLike, model: Model = "kirchhoff", strict: bool = False) -> FloatArray:
        """Standard reaction enthalpy ΔrH°(T) [J/mol]."""
        self._check_model(model)
        T = as_temperature(T)
        if model == "vant_hoff":
            return np.full_like(T, self.delta_H0)
        return self._sum("enthalpy", T, strict)

    def delta_S(
        self,
        T: ArrayLike,
        model: Model = "kirchhoff",
        standard_pressure: float = P_BAR,
        strict: bool = False,
    ) -> FloatArray:
        """Standard reaction entropy ΔrS°(T) [J/(mol K)] at standard pressure p° [Pa]."""
        self._check_model(model)
        T = as_temperature(T)
        base = (
            np.full_like(T, self.delta_S0)
            if model == "vant_hoff"
            else self._sum("entropy", T, strict)
        )
        return base + R * self._p_shift(standard_pressure)

    def delta_G(
        self,
        T: ArrayLike,
        model: Model = "kirchhoff",
        standard_pressure: float = P_BAR,
        strict: bool = False,
    ) -> FloatArray:
        """Standard reaction Gibbs energy ΔrG°(T) = −R T ln K [J/mol]."""
        T = as_temperature(T)
        return -R * T * self.ln_K(T, model, standard_pressure, strict)

    def delta_Cp(self, T: ArrayLike, strict: bool = False) -> FloatArray:
        """Standard reaction heat capacity ΔrCp°(T) [J/(mol K)]."""
        T = as_temperature(T)
        return self._sum("cp", T, strict)
