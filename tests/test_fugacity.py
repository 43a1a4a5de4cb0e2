"""Tests of the fugacity-corrected equilibrium (eqconv.fugacity through eqconv.equilibrium)
and of the gas-phase (condensation) check run after every solve.

External checks: fugacity coefficients at the converged state against ``thermo``'s own
mixture equations of state (``thermo.eos_mix.PRMIX`` / ``SRKMIX``, a reference library),
with the same critical constants and k_ij; Le Chatelier's principle and the ideal-gas limit
at low pressure (facts of the trade, REFERENCES.md §4: fugacity corrections matter above
roughly 50-100 bar); methanol and water condensing from a synthesis gas at low T and high P
(common practice, the issue's usual cases), with vapour pressures from ``thermo`` (DIPPR
101, Perry's 8th ed.).

Self-consistency: convergence at every point of grids up to 1000 bar, with the residual
recomputed here from the final composition and φ evaluated there; k_ij overrides change the
answer and are reported; missing pairs are named in a warning; the data report carries the
gas-model notes.
"""

from __future__ import annotations

import warnings

import numpy as np
import pytest
from thermo.eos_mix import PRMIX, SRKMIX

from eqconv import (
    DataWarning,
    InputError,
    MissingDataError,
    PhaseWarning,
    Reaction,
    equilibrium,
    user_species,
)
from eqconv.constants import P_BAR
from eqconv.eos import ln_phi_mixture

NH3 = "1/2 N2 + 3/2 H2 = NH3"
FEED = {"N2": 0.2375, "H2": 0.7125, "Ar": 0.05}  # invented loop gas, 5 % Ar
METHANOL = ["CO + 2 H2 = CH3OH", "CO2 + 3 H2 = CH3OH + H2O"]
# the pairs missing from the database, set explicitly to 0 (silences the warning)
NO_H2_NH3 = {("H2", "NH3"): 0.0}
NO_MISSING_LOOP = {("H2", "NH3"): 0.0, ("H2", "Ar"): 0.0}


@pytest.fixture(scope="module")
def nh3() -> Reaction:
    return Reaction(NH3)


def _quiet(**kw: object) -> dict[str, object]:
    return {"check_phase": False, **kw}


# ---------------------------------------------------------------------------- convergence
@pytest.mark.parametrize("gas", ["peng-robinson", "srk"])
def test_ammonia_converges_everywhere_up_to_1000_bar(nh3: Reaction, gas: str) -> None:
    T = np.linspace(600.0, 900.0, 31)[:, None]
    P = np.geomspace(1e5, 1000e5, 40)[None, :]
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", DataWarning)
        res = equilibrium(nh3, FEED, T, P, gas=gas, check_phase=False)
    assert res.converged.all()
    assert res.outer_iterations is not None and res.outer_iterations.max() <= 12
    # residual recomputed here, with φ evaluated at the final composition
    rep = res.gas_model_report
    assert rep is not None
    keys = list(rep.keys)
    y = np.stack([res.mole_fractions[k] for k in keys], axis=-1)
    kij = np.array([[0.0 if a == b else rep.kij(a, b) for b in keys] for a in keys])
    lnphi = ln_phi_mixture(T, P, y, rep.Tc, rep.Pc, rep.omega, kij, kind=gas).ln_phi  # type: ignore[arg-type]
    nu = {"N2": -0.5, "H2": -1.5, "NH3": 1.0}
    r = -nh3.ln_K(T)
    for k, v in nu.items():
        i = keys.index(k)
        r = r + v * (np.log(y[..., i]) + lnphi[..., i] + np.log(P / P_BAR))
    assert np.abs(r).max() <= 1e-10
    np.testing.assert_allclose(res.residuals[..., 0], r, rtol=0, atol=1e-12)
    np.testing.assert_allclose(
        np.log(res.fugacity_coefficients["NH3"]),
        lnphi[..., keys.index("NH3")],
        rtol=1e-10,
        atol=1e-15,
    )


def test_two_reactions_converge_with_fugacity_coefficients() -> None:
    # methanol synthesis, invented make-up gas, 500-600 K x 50-300 bar (gas stays gas)
    T = np.linspace(500.0, 600.0, 11)[:, None]
    P = np.linspace(50e5, 300e5, 11)[None, :]
    feed = {"CO": 0.2, "CO2": 0.08, "H2": 0.67, "CH4": 0.05}
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", DataWarning)
        warnings.simplefilter("ignore", PhaseWarning)
        res = equilibrium(METHANOL, feed, T, P, gas="peng-robinson")
        ideal = equilibrium(METHANOL, feed, T, P, check_phase=False)
    assert res.converged.all()
    assert np.abs(res.residuals).max() <= 1e-10
    assert res.element_balance_error.max() <= 1e-12
    # at 300 bar the non-ideal gas gives more methanol (φ_CH3OH < 1), as for ammonia
    assert np.all(res.mole_fractions["CH3OH"][:, -1] > ideal.mole_fractions["CH3OH"][:, -1])


# ---------------------------------------------------------------------------- vs thermo
@pytest.mark.parametrize(("gas", "cls"), [("peng-robinson", PRMIX), ("srk", SRKMIX)])
def test_final_phi_matches_thermo_mixture_eos(nh3: Reaction, gas: str, cls: type) -> None:
    # thermo.eos_mix (reference library) at the converged state, same Tc, Pc, omega, k_ij
    T = np.array([650.0, 750.0, 850.0])
    P = np.array([50e5, 300e5, 800e5])
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", DataWarning)
        res = equilibrium(nh3, FEED, T, P, gas=gas, check_phase=False)
    rep = res.gas_model_report
    assert rep is not None
    keys = list(rep.keys)
    kij = [[0.0 if a == b else rep.kij(a, b) for b in keys] for a in keys]
    for i in range(3):
        zs = [float(res.mole_fractions[k][i]) for k in keys]
        eos = cls(
            Tcs=list(rep.Tc),
            Pcs=list(rep.Pc),
            omegas=list(rep.omega),
            zs=zs,
            kijs=kij,
            T=float(T[i]),
            P=float(P[i]),
        )
        # thermo labels a single hot, dense root "liquid" (REFERENCES.md §5): take it then
        ref = np.array(eos.lnphis_g if hasattr(eos, "lnphis_g") else eos.lnphis_l)
        ours = np.log([float(res.fugacity_coefficients[k][i]) for k in keys])
        np.testing.assert_allclose(ours, ref, rtol=1e-9, atol=1e-13)


# ---------------------------------------------------------------------------- physics
def test_ideal_limit_at_low_pressure(nh3: Reaction) -> None:
    T = np.linspace(450.0, 900.0, 10)
    out = {}
    for P in (1e3, 2e3):
        ideal = equilibrium(nh3, FEED, T, P, check_phase=False)
        pr = equilibrium(
            nh3, FEED, T, P, gas="peng-robinson", kij=NO_MISSING_LOOP, check_phase=False
        )
        out[P] = pr.mole_fractions["NH3"] / ideal.mole_fractions["NH3"] - 1.0
        np.testing.assert_allclose(pr.mole_fractions["NH3"], ideal.mole_fractions["NH3"], rtol=1e-4)
    # ln φ ∝ P at low pressure (second virial coefficient): the deviation doubles with P
    # (to first order; at 450 K the conversion is near complete and the response curves)
    np.testing.assert_allclose(out[2e3] / out[1e3], 2.0, rtol=5e-3)


def test_le_chatelier_with_fugacity_coefficients(nh3: Reaction) -> None:
    T = np.linspace(600.0, 900.0, 16)[:, None]
    P = np.geomspace(10e5, 1000e5, 16)[None, :]
    res = equilibrium(nh3, FEED, T, P, gas="peng-robinson", kij=NO_MISSING_LOOP, check_phase=False)
    y = res.mole_fractions["NH3"]
    assert np.all(np.diff(y, axis=1) > 0.0)  # Δn < 0: favoured by pressure
    assert np.all(np.diff(y, axis=0) < 0.0)  # exothermic: disfavoured by temperature
    # more inert lowers the ammonia made (Δn < 0)
    diluted = equilibrium(
        nh3, {**FEED, "Ar": 0.5}, T, P, gas="peng-robinson", kij=NO_MISSING_LOOP, check_phase=False
    )
    assert np.all(diluted.conversion("N2") < res.conversion("N2"))


def test_fugacity_raises_ammonia_at_high_pressure(nh3: Reaction) -> None:
    # REFERENCES.md §2: the measured NH3 exceeds the ideal-gas value at 300-1000 atm
    ideal = equilibrium(nh3, {"N2": 1, "H2": 3}, 700.0, [300e5, 1000e5], check_phase=False)
    pr = equilibrium(
        nh3,
        {"N2": 1, "H2": 3},
        700.0,
        [300e5, 1000e5],
        gas="peng-robinson",
        kij=NO_H2_NH3,
        check_phase=False,
    )
    assert np.all(pr.mole_fractions["NH3"] > ideal.mole_fractions["NH3"] * 1.05)


# ---------------------------------------------------------------------------- data, report
def test_missing_pair_is_named_in_a_warning_and_the_report(nh3: Reaction) -> None:
    with pytest.warns(DataWarning, match=r"H2–NH3.*not in thermo's interaction-parameter"):
        res = equilibrium(
            nh3, {"N2": 1, "H2": 3}, 700.0, 200e5, gas="peng-robinson", check_phase=False
        )
    rep = res.gas_model_report
    assert rep is not None and ("H2", "NH3") in rep.missing_pairs
    text = res.data_report().to_text()
    assert "H2–NH3: k_ij = +0.0000 [MISSING]" in text
    assert "N2–H2: k_ij = +0.0711 [database]" in text  # thermo's PR table value
    assert "quantum gas" in text


def test_kij_override_changes_the_answer_and_is_reported(nh3: Reaction) -> None:
    base = equilibrium(
        nh3, {"N2": 1, "H2": 3}, 700.0, 500e5, gas="peng-robinson", kij=NO_H2_NH3, check_phase=False
    )
    with warnings.catch_warnings():
        warnings.simplefilter("error", DataWarning)  # no missing pair left: no warning
        alt = equilibrium(
            nh3,
            {"N2": 1, "H2": 3},
            700.0,
            500e5,
            gas="peng-robinson",
            kij={("NH3", "H2"): 0.2},
            check_phase=False,
        )
    assert float(alt.mole_fractions["NH3"]) != pytest.approx(
        float(base.mole_fractions["NH3"]), rel=1e-3
    )
    rep = alt.gas_model_report
    assert rep is not None and rep.kij("H2", "NH3") == 0.2 and not rep.missing_pairs
    assert "H2–NH3: k_ij = +0.2000 [user override]" in "\n".join(rep.lines())
    # an override of a database pair says what it replaced
    alt2 = equilibrium(
        nh3,
        {"N2": 1, "H2": 3},
        700.0,
        500e5,
        gas="peng-robinson",
        kij={("N2", "H2"): 0.0, ("H2", "NH3"): 0.0},
        check_phase=False,
    )
    pair = [p for p in alt2.gas_model_report.interactions.pairs if p.source == "override"]  # type: ignore[union-attr]
    assert any("replaces database value +0.0711" in p.detail for p in pair)


def test_srk_has_no_database_table_and_says_so(nh3: Reaction) -> None:
    with pytest.warns(DataWarning, match="has no srk table"):
        res = equilibrium(nh3, {"N2": 1, "H2": 3}, 700.0, 200e5, gas="srk", check_phase=False)
    assert res.gas_model_report is not None
    assert len(res.gas_model_report.missing_pairs) == 3


def test_critical_override_and_user_species_without_cas(nh3: Reaction) -> None:
    # effective H2 constants (invented round values) change the answer and are reported
    base = equilibrium(
        nh3, {"N2": 1, "H2": 3}, 700.0, 500e5, gas="peng-robinson", kij=NO_H2_NH3, check_phase=False
    )
    alt = equilibrium(
        nh3,
        {"N2": 1, "H2": 3},
        700.0,
        500e5,
        gas="peng-robinson",
        kij=NO_H2_NH3,
        critical={"H2": (43.6, 2.05e6, 0.0)},
        check_phase=False,
    )
    assert float(alt.mole_fractions["NH3"]) != pytest.approx(
        float(base.mole_fractions["NH3"]), rel=1e-4
    )
    assert "user override" in str(alt.gas_model_report)
    # a user species without a CAS number needs constants (JANAF formation data of NH3,
    # REFERENCES.md §1, with a constant Cp: an invented simplification)
    nh3u = user_species(
        key="NH3u",
        formula="H3N",
        phase="g",
        hf298=-45898.0,
        s298=192.774,
        cp={"kind": "constant", "value": 35.652},
        source="test datum",
    )
    rxn = Reaction("1/2 N2 + 3/2 H2 = NH3u", species=[nh3u])
    with pytest.raises(MissingDataError, match="NH3u"):
        equilibrium(
            rxn, {"N2": 1.0, "H2": 3.0}, 700.0, 100e5, gas="peng-robinson", check_phase=False
        )
    with pytest.warns(DataWarning, match="NH3u"):  # its k_ij are unknown: named
        res = equilibrium(
            rxn,
            {"N2": 1.0, "H2": 3.0},
            700.0,
            100e5,
            gas="peng-robinson",
            critical={"NH3u": (405.56, 1.13634e7, 0.256)},
            check_phase=False,
        )
    assert bool(res.converged)
    # same constants and k_ij = 0 for its pairs: the result of NH3 with those k_ij set to 0
    ref = equilibrium(
        Reaction(NH3, data="default"),
        {"N2": 1.0, "H2": 3.0},
        700.0,
        100e5,
        gas="peng-robinson",
        check_phase=False,
        kij={("H2", "NH3"): 0.0, ("N2", "NH3"): 0.0},
    )
    phi_u = float(res.fugacity_coefficients["NH3u"])
    assert phi_u == pytest.approx(float(ref.fugacity_coefficients["NH3"]), rel=1e-2)


@pytest.mark.parametrize(
    ("kwargs", "match"),
    [
        ({"kij": {("H2", "O2"): 0.1}}, "not in the list|not in the gas"),
        ({"kij": {("H2", "NH3"): 1.5}}, r"\(-1, 1\)"),
        ({"critical": {"H2": (-1.0, 1e6, 0.0)}}, "Tc > 0"),
        ({"critical": {"CO": (100.0, 1e6, 0.0)}}, "not a gas species"),
        ({"max_outer": 0}, "max_outer"),
    ],
)
def test_bad_gas_model_input(nh3: Reaction, kwargs: dict, match: str) -> None:
    with pytest.raises(InputError, match=match), warnings.catch_warnings():
        warnings.simplefilter("ignore", DataWarning)
        equilibrium(nh3, {"N2": 1, "H2": 3}, 700.0, 100e5, gas="peng-robinson", **kwargs)


def test_condensed_carbon_with_a_fugacity_model() -> None:
    # reformer gas at 30 bar with graphite allowed: presence decided with φ included
    rx = ["CH4 + H2O = CO + 3 H2", "CO + H2O = CO2 + H2", "2 CO = C(s) + CO2"]
    T = np.linspace(800.0, 1200.0, 9)[:, None]
    feed = {"CH4": 1.0, "H2O": np.array([0.3, 0.6, 1.5])[None, :]}
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", DataWarning)
        res = equilibrium(rx, feed, T, 30e5, gas="peng-robinson", check_phase=False)
    assert res.converged.all()
    pres = res.present("C(s)")
    assert 0 < pres.sum() < pres.size
    assert np.abs(res.residuals[pres]).max() <= 1e-10  # carbon present: Boudouard too
    assert np.all(res.residuals[..., 2][~pres] > 0.0)  # absent: Q > K, it would not form
    assert np.all(res.condensed_ln_activity["C(s)"][~pres] < 0.0)
    assert "C(s)" not in res.fugacity_coefficients  # not in the EOS mixture


def test_liquid_like_root_warns_per_point() -> None:
    # ammonia at 350-380 K and 100-300 bar: nearly pure NH3 below its Tc (405.6 K)
    T = np.array([350.0, 380.0, 600.0])
    with pytest.warns(PhaseWarning, match="liquid-like root"):
        res = equilibrium(
            NH3, {"N2": 1, "H2": 3}, T, 300e5, gas="peng-robinson", kij=NO_H2_NH3, check_phase=False
        )
    assert res.eos_flags["liquid_like"].tolist() == [True, True, False]


# ---------------------------------------------------------------------------- staying gas
def test_methanol_condensing_is_flagged() -> None:
    # invented methanol converter gas at 450 K and 100 bar: methanol above its vapour
    # pressure (Raoult's-law estimate) → one PhaseWarning summarising the points
    T = np.array([450.0, 600.0])
    with pytest.warns(PhaseWarning, match=r"gas-phase assumption fails at 1 of 2.*CH3OH"):
        res = equilibrium(METHANOL, {"CO": 0.25, "CO2": 0.05, "H2": 0.7}, T, 100e5)
    chk = res.gas_phase_check()
    assert chk.condenses.tolist() == [True, False]
    # the dew index recomputed here from thermo's DIPPR vapour pressures
    from thermo import VaporPressure

    dew = 0.0
    for k, cas in (("CH3OH", "67-56-1"), ("H2O", "7732-18-5")):
        vp = VaporPressure(CASRN=cas)
        dew += float(res.mole_fractions[k][0]) * 100e5 / vp.calculate(450.0, "DIPPR_PERRY_8E")
    assert float(chk.dew_index[0]) == pytest.approx(dew, rel=1e-9)


def test_water_condensing_in_a_shift_reactor_is_flagged_and_can_be_skipped() -> None:
    # low-temperature shift, invented wet gas at 400 K and 30 bar: p_H2O ≫ p_sat (2.4 bar)
    rx = "CO + H2O = CO2 + H2"
    feed = {"CO": 0.1, "H2O": 0.5, "H2": 0.4}
    with pytest.warns(PhaseWarning, match="H2O"):
        equilibrium(rx, feed, 400.0, 30e5)
    with warnings.catch_warnings():
        warnings.simplefilter("error", PhaseWarning)
        res = equilibrium(rx, feed, 400.0, 30e5, check_phase=False)
    assert res.gas_check is None
    assert bool(res.gas_phase_check().condenses)  # computed on request


def test_hot_gas_passes_the_check(nh3: Reaction) -> None:
    with warnings.catch_warnings():
        warnings.simplefilter("error", PhaseWarning)
        res = equilibrium(nh3, FEED, np.linspace(600.0, 900.0, 5), 200e5)
    assert res.gas_check is not None and not res.gas_check.condenses.any()
