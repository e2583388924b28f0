"""Bundles of symbolic rank: classes from ch components, exact for every rank.

The symbolic-rank results are checked against the numeric-rank bundle
computation at N = 1..4 (the ch_k(V) specialised to the ch_k of a rank-n
bundle), against Newton's identities, and in the SQCD document
(derivations/sqcd-matching.md) against Seiberg's anomaly matching.
"""
from __future__ import annotations

from math import factorial

import pytest
import sympy

from support import assert_proven, compile_text
from compiler.algebra.bundles import BundleTable
from compiler.algebra.errors import AlgebraError
from compiler.algebra.genera import BundleValue, ahat, chern_character, hirzebruch_l, todd
from compiler.algebra.graded import Ring
from compiler.errors import DocumentError

N = sympy.Symbol("N", integer=True, positive=True)
TRUNCATE = 8


def pair(n: int, kind: str, truncate: int = TRUNCATE) -> BundleTable:
    """V of symbolic rank N and W of numeric rank n, of the same kind, in one ring."""
    t = BundleTable(Ring([N], truncate))
    t.declare_symbolic("V", kind, N)
    t.declare("W", kind, n)
    t.declare("Y", "complex", 2)   # a numeric-rank bundle to combine with
    return t


def at_rank(t: BundleTable, x, n: int):
    """A symbolic-rank value specialised to W: ch_k(V) -> ch_k(W), N -> n."""
    ch_w = chern_character(t, "W")
    mapping = {key: ch_w.part(2 * int(key[2:key.index("(")])) for key in t.get("V").keys}
    mapping[N] = n
    return x.substitute(mapping)


def value(t, name):
    return BundleValue.of(t, name)


COMPLEX_CASES = {
    "c": lambda t, b: t.total_chern(b),
    "p": lambda t, b: t.total_pontryagin(b),
    "ch": lambda t, b: value(t, b).ch,
    "dual": lambda t, b: value(t, b).dual().ch,
    "wedge2": lambda t, b: value(t, b).wedge(2).ch,
    "sym2": lambda t, b: value(t, b).sym(2).ch,
    "wedge3": lambda t, b: value(t, b).wedge(3).ch,
    "adjoint": lambda t, b: (value(t, b) * value(t, b).dual()).ch,
    "td": lambda t, b: todd(t, b),
    "Ahat": lambda t, b: ahat(t, b),
    "L": lambda t, b: hirzebruch_l(t, b),
    "nested": lambda t, b: (value(t, b).sym(2).wedge(2) * value(t, b).dual() + value(t, b)).ch,
    "with a numeric bundle": lambda t, b: (value(t, b) * value(t, "Y").dual()
                                           + value(t, b).wedge(2) * value(t, "Y")).ch,
}

REAL_CASES = {
    "p": lambda t, b: t.total_pontryagin(b),
    "ch": lambda t, b: value(t, b).ch,
    "wedge2": lambda t, b: value(t, b).wedge(2).ch,
    "sym2": lambda t, b: value(t, b).sym(2).ch,
    "Ahat": lambda t, b: ahat(t, b),
    "L": lambda t, b: hirzebruch_l(t, b),
    "with a numeric bundle": lambda t, b: (value(t, b) * value(t, "Y")).ch,
}


CASES = {"complex": COMPLEX_CASES, "real": REAL_CASES}


@pytest.mark.parametrize("n", [1, 2, 3, 4])
@pytest.mark.parametrize("kind, case", [(kind, case) for kind in CASES for case in sorted(CASES[kind])])
def test_symbolic_rank_agrees_with_numeric_rank(n, kind, case):
    # common practice, no source: one formula for every rank must agree with the
    # numeric-rank computation (Chern roots, Newton's identities) at each rank;
    # real bundles are complexified in ch.
    t = pair(n, kind)
    f = CASES[kind][case]
    assert at_rank(t, f(t, "V"), n) == f(t, "W")


@pytest.mark.parametrize("n", [1, 2, 3])
def test_chern_classes_beyond_the_rank_vanish_at_that_rank(n):
    # common practice, no source: c_k is e_k of the roots, zero for k above the rank;
    # the symbolic c_k exists for every k and specialises to 0 there.
    t = pair(n, "complex")
    for k in range(1, TRUNCATE // 2 + 1):
        expected = t.chern("W", k) if k <= n else t.ring.zero()
        assert at_rank(t, t.chern("V", k), n) == expected, k
    assert not t.chern("V", n + 1).is_zero   # not zero before the rank is known


def test_newton_identities():
    # Newton's identities (common practice, no source): k c_k = sum_i (-1)^(i-1) c_(k-i) s_i
    # with power sums s_i = i! ch_i.
    t = BundleTable(Ring([N], 10))
    t.declare_symbolic("V", "complex", N)
    ring = t.ring
    c = [ring.one()] + [t.chern("V", k) for k in range(1, 6)]
    s = [None] + [ring.gen(f"ch{i}(V)") * factorial(i) for i in range(1, 6)]
    for k in range(1, 6):
        rhs = sum((c[k - i] * s[i] * (-1) ** (i - 1) for i in range(1, k + 1)), ring.zero())
        assert c[k] * k == rhs, k
    # the same for the Pontryagin roots x_i^2 of a real bundle: p_k from P_i = (2i)!/2 ch_2i
    t.declare_symbolic("B", "real", N)
    p = [ring.one()] + [t.pontryagin("B", k) for k in (1, 2)]
    big = [None, ring.gen("ch2(B)"), ring.gen("ch4(B)") * 12]
    assert p[1] == big[1]
    assert p[2] * 2 == p[1] * big[1] - big[2]


def test_ranks_of_constructions_are_polynomials_in_n():
    # common practice, no source: rank wedge^k = C(N, k), rank sym^k = C(N+k-1, k), and
    # ch(V (x) V*) = N^2 + 2N ch_2 - ch_1^2 + ... (the roots x_i - x_j).
    t = BundleTable(Ring([N], TRUNCATE))
    t.declare_symbolic("V", "complex", N)
    v = value(t, "V")
    n_el = t.ring.symbol(N)
    for k in (1, 2, 3, 4):
        expected_wedge = sympy.expand(sympy.binomial(N, k).expand(func=True))
        expected_sym = sympy.expand(sympy.binomial(N + k - 1, k).expand(func=True))
        assert v.wedge(k).ch.part(0) == t.ring.scalar(expected_wedge)
        assert v.sym(k).ch.part(0) == t.ring.scalar(expected_sym)
        assert v.wedge(k).rank is None
    adj = (v * v.dual()).ch
    ch1, ch2 = t.ring.gen("ch1(V)"), t.ring.gen("ch2(V)")
    assert adj.part(0) == n_el ** 2
    assert adj.part(2).is_zero
    assert adj.part(4) == n_el * ch2 * 2 - ch1 ** 2
    assert (value(t, "V") * value(t, "V")).rank is None


def test_what_needs_a_numeric_rank_is_refused():
    t = BundleTable(Ring([N], TRUNCATE))
    t.declare_symbolic("V", "complex", N)
    t.declare_symbolic("B", "real", N)
    t.declare("L", "line")
    for call in (lambda: t.euler("V"), lambda: t.euler("B"), lambda: t.rank("V"),
                 lambda: t.real_rank("B"), lambda: BundleValue.spinor(t, "B"),
                 lambda: t.split("V", ["L"])):
        with pytest.raises(AlgebraError, match="needs a numeric rank"):
            call()
    with pytest.raises(AlgebraError, match="real bundle"):
        t.chern("B", 1)
    with pytest.raises(AlgebraError, match="symbolic rank is real or complex"):
        t.declare_symbolic("M", "line", N)


DOC = """---
title: t
truncate: 6
---

```derive
{body}
```
"""


def test_rank_symbol_must_be_a_nonnegative_integer(tmp_path):
    report = compile_text(tmp_path / "a.md", DOC.format(
        body="symbol N: integer\nbundle V: complex, rank N"))
    assert any(":8:25: the rank N must be a symbol declared integer and nonnegative" in d
               for d in report.diagnostics), report.diagnostics
    with pytest.raises(DocumentError, match="unknown name 'M'"):
        compile_text(tmp_path / "b.md", DOC.format(body="bundle V: complex, rank M"))
    with pytest.raises(DocumentError, match="a line bundle has rank 1"):
        compile_text(tmp_path / "c.md", DOC.format(
            body="symbol N: integer, positive\nbundle V: line, rank N"))


def test_ch_components_are_written_as_ch_k(tmp_path):
    # common practice, no source: ch_2(V (x) V*) = 2N ch_2(V) - ch_1(V)^2.
    report = compile_text(tmp_path / "a.md", DOC.format(body="\n".join([
        "symbol N: integer, positive",
        "bundle V: complex, rank N",
        "check ch2(V*dual(V)) == 2*N*ch2(V) - ch1(V)^2",
        "check c2(V) == ch1(V)^2/2 - ch2(V)",
        "coefficients ch(wedge(V, 2)) of ch1(V) -> k",
        "check k == N - 1",
    ])))
    assert not report.diagnostics, report.diagnostics


RQ_TEXT = "-(Nc - Nf)/Nf"


def test_sqcd_anomalies_match(bundled):
    record = bundled("sqcd-matching").record
    # Seiberg, "Electric-magnetic duality in supersymmetric non-Abelian gauge theories",
    # Nucl. Phys. B435 (1995), section 4: R_Q = 1 - Nc/Nf cancels the U(1)_R SU(Nc)^2 anomaly,
    # and SU(Nf)^3 and SU(Nf)^2 U(1)_R match between the electric and magnetic theories.
    assert record["values"]["RQ"]["text"] == RQ_TEXT
    assert_proven(record, "check kGGR == 0")
    assert_proven(record, "check kmGGR_dual == 0")
    assert_proven(record, "check k3 == Nc")
    assert_proven(record, "check k2R == -Nc^2/Nf")
    assert_proven(record, "check m3 == k3")
    assert_proven(record, "check m2R == k2R")
    assert_proven(record, "check mRRR == kRRR")
    assert_proven(record, "check mRgrav == kRgrav")
    assert_proven(record, "check I_mag == I_el")


def test_sqcd_a_wrong_r_charge_is_caught(tmp_path):
    # Seiberg 1995: any R-charge other than 1 - Nc/Nf leaves a mixed gauge anomaly.
    from support import DERIVATIONS
    text = (DERIVATIONS / "sqcd-matching.md").read_text(encoding="utf-8")
    assert "let RQ = 1 - Nc/Nf\n" in text
    report = compile_text(tmp_path / "wrong.md", text.replace("let RQ = 1 - Nc/Nf\n",
                                                               "let RQ = 1 - 2*Nc/Nf\n"))
    failed = " ".join(report.diagnostics)
    assert "check failed: kGGR == 0" in failed
    assert "check failed: m2R == k2R" in failed


def test_classes_from_the_chern_character_of_a_construction():
    # Whitney product formula (Milnor and Stasheff, "Characteristic Classes", 1974, §14):
    # c(W + Y) = c(W) c(Y), here read off the ch of the sum through Newton's identities.
    from compiler.algebra import symbolic_rank
    t = pair(3, "complex")
    total = (value(t, "W") + value(t, "Y")).ch
    assert symbolic_rank.total_chern(total) == t.total_chern("W") * t.total_chern("Y")
    assert symbolic_rank.total_pontryagin(total, real=False) == \
        t.total_pontryagin("W") * t.total_pontryagin("Y")
    with pytest.raises(AlgebraError, match="degree-0"):
        symbolic_rank.exp_nilpotent(t.ring.one())
