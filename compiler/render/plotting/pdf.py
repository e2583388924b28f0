"""A plot as a one-page PDF for the LaTeX appendix, written by hand: lines only.

The page holds no text and no font: axes, ticks, grid, curves and legend
swatches are vector strokes, and the appendix typesets every label over the
page in the paper's own fonts (``texlabels``), so the compiled paper embeds
only TeX's fonts.  No dates, no ids: the same layout gives the same bytes.
The page stream is deflated (zlib, fixed level).
"""
from __future__ import annotations

import zlib

from compiler.render.plotting.layout import number, Layout, layout
from compiler.results import PlotData


def _rgb(color: tuple[float, float, float]) -> str:
    return " ".join(number(c) for c in color)


def _content(figure: Layout) -> bytes:
    h = figure.height
    ops = ["1 J 1 j"]
    for line in figure.lines:
        ops.append(f"{_rgb(line.color)} RG {number(line.width)} w "
                   f"{number(line.x1)} {number(h - line.y1)} m {number(line.x2)} {number(h - line.y2)} l S")
    for curve in figure.curves:
        ops.append(f"{_rgb(curve.color)} RG 1.4 w")
        for piece in curve.pieces:
            path = " ".join(f"{number(x)} {number(h - y)} {'m' if i == 0 else 'l'}" for i, (x, y) in enumerate(piece))
            ops.append(path + " S")
    return "\n".join(ops).encode("ascii")


def to_pdf(figure: Layout) -> bytes:
    """One page the size of the figure; the cross-reference table points at each object."""
    stream = zlib.compress(_content(figure), 9)
    objects = [
        b"<< /Type /Catalog /Pages 2 0 R >>",
        b"<< /Type /Pages /Kids [3 0 R] /Count 1 >>",
        (f"<< /Type /Page /Parent 2 0 R /MediaBox [0 0 {number(figure.width)} {number(figure.height)}] "
         f"/Resources << >> /Contents 4 0 R >>").encode(),
        b"<< /Length %d /Filter /FlateDecode >>\nstream\n" % len(stream) + stream + b"\nendstream",
    ]
    out = bytearray(b"%PDF-1.4\n%\xe2\xe3\xcf\xd3\n")
    offsets = []
    for index, body in enumerate(objects, start=1):
        offsets.append(len(out))
        out += b"%d 0 obj\n" % index + body + b"\nendobj\n"
    xref = len(out)
    out += b"xref\n0 %d\n0000000000 65535 f \n" % (len(objects) + 1)
    out += b"".join(b"%010d 00000 n \n" % offset for offset in offsets)
    out += b"trailer\n<< /Size %d /Root 1 0 R >>\nstartxref\n%d\n%%%%EOF\n" % (len(objects) + 1, xref)
    return bytes(out)


def plot_pdf(plot: PlotData, notation: dict[str, str]) -> bytes:
    """``plot``'s lines as a PDF file's bytes (the labels are the appendix's)."""
    return to_pdf(layout(plot, notation))
