"""Every bundled derivation's LaTeX appendix goes through pdflatex, and the
text of the PDF still says what the derivation found.

The LaTeX unit tests check the source; only a real TeX run catches a macro
that does not exist, an unbalanced display or a plot file that is not where
``\\includegraphics`` looks.  Reading the PDF back with ``pdftotext`` checks
that the published results survive typesetting.  pdftotext breaks lines,
splits fractions over two lines and turns ``_`` into a space, so every
comparison is made on text with the whitespace (and ``_``) taken out.
"""
from __future__ import annotations

import re
from dataclasses import dataclass
from pathlib import Path

import pytest

from compiler.document import ProsePart, read_document
from compiler.markdown import make_markdown
from support import DOCUMENTS, needs_tex, pdf_text, pdflatex

pytestmark = needs_tex


@dataclass(frozen=True)
class Key:
    """What a reader of the appendix must find: checks of published results
    (as written in the document, shown as proven) and value text."""
    checks: tuple[str, ...]
    texts: tuple[str, ...] = ()


KEY = {
    "brane-inflow": Key(checks=(
        # Bott and Cattaneo, "Integral invariants of 3-manifolds" (1998): E4^3 integrates to p2/4
        "m3 == p2(NW)/4",
        # Harvey, Minasian and Moore, "Non-abelian tensor-multiplet anomalies" (1998)
        "I8_stack == N*I8_free + (N^3 - N)/24*p2(NW)",
        "I8 == 0 for N = 1",
    ), texts=(
        # the N^3 coefficient of the interacting anomaly (same source), as displayed
        "4N3-N-3",
    )),
    "four-manifold-genera": Key(checks=(
        # K3: A-hat 2, signature -16, Euler number 24 (common practice, no source)
        "Ahat_K3 == 2",
        "sigma_K3 == -16",
        "chi_K3 == 24",
        # CP^2: Todd genus 1, A-hat -1/8 (common practice, no source)
        "todd_CP2 == 1",
        "Ahat_CP2 == -1/8",
    ), texts=("σK3=-16", "χK3=24", "χCP2=3")),
    "general-fiber": Key(checks=(
        # Riemann-Roch on CP^2 and on P^1 x P^1 (common practice, no source)
        "chi_Ok == (k + 1)*(k + 2)/2",
        "chi_mn == (m + 1)*(n + 1)",
        # Fulton, "Intersection theory" (1984): Segre classes invert c(E)
        "s2 == c1(E)^2 - c2(E)",
        "s4 == c1(E)^4 - 3*c1(E)^2*c2(E) + c2(E)^2",
    ), texts=("χmn=mn+m+n+1",)),
    "six-dimensional-gravity": Key(checks=(
        # Green, Schwarz and West, "Anomaly-free chiral theories in six dimensions" (1985)
        "k_trR4 == -(H - V + 29*T - 273)/5760",
        "k_p2 == 0 for H = 273, V = 0, T = 0",
        "k_p2 == 0 for H = 244, V = 0, T = 1",
    ), texts=("H+29T-V-273",)),
    "ten-dimensional-count": Key(checks=(
        # Alvarez-Gaume and Witten, "Gravitational anomalies" (1984): gravitino = -495 x spin 1/2
        "h3 == -1/60480",
        "g3 == -495*h3",
        # Green and Schwarz, "Anomaly cancellation in supersymmetric D=10 gauge theory
        # and superstring theory" (1984): the tr R^6 term cancels iff n = 496
        "k3 == 0 for n = 496",
        "k3 > 0 for n = 0..495",
    ), texts=("n-496", "120960")),
    "tensor-multiplet": Key(checks=(
        # Witten, "Five-brane effective action in M-theory" (1996)
        "I8_free == 1/48*(p2(NW) - p2(T6) + 1/4*(p1(T6) - p1(NW))^2)",
        "k_p2T == -1/48",
        "k_mixed == -1/96",
    )),
    "twisted-compactification": Key(checks=(
        # Gaiotto and Maldacena, "The gravity duals of N=2 superconformal field theories" (2009)
        "eps1 == -1/3",
        "a1 == (g - 1)*(8*N^3 - 3*N - 5)/24",
        "c1 == (g - 1)*(2*N^3 - N - 1)/6",
        # Benini, Tachikawa and Wecht, "Sicilian gauge theories and N=1 dualities" (2010)
        "a0 == 3/32*(g - 1)*(3*N^3 - N - 2)",
        "c0 == 1/32*(g - 1)*(9*N^3 - 5*N - 4)",
    ), texts=(
        # table row N = 4, g = 3: n_v = 166, n_h = 160 from the Gaiotto-Maldacena values above
        "166160",
        # the legend of the a_star plot: the plot PDF was found and embedded
        "astar",
    )),
}


def flat(text: str) -> str:
    """Text with line breaks, spaces and underscores gone, and pdftotext's
    typeset characters mapped back to the document's ASCII."""
    text = text.replace("ˆ", "^").replace("−", "-")
    return re.sub(r"[\s_]+", "", text)


def words(text: str) -> str:
    """Letters and digits only: a title hyphenated over two lines still matches."""
    return "".join(ch for ch in text.lower() if ch.isalnum())


def headings(path: Path) -> list[str]:
    """The prose headings' plain text (math left out)."""
    document = read_document(str(path), path.read_text(encoding="utf-8"))
    md = make_markdown()
    found = []
    for part in document.parts:
        if isinstance(part, ProsePart):
            tokens = md.parse(part.markdown)
            for opening, inline in zip(tokens, tokens[1:]):
                if opening.type == "heading_open":
                    found.append(" ".join(c.content for c in inline.children or [] if c.type == "text"))
    return found


@pytest.fixture(scope="module")
def appendix_text(bundled):
    """``appendix_text(STEM)``: the text of the PDF of the bundled build's
    standalone appendix, one TeX run per document."""
    texts: dict[str, str] = {}

    def get(stem: str) -> str:
        if stem not in texts:
            texts[stem] = pdf_text(pdflatex(bundled(stem).file("tex")))
        return texts[stem]

    return get


def check_steps(record: dict, expr: str) -> list[dict]:
    return [s for s in record["steps"] if s["kind"] == "check" and s["source"] == f"check {expr}"]


@pytest.mark.parametrize("path", DOCUMENTS, ids=lambda p: p.stem)
def test_appendix_compiles_and_reads_back(path, bundled, appendix_text):
    built = bundled(path.stem)
    assert built.returncode == 0, built.stderr
    text = appendix_text(path.stem)
    flat_text = flat(text)
    document = read_document(str(path), path.read_text(encoding="utf-8"))

    assert document.front.title and words(document.front.title) in words(text)
    for heading in headings(path):
        assert words(heading) in words(text), f"heading {heading!r} missing from the PDF"

    steps = built.record["steps"]
    proven = sum(c["status"] == "proven" for s in steps for c in s["checks"])
    assert built.record["passed"]
    assert f"passed.{len(steps)}steps;checks{proven}proven," in flat_text

    key = KEY.get(path.stem, Key(checks=()))
    for expr in key.checks:
        (step,) = check_steps(built.record, expr)  # the key result is in the document once
        assert [c["status"] for c in step["checks"]] == ["proven"]
        assert "proven" + flat(expr) in flat_text, f"'proven {expr}' missing from the PDF"
    for snippet in key.texts:
        assert flat(snippet) in flat_text, f"{snippet!r} missing from the PDF"


@pytest.mark.parametrize("path", DOCUMENTS, ids=lambda p: p.stem)
def test_no_literal_dollar_in_pdf(path, appendix_text):
    """No bundled document writes a literal dollar, so any "$" in the PDF is math
    that reached LaTeX as text (as ``$$...$$`` inside a paragraph once did)."""
    assert "$" not in appendix_text(path.stem)


def test_fragment_compiles_inside_a_minimal_article(tmp_path, bundled, bundled_folder, anomark):
    """The appendix as users include it: the fragment (plots and all) inside their own article."""
    path = bundled_folder / "derivations" / "twisted-compactification.md"
    bundled(path.stem)  # built first, so this build of the fragment runs warm from the cache
    run = anomark("build", path.relative_to(bundled_folder), "-o", tmp_path, "--format", "tex",
                  cwd=bundled_folder)
    assert run.returncode == 0, run.stderr
    fragment = (tmp_path / f"{path.stem}.tex").read_text(encoding="utf-8")
    assert "\\documentclass" not in fragment and "\\begin{document}" not in fragment
    assert sorted(p.name for p in tmp_path.glob("*-plot-*.pdf")) == [
        f"{path.stem}-plot-1.pdf", f"{path.stem}-plot-2.pdf"]
    paper = tmp_path / "paper.tex"
    paper.write_text("\\documentclass{article}\n\\usepackage{amsmath,amssymb,graphicx}\n"
                     "\\begin{document}\n\\section{Main text}\nSee the appendix.\n\\appendix\n"
                     f"\\input{{{path.stem}}}\n\\end{{document}}\n", encoding="utf-8")
    text = pdf_text(pdflatex(paper))
    flat_text = flat(text)
    assert words("Central charges of the (2,0) theory on a Riemann surface") in words(text)
    assert words("Main text") in words(text)
    # Gaiotto and Maldacena (2009), as in KEY above
    assert "proven" + flat("a1 == (g - 1)*(8*N^3 - 3*N - 5)/24") in flat_text
    assert "astar" in flat_text  # legend of the second plot
