"""General fibers given by any top-degree integrals (issue 12, item 6): the
compiler solves for the integrals of the standard monomials, and inconsistent
or insufficient data is a located error."""
from __future__ import annotations

import pytest

from tests.support import compile_text


def compile_doc(tmp_path, *lines: str):
    return compile_text(tmp_path / "doc.md", "```derive\n" + "\n".join(lines) + "\n```\n")


def failures(report):
    return [(s.line, c.detail) for s in report.steps for c in s.checks if c.status != "proven"]


def test_cp2(tmp_path):
    # H*(CP^2) = Q[x]/(x^3), ∫ x^2 = 1; c(T) = (1 + x)^3 gives χ = 3 and
    # p1 = 3x^2 gives σ = 1 (Hirzebruch signature theorem; common practice, no source).
    report = compile_doc(tmp_path, "fiber CP2: dimension 4", "  class x: 2",
                         "  relation x^3 = 0", "  integral x^2 = 1",
                         "integrate part((1 + x)^3, 4) over CP2 -> chi",
                         "integrate 3*x^2/3 over CP2 -> sigma",
                         "check chi == 3", "check sigma == 1")
    assert report.passed, failures(report)


# The Hirzebruch surface F_n = P(O + O(-n)) over P^1, with f the class of a
# fiber and s the section of self-intersection -n: f^2 = 0, s^2 = -n s.f and
# the point class s.f = 1; c1 = 2s + (n + 2)f, so c1^2 = K^2 = 8, and
# c2 = χ = 4 (Griffiths and Harris, "Principles of Algebraic Geometry", 1978,
# ch. 4.3; common practice).
@pytest.mark.parametrize("order", [("f", "s"), ("s", "f")])
def test_hirzebruch_surface_from_its_point_class(tmp_path, order):
    report = compile_doc(tmp_path, "symbol n: integer, n >= 0", "fiber Fn: dimension 4",
                         *[f"  class {c}: 2" for c in order],
                         "  relation f^2 = 0", "  relation s^2 = -n*s*f", "  integral s*f = 1",
                         "integrate (2*s + (n + 2)*f)^2 over Fn -> K2",
                         "integrate s^2 over Fn -> self",
                         "check K2 == 8", "check self == -n")
    assert report.passed, failures(report)


# The Grassmannian G(2,4) with x = σ1, y = σ11 (c(S*) = 1 + x + y): the
# relations make (1 + x + y)^(-1) vanish in degrees 6 and 8, and σ11^2 is the
# point class; then ∫ σ1^4 = 2 (the degree of G(2,4)) and ∫ σ1^2 σ11 = 1
# (Griffiths and Harris 1978, ch. 1.5, Schubert calculus).
G24 = ("fiber G24: dimension 8", "  class x: 2", "  class y: 4",
       "  relation x^3 = 2*x*y", "  relation x^4 - 3*x^2*y + y^2 = 0")


def test_grassmannian_from_its_point_class(tmp_path):
    report = compile_doc(tmp_path, *G24, "  integral y^2 = 1",
                         "integrate x^4 over G24 -> deg", "integrate x^2*y over G24 -> m",
                         "check deg == 2", "check m == 1")
    assert report.passed, failures(report)


def test_several_consistent_integrals_are_accepted(tmp_path):
    report = compile_doc(tmp_path, *G24, "  integral y^2 = 1", "  integral x^4 = 2",
                         "  integral x^2*y = 1", "integrate x^4 over G24 -> deg", "check deg == 2")
    assert report.passed, failures(report)


def test_an_inconsistent_integral_is_located_at_its_line(tmp_path):
    report = compile_doc(tmp_path, *G24, "  integral y^2 = 1", "  integral x^4 = 3")
    step = report.steps[0]
    assert step.status == "error"
    assert "x^4 is given 3, but the integrals before it (with the relations) give 2" in \
        step.checks[-1].detail
    assert any(":8:12: inconsistent integrals over G24" in d for d in report.diagnostics), \
        report.diagnostics


def test_insufficient_integrals_name_what_is_undetermined(tmp_path):
    # with no relation, a^2, a*b and b^2 are all standard: one integral leaves two
    report = compile_doc(tmp_path, "fiber Q: dimension 4", "  class a: 2", "  class b: 2",
                         "  integral a*b = 1")
    assert "the fiber Q needs the integral of a^2, b^2" in report.steps[0].checks[-1].detail


def test_an_integral_that_fixes_only_a_combination_is_not_enough(tmp_path):
    # b^2 = a*b + a^2: the integral of b^2 fixes the sum of the other two only
    report = compile_doc(tmp_path, "fiber Q: dimension 4", "  class a: 2", "  class b: 2",
                         "  relation b^2 = a*b + a^2", "  integral b^2 = 1")
    detail = report.steps[0].checks[-1].detail
    assert "needs the integral of 1 more top-degree monomial: the integrals given leave" in detail
    assert "a*b" in detail and "a^2" in detail
