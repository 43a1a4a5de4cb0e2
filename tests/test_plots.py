"""Plots render with the Agg backend and draw what they say (lines, levels, labels, units)."""

from __future__ import annotations

import numpy as np
import pytest

matplotlib = pytest.importorskip("matplotlib")
matplotlib.use("Agg")
import matplotlib.pyplot as plt  # noqa: E402

from eqconv import Reaction  # noqa: E402
from eqconv.constants import R  # noqa: E402
from eqconv.errors import InputError  # noqa: E402
from eqconv.studies.plots import (  # noqa: E402
    conversion_map,
    conversion_vs_temperature,
    staging_diagram,
    vant_hoff_plot,
)

PNG_MAGIC = b"\x89PNG\r\n\x1a\n"
FEED = {"N2": 1.0, "H2": 3.0, "Ar": 0.1}


@pytest.fixture(autouse=True)
def _close_figures():
    yield
    plt.close("all")


def _save(ax, path):
    ax.figure.savefig(path, dpi=60)
    data = path.read_bytes()
    assert data[:8] == PNG_MAGIC and len(data) > 2000
    return data


def _line(ax, label):
    found = [ln for ln in ax.get_lines() if ln.get_label() == label]
    assert len(found) == 1, [ln.get_label() for ln in ax.get_lines()]
    return found[0]


@pytest.fixture(scope="module")
def ammonia():
    return Reaction("N2 + 3 H2 = 2 NH3", data="janaf")


@pytest.fixture(scope="module")
def ammonia_sweep(ammonia):
    from eqconv.studies import sweep

    T = np.linspace(650.0, 800.0, 16)
    P = np.array([50e5, 100e5, 200e5, 300e5])
    return sweep(ammonia, FEED, T, P, key="N2")


# ------------------------------------------------------------------------- van 't Hoff
def test_vant_hoff_plot_draws_both_models_and_the_fit(ammonia, tmp_path):
    T = np.linspace(500.0, 900.0, 9)
    ax = vant_hoff_plot(ammonia, T)
    _save(ax, tmp_path / "vh.png")
    kir = _line(ax, "Kirchhoff (ΔrCp° integrated)")
    vh = _line(ax, "van 't Hoff (ΔrH°, ΔrS° at 298.15 K)")
    np.testing.assert_allclose(kir.get_xdata(), 1000.0 / T)
    np.testing.assert_allclose(kir.get_ydata(), ammonia.ln_K(T), rtol=1e-12)
    np.testing.assert_allclose(vh.get_ydata(), ammonia.ln_K(T, model="vant_hoff"), rtol=1e-12)
    fits = [ln for ln in ax.get_lines() if str(ln.get_label()).startswith("fit: ΔrH° = ")]
    assert len(fits) == 1
    x, y = np.asarray(fits[0].get_xdata()), np.asarray(fits[0].get_ydata())
    slope = np.polyfit(1.0 / (1000.0 / x), y, 1)[0]  # d ln K / d(1/T) [K]
    shown = float(str(fits[0].get_label()).split("= ")[1].split(" kJ")[0])
    assert shown == pytest.approx(-R * slope / 1e3, abs=0.051)  # printed to 0.1 kJ/mol
    # the mean slope lies between the Kirchhoff ΔrH° at the ends of the range
    dH = ammonia.delta_H(np.array([T.min(), T.max()])) / 1e3
    assert min(dH) < shown < max(dH)
    assert ax.get_xlabel() == "1000 / T [1/K]" and "ln K" in ax.get_ylabel()


def test_vant_hoff_plot_uses_a_given_axes(ammonia):
    _, axes = plt.subplots(1, 2)
    ax = vant_hoff_plot(
        ammonia, np.linspace(500.0, 900.0, 5), ax=axes[1], fit=False, models=("kirchhoff",)
    )
    assert ax is axes[1] and len(ax.get_lines()) == 1 and not axes[0].get_lines()


def test_vant_hoff_plot_rejects_a_bad_model(ammonia):
    with pytest.raises(InputError, match="models"):
        vant_hoff_plot(ammonia, [500.0, 600.0, 700.0], models=("ideal",))


# ------------------------------------------------------------------ conversion vs T
def test_conversion_vs_temperature_one_line_per_pressure(ammonia_sweep, tmp_path):
    ax = conversion_vs_temperature(ammonia_sweep)
    _save(ax, tmp_path / "xt.png")
    labels = [ln.get_label() for ln in ax.get_lines()]
    assert labels == ["50 bar", "100 bar", "200 bar", "300 bar"]
    line = _line(ax, "200 bar")
    np.testing.assert_allclose(line.get_xdata(), ammonia_sweep["T"].values - 273.15)
    np.testing.assert_allclose(line.get_ydata(), ammonia_sweep["conversion"].sel(P=200e5).values)
    assert ax.get_xlabel() == "T [°C]"
    assert ax.get_ylabel() == "equilibrium conversion of N2 [-]"


def test_conversion_vs_temperature_units_and_subset(ammonia_sweep):
    ax = conversion_vs_temperature(
        ammonia_sweep, pressures=[100e5, 300e5], temperature_unit="K", pressure_unit="MPa"
    )
    assert [ln.get_label() for ln in ax.get_lines()] == ["10 MPa", "30 MPa"]
    assert ax.get_xlabel() == "T [K]"
    with pytest.raises(InputError, match="temperature_unit"):
        conversion_vs_temperature(ammonia_sweep, temperature_unit="degF")


# ---------------------------------------------------------------------- conversion map
def test_conversion_map_draws_target_contours(ammonia, ammonia_sweep, tmp_path):
    from eqconv.studies import conversion_contour

    T = ammonia_sweep["T"].values
    exact = conversion_contour(ammonia, FEED, 0.3, T, (5e5, 2000e5), key="N2")
    ax = conversion_map(ammonia_sweep, targets=[0.4, 0.3], exact=[(T, exact)])
    _save(ax, tmp_path / "map.png")
    from matplotlib.contour import ContourSet

    sets = [c for c in ax.collections if isinstance(c, ContourSet)]
    filled = [c for c in sets if c.filled]
    lines = [c for c in sets if not c.filled]
    assert len(filled) == 1 and len(lines) == 1
    np.testing.assert_allclose(lines[0].levels, [0.3, 0.4])
    texts = {t.get_text() for t in ax.texts}
    assert {"X = 0.30", "X = 0.40"} <= texts
    root = _line(ax, "exact root, X = 0.30")
    np.testing.assert_allclose(root.get_ydata(), exact.value / 1e5, rtol=1e-12)
    assert ax.get_xlabel() == "T [°C]" and ax.get_ylabel() == "P [bar] (absolute)"
    assert ax.get_yscale() == "linear"  # 50-300 bar spans less than a factor 10
    # colour bar labelled with the key species and unit
    assert any("equilibrium conversion of N2 [-]" in a.get_ylabel() for a in ax.figure.axes)


def test_conversion_map_needs_two_values_per_axis(ammonia):
    from eqconv.studies import sweep

    ds = sweep(ammonia, FEED, np.linspace(650.0, 750.0, 3), 100e5, key="N2")
    with pytest.raises(InputError, match="at least 2"):
        conversion_map(ds)
    with pytest.raises(InputError, match="between 0 and 1"):
        conversion_map(sweep(ammonia, FEED, [650.0, 700.0], [1e6, 1e7], key="N2"), targets=[1.5])


def test_maps_of_a_3d_sweep_need_a_selection(ammonia):
    from eqconv.studies import hydrogen_to_nitrogen, sweep

    ds = sweep(
        ammonia, hydrogen_to_nitrogen(), [650.0, 700.0], [1e7, 2e7], values=[2.0, 3.0], key="N2"
    )
    with pytest.raises(InputError, match="H2_to_N2"):
        conversion_map(ds)
    ax = conversion_map(ds, select={"H2_to_N2": 3.0}, log_pressure=True)
    assert "H2_to_N2 = 3" in ax.get_title() and ax.get_yscale() == "log"


# ------------------------------------------------------------------------------ staging
def test_staging_diagram_lines_follow_the_beds(tmp_path):
    from eqconv.studies import equilibrium_conversion, stage_beds

    rxn = Reaction("SO2 + 1/2 O2 = SO3", data="default")
    feed = {"SO2": 0.105, "O2": 0.104, "N2": 0.791}
    res = stage_beds(rxn, feed, [693.15, 708.15, 708.15], 1.25e5, n_beds=3, key="SO2")
    ax = staging_diagram(res, rxn, feed)
    _save(ax, tmp_path / "staging.png")
    eq = _line(ax, "equilibrium")
    x_eq = equilibrium_conversion(rxn, feed, np.asarray(eq.get_xdata()) + 273.15, 1.25e5, key="SO2")
    np.testing.assert_allclose(eq.get_ydata(), x_eq, rtol=1e-12)
    for k in range(3):
        bed = _line(ax, f"bed {k + 1}")
        xs, ys = np.asarray(bed.get_xdata()), np.asarray(bed.get_ydata())
        assert xs[0] == pytest.approx(res.T_in[k] - 273.15, abs=1e-9)
        assert xs[-1] == pytest.approx(res.T_out[k] - 273.15, abs=1e-3)
        assert ys[0] == pytest.approx(res.conversion_in[k], abs=1e-12)
        assert ys[-1] == pytest.approx(res.conversion_out[k], abs=1e-12)
        # each bed ends on the equilibrium curve (approach 0 K)
        end = equilibrium_conversion(rxn, feed, res.T_out[k], 1.25e5, key="SO2")
        assert float(end) == pytest.approx(res.conversion_out[k], abs=1e-6)
    cool = _line(ax, "interstage cooling")
    np.testing.assert_allclose(cool.get_xdata(), [res.T_out[0] - 273.15, res.T_in[1] - 273.15])
    assert ax.get_xlabel() == "T [°C]" and ax.get_ylabel() == "conversion of SO2 [-] (cumulative)"
    assert "1.25 bar" in ax.get_title()
