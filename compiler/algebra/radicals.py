"""Tidying exact values with square roots into short, readable closed forms.

Extremization, checks and expressions produce values such as
``sqrt(4*N**2*(g - 1)**2 + ...)/(...)``; the forms shown to the author pull
square factors out of radicals (using the declared signs) and write a single
radical as ``K (A + B sqrt(R)) / D``.  The arithmetic behind those forms
runs on FLINT polynomials (``surds.py``), normalized as sympy normalizes
(gcds, factor lists), so the forms are the ones sympy would write, found
without sympy's general simplification.
"""
from __future__ import annotations

from fractions import Fraction
from math import gcd, lcm
from typing import Sequence

import flint

from .lazysympy import sympy

from . import surds
from .region import Region, Relation
from .sampling import SymbolSpec
from .signs import SignOracle
from .surds import Surds, factored, sympy_order

#: Above this many operations general simplification is skipped (it is slow).
SIMPLIFY_LIMIT = 200


def tidy(expr, specs: Sequence[SymbolSpec], relations: Sequence[Relation] = ()):
    """A short exact form: square factors pulled out of radicals using the
    declarations (and relations), then the shortest of a few standard
    rewritings; general simplification only on small expressions."""
    return tidy_with(expr, SignOracle(Region(tuple(specs), tuple(relations))))


def tidy_with(expr, oracle: SignOracle):
    """:func:`tidy` with the signs decided by ``oracle``.

    General simplification is slow, so it runs only where no targeted form
    applies: a rational function is the shortest of its factored, expanded
    and monic-denominator forms, all read off FLINT (general simplification
    picked the same on every rational value of the bundled documents and
    tests, though not on every rational function); a value with one square
    root also has its canonical K (A + B r) / D (general simplification was
    never shorter there)."""
    if expr.is_Atom:
        return expr
    expr = _pull_squares(expr, oracle)
    if is_rational(expr):
        forms = [expr, factored(expr), *_rational_forms(expr)]
    else:
        forms = [expr, _attempt(sympy.factor, expr)]
        radical = _attempt(_radical_form, expr)
        if radical is not None:
            forms.append(radical)
        elif sympy.count_ops(expr) < SIMPLIFY_LIMIT:
            forms.append(_attempt(sympy.simplify, expr))
    return min((f for f in forms if f is not None), key=sympy.count_ops)


def _rational_forms(expr) -> list:
    """In lowest terms on FLINT: p/q expanded with q's leading coefficient 1,
    (N^2 + N + 1/3)/(N^2 + N + 1), and for a monomial q the expanded sum
    of terms, -9*Nc^4/(16*Nf^2) + 3*Nc^2/8 - 3/16."""
    field = Surds(sympy_order(expr.free_symbols))
    found = field.read(expr)
    if found is None:
        return []
    num, _, den = found[0]
    if den.is_constant():
        return [field.expr(num / den)]
    lc = den.leading_coefficient()
    forms = [field.expr(num / lc) / field.expr(den / lc)]
    if len(den.coeffs()) == 1:
        forms.append(sympy.Add(*[t / field.expr(den) for t in sympy.Add.make_args(field.expr(num))]))
    return forms


def is_rational(expr) -> bool:
    """Whether ``expr`` is a rational function of its symbols with rational
    coefficients (sums, products, integer powers)."""
    if expr.is_Rational or expr.is_Symbol:
        return True
    if expr.is_Pow:
        return expr.exp.is_Integer and is_rational(expr.base)
    return (expr.is_Add or expr.is_Mul) and all(is_rational(a) for a in expr.args)


def _attempt(rewrite, expr):
    """``rewrite(expr)``, or None where sympy gives up on it."""
    try:
        return rewrite(expr)
    except (TypeError, ValueError, NotImplementedError, sympy.PolynomialError):
        return None


def _radical_form(expr):
    """An expression with one square root r written as K (A + B r) / D (None:
    not one square root)."""
    radicals = {p.base for p in expr.atoms(sympy.Pow) if p.exp.is_Rational and p.exp.q == 2}
    if len(radicals) != 1:
        return None
    r = sympy.sqrt(radicals.pop())
    num, den = (sympy.expand(x) for x in sympy.fraction(sympy.together(expr)))
    parts = _flint_parts(expr, num, den, r) or _sympy_parts(num, den, r)
    if parts is None:
        return None
    k, a, b, den = parts
    if k == 0:
        return sympy.Integer(0)
    return sympy.factor(k) * (sympy.factor(a) + sympy.factor(b) * r) / sympy.factor(den)


def _sympy_parts(num, den, r):
    """K, A, B, D of num/den = K (A + B r) / D by sympy's gcds (None when
    num/den is not linear in r)."""
    if den.has(r):
        db = den.coeff(r)
        da = sympy.expand(den - db * r)
        num = sympy.expand(num * (da - db * r))
        den = sympy.expand(da ** 2 - db ** 2 * r.base)
    b = num.coeff(r)
    a = sympy.expand(num - b * r)
    if a.has(r) or b.has(r) or den.has(r):
        return None
    common = sympy.gcd(sympy.gcd(a, b), den)
    a, b, den = (sympy.cancel(x / common) for x in (a, b, den))
    k = sympy.gcd(a, b) if b != 0 else a
    if k == 0:
        return k, a, b, den
    return k, sympy.cancel(a / k), sympy.cancel(b / k), den


def _flint_parts(expr, num, den, r):
    """:func:`_sympy_parts` on FLINT polynomials, with every gcd normalized as
    sympy's is, so the parts are the same; None unless num and den are
    polynomials over the rationals in the symbols and r."""
    if any(p.base == r.base and p.exp != r.exp for x in (num, den) for p in x.atoms(sympy.Pow)):
        return None   # R^(3/2) and the like
    field = Surds(sympy_order(expr.free_symbols))
    radicand = field.parts(r.base, None)
    if radicand is None or not radicand[1].is_zero() or not radicand[2].is_one():
        return None
    root = (r.base, radicand[0])
    found = [field.parts(x, root) for x in (num, den)]
    if None in found or not all(d.is_constant() for _, _, d in found):
        return None
    (a, b, dn), (da, db, dd) = found
    a, b, da, db = a / dn, b / dn, da / dd, db / dd
    if db.is_zero():
        den = da
    else:   # times the conjugate da - db r
        a, b, den = a * da - b * db * root[1], b * da - a * db, da ** 2 - db ** 2 * root[1]
    common = _sympy_gcd(_sympy_gcd(a, b), den)
    a, b, den = a / common, b / common, den / common
    k = _sympy_gcd(a, b) if not b.is_zero() else a
    if k.is_zero():
        return sympy.Integer(0), None, None, None
    return tuple(field.expr(x) for x in (k, a / k, b / k, den))


def _sympy_gcd(f, g):
    """The gcd of two FLINT polynomials normalized as ``sympy.gcd`` normalizes
    it: over the integers with the common content and a positive leading
    coefficient when both have integer coefficients, else monic; for two
    constants, the gcd of the numerators over the lcm of the denominators."""
    ctx = f.context()
    if f.is_constant() and g.is_constant():
        a, b = (Fraction(int(x.p), int(x.q)) for x in (_constant(f), _constant(g)))
        value = Fraction(gcd(a.numerator, b.numerator), lcm(a.denominator, b.denominator))
        return ctx.constant(flint.fmpq(value.numerator, value.denominator))
    h = f.gcd(g)
    if not all(int(c.q) == 1 for p in (f, g) for c in p.coeffs()):
        return h
    h = h * lcm(*(int(c.q) for c in h.coeffs()))
    h = h / _content(h) * gcd(_content(f), _content(g))
    return -h if h.leading_coefficient() < 0 else h


def _constant(p):
    coeffs = p.coeffs()
    return coeffs[0] if coeffs else flint.fmpq(0)


def _content(p) -> int:
    """The gcd of an integer polynomial's coefficients (0 for 0)."""
    return gcd(*(int(c.p) for c in p.coeffs()))


def _pull_squares(expr, signer):
    """(b^2 c)^(k/2) -> |b|^k c^(k/2) where the sign of b follows from the declarations."""
    def is_radical(e):
        return e.is_Pow and e.exp.is_Rational and e.exp.q == 2

    def pull(part):
        if part.is_number:
            return sympy.Integer(1), part
        coeff, factors = surds.factor_list(part) or sympy.factor_list(part)
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
