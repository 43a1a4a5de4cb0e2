"""Benchmark of the study layer against per-point use of the library's single-point solve.

Three jobs, each timed in the same run as its baseline:

1. Operating window of an invented ammonia converter (H2:N2 = 3, 4 % Ar): a 100 × 100
   T × P sweep (600-900 K × 10-400 bar) plus the 25 % N2-conversion contour P(T) at the
   same 100 temperatures. Baseline: ``eqconv.equilibrium`` called with scalar T and P at
   every grid point, and a scalar ``scipy.optimize.brentq`` on ln P at every temperature.
2. Four-bed intercooled SO2 converter (invented: 10 % SO2, 11 % O2, 79 % N2, 1.2 bar,
   inlets 690 K). Baseline: for each bed a scalar ``brentq`` on the outlet temperature of
   the enthalpy balance with a scalar equilibrium solve inside.
3. Bed screening: the adiabatic equilibrium outlet of a first bed for 50 inlet
   temperatures × 4 pressures at once, against the same scalar ``brentq`` per point.

Results (with date, platform, CPU model and numpy version) are appended to
``benchmarks/RESULTS_studies.md``. Run: ``python benchmarks/bench_studies.py``.
"""

from __future__ import annotations

import datetime
import platform
import sys
import time
from collections.abc import Callable
from pathlib import Path
from typing import Any

import numpy as np
from scipy.optimize import brentq

import eqconv
from eqconv import Reaction
from eqconv.equilibrium import equilibrium
from eqconv.studies import (
    adiabatic_equilibrium,
    conversion_contour,
    mixture_enthalpy,
    stage_beds,
    sweep,
)
from eqconv.studies._solve import species_list

RESULTS = Path(__file__).with_name("RESULTS_studies.md")


def _cpu() -> str:
    try:
        for line in Path("/proc/cpuinfo").read_text().splitlines():
            if line.startswith("model name"):
                return line.split(":", 1)[1].strip()
    except OSError:
        pass
    return platform.processor() or "unknown"


def _best(fn: Callable[[], Any], repeat: int) -> tuple[float, Any]:
    best, out = np.inf, None
    for _ in range(repeat):
        t0 = time.perf_counter()
        out = fn()
        best = min(best, time.perf_counter() - t0)
    return best, out


def window_study() -> dict[str, Any]:
    rxn = Reaction("N2 + 3 H2 = 2 NH3", data="janaf")
    feed = {"N2": 0.24, "H2": 0.72, "Ar": 0.04}
    T = np.linspace(600.0, 900.0, 100)
    P = np.linspace(10e5, 400e5, 100)
    target = 0.25

    def fast() -> tuple[Any, Any]:
        ds = sweep(rxn, feed, T, P)
        contour = conversion_contour(rxn, feed, target, T, (1e5, 1e9))
        return ds, contour

    def grid_loop() -> np.ndarray:
        out = np.empty((T.size, P.size))
        for i, t in enumerate(T):
            for j, p in enumerate(P):
                out[i, j] = float(equilibrium([rxn], feed, float(t), float(p)).conversion("N2"))
        return out

    def contour_loop() -> np.ndarray:
        out = np.full(T.size, np.nan)
        for i, t in enumerate(T):

            def f(lnp: float, t: float = float(t)) -> float:
                res = equilibrium([rxn], feed, t, float(np.exp(lnp)))
                return float(res.conversion("N2")) - target

            lo, hi = np.log(1e5), np.log(1e9)
            if f(lo) * f(hi) < 0:
                out[i] = np.exp(brentq(f, lo, hi, xtol=1e-12, rtol=1e-12))
        return out

    t_fast, (ds, contour) = _best(fast, 3)
    t_grid, X_loop = _best(grid_loop, 1)
    t_cont, P_loop = _best(contour_loop, 1)
    X = ds["conversion"].values
    ok = contour.reachable
    return {
        "t_fast": t_fast,
        "t_loop": t_grid + t_cont,
        "t_grid_loop": t_grid,
        "t_contour_loop": t_cont,
        "max_dX": float(np.max(np.abs(X - X_loop))),
        "max_rel_dP": float(np.nanmax(np.abs(contour.value[ok] / P_loop[ok] - 1.0))),
        "reachable": int(np.count_nonzero(ok)),
    }


def staging_study() -> dict[str, Any]:
    rxn = Reaction("SO2 + 1/2 O2 = SO3", data="janaf")
    feed = {"SO2": 0.10, "O2": 0.11, "N2": 0.79}
    P, T_in, beds = 1.2e5, 690.0, 4
    sp = species_list((rxn,), feed)
    keys = [s.key for s in sp]

    def fast() -> Any:
        return stage_beds(rxn, feed, T_in, P, n_beds=beds)

    def loop() -> list[float]:
        n = np.array([feed.get(k, 0.0) for k in keys])
        outs = []
        for _ in range(beds):
            H_in = float(mixture_enthalpy(sp, n, T_in))
            inlet = dict(zip(keys, n, strict=True))

            def g(T: float, inlet: dict[str, float] = inlet, H_in: float = H_in) -> float:
                res = equilibrium([rxn], inlet, T, P)
                m = np.array([float(res.amounts[k]) for k in keys])
                return float(mixture_enthalpy(sp, m, T)) - H_in

            T_out = brentq(g, T_in, T_in + 800.0, xtol=1e-6)
            res = equilibrium([rxn], inlet, T_out, P)
            n = np.array([float(res.amounts[k]) for k in keys])
            outs.append(T_out)
        return outs

    t_fast, res = _best(fast, 3)
    t_loop, T_loop = _best(loop, 1)
    return {
        "t_fast": t_fast,
        "t_loop": t_loop,
        "max_dT": float(np.max(np.abs(res.T_out - np.array(T_loop)))),
        "X_final": float(res.conversion_out[-1]),
    }


def bed_screening_study() -> dict[str, Any]:
    """First-bed outlet for 50 inlet temperatures × 4 pressures (a bed-design screen)."""
    rxn = Reaction("SO2 + 1/2 O2 = SO3", data="janaf")
    feed = {"SO2": 0.10, "O2": 0.11, "N2": 0.79}
    T_in = np.linspace(650.0, 750.0, 50)
    P = np.array([1.1e5, 1.5e5, 2e5, 3e5])
    sp = species_list((rxn,), feed)
    keys = [s.key for s in sp]
    n0 = np.array([feed.get(k, 0.0) for k in keys])

    def fast() -> Any:
        return adiabatic_equilibrium(rxn, feed, T_in[:, None], P[None, :])

    def loop() -> np.ndarray:
        out = np.empty((T_in.size, P.size))
        for i, t in enumerate(T_in):
            H_in = float(mixture_enthalpy(sp, n0, t))
            for j, p in enumerate(P):

                def g(T: float, p: float = float(p), H_in: float = H_in) -> float:
                    res = equilibrium([rxn], feed, T, p)
                    m = np.array([float(res.amounts[k]) for k in keys])
                    return float(mixture_enthalpy(sp, m, T)) - H_in

                out[i, j] = brentq(g, t, t + 800.0, xtol=1e-6)
        return out

    t_fast, res = _best(fast, 3)
    t_loop, T_loop = _best(loop, 1)
    return {"t_fast": t_fast, "t_loop": t_loop, "max_dT": float(np.max(np.abs(res.T_out - T_loop)))}


def main() -> int:
    w = window_study()
    s = staging_study()
    b = bed_screening_study()
    stamp = datetime.datetime.now().strftime("%Y-%m-%d %H:%M")
    row1 = (
        f"| 100 × 100 T × P sweep + 25 % contour (ammonia, invented) | {w['t_fast']:.3f} | "
        f"{w['t_loop']:.2f} (grid {w['t_grid_loop']:.2f} + contour "
        f"{w['t_contour_loop']:.2f}) | {w['t_loop'] / w['t_fast']:.0f}× | "
        f"max ΔX {w['max_dX']:.1e}, max rel ΔP {w['max_rel_dP']:.1e} "
        f"({w['reachable']}/100 T reach the target) |"
    )
    row2 = (
        f"| four-bed intercooled SO2 converter (invented) | {s['t_fast']:.3f} | "
        f"{s['t_loop']:.3f} | {s['t_loop'] / s['t_fast']:.1f}× | "
        f"max ΔT_out {s['max_dT']:.1e} K; final conversion {s['X_final']:.5f} |"
    )
    row3 = (
        f"| first-bed adiabatic outlet, 50 inlet T × 4 P (SO2, invented) | {b['t_fast']:.3f} | "
        f"{b['t_loop']:.2f} | {b['t_loop'] / b['t_fast']:.0f}× | "
        f"max ΔT_out {b['max_dT']:.1e} K |"
    )
    text = f"""
## {stamp}

Machine: {platform.platform()}, CPU {_cpu()}, Python {sys.version.split()[0]},
numpy {np.__version__}, eqconv {eqconv.__version__}.

| job | study layer [s] | per-point calls [s] | speed-up | agreement |
|---|---|---|---|---|
{row1}
{row2}
{row3}

A single staging calculation is sequential (bed k needs bed k−1's outlet), so there the
study layer does the same scalar work as the per-point loop; vectorization pays when many
beds are screened at once (third row).

Study layer: best of 3 runs; per-point baseline: one run of scalar `eqconv.equilibrium`
calls (with scalar `brentq` for the contour and the bed energy balances).
"""
    if not RESULTS.exists():
        RESULTS.write_text(
            "# Study-layer benchmarks (benchmarks/bench_studies.py)\n", encoding="utf-8"
        )
    with RESULTS.open("a", encoding="utf-8") as fh:
        fh.write(text)
    print(text)
    return 0


if __name__ == "__main__":
    sys.exit(main())
