"""Coefficients of ring elements: polynomials over QQ in the document's symbols, on FLINT.

Every operation the ring needs on coefficients lives here, so the polynomial
kernel is one module.  Coefficients are ``flint.fmpq_mpoly`` in lexicographic
order (symbols in declaration order), the order that fixes which coefficient
of a denominator is made 1.  Sympy is imported only to read expressions in.
"""
from __future__ import annotations

import math
from fractions import Fraction

import flint

from .errors import AlgebraError, LimitError, NotRational
from .lazysympy import is_sympy, sympy, sympy_symbol


class Coefficients:
    """The polynomial ring QQ[symbols]; fractions (``Frac``) for Gröbner work."""

    def __init__(self, symbols):
        self.symbols = tuple(symbols)
        self.ctx = flint.fmpq_mpoly_ctx.get(tuple(f"s{i}" for i in range(len(self.symbols))), "lex")
        self.one = self.ctx.constant(1)
        self.zero = self.ctx.constant(0)
        self.position = {s: i for i, s in enumerate(self.symbols)}
        self._sympy_position = None

    def sympy_symbols(self) -> list:
        """The symbols as sympy Symbols (made on first use: see ``lazysympy``)."""
        return [sympy_symbol(s) for s in self.symbols]

    def index(self, symbol):
        """The position of a symbol given as the ring's own or as its sympy
        Symbol; None if it is not declared."""
        i = self.position.get(symbol)
        if i is None and is_sympy(symbol):
            if self._sympy_position is None:
                self._sympy_position = {s: i for i, s in enumerate(self.sympy_symbols())}
            i = self._sympy_position.get(symbol)
        return i

    @staticmethod
    def rational(value) -> flint.fmpq:
        """An exact rational (int, Fraction, sympy Rational) as a FLINT rational."""
        if isinstance(value, bool):
            raise AlgebraError(f"not a number: {value!r}")
        if isinstance(value, int):
            return flint.fmpq(value)
        if isinstance(value, Fraction):
            return flint.fmpq(value.numerator, value.denominator)
        if is_sympy(value) and isinstance(value, sympy.Rational):
            return flint.fmpq(int(value.p), int(value.q))
        raise AlgebraError(f"not an exact rational number: {value!r}")

    def from_expr(self, expr):
        """(numerator, denominator) of a sympy expression rational in the symbols.

        Read from the expression tree with FLINT arithmetic: sympy's own
        field conversion costs milliseconds per value."""
        if not isinstance(expr, sympy.Expr) or expr.has(sympy.Float):
            raise NotRational(f"not an exact rational function of the declared symbols: {expr}")
        try:
            num, den = self._read(expr)
        except NotRational:
            den = None
        if not den:
            raise NotRational(f"not a rational function of the declared symbols: {expr}")
        g = num.gcd(den)
        return (num / g, den / g) if not g.is_constant() else (num, den)

    def _read(self, e):
        """(numerator, denominator) of one node, or NotRational."""
        if e.is_Rational:
            return self.ctx.constant(flint.fmpq(int(e.p), int(e.q))), self.one
        if e.is_Symbol and self.index(e) is not None:
            return self.ctx.gen(self.index(e)), self.one
        if e.is_Add or e.is_Mul:
            num, den = self._read(e.args[0])
            for arg in e.args[1:]:
                n, d = self._read(arg)
                if e.is_Mul:
                    num, den = num * n, den * d
                elif d == den:
                    num = num + n
                else:
                    g = den.gcd(d)
                    num, den = num * (d / g) + n * (den / g), den * (d / g)
            return num, den
        if e.is_Pow and e.exp.is_Integer:
            num, den = self._read(e.base)
            k = int(e.exp)
            if k < 0:
                if not num:
                    raise NotRational("division by zero")
                num, den, k = den, num, -k
            return num ** k, den ** k
        raise NotRational(type(e).__name__)

    def from_items(self, items):
        """A polynomial from {exponent tuple: Fraction}."""
        return self.ctx.from_dict({exps: flint.fmpq(c.numerator, c.denominator)
                                   for exps, c in items.items() if c})

    @staticmethod
    def items(poly):
        """(exponent tuple of ints, Fraction) pairs of a polynomial."""
        return [(tuple(map(int, exps)), Fraction(int(c.p), int(c.q)))
                for exps, c in zip(poly.monoms(), poly.coeffs())]

    @staticmethod
    def is_constant(p) -> bool:
        return p.is_constant()

    @staticmethod
    def gcd(a, b):
        return a.gcd(b)

    @staticmethod
    def exquo(a, b):
        return a / b

    def lcm(self, a, b):
        return a if a == b else a * (b / a.gcd(b))

    def check_power_size(self, poly, n: int, limit: int) -> None:
        """Refuse a power that would have more than ``limit`` terms, before
        building it.  The bound is the number of monomials of that degree in
        the variables present."""
        if n < 2 or len(poly) < 2:
            return
        exps = [tuple(map(int, m)) for m in poly.monoms()]
        present = sum(1 for i in range(len(self.symbols)) if any(m[i] for m in exps))
        degree = max(sum(m) for m in exps)
        bound = min(math.comb(n * degree + present, present), math.comb(len(poly) + n - 1, n))
        if bound > limit:
            raise LimitError(f"a power of a {len(poly)}-term polynomial to the {n} would have up to "
                             f"{bound} terms (the limit is {limit})")

    # -------------------------------------------------- fractions (Gröbner)
    def frac(self, num, den=None) -> "Frac":
        return Frac(num, self.one if den is None else den)

    def frac_parts(self, terms: dict):
        """{monomial: Frac} -> (numerator terms, common denominator)."""
        den = self.one
        for c in terms.values():
            den = self.lcm(den, c.denom)
        return {m: c.numer * (den / c.denom) for m, c in terms.items() if c}, den


class Frac:
    """A rational function num/den, cancelled, den with leading coefficient 1."""

    __slots__ = ("numer", "denom")

    def __init__(self, num, den):
        g = num.gcd(den)
        if not g.is_constant():
            num, den = num / g, den / g
        c = den.leading_coefficient()
        if c != 1:
            num, den = num / c, den / c
        self.numer, self.denom = num, den

    def __bool__(self):
        return bool(self.numer)

    def __eq__(self, other):
        return self.numer == other.numer and self.denom == other.denom

    def __neg__(self):
        return Frac(-self.numer, self.denom)

    def __add__(self, other):
        return Frac(self.numer * other.denom + other.numer * self.denom, self.denom * other.denom)

    def __sub__(self, other):
        return Frac(self.numer * other.denom - other.numer * self.denom, self.denom * other.denom)

    def __mul__(self, other):
        return Frac(self.numer * other.numer, self.denom * other.denom)

    def __truediv__(self, other):
        return Frac(self.numer * other.denom, self.denom * other.numer)
