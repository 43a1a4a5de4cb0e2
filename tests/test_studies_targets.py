"""Target finders: exact roots on the solver, checked against dense grids and identities.

All feeds are invented. External checks: the exact ideal-gas identities of REFERENCES.md §3
(derived) and the K = 1 crossover of the water-gas shift from NIST-JANAF log Kf
(REFERENCES.md §1, derived, printed to 1 K).
"""

from __future__ import annotations

import numpy as np
import pytest

from eqconv import InputError, Reaction
from eqconv.constants import P_BAR
from eqconv.studies import (
    UnreachableTargetError,
    conversion_contour,
    equilibrium_conversion,
    feed_ratio_for_conversion,
    pressure_for_conversion,
    steam_to_carbon,
    temperature_for_conversion,
)

C = 3.0 * np.sqrt(3.0) / 4.0  # 1.2990, REFERENCES.md §3


@pytest.fixture(scope="module")
def nh3() -> Reaction:
    return Reaction("1/2 N2 + 3/2 H2 = NH3", data="janaf")


# Invented stoichiometric synthesis gas (no inerts): the identity of REFERENCES.md §3 holds.
STOICH = {"N2": 0.5, "H2": 1.5}
# Invented loop gas with 5 % inerts.
LOOP = {"N2": 0.2375, "H2": 0.7125, "Ar": 0.05}


def _bracketing_cell(x: np.ndarray, f: np.ndarray) -> tuple[float, float]:
    """The grid cell [x_k, x_k+1] where f changes sign (exactly one expected)."""
    k = np.flatnonzero(np.sign(f[:-1]) != np.sign(f[1:]))
    assert k.size == 1
    return float(x[k[0]]), float(x[k[0] + 1])


def test_pressure_for_conversion_matches_identity(nh3: Reaction) -> None:
    # REFERENCES.md §3 (derived): ε = 1 − (1 + 1.2990 K P/p°)^(−1/2), so the pressure that
    # reaches ε is P/p° = ((1 − ε)^(−2) − 1)/(1.2990 K); exact for an ideal gas.
    T = np.array([600.0, 700.0, 800.0])
    target = 0.3
    res = pressure_for_conversion(nh3, STOICH, target, T, (1e4, 1e9))
    K = np.exp(nh3.ln_K(T))
    P_exact = ((1 - target) ** -2 - 1) / (C * K) * P_BAR
    assert res.value == pytest.approx(P_exact, rel=1e-7)
    assert res.conversion == pytest.approx(np.full(3, target), abs=1e-9)
    assert res.reachable.all() and res.quantity == "P" and res.unit == "Pa"


def test_temperature_for_conversion_matches_identity(nh3: Reaction) -> None:
    # Same identity solved for K: at the T found, K must equal ((1−ε)^−2 − 1)/(1.2990 P/p°).
    P = np.array([50e5, 150e5, 300e5])
    target = 0.25
    res = temperature_for_conversion(nh3, STOICH, target, P, (500.0, 1000.0))
    K_needed = ((1 - target) ** -2 - 1) / (C * P / P_BAR)
    assert np.exp(nh3.ln_K(res.value)) == pytest.approx(K_needed, rel=1e-6)
    # exothermic and Δn < 0: a higher pressure allows a higher temperature
    assert np.all(np.diff(res.value) > 0)


def test_temperature_target_against_dense_grid(nh3: Reaction) -> None:
    P = 100e5
    res = temperature_for_conversion(nh3, LOOP, 0.2, P, (550.0, 950.0), key="N2")
    T_grid = np.linspace(550.0, 950.0, 801)  # 0.5 K spacing
    X = equilibrium_conversion(nh3, LOOP, T_grid, P, key="N2")
    lo, hi = _bracketing_cell(T_grid, X - 0.2)
    assert lo <= float(res.value) <= hi
    # linear interpolation in the cell agrees to the cell's curvature error (≪ 0.5 K)
    T_lin = np.interp(0.2, X[::-1], T_grid[::-1])
    assert float(res.value) == pytest.approx(T_lin, abs=0.01)


def test_contour_all_T_at_once_against_dense_grid(nh3: Reaction) -> None:
    T = np.linspace(600.0, 850.0, 11)
    target = np.array([0.15, 0.3])[:, None]
    res = conversion_contour(nh3, LOOP, target, T[None, :], (1e5, 1e9), key="N2")
    assert res.value.shape == (2, 11) and res.reachable.all()
    P_grid = np.geomspace(1e5, 1e9, 1601)
    for i, t in enumerate((0.15, 0.3)):
        for j in (0, 5, 10):
            X = equilibrium_conversion(nh3, LOOP, T[j], P_grid, key="N2")
            lo, hi = _bracketing_cell(P_grid, X - t)
            assert lo <= res.value[i, j] <= hi
    # a higher target needs a higher pressure, and so does a higher temperature
    assert np.all(res.value[1] > res.value[0])
    assert np.all(np.diff(res.value, axis=1) > 0)


def test_contour_masks_unreachable_points(nh3: Reaction) -> None:
    T = np.array([650.0, 1400.0])  # at 1400 K even 1e8 Pa gives little ammonia
    res = conversion_contour(nh3, LOOP, 0.3, T, (1e5, 1e8), key="N2")
    assert res.reachable.tolist() == [True, False]
    assert np.isfinite(res.value[0]) and np.isnan(res.value[1])
    with pytest.raises(UnreachableTargetError, match=r"1400 K"):
        pressure_for_conversion(nh3, LOOP, 0.3, T, (1e5, 1e8), key="N2")


def test_unreachable_temperature_target_names_the_ends(nh3: Reaction) -> None:
    with pytest.raises(UnreachableTargetError, match="not crossed") as err:
        temperature_for_conversion(nh3, STOICH, 0.9, 10e5, (600.0, 900.0))
    assert "600 K" in str(err.value) and "900 K" in str(err.value)
    assert isinstance(err.value, ValueError)


def test_shift_half_conversion_at_K_equal_one() -> None:
    # NIST-JANAF log Kf (REFERENCES.md §1, derived): K = 1 for CO + H2O = CO2 + H2 at
    # 1097 K (printed to 1 K). Equimolar feed: ε = √K/(1 + √K) (§3), so ε = 0.5 there.
    rxn = Reaction("CO + H2O = CO2 + H2", data="janaf")
    res = temperature_for_conversion(rxn, {"CO": 1.0, "H2O": 1.0}, 0.5, 1e5, (900.0, 1300.0))
    assert float(res.value) == pytest.approx(1097.0, abs=1.0)
    assert float(rxn.ln_K(res.value)) == pytest.approx(0.0, abs=1e-8)


def test_feed_ratio_for_conversion_against_dense_grid() -> None:
    # Invented reformer: CH4 + steam at 900 K, 5 bar; find S/C for 60 % CH4 conversion.
    rxns = [
        Reaction("CH4 + H2O = CO + 3 H2", data="janaf"),
        Reaction("CO + H2O = CO2 + H2", data="janaf"),
    ]
    p = steam_to_carbon({"CH4": 1.0})
    res = feed_ratio_for_conversion(rxns, p, 0.6, 900.0, 5e5, (1.0, 8.0), key="CH4")
    assert res.quantity == "steam_to_carbon"
    sc = np.linspace(1.0, 8.0, 701)
    X = equilibrium_conversion(rxns, p.feed(sc), 900.0, 5e5, key="CH4")
    lo, hi = _bracketing_cell(sc, X - 0.6)
    assert lo <= float(res.value) <= hi
    assert float(res.conversion) == pytest.approx(0.6, abs=1e-9)


def test_target_input_errors(nh3: Reaction) -> None:
    with pytest.raises(InputError, match=r"\(0, 1\)"):
        pressure_for_conversion(nh3, STOICH, 1.2, 700.0, (1e5, 1e8))
    with pytest.raises(InputError, match="on_unreachable"):
        pressure_for_conversion(nh3, STOICH, 0.2, 700.0, (1e5, 1e8), on_unreachable="nan")
    with pytest.raises(InputError, match="P_bracket"):
        pressure_for_conversion(nh3, STOICH, 0.2, 700.0, (-1.0, 1e8))
