"""The pieces statements are made of: bounds, intervals, for clauses, fiber body lines.

Frozen dataclasses with positions, like the expression nodes; a statement
node holds them in tuples.
"""
from __future__ import annotations

from dataclasses import dataclass
from fractions import Fraction
from typing import Optional

from compiler.statements import expr_nodes as en
from compiler.statements.tree import Ident


@dataclass(frozen=True)
class Bound:
    """``g >= 2``: a symbol of its statement, operator, rational literal."""

    name: Ident
    op: str  # one of < <= > >=, always with the symbol on the left
    value: Fraction
    line: int
    column: int


@dataclass(frozen=True)
class Interval:
    """``in (a, b)`` (open) or ``a..b`` (closed) with rational end points."""

    low: Fraction
    high: Fraction
    closed: bool
    line: int
    column: int


@dataclass(frozen=True)
class ForClause:
    """``N = 2..8`` (integer range, inclusive) or ``z = 1/2`` (one value).

    Exactly one of ``value`` / ``range`` is set; ``range`` is ``(low, high)``
    as integers.
    """

    name: Ident
    value: Optional[en.Expr]
    range: Optional[tuple[int, int]]
    line: int
    column: int


@dataclass(frozen=True)
class Variable:
    """An extremization variable, optionally restricted: ``eps in (-1, 1)``."""

    name: Ident
    interval: Optional[Interval]
    line: int
    column: int


@dataclass(frozen=True)
class SplitPart:
    """A summand of ``split``: a declared bundle name, or ``trivial(k)``."""

    name: Optional[Ident]
    trivial: Optional[int]
    line: int
    column: int


@dataclass(frozen=True)
class FiberClass:
    """``class x: 2`` in a general fiber body."""

    name: Ident
    degree: int
    line: int
    column: int


@dataclass(frozen=True)
class FixedPointDecl:
    """``point p: weights w1, w2, order d`` (order None: 1).  The label is
    plain text, not an ``Ident``: it is not a name of the document."""

    label: str
    weights: tuple[en.Expr, ...]
    order: Optional[en.Expr]
    line: int
    column: int


@dataclass(frozen=True)
class PointValue:
    """``north = -t/3`` in a fixed-point fiber's ``line``: a restriction."""

    label: str
    value: en.Expr
    line: int
    column: int


@dataclass(frozen=True)
class Relation:
    """``Nf > Nc``, ``q < p``, ``Nf < 3*Nc`` in a ``symbol`` declaration.

    Each side is a linear expression with rational coefficients in symbols
    (those of this statement or declared earlier); at least one side names a
    symbol of this statement.  ``op`` is one of < <= > >=, as written:
    ``lhs op rhs``.  A chain ``Nc < Nf < 3*Nc`` gives two relations (each at
    the position of its left side).  A comparison of a symbol of this
    statement with a rational literal stays a ``Bound``.
    """

    lhs: en.Expr
    op: str
    rhs: en.Expr
    line: int
    column: int
