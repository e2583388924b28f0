"""Â, L, Todd, spinor characters and Chern characters of constructions."""
from __future__ import annotations

from fractions import Fraction

import sympy
from hypothesis import given, settings, strategies as st

from support import bundle_table as table, whitney_sum
from compiler.algebra.bundles import Trivial
from compiler.algebra.genera import BundleValue, ahat, chern_character, hirzebruch_l, \
    multiplicative_sequence, todd


def pont(t, name):
    return [None] + t.pontryagin_classes(name)


def test_ahat_through_degree_12():
    # Hirzebruch, "Topological Methods in Algebraic Geometry", 1966, §1.6 / Milnor–Stasheff 1974:
    # Â1 = -p1/24, Â2 = (7p1^2 - 4p2)/5760, Â3 = (-31p1^3 + 44p1p2 - 16p3)/967680
    t = table(T="real 7")
    p = pont(t, "T")
    a = ahat(t, "T")
    assert a.part(0) == 1
    assert a.part(4) == -p[1] / 24
    assert a.part(8) == (7 * p[1] ** 2 - 4 * p[2]) / 5760
    assert a.part(12) == (-31 * p[1] ** 3 + 44 * p[1] * p[2] - 16 * p[3]) / 967680
    assert a.degrees() == [0, 4, 8, 12]


def test_l_through_degree_12():
    # Hirzebruch 1966, §1.5; Milnor–Stasheff 1974, §19:
    # L1 = p1/3, L2 = (7p2 - p1^2)/45, L3 = (62p3 - 13p1p2 + 2p1^3)/945
    t = table(T="real 6")
    p = pont(t, "T")
    L = hirzebruch_l(t, "T")
    assert L.part(4) == p[1] / 3
    assert L.part(8) == (7 * p[2] - p[1] ** 2) / 45
    assert L.part(12) == (62 * p[3] - 13 * p[1] * p[2] + 2 * p[1] ** 3) / 945


def test_sequences_match_the_one_root_series():
    # common practice, no source: for one root K(sigma_1 = z) is the characteristic series itself,
    # compared with sympy's own series expansion.
    x = sympy.Symbol("x")
    refs = {
        "Ahat": (x / 2) / sympy.sinh(x / 2),
        "L": x / sympy.tanh(x),
        "spinor": 2 * sympy.cosh(x / 2),
    }
    for name, f in refs.items():
        q0, parts = multiplicative_sequence(name, 5)
        series = sympy.series(f, x, 0, 12).removeO()
        for j in range(6):
            coef = q0 * parts[j].get(tuple(j if k == 0 else 0 for k in range(5)), 0)
            assert sympy.Rational(coef.numerator, coef.denominator) == series.coeff(x, 2 * j), (name, j)
    q0, parts = multiplicative_sequence("todd", 6)
    series = sympy.series(x / (1 - sympy.exp(-x)), x, 0, 8).removeO()
    for j in range(7):
        coef = parts[j].get(tuple(j if k == 0 else 0 for k in range(6)), 0)
        assert sympy.Rational(coef.numerator, coef.denominator) == series.coeff(x, j)


def test_k3_surface():
    # common knowledge: the K3 surface has p1 = -48 (times the orientation class),
    # Â-genus 2 and signature -16 (Hirzebruch signature theorem, Hirzebruch 1966).
    t = table(4, T="real 4")
    ring = t.ring
    w = ring.generator("w", 4)
    sub = {"p1(T)": -48 * w}
    assert ahat(t, "T").substitute(sub).coefficient(w) == 2
    assert hirzebruch_l(t, "T").substitute(sub).coefficient(w) == -16


def test_cp2_todd_genus_and_signature():
    # common knowledge: CP^2 with c1 = 3h, c2 = 3h^2, h^3 = 0, integral of h^2 = 1 has
    # Todd genus 1 and signature 1 (p1 = c1^2 - 2c2 = 3h^2); Hirzebruch 1966.
    t = table(4, T="complex 2")
    h = t.ring.generator("h", 2)
    sub = {"c1(T)": 3 * h, "c2(T)": 3 * h * h}
    assert todd(t, "T").substitute(sub).coefficient(h * h) == 1
    assert hirzebruch_l(t, "T").substitute(sub).coefficient(h * h) == 1
    assert ahat(t, "T").substitute(sub).coefficient(h * h) == Fraction(-1, 8)


def test_todd_of_line_bundle():
    # Hirzebruch 1966, §1.7: td = x/(1 - e^-x) = 1 + x/2 + x^2/12 - x^4/720 + x^6/30240
    t = table(L="line")
    x = t.chern("L", 1)
    assert todd(t, "L") == 1 + x / 2 + x ** 2 / 12 - x ** 4 / 720 + x ** 6 / 30240


def test_spinor_times_ahat_is_rescaled_l():
    # common practice, no source: per root (x/2)/sinh(x/2) * 2cosh(x/2) = 2 (x/2)/tanh(x/2),
    # so [ch(S(B)) Â(B)]_{4k} = 2^m L_k(B) / 4^k for m = rank // 2.
    t = table(T="real 6")
    prod = BundleValue.spinor(t, "T").ch * ahat(t, "T")
    L = hirzebruch_l(t, "T")
    assert BundleValue.spinor(t, "T").rank == 8
    for k in range(4):
        assert prod.part(4 * k) == L.part(4 * k) * Fraction(8, 4 ** k)


def test_spinor_of_plane():
    # common practice, no source: ch(S) of an oriented plane is 2cosh(e/2)
    t = table(P="real 2")
    e = t.euler("P")
    assert BundleValue.spinor(t, "P").ch == 2 + e ** 2 / 4 + e ** 4 / 192 + e ** 6 / 23040


def test_real_chern_character_is_of_the_complexification():
    # common practice, no source: a plane split as L has complexification L + dual(L)
    t = table(B="real 5", L1="line", L2="line")
    t.split("B", ["L1", "L2", Trivial(1)])
    ring = t.ring
    expected = ring.one()
    for name in ("L1", "L2"):
        x = t.chern(name, 1)
        expected = expected + 2 * sum((x ** (2 * k) / sympy.factorial(2 * k) for k in range(7)),
                                      ring.zero())
    assert chern_character(t, "B") == expected
    assert BundleValue.of(t, "B").rank == 5


def exp_series(ring, x):
    return sum((x ** k / sympy.factorial(k) for k in range(ring.truncate // 2 + 1)), ring.zero())


def test_constructions_on_split_bundles():
    # common practice, no source: splitting principle, roots of V = L1 + L2 + L3 are x_i;
    # wedge^2 has roots x_i + x_j (i < j), sym^2 has x_i + x_j (i <= j), V x dual V has x_i - x_j.
    t = table(V="complex 3")
    for k in (1, 2, 3):
        t.declare(f"L{k}", "line")
    t.split("V", ["L1", "L2", "L3"])
    ring = t.ring
    x = [t.chern(f"L{k}", 1) for k in (1, 2, 3)]
    v = BundleValue.of(t, "V")
    w2 = sum((exp_series(ring, x[i] + x[j]) for i in range(3) for j in range(i + 1, 3)), ring.zero())
    s2 = sum((exp_series(ring, x[i] + x[j]) for i in range(3) for j in range(i, 3)), ring.zero())
    end = sum((exp_series(ring, x[i] - x[j]) for i in range(3) for j in range(3)), ring.zero())
    assert v.wedge(2).ch == w2 and v.wedge(2).rank == 3
    assert v.sym(2).ch == s2 and v.sym(2).rank == 6
    assert (v * v.dual()).ch == end and (v * v.dual()).rank == 9
    assert v.wedge(3).ch == exp_series(ring, x[0] + x[1] + x[2])
    assert v.wedge(4).ch.is_zero
    assert v.wedge(0).ch == 1 and v.sym(0).ch == 1


def test_nested_construction_wedge_of_sum():
    # common practice, no source: wedge^2(V + L) = wedge^2 V + V*L
    t = table(V="complex 2", L="line")
    v, l = BundleValue.of(t, "V"), BundleValue.of(t, "L")
    assert (v + l).wedge(2).ch == (v.wedge(2) + v * l).ch
    assert (v + l).sym(3).ch == (v.sym(3) + v.sym(2) * l + v * l.sym(2) + l.sym(3)).ch


@settings(max_examples=20, deadline=None)
@given(st.lists(st.integers(1, 5), min_size=2, max_size=3))
def test_genera_multiplicative_on_whitney_sums(ranks):
    # Hirzebruch 1966, §1: multiplicative sequences satisfy K(p(E + F)) = K(p(E)) K(p(F))
    t, names = whitney_sum(ranks)
    for genus in (ahat, hirzebruch_l):
        prod = t.ring.one()
        for n in names:
            prod = prod * genus(t, n)
        assert genus(t, "B") == prod
    ch_sum = sum((chern_character(t, n) for n in names), t.ring.zero())
    assert chern_character(t, "B") == ch_sum


@settings(max_examples=20, deadline=None)
@given(st.integers(1, 3), st.integers(1, 3))
def test_chern_character_additive_and_multiplicative(r1, r2):
    # common practice, no source: ch is a ring homomorphism K -> H^even(Q)
    t = table()
    t.declare("V", "complex", r1)
    t.declare("W", "complex", r2)
    t.declare("U", "complex", r1 + r2)
    t.split("U", ["V", "W"])
    v, w = BundleValue.of(t, "V"), BundleValue.of(t, "W")
    assert BundleValue.of(t, "U").ch == (v + w).ch
    assert todd(t, "U") == todd(t, "V") * todd(t, "W")
    # The Chern classes of V*W from its ch agree for a tensor of lines: c1(L1 L2) = c1 + c1.
    t.declare("L1", "line")
    t.declare("L2", "line")
    l1, l2 = BundleValue.of(t, "L1"), BundleValue.of(t, "L2")
    assert (l1 * l2).ch == exp_series(t.ring, t.chern("L1", 1) + t.chern("L2", 1))


def test_truncation_of_genera():
    t = table(8, T="real 8")
    assert ahat(t, "T").degrees() == [0, 4, 8]
