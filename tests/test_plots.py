"""Plots drawn by hand (compiler/render/plotting/): the layout's ticks and
labels, the SVG as well-formed XML, the PDF as lines only that poppler reads
back, the appendix's labels typeset by LaTeX where the layout put them,
hostile names escaped, and the same bytes in another process.  Tick steps of
1, 2, 2.5 and 5 times a power of ten and the layout rules are common practice,
no source; the colours are cited where they are defined."""
from __future__ import annotations

import html
import math
import re
import shutil
import subprocess
import sys
import xml.etree.ElementTree as ET
import zlib

import pytest

from compiler.render.plotting.labels import Run, name_label, tex_runs
from compiler.render.plotting.layout import GRID, layout, measure, ticks
from compiler.render.plotting.pdf import plot_pdf
from compiler.render.plotting.svg import plot_svg
from compiler.render.plotting.texlabels import label_tex, plot_picture
from compiler.render.printers import LatexPrinter
from compiler.results import PlotData
from support import ROOT, needs_tex, pdflatex

needs_poppler = pytest.mark.skipif(not (shutil.which("pdftotext") and shutil.which("pdftoppm")),
                                   reason="pdftotext or pdftoppm is not installed")

# a(z) = 3/32 (3N^3(1 - z^2) - N) at N = 3, a parabola with its top at z = 0.
PARABOLA = PlotData("eps", "-1", "1", {"N": "3"},
                    {"a": [(i / 10, 3 / 32 * (81 * (1 - (i / 10) ** 2) - 3)) for i in range(-10, 11)]})
TWO = PlotData("z", "1/2", "3", {"N": "4", "g": "3"},
               {"a_star": [(0.5 + i / 4, 1 + i) for i in range(11)],
                "curve 2": [(0.5 + i / 4, 5 - i / 2) for i in range(11)]})
HOSTILE_NAME = 'x)(\\<script>&"'
HOSTILE = PlotData("t", "0", "1", {HOSTILE_NAME: "1/2"},
                   {HOSTILE_NAME: [(0.0, 0.0), (1.0, 1.0)], "b": [(0.0, 1.0), (1.0, 0.0)]})


def _svg(plot: PlotData, notation=None) -> ET.Element:
    return ET.fromstring(plot_svg(plot, notation or {}))


def _points(polyline: ET.Element) -> list[tuple[float, float]]:
    return [tuple(map(float, p.split(","))) for p in polyline.get("points").split()]


def _text(svg: ET.Element) -> str:
    return "".join("".join(t.itertext()) + "\n" for t in svg.iter("text"))


# ------------------------------------------------------------------ layout

def test_ticks_are_nice_numbers_with_equal_decimals():
    # steps of 1, 2, 2.5 or 5 times a power of ten: common practice, no source
    t = ticks(-1.1, 1.1, 7)
    assert t.values == (-1.0, -0.5, 0.0, 0.5, 1.0) and t.power == 0
    assert t.labels == ("-1.0", "-0.5", "0.0", "0.5", "1.0")
    assert ticks(0.0, 2.2, 9).values == (0.0, 0.25, 0.5, 0.75, 1.0, 1.25, 1.5, 1.75, 2.0)
    assert ticks(7.2, 13.4, 7).values == (8.0, 9.0, 10.0, 11.0, 12.0, 13.0)


def test_large_and_small_ticks_share_a_power_of_ten():
    big = ticks(0.0, 3.1e6, 7)
    assert big.power == 6 and big.labels[:3] == ("0.0", "0.5", "1.0")
    small = ticks(0.0, 4.2e-5, 5)
    assert small.power == -5 and small.labels[1] == "1"


def test_a_flat_curve_and_a_missing_value_still_make_axes():
    flat = layout(PlotData("x", "0", "1", {}, {"f": [(0.0, 2.0), (1.0, 2.0)]}), {})
    assert flat.curves[0].pieces and all(math.isfinite(v) for p in flat.curves[0].pieces for v in p[0])
    gap = layout(PlotData("x", "0", "1", {}, {"f": [(0.0, 1.0), (0.5, float("nan")), (1.0, 1.0)]}), {})
    assert len(gap.curves[0].pieces) == 2
    lone = layout(PlotData("x", "0", "1", {}, {"f": [(0.0, 1.0), (0.5, None), (1.0, 1.0)], "g": []}), {})
    assert [(len(p), len(set(p))) for p in lone.curves[0].pieces] == [(2, 1), (2, 1)] and lone.curves[1].pieces == ()


def test_a_long_line_of_fixed_values_wraps_within_the_figure():
    fixed = {f"mu_{i}": f"{i}/7" for i in range(1, 13)}
    figure = layout(PlotData("x", "0", "1", fixed, {"f": [(0.0, 0.0), (1.0, 1.0)]}), {})
    heading = [t for t in figure.texts if t.anchor == "start" and any(r.text.startswith(" = ") for r in t.label)]
    assert len(heading) > 1
    assert all(t.x + measure(t.label) <= figure.width for t in heading)
    assert "".join(r.text for t in heading for r in t.label).count("μ") == 12


def test_a_dropped_sample_breaks_the_curve_instead_of_bridging_a_pole():
    # 1/x sampled at -1, -1/2, 1/2, 1: the engine dropped x = 0 where it is not real
    pole = layout(PlotData("x", "-1", "1", {}, {"f": [(-1.0, -1.0), (-0.5, -2.0), (0.5, 2.0), (1.0, 1.0)]}), {})
    assert [len(p) for p in pole.curves[0].pieces] == [2, 2]


def test_names_follow_the_notation_rule():
    # the rule of compiler/render/notation.py: italic letter, subscript star, Greek eps
    assert name_label("a_star", {}) == (Run("a", True), Run("∗", False, -0.22, 0.72))
    assert name_label("eps", {}) == (Run("ϵ", True),)
    assert name_label("Phi", {}) == (Run("Φ", False),)
    assert [(r.text, r.italic, r.accent) for r in name_label("Ahat", {})] == [("A", True, "hat")]
    hat = tex_runs(r"\hat{A}_{\mathrm{tw}}")
    assert [(r.text, r.italic, r.accent, r.rise < 0) for r in hat] == [
        ("A", True, "hat", False), ("t", False, "", True), ("w", False, "", True)]
    assert "".join(r.text for r in tex_runs(r"x_{\text{non-free}}-1")) == "xnon-free−1"
    assert [r.italic for r in tex_runs(r"\mathit{N2}\mathrm{d}\,\Sigma")] == [True, True, False, False, False]


# --------------------------------------------------------------------- SVG

def test_svg_is_well_formed_with_one_polyline_per_curve_inside_the_axes():
    svg = _svg(TWO)
    assert svg.tag == "svg" and svg.get("viewBox")
    polylines = list(svg.iter("polyline"))
    assert len(polylines) == len(TWO.curves)
    grid = [line for line in svg.iter("line") if line.get("stroke") == "#" + "".join(
        f"{round(c * 255):02x}" for c in GRID)]
    left = min(float(g.get("x1")) for g in grid)
    right = max(float(g.get("x2")) for g in grid)
    top = min(float(g.get("y1")) for g in grid)
    bottom = max(float(g.get("y2")) for g in grid)
    for polyline in polylines:
        points = _points(polyline)
        assert len(points) == 11
        assert all(left <= x <= right and top <= y <= bottom for x, y in points)
    rising, falling = map(_points, polylines)
    assert rising[-1][1] < rising[0][1] and falling[-1][1] > falling[0][1]  # y grows downwards
    text = _text(svg)
    assert "curve 2" in text and "a∗" in text and "N = 4, g = 3" in text
    assert "−0.5" in _text(_svg(PARABOLA))  # a true minus on the ticks


def test_svg_holds_no_script_url_or_id():
    svg = plot_svg(TWO, {})
    assert not re.search(r"<script|href|url\(|\bid=|<style", svg)


def test_svg_escapes_hostile_names():
    raw = plot_svg(HOSTILE, {})
    assert "<script>" not in raw
    svg = ET.fromstring(raw)
    assert {e.tag for e in svg.iter()} == {"svg", "line", "polyline", "g", "text", "tspan"}
    assert HOSTILE_NAME in _text(svg)


def test_svg_peak_is_at_the_top_of_the_parabola():
    points = _points(next(_svg(PARABOLA).iter("polyline")))
    assert min(points, key=lambda p: p[1]) == points[10]


# --------------------------------------------------------------------- PDF

def _objects(pdf: bytes) -> dict[int, int]:
    """Object number → offset, as the cross-reference table gives them."""
    start = int(re.search(rb"startxref\n(\d+)\n%%EOF\n$", pdf).group(1))
    assert pdf[start:].startswith(b"xref\n")
    head, count = re.match(rb"xref\n(\d+) (\d+)\n", pdf[start:]).groups()
    rows = pdf[start:].split(b"\n")[2:2 + int(count)]
    return {int(head) + i: int(row[:10]) for i, row in enumerate(rows) if row.endswith(b" n ")}


def _content(pdf: bytes) -> bytes:
    stream = re.search(rb"/Length (\d+) /Filter /FlateDecode >>\nstream\n", pdf)
    body = pdf[stream.end():stream.end() + int(stream.group(1))]
    assert pdf[stream.end() + len(body):].startswith(b"\nendstream")
    return zlib.decompress(body)


def test_pdf_cross_reference_offsets_point_at_their_objects():
    pdf = plot_pdf(TWO, {})
    assert pdf.startswith(b"%PDF-1.4\n") and b"CreationDate" not in pdf and b"ModDate" not in pdf
    objects = _objects(pdf)
    assert sorted(objects) == list(range(1, 5))
    for number, offset in objects.items():
        assert pdf[offset:].startswith(b"%d 0 obj\n" % number)
    assert _content(pdf).count(b" S\n") >= len(TWO.curves)


def test_pdf_holds_lines_and_no_text_at_all():
    """The appendix typesets every label; the PDF has no font and no text operator,
    so not even a hostile name reaches it."""
    for plot in (TWO, HOSTILE):
        pdf = plot_pdf(plot, {})
        content = _content(pdf)
        assert b"/Font" not in pdf and b"/BaseFont" not in pdf
        operators = set(re.findall(rb"[A-Za-z\"']+", content))
        assert operators <= {b"J", b"j", b"RG", b"w", b"m", b"l", b"S"}
        assert b"script" not in content


@needs_poppler
def test_poppler_renders_the_page_and_finds_no_text_or_font(tmp_path):
    path = tmp_path / "plot.pdf"
    path.write_bytes(plot_pdf(TWO, {"g": r"\gamma"}))
    run = subprocess.run(["pdftotext", str(path), "-"], capture_output=True, check=True, text=True)
    assert run.stderr == ""  # poppler complains when it has to rebuild a broken cross-reference table
    assert run.stdout.strip() == ""
    fonts = subprocess.run(["pdffonts", str(path)], capture_output=True, check=True, text=True).stdout
    assert len(fonts.strip().splitlines()) == 2  # the heading of pdffonts's table and no row
    png = subprocess.run(["pdftoppm", "-r", "20", "-gray", str(path)], capture_output=True, check=True).stdout
    header = re.match(rb"P5\s+(\d+)\s+(\d+)\s+255\s", png)
    assert header and (int(header.group(1)), int(header.group(2))) == (95, 59)  # 340 x 210 points at 20 dpi, rounded up
    pixels = png[header.end():]
    assert min(pixels) < 128 < max(pixels)  # ink on paper


# -------------------------------------------------- labels typeset by LaTeX

_PUT = re.compile(r"^\\put\(([-\d.]+),([-\d.]+)\)\{\\makebox\(0,0\)\[(b|bl|br)\]\{(.*)\}\}$", re.M)


def _ticks_x(figure) -> list[float]:
    """Where the x axis's tick marks are (3.5 points long, straight down)."""
    return [line.x1 for line in figure.lines if line.x1 == line.x2 and line.y2 - line.y1 == pytest.approx(3.5)]


def _puts(tex: str) -> list[tuple[float, float, str, str]]:
    return [(float(x), float(y), where, label) for x, y, where, label in _PUT.findall(tex)]


def test_labels_are_the_reports_latex():
    printer = LatexPrinter({"g": r"\gamma"})
    # the notation rule of compiler/render/notation.py, as the equations print it: eps is \epsilon,
    # a_star is a with a star below, an override wins
    assert label_tex((("name", "eps"),), printer) == r"$\epsilon$"
    assert label_tex((("name", "a_star"),), printer) == r"$a_{*}$"
    assert label_tex((("number", "-0.5"),), printer) == "$-0.5$"  # math mode: a true minus
    assert label_tex((("power", "-3"), ("gap", ""), ("name", "N"), ("equals", "4"), ("text", ", "),
                      ("name", "g"), ("equals", "-1/2")), printer) == (
        r"$\times 10^{-3}$\quad{}$N = 4$, ${\gamma} = -1/2$")
    assert label_tex((("text", "curve 2"),), printer) == "curve 2"


def test_the_picture_puts_each_label_where_the_layout_measured_it():
    figure = layout(TWO, {})
    tex = plot_picture(TWO, "two.pdf", LatexPrinter({}))
    assert tex.startswith("\\resizebox{0.8\\linewidth}{!}{\\setlength{\\unitlength}{1bp}\\small\n"
                          "\\begin{picture}(340,210)\n\\put(0,0){\\includegraphics[width=340\\unitlength]{two.pdf}}\n")
    puts = _puts(tex)
    assert len(puts) == len(figure.texts)
    ticks_x = _ticks_x(figure)
    below = [p for p in puts if p[2] == "b" and p[3][1:2].isdigit()]
    assert [p[3] for p in below] == ["$0.5$", "$1.0$", "$1.5$", "$2.0$", "$2.5$", "$3.0$"]
    assert [p[0] for p in below] == pytest.approx(ticks_x, abs=0.01) and len({p[1] for p in below}) == 1
    left = [p for p in puts if p[2] == "br"]
    assert len(left) >= 4 and len({p[0] for p in left}) == 1  # right-aligned in one column
    # each legend name starts 4 points after its swatch, its baseline 0.32 of the size below the swatch
    swatches = [line for line in figure.lines if line.width == 1.4]
    legend = [p for p in puts if p[3] in ("$a_{*}$", "curve 2")]
    assert [p[2] for p in legend] == ["bl", "bl"]
    for swatch, (x, y, _, _) in zip(swatches, legend):
        assert x == pytest.approx(swatch.x2 + 4, abs=0.01) and y == pytest.approx(210 - swatch.y1 - 2.88, abs=0.01)
    assert any(p[3] == "$N = 4$, $g = 3$" and p[2] == "bl" for p in puts)  # the fixed values


HOSTILE_VALUE = PlotData("t", "0", "1", {"N": "1}\\input{x}{"}, {HOSTILE_NAME: [(0.0, 0.0), (1.0, 1.0)]})


def test_hostile_names_and_values_are_escaped_in_the_picture():
    for plot in (HOSTILE, HOSTILE_VALUE):
        tex = plot_picture(plot, "h.pdf", LatexPrinter({}))
        assert "<script>" not in tex and "\\input" not in tex
        commands = set(re.findall(r"\\([A-Za-z]+)", tex))
        assert commands <= {"resizebox", "linewidth", "setlength", "unitlength", "small", "begin", "end",
                            "put", "includegraphics", "makebox", "text", "textbackslash", "textless",
                            "textgreater"}
        for _, _, _, label in _puts(tex):  # every label's braces close inside it
            depth = 0
            for ch in re.sub(r"\\[{}]", "", label):
                depth += {"{": 1, "}": -1}.get(ch, 0)
                assert depth >= 0
            assert depth == 0 and label.count("$") % 2 == 0
    assert r"\text{x)(\textbackslash{}\textless{}script\textgreater{}\&" in plot_picture(HOSTILE, "h.pdf", LatexPrinter({}))


def _words(pdf) -> list[tuple[str, float, float, float, float]]:
    """Each word pdftotext finds, with its box (xMin, yMin, xMax, yMax) in points from the top left."""
    page = subprocess.run(["pdftotext", "-bbox", pdf.name, "-"], cwd=pdf.parent, capture_output=True,
                          check=True, text=True).stdout
    found = re.findall(r'<word xMin="([\d.]+)" yMin="([\d.]+)" xMax="([\d.]+)" yMax="([\d.]+)">([^<]*)</word>', page)
    return [(html.unescape(text), *map(float, box)) for *box, text in found]


@needs_tex
def test_latex_typesets_the_labels_in_line_with_the_ticks_in_embedded_fonts(tmp_path):
    """The picture in a plain article: every label is text in the compiled PDF,
    the tick labels sit at the tick positions scaled like the graphic, and
    every font is embedded (pdffonts)."""
    (tmp_path / "two.pdf").write_bytes(plot_pdf(TWO, {"g": r"\gamma"}))
    (tmp_path / "h.pdf").write_bytes(plot_pdf(HOSTILE, {}))
    body = "\n\n".join(plot_picture(p, f, LatexPrinter({"g": r"\gamma"}))
                       for p, f in ((TWO, "two.pdf"), (HOSTILE, "h.pdf")))
    doc = tmp_path / "doc.tex"
    doc.write_text("\\documentclass{article}\n\\usepackage{amsmath}\n\\usepackage{graphicx}\n"
                   f"\\begin{{document}}\n\\noindent\n{body}\n\\end{{document}}\n", encoding="utf-8")
    pdf = pdflatex(doc)
    words = _words(pdf)
    text = re.sub(r"\s", "", "".join(w[0] for w in words))
    assert "a∗" in text and "curve2" in text and "N=4,γ=3" in text and "x)(\\<script>&" in text
    axis_name = next(w for w in words if w[0] == "z")
    words = [w for w in words if w[2] < axis_name[4]]  # the first figure's
    # the article's \textwidth at 10pt is 345pt (LaTeX's size10.clo), 72.27pt to 72bp; the picture is
    # 0.8 of it over the layout's 340bp
    scale = 0.8 * 345 / 72.27 * 72 / 340
    figure = layout(TWO, {"g": r"\gamma"})
    ticks_x = _ticks_x(figure)
    below = [w for w in words if w[0] in ("0.5", "1.0", "1.5", "2.0", "2.5", "3.0")][:len(ticks_x)]
    centres = [(w[1] + w[3]) / 2 for w in below]
    assert len({round(w[2], 1) for w in below}) == 1  # one row
    for i in range(1, len(below)):
        assert centres[i] - centres[0] == pytest.approx((ticks_x[i] - ticks_x[0]) * scale, abs=0.3)
    left = [w for w in words if w[0].isdigit() and w[3] < centres[0]]  # the y axis's labels
    assert len(left) >= 4 and max(w[3] for w in left) - min(w[3] for w in left) < 0.3  # right-aligned
    # 6 points left of the y axis, and centred under their ticks (the layout's anchors)
    axis = next(line.x1 for line in figure.lines if line.x1 == line.x2 and line.width == 0.8 and line.y2 - line.y1 > 10)
    assert centres[0] - left[0][3] == pytest.approx((ticks_x[0] - (axis - 6)) * scale, abs=0.3)
    ticks_y = sorted(line.y1 for line in figure.lines if line.y1 == line.y2 and line.x2 - line.x1 == pytest.approx(3.5))
    middles = sorted((w[2] + w[4]) / 2 for w in left)
    assert [m - middles[0] for m in middles] == pytest.approx([(t - ticks_y[0]) * scale for t in ticks_y], abs=0.3)
    fonts = subprocess.run(["pdffonts", pdf.name], cwd=tmp_path, capture_output=True, check=True, text=True)
    rows = fonts.stdout.strip().splitlines()[2:]
    assert rows and all(re.search(r"\s(yes|no)\s+(yes|no)\s+(yes|no)\s+\d+\s+\d+$", r).group(1) == "yes"
                        for r in rows), fonts.stdout


# ------------------------------------------------------------ determinism

_DIGEST = """
import hashlib
import sys
from compiler.render.plotting.pdf import plot_pdf
from compiler.render.plotting.svg import plot_svg
from compiler.render.plotting.texlabels import plot_picture
from compiler.render.printers import LatexPrinter
from compiler.results import PlotData
plot = PlotData("z", "1/2", "3", {"N": "4", "g": "3"},
                {"a_star": [(0.5 + i / 4, 1 + i / 3) for i in range(11)], "b": [(0.5, 1.0), (3.0, 2.0)]})
tex = plot_picture(plot, "p.pdf", LatexPrinter({"b": "\\\\beta_1"}))
print(hashlib.sha256(plot_pdf(plot, {}) + (plot_svg(plot, {"b": "\\\\beta_1"}) + tex).encode()).hexdigest())
print(sorted(m for m in ("matplotlib", "sympy") if m in sys.modules))
"""


def test_the_same_plot_gives_the_same_bytes_in_another_process():
    """Two processes with different hash seeds; drawing loads no plotting library (nor sympy)."""
    outputs = {subprocess.run([sys.executable, "-c", _DIGEST], cwd=ROOT, capture_output=True, text=True,
                              check=True, env={"PYTHONPATH": str(ROOT), "PYTHONHASHSEED": seed}).stdout
               for seed in ("1", "2")}
    assert len(outputs) == 1
    digest, loaded = next(iter(outputs)).split("\n")[:2]
    assert len(digest) == 64 and loaded == "[]"
