"""The ring kernel side by side: anomark's ring, plain sympy expansion, bare FLINT.

Not a test: run ``python bench/bench_ring.py``.  The input is a heavy
angular form of the wide inflow shape: the S^4 angular class e4 of a rank-5
bundle split into two planes (x1, x2) and a line, corrected by six flavour
line bundles f1..f6 with symbolic charges q1..q6 and N,

    E4 = e4/2 + sum_i (q_i x1 + (N - q_i) x2) f_i + sum_{i<=j} q_i q_j/(i+j) f_i f_j
         + N/4 (x1^2 + x2^2),

and each side computes E4^3 (degree 12, inside the default truncation):
anomark's ``Ring``; ``sympy.expand`` of the same expression; and one bare
``flint.fmpq_mpoly`` over classes and symbols together.  The three results
are checked equal before anything is printed.
"""
from __future__ import annotations

import time
from fractions import Fraction

import flint
import sympy

from compiler.algebra.graded import Ring

FLAVOURS = 6
BASE = ["x1", "x2"] + [f"f{i}" for i in range(1, FLAVOURS + 1)]
SYMBOLS = ["N"] + [f"q{i}" for i in range(1, FLAVOURS + 1)]


def angular_form(cls, sym, half, frac):
    """E4 from class and symbol constructors, generic over the three kernels."""
    N, q = sym("N"), [sym(f"q{i}") for i in range(1, FLAVOURS + 1)]
    x1, x2, f = cls("x1"), cls("x2"), [cls(f"f{i}") for i in range(1, FLAVOURS + 1)]
    total = cls("e4") * half + N * frac(1, 4) * (x1 * x1 + x2 * x2)
    for i in range(FLAVOURS):
        total = total + (q[i] * x1 + (N - q[i]) * x2) * f[i]
        for j in range(i, FLAVOURS):
            total = total + q[i] * q[j] * frac(1, i + j + 2) * f[i] * f[j]
    return total


def timed(fn, repeat=3):
    best, value = None, None
    for _ in range(repeat):
        start = time.perf_counter()
        value = fn()
        elapsed = time.perf_counter() - start
        best = elapsed if best is None else min(best, elapsed)
    return best, value


def run_ring(sphere_rule=False):
    ring = Ring(sympy.symbols(" ".join(SYMBOLS)), 12)
    ring.generator("e4", 4, group=1)
    for key in BASE:
        ring.generator(key, 2)
    if sphere_rule:   # e4^2 = p2(NW) = x1^2 x2^2 for the angular class of a split rank-5 bundle
        ring.add_rule(ring.gen("e4") ** 2, ring.gen("x1") ** 2 * ring.gen("x2") ** 2)
    syms = {s.name: ring.symbol(s) for s in ring.symbols}
    e4 = angular_form(ring.gen, syms.__getitem__, Fraction(1, 2), Fraction)
    elapsed, cube = timed(lambda: e4 ** 3)
    return elapsed, cube


def run_flint():
    ctx = flint.fmpq_mpoly_ctx.get(tuple(["e4"] + BASE + SYMBOLS), "degrevlex")
    var = dict(zip(ctx.names(), ctx.gens()))
    e4 = angular_form(var.__getitem__, var.__getitem__, flint.fmpq(1, 2), flint.fmpq)
    elapsed, cube = timed(lambda: e4 ** 3)
    return elapsed, cube


def run_sympy():
    var = {name: sympy.Symbol(name) for name in ["e4"] + BASE + SYMBOLS}
    e4 = angular_form(var.__getitem__, var.__getitem__, sympy.Rational(1, 2), sympy.Rational)
    elapsed, cube = timed(lambda: sympy.expand(e4 ** 3), repeat=1)
    return elapsed, cube


def class_terms_flint(poly, nclasses):
    return {m[:nclasses] for m in poly.monoms()}


def main():
    t_ring, ring_cube = run_ring()
    t_rule, _ = run_ring(sphere_rule=True)
    t_text, _ = timed(lambda: run_ring()[1].to_text(), repeat=1)
    t_flint, flint_cube = run_flint()
    t_sympy, sympy_cube = run_sympy()
    # Same value three ways: compare the ring's cube with FLINT's through sympy.
    ring_expr = sympy.expand(sympy.Add(*[c * sympy.Mul(*[sympy.Symbol(k) ** e for k, e in pairs])
                                         for pairs, c in ring_cube.terms()]))
    assert sympy.expand(ring_expr - sympy_cube) == 0
    names = {str(s): s for s in ring_expr.free_symbols}
    flint_expr = sympy.Add(*[sympy.Rational(int(c.p), int(c.q)) * sympy.Mul(
        *[names[n] ** int(e) for n, e in zip(flint_cube.context().names(), m) if e])
        for m, c in zip(flint_cube.monoms(), flint_cube.coeffs())])
    assert sympy.expand(ring_expr - flint_expr) == 0
    classes = len(ring_cube.terms())
    print(f"E4^3 with {FLAVOURS} flavours: {classes} class monomials, "
          f"{len(flint_cube)} terms over classes and symbols")
    print(f"anomark ring      : {t_ring:8.4f} s")
    print(f"  with e4^2 rule  : {t_rule:8.4f} s")
    print(f"  cube and to_text: {t_text:8.4f} s   (printing unpacks every term)")
    print(f"bare fmpq_mpoly   : {t_flint:8.4f} s")
    print(f"plain sympy expand: {t_sympy:8.4f} s")
    print(f"ring / fmpq_mpoly : {t_ring / t_flint:8.1f}x   (target: within 2x)")
    print(f"sympy / ring      : {t_sympy / t_ring:8.1f}x")


if __name__ == "__main__":
    main()
