"""The one notation rule for names, the author's overrides, and the display form.

The rule's cases are the ones issue 9 lists (``kRRR``, ``I8tw``,
``nv_minus_nh``); the expected spellings are common practice in the anomaly
literature, no source.
"""
from __future__ import annotations

import pytest
import sympy

from compiler.algebra.graded import Ring
from compiler.document import read_document
from compiler.errors import DocumentError
from compiler.presentation import display_tree
from compiler.render.notation import check_tex, name_tree
from compiler.render.printers import LatexPrinter, MathMLPrinter, TextPrinter


def _latex(name: str, notation=None) -> str:
    return LatexPrinter(notation).doprint(name_tree(name, notation))


@pytest.mark.parametrize("name, latex", [
    ("I8", "I_{8}"), ("a_star", "a_{*}"), ("eps_star", r"\epsilon_{*}"), ("kRRR", "k_{RRR}"),
    ("kR", "k_{R}"), ("I8tw", r"I_{8 , \mathrm{tw}}"), ("I8_free", r"I_{8 , \mathrm{free}}"),
    ("alpha_1", r"\alpha_{1}"), ("c_RRR", "c_{RRR}"), ("a_N2", "a_{N2}"), ("a_prime", r"{a}^{\prime}"),
    ("nv_minus_nh", r"\mathrm{nv} - \mathrm{nh}"), ("minus_a_min", r"- a_{\mathrm{min}}"),
    ("Ahat_K3", r"\hat{A}_{K3}"), ("r1_0", "r_{1 , 0}"), ("c1(L2)", "c_{1}(L_{2})"),
    ("e(TS)", r"e(\mathrm{TS})"), ("vol", r"\mathrm{vol}"), ("Sigma", r"\Sigma"),
])
def test_names_as_math(name, latex):
    assert _latex(name) == latex


def test_same_rule_in_mathml():
    assert MathMLPrinter().doprint(name_tree("kRRR")) == '<msub><mi>k</mi><mrow><mi>R</mi><mi>R</mi><mi>R</mi></mrow></msub>'
    assert MathMLPrinter().doprint(name_tree("c1(L2)")) == (
        '<mrow><msub><mi>c</mi><mn>1</mn></msub><mrow><mo stretchy="false">(</mo>'
        '<msub><mi>L</mi><mn>2</mn></msub><mo stretchy="false">)</mo></mrow></mrow>')


def test_override_wins_everywhere_the_name_appears():
    notation = {"TS": r"T\Sigma", "kRRR": "k_{RRR}"}
    assert _latex("e(TS)", notation) == r"e({T\Sigma})"
    assert LatexPrinter(notation).doprint(["pow", ["sym", "kRRR"], 2]) == "{{k_{RRR}}}^{2}"


@pytest.mark.parametrize("latex", [r"k_{RRR}", r"\hat{A}_{8}", r"T\Sigma", r"\mathrm{vol}(M)", r"c'_{2}"])
def test_subset_accepts_names(latex):
    assert check_tex(latex) is None


@pytest.mark.parametrize("latex, why", [
    (r"\href{http://x}{y}", "href"), (r"\input{/etc/passwd}", "input"), ("{a", "unbalanced"),
    ("a}{", "unbalanced"), ("é", "character"), (r"\def\x{y}", "def"), ("a % b", "character"),
    ("$x$", "character"), ("a & b", "character"), ("#1", "character"),
])
def test_subset_refuses_everything_else(latex, why):
    assert why in check_tex(latex)


def test_front_matter_notation_and_results(tmp_path):
    text = '---\nnotation:\n  kRRR: "k_{RRR}"\nresults: [a_star, c_star]\n---\n# x\n'
    doc = read_document("doc.md", text)
    assert doc.front.notation == (("kRRR", "k_{RRR}"),)
    assert doc.front.results == ("a_star", "c_star")


@pytest.mark.parametrize("front, where, message", [
    ('notation:\n  kRRR: "\\\\input{x}"', (3, 9), "\\input is not allowed in notation"),
    ('notation:\n  "k-1": "k"', (3, 3), "notation name 'k-1' is not an identifier"),
    ("notation: [a]", (2, 11), "'notation' must map names to LaTeX"),
    ("results: a_star", (2, 10), "'results' must be a list of value names"),
])
def test_front_matter_problems_are_located(front, where, message):
    with pytest.raises(DocumentError) as err:
        read_document("doc.md", f"---\n{front}\n---\n")
    problem = err.value.problems[0]
    assert (problem.location.line, problem.location.column) == where
    assert message in problem.message


# ------------------------------------------------------------------ display form

N, g, z = sympy.symbols("N g z")


def _display(expr) -> str:
    return TextPrinter().doprint(display_tree(expr))


def test_coefficient_factored_with_common_factors_out():
    # a = (g-1)(8N^3-3N-5)/24 for the N=2 twist (Gaiotto, Maldacena, "The gravity duals
    # of N=2 superconformal field theories", 2009); factored completely here.
    a = sympy.expand((g - 1) * (8 * N**3 - 3 * N - 5)) / 24
    assert _display(a) == "(N - 1)*(g - 1)*(8*N^2 + 8*N + 5)/24"
    assert _display(sympy.expand((1 + z) * (g - 1))) == "(g - 1)*(z + 1)"


def test_sign_pulled_out_when_most_terms_are_negative():
    assert _display(sympy.expand(-(z - 1) * (g - 1))) == "-(g - 1)*(z - 1)"
    assert _display(-N - g - 1) == "-(N + g + 1)"
    assert _display(N - g - 1) == "N - g - 1"


def test_radicals_kept_whole():
    root = sympy.sqrt(N**2 + 1)
    assert _display(sympy.expand((N + 1) * (N - root))) == "(N + 1)*(N - sqrt(N^2 + 1))"
    assert _display(sympy.expand((N**2 + 1) * root)) == "sqrt(N^2 + 1)^3"


def test_class_polynomial_collected_with_common_factor_out():
    ring = Ring([N], 12)
    p1 = ring.generator("p1(T)", 4)
    p2 = ring.generator("p2(T)", 8)
    value = p1 * p1 * ring.scalar((N - 1) / 96) - p2 * ring.scalar((N - 1) / 24)
    tree = display_tree(value)
    text = TextPrinter().doprint(tree)
    assert text in ("(N - 1)/96*(p1(T)^2 - 4*p2(T))", "(N - 1)/96*(-4*p2(T) + p1(T)^2)")
    assert display_tree(ring.zero()) == ["int", 0]


def test_display_is_deterministic():
    a = sympy.expand((g - 1) * (N + 1) ** 3 * (z - 2)) / 7
    assert len({_display(a) for _ in range(3)}) == 1


def _evaluate(tree, classes):
    """A tree back to a sympy expression (classes as plain symbols), to compare values."""
    kind, *args = tree
    table = {
        "int": lambda n: sympy.Integer(n), "sym": lambda name: sympy.Symbol(name),
        "cls": lambda text: classes[text], "neg": lambda t: -_evaluate(t, classes),
        "add": lambda *ts: sympy.Add(*(_evaluate(t, classes) for t in ts)),
        "mul": lambda *fs: sympy.Mul(*(_evaluate(f, classes) for f in fs)),
        "div": lambda a, b: _evaluate(a, classes) / _evaluate(b, classes),
        "pow": lambda b, n: _evaluate(b, classes) ** n, "sqrt": lambda t: sympy.sqrt(_evaluate(t, classes)),
    }
    return table[kind](*args)


@pytest.mark.parametrize("size", [3, 80])
def test_display_tree_equals_the_value(size):
    # small values are collected and factored; large ones (past COLLECT_LIMIT terms) go term by term
    ring = Ring([N, g], 12)
    gens = [ring.generator(f"c1(L{i})", 2) for i in range(size)]
    value = ring.zero()
    for i, x in enumerate(gens):
        value = value + x * x * ring.scalar((N - i) * (g - 1) / 6) - x * ring.scalar(g + i)
    classes = {f"c1(L{i})": sympy.Symbol(f"C{i}") for i in range(size)}
    expected = sum(sympy.Mul(c, *(classes[k] ** e for k, e in mono)) for mono, c in value.terms())
    assert sympy.expand(_evaluate(display_tree(value), classes) - expected) == 0
