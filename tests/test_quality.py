"""The tree stays ruff- and mypy-clean (the project's style contract)."""

from __future__ import annotations

import subprocess
import sys
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[1]


def _run(*args: str) -> subprocess.CompletedProcess[str]:
    return subprocess.run(
        [sys.executable, "-m", *args], cwd=ROOT, capture_output=True, text=True, timeout=600
    )


def test_ruff_clean():
    pytest.importorskip("ruff")
    res = _run("ruff", "check", ".")
    assert res.returncode == 0, res.stdout + res.stderr


def test_mypy_clean():
    pytest.importorskip("mypy")
    res = _run("mypy")
    assert res.returncode == 0, res.stdout + res.stderr
