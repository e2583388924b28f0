"""A plot in the LaTeX appendix: the text-free PDF with every label typeset by LaTeX over it.

Journals want every font embedded and the paper's own fonts in its figures,
so the PDF (``pdf``) holds only lines, and the labels are put over it with
the kernel ``picture`` environment, each at the baseline and anchor the one
layout gave it (in big points, so the SVG and the appendix agree).  Names
are the report's LaTeX of the notation rule, numbers are mathematics with a
true minus.  The picture is set at the layout's own size, with the labels
at ``\\small`` (the layout's 9 points in a 10pt paper), and scaled as a
whole to 0.8 of the line width, so labels keep the room measured for them
in any column.  Only LaTeX's kernel and graphicx are used.
"""
from __future__ import annotations

import itertools
import re

from compiler.render.notation import name_tree
from compiler.render.plotting.labels import Part
from compiler.render.plotting.layout import Layout, layout, number
from compiler.render.printers import LatexPrinter
from compiler.results import PlotData
from compiler.texsafe import escape_text

#: Names a document can hold (the lexer's identifiers, or a class of one);
#: anything else came from elsewhere (a tampered cache) and is shown as text.
_IDENTIFIER = re.compile(r"[A-Za-z_][A-Za-z0-9_]*(\([A-Za-z_][A-Za-z0-9_]*\))?")
_NUMBER = re.compile(r"-?[0-9]+(\.[0-9]+)?(/[0-9]+)?")
#: Layout anchor → picture box position, the reference point on the baseline.
_ANCHORS = {"start": "bl", "middle": "b", "end": "br"}


def name_math(name: str, printer: LatexPrinter) -> str:
    """``name`` as LaTeX math by the notation rule (an override was checked
    when the document was read); a name no document could hold, escaped."""
    if name in printer.notation or _IDENTIFIER.fullmatch(name):
        return printer.doprint(name_tree(name, printer.notation))
    return rf"\text{{{escape_text(name)}}}"


def number_math(text: str) -> str:
    """A number as mathematics (``-1/2`` with a true minus); other text escaped."""
    return text if _NUMBER.fullmatch(text) else rf"\text{{{escape_text(text)}}}"


#: Part kind → (is it mathematics, its LaTeX).
_TEX = {
    "name": lambda text, printer: (True, name_math(text, printer)),
    "number": lambda text, printer: (True, number_math(text)),
    "equals": lambda text, printer: (True, "= " + number_math(text)),
    "power": lambda text, printer: (True, rf"\times 10^{{{number_math(text)}}}"),
    "text": lambda text, printer: (False, escape_text(text)),
    "gap": lambda text, printer: (False, r"\quad{}"),
}


def label_tex(parts: tuple[Part, ...], printer: LatexPrinter) -> str:
    """A label's parts as LaTeX: neighbouring mathematics in one ``$...$``."""
    out = []
    pieces = (_TEX[kind](text, printer) for kind, text in parts)
    for math, group in itertools.groupby(pieces, key=lambda piece: piece[0]):
        body = (" " if math else "").join(tex for _, tex in group)
        out.append(f"${body}$" if math else body)
    return "".join(out)


def picture(figure: Layout, file: str, printer: LatexPrinter) -> str:
    """The figure's PDF ``file`` with the labels over it, 0.8 of the line width wide."""
    h = figure.height
    puts = "".join(f"\\put({number(t.x)},{number(h - t.y)}){{\\makebox(0,0)[{_ANCHORS[t.anchor]}]"
                   f"{{{label_tex(t.parts, printer)}}}}}\n" for t in figure.texts)
    return (f"\\resizebox{{0.8\\linewidth}}{{!}}{{\\setlength{{\\unitlength}}{{1bp}}\\small\n"
            f"\\begin{{picture}}({number(figure.width)},{number(h)})\n"
            f"\\put(0,0){{\\includegraphics[width={number(figure.width)}\\unitlength]{{{file}}}}}\n"
            f"{puts}\\end{{picture}}}}")


def plot_picture(plot: PlotData, file: str, printer: LatexPrinter) -> str:
    """``plot`` as the appendix shows it, names by the printer's notation."""
    return picture(layout(plot, printer.notation), file, printer)
