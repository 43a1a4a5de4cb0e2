"""Tests of eqconv.extent_solver, the pure-array extent formulation.

Exact identities (REFERENCES.md §3, derived): equimolar shift ε = √K/(1+√K); ammonia from a
stoichiometric feed ε = 1 − (1 + (3√3/4) K P/p°)^(−½). Textbook shift cases: Smith, Van Ness &
Abbott, *Introduction to Chemical Engineering Thermodynamics*, 7th ed. (2005), ch. 13 (values
from memory), with K = 1 where the book takes K ≈ 1 at 1100 K. Property tests (hypothesis):
balances close, mole fractions sum to one, residual ≤ 1e-10, Le Chatelier (common practice).
"""

from __future__ import annotations

import numpy as np
import pytest
from hypothesis import example, given, settings
from hypothesis import strategies as st

from eqconv.errors import DependentReactionsError, InputError
from eqconv.extent_solver import BALANCE_TOL, check_independent, solve_extents

TOL = 1e-10
LN10 = float(np.log(10.0))

# species orders used below
SHIFT = np.array([[-1.0, -1.0, 1.0, 1.0, 0.0]])  # CO H2O CO2 H2 N2
NH3 = np.array([[-0.5, -1.5, 1.0, 0.0]])  # N2 H2 NH3 Ar
NH3_2 = np.array([[-1.0, -3.0, 2.0, 0.0]])  # N2 H2 NH3 Ar (per 2 NH3)
REFORM = np.array(
    [
        [-1.0, -1.0, 1.0, 3.0, 0.0, 0.0],  # CH4 H2O CO H2 CO2 N2
        [0.0, -1.0, -1.0, 1.0, 1.0, 0.0],
    ]
)
DEHYD = np.array([[-1.0, 1.0, 1.0, 0.0]])  # C2H6 C2H4 H2 N2 (Δn = +1)
METHANOL = np.array(  # CH4 H2O CO H2 CO2 CH3OH N2: reforming, shift, CO + 2 H2 = CH3OH
    [
        [-1.0, -1.0, 1.0, 3.0, 0.0, 0.0, 0.0],
        [0.0, -1.0, -1.0, 1.0, 1.0, 0.0, 0.0],
        [0.0, 0.0, -1.0, -2.0, 0.0, 1.0, 0.0],
    ]
)
METHANOL_CO2 = np.array(  # same species: CO2 + H2 = CO + H2O, CO2 + 3 H2 = CH3OH + H2O,
    [  # CO + 3 H2 = CH4 + H2O
        [0.0, 1.0, 1.0, -1.0, -1.0, 0.0, 0.0],
        [0.0, 1.0, 0.0, -3.0, -1.0, 1.0, 0.0],
        [1.0, 1.0, -1.0, -3.0, 0.0, 0.0, 0.0],
    ]
)
# atom matrices (rows: elements) of the species orders, to check element balances
ATOMS = {
    "shift": np.array([[1, 0, 1, 0, 0], [1, 1, 2, 0, 0], [0, 2, 0, 2, 0], [0, 0, 0, 0, 2]]),
    "nh3": np.array([[2, 0, 1, 0], [0, 2, 3, 0], [0, 0, 0, 1]]),
    "reform": np.array(
        [[1, 0, 1, 0, 1, 0], [0, 1, 1, 0, 2, 0], [4, 2, 0, 2, 0, 0], [0, 0, 0, 0, 0, 2]]
    ),
    "methanol": np.array(
        [
            [1, 0, 1, 0, 1, 1, 0],
            [0, 1, 1, 0, 2, 1, 0],
            [4, 2, 0, 2, 0, 4, 0],
            [0, 0, 0, 0, 0, 0, 2],
        ]
    ),
}


def assert_solution(sol, nu, n0, atoms=None):
    """Converged everywhere, residual, balances, signs and mole fractions."""
    assert sol.converged.all(), f"{sol.n_failed} point(s) failed"
    assert np.max(np.abs(sol.residual)) <= TOL
    assert np.max(sol.balance_error) <= BALANCE_TOL
    n = sol.amounts
    assert np.all(n >= 0.0)
    # amounts follow the extents: n = n0 + νᵀξ (absolute, relative to the total amount)
    tot = np.sum(np.broadcast_to(n0, n.shape), axis=-1, keepdims=True)
    np.testing.assert_allclose(n, n0 + sol.extents @ nu, rtol=0, atol=1e-12 * tot.max())
    y = n / n.sum(axis=-1, keepdims=True)
    np.testing.assert_allclose(y.sum(axis=-1), 1.0, rtol=0, atol=1e-14)
    if atoms is not None:
        b0, b = np.broadcast_to(n0, n.shape) @ atoms.T, n @ atoms.T
        assert np.all(np.abs(b - b0) <= 1e-12 * np.maximum(b0, 1e-300))


# ---------------------------------------------------------------------------- exact identities
@pytest.mark.parametrize("log10K", [-100, -40, -10, -1, 0, 1, 10, 40, 100])
def test_equimolar_shift_identity(log10K: float) -> None:
    # REFERENCES.md §3 (derived): ideal gas, 1 CO + 1 H2O, ε = √K/(1 + √K), for any P
    K = 10.0**log10K
    expected = np.sqrt(K) / (1.0 + np.sqrt(K))
    lnP = np.array([-3.0, 0.0, 6.0])
    sol = solve_extents(SHIFT, [log10K * LN10], [1.0, 1.0, 0.0, 0.0, 0.0], lnP)
    assert_solution(sol, SHIFT, [1.0, 1.0, 0.0, 0.0, 0.0], ATOMS["shift"])
    # |ln Q − ln K| ≤ 1e-10 bounds the relative error of ε and of 1 − ε by about 1e-10
    np.testing.assert_allclose(sol.extents[:, 0], expected, rtol=2e-10)
    # the reactant left (1 − ε) is resolved to full relative precision as well
    np.testing.assert_allclose(sol.amounts[:, 0], 1.0 / (1.0 + np.sqrt(K)), rtol=2e-10)


def test_ammonia_stoichiometric_feed_identity() -> None:
    # REFERENCES.md §3 (derived): ½N2 + 3/2 H2 = NH3, ideal gas, feed ½ N2 + 3/2 H2:
    # ε = 1 − (1 + 1.2990 K P/p°)^(−½) with 1.2990 = 3√3/4 (written without cancellation)
    logK = np.linspace(-40.0, 40.0, 33)[:, None]
    lnP = np.log(np.array([0.1, 1.0, 30.0, 300.0]))[None, :]
    c = 3.0 * np.sqrt(3.0) / 4.0
    a = c * 10.0**logK * np.exp(lnP)
    expected = -np.expm1(-0.5 * np.log1p(a))
    sol = solve_extents(NH3, (logK * LN10)[..., None], [0.5, 1.5, 0.0, 0.0], lnP)
    assert_solution(sol, NH3, [0.5, 1.5, 0.0, 0.0], ATOMS["nh3"])
    # |ln Q − ln K| ≤ 1e-10 bounds the relative error of ε and 1 − ε by about 1e-10
    np.testing.assert_allclose(sol.extents[..., 0], expected, rtol=2e-10)
    # unconverted N2 = ½ (1 − ε) = ½ (1 + a)^(−½): no digits lost at K = 1e40
    np.testing.assert_allclose(sol.amounts[..., 0], 0.5 / np.sqrt(1.0 + a), rtol=2e-10)


@pytest.mark.parametrize(
    ("feed", "P_bar", "steam_reacted"),
    [
        # Smith, Van Ness & Abbott, 7th ed. (2005), ch. 13, water-gas shift at 1100 K where the
        # book takes K ≈ 1 (values from memory; printed to 3 decimals)
        ({"H2O": 1, "CO": 1}, 1.0, 0.5),
        ({"H2O": 1, "CO": 1}, 10.0, 0.5),
        ({"H2O": 1, "CO": 1, "N2": 2}, 1.0, 0.5),
        ({"H2O": 2, "CO": 1}, 1.0, 0.333),
        ({"H2O": 1, "CO": 2}, 1.0, 0.667),
        ({"H2O": 1, "CO": 1, "CO2": 1}, 1.0, 0.333),
    ],
)
def test_textbook_shift_cases(feed: dict[str, float], P_bar: float, steam_reacted: float) -> None:
    order = ["CO", "H2O", "CO2", "H2", "N2"]
    n0 = [float(feed.get(k, 0.0)) for k in order]
    sol = solve_extents(SHIFT, [0.0], n0, np.log(P_bar))  # K = 1
    assert_solution(sol, SHIFT, n0, ATOMS["shift"])
    assert float(sol.extents[0]) / n0[1] == pytest.approx(steam_reacted, abs=5e-4)


# ---------------------------------------------------------------------------- properties
# Feeds: 0, traces down to 1e-30 mol, or ordinary amounts. (A limiting reactant fed at
# 1e-200 mol would have to end near 1e-400 mol, below the smallest double: such points are
# reported as not converged, never returned as numbers.)
FEEDS = st.one_of(st.just(0.0), st.floats(min_value=1e-3, max_value=10.0))
TRACE = st.one_of(st.just(0.0), st.floats(min_value=1e-30, max_value=1e-6), FEEDS)


@settings(max_examples=40, deadline=None)
@given(
    lnK=st.lists(st.floats(-92.0, 92.0), min_size=1, max_size=8),
    lnP=st.floats(-5.0, 7.0),
    n=st.tuples(FEEDS, FEEDS, TRACE, TRACE, TRACE),
)
def test_shift_properties(lnK: list[float], lnP: float, n: tuple[float, ...]) -> None:
    n0 = np.array(n)
    if n0[:4].sum() <= 0.0 or (n0[0] * n0[1] == 0.0 and n0[2] * n0[3] == 0.0 and n0.sum() <= 0.0):
        n0[0] = n0[1] = 1.0
    sol = solve_extents(SHIFT, np.array(lnK)[:, None], n0, lnP)
    assert_solution(sol, SHIFT, n0, ATOMS["shift"])


@settings(max_examples=40, deadline=None)
@given(
    lnK=st.lists(st.floats(-92.0, 92.0), min_size=1, max_size=8),
    lnP=st.floats(-5.0, 7.0),
    n=st.tuples(FEEDS, FEEDS, TRACE, FEEDS),
)
def test_ammonia_properties(lnK: list[float], lnP: float, n: tuple[float, ...]) -> None:
    n0 = np.array(n)
    if n0.sum() <= 0.0:
        n0[:2] = 1.0, 3.0
    sol = solve_extents(NH3_2, np.array(lnK)[:, None], n0, lnP)
    assert_solution(sol, NH3_2, n0, ATOMS["nh3"])


@settings(max_examples=30, deadline=None)
@given(
    lnK=st.lists(st.tuples(st.floats(-92.0, 92.0), st.floats(-92.0, 92.0)), min_size=1, max_size=6),
    lnP=st.floats(-5.0, 7.0),
    n=st.tuples(FEEDS, FEEDS, TRACE, TRACE, TRACE, FEEDS),
)
# found by a clean CI run: CH4 + N2 with a trace of CO2, 1e-30 H2 and no water (see
# test_dry_reforming_route_from_trace_oxidant below)
@example(lnK=[(-28.0, 0.0)], lnP=0.0, n=(1.0, 0.0, 0.0, 1e-30, 9.384013705607426e-07, 1.0))
def test_reforming_and_shift_properties(
    lnK: list[tuple[float, float]], lnP: float, n: tuple[float, ...]
) -> None:
    n0 = np.array(n)
    if n0.sum() <= 0.0:
        n0[:2] = 1.0, 3.0
    sol = solve_extents(REFORM, np.array(lnK), n0, lnP)
    assert_solution(sol, REFORM, n0, ATOMS["reform"])


# ---------------------------------------------------------------------------- Le Chatelier
@settings(max_examples=30, deadline=None)
@given(
    dH=st.floats(-150e3, -10e3),
    dS=st.floats(-150.0, 0.0),
    T1=st.floats(400.0, 1200.0),
    dT=st.floats(5.0, 300.0),
    lnP=st.floats(0.0, 6.0),
)
def test_exothermic_conversion_falls_with_T(
    dH: float, dS: float, T1: float, dT: float, lnP: float
) -> None:
    # van 't Hoff ln K = −ΔH/(R T) + ΔS/R with ΔH < 0: K and the conversion fall with T
    R = 8.314462618
    T = np.array([T1, T1 + dT])
    lnK = (-dH / (R * T) + dS / R)[:, None]
    sol = solve_extents(NH3_2, lnK, [1.0, 3.0, 0.0, 0.1], lnP)
    assert_solution(sol, NH3_2, [1.0, 3.0, 0.0, 0.1])
    xi = sol.extents[:, 0]
    assert xi[1] < xi[0] or xi[0] > 1.0 - 1e-12  # saturated at full conversion


@settings(max_examples=30, deadline=None)
@given(
    lnK=st.floats(-30.0, 10.0),
    lnP=st.floats(-3.0, 6.0),
    dlnP=st.floats(0.1, 3.0),
    inert=st.floats(0.0, 50.0),
)
def test_pressure_and_inert_follow_delta_n(
    lnK: float, lnP: float, dlnP: float, inert: float
) -> None:
    P2 = np.array([lnP, lnP + dlnP])
    # Δn < 0 (ammonia): conversion rises with P, falls with inert
    a = solve_extents(NH3_2, [lnK], [1.0, 3.0, 0.0, inert], P2).extents[:, 0]
    b = solve_extents(NH3_2, [lnK], [1.0, 3.0, 0.0, inert + 1.0], lnP).extents[0]
    assert a[1] > a[0] and b < a[0]
    # Δn > 0 (ethane dehydrogenation): conversion falls with P, rises with inert
    c = solve_extents(DEHYD, [lnK], [1.0, 0.0, 0.0, inert], P2).extents[:, 0]
    d = solve_extents(DEHYD, [lnK], [1.0, 0.0, 0.0, inert + 1.0], lnP).extents[0]
    assert c[1] < c[0] and d > c[0]
    # Δn = 0 (shift): nothing moves with P or with inert
    e = solve_extents(SHIFT, [lnK / 3.0], [1.0, 2.0, 0.0, 0.0, inert], P2).extents[:, 0]
    f = solve_extents(SHIFT, [lnK / 3.0], [1.0, 2.0, 0.0, 0.0, inert + 5.0], lnP).extents[0]
    np.testing.assert_allclose([e[1], f], e[0], rtol=1e-12)


# ---------------------------------------------------------------------------- hard cases
@pytest.mark.parametrize("log10K", [-100.0, -40.0, 40.0, 100.0])
def test_extreme_K_two_reactions(log10K: float) -> None:
    lnK = np.array(
        [
            [log10K * LN10, 0.0],
            [0.0, log10K * LN10],
            [log10K * LN10] * 2,
            [log10K * LN10, -log10K * LN10],
        ]
    )
    for n0 in (
        [1.0, 3.0, 0.0, 0.0, 0.0, 0.0],
        [1.0, 3.0, 0.1, 0.1, 0.1, 1.0],
        [1.0, 3.0, 0.0, 0.0, 0.0, 999.0 * 4.0],
    ):
        sol = solve_extents(REFORM, lnK, n0, np.array([[-3.0], [0.0], [5.0]]))
        assert_solution(sol, REFORM, n0, ATOMS["reform"])


def test_trace_species_keep_full_relative_precision() -> None:
    # K1 = 1e40 at 1 bar: CH4 left is ~1e-40 of the feed and must satisfy ln Q = ln K itself
    sol = solve_extents(REFORM, [[40 * LN10, 0.0]], [1.0, 3.0, 0.0, 0.0, 0.0, 0.0], 0.0)
    assert_solution(sol, REFORM, [1.0, 3.0, 0.0, 0.0, 0.0, 0.0], ATOMS["reform"])
    n = sol.amounts[0]
    y = n / n.sum()
    lnQ1 = np.log(y[2]) + 3 * np.log(y[3]) - np.log(y[0]) - np.log(y[1])
    assert 0.0 < n[0] < 1e-30
    assert lnQ1 == pytest.approx(40 * LN10, abs=1e-10)


def test_ninety_nine_point_nine_percent_inert() -> None:
    n0 = np.array([0.25e-3, 0.75e-3, 0.0, 0.999])
    sol = solve_extents(NH3, np.array([[-5.0], [0.0], [5.0]]), n0, np.log(200.0))
    assert_solution(sol, NH3, n0, ATOMS["nh3"])
    n1 = np.array([1.0e-3, 1.0e-3, 0.0, 0.0, 0.999 * 2e-3 / 0.001])
    sol = solve_extents(SHIFT, [[0.0]], n1, 0.0)
    assert_solution(sol, SHIFT, n1, ATOMS["shift"])


def test_limiting_reactant_changes_across_the_grid() -> None:
    # H2:N2 from 0.5 to 6: N2-limited above 3, H2-limited below; K = 1e3, 1 bar
    r = np.linspace(0.5, 6.0, 23)
    n0 = np.stack([np.ones_like(r), r, 0 * r, 0 * r], axis=-1)
    sol = solve_extents(NH3_2, [np.log(1e3)], n0, 0.0)
    assert_solution(sol, NH3_2, n0, ATOMS["nh3"])
    xi = sol.extents[:, 0]
    assert np.all(np.diff(xi) > 0.0)
    assert np.all(xi < np.minimum(1.0, r / 3.0))


def test_blocked_reaction_is_reported_not_solved() -> None:
    # no H2 and no NH3: the reaction cannot move either way
    sol = solve_extents(NH3_2, [0.0], [1.0, 0.0, 0.0, 1.0], 0.0)
    assert sol.converged.all() and sol.blocked.all()
    assert float(sol.extents[0]) == 0.0
    # in a pair, a reaction whose species cannot form is blocked, the other one solved
    nu = np.array(
        [
            [-1.0, -3.0, 2.0, 0.0, 0.0, 0.0],  # N2 H2 NH3 CO H2O CO2
            [0.0, 1.0, 0.0, -1.0, -1.0, 1.0],
        ]
    )  # CO + H2O = CO2 + H2
    sol = solve_extents(nu, [[5.0, 2.0]], [1.0, 0.0, 0.0, 0.0, 1.0, 1.0], 0.0)
    # no CO: shift can only go backwards once H2 exists, and H2 needs the shift: all frozen
    assert sol.converged.all()
    np.testing.assert_allclose(sol.extents, 0.0, atol=1e-300)
    sol = solve_extents(nu, [[5.0, 2.0]], [1.0, 0.0, 0.0, 1.0, 1.0, 0.0], 0.0)
    assert_solution(sol, nu, [1.0, 0.0, 0.0, 1.0, 1.0, 0.0])


def test_blocked_reactions_beside_live_ones() -> None:
    # CH4 H2O CO H2 CO2 C2H6 C2H4 N2 with reforming, shift, 2 CH4 = C2H6 + H2 and
    # C2H6 = C2H4 + H2, fed without oxygen: the first two are blocked, the C2 pair is solved.
    # (The residual of the live pair used to come back NaN, from 0·ln 0 of the O species.)
    nu = np.array(
        [
            [-1.0, -1.0, 1.0, 3.0, 0.0, 0.0, 0.0, 0.0],
            [0.0, -1.0, -1.0, 1.0, 1.0, 0.0, 0.0, 0.0],
            [-2.0, 0.0, 0.0, 1.0, 0.0, 1.0, 0.0, 0.0],
            [0.0, 0.0, 0.0, 1.0, 0.0, -1.0, 1.0, 0.0],
        ]
    )
    atoms = np.array(
        [
            [1, 0, 1, 0, 1, 2, 2, 0],
            [0, 1, 1, 0, 2, 0, 0, 0],
            [4, 2, 0, 2, 0, 6, 4, 0],
            [0, 0, 0, 0, 0, 0, 0, 2],
        ]
    )
    n0 = np.array([1.0, 0.0, 0.0, 0.1, 0.0, 0.0, 0.0, 1.0])
    lnK = np.array([[1.0, 0.5, -5.0, -2.0], [10.0, 0.0, -20.0, 3.0]])
    lnP = np.array([0.0, 2.0])
    sol = solve_extents(nu, lnK, n0, lnP)
    assert_solution(sol, nu, n0, atoms)
    assert np.all(sol.blocked == [True, True, False, False])
    assert np.all(sol.amounts[:, [1, 2, 4]] == 0.0)
    assert np.all(sol.amounts[:, [5, 6]] > 0.0)
    r = lnQ_minus_lnK(nu, sol.amounts, lnK, lnP)[:, 2:]
    assert np.abs(r).max() <= 2 * TOL


def test_species_formed_only_by_a_combination() -> None:
    # dry feed CH4 + CO2: neither reaction can start alone, their difference (dry reforming)
    # can; every species is then formed and both reactions reach equilibrium
    n0 = [1.0, 0.0, 0.0, 0.0, 1.0, 0.0]
    sol = solve_extents(REFORM, [[np.log(10.0), 0.0]], n0, 0.0)
    assert_solution(sol, REFORM, n0, ATOMS["reform"])
    assert np.all(sol.amounts[0, :5] > 0.0)


def lnQ_minus_lnK(nu, n, lnK, lnP):
    """ln Q − ln K of each reaction recomputed from the amounts (ideal gas, all species gas).

    Species at exactly zero enter as ln 1 = 0; they only belong to blocked reactions, whose
    entries the callers skip.
    """
    y = n / n.sum(axis=-1, keepdims=True)
    lny = np.log(np.where(y > 0.0, y, 1.0))
    return lny @ nu.T + np.multiply.outer(np.asarray(lnP), nu.sum(axis=1)) - lnK


def test_dry_reforming_route_from_trace_oxidant() -> None:
    # Regression (clean CI run, hypothesis 6.170): CH4 + N2 with 9.4e-7 CO2, 1e-30 H2 and no
    # water. Reforming and shift alone are each held back by a trace (no H2O; 1e-30 H2); the
    # route is their difference, dry reforming CH4 + CO2 = 2 CO + 2 H2 (K = K1/K2 = e^-28),
    # plus reverse shift. The solver used to stop with converged=False here.
    x = 9.384013705607426e-07
    n0 = np.array([1.0, 0.0, 0.0, 1e-30, x, 1.0])
    sol = solve_extents(REFORM, [[-28.0, 0.0]], [n0], [0.0])
    assert_solution(sol, REFORM, n0, ATOMS["reform"])
    n = sol.amounts[0]
    assert np.abs(lnQ_minus_lnK(REFORM, n, np.array([-28.0, 0.0]), 0.0)).max() <= 2 * TOL
    # derived here, to leading order in x: the CO2 is almost all converted, CO ≈ H2 ≈ 2x,
    # y_CH4 ≈ 1/2, n_gas ≈ 2 at 1 bar, so n_CO2 = 4 x^4 e^28; shift at K = 1 with CO ≈ H2
    # gives n_H2O ≈ n_CO2 (relative corrections are of order 1e-5)
    assert n[2] == pytest.approx(2 * x, rel=1e-4)
    assert n[3] == pytest.approx(2 * x, rel=1e-4)
    assert n[4] == pytest.approx(4 * x**4 * np.exp(28.0), rel=1e-4)
    assert n[1] == pytest.approx(n[4], rel=1e-4)


@pytest.mark.parametrize("oxidant", [4, 1], ids=["trace CO2", "trace H2O"])
@pytest.mark.parametrize("lnP", [-2.0, 0.0, 4.0])
def test_trace_oxidant_family(oxidant: int, lnP: float) -> None:
    # the family around the CI point: CH4 + N2, trace H2 1e-30…1e-6, trace CO2 (or H2O)
    # 1e-9…1e-3 and nothing else; ln K1 from −60 to +10, ln K2 in {−5, 0, 5}; one vectorized
    # call on the whole (H2, oxidant, K1, K2) grid
    h2 = np.array([1e-30, 1e-24, 1e-18, 1e-12, 1e-6])
    ox = np.array([1e-9, 1e-7, 1e-5, 1e-3])
    n0 = np.zeros((h2.size, ox.size, 1, 1, 6))
    n0[..., 0] = n0[..., 5] = 1.0
    n0[..., 3] = h2[:, None, None, None]
    n0[..., oxidant] = ox[None, :, None, None]
    lnK = np.stack(np.meshgrid(np.linspace(-60.0, 10.0, 15), [-5.0, 0.0, 5.0], indexing="ij"), -1)
    sol = solve_extents(REFORM, lnK, n0, lnP)
    assert sol.shape == (5, 4, 15, 3)
    assert_solution(sol, REFORM, n0, ATOMS["reform"])
    assert np.abs(lnQ_minus_lnK(REFORM, sol.amounts, lnK, lnP)).max() <= 2 * TOL
    assert np.all(sol.amounts[..., :5] > 0.0)  # every species is formed


def test_safety_net_alone_converges_from_a_trace_limited_start() -> None:
    # The convex safety net must converge by itself, whatever start the fast path leaves.
    # Start: half-way along the ray of the feed pattern's combined reaction (here reverse
    # shift, held back by the 1e-30 H2), i.e. every product near 1e-30. Its line search
    # uses G/RT, including the −n_inert ln n_gas term of the N2: without that term the
    # slope of the merit function differs from ln Q − ln K by Δn·y_N2 and good steps near
    # the solution were refused (the point stalled).
    from eqconv._extent_multi import _feed_pattern, _interior_start
    from eqconv._extent_robust import _solve_robust

    lnK1 = np.linspace(-60.0, 10.0, 8)
    for oxidant in (4, 1):
        n0 = np.zeros((3, 3, lnK1.size, 6))
        n0[..., 0] = n0[..., 5] = 1.0
        n0[..., 3] = np.array([1e-30, 1e-18, 1e-6])[:, None, None]
        n0[..., oxidant] = np.array([1e-9, 1e-6, 1e-3])[None, :, None]
        n0 = n0.reshape(-1, 6)
        lnK = np.stack([np.tile(lnK1, 9), np.zeros(n0.shape[0])], axis=-1)
        d, never, basis = _feed_pattern(REFORM, n0[0] > 0.0)
        x = _interior_start(REFORM, n0, d, never)
        gas, blocked = np.ones(6, dtype=bool), np.zeros(2, dtype=bool)
        zero = np.zeros_like(n0)
        n, ok, _ = _solve_robust(REFORM, basis, never, x, n0, lnK, zero, gas, blocked, TOL / 2, 200)
        assert ok.all(), f"{np.count_nonzero(~ok)} of {ok.size} points stalled"
        assert np.abs(lnQ_minus_lnK(REFORM, n, lnK, 0.0)).max() <= TOL
        np.testing.assert_allclose(n @ ATOMS["reform"].T, n0 @ ATOMS["reform"].T, rtol=1e-12)


def test_dependent_reactions_are_explained() -> None:
    nu = np.vstack([REFORM, REFORM[0] + REFORM[1]])  # CH4 + 2 H2O = CO2 + 4 H2
    with pytest.raises(
        DependentReactionsError,
        match=r"reaction 3 = 1·\(reaction 1\) \+ "
        r"1·\(reaction 2\)",
    ):
        solve_extents(nu, [0.0, 0.0, 0.0], [1.0, 3.0, 0.0, 0.0, 0.0, 0.0], 0.0)
    with pytest.raises(DependentReactionsError, match="B = 2·"):
        check_independent([[-1.0, 1.0], [-2.0, 2.0]], ["A", "B"])
    assert issubclass(DependentReactionsError, ValueError)


def test_failed_points_are_flagged_with_nan() -> None:
    # C(s) + CO2 = 2 CO with K = e^20: the carbon would be used up (no presence decision yet)
    sol = solve_extents(
        [[-1.0, -1.0, 2.0]],
        [[20.0], [0.0]],
        [[1e-3, 1.0, 0.0], [10.0, 1.0, 0.0]],
        0.0,
        gas_mask=[False, True, True],
    )
    assert not sol.converged[0] and sol.converged[1]
    assert np.all(np.isnan(sol.amounts[0])) and np.all(np.isnan(sol.extents[0]))
    assert np.all(np.isfinite(sol.amounts[1]))
    assert abs(sol.residual[0, 0]) > TOL


def test_condensed_species_stay_out_of_the_gas_moles() -> None:
    # C(s) + CO2 = 2 CO with carbon in excess: K = y_CO² P/p° / y_CO2 (no carbon term)
    for lnP in (0.0, 3.0):
        sol = solve_extents(
            [[-1.0, -1.0, 2.0]], [1.0], [10.0, 1.0, 0.0], lnP, gas_mask=[False, True, True]
        )
        assert sol.converged.all()
        n = sol.amounts
        y_co2, y_co = n[1:] / n[1:].sum()
        assert 2 * np.log(y_co) - np.log(y_co2) + lnP == pytest.approx(1.0, abs=1e-10)


def test_fixed_fugacity_coefficients_enter_Q() -> None:
    ln_phi = np.array([0.05, 0.02, -0.1, 0.0])
    sol = solve_extents(NH3_2, [np.log(1e-3)], [1.0, 3.0, 0.0, 0.1], np.log(100.0), ln_phi=ln_phi)
    n = sol.amounts
    y = n / n.sum()
    lnQ = 2 * np.log(y[2]) - np.log(y[0]) - 3 * np.log(y[1]) + ln_phi @ NH3_2[0] - 2 * np.log(100.0)
    assert lnQ == pytest.approx(np.log(1e-3), abs=1e-10)
    ideal = solve_extents(NH3_2, [np.log(1e-3)], [1.0, 3.0, 0.0, 0.1], np.log(100.0))
    assert float(sol.extents[0]) > float(ideal.extents[0])  # φ_NH3 < 1 favours NH3


def test_grid_broadcasting_and_scalar_shape() -> None:
    sol = solve_extents(SHIFT, [0.0], [1.0, 1.0, 0.0, 0.0, 0.0], 0.0)
    assert sol.shape == () and sol.extents.shape == (1,)
    lnK = np.zeros((3, 1, 1))
    sol = solve_extents(SHIFT, lnK, [1.0, 1.0, 0.0, 0.0, 0.0], np.zeros(4))
    assert sol.shape == (3, 4) and sol.amounts.shape == (3, 4, 5)


@pytest.mark.parametrize(
    ("kwargs", "match"),
    [
        ({"ln_K": [np.inf]}, "ln_K must be finite"),
        ({"n0": [1.0, -1.0, 0.0, 0.0, 0.0]}, ">= 0 mol"),
        ({"n0": [1.0, 1.0]}, "last dimension 5"),
        ({"n0": [0.0] * 5}, "positive total amount of gas"),
        ({"ln_P_ratio": np.nan}, "ln_P_ratio must be finite"),
        ({"tol": 1e-16}, "tol must be >= 1e-13"),
        ({"max_iter": 0}, "max_iter"),
        ({"gas_mask": [True, True]}, "gas_mask must have shape"),
        ({"ln_K": np.zeros((2, 1)), "ln_P_ratio": np.zeros(3)}, "do not broadcast"),
    ],
)
def test_bad_input_is_named(kwargs: dict, match: str) -> None:
    args = {"nu": SHIFT, "ln_K": [0.0], "n0": [1.0, 1.0, 0.0, 0.0, 0.0], "ln_P_ratio": 0.0}
    args.update(kwargs)
    with pytest.raises(InputError, match=match):
        solve_extents(**args)


def test_large_uniform_grid_uses_the_start_tables() -> None:
    # one feed on a big grid: both the one-reaction table and the two-reaction table start
    # Newton near the root; results must equal the point-by-point solve of the same points
    lnK1 = np.linspace(-8.0, 10.0, 120)[:, None]
    lnP = np.linspace(0.0, 4.0, 100)[None, :]
    big = solve_extents(NH3_2, lnK1[..., None], [0.95 * 0.25, 0.95 * 0.75, 0.0, 0.05], lnP)
    small = solve_extents(
        NH3_2, lnK1[::17, :, None], [0.95 * 0.25, 0.95 * 0.75, 0.0, 0.05], lnP[:, ::13]
    )
    assert big.converged.all() and big.iterations.max() <= 3
    np.testing.assert_allclose(big.extents[::17, ::13], small.extents, rtol=1e-10)
    lnK2 = np.stack([np.linspace(-8.0, 10.0, 120), np.linspace(2.0, -0.5, 120)], -1)[:, None]
    big = solve_extents(REFORM, lnK2, [1.0, 3.0, 0.0, 0.0, 0.0, 0.0], lnP)
    small = solve_extents(REFORM, lnK2[::17], [1.0, 3.0, 0.0, 0.0, 0.0, 0.0], lnP[:, ::13])
    assert_solution(big, REFORM, [1.0, 3.0, 0.0, 0.0, 0.0, 0.0], ATOMS["reform"])
    np.testing.assert_allclose(big.amounts[::17, ::13], small.amounts, rtol=1e-9)


# ---------------------------------------------------------------------------- seeded stress
def random_feeds(rng: np.random.Generator, m: int, ns: int, p_zero: float) -> np.ndarray:
    """Feeds (m, ns): each amount 0, a trace 1e-30…1e-6 mol or 1e-3…10 mol (log-uniform)."""
    u = rng.random((m, ns))
    trace = 10.0 ** rng.uniform(-30.0, -6.0, (m, ns))
    ordinary = 10.0 ** rng.uniform(-3.0, 1.0, (m, ns))
    n0 = np.where(u < p_zero, 0.0, np.where(u < p_zero + 0.3, trace, ordinary))
    n0[n0.sum(axis=1) <= 0.0, 0] = 1.0
    return n0


@pytest.mark.parametrize(
    ("nu", "atoms", "lnK_max", "m"),
    [
        (REFORM, ATOMS["reform"], 100.0, 3000),
        (NH3_2, ATOMS["nh3"], 100.0, 3000),
        # three reactions: ln K within ±60 here. With ±100 and 1e-30 traces about one point
        # in 1e4 has an equilibrium amount below the smallest normal double (e.g. CH4 near
        # 1e-317 mol) and is, correctly, reported as not converged.
        (METHANOL, ATOMS["methanol"], 60.0, 1500),
        (METHANOL_CO2, ATOMS["methanol"], 60.0, 1500),
    ],
    ids=["reforming+shift", "ammonia", "methanol", "methanol-from-CO2"],
)
def test_seeded_random_stress_has_no_failures(
    nu: np.ndarray, atoms: np.ndarray, lnK_max: float, m: int
) -> None:
    # thousands of random feeds (every feed pattern, zeros and traces down to 1e-30 mol per
    # species), random ln K and ln(P/p°), all in one vectorized call: every point must
    # converge, close its element balances and meet ln Q = ln K when recomputed here
    rng = np.random.default_rng(20240611)
    nr, ns = nu.shape
    n0 = random_feeds(rng, m, ns, p_zero=0.3)
    lnK = rng.uniform(-lnK_max, lnK_max, (m, nr))
    lnP = rng.uniform(-5.0, 7.0, m)
    sol = solve_extents(nu, lnK, n0, lnP)
    assert_solution(sol, nu, n0, atoms)
    r = lnQ_minus_lnK(nu, sol.amounts, lnK, lnP)
    assert np.abs(np.where(sol.blocked, 0.0, r)).max() <= 2 * TOL
    # one feed for a large grid: the start-table path (>= 8192 points for several reactions)
    for feed in random_feeds(rng, 3, ns, p_zero=0.15):
        lnK = rng.uniform(-lnK_max, lnK_max, (9000, nr))
        sol = solve_extents(nu, lnK, feed, rng.uniform(-5.0, 7.0, 9000))
        assert_solution(sol, nu, feed, atoms)
