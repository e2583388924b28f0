"""The sign oracle: bounds, relations between symbols, one square root.

Every claim below is an elementary inequality checked by hand (common
practice, no source); the oracle must prove the true ones, disprove the
false ones it can, and answer None (undecided) rather than guess.
"""
from fractions import Fraction

import pytest
import sympy

from compiler.algebra.region import Region, build_region
from compiler.algebra.sampling import SymbolSpec
from compiler.algebra.signs import SignOracle

F = Fraction


def oracle(*declarations):
    region = build_region(declarations)
    return SignOracle(region), {s.name: s.symbol for s in region.specs}


def test_an_open_interval_bounds_both_ways():
    # Issue 12: with 0 < x < 1, x < 1 is provable (x = t/(1 + t), t > 0)
    o, s = oracle(("x", ["real"], [(">", F(0)), ("<", F(1))], []))
    x = s["x"]
    assert o.sign(x - 1) == -1
    assert o.sign(x * (1 - x)) == 1
    assert o.truth("<=", x - 1) is True
    assert o.truth(">", x - 1) is False
    assert o.sign(x - sympy.Rational(1, 2)) is None     # either sign in the interval
    assert o.sign(x ** 2 - x + sympy.Rational(13, 50)) is None   # true, but not by sign rules


def test_a_relation_between_symbols_decides_signs():
    o, s = oracle(("Nc", ["integer"], [(">=", F(2))], []),
                  ("Nf", ["integer"], [], [(sympy.Symbol("Nf"), ">", sympy.Symbol("Nc"))]))
    Nc, Nf = s["Nc"], s["Nf"]
    assert o.sign(Nf - Nc) == 1
    # integers: Nf > Nc means Nf - Nc >= 1
    assert o.truth(">=", Nf - Nc - 1) is True
    assert o.sign(Nf - Nc - 1) is None      # zero at Nf = Nc + 1
    assert o.sign(Nf ** 2 - Nc ** 2) == 1
    assert o.sign(Nc - Nf) == -1


def test_without_the_relation_nothing_is_proven():
    o, s = oracle(("Nc", ["integer"], [(">=", F(2))], []),
                  ("Nf", ["integer"], [(">=", F(2))], []))
    assert o.sign(s["Nf"] - s["Nc"]) is None


def test_a_window_bounded_by_two_relations():
    Nc, Nf = sympy.symbols("Nc Nf")
    o, s = oracle(("Nc", ["integer", "positive"], [], []),
                  ("Nf", ["integer"], [], [(Nc, "<", Nf), (Nf, "<", 3 * Nc)]))
    Nc, Nf = s["Nc"], s["Nf"]
    assert o.sign(3 * Nc - Nf) == 1
    assert o.sign(Nf - Nc) == 1
    # 2 Nf - 3 Nc changes sign inside the window (Nf = Nc + 1 and Nf = 3 Nc - 1)
    assert o.sign(2 * Nf - 3 * Nc) is None


def test_real_symbols_ordered_by_a_relation():
    q, p = sympy.symbols("q p")
    o, s = oracle(("q", ["positive"], [], []),
                  ("p", ["real"], [], [(q, "<", p)]))
    p, q = s["p"], s["q"]
    assert o.sign(p - q) == 1 and o.sign(p) == 1
    assert o.sign(p ** 2 - q ** 2) == 1
    assert o.truth(">", p * q) is True


def test_one_square_root():
    o, s = oracle(("N", ["integer"], [(">=", F(3))], []))
    N = s["N"]
    assert o.sign(sympy.sqrt(2) - 1) == 1
    assert o.sign(3 - sympy.sqrt(N ** 2 + 1)) == -1       # 9 < N^2 + 1 for N >= 3
    assert o.sign(N - sympy.sqrt(N ** 2 - 1)) == 1
    assert o.sign(sympy.sqrt(N) - 2) is None              # N = 3 below, N = 5 above


def test_reality_and_content():
    o, s = oracle(("N", ["integer"], [(">=", F(2))], []), ("z", ["real"], [], []))
    N, z = s["N"], s["z"]
    assert o.is_real(sympy.sqrt(N - 1)) is True
    assert o.is_real(sympy.sqrt(1 - N)) is False
    assert o.is_real(sympy.sqrt(z)) is None
    assert o.sign_of_content(-(N - 1) * (z ** 2 + 1)) == -1
    assert o.sign_of_content((N - 1) * z) is None
    with pytest.raises(ValueError, match="complex"):
        o.sign_of_content(sympy.I * N)


def test_an_undeclared_symbol_keeps_only_its_sympy_assumptions():
    o = SignOracle(Region(()))
    y = sympy.Symbol("y", real=True)
    assert o.sign(y ** 2 + 1) == 1
    assert o.sign(y) is None


def test_declared_bounds_alone():
    g = SymbolSpec.declare("g", ["integer"], [(">=", F(2))])
    o = SignOracle(Region((g,)))
    assert o.sign(g.symbol - 2) is None and o.truth(">=", g.symbol - 2) is True
    assert o.sign(g.symbol - 1) == 1
