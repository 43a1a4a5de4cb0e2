"""Command line ``eqconv``: parses arguments, calls the library, prints; nothing more.

``main(argv)`` returns the exit status, so it is tested by calling it. Errors go to stderr as
one line with a non-zero status and no traceback.
"""

from __future__ import annotations

import argparse
import sys
from collections.abc import Sequence

import numpy as np

from .errors import EqconvError

CAUTION = ("Equilibrium is a thermodynamic ceiling, not a design. Screening only: defer to "
           "local codes and licensed engineering practice.")

#: Invented demo scenario: the synthesis loop of a fictitious plant ("Plant A, invented").
DEMO_EQUATION = "N2 + 3 H2 = 2 NH3"


def _k_table(equation: str, data: str, T: np.ndarray, model: str) -> str:
    from .reaction import Reaction

    rxn = Reaction(equation, data=data)
    lnK = rxn.ln_K(T, model=model)  # type: ignore[arg-type]
    dH = rxn.delta_H(T, model=model)  # type: ignore[arg-type]
    dG = rxn.delta_G(T, model=model)  # type: ignore[arg-type]
    lines = [f"{rxn.equation}   (data: {data}, model: {model}, p° = 1 bar)",
             f"{'T [K]':>8} {'ln K':>10} {'log10 K':>9} {'ΔrH° [kJ/mol]':>14} "
             f"{'ΔrG° [kJ/mol]':>14}"]
    for t, lk, h, g in zip(T, lnK, dH, dG, strict=True):
        lines.append(f"{t:8.1f} {lk:10.4f} {lk / np.log(10):9.4f} {h / 1e3:14.3f} {g / 1e3:14.3f}")
    return "\n".join(lines)


def _cmd_demo(args: argparse.Namespace) -> int:
    print("eqconv demo: ammonia synthesis for an invented plant (all numbers illustrative)")
    print(_k_table(DEMO_EQUATION, args.data, np.arange(500.0, 901.0, 50.0), "kirchhoff"))
    print(CAUTION)
    return 0


def _cmd_k(args: argparse.Namespace) -> int:
    T = np.arange(args.t_min, args.t_max + 0.5 * args.t_step, args.t_step)
    print(_k_table(args.equation, args.data, T, args.model))
    print(CAUTION)
    return 0


def _cmd_species(args: argparse.Namespace) -> int:
    from .report import data_report
    from .species import get_species

    sp = get_species(args.species, data=args.data)
    print(f"{sp.key}: {sp.name}, CAS {sp.cas}, formula {sp.formula}, phase {sp.phase}")
    print(data_report([sp]).to_text())
    return 0


def build_parser() -> argparse.ArgumentParser:
    """The argument parser of ``eqconv`` (all sub-commands)."""
    parser = argparse.ArgumentParser(
        prog="eqconv", description="Equilibrium conversion ceilings of gas-phase reactions. "
        + CAUTION)
    sub = parser.add_subparsers(dest="command", required=True)
    demo = sub.add_parser("demo", help="run the embedded demo (invented ammonia plant)")
    demo.add_argument("--data", default="default", choices=("default", "janaf"))
    demo.set_defaults(func=_cmd_demo)
    k = sub.add_parser("k", help="table of K(T), ΔrH°, ΔrG° of one reaction")
    k.add_argument("equation", help='e.g. "CO + H2O = CO2 + H2"')
    k.add_argument("--data", default="default", choices=("default", "janaf"))
    k.add_argument("--model", default="kirchhoff", choices=("kirchhoff", "vant_hoff"))
    k.add_argument("--t-min", type=float, default=300.0, help="lowest T [K]")
    k.add_argument("--t-max", type=float, default=1500.0, help="highest T [K]")
    k.add_argument("--t-step", type=float, default=100.0, help="T step [K]")
    k.set_defaults(func=_cmd_k)
    sp = sub.add_parser("species", help="show one species' data and their sources")
    sp.add_argument("species", help="formula, name or CAS number")
    sp.add_argument("--data", default="default", choices=("default", "janaf"))
    sp.set_defaults(func=_cmd_species)
    return parser


def main(argv: Sequence[str] | None = None) -> int:
    """Run the command line; return the exit status (0 success, 2 bad input)."""
    parser = build_parser()
    args = parser.parse_args(argv)
    try:
        return int(args.func(args))
    except EqconvError as exc:
        print(f"eqconv: error: {exc}", file=sys.stderr)
        return 2


if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())
