"""The one whitelist between a document's math and TeX, and TeX escaping.

Which TeX primitives read or write files (``\\input``, ``\\openout``,
``\\write``) or redefine the language (``\\def``, ``\\catcode``, ``\\csname``,
the ``^^`` character-code notation) is from Knuth, "The TeXbook" (1984),
chapters 7, 8 and 20-21; the allowed commands are anomark's own choice
(common practice, no source).
"""
from __future__ import annotations

import shutil
import subprocess

import pytest

from compiler import texsafe
from compiler.markdown import MATH_TOKENS, make_markdown
from support import ROOT

HOSTILE_MATH = [
    (r"\input{/etc/passwd}", 0, r"'\input'"),
    (r"x + \immediate\openout1=leak.tex", 4, r"'\immediate'"),
    (r"\write18{rm -rf ~}", 0, r"'\write'"),
    (r"\csname input\endcsname{x}", 0, r"'\csname'"),
    (r"\def\x{1}\x", 0, r"'\def'"),
    (r"\catcode`\@=11", 0, r"'\catcode'"),
    (r"\text{\openin1=x}", 6, r"'\openin'"),
    ("^^5cinput{x}", 0, "'^^'"),
    ("x % $", 2, "TeX comment"),
    (r"x}\end{document}", 1, "never opened"),
    (r"\begin{document}", 0, "allowed environment"),
    (r"\end{aligned}", 0, "does not close"),
    (r"\frac{1}{2", 10, "never closed"),
    (r"\begin{aligned} a &= b", 22, "never closed"),
    ("a & b", 2, "'&'"),
    ("a # b", 2, "'#'"),
    ("\\@x", 0, r"'\@'"),
    ("x \U0001F600", 2, "U+1F600"),
    (r"\left( x", 8, r"has no '\right'"),
    (r"x \right)", 2, "without a"),
    (r"\left x \right)", 0, "needs a delimiter"),
    (r"\frac", 0, "needs an argument"),
    ("x^", 1, "needs something to raise"),
    ("x_}", 1, "needs something to raise"),
    ("x \x1b[2J", 2, "U+001B"),
]


@pytest.mark.parametrize("latex, offset, words", HOSTILE_MATH)
def test_math_outside_the_whitelist_is_refused_where_it_stands(latex, offset, words):
    found = texsafe.math_problem(latex)
    assert found is not None and found[0] == offset and words in found[1]


@pytest.mark.parametrize("latex", [
    r"\int_{S^4} e_4^3 = 2\, p_2(N)", r"\frac{1}{24}\left(p_1^2 - 4 p_2\right)",
    r"\begin{pmatrix} a & b \\ c & d \end{pmatrix}", r"\hat{A}(T)\,\mathrm{ch}(V)",
    r"a_{\text{max}} \leq \mathbb{Z}", "\u210f \u2124 \u03b5 x\u00b2", r"\{x\} \% 3",
])
def test_ordinary_math_is_allowed(latex):
    assert texsafe.math_problem(latex) is None


def test_every_math_piece_of_the_bundled_documents_and_the_reference_is_allowed():
    md = make_markdown()
    pieces = [(path.name, piece.content)
              for path in sorted((ROOT / "derivations").glob("*.md")) + sorted((ROOT / "docs").glob("*.md"))
              for token in md.parse(path.read_text())
              for piece in [token, *(token.children or ())] if piece.type in MATH_TOKENS]
    assert len(pieces) > 50
    assert [(name, latex) for name, latex in pieces if texsafe.math_problem(latex)] == []


def test_text_escaping_leaves_no_command_of_the_author():
    text = r"x}\input{leak}{ \def\a{} % # $ & _ ^ ~ \x1b"
    escaped = texsafe.escape_text(text)
    assert r"\input" not in escaped and r"\def" not in escaped
    assert "\x1b" not in texsafe.escape_text("a\x1bb") and "U+001B" in texsafe.escape_text("a\x1bb")


def test_file_names_keep_only_safe_characters():
    assert texsafe.file_name(r"x}\input{leak}{-plot-1.pdf") == "x__input_leak__-plot-1.pdf"
    assert texsafe.file_name("notes 2-plot-1.pdf") == "notes_2-plot-1.pdf"


def test_unicode_maps_to_commands():
    assert texsafe.text_character("\u210f") == r"\ensuremath{\hbar}"
    assert texsafe.text_character("\u2124") == r"\ensuremath{\mathbb{Z}}"
    assert texsafe.text_character("\u00e9") == r"{\'{e}}"
    assert texsafe.text_character("\u200b") == r"\hspace{0pt}"
    assert texsafe.text_character("\U0001F600") is None
    assert texsafe.math_tex("x\u00b2 + \u210f") == "x{{}^{2}} + {\\hbar}"


@pytest.mark.skipif(shutil.which("pdflatex") is None, reason="pdflatex is not installed")
def test_every_mapped_character_typesets(tmp_path):
    """Every character the tables accept, in text and in math, through pdflatex."""
    chars = [chr(c) for c in range(0xA0, 0x250)] + list(texsafe.MATH_CHARACTERS) + ["\u200b", "\u2014"]
    text = "".join(texsafe.text_character(c) or "" for c in chars)
    math = "".join(f"$a{texsafe.math_character(c)}$ " for c in chars
                   if not c.isascii() and texsafe.math_character(c) is not None)
    (tmp_path / "a.tex").write_text("\\documentclass{article}\\usepackage{amsmath,amssymb,graphicx}"
                                    f"\\begin{{document}}\n{text}\n\n{math}\n\\end{{document}}\n")
    run = subprocess.run(["pdflatex", "-interaction=nonstopmode", "-halt-on-error", "-no-shell-escape",
                          "a.tex"], cwd=tmp_path, capture_output=True, timeout=120)
    assert run.returncode == 0, run.stdout[-2000:].decode("latin-1")


def test_the_notation_subset_is_part_of_the_one_whitelist():
    from compiler.render.notation import TEX_COMMANDS, check_tex

    assert TEX_COMMANDS <= texsafe.MATH_COMMANDS
    assert "needs an argument" in check_tex(r"k_{\hat}")  # inside the subset, refused by the whitelist
