"""Gauge bundles (``bundle G: gauge E8``) and the ``factorize`` statement: their nodes and rules.

The group is read as a family word with a rank in parentheses (``SU(5)``,
``SO(N)`` with N an integer symbol) or an exceptional name (``E8``); which
groups exist and at which ranks is the group module's business, checked when
the declaration runs, so its suggestions come from one place.
"""
from __future__ import annotations

from dataclasses import dataclass
from fractions import Fraction
from typing import Optional

from compiler.statements import nodes as n
from compiler.statements.core import Cursor, expr
from compiler.statements.tree import Ident

#: Largest numeric rank of a gauge group: weight systems stay small.
MAX_GAUGE_RANK = 64
#: Most factors a factorization asks for.
MAX_FACTORS = 2


@dataclass(frozen=True)
class GaugeDecl(n._Statement):
    """``bundle G: gauge SU(N), index t``: rank a literal or an integer symbol,
    the trace index a rational literal or a convention."""

    names: tuple[Ident, ...]
    family: str
    rank: Optional[int]
    rank_name: Optional[Ident]
    index: Optional[Fraction]
    index_name: Optional[Ident]
    kind = "bundle"


@dataclass(frozen=True)
class Factorize(n._Statement):
    """``factorize I into 4, 8 -> X, Y``."""

    target: n.Expr
    degrees: tuple[int, ...]
    outputs: tuple[Ident, ...]
    kind = "factorize"


def gauge_rule(c: Cursor, names) -> GaugeDecl:
    """After ``bundle NAMES:`` when the next word is ``gauge``."""
    c.expect_word("gauge")
    family = c.peek()
    if family.kind != "name":
        c.expected("a group such as SU(5), SO(32), Sp(2) or E8")
    c.next()
    rank = rank_name = None
    if c.accept("("):
        if c.peek().kind == "name":
            rank_name = c.name("an integer symbol for the rank")
        else:
            rank = c.positive_integer("the rank", MAX_GAUGE_RANK)
        c.expect(")")
    index = index_name = None
    if c.accept(","):
        c.expect_word("index")
        if c.peek().kind == "name":
            index_name = c.name("a convention for the trace index")
        else:
            index = c.rational("the Dynkin index of the trace, such as 1, 2 or 1/2")
    return GaugeDecl(tuple(names), family.text, rank, rank_name, index, index_name, **c.span)


def factorize_rule(c: Cursor) -> Factorize:
    target = expr(c)
    c.expect_word("into")
    degrees = [c.positive_integer("a form degree", 1000)]
    while c.accept(","):
        degrees.append(c.positive_integer("a form degree", 1000))
    if len(degrees) != MAX_FACTORS:
        c.fail(c.peek(), f"give the form degrees of {MAX_FACTORS} factors, as in 'into 4, 8'")
    return Factorize(target, tuple(degrees), c.outputs(len(degrees), "factorize"), **c.span)
