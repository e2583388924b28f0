"""Symbol declarations and deterministic sample points.

The rules checked here are the spec's (derivation-format.md, Declarations
and Precise rules: "Sampling is deterministic ... satisfying the
assumptions"); the numbers are chosen by hand (common practice, no source).
"""
from fractions import Fraction

import pytest
import sympy

from compiler.algebra.region import Region, build_region
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


# -- regions: relations between symbols (issue 12) --------------------------------

Nc_, Nf_, p_, q_ = sympy.symbols("Nc Nf p q")


def sqcd_window():
    return build_region([("Nc", ["integer"], [(">=", Fraction(2))], []),
                         ("Nf", ["integer"], [], [(Nc_, "<", Nf_), (Nf_, "<", 3 * Nc_)])])


def test_region_points_lie_inside_every_relation():
    region = sqcd_window()
    Nc, Nf = region.symbols
    points = region.sample(40, "doc.md:5")
    assert len(points) == 40 and len({tuple(p.values()) for p in points}) == 40
    for point in points:
        assert point[Nc] >= 2 and point[Nc] < point[Nf] < 3 * point[Nc]
        assert all(v.is_Integer for v in point.values())
        assert region.violations(point) == []
    assert region.sample(40, "doc.md:5") == points
    assert region.sample(40, "doc.md:6") != points


def test_a_point_outside_the_region_says_what_it_breaks():
    region = sqcd_window()
    Nc, Nf = region.symbols
    assert region.violations({Nc: 3, Nf: 9}) == ["Nc = 3, Nf = 9 breaks Nf < 3*Nc"]
    assert region.violations({Nc: 3, Nf: 3}) == ["Nc = 3, Nf = 3 breaks Nc < Nf"]
    assert region.violations({Nc: 1, Nf: 2}) == ["Nc = 1 breaks Nc: integer, Nc >= 2"]
    assert region.violations({Nc: 3, Nf: 5}) == []
    # a point that fixes one symbol is judged on what it fixes
    assert region.violations({Nf: 100}) == []


def test_real_relations_and_bounds_folded_from_relations():
    region = build_region([("q", ["real"], [], [(0, "<", q_)]),
                           ("p", ["real"], [], [(q_, "<", p_), (p_, "<=", 10)])])
    q, p = region.symbols
    assert region.specs[0].describe() == "real, positive"
    assert region.specs[1].describe() == "real, p <= 10"
    assert [r.text for r in region.relations] == ["q < p"]
    for point in region.sample(30, "pq"):
        assert 0 < point[q] < point[p] <= 10


def test_small_regions_are_enumerated_inside_the_relations():
    region = build_region([("a", ["integer"], [(">=", Fraction(1)), ("<=", Fraction(3))], []),
                           ("b", ["integer"], [(">=", Fraction(1)), ("<=", Fraction(3))],
                            [(sympy.Symbol("b"), ">", sympy.Symbol("a"))])])
    a, b = region.symbols
    assert region.sample(20, "x") == [{a: 1, b: 2}, {a: 1, b: 3}, {a: 2, b: 3}]


def test_restricting_keeps_linked_symbols():
    region = build_region([("Nc", ["integer"], [(">=", Fraction(2))], []),
                           ("Nf", ["integer"], [], [(Nf_, ">", Nc_)]),
                           ("z", ["real"], [], [])])
    Nc, Nf, z = region.symbols
    assert region.restrict([Nf]).symbols == [Nc, Nf]
    assert region.restrict([z]).symbols == [z] and region.restrict([z]).relations == ()


@pytest.mark.parametrize("relations, message", [
    ([(Nf_, ">", sympy.Symbol("Nx"))], "uses Nx, which is not declared before it"),
    ([(Nf_ ** 2, ">", Nc_)], "not linear"),
    ([(Nf_, "=", Nc_)], "unknown comparison"),
    ([(Nf_, "<", 1)], "no integer satisfies"),
])
def test_bad_relations_are_rejected(relations, message):
    with pytest.raises(ValueError, match=message):
        build_region([("Nc", ["integer"], [(">=", Fraction(2))], []),
                      ("Nf", ["integer", "positive"], [], relations)])
