"""The LaTeX appendix: the same derivation, typeset for a paper.

Prose arrives as Markdown tokens and is turned into LaTeX by a table of
render rules, one small function per token type, the way markdown-it renders
HTML.  Values arrive as LaTeX already (the notation is settled upstream);
here they are only placed in ``equation*``/``align*``.  The fragment uses
nothing beyond amsmath, amssymb and graphicx and the default font encoding,
so it can be pasted into any standard article.
"""
from __future__ import annotations

import re
from pathlib import Path
from typing import Callable

import jinja2

from compiler.errors import InternalError
from compiler.markdown import expand_refs, make_markdown
from compiler.notation import name_latex
from compiler.render.templates import loader
from compiler.results import STATUSES, PlotData, Prose, Report, Step, ValueRecord
from compiler.texsafe import escape_code as _escape_code, escape_text as escape_tex, file_name, math_tex


def code_lines(text: str, number: int | None = None) -> str:
    """Monospace lines that keep their indentation and may break at spaces;
    ``number`` (a source line) hangs in the left margin."""
    lines = []
    for line in text.rstrip("\n").split("\n"):
        stripped = line.lstrip(" ")
        indent = "~" * (len(line) - len(stripped))
        lines.append(indent + _escape_code(stripped) if line else r"\mbox{}")
    margin = f"\\noindent\\llap{{\\scriptsize\\rmfamily {number}\\quad}}" if number is not None else ""
    return "{\\small\\ttfamily\\frenchspacing\\raggedright\n" + margin + "\\\\\n".join(lines) + "\\par}\n"


# ------------------------------------------------------- prose: token rules


class _TexWriter:
    """Walks markdown-it tokens; ``RULES`` maps each token type to its LaTeX."""

    def __init__(self, refs: dict[str, ValueRecord]):
        self.refs = refs
        self.links: list[tuple[str, bool]] = []  # (href, is autolink) of open links

    def render(self, tokens) -> str:
        return "".join(RULES.get(t.type, _unknown)(self, t) for t in tokens)

    def math(self, token) -> str:
        """A math token's LaTeX with its @{NAME} values spliced in."""
        return expand_refs(math_tex(token.content), {k: v.latex for k, v in self.refs.items()})


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
    return "" if auto else "\\footnote{\\texttt{" + _escape_code(href) + "}}"


def _math_block(content: str, tag: str = "") -> str:
    # A blank line inside display math is a paragraph break, which LaTeX rejects.
    body = "\n".join(line for line in content.strip().split("\n") if line.strip())
    tagged = f" \\tag{{{escape_tex(tag)}}}" if tag else ""
    return f"\\begin{{equation*}}\n{body}{tagged}\n\\end{{equation*}}\n"


def _value_ref(w, t) -> str:
    name = t.meta["name"]
    if name not in w.refs:
        return r"\textbf{??}\," + escape_tex(t.content)
    latex = w.refs[name].latex
    lines = value_lines(latex)
    if len(lines) == 1:
        return f"${latex}$"
    # Too long for a line of prose: display it, broken at top-level signs.
    return "\\begin{multline*}\n" + "\\\\\n".join(lines) + "\n\\end{multline*}\n"


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
    "code_inline": lambda w, t: "\\texttt{" + _escape_code(t.content) + "}",
    "link_open": _link_open,
    "link_close": _link_close,
    "image": lambda w, t: "[" + escape_tex(t.content or "image") + "]",
    "html_inline": lambda w, t: escape_tex(t.content),
    "math_inline": lambda w, t: f"${w.math(t)}$",
    "math_inline_double": lambda w, t: "\\[" + w.math(t).strip() + "\\]",
    "value_ref": _value_ref,
}


def prose_tex(markdown: str, refs: dict[str, ValueRecord], allow_html: bool = False) -> str:
    """Markdown prose as LaTeX; ``@{NAME}`` shows ``refs[NAME]`` as inline math."""
    tokens = make_markdown(allow_html).parse(markdown)
    return _TexWriter(refs).render(tokens).strip() + "\n"


# ------------------------------------------------------------- steps: values

_BREAK_AT = 46  # visible characters per displayed line (fits a 345pt article text width)
_INVISIBLE = re.compile(r"\\(?:left|right|mathrm|mathit|operatorname|frac|tfrac|dfrac)(?![A-Za-z])|[{}^_]")
_COMMAND = re.compile(r"\\[A-Za-z]+")


def _width(latex: str) -> int:
    """Rough printed width: markup costs nothing, a symbol command one character."""
    return len(_COMMAND.sub("x", _INVISIBLE.sub("", latex)).replace(" ", ""))


_DELIMITER = re.compile(r"\\(?:left|right)(?![A-Za-z])\s*(?:\\[A-Za-z]+|\\.|.)")
_SIZED = re.compile(r"\\Big[lr](?![A-Za-z])\s*(?:\\[A-Za-z]+|\\.|.)")
_FENCE = re.compile(r"\\(left|right)(?![A-Za-z])\s*(\\[A-Za-z]+|\\.|.)")
_ENDS_IN_OPERATOR = re.compile(r"\\(?:cdot|times|pm|mp|otimes|oplus|wedge)\s*$")


def _top_level_terms(latex: str) -> list[str]:
    """Split at ``+``/``-`` outside every bracket, keeping each sign with its term.

    A sign right after an operator or an opening bracket (``= -x``,
    ``\\cdot -x``) is unary and stays inside its term.
    """
    terms, start, depth, i = [], 0, 0, 0
    while i < len(latex):
        fixed = _SIZED.match(latex, i)
        if fixed:  # a fixed-size bracket opens no group: the line may break inside it
            i = fixed.end()
            continue
        sized = _DELIMITER.match(latex, i)
        if sized:
            depth += 1 if sized.group(0).startswith("\\left") else -1
            i = sized.end()
            continue
        ch = latex[i]
        if ch == "\\":
            i += 2  # an escaped character such as \{ is not a bracket
            continue
        if ch in "{([":
            depth += 1
        elif ch in "})]":
            depth -= 1
        elif ch in "+-" and depth == 0:
            before = latex[start:i].rstrip()
            if before and before[-1] not in "^_=+-{([" and not _ENDS_IN_OPERATOR.search(before):
                terms.append(before)
                start = i
        i += 1
    terms.append(latex[start:].strip())
    return [t for t in terms if t]


def _group_end(latex: str, i: int) -> int:
    """The index just past the brace group opening at ``latex[i] == "{"``."""
    depth = 0
    while i < len(latex):
        if latex[i] == "\\":
            i += 2
            continue
        depth += {"{": 1, "}": -1}.get(latex[i], 0)
        i += 1
        if depth == 0:
            return i
    return i


def _breakable(latex: str) -> str:
    """The same value written so that a line may end inside it.

    Auto-sized brackets cannot span lines, so they become fixed ``\\Bigl``/
    ``\\Bigr`` ones, and a fraction whose numerator is itself too long,
    ``\\frac{A}{B}``, is written ``\\frac{1}{B} \\Bigl(A\\Bigr)``.
    """
    latex = _FENCE.sub(lambda m: "" if m.group(2) == "." else f"\\Big{m.group(1)[0]}{m.group(2)}", latex)
    out, i = [], 0
    while (j := latex.find("\\frac{", i)) >= 0:
        num_end = _group_end(latex, j + 5)
        den_end = _group_end(latex, num_end) if latex[num_end:num_end + 1] == "{" else num_end
        num, den = latex[j + 6:num_end - 1], latex[num_end:den_end]
        depth = latex[:j].count("{") - latex[:j].count("}")
        if depth == 0 and den and _width(num) > _BREAK_AT * 2 // 3:
            out.append(latex[i:j] + f"\\frac{{1}}{den} \\Bigl({num}\\Bigr)")
        else:
            out.append(latex[i:den_end])
        i = den_end
    return "".join(out) + latex[i:]


def value_lines(latex: str) -> list[str]:
    """The value cut into display lines at top-level signs; one line when short."""
    if _width(latex) <= _BREAK_AT:
        return [latex]
    lines, current = [], ""
    for term in _top_level_terms(_breakable(latex)):
        if current and _width(current) + _width(term) > _BREAK_AT:
            lines.append(current)
            current = ""
        current = f"{current} {term}".strip()
    return lines + [current]


def aligned_body(lhs: str, lines: list[str]) -> str:
    """Rows for ``align*``/``split``: ``lhs &= first``, then ``&\\quad rest``."""
    first = f"{lhs} &= " if lhs else "& "
    return first + lines[0] + "".join(f"\\\\\n&\\quad {line}" for line in lines[1:])


def display_value(lhs: str, latex: str) -> str:
    """``lhs = latex`` displayed, over several aligned lines when long; an
    empty ``lhs`` (``show`` of an expression) shows the value alone."""
    lines = value_lines(latex)
    if len(lines) == 1:
        eq = f"{lhs} = " if lhs else ""
        return f"\\begin{{equation*}}\n{eq}{latex}\n\\end{{equation*}}\n"
    return f"\\begin{{align*}}\n{aligned_body(lhs, lines)}\n\\end{{align*}}\n"


def degrees_text(v: ValueRecord) -> str:
    """``degree 8`` / ``degrees 4, 8``; nothing for zero, which has no degree."""
    if not v.degrees:
        return ""
    word = "degree" if len(v.degrees) == 1 else "degrees"
    return f"{word} {', '.join(str(d) for d in v.degrees)}"


_STATUS_TEX = {
    "proven": r"\textsc{proven}",
    "sampled": r"\textsc{sampled}",
    "failed": r"\textbf{FAILED}",
    "error": r"\textbf{ERROR}",
}


def _checks(step: Step) -> str:
    parts = []
    for c in step.checks:
        text = f"{_STATUS_TEX[c.status]}~{escape_tex(c.what)}"
        if c.detail:
            text += f" ({escape_tex(c.detail)})"
        parts.append(text)
    return "; ".join(parts)


def _tabular(step: Step) -> str:
    t = step.table
    spec = "c" * len(t.columns)
    head = " & ".join(f"${c}$" for c in t.columns)
    rows = "".join(" & ".join(f"${c}$" for c in row) + " \\\\\n" for row in t.rows)
    return (f"\\begin{{center}}\\renewcommand{{\\arraystretch}}{{1.4}}\n\\begin{{tabular}}{{{spec}}}\n\\hline\n{head} \\\\\n\\hline\n"
            f"{rows}\\hline\n\\end{{tabular}}\n\\end{{center}}\n")


def plot_name(report: Report, number: int) -> str:
    """The file name of the ``number``-th plot, beside the ``.tex`` file."""
    return file_name(f"{Path(report.document).stem}-plot-{number}.pdf")


def _plots(report: Report) -> dict[int, PlotData]:
    """Step index → plot, in document order."""
    return {s.index: s.plot for s in report.steps if s.plot is not None}


def plot_files(report: Report) -> dict[str, bytes]:
    """The PDF of each plot, keyed by the name ``to_tex`` includes it under."""
    from compiler.render.plots import plot_pdf

    return {plot_name(report, n): plot_pdf(p)
            for n, p in enumerate(_plots(report).values(), start=1)}


def _step_view(step: Step, plot_file: str) -> dict:
    return {
        "line": step.line,
        "source": code_lines(step.source, step.line),
        "shown": [(display_value(name_latex(v.name), v.latex), escape_tex(degrees_text(v))) for v in step.values],
        "remainder": step.remainder.latex if step.remainder is not None else "",
        "summary": escape_tex(step.summary),
        "table": _tabular(step) if step.table is not None else "",
        "plot": plot_file,
        "checks": _checks(step),
    }


def _environment() -> jinja2.Environment:
    """Jinja with delimiters that cannot clash with TeX braces; we escape ourselves."""
    return jinja2.Environment(
        loader=loader(),
        block_start_string="((*", block_end_string="*))",
        variable_start_string="(((", variable_end_string=")))",
        comment_start_string="((=", comment_end_string="=))",
        autoescape=False, trim_blocks=True, lstrip_blocks=True,
        keep_trailing_newline=True, undefined=jinja2.StrictUndefined,
    )


def to_tex(report: Report, standalone: bool = False) -> str:
    """The appendix fragment, or with ``standalone`` a whole article around it."""
    plot_numbers = {index: n for n, index in enumerate(_plots(report), start=1)}
    items = []
    for item in report.items:
        if isinstance(item, Prose):
            items.append({"prose": prose_tex(item.markdown, item.refs, report.allow_html)})
        else:
            number = plot_numbers.get(item.index)
            items.append({"step": _step_view(item, plot_name(report, number) if number else "")})
    counts = {s: report.count(s) for s in STATUSES}
    context = {
        "title": escape_tex(report.title or Path(report.document).stem),
        "authors": escape_tex(", ".join(report.authors)),
        "date": escape_tex(report.date),
        "abstract": prose_tex(report.abstract, report.values, report.allow_html) if report.abstract else "",
        "document": _escape_code(report.document),
        "tool": escape_tex(f"{report.tool_name} {report.tool_version}"),
        "steps": len(report.steps),
        "counts": counts,
        "passed": report.passed,
        "conventions": [(_escape_code(k), escape_tex(v)) for k, v in report.conventions.items()],
        "items": items,
    }
    env = _environment()
    body = env.get_template("appendix.tex.j2").render(**context)
    if not standalone:
        return body
    return env.get_template("standalone.tex.j2").render(body=body, title=context["title"])
