"""eqconv: equilibrium conversion ceilings of gas-phase reactions.

Equilibrium is a thermodynamic ceiling, not a reactor design: see the README's cautions.
"""

from __future__ import annotations

from .errors import (
    AmbiguousSpeciesError,
    CaseFileError,
    ConvergenceError,
    DataWarning,
    DependentReactionsError,
    EqconvError,
    InputError,
    MissingDataError,
    OutOfRangeError,
    PhaseWarning,
    RangeWarning,
    ReactionSyntaxError,
    SpeciesError,
    UnbalancedReactionError,
    UnknownSpeciesError,
)
from .reaction import Reaction, parse_equation
from .report import DataReport, data_report
from .species import Species, get_species
from .user_species import user_species

__version__ = "0.1.0"

__all__ = [
    "AmbiguousSpeciesError",
    "CaseFileError",
    "ConvergenceError",
    "DataReport",
    "DataWarning",
    "DependentReactionsError",
    "EqconvError",
    "InputError",
    "MissingDataError",
    "OutOfRangeError",
    "PhaseWarning",
    "RangeWarning",
    "Reaction",
    "ReactionSyntaxError",
    "Species",
    "SpeciesError",
    "UnbalancedReactionError",
    "UnknownSpeciesError",
    "__version__",
    "data_report",
    "get_species",
    "parse_equation",
    "user_species",
]
