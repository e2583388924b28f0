"""Factorization of a class into factors of given form degrees (the Green–Schwarz question).

A homogeneous element is written as a polynomial over QQ in its class
generators and the document's symbols and factored into irreducibles
(sympy's multivariate factorization); each irreducible factor of a
weighted-homogeneous polynomial is weighted-homogeneous, so the question
"is I = X Y with deg X = a, deg Y = b" becomes a choice of irreducible
factors whose degrees add up to a.  The factors are rebuilt in the ring
generator by generator and the caller multiplies them back.  Factoring
happens in the free polynomial ring of the generators: a factorization that
exists only modulo relations (e^2 = p_n) is not found.
"""
from __future__ import annotations

from dataclasses import dataclass
from itertools import product

from .element import Element
from .errors import AlgebraError
from .lazysympy import sympy

#: Most ways of grouping the irreducible factors that are tried.
MAX_CHOICES = 100_000


@dataclass(frozen=True)
class Factorization:
    """`factors` has one element per requested degree (None if there is no such
    factorization), the content (the degree-0 factor) in the last one;
    `irreducible` lists (factor, form degree, multiplicity)."""

    factors: tuple[Element, ...] | None
    content: Element
    irreducible: tuple[tuple[Element, int, int], ...]


def _to_poly(value: Element):
    keys = sorted(value.generator_keys())
    variables = {key: sympy.Dummy(f"g{i}") for i, key in enumerate(keys)}
    expr = sympy.Integer(0)
    for monomial, coefficient in value.terms():
        term = coefficient
        for key, exponent in monomial:
            term = term * variables[key] ** exponent
        expr = expr + term
    return expr, variables


def _from_poly(ring, expr, variables, degree_of) -> tuple[Element, int]:
    """A sympy polynomial in the generator variables back into the ring, with its form degree."""
    back = {v: key for key, v in variables.items()}
    gens = [v for v in variables.values() if expr.has(v)]
    if not gens:
        return ring.from_scalar_expr(expr), 0
    poly = sympy.Poly(expr, *gens)
    total, degrees = ring.zero(), set()
    for exponents, coefficient in poly.terms():
        term = ring.from_scalar_expr(coefficient)
        degree = 0
        for v, e in zip(gens, exponents):
            if e:
                term = term * ring.gen(back[v]) ** e
                degree += degree_of[back[v]] * e
        total = total + term
        degrees.add(degree)
    if len(degrees) != 1:
        raise AlgebraError("a factor is not homogeneous")  # cannot happen for a homogeneous input
    return total, degrees.pop()


def factorize(value: Element, degrees: tuple[int, ...]) -> Factorization:
    """Write a homogeneous value as a product of factors of the given form degrees."""
    ring = value.ring
    have = value.degrees()
    if len(have) != 1:
        shown = ", ".join(map(str, have)) or "none (it is zero)"
        raise AlgebraError(f"factorize needs a nonzero homogeneous class; its form degrees are {shown}")
    if sum(degrees) != have[0] or any(d < 0 for d in degrees):
        raise AlgebraError(f"the degrees {' + '.join(map(str, degrees))} do not add up to the "
                           f"class's degree {have[0]}")
    expr, variables = _to_poly(value)
    degree_of = {key: ring.generator_info(key).degree for key in variables}
    content, pieces = sympy.factor_list(sympy.together(expr))
    content_element = ring.from_scalar_expr(content)
    irreducible = []
    for factor, multiplicity in pieces:
        element, degree = _from_poly(ring, factor, variables, degree_of)
        if degree == 0:
            content_element = content_element * element ** multiplicity if multiplicity > 0 \
                else content_element / element ** (-multiplicity)
        else:
            irreducible.append((element, degree, multiplicity))
    choice = _choose(irreducible, degrees)
    if choice is None:
        return Factorization(None, content_element, tuple(irreducible))
    factors = []
    for i, counts in enumerate(choice):
        out = content_element if i == len(choice) - 1 else ring.one()
        for (element, _, _), count in zip(irreducible, counts):
            if count:
                out = out * element ** count
        factors.append(out)
    if factors[0].terms()[0][1].could_extract_minus_sign():  # first factor's leading term positive
        factors = [-factors[0]] + factors[1:-1] + [-factors[-1]]
    return Factorization(tuple(factors), content_element, tuple(irreducible))


def _choose(irreducible, degrees):
    """For each requested degree, how many copies of each irreducible factor go into it."""
    if len(degrees) != 2:
        raise AlgebraError("factorize takes two degrees")
    ranges = [range(m + 1) for _, _, m in irreducible]
    tried = 0
    for counts in product(*ranges):
        tried += 1
        if tried > MAX_CHOICES:
            raise AlgebraError(f"more than {MAX_CHOICES} ways to group the irreducible factors")
        if sum(c * d for c, (_, d, _) in zip(counts, irreducible)) == degrees[0]:
            rest = tuple(m - c for c, (_, _, m) in zip(counts, irreducible))
            return counts, rest
    return None
