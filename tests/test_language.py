"""Functions (define), sums and products, leading terms and series, and use of other documents.

Each feature is tested three ways: what the parser builds, the located
problems a wrong use gives (exit 2 before any algebra, or an error step),
and values against results named beside them.  The bundled derivations that
use the features are built at the end.
"""
from __future__ import annotations

import os
import tomllib
from fractions import Fraction
from pathlib import Path

import pytest

from compiler import calls, preambles
from compiler.engine import BuildOptions, build
from compiler.errors import DocumentError
from compiler.statements import expr_nodes as en, nodes as n
from compiler.statements.parser import parse_block
from support import ROOT, anomark, check_statuses, find_step, parse_problem

SETTLED = {"proven", "sampled"}


def doc(*lines: str) -> str:
    return "---\ntitle: t\n---\n\n```derive\n" + "\n".join(lines) + "\n```\n"


def compile_text(folder: Path, text: str, name: str = "doc.md"):
    path = folder / name
    path.write_text(text)
    return build(str(path), text, BuildOptions(use_cache=False))


def problems(folder: Path, *lines: str) -> list[str]:
    """The located problems of a document that cannot be compiled."""
    with pytest.raises(DocumentError) as info:
        compile_text(folder, doc(*lines))
    return [str(p) for p in info.value.problems]


def step_of(report, source: str):
    found = [s for s in report.steps if s.source == source]
    assert len(found) == 1, [s.source for s in report.steps]
    return found[0]


def statuses(report, source: str) -> list[str]:
    return [c.status for c in step_of(report, source).checks]


def one(text: str):
    (statement,) = parse_block(text, 1, "doc.md")
    return statement


# ---------------------------------------------------------------- parsing

def test_define_parses_name_parameters_and_body():
    s = one("define a_chiral(r) = 3/32*(3*(r - 1)^3 - (r - 1))")
    assert isinstance(s, n.Define) and (s.name, s.params, s.rebind) == ("a_chiral", ("r",), False)
    assert one("define! f(x, y) = x*y").rebind is True


def test_calls_sums_and_expansions_parse_to_their_nodes():
    s = one("let y = f(x, 2) + sum(k^3, k = 1..N) + prod(k, k = 2..5)")
    kinds = [type(s.expr.left.left), type(s.expr.left.right), type(s.expr.right)]
    assert kinds == [en.Apply, en.Sum, en.Sum]
    total = s.expr.left.right
    assert (total.op, total.index, total.low, total.high) == ("sum", "k", en.Num(Fraction(1), 1, 32),
                                                              en.Name("N", 1, 35))
    e = one("let y = series(a, N, 3) + leading(a, x = 1/2)").expr
    assert (e.left.op, e.left.variable, e.left.point, e.left.terms) == ("series", "N", None, 3)
    assert (e.right.op, e.right.point, e.right.terms) == ("leading", Fraction(1, 2), 1)


def test_use_parses_a_path_or_a_library_name():
    s = one('use "preambles/common.md"')
    assert isinstance(s, n.UseDecl) and (s.path, s.library) == ("preambles/common.md", False)
    assert one('use library "anomalies-4d.md"').library is True


@pytest.mark.parametrize("text, column, message", [
    ("define p1(x) = x", 8, "'p1' is a built-in function and cannot be redefined"),
    ("define f(x, x) = x", 13, "'x' appears twice"),
    ("define ! f(x) = x", 8, "write 'define!' without a space"),
    ("use common", 5, "expected a document path in double quotes"),
    ('use "common.txt"', 5, "'common.txt' is not a Markdown document"),
    ('let y = "abc"', 9, "strings are not allowed in expressions"),
    ("let y = sum(k, k = 1)", 21, "expected '..'"),
    ("let y = series(a, N, 30)", 22, "the number of terms is at most 20"),
    ("let y = series(a, N)", 20, "expected ','"),
])
def test_malformed_forms_are_located(text, column, message):
    line, col, found = parse_problem(text)
    assert (line, col) == (1, column)
    assert found.startswith(message), found


# ---------------------------------------------------------------- functions

def test_functions_expand_with_evaluated_arguments(tmp_path):
    report = compile_text(tmp_path, doc(
        "symbol r: real",
        "define a_chiral(x) = 3/32*(3*(x - 1)^3 - (x - 1))",
        "define twice(x) = 2*a_chiral(x)",
        "bundle L: line",
        "define square(u) = u^2",
        # Intriligator, Wecht (2003); a = 1/48 for a free chiral (common practice, no source)
        "check a_chiral(2/3) == 1/48",
        "check twice(r) == 3/16*(3*(r - 1)^3 - (r - 1))",
        "check square(c1(L)) == c1(L)^2",
        "check square(square(r + 1)) == (r + 1)^4",
    ))
    assert report.passed
    step = step_of(report, "define a_chiral(x) = 3/32*(3*(x - 1)^3 - (x - 1))")
    assert step.kind == "define" and step.summary == "a_chiral(x) = 3/32*(3*(x - 1)^3 - (x - 1))"
    assert not step.checks and "a_chiral" not in report.values


def test_a_function_keeps_the_values_it_was_defined_with(tmp_path):
    report = compile_text(tmp_path, doc(
        "let b = 2", "define f(x) = b*x", "let! b = 3", "define! f(x) = b*x + f(x)",
        "check f(1) == 5",
    ))
    assert report.passed


def test_an_error_inside_a_body_is_reported_at_the_call(tmp_path):
    report = compile_text(tmp_path, doc("symbol x: real", "define f(y) = 1/y", "let z = f(0)"))
    step = step_of(report, "let z = f(0)")
    assert step.status == "error"
    assert "in f() (defined at line 7): division by zero" in step.checks[0].detail


@pytest.mark.parametrize("lines, where, message", [
    (("let y = g(1)",), "doc.md:6:9", "'g' is not a built-in function or a function defined earlier"),
    (("define f(x) = x", "let y = f(1, 2)"), "doc.md:7:9", "f() takes 1 argument (defined at line 6), found 2"),
    (("define f(x) = x", "define f(x) = 2*x"), "doc.md:7:1",
     "'f' is already bound at line 6; use define! to redefine it on purpose"),
    (("define! f(x) = x",), "doc.md:6:1", "define! rebinds 'f', but it is not bound yet; use define"),
    (("let f = 1", "define! f(x) = x"), "doc.md:7:1", "define! cannot rebind the value 'f'"),
    (("define f(x) = x", "let! f = 2"), "doc.md:7:1", "let! cannot rebind the function 'f'"),
    (("symbol N: integer", "define f(N) = N"), "doc.md:7:10",
     "the local name 'N' would hide the symbol 'N' declared at line 6"),
    (("define f(x) = f(x)",), "doc.md:6:15", "'f' is not a built-in function or a function defined"),
    (("define f(x) = x", "let y = f + 1"), "doc.md:7:9", "'f' is a function: call it"),
    (("symbol k: integer", "let y = sum(k, k = 1..3)"), "doc.md:7:16",
     "the local name 'k' would hide the symbol 'k'"),
    (("let y = sum(sum(k, k = 1..2), k = 1..3)",), "doc.md:6:20", "the local name 'k' is already in use"),
    (("let y = sum(k, k = 1..3) + k",), "doc.md:6:28", "unknown name 'k'"),
    (("let a = 1", "let y = leading(a, a)"), "doc.md:7:20", "'a' is a value (line 6), but a declared symbol"),
])
def test_misuse_of_functions_and_local_names_is_located(tmp_path, lines, where, message):
    found = problems(tmp_path, *lines)
    assert any(p.startswith(f"{tmp_path / where}: {message}") for p in found), found


# ---------------------------------------------------------------- sums and products

def test_sums_with_symbolic_bounds_have_closed_forms(tmp_path):
    report = compile_text(tmp_path, doc(
        "symbol N: integer, N >= 1",
        "symbol M: integer, M >= 1",
        # sum of cubes, Nicomachus (common practice, no source)
        "check sum(k^3, k = 1..N) == N^2*(N + 1)^2/4",
        # positive roots of SU(N): pairs i < j (common practice, no source)
        "check sum(sum(1, j = i + 1..N), i = 1..N - 1) == N*(N - 1)/2",
        "check sum(k, k = M..M + N - 1) == N*M + N*(N - 1)/2",
        "check sum(k^2, k = 1..N*(N + 1)/2) == (N^2 + N)*(N^2 + N + 1)*(N^2 + N + 2)/24",
        "check sum(1, k = 1..N) == N",
    ))
    assert report.passed, [(s.source, s.checks) for s in report.steps]


def test_sums_and_products_with_numeric_bounds_expand_with_classes(tmp_path):
    report = compile_text(tmp_path, doc(
        "bundle L: line",
        "check sum(k*c1(L), k = 1..3) == 6*c1(L)",
        "check prod(1 + k*c1(L), k = 1..2) == 1 + 3*c1(L) + 2*c1(L)^2",
        "check prod(k, k = 1..10) == 3628800",
        "check sum(k, k = 5..4) == 0",
        "check prod(k, k = 5..4) == 1",
    ))
    assert report.passed, [(s.source, s.checks) for s in report.steps]


@pytest.mark.parametrize("expr, message", [
    ("sum(k, k = 1..20000)", f"sum() over k = 1..20000 has 20000 terms; the limit for numeric "
                             f"bounds is {calls.MAX_RANGE_TERMS} terms"),
    ("prod(k, k = 1..N)", "prod() with symbolic bounds is not supported"),
    ("sum(1/k, k = 1..N)", "sum() with symbolic bounds needs a summand polynomial in k; 1/k is not"),
    ("sum(k, k = 1..N/2)", "the bound N/2 is not an integer at N = 1"),
    ("sum(k, k = 1..x)", "a symbolic bound must be a polynomial in symbols declared integer"),
    ("sum(k, k = 1..5/2)", "a bound of sum() must be an integer, not 5/2"),
    ("sum(k*c1(L), k = 1..N)", "with symbolic bounds the summand must be class-free"),
])
def test_unsupported_sums_are_error_steps_that_say_why(tmp_path, expr, message):
    report = compile_text(tmp_path, doc("symbol N: integer, N >= 1", "symbol x: real",
                                        "bundle L: line", f"let y = {expr}"))
    step = step_of(report, f"let y = {expr}")
    assert step.status == "error" and message in step.checks[0].detail, step.checks


# ---------------------------------------------------------------- leading terms and series

def test_leading_terms_and_series_at_infinity_and_at_a_point(tmp_path):
    report = compile_text(tmp_path, doc(
        "symbol N: integer, N >= 2",
        "symbol r: real, r > 0",
        "let big = (N^2 + 1)^3*sqrt(N^2 + 3)",
        "check leading(big, N) == N^7",
        # (1 + 3u)^(1/2) (1 + u)^3 = 1 + 9u/2 + 51u^2/8 + ... with u = 1/N^2 (binomial series)
        "check series(big, N, 3) == N^7 + 9/2*N^5 + 51/8*N^3",
        # geometric series (common practice, no source)
        "check series(1/(1 - r), r = 0, 4) == 1 + r + r^2 + r^3",
        "check leading(sqrt(r), r = 0) == sqrt(r)",
        "check series(N + 1, r, 2) == N + 1",
    ))
    assert report.passed, [(s.source, s.checks) for s in report.steps]


def test_a_series_of_a_value_with_classes_is_an_error(tmp_path):
    report = compile_text(tmp_path, doc("symbol N: integer", "bundle L: line",
                                        "let y = leading(N*c1(L), N)"))
    step = step_of(report, "let y = leading(N*c1(L), N)")
    assert step.status == "error" and "leading() expands class-free values" in step.checks[0].detail


# ---------------------------------------------------------------- use

def write(folder: Path, name: str, *lines: str) -> Path:
    path = folder / name
    path.parent.mkdir(parents=True, exist_ok=True)
    path.write_text(doc(*lines))
    return path


def test_a_used_document_brings_its_names_and_runs_its_checks_once(tmp_path):
    write(tmp_path, "sub/common.md", "symbol N: integer, N >= 2", "define dim(n) = n^2 - 1",
          "let rank = N - 1", "check dim(3) == 8")
    write(tmp_path, "left.md", 'use "sub/common.md"', "let l = dim(N)")
    write(tmp_path, "right.md", 'use "sub/common.md"', "let r = rank")
    report = compile_text(tmp_path, doc('use "left.md"', 'use "right.md"', "check l - r == N^2 - N",
                                        "show rank") + "\nHere @{rank}.\n")
    assert report.passed
    checks = [c.what for s in report.steps for c in s.checks]
    # common.md runs once, although two documents use it
    assert sum("sub/common.md:9: dim(3) == 8" in what for what in checks) == 1
    first = step_of(report, 'use "left.md"')
    assert first.kind == "use" and first.summary.startswith("left.md: ")
    assert "l (value, line 7)" in first.summary
    assert report.values["rank"].text == "N - 1"


def test_a_failed_check_in_a_used_document_is_reported_at_the_use(tmp_path):
    write(tmp_path, "common.md", "let x = 2", "check x == 3")
    main = write(tmp_path, "main.md", 'use "common.md"', "check x == 2")
    proc = anomark("build", main, "-o", tmp_path / "out", "--no-cache")
    assert proc.returncode == 1, proc.stderr
    assert f"{main}:6:1: check failed: {tmp_path / 'common.md'}:7: x == 3" in proc.stderr
    # a step that cannot run there: an error at the use line, with its own place
    write(tmp_path, "common.md", "let x = 2", "let y = 1/(x - 2)")
    report = compile_text(tmp_path, doc('use "common.md"', "let z = x"))
    (error,) = [c for c in step_of(report, 'use "common.md"').checks if c.status == "error"]
    assert error.detail == f"{tmp_path / 'common.md'}:7:1: division by zero"
    assert step_of(report, "let z = x").status == "proven"


def test_a_problem_inside_a_used_document_is_located_in_both(tmp_path):
    write(tmp_path, "common.md", "let x = y")
    found = problems(tmp_path, 'use "common.md"')
    assert found == [f"{tmp_path / 'doc.md'}:6:1: in the used document: "
                     f"{tmp_path / 'common.md'}:6:9: unknown name 'y'"]


@pytest.mark.parametrize("written, message", [
    ("../x.md", "'../x.md' leaves this document's folder"),
    ("/etc/x.md", "'/etc/x.md' is an absolute path"),
    ("missing.md", "there is no document 'missing.md' in this document's folder"),
    ("link/x.md", "'link/x.md' leads outside this document's folder (through a symbolic link)"),
])
def test_paths_outside_the_folder_are_refused(tmp_path, written, message):
    inner, outer = tmp_path / "inner", tmp_path / "outer"
    inner.mkdir()
    write(outer, "x.md", "let x = 1")
    os.symlink(outer, inner / "link")
    (found,) = problems(inner, f'use "{written}"')
    assert found.startswith(f"{inner / 'doc.md'}:6:1: {message}"), found


def test_a_cycle_of_uses_is_located(tmp_path):
    write(tmp_path, "a.md", 'use "b.md"')
    write(tmp_path, "b.md", 'use "a.md"')
    found = problems(tmp_path, 'use "a.md"')
    assert len(found) == 1 and found[0].startswith(f"{tmp_path / 'doc.md'}:6:1: in the used document")
    assert "the documents use each other in a cycle" in found[0]
    write(tmp_path, "self.md", 'use "self.md"')
    assert "cycle" in problems(tmp_path, 'use "self.md"')[0]


def test_uses_nest_only_so_deep(tmp_path):
    depth = preambles.MAX_USE_DEPTH + 2
    for i in range(depth):
        write(tmp_path, f"d{i}.md", f'use "d{i + 1}.md"' if i + 1 < depth else "let x = 1")
    (found,) = problems(tmp_path, 'use "d0.md"')
    assert f"uses nest more than {preambles.MAX_USE_DEPTH} documents deep" in found


def test_a_name_clash_with_a_used_document_is_located(tmp_path):
    write(tmp_path, "common.md", "symbol N: integer")
    write(tmp_path, "other.md", "let N = 3")
    assert problems(tmp_path, 'use "common.md"', "let N = 2") == [
        f"{tmp_path / 'doc.md'}:7:1: 'N' is already bound at line 6 of "
        f"{tmp_path / 'common.md'} (used at line 6)"]
    assert problems(tmp_path, 'use "common.md"', 'use "other.md"') == [
        f"{tmp_path / 'doc.md'}:7:1: 'N' from line 6 of {tmp_path / 'other.md'} clashes with "
        f"'N' bound at line 6 of {tmp_path / 'common.md'} (used at line 6)"]


def test_an_unknown_library_document_lists_the_library(tmp_path):
    (found,) = problems(tmp_path, 'use library "anomalies-5d.md"')
    assert "the bundled library has no document 'anomalies-5d.md'" in found
    assert "anomalies-4d.md" in found and "did you mean" in found
    (found,) = problems(tmp_path, 'use library "../x.md"')
    assert "a library document is named by its file name" in found


def test_the_library_ships_as_package_data():
    names = sorted(p.name for p in preambles.library_root().iterdir() if p.name.endswith(".md"))
    assert names == ["anomalies-2d.md", "anomalies-4d.md", "anomalies-6d.md"]
    config = tomllib.loads((ROOT / "pyproject.toml").read_text())
    assert "library/*.md" in config["tool"]["setuptools"]["package-data"]["compiler"]
    # a non-editable install carries every package of the compiler (the engine too)
    packages = {".".join(p.parent.relative_to(ROOT).parts) for p in (ROOT / "compiler").rglob("__init__.py")}
    assert packages <= set(config["tool"]["setuptools"]["packages"]), packages


def test_the_library_checks_pass_and_are_cached(tmp_path):
    text = doc('use library "anomalies-2d.md"', 'use library "anomalies-4d.md"',
               'use library "anomalies-6d.md"')
    path = tmp_path / "lib.md"
    path.write_text(text)
    for _ in range(2):  # the second build reads the step cache
        report = build(str(path), text, BuildOptions())
        assert report.passed
        checks = [c for s in report.steps for c in s.checks]
        assert checks and {c.status for c in checks} == {"proven"}
    whats = " ".join(c.what for c in checks)
    # Anselmi, Freedman, Grisaru, Johansen (1998): free chiral a = 1/48, c = 1/24
    assert "library/anomalies-4d.md:34: a_chiral(2/3) == 1/48" in whats
    # Cordova, Dumitrescu, Intriligator (2015), from memory: a of the (2,0) tensor is 1
    assert "a_6d(alpha_tensor, beta_tensor, gamma_tensor + gamma_hyper, delta_tensor + delta_hyper) == 1" in whats
    # 2d: c_R = 3 k_RR (common practice, from memory)
    assert "library/anomalies-2d.md:39: c_right(1) == 3" in whats
    assert report.values["a_vector"].text == "3/16"


# ---------------------------------------------------------------- the derivations

def test_sqcd_in_the_conformal_window(bundled):
    built = bundled("sqcd-conformal-window")
    assert built.returncode == 0 and built.record["passed"], built.stderr
    record = built.record
    for claim in (
        # SU(N) roots and sums of cubes (common practice, no source)
        "check positive_roots(Nc) == Nc*(Nc - 1)/2",
        "check sum(k^3, k = 1..Nc) == Nc^2*(Nc + 1)^2/4",
        # Intriligator, Wecht (2003) with R = 1 - Nc/Nf (Seiberg 1995)
        "check x_star == 0",
        "check a_el == 3/16*(2*Nc^2 - 1 - 3*Nc^4/Nf^2)",
        "check c_el == 1/16*(7*Nc^2 - 2 - 9*Nc^4/Nf^2)",
        # Seiberg duality: 't Hooft anomalies match (Seiberg 1995)
        "check a_mag == a_el", "check c_mag == c_el",
        # Veneziano limit of the formula above
        "check leading(a_V, Nc) == 3/16*(2 - 3/r^2)*Nc^2",
    ):
        assert check_statuses(record, claim) == {"proven"}, claim
    use = find_step(record, 'use "preambles/su-n.md"')
    assert use["kind"] == "use" and "positive_roots (function, line 14)" in use["summary"]
    assert use["summary"].startswith("preambles/su-n.md: ")  # as written in the document


def test_large_n_of_the_twisted_compactification(bundled):
    built = bundled("large-n")
    assert built.returncode == 0 and built.record["passed"], built.stderr
    record = built.record
    # Bah, Beem, Bobev, Wecht, "Four-dimensional SCFTs from M5-branes" (2012): the N^3 coefficient
    claim = "check a_large == (g - 1)*N^3*(9*z^2 - 1 + (1 + 3*z^2)*sqrt(1 + 3*z^2))/(48*z^2)"
    assert check_statuses(record, claim) <= SETTLED
    # Gaiotto, Maldacena (2009): N^3/3 at z = 1
    assert check_statuses(record, "check a_large == (g - 1)*N^3/3 for z = 1") == {"proven"}
    assert "sqrt(3*z^2 + 1)" in record["values"]["a_large"]["text"]


def test_a_use_step_shows_the_path_as_written_not_a_folder_of_this_machine(tmp_path):
    # a report shared with collaborators must not carry the author's folders
    (tmp_path / "common.md").write_text("```derive\nsymbol N: integer, N >= 2\n```\n", encoding="utf-8")
    report = compile_text(tmp_path, '```derive\nuse "common.md"\nlet x = N + 1\n```\n', "main.md")
    summary = next(s.summary for s in report.steps if s.kind == "use")
    assert summary.startswith("common.md: N (symbol, line 2)"), summary
    assert str(tmp_path) not in summary
