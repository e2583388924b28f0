"""Anomaly polynomials from field content (the matter statement), each against a source."""
from __future__ import annotations


import pytest

from support import build_snippet


def test_each_line_contributes_and_the_sum_is_bound(tmp_path, capsys):
    # Alvarez-Gaume and Witten, "Gravitational anomalies", Nucl. Phys. B234 (1984): a Weyl
    # fermion in four dimensions gives [Ahat ch]_6, so a charge-q fermion has q^3/6 c1^3 - q/24 p1 c1
    body = "\n".join(["bundle T: real, rank 4", "bundle L: line",
                      "matter I6: dimension 4, tangent T",
                      "  weyl+ 3 charges L: 2",
                      "  weyl- charges L: 1",
                      "check I6 == 3*(8/6*c1(L)^3 - 2/24*p1(T)*c1(L)) - (1/6*c1(L)^3 - 1/24*p1(T)*c1(L))"])
    status, err, record = build_snippet(tmp_path, capsys, body, truncate=6)
    assert status == 0, err
    step = record["steps"][2]
    assert [v["name"] for v in step["values"]] == ["I6_weyl+", "I6_weyl-", "I6"]
    assert "anomaly polynomial of 2 kinds of fields in 4 dimensions" in step["summary"]


def test_type_iib_is_free_of_gravitational_anomalies(tmp_path, capsys):
    # Alvarez-Gaume and Witten (1984): gravitino, dilatino of the other chirality and the
    # self-dual four-form (density -L/8) cancel in ten dimensions
    body = "\n".join(["bundle T: real, rank 10", "matter IIB: dimension 10, tangent T",
                      "  gravitino+", "  weyl-", "  selfdual+", "check IIB == 0"])
    status, err, _ = build_snippet(tmp_path, capsys, body, truncate=12)
    assert status == 0, err


def test_two_zero_tensor_multiplet(tmp_path, capsys):
    # the free (2,0) tensor multiplet: I8 = (p1^2 - 4 p2)/192 with trivial normal bundle
    # (Harvey, Minasian and Moore, "Non-abelian tensor-multiplet anomalies", JHEP 1998)
    body = "\n".join(["bundle T: real, rank 6", "matter Z8: dimension 6, tangent T", "  tensor20",
                      "check Z8 == (p1(T)^2 - 4*p2(T))/192"])
    status, err, _ = build_snippet(tmp_path, capsys, body)
    assert status == 0, err


def test_two_dimensional_chiral_and_fermi_multiplets(tmp_path, capsys):
    # 2d (0,2): a chiral multiplet of R-charge r has a right-moving fermion of charge r - 1, a
    # Fermi multiplet a left-moving one of charge r (common practice, no source); a chiral and a
    # Fermi multiplet of the same charges (a massive pair) leave nothing but the R-anomaly of the
    # shift by one unit
    body = "\n".join(["bundle T: real, rank 2", "bundle R: line", "symbol r",
                      "matter I4: dimension 2, tangent T, R_symmetry R",
                      "  chiral charges R: r", "  fermi charges R: r - 1", "check I4 == 0"])
    status, err, _ = build_snippet(tmp_path, capsys, body, truncate=4)
    assert status == 0, err


BAD = [
    ("matter I: dimension 6, tangent T\n  hyper in (T, adjoint)", 11, "'T' is not a gauge bundle"),
    ("matter I: dimension 4, tangent T\n  tensor", 11, "no field 'tensor' in 4 dimensions"),
    ("matter I: dimension 6, tangent T, R_symmetry L\n  hyper", 10,
     "the R-symmetry of 6-dimensional multiplets is a gauge bundle of SU(2)"),
    ("matter I: dimension 6, tangent T\n  selfdual+ in V", 11, "a self-dual form sits in no representation"),
    ("matter I: dimension 6, tangent T\n  weyl+ charges V: 1", 11, "charges are under line bundles"),
    ("matter I: dimension 6, tangent T\n  weyl+ p1(T)", 11, "a multiplicity is a number"),
    ("bundle G: gauge SU(3)\nmatter I: dimension 6, tangent T\n  hyper in (G, spinor)", 12,
     "SU(3) has no spinor representation"),
]


@pytest.mark.parametrize("body, line, message", BAD, ids=[b[2] for b in BAD])
def test_bad_field_content_is_an_error_at_its_field_line(tmp_path, capsys, body, line, message):
    head = "bundle T: real, rank 6\nbundle L: line\nbundle V: complex, rank 2\n"
    status, err, _ = build_snippet(tmp_path, capsys, head + body)
    assert status == 2, err
    # line: where the problem is in the file (the header 10, its first field 11)
    assert f"doc.md:{line}:" in err and message in err, err


@pytest.mark.parametrize("body, message", [
    ("matter I: dimension 5, tangent T\n  weyl+", "anomalies of chiral fields live in even dimensions"),
    ("matter I: dimension 6\n  weyl+", "name the tangent bundle"),
    ("matter I: dimension 6, tangent T\n  weyl+ in (G, adjont)", "did you mean 'adjoint'?"),
    ("matter I: dimension 6, tangent X\n  weyl+", "unknown name 'X'"),
])
def test_bad_matter_syntax_is_refused_before_building(tmp_path, capsys, body, message):
    status, err, record = build_snippet(tmp_path, capsys, "bundle T: real, rank 6\n" + body)
    assert status == 2 and message in err and record is None, err


def test_the_parser_knows_every_kind_of_field():
    from compiler.algebra import anomalies
    from compiler.statements.matter import FIELD_WORDS
    kinds = set(anomalies.FIELDS) | {k for table in anomalies.MULTIPLETS.values() for k in table}
    assert {k.rstrip("+-") for k in kinds} == set(FIELD_WORDS)


def test_an_unknown_kind_of_field_is_refused_with_a_suggestion(tmp_path, capsys):
    status, err, record = build_snippet(tmp_path, capsys, "bundle T: real, rank 6\n"
                                        "matter I: dimension 6, tangent T\n  hypr 2")
    assert status == 2 and record is None and "did you mean 'hyper'?" in err, err
