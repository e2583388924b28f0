"""``leading`` and ``series``: a class-free value expanded in one symbol.

Papers quote a-maximization results at large N by their leading terms, so
the expansion works on any class-free value, radicals included: sympy's
lazy series runs on the value's own sympy expression (built node by node by
the evaluator, never from text).  At infinity ``N = 1/t``; at a point
``x = x0 + t``; in both, ``t`` goes to 0 from above.  ``series(f, N, n)``
is the sum of the first ``n`` nonzero terms, ``leading`` the first one.
The step's time limit bounds the work.
"""
from __future__ import annotations

from . import expressions as ex, notation
from .algebra.lazysympy import sympy
from .precision import Known
from .statements import expr_nodes as en


def expand(ev, node: en.Expansion):
    known = ev.read(node.target, 0)
    value = known.value
    if not ex.is_class_free(value):
        raise ev.fail(node.target, f"{node.op}() expands class-free values; this one has "
                                   "classes (take a coefficient first)")
    kind, variable = ev.lookup(node.variable, node.variable.line, node.variable.column)
    x = ex.as_expr(variable)
    if kind != "symbol" or not isinstance(x, sympy.Symbol):
        raise ev.fail(node, f"{node.op}() expands in a declared symbol, and "
                            f"'{node.variable}' is a {kind}")
    f = ex.as_expr(value)
    if x not in f.free_symbols:
        return known
    t = sympy.Dummy("t", positive=True)
    if node.point is None:
        inner, back = 1 / t, 1 / x
    else:
        x0 = sympy.Rational(node.point.numerator, node.point.denominator)
        inner, back = x0 + t, x - x0
    from .algebra.radicals import tidy  # sympy's series need it anyway
    specs = list(ev.scope.specs.values())
    terms = []
    try:
        for term in f.subs(x, inner).lseries(t, 0):
            term = tidy(term.subs(t, back), specs)
            if term.has(sympy.Order, sympy.I, sympy.zoo, sympy.nan, sympy.oo):
                raise ev.fail(node, f"{node.op}() of {notation.text(f)} in {x}: no usable "
                                    f"expansion ({notation.text(term)})")
            if term != 0:
                terms.append(term)
            if len(terms) == node.terms:
                break
    except (NotImplementedError, ValueError, TypeError, sympy.PoleError) as exc:
        raise ev.fail(node, f"{node.op}() of {notation.text(f)} in {x}: sympy cannot expand it "
                            f"({exc})") from None
    if not terms:
        return Known(ev.scope.ring.zero(), known.exact_to)
    return Known(ex.from_expr(ev.scope.ring, sympy.Add(*terms)), known.exact_to)
