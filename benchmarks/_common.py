"""Shared helpers of the benchmark scripts: machine description and wall-clock timing."""

from __future__ import annotations

import platform
import time
from collections.abc import Callable
from typing import Any

import numpy as np


def cpu_model() -> str:
    """CPU model name from /proc/cpuinfo (or what `platform` knows)."""
    try:
        with open("/proc/cpuinfo", encoding="utf-8") as fh:
            for line in fh:
                if line.lower().startswith("model name"):
                    return line.split(":", 1)[1].strip()
    except OSError:
        pass
    return platform.processor() or "unknown"


def timed(fn: Callable[[], Any], repeats: int) -> tuple[float, float, Any]:
    """Best and median wall time [s] of `fn` over `repeats` calls, and its last result."""
    times, out = [], None
    for _ in range(repeats):
        t0 = time.perf_counter()
        out = fn()
        times.append(time.perf_counter() - t0)
    return min(times), float(np.median(times)), out
