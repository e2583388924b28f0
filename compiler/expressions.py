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
from typing import Union

from . import calls, expansions, functions, notation
from .algebra import budget
from .algebra.errors import AlgebraError, NotRational
from .algebra.graded import Element
from .algebra.lazysympy import sympy
from .errors import DocumentError, Location
from .precision import Known, beyond, power, product, quotient, smallest, whole
from .statements import expr_nodes as en

Value = Union[Element, "sympy.Expr"]


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


#: Kinds of names that have no value of their own, and what to say instead.
_NOT_VALUES = {
    "bundle": "'{0}' is a bundle; use it inside a class such as p1({0})",
    "fiber": "'{0}' is a fiber; integrate over it",
    "gauge": "'{0}' is a gauge bundle; use it inside ch({0}, adjoint) or tr({0}, 2)",
}


class Scope:
    """What the evaluator needs from the engine: names and the algebra."""

    ring = None  # graded.Ring
    bundles = None  # bundles.BundleTable
    specs: dict = {}  # name -> SymbolSpec

    def lookup(self, name: str, line: int, column: int):  # -> (kind, value)
        raise NotImplementedError

    def exact_to(self, name: str):
        """The degree up to which a bound value is exact (None: in every degree)."""
        return None

    def note_class_use(self, bundle: str, line: int) -> None:
        """Remember that a value mentions ``bundle``'s classes (for split order)."""


class Evaluator:
    def __init__(self, scope: Scope, path: str):
        self.scope = scope
        self.path = path
        #: Local names (parameters, sum indices) in force:
        #: name -> (kind, value, the degree up to which the value is exact).
        self.frames: list[dict] = []

    def lookup(self, name: str, line: int, column: int):
        """A local name first, then the document's: (kind, value)."""
        if self.frames and name in self.frames[-1]:
            return self.frames[-1][name][:2]
        return self.scope.lookup(name, line, column)

    def exact_to(self, name: str):
        """The degree up to which a name's value is exact, local names first."""
        if self.frames and name in self.frames[-1]:
            return self.frames[-1][name][2]
        return self.scope.exact_to(name)

    @contextmanager
    def frame(self, names: dict):
        self.frames.append(names)
        try:
            yield
        finally:
            self.frames.pop()

    def with_local(self, name: str, value) -> dict:
        """The frame in force plus one local value (a number: exact)."""
        return {**(self.frames[-1] if self.frames else {}), name: ("value", value, None)}

    def fail(self, node, message: str) -> DocumentError:
        return DocumentError(Location(self.path, node.line, node.column), message)

    # ------------------------------------------------------------ node kinds

    def evaluate(self, node) -> Value:
        return self.known(node).value

    def known(self, node) -> Known:
        """The value of ``node`` with the degree up to which it is exact."""
        budget.check()  # every node: a long evaluation stops at its deadline in any thread
        method = getattr(self, "_eval_" + type(node).__name__)
        try:
            return method(node)
        except (AlgebraError, NotRational, ZeroDivisionError, ValueError) as exc:
            if isinstance(exc, DocumentError):
                raise
            raise self.fail(node, str(exc) or type(exc).__name__) from None

    def read(self, node, degree: int | None = None) -> Known:
        """The value of ``node`` read in ``degree`` (None: as a whole); an
        error if that degree is beyond what is exact."""
        k = self.known(node)
        truncate = self.scope.ring.truncate
        what = f"this use of {node.id}" if isinstance(node, en.Name) else "this expression"
        problem = (whole(k, truncate, what) if degree is None
                   else beyond(k, degree, truncate, what))
        if problem:
            raise self.fail(node, problem)
        return k

    def _eval_Num(self, node: en.Num) -> Known:
        return Known(self.scope.ring.scalar(node.value))

    def _eval_Name(self, node: en.Name) -> Known:
        kind, value = self.lookup(node.id, node.line, node.column)
        if kind in _NOT_VALUES:
            raise self.fail(node, _NOT_VALUES[kind].format(node.id))
        return Known(value, self.exact_to(node.id))

    def _eval_Unary(self, node: en.Unary) -> Known:
        k = self.known(node.operand)
        return Known(-k.value, k.exact_to) if node.op == "-" else k

    def _eval_Binary(self, node: en.Binary) -> Known:
        if node.op == "^":
            return self._power(node)
        # Walk a left-associative chain (a + b - c + ...) without recursing
        # on its left spine, so long sums stay shallow.
        family = ("+", "-") if node.op in ("+", "-") else ("*", "/")
        chain = []
        while isinstance(node, en.Binary) and node.op in family:
            chain.append(node)
            node = node.left
        value = self.known(node)
        for link in reversed(chain):
            value = self._apply(link, value, self.known(link.right))
        return value

    def _apply(self, node: en.Binary, a: Known, b: Known) -> Known:
        if node.op == "/":
            return Known(self._divide(node, a.value, b.value), quotient(a, b))
        left, right = unify(self.scope.ring, a.value, b.value)
        if node.op == "+":
            return Known(left + right, smallest(a.exact_to, b.exact_to))
        if node.op == "-":
            return Known(left - right, smallest(a.exact_to, b.exact_to))
        return Known(left * right, product(a, b, self.scope.ring.truncate))

    def _power(self, node: en.Binary) -> Known:
        known = self.known(node.left)
        base = known.value
        exponent = self.read(node.right, 0).value
        k = integer_value(exponent)
        if k is None:
            raise self.fail(node.right, "an exponent must be an integer")
        if k < 0:
            if not is_class_free(base):
                raise self.fail(node, "a negative power needs a class-free base")
            if is_zero(base):
                raise self.fail(node, "a negative power of zero")
            inverse = self._divide(node, self.scope.ring.one(), base ** (-k))
            return Known(inverse, quotient(Known(inverse), known))
        return Known(base ** k, power(known, k, self.scope.ring.truncate))

    def _divide(self, node, left: Value, right: Value) -> Value:
        if not is_class_free(right):
            raise self.fail(node, "division only by class-free values")
        if is_zero(right):
            raise self.fail(node, "division by zero")
        left, right = unify(self.scope.ring, left, right)
        return left / right

    def _eval_Call(self, node: en.Call) -> Known:
        rule = functions.FUNCTIONS.get(node.func)
        if rule is None:
            prefix = node.func.rstrip("0123456789")
            if prefix in functions.CLASS_RULES and prefix != node.func:
                i = int(node.func[len(prefix):])
                value = functions.CLASS_RULES[prefix](self, node, i)
                truncate = self.scope.ring.truncate
                return Known(value, truncate if functions.CLASS_DEGREE[prefix] * i > truncate else None)
            raise self.fail(node, f"'{node.func}' cannot be called here")
        value = rule(self, node)
        if isinstance(value, Known):
            return value
        return Known(value, self.scope.ring.truncate if node.func in functions.TRUNCATED else None)

    def _eval_Apply(self, node: en.Apply) -> Known:
        return calls.apply(self, node)

    def _eval_Sum(self, node: en.Sum) -> Known:
        return calls.sum_or_prod(self, node)

    def _eval_Expansion(self, node: en.Expansion) -> Known:
        return expansions.expand(self, node)

    # ------------------------------------------------------------ helpers

    def arity(self, node: en.Call, count: int) -> None:
        if len(node.args) != count:
            raise self.fail(node, f"{node.func}() takes {count} argument{'s' if count != 1 else ''}")

    def bundle_arg(self, node: en.Call) -> str:
        """The bundle a class function is applied to, e.g. ``NW`` in ``p2(NW)``."""
        self.arity(node, 1)
        arg = node.args[0]
        if not isinstance(arg, en.Name):
            raise self.fail(arg, f"{node.func}() takes a bundle name")
        kind, _ = self.lookup(arg.id, arg.line, arg.column)
        if kind != "bundle":
            raise self.fail(arg, f"{node.func}() takes a bundle, and '{arg.id}' is a {kind}")
        self.scope.note_class_use(arg.id, node.line)
        return arg.id

    def integer_arg(self, node) -> int:
        k = integer_value(self.read(node, 0).value)
        if k is None:
            raise self.fail(node, "an integer is needed here")
        return k

# ---------------------------------------------------------------- value helpers

def is_class_free(value: Value) -> bool:
    return value.is_class_free() if isinstance(value, Element) else True


def is_zero(value: Value) -> bool:
    """Exactly: on FLINT when the value is a ring element or has at most one
    square root, else by sympy's general simplification."""
    if isinstance(value, Element):
        return value.is_zero
    from .algebra.surds import vanishes
    return vanishes(value)


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
        q = value.rational()
        return q.numerator if q is not None and q.denominator == 1 else None
    return int(value) if isinstance(value, sympy.Integer) else None


def rational_value(value: Value):
    """The Fraction a value stands for, or None."""
    if isinstance(value, Element):
        return value.rational()
    if isinstance(value, sympy.Rational):
        return Fraction(int(value.p), int(value.q))
    return None
