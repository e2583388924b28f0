"""Drawing ``plot`` steps: inline SVG for HTML, PDF for the LaTeX appendix.

matplotlib is imported only when a document has a plot, since it is slow to
load.  Output is deterministic (fixed id salt, no dates) so rebuilding an
unchanged document gives the same files; the SVG is cut down to a bare
``<svg>`` element with no URL in it, so the HTML report stays offline-safe.
"""
from __future__ import annotations

import atexit
import hashlib
import io
import os
import re
import shutil
import sys
import tempfile

from compiler.render.notation import name_tree
from compiler.render.printers import LatexPrinter
from compiler.results import PlotData

_PROLOG = re.compile(r"^.*?(?=<svg)", re.S)
_METADATA = re.compile(r"<metadata>.*?</metadata>\s*", re.S)
_XMLNS = re.compile(r'\s+xmlns(?::\w+)?="[^"]*"')


def _name(name: str, notation: dict[str, str]) -> str:
    """A name as matplotlib mathtext, by the same rule as the report's math."""
    return f"${LatexPrinter(notation).doprint(name_tree(name, notation))}$"


def _label(plot: PlotData, notation: dict[str, str]) -> str:
    return ", ".join(f"{_name(k, notation)} = {v}" for k, v in plot.fixed.items())


def _matplotlib():
    """matplotlib, imported on first use with its config folder (font cache, rc
    file) in a temporary folder removed at exit: it writes nothing under $HOME
    and no user rc file changes the plots."""
    if "matplotlib" not in sys.modules:
        folder = tempfile.mkdtemp(prefix="anomark-matplotlib-")
        atexit.register(shutil.rmtree, folder, ignore_errors=True)
        os.environ["MPLCONFIGDIR"] = folder
    import matplotlib
    return matplotlib


def _draw(plot: PlotData, fmt: str, metadata: dict, notation: dict[str, str]) -> bytes:
    """Render ``plot`` in ``fmt``; the id salt is a digest of the plot itself,
    so two plots in one page do not share element ids yet each is reproducible."""
    matplotlib = _matplotlib()
    from matplotlib.figure import Figure

    salt = hashlib.sha256(repr((plot.variable, plot.fixed, plot.curves)).encode()).hexdigest()[:12]
    style = {"svg.hashsalt": salt, "svg.fonttype": "none", "font.family": "serif",
             "font.size": 9, "axes.spines.top": False, "axes.spines.right": False}
    with matplotlib.rc_context(style):
        fig = Figure(figsize=(5.2, 3.2))
        fig.patch.set_alpha(0)  # the page shows through, as with a figure in print
        ax = fig.subplots()
        ax.set_facecolor("none")
        for name, points in plot.curves.items():
            label = _name(name, notation) if not name.startswith("curve ") else name
            ax.plot([x for x, _ in points], [y for _, y in points], label=label, linewidth=1.4)
        ax.set_xlabel(_name(plot.variable, notation))
        title = _label(plot, notation)
        if title:
            ax.set_title(title, fontsize=9, loc="left")
        ax.legend(frameon=False)
        ax.grid(True, linewidth=0.3, alpha=0.5)
        fig.tight_layout()
        buf = io.BytesIO()
        fig.savefig(buf, format=fmt, metadata=metadata)
    return buf.getvalue()


def plot_svg(plot: PlotData, notation: dict[str, str]) -> str:
    """A bare ``<svg>`` element for inlining in HTML (HTML5 supplies the namespace)."""
    svg = _draw(plot, "svg", {"Date": None}, notation).decode("utf-8")
    svg = _METADATA.sub("", _PROLOG.sub("", svg, count=1))
    svg = svg.replace("xlink:href=", "href=").replace("*{stroke", "svg *{stroke")
    return _XMLNS.sub("", svg, count=0).strip()


def plot_pdf(plot: PlotData, notation: dict[str, str]) -> bytes:
    """The plot as a PDF for ``\\includegraphics``."""
    return _draw(plot, "pdf", {"CreationDate": None, "ModDate": None}, notation)
