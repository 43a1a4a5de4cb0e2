"""Gibbs-energy minimisation over a species list (element potentials).

Self-consistency (balances, stationarity, two formulations agreeing, a scalar reference)
is kept apart from the external checks against NIST-JANAF, which name their source.
"""

from __future__ import annotations

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from scipy.optimize import brentq

from eqconv import ConvergenceError, InputError, Reaction, get_species
from eqconv.constants import P_ATM, P_BAR, R
from eqconv.gibbs import minimize_gibbs
from eqconv.gibbs_api import gibbs_equilibrium
from eqconv.reaction_basis import independent_reactions

SMR = ["CH4", "H2O", "CO", "CO2", "H2"]
A_SMR = np.array([[1, 4, 0], [0, 2, 1], [1, 0, 1], [1, 0, 2], [0, 2, 0]])
A_NH3 = np.array([[2, 0, 0], [0, 2, 0], [1, 3, 0], [0, 0, 1]])  # N2, H2, NH3, Ar (N, H, Ar)


def _stationarity(A, mu0, ln_n, lnP):
    """|ln Q − ln K| of an independent reaction set, recomputed here from the amounts."""
    nu = independent_reactions(A).astype(float)
    ln_x = ln_n - np.logaddexp.reduce(ln_n, axis=-1, keepdims=True)
    return np.abs((mu0 + np.asarray(lnP)[..., None] + ln_x) @ nu.T)


def _nh3_reference(lnK, lnP, n0):
    """Scalar reference: N2 + 3 H2 = 2 NH3 by brentq on the logit of the extent.

    ξ = lo + (hi − lo) s(u), s the logistic function, and every amount written as a sum
    of non-negative terms, so that trace amounts keep their digits.
    """
    lo, hi = -n0[2] / 2.0, min(n0[0], n0[1] / 3.0)

    def amounts(u):
        s, s1 = 1.0 / (1.0 + np.exp(-u)), 1.0 / (1.0 + np.exp(u))  # s and 1 − s
        return np.array(
            [
                max(n0[0] - hi, 0.0) + (hi - lo) * s1,
                max(n0[1] - 3.0 * hi, 0.0) + 3.0 * (hi - lo) * s1,
                2.0 * (hi - lo) * s,
                n0[3],
            ]
        )

    def f(u):
        x = amounts(u) / amounts(u).sum()
        return 2 * np.log(x[2]) - np.log(x[0]) - 3 * np.log(x[1]) - 2 * lnP - lnK

    return amounts(brentq(f, -700, 700, xtol=1e-13, rtol=1e-15, maxiter=500))


# ---------------------------------------------------------------------- scalar reference
@pytest.mark.parametrize("lnK", [-230.0, -20.0, 0.0, 5.0, 40.0, 230.0])  # K = 1e±100 too
@pytest.mark.parametrize("lnP", [np.log(0.01), 0.0, np.log(300.0)])
def test_single_reaction_matches_a_scalar_brentq_reference(lnK, lnP):
    n0 = np.array([1.0, 3.0, 0.0, 0.05])  # stoichiometric with 5 % inert argon
    mu0 = np.array([0.0, 0.0, -lnK / 2.0, 0.0])  # ln K = −Σ ν μ°/RT
    sol = minimize_gibbs(A_NH3, mu0, n0, lnP)
    assert sol.converged
    ref = _nh3_reference(lnK, lnP, n0)
    # every amount, trace ones included (1e-25 mol of N2 at K = 1e100)
    np.testing.assert_allclose(sol.amounts, ref, rtol=1e-9)


@settings(max_examples=60, deadline=None)
@given(
    st.floats(-200, 200),
    st.floats(-7, 9),
    st.floats(0, 2),
    st.floats(0, 4),
    st.floats(0, 2),
    st.floats(0, 1),
)
def test_single_reaction_random_feeds_match_the_reference(lnK, lnP, a, b, c, d):
    n0 = np.array([a, b, c, d])
    if n0[:3].sum() < 1e-3 or (a + c) < 1e-6 or (b + c) < 1e-6:
        return
    mu0 = np.array([0.0, 0.0, -lnK / 2.0, 0.0])
    sol = minimize_gibbs(A_NH3, mu0, n0, lnP)
    assert sol.converged
    if a * b > 0 or c > 0:
        ref = _nh3_reference(lnK, lnP, n0)
        mask = ref > 1e-300
        np.testing.assert_allclose(sol.amounts[mask], ref[mask], rtol=1e-8, atol=0)


# ---------------------------------------------------------------------- properties
mu_smr = st.lists(st.floats(-120, 120), min_size=5, max_size=5)
feeds = st.lists(st.one_of(st.just(0.0), st.floats(1e-12, 10.0)), min_size=5, max_size=5)


@settings(max_examples=120, deadline=None)
@given(mu_smr, feeds, st.floats(-9, 9))
def test_balances_mole_fractions_and_stationarity_on_random_states(mu0, n0, lnP):
    mu0, n0 = np.array(mu0), np.array(n0)
    if n0.sum() <= 0:
        return
    sol = minimize_gibbs(A_SMR, mu0, n0, lnP)
    assert sol.converged, sol.failure_summary()
    b = n0 @ A_SMR
    el = b > 0
    np.testing.assert_allclose((sol.amounts @ A_SMR)[el], b[el], rtol=1e-12, atol=0)
    assert np.all(sol.amounts >= 0)
    assert abs(sol.mole_fractions.sum() - 1.0) <= 1e-14
    present = sol.present
    if present.all():  # every reaction is defined: recompute ln Q − ln K here
        assert np.all(_stationarity(A_SMR, mu0, sol.ln_amounts, lnP) <= 1e-10)
    assert sol.stationarity_residual <= 1e-10
    assert sol.balance_residual <= 1e-12


def test_grid_broadcasting_and_shapes():
    T = np.linspace(700.0, 1300.0, 7)[:, None]
    P = np.linspace(1e5, 50e5, 5)[None, :]
    mu0 = np.stack([get_species(k).mu0_over_RT(T) for k in SMR], axis=-1)
    n0 = np.stack(
        [np.full((1, 5), 1.0), np.linspace(2, 4, 5)[None, :], 0 * P, 0 * P, 0 * P], axis=-1
    )  # the steam ratio swept along the pressure axis
    sol = minimize_gibbs(A_SMR, mu0, n0, np.log(P / P_BAR))
    assert sol.amounts.shape == (7, 5, 5) and sol.converged.shape == (7, 5)
    assert sol.all_converged
    assert np.allclose(sol.mole_fractions.sum(axis=-1), 1.0, rtol=0, atol=1e-14)
    # points solved alone agree with the grid (chunking and warm starts change nothing)
    one = minimize_gibbs(A_SMR, mu0[3, 0], n0[0, 2], np.log(P[0, 2] / P_BAR))
    np.testing.assert_allclose(one.amounts, sol.amounts[3, 2], rtol=1e-11)


def test_trace_species_of_a_reaction_driven_to_completion_are_exact():
    # N2 + 3 H2 = 2 NH3 with K = 1e100 from a stoichiometric feed: N2 and H2 are ~1e-26 mol
    # and must stay in the ratio 1:3 fixed by the feed (a plain element balance at 1e-12
    # relative would not see them at all)
    lnK = 230.0
    sol = minimize_gibbs(A_NH3[:3, :2], [0.0, 0.0, -lnK / 2], [1.0, 3.0, 0.0], 0.0)
    n = sol.amounts
    assert sol.converged and n[0] < 1e-20
    assert n[1] / n[0] == pytest.approx(3.0, rel=1e-12)
    # K = x_NH3² / (x_N2 x_H2³) = n_NH3² N² / (27 n_N2⁴) with n_H2 = 3 n_N2, P = p°
    assert 27 * n[0] ** 4 * np.exp(lnK) / (n[2] ** 2 * n.sum() ** 2) == pytest.approx(1.0, rel=1e-9)


def test_extreme_dilution_converges():
    mu0 = np.array([get_species(k).mu0_over_RT(900.0) for k in SMR])
    sol = minimize_gibbs(A_SMR, mu0, [1e-20, 1.0, 0.0, 0.0, 0.0], np.log(5.0))
    assert sol.converged
    carbon = sol.amounts @ A_SMR[:, 0]
    assert carbon == pytest.approx(1e-20, rel=1e-12)
    # the carbon goes to CO2 and CO (excess steam) and their balance holds at that scale
    assert sol.amounts[3] + sol.amounts[2] > 0.9e-20


def test_absent_elements_and_forced_zeros():
    # nitrogen and argon only: no H, so H2 and NH3 are removed and exactly zero
    sol = minimize_gibbs(A_NH3, [0.0, 0.0, -5.0, 0.0], [1.0, 0.0, 0.0, 1.0], 0.0)
    assert sol.converged and sol.present.tolist() == [True, False, False, True]
    assert sol.amounts.tolist() == [1.0, 0.0, 0.0, 1.0]
    # CO, CO2, O2 fed with CO only: no composition with C:O = 1 holds CO2 or O2
    A = [[1, 1], [1, 2], [0, 2]]
    sol = minimize_gibbs(A, [-20.0, -50.0, 0.0], [2.0, 0.0, 0.0], 0.0)
    assert sol.converged and sol.amounts.tolist() == [2.0, 0.0, 0.0]


def test_dependent_element_columns_are_rank_reduced():
    # N and O appear only together (as NO groups): the columns are dependent
    A = np.array([[1, 1, 0], [2, 2, 0], [0, 0, 2], [1, 1, 1]])  # NO, N2O2, H2, HNO
    sol = minimize_gibbs(A, [-3.0, -9.0, 0.0, -6.0], [1.0, 0.2, 0.5, 0.0], 0.3)
    assert sol.converged
    np.testing.assert_allclose(sol.amounts @ A, np.array([1.0, 0.2, 0.5, 0.0]) @ A, rtol=1e-12)


def test_element_totals_give_the_same_state_as_feed_amounts():
    mu0 = np.array([get_species(k).mu0_over_RT(1000.0) for k in SMR])
    n0 = np.array([1.0, 3.0, 0.0, 0.0, 0.0])
    a = minimize_gibbs(A_SMR, mu0, n0, np.log(10.0))
    b = minimize_gibbs(A_SMR, mu0, n0 @ A_SMR, np.log(10.0), feed="elements")
    np.testing.assert_allclose(a.amounts, b.amounts, rtol=1e-11)


def test_fixed_fugacity_coefficients_shift_the_equilibrium_like_pressure():
    # a common ln φ on every gas is the same as multiplying P by φ
    mu0 = np.array([get_species(k).mu0_over_RT(800.0) for k in SMR])
    n0 = [1.0, 3.0, 0.0, 0.0, 0.0]
    a = minimize_gibbs(A_SMR, mu0, n0, np.log(20.0), ln_phi=np.full(5, np.log(0.8)))
    b = minimize_gibbs(A_SMR, mu0, n0, np.log(16.0))
    np.testing.assert_allclose(a.amounts, b.amounts, rtol=1e-11)


def test_bad_input_raises_clear_errors():
    mu0 = np.zeros(5)
    with pytest.raises(InputError, match=">= 0 mol"):
        minimize_gibbs(A_SMR, mu0, [1.0, -1.0, 0, 0, 0], 0.0)
    with pytest.raises(InputError, match="finite"):
        minimize_gibbs(A_SMR, [np.nan, 0, 0, 0, 0], [1.0, 1, 0, 0, 0], 0.0)
    with pytest.raises(InputError, match="no atoms"):
        minimize_gibbs(A_SMR, mu0, np.zeros(5), 0.0)
    with pytest.raises(InputError, match="last dimension"):
        minimize_gibbs(A_SMR, mu0, [1.0, 1.0], 0.0)
    with pytest.raises(InputError, match="feed='amounts' or feed='elements'"):
        minimize_gibbs(np.eye(2), [0.0, 0.0], [1.0, 1.0], 0.0)
    with pytest.raises(InputError, match="broadcast"):
        minimize_gibbs(A_SMR, np.zeros((3, 5)), np.ones((4, 5)), 0.0)
    with pytest.raises(NotImplementedError, match="condensed"):
        minimize_gibbs(A_SMR, mu0, np.ones(5), 0.0, gas_mask=[True] * 4 + [False])
    with pytest.raises(InputError, match="cannot be made"):
        minimize_gibbs([[1, 1], [1, 2]], [0.0, 0.0], [1.0, 5.0], 0.0, feed="elements")


# ---------------------------------------------------------------------- two formulations
def test_gibbs_and_extent_formulations_agree_on_reforming_and_shift():
    ext = pytest.importorskip("eqconv.extent_solver")
    T = np.linspace(700.0, 1300.0, 25)[:, None]
    P = np.linspace(1e5, 50e5, 20)[None, :]
    mu0 = np.stack([get_species(k).mu0_over_RT(T) for k in SMR], axis=-1)
    nu = np.array([[-1, -1, 1, 0, 3], [0, -1, -1, 1, 1]])  # reforming, shift
    n0 = np.array([1.0, 3.0, 0.0, 0.0, 0.0])
    es = ext.solve_extents(nu, -(mu0 @ nu.T), n0, np.log(P / P_BAR))
    gs = minimize_gibbs(A_SMR, mu0, n0, np.log(P / P_BAR))
    assert es.converged.all() and gs.all_converged
    np.testing.assert_allclose(gs.amounts, es.amounts, rtol=1e-9, atol=0)


# ---------------------------------------------------------------------- species wrapper
def test_wrapper_returns_an_equilibrium_result():
    res = gibbs_equilibrium(SMR, {"CH4": 1.0, "H2O": 3.0}, T=[900.0, 1000.0], P=20e5, data="janaf")
    assert res.converged.all() and res.species == tuple(SMR) and res.shape == (2,)
    x = sum(res.mole_fractions.values())
    np.testing.assert_allclose(x, 1.0, atol=1e-14)
    conv = res.conversion("CH4")
    assert np.all(np.diff(conv) > 0)  # endothermic reforming: more conversion when hotter
    # the derived reactions carry the residuals; the extents rebuild the amounts
    assert [r.equation for r in res.reactions] == ["CO + 3 H2 = CH4 + H2O", "H2O + CO = CO2 + H2"]
    assert np.all(np.abs(res.residuals) <= 1e-10)
    nu = np.array([[res.reactions[j].coefficients.get(k, 0.0) for k in SMR] for j in range(2)])
    rebuilt = res.solution.amounts[..., :] - np.stack([res.feed[k] for k in SMR], axis=-1)
    np.testing.assert_allclose(np.stack(res.extents, axis=-1) @ nu, rebuilt, atol=1e-13)
    # ln K of the derived reactions from the same species data
    rx = Reaction("CO + 3 H2 = CH4 + H2O", data="janaf")
    np.testing.assert_allclose(res.ln_K[..., 0], rx.ln_K(np.array([900.0, 1000.0])), rtol=1e-12)
    assert res.diagnostics()[0].startswith("CO + 3 H2 = CH4 + H2O: at equilibrium at 2 of 2")
    with pytest.raises(InputError, match="not in the feed"):
        res.conversion("CO")
    with pytest.raises(InputError, match="not in the species list"):
        gibbs_equilibrium(SMR, {"NH3": 1.0}, T=900.0, P=1e5)
    with pytest.raises(InputError, match="ideal"):
        gibbs_equilibrium(SMR, {"CH4": 1.0}, T=900.0, P=1e5, gas="peng-robinson")
    with pytest.raises(NotImplementedError, match="condensed"):
        gibbs_equilibrium(["C(s)", "CH4", "H2"], {"CH4": 1.0}, T=900.0, P=1e5, data="janaf")


def test_wrapper_reports_blocked_reactions():
    # no hydrogen fed: the reaction that needs NH3 / H2 is blocked, N2 and Ar stay as fed
    res = gibbs_equilibrium(
        ["N2", "H2", "NH3", "Ar"], {"N2": 1.0, "Ar": 0.5}, T=700.0, P=1e6, data="janaf"
    )
    assert res.converged and res.amounts["NH3"] == 0.0 and res.amounts["N2"] == 1.0
    assert res.reaction_status().tolist() == ["blocked"]


def test_wrapper_raises_on_a_failed_point_unless_flagged(monkeypatch):
    import eqconv.gibbs as gibbs

    # a solver that gives up at once: the point keeps its starting composition
    monkeypatch.setattr(
        gibbs,
        "phase1",
        lambda p, g, b, lam, nu, *a: (
            np.zeros(len(nu), dtype=bool),
            np.ones(len(nu), dtype=np.int64),
        ),
    )
    monkeypatch.setattr(gibbs, "phase3", lambda p, g, *a: np.zeros(len(g), dtype=np.int64))
    kw = {"T": 900.0, "P": 20e5, "data": "janaf"}
    with pytest.raises(ConvergenceError, match="T = 900 K"):
        gibbs_equilibrium(SMR, {"CH4": 1.0, "H2O": 3.0}, **kw)
    res = gibbs_equilibrium(SMR, {"CH4": 1.0, "H2O": 3.0}, **kw, on_failure="flag")
    assert not res.converged and np.isnan(res.amounts["CH4"])  # never a silent number
    assert res.reaction_status().tolist() == ["not converged", "not converged"]


# ---------------------------------------------------------------------- external checks
def _janaf_table(formula):
    janaf = pytest.importorskip("janaf")
    index = {
        "CH4": "C-067",
        "H2O": "H-064",
        "CO": "C-093",
        "CO2": "C-095",
        "H2": "H-050",
        "N2": "N-023",
        "NH3": "H-083",
    }[formula]
    return janaf.Table(index=index).df


def _janaf(formula, T, column):
    import polars as pl

    df = _janaf_table(formula)
    return float(df.filter(pl.col("T(K)") == T)[column][0])


@pytest.mark.parametrize("T", [800.0, 900.0, 1000.0, 1100.0])
@pytest.mark.parametrize("P_bar", [1.0, 10.0])
def test_reforming_equilibrium_reproduces_janaf_log_kf(T, P_bar):
    # NIST-JANAF Thermochemical Tables, 4th ed. (1998), tables C-067, H-064, C-093, C-095,
    # H-050: μ°/RT from ΔfH°(298.15 K) and −(G°−H°298)/T read at table temperatures (no
    # interpolation); the equilibrium found by the Gibbs solver must satisfy
    # ln Q = Σ ν ln Kf with log Kf read from the same tables. log Kf is printed to 3
    # decimals: ±0.0005·ln 10 per species, three species per reaction (H2's is 0) -> 0.0035,
    # plus the rounding of the other two columns (~1e-4): tolerance 0.004.
    mu0 = np.array(
        [
            (1e3 * _janaf(k, 298.15, "delta-f H") - T * _janaf(k, T, "-[G-H(Tr)]/T")) / (R * T)
            for k in SMR
        ]
    )
    sol = minimize_gibbs(A_SMR, mu0, [1.0, 3.0, 0.0, 0.0, 0.0], np.log(P_bar))
    assert sol.converged
    ln_x = np.log(sol.mole_fractions)
    lnP = np.log(P_bar)
    lnkf = {k: np.log(10.0) * _janaf(k, T, "log Kf") for k in SMR}
    # CH4 + H2O = CO + 3 H2 and CO + H2O = CO2 + H2
    lnQ1 = ln_x[2] + 3 * ln_x[4] - ln_x[0] - ln_x[1] + 2 * lnP
    lnQ2 = ln_x[3] + ln_x[4] - ln_x[2] - ln_x[1]
    assert lnQ1 == pytest.approx(lnkf["CO"] + 3 * lnkf["H2"] - lnkf["CH4"] - lnkf["H2O"], abs=0.004)
    assert lnQ2 == pytest.approx(lnkf["CO2"] + lnkf["H2"] - lnkf["CO"] - lnkf["H2O"], abs=0.004)


@pytest.mark.parametrize("T", [800.0, 1000.0])
def test_wrapper_with_janaf_species_reproduces_janaf_log_kf(T):
    # NIST-JANAF 4th ed. (1998) log Kf (3 decimals) against the state found with the
    # data="janaf" species; same tolerance as above.
    res = gibbs_equilibrium(SMR, {"CH4": 1.0, "H2O": 3.0}, T=T, P=5e5, data="janaf")
    x = res.mole_fractions
    lnkf = {k: np.log(10.0) * _janaf(k, T, "log Kf") for k in SMR}
    lnQ1 = np.log(x["CO"] * x["H2"] ** 3 * 5.0**2 / (x["CH4"] * x["H2O"]))
    lnQ2 = np.log(x["CO2"] * x["H2"] / (x["CO"] * x["H2O"]))
    assert float(lnQ1) == pytest.approx(lnkf["CO"] - lnkf["CH4"] - lnkf["H2O"], abs=0.004)
    assert float(lnQ2) == pytest.approx(lnkf["CO2"] - lnkf["CO"] - lnkf["H2O"], abs=0.004)


@pytest.mark.parametrize(
    ("feed", "expected"),
    [
        ({"H2O": 1.0, "CO": 1.0}, 0.499),
        ({"H2O": 1.0, "CO": 1.0, "N2": 2.0}, 0.499),
        ({"H2O": 2.0, "CO": 1.0}, 0.333),
        ({"H2O": 1.0, "CO": 2.0}, 0.667),
        ({"H2O": 1.0, "CO": 1.0, "CO2": 1.0}, 0.333),
    ],
)
def test_water_gas_shift_textbook_cases(feed, expected):
    # Smith, Van Ness & Abbott, Introduction to Chemical Engineering Thermodynamics, 7th ed.
    # (2005), ch. 13, shift at 1100 K, ideal gas (values from memory): fraction of the steam
    # reacted, printed to 3 decimals, for K = 1. JANAF gives K = 0.991 at 1100 K, which
    # lowers these fractions by up to 0.0025 (the first case becomes 0.499, derived in
    # REFERENCES.md §3): tolerance abs 0.003.
    res = gibbs_equilibrium(["CO", "H2O", "CO2", "H2", "N2"], feed, T=1100.0, P=1e5, data="janaf")
    assert float(res.conversion("H2O")) == pytest.approx(expected, abs=0.003)


@pytest.mark.parametrize(
    ("t_c", "p_atm", "pct"),
    [
        (400.0, 10.0, 4.05),
        (400.0, 100.0, 24.84),
        (400.0, 300.0, 42.94),
        (400.0, 1000.0, 62.34),
        (500.0, 10.0, 1.27),
        (500.0, 100.0, 10.42),
        (500.0, 300.0, 23.07),
        (500.0, 1000.0, 42.68),
    ],
)
def test_ammonia_ideal_gas_with_janaf_data(t_c, p_atm, pct):
    # REFERENCES.md §2, column "ideal gas with JANAF K (derived)", 3:1 H2:N2, mol % NH3
    # printed to 2 decimals (abs 0.005). 673.15 and 773.15 K fall between JANAF table
    # points: log10 K there depends on how log Kf is interpolated (in 1/T: -1.8742 at
    # 673.15 K; the data="janaf" species, cubic in H and S: -1.8728), which moves x_NH3 by
    # up to 0.3 % relative: tolerance max(0.3 %, 0.005).
    res = gibbs_equilibrium(
        ["N2", "H2", "NH3"], {"N2": 1.0, "H2": 3.0}, T=t_c + 273.15, P=p_atm * P_ATM, data="janaf"
    )
    assert 100 * float(res.mole_fractions["NH3"]) == pytest.approx(pct, rel=3e-3, abs=0.005)


def test_nothing_moves_with_pressure_when_moles_are_conserved():
    # common practice: shift alone (Δn = 0) is independent of P for an ideal gas
    res = gibbs_equilibrium(
        ["CO", "H2O", "CO2", "H2"],
        {"CO": 1.0, "H2O": 1.5},
        T=900.0,
        P=[1e5, 1e6, 1e7],
        data="janaf",
    )
    np.testing.assert_allclose(res.amounts["CO2"], res.amounts["CO2"][0], rtol=1e-12)


def test_docstring_examples_run():
    import doctest

    import eqconv.gibbs
    import eqconv.gibbs_api

    for mod in (eqconv.gibbs, eqconv.gibbs_api):
        result = doctest.testmod(mod)
        assert result.attempted >= 1 and result.failed == 0


# ---------------------------------------------------------------------- coarse-to-fine starts
@pytest.mark.parametrize(("npts", "row"), [(7 * 200, 200), (5 * 37, 37), (301, 200), (100, 1)])
def test_coarse_plan_stays_in_rows_and_is_exact_for_quadratics(npts: int, row: int) -> None:
    """Starts are interpolated from coarse points of the same grid row only, and the weights
    are Lagrange weights: exact for any quadratic in the position (a fact of numerical
    analysis, common practice)."""
    from eqconv.gibbs import _coarse_plan

    stride = 16
    coarse, nodes, w, near = _coarse_plan(npts, row, stride)
    R = row if (row >= 4 * stride and npts % row == 0) else npts
    pos = np.arange(npts)
    assert np.all(np.diff(coarse) > 0)
    assert set((np.arange(npts // R) * R + R - 1).tolist()) <= set(coarse.tolist())
    assert np.all(coarse[nodes] // R == pos // R)  # same row
    col = (pos % R).astype(float)
    for f in (lambda c: np.ones_like(c), lambda c: 3.0 * c - 2.0, lambda c: 0.01 * c**2 - c):
        approx = np.sum(w * f((coarse[nodes] % R).astype(float)), axis=0)
        np.testing.assert_allclose(approx, f(col), rtol=1e-12, atol=1e-9)
    # the nearest neighbour is the one with the smallest distance
    dist = np.abs(coarse[nodes] % R - col)
    assert np.all(dist[near, pos] == dist.min(axis=0))


def test_grid_rows_do_not_change_the_answer() -> None:
    """The same points solved as one row or as rows of a grid agree (start independence)."""
    T = np.linspace(700.0, 1300.0, 30)[:, None]
    P = np.linspace(1e5, 50e5, 80)[None, :]
    keys = ["CH4", "H2O", "CO", "CO2", "H2"]
    feed = {"CH4": 1.0, "H2O": 3.0}
    grid = gibbs_equilibrium(keys, feed, T, P, data="janaf")
    flat = gibbs_equilibrium(
        keys,
        feed,
        np.broadcast_to(T, (30, 80)).ravel(),
        np.broadcast_to(P, (30, 80)).ravel(),
        data="janaf",
    )
    assert grid.solution.converged.all() and flat.solution.converged.all()
    for k in keys:
        np.testing.assert_allclose(grid.amounts[k].ravel(), flat.amounts[k], rtol=1e-10, atol=1e-14)


def test_interpolated_start_falls_back_to_the_nearest_converged_neighbour() -> None:
    """A coarse point that failed (NaN state) never leaks into a start marked usable."""
    from eqconv.gibbs import _coarse_plan, _interpolate

    coarse_pos, nodes, w, near = _coarse_plan(96, 1, 16)
    nc = len(coarse_pos)
    lam = np.tile(np.arange(nc, dtype=float), (2, 1))  # λ_j = coarse index, ln N likewise
    coarse = np.vstack([lam, np.arange(nc, dtype=float), np.ones(nc)])
    coarse[:, 2] = np.nan
    coarse[-1, 2] = 0.0  # the third coarse point failed
    L, V, ok = _interpolate(coarse, nodes, w, near)
    assert not np.any(ok & ~np.isfinite(V))
    assert np.all(np.isfinite(L[:, ok]))
    # where the failed point is one of the three neighbours, the nearest one's own values
    touched = np.any(nodes == 2, axis=0)
    np.testing.assert_array_equal(
        ok[touched], near[touched] != np.argmax(nodes == 2, axis=0)[touched]
    )
    assert np.all(V[touched & ok] == nodes[near, np.arange(96)][touched & ok])
    # elsewhere quadratic interpolation of a linear function: exact
    far = ~touched
    np.testing.assert_allclose(V[far], np.sum(w * nodes, axis=0)[far])
