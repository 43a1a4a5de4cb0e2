"""The README's test command and .ci/run must not drift apart."""

from __future__ import annotations

import re
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]


def _readme_commands() -> list[str]:
    text = (ROOT / "README.md").read_text(encoding="utf-8")
    return re.findall(r"```bash\n(.+?)\n```", text, flags=re.S)


def test_readme_has_exactly_two_commands():
    cmds = _readme_commands()
    assert len(cmds) == 2, cmds
    assert "eqconv demo" in cmds[0]
    assert "pytest" in cmds[1]


def test_ci_runs_the_readme_test_command_verbatim():
    test_cmd = _readme_commands()[1].strip()
    ci_lines = [
        ln.strip()
        for ln in (ROOT / ".ci" / "run").read_text().splitlines()
        if ln.strip() and not ln.lstrip().startswith("#")
    ]
    assert test_cmd in ci_lines


def test_readme_opens_with_the_job_and_the_cautions():
    text = (ROOT / "README.md").read_text(encoding="utf-8")
    first_para = text.split("\n\n")[1]
    assert "process engineers" in first_para and "equilibrium" in first_para
    assert "thermodynamic ceiling, not a design" in text
    assert "licensed engineering" in text and "local codes" in text


def test_readme_python_examples_run():
    text = (ROOT / "README.md").read_text(encoding="utf-8")
    blocks = re.findall(r"```python\n(.+?)\n```", text, flags=re.S)
    assert blocks
    namespace: dict[str, object] = {}
    for block in blocks:  # later blocks build on earlier ones, as a reader would run them
        exec(compile(block, "README.md", "exec"), namespace)
    res = namespace["res"]
    assert res.converged.all()  # type: ignore[attr-defined]
