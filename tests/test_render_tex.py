"""The LaTeX appendix: balanced, escaped, and (where pdflatex exists) compiling
as a standalone article whose text shows the key values."""
from __future__ import annotations

import re

from compiler.render.printers import LatexPrinter, lines
from compiler.render.tex import STYLES, display_value, plot_files, to_tex
from compiler.render.texprose import escape_tex, prose_tex
from compiler.results import Prose, Report, ValueRecord
from support import make_report, needs_tex, pdf_text, pdflatex

_ENV = re.compile(r"\\(begin|end)\{([^}]*)\}")


def _assert_balanced(tex: str) -> None:
    stack = []
    for kind, name in _ENV.findall(tex):
        if kind == "begin":
            stack.append(name)
        else:
            assert stack and stack.pop() == name, f"\\end{{{name}}} closes nothing open"
    assert stack == []
    depth = 0
    for ch in re.sub(r"\\[{}\\]", "", tex):  # escaped braces do not count
        depth += {"{": 1, "}": -1}.get(ch, 0)
        assert depth >= 0
    assert depth == 0
    assert len(re.findall(r"(?<!\\)\$", tex)) % 2 == 0


def test_fragment_balanced_and_not_a_document():
    for style in STYLES:
        tex = to_tex(make_report(), style=style)
        _assert_balanced(tex)
        assert "\\documentclass" not in tex and "\\begin{document}" not in tex
    assert "\\section{Anomaly of a twisted compactification}" in to_tex(make_report())
    assert "\\section*{Anomaly of a twisted compactification}" in to_tex(make_report(), style="audit")


def test_standalone_article():
    tex = to_tex(make_report(), standalone=True)
    _assert_balanced(tex)
    assert tex.startswith("\\documentclass{article}")
    for package in ("amsmath", "amssymb", "graphicx"):
        assert f"\\usepackage{{{package}}}" in tex
    assert to_tex(make_report()) in tex


def test_prose_rules():
    refs = {"kR": ValueRecord("kR", "1/2", [0], ["div", ["int", 1], ["int", 2]])}
    md = ("# Head\n\nSome *em* and **strong** and `c_1^2` and [a link](https://example.org/a_b).\n\n"
          "- one\n- two\n\n1. first\n\n> quoted\n\nvalue @{kR} and $x^2$\n\n$$\na\n\nb\n$$\n")
    tex = prose_tex(md, refs)
    _assert_balanced(tex)
    assert "\\subsection*{Head}" in tex
    assert "\\emph{em}" in tex and "\\textbf{strong}" in tex
    assert "\\texttt{c\\symbol{95}1\\symbol{94}2}" in tex
    assert "a link\\footnote{\\texttt{https://example.org/a\\symbol{95}b}}" in tex
    assert "\\begin{itemize}\n\\item one\n\\item two\n\\end{itemize}" in tex
    assert "\\begin{enumerate}\n\\item first\n\\end{enumerate}" in tex
    assert "\\begin{quote}\nquoted\n\n\\end{quote}" in tex
    assert "value $\\frac{1}{2}$ and $x^2$" in tex
    assert "\\begin{equation*}\na\nb\n\\end{equation*}" in tex  # no paragraph break inside math


def test_punctuation_after_a_displayed_value_stays_with_it():
    long = ["add", *(["mul", ["int", k], ["pow", ["sym", "N"], k]] for k in range(2, 9))]
    refs = {"a": ValueRecord("a", "", [0], long),
            "k": ValueRecord("k", "1/2", [0], ["div", ["int", 1], ["int", 2]])}
    tex = prose_tex("The value is @{a}. And @{k}, short.\n", refs)
    _assert_balanced(tex)
    # the long value is a display that ends with the full stop; the short one keeps its comma
    assert re.search(r"N\^\{8\}\.\n\\end\{(equation|multline)\*\}\n And \$\\frac\{1\}\{2\}\$, short", tex), tex
    assert "\n." not in tex


def test_text_specials_escaped():
    assert escape_tex("50% & $x_1$ #{a}~^\\") == (
        r"50\% \& \$x\_1\$ \#\{a\}\textasciitilde{}\textasciicircum{}\textbackslash{}")
    assert escape_tex("α ≤ β") == r"\ensuremath{\alpha} \ensuremath{\leq} \ensuremath{\beta}"
    tex = to_tex(make_report(), style="audit")
    assert "<script>" not in tex
    assert r"Beware \textless{}script\textgreater{}alert(1)" in tex
    assert r"\# \symbol{60}script\symbol{62}alert(1)" in tex  # in a statement's source


def test_typographic_quotes():
    assert escape_tex('Witten ("Five-brane effective action", 1996)') == \
        "Witten (``Five-brane effective action'', 1996)"
    assert escape_tex("the 'trial' charge isn't") == "the `trial' charge isn't"


def test_unnamed_value_shows_alone():
    assert display_value(LatexPrinter(), "", ["add", ["sym", "x"], ["int", 1]]) == \
        "\\begin{equation*}\nx + 1\n\\end{equation*}\n"


def test_results_numbered_and_labelled_by_name():
    tex = to_tex(make_report())
    # the final binding of I8 is the one a paper refers to
    assert "\\begin{equation}\nI_{8} = " in tex and "\\label{eq:I8}" in tex
    assert "\\label{eq:kR}" in tex
    assert tex.count("\\label{eq:") == 2


def test_long_values_break_at_top_level_signs_only():
    terms = [["mul", ["div", ["int", k], ["int", 48]], ["pow", ["cls", f"p1(T{k})"], 2], ["cls", f"c1(L{k})"]]
             for k in range(1, 7)]
    tree = ["add", *terms, ["neg", ["add", ["sym", "a"], ["neg", ["sym", "b"]], ["sym", "c"]]]]
    shown = display_value(LatexPrinter(), "I", tree, "eq:I")
    _assert_balanced(shown)
    assert shown.startswith("\\begin{equation}\n\\begin{split}\nI &= ") and "\\\\\n&\\quad + " in shown
    assert "- (a - b + c)" in shown  # a short bracket is never cut
    rows = lines(LatexPrinter(), tree, 30)
    assert len(rows) > 2
    assert " ".join(rows).split() == LatexPrinter().doprint(tree).split()  # nothing lost or added


def test_long_factor_opened_into_a_bracket():
    sum_ = ["add", *[["mul", ["int", k], ["pow", ["sym", "N"], k], ["sym", "g"], ["sym", "z"]] for k in range(1, 15)]]
    tree = ["neg", ["mul", ["div", ["mul", ["int", 3], sum_], ["int", 24]], ["cls", "c1(R)"]]]
    rows = lines(LatexPrinter(), tree, 40)
    assert rows[0].startswith(r"- \frac{3}{24} \Bigl( 1 N^{1} g z") and rows[-1].endswith(r"\Bigr) c_{1}(R)")
    assert " ".join(rows).count("+") == 13  # every term kept


def test_tables_and_plots():
    report = make_report()
    tex = to_tex(report)
    assert "\\begin{tabular}{ccc}" in tex and "$N$ & $g$ & $a_{*}$ \\\\" in tex
    assert "$2$ & $2$ & $\\frac{53}{24}$ \\\\" in tex
    assert "\\begin{figure}[htbp]\n\\centering\n\\resizebox{0.8\\linewidth}{!}" in tex
    assert "\\put(0,0){\\includegraphics[width=340\\unitlength]{twisted-plot-1.pdf}}" in tex
    assert "\\makebox(0,0)[bl]{$a_{*}$}" in tex  # the legend, typeset by LaTeX over the plot
    assert "\\caption{$a_{*}$ against $z$ from $1/2$ to $3$ at $N$~$= 4$, $g$~$= 3$.}" in tex
    assert "\\label{fig:twisted-plot-1}" in tex
    files = plot_files(report)
    assert list(files) == ["twisted-plot-1.pdf"]
    assert files["twisted-plot-1.pdf"].startswith(b"%PDF")
    assert files == plot_files(make_report())  # reproducible bytes


def test_audit_lists_every_check_with_status():
    tex = to_tex(make_report(), style="audit")
    assert "\\textsc{proven}~homogeneous of degree 8" in tex
    assert "\\textsc{sampled}~claim holds (equal at 24 random points)" in tex
    assert "\\textbf{FAILED}~claim holds (at N = 2: left 1/\\allowbreak{}2, right 2)" in tex
    assert "\\textbf{ERROR}~value exists (undefined name missing)" in tex
    assert "\\textsc{not passed}" in tex


def test_appendix_shows_claims_as_equations_and_leaves_routine_checks_out():
    tex = to_tex(make_report())
    assert "homogeneous of degree 8" not in tex
    assert "\\begin{equation*}\nk_{R} = ( N ^{3} - N ) / 12\\qquad\\text{(sampled)}\n\\end{equation*}\n" in tex
    assert "equal at 24 random points" in tex
    assert "k_{R} = N\\qquad\\text{(FAILED)}" in tex and "at N = 2:" in tex
    assert "symbol N" not in tex  # declarations are not results
    # one closing note on how it was verified; the file name, never a path
    assert "\\paragraph{Verification.}" in tex
    assert ("Of its 5 checks (2 stated identities, the rest automatic), 2 were proven exactly, "
            "1 was verified at random rational points (equal at 24 random points) and "
            "2 failed or could not be evaluated.") in tex
    assert "from \\texttt{twisted.md}" in tex and "derivations/" not in tex


def test_notation_override_reaches_every_view():
    report = make_report()
    report.notation = {"I8_free": r"I^{(1)}_{8}", "a_star": r"\hat{a}"}
    tex = to_tex(report)
    assert "{I^{(1)}_{8}}" in tex and "${\\hat{a}}$ against $z$" in tex and "& ${\\hat{a}}$ \\\\" in tex


def _compile(tmp_path, report) -> str:
    """Build the standalone article in ``tmp_path``; return the PDF's text."""
    tex = tmp_path / "doc.tex"
    tex.write_text(to_tex(report, standalone=True), encoding="utf-8")
    for name, data in plot_files(report).items():
        (tmp_path / name).write_bytes(data)
    return pdf_text(pdflatex(tex), layout=False)


@needs_tex
def test_standalone_compiles(tmp_path):
    text = _compile(tmp_path, make_report())
    for needle in ("Anomaly of a twisted compactification", "FAILED", "at N = 2: left 1/2, right 2",
                   "<script>alert(1)</script>", "53", "Verification."):
        assert needle in text, needle


@needs_tex
def test_every_prose_construct_compiles(tmp_path):
    md = ("# One\n\n## Two\n\n### Three\n\n#### Four\n\n"
          "Â-genus, α ≤ β — “quoted” 100% & co_ok #1 {x} ~ ^ \\ | <b>\\\nnext line\n\n"
          "- outer\n  - inner `\\end{verbatim}` [link](https://e.org/?q=a_b&c=%7E)\n\n"
          "1. one\n2. two ![alt](x.png)\n\n> quote\n\n```\n\\end{verbatim} % }{\n  indented\n```\n\n"
          "    indented code\n\n---\n\n$$\nx = 1\n$$ (eq1)\n\n<div>html</div>\n")
    report = Report("anomark", "0.1.0", "rich.md", "Rich & odd_title", ["A & B"], "", "", {}, 12,
                    [Prose(md, 1, {})], {})
    text = _compile(tmp_path, report)
    # pdftotext reads a text-font underscore (a rule) as a space
    for needle in ("Rich & odd title", "Four", "-genus, α ≤ β", "100% & co ok #1 {x}", "next line",
                   "\\end{verbatim} % }{", "indented code", "(eq1)", "<div>html</div>", "e.org/?q=a_b&c=%7E"):
        assert needle in text, needle
