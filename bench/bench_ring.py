"""Compare the graded ring with plain sympy expansion on the same input.

Not a test: run ``python bench/bench_ring.py``.  The input is a 30-term
degree-4 class X with symbolic coefficients and a degree-8 class Y; both
sides compute X^3 and X*Y (degree 12, inside the default truncation).
"""
from __future__ import annotations

import itertools
import random
import time

import sympy

from compiler.algebra.graded import Ring


def build_input(seed: int = 7):
    rnd = random.Random(seed)
    symbols = sympy.symbols("a b c d")
    # 7 degree-2 classes give 28 quadratic monomials, plus 2 degree-4 classes: 30 terms.
    deg2 = [f"x{i}" for i in range(7)]
    deg4 = ["y0", "y1"]
    quad = [(u, v) for u, v in itertools.combinations_with_replacement(deg2, 2)] + [(y,) for y in deg4]

    def coef():
        return sum(rnd.randint(-5, 5) * s for s in symbols) + rnd.randint(1, 9)

    x_terms = [(coef(), mono) for mono in quad]
    deg8 = rnd.sample([m for m in itertools.combinations_with_replacement(deg2 + deg4, 4)
                       if 2 * sum(1 for g in m if g.startswith("x")) + 4 * sum(1 for g in m if g.startswith("y")) == 8], 20)
    y_terms = [(coef(), mono) for mono in deg8]
    return symbols, deg2, deg4, x_terms, y_terms


def run_ring(symbols, deg2, deg4, x_terms, y_terms):
    ring = Ring(symbols, 12)
    gens = {g: ring.generator(g, 2, text=g, latex=g) for g in deg2}
    gens.update({g: ring.generator(g, 4, text=g, latex=g) for g in deg4})

    def element(terms):
        total = ring.zero()
        for c, mono in terms:
            m = ring.from_scalar_expr(c)
            for g in mono:
                m = m * gens[g]
            total = total + m
        return total

    start = time.perf_counter()
    x, y = element(x_terms), element(y_terms)
    cube, prod = x ** 3, x * y
    elapsed = time.perf_counter() - start
    return elapsed, len(cube.terms()) + len(prod.terms())


def run_sympy(symbols, deg2, deg4, x_terms, y_terms):
    gens = {g: sympy.Symbol(g) for g in deg2 + deg4}

    def expr(terms):
        return sympy.Add(*[c * sympy.Mul(*[gens[g] for g in mono]) for c, mono in terms])

    start = time.perf_counter()
    x, y = expr(x_terms), expr(y_terms)
    cube, prod = sympy.expand(x ** 3), sympy.expand(x * y)
    elapsed = time.perf_counter() - start
    classes = set(gens.values())

    def class_monomials(e):
        return {sympy.Mul(*[f for f in sympy.Mul.make_args(t) if f.free_symbols and f.free_symbols <= classes])
                for t in sympy.Add.make_args(e)}
    return elapsed, len(class_monomials(cube)) + len(class_monomials(prod))


def main():
    data = build_input()
    t_ring, n_ring = run_ring(*data)
    t_sympy, n_sympy = run_sympy(*data)
    assert n_ring == n_sympy, (n_ring, n_sympy)
    print(f"graded ring : {t_ring:8.3f} s  ({n_ring} class monomials)")
    print(f"sympy expand: {t_sympy:8.3f} s")
    print(f"ratio       : {t_sympy / t_ring:8.1f}x")


if __name__ == "__main__":
    main()
