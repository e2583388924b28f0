"""Coefficients of ring elements: polynomials over QQ in the document's symbols.

Every operation the ring needs on coefficients lives here, so the
polynomial kernel is one module: exact rationals in, cancelled numerator
terms over one monic common denominator out.
"""
from __future__ import annotations

import math
from fractions import Fraction

import sympy
from sympy import QQ
from sympy.polys.fields import FracField

from .errors import AlgebraError, LimitError, NotRational


class Coefficients:
    """The polynomial ring QQ[symbols] and its fraction field."""

    def __init__(self, symbols):
        self.symbols = tuple(symbols)
        self.field = FracField(self.symbols, QQ)
        self.ring = self.field.ring
        self.one = self.ring.one
        self.zero = self.ring.zero
        self.position = {s: i for i, s in enumerate(self.symbols)}

    def rational(self, value):
        """An exact rational (int, Fraction, sympy Rational) as a constant polynomial."""
        if isinstance(value, bool):
            raise AlgebraError(f"not a number: {value!r}")
        if isinstance(value, int):
            q = QQ(value)
        elif isinstance(value, Fraction):
            q = QQ(value.numerator, value.denominator)
        elif isinstance(value, sympy.Rational):
            q = QQ(int(value.p), int(value.q))
        else:
            raise AlgebraError(f"not an exact rational number: {value!r}")
        return self.ring.ground_new(q)

    def symbol(self, position: int):
        return self.ring.gens[position]

    def from_expr(self, expr):
        """(numerator, denominator) of a sympy expression rational in the symbols."""
        if not isinstance(expr, sympy.Expr) or expr.has(sympy.Float):
            raise NotRational(f"not an exact rational function of the declared symbols: {expr}")
        try:
            frac = self.field.from_expr(expr)
        except (ValueError, TypeError, sympy.PolynomialError, sympy.CoercionFailed):
            raise NotRational(f"not a rational function of the declared symbols: {expr}") from None
        return frac.numer, frac.denom

    def from_items(self, items):
        """A polynomial from {exponent tuple: Fraction}."""
        out = {exps: QQ(c.numerator, c.denominator) for exps, c in items.items() if c}
        return self.ring.from_dict(out) if out else self.zero

    @staticmethod
    def items(poly):
        """(exponent tuple, Fraction) pairs of a polynomial."""
        return [(exps, Fraction(int(c.numerator), int(c.denominator))) for exps, c in poly.items()]

    @staticmethod
    def is_constant(p) -> bool:
        return p.is_ground

    @staticmethod
    def gcd(a, b):
        return a.gcd(b)

    @staticmethod
    def exquo(a, b):
        return a.exquo(b)

    def lcm(self, a, b):
        return a if a == b else a * b.exquo(a.gcd(b))

    def cancel(self, terms: dict, den):
        """Make gcd(den, numerators) = 1 and den monic (1 when constant)."""
        one = self.one
        if not terms:
            return {}, one
        if den == one:
            return terms, one
        if den.is_ground:
            c = den.LC
            return {m: n.quo_ground(c) for m, n in terms.items()}, one
        g = den
        for n in terms.values():
            g = g.gcd(n)
            if g.is_ground:
                break
        if not g.is_ground:
            den = den.exquo(g)
            terms = {m: n.exquo(g) for m, n in terms.items()}
        c = den.LC
        if den.is_ground:
            return {m: n.quo_ground(c) for m, n in terms.items()}, one
        if c != 1:
            den = den.quo_ground(c)
            terms = {m: n.quo_ground(c) for m, n in terms.items()}
        return terms, den

    @staticmethod
    def size(poly) -> int:
        return len(poly)

    def check_power_size(self, poly, n: int, limit: int) -> None:
        """Refuse a power that would have more than ``limit`` terms, before
        building it.  The bound is the number of monomials of that degree in
        the variables present."""
        if n < 2 or len(poly) < 2:
            return
        exps = list(poly.keys())
        present = sum(1 for i in range(len(self.symbols)) if any(m[i] for m in exps))
        degree = max(sum(m) for m in exps)
        bound = min(math.comb(n * degree + present, present), math.comb(len(poly) + n - 1, n))
        if bound > limit:
            raise LimitError(f"a power of a {len(poly)}-term polynomial to the {n} would have up to "
                             f"{bound} terms (the limit is {limit})")

    # -------------------------------------------------- fractions (Gröbner)
    def frac(self, num, den=None):
        return self.field.new(num, self.one if den is None else den)

    def frac_parts(self, terms: dict):
        """{monomial: fraction} -> (numerator terms, common denominator)."""
        den = self.one
        for c in terms.values():
            den = self.lcm(den, c.denom)
        return {m: c.numer * den.exquo(c.denom) for m, c in terms.items() if c}, den
