"""Values (a + b sqrt(R)) / d, with a, b, d, R polynomials over QQ, on FLINT.

Extremization asks the same few questions of its values again and again:
the sign of a rational function or of one with a single square root, the
lowest terms of a rational function.  Read into FLINT polynomials in the
symbols, those are exact polynomial arithmetic, with none of sympy's
expression rewriting or assumption queries.  Anything else (other roots,
functions, floats, complex numbers) is not read: the callers then fall back
on sympy.
"""
from __future__ import annotations

from fractions import Fraction
from math import gcd, inf, isqrt, lcm
from typing import Sequence

import flint
from flint.utils.flint_exceptions import DomainError

from .lazysympy import sympy

Parts = tuple  # (a, b, d): FLINT polynomials, the value (a + b r) / d


class Surds:
    """FLINT polynomials over QQ in ``symbols``, lexicographic in that order."""

    def __init__(self, symbols: Sequence[sympy.Symbol]):
        self.symbols = list(symbols)
        self.index = {s: i for i, s in enumerate(self.symbols)}
        self.ctx = flint.fmpq_mpoly_ctx.get(tuple(f"v{i}" for i in range(len(self.symbols))), "lex")

    def constant(self, value) -> flint.fmpq_mpoly:
        return self.ctx.constant(value)

    def radicand(self, expr):
        """(R, R as a polynomial) for the one square root in ``expr``, None
        for none; False when there are several or R is no polynomial."""
        radicands = {p.base for p in expr.atoms(sympy.Pow) if p.exp.is_Rational and p.exp.q == 2}
        if not radicands:
            return None
        if len(radicands) > 1:
            return False
        base = radicands.pop()
        parts = self.parts(base, None)
        if parts is None or not parts[1].is_zero() or not parts[2].is_constant():
            return False
        return base, parts[0] / parts[2]

    def read(self, expr) -> tuple[Parts, flint.fmpq_mpoly | None] | None:
        """((a, b, d) in lowest terms, R) with expr = (a + b sqrt(R)) / d, R None
        for a rational function; None when ``expr`` is neither."""
        root = self.radicand(expr)
        if root is False:
            return None
        parts = self.parts(expr, root)
        if parts is None:
            return None
        common = parts[0].gcd(parts[1]).gcd(parts[2])
        return tuple(x / common for x in parts), (root[1] if root else None)

    def parts(self, expr, root) -> Parts | None:
        """(a, b, d) with expr = (a + b r) / d, where ``root`` is (R, R as a
        polynomial) and r = sqrt(R); None when ``expr`` is not of that kind."""
        zero, one = self.ctx.constant(0), self.ctx.constant(1)
        radicand = root[1] if root else None
        if expr.is_Rational:
            return self.ctx.constant(flint.fmpq(int(expr.p), int(expr.q))), zero, one
        if expr.is_Symbol:
            i = self.index.get(expr)
            return None if i is None else (self.ctx.gen(i), zero, one)
        if expr.is_Pow and expr.exp.is_Rational and expr.exp.q == 2:
            if root is None or expr.base != root[0]:
                return None
            m = (int(expr.exp.p) - 1) // 2     # R^(k/2) = R^m r
            return (zero, radicand ** m, one) if m >= 0 else (zero, one, radicand ** -m)
        if expr.is_Pow and expr.exp.is_Integer:
            base = self.parts(expr.base, root)
            if base is not None and int(expr.exp) < 0:
                base = _inverse(base, radicand)
            if base is None:
                return None
            result = (one, zero, one)
            for _ in range(abs(int(expr.exp))):
                result = _times(result, base, radicand)
            return result
        if not (expr.is_Add or expr.is_Mul):
            return None
        terms = [self.parts(a, root) for a in expr.args]
        if None in terms:
            return None
        result = terms[0]
        for term in terms[1:]:
            result = _times(result, term, radicand) if expr.is_Mul else _plus(result, term)
        return result

    def factor_list(self, poly) -> tuple[sympy.Rational, list]:
        """A rational times primitive integer factors with positive leading
        coefficients (in this order of the symbols), as sympy writes them."""
        c, factors = poly.factor()
        coeff = Fraction(int(c.p), int(c.q))
        found = []
        for f, e in factors:
            scale = lcm(*(int(q.q) for q in f.coeffs()))
            content = gcd(*(int(q.p) for q in f.coeffs())) * (-1 if f.leading_coefficient() < 0 else 1)
            coeff *= Fraction(content, scale) ** int(e)
            found.append((self.expr(f * scale / content), int(e)))
        return sympy.Rational(coeff.numerator, coeff.denominator), found

    def expr(self, poly) -> sympy.Expr:
        """A polynomial as sympy's expanded sum of its terms."""
        return sympy.Add(*[sympy.Rational(int(c.p), int(c.q)) * sympy.Mul(
            *[s ** e for s, e in zip(self.symbols, monom) if e]) for monom, c in poly.terms()])


def factor_list(expr) -> tuple[sympy.Rational, list] | None:
    """``sympy.factor_list(expr)`` for a polynomial over QQ, from FLINT's
    factorization (the factors in another order); None when ``expr`` is no
    such polynomial."""
    if expr.is_Rational:
        return expr, []
    surds = Surds(sympy_order(expr.free_symbols))
    parts = surds.parts(expr, None)
    if parts is None or not parts[2].is_constant():
        return None
    return surds.factor_list(parts[0] / parts[2])


def factored(expr) -> sympy.Expr | None:
    """``sympy.factor(expr)`` for a rational function over QQ, from FLINT's
    factorizations of its numerator and denominator; None for anything else."""
    surds = Surds(sympy_order(expr.free_symbols))
    parts = surds.parts(expr, None)
    if parts is None:
        return None
    (cn, fn), (cd, fd) = surds.factor_list(parts[0]), surds.factor_list(parts[2])
    from sympy.core.mul import _keep_coeff   # how sympy.factor joins the coefficient
    return _keep_coeff(cn / cd, sympy.Mul(*[f ** e for f, e in fn], *[f ** -e for f, e in fd]))


def identically_zero(expr) -> bool | None:
    """Whether ``expr`` vanishes for every value of its symbols, decided on
    FLINT for (a + b sqrt(R)) / d: when R is not a square, sqrt(R) is no
    rational function, so the value is 0 only if a and b both are.  None when
    ``expr`` is not of that form or R is a square (the caller then asks sympy)."""
    read = Surds(sympy_order(expr.free_symbols)).read(expr)
    if read is None:
        return None
    (a, b, _), radicand = read
    if radicand is None or b.is_zero():
        return a.is_zero()
    try:
        radicand.sqrt()
    except DomainError:
        return a.is_zero() and b.is_zero()
    return None


def vanishes(expr) -> bool:
    """Whether ``expr`` is exactly 0: on FLINT when it can be read, else by sympy."""
    decided = identically_zero(expr)
    return decided if decided is not None else sympy.simplify(expr) == 0


def sampler(expr, variable):
    """``x -> float`` for ``expr`` in one symbol, from its exact parts: a, b,
    d and R evaluated at the rational x, the square root to 40 digits; None
    at a pole or where the value is not real.  None for another kind of expr."""
    read = Surds([variable]).read(expr)
    if read is None:
        return None
    (a, b, d), radicand = read

    def at(x: Fraction) -> float | None:
        x = flint.fmpq(x.numerator, x.denominator)
        den = d(x)
        if den == 0:
            return None
        value = Fraction(int(a(x).p), int(a(x).q))
        if radicand is not None and not b.is_zero():
            r = radicand(x)
            if r < 0:
                return None
            scale = 10 ** 40
            root = Fraction(isqrt(int(r.p) * int(r.q) * scale * scale), int(r.q) * scale)
            value += Fraction(int(b(x).p), int(b(x).q)) * root
        value /= Fraction(int(den.p), int(den.q))
        try:
            return float(value)
        except OverflowError:  # beyond float range: infinite, as sympy's float() gives
            return inf if value > 0 else -inf
    return at


def sympy_order(symbols) -> list:
    """``symbols`` in sympy's order of generators, so that leading terms and
    leading coefficients are the ones sympy's polynomials have."""
    from sympy.polys.polyutils import _sort_gens
    return _sort_gens(symbols)


def _plus(x: Parts, y: Parts) -> Parts:
    (a1, b1, d1), (a2, b2, d2) = x, y
    common = d1.gcd(d2)
    u, v = d2 / common, d1 / common
    return a1 * u + a2 * v, b1 * u + b2 * v, d1 * u


def _times(x: Parts, y: Parts, radicand) -> Parts:
    (a1, b1, d1), (a2, b2, d2) = x, y
    if b1.is_zero() or b2.is_zero():
        return a1 * a2, a1 * b2 + b1 * a2, d1 * d2
    return a1 * a2 + b1 * b2 * radicand, a1 * b2 + b1 * a2, d1 * d2


def _inverse(x: Parts, radicand) -> Parts | None:
    """d / (a + b r) = d (a - b r) / (a^2 - b^2 R); None where that is 0."""
    a, b, d = x
    if b.is_zero():
        return None if a.is_zero() else (d, b, a)
    norm = a ** 2 - b ** 2 * radicand
    return None if norm.is_zero() else (d * a, -d * b, norm)
