"""The command line, tested by calling ``main(argv)``: output, files, exit status, errors."""

from __future__ import annotations

import json
import os
import subprocess
import sys
import textwrap
from pathlib import Path

import pytest

from eqconv.case.load import schema_text
from eqconv.cli import main

ROOT = Path(__file__).resolve().parents[1]
SO2 = ROOT / "data" / "so2_converter.toml"
CEILING = "thermodynamic ceiling, not a design"


def _run(capsys, *argv):
    code = main(list(argv))
    out, err = capsys.readouterr()
    return code, out, err


def _assert_one_line_error(err: str, *words: str) -> None:
    # progress messages ("eqconv: running ... ...") may come first; the error is one line
    lines = [ln for ln in err.splitlines() if ln.strip() and not ln.endswith(" ...")]
    assert len(lines) == 1, err
    assert lines[0].startswith("eqconv: ") and "Traceback" not in err
    for w in words:
        assert w in lines[0], lines[0]


# -------------------------------------------------------------------------------- demo
def test_demo_prints_the_table_and_the_caution(capsys):
    code, out, err = _run(capsys, "demo")
    assert code == 0, err
    assert "invented" in out.lower()
    assert "Equilibrium conversion of N2 [-], design feed:" in out
    assert "Target conversion 0.3 of N2: reached at or below this temperature" in out
    assert "Adiabatic beds with interstage cooling, P = 200 bar" in out
    assert CEILING in out and "licensed engineering" in out and "local codes" in out
    assert "eqconv: running the embedded demo case" in err  # progress on stderr


def test_demo_needs_no_optional_package():
    # what `pip install .` gives: no matplotlib, xarray, pandas extras. Block them (the core
    # libraries may import pandas themselves, so only modules we must not need are blocked).
    script = textwrap.dedent("""
        import importlib.abc, sys
        BLOCK = ("matplotlib", "xarray", "dask", "nbformat")
        class Blocker(importlib.abc.MetaPathFinder):
            def find_spec(self, name, path=None, target=None):
                if name.split(".")[0] in BLOCK:
                    raise ImportError(f"blocked {name}")
                return None
        sys.meta_path.insert(0, Blocker())
        from eqconv.cli import main
        code = main(["demo", "--quiet"])
        assert not [m for m in sys.modules if m.split(".")[0] in BLOCK]
        sys.exit(code)
    """)
    env = {**os.environ, "PYTHONPATH": str(ROOT)}
    res = subprocess.run(
        [sys.executable, "-c", script],
        capture_output=True,
        text=True,
        env=env,
        timeout=300,
        cwd=ROOT,
    )
    assert res.returncode == 0, res.stderr
    assert CEILING in res.stdout and "Traceback" not in res.stderr


def test_demo_case_can_be_shown(capsys):
    code, out, _ = _run(capsys, "demo", "--show-case")
    assert code == 0 and "INVENTED" in out and "[staging]" in out


# --------------------------------------------------------------------------------- run
def test_run_writes_files_and_refuses_to_overwrite(capsys, tmp_path):
    out_dir = tmp_path / "so2"
    code, out, err = _run(capsys, "run", str(SO2), "--out", str(out_dir))
    assert code == 0, err
    assert "SO2 converter, four beds" in out and CEILING in out
    written = {p.name for p in out_dir.iterdir()}
    expected = {
        "summary.txt",
        "case.json",
        "results.json",
        "data_report.csv",
        "grid.csv",
        "targets.csv",
        "staging.csv",
        "sweep.csv",
        "sweep.json",
        "staging.png",
        "conversion_map.png",
        "conversion_vs_T.png",
        "vant_hoff.png",
    }
    assert expected <= written, expected - written
    assert CEILING in (out_dir / "summary.txt").read_text(encoding="utf-8")
    staging = (out_dir / "staging.csv").read_text(encoding="utf-8").splitlines()
    assert staging[0].startswith("bed,T_in [K],T_out [K]") and len(staging) == 1 + 4
    assert (out_dir / "staging.png").read_bytes()[:4] == b"\x89PNG"
    assert "eqconv: staging adiabatic beds ..." in err

    before = (out_dir / "summary.txt").stat().st_mtime_ns
    code, _, err = _run(capsys, "run", str(SO2), "--out", str(out_dir))
    assert code == 2
    _assert_one_line_error(err, str(out_dir), "exists", "--overwrite")
    assert (out_dir / "summary.txt").stat().st_mtime_ns == before

    code, _, err = _run(capsys, "run", str(SO2), "--out", str(out_dir), "--overwrite", "--quiet")
    assert code == 0 and err == ""


def test_run_refuses_an_existing_empty_folder(capsys, tmp_path):
    code, _, err = _run(capsys, "run", str(SO2), "--out", str(tmp_path))
    assert code == 2
    _assert_one_line_error(err, "exists")


# ------------------------------------------------------------------------ species and k
def test_species_shows_data_and_sources(capsys):
    code, out, _ = _run(capsys, "species", "ammonia", "--data", "janaf")
    assert code == 0
    assert "NH3" in out and "7664-41-7" in out and "NIST-JANAF" in out
    # NIST-JANAF 4th ed. (1998), NH3 (H-083): ΔfH°(298.15 K) = -45.898 kJ/mol
    assert "-45.898" in out
    assert CEILING in out


def test_k_table_matches_janaf(capsys):
    code, out, _ = _run(
        capsys,
        "k",
        "CO + H2O = CO2 + H2",
        "--data",
        "janaf",
        "--t-min",
        "500",
        "--t-max",
        "1000",
        "--t-step",
        "500",
    )
    assert code == 0
    rows = {
        float(line.split()[0]): line.split()
        for line in out.splitlines()
        if line.strip() and line.split()[0].replace(".", "").isdigit()
    }
    # /work/shared/REFERENCES.md §1, log10 K from NIST-JANAF log Kf (derived, 3 decimals)
    assert float(rows[500.0][4]) == pytest.approx(2.139, abs=0.0015)
    assert float(rows[1000.0][4]) == pytest.approx(0.158, abs=0.0015)
    assert CEILING in out


def test_k_accepts_temperatures_with_units(capsys):
    code, out, _ = _run(
        capsys,
        "k",
        "N2 + 3 H2 = 2 NH3",
        "--t-min",
        "200 degC",
        "--t-max",
        "300 degC",
        "--t-step",
        "50",
    )
    assert code == 0
    temps = [
        float(ln.split()[0])
        for ln in out.splitlines()
        if ln.strip() and ln.split()[0].replace(".", "").isdigit()
    ]
    assert temps == pytest.approx([473.15, 523.15, 573.15])


# ------------------------------------------------------------------------------ schema
def test_schema_prints_the_json_schema(capsys):
    code, out, _ = _run(capsys, "schema")
    assert code == 0
    assert out == schema_text()
    schema = json.loads(out)
    assert schema["title"] == "eqconv case file" and CEILING in schema["description"]


# ------------------------------------------------------------------------ help, errors
@pytest.mark.parametrize("argv", [[], ["run"], ["demo"], ["species"], ["k"], ["schema"]])
def test_help_everywhere(capsys, argv):
    code, out, _ = _run(capsys, *argv, "--help")
    assert code == 0
    assert out.startswith("usage: eqconv") and CEILING in " ".join(out.split())


def _case(tmp_path, text: str) -> str:
    p = tmp_path / "case.toml"
    p.write_text(text, encoding="utf-8")
    return str(p)


GOOD = """
title = "Invented"
reactions = ["N2 + 3 H2 = 2 NH3"]
[feed]
components = { N2 = 1, H2 = 3 }
[grid]
temperature = "450 degC"
pressure = "150 bar"
"""


@pytest.mark.parametrize(
    ("argv", "case_text", "words"),
    [
        (["fly"], None, ["invalid choice", "'fly'"]),
        (["run"], None, ["required", "case"]),
        (["run", "{case}"], GOOD, ["--out"]),
        (["k", "N2 + 3 H2 = 2 NH3", "--t-min", "hot"], None, ["--t-min", "'hot'"]),
        (["k", "N2 + H2 = NH3"], None, ["does not balance", "N: -1"]),
        (["k", "N2 + 3 H2 == 2 NH3"], None, ["exactly one"]),
        (["k", "CO + H2O = CO2 + H2", "--t-step", "0"], None, ["--t-step", "> 0"]),
        (["species", "unobtainium"], None, ["unobtainium"]),
        (
            ["run", "{case}", "--out", "{out}"],
            GOOD.replace('"150 bar"', "150"),
            ["case file", "grid.pressure = 150", "no unit"],
        ),
        (
            ["run", "{case}", "--out", "{out}"],
            GOOD + "colour = 3\n",
            ["grid.colour", "unknown key"],
        ),
        (["run", "{case}", "--out", "{out}"], GOOD.replace("[feed]", "[feed"), ["not valid TOML"]),
        (
            ["run", "{case}", "--out", "{out}"],
            GOOD.replace("2 NH3", "2 XQZ9"),
            ["reactions[0]", "XQZ9"],
        ),
        (["run", "missing.toml", "--out", "{out}"], None, ["missing.toml", "does not exist"]),
    ],
)
def test_bad_input_exits_2_with_one_line(capsys, tmp_path, argv, case_text, words):
    case = _case(tmp_path, case_text) if case_text is not None else ""
    out_dir = str(tmp_path / "out")
    args = [a.replace("{case}", case).replace("{out}", out_dir) for a in argv]
    code, out, err = _run(capsys, *args)
    assert code == 2, (out, err)
    _assert_one_line_error(err, *words)
    assert not (tmp_path / "out").exists()


def test_warnings_are_one_line(capsys, monkeypatch):
    import warnings

    import eqconv.cli as cli
    from eqconv.errors import RangeWarning

    def warn(args):
        warnings.warn(
            "NH3: T = 100 K is below the valid range\nof its Cp model", RangeWarning, stacklevel=1
        )
        return 0

    monkeypatch.setattr(cli, "_cmd_schema", warn)
    code, _, err = _run(capsys, "schema")
    assert code == 0
    assert err == "eqconv: warning: NH3: T = 100 K is below the valid range of its Cp model\n"
