"""Benchmark of eqconv.eos.ln_phi_mixture against a per-point loop over thermo's PRMIX.

Four components (N2, H2, NH3, CH4: an invented ammonia-synthesis loop gas), Peng-Robinson
with the database kij, random states 600-900 K and 1-30 MPa. Measures points per second of
the vectorized function on 40,000 and 1,000,000 points and of a Python loop that builds one
``thermo.eos_mix.PRMIX`` object per point (2,000 points) computing the same fugacity
coefficients, checks that both agree, and appends the figures with date and machine to
benchmarks/RESULTS_eos.md.

Run: ``python benchmarks/bench_eos.py`` from the repository root.
"""

from __future__ import annotations

import datetime as _dt
import os
import platform
import sys
import time
from pathlib import Path

import numpy as np
import thermo
from _common import cpu_model as _cpu_model  # benchmarks/_common.py
from thermo.eos_mix import PRMIX

from eqconv.eos import ln_phi_mixture
from eqconv.eos_data import critical_constants, interaction_parameters

CAS = ["7727-37-9", "1333-74-0", "7664-41-7", "74-82-8"]  # N2, H2, NH3, CH4
RESULTS = Path(__file__).with_name("RESULTS_eos.md")


def _states(n: int, seed: int) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    rng = np.random.default_rng(seed)
    T = rng.uniform(600.0, 900.0, n)
    P = rng.uniform(1.0e6, 3.0e7, n)
    y = rng.dirichlet([2.0, 6.0, 1.0, 0.5], n)
    return T, P, y


def _timings(fn, repeats: int) -> tuple[float, float]:
    """Best and median wall time of `repeats` calls [s]."""
    times = []
    for _ in range(repeats):
        t0 = time.perf_counter()
        fn()
        times.append(time.perf_counter() - t0)
    return min(times), float(np.median(times))


def main() -> int:
    load = os.getloadavg()
    cc = critical_constants(CAS)
    kij, _ = interaction_parameters(CAS)
    Tc, Pc, om = cc.Tc, cc.Pc, cc.omega

    rows: list[tuple[str, int, float, float]] = []
    for n, repeats in ((40_000, 100), (1_000_000, 7)):
        T, P, y = _states(n, seed=n)
        ln_phi_mixture(T, P, y, Tc, Pc, om, kij)  # warm-up
        best, med = _timings(
            lambda T=T, P=P, y=y: ln_phi_mixture(T, P, y, Tc, Pc, om, kij), repeats
        )
        rows.append((f"eqconv ln_phi_mixture ({repeats} runs)", n, best, med))

    n_loop = 2_000
    T, P, y = _states(n_loop, seed=1)
    tcs, pcs, oms, ks = Tc.tolist(), Pc.tolist(), om.tolist(), kij.tolist()
    ref = np.empty((n_loop, len(CAS)))
    t0 = time.perf_counter()
    for i in range(n_loop):
        eos = PRMIX(Tcs=tcs, Pcs=pcs, omegas=oms, zs=y[i].tolist(), kijs=ks, T=T[i], P=P[i])
        ref[i] = eos.lnphis_g if hasattr(eos, "lnphis_g") else eos.lnphis_l
    t_loop = time.perf_counter() - t0
    rows.append(("per-point loop over thermo PRMIX (1 run)", n_loop, t_loop, t_loop))
    ours = ln_phi_mixture(T, P, y, Tc, Pc, om, kij).ln_phi
    max_diff = float(np.max(np.abs(ours - ref)))

    stamp = _dt.datetime.now(_dt.UTC).strftime("%Y-%m-%d %H:%M UTC")
    lines = [
        f"## {stamp}",
        "",
        f"- machine: {platform.platform()}; CPU: {_cpu_model()}; {os.cpu_count()} logical CPUs; "
        f"load average before the run {load[0]:.2f} (other work on the machine slows timings)",
        f"- Python {platform.python_version()}, numpy {np.__version__}, "
        f"thermo {thermo.__version__}",
        "- problem: 4 components (N2, H2, NH3, CH4), Peng-Robinson, database kij, "
        "T 600-900 K, P 1-30 MPa, random compositions",
        "",
        "| method | points | best [ms] | median [ms] | points/s (best) | us/point (best) |",
        "|---|---:|---:|---:|---:|---:|",
    ]
    for name, n, best, med in rows:
        lines.append(
            f"| {name} | {n:,} | {best * 1e3:.2f} | {med * 1e3:.2f} | {n / best:,.0f} "
            f"| {best / n * 1e6:.3f} |"
        )
    speedup = (rows[0][1] / rows[0][2]) / (n_loop / t_loop)
    lines += [
        "",
        f"- speed-up at 40,000 points over the thermo loop: {speedup:,.0f}x",
        f"- max |ln phi (eqconv) - ln phi (thermo PRMIX)| on the loop's {n_loop:,} points: "
        f"{max_diff:.2e}",
        "",
    ]
    text = "\n".join(lines)
    new_file = not RESULTS.exists()
    with RESULTS.open("a", encoding="utf-8") as fh:
        if new_file:
            fh.write(
                "# Benchmark results: cubic-EOS fugacity coefficients (benchmarks/bench_eos.py)\n\n"
            )
        fh.write(text + "\n")
    print(text)
    return 0


if __name__ == "__main__":
    sys.exit(main())
