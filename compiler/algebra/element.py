"""Elements of the graded ring: exact arithmetic and queries on normal forms.

An element holds ``_p``, one FLINT polynomial over symbols and classes, over
``_d``, a denominator in the symbols (see ``kernel``), always in normal form.
Elements are immutable; one built before a generator or rule was added is
moved and re-normalised on first use (``_fresh``).  Queries that need terms
by class monomial unpack once and keep the result (``_t``, ``_den``).
"""
from __future__ import annotations

import math
from fractions import Fraction

import flint
from typing import Mapping

from . import budget, printing, serial, substitution
from .errors import AlgebraError, LimitError
from .lazysympy import sympy
from .monomials import Mono

#: Most terms (over classes and symbols together) a product may have.
MAX_TERMS = 200_000
#: Most term pairs multiplied in one product (after skipping truncated components).
MAX_PRODUCT = 20_000_000
#: Digits of the numerator or denominator of any number in a value, as for the
#: lexer's number literals: a power is refused before it is computed if its
#: numbers would grow past this, and a value past it cannot be shown.
MAX_DIGITS = 4000
_BITS_PER_DIGIT = math.log2(10)


class Element:
    """An immutable element of a Ring, always in normal form."""

    __slots__ = ("_ring", "_p", "_d", "_epoch", "_view")
    __hash__ = None  # type: ignore[assignment]

    def __init__(self, ring, p, d):
        self._ring = ring
        self._p = p
        self._d = d
        self._epoch = ring._epoch
        self._view = None

    @property
    def ring(self):
        return self._ring

    def _fresh(self) -> "Element":
        """Move to the current context and re-normalise if generators or
        rules were added since this element was built."""
        if self._epoch == self._ring._epoch:
            return self
        return self._ring._renew(self._p, self._d)

    @property
    def _t(self) -> dict:
        """{monomial: numerator polynomial in the symbols}, unpacked once."""
        if self._view is None:
            L = self._ring.layout
            self._view = (L.unpack(self._p), L.symbols_part(self._d))
        return self._view[0]

    @property
    def _den(self):
        self._t
        return self._view[1]

    # ------------------------------------------------------------ arithmetic
    def __add__(self, other):
        try:
            other = self._ring._coerce(other)
        except AlgebraError:
            return NotImplemented
        a, b = self._fresh(), other._fresh()
        L = a._ring.layout
        if a._d == b._d:  # the common case: no rescaling
            return Element(a._ring, *L.cancel(a._p + b._p, a._d))
        g = a._d.gcd(b._d)
        fa, fb = b._d / g, a._d / g
        return Element(a._ring, *L.cancel(a._p * fa + b._p * fb, a._d * fa))

    __radd__ = __add__

    def __neg__(self):
        a = self._fresh()
        return Element(a._ring, -a._p, a._d)

    def __sub__(self, other):
        try:
            other = self._ring._coerce(other)
        except AlgebraError:
            return NotImplemented
        return self + (-other)

    def __rsub__(self, other):
        return (-self) + other

    def __mul__(self, other):
        try:
            other = self._ring._coerce(other)
        except AlgebraError:
            return NotImplemented
        a, b = self._fresh(), other._fresh()
        R = a._ring
        L = R.layout
        if L.has_odd(a._p) and L.has_odd(b._p):
            raw = L.product_signed(a._t, b._t)
            return R._make(raw, a._den * b._den)
        pairs = _factor_pairs(L, a._p, b._p)
        if sum(len(x) * len(y) for x, y in pairs) > MAX_PRODUCT:
            raise LimitError(f"a product of polynomials with {len(a._p)} and {len(b._p)} "
                             f"terms is beyond the limit; simplify the input")
        p = pairs[0][0] * pairs[0][1]
        for x, y in pairs[1:]:
            p += x * y
        return R._normal(_capped(p), a._d * b._d)

    __rmul__ = __mul__

    def __truediv__(self, other):
        try:
            other = self._ring._coerce(other)
        except AlgebraError:
            return NotImplemented
        other = other._fresh()
        if not other.is_class_free():
            raise AlgebraError(f"cannot divide by {other.to_text()}: it contains classes")
        if other.is_zero:
            raise AlgebraError("division by zero")
        a = self._fresh()
        return Element(a._ring, *a._ring.layout.cancel(a._p * other._d, a._d * other._p))

    def __rtruediv__(self, other):
        return self._ring._coerce(other) / self

    def __pow__(self, n):
        if isinstance(n, bool) or not isinstance(n, int):
            return NotImplemented
        a = self._fresh()
        R = a._ring
        L = R.layout
        if n < 0:
            return (R.one() / a) ** (-n)
        if a.is_class_free():
            if a.is_zero:
                return R.one() if n == 0 else a
            for poly in (a._p, a._d):
                R.coeffs.check_power_size(poly, n, MAX_TERMS)
                _check_digits([poly], n)
            return Element(R, *L.cancel(a._p ** n, a._d ** n))
        if () in a._t:  # a^n keeps the n-th power of the constant term, whatever the truncation
            _check_digits([a._t[()], a._den], n)
        low = min(k for k, _ in L.degree_parts(a._p))
        if n * low > R.truncate:
            return R.zero()
        if n * L.top_degree(a._p) <= R.truncate and not L.has_odd(a._p):
            return R._normal(_capped(a._p ** n), a._d ** n)   # nothing to truncate: one FLINT power
        result, base = R.one(), a
        while n:
            budget.check()
            if n & 1:
                result = result * base
            n >>= 1
            if n:
                base = base * base
        return result

    def __eq__(self, other):
        try:
            other = self._ring._coerce(other)
        except AlgebraError:
            return NotImplemented
        a, b = self._fresh(), other._fresh()
        return a._d == b._d and a._p == b._p

    def __ne__(self, other):
        eq = self.__eq__(other)
        return eq if eq is NotImplemented else not eq

    # -------------------------------------------------------------- queries
    @property
    def is_zero(self) -> bool:
        return not self._fresh()._p

    @property
    def size(self) -> int:
        """Terms over classes and symbols together: the text of the value
        has at least two characters for each, so a value too large to show
        is known before it is printed."""
        return len(self._fresh()._p)

    def is_class_free(self) -> bool:
        a = self._fresh()
        return a._ring.layout.top_degree(a._p) <= 0

    def degrees(self) -> list[int]:
        a = self._fresh()
        return sorted(k for k, _ in a._ring.layout.degree_parts(a._p))

    def is_homogeneous(self) -> bool:
        return len(self.degrees()) <= 1

    def part(self, k: int) -> "Element":
        a = self._fresh()
        L = a._ring.layout
        parts = dict(L.degree_parts(a._p))
        return Element(a._ring, *L.cancel(parts.get(k, L.zero), a._d))

    def _lead_mono(self) -> Mono:
        return self._ring.monos.leading(self._t)

    def _sorted(self):
        return sorted(self._t.items(), key=lambda mc: self._ring.monos.key(mc[0]))

    def terms(self) -> list[tuple[tuple[tuple[str, int], ...], object]]:
        """(monomial, coefficient) in normal-form order: the monomial as
        ((generator key, exponent), ...) in printing order (base classes
        last), the coefficient a sympy expression in the ring's symbols."""
        a = self._fresh()
        R = a._ring
        symbols = R.coeffs.sympy_symbols()
        out = []
        for m, c in a._sorted():
            s, x, y, P, Q = printing.scalar_parts(R.coeffs, c, a._den)
            coef = sympy.Integer(s) * sympy.Rational(x, y) * printing.prim_expr(P, symbols) \
                / printing.prim_expr(Q, symbols)
            out.append((R.monos.pairs(m), coef))
        return out

    def monomials(self) -> list[tuple[tuple[str, int], ...]]:
        """The monomials of ``terms``, without their coefficients."""
        a = self._fresh()
        return [a._ring.monos.pairs(m) for m, _ in a._sorted()]

    def as_monomial(self):
        """The monomial pairs if the value is one monomial with coefficient 1, else None."""
        a = self._fresh()
        one = a._ring.coeffs.one
        if len(a._t) != 1 or a._den != one:
            return None
        (m, c), = a._t.items()
        return a._ring.monos.pairs(m) if c == one else None

    def as_symbol(self):
        """The ring's symbol if the value is exactly one declared symbol, else None."""
        a = self._fresh()
        if not a._d.is_constant() or len(a._p) != 1 or a._p.coeffs()[0] != 1:
            return None
        exps = [int(e) for e in a._p.monoms()[0]]
        nsym = len(a._ring.symbols)
        if sum(exps) != 1 or not any(exps[:nsym]):
            return None
        return a._ring.symbols[exps.index(1)]

    def rational(self):
        """The Fraction the value is, when it is a number; else None."""
        a = self._fresh()
        if not a._p.is_constant() or not a._d.is_constant():
            return None
        p, d = (x.coeffs()[0] if x else flint.fmpq(0) for x in (a._p, a._d))
        q = p / d
        return Fraction(int(q.p), int(q.q))

    def fractions(self) -> list:
        """(monomial, numerator, denominator) in normal-form order: the
        monomial as in ``terms``, the coefficient a reduced quotient of
        ``ring.coeffs`` polynomials (what the display form factors)."""
        a = self._fresh()
        C = a._ring.coeffs
        out = []
        for m, c in a._sorted():
            g = C.gcd(c, a._den)
            out.append((a._ring.monos.pairs(m), C.exquo(c, g), C.exquo(a._den, g)))
        return out

    def leading_term(self) -> tuple["Element", "Element"]:
        """(leading monomial, its class-free coefficient) in the ring's order."""
        a = self._fresh()
        if not a._t:
            raise AlgebraError("zero has no leading term")
        m = a._lead_mono()
        R = a._ring
        return R._make({m: R.coeffs.one}, R.coeffs.one), R._make({(): a._t[m]}, a._den)

    def coefficient(self, monomial) -> "Element":
        """Class-free coefficient of an exact normal-form monomial (an Element or key pairs)."""
        a = self._fresh()
        R = a._ring
        if isinstance(monomial, Element):
            monomial = monomial._fresh()
            items = list(monomial._t.items())
            if len(items) != 1 or monomial._den != R.coeffs.one or items[0][1] != R.coeffs.one:
                raise AlgebraError(f"{monomial.to_text()} is not a monomial")
            m = items[0][0]
        else:
            m = R._mono_from_pairs(monomial)
            if not R.rewriter.is_normal(m):
                raise AlgebraError(f"{R.monos.text(m)} is not a monomial of the normal form")
        c = a._t.get(m)
        if c is None:
            return R.zero()
        return R._make({(): c}, a._den)

    def by_group(self, group: int) -> list[tuple[tuple[tuple[str, int], ...], "Element"]]:
        """Split as sum of (monomial in ``group`` classes) * (coefficient free of them)."""
        a = self._fresh()
        R = a._ring
        gens = R.monos.gens
        mine = [g.index for g in gens if g.group == group]
        if not any(gens[i].degree % 2 for i in mine):
            L = R.layout
            return [(R.monos.pairs(f), Element(R, *L.cancel(q, a._d)))
                    for f, q in sorted(L.split(a._p, mine), key=lambda fq: R.monos.key(fq[0]))]
        collected: dict[Mono, dict] = {}
        for m, c in a._t.items():
            f = tuple((i, e) for i, e in m if gens[i].group == group)
            r = tuple((i, e) for i, e in m if gens[i].group != group)
            sign, _ = R.monos.mul(f, r)
            collected.setdefault(f, {})[r] = c if sign > 0 else -c
        return [(R.monos.pairs(f), R._make(collected[f], a._den))
                for f in sorted(collected, key=R.monos.key)]

    def generator_keys(self) -> set[str]:
        a = self._fresh()
        gens = a._ring.monos.gens
        return {gens[i].key for i in a._ring.layout.variable_degrees(a._p)[1]}

    def free_symbols(self) -> set:
        a = self._fresh()
        L, syms = a._ring.layout, a._ring.symbols
        return {syms[i] for p in (a._p, a._d) for i in L.variable_degrees(p)[0]}

    def to_scalar(self):
        """The value as a sympy expression; it must be class-free."""
        a = self._fresh()
        if not a.is_class_free():
            raise AlgebraError(f"{a.to_text()} contains classes")
        if not a._t:
            return sympy.Integer(0)
        return a.terms()[0][1]

    def substitute(self, mapping: Mapping) -> "Element":
        """Replace generators (by key) and/or symbols (the ring's or their
        sympy Symbols) simultaneously (``substitution``)."""
        return substitution.substitute(self, mapping)

    # ------------------------------------------------------------ printing
    def _printed_terms(self):
        a = self._fresh()
        _check_digits([a._p, a._d])
        C = a._ring.coeffs
        return [(m, printing.scalar_parts(C, c, a._den)) for m, c in a._sorted()]

    def to_text(self) -> str:
        """Deterministic text in the document's own expression syntax (re-readable)."""
        return printing.to_text(self._ring, self._printed_terms())

    def __repr__(self) -> str:
        return f"Element({self.to_text()})"

    def to_data(self) -> dict:
        """The exact value as plain JSON data, for the build cache (``serial``)."""
        a = self._fresh()
        return serial.to_data(a._ring, a._sorted(), a._den)


def _bits(c) -> int:
    """Bits of the larger of a rational's numerator and denominator."""
    return max(int(c.p).bit_length(), int(c.q).bit_length())


def _check_digits(polys, n: int = 1) -> None:
    """Refuse numbers past MAX_DIGITS: those of ``polys``, or (with ``n``) the
    ones their n-th powers certainly hold, the n-th powers of the leading
    coefficients (a number of b bits is at least 2^(b-1))."""
    coefficients = [c for p in polys for c in (p.coeffs() if n == 1 else p.coeffs()[:1])]
    bits = n * max((_bits(c) - 1 for c in coefficients), default=0)
    if bits >= MAX_DIGITS * _BITS_PER_DIGIT:
        what = "a number in the value is" if n == 1 else f"the power to the {n} would hold a number"
        raise LimitError(f"{what} about {int(bits / _BITS_PER_DIGIT)} digits long "
                         f"(the limit is {MAX_DIGITS} digits)")


def _capped(p):
    if len(p) > MAX_TERMS:
        raise LimitError(f"a product grew beyond {MAX_TERMS} terms (the term limit); "
                         f"simplify the input or lower truncate")
    return p


def _factor_pairs(L, p, q) -> list:
    """What to multiply for p*q: the whole, or, when the product passes the
    truncation, the pairs of degree components that stay within it."""
    if L.top_degree(p) + L.top_degree(q) <= L.truncate or len(p) == 1 or len(q) == 1:
        return [(p, q)]
    qs = L.degree_parts(q)
    pairs = [(x, y) for dp, x in L.degree_parts(p) for dq, y in qs if dp + dq <= L.truncate]
    return pairs or [(L.zero, L.zero)]
