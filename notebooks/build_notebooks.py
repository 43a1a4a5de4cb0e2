"""Build the sensitivity-study notebooks of eqconv from the cell texts below.

The notebooks are generated, not edited by hand, so they stay small, deterministic and free
of outputs: ``python notebooks/build_notebooks.py`` rewrites them, and the test suite checks
that the files in the repository are exactly what this script produces and executes them.
All plants and numbers in them are invented.
"""

from __future__ import annotations

import sys
from pathlib import Path

import nbformat
from nbformat.notebooknode import NotebookNode

HERE = Path(__file__).resolve().parent

CAUTION_MD = (
    "**Caution.** Equilibrium is a thermodynamic ceiling, not a design: real converters reach "
    "less (kinetics, catalyst activity and ageing, heat and mass transfer, flow "
    "maldistribution). These are screening numbers for an invented plant; every design "
    "decision belongs to qualified engineers under local codes, standards and licensed "
    "engineering practice."
)

AMMONIA: list[tuple[str, str]] = [
    (
        "md",
        """# Ammonia converter: operating window and its sensitivities

*Invented scenario.* The synthesis loop of an invented plant ("Riverside Works, loop 2")
feeds its converter with a 3:1 H2:N2 gas carrying about 4 % inerts (CH4 and Ar). Before
talking to catalyst vendors the process engineer wants the **equilibrium ceiling**: how much
N2 can be converted at all, where a 30 % per-pass target is still reachable, and how much
that depends on the H2:N2 ratio, on the inert level and on the thermochemical data.

Everything below is ideal gas. Above roughly 50-100 bar fugacity corrections matter (common
practice), so the absolute numbers are a first look; the trends are what this study is for.""",
    ),
    (
        "code",
        """import matplotlib.pyplot as plt
import numpy as np

import eqconv
from eqconv.studies import (
    conversion_contour,
    equilibrium_conversion,
    hydrogen_to_nitrogen,
    inert_fraction,
    sweep,
    sweep_dataframe,
    temperature_for_conversion,
)
from eqconv.studies.plots import conversion_map, conversion_vs_temperature, vant_hoff_plot

rxn = eqconv.Reaction("N2 + 3 H2 = 2 NH3", data="default")
feed = {"N2": 0.24, "H2": 0.72, "CH4": 0.025, "Ar": 0.015}  # mol, invented loop gas
T = np.linspace(380.0, 520.0, 29) + 273.15  # K
P = np.array([100.0, 150.0, 200.0, 250.0, 300.0]) * 1e5  # Pa
target = 0.30""",
    ),
    (
        "md",
        """## K(T): how steeply the ceiling falls with temperature

The van 't Hoff plot shows ln K of the synthesis against 1/T; the slope of the fitted
straight line is read out as the mean reaction enthalpy over the range.""",
    ),
    (
        "code",
        """ax = vant_hoff_plot(rxn, np.linspace(600.0, 900.0, 13))
plt.show()""",
    ),
    (
        "md",
        """## The operating window on the T-P plane

One vectorized sweep over T x P gives the whole map; the exact 30 % contour comes from a
root-finder on the solver, not from reading the grid.""",
    ),
    (
        "code",
        """ds = sweep(rxn, feed, T, P, key="N2")
contour = conversion_contour(rxn, feed, target, T, (10e5, 1000e5), key="N2")
fig, (a1, a2) = plt.subplots(1, 2, figsize=(12, 4.5), layout="constrained")
conversion_vs_temperature(ds, ax=a1)
conversion_map(ds, targets=[0.2, target, 0.4], exact=[(T, contour)], ax=a2)
plt.show()""",
    ),
    (
        "code",
        """limit = temperature_for_conversion(rxn, feed, target, P, (600.0, 900.0), key="N2")
for p, t in zip(P, limit.value, strict=True):
    print(f"P = {p / 1e5:5.0f} bar: 30 % N2 conversion reachable up to {t - 273.15:6.1f} degC")
# sanity check against the grid: just below the limit the grid conversion meets the target
x_check = equilibrium_conversion(rxn, feed, limit.value - 0.5, P, key="N2")
assert np.all(x_check >= target)""",
    ),
    (
        "md",
        """## Sensitivity 1: the H2:N2 ratio

Conversion of N2 keeps rising with more hydrogen, but the ammonia content of the gas (what
the loop actually produces per pass) peaks near the stoichiometric ratio of 3 - a classic
result of the ideal-gas equilibrium.""",
    ),
    (
        "code",
        """ratio = hydrogen_to_nitrogen(inerts={"CH4": 0.025, "Ar": 0.015})
r = np.linspace(1.5, 5.0, 36)
ds_r = sweep(rxn, ratio, 450.0 + 273.15, 200e5, values=r, key="N2")
y_nh3 = ds_r["mole_fraction"].sel(species="NH3").squeeze()
best = float(r[int(np.argmax(y_nh3.values))])
print(f"NH3 mole fraction is highest at H2:N2 = {best:.2f}")
assert abs(best - 3.0) <= 0.11
fig, ax = plt.subplots(layout="constrained")
ax.plot(r, 100 * y_nh3.values, label="NH3 in converter outlet")
ax.plot(r, 100 * ds_r["conversion"].squeeze().values, "--", label="N2 conversion")
ax.set_xlabel("H2:N2 in the feed [mol/mol]")
ax.set_ylabel("[%]")
ax.set_title("450 degC, 200 bar, 4 % inerts (ideal gas)")
ax.legend()
plt.show()""",
    ),
    (
        "md",
        """## Sensitivity 2: inerts

Inerts dilute the gas; for a reaction with fewer product moles (Δn < 0) that lowers the
equilibrium conversion, which is why the loop purges. The tidy table is what goes into a
report.""",
    ),
    (
        "code",
        """reactive = {"N2": 1.0, "H2": 3.0}
inerts = inert_fraction(reactive, inert="Ar")
x_inert = np.array([0.0, 0.02, 0.05, 0.10, 0.15, 0.20])
ds_i = sweep(rxn, inerts, 450.0 + 273.15, np.array([150e5, 250e5]), values=x_inert, key="N2")
table = sweep_dataframe(ds_i)[["P", "inert_fraction", "conversion", "x_NH3"]]
table["P"] = table["P"] / 1e5
table = table.rename(
    columns={
        "P": "P [bar]",
        "inert_fraction": "inerts [mol/mol]",
        "conversion": "N2 conversion [-]",
        "x_NH3": "y NH3 [-]",
    }
)
assert np.all(np.diff(ds_i["conversion"].values, axis=-1) < 0)
table.round(4)""",
    ),
    (
        "md",
        """## Sensitivity 3: the thermochemical data

The ranked default sources and the NIST-JANAF tables differ in ΔfH° of NH3 by about
0.34 kJ/mol, which moves K by several percent. How much does the ceiling move?""",
    ),
    (
        "code",
        """rxn_janaf = eqconv.Reaction("N2 + 3 H2 = 2 NH3", data="janaf")
Tc = np.array([400.0, 450.0, 500.0]) + 273.15
x_default = equilibrium_conversion(rxn, feed, Tc[:, None], P[None, :], key="N2")
x_janaf = equilibrium_conversion(rxn_janaf, feed, Tc[:, None], P[None, :], key="N2")
shift = 100 * (x_default - x_janaf)
print("conversion(default) - conversion(JANAF), percentage points")
print("T [degC] \\\\ P [bar]", *(f"{p / 1e5:7.0f}" for p in P))
for t, row in zip(Tc, shift, strict=True):
    print(f"{t - 273.15:8.0f}        ", *(f"{v:7.3f}" for v in row))""",
    ),
    ("md", CAUTION_MD),
]

SO2: list[tuple[str, str]] = [
    (
        "md",
        """# SO2 converter: staging of adiabatic beds with interstage cooling

*Invented scenario.* A sulfur-burning acid plant ("Harbour Acid Works, line 3", invented)
sends 10.5 % SO2 in dried air to a four-bed converter at about 1.25 bar. Each bed runs
adiabatically; gas is cooled back to a chosen inlet temperature between beds. The study
asks: what conversion can four beds reach at equilibrium, how sensitive is it to the bed
inlet temperatures and to the gas strength, and how many beds a 98 % target needs.""",
    ),
    (
        "code",
        """import matplotlib.pyplot as plt
import numpy as np

import eqconv
from eqconv.studies import (
    adiabatic_rise,
    equilibrium_conversion,
    mixture_enthalpy,
    stage_beds,
)
from eqconv.studies.plots import staging_diagram

rxn = eqconv.Reaction("SO2 + 1/2 O2 = SO3", data="default")
feed = {"SO2": 0.105, "O2": 0.104, "N2": 0.791}  # mol, invented burner gas
P = 1.25e5  # Pa
T_in = np.array([420.0, 435.0, 435.0, 430.0]) + 273.15  # K, bed inlets""",
    ),
    (
        "md",
        """## Four beds at the design inlet temperatures

The table gives per-bed inlet and outlet temperatures, cumulative conversion and the duty
of each interstage cooler (J per mol of fresh feed here, because the feed is in mol).""",
    ),
    (
        "code",
        """beds = stage_beds(rxn, feed, T_in, P, n_beds=4, key="SO2")
df = beds.to_dataframe()
df[["T_in", "T_out"]] = df[["T_in", "T_out"]] - 273.15
df.rename(columns={"T_in": "T_in [degC]", "T_out": "T_out [degC]"}).round(4)""",
    ),
    (
        "code",
        """# energy balance of every bed: adiabatic, so the mixture enthalpy is unchanged
species = [eqconv.get_species(k) for k in beds.species]
H_in = mixture_enthalpy(species, beds.amounts_in, beds.T_in)
H_out = mixture_enthalpy(species, beds.amounts_out, beds.T_out)
assert np.allclose(H_out, H_in, rtol=0, atol=1e-6 * np.abs(H_in).max())
rise = adiabatic_rise(rxn, feed, T_in[0], 0.1, key="SO2")
print(f"adiabatic temperature rise per 10 % conversion: {float(rise):.1f} K")
ax = staging_diagram(beds, rxn, feed)
plt.show()""",
    ),
    (
        "md",
        """## Sensitivity 1: the inlet temperature of every bed

A colder inlet leaves more room under the equilibrium curve, but the catalyst needs a
minimum ignition temperature (a kinetic limit this study cannot see). Here all four inlets
move together.""",
    ),
    (
        "code",
        """shifts = np.arange(-20.0, 21.0, 10.0)
final = [stage_beds(rxn, feed, T_in + d, P, n_beds=4, key="SO2").conversion_out[-1] for d in shifts]
for d, x in zip(shifts, final, strict=True):
    print(f"inlets {d:+5.0f} K: conversion after 4 beds = {x:.4f}")
assert np.all(np.diff(final) < 0)  # exothermic: colder inlets, higher ceiling""",
    ),
    (
        "md",
        """## Sensitivity 2: gas strength and the number of beds for 98 %

Stronger gas (more SO2 per mol) means a larger adiabatic rise per unit conversion, so each
bed gains less before it meets the equilibrium curve.""",
    ),
    (
        "code",
        """for y_so2 in (0.08, 0.105, 0.12):
    y_o2 = 0.99 * y_so2  # invented burner rule: about equal O2 and SO2
    gas = {"SO2": y_so2, "O2": y_o2, "N2": 1.0 - y_so2 - y_o2}
    need = stage_beds(rxn, gas, 430.0 + 273.15, P, target=0.98, max_beds=8, key="SO2")
    print(f"{100 * y_so2:5.1f} % SO2: {need.n_beds} beds reach {need.conversion_out[-1]:.4f}")""",
    ),
    (
        "code",
        """# the equilibrium curve itself at three converter pressures
T = np.linspace(380.0, 650.0, 55) + 273.15
fig, ax = plt.subplots(layout="constrained")
for p in (1.25e5, 2.5e5, 5e5):
    ax.plot(
        T - 273.15, equilibrium_conversion(rxn, feed, T, p, key="SO2"), label=f"{p / 1e5:g} bar"
    )
ax.set_xlabel("T [degC]")
ax.set_ylabel("equilibrium conversion of SO2 [-]")
ax.legend(title="P")
plt.show()""",
    ),
    ("md", CAUTION_MD),
]

NOTEBOOKS: dict[str, list[tuple[str, str]]] = {
    "ammonia_operating_window.ipynb": AMMONIA,
    "so2_converter_staging.ipynb": SO2,
}


def build() -> dict[str, NotebookNode]:
    """The notebooks, keyed by file name, with deterministic cell ids and no outputs."""
    out = {}
    for name, cells in NOTEBOOKS.items():
        nb = nbformat.v4.new_notebook()
        nb.metadata = {
            "kernelspec": {"display_name": "Python 3", "language": "python", "name": "python3"},
            "language_info": {"name": "python"},
        }
        stem = name.removesuffix(".ipynb").replace("_", "-")
        for i, (kind, text) in enumerate(cells):
            cell = (
                nbformat.v4.new_markdown_cell(text)
                if kind == "md"
                else nbformat.v4.new_code_cell(text)
            )
            cell["id"] = f"{stem}-{i:02d}"
            nb.cells.append(cell)
        nbformat.validate(nb)
        out[name] = nb
    return out


def render(nb: NotebookNode) -> str:
    """The file text of a notebook (what is stored in the repository)."""
    return nbformat.writes(nb) + "\n"


def main(argv: list[str] | None = None) -> int:
    """Write every notebook next to this script; ``--check`` only compares."""
    check = "--check" in (argv if argv is not None else sys.argv[1:])
    stale = []
    for name, nb in build().items():
        path = HERE / name
        text = render(nb)
        if check:
            if not path.exists() or path.read_text(encoding="utf-8") != text:
                stale.append(name)
        else:
            path.write_text(text, encoding="utf-8")
    if stale:
        print("stale notebooks (run python notebooks/build_notebooks.py):", *stale)
        return 1
    return 0


if __name__ == "__main__":
    sys.exit(main())
