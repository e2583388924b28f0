"""Exact expansions of (a + b sqrt(R)) / d in one symbol, on FLINT polynomials.

Large-N results of a-maximization are such values, and sympy's lazy series
takes seconds on them.  With ``x = 1/t`` (at infinity) or ``x = x0 + t`` (at
a point), each of a, b, d and R is a polynomial in t times a power of t, with
coefficients polynomials in the other symbols; then

    sqrt(R) = t^(m/2) sqrt(r0) sqrt(1 + u),   1/d = t^(-n) / d0 * 1/(1 + e)

and sqrt(1 + u), 1/(1 + e) follow from recurrences on those coefficients
(the binomial and geometric series), with denominators powers of r0 and d0.
So every coefficient is p + q sqrt(r0), p and q rational functions, exact,
written as sympy's own series writes it, so that the display forms made from
the terms are the ones sympy's terms give.  Where that could differ (see
``terms``), and for values of another kind, the caller uses sympy's series.
"""
from __future__ import annotations

from fractions import Fraction
from math import comb
from typing import Callable, Iterator

import flint

from . import budget
from .lazysympy import sympy
from .surds import Surds, sympy_order


def terms(expr, x, point: Fraction | None, t, one_root: Callable) -> Iterator | None:
    """The terms ``c * t**e`` of ``expr`` (a sympy expression in the symbol
    ``x``) with ``x = 1/t`` for ``point`` None, else ``x = point + t``: one term
    per power of t, in increasing powers, the nonzero ones only; the iterator
    ends when the expansion does.  None, leaving the value to sympy, when
    ``expr`` is no (a + b sqrt(R)) / d; when b is not 0 and ``point`` is given
    (a short term such as (r + 1)/(1 - z) is then displayed as sympy happened
    to write it, with a sign or denominator this module does not predict);
    when sqrt(r0) is not one real radical
    as ``one_root(sqrt(r0))`` says (its display form would follow how the
    terms are written, and this module writes them as sympy's series does
    only for one radical); when R has an odd power of t (sympy groups the
    half-integer powers its own way); or when sqrt(R) is a polynomial times
    a power of t but not a power of t alone (its series ends)."""
    field = Surds(sympy_order(expr.free_symbols))
    found = field.read(expr)
    if found is None:
        return None
    (a, b, d), radicand = found
    i = field.index[x]
    shift = _Shift(field, i, point)
    rational = _rational(field, *_lowest(a, d, shift))
    if not b.is_zero():
        if point is not None:
            return None
        r = shift(radicand)
        if r[0] % 2 or not _plain_root(field.expr(r[1][0]), one_root) or (
                len(r[1]) > 1 and _is_square(radicand, i, shift)):
            return None
        rational = _merged(rational, _surd(field, *_lowest(b, d, shift), r))
    return (_written(c * t ** e) for e, c in rational)


def _written(term):
    """A term as sympy's series writes one: the numerator expanded into a sum
    of terms, each over the denominator; a sum (of a rational part and a
    part with the root) first brought to one denominator, its sign out."""
    if not term.is_Add:
        num, den = (sympy.expand(x) for x in sympy.fraction(term))
    else:
        num, den = (sympy.expand(x) for x in sympy.fraction(sympy.together(term)))
        if den.could_extract_minus_sign():
            num, den = -num, -den
    return sympy.Add(*[part / den for part in sympy.Add.make_args(num)])


def _lowest(a, d, shift) -> tuple:
    """a/d in lowest terms, both as series in t (a None for 0)."""
    common = a.gcd(d)
    return shift(a / common), shift(d / common)


def _plain_root(r0, one_root: Callable) -> bool:
    """Whether sqrt(r0) is rational, or one real radical that stays whole:
    r0 a nonnegative sum, its content a square, whose root ``one_root``
    accepts.  (sympy splits the root of a product, 3*z, into
    sqrt(3)*sqrt(z), and (2*z**2 + 2)**(-1/2) into sqrt(2)/(2*sqrt(z**2 + 1)),
    takes I out of the root of a negative value, and multiplies a root of a
    number such as sqrt(2) into its terms in its own way.)"""
    content = r0.primitive()[0] if r0.is_Add else r0
    if not (content.is_Rational and sympy.sqrt(content).is_Rational):
        return False
    return r0.is_Rational or (r0.is_Add and bool(r0.is_nonnegative) and one_root(sympy.sqrt(r0)))


class _Shift:
    """A polynomial in x as t^v times a polynomial in t: (v, [c0, c1, ...]) with
    c0 nonzero, each c a polynomial in the other symbols; None for 0."""

    def __init__(self, field: Surds, i: int, point: Fraction | None):
        self.ctx, self.i, self.point = field.ctx, i, point

    def __call__(self, poly):
        if poly.is_zero():
            return None
        by_power: dict[int, dict] = {}
        for monom, c in poly.terms():
            rest = monom[:self.i] + (0,) + monom[self.i + 1:]
            by_power.setdefault(int(monom[self.i]), {})[rest] = c
        top = max(by_power)
        coeffs = [self.ctx.from_dict(by_power.get(k, {})) for k in range(top + 1)]
        if self.point is None:
            return -top, coeffs[::-1]
        x0 = flint.fmpq(self.point.numerator, self.point.denominator)
        shifted = [sum((c * (comb(k, j) * x0 ** (k - j)) for k, c in enumerate(coeffs) if k >= j),
                       self.ctx.constant(0)) for j in range(top + 1)]
        low = next(j for j, c in enumerate(shifted) if not c.is_zero())
        return low, shifted[low:]


def _is_square(radicand, i: int, shift: _Shift) -> bool:
    """Whether R is a power of t times a square in t (over the other
    symbols): then sqrt(1 + u) is a polynomial, and its series ends."""
    _, factors = radicand.factor()
    return all(e % 2 == 0 for f, e in factors if f.degrees()[i] > 0 and len(shift(f)[1]) > 1)


class _Inverse:
    """The coefficients V_j of d0/d(t) = sum V_j (t/d0)^j: V_0 = 1,
    V_j = -sum_{k=1..j} d_k d0^(k-1) V_(j-k)."""

    def __init__(self, d: list):
        self.d, self.v = d, [d[0] ** 0]

    def __getitem__(self, j: int):
        while len(self.v) <= j:
            n = len(self.v)
            self.v.append(-sum((self.d[k] * self.d[0] ** (k - 1) * self.v[n - k]
                                for k in range(1, min(n, len(self.d) - 1) + 1)), self.d[0] * 0))
        return self.v[j]


class _Root:
    """The coefficients W_j of sqrt(R(t)/r0) = sum W_j (t/r0)^j: W_0 = 1,
    2 W_j = r_j r0^(j-1) - sum_{k=1..j-1} W_k W_(j-k)."""

    def __init__(self, r: list):
        self.r, self.w = r, [r[0] ** 0]

    def __getitem__(self, j: int):
        while len(self.w) <= j:
            n = len(self.w)
            rn = self.r[n] * self.r[0] ** (n - 1) if n < len(self.r) else self.r[0] * 0
            self.w.append((rn - sum((self.w[k] * self.w[n - k] for k in range(1, n)), self.r[0] * 0)) / 2)
        return self.w[j]


def _coefficient(field: Surds, num, den):
    """num/den in lowest terms, as a sympy expression."""
    common = num.gcd(den)
    return field.expr(num / common) / field.expr(den / common)


def _over_root(field: Surds, num, k: int, den, r0):
    """num / (r0^k den) times sqrt(r0), in lowest terms, with the powers of r0
    joined as sympy joins them: r0^(1/2 - k)."""
    while k and (num % r0).is_zero():
        num, k = num / r0, k - 1
    return _coefficient(field, num, den) * field.expr(r0) ** sympy.Rational(1 - 2 * k, 2)


def _rational(field: Surds, a, d) -> Iterator[tuple[int, object]]:
    """(power, coefficient) of a/d in lowest terms, t^(va - vd) / d0 times
    sum_k P_k (t/d0)^k, P_k = sum_(i+j=k) a_i V_j d0^i; finite when d is a
    power of t (then only)."""
    if a is None:
        return
    (va, ac), (vd, dc) = a, d
    inverse, d0 = _Inverse(dc), dc[0]
    k = 0
    while len(dc) > 1 or k < len(ac):
        budget.check()
        num = sum((ac[i] * inverse[k - i] * d0 ** i for i in range(min(k, len(ac) - 1) + 1)), d0 * 0)
        if not num.is_zero():
            yield va - vd + k, _coefficient(field, num, d0 ** (k + 1))
        k += 1


def _surd(field: Surds, b, d, r) -> Iterator[tuple[int, object]]:
    """(power, coefficient) of b sqrt(R) / d, b/d in lowest terms, vR even:
    with sqrt(R) = t^(vR/2) sqrt(r0) sum_j W_j (t/r0)^j, it is
    t^(vb - vd + vR/2) sqrt(r0) / d0 times sum_k Q_k t^k / (r0^k d0^k),
    Q_k = sum_(i+j+l=k) b_i W_j V_l r0^(i+l) d0^(i+j); finite when R and d
    are powers of t (then only)."""
    (vb, bc), (vd, dc), (vr, rc) = b, d, r
    inverse, roots = _Inverse(dc), _Root(rc)
    d0, r0 = dc[0], rc[0]
    start = vb - vd + vr // 2
    k = 0
    while len(dc) > 1 or len(rc) > 1 or k < len(bc):
        budget.check()
        num = sum((bc[i] * roots[j] * inverse[k - i - j] * r0 ** (k - j) * d0 ** (i + j)
                   for i in range(min(k, len(bc) - 1) + 1) for j in range(k - i + 1)), d0 * 0)
        if not num.is_zero():
            yield start + k, _over_root(field, num, k, d0 ** (k + 1), r0)
        k += 1


def _merged(first: Iterator, second: Iterator) -> Iterator[tuple[int, object]]:
    """Two series of (power, coefficient) in increasing powers, added."""
    x, y = next(first, None), next(second, None)
    while x is not None or y is not None:
        if y is None or (x is not None and x[0] < y[0]):
            yield x
            x = next(first, None)
        elif x is None or y[0] < x[0]:
            yield y
            y = next(second, None)
        else:
            yield x[0], x[1] + y[1]
            x, y = next(first, None), next(second, None)
