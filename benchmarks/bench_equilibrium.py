"""Benchmark of eqconv.equilibrium (issue 3) against per-point loops, measured in one run.

Cases (200 × 200 grids, JANAF data through ``eqconv.Reaction(..., data="janaf").ln_K``):

1. ammonia synthesis N2 + 3 H2 = 2 NH3, 600-900 K × 10-400 bar, feed H2:N2 = 3:1 with 5 % Ar;
   baseline: a per-point ``scipy.optimize.brentq`` loop on the extent (bracket just inside
   the feasible interval, math.log, residual checked afterwards).
2. steam reforming CH4 + H2O = CO + 3 H2 with shift CO + H2O = CO2 + H2, steam:carbon 3,
   700-1300 K × 1-50 bar; baseline: a per-point ``scipy.optimize.fsolve`` loop on the two
   extents, warm-started from the previous point of the row, with retries from fixed guesses
   and a residual check (|ln Q − ln K| ≤ 1e-8, all amounts > 0) before accepting; also on
   a wide grid, 300-1500 K × 0.1-1000 bar, where that loop fails at many points.
3. (when eqconv.gibbs exists) the Gibbs formulation on case 2 against per-point
   ``scipy.optimize.minimize(method="SLSQP")`` on the same Gibbs energy.

Also: peak memory of a 1e6-point grid and time to the first result in a fresh process (both
in subprocesses), and the absolute targets read on this machine through the baselines (the
per-point loop rates quoted with the targets against those measured here). Results are
appended with date and machine to benchmarks/RESULTS.md.
eqconv figures are the best of several repeats (the machine is shared; the median is given
too); baselines run once on a subset of the grid and are scaled to points per second.

Run: ``python benchmarks/bench_equilibrium.py`` from the repository root.
"""

from __future__ import annotations

import datetime as _dt
import json
import math
import os
import platform
import subprocess
import sys
import time
import warnings
from pathlib import Path
from typing import Any

import numpy as np
import scipy
from _common import cpu_model as _cpu_model  # benchmarks/_common.py
from _common import timed as _timed
from scipy.optimize import brentq, fsolve, minimize

from eqconv import Reaction
from eqconv.equilibrium import equilibrium
from eqconv.errors import PhaseWarning
from eqconv.extent_solver import solve_extents
from eqconv.result import EquilibriumResult

RESULTS = Path(__file__).with_name("RESULTS.md")
P0 = 1e5
NH3_FEED = {"N2": 0.95 * 0.25, "H2": 0.95 * 0.75, "Ar": 0.05}
REF_FEED = {"CH4": 1.0, "H2O": 3.0}


def _with_y(res: EquilibriumResult) -> EquilibriumResult:
    """The result, with its mole fractions computed (part of the timed work)."""
    _ = res.mole_fractions
    return res


# ---------------------------------------------------------------------------- case 1
def _brentq_loop(
    pts: list[tuple[int, int]], lnK_T: np.ndarray, P_row: np.ndarray
) -> tuple[np.ndarray, int, float]:
    """Case 1's baseline: brentq on the extent at each (T index, P index); seconds."""
    a, b, c = NH3_FEED["N2"], NH3_FEED["H2"], NH3_FEED["Ar"]
    xmax = min(a, b / 3.0)
    out = np.empty(len(pts))
    bad = 0
    t0 = time.perf_counter()
    for k, (i, j) in enumerate(pts):
        lk, lp = lnK_T[i], math.log(P_row[j] / P0)

        def f(x: float, lk: float = lk, lp: float = lp) -> float:
            return (
                2 * math.log(2 * x)
                + 2 * math.log(a + b + c - 2 * x)
                - math.log(a - x)
                - 3 * math.log(b - 3 * x)
                - 2 * lp
                - lk
            )

        x = brentq(f, 1e-12 * xmax, xmax * (1 - 1e-12), xtol=1e-15, rtol=1e-15)
        out[k] = x
        bad += abs(f(x)) > 1e-8
    return out, bad, time.perf_counter() - t0


_PROBE: list[np.ndarray] = []


def _probe() -> float:
    """Machine-speed probe [points/s]: case 1's brentq loop on 400 points, right now."""
    if not _PROBE:
        _PROBE.append(Reaction("N2 + 3 H2 = 2 NH3", data="janaf").ln_K(np.linspace(600, 900, 200)))
    pts = [(i, j) for i in range(0, 200, 10) for j in range(0, 200, 10)]
    return len(pts) / _brentq_loop(pts, _PROBE[0], np.linspace(10e5, 400e5, 200))[2]


def _timed_probed(fn: Any, repeats: int) -> tuple[float, float, Any, float]:
    """:func:`_timed` with the speed probe run just before and just after (its mean)."""
    p0 = _probe()
    best, med, res = _timed(fn, repeats)
    return best, med, res, 0.5 * (p0 + _probe())


def case_ammonia(lines: list[str]) -> dict[str, float]:
    T = np.linspace(600.0, 900.0, 200)[:, None]
    P = np.linspace(10e5, 400e5, 200)[None, :]
    rxn = Reaction("N2 + 3 H2 = 2 NH3", data="janaf")
    N = 40_000
    best, med, res, probe = _timed_probed(lambda: _with_y(equilibrium(rxn, NH3_FEED, T, P)), 15)
    assert res.converged.all()
    r_max = float(np.abs(res.residuals).max())
    # the array layer alone, on the same ln K (Reaction.ln_K and result assembly excluded)
    lnK = rxn.ln_K(T)[..., None]
    n0 = [NH3_FEED["N2"], NH3_FEED["H2"], 0.0, NH3_FEED["Ar"]]
    nu = [[-1.0, -3.0, 2.0, 0.0]]
    b2, m2, _ = _timed(lambda: solve_extents(nu, lnK, n0, np.log(P / P0)), 7)

    # baseline: brentq per point, as a competent user writes it
    lnK_T = rxn.ln_K(T[:, 0])
    pts = [(i, j) for i in range(0, 200, 5) for j in range(0, 200, 4)]  # 2000 points
    out, bad, t_base = _brentq_loop(pts, lnK_T, P[0])
    base_rate = len(pts) / t_base
    ours = np.array([res.extents[0][i, j] for i, j in pts])
    agree = float(np.max(np.abs(out / ours - 1.0)))
    rate, rate_med = N / best, N / med
    lines += [
        "### Case 1: ammonia synthesis, 5 % Ar, 200 × 200 (600-900 K × 10-400 bar)",
        "",
        "| method | points/s | note |",
        "|---|---|---|",
        f"| eqconv.equilibrium + mole fractions | {rate:.3g} (median {rate_med:.3g}) | "
        f"{int(res.converged.sum())}/{N} converged, max |ln Q − ln K| = {r_max:.1e}, "
        f"iterations ≤ {int(res.iterations.max())} |",
        f"| eqconv.extent_solver.solve_extents (array layer) | {N / b2:.3g} (median "
        f"{N / m2:.3g}) | same ln K |",
        f"| per-point brentq loop | {base_rate:.3g} | {len(pts)} points, {bad} above 1e-8; "
        f"max relative difference to eqconv {agree:.1e} |",
        "",
        f"Targets: ≥ 1e7 points/s → {'met' if rate >= 1e7 else 'NOT met'} ({rate:.3g}); "
        f"≥ 100 × brentq → {rate / base_rate:.0f} ×.",
        "",
    ]
    return {"rate": rate, "base": base_rate, "probe": probe}


# ---------------------------------------------------------------------------- case 2
def _reforming_grid() -> tuple[np.ndarray, np.ndarray, list[Reaction]]:
    T = np.linspace(700.0, 1300.0, 200)[:, None]
    P = np.linspace(1e5, 50e5, 200)[None, :]
    rx = [
        Reaction("CH4 + H2O = CO + 3 H2", data="janaf"),
        Reaction("CO + H2O = CO2 + H2", data="janaf"),
    ]
    return T, P, rx


def _fsolve_loop(lnK: np.ndarray, lnP: np.ndarray) -> tuple[np.ndarray, int, int, float]:
    """Per-point fsolve with warm start and residual-checked retries (rows of T)."""

    def F(x: np.ndarray, k1: float, k2: float, lp: float) -> list[float]:
        a, b = x
        n = (1 - a, 3 - a - b, a - b, 3 * a + b, b)
        if min(n) <= 0.0:
            return [1e3, 1e3]
        tot = 4 + 2 * a
        return [
            math.log(n[2])
            + 3 * math.log(n[3])
            - math.log(n[0])
            - math.log(n[1])
            + 2 * (lp - math.log(tot))
            - k1,
            math.log(n[4]) + math.log(n[3]) - math.log(n[2]) - math.log(n[1]) - k2,
        ]

    guesses = [(0.5, 0.25), (0.9, 0.3), (0.1, 0.05), (0.99, 0.5), (0.02, 0.01)]
    out = np.full((lnK.shape[0], lnP.size, 2), np.nan)
    failed = silent = 0
    t0 = time.perf_counter()
    for i in range(lnK.shape[0]):
        warm = None
        for j in range(lnP.size):
            args = (lnK[i, 0], lnK[i, 1], lnP[j])
            ok = False
            for g in ([warm] if warm is not None else []) + guesses:
                x, _info, ier, _msg = fsolve(F, g, args=args, full_output=True, xtol=1e-12)
                r = np.max(np.abs(F(x, *args)))
                if ier == 1 and r > 1e-8:
                    silent += 1  # fsolve reports success with a wrong answer
                if ier == 1 and r <= 1e-8:
                    ok = True
                    break
            if ok:
                out[i, j] = x
                warm = x
            else:
                failed += 1
                warm = None
    return out, failed, silent, time.perf_counter() - t0


def case_reforming(lines: list[str]) -> dict[str, float]:
    T, P, rx = _reforming_grid()
    N = 40_000
    best, med, res, probe = _timed_probed(lambda: _with_y(equilibrium(rx, REF_FEED, T, P)), 11)
    conv = int(res.converged.sum())
    r_max = float(np.abs(res.residuals).max())
    lnK = np.stack([r.ln_K(T[:, 0]) for r in rx], axis=-1)
    nu = [[-1.0, -1.0, 1.0, 3.0, 0.0], [0.0, -1.0, -1.0, 1.0, 1.0]]
    b2, m2, _ = _timed(
        lambda: solve_extents(nu, lnK[:, None, :], [1.0, 3.0, 0.0, 0.0, 0.0], np.log(P / P0)), 5
    )
    rows = slice(0, 200, 4)  # 50 rows of T × 200 P = 10,000 points
    x, failed, silent, t_base = _fsolve_loop(lnK[rows], np.log(P[0] / P0))
    n_base = x.shape[0] * x.shape[1]
    base_rate = n_base / t_base
    ours = np.stack(res.extents, axis=-1)[rows]
    good = np.isfinite(x[..., 0])
    agree = float(np.max(np.abs(x[good] - ours[good])))
    ours_ok = bool(res.converged[rows][~good].all()) if np.any(~good) else True
    rate, rate_med = N / best, N / med
    lines += [
        "### Case 2: steam reforming + shift, S/C 3, 200 × 200 (700-1300 K × 1-50 bar)",
        "",
        "| method | points/s | note |",
        "|---|---|---|",
        f"| eqconv.equilibrium + mole fractions | {rate:.3g} (median {rate_med:.3g}) | "
        f"{conv}/{N} converged, max |ln Q − ln K| = {r_max:.1e}, iterations ≤ "
        f"{int(res.iterations.max())} |",
        f"| eqconv.extent_solver.solve_extents (array layer) | {N / b2:.3g} (median "
        f"{N / m2:.3g}) | same ln K |",
        f"| per-point fsolve, warm start + retries | {base_rate:.3g} | {n_base} points: "
        f"{failed} failed after all retries, {silent} attempts flagged success with "
        f"|residual| > 1e-8; max |Δξ| to eqconv {agree:.1e} |",
        "",
        f"Targets: ≥ 2e6 points/s → {'met' if rate >= 2e6 else 'NOT met'} ({rate:.3g}); "
        f"≥ 50 × fsolve → {rate / base_rate:.0f} ×; eqconv converged at all "
        f"{int(np.count_nonzero(~good))} points where fsolve failed: {ours_ok}.",
        "",
    ]
    return {"rate": rate, "base": base_rate, "probe": probe}


# ---------------------------------------------------------------------------- case 2, wide
def case_reforming_wide(lines: list[str]) -> None:
    """Case 2 on a wide grid (300-1500 K × 0.1-1000 bar), where per-point fsolve fails."""
    T = np.linspace(300.0, 1500.0, 200)[:, None]
    P = np.geomspace(0.1e5, 1000e5, 200)[None, :]
    _, _, rx = _reforming_grid()
    N = 40_000
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", PhaseWarning)  # counted below instead
        best, med, res = _timed(
            lambda: _with_y(equilibrium(rx, REF_FEED, T, P, on_failure="flag")), 11
        )
    conv = int(res.converged.sum())
    r_max = float(np.nanmax(np.abs(res.residuals)))
    wet = int(np.count_nonzero(res.gas_phase_check().condenses))
    lnK = np.stack([r.ln_K(T[:, 0]) for r in rx], axis=-1)
    rows, cols = slice(0, 200, 4), slice(0, 200, 4)  # 50 × 50 = 2,500 points
    x, failed, silent, t_base = _fsolve_loop(lnK[rows], np.log(P[0, cols] / P0))
    n_base = x.shape[0] * x.shape[1]
    ours = np.stack(res.extents, axis=-1)[rows, cols]
    good = np.isfinite(x[..., 0])
    both = good & np.isfinite(ours[..., 0])
    agree = float(np.max(np.abs(x[both] - ours[both]), initial=0.0))
    ours_ok = bool(res.converged[rows, cols][~good].all()) if np.any(~good) else True
    lines += [
        "### Case 2, wide grid: S/C 3, 200 × 200 (300-1500 K × 0.1-1000 bar, P geometric)",
        "",
        "| method | points/s | note |",
        "|---|---|---|",
        f"| eqconv.equilibrium + mole fractions | {N / best:.3g} (median {N / med:.3g}) | "
        f"{conv}/{N} converged, max |ln Q − ln K| = {r_max:.1e}, iterations ≤ "
        f"{int(res.iterations.max())}; the gas-phase check flags {wet} points (water "
        "would condense) |",
        f"| per-point fsolve, warm start + retries | {n_base / t_base:.3g} | {n_base} points: "
        f"{failed} failed after all retries, {silent} attempts flagged success with "
        f"|residual| > 1e-8; max |Δξ| to eqconv where it succeeded {agree:.1e} |",
        "",
        f"eqconv converged at all {int(np.count_nonzero(~good))} points where fsolve failed: "
        f"{ours_ok}; speed ratio {N / best / (n_base / t_base):.0f} ×.",
        "",
    ]


# ---------------------------------------------------------------------------- case 3
def case_gibbs(lines: list[str]) -> dict[str, float]:
    try:
        from eqconv.gibbs_api import gibbs_equilibrium
    except ImportError:
        lines += ["### Case 3: Gibbs formulation — eqconv.gibbs not present, skipped", ""]
        return {}
    from eqconv import get_species

    T, P, rx = _reforming_grid()
    keys = ["CH4", "H2O", "CO", "CO2", "H2"]
    N = 40_000
    best, med, res, probe = _timed_probed(
        lambda: gibbs_equilibrium(keys, REF_FEED, T, P, data="janaf", on_failure="flag"), 11
    )
    conv = int(np.asarray(res.converged).sum())
    ext = equilibrium(rx, REF_FEED, T, P)
    agree = max(float(np.nanmax(np.abs(res.amounts[k] - ext.amounts[k]))) for k in keys)
    # SLSQP on the same Gibbs energy, 200 points
    sp = [get_species(k, data="janaf") for k in keys]
    A = np.array([[s.atoms.get(e, 0) for e in ("C", "H", "O")] for s in sp], dtype=float)
    b = np.array([1.0, 3.0, 0.0, 0.0, 0.0]) @ A
    idx = [(i, j) for i in range(0, 200, 20) for j in range(0, 200, 10)]
    lnK = np.stack([r.ln_K(T[:, 0]) for r in rx], axis=-1)
    worst = []
    t0 = time.perf_counter()
    for i, j in idx:
        mu = np.array([s.mu0_over_RT(T[i, 0]) for s in sp]) + math.log(P[0, j] / P0)

        def G(n: np.ndarray, mu: np.ndarray = mu) -> float:
            n = np.maximum(n, 1e-300)
            return float(n @ (mu + np.log(n / n.sum())))

        r = minimize(
            G,
            np.array([0.5, 2.0, 0.25, 0.25, 1.5]),
            method="SLSQP",
            bounds=[(0.0, None)] * 5,
            constraints={"type": "eq", "fun": lambda n: n @ A - b},
        )
        n = np.maximum(r.x, 1e-300)
        y = n / n.sum()
        lp = math.log(P[0, j] / P0)
        r1 = math.log(y[2]) + 3 * math.log(y[4]) - math.log(y[0]) - math.log(y[1]) + 2 * lp
        r2 = math.log(y[3]) + math.log(y[4]) - math.log(y[2]) - math.log(y[1])
        worst.append(max(abs(r1 - lnK[i, 0]), abs(r2 - lnK[i, 1])))
    t_base = time.perf_counter() - t0
    base_rate = len(idx) / t_base
    worst_arr = np.array(worst)
    rate = N / best
    g_res = float(np.nanmax(np.abs(np.asarray(res.residuals))))
    lines += [
        "### Case 3: Gibbs formulation (eqconv.gibbs) on case 2",
        "",
        "| method | points/s | note |",
        "|---|---|---|",
        f"| eqconv.gibbs_api.gibbs_equilibrium | {rate:.3g} (median {N / med:.3g}) | "
        f"{conv}/{N} converged, max |ln Q − ln K| = {g_res:.1e}; max |Δn| to the "
        f"extent solver {agree:.1e} mol |",
        f"| per-point SLSQP | {base_rate:.3g} | {len(idx)} points, |ln Q − ln K| from "
        f"{worst_arr.min():.1e} to {worst_arr.max():.1e} (median {np.median(worst_arr):.1e}) |",
        "",
        f"Targets: ≥ 1e6 points/s → {'met' if rate >= 1e6 else 'NOT met'} ({rate:.3g}); "
        f"≥ 300 × SLSQP → {rate / base_rate:.0f} ×.",
        "",
    ]
    return {"rate": rate, "base": base_rate, "probe": probe}


# ---------------------------------------------------------------------------- machine speed
#: Per-point baseline rates quoted with the targets (issue 3), measured on the machine the
#: targets were set on [points/s].
QUOTED_BRENTQ, QUOTED_FSOLVE = 7.5e4, 3.5e4


def machine_speed(
    lines: list[str], c1: dict[str, float], c2: dict[str, float], c3: dict[str, float]
) -> None:
    """The absolute targets, read on this machine through a speed probe run beside each case.

    The probe is case 1's brentq loop on 400 points, run just before and just after each
    eqconv timing (the machine's speed drifts within a run); the factor is the quoted
    brentq rate over the probe's.
    """
    f2 = QUOTED_FSOLVE / c2["base"]
    rows = [("1, ammonia", c1, 1e7), ("2, reforming", c2, 2e6)]
    if c3:
        rows.append(("3, Gibbs", c3, 1e6))
    table = []
    for name, c, tgt in rows:
        f = QUOTED_BRENTQ / c["probe"]
        table.append(
            f"| {name} | {c['rate']:.3g} | {c['probe']:.3g} | {f:.2f} | {tgt:.0e} | "
            f"{tgt / f:.3g} | {'yes' if c['rate'] >= tgt / f else 'no'} |"
        )
    lines += [
        "### Machine speed",
        "",
        f"The targets were quoted with per-point loop rates of {QUOTED_BRENTQ:.2g} (brentq) "
        f"and {QUOTED_FSOLVE:.2g} (fsolve) points/s on the machine they were set on. Here the "
        f"brentq loop ran at {c1['base']:.3g} and the fsolve loop at {c2['base']:.3g} points/s "
        f"(fsolve factor {f2:.2f}). The table reads each target through a brentq probe run "
        "around that case's timing (the quoted loops need not have been written exactly as "
        "these: the factor is approximate):",
        "",
        "| case | eqconv points/s | probe points/s | factor | target | target / factor | met |",
        "|---|---|---|---|---|---|---|",
        *table,
        "",
    ]


# ---------------------------------------------------------------------------- memory, start
_MEMORY = r"""
import json, resource, sys, time, tracemalloc
import numpy as np
from eqconv import Reaction
from eqconv.equilibrium import equilibrium
case = sys.argv[1]
if case == "ammonia":
    rx = Reaction("N2 + 3 H2 = 2 NH3", data="janaf")
    feed = {"N2": 0.2375, "H2": 0.7125, "Ar": 0.05}
    T = np.linspace(600.0, 900.0, 1000)[:, None]; P = np.linspace(10e5, 400e5, 1000)[None, :]
else:
    rx = [Reaction("CH4 + H2O = CO + 3 H2", data="janaf"),
          Reaction("CO + H2O = CO2 + H2", data="janaf")]
    feed = {"CH4": 1.0, "H2O": 3.0}
    T = np.linspace(700.0, 1300.0, 1000)[:, None]; P = np.linspace(1e5, 50e5, 1000)[None, :]
equilibrium(rx, feed, 700.0, 1e6)
before = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss
t0 = time.perf_counter()
res = equilibrium(rx, feed, T, P)
y = res.mole_fractions
dt = time.perf_counter() - t0
after = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss
ok = bool(res.converged.all())
del res, y
tracemalloc.start()  # second run: Python-level allocation peak (slower, not timed)
res = equilibrium(rx, feed, T, P)
y = res.mole_fractions
peak = tracemalloc.get_traced_memory()[1]
print(json.dumps({"rss_before_kB": before, "rss_after_kB": after, "traced_peak_B": peak,
                  "seconds": dt, "converged": ok}))
"""

_START = r"""
import time
t0 = time.perf_counter()
from eqconv import Reaction
from eqconv.equilibrium import equilibrium
t1 = time.perf_counter()
res = equilibrium(Reaction("N2 + 3 H2 = 2 NH3", data="janaf"), {"N2": 1.0, "H2": 3.0}, 700.0, 1e7)
float(res.mole_fractions["NH3"])
t2 = time.perf_counter()
print(t1 - t0, t2 - t1)
"""


def memory_and_start(lines: list[str]) -> None:
    lines += [
        "### Peak memory (1e6-point grid, 1000 × 1000, in a subprocess)",
        "",
        "| case | peak RSS growth | tracemalloc peak | time | converged |",
        "|---|---|---|---|---|",
    ]
    for case in ("ammonia", "reforming"):
        out = subprocess.run(
            [sys.executable, "-c", _MEMORY, case], capture_output=True, text=True, check=True
        )
        d = json.loads(out.stdout.strip().splitlines()[-1])
        grow = (d["rss_after_kB"] - d["rss_before_kB"]) / 1024
        lines.append(
            f"| {case} | {grow:.0f} MiB (RSS {d['rss_after_kB'] / 1024:.0f} MiB) | "
            f"{d['traced_peak_B'] / 2**20:.0f} MiB | {d['seconds']:.2f} s "
            f"({1e6 / d['seconds']:.3g} points/s) | {d['converged']} |"
        )
    lines += ["", "Target: under 1 GiB.", ""]
    runs = []
    for _ in range(3):
        t0 = time.perf_counter()
        out = subprocess.run(
            [sys.executable, "-c", _START], capture_output=True, text=True, check=True
        )
        wall = time.perf_counter() - t0
        imp, first = (float(v) for v in out.stdout.split())
        runs.append((wall, imp, first))
    wall, imp, first = min(runs)
    lines += [
        "### Time to first result (fresh process, best of 3)",
        "",
        f"Whole process (interpreter start, import, one ammonia point): {wall:.2f} s; "
        f"import of eqconv {imp:.2f} s; first equilibrium call (species data, ln K, "
        f"solve) {first:.3f} s.",
        "",
    ]


def main() -> int:
    load = os.getloadavg() if hasattr(os, "getloadavg") else (float("nan"),) * 3
    lines = [
        f"## bench_equilibrium.py — {_dt.datetime.now().isoformat(timespec='seconds')}",
        "",
        f"Machine: {platform.platform()}, CPU {_cpu_model()} ({os.cpu_count()} logical), "
        f"Python {platform.python_version()}, numpy {np.__version__}, scipy "
        f"{scipy.__version__}; load average at start {load[0]:.2f} (shared machine: other "
        f"processes were running). One thread.",
        "",
    ]
    c1 = case_ammonia(lines)
    c2 = case_reforming(lines)
    case_reforming_wide(lines)
    c3 = case_gibbs(lines)
    machine_speed(lines, c1, c2, c3)
    memory_and_start(lines)
    text = "\n".join(lines) + "\n"
    old = (
        RESULTS.read_text(encoding="utf-8")
        if RESULTS.exists()
        else (
            "# Benchmark results\n\nSections are appended by the scripts in benchmarks/; none is "
            "deleted.\n\n"
        )
    )
    RESULTS.write_text(old + text, encoding="utf-8")
    print(text)
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
