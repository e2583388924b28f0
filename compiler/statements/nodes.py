"""The statement nodes of the syntax tree: one frozen dataclass per statement.

Each knows its position and source text (``_Statement``) and its ``kind``,
the word the engine's handler table is keyed by.  Expressions are in
``expr_nodes``, the pieces statements are built of in ``clause_nodes``.
"""
from __future__ import annotations

from dataclasses import dataclass, field
from fractions import Fraction
from typing import Optional, Union

from compiler.statements import clause_nodes as cn, expr_nodes as en
from compiler.statements.tree import Ident


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
    """``symbol N, k: integer, positive, 1 <= k < N``: symbols with assumptions, bounds, relations."""

    names: tuple[Ident, ...]
    assumptions: tuple[str, ...]  # integer, positive, nonnegative, real, nonzero
    bounds: tuple[cn.Bound, ...]
    relations: tuple[cn.Relation, ...] = ()
    kind = "symbol"


@dataclass(frozen=True)
class ConventionDecl(_Statement):
    """``convention k = 1/2``: a normalization the command line may override."""

    name: Ident
    value: Fraction
    kind = "convention"


@dataclass(frozen=True)
class BundleDecl(_Statement):
    """``bundle T: real, rank 6``: vector bundles whose classes the algebra knows."""

    names: tuple[Ident, ...]
    bundle_kind: str  # "real", "complex" or "line"
    rank: Union[int, Ident, None]  # None for line bundles; an Ident: a declared integer symbol
    kind = "bundle"


@dataclass(frozen=True)
class SplitDecl(_Statement):
    """``split T6 = T4 + TS``: a bundle as a sum of others (Whitney sum)."""

    bundle: Ident
    parts: tuple[cn.SplitPart, ...]
    kind = "split"


@dataclass(frozen=True)
class SurfaceFiber(_Statement):
    """``fiber Sigma: surface, genus g, tangent TS``; genus is a name or int."""

    name: Ident
    genus: en.Expr
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
    classes: tuple[cn.FiberClass, ...]
    relations: tuple[en.Equation, ...]
    integrals: tuple[en.Equation, ...]  # lhs a monomial, rhs its integral
    kind = "fiber"


@dataclass(frozen=True)
class FixedPointFiber(_Statement):
    """``fiber D: fixed points, dimension 2, rotation t = v, tangent TD`` with a body
    of ``point`` and ``line``, or ``fiber D: spindle a, b, ...``.  ``identified[i]``
    is what parameter i stands for (None: formal); ``line_values[i]`` restrict
    ``lines[i]`` to the points.  ``model`` is a general fiber to agree with,
    ``line_models[i]`` its class that c1 of ``lines[i]`` stands for."""

    name: Ident
    dimension: int
    parameters: tuple[Ident, ...]
    identified: tuple[Optional[en.Expr], ...]
    tangent: Optional[Ident]
    points: tuple[cn.FixedPointDecl, ...]
    lines: tuple[Ident, ...]
    line_values: tuple[tuple[cn.PointValue, ...], ...]
    model: Optional[Ident] = None
    line_models: tuple[Optional[Ident], ...] = ()
    kind = "fiber"


@dataclass(frozen=True)
class Let(_Statement):
    """``let NAME = EXPR``: a value bound once (``rebind`` with ``let!``)."""

    name: Ident
    expr: en.Expr
    rebind: bool
    kind = "let"


@dataclass(frozen=True)
class Define(_Statement):
    """``define f(x, y) = body``: ``params`` are local to ``body``."""

    name: Ident
    params: tuple[Ident, ...]
    body: en.Expr
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
    """``substitute X: a = b, ... -> OUT``: symbols or classes replaced at once."""

    target: en.Expr
    pairs: tuple[en.Equation, ...]
    outputs: tuple[Ident, ...]
    kind = "substitute"


@dataclass(frozen=True)
class Reduce(_Statement):
    """``reduce X modulo a = b, ... -> OUT``: a value rewritten modulo relations."""

    target: en.Expr
    relations: tuple[en.Equation, ...]
    outputs: tuple[Ident, ...]
    kind = "reduce"


@dataclass(frozen=True)
class Integrate(_Statement):
    """``integrate X over FIBER -> OUT``: fiber integration."""

    target: en.Expr
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
    """``coefficients X of m1, m2 -> a, b``: the coefficients of given monomials."""

    target: en.Expr
    monomials: tuple[en.Expr, ...]
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
    target: en.Expr
    variables: tuple[cn.Variable, ...]
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
    """``check LHS OP RHS [for ...]``: a claim decided exactly or by sampling."""

    lhs: en.Expr
    op: str  # == != < <= > >=
    rhs: en.Expr
    clauses: tuple[cn.ForClause, ...]
    kind = "check"


@dataclass(frozen=True)
class Show(_Statement):
    """``show X [as FORM | collected in SYM]``: values displayed in a chosen form."""

    exprs: tuple[en.Expr, ...]
    form: str = "factored"  # or "expanded", "collected" (in ``symbol``)
    symbol: Optional[Ident] = None
    kind = "show"


@dataclass(frozen=True)
class Table(_Statement):
    """``table X, Y for ...``: values at every point of the ``for`` lists."""

    exprs: tuple[en.Expr, ...]
    clauses: tuple[cn.ForClause, ...]
    kind = "table"


@dataclass(frozen=True)
class Plot(_Statement):
    """``plot X over VAR in LOW..HIGH [for ...]``: curves of class-free values."""

    exprs: tuple[en.Expr, ...]
    variable: Ident
    interval: cn.Interval
    clauses: tuple[cn.ForClause, ...]
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

    target: en.Expr
    degrees: tuple[int, ...]
    outputs: tuple[Ident, ...]
    kind = "factorize"


@dataclass(frozen=True)
class MatterDecl(_Statement):
    """``matter NAME: dimension D, tangent T`` and one field per line: an anomaly polynomial from field content."""

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
