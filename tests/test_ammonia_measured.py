"""Ammonia synthesis equilibrium against measured data, ideal gas and cubic EOS.

Sources (REFERENCES.md §2): Larson & Dodge, J. Am. Chem. Soc. 45, 2918 (1923), 10-100 atm,
and Larson, J. Am. Chem. Soc. 46, 367 (1924), 300-1000 atm (measured, citations and values
from memory); Gillespie, Proc. Natl. Acad. Sci. 11 (1925), whose fit of those data (the
"fit" column, derived from the equations read) is the experimental reference here: about
±2 % up to 300 atm and ±3 % above. Gillespie & Beattie, Phys. Rev. 36, 743 (1930)
(coefficients from memory): thermodynamic K of 1/2 N2 + 3/2 H2 = NH3 in atm⁻¹. Dyson &
Simon, Ind. Eng. Chem. Fundam. 7, 605 (1968) (memory): pure-gas φ fits, used here with the
Lewis fugacity rule (φ_i in the mixture = φ of pure i at T, P) as a second opinion.

Feed 3:1 H2:N2, NH3 mol % at equilibrium; deviation relative to the fit column in
brackets. "default" = eqconv's default data (ATcT ΔfH° of NH3), "JANAF" = NIST-JANAF (1998),
"G&B" = the Gillespie & Beattie K fed straight to the solver (same K for every model of its
group). PR = Peng-Robinson, SRK = Soave-Redlich-Kwong, k_ij from thermo's database (PR: N2-H2
0.0711, N2-NH3 0.2193; H2-NH3 missing, 0; SRK: no table, all 0); D&S = Lewis rule with the
Dyson & Simon φ and the default K.

Default data (eqconv's default: ATcT ΔfH° of NH3):

| T, P | fit | meas. | default ideal | default PR | default SRK | D&S (default K) |
|---|---|---|---|---|---|---|
| 400 °C, 10 atm | 3.80 | 3.85 | 3.84 (+1.0) | 3.86 (+1.5) | 3.86 (+1.5) | 3.94 (+3.7) |
| 400 °C, 100 atm | 25.13 | 25.1 | 23.98 (−4.6) | 25.12 (−0.0) | 25.10 (−0.1) | 25.82 (+2.7) |
| 400 °C, 300 atm | 46.70 | 47.0 | 41.95 (−10.2) | 46.92 (+0.5) | 46.97 (+0.6) | 47.56 (+1.8) |
| 400 °C, 1000 atm | 79.99 | 79.8 | 61.50 (−23.1) | 74.91 (−6.3) | 75.50 (−5.6) | 73.54 (−8.1) |
| 500 °C, 10 atm | 1.22 | 1.20 | 1.20 (−1.3) | 1.21 (−0.9) | 1.21 (−1.0) | 1.19 (−2.5) |
| 500 °C, 100 atm | 10.45 | 10.4 | 9.99 (−4.4) | 10.36 (−0.9) | 10.35 (−1.0) | 10.61 (+1.6) |
| 500 °C, 300 atm | 26.26 | 26.44 | 22.33 (−15.0) | 24.53 (−6.6) | 24.50 (−6.7) | 26.25 (−0.1) |
| 500 °C, 1000 atm | 57.42 | 57.47 | 41.79 (−27.2) | 51.42 (−10.5) | 51.80 (−9.8) | 55.50 (−3.3) |

Other K sources (K, not the EOS, sets the low-pressure deviation):

| T, P | fit | JANAF ideal | JANAF PR | G&B ideal | G&B PR |
|---|---|---|---|---|---|
| 400 °C, 10 atm | 3.80 | 4.06 (+6.8) | 4.08 (+7.4) | 3.78 (−0.6) | 3.80 (−0.1) |
| 400 °C, 100 atm | 25.13 | 24.88 (−1.0) | 26.06 (+3.7) | 23.74 (−5.5) | 24.87 (−1.1) |
| 400 °C, 300 atm | 46.70 | 42.99 (−7.9) | 48.03 (+2.8) | 41.66 (−10.8) | 46.62 (−0.2) |
| 400 °C, 1000 atm | 79.99 | 62.39 (−22.0) | 75.65 (−5.4) | 61.26 (−23.4) | 74.71 (−6.6) |
| 500 °C, 10 atm | 1.22 | 1.27 (+3.9) | 1.27 (+4.3) | 1.19 (−2.6) | 1.19 (−2.2) |
| 500 °C, 100 atm | 10.45 | 10.43 (−0.1) | 10.82 (+3.5) | 9.89 (−5.4) | 10.25 (−1.9) |
| 500 °C, 300 atm | 26.26 | 23.09 (−12.1) | 25.35 (−3.5) | 22.14 (−15.7) | 24.33 (−7.3) |
| 500 °C, 1000 atm | 57.42 | 42.70 (−25.6) | 52.38 (−8.8) | 41.57 (−27.6) | 51.18 (−10.9) |

What the tables show (each statement is asserted below):

* Requirement met by both cubics with the default data: within 7 % of the fit at every point
  up to 300 atm (worst: 500 °C, 300 atm, PR −6.6 %, SRK −6.7 %) and closer than the ideal gas
  at every pressure ≥ 300 atm. PR is the recommended default for ammonia: it is the one with
  database k_ij; SRK runs with all k_ij = 0 and happens to land within 0.8 % of PR here.
  Against the measured column instead of the fit (values from memory), that worst point is
  −7.2 % (PR) and −7.3 % (SRK): just outside 7 %, inside the fit's stated ±2 % band of it.
* At ≥ 300 atm the cubics recover most of the non-ideality (−23 % → −6 % at 400 °C,
  1000 atm) but not all: both under-predict at 500 °C, 300-1000 atm with every K source
  (−3.5 to −11 %), so that gap is the equation of state (classical H2 constants,
  k_ij(H2-NH3) = 0), not K. The Dyson & Simon Lewis-rule φ does better there (−0.1 %, −3.3 %).
* Below about 100 atm the equation of state moves NH3 by ≤ 0.5 % at 10 atm, while the three
  K sources spread it by 7 %: JANAF's K (its NH3 ΔfH° is 0.34 kJ/mol more negative than
  ATcT's, REFERENCES.md §1) over-predicts by 4-7 % at 10 atm, the default (ATcT) and G&B K
  are within 2.6 %. The remaining low-pressure deviation comes from K, not from the EOS.
"""

from __future__ import annotations

import re
import warnings
from dataclasses import dataclass

import numpy as np
import pytest

from eqconv import DataWarning, Reaction, equilibrium, get_species
from eqconv.constants import P_ATM
from eqconv.extent_solver import solve_extents
from eqconv.fugacity import eos_setup, solve_fugacity

# REFERENCES.md §2: (T [°C], P [atm], NH3 mol % Gillespie (1925) fit, measured Larson &
# Dodge (1923) ≤ 100 atm / Larson (1924) ≥ 300 atm, values from memory)
POINTS = [
    (400.0, 10.0, 3.80, "3.85"),
    (400.0, 100.0, 25.13, "25.1"),
    (400.0, 300.0, 46.70, "47.0"),
    (400.0, 1000.0, 79.99, "79.8"),
    (500.0, 10.0, 1.22, "1.20"),
    (500.0, 100.0, 10.45, "10.4"),
    (500.0, 300.0, 26.26, "26.44"),
    (500.0, 1000.0, 57.42, "57.47"),
]
COLUMNS = (
    "default ideal",
    "default PR",
    "default SRK",
    "JANAF ideal",
    "JANAF PR",
    "G&B ideal",
    "G&B PR",
    "D&S (default K)",
)
KEYS = ("N2", "H2", "NH3")
NU = np.array([[-0.5, -1.5, 1.0]])
FEED = np.array([0.25, 0.75, 0.0])


def gillespie_beattie_ln_k(T: float) -> float:
    """ln K [atm⁻¹] of 1/2 N2 + 3/2 H2 = NH3, Gillespie & Beattie (1930), REFERENCES.md §2."""
    log10_k = -2.691122 * np.log10(T) - 5.519265e-5 * T + 1.848863e-7 * T**2 + 2001.6 / T + 2.6899
    return float(np.log(10.0) * log10_k)


def dyson_simon_ln_phi(T: float, p_atm: float) -> np.ndarray:
    """ln φ of pure N2, H2, NH3 (Dyson & Simon 1968, REFERENCES.md §2; T [K], P [atm])."""
    P = p_atm
    phi_n2 = 0.93431737 + 3.101804e-4 * T + 2.95896e-4 * P - 2.707279e-7 * T**2 + 4.775207e-7 * P**2
    phi_nh3 = (
        0.1438996 + 2.028538e-3 * T - 4.487672e-4 * P - 1.142945e-6 * T**2 + 2.761216e-7 * P**2
    )
    ln_phi_h2 = (
        np.exp(-3.8402 * T**0.125 + 0.541) * P
        - np.exp(-0.1263 * T**0.5 - 15.980) * P**2
        + 300.0 * np.exp(-0.011901 * T - 5.941) * (np.exp(-P / 300.0) - 1.0)
    )
    return np.array([np.log(phi_n2), ln_phi_h2, np.log(phi_nh3)])


def _y(n: np.ndarray) -> float:
    return float(100.0 * n[2] / n.sum())


@dataclass(frozen=True)
class Row:
    t_c: float
    p_atm: float
    fit: float
    measured: str  # as printed in REFERENCES.md §2
    values: dict[str, float]

    def dev(self, col: str) -> float:
        """Relative deviation from the fit [%]."""
        return 100.0 * (self.values[col] / self.fit - 1.0)


def deviation_table() -> list[Row]:
    """NH3 mol % of every model and data source at the REFERENCES.md §2 points."""
    rows = []
    cas = [get_species(k).cas for k in KEYS]
    gas = np.ones(3, dtype=bool)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", DataWarning)  # H2-NH3 k_ij missing: said above
        setup = eos_setup("peng-robinson", KEYS, cas, gas)
        for t_c, p_atm, fit, meas in POINTS:
            T, P = t_c + 273.15, p_atm * P_ATM
            v: dict[str, float] = {}
            for data in ("default", "janaf"):
                rxn = Reaction("1/2 N2 + 3/2 H2 = NH3", data=data)
                label = "default" if data == "default" else "JANAF"
                for g, name in (("ideal", "ideal"), ("peng-robinson", "PR"), ("srk", "SRK")):
                    if data == "janaf" and g == "srk":
                        continue
                    res = equilibrium(rxn, {"N2": 1.0, "H2": 3.0}, T, P, gas=g, check_phase=False)
                    v[f"{label} {name}"] = 100.0 * float(res.mole_fractions["NH3"])
            ln_k = gillespie_beattie_ln_k(T)  # atm⁻¹: solve with ln(P/1 atm)
            sol = solve_extents(NU, [ln_k], FEED, np.log(p_atm))
            v["G&B ideal"] = _y(sol.amounts)
            fs = solve_fugacity(NU, [ln_k], FEED, T, P, P_ATM, gas_mask=gas, eos=setup)
            assert bool(fs.phases.solution.converged)
            v["G&B PR"] = _y(fs.phases.solution.amounts)
            ln_k_def = float(Reaction("1/2 N2 + 3/2 H2 = NH3").ln_K(T))
            sol = solve_extents(
                NU, [ln_k_def], FEED, np.log(P / 1e5), ln_phi=dyson_simon_ln_phi(T, p_atm)
            )
            v["D&S (default K)"] = _y(sol.amounts)
            rows.append(Row(t_c, p_atm, fit, meas, v))
    return rows


TABLE_A = ("default ideal", "default PR", "default SRK", "D&S (default K)")
TABLE_B = ("JANAF ideal", "JANAF PR", "G&B ideal", "G&B PR")


def format_table(rows: list[Row], columns: tuple[str, ...], measured: bool = True) -> str:
    """Markdown table as in this module's docstring."""
    lead = ["T, P", "fit", *(["meas."] if measured else [])]
    out = ["| " + " | ".join([*lead, *columns]) + " |", "|" + "---|" * (len(lead) + len(columns))]
    for r in rows:
        cells = [f"{r.values[c]:.2f} ({r.dev(c):+.1f})".replace("-", "−") for c in columns]
        first = [f"{r.t_c:.0f} °C, {r.p_atm:.0f} atm", f"{r.fit:.2f}"]
        out.append("| " + " | ".join([*first, *([r.measured] if measured else []), *cells]) + " |")
    return "\n".join(out)


def format_tables(rows: list[Row]) -> str:
    """Both tables of the docstring."""
    return (
        "Default data (eqconv's default: ATcT ΔfH° of NH3):\n\n"
        + format_table(rows, TABLE_A)
        + "\n\nOther K sources (K, not the EOS, sets the low-pressure deviation):\n\n"
        + format_table(rows, TABLE_B, measured=False)
    )


@pytest.fixture(scope="module")
def table() -> list[Row]:
    return deviation_table()


def test_docstring_table_is_the_computed_one(table: list[Row]) -> None:
    # the table above is what the code gives now (0.01 mol % printed precision)
    doc = __doc__ or ""
    for r in table:
        line = next(
            ln for ln in doc.splitlines() if ln.startswith(f"| {r.t_c:.0f} °C, {r.p_atm:.0f} atm")
        )
        rest = doc[doc.index(line) + len(line) :]
        line_b = next(ln for ln in rest.splitlines() if ln.startswith(line[: line.index("atm")]))
        printed = [float(x) for x in re.findall(r"\| (\d+\.\d+) \(", line + line_b)]
        assert printed == pytest.approx([r.values[c] for c in TABLE_A + TABLE_B], abs=0.0051)


# ---------------------------------------------------------------------------- requirements
@pytest.mark.parametrize("model", ["default PR", "default SRK"])
def test_within_7_percent_up_to_300_atm(table: list[Row], model: str) -> None:
    # Gillespie (1925) fit of Larson & Dodge (1923) / Larson (1924), REFERENCES.md §2
    for r in table:
        if r.p_atm <= 300.0:
            assert abs(r.dev(model)) <= 7.0, (r.t_c, r.p_atm, r.dev(model))


@pytest.mark.parametrize("model", ["default PR", "default SRK"])
def test_closer_than_ideal_at_300_atm_and_above(table: list[Row], model: str) -> None:
    # Larson (1924) data via the Gillespie (1925) fit, REFERENCES.md §2
    for r in table:
        if r.p_atm >= 300.0:
            assert abs(r.dev(model)) < abs(r.dev("default ideal")), (r.t_c, r.p_atm)
            assert r.dev(model) - r.dev("default ideal") > 4.0  # a real move, not a nudge


def test_ideal_janaf_column_of_references(table: list[Row]) -> None:
    # REFERENCES.md §2, "ideal gas with JANAF K (derived)" (see tests/test_equilibrium.py
    # for the tolerance: Reaction(data="janaf") interpolates H and S, not log Kf)
    expected = [4.05, 24.84, 42.94, 62.34, 1.27, 10.42, 23.07, 42.68]
    got = [r.values["JANAF ideal"] for r in table]
    assert got == pytest.approx(expected, rel=2.5e-3)


def test_remaining_low_pressure_deviation_comes_from_K(table: list[Row]) -> None:
    for r in table:
        if r.p_atm != 10.0:
            continue
        eos_effect = abs(r.values["default PR"] / r.values["default ideal"] - 1.0)
        k_sources = [r.values[c] for c in ("default ideal", "JANAF ideal", "G&B ideal")]
        k_spread = (max(k_sources) - min(k_sources)) / r.fit
        assert eos_effect < 0.006  # the EOS moves NH3 by < 0.6 % at 10 atm
        assert k_spread > 5.0 * eos_effect  # the three K sources spread it far more
        # the Gillespie & Beattie K and the default (ATcT) data agree with the fit to 2.6 %
        # (its ±2 %), JANAF's K over-predicts (REFERENCES.md §1: NH3 ΔfH° 0.34 kJ/mol lower)
        assert abs(r.dev("G&B PR")) <= 2.6 and abs(r.dev("default PR")) <= 2.6
        assert r.dev("JANAF PR") > 3.5


def test_eos_gap_at_high_pressure_is_not_K(table: list[Row]) -> None:
    # 500 °C, 300-1000 atm: PR under-predicts with every K source; Dyson & Simon does better
    for r in table:
        if r.t_c == 500.0 and r.p_atm >= 300.0:
            assert all(r.dev(c) < -3.0 for c in ("default PR", "JANAF PR", "G&B PR"))
            assert abs(r.dev("D&S (default K)")) < abs(r.dev("default PR"))


def test_mixture_phi_against_dyson_simon_second_opinion() -> None:
    # REFERENCES.md §2, Dyson & Simon (1968) pure-gas φ at 100-300 atm: the PR mixture φ at
    # the equilibrium state (Lewis rule = pure φ) agrees within the rule's own error
    # (common practice: a few per cent for N2 and H2 at these conditions; NH3, the heavy
    # component in a light mixture, deviates most)
    rxn = Reaction("1/2 N2 + 3/2 H2 = NH3")
    for t_c in (400.0, 500.0):
        for p_atm in (100.0, 300.0):
            T = t_c + 273.15
            res = equilibrium(
                rxn,
                {"N2": 1, "H2": 3},
                T,
                p_atm * P_ATM,
                gas="peng-robinson",
                kij={("H2", "NH3"): 0.0},
                check_phase=False,
            )
            phi = np.log([float(res.fugacity_coefficients[k]) for k in KEYS])
            ds = dyson_simon_ln_phi(T, p_atm)
            assert phi[:2] == pytest.approx(ds[:2], abs=0.03)  # N2, H2: |Δ ln φ| < 0.03
            assert phi[2] == pytest.approx(ds[2], abs=0.12)  # NH3
            assert np.sign(phi[0]) == np.sign(ds[0]) and phi[1] > 0.0
