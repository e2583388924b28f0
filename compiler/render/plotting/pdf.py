"""A plot as a one-page PDF for ``\\includegraphics``, written by hand.

Vector lines and the base-14 fonts (Times-Roman, Times-Italic, Symbol for
Greek and mathematical signs), which every viewer has, so nothing is
embedded.  Each text run is placed at the position the layout measured; an
accent is its own glyph centred over its run.  No dates, no ids: the same
layout gives the same bytes.  The page stream is deflated (zlib, fixed level).
"""
from __future__ import annotations

import zlib

from compiler.render.plotting.fonts import ITALIC, ROMAN, SYMBOL, glyph, width
from compiler.render.plotting.layout import number, INK, SIZE, Layout, Text, layout, measure
from compiler.render.plotting.labels import Run
from compiler.results import PlotData

_FONTS = {ROMAN: "F1", ITALIC: "F2", SYMBOL: "F3"}
_SLANT = 0.21  # oblique Symbol for slanted Greek, as Times-Italic leans (about 12 degrees)
#: Accent name → (font, code, rise over a lower-case letter in units of the run's size).
_ACCENT_GLYPHS = {"hat": (ROMAN, 0x88, 0.0), "bar": (ROMAN, 0xAF, 0.0), "tilde": (ROMAN, 0x98, 0.0),
                  "ddot": (ROMAN, 0xA8, 0.0), "dot": (SYMBOL, 0xD7, 0.42), "check": (ROMAN, ord("v"), 0.52),
                  "vec": (SYMBOL, 0xAE, 0.5)}
#: Accent scale: a check is a small v, a vector arrow a small arrow.
_ACCENT_SCALE = {"check": 0.45, "vec": 0.5}
_TALL = 0.21  # extra rise over capitals and digits: cap height less x-height in Times



def _string(codes: bytes) -> str:
    """A PDF literal string: parentheses and backslashes escaped, the rest octal if not printable."""
    return "(" + "".join("\\" + chr(b) if b in b"()\\" else chr(b) if 32 <= b < 127 else f"\\{b:03o}"
                         for b in codes) + ")"


def _show(font: str, size: float, x: float, y: float, codes: bytes, italic: bool) -> str:
    slant = _SLANT if italic and font == SYMBOL else 0
    return f"BT /{_FONTS[font]} {number(size)} Tf 1 0 {number(slant)} 1 {number(x)} {number(y)} Tm {_string(codes)} Tj ET"


def _segments(run: Run) -> list[tuple[str, bytes]]:
    """The run's characters grouped by the font that draws them."""
    out: list[tuple[str, bytes]] = []
    for char in run.text:
        font, code = glyph(char, run.italic)
        if out and out[-1][0] == font:
            out[-1] = (font, out[-1][1] + bytes([code]))
        else:
            out.append((font, bytes([code])))
    return out


def _accent(run: Run, x: float, w: float, y: float, size: float) -> str:
    font, code, rise = _ACCENT_GLYPHS[run.accent]
    scale = _ACCENT_SCALE.get(run.accent, 1.0)
    tall = any(c.isupper() or c.isdigit() for c in run.text)
    lean = size * 0.12 if run.italic else 0  # over an italic letter the top is to the right
    aw = width(font, code) * size * scale
    return _show(font, size * scale, x + (w - aw) / 2 + lean, y + size * (rise + (_TALL if tall else 0)),
                 bytes([code]), False)


def _text(t: Text, height: float) -> list[str]:
    x = t.x - {"start": 0, "middle": measure(t.label) / 2, "end": measure(t.label)}[t.anchor]
    ops = []
    for run in t.label:
        size, y, start = SIZE * run.scale, height - t.y + run.rise * SIZE, x
        for font, codes in _segments(run):
            ops.append(_show(font, size, x, y, codes, run.italic))
            x += sum(width(font, c) for c in codes) * size
        if run.accent:
            ops.append(_accent(run, start, x - start, y, size))
    return ops


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
    ops.append(f"{_rgb(INK)} rg")
    for t in figure.texts:
        ops.extend(_text(t, h))
    return "\n".join(ops).encode("latin-1")


def to_pdf(figure: Layout) -> bytes:
    """One page the size of the figure; the cross-reference table points at each object."""
    stream = zlib.compress(_content(figure), 9)
    fonts = " ".join(f"/{key} {n} 0 R" for n, key in enumerate(_FONTS.values(), start=5))
    objects = [
        b"<< /Type /Catalog /Pages 2 0 R >>",
        b"<< /Type /Pages /Kids [3 0 R] /Count 1 >>",
        (f"<< /Type /Page /Parent 2 0 R /MediaBox [0 0 {number(figure.width)} {number(figure.height)}] "
         f"/Resources << /Font << {fonts} >> >> /Contents 4 0 R >>").encode(),
        b"<< /Length %d /Filter /FlateDecode >>\nstream\n" % len(stream) + stream + b"\nendstream",
        *(f"<< /Type /Font /Subtype /Type1 /BaseFont /{font}"
          f"{' /Encoding /WinAnsiEncoding' if font != SYMBOL else ''} >>".encode() for font in _FONTS),
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
    """``plot`` as a PDF file's bytes, names by the report's notation."""
    return to_pdf(layout(plot, notation))
