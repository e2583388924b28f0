"""The HTML report: one self-contained page, safe to open from a stranger.

Everything the document supplies (statement text, names, details, prose
unless ``--allow-html``) reaches the page only through Jinja's autoescape or
markdown-it's escaping renderer; the only markup we mark safe is what we
generate ourselves (sanitized MathML, the plots' SVG, the CSS).  The page
loads nothing: no scripts, fonts or images from anywhere.
"""
from __future__ import annotations

import re
from pathlib import Path

import jinja2
from markupsafe import Markup, escape

from compiler.markdown import expand_refs, make_markdown
from compiler.render.claims import extremum_rows
from compiler.render.mathml import math_element, to_mathml
from compiler.render.notation import name_tree
from compiler.render.printers import LatexPrinter, MathMLPrinter, degrees_text, lines

_tex_width = LatexPrinter.measure
from compiler.render.templates import environment
from compiler.results import STATUSES, Report, Step, ValueRecord

GLYPHS = {"proven": "\u2713", "sampled": "\u2248", "failed": "\u2717", "error": "!"}


# ------------------------------------------------------------- prose rules
# markdown-it render rules: (renderer, tokens, idx, options, env) -> html.


def _math(token, env) -> str:
    """A math token's LaTeX with its @{NAME} values spliced in."""
    latex = env["latex"]
    return expand_refs(token.content.strip(), {k: latex.doprint(v.tree) for k, v in env["refs"].items()})


def _math_inline(self, tokens, idx, options, env) -> str:
    return to_mathml(_math(tokens[idx], env))


def _math_inline_double(self, tokens, idx, options, env) -> str:
    return to_mathml(_math(tokens[idx], env), display=True)


_SPACING = re.compile(r"\\q?quad(?![A-Za-z])")


def _display_rows(latex: str) -> list[str]:
    """An author's display cut at its top-level ``\\quad``/``\\qquad`` when it
    is too wide for the column (browsers do not break MathML lines)."""
    if _tex_width(latex) <= WIDTH:
        return [latex]
    rows, start, depth = [], 0, 0
    for i, ch in enumerate(latex):
        depth += {"{": 1, "}": -1}.get(ch, 0) if latex[i - 1:i] != "\\" else 0
        if depth == 0 and (m := _SPACING.match(latex, i)):
            rows.append(latex[start:i])
            start = m.end()
    rows.append(latex[start:])
    return [r for r in rows if r.strip()]


def _math_block(self, tokens, idx, options, env) -> str:
    rows = _display_rows(_math(tokens[idx], env))
    return f'<div class="display">{"".join(to_mathml(r, display=True) for r in rows)}</div>\n'


def _math_block_label(self, tokens, idx, options, env) -> str:
    t = tokens[idx]
    math = to_mathml(_math(t, env), display=True)
    return f'<div class="display">{math}<span class="eqno">({escape(t.info)})</span></div>\n'


#: Printed characters beyond which an @{NAME} value is set as display math.
LONG_INLINE = 30
#: Printed characters per line of a displayed value: what a 36rem column holds.
WIDTH = 46


#: Punctuation that belongs to a displayed value before it.
_TRAILING = re.compile(r"[.,;:!?]+")


def _value_ref(self, tokens, idx, options, env) -> str:
    t = tokens[idx]
    ref = env["refs"].get(t.meta["name"])
    if ref is None:
        return f'<span class="unknown-ref" title="no such value">{escape(t.content)}</span>'
    printer = env["mathml"]
    inline = printer.doprint(ref.tree)
    if printer.measure(inline) <= LONG_INLINE:
        return math_element(inline)
    # A long value cannot wrap inside a line of prose: set it on its own
    # line, with the punctuation that follows it (not at the next line's start).
    after = tokens[idx + 1] if idx + 1 < len(tokens) else None
    mark = _TRAILING.match(after.content) if after is not None and after.type == "text" else None
    if mark:
        after.content = after.content[mark.end():]
    return value_math(printer, "", ref.tree, mark.group() if mark else "")


def _image(self, tokens, idx, options, env) -> str:
    """Images are not fetched: the report must open offline and leak no visit."""
    alt = self.renderInlineAsText(tokens[idx].children or [], options, env)
    return f'<span class="image-alt" title="image not embedded">[{escape(alt or "image")}]</span>'


PROSE_RULES = {
    "math_inline": _math_inline,
    "math_inline_double": _math_inline_double,
    "math_block": _math_block,
    "math_block_label": _math_block_label,
    "value_ref": _value_ref,
    "image": _image,
}


def _markdown(allow_html: bool):
    md = make_markdown(allow_html)
    for name, rule in PROSE_RULES.items():
        md.add_render_rule(name, rule)
    return md


# ---------------------------------------------------------------- filters


def value_math(printer: MathMLPrinter, name: str, tree: list, trailing: str = "") -> Markup:
    """``name = value`` as display math, as an aligned table of lines when
    long (browsers do not break MathML lines); an empty name shows the value;
    ``trailing`` punctuation ends the last line."""
    lhs = printer.doprint(name_tree(name, printer.notation)) + "<mo>=</mo>" if name else ""
    rows = lines(printer, tree, WIDTH - printer.measure(lhs))
    if trailing:
        rows[-1] += f"<mo>{escape(trailing)}</mo>"
    if len(rows) == 1:
        return math_element(lhs + rows[0], display=True)
    indent = '<mspace width="1em"></mspace>'
    cells = "".join(f'<mtr><mtd columnalign="right">{lhs if i == 0 else ""}</mtd>'
                    f'<mtd columnalign="left">{indent if i else ""}{row}</mtd></mtr>'
                    for i, row in enumerate(rows))
    return math_element(f'<mtable displaystyle="true" columnalign="right left" columnspacing="0">{cells}</mtable>',
                        display=True)


def _extremum(check, printer: LatexPrinter) -> Markup:
    """An extremization's critical points, kept root and second-order test as math."""
    rows = extremum_rows(check.detail, printer, WIDTH - 10) if check.detail else None
    if rows is None:
        return Markup("")
    items = "".join(f'<li><span class="label">{escape(label)}</span>'
                    + "".join(to_mathml(line, display=True) for line in lines) + "</li>"
                    for label, lines in rows)
    return Markup(f'<ul class="extremum">{items}</ul>')


def _plot(plot, notation) -> Markup:
    """A plot as inline SVG (ours, every text escaped); the drawing code loads for plots only."""
    from compiler.render.plotting.svg import plot_svg
    return Markup(plot_svg(plot, notation))


def _environment(report: Report) -> jinja2.Environment:
    env = environment(
        autoescape=True,
        trim_blocks=True,
        lstrip_blocks=True,
        undefined=jinja2.StrictUndefined,
    )
    printer = MathMLPrinter(report.notation)
    env.filters.update(
        math=to_mathml,
        value_math=lambda v: value_math(printer, v.name, v.tree),
        tree_math=lambda tree: value_math(printer, "", tree),
        name_math=lambda name: math_element(printer.doprint(name_tree(name, report.notation))),
        cell_math=lambda tree: math_element(printer.doprint(tree)),
        degrees=degrees_text,
        svg=lambda p: _plot(p, report.notation),
        extremum=lambda c: _extremum(c, LatexPrinter(report.notation)),
    )
    env.globals.update(glyphs=GLYPHS)
    return env


def to_html(report: Report) -> str:
    """The report as one HTML page with the stylesheet inlined."""
    md = _markdown(report.allow_html)
    printers = {"mathml": MathMLPrinter(report.notation), "latex": LatexPrinter(report.notation)}

    def prose(markdown: str, refs: dict[str, ValueRecord]) -> Markup:
        # Trusted only because markdown-it escapes all text (raw HTML too unless allowed).
        return Markup(md.render(markdown, {"refs": refs, **printers}))

    counts = {s: report.count(s) for s in STATUSES}
    flagged = [s for s in report.steps if s.status in ("failed", "error")]
    return _environment(report).get_template("report.html.j2").render(
        r=report,
        title=report.title or Path(report.document).stem,
        prose=prose,
        counts=counts,
        flagged=flagged,
        headline=[report.values[n] for n in report.headline if n in report.values],
        is_step=lambda item: isinstance(item, Step),
    )
