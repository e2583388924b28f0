"""``fiber`` statements: header rules keyed by fiber kind, body rules keyed by body word.

``fiber F: surface, ...`` and ``fiber F: sphere of ...`` are one line.  The
other kinds collect the indented lines that follow their header: under
``fiber F: dimension n`` the lines ``class``, ``relation`` and ``integral``
make one ``GeneralFiber``; under ``fiber F: fixed points, ...`` the lines
``point`` and ``line`` make one ``FixedPointFiber``, and so do the ``line``
lines under ``fiber F: spindle a, b, ...`` (whose points are ``north`` and
``south``).  ``, model G`` after the rotation names a general fiber the
localization is checked against; ``line L = x: ...`` says L's c1 is G's class x.
"""
from __future__ import annotations

from dataclasses import dataclass, field
from typing import Callable, Optional

from compiler.statements import clause_nodes as cn, expr_nodes as en, nodes as n
from compiler.statements.core import Cursor, did_you_mean
from compiler.statements.expr_parser import equations, expr, literal
from compiler.statements.lexer import LogicalLine
from compiler.statements.tree import Ident

BODY_WORDS = ("class", "relation", "integral", "point", "line")
#: A fiber of higher dimension (or a class of higher degree) is beyond any
#: anomaly computation.
MAX_FIBER_DIMENSION = 64


@dataclass(frozen=True)
class Header:
    """A fiber header waiting for its indented body: the body words it reads
    and how the collected parts (lists keyed by part name) make its node."""

    rules: dict
    make: Callable[[dict, dict], object]   # (parts, span) -> statement node
    span: dict


@dataclass
class FiberBody:
    """The body lines collected so far under a fiber's header (``header`` is
    None under a header that failed to parse)."""

    header: Optional[Header]
    parts: dict = field(default_factory=dict)
    end_line: int = 0
    sources: list = field(default_factory=list)

    def add(self, parsed: tuple[str, list], logical: LogicalLine) -> None:
        kind, items = parsed
        self.parts.setdefault(kind, []).extend(items)
        self.end_line = logical.end_line
        self.sources.append("  " + logical.source)

    def build(self):
        span = dict(self.header.span)
        span["end_line"] = max(span["end_line"], self.end_line)
        span["source"] = "\n".join([span["source"], *self.sources])
        return self.header.make(self.parts, span)


def fiber_rule(c: Cursor):
    """``fiber NAME: KIND ...``: a fiber node, or a ``Header`` waiting for its body."""
    name = c.name("a fiber name")
    c.expect(":")
    kind = c.peek()
    if kind.kind == "name" and kind.text in FIBER_KINDS:
        c.next()
        return FIBER_KINDS[kind.text](c, name)
    if kind.kind == "name":
        c.fail(kind, f"unknown fiber kind '{kind.text}' (allowed: 'surface, genus g, "
                     "tangent T', 'sphere of B, angular e', 'dimension n', 'fixed points, "
                     "dimension n, rotation t', 'spindle a, b, rotation t')"
               + did_you_mean(kind.text, FIBER_KINDS))
    c.expected("surface, sphere, dimension, fixed or spindle")


def _surface(c: Cursor, name: Ident) -> n.SurfaceFiber:
    options = _options(c, {"genus": _genus, "tangent": Cursor.name})
    return n.SurfaceFiber(name, options["genus"], options["tangent"], **c.span)


def _sphere(c: Cursor, name: Ident) -> n.SphereFiber:
    c.expect_word("of")
    bundle = c.name("a real bundle of odd rank")
    options = _options(c, {"angular": Cursor.name})
    return n.SphereFiber(name, bundle, options["angular"], **c.span)


def _dimension(c: Cursor, name: Ident) -> Header:
    dimension = c.positive_integer("the fiber dimension", MAX_FIBER_DIMENSION)

    def make(parts: dict, span: dict) -> n.GeneralFiber:
        return n.GeneralFiber(name, dimension, *(tuple(parts.get(k, ())) for k in
                                                 ("classes", "relations", "integrals")), **span)
    return Header(GENERAL_RULES, make, c.span)


def _fixed(c: Cursor, name: Ident) -> Header:
    """``fixed points, dimension d, rotation t [= value], ... [, tangent T]``."""
    c.expect_word("points")
    c.expect(",")
    c.expect_word("dimension")
    dimension = c.even_dimension("the fiber dimension", MAX_FIBER_DIMENSION,
                                 "a fiber with isolated fixed points has even dimension, not {}")
    rotation = _rotation(c)
    return Header(FIXED_RULES, lambda parts, span: _fixed_node(
        name, dimension, rotation, parts.get("points", ()), parts, span), c.span)


def _spindle(c: Cursor, name: Ident) -> Header:
    """``spindle a, b, rotation t [= value] [, tangent T]``: the pole ``north`` of
    order a with weight t/a and the pole ``south`` of order b with weight -t/b."""
    a = expr(c)
    c.expect(",")
    b = expr(c)
    rotation = _rotation(c)
    if len(rotation[0]) != 1:
        c.fail(rotation[0][1], "a spindle turns about one axis: give one rotation parameter")
    t = en.Name(rotation[0][0], rotation[0][0].line, rotation[0][0].column)
    poles = (cn.FixedPointDecl("north", (en.Binary("/", t, a, a.line, a.column),), a,
                              a.line, a.column),
             cn.FixedPointDecl("south", (en.Unary("-", en.Binary("/", t, b, b.line, b.column),
                                                b.line, b.column),), b, b.line, b.column))
    return Header(SPINDLE_RULES, lambda parts, span: _fixed_node(
        name, 2, rotation, poles, parts, span), c.span)


def _rotation(c: Cursor) -> tuple:
    """``, rotation t [= value], u [= value] [, tangent T] [, model G]``: the
    parameters, what each stands for (None: formal), the tangent bundle's name
    and the general fiber to agree with."""
    c.expect(",")
    c.expect_word("rotation")
    parameters, identified, tail = [], [], {"tangent": None, "model": None}
    while True:
        parameters.append(c.name("a rotation parameter"))
        identified.append(expr(c) if c.accept("=") else None)
        if not c.accept(","):
            break
        word = next((w for w in _TAIL if c.at_word(w)), None)
        if word is not None:
            c.next()
            tail[word] = _TAIL[word](c)
            tail.update(c.options({w: r for w, r in _TAIL.items() if w != word}))
            break
    c.no_duplicates(parameters)
    return tuple(parameters), tuple(identified), tail["tangent"], tail["model"]


_TAIL = {"tangent": lambda c: c.name("the tangent bundle's name"),
         "model": lambda c: c.name("a general fiber's name")}


def _fixed_node(name: Ident, dimension: int, rotation: tuple, points, parts: dict,
                span: dict) -> n.FixedPointFiber:
    lines = parts.get("lines", ())
    return n.FixedPointFiber(name, dimension, rotation[0], rotation[1], rotation[2],
                             tuple(points), tuple(line for line, _, _ in lines),
                             tuple(values for _, _, values in lines), rotation[3],
                             tuple(model for _, model, _ in lines), **span)


def _options(c: Cursor, readers: dict) -> dict:
    """``, word value`` pairs in any order, each required exactly once."""
    values = c.options(readers)
    missing = [w for w in readers if w not in values]
    if missing:
        c.expected(f"', {missing[0]} ...'")
    return values


def _genus(c: Cursor) -> en.Expr:
    if c.peek().kind == "int":
        return literal(c)
    name = c.name("the genus (a symbol or a nonnegative integer)")
    return en.Name(name, name.line, name.column)


def body_line(c: Cursor, rules: dict) -> tuple[str, list]:
    """One indented line of a fiber body, read by the header's ``rules``."""
    c.lexing_problems()
    word = c.peek()
    reader = rules.get(word.text) if word.kind == "name" else None
    if reader is None:
        c.fail(word, f"an indented line here starts with {' or '.join(rules)}, found "
                     f"{c.describe(word)}" + (did_you_mean(word.text, rules)
                                              if word.kind == "name" else ""))
    c.next()
    result = reader(c)
    c.expect_end()
    return result


def _body_class(c: Cursor) -> tuple[str, list]:
    names = c.name_list("a class name")
    c.expect(":")
    degree = c.positive_integer("the degree", MAX_FIBER_DIMENSION)
    return "classes", [cn.FiberClass(name, degree, name.line, name.column) for name in names]


def _point(c: Cursor) -> tuple[str, list]:
    """``point p: weights w1, w2 [, order d]`` (``weight`` for one)."""
    label = c.name("a fixed point's label")
    c.expect(":")
    if not (c.at_word("weight") or c.at_word("weights")):
        c.expected("'weights'")
    c.next()
    weights, order = [expr(c)], None
    while c.accept(","):
        if c.at_word("order"):
            c.next()
            order = expr(c)
            break
        weights.append(expr(c))
    return "points", [cn.FixedPointDecl(str(label), tuple(weights), order,
                                       label.line, label.column)]


def _line(c: Cursor) -> tuple[str, list]:
    """``line L [= x]: p = value, q = value``: a line bundle by its restrictions
    (and the model fiber's class its c1 stands for)."""
    name = c.name("a line bundle's name")
    model = c.name("a class of the model fiber") if c.accept("=") else None
    c.expect(":")
    values = []
    while True:
        label = c.name("a fixed point's label")
        c.expect("=")
        values.append(cn.PointValue(str(label), expr(c), label.line, label.column))
        if not c.accept(","):
            return "lines", [(name, model, tuple(values))]


FIBER_KINDS = {"surface": _surface, "sphere": _sphere, "dimension": _dimension,
               "fixed": _fixed, "spindle": _spindle}

FIXED_RULES = {"point": _point, "line": _line}
SPINDLE_RULES = {"line": _line}

GENERAL_RULES = {
    "class": _body_class,
    "relation": lambda c: ("relations", list(equations(c, bare=True))),
    "integral": lambda c: ("integrals", list(equations(c, bare=False))),
}
