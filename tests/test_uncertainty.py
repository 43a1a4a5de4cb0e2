"""Uncertainty of K and of equilibrium conversion; sensitivities; data sources side by side.

External checks (each names its source beside it): NIST-JANAF table H-083 (read through the
``janaf`` package) against the Active Thermochemical Tables value of ΔfH°(NH3) as shipped by
``chemicals`` (method "ATCT_G"), the size of their effect on K quoted in
shared/REFERENCES.md §1, and the closed-form ammonia conversion of REFERENCES.md §3.
The rest are self-consistency checks of the propagation (first order against Monte Carlo,
analytic against finite-difference sensitivities, reproducibility).
"""

from __future__ import annotations

import dataclasses
import warnings
from dataclasses import dataclass

import numpy as np
import pytest

from eqconv import ConvergenceError, InputError, Reaction, UnknownSpeciesError, get_species
from eqconv.constants import P_BAR, R
from eqconv.sensitivity import compare_sources, conversion_sensitivity
from eqconv.uncertainty import (
    MonteCarloInterrupted,
    data_uncertainty,
    ln_K_jacobian,
    ln_K_uncertainty,
    monte_carlo_equilibrium,
    sample_ln_K,
    source_group,
)

AMMONIA = "N2 + 3 H2 = 2 NH3"
FEED = {"N2": 1.0, "H2": 3.0}


@pytest.fixture(scope="module")
def nh3_janaf() -> Reaction:
    return Reaction(AMMONIA, data="janaf")


@dataclass(frozen=True)
class _ScaledCp:
    """A Cp model times (1 + c): an independent route to the Cp derivative."""

    base: object
    c: float

    @property
    def T_min(self) -> float:
        return self.base.T_min  # type: ignore[attr-defined]

    @property
    def T_max(self) -> float:
        return self.base.T_max  # type: ignore[attr-defined]

    @property
    def method(self) -> str:
        return "scaled"

    def cp(self, T):
        return (1.0 + self.c) * self.base.cp(T)  # type: ignore[attr-defined]

    def h_int(self, T):
        return (1.0 + self.c) * self.base.h_int(T)  # type: ignore[attr-defined]

    def s_int(self, T):
        return (1.0 + self.c) * self.base.s_int(T)  # type: ignore[attr-defined]


# --------------------------------------------------------------------------- data model
def test_defaults_come_from_the_species_fields_and_elements_are_exact(nh3_janaf):
    du = data_uncertainty(nh3_janaf)
    nh3 = get_species("NH3", data="janaf")
    i = du.keys.index("NH3")
    ns = len(du.keys)
    assert du.u[i] == nh3.u_hf298 > 0
    assert du.u[ns + i] == nh3.u_s298 > 0
    assert du.u[2 * ns + i] == nh3.u_cp_rel > 0
    # ΔfH° of N2 and H2 is zero by definition: the species carry no uncertainty for it
    assert get_species("N2", data="janaf").u_hf298 == 0.0
    assert du.u[du.keys.index("N2")] == 0.0
    assert du.u[du.keys.index("H2")] == 0.0
    # a user who gives an element an uncertainty keeps it when asked to
    n2 = get_species("N2", data="janaf").replace(u_hf298=100.0, note="user value")
    rxn = Reaction(AMMONIA, data="janaf", species=[n2])
    kept = data_uncertainty(rxn, reference_elements_exact=False)
    assert kept.u[kept.keys.index("N2")] == 100.0


def test_user_uncertainty_override_is_used(nh3_janaf):
    nh3 = get_species("NH3", data="janaf").replace(u_hf298=30.0, note="user value")
    rxn = Reaction(AMMONIA, data="janaf", species=[nh3])
    du = data_uncertainty(rxn)
    assert du.u[du.keys.index("NH3")] == 30.0
    small = ln_K_uncertainty(rxn, 700.0).std[0]
    big = ln_K_uncertainty(nh3_janaf, 700.0).std[0]
    assert small < big


def test_correlation_model_cp_within_one_compilation(nh3_janaf):
    du = data_uncertainty(nh3_janaf)
    ns = len(du.keys)
    cp = du.correlation[2 * ns :, 2 * ns :]
    assert np.all(cp == 1.0)  # every JANAF table shares one Cp error
    assert np.array_equal(du.correlation[:ns, :ns], np.eye(ns))  # ΔfH° independent
    assert {du.groups[2 * ns + i] for i in range(ns)} == {"NIST-JANAF"}
    labels = [c[0] for c in du.components()]
    assert "Cp°[NIST-JANAF](N2, H2, NH3)" in labels
    indep = data_uncertainty(nh3_janaf, cp="independent")
    assert np.array_equal(indep.correlation[2 * ns :, 2 * ns :], np.eye(ns))
    assert source_group("NIST WebBook Shomate (piecewise)") == "NIST WebBook Shomate"


def test_bad_correlation_input_is_rejected(nh3_janaf):
    with pytest.raises(InputError, match="positive semi-definite"):
        data_uncertainty(nh3_janaf, hf=[[1.0, 0.9, 0.9], [0.9, 1.0, -0.9], [0.9, -0.9, 1.0]])
    with pytest.raises(InputError, match="shape"):
        data_uncertainty(nh3_janaf, correlation=np.eye(4))
    with pytest.raises(InputError, match="'independent', 'source'"):
        data_uncertainty(nh3_janaf, s="sometimes")


def test_correlated_draws_have_the_asked_covariance(nh3_janaf):
    du = data_uncertainty(nh3_janaf)
    theta = du.draw(40_000, np.random.default_rng(3))
    active = du.u > 0
    emp = np.corrcoef(theta[:, active], rowvar=False)
    assert emp == pytest.approx(du.correlation[np.ix_(active, active)], abs=0.02)
    assert theta[:, active].std(axis=0) == pytest.approx(du.u[active], rel=0.02)


# --------------------------------------------------------------------------- ln K
def test_ln_K_derivatives_match_finite_differences_of_the_core(nh3_janaf):
    T = np.array([400.0, 700.0, 1000.0])
    J = ln_K_jacobian(nh3_janaf, T)
    du = data_uncertainty(nh3_janaf)
    ns = len(du.keys)
    for i, key in enumerate(du.keys):
        sp = get_species(key, data="janaf")
        for p, field_, h in ((i, "hf298", 10.0), (ns + i, "s298", 0.01)):
            up = sp.replace(**{field_: getattr(sp, field_) + h})
            dn = sp.replace(**{field_: getattr(sp, field_) - h})
            fd = (
                Reaction(AMMONIA, data="janaf", species=[up]).ln_K(T)
                - Reaction(AMMONIA, data="janaf", species=[dn]).ln_K(T)
            ) / (2 * h)
            assert J[p, :, 0] == pytest.approx(fd, rel=1e-7)
        c = 1e-3
        up = sp.replace(cp_model=_ScaledCp(sp.cp_model, c))
        dn = sp.replace(cp_model=_ScaledCp(sp.cp_model, -c))
        fd = (
            Reaction(AMMONIA, data="janaf", species=[up]).ln_K(T)
            - Reaction(AMMONIA, data="janaf", species=[dn]).ln_K(T)
        ) / (2 * c)
        assert J[2 * ns + i, :, 0] == pytest.approx(fd, rel=1e-7)


def test_ln_K_first_order_matches_monte_carlo():
    rxns = [
        Reaction("CH4 + H2O = CO + 3 H2", data="janaf"),
        Reaction("CO + H2O = CO2 + H2", data="janaf"),
    ]
    T = np.array([600.0, 900.0, 1200.0])
    lk = ln_K_uncertainty(rxns, T)
    s = sample_ln_K(rxns, T, 20_000, seed=11)
    assert s.shape == (20_000, 3, 2)
    # ln K is linear in the data: the sample mean and spread match the first order within
    # sampling error (1/sqrt(2N) = 0.5 % on a standard deviation)
    assert s.mean(axis=0) == pytest.approx(lk.ln_K, abs=0.05 * lk.std.max())
    assert s.std(axis=0) == pytest.approx(lk.std, rel=0.03)
    emp = np.array([np.cov(s[:, t, :], rowvar=False) for t in range(3)])
    assert emp == pytest.approx(lk.covariance, rel=0.06, abs=1e-4 * lk.std.max() ** 2)
    _, shares = lk.shares()
    assert shares.sum(axis=0) == pytest.approx(np.ones((3, 2)), abs=1e-12)


# --------------------------------------------------------------------------- Monte Carlo
def test_first_order_conversion_agrees_with_monte_carlo_for_small_uncertainties(nh3_janaf):
    T = np.array([650.0, 750.0, 850.0])[:, None]
    P = np.array([30e5, 200e5])[None, :]
    du = data_uncertainty(nh3_janaf).scaled(0.2)
    mc = monte_carlo_equilibrium(nh3_janaf, FEED, T, P, n_samples=8000, seed=5, data=du)
    fo = conversion_sensitivity(nh3_janaf, FEED, T, P, data=du)
    # sampling error of a standard deviation from 8000 samples: ~0.8 %
    assert mc.conversion.std == pytest.approx(fo.std, rel=0.04)
    assert mc.conversion.mean == pytest.approx(mc.nominal_conversion, abs=0.1 * fo.std.max())
    # the 2.5-97.5 % band is ±1.96 σ for a near-linear response
    width = mc.conversion.upper - mc.conversion.lower
    assert width == pytest.approx(2 * 1.96 * fo.std, rel=0.08)


def test_bands_shrink_with_the_uncertainties(nh3_janaf):
    du = data_uncertainty(nh3_janaf)
    widths = []
    for f in (1.0, 0.5, 0.1):
        mc = monte_carlo_equilibrium(
            nh3_janaf, FEED, 700.0, 100e5, n_samples=2000, seed=9, data=du.scaled(f)
        )
        widths.append(float(mc.conversion.upper - mc.conversion.lower))
    assert widths[0] > widths[1] > widths[2] > 0
    # common random numbers: the width scales nearly in proportion to the uncertainties
    assert widths[1] / widths[0] == pytest.approx(0.5, rel=0.05)
    assert widths[2] / widths[0] == pytest.approx(0.1, rel=0.05)


def test_percentile_bands_equal_numpy_percentiles_of_the_samples(nh3_janaf):
    T = np.array([600.0, 800.0])[:, None]
    P = np.array([10e5, 300e5])[None, :]
    mc = monte_carlo_equilibrium(
        nh3_janaf,
        FEED,
        T,
        P,
        n_samples=301,
        seed=2,
        percentiles=(2.5, 16.0, 50.0, 84.0, 97.5),
        keep_samples=True,
    )
    assert mc.conversion_samples is not None and mc.mole_fraction_samples is not None
    q = (2.5, 16.0, 50.0, 84.0, 97.5)
    ref_c = np.percentile(mc.conversion_samples, q, axis=0)
    ref_y = np.percentile(mc.mole_fraction_samples, q, axis=0)
    for a, p in enumerate(q):
        assert mc.conversion.percentiles[p] == pytest.approx(ref_c[a], rel=1e-13, abs=1e-15)
        for i, key in enumerate(mc.keys):
            assert mc.mole_fractions[key].percentiles[p] == pytest.approx(
                ref_y[a][..., i], rel=1e-13, abs=1e-15
            )
    assert mc.conversion.std == pytest.approx(mc.conversion_samples.std(axis=0, ddof=1), rel=1e-10)
    ysum = sum(mc.mole_fractions[k].mean for k in mc.keys)
    assert ysum == pytest.approx(np.ones((2, 2)), abs=1e-12)


def test_two_reactions_and_an_inert_run_vectorized():
    rxns = [
        Reaction("CH4 + H2O = CO + 3 H2", data="janaf"),
        Reaction("CO + H2O = CO2 + H2", data="janaf"),
    ]
    feed = {"CH4": 1.0, "H2O": 3.0, "N2": 0.5}  # invented feed, N2 inert
    T = np.array([800.0, 1000.0])[:, None]
    mc = monte_carlo_equilibrium(
        rxns, feed, T, np.array([1e5, 20e5])[None, :], n_samples=200, seed=4, keep_samples=True
    )
    assert mc.keys[-1] == "N2" and mc.conversion_of == "CH4"
    assert mc.conversion_samples.shape == (200, 2, 2)
    ref = np.percentile(mc.mole_fraction_samples, (2.5, 97.5), axis=0)
    assert mc.mole_fractions["CO"].lower == pytest.approx(
        ref[0][..., mc.keys.index("CO")], rel=1e-12
    )
    # reforming (Δn > 0) is favoured by low pressure (common practice, REFERENCES.md §4)
    assert np.all(mc.nominal_conversion[:, 0] > mc.nominal_conversion[:, 1])
    assert np.all(mc.conversion.std > 0)


def test_feed_sweep_text_equations_and_named_inerts(nh3_janaf):
    # invented feed sweep: H2:N2 = 2, 3, 4 with methane as inert, grid (feed, T, P)
    h2 = np.array([2.0, 3.0, 4.0])[:, None, None]
    T = np.linspace(650.0, 800.0, 4)[:, None]
    P = np.array([50e5, 150e5])
    mc = monte_carlo_equilibrium(
        AMMONIA,
        {"N2": 1.0, "H2": h2, "methane": 0.2},
        T,
        P,
        n_samples=100,
        seed=1,
        keep_samples=True,
    )
    assert mc.shape == (3, 4, 2) and mc.keys == ("N2", "H2", "NH3", "CH4")
    assert mc.conversion_samples.shape == (100, 3, 4, 2)
    # more hydrogen converts more of the nitrogen (Le Chatelier, common practice)
    assert np.all(np.diff(mc.nominal_conversion, axis=0) > 0)
    one = monte_carlo_equilibrium(
        AMMONIA, {"N2": 1.0, "H2": 3.0, "methane": 0.2}, T, P, n_samples=100, seed=1
    )
    assert one.conversion.mean == pytest.approx(mc.conversion.mean[1], rel=1e-9)
    assert mc.mole_fractions["CH4"].std.max() > 0
    assert len(mc.data.species) == 3  # the inert carries no data uncertainty


def test_seed_makes_runs_reproducible_whatever_the_chunking(nh3_janaf):
    T = np.linspace(650.0, 800.0, 4)[:, None]
    P = np.array([50e5, 150e5])[None, :]
    a = monte_carlo_equilibrium(nh3_janaf, FEED, T, P, n_samples=300, seed=42, keep_samples=True)
    b = monte_carlo_equilibrium(
        nh3_janaf, FEED, T, P, n_samples=300, seed=42, keep_samples=True, chunk_points=40
    )
    a2 = monte_carlo_equilibrium(nh3_janaf, FEED, T, P, n_samples=300, seed=42, keep_samples=True)
    c = monte_carlo_equilibrium(nh3_janaf, FEED, T, P, n_samples=300, seed=43)
    assert np.array_equal(a.conversion_samples, a2.conversion_samples)  # bit for bit
    # another chunking draws the same data (one generator stream); the solves then agree to
    # the equilibrium tolerance (|ln Q - ln K| <= 1e-10), not bit for bit
    assert b.conversion_samples == pytest.approx(a.conversion_samples, rel=1e-9)
    assert a.conversion.upper == pytest.approx(b.conversion.upper, rel=1e-9)
    assert not np.array_equal(a.conversion.upper, c.conversion.upper)
    z1 = sample_ln_K(nh3_janaf, T, 300, seed=42)
    assert np.array_equal(z1, sample_ln_K(nh3_janaf, T, 300, seed=42))
    g1, g2 = np.random.default_rng(7), np.random.default_rng(7)
    d = monte_carlo_equilibrium(nh3_janaf, FEED, T, P, n_samples=50, seed=g1)
    e = monte_carlo_equilibrium(nh3_janaf, FEED, T, P, n_samples=50, seed=g2)
    assert np.array_equal(d.conversion.mean, e.conversion.mean)
    assert a.seed == 42 and d.seed is None


def test_progress_and_clean_interruption(nh3_janaf, capsys, monkeypatch):
    T = np.linspace(650.0, 800.0, 10)[:, None]
    P = np.array([50e5, 150e5])[None, :]  # 20 points, chunk_points=100 -> 5 samples a chunk
    seen: list[tuple[int, int]] = []

    def stop_after_two(done: int, total: int) -> None:
        seen.append((done, total))
        if len(seen) == 2:
            raise KeyboardInterrupt

    with pytest.warns(RuntimeWarning, match="10 of 50 samples"):
        res = monte_carlo_equilibrium(
            nh3_janaf, FEED, T, P, n_samples=50, seed=1, chunk_points=100, progress=stop_after_two
        )
    assert seen == [(5, 50), (10, 50)]
    assert res.interrupted and res.n_samples == 10 and res.n_requested == 50
    full = monte_carlo_equilibrium(nh3_janaf, FEED, T, P, n_samples=10, seed=1, chunk_points=100)
    assert res.conversion.mean == pytest.approx(full.conversion.mean, rel=1e-12)
    seen.clear()
    with pytest.raises(MonteCarloInterrupted) as info:
        monte_carlo_equilibrium(
            nh3_janaf,
            FEED,
            T,
            P,
            n_samples=50,
            seed=1,
            chunk_points=100,
            progress=stop_after_two,
            on_interrupt="raise",
        )
    assert info.value.n_completed == 10 and info.value.result.n_samples == 10
    assert isinstance(info.value, KeyboardInterrupt)

    # Ctrl-C inside the first chunk (before any sample is complete) propagates as is
    import eqconv.extent_solver as es

    def interrupted_solver(*args, **kwargs):
        raise KeyboardInterrupt

    monkeypatch.setattr(es, "solve_extents", interrupted_solver)
    with pytest.raises(KeyboardInterrupt) as bare:
        monte_carlo_equilibrium(nh3_janaf, FEED, T, P, n_samples=5, seed=1, chunk_points=100)
    assert not isinstance(bare.value, MonteCarloInterrupted)
    # Ctrl-C inside the third chunk: the two finished chunks are returned, the third dropped
    monkeypatch.undo()
    real, calls = es.solve_extents, []

    def third_chunk_interrupted(*args, **kwargs):
        calls.append(1)
        if len(calls) == 3:
            raise KeyboardInterrupt
        return real(*args, **kwargs)

    monkeypatch.setattr(es, "solve_extents", third_chunk_interrupted)
    with pytest.warns(RuntimeWarning, match="10 of 50 samples"):
        mid = monte_carlo_equilibrium(nh3_janaf, FEED, T, P, n_samples=50, seed=1, chunk_points=100)
    assert mid.n_samples == 10 and mid.interrupted
    assert mid.conversion.mean == pytest.approx(full.conversion.mean, rel=1e-12)
    monkeypatch.undo()
    capsys.readouterr()
    monte_carlo_equilibrium(
        nh3_janaf, FEED, T, P, n_samples=10, seed=1, chunk_points=100, progress=True
    )
    err = capsys.readouterr().err
    assert "Monte Carlo: 5/10 samples" in err and "10/10 samples (100 %)" in err


def test_failed_solves_raise_instead_of_returning_numbers(nh3_janaf, monkeypatch):
    import eqconv.extent_solver as es

    real = es.solve_extents

    def flaky(*args, **kwargs):
        sol = real(*args, **kwargs)
        conv = sol.converged.copy()
        conv.flat[-1] = False
        return dataclasses.replace(sol, converged=conv)

    monkeypatch.setattr(es, "solve_extents", flaky)
    with pytest.raises(ConvergenceError, match=r"1 equilibrium solve\(s\) failed.*T = 800 K"):
        monte_carlo_equilibrium(
            nh3_janaf, FEED, np.array([700.0, 800.0]), 50e5, n_samples=10, seed=1
        )


def test_bad_monte_carlo_input(nh3_janaf):
    with pytest.raises(InputError, match="n_samples"):
        monte_carlo_equilibrium(nh3_janaf, FEED, 700.0, 1e6, n_samples=0)
    with pytest.raises(InputError, match="percentiles"):
        monte_carlo_equilibrium(nh3_janaf, FEED, 700.0, 1e6, percentiles=(2.5, 120.0))
    with pytest.raises(InputError, match="seed"):
        monte_carlo_equilibrium(nh3_janaf, FEED, 700.0, 1e6, seed="abc")  # type: ignore
    with pytest.raises(InputError, match="memory_limit"):
        monte_carlo_equilibrium(
            nh3_janaf, FEED, np.linspace(600, 900, 100), 1e6, n_samples=1000, memory_limit=1e6
        )
    with pytest.raises(InputError, match="positive feed"):
        monte_carlo_equilibrium(nh3_janaf, FEED, 700.0, 1e6, conversion_of="NH3")
    plain = monte_carlo_equilibrium(nh3_janaf, FEED, 700.0, 1e6, n_samples=20, percentiles=())
    assert plain.conversion_samples is None and plain.conversion.std > 0
    with pytest.raises(InputError, match="no percentiles"):
        _ = plain.conversion.lower
    with pytest.raises(InputError, match="on_interrupt"):
        monte_carlo_equilibrium(nh3_janaf, FEED, 700.0, 1e6, on_interrupt="ignore")  # type: ignore
    with pytest.raises(UnknownSpeciesError, match="unobtainium"):
        monte_carlo_equilibrium(nh3_janaf, {"N2": 1, "H2": 3, "unobtainium-42": 1}, 700.0, 1e6)


# --------------------------------------------------------------------------- sensitivities
def test_analytic_sensitivities_match_central_differences(nh3_janaf):
    T = np.array([600.0, 750.0, 900.0])[:, None]
    P = np.array([10e5, 100e5, 400e5])[None, :]
    a = conversion_sensitivity(nh3_janaf, FEED, T, P)
    c = conversion_sensitivity(nh3_janaf, FEED, T, P, method="central")
    assert a.method == "analytic" and c.method == "central"
    for p, label in enumerate(a.labels):  # each datum to 1e-4 of its own largest value
        scale = np.abs(a.coefficients[p]).max()
        assert scale > 0, label
        assert a.coefficients[p] == pytest.approx(c.coefficients[p], abs=1e-4 * scale), label


def test_sensitivity_against_independent_finite_differences(nh3_janaf):
    # rebuild the reaction with ΔfH°(NH3) ± h and re-solve: no use of the ln K Jacobian
    from eqconv.extent_solver import solve_extents

    T, P, h = 720.0, 150e5, 20.0
    nh3 = get_species("NH3", data="janaf")

    def conversion(species):
        rxn = Reaction(AMMONIA, data="janaf", species=[species])
        sol = solve_extents(
            rxn.nu[None, :], rxn.ln_K(T)[None], [1.0, 3.0, 0.0], np.log(P / P_BAR), tol=1e-13
        )
        return float(sol.extents[0])  # conversion of N2 = ξ / 1 mol

    fd = (
        conversion(nh3.replace(hf298=nh3.hf298 + h)) - conversion(nh3.replace(hf298=nh3.hf298 - h))
    ) / (2 * h)
    sens = conversion_sensitivity(nh3_janaf, FEED, T, P)
    assert float(sens.wrt_hf298()["NH3"]) == pytest.approx(fd, rel=1e-5)


def test_sensitivity_matches_the_closed_form_ammonia_conversion():
    # REFERENCES.md §3 (derived identity): ½N2 + 3/2 H2 = NH3 from a stoichiometric feed,
    # ideal gas: ε = 1 − (1 + 1.2990 K P/p°)^(−½), so dε/d ln K = a/2 (1 + a)^(−3/2) with
    # a = 1.2990 K P/p°, and d ln K/dΔfH°(NH3) = −1/(R T).
    rxn = Reaction("1/2 N2 + 3/2 H2 = NH3", data="janaf")
    T = np.array([500.0, 650.0, 800.0])
    P = 50e5
    sens = conversion_sensitivity(rxn, {"N2": 0.5, "H2": 1.5}, T, P)
    a = 3 * np.sqrt(3) / 4 * np.exp(rxn.ln_K(T)) * P / P_BAR
    assert sens.conversion == pytest.approx(1 - (1 + a) ** -0.5, rel=1e-10)
    expected = -0.5 * a * (1 + a) ** -1.5 / (R * T)
    assert sens.wrt_hf298()["NH3"] == pytest.approx(expected, rel=1e-8)


def test_ranking_of_the_dominant_datum(nh3_janaf):
    T = np.array([500.0, 900.0])
    sens = conversion_sensitivity(nh3_janaf, FEED, T, 100e5)
    _, shares = sens.shares()
    assert shares.sum(axis=0) == pytest.approx(np.ones(2), abs=1e-12)
    assert list(sens.dominant()) == ["ΔfH°(NH3)", "ΔfH°(NH3)"]
    top = sens.ranking((0,))
    assert top[0][0] == "ΔfH°(NH3)" and top[0][1] >= top[1][1] >= top[-1][1]
    # a poor heat-capacity fit (invented 5 % uncertainty, still one JANAF error for all
    # three species) dominates far from 298.15 K only, where the Cp integrals are large
    rough = [get_species(k, data="janaf").replace(u_cp_rel=0.05) for k in ("N2", "H2", "NH3")]
    rxn = Reaction(AMMONIA, data="janaf", species=rough)
    dom = conversion_sensitivity(rxn, FEED, np.array([320.0, 1200.0]), 100e5).dominant()
    assert dom[0] == "ΔfH°(NH3)"
    assert dom[1] == "Cp°[NIST-JANAF](N2, H2, NH3)"


# --------------------------------------------------------------------------- sources
def test_janaf_and_atct_ammonia_difference_from_their_own_data():
    chemicals_reaction = pytest.importorskip("chemicals.reaction")
    janaf = pytest.importorskip("janaf")
    # NIST-JANAF Thermochemical Tables, 4th ed. (1998), table H-083, via the janaf package
    df = janaf.Table("H-083").df
    hf_janaf = float(df.filter(df["T(K)"] == 298.15)["delta-f H"].to_numpy()[0]) * 1e3
    assert hf_janaf == pytest.approx(-45898.0, abs=0.5)  # printed to 0.001 kJ/mol
    # Active Thermochemical Tables value, as shipped by chemicals (method "ATCT_G")
    hf_atct = float(chemicals_reaction.Hfg("7664-41-7", method="ATCT_G"))
    # REFERENCES.md §1 reads −45.556 ± 0.029 kJ/mol; the ATcT version in chemicals differs
    # by 2 J/mol, inside that uncertainty
    assert hf_atct == pytest.approx(-45556.0, abs=29.0)

    nh3 = get_species("NH3", data="janaf")
    assert nh3.hf298 == hf_janaf
    # ATcT's own standard uncertainty, as shipped with the value by chemicals
    u_atct = float(chemicals_reaction.Hfg_ATcT_data.loc["7664-41-7", "uncertainty"])
    assert u_atct == pytest.approx(29.0, abs=2.0)  # REFERENCES.md §1: ± 0.029 kJ/mol
    atct = nh3.replace(hf298=hf_atct, u_hf298=u_atct, note="ATcT via chemicals")
    T = np.array([400.0, 500.0, 600.0, 750.0])
    cmp = compare_sources(
        "1/2 N2 + 3/2 H2 = NH3",
        {"N2": 1.0, "H2": 3.0},
        T,
        100e5,
        sources=["janaf", ("ATcT NH3", [atct], "janaf")],
        n_samples=200,
        seed=3,
    )
    ratio = np.exp(cmp.ln_K["ATcT NH3"][:, 0] - cmp.ln_K["janaf"][:, 0])
    # exact for a ΔfH° shift of one product: K_ATcT/K_JANAF = exp(−ΔΔfH°/(R T))
    assert ratio == pytest.approx(np.exp(-(hf_atct - hf_janaf) / (R * T)), rel=1e-12)
    # REFERENCES.md §1: "moves K of ammonia synthesis by about 5–9 % between 400 and 750 K"
    # (the sources' own data give 9.7 % at 400 K and 5.3 % at 750 K)
    change = 1.0 - ratio
    assert change[0] == pytest.approx(0.09, abs=0.01)
    assert change[-1] == pytest.approx(0.05, abs=0.01)
    assert np.all(np.diff(change) < 0)
    # the whole default data set (ΔfH° from ATcT) against the whole JANAF set: the NH3
    # ΔfH° is almost all of the difference
    full = compare_sources(
        "1/2 N2 + 3/2 H2 = NH3",
        {"N2": 1.0, "H2": 3.0},
        T,
        100e5,
        sources=["janaf", "default"],
        n_samples=100,
        seed=3,
    )
    full_ratio = np.exp(full.ln_K["default"][:, 0] - full.ln_K["janaf"][:, 0])
    assert full_ratio == pytest.approx(ratio, rel=0.01)
    rows = cmp.rows()
    assert [r["source"] for r in rows] == ["janaf"] * 4 + ["ATcT NH3"] * 4
    # a less stable NH3 (ATcT) lowers the equilibrium conversion at every T
    assert all(r["X - X_ref"] < 0 for r in rows[4:])
    assert rows[4]["K/K_ref (1/2 N2 + 3/2 H2 = NH3)"] == pytest.approx(ratio[0], rel=1e-12)


def test_comparison_table_and_plot():
    pd = pytest.importorskip("pandas")
    mpl = pytest.importorskip("matplotlib")
    mpl.use("Agg")
    import matplotlib.pyplot as plt

    cmp = compare_sources(
        AMMONIA, FEED, np.linspace(600.0, 800.0, 5), [50e5, 200e5], n_samples=100, seed=1
    )
    df = cmp.table()
    assert isinstance(df, pd.DataFrame)
    assert len(df) == 2 * 5 * 2
    for col in (
        "source",
        "T [K]",
        "P [Pa]",
        "X nominal",
        "X mean",
        "u(X)",
        "X p2.5",
        "X p97.5",
        "(X - X_ref)/u",
    ):
        assert col in df.columns
    assert (df["X p2.5"] <= df["X p97.5"]).all()
    assert {r["species"] for r in cmp.data_rows()} == {"N2", "H2", "NH3"}
    fig, ax = plt.subplots()
    out = cmp.plot(ax=ax, P=200e5)
    assert out is ax
    assert len(ax.lines) == 2 and len(ax.collections) == 2
    assert "200 bar" in ax.get_title()
    assert ax.lines[0].get_ydata() == pytest.approx(cmp.results["default"].nominal_conversion[:, 1])
    plt.close(fig)
    with pytest.raises(InputError, match="twice"):
        compare_sources(AMMONIA, FEED, [700.0], 1e6, sources=["janaf", "janaf"], n_samples=5)


def test_ln_K_band_and_warnings_are_quiet(nh3_janaf):
    lk = ln_K_uncertainty(nh3_janaf, np.array([500.0, 700.0]))
    lo, hi = lk.band(0.95)
    assert hi - lo == pytest.approx(2 * 1.959964 * lk.std, rel=1e-6)
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        monte_carlo_equilibrium(nh3_janaf, FEED, 700.0, 1e6, n_samples=20, seed=1)
