"""Tidying exact values with square roots into short, readable closed forms.

Extremization, checks and expressions produce values such as
``sqrt(4*N**2*(g - 1)**2 + ...)/(...)``; the forms shown to the author pull
square factors out of radicals (using the declared signs) and write a single
radical as ``K (A + B sqrt(R)) / D``.
"""
from __future__ import annotations

from typing import Sequence

from .lazysympy import sympy

from .region import Region, Relation
from .sampling import SymbolSpec
from .signs import SignOracle

#: Above this many operations general simplification is skipped (it is slow).
SIMPLIFY_LIMIT = 200


def tidy(expr, specs: Sequence[SymbolSpec], relations: Sequence[Relation] = ()):
    """A short exact form: square factors pulled out of radicals using the
    declarations (and relations), then the shortest of a few standard
    rewritings; general simplification only on small expressions."""
    return tidy_with(expr, SignOracle(Region(tuple(specs), tuple(relations))))


def tidy_with(expr, oracle: SignOracle):
    """:func:`tidy` with the signs decided by ``oracle``."""
    expr = _pull_squares(expr, oracle)
    forms = [expr]
    rewrites = [sympy.factor, _radical_form]
    if sympy.count_ops(expr) < SIMPLIFY_LIMIT:
        rewrites.append(sympy.simplify)
    for rewrite in rewrites:
        try:
            forms.append(rewrite(expr))
        except (TypeError, ValueError, NotImplementedError, sympy.PolynomialError):
            continue
    return min(forms, key=sympy.count_ops)


def _radical_form(expr):
    """An expression with one square root r written as K (A + B r) / D."""
    radicals = {p.base for p in expr.atoms(sympy.Pow) if p.exp.is_Rational and p.exp.q == 2}
    if len(radicals) != 1:
        return expr
    r = sympy.sqrt(radicals.pop())
    num, den = (sympy.expand(x) for x in sympy.fraction(sympy.together(expr)))
    if den.has(r):
        db = den.coeff(r)
        da = sympy.expand(den - db * r)
        num = sympy.expand(num * (da - db * r))
        den = sympy.expand(da ** 2 - db ** 2 * r.base)
    b = num.coeff(r)
    a = sympy.expand(num - b * r)
    if a.has(r) or b.has(r) or den.has(r):
        return expr
    common = sympy.gcd(sympy.gcd(a, b), den)
    a, b, den = (sympy.cancel(x / common) for x in (a, b, den))
    k = sympy.gcd(a, b) if b != 0 else a
    if k == 0:
        return sympy.Integer(0)
    return sympy.factor(k) * (sympy.factor(sympy.cancel(a / k))
                              + sympy.factor(sympy.cancel(b / k)) * r) / sympy.factor(den)


def _pull_squares(expr, signer):
    """(b^2 c)^(k/2) -> |b|^k c^(k/2) where the sign of b follows from the declarations."""
    def is_radical(e):
        return e.is_Pow and e.exp.is_Rational and e.exp.q == 2

    def pull(part):
        if part.is_number:
            return sympy.Integer(1), part
        coeff, factors = sympy.factor_list(part)
        outside, inside = sympy.Integer(1), coeff
        for base, mult in factors:
            s = signer.sign(base) if mult >= 2 else None
            if s in (1, -1):
                outside *= (s * base) ** (mult // 2)
                inside *= base ** (mult % 2)
            else:
                inside *= base ** mult
        return outside, inside

    def rewrite(power):
        num, den = sympy.fraction(sympy.together(power.base))
        (out_n, in_n), (out_d, in_d) = pull(num), pull(den)
        return (out_n / out_d * sympy.sqrt(in_n / in_d)) ** power.exp.p

    return expr.replace(is_radical, rewrite)
