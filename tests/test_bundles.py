"""Bundle classes, normal-form conventions and Whitney-sum splits."""
from __future__ import annotations

import pytest
from hypothesis import given, settings, strategies as st

from support import bundle_table as table, whitney_sum
from compiler.algebra.bundles import Trivial
from compiler.algebra.graded import AlgebraError


def test_generators_follow_rank_conventions():
    t = table(T6="real 6", NW="real 5", TS="real 2", V="complex 3", L="line")
    assert t.get("T6").keys == ("p1(T6)", "p2(T6)", "p3(T6)", "e(T6)")
    assert t.get("NW").keys == ("p1(NW)", "p2(NW)")
    assert t.get("TS").keys == ("e(TS)",)
    assert t.get("V").keys == ("c1(V)", "c2(V)", "c3(V)")
    assert t.get("L").keys == ("c1(L)",) and t.get("L").line and t.rank("L") == 1
    assert t.ring.generator_info("p2(T6)").degree == 8
    assert t.ring.generator_info("e(T6)").degree == 6


def test_euler_squared_is_top_pontryagin():
    # spec: for a real bundle of even rank 2n, e^2 is rewritten as p_n
    t = table(T4="real 4")
    e, p2 = t.euler("T4"), t.pontryagin("T4", 2)
    assert e * e == p2
    assert e ** 3 == e * p2          # degree 12 survives truncation
    assert [k for k, _ in (e * e + e).terms()[0][0]] == ["p2(T4)"]


def test_plane_p1_is_e_squared():
    # spec: for an oriented plane p1 = e^2
    t = table(TS="real 2")
    assert t.pontryagin("TS", 1) == t.euler("TS") ** 2


def test_classes_beyond_rank_and_wrong_kind_are_errors():
    t = table(NW="real 5", V="complex 3", R1="real 1")
    for bad in (lambda: t.pontryagin("NW", 3), lambda: t.euler("NW"), lambda: t.chern("NW", 1),
                lambda: t.total_chern("NW"), lambda: t.chern("V", 4), lambda: t.pontryagin("V", 4),
                lambda: t.pontryagin("R1", 1), lambda: t.pontryagin("NW", 0)):
        with pytest.raises(AlgebraError):
            bad()
    with pytest.raises(AlgebraError, match="rank"):
        t.declare("X", "real", 0)
    with pytest.raises(AlgebraError, match="kind"):
        t.declare("Y", "quaternionic", 2)
    with pytest.raises(AlgebraError, match="already"):
        t.declare("V", "real", 2)


def test_complex_bundle_pontryagin_and_euler():
    # Milnor–Stasheff, "Characteristic Classes", 1974, Cor. 15.5: sum (-1)^k p_k = c(V) c(dual V)
    # hence p1 = c1^2 - 2 c2, p2 = c2^2 - 2 c1 c3 + 2 c4; and e(V_R) = c_n (ibid. §14, where the
    # top Chern class is defined as the Euler class; from memory)
    t = table(16, V="complex 4")
    c = [None] + [t.chern("V", k) for k in range(1, 5)]
    assert t.pontryagin("V", 1) == c[1] ** 2 - 2 * c[2]
    assert t.pontryagin("V", 2) == c[2] ** 2 - 2 * c[1] * c[3] + 2 * c[4]
    assert t.euler("V") == c[4]
    t.declare("L", "line")
    assert t.pontryagin("L", 1) == t.chern("L", 1) ** 2 and t.euler("L") == t.chern("L", 1)


def test_split_rewrites_classes_in_the_parts():
    # spec example: split NW = L1 + L2 + trivial(1) gives p(NW) = (1 + c1(L1)^2)(1 + c1(L2)^2)
    t = table(NW="real 5", L1="line", L2="line")
    t.split("NW", ["L1", "L2", Trivial(1)])
    x1, x2 = t.chern("L1", 1), t.chern("L2", 1)
    assert t.total_pontryagin("NW") == (1 + x1 ** 2) * (1 + x2 ** 2)
    assert t.pontryagin("NW", 2) == x1 ** 2 * x2 ** 2
    assert not (t.pontryagin("NW", 1).generator_keys() & {"p1(NW)", "p2(NW)"})
    assert t.parts("NW") is not None and t.get("L1").used


def test_split_euler_class():
    # common practice, no source: e is multiplicative on Whitney sums; a trivial summand kills it
    t = table()
    for name, rank in (("T6", 6), ("T4", 4), ("TS", 2), ("T8", 8), ("T7", 7), ("T3", 3)):
        t.declare(name, "real", rank)
    t.split("T6", ["T4", "TS"])
    assert t.euler("T6") == t.euler("T4") * t.euler("TS")
    assert t.pontryagin("T6", 1) == t.pontryagin("T4", 1) + t.euler("TS") ** 2
    assert t.euler("T6") ** 2 == t.pontryagin("T6", 3)
    t.split("T8", ["T7", Trivial(1)])
    assert t.euler("T8").is_zero
    t.declare("T10", "real", 10)
    t.split("T10", ["T7", "T3"])
    assert t.euler("T10").is_zero


def test_split_complex_into_lines():
    # Milnor–Stasheff 1974, Whitney product formula (§14): c(V + W) = c(V) c(W)
    t = table(V="complex 3")
    for k in (1, 2, 3):
        t.declare(f"L{k}", "line")
    t.split("V", ["L1", "L2", "L3"])
    x = [t.chern(f"L{k}", 1) for k in (1, 2, 3)]
    assert t.chern("V", 2) == x[0] * x[1] + x[0] * x[2] + x[1] * x[2]
    assert t.euler("V") == x[0] * x[1] * x[2]


def test_split_errors():
    t = table(T6="real 6", T4="real 4", V="complex 2", L="line")
    with pytest.raises(AlgebraError, match="do not add up"):
        t.split("T6", ["T4", Trivial(1)])
    with pytest.raises(AlgebraError, match="complex"):
        t.split("V", ["T4"])
    with pytest.raises(AlgebraError, match="unknown bundle"):
        t.split("T6", ["T4", "TS"])
    t.pontryagin("T4", 1)
    with pytest.raises(AlgebraError, match="already in use"):
        t.split("T4", ["L", "L"])
    t.split("V", ["L", Trivial(1)])
    with pytest.raises(AlgebraError, match="already split"):
        t.split("V", ["L", "L"])
    t.declare("A", "real", 2)
    t.declare("B", "real", 2)
    t.split("A", ["B"])
    with pytest.raises(AlgebraError, match="built from"):
        t.split("B", ["A"])


def test_nested_split_uses_the_deepest_parts():
    t = table(T6="real 6", T4="real 4", TS="real 2", L1="line", L2="line")
    t.split("T6", ["T4", "TS"])
    t.split("T4", ["L1", "L2"])
    assert t.euler("T6") == t.chern("L1", 1) * t.chern("L2", 1) * t.euler("TS")


@settings(max_examples=25, deadline=None)
@given(st.lists(st.integers(1, 6), min_size=1, max_size=3))
def test_pontryagin_is_multiplicative_on_splits(ranks):
    # Milnor–Stasheff 1974, Thm. 15.3: p(E + F) = p(E) p(F) modulo 2-torsion
    t, names = whitney_sum(ranks)
    prod = t.ring.one()
    for n in names:
        prod = prod * t.total_pontryagin(n)
    assert t.total_pontryagin("B") == prod
