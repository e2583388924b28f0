"""The expression nodes of the syntax tree: pure data, no algebra.

Every node is a small frozen dataclass that remembers where it came from
(1-based ``line`` and ``column`` in the Markdown file), so every later stage
can point at the exact spot; every identifier is an ``Ident`` (a positioned
``str``, see ``tree``), so passes find names generically.  Numbers are kept as ``fractions.Fraction``;
turning the tree into algebra is the expression evaluator's job, and this
package never imports sympy.
"""
from __future__ import annotations

from dataclasses import dataclass
from fractions import Fraction
from typing import Optional, Union

from compiler.statements.tree import Ident


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
