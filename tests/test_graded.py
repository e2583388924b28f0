"""The graded ring: normal form, arithmetic, Gröbner reduction, printing."""
from __future__ import annotations

import re
from fractions import Fraction

import pytest
import sympy
from hypothesis import given, settings, strategies as st

from compiler.algebra import element
from compiler.algebra.errors import AlgebraError, LimitError, NotRational
from compiler.algebra.graded import Ring

N, M, g = sympy.symbols("N M g")


def make_ring(truncate=12, symbols=(N, M)):
    ring = Ring(list(symbols), truncate)
    a = ring.generator("a", 2)
    b = ring.generator("b", 2)
    c = ring.generator("c", 4)
    return ring, a, b, c


# ------------------------------------------------------------ tiny reader
TOKEN = re.compile(r"\s*(?:(\d+)|([A-Za-z][A-Za-z0-9_]*)|(.))")


def read_back(ring: Ring, text: str):
    """Parse to_text output with only names, integers, + - * / ^ ( ) and calls.

    A test-side reader (the project's parser lives elsewhere): a call f(X)
    or a bare name is looked up as a generator text, else as a symbol.
    """
    toks = [m.groups() for m in TOKEN.finditer(text) if m.group(0).strip()]
    pos = 0
    gens = {gen.key: gen for gen in ring.generators()}
    syms = {s.name: s for s in ring.symbols}

    def peek():
        return toks[pos] if pos < len(toks) else (None, None, None)

    def take(op=None):
        nonlocal pos
        tok = toks[pos]
        if op is not None:
            assert tok[2] == op, (tok, op, text)
        pos += 1
        return tok

    def atom():
        num, name, op = take()
        if num is not None:
            return ring.scalar(int(num))
        if op == "(":
            x = expr()
            take(")")
            return x
        assert name is not None, text
        if peek()[2] == "(":
            take("(")
            arg = take()[1]
            take(")")
            name = f"{name}({arg})"
        if name in gens:
            gen = gens[name]
            return ring.generator(gen.key, gen.degree, group=gen.group)
        return ring.symbol(syms[name])

    def power():
        base = atom()
        if peek()[2] == "^":
            take("^")
            return base ** int(take()[0])
        return base

    def unary():
        if peek()[2] == "-":
            take("-")
            return -unary()
        return power()

    def term():
        x = unary()
        while peek()[2] in ("*", "/"):
            op = take()[2]
            y = unary()
            x = x * y if op == "*" else x / y
        return x

    def expr():
        x = term()
        while peek()[2] in ("+", "-"):
            op = take()[2]
            y = term()
            x = x + y if op == "+" else x - y
        return x

    value = expr()
    assert pos == len(toks), text
    return value


def as_expr(el):
    """The element as a sympy expression, each generator a Symbol named by its text."""
    ring = el.ring
    return sympy.Add(*[coef * sympy.Mul(*[sympy.Symbol(k) ** e for k, e in pairs])
                       for pairs, coef in el.terms()])


ALLOWED = re.compile(r"^(?:[A-Za-z][A-Za-z0-9_]*|\d+|[-+*/^() ])+$")


# ------------------------------------------------------------ normal form
def test_truncation_drops_high_degrees_as_they_arise():
    # common practice, no source: the spec's truncation rule
    ring, a, b, c = make_ring(truncate=6)
    x = (1 + a) ** 5
    assert x.degrees() == [0, 2, 4, 6]
    assert x.part(6) == 10 * a ** 3
    assert (a ** 4).is_zero
    assert (c * c).is_zero
    assert ((1 + a) ** 1000).part(2) == 1000 * a


def test_degrees_homogeneity_and_zero():
    ring, a, b, c = make_ring()
    assert ring.zero().degrees() == []
    assert ring.zero().is_homogeneous()
    x = a * b + c
    assert x.degrees() == [4] and x.is_homogeneous()
    y = 1 + a + c
    assert y.degrees() == [0, 2, 4] and not y.is_homogeneous()
    assert y.part(4) == c and y.part(8).is_zero


def test_rule_rewrites_eagerly_and_renormalises_old_elements():
    ring, a, b, c = make_ring()
    old = b ** 3 + a * b
    ring.add_rule(b * b, a * a)      # like e^2 -> p_n: b^2 is the larger monomial
    assert (b ** 3).terms() == [((("a", 2), ("b", 1)), 1)]
    assert old + 0 == a * a * b + a * b
    assert old == a * a * b + a * b


def test_rule_direction_follows_the_monomial_order():
    # c is declared after a, so c > a^2 and the rule reads c -> a^2.
    ring, a, b, c = make_ring()
    ring.add_rule(a * a, c)
    assert c.terms() == [((("a", 2),), 1)]


def test_rules_are_kept_as_a_reduced_basis():
    # a^2 -> a*b and then a*b -> b^2 must give a^2 = b^2 whatever the order.
    ring, a, b, c = make_ring()
    ring.add_rule(b * b, a * b)      # b is declared later, so b^2 leads
    ring.add_rule(a * b, a * a)
    assert b * b == a * a
    assert a * b == a * a
    assert (a + b) ** 2 == 4 * a * a


def test_rule_must_be_homogeneous_monomial():
    ring, a, b, c = make_ring()
    with pytest.raises(AlgebraError):
        ring.add_rule(a * a, b)
    with pytest.raises(AlgebraError):
        ring.add_rule(2 * a, b)


def test_fiber_classes_come_first_and_later_declared_are_larger():
    ring, a, b, c = make_ring()
    x = ring.generator("x", 2, group=1)
    # block order: any fiber class beats any base class
    assert (a ** 3 + x).terms()[0][0] == (("x", 1),)
    # graded reverse lex: b (later) > a, and c > a*b > a^2 within degree 4
    assert [t[0] for t in (a + b).terms()] == [(("b", 1),), (("a", 1),)]
    assert [t[0] for t in (a * a + a * b + c + b * b).terms()] == [
        (("c", 1),), (("b", 2),), (("a", 1), ("b", 1)), (("a", 2),)]


def test_vanish_above_applies_after_rules():
    ring, a, b, c = make_ring()
    x = ring.generator("x", 2, group=1)
    ring.vanish_above(1, 2)
    assert (x * x).is_zero and (x * a) == x * a
    ring2, a2, _, _ = make_ring()
    y = ring2.generator("y", 2, group=1)
    ring2.add_rule(y * y, -a2 * y)   # a twisted fibration: y^2 is rewritten, not dropped
    ring2.vanish_above(1, 2)
    assert y ** 2 == -a2 * y
    assert y ** 3 == a2 ** 2 * y


def test_odd_classes_anticommute():
    ring = Ring([], 12)
    u = ring.generator("u", 3)
    v = ring.generator("v", 3)
    assert u * v == -(v * u)
    assert (u * u).is_zero
    assert ((u + v) ** 2).is_zero


def test_zero_symbol_ring():
    ring = Ring([], 8)
    a = ring.generator("a", 2)
    assert ((1 + a) ** 2 - 1 - 2 * a) == a * a
    assert (a / 4).to_text() == "1/4*a"


# ----------------------------------------------------------- coefficients
def test_rational_function_coefficients_cancel_exactly():
    ring, a, b, c = make_ring()
    n = ring.symbol(N)
    assert (n * n - 1) / (n - 1) == n + 1
    assert (a / (n - 1) - a / (n + 1)) == 2 * a / (n * n - 1)
    assert ((n * a + a) / (n + 1)) == a
    assert (a / n * n) == a
    assert (n / 2 * a).coefficient(a).to_scalar() == N / 2


def test_division_errors():
    ring, a, b, c = make_ring()
    with pytest.raises(ValueError, match="contains classes"):
        b / a
    with pytest.raises(ValueError, match="division by zero"):
        a / (ring.symbol(N) - ring.symbol(N))
    assert ring.symbol(N) ** -2 == 1 / (ring.symbol(N) ** 2)


def test_from_scalar_expr():
    ring, a, b, c = make_ring()
    x = ring.from_scalar_expr((N ** 3 - N) / (6 * M - 6))
    assert x * (6 * ring.symbol(M) - 6) == ring.symbol(N) ** 3 - ring.symbol(N)
    for bad in (sympy.sqrt(N), sympy.Symbol("z"), sympy.pi, sympy.Float("0.5") * N):
        with pytest.raises(NotRational):
            ring.from_scalar_expr(bad)
    assert issubclass(NotRational, ValueError)


def test_coefficient_and_leading_term():
    ring, a, b, c = make_ring()
    n = ring.symbol(N)
    x = (n - 1) * a ** 3 + n / 3 * a * c + 5
    assert x.coefficient(a ** 3) == n - 1
    assert x.coefficient((("a", 1), ("c", 1))) == n / 3
    assert x.coefficient(b).is_zero
    assert x.coefficient(ring.one()) == 5
    mono, coef = x.leading_term()
    assert mono == a * c and coef == n / 3
    ring.add_rule(a * a, c)          # c -> a^2, so c alone is no longer a normal monomial
    with pytest.raises(AlgebraError, match="not a monomial of the normal form"):
        x.coefficient((("c", 1),))
    with pytest.raises(AlgebraError):
        x.coefficient(2 * c)


def test_by_group_splits_fiber_and_base():
    ring, a, b, c = make_ring()
    x = ring.generator("x", 2, group=1)
    v = 3 * x * a + x - a * b + x * x * b
    parts = dict(v.by_group(1))
    assert parts[(("x", 2),)] == b
    assert parts[(("x", 1),)] == 3 * a + 1
    assert parts[()] == -a * b


# --------------------------------------------------------------- substitute
def test_substitute_is_simultaneous():
    ring, a, b, c = make_ring()
    n, m = ring.symbol(N), ring.symbol(M)
    x = a + 2 * b + n * c
    swapped = x.substitute({"a": b, "b": a, N: m})
    assert swapped == b + 2 * a + m * c
    assert x.substitute({N: n + 1}) == a + 2 * b + (n + 1) * c
    assert (a / (n - 1)).substitute({N: ring.scalar(3)}) == a / 2
    with pytest.raises(AlgebraError):
        (a / (n - 1)).substitute({N: ring.scalar(1)})
    assert x.free_symbols() == {N}
    assert x.generator_keys() == {"a", "b", "c"}


def test_substitute_symbol_by_rational_function():
    ring, a, b, c = make_ring()
    n, m = ring.symbol(N), ring.symbol(M)
    x = (n ** 2 + 1) / (n - 2) * a
    got = x.substitute({N: m / (m + 1)})
    r = m / (m + 1)
    assert got == (r * r + 1) / (r - 2) * a


# ----------------------------------------------------------------- Gröbner
def test_reduce_simple_relation():
    ring, a, b, c = make_ring()
    # b is larger, so b + a = 0 rewrites b -> -a
    assert ring.reduce((a + b) * c + b * b, [a + b]) == a * a
    assert ring.reduce(b ** 3, [b * b - a * b, a * a]) .is_zero


def _sympy_groebner_check(relations, ring, gens):
    """Compare with sympy's groebner (grevlex, largest = latest declared)."""
    syms = {gen.key: sympy.Symbol(gen.key) for gen in ring.generators()}
    order = [syms[k] for k in reversed(gens)]
    exprs = [as_expr(r).subs({sympy.Symbol(gen.key): syms[gen.key] for gen in ring.generators()})
             for r in relations]
    ref = sympy.groebner(exprs, *order, order="grevlex")
    ours = ring.groebner(relations)
    ours_exprs = sorted(str(sympy.expand(as_expr(o))) for o in ours)
    assert sorted(str(sympy.expand(r)) for r in ref.exprs) == ours_exprs


def test_groebner_agrees_with_sympy():
    # common practice, no source: sympy's groebner as an independent reference
    ring = Ring([], 40)
    x, y, z = (ring.generator(k, 2) for k in "xyz")
    _sympy_groebner_check([x * x - y * z, x * y - z * z, y * y - 2 * x * z], ring, ["x", "y", "z"])
    _sympy_groebner_check([x * y + z * z, x * x * z - y ** 3], ring, ["x", "y", "z"])


def test_groebner_inconsistent_and_inhomogeneous():
    ring, a, b, c = make_ring()
    with pytest.raises(AlgebraError, match="1 = 0"):
        ring.groebner([ring.scalar(3)])
    with pytest.raises(AlgebraError, match="not homogeneous"):
        ring.groebner([a - 1])


def _poly(ring, gens, coeffs):
    total = ring.zero()
    monos = [gens[0] * gens[0], gens[0] * gens[1], gens[1] * gens[1], gens[2]]
    for k, m in zip(coeffs, monos):
        total = total + k * m
    return total


small = st.integers(-3, 3)


@settings(max_examples=40, deadline=None)
@given(st.lists(st.lists(small, min_size=4, max_size=4), min_size=1, max_size=3),
       st.lists(small, min_size=4, max_size=4), st.randoms())
def test_reduce_is_idempotent_and_order_independent(rels, target, rnd):
    ring, a, b, c = make_ring(truncate=10)
    n = ring.symbol(N)
    relations = [_poly(ring, [a, b, c], r) for r in rels]
    relations[0] = relations[0] + n * a * b   # symbolic coefficients too
    x = _poly(ring, [a, b, c], target) * (a + n * b) + c * c
    try:
        r1 = ring.reduce(x, relations)
    except AlgebraError:
        return   # unit ideal: nothing to compare
    shuffled = list(relations)
    rnd.shuffle(shuffled)
    shuffled = [k * r for k, r in zip(range(2, 9), shuffled)]
    assert ring.reduce(x, shuffled) == r1
    assert ring.reduce(r1, relations) == r1
    assert ring.reduce(x - r1, relations).is_zero


# --------------------------------------------------------------- arithmetic
def _to_sympy(el):
    return sympy.expand(as_expr(el))


@settings(max_examples=40, deadline=None)
@given(st.lists(st.tuples(small, small, st.integers(0, 2), st.integers(0, 2), st.integers(0, 1)),
                min_size=1, max_size=5), st.integers(1, 3))
def test_arithmetic_agrees_with_sympy(spec, power):
    # common practice, no source: plain sympy expansion as an independent reference
    ring, a, b, c = make_ring(truncate=40)
    n, m = ring.symbol(N), ring.symbol(M)
    x = ring.zero()
    ref = 0
    A, B, C = sympy.symbols("a b c")
    for k1, k2, ea, eb, ec in spec:
        x = x + (k1 + k2 * n - m) * a ** ea * b ** eb * c ** ec
        ref += (k1 + k2 * N - M) * A ** ea * B ** eb * C ** ec
    assert sympy.expand(_to_sympy(x ** power) - sympy.expand(ref ** power)) == 0
    y = x * (n + 2) / (m + 1)
    assert sympy.simplify(as_expr(y) - ref * (N + 2) / (M + 1)) == 0


def test_term_cap(monkeypatch):
    monkeypatch.setattr(element, "MAX_TERMS", 50)
    ring = Ring([], 12)
    gens = [ring.generator(f"x{i}", 2) for i in range(8)]
    s = sum(gens[1:], gens[0])
    with pytest.raises(LimitError):
        s ** 4
    assert issubclass(LimitError, ValueError)


# ----------------------------------------------------------------- printing
def test_text_is_deterministic_exact_and_readable():
    ring = Ring([N, g], 12)
    p1 = ring.generator("p1(NW)", 4)
    p2 = ring.generator("p2(NW)", 8)
    e4 = ring.generator("e4", 4, group=1)
    n, gg = ring.symbol(N), ring.symbol(g)
    x = (n ** 3 - n) / 24 * p2 - Fraction(1, 48) * p1 ** 2 + e4 * p1 / (2 * gg - 2) - (n - 1) * e4 * e4 + 3
    text = x.to_text()
    assert text == ("-(N - 1)*e4^2 + 1/(2*(g - 1))*e4*p1(NW) + (N^3 - N)/24*p2(NW)"
                    " - 1/48*p1(NW)^2 + 3")
    assert ALLOWED.match(text)
    assert read_back(ring, text) == x
    assert ring.zero().to_text() == "0"
    assert (n + 1).to_text() == "N + 1"
    assert (-n - 1).to_text() == "-(N + 1)"


@settings(max_examples=40, deadline=None)
@given(st.lists(st.tuples(st.integers(-4, 4), st.integers(1, 5), st.integers(-2, 2),
                          st.integers(0, 2), st.integers(0, 2)), min_size=1, max_size=5))
def test_text_round_trip(spec):
    ring, a, b, c = make_ring()
    x = ring.generator("x", 2, group=1)
    n, m = ring.symbol(N), ring.symbol(M)
    value = ring.zero()
    for k, d, s, ea, ex in spec:
        value = value + Fraction(k, d) * (n ** ea - s * m) / (m + d) * a ** ea * x ** ex * c ** (ex % 2)
    text = value.to_text()
    assert ALLOWED.match(text), text
    assert read_back(ring, text) == value


def test_terms_and_to_scalar():
    ring, a, b, c = make_ring()
    n = ring.symbol(N)
    x = (n - 1) / 4 * a + 2
    terms = x.terms()
    assert terms[0][0] == (("a", 1),) and sympy.simplify(terms[0][1] - (N - 1) / 4) == 0
    assert terms[1] == ((), 2)
    assert ((n - 1) / (n + 1)).to_scalar() == (N - 1) / (N + 1)
    with pytest.raises(AlgebraError):
        x.to_scalar()


def test_generator_registration():
    ring, a, b, c = make_ring()
    assert ring.generator("a", 2) == a
    with pytest.raises(AlgebraError):
        ring.generator("a", 4)
    with pytest.raises(AlgebraError):
        ring.generator("z", 0)
    assert ring.generator("big", 14).is_zero   # beyond truncate 12


# ------------------------------------------------------ the FLINT kernel
def test_elements_built_before_a_new_generator_keep_working():
    ring, a, b, c = make_ring()
    x = (ring.symbol(N) + 1) * a * b
    z = ring.generator("z", 2)      # the kernel's context grows
    assert x * z == (ring.symbol(N) + 1) * z * a * b
    assert (x + z).to_text() == "(N + 1)*a*b + z"


def test_products_past_the_truncation_drop_only_high_degrees():
    # common practice, no source: truncation keeps every component of degree <= truncate
    ring, a, b, c = make_ring(truncate=8)
    x = 1 + a + c + a * c
    y = 1 + b * b + c * c
    assert x * y == 1 + a + c + a * c + b * b + a * b * b + c * c + b * b * c
    assert (x * y).degrees() == [0, 2, 4, 6, 8]
    assert x ** 3 == (x * x) * x


def test_one_power_and_repeated_products_agree_under_rules():
    ring, a, b, c = make_ring()
    e = ring.generator("e", 4, group=1)
    n = ring.symbol(N)
    ring.add_rule(e * e, c * c / 4)
    x = e / 2 + n * a * b + (n - 1) / 3 * c
    assert x ** 3 == x * x * x
    assert (e ** 3) == c * c * e / 4


def test_degree_limits_with_several_fiber_classes():
    # common practice, no source: classes of fiber degree above the limit vanish
    ring, a, b, c = make_ring()
    x = ring.generator("x", 2, group=1)
    y = ring.generator("y", 4, group=1)
    ring.vanish_above(1, 4)
    assert (x ** 3).is_zero and (x * y).is_zero and (y * y).is_zero
    assert x * x * a == a * x ** 2 and not (x * x).is_zero and (y * a).part(6) == y * a
    assert not ring.is_normal_monomial([("x", 1), ("y", 1)])
    assert ring.is_normal_monomial([("x", 2), ("a", 3)])


def test_odd_classes_with_even_ones_and_symbols():
    ring = Ring([N], 12)
    u = ring.generator("u", 3)
    v = ring.generator("v", 3)
    a = ring.generator("a", 2)
    n = ring.symbol(N)
    left, right = u + n * a, v + a
    assert left * right == u * v + u * a + n * a * v + n * a * a
    assert right * left == -(u * v) + u * a + n * a * v + n * a * a
    assert ((u + a) ** 3).part(7) == 3 * u * a * a


def test_minimal_monomials_beyond_a_limit():
    from compiler.algebra.kernel import minimal_beyond
    assert sorted(minimal_beyond({0: 2, 1: 4}, 4)) == [((0, 1), (1, 1)), ((0, 3),), ((1, 2),)]
    assert minimal_beyond({0: 4}, 4) == [((0, 2),)]


def test_the_ring_imports_neither_sympy_nor_matplotlib():
    # issue 11, item 4: a build whose algebra needs no sympy does not pay for importing it
    import os
    import subprocess
    import sys
    from pathlib import Path
    root = Path(__file__).resolve().parent.parent
    code = ("import sys, compiler.algebra.graded, compiler.algebra.bundles, "
            "compiler.algebra.genera, compiler.algebra.fibers; "
            "print(sorted(m for m in ('sympy', 'matplotlib') if m in sys.modules))")
    env = dict(os.environ, PYTHONPATH=str(root))
    out = subprocess.run([sys.executable, "-c", code], cwd=root, env=env,
                         capture_output=True, text=True, check=True)
    assert out.stdout.strip() == "[]"


def test_long_ring_loops_poll_the_deadline():
    # issue 10: the time limit works in any thread, so the ring's loops poll the budget
    from compiler.algebra import budget
    ring, a, b, c = make_ring()
    with budget.deadline(0, "a test deadline"):
        with pytest.raises(budget.BudgetExceeded):
            ring.groebner([a * a - c, a * b - b * b])
        with pytest.raises(budget.BudgetExceeded):
            (1 + a) ** 20
    assert ((1 + a) ** 20).part(2) == 20 * a
