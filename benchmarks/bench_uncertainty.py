"""Benchmark: Monte Carlo data uncertainty of ammonia synthesis on a T × P grid.

Target (issue 6): 1,000 samples × a 50 × 50 grid (600–900 K × 10–400 bar; an invented
3:1 H2:N2 feed) = 2.5e6 equilibrium solves in under 2 s on one core, peak memory under
1 GiB. Every figure is measured in this run:

* the vectorized run, :func:`eqconv.uncertainty.monte_carlo_equilibrium` with 2.5–97.5 %
  bands of conversion and composition (best and median of repeats, in a child process
  whose peak RSS is read from ``getrusage``);
* baseline A, what a user would write without this module: a loop over samples that
  perturbs the species data, rebuilds the reaction and calls :func:`eqconv.equilibrium` on
  the grid, then takes percentiles; run on a subset of the samples and *extrapolated*;
* baseline B: the same loop over samples calling the pure solver on the grid (only the
  samples-as-a-dimension trick removed); also extrapolated from a subset.

Baseline A is also checked to give the same conversions as the vectorized run for the same
draws. Results are appended to ``benchmarks/RESULTS_uncertainty.md``.

Run: ``python benchmarks/bench_uncertainty.py`` (``--quick`` for a smoke run).
"""

from __future__ import annotations

import os

for _var in (
    "OMP_NUM_THREADS",
    "OPENBLAS_NUM_THREADS",
    "MKL_NUM_THREADS",
    "NUMEXPR_NUM_THREADS",
    "VECLIB_MAXIMUM_THREADS",
):
    os.environ[_var] = "1"

import argparse  # noqa: E402
import datetime  # noqa: E402
import json  # noqa: E402
import platform  # noqa: E402
import resource  # noqa: E402
import statistics  # noqa: E402
import subprocess  # noqa: E402
import sys  # noqa: E402
import time  # noqa: E402
from dataclasses import dataclass  # noqa: E402
from pathlib import Path  # noqa: E402
from typing import Any  # noqa: E402

import numpy as np  # noqa: E402
from _common import cpu_model as _cpu_model  # noqa: E402  (benchmarks/_common.py)

HERE = Path(__file__).resolve().parent
RESULTS = HERE / "RESULTS_uncertainty.md"
EQUATION = "N2 + 3 H2 = 2 NH3"
FEED = {"N2": 1.0, "H2": 3.0}  # invented stoichiometric feed [mol]
SEED = 2024
PERCENTILES = (2.5, 50.0, 97.5)
TARGET_S = 2.0
TARGET_BYTES = 2**30


def _grid(n: int) -> tuple[np.ndarray, np.ndarray]:
    T = np.linspace(600.0, 900.0, n)
    P = np.geomspace(10e5, 400e5, n)
    return T[:, None], P[None, :]


@dataclass(frozen=True)
class _ScaledCp:
    """Cp model times (1 + c): how a user perturbs a heat-capacity curve."""

    base: Any
    c: float

    @property
    def T_min(self) -> float:
        return float(self.base.T_min)

    @property
    def T_max(self) -> float:
        return float(self.base.T_max)

    @property
    def method(self) -> str:
        return f"{self.base.method} x (1 + {self.c:.3g})"

    def cp(self, T: Any) -> Any:
        return (1.0 + self.c) * self.base.cp(T)

    def h_int(self, T: Any) -> Any:
        return (1.0 + self.c) * self.base.h_int(T)

    def s_int(self, T: Any) -> Any:
        return (1.0 + self.c) * self.base.s_int(T)


def _perturbed_reaction(du: Any, theta: np.ndarray) -> Any:
    from eqconv import Reaction

    ns = len(du.species)
    species = [
        sp.replace(
            hf298=sp.hf298 + theta[i],
            s298=sp.s298 + theta[ns + i],
            cp_model=_ScaledCp(sp.cp_model, float(theta[2 * ns + i])),
            note="Monte Carlo draw",
        )
        for i, sp in enumerate(du.species)
    ]
    return Reaction(EQUATION, data="janaf", species=species)


def _baseline_equilibrium(du: Any, thetas: np.ndarray, T: Any, P: Any) -> np.ndarray:
    """Baseline A: perturb data, rebuild the reaction, call eqconv.equilibrium per sample."""
    from eqconv.equilibrium import equilibrium

    out = []
    for theta in thetas:
        rxn = _perturbed_reaction(du, theta)
        res = equilibrium([rxn], FEED, T, P)
        out.append(np.asarray(res.conversion("N2")))
    conv = np.array(out)
    np.percentile(conv, PERCENTILES, axis=0)
    return conv


def _baseline_solver(du: Any, thetas: np.ndarray, T: Any, P: Any) -> np.ndarray:
    """Baseline B: one pure-solver call on the grid per sample (samples not a dimension)."""
    from eqconv.constants import P_BAR
    from eqconv.extent_solver import solve_extents

    rxn0 = _perturbed_reaction(du, np.zeros(du.n_params))
    out = []
    for theta in thetas:
        rxn = _perturbed_reaction(du, theta)
        sol = solve_extents(
            rxn0.nu[None, :], rxn.ln_K(T)[..., None], [1.0, 3.0, 0.0], np.log(P / P_BAR)
        )
        out.append(sol.extents[..., 0] / 1.0)
    conv = np.array(out)
    np.percentile(conv, PERCENTILES, axis=0)
    return conv


def _baseline_brentq(lnK: np.ndarray, T: Any, P: Any) -> np.ndarray:
    """Baseline C: per point and sample, scipy brentq on the extent (a scalar loop)."""
    import math

    from scipy.optimize import brentq

    def f(xi: float, lnk: float, lnp: float) -> float:
        n2, h2, nh3, tot = 1.0 - xi, 3.0 - 3.0 * xi, 2.0 * xi, 4.0 - 2.0 * xi
        return (
            2.0 * math.log(nh3 / tot)
            - math.log(n2 / tot)
            - 3.0 * math.log(h2 / tot)
            - 2.0 * lnp
            - lnk
        )

    lnP = np.log(np.broadcast_to(P, np.broadcast_shapes(np.shape(T), np.shape(P))) / 1e5)
    out = np.empty((lnK.shape[0], *lnP.shape))
    for s in range(lnK.shape[0]):
        lk = np.broadcast_to(lnK[s, ..., 0], lnP.shape)
        for ix in np.ndindex(lnP.shape):
            out[(s, *ix)] = brentq(f, 1e-15, 1.0 - 1e-15, args=(lk[ix], lnP[ix]), xtol=1e-15)
    return out


def child(n_samples: int, n_grid: int, repeats: int, n_baseline: int) -> dict[str, Any]:
    """Measure in this (fresh) process; return a JSON-able dict."""
    rss_start = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss * 1024
    from eqconv import Reaction
    from eqconv.uncertainty import data_uncertainty, monte_carlo_equilibrium

    rxn = Reaction(EQUATION, data="janaf")
    du = data_uncertainty(rxn)
    T, P = _grid(n_grid)
    monte_carlo_equilibrium(rxn, FEED, T, P, n_samples=10, seed=SEED)  # imports, caches
    rss_ready = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss * 1024
    times = []
    for _ in range(repeats):
        t0 = time.perf_counter()
        mc = monte_carlo_equilibrium(
            rxn, FEED, T, P, n_samples=n_samples, seed=SEED, percentiles=PERCENTILES
        )
        times.append(time.perf_counter() - t0)
    rss_peak = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss * 1024
    solves = n_samples * n_grid * n_grid

    # same draws as the vectorized run (the generator stream does not depend on chunking)
    thetas = du.draw(n_baseline, np.random.default_rng(SEED))
    kept = monte_carlo_equilibrium(
        rxn, FEED, T, P, n_samples=n_baseline, seed=SEED, keep_samples=True
    )
    t0 = time.perf_counter()
    conv_b = _baseline_solver(du, thetas, T, P)
    t_b = time.perf_counter() - t0
    result: dict[str, Any] = {
        "n_samples": n_samples,
        "grid": [n_grid, n_grid],
        "solves": solves,
        "times": times,
        "best": min(times),
        "median": statistics.median(times),
        "rss_start": rss_start,
        "rss_ready": rss_ready,
        "rss_peak": rss_peak,
        "x_band_at_750K_100bar": None,
        "baseline_solver": {
            "n": n_baseline,
            "time": t_b,
            "extrapolated": t_b * n_samples / n_baseline,
            "max_diff": float(np.max(np.abs(conv_b - kept.conversion_samples))),
        },
    }
    from eqconv.uncertainty import ln_K_jacobian

    lnK = rxn.ln_K(T)[None, ..., None] + np.tensordot(
        thetas[:2], ln_K_jacobian(rxn, T), axes=(1, 0)
    )
    t0 = time.perf_counter()
    conv_c = _baseline_brentq(lnK, T, P)
    t_c = time.perf_counter() - t0
    result["baseline_brentq"] = {
        "n": 2,
        "time": t_c,
        "extrapolated": t_c * n_samples / 2,
        "max_diff": float(np.max(np.abs(conv_c - kept.conversion_samples[:2]))),
    }
    a = int(np.argmin(np.abs(T[:, 0] - 750.0)))
    b = int(np.argmin(np.abs(P[0] - 100e5)))
    result["x_band_at_750K_100bar"] = [
        float(T[a, 0]),
        float(P[0, b]),
        float(mc.nominal_conversion[a, b]),
        float(mc.conversion.lower[a, b]),
        float(mc.conversion.upper[a, b]),
    ]
    try:
        import eqconv.equilibrium  # noqa: F401

        has_equilibrium = True
    except ImportError:  # pragma: no cover - before the solver module exists
        has_equilibrium = False
    if has_equilibrium:
        t0 = time.perf_counter()
        conv_a = _baseline_equilibrium(du, thetas, T, P)
        t_a = time.perf_counter() - t0
        result["baseline_equilibrium"] = {
            "n": n_baseline,
            "time": t_a,
            "extrapolated": t_a * n_samples / n_baseline,
            "max_diff": float(np.max(np.abs(conv_a - kept.conversion_samples))),
        }
    return result


def _report(r: dict[str, Any], quick: bool) -> str:
    mib = 2**20
    now = datetime.datetime.now().astimezone().strftime("%Y-%m-%d %H:%M %Z")
    rate = r["solves"] / r["best"]
    lines = [
        f"## {now}{' (quick smoke run, not the target size)' if quick else ''}",
        "",
        f"Machine: {platform.platform()}; CPU: {_cpu_model()} ({os.cpu_count()} logical "
        f"cores, benchmark pinned to 1 thread); Python {platform.python_version()}; "
        f"numpy {np.__version__}.",
        "",
        f"Case: {EQUATION}, invented feed N2:H2 = 1:3, ideal gas, NIST-JANAF data with the "
        f"project's default uncertainties; {r['n_samples']} samples × "
        f"{r['grid'][0]} × {r['grid'][1]} grid (600–900 K × 10–400 bar) = "
        f"{r['solves']:.3g} equilibrium solves; percentiles {PERCENTILES} of conversion and "
        "mole fractions.",
        "",
        "| measurement | value | target |",
        "|---|---|---|",
        f"| vectorized Monte Carlo, best of {len(r['times'])} | {r['best']:.3f} s "
        f"({rate:.3g} solves/s) | < {TARGET_S:g} s "
        f"({'met' if r['best'] < TARGET_S else 'NOT met'}) |",
        f"| same, median | {r['median']:.3f} s | |",
        f"| peak RSS of the benchmark process | {r['rss_peak'] / mib:.0f} MiB "
        f"(after imports and a warm-up: {r['rss_ready'] / mib:.0f} MiB) | < 1024 MiB "
        f"({'met' if r['rss_peak'] < TARGET_BYTES else 'NOT met'}) |",
    ]
    bs = r["baseline_solver"]
    lines.append(
        f"| baseline B: loop over samples, pure solver on the grid | {bs['extrapolated']:.2f} s "
        f"(extrapolated from {bs['n']} samples: {bs['time']:.2f} s); "
        f"{bs['extrapolated'] / r['best']:.1f}× slower | |"
    )
    if "baseline_equilibrium" in r:
        ba = r["baseline_equilibrium"]
        lines.append(
            f"| baseline A: loop over samples, rebuild data, `eqconv.equilibrium` on the grid "
            f"| {ba['extrapolated']:.2f} s (extrapolated from {ba['n']} samples: "
            f"{ba['time']:.2f} s); {ba['extrapolated'] / r['best']:.1f}× slower | |"
        )
    else:
        lines.append(
            "| baseline A (`eqconv.equilibrium` per sample) | not run: "
            "eqconv.equilibrium not available | |"
        )
    bc = r["baseline_brentq"]
    lines.append(
        f"| baseline C: scalar loop, `scipy.optimize.brentq` per point and sample "
        f"| {bc['extrapolated']:.1f} s (extrapolated from {bc['n']} samples × "
        f"{r['grid'][0] * r['grid'][1]} points: {bc['time']:.2f} s); "
        f"{bc['extrapolated'] / r['best']:.0f}× slower | |"
    )
    x = r["x_band_at_750K_100bar"]
    lines += [
        "",
        f"Agreement with the baselines on the same draws: max |ΔX| = {bs['max_diff']:.1e} "
        "(baseline B)"
        + (
            f", {r['baseline_equilibrium']['max_diff']:.1e} (baseline A)"
            if "baseline_equilibrium" in r
            else ""
        )
        + f", {bc['max_diff']:.1e} (baseline C).",
        f"Example band: at {x[0]:.0f} K, {x[1] / 1e5:.0f} bar the N2 conversion is "
        f"{x[2]:.4f} (2.5–97.5 %: {x[3]:.4f}–{x[4]:.4f}).",
        f"Timing repeats [s]: {', '.join(f'{t:.3f}' for t in r['times'])}. Wall-clock times on "
        "a shared machine; other processes may have been running.",
        "",
    ]
    return "\n".join(lines)


def main(argv: list[str] | None = None) -> int:
    """Run the child measurement in a fresh process and append the report."""
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--quick", action="store_true", help="small smoke run")
    ap.add_argument("--child", action="store_true", help=argparse.SUPPRESS)
    ap.add_argument("--no-write", action="store_true", help="print only")
    args = ap.parse_args(argv)
    n_samples, n_grid, repeats, n_base = (50, 10, 2, 3) if args.quick else (1000, 50, 5, 100)
    if args.child:
        print(json.dumps(child(n_samples, n_grid, repeats, n_base)))
        return 0
    cmd = [sys.executable, str(Path(__file__).resolve()), "--child"]
    if args.quick:
        cmd.append("--quick")
    proc = subprocess.run(
        cmd,
        capture_output=True,
        text=True,
        check=False,
        cwd=HERE.parent,
        env={**os.environ, "PYTHONWARNINGS": "ignore"},
    )
    if proc.returncode != 0:
        sys.stderr.write(proc.stderr)
        return proc.returncode
    report = _report(json.loads(proc.stdout.strip().splitlines()[-1]), args.quick)
    print(report)
    if not args.no_write:
        new = not RESULTS.exists()
        with RESULTS.open("a", encoding="utf-8") as fh:
            if new:
                fh.write(
                    "# Benchmark results: Monte Carlo data uncertainty "
                    "(benchmarks/bench_uncertainty.py)\n\n"
                )
            fh.write(report + "\n")
    return 0


if __name__ == "__main__":
    sys.exit(main())
