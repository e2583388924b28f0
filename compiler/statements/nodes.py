"""The syntax tree of derivation statements: pure data, no algebra.

Every node is a small frozen dataclass that remembers where it came from
(1-based ``line`` and ``column`` in the Markdown file), so every later stage
can point at the exact spot.  Numbers are kept as ``fractions.Fraction``;
turning the tree into algebra is the expression evaluator's job, and this
package never imports sympy.
"""
from __future__ import annotations

import re
from dataclasses import dataclass
from fractions import Fraction
from typing import Optional, Union


# ---------------------------------------------------------------- expressions


@dataclass(frozen=True)
class Num:
    """An exact integer or fraction literal (``3``; ``1/48`` is Binary)."""

    value: Fraction
    line: int
    column: int


@dataclass(frozen=True)
class Name:
    """An author's identifier: a symbol, bundle, fiber class or bound value."""

    id: str
    line: int
    column: int


@dataclass(frozen=True)
class Call:
    """A built-in function in call position: ``p1(T)``, ``ch(S(NW))``."""

    func: str
    args: tuple["Expr", ...]
    line: int
    column: int


@dataclass(frozen=True)
class Unary:
    """``-x`` or ``+x``."""

    op: str
    operand: "Expr"
    line: int
    column: int


@dataclass(frozen=True)
class Binary:
    """``+ - * / ^``; ``**`` is normalised to ``^`` by the parser."""

    op: str
    left: "Expr"
    right: "Expr"
    line: int
    column: int


Expr = Union[Num, Name, Call, Unary, Binary]


@dataclass(frozen=True)
class Equation:
    """``lhs = rhs`` in substitutions, relations and fiber integrals.

    A bare expression in a relation list is ``Equation(expr, None)``: it
    vanishes.
    """

    lhs: Expr
    rhs: Optional[Expr]
    line: int
    column: int


# ---------------------------------------------------------------- pieces


@dataclass(frozen=True)
class Bound:
    """``g >= 2``: symbol, comparison operator, rational literal."""

    name: str
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

    name: str
    value: Optional[Expr]
    range: Optional[tuple[int, int]]
    line: int
    column: int


@dataclass(frozen=True)
class Variable:
    """An extremization variable, optionally restricted: ``eps in (-1, 1)``."""

    name: str
    interval: Optional[Interval]
    line: int
    column: int


@dataclass(frozen=True)
class SplitPart:
    """A summand of ``split``: a declared bundle name, or ``trivial(k)``."""

    name: Optional[str]
    trivial: Optional[int]
    line: int
    column: int


@dataclass(frozen=True)
class FiberClass:
    """``class x: 2`` in a general fiber body."""

    name: str
    degree: int
    line: int
    column: int


# ---------------------------------------------------------------- statements
#
# Every statement has ``line``/``column`` (where its first token is),
# ``end_line`` (the last physical line it spans) and ``source`` (its joined
# text, comments removed) so the report can quote it.


@dataclass(frozen=True)
class SymbolDecl:
    names: tuple[str, ...]
    assumptions: tuple[str, ...]  # integer, positive, nonnegative, real, nonzero
    bounds: tuple[Bound, ...]
    line: int
    column: int
    end_line: int
    source: str
    kind = "symbol"


@dataclass(frozen=True)
class ConventionDecl:
    name: str
    value: Fraction
    line: int
    column: int
    end_line: int
    source: str
    kind = "convention"


@dataclass(frozen=True)
class BundleDecl:
    names: tuple[str, ...]
    bundle_kind: str  # "real", "complex" or "line"
    rank: Optional[int]  # None for line bundles
    line: int
    column: int
    end_line: int
    source: str
    kind = "bundle"


@dataclass(frozen=True)
class SplitDecl:
    bundle: str
    parts: tuple[SplitPart, ...]
    line: int
    column: int
    end_line: int
    source: str
    kind = "split"


@dataclass(frozen=True)
class SurfaceFiber:
    """``fiber Sigma: surface, genus g, tangent TS``; genus is a name or int."""

    name: str
    genus: Expr
    tangent: str
    line: int
    column: int
    end_line: int
    source: str
    kind = "fiber"


@dataclass(frozen=True)
class SphereFiber:
    """``fiber S4: sphere of NW, angular e4``."""

    name: str
    bundle: str
    angular: str
    line: int
    column: int
    end_line: int
    source: str
    kind = "fiber"


@dataclass(frozen=True)
class GeneralFiber:
    """``fiber F: dimension 2`` with an indented body of class/relation/integral."""

    name: str
    dimension: int
    classes: tuple[FiberClass, ...]
    relations: tuple[Equation, ...]
    integrals: tuple[Equation, ...]  # lhs a monomial, rhs its integral
    line: int
    column: int
    end_line: int
    source: str
    kind = "fiber"


@dataclass(frozen=True)
class Let:
    name: str
    expr: Expr
    rebind: bool
    line: int
    column: int
    end_line: int
    source: str
    kind = "let"


@dataclass(frozen=True)
class Substitute:
    target: Expr
    pairs: tuple[Equation, ...]
    outputs: tuple[str, ...]
    line: int
    column: int
    end_line: int
    source: str
    kind = "substitute"


@dataclass(frozen=True)
class Reduce:
    target: Expr
    relations: tuple[Equation, ...]
    outputs: tuple[str, ...]
    line: int
    column: int
    end_line: int
    source: str
    kind = "reduce"


@dataclass(frozen=True)
class Integrate:
    target: Expr
    fiber: str
    fiber_line: int
    fiber_column: int
    outputs: tuple[str, ...]
    line: int
    column: int
    end_line: int
    source: str
    kind = "integrate"


@dataclass(frozen=True)
class Coefficients:
    target: Expr
    monomials: tuple[Expr, ...]
    outputs: tuple[str, ...]
    line: int
    column: int
    end_line: int
    source: str
    kind = "coefficients"


@dataclass(frozen=True)
class Extremize:
    """``maximize``/``minimize``/``extremize``.

    ``point`` names the critical point's coordinates (one per variable, in
    parentheses in the source when there are two or more); ``value`` names
    the extremal value.
    """

    mode: str  # "maximize", "minimize" or "extremize"
    target: Expr
    variables: tuple[Variable, ...]
    point: tuple[str, ...]
    value: str
    line: int
    column: int
    end_line: int
    source: str

    @property
    def kind(self) -> str:
        return self.mode

    @property
    def outputs(self) -> tuple[str, ...]:
        return self.point + (self.value,)


@dataclass(frozen=True)
class Check:
    lhs: Expr
    op: str  # == != < <= > >=
    rhs: Expr
    clauses: tuple[ForClause, ...]
    line: int
    column: int
    end_line: int
    source: str
    kind = "check"


@dataclass(frozen=True)
class Show:
    exprs: tuple[Expr, ...]
    line: int
    column: int
    end_line: int
    source: str
    kind = "show"


@dataclass(frozen=True)
class Table:
    exprs: tuple[Expr, ...]
    clauses: tuple[ForClause, ...]
    line: int
    column: int
    end_line: int
    source: str
    kind = "table"


@dataclass(frozen=True)
class Plot:
    exprs: tuple[Expr, ...]
    variable: str
    interval: Interval
    clauses: tuple[ForClause, ...]
    line: int
    column: int
    end_line: int
    source: str
    kind = "plot"


Statement = Union[
    SymbolDecl, ConventionDecl, BundleDecl, SplitDecl, SurfaceFiber,
    SphereFiber, GeneralFiber, Let, Substitute, Reduce, Integrate,
    Coefficients, Extremize, Check, Show, Table, Plot,
]

#: Words that begin a statement; they cannot be used as names.
STATEMENT_WORDS = frozenset({
    "symbol", "convention", "bundle", "split", "fiber", "let", "substitute",
    "reduce", "integrate", "coefficients", "maximize", "minimize",
    "extremize", "check", "show", "table", "plot",
})

#: Built-in functions; a name is a function only in call position.
BUILTIN_FUNCTIONS = frozenset({
    "p", "c", "e", "Ahat", "L", "td", "ch", "S", "dual", "wedge", "sym",
    "part", "degree", "sqrt", "trivial",
})

_INDEXED_CLASS = re.compile(r"[pc][1-9][0-9]*")


def is_builtin_function(name: str) -> bool:
    """True for ``p``, ``ch``, ... and the indexed classes ``p1``, ``c12``."""
    return name in BUILTIN_FUNCTIONS or _INDEXED_CLASS.fullmatch(name) is not None
