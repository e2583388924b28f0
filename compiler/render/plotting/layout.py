"""Where everything on a plot goes: axes box, nice ticks, grid, curves, legend, labels.

Coordinates are points (1/72 inch) on a page of ``WIDTH`` by ``HEIGHT``,
y downwards as in SVG (the PDF and the LaTeX picture flip it).  Text is
placed by anchor at its baseline and measured with Times metrics, which the
SVG draws with; the LaTeX appendix typesets the same parts in the paper's
fonts over the text-free PDF, in the room measured here.
Numbers are only ever formatted from exact tick multiples, so the output is
the same for the same data.
"""
from __future__ import annotations

import math
from dataclasses import dataclass, replace
from decimal import Decimal
from fractions import Fraction

from compiler.render.plotting.fonts import glyph, width
from compiler.render.plotting.labels import Label, Part, spell
from compiler.results import PlotData

WIDTH, HEIGHT = 340.0, 210.0
SIZE = 9.0  # base font size, points
INK, GRID = (0.12, 0.114, 0.102), (0.86, 0.86, 0.86)
#: Curve colours, distinguishable with the common colour-vision deficiencies:
#: Okabe and Ito, "Color Universal Design" (2008), in their order, black last.
COLORS = ((0.0, 0.447, 0.698), (0.835, 0.369, 0.0), (0.0, 0.62, 0.451), (0.8, 0.475, 0.655),
          (0.902, 0.624, 0.0), (0.337, 0.706, 0.914), (0.0, 0.0, 0.0))
#: Beyond this a value is drawn as a gap: the axis span must stay a finite float.
_LARGEST = 1e300
#: Room for text measured in Times: a browser without Times draws the SVG in a
#: wider serif (DejaVu Serif digits are 27% wider than Times digits).
_SLACK = 1.3
_MARGIN = 0.05  # data to axes edge, a fraction of the span (common practice, no source)
_STEPS = (1, 2, 25, 5, 10)  # tick steps by tens: 1, 2, 2.5, 5 (common practice, no source)


@dataclass(frozen=True)
class Line:
    """A straight stroke, in points."""

    x1: float
    y1: float
    x2: float
    y2: float
    color: tuple[float, float, float]
    width: float


@dataclass(frozen=True)
class Text:
    """A label at a baseline point with its anchor."""

    x: float
    y: float  # baseline
    label: Label  # as the SVG draws it
    anchor: str  # "start", "middle" or "end"
    parts: tuple[Part, ...]  # what it says, for the appendix to typeset


@dataclass(frozen=True)
class Curve:
    """A curve's colour and its unbroken runs of points."""

    color: tuple[float, float, float]
    pieces: tuple[tuple[tuple[float, float], ...], ...]  # unbroken runs of points


@dataclass(frozen=True)
class Layout:
    """Everything a plot draws, in points: both backends read only this."""

    width: float
    height: float
    lines: tuple[Line, ...]  # grid first, then axes and ticks, then legend samples
    curves: tuple[Curve, ...]
    texts: tuple[Text, ...]


def number(v: float) -> str:
    """A coordinate as both backends write it: two decimals, no trailing zeros."""
    text = f"{v:.2f}".rstrip("0").rstrip(".")
    return "0" if text == "-0" else text


def measure(label: Label) -> float:
    """Printed width of ``label`` at ``SIZE``, in points."""
    return sum(width(*glyph(c, r.italic)) * SIZE * r.scale for r in label for c in r.text)


# ------------------------------------------------------------------ ticks

@dataclass(frozen=True)
class Ticks:
    """Tick positions and labels along one axis."""

    values: tuple[float, ...]
    labels: tuple[str, ...]  # ASCII numbers, ``-0.5``
    power: int  # labels are in units of 10**power (0: as they are)


def _step(span: float, target: int) -> tuple[int, int]:
    """A nice tick step as ``mantissa * 10**exponent``."""
    raw = span / target
    exponent = math.floor(math.log10(raw))
    for mantissa in _STEPS:
        size = mantissa / 10 if mantissa == 25 else mantissa
        if size * 10 ** exponent >= raw * (1 - 1e-9):
            return {25: (25, exponent - 1), 10: (1, exponent + 1)}.get(mantissa, (mantissa, exponent))
    raise AssertionError("a step of 10 always fits")


def ticks(low: float, high: float, target: int) -> Ticks:
    """Tick values at a nice step inside [low, high], labelled with equal decimals;
    very large or small numbers share a power of ten shown once by the axis."""
    mantissa, exponent = _step(high - low, target)
    step = mantissa * 10.0 ** exponent
    ks = range(math.ceil(low / step - 1e-9), math.floor(high / step + 1e-9) + 1)
    exact = [Decimal(k * mantissa).scaleb(exponent) for k in ks]
    top = max(abs(v) for v in exact) if any(exact) else Decimal(0)
    power = top.adjusted() if top and not -3 <= top.adjusted() < 5 else 0
    decimals = max(0, power - exponent)
    labels = tuple(f"{v.scaleb(-power):.{decimals}f}" for v in exact)
    return Ticks(tuple(float(v) for v in exact), labels, power)


def _limits(values: list[float]) -> tuple[float, float]:
    """The axis range: the data with a margin; a flat or empty curve gets a unit span."""
    if not values:
        return 0.0, 1.0
    low, high = min(values), max(values)
    if high - low <= 1e-12 * max(abs(low), abs(high), 1e-300):
        half = abs(low) / 10 or 1.0
        return low - half, high + half
    pad = (high - low) * _MARGIN
    return low - pad, high + pad


# ------------------------------------------------------------------ layout

def _drawable(v) -> bool:
    return v is not None and math.isfinite(v) and abs(v) <= _LARGEST


def _pieces(points) -> list[list[tuple[float, float]]]:
    """Points split where a value is missing, not a finite float in range, or
    skipped: the engine samples evenly, so a step wider than the usual one is a
    point it dropped (not real there), and the curve breaks instead of
    bridging a pole.  A lone point is kept as a dot."""
    points = [(x, y) for x, y in points if _drawable(x)]
    usual = min((b[0] - a[0] for a, b in zip(points, points[1:]) if b[0] > a[0]), default=0.0)
    out, piece, previous = [], [], 0.0
    for x, y in points:
        if piece and (not _drawable(y) or x - previous > usual * 1.5):
            out.append(piece)
            piece = []
        if _drawable(y):
            piece.append((x, y))
        previous = x
    # a lone point doubled is a line of length zero, which round caps show as a dot
    return [p if len(p) > 1 else p * 2 for p in (out + [piece] if piece else out)]


def _number(text: str) -> float | None:
    """An interval end as the engine wrote it (``-1``, ``1/2``), None if it is not one."""
    try:
        return float(Fraction(text))
    except (ValueError, ZeroDivisionError):
        return None


def _legend(entries: list[tuple[tuple, Text]], box, points) -> tuple[list[Line], list[Text]]:
    """Legend in the inside corner its box covers fewest curve points of;
    ``entries`` are colours and unplaced texts."""
    left, top, right, bottom = box
    sample, gap, pad, row = 16.0, 4.0, 6.0, SIZE * 1.35
    w = sample + gap + max(measure(text.label) for _, text in entries) * _SLACK
    h = row * len(entries)
    corners = [(right - pad - w, top + pad), (left + pad, top + pad),
               (right - pad - w, bottom - pad - h), (left + pad, bottom - pad - h)]

    def covered(corner) -> int:
        x, y = corner
        return sum(x - gap <= px <= x + w + gap and y - gap <= py <= y + h + gap for px, py in points)

    x, y = min(corners, key=covered)  # ties: the first, upper right as is usual
    lines, texts = [], []
    for i, (color, text) in enumerate(entries):
        mid = y + row * (i + 0.5)
        lines.append(Line(x, mid, x + sample, mid, color, 1.4))
        texts.append(replace(text, x=x + sample + gap, y=mid + SIZE * 0.32))
    return lines, texts


def layout(plot: PlotData, notation: dict[str, str]) -> Layout:
    """The whole figure for ``plot``, names printed by the report's notation rule."""
    curves = {name: _pieces(points) for name, points in plot.curves.items()}
    xs = [x for pieces in curves.values() for piece in pieces for x, _ in piece]
    ys = [y for pieces in curves.values() for piece in pieces for _, y in piece]
    ends = [v for v in (_number(plot.low), _number(plot.high)) if v is not None]
    x0, x1 = _limits(xs + ends)
    y0, y1 = _limits(ys)
    xt, yt = ticks(x0, x1, 7), ticks(y0, y1, 7)

    def text(x: float, y: float, parts: tuple[Part, ...], anchor: str) -> Text:
        return Text(x, y, spell(parts, notation), anchor, parts)

    ylabels = [text(0, 0, (("number", n),), "end") for n in yt.labels]
    right = WIDTH - 10
    left = 6 + max(measure(t.label) for t in ylabels) * _SLACK + 7
    heading = _heading(plot, notation, yt.power, right - left)
    top = 8 + SIZE * 1.35 * len(heading) + (SIZE * 0.3 if heading else 0)
    bottom = HEIGHT - (SIZE * 3.4 + 8)
    box = (left, top, right, bottom)

    def px(x: float) -> float:
        return left + (x - x0) / (x1 - x0) * (right - left)

    def py(y: float) -> float:
        return bottom - (y - y0) / (y1 - y0) * (bottom - top)

    lines = [Line(px(v), top, px(v), bottom, GRID, 0.4) for v in xt.values]
    lines += [Line(left, py(v), right, py(v), GRID, 0.4) for v in yt.values]
    lines += [Line(left, top, left, bottom, INK, 0.8), Line(left, bottom, right, bottom, INK, 0.8)]
    lines += [Line(px(v), bottom, px(v), bottom + 3.5, INK, 0.8) for v in xt.values]
    lines += [Line(left - 3.5, py(v), left, py(v), INK, 0.8) for v in yt.values]
    texts = [text(px(v), bottom + 5 + SIZE, (("number", n),), "middle") for v, n in zip(xt.values, xt.labels)]
    texts += [replace(t, x=left - 6, y=py(v) + SIZE * 0.32) for v, t in zip(yt.values, ylabels)]
    texts.append(text((left + right) / 2, HEIGHT - 8, (("name", plot.variable),), "middle"))
    texts += [text(left, top - SIZE * (0.6 + 1.35 * (len(heading) - 1 - i)), line, "start")
              for i, line in enumerate(heading)]
    if xt.power:
        texts.append(text(right, bottom + 5 + SIZE * 2.4, (("power", str(xt.power)),), "end"))

    drawn = [Curve(COLORS[i % len(COLORS)], tuple(tuple((px(x), py(y)) for x, y in piece) for piece in pieces))
             for i, pieces in enumerate(curves.values())]
    entries = [(c.color, text(0, 0, (_curve_part(name),), "start")) for c, name in zip(drawn, curves)]
    if entries:
        points = [p for c in drawn for piece in c.pieces for p in piece]
        legend_lines, legend_texts = _legend(entries, box, points)
        lines += legend_lines
        texts += legend_texts
    return Layout(WIDTH, HEIGHT, tuple(lines), tuple(drawn), tuple(texts))


def _curve_part(name: str) -> Part:
    """A named curve by the notation rule; an unnamed one as numbered."""
    return ("text", name) if name.startswith("curve ") else ("name", name)


def _heading(plot: PlotData, notation: dict[str, str], power: int, width: float) -> list[tuple[Part, ...]]:
    """The lines above the axes: the y unit (``×10⁷``) if any, then the fixed
    values ``N = 3, g = 2``, wrapped after a comma to fit ``width``."""
    pieces = [(("name", name), ("equals", value)) for name, value in plot.fixed.items()]
    lines, current = [], (("power", str(power)), ("gap", "")) if power else ()
    for i, piece in enumerate(pieces):
        comma = (("text", ", "),) if i else ()
        if i and measure(spell(current + comma + piece, notation)) * _SLACK > width:
            lines.append(current + (("text", ","),))
            current = piece
        else:
            current += comma + piece
    return lines + [current] if current else lines
