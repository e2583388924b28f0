"""Every bundled derivation's LaTeX, in both styles, goes through pdflatex,
and the text of the PDF still says what the derivation found.

The appendix style is compiled standalone and ``\\input`` into a plain
article with only amsmath, amssymb and graphicx; no line may stick out of
the text block by more than 10pt (an overfull box in the log).  The audit
style lists every check, so the published results are looked for there.

The LaTeX unit tests check the source; only a real TeX run catches a macro
that does not exist, an unbalanced display or a plot file that is not where
``\\includegraphics`` looks.  Reading the PDF back with ``pdftotext`` checks
that the published results survive typesetting.  pdftotext breaks lines,
splits fractions over two lines and turns ``_`` into a space, so every
comparison is made on text with the whitespace (and ``_``) taken out.
``pdffonts`` checks that every font of the result is embedded.
"""
from __future__ import annotations

import json
import re
import subprocess
import sys
from dataclasses import dataclass
from pathlib import Path

import pytest

from compiler.document import ProsePart, read_document
from compiler.engine import BuildOptions, build
from compiler.markdown import make_markdown
from compiler.render.json import to_record
from compiler.render.tex import plot_files, to_tex
from support import DOCUMENTS, ROOT, needs_tex, pdf_text, pdflatex

pytestmark = needs_tex

DERIVATIONS = DOCUMENTS


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
        # the N^3 coefficient of the interacting anomaly (same source), as displayed:
        # (4N^3 - N - 3)/96 = (N - 1)(4N^2 + 4N + 3)/96, with (N - 1)/192 in front
        "2(4N2+4N+3)",
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
    ), texts=("χmn=(m+1)(n+1)",)),
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
        # the x axis of the a_star plot, z from 1/2 to 3 in steps of 1/2: typeset by LaTeX over the plot
        "0.51.01.52.02.53.0",
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


def anomark_build(path: Path, out: Path, formats: str, standalone: bool) -> None:
    command = [sys.executable, "-m", "compiler", "build", str(path.relative_to(ROOT)), "-o", str(out),
               "--format", formats, "--no-cache", "--quiet"] + (["--standalone"] if standalone else [])
    run = subprocess.run(command, cwd=ROOT, capture_output=True, text=True, timeout=600)
    assert run.returncode == 0, run.stderr


@dataclass
class Appendix:
    record: dict
    text: str  # the appendix style, standalone
    audit: str  # the audit style, standalone
    in_paper: str  # the appendix fragment \\input into a plain article
    overfull: list[float]  # every overfull box of the three runs, in pt
    fonts: list[str]  # pdffonts's rows for the three PDFs


_BUILT: dict[str, Appendix] = {}
_OVERFULL = re.compile(r"^Overfull \\hbox \(([\d.]+)pt too wide\)", re.M)
PAPER = ("\\documentclass{article}\n\\usepackage{amsmath}\n\\usepackage{amssymb}\n\\usepackage{graphicx}\n"
         "\\begin{document}\n\\section{Main text}\nAs derived in appendix~\\ref{app:%s}.\n\\appendix\n"
         "\\input{%s}\n\\end{document}\n")


def appendix(path: Path, factory, folder: Path) -> Appendix:
    """One build and three TeX runs per document, shared by the tests below.
    The build is the session's bundled one replayed from its cache (``folder``
    holds the built copy of derivations/), so the document is computed once."""
    if path.stem not in _BUILT:
        out = factory.mktemp(path.stem)
        source = folder / "derivations" / path.name
        report = build(str(source), source.read_text(encoding="utf-8"), BuildOptions(use_cache=True))
        for name, data in plot_files(report).items():
            (out / name).write_bytes(data)
        (out / "appendix.tex").write_text(to_tex(report, standalone=True), encoding="utf-8")
        (out / "audit.tex").write_text(to_tex(report, standalone=True, style="audit"), encoding="utf-8")
        (out / "fragment.tex").write_text(to_tex(report), encoding="utf-8")
        (out / "paper.tex").write_text(PAPER % (path.stem, "fragment"), encoding="utf-8")
        texts, overfull, fonts = {}, [], []
        for name in ("appendix", "audit", "paper"):
            pdf = pdflatex(out / f"{name}.tex")
            texts[name] = pdf_text(pdf)
            log = (out / f"{name}.log").read_text(encoding="utf-8", errors="replace")
            overfull += [float(x) for x in _OVERFULL.findall(log)]
            listing = subprocess.run(["pdffonts", pdf.name], cwd=out, capture_output=True, text=True, check=True)
            fonts += listing.stdout.strip().splitlines()[2:]  # below the table's heading
        _BUILT[path.stem] = Appendix(to_record(report), texts["appendix"], texts["audit"], texts["paper"],
                                     overfull, fonts)
    return _BUILT[path.stem]


@pytest.fixture
def appendix_of(tmp_path_factory, bundled, bundled_folder):
    def get(path: Path) -> Appendix:
        bundled(path.stem)  # the cold build that fills the cache
        return appendix(path, tmp_path_factory, bundled_folder)
    return get


def check_steps(record: dict, expr: str) -> list[dict]:
    return [s for s in record["steps"] if s["kind"] == "check" and s["source"] == f"check {expr}"]


@pytest.mark.parametrize("path", DERIVATIONS, ids=lambda p: p.stem)
def test_audit_compiles_and_reads_back(path, appendix_of):
    built = appendix_of(path)
    text, flat_text = built.audit, flat(built.audit)
    document = read_document(str(path), path.read_text(encoding="utf-8"))

    assert document.front.title and words(document.front.title) in words(text)
    for heading in headings(path):
        assert words(heading) in words(text), f"heading {heading!r} missing from the PDF"

    steps = built.record["steps"]
    checks = sum(len(s["checks"]) for s in steps)
    proven = sum(c["status"] == "proven" for s in steps for c in s["checks"])
    assert built.record["passed"]
    assert f"passed.{len(steps)}steps,{checks}checks:{proven}proven," in flat_text

    key = KEY.get(path.stem, Key(checks=()))
    for expr in key.checks:
        (step,) = check_steps(built.record, expr)  # the key result is in the document once
        assert [c["status"] for c in step["checks"]] == ["proven"]
        assert "proven" + flat(expr) in flat_text, f"'proven {expr}' missing from the PDF"
    for snippet in key.texts:
        assert flat(snippet) in flat_text, f"{snippet!r} missing from the PDF"


@pytest.mark.parametrize("path", DERIVATIONS, ids=lambda p: p.stem)
def test_appendix_reads_like_an_appendix(path, appendix_of):
    built = appendix_of(path)
    document = read_document(str(path), path.read_text(encoding="utf-8"))
    for text in (built.text, built.in_paper):
        assert words(document.front.title) in words(text)
        for heading in headings(path):
            assert words(heading) in words(text), f"heading {heading!r} missing from the PDF"
        steps = built.record["steps"]
        checks = sum(len(s["checks"]) for s in steps)
        proven = sum(c["status"] == "proven" for s in steps for c in s["checks"])
        # the closing note on how it was verified, with the file name and never a path
        assert f"Ofits{checks}checks(" in flat(text) and f"{proven}wereprovenexactly" in flat(text) or \
            f"{proven}wasprovenexactly" in flat(text)
        assert f"from{path.name}." in flat(text) and str(ROOT) not in text
        # the routine checks and the statements' listing stay out
        assert "homogeneous of degree" not in text
        declared = [s["source"] for s in built.record["steps"] if s["kind"] in ("symbol", "bundle")]
        assert not [d for d in declared if flat(d) in flat(text)]
    assert "Main text" in built.in_paper and "As derived in appendix A" in " ".join(built.in_paper.split())


@pytest.mark.parametrize("path", DERIVATIONS, ids=lambda p: p.stem)
def test_nothing_sticks_out_of_the_text_block(path, appendix_of):
    assert [x for x in appendix_of(path).overfull if x > 10] == []


@pytest.mark.parametrize("path", DERIVATIONS, ids=lambda p: p.stem)
def test_every_font_is_embedded(path, appendix_of):
    """Journals take only PDFs with embedded fonts; plot labels are TeX's own text,
    so pdffonts lists TeX's fonts only, each embedded (its ``emb`` column)."""
    fonts = appendix_of(path).fonts
    assert fonts
    for row in fonts:
        emb = re.search(r"\s(yes|no)\s+(yes|no)\s+(yes|no)\s+\d+\s+\d+$", row).group(1)
        assert emb == "yes", row


@pytest.mark.parametrize("path", DERIVATIONS, ids=lambda p: p.stem)
def test_no_literal_dollar_in_pdf(path, appendix_of):
    """No bundled document writes a literal dollar, so any "$" in the PDF is math
    that reached LaTeX as text (as ``$$...$$`` inside a paragraph once did)."""
    built = appendix_of(path)
    assert "$" not in built.text and "$" not in built.audit


def test_fragment_from_the_command_line_inside_a_minimal_article(tmp_path):
    """The appendix as users include it: the fragment (plots and all) inside their own article,
    each result numbered and referred to by its name."""
    path = ROOT / "derivations" / "twisted-compactification.md"
    anomark_build(path, tmp_path, "tex", standalone=False)
    fragment = (tmp_path / f"{path.stem}.tex").read_text(encoding="utf-8")
    assert "\\documentclass" not in fragment and "\\begin{document}" not in fragment
    assert sorted(p.name for p in tmp_path.glob("*-plot-*.pdf")) == [
        f"{path.stem}-plot-1.pdf", f"{path.stem}-plot-2.pdf"]
    assert "\\label{eq:a1}" in fragment and "\\label{eq:a_star}" in fragment
    assert fragment.count("\\begin{figure}") == 2
    paper = tmp_path / "paper.tex"
    paper.write_text(PAPER.replace("\\end{document}", "By \\eqref{eq:a1}, $a$ grows with $g$.\n\\end{document}")
                     % (path.stem, path.stem), encoding="utf-8")
    text = pdf_text(pdflatex(paper))
    flat_text = flat(text)
    assert words("Central charges of the (2,0) theory on a Riemann surface") in words(text)
    assert "By(" in flat_text and "By(??)" not in flat_text  # the reference resolved to a number
    assert "0.51.01.52.02.53.0" in flat_text  # the x axis of the second plot, typeset by LaTeX
