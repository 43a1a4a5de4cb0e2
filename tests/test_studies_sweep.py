"""Feed parameters, T × P × feed sweeps (chunked, dask) and their exports.

All scenarios are invented. External checks: the water-gas-shift and ammonia identities of
REFERENCES.md §3 (derived, exact for an ideal gas) and the Le Chatelier facts of §4
(common practice).
"""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pytest

from eqconv import ConvergenceError, InputError, Reaction
from eqconv.studies import (
    FeedParameter,
    hydrogen_to_nitrogen,
    inert_fraction,
    oxygen_excess,
    ratio,
    read_sweep_csv,
    read_sweep_json,
    steam_to_carbon,
    sweep,
    sweep_dataframe,
    write_sweep_csv,
    write_sweep_json,
)

# ---------------------------------------------------------------- feed parameters


def test_steam_to_carbon_counts_hydrocarbon_carbon_only() -> None:
    # invented natural gas: 90 % CH4, 6 % C2H6, 2 % C3H8 plus 2 % CO2 (not counted)
    p = steam_to_carbon({"CH4": 0.90, "C2H6": 0.06, "C3H8": 0.02}, others={"CO2": 0.02})
    f = p.feed([2.5, 3.0])
    carbon = 0.90 + 2 * 0.06 + 3 * 0.02
    assert f["H2O"] == pytest.approx(np.array([2.5, 3.0]) * carbon, rel=1e-15)
    assert f["CO2"] == pytest.approx([0.02, 0.02], rel=1e-15)
    assert p.name == "steam_to_carbon" and p.unit == "mol/mol"
    with pytest.raises(InputError, match="steam_to_carbon"):
        p.feed(-1.0)


def test_hydrogen_to_nitrogen_keeps_inert_fractions() -> None:
    p = hydrogen_to_nitrogen(inerts={"Ar": 0.03, "CH4": 0.02})
    r = np.array([2.0, 3.0, 4.0])
    f = p.feed(r)
    total = sum(f.values())
    assert total == pytest.approx(np.ones(3), rel=1e-14)
    assert f["H2"] / f["N2"] == pytest.approx(r, rel=1e-14)
    assert f["Ar"] == pytest.approx(0.03 * np.ones(3), rel=1e-15)
    with pytest.raises(InputError, match="sum"):
        hydrogen_to_nitrogen(inerts={"Ar": 0.7, "CH4": 0.4})


def test_inert_fraction_and_bounds() -> None:
    p = inert_fraction({"N2": 1.0, "H2": 3.0}, inert="Ar")
    f = p.feed(np.array([0.0, 0.1, 0.5]))
    assert f["Ar"] == pytest.approx([0.0, 0.1, 0.5], abs=1e-15)
    assert f["H2"] / f["N2"] == pytest.approx(3.0 * np.ones(3), rel=1e-14)
    assert sum(f.values()) == pytest.approx(np.ones(3), rel=1e-14)
    with pytest.raises(InputError, match=r"\[0, 1\)"):
        p.feed(1.0)


def test_oxygen_excess_with_air() -> None:
    # invented sulfur-burner gas: 0.1 mol SO2 needs 0.05 mol O2; air is 79/21 N2/O2
    # (common practice)
    p = oxygen_excess({"SO2": 0.1}, 0.05, companions={"N2": 79 / 21})
    f = p.feed([0.0, 1.2])
    assert f["O2"] == pytest.approx([0.05, 0.11], rel=1e-14)
    assert f["N2"] / f["O2"] == pytest.approx([79 / 21] * 2, rel=1e-14)
    assert f["SO2"] == pytest.approx([0.1, 0.1], rel=1e-15)
    with pytest.raises(InputError, match="stoichiometric_O2"):
        oxygen_excess({"SO2": 0.1}, 0.0)


def test_generic_ratio_and_name_check() -> None:
    p = ratio("steam_to_CO", "H2O", "CO", {"CO": 2.0, "H2": 1.0})
    f = p.feed(1.5)
    assert float(f["H2O"]) == pytest.approx(3.0, rel=1e-15)
    assert float(f["H2"]) == 1.0
    with pytest.raises(InputError, match="identifier"):
        FeedParameter("not a name", "1", "", (0.0, 1.0), (True, True), lambda v: {"A": v})
    with pytest.raises(InputError, match="CO"):
        ratio("x", "H2O", "CO", {"H2": 1.0})


# ---------------------------------------------------------------- sweeps

SHIFT_FEED = {"CO": 1.0, "H2O": 1.0}  # invented equimolar shift feed
NH3_LOOP = {"N2": 0.2375, "H2": 0.7125, "Ar": 0.05}  # invented loop gas, 5 % Ar


@pytest.fixture(scope="module")
def shift() -> Reaction:
    return Reaction("CO + H2O = CO2 + H2", data="janaf")


@pytest.fixture(scope="module")
def nh3() -> Reaction:
    return Reaction("N2 + 3 H2 = 2 NH3", data="janaf")


def test_sweep_layout_units_and_shift_identity(shift: Reaction) -> None:
    T = np.array([700.0, 900.0, 1100.0])
    P = np.array([1e5, 10e5])
    ds = sweep(shift, SHIFT_FEED, T, P)
    assert ds["conversion"].dims == ("T", "P")
    assert ds["mole_fraction"].dims == ("T", "P", "species")
    assert ds["extent"].dims == ("T", "P", "reaction")
    assert ds["ln_K"].dims == ("T", "reaction")
    assert ds["T"].attrs["units"] == "K" and ds["P"].attrs["units"] == "Pa"
    assert ds["amount"].attrs["units"] == "mol" and ds["conversion"].attrs["key"] == "CO"
    assert list(ds["species"].values) == ["CO", "H2O", "CO2", "H2"]
    # REFERENCES.md §3 (derived, exact for an ideal gas): equimolar shift ε = √K/(1 + √K)
    K = np.exp(ds["ln_K"].values[:, 0])
    eps = np.sqrt(K) / (1 + np.sqrt(K))
    assert ds["conversion"].values == pytest.approx(np.repeat(eps[:, None], 2, 1), abs=1e-10)
    # Δn = 0: nothing moves with P (REFERENCES.md §4, common practice)
    assert np.ptp(ds["conversion"].values, axis=1) == pytest.approx(np.zeros(3), abs=1e-12)
    assert bool(ds["converged"].all())
    assert ds["mole_fraction"].sum("species").values == pytest.approx(np.ones((3, 2)), abs=1e-14)


def test_sweep_feed_parameter_dimension(nh3: Reaction) -> None:
    p = inert_fraction({"N2": 1.0, "H2": 3.0}, inert="Ar")
    ds = sweep(nh3, p, [700.0], [50e5, 200e5], values=[0.0, 0.1, 0.2])
    assert ds["conversion"].dims == ("T", "P", "inert_fraction")
    assert ds["inert_fraction"].attrs["units"] == "1"
    X = ds["conversion"].values[0]
    # Le Chatelier (REFERENCES.md §4): Δn < 0, so pressure raises and inert lowers conversion
    assert np.all(X[1] > X[0])
    assert np.all(np.diff(X, axis=1) < 0)
    assert ds["feed_amount"].sel(inert_fraction=0.1, species="Ar").item() == pytest.approx(0.1)


def test_chunked_equals_unchunked_with_progress(nh3: Reaction) -> None:
    T = np.linspace(600.0, 900.0, 13)
    P = np.geomspace(1e6, 4e7, 7)
    calls: list[tuple[int, int]] = []
    a = sweep(nh3, NH3_LOOP, T, P, chunk_size=10, progress=lambda d, n: calls.append((d, n)))
    b = sweep(nh3, NH3_LOOP, T, P)
    assert calls[-1] == (91, 91) and len(calls) == 10
    assert [d for d, _ in calls] == sorted(d for d, _ in calls)
    for var in ("mole_fraction", "amount", "extent", "conversion"):
        np.testing.assert_array_equal(a[var].values, b[var].values)


def test_dask_path_equals_in_memory(nh3: Reaction) -> None:
    xr = pytest.importorskip("xarray")
    dask = pytest.importorskip("dask")
    T = np.linspace(600.0, 900.0, 12)
    P = np.geomspace(1e6, 4e7, 8)
    Td = xr.DataArray(T, dims="T", coords={"T": T}).chunk({"T": 5})
    Pd = xr.DataArray(P, dims="P", coords={"P": P}).chunk({"P": 3})
    p = hydrogen_to_nitrogen(inerts={"Ar": 0.05})
    v = np.array([2.5, 3.0, 3.5])
    Vd = xr.DataArray(v, dims="H2_to_N2", coords={"H2_to_N2": v}).chunk({"H2_to_N2": 2})
    lazy = sweep(nh3, p, Td, Pd, values=Vd)
    assert lazy["conversion"].chunks is not None  # still lazy
    ref = sweep(nh3, p, T, P, values=v)
    for scheduler in ("synchronous", "threads"):
        with dask.config.set(scheduler=scheduler):
            got = lazy.compute()
        for var in ("mole_fraction", "extent", "conversion", "ln_K", "feed_amount"):
            np.testing.assert_allclose(
                got[var].transpose(*ref[var].dims).values, ref[var].values, rtol=1e-13, atol=1e-15
            )
        assert bool(got["converged"].all())


def test_feed_given_by_names_is_keyed_by_species(nh3: Reaction) -> None:
    by_name = sweep(
        nh3, {"nitrogen": 0.2375, "hydrogen": 0.7125, "argon": 0.05}, [700.0], [1e7], key="nitrogen"
    )
    by_key = sweep(nh3, NH3_LOOP, [700.0], [1e7])
    assert list(by_name["species"].values) == ["N2", "H2", "NH3", "Ar"]
    assert by_name.attrs["key"] == "N2"
    np.testing.assert_array_equal(by_name["conversion"].values, by_key["conversion"].values)


def test_sweep_input_errors(nh3: Reaction) -> None:
    with pytest.raises(InputError, match="T must"):
        sweep(nh3, NH3_LOOP, [0.0, 700.0], [1e6])
    with pytest.raises(InputError, match="values="):
        sweep(nh3, hydrogen_to_nitrogen(), [700.0], [1e6])
    with pytest.raises(InputError, match="chunk_size"):
        sweep(nh3, NH3_LOOP, [700.0], [1e6], chunk_size=0)
    with pytest.raises(InputError, match="key"):
        sweep(nh3, NH3_LOOP, [700.0], [1e6], key="CH4")


# ---------------------------------------------------------------- exports


def test_dataframe_csv_and_json_round_trip(nh3: Reaction, tmp_path: Path) -> None:
    p = hydrogen_to_nitrogen(inerts={"Ar": 0.05})
    ds = sweep(nh3, p, [650.0, 750.0], [1e6, 1e7, 3e7], values=[2.0, 3.0])
    df = sweep_dataframe(ds)
    assert len(df) == 12
    assert {
        "T",
        "P",
        "H2_to_N2",
        "x_NH3",
        "n_Ar",
        "extent_1",
        "ln_K_1",
        "conversion",
        "converged",
    } <= set(df.columns)
    assert df.attrs["units"]["T"] == "K" and df.attrs["units"]["n_NH3"] == "mol"
    row = df[(df["T"] == 750.0) & (df["P"] == 1e7) & (df["H2_to_N2"] == 3.0)].iloc[0]
    assert (
        row["x_NH3"] == ds["mole_fraction"].sel(T=750.0, P=1e7, H2_to_N2=3.0, species="NH3").item()
    )
    path = write_sweep_csv(ds, tmp_path / "window.csv")
    assert "T [K]" in path.read_text().splitlines()[0]
    back = read_sweep_csv(path)
    assert back.attrs["units"]["x_NH3"] == "1"
    np.testing.assert_array_equal(back[df.columns].to_numpy(dtype=float), df.to_numpy(dtype=float))
    with pytest.raises(InputError, match="exists"):
        write_sweep_csv(ds, path)
    write_sweep_csv(df, path, overwrite=True)
    jpath = write_sweep_json(ds, tmp_path / "window.json")
    ds2 = read_sweep_json(jpath)
    for var in ds.data_vars:
        np.testing.assert_array_equal(ds2[var].values, ds[var].values)
        assert ds2[var].attrs == ds[var].attrs
    assert ds2.attrs["reactions"] == ds.attrs["reactions"]
    with pytest.raises(InputError, match="exists"):
        write_sweep_json(ds, jpath)


def test_failed_points_flagged_or_raised_and_round_trip(tmp_path: Path) -> None:
    # Points that genuinely fail: Peng-Robinson ammonia at 1000 bar allowed only two
    # fugacity updates cannot converge, so the sweep must flag them (NaN state) or raise,
    # never return a number there; the 0.01 bar points converge.
    rxn = Reaction("1/2 N2 + 3/2 H2 = NH3", data="janaf")
    feed = {"N2": 1.0, "H2": 3.0}
    T, P = [700.0, 800.0], [1e3, 1e8]
    opts = {"gas": "peng-robinson", "max_outer": 2, "kij": {("H2", "NH3"): 0.0}}
    with pytest.raises(ConvergenceError):
        sweep(rxn, feed, T, P, **opts)
    ds = sweep(rxn, feed, T, P, on_failure="flag", **opts)
    ok = ds["converged"].values
    assert ok.tolist() == [[True, False], [True, False]]
    assert np.all(np.isnan(ds["amount"].values[~ok]))
    assert np.all(np.isnan(ds["conversion"].values[~ok]))
    assert np.all(np.isfinite(ds["amount"].values[ok]))
    assert ds["mole_fraction"].sum("species").values[ok] == pytest.approx(1.0, abs=1e-14)
    back = read_sweep_json(write_sweep_json(ds, tmp_path / "flag.json"))
    np.testing.assert_array_equal(back["converged"].values, ok)
    np.testing.assert_array_equal(back["amount"].values, ds["amount"].values)  # NaN == NaN
    df = read_sweep_csv(write_sweep_csv(ds, tmp_path / "flag.csv"))
    assert df["converged"].tolist() == ok.ravel().tolist()
    assert df["n_NH3"].isna().tolist() == (~ok).ravel().tolist()
