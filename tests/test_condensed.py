"""Tests of eqconv.condensed: pure condensed phases whose presence is decided per point.

External checks: NIST-JANAF Thermochemical Tables, 4th ed. (1998), through the ``janaf``
package (log Kf of CO, CO2 and graphite's reference state) fed to an exact closed form of the
Boudouard equilibrium (derived below); water's normal boiling point, 100 °C at 1 atm (common
practice), reproduced by H2O(g) = H2O(l) with JANAF data; and an independent minimisation of
the Gibbs energy (element-potential formulation for the gas, scipy's bounded scalar search
for the graphite amount) at sampled points.

Property tests (hypothesis): the presence decision satisfies the equilibrium conditions
(present ⇒ amount ≥ 0 and its reactions at equilibrium; absent ⇒ the activity the gas would
give it is ≤ 1), element balances close, and presence agrees with the carbon activity of the
carbon-free gas (the other way of deciding it).
"""

from __future__ import annotations

import janaf
import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from scipy.optimize import minimize_scalar

from eqconv import InputError, Reaction, equilibrium, get_species, gibbs_equilibrium
from eqconv.condensed import MAX_CONDENSED, solve_phases
from eqconv.constants import P_ATM, P_BAR

REFORMING = ["CH4 + H2O = CO + 3 H2", "CO + H2O = CO2 + H2"]
BOUDOUARD = "2 CO = C(s) + CO2"
CRACKING = "CH4 = C(s) + 2 H2"


JANAF_TABLE = {"CO": "C-093", "CO2": "C-095"}  # NIST-JANAF table numbers (REFERENCES.md §1)


def _janaf_log_kf(formula: str, T: float) -> float:
    """log10 Kf at a JANAF table row (T must be a row, e.g. 800, 1000 K)."""
    df = janaf.Table(JANAF_TABLE[formula]).df
    row = df.filter(abs(df["T(K)"] - T) < 1e-6)
    return float(row["log Kf"].to_numpy()[0])


# ---------------------------------------------------------------------------- exact cases
@pytest.mark.parametrize("T", [800.0, 900.0, 1000.0, 1100.0, 1200.0])
@pytest.mark.parametrize("p_bar", [1.0, 20.0])
def test_boudouard_from_pure_co_matches_closed_form_with_janaf_k(T: float, p_bar: float) -> None:
    # Exact identity (derived): 2 CO = C(s) + CO2 from 1 mol CO, ideal gas, carbon present:
    # n_CO = 1 − 2ξ, n_CO2 = ξ, n_gas = 1 − ξ and ξ(1 − ξ)/(1 − 2ξ)² = K P/p° give
    # ξ = [1 − (1 + 4 K P/p°)^(−1/2)] / 2 (carbon always forms from pure CO).
    # K from NIST-JANAF 4th ed. (1998) log Kf read through the janaf package at table rows:
    # log K = log Kf(CO2) − 2 log Kf(CO) (graphite is the reference state, log Kf = 0).
    log_k = _janaf_log_kf("CO2", T) - 2.0 * _janaf_log_kf("CO", T)
    kp = 10.0**log_k * p_bar
    xi = 0.5 * (1.0 - (1.0 + 4.0 * kp) ** -0.5)
    res = equilibrium(BOUDOUARD, {"CO": 1.0}, T=T, P=p_bar * P_BAR, data="janaf")
    assert bool(res.present("C(s)"))
    # JANAF prints log Kf to 3 decimals: K to ±0.35 %, which moves ξ by at most that much
    assert float(res.amounts["C(s)"]) == pytest.approx(xi, rel=4e-3)
    assert float(res.amounts["CO2"]) == pytest.approx(float(res.amounts["C(s)"]), rel=1e-12)


def test_no_carbon_where_the_gas_is_too_oxidising() -> None:
    # CO:CO2 = 1:1 at 1300 K, 1 bar: Q = y_CO2/(y_CO² P/p°) = 2 ≫ K, so carbon cannot form;
    # the gas is left as fed and the activity it would give graphite is K/Q (< 1)
    rxn = Reaction(BOUDOUARD, data="janaf")
    res = equilibrium(rxn, {"CO": 1.0, "CO2": 1.0}, T=1300.0, P=P_BAR)
    assert not bool(res.present("C(s)"))
    assert float(res.amounts["CO"]) == 1.0 and float(res.amounts["C(s)"]) == 0.0
    ln_a = float(rxn.ln_K(1300.0)) - np.log(2.0)
    assert float(res.condensed_ln_activity["C(s)"]) == pytest.approx(ln_a, rel=1e-12)
    assert str(res.reaction_status()[0]) == "phase absent"
    assert "absent" in res.diagnostics(index=())[0]


def test_fed_carbon_that_is_used_up_is_absent_not_a_failure() -> None:
    # C(s) + CO2 = 2 CO at 1300 K: a little carbon gasifies completely (it used to be
    # reported as a failed point); a large bed keeps carbon present
    rxn = Reaction("C(s) + CO2 = 2 CO", data="janaf")
    res = equilibrium(rxn, {"C(s)": np.array([1e-3, 50.0]), "CO2": 1.0}, T=1300.0, P=P_BAR)
    assert res.converged.all()
    assert res.present("C(s)").tolist() == [False, True]
    assert res.amounts["C(s)"][0] == 0.0
    assert res.amounts["CO"][0] == pytest.approx(2e-3, rel=1e-12)
    assert res.amounts["CO2"][0] == pytest.approx(0.999, rel=1e-12)
    assert res.condensed_ln_activity["C(s)"][0] < 0.0
    assert abs(res.residuals[1, 0]) <= 1e-10  # present: at equilibrium
    assert res.element_balance_error.max() <= 1e-12


def test_fed_carbon_that_needs_a_combined_route_to_vanish() -> None:
    # carbon fed with CO2 only and the reactions C + H2O = CO + H2 and the shift: complete
    # gasification needs C + CO2 = 2 CO (reaction 1 − reaction 2), not reaction 1 alone,
    # whose pivot would drive H2O negative; the linear-programming repair finds it
    rx = ["C(s) + H2O = CO + H2", "CO + H2O = CO2 + H2"]
    res = equilibrium(rx, {"C(s)": 1e-3, "CO2": 1.0, "H2O": 1e-4}, T=1300.0, P=P_BAR, data="janaf")
    assert bool(res.converged) and not bool(res.present("C(s)"))
    assert float(res.element_balance_error) <= 1e-12
    assert float(res.amounts["C(s)"]) == 0.0 and float(res.condensed_ln_activity["C(s)"]) < 0.0


def test_water_condenses_at_its_boiling_point() -> None:
    # H2O(g) = H2O(l) with JANAF data: liquid present where y_H2O P > p_sat; at 373.15 K
    # the pure-water gas partial pressure must be 1 atm (normal boiling point, common
    # practice); JANAF's tables give 0.985 atm (their liquid table is for 1 bar), so 2 %.
    rx = ["CO + H2O = CO2 + H2", "H2O = H2O(l)"]
    res = equilibrium(
        rx,
        {"CO2": 1.0, "H2": 1.0, "H2O": np.array([0.01, 5.0])},
        T=373.15,
        P=5 * P_ATM,
        data="janaf",
        check_phase=False,
    )
    pres = res.present("H2O(l)")
    assert pres.tolist() == [False, True]
    p_h2o = res.mole_fractions["H2O"][1] * 5 * P_ATM
    assert p_h2o == pytest.approx(P_ATM, rel=0.02)
    assert res.condensed_ln_activity["H2O(l)"][0] < 0.0


# ---------------------------------------------------------------------------- two ways agree
def _gas_only_ln_a(T: np.ndarray, P: float, feed: dict, data: str = "janaf") -> np.ndarray:
    """ln a_C of the carbon-free equilibrium gas (the second way of deciding presence)."""
    res = equilibrium(REFORMING, feed, T=T, P=P, data=data, check_phase=False)
    y = res.mole_fractions
    lp = np.log(P / P_BAR)
    kb = Reaction(BOUDOUARD, data=data).ln_K(T)
    return kb + 2.0 * (np.log(y["CO"]) + lp) - (np.log(y["CO2"]) + lp)


def test_presence_agrees_with_carbon_activity_of_the_carbon_free_gas() -> None:
    T = np.linspace(700.0, 1300.0, 25)[:, None]
    sc = np.array([0.3, 0.6, 1.0, 1.4, 2.0, 3.0])[None, :]
    feed = {"CH4": 1.0, "H2O": sc}
    res = equilibrium([*REFORMING, BOUDOUARD], feed, T=T, P=P_BAR, data="janaf", check_phase=False)
    assert res.converged.all()
    ln_a = _gas_only_ln_a(T, P_BAR, feed)
    pres = res.present("C(s)")
    assert 0 < pres.sum() < pres.size  # both cases occur on this grid
    np.testing.assert_array_equal(pres, ln_a > 0.0)
    # absent: the answer is the carbon-free gas, and its activity is the one reported
    gas_only = equilibrium(REFORMING, feed, T=T, P=P_BAR, data="janaf", check_phase=False)
    for k in ("CH4", "H2O", "CO", "H2", "CO2"):
        np.testing.assert_allclose(
            res.amounts[k][~pres], gas_only.amounts[k][~pres], rtol=1e-9, atol=1e-14
        )
    np.testing.assert_allclose(
        res.condensed_ln_activity["C(s)"][~pres], ln_a[~pres], rtol=0, atol=1e-9
    )
    # present: carbon > 0 and every reaction, Boudouard included, at equilibrium
    assert np.all(res.amounts["C(s)"][pres] > 0.0)
    assert np.abs(res.residuals[pres]).max() <= 1e-10


def test_boudouard_or_cracking_give_the_same_equilibrium() -> None:
    # {reforming, shift, Boudouard} and {reforming, shift, cracking} span the same reactions
    T = np.linspace(750.0, 1250.0, 11)[:, None]
    feed = {"CH4": 1.0, "H2O": np.array([0.5, 1.2, 2.5])[None, :], "CO2": 0.3}
    a = equilibrium([*REFORMING, BOUDOUARD], feed, T=T, P=5e5, data="janaf", check_phase=False)
    b = equilibrium([*REFORMING, CRACKING], feed, T=T, P=5e5, data="janaf", check_phase=False)
    np.testing.assert_array_equal(a.present("C(s)"), b.present("C(s)"))
    for k in ("CH4", "H2O", "CO", "H2", "CO2", "C(s)"):
        np.testing.assert_allclose(a.amounts[k], b.amounts[k], rtol=1e-8, atol=1e-12)


# ---------------------------------------------------------------------------- independent G min
def _g_total(T: float, P: float, sc: float, n_c: np.ndarray) -> np.ndarray:
    """G/RT of the system with n_c mol of graphite set aside, the gas at its own minimum
    by the element-potential formulation (eqconv.gibbs_equilibrium, a different method
    from the extent solver): feed CH4 → (1 − n_c) CH4 + 2 n_c H2 keeps the elements."""
    keys = ["CH4", "H2O", "CO", "H2", "CO2"]
    gas = gibbs_equilibrium(
        keys, {"CH4": 1.0 - n_c, "H2": 2.0 * n_c, "H2O": sc}, T, P, data="janaf"
    )
    sp = {k: get_species(k, data="janaf") for k in keys}
    g = np.zeros_like(n_c)
    ng = sum(gas.amounts[k] for k in keys)
    for k in keys:
        n = gas.amounts[k]
        g = g + n * (float(sp[k].mu0_over_RT(T)) + np.log(P / P_BAR) + np.log(n / ng))
    return g + n_c * float(get_species("C(s)", data="janaf").mu0_over_RT(T))


@pytest.mark.parametrize(
    ("T", "sc"), [(800.0, 0.5), (900.0, 1.0), (1000.0, 1.6), (1100.0, 0.8), (1200.0, 2.0)]
)
def test_carbon_amount_minimises_an_independent_gibbs_energy(T: float, sc: float) -> None:
    # the reference: G(n_C) = min over the gas at fixed n_C (element potentials) + n_C μ°_C,
    # minimised over n_C by a dense scan and a bounded scalar search (scipy)
    P = 2 * P_BAR
    res = equilibrium(
        [*REFORMING, BOUDOUARD], {"CH4": 1.0, "H2O": sc}, T=T, P=P, data="janaf", check_phase=False
    )
    grid = np.linspace(0.0, 0.98, 491)
    g = _g_total(T, P, sc, grid)
    i = int(np.argmin(g))
    if i == 0:
        n_ref = 0.0
        assert g[1] > g[0]  # G rises as soon as carbon forms
    else:
        opt = minimize_scalar(
            lambda x: float(_g_total(T, P, sc, np.array([x]))[0]),
            bounds=(grid[i - 1], grid[i + 1]),
            method="bounded",
            options={"xatol": 1e-9},
        )
        n_ref = float(opt.x)
    assert bool(res.present("C(s)")) == (n_ref > 0.0)
    # a flat minimum: G is quadratic near it, so x is found to ~sqrt(eps) of the scale
    assert float(res.amounts["C(s)"]) == pytest.approx(n_ref, abs=1e-6)
    g_ours = float(_g_total(T, P, sc, np.array([float(res.amounts["C(s)"])]))[0])
    assert g_ours <= float(g.min()) + 1e-12


# ---------------------------------------------------------------------------- properties
@settings(max_examples=40, deadline=None)
@given(
    T=st.floats(650.0, 1400.0),
    p_bar=st.floats(0.5, 60.0),
    h2o=st.floats(0.05, 4.0),
    co2=st.floats(0.0, 1.0),
    h2=st.floats(0.0, 2.0),
    n2=st.floats(0.0, 3.0),
)
def test_presence_decision_is_consistent(
    T: float, p_bar: float, h2o: float, co2: float, h2: float, n2: float
) -> None:
    feed = {"CH4": 1.0, "H2O": h2o, "CO2": co2, "H2": h2, "N2": n2}
    res = equilibrium(
        [*REFORMING, BOUDOUARD], feed, T=T, P=p_bar * P_BAR, data="janaf", check_phase=False
    )
    assert bool(res.converged)
    assert float(res.element_balance_error) <= 1e-12
    y = res.mole_fractions
    lp = np.log(p_bar)
    lnf = {k: np.log(float(y[k])) + lp for k in ("CH4", "H2O", "CO", "H2", "CO2")}
    kb = float(Reaction(BOUDOUARD, data="janaf").ln_K(T))
    ln_a = kb + 2.0 * lnf["CO"] - lnf["CO2"]  # carbon activity the gas supports
    r_ref = float(Reaction(REFORMING[0], data="janaf").ln_K(T))
    r_sh = float(Reaction(REFORMING[1], data="janaf").ln_K(T))
    assert lnf["CO"] + 3 * lnf["H2"] - lnf["CH4"] - lnf["H2O"] == pytest.approx(r_ref, abs=1e-9)
    assert lnf["CO2"] + lnf["H2"] - lnf["CO"] - lnf["H2O"] == pytest.approx(r_sh, abs=1e-9)
    if bool(res.present("C(s)")):
        assert float(res.amounts["C(s)"]) > 0.0
        assert ln_a == pytest.approx(0.0, abs=1e-9)  # Boudouard at equilibrium with a_C = 1
    else:
        assert float(res.amounts["C(s)"]) == 0.0
        assert ln_a <= 1e-10  # the gas would not form carbon
        assert float(res.condensed_ln_activity["C(s)"]) == pytest.approx(ln_a, abs=1e-9)
    # the other way: the carbon-free gas decides the same
    ln_a_free = _gas_only_ln_a(np.array(T), p_bar * P_BAR, feed)
    if abs(float(ln_a_free)) > 1e-6:
        assert bool(res.present("C(s)")) == bool(ln_a_free > 0.0)


@settings(max_examples=25, deadline=None)
@given(
    T=st.floats(330.0, 480.0),
    p_bar=st.floats(1.0, 40.0),
    co=st.floats(0.0, 1.0),
    h2o=st.floats(0.05, 3.0),
    co2=st.floats(0.05, 1.0),
)
def test_two_condensed_species_are_decided_together(
    T: float, p_bar: float, co: float, h2o: float, co2: float
) -> None:
    # graphite and liquid water in one problem: four phase assignments are possible (a
    # little N2 keeps a gas phase: see the test of the no-gas case below)
    rx = ["CO + H2O = CO2 + H2", "H2O = H2O(l)", BOUDOUARD]
    feed = {"CO": co, "H2O": h2o, "CO2": co2, "H2": 0.1, "N2": 0.05}
    res = equilibrium(rx, feed, T=T, P=p_bar * P_BAR, data="janaf", check_phase=False)
    assert bool(res.converged) and float(res.element_balance_error) <= 1e-12
    y = res.mole_fractions
    lp = np.log(p_bar)
    lnf = {k: np.log(float(y[k])) + lp for k in ("CO", "H2O", "CO2", "H2")}
    ln_a = {
        "H2O(l)": float(Reaction("H2O = H2O(l)", data="janaf").ln_K(T)) + lnf["H2O"],
        "C(s)": float(Reaction(BOUDOUARD, data="janaf").ln_K(T)) + 2 * lnf["CO"] - lnf["CO2"],
    }
    for k, la in ln_a.items():
        if bool(res.present(k)):
            assert float(res.amounts[k]) > 0.0 and la == pytest.approx(0.0, abs=1e-9)
        else:
            assert float(res.amounts[k]) == 0.0 and la <= 1e-10


def test_no_gas_left_at_equilibrium_is_flagged_not_answered() -> None:
    # CO2 + 2 H2 → C + 2 H2O goes to completion at 342 K and all the water condenses at
    # 1 bar (p_sat ≈ 0.33 bar): no gas phase is left, which a gas-phase model cannot
    # represent; the point must be flagged (NaN), never returned as a number
    rx = ["CO + H2O = CO2 + H2", "H2O = H2O(l)", BOUDOUARD]
    feed = {"H2O": 2.0, "CO2": 0.05, "H2": 0.1}
    res = equilibrium(
        rx, feed, T=342.0, P=P_BAR, data="janaf", check_phase=False, on_failure="flag"
    )
    assert not bool(res.converged) and np.isnan(float(res.amounts["C(s)"]))
    # with an inert gas present the same chemistry converges
    res = equilibrium(rx, {**feed, "N2": 0.05}, T=342.0, P=P_BAR, data="janaf", check_phase=False)
    assert bool(res.present("C(s)")) and bool(res.present("H2O(l)"))


def test_assignments_vary_across_a_grid_with_two_condensed_species() -> None:
    rx = ["CO + H2O = CO2 + H2", "H2O = H2O(l)", BOUDOUARD]
    T = np.linspace(330.0, 500.0, 30)[:, None]
    feed = {"CO": np.array([1e-6, 0.05, 1.0])[None, :], "H2O": 1.0, "CO2": 1.0}
    res = equilibrium(rx, feed, T=T, P=10 * P_BAR, data="janaf", check_phase=False)
    assert res.converged.all()
    combos = {
        (bool(a), bool(b))
        for a, b in zip(res.present("H2O(l)").ravel(), res.present("C(s)").ravel(), strict=True)
    }
    assert len(combos) == 4  # all four assignments on one grid, solved group by group


# ---------------------------------------------------------------------------- array layer, API
def test_solve_phases_without_condensed_species_is_the_extent_solver() -> None:
    ps = solve_phases(
        [[-1.0, -1.0, 1.0, 1.0]], [0.0], [1.0, 1.0, 0.0, 0.0], 0.0, gas_mask=[True] * 4
    )
    assert ps.condensed == () and ps.present.shape == (0,)
    assert float(ps.solution.extents[0]) == pytest.approx(0.5, rel=1e-12)


def test_start_assignment_does_not_change_the_answer() -> None:
    nu = [[-2.0, 1.0, 1.0]]
    lnK = np.linspace(-3.0, 3.0, 13)[:, None]
    n0 = [1.0, 0.0, 0.6]
    a = solve_phases(nu, lnK, n0, 0.0, gas_mask=[True, False, True])
    b = solve_phases(nu, lnK, n0, 0.0, gas_mask=[True, False, True], start=1)
    np.testing.assert_array_equal(a.present, b.present)
    np.testing.assert_allclose(a.solution.amounts, b.solution.amounts, rtol=1e-12)
    assert 0 < a.present.sum() < a.present.size


def test_too_many_condensed_species_and_bad_queries() -> None:
    nc = MAX_CONDENSED + 1
    nu = np.zeros((nc, nc + 1))
    nu[:, 0] = -1.0
    nu[np.arange(nc), np.arange(1, nc + 1)] = 1.0
    with pytest.raises(InputError, match="at most"):
        solve_phases(
            nu, np.zeros(nc), np.r_[1.0, np.zeros(nc)], 0.0, gas_mask=[True] + [False] * nc
        )
    res = equilibrium(REFORMING, {"CH4": 1.0, "H2O": 3.0}, T=900.0, P=P_BAR, data="janaf")
    with pytest.raises(InputError, match="not a reacting condensed species"):
        res.present("CH4")


def test_export_has_presence_column() -> None:
    res = equilibrium(
        BOUDOUARD, {"CO": 1.0, "CO2": np.array([0.0, 5.0])}, T=1000.0, P=P_BAR, data="janaf"
    )
    d = res.to_dict()
    assert d["present C(s) [-]"].tolist() == [True, False]
