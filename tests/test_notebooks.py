"""The sensitivity-study notebooks are generated, stored without outputs, and they run."""

from __future__ import annotations

import importlib.util
import os
from pathlib import Path

import pytest

nbformat = pytest.importorskip("nbformat")
nbclient = pytest.importorskip("nbclient")
pytest.importorskip("ipykernel")
pytest.importorskip("matplotlib")

ROOT = Path(__file__).resolve().parents[1]
NOTEBOOKS = ROOT / "notebooks"


def _builder():
    spec = importlib.util.spec_from_file_location(
        "build_notebooks", NOTEBOOKS / "build_notebooks.py"
    )
    assert spec is not None and spec.loader is not None
    module = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(module)
    return module


BUILDER = _builder()
NAMES = sorted(BUILDER.NOTEBOOKS)


def test_there_are_at_least_two_notebooks():
    assert len(NAMES) >= 2
    assert {"ammonia_operating_window.ipynb", "so2_converter_staging.ipynb"} <= set(NAMES)


@pytest.mark.parametrize("name", NAMES)
def test_stored_notebook_is_the_generated_one_without_outputs(name):
    path = NOTEBOOKS / name
    assert path.read_text(encoding="utf-8") == BUILDER.render(BUILDER.build()[name]), (
        "regenerate with: python notebooks/build_notebooks.py"
    )
    nb = nbformat.read(path, as_version=4)
    code = [c for c in nb.cells if c.cell_type == "code"]
    assert code and all(not c.outputs and c.execution_count is None for c in code)
    text = " ".join(c.source for c in nb.cells)
    assert "Invented scenario" in text and "thermodynamic ceiling, not a design" in text


@pytest.mark.parametrize("name", NAMES)
def test_notebook_executes(name, monkeypatch):
    monkeypatch.setenv("MPLBACKEND", "Agg")
    monkeypatch.setenv(
        "PYTHONPATH", os.pathsep.join([str(ROOT), *filter(None, [os.environ.get("PYTHONPATH")])])
    )
    nb = nbformat.read(NOTEBOOKS / name, as_version=4)
    client = nbclient.NotebookClient(
        nb, timeout=120, kernel_name="python3", resources={"metadata": {"path": str(NOTEBOOKS)}}
    )
    client.execute()
    code = [c for c in nb.cells if c.cell_type == "code"]
    assert all(c.execution_count is not None for c in code)
    errors = [o for c in code for o in c.outputs if o.output_type == "error"]
    assert not errors, [e.get("evalue") for e in errors]
    printed = "".join(
        o.get("text", "") for c in code for o in c.outputs if o.output_type == "stream"
    )
    assert printed.strip(), "the notebook should report its findings"
