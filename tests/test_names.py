"""Names and order: the static pass that decides whether a document can be
compiled at all (spec, "Precise rules → Names and order" and "Prose").

Every case is a small document built in-process; the problems it must raise
are the ones that stop a build with exit 2 before any algebra runs, so the
tests look at the problems' positions and words, not at values.
"""
from __future__ import annotations

import pytest

from compiler.errors import DocumentError
from compiler.results import Prose
from support import compile_text


def derive(*lines: str, before: str = "", after: str = "") -> str:
    """A document with one derive block; its first statement is on line
    ``2 + before.count('\\n')``."""
    return before + "```derive\n" + "\n".join(lines) + "\n```\n" + after


def compile_doc(tmp_path, text: str):
    return compile_text(tmp_path / "doc.md", text)


def problems(tmp_path, text: str) -> list[tuple[int, int, str]]:
    with pytest.raises(DocumentError) as info:
        compile_doc(tmp_path, text)
    return [(p.location.line, p.location.column, p.message) for p in info.value.problems]


def final_text(report, name: str) -> str:
    return report.values[name].text


# ---------------------------------------------------------------- declared before use

def test_a_name_used_before_its_declaration_is_unknown_at_that_line(tmp_path):
    # spec: Precise rules → Names and order: "Every name is declared on an earlier line before use"
    found = problems(tmp_path, derive("let a = N", "symbol N"))
    assert [(line, col) for line, col, _ in found] == [(2, 9)]
    assert "unknown name 'N'" in found[0][2]


def test_a_let_cannot_read_the_name_it_is_binding(tmp_path):
    # spec: Precise rules → Names and order (declared on an *earlier* line)
    found = problems(tmp_path, derive("symbol N", "let a = a + N"))
    assert found[0][:2] == (3, 9) and "'a'" in found[0][2]


def test_split_parts_must_be_declared_earlier(tmp_path):
    # spec: Precise rules → Names and order: "the parts of a split too (except trivial(k))"
    found = problems(tmp_path, derive("bundle NW: real, rank 5", "split NW = L1 + L2 + trivial(1)",
                                      "bundle L1, L2: line"))
    assert [(line, col) for line, col, _ in found] == [(3, 12), (3, 17)]
    assert all("unknown name" in message for _, _, message in found)


def test_trivial_part_needs_no_declaration(tmp_path):
    # spec: Precise rules → Names and order: "(except trivial(k))"
    report = compile_doc(tmp_path, derive("bundle NW: real, rank 3", "bundle L1: line",
                                          "split NW = L1 + trivial(1)"))
    assert report.passed


def test_surface_tangent_is_declared_by_the_fiber(tmp_path):
    # spec: Precise rules → Names and order: "A surface fiber's tangent TS declares TS"
    report = compile_doc(tmp_path, derive("fiber Sigma: surface, genus 2, tangent TS",
                                          "let a = e(TS)"))
    assert final_text(report, "a") == "e(TS)"
    found = problems(tmp_path, derive("let a = e(TS)", "fiber Sigma: surface, genus 2, tangent TS"))
    assert found[0][:2] == (2, 11) and "unknown name 'TS'" in found[0][2]


def test_convention_is_declared_by_its_statement_not_before(tmp_path):
    # spec: Precise rules → Names and order: "A convention statement ... declares a convention"
    found = problems(tmp_path, derive("let k = kappa", "convention kappa = 3"))
    assert found[0][:2] == (2, 9)


def test_front_matter_convention_is_declared_from_the_start(tmp_path):
    # spec: Precise rules → Names and order: "... or a conventions: entry in the front matter"
    text = "---\nconventions:\n  kappa: 3\n---\n" + derive("let k = kappa")
    assert final_text(compile_doc(tmp_path, text), "k") == "3"


def test_angular_integral_is_built_in(tmp_path):
    # spec: Precise rules → Names and order: "angular_integral is a built-in convention with default 2"
    assert final_text(compile_doc(tmp_path, derive("let k = angular_integral")), "k") == "2"


# ---------------------------------------------------------------- bound once

def test_rebinding_without_bang_names_the_earlier_line(tmp_path):
    # spec: Statements: "rebinding without ! is an error"; the message points at the first binding
    found = problems(tmp_path, derive("symbol N", "let a = N", "let a = 2*N"))
    assert len(found) == 1
    line, _, message = found[0]
    assert line == 4 and "line 3" in message


def test_an_operation_output_cannot_silently_rebind(tmp_path):
    # spec: Precise rules → Names and order: "every name is bound once (let! aside)"
    found = problems(tmp_path, derive("symbol N", "let a = N", "substitute a: N = 1 -> a"))
    assert found[0][0] == 4 and "line 3" in found[0][2]


@pytest.mark.parametrize("second", ["symbol N", "bundle N: line", "let N = 1",
                                    "fiber N: surface, genus 2, tangent TN"])
def test_every_kind_of_name_shares_one_namespace(tmp_path, second):
    # spec: Precise rules → Names and order: "One namespace"
    found = problems(tmp_path, derive("symbol N", second))
    assert found[0][0] == 3 and "line 2" in found[0][2]


def test_let_bang_on_a_fresh_name_is_an_error(tmp_path):
    # spec: Precise rules → Names and order: "on a fresh name it is an error"
    found = problems(tmp_path, derive("symbol N", "let! a = N"))
    assert found[0][:2] == (3, 1) and "'a'" in found[0][2]


@pytest.mark.parametrize("decl", ["symbol x", "bundle x: line", "convention x = 1"])
def test_let_bang_cannot_rebind_a_declaration(tmp_path, decl):
    # spec: Precise rules → Names and order: "let! rebinds a name bound by let or by an operation"
    found = problems(tmp_path, derive(decl, "let! x = 2"))
    assert found[0][0] == 3 and "line 2" in found[0][2]


def test_let_bang_rebinds_an_operation_output(tmp_path):
    # spec: Precise rules → Names and order: "let! rebinds a name bound by let or by an operation"
    report = compile_doc(tmp_path, derive("bundle L1: line", "let c = c1(L1)",
                                          "substitute c: c1(L1) = 2*c1(L1) -> d",
                                          "let! d = d + c", "check d == 3*c1(L1)"))
    assert report.passed and final_text(report, "d") == "3*c1(L1)"


def test_earlier_values_keep_what_they_were_computed_from(tmp_path):
    # spec: Precise rules → Names and order: "Earlier values keep what they were computed from"
    report = compile_doc(tmp_path, derive("symbol N", "let a = N", "let b = a + 1",
                                          "let! a = a + 10", "check b == N + 1",
                                          "check a == N + 10"))
    assert report.passed
    assert final_text(report, "b") == "N + 1"
    rebind = [s for s in report.steps if s.rebind]
    assert [s.line for s in rebind] == [5] and rebind[0].kind == "let"


# ---------------------------------------------------------------- @{NAME}

def _refs(report) -> list[dict[str, str]]:
    return [{k: v.text for k, v in item.refs.items()} for item in report.items
            if isinstance(item, Prose) and item.refs]


def test_prose_reference_shows_the_binding_in_force(tmp_path):
    # spec: Precise rules → Prose: "it shows the binding in force at that point of the document
    # (a name bound only further down shows its first binding)"
    text = ("Before: @{x}.\n\n"
            + derive("symbol N", "let x = N", "let! x = 2*N")
            + "\nMiddle: @{x}.\n\n"
            + "```derive\nlet! x = 5\n```\n\nEnd: @{x}.\n")
    assert _refs(compile_doc(tmp_path, text)) == [{"x": "N"}, {"x": "2*N"}, {"x": "5"}]


def test_unknown_prose_reference_is_an_error_at_its_line(tmp_path):
    # spec: Prose: "An unknown NAME is a build error at that line"
    text = derive("symbol N") + "\nSome text\nwith @{nosuch} here.\n"
    found = problems(tmp_path, text)
    assert [(line, col) for line, col, _ in found] == [(6, 6)]
    assert "nosuch" in found[0][2]


def test_prose_reference_in_code_is_not_a_reference(tmp_path):
    # spec: Precise rules → Prose: "@{NAME} works anywhere in prose except code spans and code blocks"
    text = "Code `@{nosuch}` here.\n\n```python\n@{other}\n```\n\n    @{indented}\n\n" + derive("symbol N")
    assert compile_doc(tmp_path, text).passed


# ---------------------------------------------------------------- reporting

def test_did_you_mean_suggests_a_close_name_in_force(tmp_path):
    # spec: Precise rules → Names and order (unknown names); suggestion is common practice, no source
    found = problems(tmp_path, derive("symbol kappa", "let a = kapa"))
    assert "did you mean 'kappa'" in found[0][2]


def test_every_name_problem_is_reported_at_once_in_order(tmp_path):
    # spec: Precise rules → Checks and exit status: unknown or rebound names stop the build;
    # the names pass reports all of them together
    text = ("@{ghost}\n\n"
            + derive("symbol N", "let a = M", "let a = N", "let! b = 1", "integrate a over F -> c"))
    found = problems(tmp_path, text)
    assert [line for line, _, _ in found] == [1, 5, 6, 7, 8]


def test_a_name_problem_writes_no_output_files(tmp_path, anomark):
    # spec: Precise rules → Checks and exit status: exit 2 ... "A document that could not be
    # parsed writes no output files"
    doc = tmp_path / "broken.md"
    doc.write_text(derive("let a = zz"))
    proc = anomark("build", doc, "--format", "html,json,tex", "--no-cache")
    assert proc.returncode == 2
    assert f"{doc}:2:9:" in proc.stderr
    assert sorted(p.name for p in tmp_path.iterdir() if not p.name.startswith(".")) == ["broken.md"]


@pytest.mark.parametrize("use, kind", [("integrate N over T -> r", "fiber"),
                                       ("check N == 1 for T = 1", "symbol"),
                                       ("maximize N over T -> u, v", "symbol")])
def test_a_name_of_the_wrong_kind_is_a_compile_error(tmp_path, use, kind):
    # spec: Precise rules → Names and order; "for targets are symbols" (Checks and exit status)
    found = problems(tmp_path, derive("symbol N", "bundle T: real, rank 4", use))
    assert found[0][0] == 4 and kind in found[0][2] and "line 3" in found[0][2]
