"""Tests of species resolution, data provenance, user species, overrides and the data report.

External checks: REFERENCES.md §1 (NIST-JANAF and ATcT formation data), §5 (pitfalls of the
property libraries, measured on thermo 0.6.1 / chemicals 1.5.2), NIST-JANAF tables through
the ``janaf`` package, and chemicals' own source lists (``chemicals.reaction.Hfg_methods``).
"""

from __future__ import annotations

import json
import warnings

import janaf
import numpy as np
import pytest
from chemicals import reaction as rx
from thermo import HeatCapacityGas

from eqconv import (
    AmbiguousSpeciesError,
    InputError,
    MissingDataError,
    RangeWarning,
    Reaction,
    Species,
    SpeciesError,
    UnknownSpeciesError,
    data_report,
    get_species,
    user_species,
)
from eqconv.constants import T_REF
from eqconv.cp import TRCCp
from eqconv.identify import resolve

COMMON_GASES = [
    "H2",
    "N2",
    "O2",
    "NH3",
    "H2O",
    "CO",
    "CO2",
    "CH4",
    "SO2",
    "SO3",
    "NO",
    "NO2",
    "N2O",
    "H2S",
    "HCl",
    "C2H2",
    "C2H4",
]


# ------------------------------------------------------------------ resolution
def test_formula_with_isomers_is_ambiguous() -> None:
    with pytest.raises(AmbiguousSpeciesError) as info:
        get_species("C2H6O")
    msg = str(info.value)
    # chemicals' database holds both C2H6O isomers (REFERENCES.md §5: a formula look-up
    # there silently returns dimethyl ether)
    assert "ethanol" in msg and "dimethyl ether" in msg
    assert "64-17-5" in msg and "115-10-6" in msg
    assert "name or CAS" in msg
    assert isinstance(info.value, SpeciesError) and isinstance(info.value, ValueError)


@pytest.mark.parametrize("text", ["", "   ", "unobtainium", "7664-41-8", "(g)"])
def test_empty_or_unknown_never_resolves(text: str) -> None:
    # REFERENCES.md §5: chemicals resolves an empty string to a metal; eqconv must not
    with pytest.raises(UnknownSpeciesError) as info:
        get_species(text)
    assert isinstance(info.value, LookupError) and isinstance(info.value, ValueError)
    if text.strip():
        assert text.strip() in str(info.value)


def test_integer_cas_is_rejected() -> None:
    # REFERENCES.md §5: an integer CAS can select another source than the string CAS
    with pytest.raises(UnknownSpeciesError, match="7664417"):
        get_species(7664417)  # type: ignore[arg-type]


@pytest.mark.parametrize("data", ["default", "janaf"])
def test_formula_name_and_cas_give_the_same_object(data: str) -> None:
    by_formula = get_species("NH3", data=data)
    assert get_species("ammonia", data=data) is by_formula
    assert get_species("7664-41-7", data=data) is by_formula
    assert get_species("Ammonia", data=data) is by_formula
    assert get_species("NH3(g)", data=data) is by_formula
    assert by_formula.key == "NH3" and by_formula.cas == "7664-41-7"
    assert by_formula.atoms == {"N": 1, "H": 3}
    assert get_species(by_formula) is by_formula


def test_isomers_by_cas_keep_distinct_labels() -> None:
    """Ethanol and dimethyl ether by CAS number must not share one label."""
    ethanol, dme = resolve("64-17-5"), resolve("115-10-6")
    assert ethanol.cas == "64-17-5" and dme.cas == "115-10-6"
    assert ethanol.key != dme.key
    # one chemical, one label, however it was typed
    assert resolve("ethanol").key == ethanol.key
    assert resolve("dimethyl ether").key == dme.key


def test_unknown_data_source() -> None:
    with pytest.raises(InputError, match="handbook-x"):
        get_species("NH3", data="handbook-x")


# ------------------------------------------------------------------ provenance
@pytest.mark.parametrize("data", ["default", "janaf"])
@pytest.mark.parametrize("key", COMMON_GASES)
def test_every_datum_has_a_source(data: str, key: str) -> None:
    sp = get_species(key, data=data)
    assert sp.data == data
    assert set(sp.sources) == {"hf298", "s298", "cp"}
    assert all(isinstance(v, str) and v.strip() for v in sp.sources.values())
    assert sp.cp_model.method
    lo, hi = sp.T_range
    assert 0.0 < lo <= T_REF < hi
    # an element in its reference state has ΔfH° = 0 exactly, by definition
    element_ref = len(sp.atoms) == 1 and sp.hf298 == 0.0
    assert (sp.u_hf298 == 0.0) if element_ref else (sp.u_hf298 > 0.0)
    assert sp.u_s298 > 0.0 and sp.u_cp_rel > 0.0
    if data == "janaf":
        assert "NIST-JANAF" in sp.sources["hf298"]


@pytest.mark.parametrize("key", COMMON_GASES)
def test_default_formation_enthalpy_is_never_an_estimate(key: str) -> None:
    sp = get_species(key)
    # REFERENCES.md §5: TRC and Joback values can be far off (Joback gives O2 −427 kJ/mol)
    for word in ("TRC", "Joback", "JOBACK", "API"):
        assert word not in sp.sources["hf298"]
    # and the value is the one chemicals lists under the source named
    method = {
        "Active Thermochemical Tables": "ATCT_G",
        "NIST Chemistry WebBook": "WEBBOOK",
        "CRC Handbook": "CRC",
        "NIST-JANAF": "JANAF",
        "Yaws": "YAWS",
    }
    tag = next(m for label, m in method.items() if sp.sources["hf298"].startswith(label))
    assert sp.hf298 == pytest.approx(rx.Hfg(sp.cas, method=tag), abs=1e-9)


def test_oxygen_takes_atct_not_joback() -> None:
    # chemicals lists a Joback estimate for O2 (REFERENCES.md §5: −427 kJ/mol)
    assert "JOBACK" in rx.Hfg_methods("7782-44-7")
    o2 = get_species("O2")
    assert o2.hf298 == 0.0
    assert o2.sources["hf298"].startswith("Active Thermochemical Tables")


@pytest.mark.parametrize(
    "cas",
    [
        "6004-44-0",  # methylketene: chemicals has only TRC and Joback values
        "460-16-2",  # 1-chloro-2-fluoroethene: Joback only
    ],
)
def test_estimate_only_formation_enthalpy_raises(cas: str) -> None:
    methods = rx.Hfg_methods(cas)
    assert methods and set(methods) <= {"TRC", "JOBACK"}
    # chemicals' default would silently return the estimate ...
    assert rx.Hfg(cas) is not None
    # ... eqconv refuses and says why
    with pytest.raises(MissingDataError, match="estimates are not used"):
        get_species(cas)


def test_propane_formation_enthalpy_is_not_the_trc_value() -> None:
    sp = get_species("C3H8")
    # REFERENCES.md §5: propane ΔfH° is −104.7 kJ/mol; the TRC value −82.4 is far off.
    # Sources differ by a few tenths of a kJ/mol (ATcT −104.39 in chemicals 1.5.2).
    assert sp.hf298 / 1e3 == pytest.approx(-104.7, abs=0.5)
    assert "TRC" not in sp.sources["hf298"]


def test_default_ammonia_is_atct() -> None:
    sp = get_species("NH3")
    # REFERENCES.md §1 (read): ATcT ΔfH°(NH3, g) = −45.556 ± 0.029 kJ/mol
    assert sp.hf298 / 1e3 == pytest.approx(-45.556, abs=0.029)
    assert sp.sources["hf298"].startswith("Active Thermochemical Tables")
    # REFERENCES.md §1: JANAF's value is 0.34 kJ/mol more negative
    assert (sp.hf298 - get_species("NH3", data="janaf").hf298) / 1e3 == pytest.approx(
        0.34, abs=0.005
    )


# ------------------------------------------------------------------ default Cp choice
@pytest.mark.parametrize(
    ("key", "table", "thermo_error"),
    [
        # REFERENCES.md §5 (measured on thermo 0.6.1): thermo's default Cp method at 1000 K
        # is +5 % (CH4), +17 % (C2H4), +10 % (SO2) off, printed to 1 %
        ("CH4", "C-067", 0.05),
        ("C2H4", "C-128", 0.17),
        ("SO2", "O-034", 0.10),
    ],
)
def test_default_cp_is_not_a_narrow_fit_extrapolated(
    key: str, table: str, thermo_error: float
) -> None:
    df = janaf.Table(table).df
    cp_janaf = float(df.filter(df["T(K)"] == 1000.0)["Cp"].to_numpy()[0])
    sp = get_species(key)
    with warnings.catch_warnings():
        warnings.simplefilter("error", RangeWarning)  # 1000 K is inside the chosen fit
        cp = float(sp.cp(1000.0))
    # NIST-JANAF 4th ed. (1998), Cp° at 1000 K; REFERENCES.md §5: Shomate within 0.1 %,
    # asked here within 1 %
    assert cp == pytest.approx(cp_janaf, rel=0.01)
    assert sp.T_range[1] >= 1000.0
    # thermo's own default would be off by the quoted amount (±0.5 % for the rounding)
    obj = HeatCapacityGas(CASRN=sp.cas)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        cp_thermo = obj.T_dependent_property(1000.0)
    assert cp_thermo / cp_janaf - 1.0 == pytest.approx(thermo_error, abs=0.005)
    assert obj.T_limits[obj.method][1] < 1000.0


@pytest.mark.parametrize("key", ["C2H6", "C3H8", "CH3OH"])
def test_species_without_shomate_use_the_trc_correlation(key: str) -> None:
    # thermo 0.6.1 has no NIST Shomate constants for these; the ranking says TRC next
    sp = get_species(key)
    assert isinstance(sp.cp_model, TRCCp)
    assert "TRC" in sp.sources["cp"]
    assert sp.T_range[1] >= 1000.0


def test_extrapolation_warns() -> None:
    sp = get_species("CH4")
    hi = sp.T_range[1]
    with pytest.warns(RangeWarning, match="CH4"):
        sp.cp(hi + 500.0)
    with pytest.raises(InputError):
        sp.cp(-5.0)


# ------------------------------------------------------------------ user species
BASE = {
    "key": "X2",
    "formula": "N2",
    "hf298": 0.0,
    "s298": 191.6,
    "cp": {"kind": "constant", "value": 29.1},
    "source": "invented test datum",
}


def test_user_species_valid() -> None:
    sp = user_species(**BASE)
    assert isinstance(sp, Species)
    assert sp.data == "user"
    assert sp.sources == {k: "invented test datum" for k in ("hf298", "s298", "cp")}
    assert float(sp.cp(500.0)) == 29.1
    assert sp.T_range == (200.0, 1500.0)


@pytest.mark.parametrize(
    ("changes", "names"),
    [
        ({"colour": "blue"}, "colour"),  # unknown key
        ({"source": None}, "source"),  # missing source (None = drop the key)
        ({"source": ""}, "source"),
        ({"cp": {"kind": "cubic", "coeffs": (1.0, 2.0)}}, "cp.kind"),  # bad Cp kind
        ({"cp": {"kind": "constant", "value": 29.1, "foo": 1}}, "cp.foo"),
        ({"cp": {"kind": "constant"}}, "value"),
        ({"cp": {"kind": "shomate", "coeffs": (1.0, 2.0, 3.0, 4.0)}}, "shomate"),
        ({"cp": {"kind": "nasa7", "coeffs": (1.0,) * 6}}, "6"),
        ({"cp": {"kind": "constant", "value": 29.1, "T_min": 900.0, "T_max": 300.0}}, "T_min"),
        ({"s298": -1.0}, "s298"),
        ({"hf298": "abc"}, "hf298"),
        ({"hf298": float("nan")}, "hf298"),
        ({"key": ""}, "key"),
    ],
)
def test_user_species_errors_name_the_key(changes: dict[str, object], names: str) -> None:
    fields = {**BASE, **changes}
    fields = {k: v for k, v in fields.items() if v is not None}
    with pytest.raises(InputError, match=names):
        user_species(**fields)


def test_user_species_bad_formula() -> None:
    with pytest.raises(UnknownSpeciesError, match="Xx"):
        user_species(**{**BASE, "formula": "Xx2"})


def test_user_species_in_a_reaction() -> None:
    # NIST-JANAF 4th ed. (1998), table H-083 (REFERENCES.md §1) typed in by a user, with a
    # constant Cp: at 298.15 K the reaction must agree with the JANAF data set exactly
    nh3 = user_species(
        key="NH3",
        formula="NH3",
        hf298=-45898.0,
        s298=192.774,
        cp={"kind": "constant", "value": 35.652, "T_min": 250.0, "T_max": 400.0},
        source="NIST-JANAF 1998, H-083 (typed in)",
    )
    rxn = Reaction("1/2 N2 + 3/2 H2 = NH3", data="janaf", species=[nh3])
    ref = Reaction("1/2 N2 + 3/2 H2 = NH3", data="janaf")
    assert rxn.species[2] is nh3
    assert float(rxn.ln_K(T_REF)) == pytest.approx(float(ref.ln_K(T_REF)), abs=1e-9)


# ------------------------------------------------------------------ overrides
def test_replace_records_the_override_source() -> None:
    nh3 = get_species("NH3")
    janaf_hf = get_species("NH3", data="janaf").hf298
    over = nh3.replace(hf298=janaf_hf, note="NIST-JANAF 1998, table H-083")
    assert over.sources["hf298"] == "NIST-JANAF 1998, table H-083"
    assert over.sources["s298"] == nh3.sources["s298"]
    assert over.sources["cp"] == nh3.sources["cp"]
    assert over.hf298 == janaf_hf and over.s298 == nh3.s298
    # the original is untouched and still cached
    assert nh3.sources["hf298"].startswith("Active Thermochemical Tables")
    assert get_species("NH3") is nh3
    # the override reaches the reaction: ΔrH° moves by exactly the change
    base = Reaction("N2 + 3 H2 = 2 NH3")
    changed = Reaction("N2 + 3 H2 = 2 NH3", species=[over])
    assert changed.delta_H0 - base.delta_H0 == pytest.approx(2 * (janaf_hf - nh3.hf298), abs=1e-9)


def test_replace_cp_model_and_default_note() -> None:
    nh3 = get_species("NH3")
    jan = get_species("NH3", data="janaf")
    over = nh3.replace(cp_model=jan.cp_model)
    assert over.sources["cp"] == "user override"
    assert over.cp_model is jan.cp_model


def test_replace_rejects_unknown_fields() -> None:
    with pytest.raises(InputError, match="key"):
        get_species("NH3").replace(key="ammonia2")
    with pytest.raises(InputError, match="hf298"):
        get_species("NH3").replace(hf298=float("inf"))


# ------------------------------------------------------------------ data report
def _report_reactions() -> list[Reaction]:
    return [
        Reaction("N2 + 3 H2 = 2 NH3"),
        Reaction("1/2 N2 + 3/2 H2 = NH3"),
        Reaction("CO + H2O = CO2 + H2", data="janaf"),
    ]


def test_data_report_lists_every_species_once() -> None:
    rxns = _report_reactions()
    rep = data_report([*rxns, get_species("NH3")])
    entries = {(r["species"], r["data"]) for r in rep.rows}
    assert entries == {
        ("N2", "default"),
        ("H2", "default"),
        ("NH3", "default"),
        ("CO", "janaf"),
        ("H2O", "janaf"),
        ("CO2", "janaf"),
        ("H2", "janaf"),
    }
    # three rows (ΔfH°, S°, Cp°) for each species, never repeated
    assert len(rep.rows) == 3 * len(entries)
    quantities = [(r["species"], r["data"], r["quantity"]) for r in rep.rows]
    assert len(set(quantities)) == len(quantities)


def test_data_report_rows_carry_sources_and_ranges() -> None:
    rep = data_report(_report_reactions())
    species = {(sp.key, sp.data): sp for rxn in _report_reactions() for sp in rxn.species}
    for row in rep.rows:
        sp = species[(row["species"], row["data"])]
        assert row["CAS"] == sp.cas
        assert row["source"]
        if row["quantity"].startswith("ΔfH"):
            assert row["source"] == sp.sources["hf298"]
            assert float(row["value"]) == pytest.approx(sp.hf298 / 1e3, abs=5e-4)
        elif row["quantity"].startswith("S°"):
            assert row["source"] == sp.sources["s298"]
        else:
            assert row["source"] == sp.sources["cp"]
            lo, hi = sp.T_range
            assert f"{lo:g}" in row["valid range"] and f"{hi:g}" in row["valid range"]
    text = str(rep)
    for key in ("NH3", "CO2", "NIST-JANAF", "Active Thermochemical Tables"):
        assert key in text


def test_data_report_export_never_overwrites(tmp_path: object) -> None:
    from pathlib import Path

    path = Path(str(tmp_path))
    rep = data_report(_report_reactions())
    csv_file, json_file = path / "data.csv", path / "data.json"
    text = rep.to_csv(csv_file)
    with open(csv_file, encoding="utf-8", newline="") as fh:  # csv writes \r\n line ends
        assert fh.read() == text
    assert text.splitlines()[0].startswith("species,CAS,data,quantity")
    assert len(text.strip().splitlines()) == 1 + len(rep.rows)
    rep.to_json(json_file)
    assert json.loads(json_file.read_text(encoding="utf-8"))["rows"] == list(rep.rows)
    # an existing file is left alone unless overwrite=True
    for f, write in ((csv_file, rep.to_csv), (json_file, rep.to_json)):
        f.write_text("keep me", encoding="utf-8")
        with pytest.raises(InputError, match=f.name):
            write(f)
        assert f.read_text(encoding="utf-8") == "keep me"
        write(f, overwrite=True)
        assert f.read_text(encoding="utf-8") != "keep me"


def test_data_report_rejects_other_items() -> None:
    with pytest.raises(InputError):
        data_report(["NH3"])  # type: ignore[list-item]


# ------------------------------------------------------------------ species thermodynamics
def test_species_properties_against_janaf_rows() -> None:
    sp = get_species("NH3", data="janaf")
    df = janaf.Table("H-083").df
    rows = df.filter(df["T(K)"].is_in([500.0, 1000.0]))
    T = rows["T(K)"].to_numpy()
    # NIST-JANAF 4th ed. (1998), table H-083, rows at 500 and 1000 K
    np.testing.assert_allclose(sp.entropy(T), rows["S"].to_numpy(), rtol=0, atol=1e-9)
    np.testing.assert_allclose(
        sp.enthalpy(T) - sp.hf298, rows["H-H(Tr)"].to_numpy() * 1e3, rtol=0, atol=1e-6
    )
    gef = rows["-[G-H(Tr)]/T"].to_numpy()  # −(G − H298)/T, printed to 0.001 J/(mol K)
    from eqconv.constants import R

    mu = sp.mu0_over_RT(T) * R * T  # H − T S on the formation scale
    np.testing.assert_allclose(-(mu - sp.hf298) / T, gef, rtol=0, atol=1e-3)
