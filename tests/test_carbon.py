"""Tests of eqconv.studies.carbon: the carbon-formation boundary of a steam reformer feed.

Checks of the method: the S/C limit found from the carbon activity of the carbon-free gas
(Boudouard and methane cracking) agrees with the other way, solving with graphite allowed
and finding where it becomes present, and with a brute-force dense S/C grid of that solve.

Expectations of the trade, stated with what we find (common practice, see the module notes
of eqconv.studies.carbon):

* carbon risk rises as S/C falls: a_C falls monotonically with S/C at every T;
* industrial reformers run at S/C ≈ 3 to stay clear of carbon: at S/C = 3 no carbon is
  thermodynamically stable anywhere in 700-1300 K and 1-30 bar (the thermodynamic limit is
  far lower, about 0.3-1.5; kinetic carbon and heavier feeds explain the margin);
* methane cracking (CH4 = C + 2 H2, endothermic) makes carbon more stable at high T for a
  steam-poor gas, but with steam the equilibrated gas decides: at 1 bar the limit peaks near
  850 K (≈ 1.5) and falls toward 1 at high T; at 30 bar it rises with T up to ≈ 1000 K and
  then stays near 0.83. So "carbon disappears at high T" holds at low pressure above ~900 K,
  not at 30 bar below 1000 K.
* derived: at high T the gas tends to CO + H2, so carbon is avoided when O/C ≥ 1, i.e.
  S/C* → 1 for a CH4/H2O feed (at 1 bar we find a shallow minimum of 0.990 near 1150-1200 K,
  residual CH4 holding the rest of the carbon, then a slow rise toward 1);
* higher pressure lowers the thermodynamic S/C limit at every T here (cracking, Δn > 0,
  is suppressed); co-fed H2 lowers it everywhere. Co-fed CO2 is not simply "more
  oxygen": it brings carbon too (S/C counts only the CH4 carbon), and we find it *raises*
  the limit below about 900 K (1 bar) and lowers it above about 950 K.
"""

from __future__ import annotations

import warnings

import numpy as np
import pytest

from eqconv import DataWarning, InputError, equilibrium
from eqconv.constants import P_BAR
from eqconv.studies import (
    carbon_activity,
    carbon_free_temperatures,
    minimum_steam_to_carbon,
)

WITH_CARBON = ["CH4 + H2O = CO + 3 H2", "CO + H2O = CO2 + H2", "2 CO = C(s) + CO2"]
T_GRID = np.linspace(700.0, 1300.0, 13)


def _present(
    T: np.ndarray, P: float, sc: np.ndarray, others: dict | None = None, **kw: object
) -> np.ndarray:
    feed = {"CH4": 1.0, "H2O": sc, **(others or {})}
    res = equilibrium(WITH_CARBON, feed, T, P, check_phase=False, **kw)
    assert res.converged.all()
    return np.asarray(res.present("C(s)"))


@pytest.fixture(scope="module")
def limits() -> dict[float, np.ndarray]:
    return {P: minimum_steam_to_carbon(T_GRID, P).steam_to_carbon for P in (P_BAR, 30 * P_BAR)}


# ---------------------------------------------------------------------------- two ways agree
@pytest.mark.parametrize("P", [P_BAR, 30 * P_BAR])
def test_limit_is_where_graphite_becomes_present(limits: dict, P: float) -> None:
    sc = limits[P]
    assert np.all(np.isfinite(sc))
    below = _present(T_GRID, P, sc * (1.0 - 1e-4))
    above = _present(T_GRID, P, sc * (1.0 + 1e-4))
    assert below.all() and not above.any()


def test_limit_against_brute_force_dense_grid(limits: dict) -> None:
    # one vectorized solve with C(s) allowed on a dense S/C grid: the first carbon-free
    # S/C brackets the root to the grid step
    sc_grid = np.linspace(0.05, 3.0, 1181)  # step 0.0025
    pres = _present(T_GRID[:, None], P_BAR, sc_grid[None, :])
    first_free = np.argmax(~pres, axis=1)
    assert np.all(~pres[np.arange(T_GRID.size), first_free])
    lo, hi = sc_grid[first_free - 1], sc_grid[first_free]
    sc = limits[P_BAR]
    assert np.all((sc > lo) & (sc <= hi))
    # carbon at every S/C below the limit and none above (a single crossing)
    np.testing.assert_array_equal(pres, sc_grid[None, :] < sc[:, None])


def test_boudouard_and_cracking_activities_agree_at_gas_equilibrium() -> None:
    act = carbon_activity(T_GRID[:, None], 10 * P_BAR, np.array([0.5, 1.0, 2.0, 4.0])[None, :])
    assert act.converged.all()
    # cracking = reforming + Boudouard − shift: equal once the gas is at equilibrium
    np.testing.assert_allclose(act.ln_a_boudouard, act.ln_a_cracking, rtol=0, atol=1e-9)
    assert np.all(np.diff(act.ln_a, axis=1) < 0.0)  # more steam, less carbon


def test_activity_from_the_carbon_allowed_solve_matches() -> None:
    sc = np.array([1.5, 2.5, 4.0])
    act = carbon_activity(T_GRID[:, None], P_BAR, sc[None, :])
    res = equilibrium(
        WITH_CARBON, {"CH4": 1.0, "H2O": sc[None, :]}, T_GRID[:, None], P_BAR, check_phase=False
    )
    free = ~res.present("C(s)")
    np.testing.assert_allclose(
        res.condensed_ln_activity["C(s)"][free], act.ln_a[free], rtol=0, atol=1e-9
    )
    np.testing.assert_array_equal(free, act.ln_a < 0.0)


# ---------------------------------------------------------------------------- expectations
def test_carbon_risk_rises_at_low_steam_to_carbon() -> None:
    sc = np.linspace(0.2, 4.0, 60)
    act = carbon_activity(T_GRID[:, None], 5 * P_BAR, sc[None, :])
    assert np.all(np.diff(act.ln_a, axis=1) < 0.0)
    assert np.all(act.ln_a[:, 0] > 0.0)  # S/C 0.2: carbon everywhere on 700-1300 K


def test_common_practice_steam_to_carbon_is_clear_of_carbon(limits: dict) -> None:
    # common practice: S/C ≈ 3 in natural-gas reformers; thermodynamically far from carbon
    for P in (P_BAR, 10 * P_BAR, 30 * P_BAR):
        act = carbon_activity(T_GRID, P, 3.0)
        assert np.all(act.ln_a < -0.3)
    for sc in limits.values():
        assert np.all((sc > 0.3) & (sc < 1.5))


def test_shape_of_the_limit_over_temperature(limits: dict) -> None:
    low, high = limits[P_BAR], limits[30 * P_BAR]
    # 1 bar: a maximum near 850 K (≈ 1.48), then down to a shallow minimum just below 1
    k = int(np.argmax(low))
    assert 800.0 <= T_GRID[k] <= 900.0 and low[k] == pytest.approx(1.48, abs=0.02)
    hot = T_GRID >= 1150.0
    assert np.all(np.diff(low[k : int(np.argmax(hot)) + 1]) < 0.0)
    assert np.all(np.abs(low[hot] - 1.0) < 0.012)  # derived: S/C* → 1 as T rises
    # 30 bar: rises with T to ~1000 K, then flat near 0.83; everywhere below the 1 bar limit
    assert np.all(np.diff(high[: int(np.searchsorted(T_GRID, 1000.0))]) > 0.0)
    assert np.all(np.abs(high[T_GRID >= 1000.0] - 0.835) < 0.03)
    assert np.all(high < low)


def test_co_fed_hydrogen_and_co2_move_the_limit(limits: dict) -> None:
    base = limits[P_BAR]
    h2 = minimum_steam_to_carbon(T_GRID, P_BAR, others={"H2": 0.5})
    # H2 pushes cracking back: lower limit everywhere (below the bracket at 700 K)
    assert h2.status[0] == "free in bracket"
    assert np.all(h2.steam_to_carbon[1:] < base[1:])
    # CO2 brings carbon and oxygen: higher limit when cool, lower when hot (see notes)
    co2 = minimum_steam_to_carbon(T_GRID, P_BAR, others={"CO2": 0.2}).steam_to_carbon
    assert np.all(co2[T_GRID <= 900.0] > base[T_GRID <= 900.0])
    assert np.all(co2[T_GRID >= 950.0] < base[T_GRID >= 950.0])
    # inerts in the feed: the root still matches the carbon-allowed solve
    with_n2 = minimum_steam_to_carbon(T_GRID, P_BAR, others={"N2": 1.0}).steam_to_carbon
    assert _present(T_GRID, P_BAR, with_n2 * 0.999, {"N2": 1.0}).all()
    assert not _present(T_GRID, P_BAR, with_n2 * 1.001, {"N2": 1.0}).any()


def test_cracking_makes_a_steam_poor_gas_carbon_rich_at_high_temperature() -> None:
    # S/C 0.8 at 1 bar: carbon-free only at the low end (cracking K rises with T)
    rng = carbon_free_temperatures(0.8, P_BAR, (600.0, 1400.0))
    assert len(rng.intervals) == 1 and rng.intervals[0][0] == 600.0
    assert 640.0 < rng.intervals[0][1] < 700.0
    # S/C 1.2 at 1 bar: two carbon-free windows with carbon in between (non-monotonic)
    rng = carbon_free_temperatures(1.2, P_BAR, (600.0, 1400.0))
    assert len(rng.intervals) == 2 and rng.boundaries.size == 2
    act = carbon_activity(rng.boundaries, P_BAR, 1.2)
    np.testing.assert_allclose(act.ln_a, 0.0, atol=1e-9)
    # a dense scan with C(s) allowed agrees with the intervals
    T = np.linspace(600.0, 1400.0, 161)
    off = np.min(np.abs(T[:, None] - rng.boundaries[None, :]), axis=1) > 1e-6
    pres = _present(T, P_BAR, np.array(1.2))
    np.testing.assert_array_equal(pres[off], ~rng.carbon_free(T)[off])
    # S/C 1.5 at 1 bar: no carbon anywhere in the range
    assert carbon_free_temperatures(1.5, P_BAR, (600.0, 1400.0)).intervals == [(600.0, 1400.0)]


def test_fugacity_model_and_its_cross_check() -> None:
    T = np.array([800.0, 1000.0, 1200.0])
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", DataWarning)
        ideal = minimum_steam_to_carbon(T, 30 * P_BAR).steam_to_carbon
        pr = minimum_steam_to_carbon(T, 30 * P_BAR, gas="peng-robinson").steam_to_carbon
        # at 30 bar and these temperatures the gas is nearly ideal: a small correction
        np.testing.assert_allclose(pr, ideal, rtol=0.03)
        assert not np.allclose(pr, ideal, rtol=1e-4)
        below = _present(T, 30 * P_BAR, pr * 0.999, gas="peng-robinson")
        above = _present(T, 30 * P_BAR, pr * 1.001, gas="peng-robinson")
    assert below.all() and not above.any()


# ---------------------------------------------------------------------------- status, errors
def test_unbracketed_limits_are_reported() -> None:
    res = minimum_steam_to_carbon([1100.0], 30 * P_BAR, bracket=(2.0, 10.0))
    assert res.status.tolist() == ["free in bracket"] and np.isnan(res.steam_to_carbon[0])
    res = minimum_steam_to_carbon([1100.0], 30 * P_BAR, bracket=(0.05, 0.1))
    assert res.status.tolist() == ["carbon in bracket"]
    res = minimum_steam_to_carbon([900.0], 30 * P_BAR)
    assert abs(float(res.ln_a_at_limit[0])) <= 1e-10 and res.iterations > 0


@pytest.mark.parametrize(
    ("call", "match"),
    [
        (lambda: minimum_steam_to_carbon(900.0, 1e5, bracket=(1.0, 0.5)), "bracket"),
        (lambda: carbon_activity(900.0, 1e5, -1.0), "steam_to_carbon"),
        (lambda: carbon_activity(900.0, 1e5, 1.0, others={"H2O": 1.0}), "others"),
        (lambda: carbon_free_temperatures(1.0, 1e5, (900.0, 800.0)), "T_bounds"),
        (lambda: carbon_free_temperatures(1.0, 1e5, n_scan=2), "n_scan"),
    ],
)
def test_bad_input(call: object, match: str) -> None:
    with pytest.raises(InputError, match=match):
        call()  # type: ignore[operator]
