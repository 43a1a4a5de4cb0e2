"""Case files: units at the boundary, validation messages, the JSON Schema, every data case.

External checks name their source beside them; the rest are self-consistency checks of the
case layer (a value goes in with a unit and comes out in SI, a bad key is named).
"""

from __future__ import annotations

import json
import math
import tomllib
from pathlib import Path

import numpy as np
import pytest
from hypothesis import given
from hypothesis import strategies as st

from eqconv.case import CAUTION, case_schema, load_case, parse_case
from eqconv.case.load import schema_text, write_schema
from eqconv.case.units import UNITS, from_si, to_si
from eqconv.errors import CaseFileError, InputError

ROOT = Path(__file__).resolve().parents[1]
DATA_CASES = sorted((ROOT / "data").glob("*.toml"))
DEMO_CASE = ROOT / "eqconv" / "demo" / "ammonia_converter.toml"

MINIMAL = """
title = "Invented test case"
reactions = ["N2 + 3 H2 = 2 NH3"]
[feed]
components = { N2 = 1, H2 = 3 }
[grid]
temperature = { start = "350 degC", stop = "550 degC", points = 5 }
pressure = "150 bar"
"""


# ------------------------------------------------------------------------------ units
@pytest.mark.parametrize(
    ("text", "kind", "si"),
    [
        # BIPM SI Brochure, 9th ed. (2019): t/°C = T/K − 273.15 (exact)
        ("450 degC", "temperature", 723.15),
        ("450 °C", "temperature", 723.15),
        ("-40 degC", "temperature", 233.15),
        ("723.15 K", "temperature", 723.15),
        # NIST SP 811 (2008), B.9: T/K = (t/°F + 459.67)/1.8 (exact)
        ("932 degF", "temperature", 773.15),
        ("-40 degF", "temperature", 233.15),
        ("30 bar", "pressure", 3.0e6),
        ("3.5 MPa", "pressure", 3.5e6),
        ("250 kPa", "pressure", 2.5e5),
        # standard atmosphere = 101 325 Pa (exact, NIST SP 811 B.8)
        ("1 atm", "pressure", 101325.0),
        ("760 torr", "pressure", 101325.0),
        # gauge pressure on top of the standard atmosphere (common practice)
        ("30 barg", "pressure", 3.101325e6),
        ("0 psig", "pressure", 101325.0),
        ("3600 kmol/h", "molar_flow", 1000.0),
        ("60 mol/min", "molar_flow", 1.0),
        ("2 kmol", "amount", 2000.0),
        ("-45.898 kJ/mol", "molar_energy", -45898.0),
        ("1 kcal/mol", "molar_energy", 4184.0),
        ("20 K", "temperature_difference", 20.0),
        ("18 degF", "temperature_difference", 10.0),
    ],
)
def test_to_si_converts_exact_definitions(text, kind, si):
    assert to_si(text, kind) == pytest.approx(si, rel=1e-12, abs=1e-9)


def test_psia_matches_the_published_factor():
    # NIST SP 811 (2008), B.8: 1 lbf/in² = 6.894 757 E+03 Pa (7 significant digits)
    assert to_si("1 psia", "pressure") == pytest.approx(6894.757, rel=1e-7)
    # NIST SP 811 (2008), B.8: 1 kgf/cm² = 9.806 65 E+04 Pa (exact)
    assert to_si("1 kgf/cm2", "pressure") == pytest.approx(98066.5, rel=1e-12)


def test_normal_cubic_metre_matches_the_codata_molar_volume():
    # CODATA 2018: molar volume of an ideal gas at 273.15 K and 101.325 kPa is
    # 22.413 969 54... L/mol, so 1 Nm3 = 1000 / 22.41396954 mol
    assert to_si("3600 Nm3/h", "molar_flow") == pytest.approx(1000.0 / 22.41396954, rel=1e-9)


def test_lbmol_uses_the_exact_pound():
    # NIST SP 811 (2008), B.8: 1 lb (avoirdupois) = 0.453 592 37 kg (exact)
    assert to_si("3600 lbmol/h", "molar_flow") == pytest.approx(453.59237, rel=1e-12)


@given(st.floats(min_value=1.0, max_value=5000.0), st.sampled_from(sorted(UNITS["temperature"])))
def test_from_si_inverts_to_si_for_temperature(T, unit):
    shown = float(from_si(T, unit, "temperature"))
    assert to_si(f"{shown!r} {unit}", "temperature") == pytest.approx(T, rel=1e-12)


@given(st.floats(min_value=1e3, max_value=1e9), st.sampled_from(sorted(UNITS["pressure"])))
def test_from_si_inverts_to_si_for_pressure(P, unit):
    shown = float(from_si(P, unit, "pressure"))  # gauge units may show a negative number
    assert to_si(f"{shown!r} {unit}", "pressure") == pytest.approx(P, rel=1e-12)


@pytest.mark.parametrize(
    ("value", "kind", "words"),
    [
        (450, "temperature", ["450 has no unit", "'450 degC'"]),
        ("450", "temperature", ["has no unit"]),
        ("450 degK", "temperature", ["'degK'", "not a temperature unit", "'degC'"]),
        ("30 bars", "pressure", ["'bars'", "not a pressure unit", "'bar'"]),
        ("-300 degC", "temperature", ["-26.85 K", "> 0 K"]),
        ("-2 barg", "pressure", ["Pa absolute", "> 0"]),
        ("hot", "temperature", ["'hot'", "number followed by a unit"]),
        ("1e400 K", "temperature", ["not a finite"]),
        (True, "pressure", ["True"]),
    ],
)
def test_to_si_errors_name_the_value_and_the_expectation(value, kind, words):
    with pytest.raises(InputError) as info:
        to_si(value, kind)
    for w in words:
        assert w in str(info.value)


# ------------------------------------------------------------------------- validation
def test_minimal_case_is_converted_to_si_once():
    case = parse_case(MINIMAL)
    assert case.grid is not None
    assert case.grid.temperature == pytest.approx((623.15, 673.15, 723.15, 773.15, 823.15))
    assert case.grid.pressure == (1.5e7,)
    assert case.feed.components == {"N2": 1.0, "H2": 3.0}
    assert case.feed.basis == "mol"
    assert case.gas == "ideal" and case.data == "default"


def test_models_are_frozen():
    case = parse_case(MINIMAL)
    with pytest.raises(Exception, match="frozen"):
        case.title = "changed"  # type: ignore[misc]


def test_axis_forms_agree():
    forms = [
        '["100 bar", "200 bar", "300 bar"]',
        '{ values = [100, 200, 300], unit = "bar" }',
        '{ start = "100 bar", stop = "300 bar", points = 3 }',
        '{ start = "10 MPa", stop = "30 MPa", points = 3 }',
    ]
    grids = [parse_case(MINIMAL.replace('"150 bar"', f)).grid for f in forms]
    for g in grids:
        assert g is not None
        assert g.pressure == pytest.approx((1e7, 2e7, 3e7), rel=1e-14)


def test_log_spacing_is_geometric():
    case = parse_case(
        MINIMAL.replace(
            '"150 bar"', '{ start = "1 bar", stop = "100 bar", points = 3, spacing = "log" }'
        )
    )
    assert case.grid is not None
    assert case.grid.pressure == pytest.approx((1e5, 1e6, 1e7), rel=1e-12)


def test_feed_flows_are_converted_and_set_the_basis():
    case = parse_case(MINIMAL.replace("N2 = 1, H2 = 3", 'N2 = "3600 kmol/h", H2 = "3 kmol/s"'))
    assert case.feed.basis == "mol/s"
    assert case.feed.components == pytest.approx({"N2": 1000.0, "H2": 3000.0})


BAD = [
    # (replace this, with this, words the one-line message must contain)
    (
        'pressure = "150 bar"',
        'pressure = "150 bar"\npresure = "3 bar"',
        ["grid.presure", "unknown key", "'3 bar'", "pressure, temperature"],
    ),
    ('pressure = "150 bar"', "pressure = 150", ["grid.pressure = 150", "no unit", "'30 bar'"]),
    ('"150 bar"', '"150 bars"', ["grid.pressure = '150 bars'", "'bars'", "'bar'"]),
    ('"350 degC"', '"-300 degC"', ["grid.temperature", "-26.85 K", "> 0 K"]),
    ("points = 5", "points = 1", ["grid.temperature", "'points'", "from 2 to"]),
    ("points = 5", "points = 5, pionts = 3", ["grid.temperature", "pionts", "'start'"]),
    ('title = "Invented test case"', "", ["title", "required key is missing"]),
    (
        'title = "Invented test case"',
        'title = "x"\ngas = "vdw"',
        ["gas = 'vdw'", "'ideal'", "'peng-robinson'", "'srk'"],
    ),
    ('title = "Invented test case"', 'title = "x"\ndata = "nist"', ["data = 'nist'", "'janaf'"]),
    ("N2 = 1,", "N2 = -1,", ["feed.components.N2 = -1", ">= 0"]),
    ("N2 = 1,", 'N2 = "1 kmol/h",', ["feed", "mix molar flows"]),
    ("N2 = 1,", 'N2 = "1 bar",', ["feed.components.N2 = '1 bar'", "molar flow", "kmol/h"]),
    ('reactions = ["N2 + 3 H2 = 2 NH3"]', "reactions = []", ["reactions = []", "at least 1 item"]),
    (
        'title = "Invented test case"',
        'title = "x"\nconversion_of = "NH3"',
        ["conversion_of = 'NH3'", "not a feed component", "['H2', 'N2']"],
    ),
    (
        "H2 = 3 }",
        'H2 = 3 }\nparameter = { kind = "H2N2", values = [2, 3] }',
        ["feed.parameter.kind = 'H2N2'", "'H2_to_N2'", "'steam_to_carbon'"],
    ),
    (
        "H2 = 3 }",
        'H2 = 3 }\nparameter = { kind = "H2_to_N2", values = [3, 2] }',
        ["feed.parameter.values = [3, 2]", "increase"],
    ),
    (
        "H2 = 3 }",
        'H2 = 3 }\nparameter = { kind = "H2_to_N2", values = [3], inert = {} }',
        ["feed.parameter.inert", "unknown key", "inerts"],
    ),
    (
        "H2 = 3 }",
        'H2 = 3 }\nparameter = { kind = "H2_to_N2", values = [3], inerts = {Ar = 2} }',
        ["feed.parameter.inerts.Ar = 2", "less than 1"],
    ),
    (
        "[grid]",
        "[targets]\nconversion = [1.2]\n[grid]",
        ["targets.conversion[0] = 1.2", "less than 1"],
    ),
    (
        "[grid]",
        '[staging]\ninlet_temperature = "400 degC"\npressure = "200 bar"\n[grid]',
        ["staging", "exactly one of 'beds' and 'target_conversion'"],
    ),
    (
        "[grid]",
        '[[species]]\nkey = "X"\nformula = "N2"\nenthalpy_of_formation = "0 kJ/mol"\n'
        'standard_entropy = "191 J/(mol K)"\nsource = "invented"\n'
        'heat_capacity = { kind = "constant", valu = "29 J/(mol K)" }\n[grid]',
        ["species[0].heat_capacity.valu", "unknown key", "value"],
    ),
    ('pressure = "150 bar"', 'pressure = "150 bar"\nx = ', ["not valid TOML", "line"]),
]


@pytest.mark.parametrize(("old", "new", "words"), BAD)
def test_malformed_case_names_key_value_and_expectation(old, new, words):
    assert old in MINIMAL
    with pytest.raises(CaseFileError) as info:
        parse_case(MINIMAL.replace(old, new), source="bad.toml")
    msg = str(info.value)
    assert msg.startswith("case file bad.toml: ")
    assert "\n" not in msg
    for w in words:
        assert w in msg, msg


def test_several_problems_are_counted():
    text = MINIMAL.replace('"150 bar"', "150").replace('"350 degC"', '"-300 degC"')
    with pytest.raises(CaseFileError, match=r"and 1 more problem\)"):
        parse_case(text)


def test_missing_file_is_a_case_file_error(tmp_path):
    with pytest.raises(CaseFileError, match="does not exist"):
        load_case(tmp_path / "nope.toml")


# ----------------------------------------------------------------------------- schema
def test_shipped_schema_is_the_generated_one():
    shipped = (ROOT / "data" / "case.schema.json").read_text(encoding="utf-8")
    assert shipped == schema_text(), "regenerate with eqconv.case.load.write_schema"


def test_schema_is_valid_and_accepts_every_shipped_case():
    jsonschema = pytest.importorskip("jsonschema")
    schema = case_schema()
    jsonschema.Draft202012Validator.check_schema(schema)
    validator = jsonschema.Draft202012Validator(schema)
    for path in [*DATA_CASES, DEMO_CASE]:
        raw = tomllib.loads(path.read_text(encoding="utf-8"))
        errors = [e.message for e in validator.iter_errors(raw)]
        assert not errors, (path.name, errors)


def test_schema_rejects_what_the_models_reject():
    jsonschema = pytest.importorskip("jsonschema")
    validator = jsonschema.Draft202012Validator(case_schema())
    for old, new in [
        ('"150 bar"', '"150 bars"'),
        ('"150 bar"', "150"),
        ('title = "Invented test case"', 'title = "x"\ncolour = 1'),
    ]:
        raw = tomllib.loads(MINIMAL.replace(old, new))
        assert list(validator.iter_errors(raw)), new


def test_schema_carries_the_caution_and_units():
    schema = case_schema()
    assert "thermodynamic ceiling, not a design" in schema["description"]
    text = json.dumps(schema)
    assert "degC" in text and "kmol/h" in text and "barg" in text


def test_write_schema_never_overwrites(tmp_path):
    p = write_schema(tmp_path / "s.json")
    assert json.loads(p.read_text(encoding="utf-8")) == case_schema()
    with pytest.raises(InputError, match="exists"):
        write_schema(p)
    write_schema(p, overwrite=True)


# ------------------------------------------------------------------------ data cases
def test_there_are_at_least_three_invented_scenarios():
    assert len(DATA_CASES) >= 3
    for path in [*DATA_CASES, DEMO_CASE]:
        head = path.read_text(encoding="utf-8").split("\n\n")[0].lower()
        assert head.startswith("#") and "invented" in head, path.name


@pytest.fixture(scope="module")
def results():
    from eqconv.case.run import run_case

    return {p.stem: run_case(load_case(p)) for p in DATA_CASES}


def test_every_data_case_runs_and_writes(results, tmp_path):
    for name, res in results.items():
        text = res.summary()
        assert res.case.title in text and CAUTION in text
        files = res.write(tmp_path / name)
        names = {f.name for f in files}
        assert {"summary.txt", "results.json", "case.json", "data_report.csv"} <= names, name
        assert all(f.stat().st_size > 0 for f in files)
        back = json.loads((tmp_path / name / "results.json").read_text(encoding="utf-8"))
        assert back["caution"] == CAUTION and back["key"] == res.key
        with pytest.raises(InputError, match="exists"):
            res.write(tmp_path / name)


def test_data_cases_obey_le_chatelier(results):
    # common practice (Le Chatelier): Δn < 0 and exothermic: conversion rises with P, falls
    # with T; Δn = 0: ideal-gas conversion does not depend on P; reforming (Δn > 0,
    # endothermic) the reverse
    amm = results["ammonia_loop"].conversion
    assert np.all(np.diff(amm, axis=1) > 0) and np.all(np.diff(amm, axis=0) < 0)
    so2 = results["so2_converter"].conversion
    assert np.all(np.diff(so2, axis=1) > 0) and np.all(np.diff(so2, axis=0) < 0)
    shift = results["shift_converter"].conversion
    assert np.all(np.diff(shift, axis=0) < 0)
    np.testing.assert_allclose(shift, shift[:, :1] * np.ones_like(shift), rtol=1e-9)
    ref = results["steam_reformer"].conversion
    assert np.all(np.diff(ref, axis=1) < 0) and np.all(np.diff(ref, axis=0) > 0)


def test_target_limits_agree_with_the_grid(results):
    # the exact temperature limit at each grid pressure brackets the grid conversions
    res = results["ammonia_loop"]
    assert res.case.grid is not None
    T = np.asarray(res.case.grid.temperature)
    for tl in res.temperature_limits:
        target = float(np.ravel(tl.target)[0])
        for j, (t_root, ok) in enumerate(zip(tl.value, tl.reachable, strict=True)):
            assert ok
            below, above = res.conversion[T < t_root, j], res.conversion[T > t_root, j]
            assert np.all(below >= target) and np.all(above <= target)


def test_pressure_limits_and_plots_use_the_design_feed(results):
    # a swept feed parameter adds a dimension to the sweep files, but the table, the target
    # contours and the maps all belong to the design feed
    res = results["steam_reformer"]
    assert res.case.grid is not None and res.sweep is not None
    assert "steam_to_carbon" in res.sweep["conversion"].dims
    np.testing.assert_allclose(
        res.design_sweep["conversion"].transpose("T", "P").values, res.conversion, rtol=1e-12
    )
    P = np.asarray(res.case.grid.pressure)
    for pl in res.pressure_limits:  # Δn > 0: the target is met at or below the root
        target = float(np.ravel(pl.target)[0])
        for i, (p_root, ok) in enumerate(zip(pl.value, pl.reachable, strict=True)):
            if ok:
                assert np.all(res.conversion[i, P < p_root] >= target)
                assert np.all(res.conversion[i, P > p_root] <= target)


def test_staging_beds_climb_and_stay_under_equilibrium(results):
    from eqconv.studies import equilibrium_conversion

    for name in ("so2_converter", "ammonia_loop", "shift_converter"):
        res = results[name]
        s = res.staging
        assert s is not None and s.n_beds == res.case.staging.beds  # type: ignore[union-attr]
        assert np.all(np.diff(s.conversion_out) > 0)
        assert np.all(s.T_out > s.T_in)  # exothermic beds heat up
        x_eq = equilibrium_conversion(res.reactions, res.feed, s.T_out, s.P, key=s.key)
        assert np.all(s.conversion_out <= x_eq + 1e-9)


def test_so2_converter_reaches_a_high_conversion(results):
    # common practice: four intercooled beds without interpass absorption reach ~97-98 %
    s = results["so2_converter"].staging
    assert 0.95 < s.conversion_out[-1] < 0.995


# ------------------------------------------------------------- external checks via a case
AMMONIA_CHECK = """
title = "Invented check case: 3:1 synthesis gas"
data = "janaf"
reactions = ["N2 + 3 H2 = 2 NH3"]
conversion_of = "N2"
[feed]
components = { N2 = "1 kmol/h", H2 = "3 kmol/h" }
[grid]
temperature = ["400 degC", "426.85 degC", "500 degC"]
pressure = ["10 atm", "100 atm"]
"""


@pytest.fixture(scope="module")
def ammonia_check():
    from eqconv.case.run import run_case

    res = run_case(parse_case(AMMONIA_CHECK), sweep=False)
    X = res.conversion  # N2 conversion; rows 673.15, 700, 773.15 K; columns 10, 100 atm
    return 100.0 * 2.0 * X / (4.0 - 2.0 * X)  # mol % NH3 (3:1 feed)


def test_ammonia_case_at_a_janaf_row_matches_the_closed_form(ammonia_check):
    # NIST-JANAF 4th ed. (1998), table H-083 (NH3, g): log Kf(700 K) = -2.029 (printed to
    # 0.001, so K to 0.23 %); /work/shared/REFERENCES.md §3 (exact identity, stoichiometric
    # feed, ideal gas): ε = 1 − (1 + 1.2990 K P/p°)^(−½) per mol NH3, y_NH3 = ε / (2 − ε)
    K = 10.0**-2.029
    for j, P_atm in enumerate((10.0, 100.0)):
        eps = 1.0 - (1.0 + 3.0 * math.sqrt(3.0) / 4.0 * K * P_atm * 1.01325) ** -0.5
        assert ammonia_check[1, j] == pytest.approx(100.0 * eps / (2.0 - eps), rel=1.5e-3)


def test_ammonia_case_matches_the_ideal_gas_janaf_column(ammonia_check):
    # /work/shared/REFERENCES.md §2, "ideal gas with JANAF K" column (derived, 0.01 mol %).
    # That column interpolates JANAF log Kf between table rows (673.15 and 773.15 K are not
    # rows) while data="janaf" interpolates H and S; K differs by up to ~0.3 %, which moves
    # y_NH3 by up to rel 2e-3: that sets the tolerance.
    expected = np.array([[4.05, 24.84], [1.27, 10.42]])
    np.testing.assert_allclose(ammonia_check[[0, 2]], expected, rtol=2.5e-3)


SHIFT_CHECK = """
title = "Invented check case: equimolar shift"
data = "janaf"
reactions = ["CO + H2O = CO2 + H2"]
conversion_of = "H2O"
[feed]
components = { CO = 1, H2O = 1 }
[grid]
temperature = "1100 K"
pressure = ["1 bar", "10 bar"]
"""


def test_shift_case_matches_the_textbook_example():
    from eqconv.case.run import run_case

    res = run_case(parse_case(SHIFT_CHECK), sweep=False)
    # Smith, Van Ness & Abbott, 7th ed., ch. 13 (memory): K ≈ 1 at 1100 K, fraction of steam
    # reacted 0.5 at 1 and 10 bar; with JANAF K(1100 K) = 0.991 it is 0.499
    # (/work/shared/REFERENCES.md §3)
    np.testing.assert_allclose(res.conversion, 0.499, atol=6e-4)
    K = res.reactions[0].K(1100.0)
    assert res.conversion[0, 0] == pytest.approx(math.sqrt(K) / (1 + math.sqrt(K)), rel=1e-9)


USER_SPECIES = """
title = "Invented check case: ammonia from user data"
data = "janaf"
reactions = ["N2 + 3 H2 = 2 NH3u"]
conversion_of = "N2"
[[species]]
key = "NH3u"
formula = "NH3"
name = "ammonia (user data)"
# NIST-JANAF 4th ed. (1998), table H-083: ΔfH° and S° at 298.15 K (read)
enthalpy_of_formation = "-45.898 kJ/mol"
standard_entropy = "192.774 J/(mol K)"
source = "JANAF 298.15 K values with the NIST WebBook Shomate Cp of NH3 (value from memory)"
[species.heat_capacity]
kind = "shomate"
coefficients = [19.99563, 49.77119, -15.37599, 1.921168, 0.189174]
low_temperature = "298 K"
high_temperature = "1400 K"
[feed]
components = { N2 = 1, H2 = 3 }
[grid]
temperature = ["400 degC", "500 degC"]
pressure = ["50 bar", "200 bar"]
"""


def test_user_species_case_runs_and_agrees_with_janaf_ammonia():
    from eqconv.case.run import run_case
    from eqconv.report import data_report

    user = run_case(parse_case(USER_SPECIES), sweep=False)
    ref = run_case(
        parse_case(
            USER_SPECIES.replace("NH3u", "NH3").split("[[species]]")[0]
            + "[feed]"
            + USER_SPECIES.split("[feed]")[1]
        ),
        sweep=False,
    )
    # same ΔfH° and S°; Cp from a Shomate fit instead of the JANAF table (measured: 3e-4)
    np.testing.assert_allclose(user.conversion, ref.conversion, rtol=1e-3)
    sources = {r["source"] for r in data_report(user.reactions).rows if r["species"] == "NH3u"}
    assert any("value from memory" in s for s in sources)


def test_bad_user_species_names_its_entry():
    from eqconv.case.run import run_case

    bad = USER_SPECIES.replace('formula = "NH3"', 'formula = "Qx3"')
    with pytest.raises(CaseFileError, match=r"species\[0\] \(NH3u\)"):
        run_case(parse_case(bad), sweep=False)
