"""``leading`` and ``series``: a class-free value expanded in one symbol.

Papers quote a-maximization results at large N by their leading terms, so
the expansion works on any class-free value, radicals included.  Values
(a + b sqrt(R)) / d, what extremization gives, are expanded exactly on FLINT
(``algebra/series.py``); anything else by sympy's lazy series on the value's
own sympy expression (built node by node by the evaluator, never from
text).  At infinity ``N = 1/t``; at a point ``x = x0 + t``; in both, ``t``
goes to 0 from above.  ``series(f, N, n)``
is the sum of the first ``n`` nonzero terms, ``leading`` the first one.
The step's time limit bounds the work.
"""
from __future__ import annotations

from fractions import Fraction
from typing import Iterator

from . import expressions as ex, notation
from .algebra import series
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
    point = None if node.point is None else Fraction(node.point)
    specs = list(ev.scope.specs.values())
    terms = []
    try:
        for term in tidied_terms(f, x, point, specs):
            if term.has(sympy.Order, sympy.I, sympy.zoo, sympy.nan, sympy.oo):
                raise ev.fail(node, f"{node.op}() of {notation.text(f)} in {x}: no usable "
                                    f"expansion ({notation.text(term)})")
            terms.append(term)
            if len(terms) == node.terms:
                break
    except (NotImplementedError, ValueError, TypeError, sympy.PoleError) as exc:
        raise ev.fail(node, f"{node.op}() of {notation.text(f)} in {x}: sympy cannot expand it "
                            f"({exc})") from None
    if not terms:
        return Known(ev.scope.ring.zero(), known.exact_to)
    return Known(ex.from_expr(ev.scope.ring, sympy.Add(*terms)), known.exact_to)


def tidied_terms(f, x, point: Fraction | None, specs) -> Iterator:
    """The nonzero terms of ``f`` expanded in ``x`` at infinity (``point``
    None) or at ``point``, one per power of x, each in its tidy form: exact
    on FLINT for (a + b sqrt(R)) / d, by sympy's lazy series otherwise."""
    from .algebra.radicals import tidy  # sympy's series need it anyway
    t = sympy.Dummy("t", positive=True)
    if point is None:
        inner, back = 1 / t, 1 / x
    else:
        x0 = sympy.Rational(point.numerator, point.denominator)
        inner, back = x0 + t, x - x0
    raw = series.terms(f, x, point, t, lambda root: _radicals(tidy(root, specs)) <= 1)
    for term in f.subs(x, inner).lseries(t, 0) if raw is None else raw:
        term = tidy(term.subs(t, back), specs)
        if term != 0:
            yield term


def _radicals(expr) -> int:
    """How many different square roots ``expr`` has."""
    return len({p.base for p in expr.atoms(sympy.Pow) if p.exp.is_Rational and p.exp.q == 2})
