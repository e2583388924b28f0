"""Plots drawn by hand (compiler/render/plotting/): the layout's ticks and
labels, the SVG as well-formed XML, the PDF as a file poppler reads back,
hostile names escaped in both, and the same bytes in another process."""
from __future__ import annotations

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
from compiler.results import PlotData
from support import ROOT

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
    assert [r.text for label in t.labels for r in label] == ["−1.0", "−0.5", "0.0", "0.5", "1.0"]
    assert ticks(0.0, 2.2, 9).values == (0.0, 0.25, 0.5, 0.75, 1.0, 1.25, 1.5, 1.75, 2.0)
    assert ticks(7.2, 13.4, 7).values == (8.0, 9.0, 10.0, 11.0, 12.0, 13.0)


def test_large_and_small_ticks_share_a_power_of_ten():
    big = ticks(0.0, 3.1e6, 7)
    assert big.power == 6 and [label[0].text for label in big.labels][:3] == ["0.0", "0.5", "1.0"]
    small = ticks(0.0, 4.2e-5, 5)
    assert small.power == -5 and small.labels[1][0].text == "1"


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


def test_pdf_cross_reference_offsets_point_at_their_objects():
    pdf = plot_pdf(TWO, {})
    assert pdf.startswith(b"%PDF-1.4\n") and b"CreationDate" not in pdf and b"ModDate" not in pdf
    objects = _objects(pdf)
    assert sorted(objects) == list(range(1, 8))
    for number, offset in objects.items():
        assert pdf[offset:].startswith(b"%d 0 obj\n" % number)
    stream = re.search(rb"/Length (\d+) /Filter /FlateDecode >>\nstream\n", pdf)
    body = pdf[stream.end():stream.end() + int(stream.group(1))]
    assert pdf[stream.end() + len(body):].startswith(b"\nendstream")
    assert zlib.decompress(body).count(b" S\n") >= len(TWO.curves)


def _content(pdf: bytes) -> bytes:
    stream = re.search(rb"stream\n(.*)\nendstream", pdf, re.S).group(1)
    return zlib.decompress(stream)


def test_pdf_strings_escape_parentheses_and_backslashes():
    content = _content(plot_pdf(HOSTILE, {}))
    assert b"(x\\)\\(\\\\<script>&\") Tj" in content
    for string in re.findall(rb"\((?:[^()\\]|\\.)*\) Tj", content):  # every string closes where it should
        assert string.endswith(b") Tj")
    assert content.count(b" Tj") == len(re.findall(rb"\((?:[^()\\]|\\.)*\) Tj", content))


@needs_poppler
def test_poppler_reads_the_labels_and_renders_the_page(tmp_path):
    path = tmp_path / "plot.pdf"
    path.write_bytes(plot_pdf(TWO, {"g": r"\gamma"}))
    run = subprocess.run(["pdftotext", str(path), "-"], capture_output=True, check=True, text=True)
    assert run.stderr == ""  # poppler complains when it has to rebuild a broken cross-reference table
    flat = re.sub(r"\s+", "", run.stdout)
    assert "a∗" in flat and "curve2" in flat and "N=4,γ=3" in flat and "z" in flat
    png = subprocess.run(["pdftoppm", "-r", "20", "-gray", str(path)], capture_output=True, check=True).stdout
    header = re.match(rb"P5\s+(\d+)\s+(\d+)\s+255\s", png)
    assert header and (int(header.group(1)), int(header.group(2))) == (95, 59)  # 340 x 210 points at 20 dpi, rounded up
    pixels = png[header.end():]
    assert min(pixels) < 128 < max(pixels)  # ink on paper


@needs_poppler
def test_poppler_reads_hostile_names_back(tmp_path):
    path = tmp_path / "plot.pdf"
    path.write_bytes(plot_pdf(HOSTILE, {}))
    text = subprocess.run(["pdftotext", str(path), "-"], capture_output=True, check=True, text=True).stdout
    assert HOSTILE_NAME in text


# ------------------------------------------------------------ determinism

_DIGEST = """
import hashlib
import sys
from compiler.render.plotting.pdf import plot_pdf
from compiler.render.plotting.svg import plot_svg
from compiler.results import PlotData
plot = PlotData("z", "1/2", "3", {"N": "4", "g": "3"},
                {"a_star": [(0.5 + i / 4, 1 + i / 3) for i in range(11)], "b": [(0.5, 1.0), (3.0, 2.0)]})
print(hashlib.sha256(plot_pdf(plot, {}) + plot_svg(plot, {"b": "\\\\beta_1"}).encode()).hexdigest())
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
