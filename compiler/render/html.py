"""The HTML report: one self-contained page, safe to open from a stranger.

Everything the document supplies (statement text, names, details, prose
unless ``--allow-html``) reaches the page only through Jinja's autoescape or
markdown-it's escaping renderer; the only markup we mark safe is what we
generate ourselves (sanitized MathML, matplotlib SVG, the CSS).  The page
loads nothing: no scripts, fonts or images from anywhere.
"""
from __future__ import annotations

from pathlib import Path

import jinja2
from markupsafe import Markup, escape

from compiler.markdown import expand_refs, make_markdown
from compiler.render.mathml import to_mathml
from compiler.render.templates import loader
from compiler.render.tex import aligned_body, degrees_text, name_latex, value_lines
from compiler.results import STATUSES, PlotData, Report, Step, ValueRecord

GLYPHS = {"proven": "\u2713", "sampled": "\u2248", "failed": "\u2717", "error": "!"}


# ------------------------------------------------------------- prose rules
# markdown-it render rules: (renderer, tokens, idx, options, env) -> html.


def _math(token, env) -> str:
    """A math token's LaTeX with its @{NAME} values spliced in."""
    return expand_refs(token.content.strip(), {k: v.latex for k, v in env["refs"].items()})


def _math_inline(self, tokens, idx, options, env) -> str:
    return to_mathml(_math(tokens[idx], env))


def _math_inline_double(self, tokens, idx, options, env) -> str:
    return to_mathml(_math(tokens[idx], env), display=True)


def _math_block(self, tokens, idx, options, env) -> str:
    return f'<div class="display">{to_mathml(_math(tokens[idx], env), display=True)}</div>\n'


def _math_block_label(self, tokens, idx, options, env) -> str:
    t = tokens[idx]
    math = to_mathml(_math(t, env), display=True)
    return f'<div class="display">{math}<span class="eqno">({escape(t.info)})</span></div>\n'


#: LaTeX length beyond which an @{NAME} value is set as display math.
LONG_INLINE = 90


def _value_ref(self, tokens, idx, options, env) -> str:
    t = tokens[idx]
    ref = env["refs"].get(t.meta["name"])
    if ref is None:
        return f'<span class="unknown-ref" title="no such value">{escape(t.content)}</span>'
    # A long value cannot wrap inside a line of prose: set it on its own line.
    return to_mathml(ref.latex, display=len(ref.latex) > LONG_INLINE)


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


def _plot_svg(p: PlotData) -> Markup:
    from compiler.render.plots import plot_svg  # matplotlib loads only for documents with plots

    return Markup(plot_svg(p))


def _value_math(v: ValueRecord) -> Markup:
    """``name = value`` as display math, aligned over several lines when long
    (browsers do not break MathML lines); a ``show`` of an expression has no name."""
    lhs = name_latex(v.name)
    lines = value_lines(v.latex)
    if len(lines) == 1:
        return to_mathml(f"{lhs} = {v.latex}" if lhs else v.latex, display=True)
    return to_mathml(f"\\begin{{split}}{aligned_body(lhs, lines)}\\end{{split}}", display=True)


def _environment() -> jinja2.Environment:
    env = jinja2.Environment(
        loader=loader(),
        autoescape=True,
        trim_blocks=True,
        lstrip_blocks=True,
        undefined=jinja2.StrictUndefined,
    )
    env.filters.update(
        math=to_mathml,
        value_math=_value_math,
        degrees=degrees_text,
        svg=_plot_svg,
    )
    env.globals.update(glyphs=GLYPHS)
    return env


def to_html(report: Report) -> str:
    """The report as one HTML page with the stylesheet inlined."""
    md = _markdown(report.allow_html)

    def prose(markdown: str, refs: dict[str, ValueRecord]) -> Markup:
        # Trusted only because markdown-it escapes all text (raw HTML too unless allowed).
        return Markup(md.render(markdown, {"refs": refs}))

    counts = {s: report.count(s) for s in STATUSES}
    flagged = [s for s in report.steps if s.status in ("failed", "error")]
    return _environment().get_template("report.html.j2").render(
        r=report,
        title=report.title or Path(report.document).stem,
        prose=prose,
        counts=counts,
        flagged=flagged,
        is_step=lambda item: isinstance(item, Step),
    )
