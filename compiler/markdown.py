"""The one Markdown configuration shared by the document reader and renderers.

Reading and rendering must agree on what is prose, math, code and a value
reference, so both build their parser here.  ``@{NAME}`` is an inline rule of
its own: code spans and code blocks are consumed by their own rules first,
so a reference written inside them stays literal text.
"""
from __future__ import annotations

import re

from markdown_it import MarkdownIt
from markdown_it.rules_inline import StateInline
from mdit_py_plugins.dollarmath import dollarmath_plugin
from mdit_py_plugins.front_matter import front_matter_plugin

_VALUE_REF = re.compile(r"@\{([A-Za-z][A-Za-z0-9_]*)\}")


def _value_ref_rule(state: StateInline, silent: bool) -> bool:
    """``@{NAME}`` → a ``value_ref`` token.

    ``meta["offset"]`` is the reference's position in the inline source so
    the document reader can turn it into a file line and column.
    """
    if not state.src.startswith("@{", state.pos):
        return False
    match = _VALUE_REF.match(state.src, state.pos, state.posMax)
    if match is None:
        return False
    if not silent:
        token = state.push("value_ref", "", 0)
        token.content = match.group(0)
        token.markup = "@{}"
        token.meta = {"name": match.group(1), "offset": state.pos}
    state.pos = match.end()
    return True


#: Token types whose content is LaTeX, where ``@{NAME}`` is spliced in as math.
MATH_TOKENS = ("math_inline", "math_inline_double", "math_block", "math_block_label")


def math_refs(latex: str) -> list[str]:
    """The names of the ``@{NAME}`` references inside a piece of math."""
    return [m.group(1) for m in _VALUE_REF.finditer(latex)]


def expand_refs(latex: str, refs: dict) -> str:
    """Math with each ``@{NAME}`` replaced by ``refs[NAME]`` (LaTeX), as a group."""
    return _VALUE_REF.sub(lambda m: "{" + refs[m.group(1)] + "}" if m.group(1) in refs
                          else m.group(0), latex)


def value_ref_plugin(md: MarkdownIt) -> None:
    """Register the ``@{NAME}`` rule (before ``text``, which stops at ``@``)."""
    md.inline.ruler.before("text", "value_ref", _value_ref_rule)


def make_markdown(allow_html: bool = False) -> MarkdownIt:
    """CommonMark with front matter, ``$``/``$$`` math and ``@{NAME}``.

    With ``allow_html`` false raw HTML is not recognised at all, so it stays
    text and every renderer escapes it: a shared report must not run a
    stranger's script.

    The front matter rule starts disabled: renderers parse prose runs cut
    out of the file, and a run that happens to begin with a ``---`` rule must
    not vanish as "front matter".  The document reader enables it for the
    whole file (``md.enable("front_matter")``).
    """
    md = MarkdownIt("commonmark", {"html": allow_html})
    md.use(front_matter_plugin)
    md.use(dollarmath_plugin, double_inline=True)  # $$...$$ inside a paragraph
    md.use(value_ref_plugin)
    md.disable("front_matter")
    return md
