"""Benchmark: the Gibbs (element-potential) formulation on steam reforming + shift.

Issue 3, case 3. Species CH4, H2O, CO, CO2, H2 (default data), steam:carbon 3, a 200 × 200
grid 700-1300 K × 1-50 bar. Baseline, measured in the same run: a per-point
``scipy.optimize.minimize(method="SLSQP")`` loop on the same Gibbs energy with analytic
gradients and element-balance constraints, on a random subset of 300 points.

Targets: >= 1e6 points/s, >= 300× the SLSQP loop, residuals <= 1e-10 where SLSQP's are
1e-7-1e-3. Also reported: peak memory for a 1e6-point grid and time to first result in a
fresh process. Results are appended to benchmarks/RESULTS_gibbs.md (not a timed test).

Run: ``python benchmarks/bench_gibbs.py [--quick]``.
"""

from __future__ import annotations

import argparse
import datetime
import platform
import subprocess
import sys
import time
from pathlib import Path

import numpy as np
from scipy.optimize import minimize

from eqconv import get_species
from eqconv.constants import P_BAR
from eqconv.gibbs import minimize_gibbs

SPECIES = ["CH4", "H2O", "CO", "CO2", "H2"]
A = np.array([[1, 4, 0], [0, 2, 1], [1, 0, 1], [1, 0, 2], [0, 2, 0]], dtype=float)
NU = np.array([[-1, -1, 1, 0, 3], [0, -1, -1, 1, 1]], dtype=float)  # reforming, shift
FEED = np.array([1.0, 3.0, 0.0, 0.0, 0.0])  # steam:carbon 3
OUT = Path(__file__).with_name("RESULTS_gibbs.md")


def grid(nT: int, nP: int) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    T = np.linspace(700.0, 1300.0, nT)[:, None]
    P = np.linspace(1e5, 50e5, nP)[None, :]
    mu0 = np.stack([get_species(k).mu0_over_RT(T) for k in SPECIES], axis=-1)
    return T, P, np.broadcast_to(mu0, (nT, nP, 5)) + 0.0 * P[..., None]


def residuals(mu0: np.ndarray, n: np.ndarray, lnP: np.ndarray) -> tuple[np.ndarray, ...]:
    """max |ln Q − ln K| over both reactions and max relative element residual, here."""
    with np.errstate(divide="ignore", invalid="ignore"):
        ln_x = np.log(n) - np.log(n.sum(axis=-1, keepdims=True))
        stat = np.abs((mu0 + lnP[..., None] + ln_x) @ NU.T).max(axis=-1)
    b = FEED @ A
    el = (np.abs(n @ A - b) / b).max(axis=-1)
    return np.nan_to_num(stat, nan=np.inf), el


def slsqp_point(g: np.ndarray) -> tuple[np.ndarray, bool]:
    """What a competent user would write: min G/RT s.t. Aᵀn = b, n > 0, analytic gradient."""
    b = FEED @ A

    def G(n: np.ndarray) -> float:
        return float(n @ (g + np.log(n / n.sum())))

    def dG(n: np.ndarray) -> np.ndarray:
        return g + np.log(n / n.sum())

    x0 = FEED + NU.T @ np.array([0.02, 0.01])  # feasible, every species present
    cons = {"type": "eq", "fun": lambda n: A.T @ n - b, "jac": lambda n: A.T}
    res = minimize(
        G,
        x0,
        jac=dG,
        method="SLSQP",
        bounds=[(1e-30, None)] * 5,
        constraints=[cons],
        options={"ftol": 1e-14, "maxiter": 500},
    )
    return res.x, bool(res.success)


def pct(a: np.ndarray) -> str:
    q = np.percentile(a, [50, 90, 99, 100])
    return " / ".join(f"{v:.1e}" for v in q)


def fresh_process(code: str) -> str:
    return subprocess.run(
        [sys.executable, "-c", code], capture_output=True, text=True, check=True
    ).stdout.strip()


def main(argv: list[str] | None = None) -> int:
    ap = argparse.ArgumentParser(description=__doc__)
    ap.add_argument("--quick", action="store_true", help="fewer repeats, no 1e6 grid")
    args = ap.parse_args(argv)
    T, P, mu0 = grid(200, 200)
    lnP = np.log(P / P_BAR) + 0.0 * T
    npts = T.size * P.size
    minimize_gibbs(A, mu0, FEED, lnP)  # warm-up (imports, caches)
    wall, cpu = [], []
    for _ in range(3 if args.quick else 11):
        t0, c0 = time.perf_counter(), time.process_time()
        sol = minimize_gibbs(A, mu0, FEED, lnP)
        wall.append(time.perf_counter() - t0)
        cpu.append(time.process_time() - c0)
    t_g = float(np.median(wall))
    stat_g, el_g = residuals(mu0, sol.amounts, lnP)

    rng = np.random.default_rng(3)
    idx = rng.choice(npts, 300, replace=False)
    gflat = (mu0 + lnP[..., None]).reshape(-1, 5)[idx]
    t0 = time.perf_counter()
    out = [slsqp_point(g) for g in gflat]
    t_s = (time.perf_counter() - t0) / len(idx)
    n_s = np.array([o[0] for o in out])
    ok_s = np.array([o[1] for o in out])
    stat_s, el_s = residuals(mu0.reshape(-1, 5)[idx], n_s, lnP.reshape(-1)[idx])
    n_ref = sol.amounts.reshape(-1, 5)[idx]
    worst = np.max(np.abs(np.log(n_s / n_ref)), axis=1)  # worst species, ln of the ratio

    extra = []
    if not args.quick:
        mem = fresh_process(
            f"import resource, numpy as np, sys; sys.path.insert(0, {str(OUT.parents[1])!r})\n"
            "from benchmarks.bench_gibbs import grid, A, FEED\n"
            "from eqconv.gibbs import minimize_gibbs\n"
            "from eqconv.constants import P_BAR\n"
            "T, P, mu0 = grid(1000, 1000)\n"
            "r0 = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss\n"
            "s = minimize_gibbs(A, mu0, FEED, np.log(P / P_BAR))\n"
            "r1 = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss\n"
            "print(r0 / 1024, r1 / 1024, bool(s.all_converged))"
        )
        r0, r1, conv1m = mem.split()
        first = fresh_process(
            "import time; t = time.perf_counter()\n"
            "from eqconv.gibbs_api import gibbs_equilibrium\n"
            "r = gibbs_equilibrium(['CH4', 'H2O', 'CO', 'CO2', 'H2'], {'CH4': 1, 'H2O': 3},"
            " T=1000.0, P=20e5)\n"
            "print(time.perf_counter() - t)"
        )
        extra = [
            f"| peak RSS, 1e6-point grid (inputs + outputs included) | {float(r1):.0f} MiB "
            f"(before the solve: {float(r0):.0f} MiB; all converged: {conv1m}) | < 1 GiB |",
            f"| time to first result, fresh process (import + one point) | "
            f"{float(first):.2f} s | — |",
        ]

    cpu_model = "unknown"
    for line in Path("/proc/cpuinfo").read_text().splitlines():
        if line.startswith("model name"):
            cpu_model = line.split(":", 1)[1].strip()
            break
    rate = npts / t_g
    lines = [
        f"\n## {datetime.datetime.now().isoformat(timespec='minutes')} — Gibbs formulation, "
        "steam reforming + shift (issue 3, case 3)\n",
        f"Machine: {platform.platform()}, CPU {cpu_model} ({len(wall)} runs, "
        f"{__import__('os').cpu_count()} logical CPUs), Python {platform.python_version()}, "
        f"numpy {np.__version__}.",
        "Grid 200 × 200, 700–1300 K × 1–50 bar, CH4:H2O = 1:3, default species data.\n",
        "| quantity | measured | target |",
        "|---|---|---|",
        f"| Gibbs solver, points/s (median wall time {t_g * 1e3:.1f} ms; best "
        f"{min(wall) * 1e3:.1f} ms, CPU median {np.median(cpu) * 1e3:.1f} ms) | "
        f"{rate:.3g} (best {npts / min(wall):.3g}) | >= 1e6 |",
        f"| SLSQP loop, points/s (300 points) | {1 / t_s:.3g} | — |",
        f"| speed-up over SLSQP | {t_s * rate:.0f}× | >= 300× |",
        f"| Gibbs: converged points | {int(sol.converged.sum())} / {npts} | all |",
        f"| Gibbs: max iterations / mean | {int(sol.iterations.max())} / "
        f"{sol.iterations.mean():.2f} | — |",
        f"| Gibbs: max &#124;ln Q − ln K&#124;, p50/p90/p99/max (recomputed) | "
        f"{pct(stat_g.ravel())} | <= 1e-10 |",
        f"| Gibbs: element balance (relative), p50/p90/p99/max | {pct(el_g.ravel())} | <= 1e-12 |",
        f"| SLSQP: reported success | {int(ok_s.sum())} / {len(idx)} | — |",
        f"| SLSQP: max &#124;ln Q − ln K&#124;, p50/p90/p99/max | {pct(stat_s)} | — |",
        f"| SLSQP: element balance (relative), p50/p90/p99/max | {pct(el_s)} | — |",
        f"| SLSQP: worst species vs Gibbs, &#124;ln(n/n_ref)&#124; p50/p90/p99/max | "
        f"{pct(worst)} | — |",
        *extra,
    ]
    text = "\n".join(lines) + "\n"
    print(text)
    with OUT.open("a", encoding="utf-8") as fh:
        if OUT.stat().st_size == 0:
            fh.write("# Benchmark results: Gibbs formulation (benchmarks/bench_gibbs.py)\n")
        fh.write(text)
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
