"""Case files: a TOML description of a screening study, validated at the boundary and run.

* :mod:`~eqconv.case.units` — values with units (``"450 degC"``, ``"30 bar"``) to SI;
* :mod:`~eqconv.case.model` — frozen pydantic models of a case (unknown keys refused);
* :mod:`~eqconv.case.load` — read TOML, one-line errors naming key, value and expectation,
  the JSON Schema;
* :mod:`~eqconv.case.run` — run a case through :mod:`eqconv.studies`, print and write it.
"""

from __future__ import annotations

#: Stated by every command-line output and written into every result file.
CAUTION = (
    "Caution: equilibrium is a thermodynamic ceiling, not a design; real reactors reach "
    "less (kinetics, catalyst, heat and mass transfer). Screening only: every design decision "
    "belongs to qualified engineers under local codes, standards and licensed engineering "
    "practice."
)

from .load import case_schema, load_case, parse_case  # noqa: E402
from .model import Case  # noqa: E402

__all__ = ["CAUTION", "Case", "case_schema", "load_case", "parse_case", "run_case"]


def __getattr__(name: str) -> object:
    if name == "run_case":  # imported on first use: it pulls in the study layer
        from .run import run_case

        return run_case
    raise AttributeError(f"module 'eqconv.case' has no attribute {name!r}")
