"""The display form of rational functions, built on FLINT, is the tree sympy's own spelling gives.

``compiler.spelling`` reproduces sympy's conventions (term order, factor
order, signs) so that showing a value needs no sympy; here each tree is
compared with the one built from ``sympy.factor`` (the reference the display
form promises: "as sympy.factor writes it"), on a fixed family of random
rational functions whose symbol names exercise sympy's generator order
(one-letter names ranked p..w before a..o, x, y, z first; indexed names).
"""
from __future__ import annotations

import random
from fractions import Fraction

import sympy

from compiler.algebra.graded import Ring
from compiler.presentation import _negative, _node, _ordered, _poly_expr, display_tree
from compiler.spelling import Spelling

NAMES = ["N", "q1", "q10", "q2", "g", "x", "p", "a", "eps", "k"]


def _random_poly(rng, ring, symbols):
    terms = ring.zero()
    for _ in range(rng.randint(1, 4)):
        term = ring.scalar(Fraction(rng.choice([-3, -2, -1, 1, 1, 2, 5]), rng.choice([1, 1, 2, 3])))
        for s in rng.sample(symbols, rng.randint(0, min(2, len(symbols)))):
            term = term * ring.symbol(s) ** rng.randint(1, 2)
        terms = terms + term
    return terms


def _random_value(rng, ring, symbols):
    value = ring.scalar(Fraction(rng.choice([-6, -1, 1, 1, 3, 7]), rng.choice([1, 2, 5])))
    for _ in range(rng.randint(1, 3)):
        factor = _random_poly(rng, ring, symbols)
        if factor.is_zero:
            continue
        power = rng.choice([1, 1, 2, 3, -1, -2])
        value = value * factor ** power if power > 0 else value / factor ** (-power)
    return value


def _factored(value):
    """The tree of sympy's factorization of a class-free value."""
    return _node(sympy.factor(value.to_scalar()), _ordered)


def test_class_free_values_are_shown_as_sympy_factor_writes_them():
    rng = random.Random(20261202)
    symbols = [sympy.Symbol(name) for name in NAMES]
    ring = Ring(symbols, 12)
    checked = 0
    for _ in range(400):
        chosen = rng.sample(symbols, rng.randint(1, 4))
        value = _random_value(rng, ring, chosen)
        if value.is_zero:
            continue
        assert display_tree(value) == _factored(value), value.to_text()
        checked += 1
    assert checked > 350


def test_the_sign_of_a_sum_is_judged_as_sympy_judges_it():
    # sympy's could_extract_minus_sign: more negative terms, or as many and
    # the smaller sort key (x - 1 rather than 1 - x)
    rng = random.Random(7)
    symbols = [sympy.Symbol(name) for name in NAMES]
    ring = Ring(symbols, 12)
    spelling = Spelling(NAMES)
    for _ in range(300):
        poly = _random_poly(rng, ring, rng.sample(symbols, rng.randint(1, 3)))
        if poly.is_zero:
            continue
        (_, num, den), = poly.fractions()
        (_, d), = ring.coeffs.items(den)
        terms = [(e, c / d) for e, c in ring.coeffs.items(num)]
        assert spelling.negative(terms) == _negative(_poly_expr(ring.coeffs, num) / _poly_expr(ring.coeffs, den))


def test_a_class_polynomial_shows_the_same_coefficients():
    # each coefficient of a class polynomial, factored, is the tree of the same
    # rational function shown alone (common factor pulled out first)
    symbols = sympy.symbols("N q1 q2")
    ring = Ring(list(symbols), 8)
    c = ring.generator("c", 2)
    n, q1, q2 = (ring.symbol(s) for s in symbols)
    coefficients = [(n - q1) * (n + 1), q1 * q2 - n, 1 - n ** 2]
    value = sum((k * c ** (i + 1) for i, k in enumerate(coefficients)), ring.zero())
    tree = display_tree(value)
    assert tree[0] == "add" and len(tree) == 4
    expected = []
    for k, power in zip(coefficients, (["cls", "c"], ["pow", ["cls", "c"], 2], ["pow", ["cls", "c"], 3])):
        shown = _factored(k)
        expected.append(["neg", _times(shown[1], power)] if shown[0] == "neg" else _times(shown, power))
    assert sorted(map(repr, tree[1:])) == sorted(map(repr, expected))  # in the normal form's order


def _times(tree, power):
    return ["mul", *(tree[1:] if tree[0] == "mul" else [tree]), power]


def test_sums_are_written_in_sympy_term_order():
    # as_ordered_terms: lexicographic in the symbols by name, highest first,
    # except that a positive number before one negative term stays first (1 - x)
    rng = random.Random(11)
    symbols = [sympy.Symbol(name) for name in NAMES]
    ring = Ring(symbols, 12)
    spelling = Spelling(NAMES)
    cases = [ring.one() - ring.symbol(symbols[0]), 2 - ring.symbol(symbols[5]) ** 2,
             ring.one() - ring.symbol(symbols[1]) * ring.symbol(symbols[2])]
    cases += [_random_poly(rng, ring, rng.sample(symbols, rng.randint(1, 3))) for _ in range(300)]
    for poly in cases:
        if poly.is_zero:
            continue
        (_, num, den), = poly.fractions()
        (_, d), = ring.coeffs.items(den)
        terms = [(e, c / d) for e, c in ring.coeffs.items(num)]
        assert spelling.poly_tree(terms) == _node(poly.to_scalar(), _ordered), poly.to_text()
