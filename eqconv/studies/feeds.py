"""Feed parameters: one number (a ratio or a fraction) that generates a whole feed.

A sensitivity study varies the feed through the ratio an engineer controls — the
steam-to-carbon ratio of a reformer, the H2:N2 ratio of an ammonia loop, the inert level of
a purge-limited loop, the oxygen excess of a burner gas — rather than species by species.
A :class:`FeedParameter` carries that ratio's name (it becomes a dimension of a sweep),
its unit, its definition in words, its valid range, and the rule that turns an array of
values into feed amounts [mol] of the same shape.

Examples
--------
>>> sc = steam_to_carbon({"CH4": 1.0})
>>> {k: float(v) for k, v in sc.feed(3.0).items()}
{'CH4': 1.0, 'H2O': 3.0}
>>> hn = hydrogen_to_nitrogen(inerts={"Ar": 0.04})
>>> {k: round(float(v), 3) for k, v in hn.feed(3.0).items()}
{'N2': 0.24, 'H2': 0.72, 'Ar': 0.04}
"""

from __future__ import annotations

from collections.abc import Callable, Mapping
from dataclasses import dataclass, field

import numpy as np
from numpy.typing import ArrayLike, NDArray

from ..errors import InputError
from ..identify import resolve

__all__ = [
    "FeedParameter",
    "hydrogen_to_nitrogen",
    "inert_fraction",
    "oxygen_excess",
    "ratio",
    "steam_to_carbon",
]

FloatArray = NDArray[np.float64]
FeedRule = Callable[[FloatArray], dict[str, FloatArray]]


@dataclass(frozen=True)
class FeedParameter:
    """A scalar feed parameter and the rule that builds feed amounts from it.

    Attributes
    ----------
    name : str
        Identifier used as the dimension / column name (e.g. ``"steam_to_carbon"``).
    unit : str
        Unit of the parameter (e.g. ``"mol/mol"``, ``"1"`` for a fraction).
    description : str
        The definition in words, recorded in study outputs.
    bounds : tuple of float
        Valid range ``(low, high)`` of the parameter.
    inclusive : tuple of bool
        Whether ``low`` and ``high`` themselves are valid.
    rule : callable
        Maps a float array of values to ``{species key: amounts [mol]}`` of the same shape.
    """

    name: str
    unit: str
    description: str
    bounds: tuple[float, float]
    inclusive: tuple[bool, bool]
    rule: FeedRule = field(repr=False)

    def __post_init__(self) -> None:
        if not self.name.isidentifier():
            raise InputError(f"a feed parameter name must be an identifier; got {self.name!r}")

    def check(self, values: ArrayLike) -> FloatArray:
        """Return `values` as a float array after checking they lie in :attr:`bounds`.

        Raises
        ------
        InputError
            If a value is not finite or lies outside the valid range.
        """
        v = np.asarray(values, dtype=float)
        lo, hi = self.bounds
        below = (v < lo) if self.inclusive[0] else (v <= lo)
        above = (v > hi) if self.inclusive[1] else (v >= hi)
        bad = ~np.isfinite(v) | below | above
        if np.any(bad):
            first = float(v[bad].flat[0])
            left = "[" if self.inclusive[0] else "("
            right = "]" if self.inclusive[1] else ")"
            raise InputError(
                f"{self.name} must lie in {left}{lo:g}, {hi:g}{right} {self.unit}; got {first!r}"
            )
        return v

    def feed(self, values: ArrayLike) -> dict[str, FloatArray]:
        """Feed amounts [mol] for the parameter `values` (each array has their shape).

        Raises
        ------
        InputError
            If a value lies outside :attr:`bounds`.
        """
        v = self.check(values)
        out = self.rule(v)
        return {
            k: np.broadcast_to(np.asarray(a, dtype=float), v.shape).copy() for k, a in out.items()
        }


def _positive_mapping(
    amounts: Mapping[str, float] | None, what: str, allow_empty: bool = True
) -> dict[str, float]:
    out: dict[str, float] = {}
    for k, a in (amounts or {}).items():
        value = float(a)
        if not np.isfinite(value) or value < 0.0:
            raise InputError(f"{what}[{k!r}] must be a finite amount >= 0; got {a!r}")
        out[str(k)] = value
    if not allow_empty and not any(v > 0.0 for v in out.values()):
        raise InputError(f"{what} must contain at least one positive amount; got {amounts!r}")
    return out


def _carbon_atoms(key: str) -> int:
    try:
        return int(resolve(key).atoms.get("C", 0))
    except Exception as exc:  # unknown names: say what to do instead
        raise InputError(
            f"cannot count carbon atoms of {key!r} ({exc}); pass carbon_atoms={{{key!r}: n}}"
        ) from exc


def steam_to_carbon(
    hydrocarbons: Mapping[str, float],
    *,
    steam: str = "H2O",
    others: Mapping[str, float] | None = None,
    carbon_atoms: Mapping[str, int] | None = None,
) -> FeedParameter:
    """Steam-to-carbon ratio S/C of a reformer feed.

    Parameters
    ----------
    hydrocarbons : mapping
        Amounts of the carbon-bearing feed species whose carbon is counted [mol], > 0 in
        total (e.g. ``{"CH4": 0.95, "C2H6": 0.05}``).
    steam : str
        Key of the steam species.
    others : mapping, optional
        Further feed species at fixed amounts whose carbon is *not* counted [mol] (e.g.
        recycle H2, CO2).
    carbon_atoms : mapping, optional
        Carbon atoms per molecule for keys that cannot be resolved by formula.

    Returns
    -------
    FeedParameter
        ``name="steam_to_carbon"``, unit ``mol/mol``, valid range (0, ∞).

    Notes
    -----
    n_steam = S/C · Σ_i n_i c_i, with c_i the carbon atoms of hydrocarbon i (common
    practice: the carbon of CO and CO2 in the feed is not counted).
    """
    hc = _positive_mapping(hydrocarbons, "hydrocarbons", allow_empty=False)
    rest = _positive_mapping(others, "others")
    if steam in hc or steam in rest:
        raise InputError(f"steam species {steam!r} must not also appear in the fixed amounts")
    counts = dict(carbon_atoms or {})
    carbon = sum(n * (counts[k] if k in counts else _carbon_atoms(k)) for k, n in hc.items())
    if carbon <= 0.0:
        raise InputError(f"hydrocarbons {hydrocarbons!r} contain no carbon")

    def rule(v: FloatArray) -> dict[str, FloatArray]:
        out = {k: np.full_like(v, n) for k, n in {**hc, **rest}.items()}
        out[steam] = v * carbon
        return out

    return FeedParameter(
        "steam_to_carbon",
        "mol/mol",
        f"mol {steam} per mol of carbon in {sorted(hc)} (carbon = {carbon:g} mol)",
        (0.0, np.inf),
        (False, False),
        rule,
    )


def hydrogen_to_nitrogen(
    *, inerts: Mapping[str, float] | None = None, hydrogen: str = "H2", nitrogen: str = "N2"
) -> FeedParameter:
    """H2:N2 molar ratio of an ammonia synthesis feed at fixed inert mole fractions.

    Parameters
    ----------
    inerts : mapping, optional
        Mole fractions of inert species in the feed [-] (e.g. ``{"Ar": 0.03, "CH4": 0.02}``),
        summing to less than 1.
    hydrogen, nitrogen : str
        Keys of the two reactants.

    Returns
    -------
    FeedParameter
        ``name="H2_to_N2"``, unit ``mol/mol``, range (0, ∞); the feed totals 1 mol.

    Notes
    -----
    With r = n_H2/n_N2 and x_inert the inert total: n_N2 = (1 − x_inert)/(1 + r),
    n_H2 = r n_N2, n_j = x_j for each inert j. The stoichiometric ratio is r = 3.
    """
    xin = _positive_mapping(inerts, "inerts")
    total = sum(xin.values())
    if total >= 1.0:
        raise InputError(f"inert mole fractions must sum to < 1; got {total:g}")

    def rule(v: FloatArray) -> dict[str, FloatArray]:
        n2 = (1.0 - total) / (1.0 + v)
        out = {nitrogen: n2, hydrogen: v * n2}
        out.update({k: np.full_like(v, x) for k, x in xin.items()})
        return out

    return FeedParameter(
        "H2_to_N2",
        "mol/mol",
        f"mol {hydrogen} per mol {nitrogen}; inerts {xin} as mole fractions; 1 mol total",
        (0.0, np.inf),
        (False, False),
        rule,
    )


def inert_fraction(reactive: Mapping[str, float], *, inert: str = "Ar") -> FeedParameter:
    """Mole fraction of one inert species in the feed, the reactive part in fixed proportion.

    Parameters
    ----------
    reactive : mapping
        Relative amounts of the other feed species (any scale) [mol].
    inert : str
        Key of the inert species.

    Returns
    -------
    FeedParameter
        ``name="inert_fraction"``, unit ``1`` (mole fraction), range [0, 1); 1 mol total.

    Notes
    -----
    n_inert = x, n_i = (1 − x) r_i / Σ r, so the feed totals 1 mol.
    """
    rel = _positive_mapping(reactive, "reactive", allow_empty=False)
    if inert in rel:
        raise InputError(f"inert species {inert!r} must not also be in `reactive`")
    s = sum(rel.values())

    def rule(v: FloatArray) -> dict[str, FloatArray]:
        out = {k: (1.0 - v) * r / s for k, r in rel.items()}
        out[inert] = v.copy()
        return out

    return FeedParameter(
        "inert_fraction",
        "1",
        f"mole fraction of {inert} in the feed; rest {rel} in proportion; 1 mol total",
        (0.0, 1.0),
        (True, False),
        rule,
    )


def oxygen_excess(
    fuel: Mapping[str, float],
    stoichiometric_O2: float,
    *,
    oxygen: str = "O2",
    companions: Mapping[str, float] | None = None,
) -> FeedParameter:
    """Fractional oxygen excess over a stated stoichiometric demand.

    Parameters
    ----------
    fuel : mapping
        Fixed amounts of the other feed species [mol] (e.g. ``{"SO2": 0.1}``).
    stoichiometric_O2 : float
        Oxygen needed for complete reaction of the fuel [mol], > 0 (for SO2 + ½O2 = SO3 it
        is half the SO2).
    oxygen : str
        Key of oxygen.
    companions : mapping, optional
        Moles of each species carried per mol of O2 (air: ``{"N2": 79/21}``, common practice).

    Returns
    -------
    FeedParameter
        ``name="O2_excess"``, unit ``1`` (0.1 = 10 % excess), range (−1, ∞).

    Notes
    -----
    e = (n_O2 − n_O2,stoich)/n_O2,stoich, so n_O2 = (1 + e) n_O2,stoich and n_j = c_j n_O2.
    """
    base = _positive_mapping(fuel, "fuel")
    comp = _positive_mapping(companions, "companions")
    stoich = float(stoichiometric_O2)
    if not np.isfinite(stoich) or stoich <= 0.0:
        raise InputError(f"stoichiometric_O2 must be > 0 mol; got {stoichiometric_O2!r}")
    clash = ({oxygen} | set(comp)) & set(base)
    if clash:
        raise InputError(f"{sorted(clash)} appear both in `fuel` and as oxygen/companions")

    def rule(v: FloatArray) -> dict[str, FloatArray]:
        o2 = (1.0 + v) * stoich
        out = {k: np.full_like(v, n) for k, n in base.items()}
        out[oxygen] = o2
        out.update({k: c * o2 for k, c in comp.items()})
        return out

    return FeedParameter(
        "O2_excess",
        "1",
        f"(n_{oxygen} − {stoich:g} mol)/{stoich:g} mol; companions per mol {oxygen}: {comp}",
        (-1.0, np.inf),
        (False, False),
        rule,
    )


def ratio(
    name: str, numerator: str, denominator: str, base: Mapping[str, float], *, unit: str = "mol/mol"
) -> FeedParameter:
    """Generic ratio: the amount of `numerator` is the value times that of `denominator`.

    Parameters
    ----------
    name : str
        Parameter name (an identifier).
    numerator, denominator : str
        Species keys; `denominator` must be in `base` with a positive amount.
    base : mapping
        Amounts of every other feed species [mol] (a `numerator` entry is ignored).
    unit : str
        Unit label.

    Returns
    -------
    FeedParameter
        Range [0, ∞).

    Notes
    -----
    n_numerator = value · n_denominator; all other amounts as in `base`.
    """
    amounts = _positive_mapping(base, "base")
    if amounts.get(denominator, 0.0) <= 0.0:
        raise InputError(f"{denominator!r} must be in base with an amount > 0; got {base!r}")
    if numerator == denominator:
        raise InputError("numerator and denominator must differ")
    amounts.pop(numerator, None)
    den = amounts[denominator]

    def rule(v: FloatArray) -> dict[str, FloatArray]:
        out = {k: np.full_like(v, n) for k, n in amounts.items()}
        out[numerator] = v * den
        return out

    return FeedParameter(
        name, unit, f"mol {numerator} per mol {denominator}", (0.0, np.inf), (True, False), rule
    )
