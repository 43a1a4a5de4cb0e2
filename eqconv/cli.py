"""Command line ``eqconv``: parses arguments, calls the library, prints; nothing more.

Sub-commands::

    eqconv run CASE.toml --out DIR [--overwrite]   run a case file: table + CSV/JSON/PNG files
    eqconv demo                                    run the embedded (invented) demo case
    eqconv species NAME                            one species' data and their sources
    eqconv k "EQUATION"                            K(T) table of one reaction
    eqconv schema                                  JSON Schema of case files

``main(argv)`` returns the exit status, so it is tested by calling it: 0 success, 1 a
calculation that failed or a missing optional package, 2 bad input (usage, a malformed case
file, an unknown species, an existing output folder). Errors go to stderr as one line
without a traceback; progress messages go to stderr too, results to stdout.
"""

from __future__ import annotations

import argparse
import sys
import warnings
from collections.abc import Sequence
from importlib import resources
from pathlib import Path
from typing import Any, NoReturn, TextIO

import numpy as np

from . import __version__
from .case import CAUTION
from .errors import ConvergenceError, EqconvError, InputError

#: The embedded demo case (package data).
DEMO_CASE = "ammonia_converter.toml"


class _UsageError(Exception):
    """Raised by the parser instead of printing usage and exiting."""


class _Parser(argparse.ArgumentParser):
    def error(self, message: str) -> NoReturn:
        raise _UsageError(f"{self.prog}: {message} (see {self.prog} --help)")


# ----------------------------------------------------------------------------- helpers
def _temperature_arg(text: str) -> float:
    """A CLI temperature: a bare number in K, or a value with its unit ('450 degC')."""
    from .case.units import parse_number_unit, to_si

    try:
        number, unit = parse_number_unit(text)
        return number if not unit else to_si(text, "temperature")
    except InputError as exc:
        raise argparse.ArgumentTypeError(str(exc)) from None


def _progress(quiet: bool, stream: TextIO) -> Any:
    def say(message: str) -> None:
        if not quiet:
            print(f"eqconv: {message} ...", file=stream, flush=True)

    return say


def _k_table(equation: str, data: str, T: np.ndarray, model: str) -> str:
    from .reaction import Reaction

    rxn = Reaction(equation, data=data)
    lnK = rxn.ln_K(T, model=model)  # type: ignore[arg-type]
    dH = rxn.delta_H(T, model=model)  # type: ignore[arg-type]
    dG = rxn.delta_G(T, model=model)  # type: ignore[arg-type]
    lines = [
        f"{rxn.equation}   (data: {data}, model: {model}, p° = 1 bar, Δn gas = "
        f"{rxn.delta_n_gas:g})",
        f"{'T [K]':>8} {'T [°C]':>8} {'K [-]':>11} {'ln K':>10} {'log10 K':>9} "
        f"{'ΔrH° [kJ/mol]':>14} {'ΔrG° [kJ/mol]':>14}",
    ]
    for t, lk, h, g in zip(T, lnK, dH, dG, strict=True):
        lines.append(
            f"{t:8.2f} {t - 273.15:8.2f} {np.exp(lk):11.4e} {lk:10.4f} {lk / np.log(10):9.4f} "
            f"{h / 1e3:14.3f} {g / 1e3:14.3f}"
        )
    return "\n".join(lines)


# ---------------------------------------------------------------------------- commands
def _cmd_run(args: argparse.Namespace) -> int:
    from .case.load import load_case
    from .case.run import run_case

    out = Path(args.out)
    if out.exists() and not args.overwrite:
        raise InputError(f"output folder {out} exists; choose another or pass --overwrite")
    say = _progress(args.quiet, sys.stderr)
    case = load_case(args.case)
    say(f"running {args.case}")
    result = run_case(case, progress=say)
    files = result.write(out, overwrite=args.overwrite, progress=say)
    print(result.summary())
    print(f"\n{len(files)} files written to {out}:")
    for f in files:
        print(f"  {f.name}")
    return 0


def _demo_text() -> str:
    return resources.files("eqconv").joinpath("demo", DEMO_CASE).read_text(encoding="utf-8")


def _cmd_demo(args: argparse.Namespace) -> int:
    from .case.load import parse_case
    from .case.run import run_case

    case = parse_case(_demo_text(), source=f"eqconv/demo/{DEMO_CASE}")
    if args.data is not None and args.data != case.data:
        case = case.model_copy(update={"data": args.data})
    if args.show_case:
        print(_demo_text())
        return 0
    say = _progress(args.quiet, sys.stderr)
    say("running the embedded demo case (an invented plant)")
    result = run_case(case, sweep=False, progress=say)
    print(result.summary())
    print(f"\n(the demo case is eqconv/demo/{DEMO_CASE}; print it with: eqconv demo --show-case)")
    return 0


def _cmd_k(args: argparse.Namespace) -> int:
    if not 0 < args.t_step:
        raise InputError(f"--t-step must be > 0 K; got {args.t_step!r}")
    if not args.t_min <= args.t_max:
        raise InputError(f"--t-min ({args.t_min} K) must not exceed --t-max ({args.t_max} K)")
    n = int(np.floor((args.t_max - args.t_min) / args.t_step + 1e-9)) + 1
    if n > 10_000:
        raise InputError(f"that table would have {n} rows; use a larger --t-step")
    T = args.t_min + args.t_step * np.arange(n)
    print(_k_table(args.equation, args.data, T, args.model))
    print(CAUTION)
    return 0


def _cmd_species(args: argparse.Namespace) -> int:
    from .report import data_report
    from .species import get_species

    sp = get_species(args.species, data=args.data)
    print(f"{sp.key}: {sp.name}, CAS {sp.cas or '-'}, formula {sp.formula}, phase {sp.phase}")
    print(f"valid T range of its Cp model: {sp.T_range[0]:g}–{sp.T_range[1]:g} K")
    for name, value in (
        ("Tc [K]", sp.Tc),
        ("Pc [bar]", None if sp.Pc is None else sp.Pc / 1e5),
        ("acentric factor [-]", sp.omega),
    ):
        print(f"{name}: {'unknown' if value is None else f'{value:.6g}'}")
    print(data_report([sp]).to_text())
    print(CAUTION)
    return 0


def _cmd_schema(args: argparse.Namespace) -> int:
    from .case.load import schema_text

    print(schema_text(), end="")
    return 0


# ------------------------------------------------------------------------------ parser
def build_parser() -> argparse.ArgumentParser:
    """The argument parser of ``eqconv`` (all sub-commands)."""
    parser = _Parser(
        prog="eqconv",
        description="Equilibrium conversion ceilings of gas-phase reactions.",
        epilog=CAUTION,
    )
    parser.add_argument("--version", action="version", version=f"eqconv {__version__}. {CAUTION}")
    sub = parser.add_subparsers(
        dest="command", required=True, parser_class=_Parser, metavar="{run,demo,species,k,schema}"
    )

    run = sub.add_parser(
        "run",
        help="run a TOML case file: table on screen, files in a folder",
        description="Run a case file: print the table and write CSV, JSON and "
        "PNG files into a new folder.",
        epilog=CAUTION,
    )
    run.add_argument("case", help="the TOML case file")
    run.add_argument(
        "--out",
        required=True,
        metavar="DIR",
        help="output folder (must not exist unless --overwrite)",
    )
    run.add_argument(
        "--overwrite",
        action="store_true",
        help="write into DIR even if it exists, replacing files of the same name",
    )
    run.add_argument("--quiet", action="store_true", help="no progress messages on stderr")
    run.set_defaults(func=_cmd_run)

    demo = sub.add_parser(
        "demo",
        help="run the embedded demo case (an invented ammonia plant)",
        description="Run the embedded demo: the operating window of an invented ammonia converter.",
        epilog=CAUTION,
    )
    demo.add_argument(
        "--data",
        default=None,
        choices=("default", "janaf"),
        help="data source of the species (default: the one the demo case names)",
    )
    demo.add_argument("--show-case", action="store_true", help="print the demo case file")
    demo.add_argument("--quiet", action="store_true", help="no progress messages on stderr")
    demo.set_defaults(func=_cmd_demo)

    sp = sub.add_parser(
        "species",
        help="show one species' data and their sources",
        description="Show one species' data, their sources and valid ranges.",
        epilog=CAUTION,
    )
    sp.add_argument("species", help="formula, name or CAS number, e.g. NH3, ammonia, 7664-41-7")
    sp.add_argument("--data", default="default", choices=("default", "janaf"))
    sp.set_defaults(func=_cmd_species)

    k = sub.add_parser(
        "k",
        help="table of K(T), ΔrH° and ΔrG° of one reaction",
        description="Table of the equilibrium constant of one reaction (p° = 1 bar).",
        epilog=CAUTION,
    )
    k.add_argument("equation", help='e.g. "CO + H2O = CO2 + H2"')
    k.add_argument("--data", default="default", choices=("default", "janaf"))
    k.add_argument(
        "--model",
        default="kirchhoff",
        choices=("kirchhoff", "vant_hoff"),
        help="kirchhoff: ΔrCp° integrated; vant_hoff: ΔrH°, ΔrS° at 298.15 K",
    )
    k.add_argument(
        "--t-min",
        type=_temperature_arg,
        default=300.0,
        help="lowest T: K, or with a unit such as '200 degC' (default 300)",
    )
    k.add_argument(
        "--t-max",
        type=_temperature_arg,
        default=1500.0,
        help="highest T: K, or with a unit (default 1500)",
    )
    k.add_argument("--t-step", type=float, default=100.0, help="T step [K] (default 100)")
    k.set_defaults(func=_cmd_k)

    schema = sub.add_parser(
        "schema",
        help="print the JSON Schema of case files",
        description="Print the JSON Schema of case files.",
        epilog=CAUTION,
    )
    schema.set_defaults(func=_cmd_schema)
    return parser


def _one_line_warning(
    message: Warning | str,
    category: type[Warning],
    filename: str,
    lineno: int,
    file: TextIO | None = None,
    line: str | None = None,
) -> None:
    text = " ".join(str(message).split())
    if text in _SHOWN:  # the same warning from several steps of one run: say it once
        return
    _SHOWN.add(text)
    print(f"eqconv: warning: {text}", file=sys.stderr)


_SHOWN: set[str] = set()


def main(argv: Sequence[str] | None = None) -> int:
    """Run the command line; return the exit status (0 success, 1 failed, 2 bad input)."""
    parser = build_parser()
    try:
        args = parser.parse_args(argv)
    except _UsageError as exc:
        print(f"eqconv: error: {exc}", file=sys.stderr)
        return 2
    except SystemExit as exc:  # --help and --version print and exit 0
        return int(exc.code or 0)
    _SHOWN.clear()
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", ResourceWarning)  # from third-party file handles
        warnings.showwarning = _one_line_warning
        try:
            return int(args.func(args))
        except ConvergenceError as exc:
            print(f"eqconv: calculation failed: {_first_line(exc)}", file=sys.stderr)
            return 1
        except EqconvError as exc:
            print(f"eqconv: error: {_first_line(exc)}", file=sys.stderr)
            return 2
        except ImportError as exc:
            print(f"eqconv: missing optional package: {_first_line(exc)}", file=sys.stderr)
            return 1
        except OSError as exc:
            print(
                f"eqconv: error: {exc.strerror or exc}: {exc.filename or ''}".rstrip(": "),
                file=sys.stderr,
            )
            return 2


def _first_line(exc: BaseException, limit: int = 600) -> str:
    """The message on one line (whitespace collapsed, shortened past `limit` characters)."""
    text = " ".join(str(exc).split()) or type(exc).__name__
    return text if len(text) <= limit else text[: limit - 3] + "..."


if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())
