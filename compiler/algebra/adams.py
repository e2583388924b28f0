"""Traces of the named representations of SU(N), SO(N) and Sp(N) at symbolic rank N.

A representation built from the fundamental V by tensor operations has a
character that is a polynomial in the Adams operations of ch(V): the dual is
psi^-1, Sym^m and wedge^m are sums over cycle types of S_m (the cycle index
with the signs of permutations for wedge).  In the exponential series
ch(V) = sum_k p_k t^k / k! with p_k = tr_V F^k and p_0 = dim V, the Adams
operation psi^j multiplies p_k by j^k, so every trace tr_rho F^k comes out as
a polynomial in N and the p_k, exact for every N at once (the p_k are taken
independent, which is true at ranks where the group has a Casimir of each
degree up to k).
"""
from __future__ import annotations

from fractions import Fraction
from math import comb, factorial

# A polynomial is a dict {(power of N, sorted degrees of the p_k factors): coefficient};
# a character is a list of polynomials, entry k being tr F^k.


def _add(*polys):
    out: dict = {}
    for poly, factor in polys:
        for key, c in poly.items():
            out[key] = out.get(key, 0) + factor * c
    return {key: c for key, c in out.items() if c}


def _mul(a, b):
    out: dict = {}
    for (n1, m1), c1 in a.items():
        for (n2, m2), c2 in b.items():
            key = (n1 + n2, tuple(sorted(m1 + m2)))
            out[key] = out.get(key, 0) + c1 * c2
    return {key: c for key, c in out.items() if c}


def _product(x, y):
    """Characters multiply as exponential series: a binomial convolution."""
    return [_add(*((_mul(x[i], y[k - i]), comb(k, i)) for i in range(k + 1))) for k in range(len(x))]


def _adams(x, j):
    return [{key: c * j ** k for key, c in poly.items()} for k, poly in enumerate(x)]


def _combine(*terms):
    return [_add(*((x[k], f) for x, f in terms)) for k in range(len(terms[0][0]))]


def _trivial(length):
    return [{(0, ()): Fraction(1)}] + [{} for _ in range(length - 1)]


def _partitions(m, largest=None):
    largest = m if largest is None else largest
    if m == 0:
        yield ()
        return
    for first in range(min(m, largest), 0, -1):
        for rest in _partitions(m - first, first):
            yield (first,) + rest


def _power(x, m, sign):
    """Sym^m (sign +1) or wedge^m (sign -1) by the cycle index of S_m."""
    terms = []
    for shape in _partitions(m):
        z = 1
        for part in set(shape):
            z *= part ** shape.count(part) * factorial(shape.count(part))
        term = _trivial(len(x))
        for part in shape:
            term = _product(term, _adams(x, part))
        terms.append((term, Fraction(sign ** (m - len(shape)), z)))
    return _combine(*terms)


def _fundamental(family, degree):
    """ch of the defining representation: p_0 = dim; p_1 = 0 for SU, odd p_k = 0 for SO and Sp."""
    dim = {"SU": 1, "SO": 1, "Sp": 2}[family]
    keep = {"SU": lambda k: k != 1, "SO": lambda k: k % 2 == 0, "Sp": lambda k: k % 2 == 0}[family]
    return [{(1, ()): Fraction(dim)}] + [
        {(0, (k,)): Fraction(1)} if keep(k) else {} for k in range(1, degree + 1)]


def _minus(x, y):
    return _combine((x, 1), (y, -1))


def _traceless(x, m, sign):
    """Sym^m V - Sym^(m-2) V or wedge^m V - wedge^(m-2) V: remove the traces with the invariant form."""
    return _minus(_power(x, m, sign), _power(x, m - 2, sign)) if m >= 2 else _power(x, m, sign)


# (family, name) -> character from ch(V) and the power m
BUILDERS = {
    ("SU", "fundamental"): lambda v, m: v,
    ("SU", "antifundamental"): lambda v, m: _adams(v, -1),
    ("SU", "adjoint"): lambda v, m: _minus(_product(v, _adams(v, -1)), _trivial(len(v))),
    ("SU", "antisymmetric"): lambda v, m: _power(v, m, -1),
    ("SU", "symmetric"): lambda v, m: _power(v, m, 1),
    ("SO", "vector"): lambda v, m: v,
    ("SO", "adjoint"): lambda v, m: _power(v, 2, -1),
    ("SO", "antisymmetric"): lambda v, m: _power(v, m, -1),
    ("SO", "symmetric"): lambda v, m: _traceless(v, m, 1),
    ("Sp", "fundamental"): lambda v, m: v,
    ("Sp", "adjoint"): lambda v, m: _power(v, 2, 1),
    ("Sp", "antisymmetric"): lambda v, m: _traceless(v, m, -1),
    ("Sp", "symmetric"): lambda v, m: _power(v, m, 1),
}


def rank_traces(family: str, name: str, power: int, degree: int) -> dict[tuple[int, ...], tuple[Fraction, ...]]:
    """tr_rho F^degree as {degrees of the fundamental traces: coefficients in ascending powers of N}."""
    character = BUILDERS[family, name](_fundamental(family, degree), power)
    grouped: dict[tuple[int, ...], dict[int, Fraction]] = {}
    for (npow, mono), c in character[degree].items():
        grouped.setdefault(mono, {})[npow] = Fraction(c)
    return {mono: tuple(coeffs.get(i, Fraction(0)) for i in range(max(coeffs) + 1))
            for mono, coeffs in sorted(grouped.items())}
