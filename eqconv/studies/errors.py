"""Errors of the study layer (all derive from :class:`eqconv.errors.EqconvError`)."""

from __future__ import annotations

from ..errors import InputError

__all__ = ["UnreachableTargetError"]


class UnreachableTargetError(InputError):
    """A target conversion is not reached: not crossed inside the given bracket, or not
    within the allowed number of beds. The message names the target, the bracket and the
    conversions reached at its ends (or the asymptote)."""
