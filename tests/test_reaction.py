"""Tests of eqconv.reaction: equation parser, atom balance, standard pressure, ΔrH°/ΔrS°/ΔrG°,
input checks and range warnings.

Property-based tests (hypothesis) generate balanced reactions from a pool of species with
known atoms, written in many equivalent ways, and check that the parser and the atom balance
recover them; perturbed versions must be rejected with every unbalanced element named.
External checks: REFERENCES.md §2 (standard-pressure shift of ammonia synthesis, JANAF K in
atm) and NIST-JANAF 4th ed. (1998) formation data.
"""

from __future__ import annotations

import re
import uuid
import warnings
from fractions import Fraction
from typing import Any

import numpy as np
import pytest
from hypothesis import HealthCheck, assume, given, settings
from hypothesis import strategies as st

from eqconv import (
    EqconvError,
    InputError,
    OutOfRangeError,
    RangeWarning,
    Reaction,
    ReactionSyntaxError,
    Species,
    UnbalancedReactionError,
    get_species,
    parse_equation,
    user_species,
)
from eqconv.constants import P_ATM, P_BAR, T_REF, R
from eqconv.cp import constant_cp

LN10 = float(np.log(10.0))

# pool of species with known atoms, each writable as formula, name or CAS number
# (CAS numbers: common practice, as registered)
POOL: dict[str, tuple[str, str, dict[str, int]]] = {
    "H2": ("hydrogen", "1333-74-0", {"H": 2}),
    "N2": ("nitrogen", "7727-37-9", {"N": 2}),
    "O2": ("oxygen", "7782-44-7", {"O": 2}),
    "NH3": ("ammonia", "7664-41-7", {"N": 1, "H": 3}),
    "H2O": ("water", "7732-18-5", {"H": 2, "O": 1}),
    "CO": ("carbon monoxide", "630-08-0", {"C": 1, "O": 1}),
    "CO2": ("carbon dioxide", "124-38-9", {"C": 1, "O": 2}),
    "CH4": ("methane", "74-82-8", {"C": 1, "H": 4}),
    "SO2": ("sulfur dioxide", "7446-09-5", {"S": 1, "O": 2}),
    "SO3": ("sulfur trioxide", "7446-11-9", {"S": 1, "O": 3}),
    "NO": ("nitric oxide", "10102-43-9", {"N": 1, "O": 1}),
    "NO2": ("nitrogen dioxide", "10102-44-0", {"N": 1, "O": 2}),
}
BALANCED: list[dict[str, int]] = [
    {"N2": -1, "H2": -3, "NH3": 2},
    {"CO": -1, "H2O": -1, "CO2": 1, "H2": 1},
    {"CH4": -1, "H2O": -1, "CO": 1, "H2": 3},
    {"SO2": -2, "O2": -1, "SO3": 2},
    {"NO": -2, "O2": -1, "NO2": 2},
    {"CH4": -1, "O2": -2, "CO2": 1, "H2O": 2},
    {"NH3": -4, "O2": -5, "NO": 4, "H2O": 6},
    {"H2": -2, "O2": -1, "H2O": 2},
    {"CO2": -1, "H2": -4, "CH4": 1, "H2O": 2},
]
ARROWS = ["=", "->", "<=>", "⇌", "→"]

rationals = st.builds(Fraction, st.integers(1, 12), st.integers(1, 12))


def _net(parts: list[tuple[dict[str, int], Fraction]]) -> dict[str, Fraction]:
    net: dict[str, Fraction] = {}
    for rxn, m in parts:
        for sp, nu in rxn.items():
            net[sp] = net.get(sp, Fraction(0)) + m * nu
    return {sp: nu for sp, nu in net.items() if nu != 0}


def _is_terminating(f: Fraction) -> bool:
    q = f.denominator
    for p in (2, 5):
        while q % p == 0:
            q //= p
    return q == 1


def _decimal(f: Fraction) -> str:
    text = f"{float(f):.12f}".rstrip("0")
    return text + "0" if text.endswith(".") else text


@st.composite
def coefficient_text(draw: st.DrawFn, value: Fraction) -> str:
    styles = ["fraction"]
    if value.denominator == 1:
        styles.append("integer")
    if _is_terminating(value):
        styles.append("decimal")
    if value == 1:
        styles.append("omitted")
    style = draw(st.sampled_from(styles))
    if style == "integer":
        return str(value.numerator)
    if style == "decimal":
        return _decimal(value)
    if style == "omitted":
        return ""
    return f"{value.numerator}/{value.denominator}"


@st.composite
def term_text(draw: st.DrawFn, coeff: Fraction, alias: str, is_formula: bool) -> str:
    c = draw(coefficient_text(coeff))
    if not c:
        return alias
    forms = [f"{c} {alias}", f"{c}  {alias}", f"{c}*{alias}"]
    if is_formula:
        forms.append(f"{c}{alias}")  # "3H2"
    return draw(st.sampled_from(forms))


@st.composite
def written_reaction(
    draw: st.DrawFn, net: dict[str, Fraction]
) -> tuple[str, dict[str, str], dict[str, Fraction]]:
    """Write signed coefficients `net` as equation text; returns (text, alias, net-by-alias)."""
    alias: dict[str, str] = {}
    for sp in net:
        kind = draw(st.sampled_from(["formula", "name", "cas"]))
        alias[sp] = {"formula": sp, "name": POOL[sp][0], "cas": POOL[sp][1]}[kind]
    terms: dict[int, list[str]] = {-1: [], 1: []}
    for sp, nu in net.items():
        terms[1 if nu > 0 else -1].append(draw(term_text(abs(nu), alias[sp], alias[sp] == sp)))
    # a spectator on both sides is netted by the parser
    if draw(st.booleans()):
        spect = draw(st.sampled_from(sorted(POOL)))
        if spect not in alias:
            alias[spect] = spect
        k = draw(rationals)
        for side in (-1, 1):
            terms[side].append(draw(term_text(k, alias[spect], alias[spect] == spect)))
    for side in (-1, 1):
        terms[side] = draw(st.permutations(terms[side]))
    plus = draw(st.sampled_from([" + ", "  +  ", " +\t", "\t+ "]))
    arrow = draw(st.sampled_from(ARROWS))
    pad = draw(st.sampled_from(["", " ", "  "]))
    text = f"{pad}{plus.join(terms[-1])}{pad}{arrow}{pad}{plus.join(terms[1])}{pad}"
    by_alias = {alias[sp]: nu for sp, nu in net.items()}
    return text, alias, by_alias


@st.composite
def balanced_case(draw: st.DrawFn) -> tuple[str, dict[str, str], dict[str, Fraction]]:
    n = draw(st.integers(1, 2))
    parts = [
        (draw(st.sampled_from(BALANCED)), draw(rationals) * draw(st.sampled_from([1, -1])))
        for _ in range(n)
    ]
    net = _net(parts)
    assume(net)
    written = draw(written_reaction(net))
    return written[0], written[1], net


def _approx(d: dict[str, Fraction]) -> dict[str, object]:
    return {k: pytest.approx(float(v), rel=1e-12, abs=1e-12) for k, v in d.items()}


SETTINGS = settings(max_examples=150, deadline=None, suppress_health_check=[HealthCheck.too_slow])


# ------------------------------------------------------------------ parser, property tests
@SETTINGS
@given(balanced_case())
def test_balanced_reactions_round_trip(case: tuple[str, dict[str, str], dict]) -> None:
    text, alias, net = case
    by_alias = {alias[sp]: nu for sp, nu in net.items()}
    assert parse_equation(text) == _approx(by_alias)
    rxn = Reaction(text, data="janaf")  # raises if the atom balance fails
    assert rxn.coefficients == _approx(net)
    # the same reaction from a mapping keyed by what the user typed
    from_map = Reaction({alias[sp]: float(nu) for sp, nu in net.items()}, data="janaf")
    assert from_map.coefficients == _approx(net)
    # and every element balances
    for el in {e for sp in net for e in POOL[sp][2]}:
        assert sum(rxn.coefficients[sp] * POOL[sp][2].get(el, 0) for sp in net) == (
            pytest.approx(0.0, abs=1e-12)
        )


@SETTINGS
@given(balanced_case())
def test_printed_equation_parses_back(case: tuple[str, dict[str, str], dict]) -> None:
    text, _, net = case
    rxn = Reaction(text, data="janaf")
    # Reaction.equation is what a user prints and copies into the next script
    again = Reaction(rxn.equation, data="janaf")
    assert again.coefficients == _approx(net)


@SETTINGS
@given(
    balanced_case(),
    st.data(),
    rationals,
    st.sampled_from([1, -1]),
)
def test_unbalanced_reactions_name_each_element(
    case: tuple[str, dict[str, str], dict], data: st.DataObject, delta: Fraction, sign: int
) -> None:
    _, _, net = case
    sp = data.draw(st.sampled_from(sorted(net)))
    bad = dict(net)
    bad[sp] = net[sp] + sign * delta
    bad = {k: v for k, v in bad.items() if v != 0}
    assume(bad and any(v > 0 for v in bad.values()) and any(v < 0 for v in bad.values()))
    text, _, _ = data.draw(written_reaction(bad))
    expected = {el: float(sign * delta * n) for el, n in POOL[sp][2].items()}
    with pytest.raises(UnbalancedReactionError) as info:
        Reaction(text, data="janaf")
    assert isinstance(info.value, ValueError)
    detail = str(info.value).split("products − reactants:")[-1]
    found = {el: float(v) for el, v in re.findall(r"([A-Z][a-z]?): ([+-][0-9.e+-]+)", detail)}
    # every unbalanced element is named with its imbalance (products − reactants), no other
    assert found == {el: pytest.approx(v, rel=1e-5) for el, v in expected.items()}


def test_unbalanced_message_example() -> None:
    with pytest.raises(UnbalancedReactionError, match=r"H: \+1.*N: -1"):
        Reaction("N2 + H2 = NH3", data="janaf")


# ------------------------------------------------------------------ parser, examples
def test_multiplication_sign_with_spaces() -> None:
    # "3*H2" is accepted, so "3 * H2" must be too (not read as a species named "* H2")
    assert parse_equation("N2 + 3 * H2 = 2 * NH3") == {"N2": -1.0, "H2": -3.0, "NH3": 2.0}


def test_equation_forms_from_the_issue() -> None:
    expected = {"N2": -1.0, "H2": -3.0, "NH3": 2.0}
    for text in (
        "N2 + 3 H2 = 2 NH3",
        "N2 + 3 H2 -> 2 NH3",
        "N2 + 3 H2 <=> 2 NH3",
        "N2 + 3H2 = 2NH3",
        "N2 + 3*H2 = 2*NH3",
    ):
        assert Reaction(text, data="janaf").coefficients == expected
    half = {"N2": -0.5, "H2": -1.5, "NH3": 1.0}
    for text in ("1/2 N2 + 3/2 H2 = NH3", "0.5 N2 + 1.5 H2 = NH3", ".5 N2 + 1.5 H2 = NH3"):
        assert Reaction(text, data="janaf").coefficients == half


def test_names_and_cas_numbers_as_species() -> None:
    expected = {"N2": -0.5, "H2": -1.5, "NH3": 1.0}
    by_name = Reaction("1/2 nitrogen + 3/2 hydrogen = ammonia", data="janaf")
    by_cas = Reaction("1/2 7727-37-9 + 3/2 1333-74-0 = 7664-41-7", data="janaf")
    mixed = Reaction("0.5 N2 + 1.5 hydrogen -> 7664-41-7", data="janaf")
    for rxn in (by_name, by_cas, mixed):
        assert rxn.coefficients == expected
        assert rxn.keys == ("N2", "H2", "NH3")
    # the same chemical written two ways on one side is one species
    assert Reaction("N2 + 2 H2 + hydrogen = 2 ammonia", data="janaf").coefficients == {
        "N2": -1.0,
        "H2": -3.0,
        "NH3": 2.0,
    }


def test_species_on_both_sides_is_netted() -> None:
    assert parse_equation("N2 + 3 H2 + NH3 = 3 NH3") == {"N2": -1.0, "H2": -3.0, "NH3": 2.0}


def test_mapping_of_coefficients() -> None:
    rxn = Reaction({"N2": -1, "H2": -3, "NH3": 2}, data="janaf")
    assert rxn.coefficients == {"N2": -1.0, "H2": -3.0, "NH3": 2.0}
    assert rxn.delta_n_gas == -2.0
    by_name = Reaction(
        {"nitrogen": -0.5, "hydrogen": -1.5, "ammonia": 1.0, "argon": 0.0}, data="janaf"
    )
    assert by_name.coefficients == {"N2": -0.5, "H2": -1.5, "NH3": 1.0}
    with pytest.raises(ReactionSyntaxError):
        Reaction({"N2": 0.0}, data="janaf")
    with pytest.raises(ReactionSyntaxError):
        Reaction({"N2": -1.0, "H2": float("nan"), "NH3": 2.0}, data="janaf")
    with pytest.raises(UnbalancedReactionError, match="N: -1"):
        Reaction({"N2": -1, "H2": -3, "NH3": 1}, data="janaf")


def test_species_sharing_a_key_do_not_cancel_silently() -> None:
    """Two different chemicals with one label must not net to an empty reaction."""
    common = {
        "formula": "C2H6O",
        "hf298": -2.0e5,
        "s298": 270.0,
        "cp": {"kind": "constant", "value": 65.0},
        "source": "invented test datum",
    }
    a = user_species(key="C2H6O", name="isomer A", **common)
    b = user_species(key="C2H6O", name="isomer B", **common)
    with pytest.raises(EqconvError):
        Reaction("A = B", species={"A": a, "B": b})


@pytest.mark.parametrize(
    "text",
    [
        "",
        "   ",
        "N2 + 3 H2",  # no arrow
        "N2 = H2 = NH3",  # two arrows
        " = 2 NH3",  # empty side
        "N2 + 3 H2 = ",
        "0 N2 + 3 H2 = 2 NH3",  # zero coefficient
        "H2 = H2",  # nothing left after netting
        "1/0 N2 + 3 H2 = 2 NH3",  # division by zero in a coefficient
        "N2 + 3 H2 + = 2 NH3",  # dangling '+'
        "N2 + + 3 H2 = 2 NH3",  # doubled '+'
        "N2 + 3 H2 => 2 NH3",  # malformed arrow
    ],
)
def test_syntax_errors(text: str) -> None:
    with pytest.raises(ReactionSyntaxError) as info:
        parse_equation(text)
    assert isinstance(info.value, ValueError)
    with pytest.raises(ReactionSyntaxError):
        Reaction(text, data="janaf")


@pytest.mark.parametrize("bad", [None, 5, ["N2 = N2"]])
def test_non_text_equation(bad: object) -> None:
    with pytest.raises(ReactionSyntaxError):
        parse_equation(bad)  # type: ignore[arg-type]


# ------------------------------------------------------------------ standard pressure
def test_standard_pressure_conversion() -> None:
    T = np.array([400.0, 700.0, 1000.0])
    for text in (
        "N2 + 3 H2 = 2 NH3",
        "1/2 N2 + 3/2 H2 = NH3",
        "CH4 + H2O = CO + 3 H2",
        "CO + H2O = CO2 + H2",
    ):
        rxn = Reaction(text, data="janaf")
        diff = rxn.ln_K(T, standard_pressure=P_ATM) - rxn.ln_K(T, standard_pressure=P_BAR)
        # derived identity: ln K(1 atm) − ln K(1 bar) = −Δn ln(1.01325)
        np.testing.assert_allclose(diff, -rxn.delta_n_gas * np.log(1.01325), rtol=1e-12, atol=1e-14)
        assert np.allclose(rxn.ln_K(T), rxn.ln_K(T, standard_pressure=1e5), rtol=0, atol=0)
    assert Reaction("N2 + 3 H2 = 2 NH3", data="janaf").delta_n_gas == -2.0


def test_ammonia_atm_shift_of_references() -> None:
    rxn = Reaction("1/2 N2 + 3/2 H2 = NH3", data="janaf")
    diff = (rxn.ln_K(600.0, standard_pressure=P_ATM) - rxn.ln_K(600.0)) / LN10
    # REFERENCES.md §2: "log10 K(atm⁻¹) = log10 K(bar⁻¹) + 0.0057 for this reaction"
    assert float(diff) == pytest.approx(0.0057, abs=5e-5)


def test_ammonia_janaf_K_in_atm_of_references() -> None:
    rxn = Reaction("1/2 N2 + 3/2 H2 = NH3", data="janaf")
    T = np.array([573.15, 723.15, 773.15])
    got = rxn.ln_K(T, standard_pressure=P_ATM) / LN10
    # REFERENCES.md §2 (derived): "JANAF in atm gives −1.1699, −2.1501, −2.3980". Those
    # digits come from interpolating log Kf linearly in 1/T between the 100-K rows, whose
    # curvature error (ΔrCp ≈ −15 J/(mol K)) is up to 0.0025 at 573 K; eqconv interpolates
    # H and S with their Cp slopes instead. Tolerance: that interpolation error.
    np.testing.assert_allclose(got, [-1.1699, -2.1501, -2.3980], rtol=0, atol=0.003)


def test_delta_S_carries_the_standard_pressure() -> None:
    rxn = Reaction("N2 + 3 H2 = 2 NH3", data="janaf")
    T = np.array([500.0, 900.0])
    shift = rxn.delta_S(T, standard_pressure=P_ATM) - rxn.delta_S(T)
    # μ° = μ°(1 bar) + RT ln(p°/1 bar) per gas mole: ΔS° shifts by −Δn R ln(p°/1 bar)
    np.testing.assert_allclose(shift, 2.0 * R * np.log(1.01325), rtol=1e-12)


# ------------------------------------------------------------------ ΔH°, ΔS°, ΔG°, ln K
@pytest.mark.parametrize("data", ["janaf", "default"])
@pytest.mark.parametrize("model", ["kirchhoff", "vant_hoff"])
@pytest.mark.parametrize("p0", [P_BAR, P_ATM])
def test_delta_G_is_minus_RT_ln_K_and_H_minus_TS(data: str, model: str, p0: float) -> None:
    rxn = Reaction("CH4 + H2O = CO + 3 H2", data=data)
    T = np.linspace(300.0, 1500.0, 13)
    G = rxn.delta_G(T, model=model, standard_pressure=p0)  # type: ignore[arg-type]
    lnK = rxn.ln_K(T, model=model, standard_pressure=p0)  # type: ignore[arg-type]
    np.testing.assert_allclose(G, -R * T * lnK, rtol=1e-13)
    H = rxn.delta_H(T, model=model)  # type: ignore[arg-type]
    S = rxn.delta_S(T, model=model, standard_pressure=p0)  # type: ignore[arg-type]
    np.testing.assert_allclose(G, H - T * S, rtol=1e-11, atol=1e-6)


@pytest.mark.parametrize(
    ("data", "rtol"),
    [
        # analytic Cp models: exact up to the finite-difference error
        ("default", 1e-6),
        # JANAF tables: H and S are interpolated by separate splines that agree at the rows;
        # between rows their slopes differ by up to ~0.07 J/(mol K) in T dS/dT − dH/dT
        # (measured max relative mismatch 5.4e-4 over 305–1495 K for three reactions)
        ("janaf", 1e-3),
    ],
)
@pytest.mark.parametrize(
    "equation", ["1/2 N2 + 3/2 H2 = NH3", "CH4 + H2O = CO + 3 H2", "CO + H2O = CO2 + H2"]
)
def test_van_t_hoff_equation_holds_for_kirchhoff(data: str, rtol: float, equation: str) -> None:
    rxn = Reaction(equation, data=data)
    T = np.linspace(305.0, 1495.0, 120)
    dT = 1e-2
    slope = (rxn.ln_K(T + dT) - rxn.ln_K(T - dT)) / (2 * dT)
    # d ln K / dT = ΔrH° / (R T²) (van 't Hoff equation, exact thermodynamics)
    np.testing.assert_allclose(slope, rxn.delta_H(T) / (R * T**2), rtol=rtol)


@pytest.mark.parametrize("data", ["janaf", "default"])
def test_kirchhoff_delta_H_at_298_equals_delta_H0(data: str) -> None:
    rxn = Reaction("1/2 N2 + 3/2 H2 = NH3", data=data)
    assert float(rxn.delta_H(T_REF)) == pytest.approx(rxn.delta_H0, rel=1e-12)
    assert float(rxn.delta_S(T_REF)) == pytest.approx(rxn.delta_S0, rel=1e-12)
    assert rxn.delta_H0 == pytest.approx(get_species("NH3", data=data).hf298, rel=1e-12)


def test_delta_H0_of_ammonia_from_janaf() -> None:
    rxn = Reaction("1/2 N2 + 3/2 H2 = NH3", data="janaf")
    # REFERENCES.md §1 (NIST-JANAF, read): ΔfH°(NH3, 298.15 K) = −45.898 kJ/mol
    assert rxn.delta_H0 / 1e3 == pytest.approx(-45.898, abs=5e-4)
    # S°: NH3 192.774, N2 191.609, H2 130.680 J/(mol K)
    assert rxn.delta_S0 == pytest.approx(192.774 - 0.5 * 191.609 - 1.5 * 130.680, abs=2e-3)


def test_vant_hoff_delta_H_and_S_are_constant() -> None:
    rxn = Reaction("CO + H2O = CO2 + H2", data="janaf")
    T = np.array([300.0, 700.0, 1500.0])
    np.testing.assert_array_equal(rxn.delta_H(T, model="vant_hoff"), np.full(3, rxn.delta_H0))
    np.testing.assert_array_equal(rxn.delta_S(T, model="vant_hoff"), np.full(3, rxn.delta_S0))
    # and the kirchhoff ΔH° does vary (ΔCp ≠ 0)
    assert np.ptp(rxn.delta_H(T)) > 1e3


def test_delta_Cp_is_sum_of_species_cp() -> None:
    rxn = Reaction("CO + H2O = CO2 + H2", data="janaf")
    # NIST-JANAF (REFERENCES.md §1) Cp° at 298.15 K: CO2 37.129, H2 28.836, CO 29.142, H2O 33.590
    assert float(rxn.delta_Cp(T_REF)) == pytest.approx(37.129 + 28.836 - 29.142 - 33.590, abs=2e-3)


def test_shapes_broadcast() -> None:
    rxn = Reaction("N2 + 3 H2 = 2 NH3", data="janaf")
    T = np.linspace(400.0, 900.0, 6).reshape(2, 3)
    for f in (rxn.ln_K, rxn.K, rxn.delta_H, rxn.delta_S, rxn.delta_G, rxn.delta_Cp):
        assert np.shape(f(T)) == (2, 3)
        assert np.shape(f(500.0)) == ()


# ------------------------------------------------------------------ bad input
@pytest.mark.parametrize(
    "T",
    [0.0, -10.0, float("nan"), float("inf"), [500.0, float("nan")], np.array([[600.0], [-1.0]])],
)
def test_bad_temperature_raises_input_error(T: Any) -> None:
    rxn = Reaction("N2 + 3 H2 = 2 NH3", data="janaf")
    for f in (rxn.ln_K, rxn.K, rxn.delta_H, rxn.delta_S, rxn.delta_G, rxn.delta_Cp):
        with pytest.raises(InputError, match="T"):
            f(T)
    with pytest.raises(InputError):
        rxn.ln_K(T, model="vant_hoff")


def test_bad_model_and_standard_pressure() -> None:
    rxn = Reaction("N2 + 3 H2 = 2 NH3", data="janaf")
    with pytest.raises(InputError, match="vant-hoff"):
        rxn.ln_K(500.0, model="vant-hoff")  # type: ignore[arg-type]
    for p0 in (0.0, -1e5, float("nan")):
        with pytest.raises(InputError):
            rxn.ln_K(500.0, standard_pressure=p0)
    with pytest.raises(InputError, match="nasa"):
        Reaction("N2 + 3 H2 = 2 NH3", data="nasa")


# ------------------------------------------------------------------ range warnings
def _narrow(key: str, T_min: float, T_max: float) -> Species:
    """A JANAF species with a narrow constant-Cp model under a unique method name."""
    sp = get_species(key, data="janaf")
    model = constant_cp(
        float(sp.cp_model.cp(T_REF)), T_min, T_max, method=f"test model {uuid.uuid4().hex}"
    )
    return sp.replace(cp_model=model, note="invented narrow-range test model")


def _range_warnings(record: list[warnings.WarningMessage]) -> list[str]:
    return [str(w.message) for w in record if issubclass(w.category, RangeWarning)]


def test_range_warning_once_per_species_and_range() -> None:
    nh3 = _narrow("NH3", 250.0, 800.0)
    h2 = _narrow("H2", 250.0, 850.0)
    rxn = Reaction("N2 + 3 H2 = 2 NH3", data="janaf", species=[nh3, h2])
    with warnings.catch_warnings(record=True) as rec:
        warnings.simplefilter("always")
        rxn.ln_K(np.array([500.0, 900.0, 1000.0]))
        first = _range_warnings(rec)
        rxn.ln_K(950.0)
        rxn.delta_H(np.array([900.0, 1200.0]))
        repeat = _range_warnings(rec)[len(first) :]
        rxn.ln_K(200.0)
        below = _range_warnings(rec)[len(first) + len(repeat) :]
    # one warning per species, naming the species, its range and the worst T
    assert len(first) == 2
    assert any("NH3" in m and "1000" in m and "250" in m and "800" in m for m in first)
    assert any("H2" in m and "850" in m for m in first)
    assert repeat == []
    # a different range boundary (below) warns once per species again
    assert len(below) == 2
    assert all("below" in m for m in below)


def test_range_warning_is_a_user_warning() -> None:
    assert issubclass(RangeWarning, UserWarning)
    nh3 = _narrow("NH3", 250.0, 800.0)
    rxn = Reaction("N2 + 3 H2 = 2 NH3", data="janaf", species=[nh3])
    with pytest.warns(RangeWarning, match="NH3"):
        rxn.ln_K(900.0)


def test_no_warning_inside_the_range_and_for_vant_hoff() -> None:
    nh3 = _narrow("NH3", 250.0, 800.0)
    rxn = Reaction("N2 + 3 H2 = 2 NH3", data="janaf", species=[nh3])
    with warnings.catch_warnings():
        warnings.simplefilter("error", RangeWarning)
        rxn.ln_K(np.array([300.0, 799.0]))
        rxn.ln_K(1200.0, model="vant_hoff")  # uses 298.15 K data only


def test_strict_raises_out_of_range_error() -> None:
    nh3 = _narrow("NH3", 250.0, 800.0)
    rxn = Reaction("N2 + 3 H2 = 2 NH3", data="janaf", species=[nh3])
    for f in (rxn.ln_K, rxn.delta_H, rxn.delta_S, rxn.delta_G, rxn.delta_Cp):
        with pytest.raises(OutOfRangeError, match=r"NH3.*800"):
            f(np.array([500.0, 900.0]), strict=True)
    with pytest.raises(OutOfRangeError, match="below"):
        rxn.ln_K(200.0, strict=True)
    assert issubclass(OutOfRangeError, ValueError)
    # strict inside the range is silent
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        rxn.ln_K(np.array([300.0, 700.0]), strict=True)
