"""Gauge bundles, representations, chiral spinors and factorization, each against a source."""
from __future__ import annotations

from fractions import Fraction as Q

import pytest

from compiler.algebra import gauge, genera
from compiler.algebra.bundles import BundleTable
from compiler.algebra.errors import AlgebraError
from compiler.algebra.factor import factorize
from compiler.algebra.graded import Ring
from compiler.algebra.groups import group
from compiler.algebra.weights import GroupError
from support import build_snippet


def ten_dimensional(*groups, index=None):
    """1/2 [Ahat(T)(ch(T) - 2 + sum ch_adj)]_12: gravitino, dilatino, gauginos (Alvarez-Gaume
    and Witten, "Gravitational anomalies", Nucl. Phys. B234, 1984)."""
    ring = Ring([], 12)
    table = BundleTable(ring)
    table.declare("T", "real", 10)
    ahat = genera.ahat(table, "T")
    bundles = [gauge.declare(ring, f"G{i}", group(*g), index) for i, g in enumerate(groups)]
    gauginos = sum((gauge.character(ring, b, ("adjoint", None)) for b in bundles), ring.zero())
    return ring, bundles, (ahat * (genera.chern_character(table, "T") - 2 + gauginos)).part(12) / 2


# Green and Schwarz, "Anomaly cancellations in supersymmetric D = 10 gauge theory and
# superstring theory", Phys. Lett. B149 (1984): SO(32) and E8 x E8 factorize
@pytest.mark.parametrize("groups", [[("SO", 32)], [("E8",), ("E8",)]], ids=["SO(32)", "E8xE8"])
def test_ten_dimensional_polynomial_factorizes(groups):
    ring, bundles, i12 = ten_dimensional(*groups, index=Q(2))
    result = factorize(i12, (4, 8))
    x4, x8 = result.factors
    assert x4 * x8 == i12
    assert x4.degrees() == [4] and x8.degrees() == [8]
    # X4 ~ tr R^2 - sum tr F^2 in the traces of Dynkin index 2 (the vector of SO(32),
    # Tr/30 of E8), with tr R^2 = 2 p1 in the curvature normalisation of ch
    trace_sum = sum((ring.gen(f"tr(G{i}, 2)") for i in range(len(bundles))), ring.zero())
    assert x4 == x4.coefficient(ring.gen("tr(G0, 2)")) * (trace_sum - 2 * ring.gen("p1(T)"))


# Green and Schwarz (1984): a group of dimension 496 other than these does not factorize; a
# single E8 (dimension 248) leaves an irreducible tr R^6 (Alvarez-Gaume and Witten, 1984)
@pytest.mark.parametrize("groups", [[("SO", 30)], [("E8",)], [("SU", 5)]])
def test_other_groups_do_not_factorize_and_show_the_obstruction(groups):
    _, _, i12 = ten_dimensional(*groups)
    result = factorize(i12, (4, 8))
    assert result.factors is None
    assert [(d, m) for _, d, m in result.irreducible] == [(12, 1)]
    assert result.irreducible[0][0] * result.content == i12


def test_factorize_refuses_a_mixed_degree_or_wrong_degrees():
    ring, _, i12 = ten_dimensional(("SO", 32))
    with pytest.raises(AlgebraError, match="do not add up"):
        factorize(i12, (4, 4))
    with pytest.raises(AlgebraError, match="homogeneous"):
        factorize(i12 + ring.gen("p1(T)"), (2, 2))


def test_factorize_finds_repeated_factors():
    # common practice, no source: (a + b)^2 (a - b) = X4 * X8 with X4 = a + b or a - b
    ring = Ring([], 12)
    a = ring.generator("a", 4)
    b = ring.generator("b", 4)
    value = (a + b) ** 2 * (a - b) * 3
    x4, x8 = factorize(value, (4, 8)).factors
    assert x4 * x8 == value and x4.degrees() == [4]


def test_trace_index_changes_the_trace_in_force():
    # Green, Schwarz and Witten vol. 2 (1987): for E8, tr = Tr/30 has Tr F^4 = (Tr F^2)^2/100,
    # so tr F^4 = 9/30 (tr F^2)^2; in the adjoint trace itself the factor is 1/100
    for index, factor in ((2, Q(3, 10)), (60, Q(1, 100))):
        ring = Ring([], 8)
        bundle = gauge.declare(ring, "E", group("E8"), Q(index))
        assert gauge.trace_in_force(ring, bundle, 4) == ring.gen("tr(E, 2)") ** 2 * factor


def test_symbolic_rank_agrees_with_numeric_rank():
    # independent computations: Adams operations at symbolic N, weight systems at N = 6
    # (the SU(N) adjoint: Tr F^4 = 2N tr F^4 + 6 (tr F^2)^2, van Ritbergen, Schellekens and
    # Vermaseren, Int. J. Mod. Phys. A14, 1999)
    import sympy
    n = sympy.Symbol("N", integer=True)
    ring = Ring([n], 12)
    symbolic = gauge.declare(ring, "H", group("SU"), None, ring.symbol(n))
    numeric = gauge.declare(ring, "G", group("SU", 6), None)
    for name in ("adjoint", "antisymmetric", "symmetric"):
        left = gauge.character(ring, symbolic, (name, None)).substitute({n: ring.scalar(6)})
        right = gauge.character(ring, numeric, (name, None))
        renamed = right.substitute({f"tr(G, {k})": ring.gen(f"tr(H, {k})") for k in range(2, 7)})
        assert left == renamed, name
    assert gauge.trace(ring, symbolic, ("adjoint", None), 4) == (
        2 * ring.symbol(n) * ring.gen("tr(H, 4)") + 6 * ring.gen("tr(H, 2)") ** 2)


def test_chiral_spinors():
    # ch(S+) - ch(S-) = prod 2 sinh(x_i/2) = e / Ahat, ch(S+) + ch(S-) = prod 2 cosh(x_i/2);
    # each of rank 2^(m-1) (Lawson and Michelsohn, Spin Geometry, 1989, from memory)
    ring = Ring([], 12)
    table = BundleTable(ring)
    table.declare("B", "real", 8)
    plus = genera.BundleValue.chiral(table, "B", 1)
    minus = genera.BundleValue.chiral(table, "B", -1)
    assert plus.rank == minus.rank == 8
    assert (plus.ch - minus.ch) * genera.ahat(table, "B") == table.euler("B")
    assert plus.ch + minus.ch == genera.BundleValue.spinor(table, "B").ch
    table.declare("C", "real", 5)
    with pytest.raises(AlgebraError, match="even rank"):
        genera.BundleValue.chiral(table, "C", 1)


def test_gauge_bundles_need_traces_up_to_the_truncation():
    with pytest.raises(GroupError, match="truncate <= 24"):
        gauge.declare(Ring([], 28), "G", group("SU", 3), None)


# ---------------------------------------------------------------- through the command line

BAD = [
    ("bundle G: gauge E9", 7, "unknown group 'E9'; known groups: SU, SO, Sp, G2, F4, E6, E7, E8"),
    ("bundle G: gauge Su(3)", 7, "unknown group 'Su'; did you mean SU?"),
    ("symbol N: integer\nbundle G: gauge E8(N)", 8, "E8 has a fixed rank"),
    ("symbol x: real\nbundle G: gauge SU(x)", 8, "must be a symbol declared integer"),
    ("bundle G: gauge SO(4)", 7, "SO(4) is not simple"),
    ("bundle G: gauge E8\nshow ch(G, [1, 0])", 8, "E8 has rank 8: give 8 non-negative integer"),
    ("bundle G: gauge SU(5)\nshow ch(G, spinor)", 8, "SU(5) has no spinor representation"),
    ("symbol N: integer\nbundle G: gauge SU(N)\nshow ch(G, [1, 0])", 9, "symbolic rank"),
    ("bundle G: gauge E8\nshow ch(G, [9, 9, 9, 9, 9, 9, 9, 9])", 8, "above the limit"),
    ("bundle G: gauge SU(5)\nshow ch(G)", 8, "give a representation, as in ch(G, adjoint)"),
    ("bundle G: gauge SU(5)\nshow p1(G)", 8, "'G' is a gauge"),
    ("bundle G: gauge SU(5)\nfactorize tr(G, 2) + tr(G, 3) into 2, 2 -> a, b", 8, "homogeneous"),
    ("bundle B: real, rank 5\nshow ch(S+(B))", 8, "even rank"),
    ("bundle G: gauge SU(5)\nshow tr(G, adjoint)", 8, "give the power too, as in tr(G, adjoint, 2)"),
]


@pytest.mark.parametrize("body, line, message", BAD, ids=[b[2] for b in BAD])
def test_bad_input_is_a_located_error(tmp_path, capsys, body, line, message):
    status, err, _ = build_snippet(tmp_path, capsys, body)
    assert status == 2, err
    assert f"doc.md:{line}:" in err and message in err, err
    assert "Traceback" not in err and "internal error" not in err


@pytest.mark.parametrize("body, message", [
    ("bundle G: gauge SU(65)", "the rank is at most 64"),
    ("bundle G: gauge SU(5)\nshow ch(G, adjoint, 2)", "ch() takes 1 or 2 arguments"),
    ("bundle G: gauge SU(5), index x\n", "unknown name 'x'"),
    ("bundle G: gauge SU(5)\nshow ch(G, adjont)", "did you mean 'adjoint'?"),
    ("bundle G: gauge SU(5)\nshow tr(G, adjont, 2)", "did you mean 'adjoint'?"),
    ("bundle G: gauge SU(5)\nshow ch(G, 2)", "expected a representation"),
    ("let x = 1\nfactorize x into 4 -> a", "give the form degrees of 2 factors"),
])
def test_bad_syntax_is_refused_before_building(tmp_path, capsys, body, message):
    status, err, record = build_snippet(tmp_path, capsys, body)
    assert status == 2 and message in err and record is None, err


def test_a_class_that_does_not_factorize_fails_with_the_obstruction(tmp_path, capsys):
    body = "bundle G: gauge SU(5)\nfactorize tr(G, 2)^2 + tr(G, 4) into 4, 4 -> a, b\nshow a"
    status, err, record = build_snippet(tmp_path, capsys, body)
    assert status == 2  # the failed step leaves a without a value, so 'show a' is an error
    step = record["steps"][1]
    assert step["checks"][0]["status"] == "failed"
    assert "tr(G, 4) + tr(G, 2)^2" in step["checks"][0]["detail"]


def test_the_trace_convention_is_stated_and_set_changes_it(tmp_path, capsys):
    # Green, Schwarz and Witten vol. 2 (1987): E8 Tr F^4 = (Tr F^2)^2/100 in the adjoint
    body = "convention t = 2\nbundle E: gauge E8, index t\nlet q = tr(E, 4)"
    status, err, record = build_snippet(tmp_path, capsys, body)
    assert status == 0, err
    assert "Dynkin index 2" in record["steps"][1]["summary"]
    assert record["values"]["q"]["text"] == "3/10*tr(E, 2)^2"
    status, err, record = build_snippet(tmp_path, capsys, body, "--set", "t=60")
    assert status == 0, err
    assert "convention t = 60" in record["steps"][1]["summary"]
    assert record["values"]["q"]["text"] == "1/100*tr(E, 2)^2"


def test_classes_of_constructions(tmp_path, capsys):
    body = "\n".join([
        "bundle V: complex, rank 3", "bundle W: complex, rank 2", "bundle B: real, rank 4",
        # Whitney product formula (Milnor and Stasheff, Characteristic Classes, 1974, section 14)
        "check c(V + W) == c(V)*c(W)",
        "check p(B + B) == p(B)^2",
        "check e(V + W) == c3(V)*c2(W)",
        # c1 of a tensor product and of a dual (Milnor and Stasheff 1974, section 14)
        "check c1(V*W) == 2*c1(V) + 3*c1(W)",
        "check c(dual(V)) == 1 - c1(V) + c2(V) - c3(V)",
        # c2 of wedge^2 of a rank-3 bundle, wedge^2 V = dual(V) (x) det V (common practice, no source)
        "check c2(wedge(V, 2)) == c1(V)^2 + c2(V)",
        # p1 of wedge^2 of a real rank-n bundle is (n - 2) p1 (common practice, no source)
        "check p1(wedge(B, 2)) == 2*p1(B)",
        "check p1(V + W) == p1(V) + p1(W)",
        "show e(wedge(B, 2))",
    ])
    status, err, record = build_snippet(tmp_path, capsys, body)
    assert status == 2 and "doc.md:18:" in err and "not determined by its Chern character" in err, err
    assert all(c["status"] == "proven" for s in record["steps"][3:-1] for c in s["checks"])


def test_symbolic_and_exceptional_traces_through_the_language(tmp_path, capsys):
    body = "\n".join([
        "symbol N: integer, N >= 3",
        "bundle A: gauge SO(N)", "bundle C: gauge Sp(N)", "bundle E: gauge E6",
        # adjoint indices 2 h^vee: SO(N) h = N - 2 (vector index 2), Sp(N) h = N + 1 (fundamental
        # index 1) (van Ritbergen, Schellekens and Vermaseren, Int. J. Mod. Phys. A14, 1999)
        "check tr(A, adjoint, 2) == (N - 2)*tr(A, 2)",
        "check tr(C, adjoint, 2) == (2*N + 2)*tr(C, 2)",
        # E6: the odd Casimirs are traces in the 27, its conjugate has the opposite odd traces,
        # and the adjoint, a real representation, has none (common practice, no source)
        "check tr(E, fundamental, 5) + tr(E, antifundamental, 5) == 0",
        "check tr(E, adjoint, 5) == 0",
        "check part(ch(E, fundamental), 0) == 27",
        "show tr(E, fundamental, 5)",
    ])
    status, err, record = build_snippet(tmp_path, capsys, body, truncate=10)
    assert status == 0, err
    # the odd invariant is a generator of its own, and its text reads back
    assert record["steps"][-1]["values"][0]["text"] == "tr(E, fundamental, 5)"


def test_a_fractional_rank_is_refused(tmp_path, capsys):
    status, err, record = build_snippet(tmp_path, capsys, "bundle G: gauge SU(5/2)")
    assert status == 2 and record is None and "the rank of a group is a whole number" in err, err


def test_the_curvature_factor_is_a_convention(tmp_path, capsys):
    # ch = tr exp(c F): with c = -1 the odd Chern characters change sign (common practice,
    # no source: the sign between Hermitian and anti-Hermitian curvatures)
    body = "\n".join(["convention s = 1", "bundle G: gauge SU(5), index 1, curvature s",
                      "let odd = part(ch(G, fundamental), 6)", "let even = part(ch(G, fundamental), 4)"])
    for value, sign in (("1", ""), ("-1", "-")):
        status, err, record = build_snippet(tmp_path, capsys, body, "--set", f"s={value}")
        assert status == 0, err
        assert record["values"]["odd"]["text"] == f"{sign}1/6*tr(G, 3)"
        assert record["values"]["even"]["text"] == "1/2*tr(G, 2)"
        assert f"convention s = {value}" in record["steps"][1]["summary"]
    status, err, _ = build_snippet(tmp_path, capsys, "bundle G: gauge SU(5), curvature 0")
    assert status == 2 and "must not be zero" in err, err
    status, err, _ = build_snippet(tmp_path, capsys, "bundle G: gauge SU(5), index 1, index 2")
    assert status == 2 and "'index' is given twice" in err, err
