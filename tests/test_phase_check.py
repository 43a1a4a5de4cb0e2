"""Vapour pressures and the gas-phase (dew-point) check."""

from __future__ import annotations

import warnings

import numpy as np
import pytest

from eqconv import PhaseWarning, get_species
from eqconv.phase_check import check_gas_phase, vapour_pressure_model


def test_water_vapour_pressure_matches_steam_tables():
    model = vapour_pressure_model("7732-18-5")
    assert model is not None
    # IAPWS-95 saturation pressures (steam tables; values from memory):
    # 100 °C -> 101.418 kPa, 200 °C -> 1554.9 kPa, 300 °C -> 8587.9 kPa
    T = np.array([373.15, 473.15, 573.15])
    expected = np.array([101.418e3, 1554.9e3, 8587.9e3])
    assert model(T) == pytest.approx(expected, rel=5e-3)


def test_methanol_normal_boiling_point():
    model = vapour_pressure_model("67-56-1")
    assert model is not None
    # CRC Handbook: methanol boils at 64.7 °C at 1 atm (value from memory)
    assert float(model(337.85)) == pytest.approx(101325.0, rel=1e-2)


def test_no_condensation_above_critical_temperature():
    model = vapour_pressure_model("7732-18-5")
    assert model is not None
    assert np.isinf(model(np.array([650.0, 900.0]))).all()


def test_flags_wet_cold_high_pressure_gas_and_not_hot_gas():
    species = [get_species(k) for k in ("H2O", "H2", "CO2")]
    y = {"H2O": np.array([0.3, 0.3]), "H2": np.array([0.5, 0.5]), "CO2": np.array([0.2, 0.2])}
    T = np.array([400.0, 700.0])
    P = np.array([30e5, 30e5])
    with pytest.warns(PhaseWarning, match="1 of 2"):
        chk = check_gas_phase(species, y, T, P)
    # at 400 K p_sat(H2O) ≈ 2.46 bar (steam tables, memory) while p_H2O = 9 bar
    assert chk.condenses.tolist() == [True, False]
    assert chk.saturation["H2O"][0] == pytest.approx(9e5 / 2.456e5, rel=2e-2)
    assert chk.saturation["H2O"][1] == 0.0


def test_ideal_solution_dew_index_adds_components():
    species = [get_species(k) for k in ("H2O", "CH3OH", "H2")]
    T = 420.0
    P = 10e5
    y = {"H2O": 0.2, "CH3OH": 0.4, "H2": 0.4}
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", PhaseWarning)
        chk = check_gas_phase(species, y, T, P)
    total = chk.saturation["H2O"] + chk.saturation["CH3OH"]
    assert float(chk.dew_index) == pytest.approx(float(total), rel=1e-12)
    # each alone is below saturation, together above: the mixture check is the stricter one
    assert float(chk.saturation["CH3OH"]) < 1.0 or float(chk.saturation["H2O"]) < 1.0
