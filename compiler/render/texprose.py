"""Markdown prose and plain text as LaTeX, for both styles of the ``.tex`` output.

Prose arrives as Markdown tokens and is turned into LaTeX by a table of
render rules, one small function per token type, the way markdown-it renders
HTML.  Text is escaped for the default font encoding (so the fragment needs
nothing beyond amsmath, amssymb and graphicx); straight quotes become
typographic ones; an ``@{NAME}`` prints its value's tree with the shared
printers.
"""
from __future__ import annotations

import re
from typing import Callable

from compiler.errors import InternalError
from compiler.markdown import expand_refs, make_markdown
from compiler.render.printers import LatexPrinter, lines
from compiler.results import ValueRecord
from compiler.texsafe import escape_code, escape_text, math_tex

#: Printed characters per displayed line (fits a 345pt article text width).
WIDTH = 46
#: A value wider than this in prose is set as a display: TeX cannot break
#: a line inside a fraction.
LONG_INLINE = 24

_OPENING_QUOTE = re.compile(r'(^|(?<=[\s(\[{\u2014-]))"')
_OPENING_SINGLE = re.compile(r"(^|(?<=[\s(\[{\u2014-]))'")


def escape_tex(text: str) -> str:
    """Plain text safe for LaTeX: specials escaped, common symbols as math,
    straight quotes turned into opening and closing ones."""
    text = _OPENING_QUOTE.sub("\u201c", text).replace('"', "\u201d")
    text = _OPENING_SINGLE.sub("\u2018", text)
    return escape_text(text)


_BREAKABLE = re.compile(r"(?<=[*+,;=)/])(?=\S)|(?<=\^)(?=\S)")


def escape_detail(text: str) -> str:
    """Text holding long expressions (a check's detail): escaped, and free
    to break a line after an operator, since it has few spaces."""
    return r"\allowbreak{}".join(escape_tex(part) for part in _BREAKABLE.split(text))


def code_lines(text: str, number: int | None = None) -> str:
    """Monospace lines that keep their indentation and may break at spaces;
    ``number`` (a source line) hangs in the left margin."""
    lines = []
    for line in text.rstrip("\n").split("\n"):
        stripped = line.lstrip(" ")
        indent = "~" * (len(line) - len(stripped))
        lines.append(indent + escape_code(stripped) if line else r"\mbox{}")
    margin = f"\\noindent\\llap{{\\scriptsize\\rmfamily {number}\\quad}}" if number is not None else ""
    return "{\\small\\ttfamily\\frenchspacing\\raggedright\n" + margin + "\\\\\n".join(lines) + "\\par}\n"


# ------------------------------------------------------- prose: token rules


class _TexWriter:
    """Walks markdown-it tokens; ``RULES`` maps each token type to its LaTeX."""

    def __init__(self, refs: dict[str, ValueRecord], printer: LatexPrinter):
        self.refs = refs
        self.printer = printer
        self.links: list[tuple[str, bool]] = []  # (href, is autolink) of open links

    def render(self, tokens) -> str:
        _keep_punctuation(tokens)
        return "".join(RULES.get(t.type, _unknown)(self, t) for t in tokens)

    def math(self, token) -> str:
        """A math token's LaTeX with its @{NAME} values spliced in."""
        return expand_refs(math_tex(token.content), {k: self.printer.doprint(v.tree) for k, v in self.refs.items()})


#: Punctuation that belongs to the value before it: a value set as a
#: display takes it inside, so it does not start the next line.
_TRAILING = re.compile(r"[.,;:!?]+")


def _keep_punctuation(tokens) -> None:
    """Move the punctuation right after each ``@{NAME}`` into its token's ``meta``."""
    for ref, after in zip(tokens, tokens[1:]):
        if ref.type == "value_ref" and after.type == "text":
            mark = _TRAILING.match(after.content)
            if mark:
                ref.meta["trailing"] = mark.group()
                after.content = after.content[mark.end():]


def _unknown(w: _TexWriter, t) -> str:
    raise InternalError(f"no LaTeX rule for Markdown token {t.type!r}")


_HEADINGS = {"h1": "subsection*", "h2": "subsection*", "h3": "subsubsection*"}


def _heading_open(w, t) -> str:
    return "\\" + _HEADINGS.get(t.tag, "paragraph*") + "{"


def _link_open(w, t) -> str:
    w.links.append((t.attrs.get("href", ""), t.markup == "autolink"))
    return ""


def _link_close(w, t) -> str:
    href, auto = w.links.pop()
    return "" if auto else "\\footnote{\\texttt{" + escape_code(href) + "}}"


def _math_block(content: str, tag: str = "") -> str:
    # A blank line inside display math is a paragraph break, which LaTeX rejects.
    body = "\n".join(line for line in content.strip().split("\n") if line.strip())
    tagged = f" \\tag{{{escape_tex(tag)}}}" if tag else ""
    return f"\\begin{{equation*}}\n{body}{tagged}\n\\end{{equation*}}\n"


def _value_ref(w, t) -> str:
    name, trailing = t.meta["name"], t.meta.get("trailing", "")
    if name not in w.refs:
        return r"\textbf{??}\," + escape_tex(t.content) + trailing
    rows = lines(w.printer, w.refs[name].tree, WIDTH)
    if len(rows) == 1 and w.printer.measure(rows[0]) <= LONG_INLINE:
        return f"${rows[0]}${trailing}"
    # Too long for a line of prose: display it, broken at top-level signs,
    # with the punctuation that follows it inside.
    rows[-1] += trailing
    if len(rows) == 1:
        return f"\\begin{{equation*}}\n{rows[0]}\n\\end{{equation*}}\n"
    return "\\begin{multline*}\n" + "\\\\\n".join(rows) + "\n\\end{multline*}\n"


Rule = Callable[[_TexWriter, object], str]
RULES: dict[str, Rule] = {
    "front_matter": lambda w, t: "",
    "paragraph_open": lambda w, t: "",
    "paragraph_close": lambda w, t: "" if t.hidden else "\n\n",  # hidden: tight list item
    "heading_open": _heading_open,
    "heading_close": lambda w, t: "}\n\n",
    "inline": lambda w, t: w.render(t.children or []),
    "bullet_list_open": lambda w, t: "\\begin{itemize}\n",
    "bullet_list_close": lambda w, t: "\\end{itemize}\n\n",
    "ordered_list_open": lambda w, t: "\\begin{enumerate}\n",
    "ordered_list_close": lambda w, t: "\\end{enumerate}\n\n",
    "list_item_open": lambda w, t: "\\item ",
    "list_item_close": lambda w, t: "\n",
    "blockquote_open": lambda w, t: "\\begin{quote}\n",
    "blockquote_close": lambda w, t: "\\end{quote}\n\n",
    "code_block": lambda w, t: code_lines(t.content) + "\n",
    "fence": lambda w, t: code_lines(t.content) + "\n",
    "html_block": lambda w, t: code_lines(t.content) + "\n",
    "hr": lambda w, t: "\\par\\medskip\\noindent\\hrulefill\\par\\medskip\n\n",
    "math_block": lambda w, t: _math_block(w.math(t)),
    "math_block_label": lambda w, t: _math_block(w.math(t), t.info),
    "text": lambda w, t: escape_tex(t.content),
    "softbreak": lambda w, t: "\n",
    "hardbreak": lambda w, t: "\\\\\n",
    "em_open": lambda w, t: "\\emph{",
    "em_close": lambda w, t: "}",
    "strong_open": lambda w, t: "\\textbf{",
    "strong_close": lambda w, t: "}",
    "code_inline": lambda w, t: "\\texttt{" + escape_code(t.content) + "}",
    "link_open": _link_open,
    "link_close": _link_close,
    "image": lambda w, t: "[" + escape_tex(t.content or "image") + "]",
    "html_inline": lambda w, t: escape_tex(t.content),
    "math_inline": lambda w, t: f"${w.math(t)}$",
    "math_inline_double": lambda w, t: "\\[" + w.math(t).strip() + "\\]",
    "value_ref": _value_ref,
}


def prose_tex(markdown: str, refs: dict[str, ValueRecord], allow_html: bool = False,
              notation: dict[str, str] | None = None) -> str:
    """Markdown prose as LaTeX; ``@{NAME}`` shows ``refs[NAME]`` as inline math."""
    tokens = make_markdown(allow_html).parse(markdown)
    return _TexWriter(refs, LatexPrinter(notation)).render(tokens).strip() + "\n"

