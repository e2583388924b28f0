"""The LaTeX appendix: balanced, escaped, and (where pdflatex exists) compiling
as a standalone article whose text shows the key values."""
from __future__ import annotations

import re

from compiler.render.tex import (display_value, escape_tex, name_latex, plot_files, prose_tex, to_tex,
                                 value_lines)
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
    tex = to_tex(make_report())
    _assert_balanced(tex)
    assert "\\documentclass" not in tex and "\\begin{document}" not in tex
    assert tex.startswith("\\section*{Anomaly of a twisted compactification}")


def test_standalone_article():
    tex = to_tex(make_report(), standalone=True)
    _assert_balanced(tex)
    assert tex.startswith("\\documentclass{article}")
    for package in ("amsmath", "amssymb", "graphicx"):
        assert f"\\usepackage{{{package}}}" in tex
    assert to_tex(make_report()) in tex


def test_prose_rules():
    refs = {"kR": ValueRecord("kR", "1/2", r"\frac{1}{2}", [0])}
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


def test_text_specials_escaped():
    assert escape_tex("50% & $x_1$ #{a}~^\\") == (
        r"50\% \& \$x\_1\$ \#\{a\}\textasciitilde{}\textasciicircum{}\textbackslash{}")
    assert escape_tex("α ≤ β") == r"\ensuremath{\alpha} \ensuremath{\leq} \ensuremath{\beta}"
    tex = to_tex(make_report())
    assert "<script>" not in tex
    assert r"Beware \textless{}script\textgreater{}alert(1)" in tex
    assert r"\# \symbol{60}script\symbol{62}alert(1)" in tex  # in a statement's source


def test_names_as_math():
    # written the way the values print their symbols (trailing digits and _parts as subscripts)
    assert name_latex("I8") == "I_{8}"
    assert name_latex("a_star") == "a_{*}"
    assert name_latex("eps_star") == r"\epsilon_{*}"
    assert name_latex("kRRR") == r"\mathrm{kRRR}"
    assert name_latex("I8_free") == r"I_{8,\mathrm{free}}"
    assert name_latex("alpha_1") == r"\alpha_{1}"
    assert name_latex("") == ""


def test_unnamed_value_shows_alone():
    assert display_value("", "x + 1") == "\\begin{equation*}\nx + 1\n\\end{equation*}\n"


def test_long_values_break_at_top_level_signs_only():
    short = display_value("x", r"\left(a + b\right)")
    assert short == "\\begin{equation*}\nx = \\left(a + b\\right)\n\\end{equation*}\n"
    terms = [rf"\frac{{{k}}}{{48}} p_{{1}}(T_{{{k}}})^{{2}} c_{{1}}(L_{{{k}}})" for k in range(1, 7)]
    latex = " + ".join(terms) + r" - \left(a - b + c - d\right)"
    shown = display_value("I", latex)
    _assert_balanced(shown)
    assert shown.startswith("\\begin{align*}\nI &= ") and "\\\\\n&\\quad + " in shown
    # auto-sized brackets cannot span lines, so a broken value uses fixed ones
    lines = value_lines(latex)
    assert len(lines) > 1 and any(r"\Bigl(a - b + c - d\Bigr)" in line for line in lines)
    assert " ".join(lines).split() == latex.replace(r"\left", r"\Bigl").replace(r"\right", r"\Bigr").split()


def test_long_numerator_opened_into_a_bracket():
    num = " + ".join(f"{k} N^{{{k}}} g z" for k in range(1, 15))
    lines = value_lines(rf"-\frac{{{num}}}{{24}} c_{{1}}(R)")
    assert lines[0].startswith(r"-\frac{1}{24} \Bigl(1 N^{1} g z") and lines[-1].endswith(r"\Bigr) c_{1}(R)")
    assert " ".join(lines).count("+") == 13  # every term kept


def test_tables_and_plots():
    report = make_report()
    tex = to_tex(report)
    assert "\\begin{tabular}{ccc}" in tex and "$N$ & $g$ & $a_{\\star}$ \\\\" in tex
    assert "$2$ & $2$ & $\\frac{53}{24}$ \\\\" in tex
    assert "\\includegraphics[width=0.8\\linewidth]{twisted-plot-1.pdf}" in tex
    files = plot_files(report)
    assert list(files) == ["twisted-plot-1.pdf"]
    assert files["twisted-plot-1.pdf"].startswith(b"%PDF")
    assert files == plot_files(make_report())  # reproducible bytes


def test_checks_listed_with_status():
    tex = to_tex(make_report())
    assert "\\textsc{proven}~homogeneous of degree 8" in tex
    assert "\\textsc{sampled}~claim holds (equal at 24 random points)" in tex
    assert "\\textbf{FAILED}~claim holds (at N = 2: left 1/2, right 2)" in tex
    assert "\\textbf{ERROR}~value exists (undefined name missing)" in tex
    assert "\\textsc{not passed}" in tex


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
    for needle in ("Anomaly of a twisted compactification", "let I8 = (N - 1)*I8_free",
                   "FAILED", "at N = 2: left 1/2, right 2", "angular_integral", "remainder",
                   "<script>alert(1)</script>", "53"):
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
