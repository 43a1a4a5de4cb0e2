"""eqconv: equilibrium conversion ceilings of gas-phase reactions.

Equilibrium is a thermodynamic ceiling, not a reactor design: see the README's cautions.
"""

from __future__ import annotations

from . import studies
from .equilibrium import equilibrium
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
from .gibbs_api import gibbs_equilibrium
from .reaction import Reaction, parse_equation
from .reaction_basis import derive_reactions
from .report import DataReport, data_report
from .result import EquilibriumResult
from .sensitivity import compare_sources, conversion_sensitivity
from .species import Species, get_species
from .uncertainty import (
    MonteCarloInterrupted,
    data_uncertainty,
    ln_K_uncertainty,
    monte_carlo_equilibrium,
)
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
    "EquilibriumResult",
    "InputError",
    "MissingDataError",
    "MonteCarloInterrupted",
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
    "compare_sources",
    "conversion_sensitivity",
    "data_report",
    "data_uncertainty",
    "derive_reactions",
    "equilibrium",
    "get_species",
    "gibbs_equilibrium",
    "ln_K_uncertainty",
    "monte_carlo_equilibrium",
    "parse_equation",
    "studies",
    "user_species",
]
