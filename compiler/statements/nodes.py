"""The syntax tree of derivation statements: pure data, no algebra.

Every node is a small frozen dataclass that remembers where it came from
(1-based ``line`` and ``column`` in the Markdown file), so every later stage
can point at the exact spot; every identifier is an ``Ident`` (a positioned
``str``, see ``tree``), so passes find names generically.  Numbers are kept as ``fractions.Fraction``;
turning the tree into algebra is the expression evaluator's job, and this
package never imports sympy.
"""
from __future__ import annotations

from dataclasses import dataclass, field
from fractions import Fraction
from typing import Optional, Union

from compiler.statements.tree import Ident


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

    id: Ident
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


@dataclass(frozen=True)
class RepSpec:
    """A representation inside ``ch(G, ...)``/``tr(G, ..., k)``: a trade name
    (``adjoint``, ``spinor+``, ``antisymmetric(3)``) or Dynkin labels ``[1, 0]``."""

    name: str  # "" for Dynkin labels
    power: Optional[int]
    labels: tuple[int, ...]
    line: int
    column: int


@dataclass(frozen=True)
class Apply:
    """A call of a function the document defined: ``a_chiral(r)``."""

    func: Ident
    args: tuple["Expr", ...]
    line: int
    column: int


@dataclass(frozen=True)
class Sum:
    """``sum(body, k = low..high)`` or ``prod(...)``; ``index`` is local to ``body``."""

    op: str  # "sum" or "prod"
    body: "Expr"
    index: Ident
    low: "Expr"
    high: "Expr"
    line: int
    column: int


@dataclass(frozen=True)
class Expansion:
    """``leading(f, N)``, ``series(f, N, 3)``: the first ``terms`` nonzero terms
    of ``f`` in ``variable`` at infinity (``point`` None) or at ``x = point``."""

    op: str  # "leading" or "series"
    target: "Expr"
    variable: Ident
    point: Optional[Fraction]
    terms: int
    line: int
    column: int


Expr = Union[Num, Name, Call, Unary, Binary, RepSpec, Apply, Sum, Expansion]


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
    value: Optional[Expr]
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
    weights: tuple[Expr, ...]
    order: Optional[Expr]
    line: int
    column: int


@dataclass(frozen=True)
class PointValue:
    """``north = -t/3`` in a fixed-point fiber's ``line``: a restriction."""

    label: str
    value: Expr
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

    lhs: Expr
    op: str
    rhs: Expr
    line: int
    column: int


# ---------------------------------------------------------------- statements


@dataclass(frozen=True, kw_only=True)
class _Statement:
    """Where a statement stands: ``line``/``column`` of its first token,
    ``end_line`` the last physical line it spans and ``source`` its joined
    text without comments, so the report can quote it."""

    line: int
    column: int
    end_line: int
    source: str


@dataclass(frozen=True)
class SymbolDecl(_Statement):
    names: tuple[Ident, ...]
    assumptions: tuple[str, ...]  # integer, positive, nonnegative, real, nonzero
    bounds: tuple[Bound, ...]
    relations: tuple[Relation, ...] = ()
    kind = "symbol"


@dataclass(frozen=True)
class ConventionDecl(_Statement):
    name: Ident
    value: Fraction
    kind = "convention"


@dataclass(frozen=True)
class BundleDecl(_Statement):
    names: tuple[Ident, ...]
    bundle_kind: str  # "real", "complex" or "line"
    rank: Union[int, Ident, None]  # None for line bundles; an Ident: a declared integer symbol
    kind = "bundle"


@dataclass(frozen=True)
class SplitDecl(_Statement):
    bundle: Ident
    parts: tuple[SplitPart, ...]
    kind = "split"


@dataclass(frozen=True)
class SurfaceFiber(_Statement):
    """``fiber Sigma: surface, genus g, tangent TS``; genus is a name or int."""

    name: Ident
    genus: Expr
    tangent: Ident
    kind = "fiber"


@dataclass(frozen=True)
class SphereFiber(_Statement):
    """``fiber S4: sphere of NW, angular e4``."""

    name: Ident
    bundle: Ident
    angular: Ident
    kind = "fiber"


@dataclass(frozen=True)
class GeneralFiber(_Statement):
    """``fiber F: dimension 2`` with an indented body of class/relation/integral."""

    name: Ident
    dimension: int
    classes: tuple[FiberClass, ...]
    relations: tuple[Equation, ...]
    integrals: tuple[Equation, ...]  # lhs a monomial, rhs its integral
    kind = "fiber"


@dataclass(frozen=True)
class FixedPointFiber(_Statement):
    """``fiber D: fixed points, dimension 2, rotation t = v, tangent TD`` with a body
    of ``point`` and ``line``, or ``fiber D: spindle a, b, ...``.  ``identified[i]``
    is what parameter i stands for (None: formal); ``line_values[i]`` restrict
    ``lines[i]`` to the points."""

    name: Ident
    dimension: int
    parameters: tuple[Ident, ...]
    identified: tuple[Optional[Expr], ...]
    tangent: Optional[Ident]
    points: tuple[FixedPointDecl, ...]
    lines: tuple[Ident, ...]
    line_values: tuple[tuple[PointValue, ...], ...]
    kind = "fiber"


@dataclass(frozen=True)
class Let(_Statement):
    name: Ident
    expr: Expr
    rebind: bool
    kind = "let"


@dataclass(frozen=True)
class Define(_Statement):
    """``define f(x, y) = body``: ``params`` are local to ``body``."""

    name: Ident
    params: tuple[Ident, ...]
    body: Expr
    rebind: bool
    kind = "define"


@dataclass(frozen=True)
class UseDecl(_Statement):
    """``use "common.md"`` (in this folder or below) or ``use library "x.md"``."""

    path: str
    library: bool
    #: The loaded document (a ``preambles.Module``, not a node), set after parsing.
    module: object = field(default=None, compare=False, repr=False)
    kind = "use"


@dataclass(frozen=True)
class Substitute(_Statement):
    target: Expr
    pairs: tuple[Equation, ...]
    outputs: tuple[Ident, ...]
    kind = "substitute"


@dataclass(frozen=True)
class Reduce(_Statement):
    target: Expr
    relations: tuple[Equation, ...]
    outputs: tuple[Ident, ...]
    kind = "reduce"


@dataclass(frozen=True)
class Integrate(_Statement):
    target: Expr
    fiber: Ident
    outputs: tuple[Ident, ...]
    kind = "integrate"

    # The engine still reads these two; it can use ``fiber.line`` instead.
    @property
    def fiber_line(self) -> int:
        return self.fiber.line

    @property
    def fiber_column(self) -> int:
        return self.fiber.column


@dataclass(frozen=True)
class Coefficients(_Statement):
    target: Expr
    monomials: tuple[Expr, ...]
    outputs: tuple[Ident, ...]
    kind = "coefficients"


@dataclass(frozen=True)
class Extremize(_Statement):
    """``maximize``/``minimize``/``extremize``.

    ``point`` names the critical point's coordinates (one per variable, in
    parentheses in the source when there are two or more); ``value`` names
    the extremal value.
    """

    mode: str  # "maximize", "minimize" or "extremize"
    target: Expr
    variables: tuple[Variable, ...]
    point: tuple[Ident, ...]
    value: Ident

    @property
    def kind(self) -> str:
        return self.mode

    @property
    def outputs(self) -> tuple[Ident, ...]:
        return self.point + (self.value,)


@dataclass(frozen=True)
class Check(_Statement):
    lhs: Expr
    op: str  # == != < <= > >=
    rhs: Expr
    clauses: tuple[ForClause, ...]
    kind = "check"


@dataclass(frozen=True)
class Show(_Statement):
    exprs: tuple[Expr, ...]
    form: str = "factored"  # or "expanded", "collected" (in ``symbol``)
    symbol: Optional[Ident] = None
    kind = "show"


@dataclass(frozen=True)
class Table(_Statement):
    exprs: tuple[Expr, ...]
    clauses: tuple[ForClause, ...]
    kind = "table"


@dataclass(frozen=True)
class Plot(_Statement):
    exprs: tuple[Expr, ...]
    variable: Ident
    interval: Interval
    clauses: tuple[ForClause, ...]
    kind = "plot"


@dataclass(frozen=True)
class GaugeDecl(_Statement):
    """``bundle G: gauge SU(N), index t, curvature 1/2``: rank a literal or an integer
    symbol; the trace index and the curvature factor rational literals or conventions."""

    names: tuple[Ident, ...]
    family: str
    rank: Optional[int]
    rank_name: Optional[Ident]
    index: Union[Fraction, Ident, None]
    curvature: Union[Fraction, Ident, None]
    kind = "bundle"


@dataclass(frozen=True)
class Factorize(_Statement):
    """``factorize I into 4, 8 -> X, Y``."""

    target: Expr
    degrees: tuple[int, ...]
    outputs: tuple[Ident, ...]
    kind = "factorize"


@dataclass(frozen=True)
class MatterDecl(_Statement):
    name: Ident
    dimension: int
    tangent: Ident
    r_symmetry: Optional[Ident]
    fields: tuple  # of matter.Field, the indented lines
    kind = "matter"

    @property
    def outputs(self) -> tuple[Ident, ...]:
        """The polynomial it binds, as the outputs of a step (kept in the cache)."""
        return (self.name,)


Statement = Union[
    SymbolDecl, ConventionDecl, BundleDecl, GaugeDecl, SplitDecl, SurfaceFiber,
    SphereFiber, GeneralFiber, FixedPointFiber, Let, Define, UseDecl, Substitute, Reduce,
    Integrate, Factorize, MatterDecl, Coefficients, Extremize, Check, Show, Table, Plot,
]
