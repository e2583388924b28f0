"""A plot as a bare ``<svg>`` element to inline in the HTML report.

No script, no URL, no id: lines, polylines and text, every text escaped.
HTML5 supplies the namespace.  The text names a Times-like family, whose
metrics the layout measured with; runs become ``tspan``s, accents combining
marks after their letters.
"""
from __future__ import annotations

from markupsafe import escape

from compiler.render.plotting.layout import number, INK, SIZE, Layout, Text, layout
from compiler.render.plotting.labels import Run
from compiler.results import PlotData

FAMILY = "'Times New Roman', Times, 'Liberation Serif', 'Nimbus Roman', 'TeX Gyre Termes', serif"
_MARKS = {"hat": "\u0302", "bar": "\u0304", "tilde": "\u0303", "dot": "\u0307", "ddot": "\u0308",
          "vec": "\u20d7", "check": "\u030c"}



def _color(rgb: tuple[float, float, float]) -> str:
    return "#" + "".join(f"{round(c * 255):02x}" for c in rgb)


def _tspan(run: Run, rise: float) -> str:
    """One run, shifted from the previous run's baseline (``rise`` there)."""
    attrs = []
    if run.italic:
        attrs.append('font-style="italic"')
    if run.scale != 1:
        attrs.append(f'font-size="{number(SIZE * run.scale)}"')
    if run.rise != rise:
        attrs.append(f'dy="{number((rise - run.rise) * SIZE)}"')
    text = "".join(c + _MARKS[run.accent] for c in run.text) if run.accent else run.text
    return f"<tspan{' ' if attrs else ''}{' '.join(attrs)}>{escape(text)}</tspan>"


def _text(t: Text) -> str:
    spans, rise = [], 0.0
    for run in t.label:
        spans.append(_tspan(run, rise))
        rise = run.rise
    return (f'<text x="{number(t.x)}" y="{number(t.y)}" text-anchor="{t.anchor}">'
            f'{"".join(spans)}</text>')


def to_svg(figure: Layout) -> str:
    out = [f'<svg viewBox="0 0 {number(figure.width)} {number(figure.height)}" width="{number(figure.width)}" '
           f'height="{number(figure.height)}" font-family="{escape(FAMILY)}" font-size="{number(SIZE)}" '
           f'stroke-linecap="round">']
    for line in figure.lines:
        out.append(f'<line x1="{number(line.x1)}" y1="{number(line.y1)}" x2="{number(line.x2)}" y2="{number(line.y2)}" '
                   f'stroke="{_color(line.color)}" stroke-width="{number(line.width)}"/>')
    for curve in figure.curves:
        for piece in curve.pieces:
            points = " ".join(f"{number(x)},{number(y)}" for x, y in piece)
            out.append(f'<polyline fill="none" stroke="{_color(curve.color)}" stroke-width="1.4" '
                       f'stroke-linejoin="round" points="{points}"/>')
    out.append(f'<g fill="{_color(INK)}">')
    out.extend(_text(t) for t in figure.texts)
    out.append("</g></svg>")
    return "\n".join(out)


def plot_svg(plot: PlotData, notation: dict[str, str]) -> str:
    """``plot`` as an inline ``<svg>`` element, names by the report's notation."""
    return to_svg(layout(plot, notation))
