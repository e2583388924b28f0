"""The safe expression evaluator: syntax trees in, algebra values out.

Document text never reaches ``eval`` or sympy's string parsers.  The parser
has already built a tree of ``Num``/``Name``/``Call``/``Unary``/``Binary``
nodes; here each node kind has one method (dispatched by the node's class
name, the way sympy's printers dispatch), and each built-in function has one
entry in a table.  What a name means comes from the engine's scope.

A value is either an ``Element`` of the graded ring (classes with rational-
function coefficients, which covers almost everything) or, for the few
class-free results that leave the rational functions (a square root from an
extremization), a plain sympy expression.
"""
from __future__ import annotations

from contextlib import contextmanager
from fractions import Fraction
from typing import Callable, Union

import sympy

from . import calls, expansions, notation
from .algebra import budget, genera
from .algebra.radicals import tidy
from .algebra.genera import BundleValue
from .algebra.errors import AlgebraError, NotRational
from .algebra.graded import Element
from .errors import DocumentError, Location
from .statements import nodes as n

Value = Union[Element, sympy.Expr]


class Missing:
    """A name whose defining step failed: using it is an error, reported once."""

    def __init__(self, name: str, line: int):
        self.name = name
        self.line = line


class MissingValue(DocumentError):
    """A use of a name whose defining step failed."""

    def __init__(self, location: Location, name: str, line: int):
        super().__init__(location, f"'{name}' has no value: the step at line {line} did not produce it")
        self.name = name
        self.line = line  # the step that did not produce it


class Scope:
    """What the evaluator needs from the engine: names and the algebra."""

    ring = None  # graded.Ring
    bundles = None  # bundles.BundleTable
    specs: dict = {}  # sympy Symbol -> SymbolSpec

    def lookup(self, name: str, line: int, column: int):  # -> (kind, value)
        raise NotImplementedError

    def note_class_use(self, bundle: str, line: int) -> None:
        """Remember that a value mentions ``bundle``'s classes (for split order)."""


class Evaluator:
    def __init__(self, scope: Scope, path: str):
        self.scope = scope
        self.path = path
        #: Local names (parameters, sum indices) in force: name -> (kind, value).
        self.frames: list[dict] = []

    def lookup(self, name: str, line: int, column: int):
        """A local name first, then the document's."""
        if self.frames and name in self.frames[-1]:
            return self.frames[-1][name]
        return self.scope.lookup(name, line, column)

    @contextmanager
    def frame(self, names: dict):
        self.frames.append(names)
        try:
            yield
        finally:
            self.frames.pop()

    def with_local(self, name: str, value) -> dict:
        """The frame in force plus one local value."""
        return {**(self.frames[-1] if self.frames else {}), name: ("value", value)}

    def fail(self, node, message: str) -> DocumentError:
        return DocumentError(Location(self.path, node.line, node.column), message)

    # ------------------------------------------------------------ node kinds

    def evaluate(self, node) -> Value:
        budget.check()  # every node: a long evaluation stops at its deadline in any thread
        method = getattr(self, "_eval_" + type(node).__name__)
        try:
            return method(node)
        except (AlgebraError, NotRational, ZeroDivisionError, ValueError) as exc:
            if isinstance(exc, DocumentError):
                raise
            raise self.fail(node, str(exc) or type(exc).__name__) from None

    def _eval_Num(self, node: n.Num) -> Value:
        return self.scope.ring.scalar(node.value)

    def _eval_Name(self, node: n.Name) -> Value:
        kind, value = self.lookup(node.id, node.line, node.column)
        if kind in ("bundle", "fiber"):
            raise self.fail(node, f"'{node.id}' is a {kind}; use it inside a class such as p1({node.id})"
                            if kind == "bundle" else f"'{node.id}' is a fiber; integrate over it")
        return value

    def _eval_Unary(self, node: n.Unary) -> Value:
        value = self.evaluate(node.operand)
        return -value if node.op == "-" else value

    def _eval_Binary(self, node: n.Binary) -> Value:
        if node.op == "^":
            return self._power(node)
        # Walk a left-associative chain (a + b - c + ...) without recursing
        # on its left spine, so long sums stay shallow.
        family = ("+", "-") if node.op in ("+", "-") else ("*", "/")
        chain = []
        while isinstance(node, n.Binary) and node.op in family:
            chain.append(node)
            node = node.left
        value = self.evaluate(node)
        for link in reversed(chain):
            value = self._apply(link, value, self.evaluate(link.right))
        return value

    def _apply(self, node: n.Binary, left: Value, right: Value) -> Value:
        if node.op == "/":
            return self._divide(node, left, right)
        left, right = unify(self.scope.ring, left, right)
        if node.op == "+":
            return left + right
        if node.op == "-":
            return left - right
        return left * right

    def _power(self, node: n.Binary) -> Value:
        base = self.evaluate(node.left)
        exponent = self.evaluate(node.right)
        k = integer_value(exponent)
        if k is None:
            raise self.fail(node.right, "an exponent must be an integer")
        if k < 0:
            if not is_class_free(base):
                raise self.fail(node, "a negative power needs a class-free base")
            if is_zero(base):
                raise self.fail(node, "a negative power of zero")
            return self._divide(node, self.scope.ring.one(), base ** (-k))
        return base ** k

    def _divide(self, node, left: Value, right: Value) -> Value:
        if not is_class_free(right):
            raise self.fail(node, "division only by class-free values")
        if is_zero(right):
            raise self.fail(node, "division by zero")
        left, right = unify(self.scope.ring, left, right)
        return left / right

    def _eval_Call(self, node: n.Call) -> Value:
        rule = FUNCTIONS.get(node.func)
        if rule is None:
            prefix = node.func.rstrip("0123456789")
            if prefix in CLASS_RULES and prefix != node.func:
                return CLASS_RULES[prefix](self, node, int(node.func[len(prefix):]))
            raise self.fail(node, f"'{node.func}' cannot be called here")
        return rule(self, node)

    def _eval_Apply(self, node: n.Apply) -> Value:
        return calls.apply(self, node)

    def _eval_Sum(self, node: n.Sum) -> Value:
        return calls.sum_or_prod(self, node)

    def _eval_Expansion(self, node: n.Expansion) -> Value:
        return expansions.expand(self, node)

    # ------------------------------------------------------------ helpers

    def arity(self, node: n.Call, count: int) -> None:
        if len(node.args) != count:
            raise self.fail(node, f"{node.func}() takes {count} argument{'s' if count != 1 else ''}")

    def bundle_arg(self, node: n.Call) -> str:
        """The bundle a class function is applied to, e.g. ``NW`` in ``p2(NW)``."""
        self.arity(node, 1)
        arg = node.args[0]
        if not isinstance(arg, n.Name):
            raise self.fail(arg, f"{node.func}() takes a bundle name")
        kind, _ = self.lookup(arg.id, arg.line, arg.column)
        if kind != "bundle":
            raise self.fail(arg, f"{node.func}() takes a bundle, and '{arg.id}' is a {kind}")
        self.scope.note_class_use(arg.id, node.line)
        return arg.id

    def integer_arg(self, node) -> int:
        k = integer_value(self.evaluate(node))
        if k is None:
            raise self.fail(node, "an integer is needed here")
        return k

    def construction(self, node):
        """A bundle construction inside ``ch(...)``: names, S, dual, +, *, wedge, sym."""
        if isinstance(node, n.Name):
            kind, _ = self.lookup(node.id, node.line, node.column)
            if kind != "bundle":
                raise self.fail(node, f"'{node.id}' is a {kind}, not a bundle")
            self.scope.note_class_use(node.id, node.line)
            return BundleValue.of(self.scope.bundles, node.id)
        if isinstance(node, n.Binary) and node.op in ("+", "*"):
            left, right = self.construction(node.left), self.construction(node.right)
            return left + right if node.op == "+" else left * right
        if isinstance(node, n.Call) and node.func in CONSTRUCTIONS:
            return CONSTRUCTIONS[node.func](self, node)
        raise self.fail(node, "ch() takes a bundle or a bundle construction: "
                              "S(B), dual(V), V + W, V*W, wedge(V, k), sym(V, k)")


# ---------------------------------------------------------------- functions
# One small function per built-in; the table below chooses.

def _pontryagin(ev: Evaluator, node: n.Call, i: int) -> Value:
    return ev.scope.bundles.pontryagin(ev.bundle_arg(node), i)


def _chern(ev: Evaluator, node: n.Call, i: int) -> Value:
    return ev.scope.bundles.chern(ev.bundle_arg(node), i)


def _ch_component(ev: Evaluator, node: n.Call, k: int) -> Value:
    """ch_k(X) = part(ch(X), 2k): a generator for a bundle of symbolic rank."""
    ev.arity(node, 1)
    return ev.construction(node.args[0]).ch.part(2 * k)


CLASS_RULES = {"p": _pontryagin, "c": _chern, "ch": _ch_component}


def _euler(ev, node):
    return ev.scope.bundles.euler(ev.bundle_arg(node))


def _total_p(ev, node):
    return ev.scope.bundles.total_pontryagin(ev.bundle_arg(node))


def _total_c(ev, node):
    return ev.scope.bundles.total_chern(ev.bundle_arg(node))


def _ahat(ev, node):
    return genera.ahat(ev.scope.bundles, ev.bundle_arg(node))


def _hirzebruch_l(ev, node):
    return genera.hirzebruch_l(ev.scope.bundles, ev.bundle_arg(node))


def _todd(ev, node):
    return genera.todd(ev.scope.bundles, ev.bundle_arg(node))


def _ch(ev, node):
    ev.arity(node, 1)
    return ev.construction(node.args[0]).ch


def _part(ev, node):
    ev.arity(node, 2)
    value = ev.evaluate(node.args[0])
    k = ev.integer_arg(node.args[1])
    if isinstance(value, Element):
        return value.part(k)
    return value if k == 0 else ev.scope.ring.zero()


def _degree(ev, node):
    ev.arity(node, 1)
    value = ev.evaluate(node.args[0])
    if not isinstance(value, Element):
        return ev.scope.ring.zero()
    degrees = value.degrees()
    if len(degrees) > 1:
        raise ev.fail(node, "degree() of a value with several degrees: "
                            + ", ".join(map(str, degrees)))
    return ev.scope.ring.scalar(degrees[0] if degrees else 0)


def _sqrt(ev, node):
    ev.arity(node, 1)
    value = ev.evaluate(node.args[0])
    if not is_class_free(value):
        raise ev.fail(node, "sqrt() of a value with classes")
    if as_expr(value).is_negative:
        raise ev.fail(node, f"sqrt() of a negative value: {notation.text(as_expr(value))}")
    root = tidy(sympy.sqrt(as_expr(value)), list(ev.scope.specs.values()))
    return from_expr(ev.scope.ring, root)


def _not_here(ev, node):
    raise ev.fail(node, f"{node.func}() is a bundle construction: use it inside ch(...)"
                  if node.func in CONSTRUCTIONS else f"{node.func}() belongs in a split statement")


FUNCTIONS: dict[str, Callable] = {
    "e": _euler, "p": _total_p, "c": _total_c, "Ahat": _ahat, "L": _hirzebruch_l,
    "td": _todd, "ch": _ch, "part": _part, "degree": _degree, "sqrt": _sqrt,
    "S": _not_here, "dual": _not_here, "wedge": _not_here, "sym": _not_here,
    "trivial": _not_here,
}


def _spinor(ev, node):
    ev.arity(node, 1)
    return BundleValue.spinor(ev.scope.bundles, ev.bundle_arg(node))


def _dual(ev, node):
    ev.arity(node, 1)
    return ev.construction(node.args[0]).dual()


def _wedge(ev, node):
    ev.arity(node, 2)
    return ev.construction(node.args[0]).wedge(ev.integer_arg(node.args[1]))


def _sym(ev, node):
    ev.arity(node, 2)
    return ev.construction(node.args[0]).sym(ev.integer_arg(node.args[1]))


CONSTRUCTIONS = {"S": _spinor, "dual": _dual, "wedge": _wedge, "sym": _sym}


# ---------------------------------------------------------------- value helpers

def is_class_free(value: Value) -> bool:
    return value.is_class_free() if isinstance(value, Element) else True


def is_zero(value: Value) -> bool:
    return value.is_zero if isinstance(value, Element) else sympy.simplify(value) == 0


def as_expr(value: Value) -> sympy.Expr:
    """A class-free value as a sympy expression."""
    return value.to_scalar() if isinstance(value, Element) else value


def from_expr(ring, expr: sympy.Expr) -> Value:
    """Back into the ring when the expression is a rational function."""
    try:
        return ring.from_scalar_expr(expr)
    except NotRational:
        return expr


def unify(ring, left: Value, right: Value):
    """Bring two values to one kind before arithmetic."""
    if isinstance(left, Element) and isinstance(right, Element):
        return left, right
    for a, b in ((left, right), (right, left)):
        if isinstance(a, Element) and not a.is_class_free():
            raise AlgebraError("classes cannot be combined with an irrational number "
                               f"({notation.text(b)})")
    return as_expr(left), as_expr(right)


def integer_value(value: Value):
    """The Python int a value stands for, or None."""
    if isinstance(value, Element):
        if not value.is_class_free():
            return None
        value = value.to_scalar()
    if isinstance(value, sympy.Integer):
        return int(value)
    return None


def rational_value(value: Value):
    """The Fraction a value stands for, or None."""
    if isinstance(value, Element):
        if not value.is_class_free():
            return None
        value = value.to_scalar()
    if isinstance(value, sympy.Rational):
        return Fraction(int(value.p), int(value.q))
    return None
