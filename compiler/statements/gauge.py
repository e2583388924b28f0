"""Rules for gauge bundles (``bundle G: gauge E8``) and the ``factorize`` statement.

The group is read as a family word with a rank in parentheses (``SU(5)``,
``SO(N)`` with N an integer symbol) or an exceptional name (``E8``); which
groups exist and at which ranks is the group module's business, checked when
the declaration runs, so its suggestions come from one place.
"""
from __future__ import annotations

from compiler.statements import nodes as n
from compiler.statements.core import Cursor
from compiler.statements.expr_parser import expr

#: Largest numeric rank of a gauge group: weight systems stay small.
MAX_GAUGE_RANK = 64
#: Most factors a factorization asks for.
MAX_FACTORS = 2
#: Options of a gauge declaration, each a rational literal or a convention.
_OPTIONS = {"index": "the Dynkin index of the trace, such as 1, 2 or 1/2",
            "curvature": "the factor of the curvature, such as 1 or -1"}


def gauge_rule(c: Cursor, names) -> n.GaugeDecl:
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
            if c.at("/") or c.at("."):
                c.fail(c.peek(), "the rank of a group is a whole number")
        c.expect(")")
    options = c.options({word: _number_or_convention(what) for word, what in _OPTIONS.items()})
    return n.GaugeDecl(tuple(names), family.text, rank, rank_name, options.get("index"),
                       options.get("curvature"), **c.span)


def factorize_rule(c: Cursor) -> n.Factorize:
    target = expr(c)
    c.expect_word("into")
    degrees = [c.positive_integer("a form degree", 1000)]
    while c.accept(","):
        degrees.append(c.positive_integer("a form degree", 1000))
    if len(degrees) != MAX_FACTORS:
        c.fail(c.peek(), f"give the form degrees of {MAX_FACTORS} factors, as in 'into 4, 8'")
    return n.Factorize(target, tuple(degrees), c.outputs(len(degrees), "factorize"), **c.span)


def _number_or_convention(what: str):
    """A reader of a rational literal (described by ``what``) or a convention's name."""
    return lambda c: c.name("a convention") if c.peek().kind == "name" else c.rational(what)
