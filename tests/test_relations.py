"""Relations between symbols (issue 12, item 2): ``symbol Nf: integer, Nc < Nf < 3*Nc``
restricts sampling, the sign oracle of checks, extremization and ``for`` points."""
from __future__ import annotations

import pytest
import sympy

from compiler.engine.run import parse
from compiler.engine.scope import DocScope
from compiler.errors import DocumentError
from tests.support import compile_text

WINDOW = ("symbol Nc: integer, Nc >= 2", "symbol Nf: integer, Nc < Nf < 3*Nc")


def compile_doc(tmp_path, *lines: str):
    return compile_text(tmp_path / "doc.md", "```derive\n" + "\n".join(lines) + "\n```\n")


def scope_of(tmp_path, *lines: str) -> DocScope:
    path = str(tmp_path / "doc.md")
    document, blocks = parse(path, "```derive\n" + "\n".join(lines) + "\n```\n")
    return DocScope(path, document, [s for i in sorted(blocks) for s in blocks[i]], {})


def test_sampling_draws_inside_the_window(tmp_path):
    # the conformal window of SQCD (Seiberg, "Electric-magnetic duality in
    # supersymmetric non-Abelian gauge theories", 1994)
    scope = scope_of(tmp_path, *WINDOW)
    nc, nf = scope.specs["Nc"].symbol, scope.specs["Nf"].symbol
    points = scope.context(7).samples({nf})
    assert len(points) >= 20
    assert all(p[nc] >= 2 and p[nc] < p[nf] < 3 * p[nc] for p in points)
    assert len({p[nc] for p in points}) > 1  # Nc is drawn too, not fixed at its bound


def test_signs_are_decided_from_the_relations(tmp_path):
    report = compile_doc(tmp_path, *WINDOW, "check 1 - Nc/Nf > 0", "check Nf - Nc >= 1",
                         "check 3*Nc - Nf >= 1", "check Nf - 2*Nc > 0")
    statuses = [s.status for s in report.steps[2:]]
    assert statuses[:3] == ["proven"] * 3
    assert statuses[3] == "failed"  # Nc = 2, Nf = 3 is in the window


def test_a_sampled_equality_is_tested_inside_the_window(tmp_path):
    # |Nf - Nc| = Nf - Nc only where Nf > Nc (common practice, no source)
    report = compile_doc(tmp_path, *WINDOW, "check sqrt((Nf - Nc)^2) == Nf - Nc")
    assert report.steps[-1].status in ("proven", "sampled"), report.steps[-1].checks


def test_a_for_point_outside_the_window_names_the_relation(tmp_path):
    report = compile_doc(tmp_path, *WINDOW, "check Nf > Nc for Nc = 3, Nf = 5..9")
    step = report.steps[-1]
    assert step.status == "error"
    assert "outside the declared region: Nc = 3, Nf = 9 breaks Nf < 3*Nc" in step.checks[-1].detail
    inside = compile_doc(tmp_path, *WINDOW, "check Nf > Nc for Nc = 3, Nf = 4..8")
    assert inside.passed


def test_extremization_uses_the_relations(tmp_path):
    # f = (p - q) x - x^3/3 has critical points x = ±sqrt(p - q): real only
    # for p > q, the maximum at the positive one (common practice, no source)
    report = compile_doc(tmp_path, "symbol p: positive", "symbol q: real, 0 < q < p",
                         "symbol x: real", "let f = (p - q)*x - x^3/3",
                         "maximize f over x -> x_star, f_star",
                         "check x_star^2 == p - q", "check x_star > 0")
    assert report.passed, [(s.source, s.checks) for s in report.steps if s.status != "proven"]


def test_a_declaration_no_point_satisfies_is_located(tmp_path):
    with pytest.raises(DocumentError) as info:
        compile_doc(tmp_path, "symbol a: real", "symbol b: real, b > 2, 2*b < 3")
    assert info.value.location.line == 3


def test_relations_are_linear_forms_of_the_symbols(tmp_path):
    scope = scope_of(tmp_path, "symbol a: real", "symbol b: real, 2*a - 1/2 < b")
    (relation,) = scope.region.relations
    a, b = (scope.specs[x].symbol for x in "ab")
    assert sympy.expand(relation.expr - (b - 2 * a + sympy.Rational(1, 2))) == 0
    assert relation.strict


def test_a_for_point_that_fixes_one_symbol_leaves_the_relations_on_the_others(tmp_path):
    # Nf = 5 leaves Nc < 5 < 3*Nc, so Nc <= 4 (an integer); without the point in
    # the relations Nc would be unbounded and Nc = 5 a false counterexample
    report = compile_doc(tmp_path, *WINDOW, "check Nc <= 4 for Nf = 5", "check Nc >= 2 for Nf = 5")
    assert [s.status for s in report.steps[2:]] == ["proven", "proven"], report.steps[2].checks


def test_a_for_point_that_leaves_another_symbol_no_value_is_an_error(tmp_path):
    report = compile_doc(tmp_path, *WINDOW, "check Nc >= 2 for Nf = 2")
    assert report.steps[-1].status == "error"
    assert "at Nf = 2, no integer satisfies the declaration of Nc" in report.steps[-1].checks[-1].detail
