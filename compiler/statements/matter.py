"""``matter`` statements: field content whose anomaly polynomial the compiler forms.

    matter I8: dimension 6, tangent T, R_symmetry R
      vector in (G, adjoint)
      hyper 2*N in (G, fundamental)
      tensor

A header line names the polynomial, the spacetime dimension, the tangent
bundle and optionally the R-symmetry bundle; each indented line is one kind
of field or multiplet with a multiplicity (an expression, default 1), the
representations it sits in (a gauge bundle's representation ``(G, rep)``
or any bundle construction) and its charges under line bundles
(``charges L: q``).  Which kinds exist in which dimension is the engine's
table; here they are only words.
"""
from __future__ import annotations

from dataclasses import dataclass
from typing import Optional

from compiler.statements import expr_nodes as en, nodes as n
from compiler.statements.core import Cursor
from compiler.statements.expr_parser import expr, representation
from compiler.statements.fibers import Header
from compiler.statements.tree import Ident

#: Spacetime dimensions a matter statement accepts (anomalies live in even dimensions).
MAX_DIMENSION = 12
_OPTIONS = ("tangent", "R_symmetry")


@dataclass(frozen=True)
class Factor:
    """A representation a field sits in: ``(G, rep)`` or a bundle construction."""

    gauge: Optional[Ident]
    rep: Optional[en.RepSpec]
    construction: Optional[en.Expr]
    line: int
    column: int


@dataclass(frozen=True)
class Charge:
    """``L: q`` after ``charges``: the charge under a line bundle."""

    bundle: Ident
    value: en.Expr
    line: int
    column: int


@dataclass(frozen=True)
class Field:
    """One body line: a kind (``weyl+``, ``hyper``, ...), its multiplicity and representation."""

    kind: str
    count: Optional[en.Expr]
    factors: tuple[Factor, ...]
    charges: tuple[Charge, ...]
    line: int
    column: int


def matter_rule(c: Cursor) -> Header:
    """The header; the indented lines below it are read by ``FIELD_RULES``."""
    name = c.name("a name for the anomaly polynomial")
    c.expect(":")
    c.expect_word("dimension")
    dimension = c.even_dimension("the dimension", MAX_DIMENSION,
                                 "anomalies of chiral fields live in even dimensions, not {}")
    options = c.options(dict.fromkeys(_OPTIONS, lambda c: c.name("a bundle name")))
    if "tangent" not in options:
        c.fail(c.peek(), "name the tangent bundle: 'matter I: dimension 6, tangent T'")
    tangent, r_symmetry = options["tangent"], options.get("R_symmetry")
    return Header(FIELD_RULES, lambda parts, span: n.MatterDecl(
        name, dimension, tangent, r_symmetry, tuple(parts.get("fields", ())), **span), c.span)


def _field(c: Cursor) -> tuple[str, list[Field]]:
    """``KIND [COUNT] [in FACTOR, ...] [charges L: q, ...]``, after the kind's word."""
    start = c.tokens[c.pos - 1]
    sign = c.peek()
    text = start.text
    if sign.kind == "op" and sign.text in "+-" and sign.column == start.end_column:
        c.next()
        text += sign.text
    count = None
    if not (c.at_word("in") or c.at_word("charges") or c.peek().kind == "end"):
        count = expr(c)
    factors: list[Factor] = []
    if c.at_word("in"):
        c.next()
        factors.append(_factor(c))
        while c.accept(","):
            factors.append(_factor(c))
    charges: list[Charge] = []
    if c.at_word("charges"):
        c.next()
        charges.append(_charge(c))
        while c.accept(","):
            charges.append(_charge(c))
        c.no_duplicates([q.bundle for q in charges])
    return "fields", [Field(text, count, tuple(factors), tuple(charges), start.line, start.column)]


def _factor(c: Cursor) -> Factor:
    start = c.peek()
    if c.at("(") and c.peek(1).kind == "name" and c.peek(2).text == ",":
        c.next()
        gauge = c.name("a gauge bundle")
        c.expect(",")
        rep = representation(c)
        c.expect(")")
        return Factor(gauge, rep, None, start.line, start.column)
    return Factor(None, None, expr(c), start.line, start.column)


def _charge(c: Cursor) -> Charge:
    bundle = c.name("a line bundle")
    c.expect(":")
    return Charge(bundle, expr(c), bundle.line, bundle.column)


#: The words a field line starts with (``weyl``, ``gravitino`` and ``selfdual`` take a
#: chirality, ``weyl+``); which exist in which dimension is ``algebra/anomalies.py``'s table.
FIELD_WORDS = ("weyl", "gravitino", "selfdual", "chiral", "fermi", "vector", "hyper", "tensor",
               "tensor20", "gravity")
FIELD_RULES = {word: _field for word in FIELD_WORDS}
