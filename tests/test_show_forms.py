"""``show X as expanded`` / ``as factored`` / ``collected in N``: the forms an author asks for.

Each requested form is printed in the document syntax, read back with the
same parser and proved equal to the value it shows (an exact identity, not a
sampled one); its shape is the one asked for; a bad request is a located
document error.
"""
from __future__ import annotations

import pytest

from compiler.errors import DocumentError
from compiler.render.printers import TextPrinter
from support import compile_text

HEAD = """```derive
symbol N: integer, N >= 2
symbol g: integer, g >= 2
bundle V: complex, rank 2
let a = (g - 1)*(8*N^3 - 3*N - 5)/24
let b = a*c1(V)^2 + (N - 1)*(N + 2)*c2(V)
let r = (N^2 + g)/(N + 1)
"""

SHOWS = (
    "show a as expanded", "show b as expanded", "show a as factored",
    "show a collected in N", "show b collected in N", "show a, b collected in g",
    "show r collected in g", "show r collected in N",
)


def _shown(tmp_path, lines) -> list[tuple[str, str]]:
    report = compile_text(tmp_path / "doc.md", HEAD + "\n".join(lines) + "\n```\n")
    return [(s.source, v.name, TextPrinter().doprint(v.tree))
            for s in report.steps if s.source.startswith("show") for v in s.values]


def test_requested_forms_read_back_to_the_value_they_show(tmp_path):
    shown = _shown(tmp_path, SHOWS)
    assert len(shown) == 9
    claims = [f"check {name} == {text}" for _, name, text in shown]
    again = compile_text(tmp_path / "again.md", HEAD + "\n".join(claims) + "\n```\n")
    checks = [s for s in again.steps if s.source.startswith("check")]
    assert len(checks) == len(claims)
    assert all(s.status == "proven" for s in checks), [(s.source, s.status) for s in checks]


def test_requested_forms_have_the_shape_asked_for(tmp_path):
    shown = {(source, name): text for source, name, text in _shown(tmp_path, SHOWS)}
    # expanded: multiplied out, no bracketed factor left
    assert shown["show a as expanded", "a"] == "N^3*g/3 - N^3/3 - N*g/8 + N/8 - 5*g/24 + 5/24"
    assert "(" not in shown["show b as expanded", "b"].replace("c1(V)", "").replace("c2(V)", "")
    # factored is the default display form
    assert shown["show a as factored", "a"] == "(N - 1)*(g - 1)*(8*N^2 + 8*N + 5)/24"
    # collected: powers of the symbol, highest first, each coefficient factored
    assert shown["show a collected in N", "a"] == "(g - 1)/3*N^3 - (g - 1)/8*N - 5*(g - 1)/24"
    assert shown["show b collected in N", "b"] == \
        "(N^2 + N - 2)*c2(V) + ((g - 1)/3*N^3 - (g - 1)/8*N - 5*(g - 1)/24)*c1(V)^2"
    assert shown["show r collected in g", "r"] == "1/(N + 1)*g + N^2/(N + 1)"
    # a denominator in the symbol itself stays below the collected numerator
    assert shown["show r collected in N", "r"] == "(N^2 + g)/(N + 1)"


@pytest.mark.parametrize("line, column, message", [
    ("show a as sorted", 11, "expected 'expanded' or 'factored'"),
    ("show a collected N", 18, "expected 'in'"),
])
def test_a_malformed_form_request_is_a_located_syntax_error(tmp_path, line, column, message):
    with pytest.raises(DocumentError) as caught:
        compile_text(tmp_path / "doc.md", HEAD + line + "\n```\n")
    assert (caught.value.location.line, caught.value.location.column) == (8, column)
    assert message in str(caught.value)


@pytest.mark.parametrize("line, place, message", [
    ("show a collected in q", ":8:21", "'q' is not a declared symbol"),
    ("show sqrt(N) collected in N", ":8:6", "not a rational function of N"),
])
def test_an_impossible_form_request_is_a_located_step_error(tmp_path, line, place, message):
    report = compile_text(tmp_path / "doc.md", HEAD + line + "\n```\n")
    step = report.steps[-1]
    assert step.status == "error"
    assert message in step.checks[0].detail
    assert any(line.endswith(place + ": " + step.checks[0].detail) for line in report.diagnostics), \
        report.diagnostics
