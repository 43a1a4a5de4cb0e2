"""Exceptions and warnings raised by eqconv.

Every error the library raises derives from :class:`EqconvError`. Errors caused by a bad
value also derive from :class:`ValueError`, so ``except ValueError`` keeps working in
scripts written before eqconv existed. Messages name the offending value and what was
expected.
"""

from __future__ import annotations


class EqconvError(Exception):
    """Base class of every error raised by eqconv."""


class InputError(EqconvError, ValueError):
    """An argument has an impossible or malformed value (e.g. T <= 0, a negative amount)."""


class SpeciesError(EqconvError, ValueError):
    """A species could not be resolved to exactly one chemical."""


class UnknownSpeciesError(SpeciesError, LookupError):
    """No chemical matches the given formula, name or CAS number."""


class AmbiguousSpeciesError(SpeciesError):
    """More than one chemical matches (e.g. a formula with isomers)."""


class MissingDataError(EqconvError, ValueError):
    """A datum needed for the calculation is not available from the chosen source."""


class UnbalancedReactionError(EqconvError, ValueError):
    """A reaction equation does not conserve every element."""


class ReactionSyntaxError(EqconvError, ValueError):
    """A reaction equation string could not be parsed."""


class DependentReactionsError(EqconvError, ValueError):
    """A set of reactions is linearly dependent (rank-deficient stoichiometry)."""


class OutOfRangeError(EqconvError, ValueError):
    """A correlation was evaluated outside its valid range while strict checking was on."""


class ConvergenceError(EqconvError, RuntimeError):
    """An equilibrium solve did not meet its tolerance at one or more points."""


class CaseFileError(EqconvError, ValueError):
    """A case file is malformed: a key is unknown, missing, or has a bad value."""


class RangeWarning(UserWarning):
    """A correlation is used outside its valid temperature range (extrapolation)."""


class PhaseWarning(UserWarning):
    """The gas-phase assumption fails: a component would condense at the equilibrium state."""


class DataWarning(UserWarning):
    """A datum comes from an estimate or a low-ranked source."""
