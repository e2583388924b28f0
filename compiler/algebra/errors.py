"""The algebra's user-level exceptions; the engine adds the document location."""
from __future__ import annotations


class AlgebraError(ValueError):
    """A user-level problem in the algebra (the engine adds the location)."""


class NotRational(AlgebraError):
    """A scalar that is not a rational function of the declared symbols."""


class LimitError(AlgebraError):
    """A computation grew beyond the term cap; fail fast instead of hanging."""
