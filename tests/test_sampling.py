"""Symbol declarations and deterministic sample points.

The rules checked here are the spec's (derivation-format.md, Declarations
and Precise rules: "Sampling is deterministic ... satisfying the
assumptions"); the numbers are chosen by hand (common practice, no source).
"""
from fractions import Fraction

import pytest
import sympy

from compiler.algebra.region import Region
from compiler.algebra.sampling import SymbolSpec, evaluate


def test_integer_positive_carries_sympy_assumptions():
    spec = SymbolSpec.declare("N", ["integer", "positive"], [])
    assert spec.symbol.is_integer and spec.symbol.is_positive and spec.symbol.is_real
    assert spec.describe() == "integer, positive"
    # the assumptions let sympy simplify radicals of the symbol itself
    assert sympy.sqrt(spec.symbol ** 2) == spec.symbol


def test_bounds_combine_with_assumptions():
    g = SymbolSpec.declare("g", ["integer"], [(">=", Fraction(2))])
    assert g.describe() == "integer, g >= 2"
    assert g.symbol.is_positive  # g >= 2 implies positive
    assert g.admits(2) and g.admits(7)
    assert not g.admits(1) and not g.admits(Fraction(5, 2))
    x = SymbolSpec.declare("x", [], [(">", Fraction(0)), ("<", Fraction(1))])
    assert x.describe() == "real, 0 < x < 1"
    assert x.admits(Fraction(1, 2))
    assert not x.admits(0) and not x.admits(1)
    # the tighter of "positive" and "x >= 3" wins
    y = SymbolSpec.declare("y", ["positive"], [(">=", Fraction(3))])
    assert (y.lower, y.lower_strict) == (3, False)


def test_bare_symbol_is_real():
    spec = SymbolSpec.declare("eps", [], [])
    assert spec.symbol.is_real and spec.symbol.is_positive is None
    assert spec.describe() == "real"


@pytest.mark.parametrize("assumptions, bounds", [
    (["positive"], [("<", Fraction(0))]),
    (["integer"], [(">", Fraction(0)), ("<", Fraction(1))]),
    (["nonzero"], [(">=", Fraction(0)), ("<=", Fraction(0))]),
    ([], [(">", Fraction(2)), ("<=", Fraction(2))]),
])
def test_contradictions_are_rejected(assumptions, bounds):
    with pytest.raises(ValueError, match="satisfies the declaration of x"):
        SymbolSpec.declare("x", assumptions, bounds)


def test_unknown_words_are_rejected():
    with pytest.raises(ValueError, match="unknown assumption 'prime'"):
        SymbolSpec.declare("x", ["prime"], [])
    with pytest.raises(ValueError, match="unknown comparison"):
        SymbolSpec.declare("x", [], [("=", Fraction(1))])


def _specs():
    return [SymbolSpec.declare("N", ["integer", "positive"], []),
            SymbolSpec.declare("g", ["integer"], [(">=", Fraction(2))]),
            SymbolSpec.declare("z", ["real"], [(">", Fraction(0))]),
            SymbolSpec.declare("x", [], [(">", Fraction(0)), ("<", Fraction(1))]),
            SymbolSpec.declare("w", ["nonzero"], [])]


def test_sample_points_satisfy_every_declaration_and_are_distinct():
    specs = _specs()
    points = Region(tuple(specs)).sample(40, "doc.md:12")
    assert len(points) == 40
    assert len({tuple(p.values()) for p in points}) == 40
    for p in points:
        for s in specs:
            value = p[s.symbol]
            assert isinstance(value, sympy.Rational)
            assert s.admits(Fraction(int(value.p), int(value.q)))
            if s.integer:
                assert value.is_Integer


def test_sample_points_are_deterministic_and_seeded():
    specs = _specs()
    assert Region(tuple(specs)).sample(20, "a.md:3") == Region(tuple(specs)).sample(20, "a.md:3")
    assert Region(tuple(specs)).sample(20, "a.md:3") != Region(tuple(specs)).sample(20, "a.md:4")


def test_sample_points_spread_over_small_and_moderate_sizes():
    z = SymbolSpec.declare("z", ["positive"], [])
    values = [p[z.symbol] for p in Region((z,)).sample(60, "spread")]
    assert any(v < 1 for v in values)
    assert any(v > 10 for v in values)
    assert any(not v.is_Integer for v in values)


def test_small_finite_domains_are_enumerated():
    k = SymbolSpec.declare("k", ["integer"], [(">=", Fraction(1)), ("<=", Fraction(3))])
    points = Region((k,)).sample(20, "finite")
    assert sorted(p[k.symbol] for p in points) == [1, 2, 3]


def test_no_symbols_gives_the_single_empty_point():
    assert Region(()).sample(20, "none") == [{}]


def test_evaluate_substitutes_exactly_before_rounding():
    x = sympy.Symbol("x", real=True)
    # With 50-digit floats this difference of 1e75-sized terms would be noise.
    big = sympy.Integer(10) ** 30
    value = evaluate(sympy.sqrt(x) * (x + 1) ** 2 - x ** sympy.Rational(5, 2)
                     - 2 * x ** sympy.Rational(3, 2), {x: big})
    assert abs(value - sympy.Integer(10) ** 15) < sympy.Float("1e-30")
