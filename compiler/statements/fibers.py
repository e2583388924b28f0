"""``fiber`` statements: header rules keyed by fiber kind, body rules keyed by body word.

``fiber F: surface, ...`` and ``fiber F: sphere of ...`` are one line; a
``fiber F: dimension n`` header collects the indented lines that follow it
(``class``, ``relation``, ``integral``) into one ``GeneralFiber``.
"""
from __future__ import annotations

from dataclasses import dataclass, field
from fractions import Fraction
from typing import Optional

from compiler.statements import nodes as n
from compiler.statements.core import Cursor, did_you_mean, equations
from compiler.statements.lexer import LogicalLine
from compiler.statements.tree import Ident

BODY_WORDS = ("class", "relation", "integral")
#: A fiber of higher dimension (or a class of higher degree) is beyond any
#: anomaly computation.
MAX_FIBER_DIMENSION = 64


@dataclass(frozen=True)
class GeneralHeader:
    """``fiber F: dimension n``, waiting for its indented body."""

    name: Ident
    dimension: int
    span: dict

    def open_body(self) -> "FiberBody":
        return FiberBody(self)


@dataclass
class FiberBody:
    """The body lines collected so far under a general fiber's header
    (``header`` is None under a header that failed to parse)."""

    header: Optional[GeneralHeader]
    classes: list = field(default_factory=list)
    relations: list = field(default_factory=list)
    integrals: list = field(default_factory=list)
    end_line: int = 0
    sources: list = field(default_factory=list)

    def add(self, c: Cursor, logical: LogicalLine) -> None:
        kind, items = body_line(c)
        getattr(self, kind).extend(items)
        self.end_line = logical.end_line
        self.sources.append("  " + logical.source)

    def build(self) -> n.GeneralFiber:
        span = dict(self.header.span)
        span["end_line"] = max(span["end_line"], self.end_line)
        span["source"] = "\n".join([span["source"], *self.sources])
        return n.GeneralFiber(self.header.name, self.header.dimension, tuple(self.classes),
                              tuple(self.relations), tuple(self.integrals), **span)


def fiber_rule(c: Cursor):
    """``fiber NAME: KIND ...``: a fiber node, or a ``GeneralHeader``."""
    name = c.name("a fiber name")
    c.expect(":")
    kind = c.peek()
    if kind.kind == "name" and kind.text in FIBER_KINDS:
        c.next()
        return FIBER_KINDS[kind.text](c, name)
    if kind.kind == "name":
        c.fail(kind, f"unknown fiber kind '{kind.text}' (allowed: 'surface, genus g, "
                     "tangent T', 'sphere of B, angular e', 'dimension n')"
               + did_you_mean(kind.text, FIBER_KINDS))
    c.expected("surface, sphere or dimension")


def _surface(c: Cursor, name: Ident) -> n.SurfaceFiber:
    options = _options(c, {"genus": _genus, "tangent": Cursor.name})
    return n.SurfaceFiber(name, options["genus"], options["tangent"], **c.span)


def _sphere(c: Cursor, name: Ident) -> n.SphereFiber:
    c.expect_word("of")
    bundle = c.name("a real bundle of odd rank")
    options = _options(c, {"angular": Cursor.name})
    return n.SphereFiber(name, bundle, options["angular"], **c.span)


def _dimension(c: Cursor, name: Ident) -> GeneralHeader:
    dimension = c.positive_integer("the fiber dimension", MAX_FIBER_DIMENSION)
    return GeneralHeader(name, dimension, c.span)


def _options(c: Cursor, readers: dict) -> dict:
    """``, word value`` pairs in any order, each required exactly once."""
    values = {}
    while c.accept(","):
        token = c.peek()
        if token.kind != "name" or token.text not in readers:
            c.expected(" or ".join(f"'{w}'" for w in readers))
        if token.text in values:
            c.fail(token, f"'{token.text}' given twice")
        c.next()
        values[token.text] = readers[token.text](c)
    missing = [w for w in readers if w not in values]
    if missing:
        c.expected(f"', {missing[0]} ...'")
    return values


def _genus(c: Cursor) -> n.Expr:
    token = c.peek()
    if token.kind == "int":
        c.next()
        return n.Num(Fraction(token.value), token.line, token.column)
    name = c.name("the genus (a symbol or a nonnegative integer)")
    return n.Name(name, name.line, name.column)


def body_line(c: Cursor) -> tuple[str, list]:
    """One indented line of a general fiber: class, relation or integral."""
    c.lexing_problems()
    word = c.peek()
    reader = BODY_RULES.get(word.text) if word.kind == "name" else None
    if reader is None:
        c.fail(word, "a fiber body line starts with class, relation or integral, found "
                     f"{c.describe(word)}" + (did_you_mean(word.text, BODY_WORDS)
                                              if word.kind == "name" else ""))
    c.next()
    result = reader(c)
    c.expect_end()
    return result


def _body_class(c: Cursor) -> tuple[str, list]:
    names = c.name_list("a class name")
    c.expect(":")
    degree = c.positive_integer("the degree", MAX_FIBER_DIMENSION)
    return "classes", [n.FiberClass(name, degree, name.line, name.column) for name in names]


FIBER_KINDS = {"surface": _surface, "sphere": _sphere, "dimension": _dimension}

BODY_RULES = {
    "class": _body_class,
    "relation": lambda c: ("relations", list(equations(c, bare=True))),
    "integral": lambda c: ("integrals", list(equations(c, bare=False))),
}
