"""The expression forms with local names: calls of defined functions, sums and products.

A ``define`` binds a ``Function``: its parameters, its body (a syntax tree)
and the values of the names the body reads as they were when it was defined,
so a later ``let!`` does not change what an earlier function means.  A call
evaluates its arguments, binds them to the parameters in a fresh frame and
evaluates the body there (expansion at evaluation; definitions are never
recursive, so this ends, and the step's time limit bounds a definition
chain that doubles its work at each level).

``sum(body, k = a..b)`` and ``prod(...)`` bind ``k`` in the body only.  With
integer bounds they expand term by term (classes allowed); with symbolic
bounds a sum of a summand polynomial in ``k`` has a closed form (Faulhaber's,
from Bernoulli polynomials), verified by telescoping before it is used.
"""
from __future__ import annotations

import itertools
from dataclasses import dataclass

from . import expressions as ex, notation, precision
from .algebra.lazysympy import sympy
from .errors import DocumentError, InternalError
from .statements import expr_nodes as en

#: Most terms a sum or product with numeric bounds expands.
MAX_RANGE_TERMS = 10_000
#: Most integer points tried to show that a symbolic bound is an integer.
MAX_BOUND_POINTS = 10_000


@dataclass(frozen=True)
class Function:
    """A defined function: ``captured`` maps each other name its body reads
    to ``(kind, value)`` at the definition; ``origin`` says where that was."""

    name: str
    params: tuple[str, ...]
    body: object
    captured: dict
    origin: str


def apply(ev, node: en.Apply):
    kind, fn = ev.lookup(node.func, node.line, node.column)
    if kind != "function":
        raise ev.fail(node, f"'{node.func}' is a {kind}, not a function")
    if len(node.args) != len(fn.params):
        raise ev.fail(node, f"{fn.name}() takes {len(fn.params)} arguments, found {len(node.args)}")
    args = [ev.known(arg) for arg in node.args]
    frame = dict(fn.captured)
    frame.update((p, ("value", k.value, k.exact_to)) for p, k in zip(fn.params, args))
    try:
        with ev.frame(frame):
            return ev.known(fn.body)
    except ex.MissingValue:
        raise
    except DocumentError as err:
        raise ev.fail(node, f"in {fn.name}() (defined {fn.origin}): "
                            f"{err.problems[0].message}") from None


def sum_or_prod(ev, node: en.Sum):
    low, high = ev.read(node.low, 0).value, ev.read(node.high, 0).value
    for bound, value in ((node.low, low), (node.high, high)):
        if not ex.is_class_free(value):
            raise ev.fail(bound, f"a bound of {node.op}() must be a number or a symbol's value")
        if ex.rational_value(value) is not None and ex.integer_value(value) is None:
            raise ev.fail(bound, f"a bound of {node.op}() must be an integer, "
                                 f"not {notation.text(ex.as_expr(value))}")
    a, b = ex.integer_value(low), ex.integer_value(high)
    if a is not None and b is not None:
        return _expand(ev, node, a, b)
    if node.op == "prod":
        raise ev.fail(node, "prod() with symbolic bounds is not supported (its closed form "
                            "is not a polynomial); give integer bounds such as k = 1..8")
    for bound, value in ((node.low, low), (node.high, high)):
        _require_integer_valued(ev, bound, ex.as_expr(value))
    return _faulhaber(ev, node, ex.as_expr(low), ex.as_expr(high))


def _expand(ev, node: en.Sum, a: int, b: int):
    count = b - a + 1
    if count > MAX_RANGE_TERMS:
        raise ev.fail(node, f"{node.op}() over {node.index} = {a}..{b} has {count} terms; "
                            f"the limit for numeric bounds is {MAX_RANGE_TERMS} terms")
    ring = ev.scope.ring
    total = precision.Known(ring.zero() if node.op == "sum" else ring.one())
    for k in range(a, b + 1):
        with ev.frame(ev.with_local(node.index, ring.scalar(k))):
            term = ev.known(node.body)
        left, right = ex.unify(ring, total.value, term.value)
        total = (precision.Known(left + right, precision.smallest(total.exact_to, term.exact_to))
                 if node.op == "sum" else
                 precision.Known(left * right, precision.product(total, term, ring.truncate)))
    return total


def _faulhaber(ev, node: en.Sum, low, high):
    k = sympy.Dummy(str(node.index), integer=True)
    try:
        with ev.frame(ev.with_local(node.index, k)):
            summand = ev.read(node.body, 0)
    except ex.MissingValue:
        raise
    except DocumentError as err:
        raise ev.fail(node, f"{err.problems[0].message} (with symbolic bounds the summand "
                            f"must be class-free and polynomial in {node.index})") from None
    if not ex.is_class_free(summand.value):
        raise ev.fail(node.body, "with symbolic bounds the summand must be class-free; "
                                 "give integer bounds to sum classes")
    p = ex.as_expr(summand.value)
    if not p.is_polynomial(k):
        raise ev.fail(node.body, f"sum() with symbolic bounds needs a summand polynomial in "
                                 f"{node.index}; {notation.text(p.subs(k, sympy.Symbol(str(node.index))))}"
                                 " is not")
    m = sympy.Dummy("m", integer=True)
    partial = _partial_sum(sympy.Poly(p, k), m)  # sum of p(k) for k = 0..m
    # Telescoping proves the closed form: S(m) - S(m - 1) = p(m).
    if sympy.expand(partial - partial.subs(m, m - 1) - p.subs(k, m)) != 0:
        raise InternalError(f"Faulhaber closed form of {p} does not telescope")
    return precision.Known(ex.from_expr(ev.scope.ring,
                                 sympy.expand(partial.subs(m, high) - partial.subs(m, low - 1))),
                    summand.exact_to)


def _partial_sum(poly: sympy.Poly, m):
    """Sum of ``poly(k)`` for k = 0..m: sum_k k^j = (B_{j+1}(m+1) - B_{j+1}(0))/(j+1)."""
    total = sympy.Integer(0)
    for (j,), c in poly.terms():
        if j == 0:
            total += c * (m + 1)
            continue
        total += c * (sympy.bernoulli(j + 1, m + 1) - sympy.bernoulli(j + 1, 0)) / (j + 1)
    return sympy.expand(total)


def _require_integer_valued(ev, node, bound) -> None:
    """A symbolic bound must be an integer at every admissible point: a
    polynomial in integer symbols that is an integer on the box {0..d}^m
    (d its degree) is one everywhere (its coefficients in the binomial basis
    are its finite differences at 0)."""
    symbols = sorted(bound.free_symbols, key=str)
    if not symbols:
        return  # an integer, checked by the caller
    if not all(s.is_integer for s in symbols) or not bound.is_polynomial(*symbols):
        raise ev.fail(node, f"a symbolic bound must be a polynomial in symbols declared "
                            f"integer, not {notation.text(bound)}")
    degree = sympy.Poly(bound, *symbols).total_degree()
    if (degree + 1) ** len(symbols) > MAX_BOUND_POINTS:
        raise ev.fail(node, f"cannot show that the bound {notation.text(bound)} is an integer "
                            f"(degree {degree} in {len(symbols)} symbols)")
    for point in itertools.product(range(degree + 1), repeat=len(symbols)):
        if not bound.subs(dict(zip(symbols, point))).is_integer:
            raise ev.fail(node, f"the bound {notation.text(bound)} is not an integer at "
                                + ", ".join(f"{s} = {v}" for s, v in zip(symbols, point)))
