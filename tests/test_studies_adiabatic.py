"""Adiabatic lines, adiabatic equilibrium outlets and intercooled bed staging.

All plants and feeds here are invented. The external check is a hand calculation of the
adiabatic temperature rise of SO2 oxidation from the NIST-JANAF tables, independent of the
library's heat-capacity models.
"""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pytest

from eqconv import InputError, Reaction, get_species
from eqconv.studies import (
    StagingResult,
    UnreachableTargetError,
    adiabatic_equilibrium,
    adiabatic_line,
    adiabatic_rise,
    equilibrium_conversion,
    mixture_enthalpy,
    stage_beds,
)

# Invented SO2 converter feed (sulfur-burner gas of an invented plant), mol per mol of feed.
SO2_FEED = {"SO2": 0.10, "O2": 0.11, "N2": 0.79}
# Invented ammonia converter feed: 3:1 H2:N2 with 4 % argon.
NH3_FEED = {"N2": 0.24, "H2": 0.72, "Ar": 0.04}

# NIST-JANAF Thermochemical Tables, 4th ed. (M. W. Chase, 1998), ideal gas at 1 bar, as
# printed: ΔfH°(298.15 K) and H − H(298.15 K) at 600 ... 1000 K, all in kJ/mol.
# Tables O-034 (SO2), O-058 (SO3), O-029 (O2), N-023 (N2). Copied into the test so that the
# hand calculation below uses nothing but the printed table; test_table_copy_matches_janaf
# checks the copy against the `janaf` package.
JANAF_T = np.array([600.0, 700.0, 800.0, 900.0, 1000.0])
JANAF_H_MINUS_H298 = {
    "SO2": np.array([13.544, 18.548, 23.721, 29.023, 34.428]),
    "SO3": np.array([18.107, 24.997, 32.160, 39.531, 47.060]),
    "O2": np.array([9.244, 12.499, 15.835, 19.241, 22.703]),
    "N2": np.array([8.894, 11.937, 15.046, 18.223, 21.463]),
}
JANAF_DFH298 = {"SO2": -296.842, "SO3": -395.765, "O2": 0.0, "N2": 0.0}
JANAF_INDEX = {"SO2": "O-034", "SO3": "O-058", "O2": "O-029", "N2": "N-023"}


def _so2(data: str = "janaf") -> Reaction:
    return Reaction("SO2 + 1/2 O2 = SO3", data=data)


def _hand_amounts(X: float) -> dict[str, float]:
    """Amounts after converting a fraction X of the SO2 by SO2 + ½O2 = SO3 [mol]."""
    return {"SO2": 0.10 * (1 - X), "O2": 0.11 - 0.05 * X, "SO3": 0.10 * X, "N2": 0.79}


def _hand_H(n: dict[str, float], T: float) -> float:
    """Σ n (ΔfH° + [H − H298]) [kJ], H − H298 interpolated *linearly* between table rows."""
    return sum(
        a * (JANAF_DFH298[s] + np.interp(T, JANAF_T, JANAF_H_MINUS_H298[s])) for s, a in n.items()
    )


def test_table_copy_matches_janaf() -> None:
    janaf = pytest.importorskip("janaf")
    for s, index in JANAF_INDEX.items():
        df = janaf.Table(index).df
        T = np.asarray(df["T(K)"], dtype=float)
        H = np.asarray(df["H-H(Tr)"], dtype=float)
        dfh = np.asarray(df["delta-f H"], dtype=float)
        for t, h in zip(JANAF_T, JANAF_H_MINUS_H298[s], strict=True):
            assert H[T == t][0] == pytest.approx(h, abs=5e-4)
        assert dfh[T == 298.15][0] == pytest.approx(JANAF_DFH298[s], abs=5e-4)


def test_adiabatic_rise_hand_calculation_at_table_node() -> None:
    # Hand calculation, NIST-JANAF tables (1998): at which conversion does the invented feed,
    # entering at 700 K, leave at exactly 800 K? Both temperatures are table rows, so no
    # interpolation is needed: H_out(800 K, X) = H_in(700 K) is linear in X.
    H_in = _hand_H({"SO2": 0.10, "O2": 0.11, "N2": 0.79}, 700.0)
    h0, h1 = _hand_H(_hand_amounts(0.0), 800.0), _hand_H(_hand_amounts(1.0), 800.0)
    X_hand = (H_in - h0) / (h1 - h0)
    assert 0.3 < X_hand < 0.4  # a rise of 100 K takes about a third of the SO2
    # Tolerance from the printed precision: each H is printed to 0.001 kJ/mol, so the
    # balance is known to about ±1 J per mol of feed, i.e. ±0.03 K at Cp ≈ 33 J/(K mol).
    # The library's JANAF species interpolate the same table exactly at its rows.
    T = adiabatic_line(_so2("janaf"), SO2_FEED, 700.0, X_hand)
    assert float(T) == pytest.approx(800.0, abs=0.05)
    # The default data set (other Cp fits) must agree within the spread of data sources,
    # ±0.5 K here (a difference of about 15 J per mol of feed in enthalpy).
    T_def = adiabatic_line(_so2("default"), SO2_FEED, 700.0, X_hand)
    assert float(T_def) == pytest.approx(800.0, abs=0.5)


def test_adiabatic_rise_hand_calculation_between_rows() -> None:
    # Hand calculation, NIST-JANAF tables (1998): adiabatic outlet at 50 % SO2 conversion,
    # inlet 700 K, solving H_out(T) = H_in with H − H298 interpolated linearly between the
    # 100 K rows (the outlet falls between 800 and 900 K).
    H_in = _hand_H({"SO2": 0.10, "O2": 0.11, "N2": 0.79}, 700.0)
    n = _hand_amounts(0.5)
    g800, g900 = _hand_H(n, 800.0) - H_in, _hand_H(n, 900.0) - H_in
    assert g800 < 0.0 < g900
    T_hand = 800.0 + 100.0 * (-g800) / (g900 - g800)
    # Tolerance: linear interpolation overstates H between rows by at most
    # (dCp/dT)·(100 K)²/8 ≈ 0.0072 J/(mol K²) · 1e4 K² / 8 ≈ 9 J per mol of feed for this
    # outlet mixture, i.e. ≤ 0.27 K at Cp ≈ 33.7 J/K; plus ±0.03 K print precision -> 0.5 K.
    rise = adiabatic_rise(_so2("janaf"), SO2_FEED, 700.0, 0.5)
    assert float(rise) == pytest.approx(T_hand - 700.0, abs=0.5)
    rise_def = adiabatic_rise(_so2("default"), SO2_FEED, 700.0, 0.5)
    assert float(rise_def) == pytest.approx(T_hand - 700.0, abs=0.5)


def test_adiabatic_line_is_an_energy_balance() -> None:
    rxn = _so2()
    X = np.linspace(0.0, 1.0, 11)
    T = adiabatic_line(rxn, SO2_FEED, 700.0, X)
    sp = (*rxn.species, get_species("N2", data="janaf"))
    keys = [s.key for s in sp]
    n_in = np.array([SO2_FEED.get(k, 0.0) for k in keys])
    n = np.array([[_hand_amounts(x).get(k, 0.0) for k in keys] for x in X])
    H_in = mixture_enthalpy(sp, n_in, 700.0)
    assert np.allclose(mixture_enthalpy(sp, n, T), H_in, rtol=0, atol=1e-6)
    assert T[0] == pytest.approx(700.0, abs=1e-9)
    assert np.all(np.diff(T) > 0)  # exothermic: T rises along the line


def test_adiabatic_line_vectorized_and_basis() -> None:
    rxn = _so2()
    T_in = np.array([650.0, 700.0])[:, None]
    X = np.array([0.2, 0.6])[None, :]
    T = adiabatic_line(rxn, SO2_FEED, T_in, X)
    assert T.shape == (2, 2)
    # a bed that starts at 40 % cumulative conversion: its line in cumulative conversion
    inlet = {"SO2": 0.06, "O2": 0.09, "SO3": 0.04, "N2": 0.79}
    T2 = adiabatic_line(rxn, inlet, 700.0, [0.4, 0.6], basis=SO2_FEED)
    assert T2[0] == pytest.approx(700.0, abs=1e-9)
    T_direct = adiabatic_line(rxn, inlet, 700.0, 0.2 / 0.6)  # same state, own basis
    assert T2[1] == pytest.approx(float(T_direct), abs=1e-9)


def test_adiabatic_line_rejects_impossible_conversion() -> None:
    with pytest.raises(InputError, match="conversion"):
        adiabatic_line(_so2(), {"SO2": 0.1, "O2": 0.01, "N2": 0.89}, 700.0, 0.5)
    with pytest.raises(InputError, match="reactant"):
        adiabatic_line(_so2(), SO2_FEED, 700.0, 0.5, key="SO3")
    with pytest.raises(InputError):
        adiabatic_line(_so2(), SO2_FEED, -5.0, 0.5)


# ---------------------------------------------------------------- adiabatic equilibrium


def _atoms(keys: tuple[str, ...]) -> np.ndarray:
    sp = [get_species(k, data="janaf") for k in keys]
    elements = sorted({e for s in sp for e in s.atoms})
    return np.array([[s.atoms.get(e, 0) for e in elements] for s in sp], dtype=float)


def test_adiabatic_equilibrium_is_where_line_meets_curve() -> None:
    rxn = _so2()
    res = adiabatic_equilibrium(rxn, SO2_FEED, 700.0, 1.2e5)
    T_out, X_out = float(res.T_out), float(res.conversion)
    # the outlet lies on the adiabatic line ...
    assert float(adiabatic_line(rxn, SO2_FEED, 700.0, X_out)) == pytest.approx(T_out, abs=1e-5)
    # ... and on the equilibrium curve
    assert float(equilibrium_conversion(rxn, SO2_FEED, T_out, 1.2e5)) == pytest.approx(
        X_out, abs=1e-9
    )
    # brute force on a dense grid: the line minus the curve changes sign in one 0.25 K cell
    T = np.arange(700.0, 1000.0, 0.25)
    X_eq = equilibrium_conversion(rxn, SO2_FEED, T, 1.2e5)
    gap = adiabatic_line(rxn, SO2_FEED, 700.0, X_eq) - T
    k = np.flatnonzero(np.sign(gap[:-1]) != np.sign(gap[1:]))
    assert k.size == 1 and T[k[0]] <= T_out <= T[k[0] + 1]


def test_adiabatic_equilibrium_vectorized_equals_scalar() -> None:
    rxn = _so2()
    T_in = np.array([650.0, 700.0, 750.0])
    P = np.array([1e5, 5e5])[:, None]
    res = adiabatic_equilibrium(rxn, SO2_FEED, T_in, P)
    assert res.T_out.shape == (2, 3)
    one = adiabatic_equilibrium(rxn, SO2_FEED, 700.0, 5e5)
    assert res.T_out[1, 1] == pytest.approx(float(one.T_out), abs=2e-6)
    # Le Chatelier (REFERENCES.md §4): Δn < 0, so pressure raises the outlet conversion
    assert np.all(res.conversion[1] > res.conversion[0])
    assert sum(res.mole_fractions.values()) == pytest.approx(np.ones((2, 3)), abs=1e-14)


def test_approach_temperature_lowers_conversion() -> None:
    rxn = _so2()
    base = adiabatic_equilibrium(rxn, SO2_FEED, 700.0, 1.2e5)
    app = adiabatic_equilibrium(rxn, SO2_FEED, 700.0, 1.2e5, approach_T=20.0)
    assert float(app.conversion) < float(base.conversion)
    assert float(app.T_out) < float(base.T_out)
    X_curve = equilibrium_conversion(rxn, SO2_FEED, float(app.T_out) + 20.0, 1.2e5)
    assert float(app.conversion) == pytest.approx(float(X_curve), abs=1e-9)


# ---------------------------------------------------------------- staging


@pytest.fixture(scope="module")
def so2_four_beds() -> StagingResult:
    return stage_beds(_so2(), SO2_FEED, [690.0, 700.0, 700.0, 710.0], 1.2e5, n_beds=4)


def test_staging_energy_and_element_balance_per_bed(so2_four_beds: StagingResult) -> None:
    res = so2_four_beds
    assert res.n_beds == 4
    sp = [get_species(k, data="janaf") for k in res.species]
    A = _atoms(res.species)
    for k in range(res.n_beds):
        # element balance of every bed (REFERENCES-free, exact conservation)
        e_in, e_out = res.amounts_in[k] @ A, res.amounts_out[k] @ A
        assert e_out == pytest.approx(e_in, rel=1e-12)
        # energy balance of every (adiabatic) bed, J per mol of feed
        H_in = float(mixture_enthalpy(sp, res.amounts_in[k], res.T_in[k]))
        H_out = float(mixture_enthalpy(sp, res.amounts_out[k], res.T_out[k]))
        assert H_out == pytest.approx(H_in, abs=1e-3)
        # the outlet is at equilibrium
        fresh = dict(zip(res.species, res.amounts_in[0], strict=True))
        outlet = dict(zip(res.species, res.amounts_out[k], strict=True))
        X = (fresh["SO2"] - outlet["SO2"]) / fresh["SO2"]
        assert res.conversion_out[k] == pytest.approx(X, abs=1e-15)
        assert float(equilibrium_conversion(_so2(), fresh, res.T_out[k], 1.2e5)) == pytest.approx(
            X, abs=1e-9
        )
        if k + 1 < res.n_beds:
            # cooler: composition unchanged, heat = enthalpy drop to the next inlet T
            np.testing.assert_array_equal(res.amounts_in[k + 1], res.amounts_out[k])
            H_next = float(mixture_enthalpy(sp, res.amounts_in[k + 1], res.T_in[k + 1]))
            assert res.heat_removed[k] == pytest.approx(H_out - H_next, rel=1e-12)
            assert res.heat_removed[k] > 0
    np.testing.assert_allclose(res.heat_removed_per_mol, res.heat_removed / 1.0, rtol=1e-15)
    assert np.all(np.diff(res.conversion_out) > 0)
    np.testing.assert_allclose(
        res.bed_conversion, res.conversion_out - res.conversion_in, rtol=0, atol=1e-15
    )


def test_staging_number_of_beds_for_target() -> None:
    rxn = _so2()
    res = stage_beds(rxn, SO2_FEED, 700.0, 1.2e5, target=0.97)
    assert res.reached and res.conversion_out[-1] >= 0.97
    assert res.conversion_out[-2] < 0.97  # one bed fewer would not do
    fewer = stage_beds(rxn, SO2_FEED, 700.0, 1.2e5, n_beds=res.n_beds - 1)
    np.testing.assert_allclose(fewer.T_out, res.T_out[:-1], rtol=0, atol=1e-9)
    # the asymptote of infinitely many beds is the equilibrium conversion at the inlet T
    X_lim = float(equilibrium_conversion(rxn, SO2_FEED, 700.0, 1.2e5))
    with pytest.raises(UnreachableTargetError, match="infinitely many beds"):
        stage_beds(rxn, SO2_FEED, 700.0, 1.2e5, target=min(0.999999, X_lim + 1e-4))
    with pytest.raises(UnreachableTargetError, match="max_beds"):
        stage_beds(rxn, SO2_FEED, 700.0, 1.2e5, target=0.97, max_beds=1)


def test_intercooled_ammonia_beds_follow_adiabatic_lines() -> None:
    # invented three-bed intercooled ammonia converter at 200 bar, inlets 650 K
    rxn = Reaction("N2 + 3 H2 = 2 NH3", data="janaf")
    res = stage_beds(rxn, NH3_FEED, 650.0, 200e5, n_beds=3, key="N2")
    for k, (X, T) in enumerate(res.lines(points=20)):
        assert X[0] == pytest.approx(res.conversion_in[k], abs=1e-15)
        assert T[0] == pytest.approx(res.T_in[k], abs=1e-9)
        assert T[-1] == pytest.approx(res.T_out[k], abs=1e-4)
        assert np.all(np.diff(T) > 0)
    assert res.T_out[0] > res.T_out[1] > res.T_out[2]  # later beds climb less


def test_staging_tables_and_errors(so2_four_beds: StagingResult, tmp_path: Path) -> None:
    res = so2_four_beds
    df = res.to_dataframe()
    assert list(df["bed"]) == [1, 2, 3, 4]
    assert df.attrs["units"]["T_out"] == "K" and df.attrs["units"]["heat_removed"] == "J"
    assert df["heat_removed"].iloc[-1] == 0.0
    text = res.to_text()
    assert "T out [K]" in text and len(text.splitlines()) == 6
    path = res.write_csv(tmp_path / "beds.csv")
    assert path.read_text().splitlines()[0].startswith("bed,T_in [K],T_out [K]")
    with pytest.raises(InputError, match="exists"):
        res.write_csv(path)
    with pytest.raises(InputError, match="n_beds or target"):
        stage_beds(_so2(), SO2_FEED, 700.0, 1.2e5)
    with pytest.raises(InputError, match="n_beds"):
        stage_beds(_so2(), SO2_FEED, 700.0, 1.2e5, n_beds=0)
