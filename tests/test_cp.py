"""Tests of eqconv.cp: heat-capacity models evaluated with numpy from raw coefficients.

External checks (each named beside its assertion):

* ``thermo.HeatCapacityGas`` (thermo 0.6.1) with its method set to ``WEBBOOK_SHOMATE``,
  ``TRCIG`` or ``POLING_POLY``: Cp, ∫Cp dT and ∫Cp/T dT over each method's valid range, for
  13–16 gases, to 1e-9 relative (the two libraries differ only in the last digits of R);
* ``chemicals.heat_capacity`` (chemicals 1.5.2): Shomate, TRCCp, Poling and their integrals,
  and the worked examples printed in their docstrings;
* NIST-JANAF Thermochemical Tables, 4th ed. (1998), through the ``janaf`` package, for
  :class:`~eqconv.cp.TabulatedCp`;
* the NASA 7-term polynomial forms (McBride, Zehe & Gordon, NASA/TP-2002-211556) evaluated
  by hand.

Self-consistency checks (piecewise continuity, shapes, errors) follow.
"""

from __future__ import annotations

import math
from collections.abc import Callable
from functools import cache

import chemicals.heat_capacity as hc
import janaf
import numpy as np
import pytest
from numpy.typing import NDArray
from thermo import HeatCapacityGas

from eqconv import EqconvError, InputError, get_species
from eqconv.constants import T_REF, R
from eqconv.cp import (
    CpModel,
    PiecewiseCp,
    PowerSeriesCp,
    TabulatedCp,
    TRCCp,
    constant_cp,
    maier_kelley_cp,
    nasa7_cp,
    nasa9_cp,
    polynomial_cp,
    shomate_cp,
)

FloatArray = NDArray[np.float64]
REL = 1e-9  # the brief: numpy evaluation agrees with the libraries' own to ~1e-9 relative

CAS = {
    "NH3": "7664-41-7",
    "CH4": "74-82-8",
    "CO2": "124-38-9",
    "CO": "630-08-0",
    "H2O": "7732-18-5",
    "SO2": "7446-09-5",
    "C2H4": "74-85-1",
    "H2": "1333-74-0",
    "N2": "7727-37-9",
    "O2": "7782-44-7",
    "NO": "10102-43-9",
    "HCl": "7647-01-0",
    "H2S": "7783-06-4",
    "C2H6": "74-84-0",
    "C3H8": "74-98-6",
    "CH3OH": "67-56-1",
}
SHOMATE_SPECIES = [k for k in CAS if k not in ("C2H6", "C3H8", "CH3OH")]  # 13 with Shomate
ALL_SPECIES = list(CAS)


# ------------------------------------------------------------------ reading thermo's data
@cache
def _thermo(species: str) -> HeatCapacityGas:
    return HeatCapacityGas(CASRN=CAS[species])


def _shomate_model(species: str) -> PiecewiseCp:
    """eqconv model from thermo's raw Shomate constants (stored for T in K)."""
    params = _thermo(species).Shomate_parameters
    pieces = []
    for name in sorted(params, key=lambda k: params[k]["Tmin"]):
        p = params[name]
        # back to the NIST WebBook convention t = T/1000 that shomate_cp takes
        pieces.append(
            shomate_cp(
                p["A"],
                p["B"] * 1e3,
                p["C"] * 1e6,
                p["D"] * 1e9,
                p["E"] / 1e6,
                T_min=p["Tmin"],
                T_max=p["Tmax"],
                method=name,
            )
        )
    return PiecewiseCp(tuple(pieces), method="NIST WebBook Shomate")


def _trc_model(species: str) -> TRCCp:
    p = _thermo(species).TRCCp_parameters["TRCIG"]
    return TRCCp(tuple(p[f"a{k}"] for k in range(8)), p["Tmin"], p["Tmax"])


def _poling_coeffs(species: str) -> list[float]:
    row = hc.Cp_data_Poling.loc[CAS[species]]
    return [float(row[f"a{k}"]) for k in range(5)]


def _poling_model(species: str) -> PowerSeriesCp:
    row = hc.Cp_data_Poling.loc[CAS[species]]
    return polynomial_cp([R * a for a in _poling_coeffs(species)], row["Tmin"], row["Tmax"])


BUILDERS: dict[str, Callable[[str], CpModel]] = {
    "WEBBOOK_SHOMATE": _shomate_model,
    "TRCIG": _trc_model,
    "POLING_POLY": _poling_model,
}


def _grid(species: str, method: str, n: int = 25) -> FloatArray:
    lo, hi = _thermo(species).T_limits[method]
    T = np.linspace(lo, hi, n)
    # stay off the Shomate break points, where thermo and eqconv may pick different pieces
    if method == "WEBBOOK_SHOMATE":
        breaks = [p["Tmin"] for p in _thermo(species).Shomate_parameters.values()]
        T = T[np.all(np.abs(T[:, None] - np.array(breaks)[None, :]) > 1e-6, axis=1)]
    return T


def _thermo_eval(species: str, method: str, T: FloatArray) -> tuple[FloatArray, ...]:
    obj = _thermo(species)
    obj.method = method
    T0 = float(T[0])
    cp = np.array([obj.T_dependent_property(float(t)) for t in T])
    h = np.array([obj.T_dependent_property_integral(T0, float(t)) for t in T[1:]])
    s = np.array([obj.T_dependent_property_integral_over_T(T0, float(t)) for t in T[1:]])
    return cp, h, s


def _eq_eval(model: CpModel, T: FloatArray) -> tuple[FloatArray, ...]:
    T0 = T[0]
    return (
        model.cp(T),
        model.h_int(T[1:]) - model.h_int(T0),
        model.s_int(T[1:]) - model.s_int(T0),
    )


# ------------------------------------------------------------------ against thermo
@pytest.mark.parametrize(
    ("species", "method"),
    [(s, "WEBBOOK_SHOMATE") for s in SHOMATE_SPECIES]
    + [(s, m) for s in ALL_SPECIES for m in ("TRCIG", "POLING_POLY")],
)
def test_cp_matches_thermo(species: str, method: str) -> None:
    T = _grid(species, method)
    model = BUILDERS[method](species)
    # thermo 0.6.1 HeatCapacityGas(CASRN).T_dependent_property with method set
    np.testing.assert_allclose(model.cp(T), _thermo_eval(species, method, T)[0], rtol=REL)


@pytest.mark.parametrize(
    ("species", "method"),
    [(s, "WEBBOOK_SHOMATE") for s in SHOMATE_SPECIES]
    + [(s, m) for s in ALL_SPECIES for m in ("TRCIG", "POLING_POLY")],
)
def test_cp_integrals_match_thermo(species: str, method: str) -> None:
    T = _grid(species, method)
    _, h_ref, s_ref = _thermo_eval(species, method, T)
    _, h, s = _eq_eval(BUILDERS[method](species), T)
    # thermo 0.6.1 T_dependent_property_integral / _integral_over_T between T[0] and T
    np.testing.assert_allclose(h, h_ref, rtol=REL, err_msg="∫Cp dT")
    np.testing.assert_allclose(s, s_ref, rtol=REL, err_msg="∫Cp/T dT")


@pytest.mark.parametrize("species", SHOMATE_SPECIES)
def test_default_species_shomate_model_matches_thermo(species: str) -> None:
    """The default data set builds its Shomate model itself; check it against thermo."""
    model = get_species(species).cp_model
    T = _grid(species, "WEBBOOK_SHOMATE")
    cp_ref, h_ref, s_ref = _thermo_eval(species, "WEBBOOK_SHOMATE", T)
    cp, h, s = _eq_eval(model, T)
    # thermo 0.6.1 with method "WEBBOOK_SHOMATE" (NIST WebBook Shomate constants)
    np.testing.assert_allclose(cp, cp_ref, rtol=REL)
    np.testing.assert_allclose(h, h_ref, rtol=REL)
    np.testing.assert_allclose(s, s_ref, rtol=REL)


def test_trc_integral_across_a7() -> None:
    """Pinpoint: TRC integrals from 298.15 K to T when the switch point a7 lies between."""
    model = _trc_model("CH4")  # thermo's TRC constants for methane: a7 = 473 K
    a = model.a
    assert T_REF < a[7] < 1000.0
    T = np.array([400.0, 470.0, 480.0, 700.0, 1000.0, 3000.0])
    # chemicals 1.5.2 TRCCp_integral / TRCCp_integral_over_T (analytic antiderivatives)
    h_ref = [hc.TRCCp_integral(t, *a) - hc.TRCCp_integral(T_REF, *a) for t in T]
    s_ref = [hc.TRCCp_integral_over_T(t, *a) - hc.TRCCp_integral_over_T(T_REF, *a) for t in T]
    np.testing.assert_allclose(model.h_int(T), h_ref, rtol=REL)
    np.testing.assert_allclose(model.s_int(T), s_ref, rtol=REL)


# ------------------------------------------------------------------ against chemicals
# chemicals 1.5.2 docstring of Shomate: NIST WebBook water-vapour constants (500–1700 K),
# NIST convention A, B, C, D, E with t = T/1000
WATER_SHOMATE_NIST = (30.09200, 6.832514, 6.793435, -2.534480, 0.082139)
WATER_SHOMATE_SI = (30.09200, 6.832514 / 1e3, 6.793435 / 1e6, -2.534480 / 1e9, 0.082139 * 1e6)
# chemicals 1.5.2 docstring of TRCCp
TRC_EXAMPLE = (4.0, 7.65e5, 720.0, 3.565, -0.052, -1.55e6, 52.0, 201.0)


def test_shomate_docstring_example_of_chemicals() -> None:
    model = shomate_cp(*WATER_SHOMATE_NIST, T_min=500.0, T_max=1700.0)
    # chemicals 1.5.2, Shomate docstring: Shomate(500, *water_low_gas_coeffs) = 35.21836175
    assert float(model.cp(500.0)) == pytest.approx(35.21836175, rel=1e-9)


def test_trc_docstring_example_of_chemicals() -> None:
    model = TRCCp(TRC_EXAMPLE, 50.0, 1500.0)
    # chemicals 1.5.2, TRCCp docstring: TRCCp(300, ...) = 42.065271080974654
    assert float(model.cp(300.0)) == pytest.approx(42.065271080974654, rel=1e-9)


def test_shomate_and_integrals_match_chemicals() -> None:
    model = shomate_cp(*WATER_SHOMATE_NIST, T_min=500.0, T_max=1700.0)
    T = np.linspace(500.0, 1700.0, 31)
    # chemicals 1.5.2 Shomate, Shomate_integral, Shomate_integral_over_T
    cp_ref = [hc.Shomate(t, *WATER_SHOMATE_SI) for t in T]
    h_ref = [
        hc.Shomate_integral(t, *WATER_SHOMATE_SI) - hc.Shomate_integral(T_REF, *WATER_SHOMATE_SI)
        for t in T
    ]
    s_ref = [
        hc.Shomate_integral_over_T(t, *WATER_SHOMATE_SI)
        - hc.Shomate_integral_over_T(T_REF, *WATER_SHOMATE_SI)
        for t in T
    ]
    np.testing.assert_allclose(model.cp(T), cp_ref, rtol=REL)
    np.testing.assert_allclose(model.h_int(T), h_ref, rtol=REL)
    np.testing.assert_allclose(model.s_int(T), s_ref, rtol=REL)


@pytest.mark.parametrize("species", ALL_SPECIES)
def test_trc_and_integrals_match_chemicals(species: str) -> None:
    model = _trc_model(species)
    a = model.a
    T = np.linspace(model.T_min, model.T_max, 31)
    T = T[np.abs(T - T_REF) > 1.0]  # relative comparison of integrals from 298.15 K
    # chemicals 1.5.2 TRCCp, TRCCp_integral, TRCCp_integral_over_T
    cp_ref = [hc.TRCCp(t, *a) for t in T]
    h_ref = [hc.TRCCp_integral(t, *a) - hc.TRCCp_integral(T_REF, *a) for t in T]
    s_ref = [hc.TRCCp_integral_over_T(t, *a) - hc.TRCCp_integral_over_T(T_REF, *a) for t in T]
    np.testing.assert_allclose(model.cp(T), cp_ref, rtol=REL)
    np.testing.assert_allclose(model.h_int(T), h_ref, rtol=REL)
    np.testing.assert_allclose(model.s_int(T), s_ref, rtol=REL)


@pytest.mark.parametrize("species", ALL_SPECIES)
def test_poling_and_integrals_match_chemicals(species: str) -> None:
    model = _poling_model(species)
    c = _poling_coeffs(species)
    T = np.linspace(model.T_min, model.T_max, 31)
    T = T[np.abs(T - T_REF) > 1.0]
    # chemicals 1.5.2 Poling, Poling_integral, Poling_integral_over_T
    cp_ref = [hc.Poling(t, *c) for t in T]
    h_ref = [hc.Poling_integral(t, *c) - hc.Poling_integral(T_REF, *c) for t in T]
    s_ref = [hc.Poling_integral_over_T(t, *c) - hc.Poling_integral_over_T(T_REF, *c) for t in T]
    np.testing.assert_allclose(model.cp(T), cp_ref, rtol=REL)
    np.testing.assert_allclose(model.h_int(T), h_ref, rtol=REL)
    np.testing.assert_allclose(model.s_int(T), s_ref, rtol=REL)


def test_maier_kelley_and_nasa9_against_hand_evaluation() -> None:
    T = np.array([250.0, 298.15, 600.0, 1500.0])
    a, b, c = 44.14, 9.04e-3, -8.54e5  # illustrative constants (invented for this test)
    mk = maier_kelley_cp(a, b, c, 200.0, 2000.0)
    np.testing.assert_allclose(mk.cp(T), a + b * T + c / T**2, rtol=1e-14)
    h_hand = a * (T - T_REF) + b / 2 * (T**2 - T_REF**2) - c * (1 / T - 1 / T_REF)
    s_hand = a * np.log(T / T_REF) + b * (T - T_REF) - c / 2 * (1 / T**2 - 1 / T_REF**2)
    np.testing.assert_allclose(mk.h_int(T), h_hand, rtol=1e-12, atol=1e-9)
    np.testing.assert_allclose(mk.s_int(T), s_hand, rtol=1e-12, atol=1e-12)
    # NASA 9-term: Cp/R = a1/T² + a2/T + a3 + a4 T + ... + a7 T⁴ (invented coefficients)
    n9 = (2.0e4, -300.0, 4.0, 1.0e-3, -2.0e-7, 1.0e-11, -1.0e-15)
    m9 = nasa9_cp(n9, 200.0, 6000.0)
    hand = R * (
        n9[0] / T**2 + n9[1] / T + n9[2] + n9[3] * T + n9[4] * T**2 + n9[5] * T**3 + n9[6] * T**4
    )
    np.testing.assert_allclose(m9.cp(T), hand, rtol=1e-13)


# ------------------------------------------------------------------ NASA 7-term polynomials
# N2, GRI-Mech 3.0 thermodynamic data (NASA 7-term, 300–1000 K and 1000–5000 K)
# (value from memory; a JANAF sanity check below guards against a typing slip)
N2_LOW = (3.298677, 1.4082404e-3, -3.963222e-6, 5.641515e-9, -2.444854e-12, -1020.8999, 3.950372)
N2_HIGH = (2.92664, 1.4879768e-3, -5.68476e-7, 1.0097038e-10, -6.753351e-15, -922.7977, 5.980528)


def _nasa_h(a: tuple[float, ...], T: FloatArray | float) -> FloatArray:
    """H°(T) [J/mol] from the NASA form H/RT = a1 + a2 T/2 + … + a5 T⁴/5 + a6/T."""
    T = np.asarray(T, dtype=float)
    return (
        R
        * T
        * (a[0] + a[1] * T / 2 + a[2] * T**2 / 3 + a[3] * T**3 / 4 + a[4] * T**4 / 5 + a[5] / T)
    )


def _nasa_s(a: tuple[float, ...], T: FloatArray | float) -> FloatArray:
    """S°(T) [J/(mol K)] from S/R = a1 ln T + a2 T + a3 T²/2 + a4 T³/3 + a5 T⁴/4 + a7."""
    T = np.asarray(T, dtype=float)
    return R * (
        a[0] * np.log(T) + a[1] * T + a[2] * T**2 / 2 + a[3] * T**3 / 3 + a[4] * T**4 / 4 + a[6]
    )


def test_nasa7_against_hand_evaluated_polynomial() -> None:
    model = nasa7_cp(N2_LOW, 300.0, 1000.0)
    T = np.array([300.0, 450.0, 700.0, 1000.0])
    a = N2_LOW
    cp_hand = R * (a[0] + a[1] * T + a[2] * T**2 + a[3] * T**3 + a[4] * T**4)
    np.testing.assert_allclose(model.cp(T), cp_hand, rtol=1e-13)
    # H and S from the NASA forms with a6, a7: their increments must match eqconv's
    np.testing.assert_allclose(model.h_int(T), _nasa_h(a, T) - _nasa_h(a, T_REF), rtol=1e-11)
    np.testing.assert_allclose(model.s_int(T), _nasa_s(a, T) - _nasa_s(a, T_REF), rtol=1e-11)
    # the 5-coefficient form gives the same model (a6, a7 are not used for Cp)
    five = nasa7_cp(N2_LOW[:5], 300.0, 1000.0)
    np.testing.assert_allclose(five.h_int(T), model.h_int(T), rtol=1e-15)


def test_nasa7_two_ranges_piecewise_against_hand_evaluation() -> None:
    model = PiecewiseCp(
        (nasa7_cp(N2_LOW, 300.0, 1000.0), nasa7_cp(N2_HIGH, 1000.0, 5000.0)), method="N2"
    )
    T = np.array([1200.0, 2500.0, 5000.0])
    # hand: low range from 298.15 K to 1000 K, then the high range from 1000 K to T
    h_hand = (_nasa_h(N2_LOW, 1000.0) - _nasa_h(N2_LOW, T_REF)) + (
        _nasa_h(N2_HIGH, T) - _nasa_h(N2_HIGH, 1000.0)
    )
    s_hand = (_nasa_s(N2_LOW, 1000.0) - _nasa_s(N2_LOW, T_REF)) + (
        _nasa_s(N2_HIGH, T) - _nasa_s(N2_HIGH, 1000.0)
    )
    np.testing.assert_allclose(model.h_int(T), h_hand, rtol=1e-11)
    np.testing.assert_allclose(model.s_int(T), s_hand, rtol=1e-11)


def test_nasa7_n2_coefficients_sane_against_janaf() -> None:
    # NIST-JANAF 4th ed. (1998), table N-023: Cp(298.15) 29.124, S(298.15) 191.609,
    # H−H298 at 1000 K 21.463 kJ/mol. The GRI fit is not JANAF, so 0.3 %.
    model = nasa7_cp(N2_LOW, 300.0, 1000.0)
    assert float(model.cp(T_REF)) == pytest.approx(29.124, rel=3e-3)
    assert float(_nasa_s(N2_LOW, T_REF)) == pytest.approx(191.609, rel=3e-3)
    assert float(model.h_int(1000.0)) == pytest.approx(21463.0, rel=3e-3)


# ------------------------------------------------------------------ TabulatedCp vs JANAF
@cache
def _janaf_rows(index: str) -> tuple[FloatArray, FloatArray, FloatArray, FloatArray]:
    df = janaf.Table(index).df
    T = df["T(K)"].to_numpy()
    keep = T >= 100.0
    return (
        T[keep],
        df["Cp"].to_numpy()[keep],
        df["H-H(Tr)"].to_numpy()[keep] * 1e3,
        df["S"].to_numpy()[keep],
    )


JANAF_INDEX = {
    "NH3": "H-083",
    "CH4": "C-067",
    "SO2": "O-034",
    "SO3": "O-058",
    "H2O": "H-064",
    "N2": "N-023",
    "CO2": "C-095",
}


@pytest.mark.parametrize("species", list(JANAF_INDEX))
def test_tabulated_cp_reproduces_janaf_at_nodes(species: str) -> None:
    T, cp, h, s = _janaf_rows(JANAF_INDEX[species])
    sp = get_species(species, data="janaf")
    model = sp.cp_model
    assert isinstance(model, TabulatedCp)
    # NIST-JANAF 4th ed. (1998) printed rows: H − H(298.15) and S exactly at the nodes
    np.testing.assert_allclose(model.h_int(T), h, rtol=0, atol=1e-9)
    np.testing.assert_allclose(sp.s298 + model.s_int(T), s, rtol=0, atol=1e-10)
    # Cp at the nodes within the table's rounding (printed to 0.001 J/(mol K))
    np.testing.assert_allclose(model.cp(T), cp, rtol=0, atol=5e-4)


@pytest.mark.parametrize("species", list(JANAF_INDEX))
def test_tabulated_cp_between_nodes_from_a_thinned_table(species: str) -> None:
    """Interpolation quality: drop every other row and predict it from its neighbours."""
    T, cp, h, s = _janaf_rows(JANAF_INDEX[species])
    keep = np.zeros(T.size, dtype=bool)
    keep[::2] = True
    keep[np.flatnonzero(np.isclose(T, T_REF))] = True
    keep[-1] = True
    model = TabulatedCp(tuple(T[keep]), tuple(cp[keep]), tuple(h[keep]), tuple(s[keep]), "thin")
    test = ~keep & (T >= 300.0) & (T <= 3000.0)
    s298 = s[np.isclose(T, T_REF)][0]
    # NIST-JANAF 4th ed. (1998) rows left out; bounds set just above what was measured for
    # these seven gases at 200-K spacing: Cp 0.0103 J/(mol K) (CO2 at 500 K), H 1.2 J/mol,
    # S 0.014 J/(mol K)
    np.testing.assert_allclose(model.cp(T[test]), cp[test], rtol=0, atol=0.012)
    np.testing.assert_allclose(model.h_int(T[test]), h[test], rtol=0, atol=1.5)
    np.testing.assert_allclose(s298 + model.s_int(T[test]), s[test], rtol=0, atol=0.02)


def test_tabulated_cp_is_the_derivative_of_its_enthalpy() -> None:
    model = get_species("NH3", data="janaf").cp_model
    T = np.linspace(320.0, 2950.0, 40)
    dT = 1e-3
    slope = (model.h_int(T + dT) - model.h_int(T - dT)) / (2 * dT)
    np.testing.assert_allclose(model.cp(T), slope, rtol=1e-7)


# ------------------------------------------------------------------ PiecewiseCp
@pytest.mark.parametrize("species", ["NH3", "CH4", "H2O", "N2", "O2", "H2"])
def test_piecewise_default_models_continuous_at_breaks(species: str) -> None:
    model = get_species(species).cp_model
    assert isinstance(model, PiecewiseCp)
    breaks = [p.T_min for p in model.pieces[1:]]
    assert breaks
    for b in breaks:
        below, at = np.nextafter(b, 0.0), b
        cp_max = 200.0  # J/(mol K), far above any gas Cp here
        assert abs(float(model.h_int(at) - model.h_int(below))) <= cp_max * (b - below) + 1e-9
        assert abs(float(model.s_int(at) - model.s_int(below))) <= 1e-11


def test_piecewise_two_constants_analytic_above_298() -> None:
    model = PiecewiseCp((constant_cp(20.0, 100.0, 500.0), constant_cp(30.0, 500.0, 3000.0)), "x")
    T = np.array([200.0, 298.15, 400.0, 500.0, 800.0])
    h = np.where(T < 500.0, 20.0 * (T - T_REF), 20.0 * (500.0 - T_REF) + 30.0 * (T - 500.0))
    s = np.where(
        T < 500.0, 20.0 * np.log(T / T_REF), 20.0 * np.log(500.0 / T_REF) + 30.0 * np.log(T / 500.0)
    )
    np.testing.assert_allclose(model.h_int(T), h, rtol=1e-13, atol=1e-10)
    np.testing.assert_allclose(model.s_int(T), s, rtol=1e-13, atol=1e-13)
    np.testing.assert_allclose(model.cp(T), np.where(T < 500.0, 20.0, 30.0), rtol=0)


def test_piecewise_reference_in_a_later_piece() -> None:
    """298.15 K inside the second of three pieces: offsets must run both ways."""
    model = PiecewiseCp(
        (
            constant_cp(10.0, 50.0, 250.0),
            constant_cp(20.0, 250.0, 400.0),
            constant_cp(40.0, 400.0, 2000.0),
        ),
        "x",
    )
    T = np.array([100.0, 250.0, 298.15, 350.0, 400.0, 1000.0])
    h_hand = np.select(
        [T < 250.0, T < 400.0],
        [20.0 * (250.0 - T_REF) + 10.0 * (T - 250.0), 20.0 * (T - T_REF)],
        20.0 * (400.0 - T_REF) + 40.0 * (T - 400.0),
    )
    s_hand = np.select(
        [T < 250.0, T < 400.0],
        [20.0 * np.log(250.0 / T_REF) + 10.0 * np.log(T / 250.0), 20.0 * np.log(T / T_REF)],
        20.0 * np.log(400.0 / T_REF) + 40.0 * np.log(T / 400.0),
    )
    np.testing.assert_allclose(model.h_int(T), h_hand, rtol=1e-13, atol=1e-10)
    np.testing.assert_allclose(model.s_int(T), s_hand, rtol=1e-13, atol=1e-13)


# ------------------------------------------------------------------ vectorization
def _models() -> dict[str, CpModel]:
    return {
        "constant": constant_cp(29.1),
        "polynomial": polynomial_cp([28.0, 2e-3, -1e-7], 200.0, 1500.0),
        "shomate": shomate_cp(*WATER_SHOMATE_NIST, T_min=500.0, T_max=1700.0),
        "nasa7": nasa7_cp(N2_LOW, 300.0, 1000.0),
        "trc": TRCCp(TRC_EXAMPLE, 50.0, 1500.0),
        "tabulated": get_species("NH3", data="janaf").cp_model,
        "piecewise": get_species("H2O").cp_model,
    }


@pytest.mark.parametrize("name", list(_models()))
@pytest.mark.parametrize("shape", [(7,), (2, 3), (4, 1), (1, 5, 2), (0,)])
def test_shapes_in_equal_shapes_out(name: str, shape: tuple[int, ...]) -> None:
    model = _models()[name]
    T = np.linspace(310.0, 1400.0, math.prod(shape)).reshape(shape)
    for f in (model.cp, model.h_int, model.s_int):
        out = np.asarray(f(T))
        assert out.shape == shape
        assert out.dtype == np.float64
        if T.size:  # element-wise: same values as one point at a time
            flat = np.array([float(f(float(t))) for t in T.ravel()])
            np.testing.assert_allclose(out.ravel(), flat, rtol=1e-13, atol=1e-12)


@pytest.mark.parametrize("name", list(_models()))
def test_scalar_in_gives_0d_out(name: str) -> None:
    model = _models()[name]
    for f in (model.cp, model.h_int, model.s_int):
        out = f(700.0)
        assert isinstance(out, np.ndarray | np.floating)
        assert np.shape(out) == ()
        assert math.isfinite(float(out))
    # list input broadcasts like an array
    assert np.shape(model.cp([400.0, 500.0])) == (2,)


@pytest.mark.parametrize("name", list(_models()))
def test_nan_in_gives_nan_out(name: str) -> None:
    # STYLE.md habit 7: NaN in gives NaN out, never a silent number
    model = _models()[name]
    T = np.array([600.0, np.nan])
    for f in (model.cp, model.h_int, model.s_int):
        out = f(T)
        assert np.isfinite(out[0])
        assert np.isnan(out[1]), f"{name}.{f.__name__}(nan) returned {out[1]!r}"


# ------------------------------------------------------------------ bad input
@pytest.mark.parametrize(
    ("build", "fragment"),
    [
        (lambda: PowerSeriesCp((1.0, 2.0), (0.0,), 200.0, 1000.0, "x"), "2"),
        (lambda: PowerSeriesCp((), (), 200.0, 1000.0, "x"), "0"),
        (lambda: PowerSeriesCp((np.nan,), (0.0,), 200.0, 1000.0, "x"), "nan"),
        (lambda: constant_cp(30.0, 1000.0, 200.0), "1000"),
        (lambda: constant_cp(30.0, 0.0, 200.0), "0"),
        (lambda: constant_cp(30.0, 100.0, np.inf), "inf"),
        (lambda: shomate_cp(1.0, 2.0, 3.0, 4.0, np.inf, 300.0, 1000.0), "inf"),
        (lambda: nasa7_cp((1.0,) * 6, 300.0, 1000.0), "6"),
        (lambda: nasa9_cp((1.0,) * 8, 300.0, 1000.0), "8"),
        (lambda: TRCCp((4.0,) * 7, 50.0, 1000.0), "7"),
        (lambda: TRCCp(TRC_EXAMPLE, 1000.0, 50.0), "1000"),
        (lambda: TRCCp((np.nan, *TRC_EXAMPLE[1:]), 50.0, 1000.0), "nan"),
        (lambda: TabulatedCp((200.0, 300.0), (30.0, 31.0), (-3000.0,), (180.0, 190.0), "x"), ""),
        (lambda: TabulatedCp((300.0, 200.0), (30.0, 31.0), (0.0, 1.0), (180.0, 190.0), "x"), ""),
        (
            lambda: TabulatedCp((400.0, 500.0), (30.0, 31.0), (0.0, 1.0), (180.0, 190.0), "x"),
            "298.15",
        ),
        (lambda: TabulatedCp((298.15,), (30.0,), (0.0,), (180.0,), "x"), ""),
        (
            lambda: TabulatedCp(
                (200.0, 400.0), (30.0, np.nan), (-3000.0, 3000.0), (180.0, 200.0), "x"
            ),
            "",
        ),
        (lambda: PiecewiseCp((), "x"), ""),
        (
            lambda: PiecewiseCp(
                (constant_cp(30.0, 500.0, 900.0), constant_cp(30.0, 100.0, 500.0)), "x"
            ),
            "500",
        ),
        # a gap between pieces would extrapolate the lower piece silently across it
        (
            lambda: PiecewiseCp(
                (constant_cp(30.0, 100.0, 400.0), constant_cp(31.0, 500.0, 900.0)), "x"
            ),
            "400",
        ),
    ],
    ids=[
        "lengths-differ",
        "empty",
        "nan-coeff",
        "Tmin>Tmax",
        "Tmin=0",
        "Tmax=inf",
        "shomate-inf",
        "nasa7-6",
        "nasa9-8",
        "trc-7",
        "trc-range",
        "trc-nan",
        "table-lengths",
        "table-decreasing",
        "table-no-298",
        "table-one-row",
        "table-nan",
        "piecewise-empty",
        "piecewise-unordered",
        "piecewise-gap",
    ],
)
def test_bad_input_raises_input_error(build: Callable[[], object], fragment: str) -> None:
    with pytest.raises(InputError) as info:
        build()
    assert isinstance(info.value, ValueError)
    assert isinstance(info.value, EqconvError)
    assert fragment in str(info.value)
