"""The ``.tex`` output: an appendix for a paper, or the full audit listing.

``appendix`` (the default) is what a paper's appendix holds: the prose, each
computed result as a numbered equation labelled ``eq:NAME`` (the final
binding of a name; earlier ones get ``eq:NAME-LINE``), each ``check`` as the
equation it asserts with its status, plots as figures, and one closing
paragraph on how it was verified.  Declarations and routine checks are left
out.  ``audit`` lists every statement with its line, values and checks.
Both use nothing beyond amsmath, amssymb and graphicx, standalone or
``\\input`` into an article.
"""
from __future__ import annotations

import re
from pathlib import Path

import jinja2

from compiler.render import TEX_STYLES as STYLES
from compiler.render.claims import claim_latex
from compiler.render.notation import name_tree
from compiler.render.plotting.pdf import plot_pdf
from compiler.render.plotting.texlabels import name_math, number_math, plot_picture
from compiler.render.printers import LatexPrinter, degrees_text, lines
from compiler.render.templates import environment
from compiler.render.texprose import WIDTH, code_lines, escape_detail, escape_tex, prose_tex
from compiler.results import STATUSES, PlotData, Prose, Report, Step, ValueRecord
from compiler.texsafe import escape_code, file_name


#: Statements that only declare: the appendix leaves them out.
DECLARATIONS = frozenset({"symbol", "convention", "bundle", "split", "fiber", "surface", "sphere"})


def display_value(printer: LatexPrinter, name: str, tree: list, label: str = "") -> str:
    """``name = value`` as a display, over aligned lines when long; numbered
    and labelled when ``label`` is given, unnumbered otherwise."""
    lhs = printer.doprint(name_tree(name, printer.notation)) if name else ""
    rows = lines(printer, tree, WIDTH - printer.measure(lhs) // 2)
    env = "equation" if label else "equation*"
    tag = f"\\label{{{label}}}\n" if label else ""
    if len(rows) == 1:
        return f"\\begin{{{env}}}\n{lhs + ' = ' if lhs else ''}{rows[0]}\n{tag}\\end{{{env}}}\n"
    first = f"{lhs} &= " if lhs else "& "
    body = first + rows[0] + "".join(f"\\\\\n&\\quad {row}" for row in rows[1:])
    return f"\\begin{{{env}}}\n\\begin{{split}}\n{body}\n\\end{{split}}\n{tag}\\end{{{env}}}\n"


_STATUS_TEX = {
    "proven": r"\textsc{proven}",
    "sampled": r"\textsc{sampled}",
    "failed": r"\textbf{FAILED}",
    "error": r"\textbf{ERROR}",
}
_STATUS_WORDS = {"proven": "proven exactly", "sampled": "sampled", "failed": "FAILED", "error": "ERROR"}


def _tabular(step: Step, printer: LatexPrinter) -> str:
    t = step.table
    head = " & ".join("$" + (printer.doprint(name_tree(n, printer.notation)) if n else r"\cdots") + "$"
                      for n in t.names)
    rows = "".join(" & ".join(f"${printer.doprint(c)}$" for c in row) + " \\\\\n" for row in t.cells)
    return (f"\\begin{{center}}\\renewcommand{{\\arraystretch}}{{1.4}}\n\\begin{{tabular}}{{{'c' * len(t.names)}}}\n"
            f"\\hline\n{head} \\\\\n\\hline\n{rows}\\hline\n\\end{{tabular}}\n\\end{{center}}\n")


def plot_name(report: Report, number: int) -> str:
    """The file name of the ``number``-th plot, beside the ``.tex`` file."""
    return file_name(f"{Path(report.document).stem}-plot-{number}.pdf")


def _plots(report: Report) -> dict[int, PlotData]:
    """Step index → plot, in document order."""
    return {s.index: s.plot for s in report.steps if s.plot is not None}


def plot_files(report: Report) -> dict[str, bytes]:
    """The PDF of each plot, keyed by the name ``to_tex`` includes it under."""
    return {plot_name(report, n): plot_pdf(p, report.notation)
            for n, p in enumerate(_plots(report).values(), start=1)}


def _caption(plot: PlotData, printer: LatexPrinter) -> str:
    def name(n: str) -> str:
        return f"${name_math(n, printer)}$" if not n.startswith("curve ") else escape_tex(n)
    curves = ", ".join(name(c) for c in plot.curves)
    fixed = ", ".join(f"{name(k)}~$= {number_math(v)}$" for k, v in plot.fixed.items())
    at = f" at {fixed}" if fixed else ""
    return (f"{curves} against {name(plot.variable)} from ${escape_tex(plot.low)}$ "
            f"to ${escape_tex(plot.high)}${at}.")


def _figure(plot: PlotData, file: str, printer: LatexPrinter) -> str:
    label = f"fig:{Path(file).stem}"
    return (f"\\begin{{figure}}[htbp]\n\\centering\n{plot_picture(plot, file, printer)}\n"
            f"\\caption{{{_caption(plot, printer)}}}\n\\label{{{label}}}\n\\end{{figure}}\n")


def _label(report: Report, v: ValueRecord, step: Step) -> str:
    final = report.values.get(v.name) is v
    return f"eq:{v.name}" if final else f"eq:{v.name}-{step.line}"


def _appendix_step(report: Report, step: Step, plot_file: str, printer: LatexPrinter) -> str:
    """What the appendix shows of one step: results, claims, tables, figures."""
    if step.kind in DECLARATIONS:
        return ""
    out = []
    for v in step.values:
        out.append(display_value(printer, v.name, v.tree, _label(report, v, step) if v.name else ""))
    if step.kind == "check":
        out.append(_claim(step, printer))
    if step.table is not None:
        out.append(_tabular(step, printer))
    if plot_file:
        out.append(_figure(step.plot, plot_file, printer))
    loud = [c for c in step.notable_checks if step.kind != "check"]
    if loud:
        out.append(_check_list(loud, "small"))
    return "".join(out)


def _claim(step: Step, printer: LatexPrinter) -> str:
    """A ``check`` as the equation it asserts, its status beside it; what
    went wrong (or how it was sampled) below."""
    rows = claim_latex(step.source, printer, WIDTH - 16)  # room for the status beside it
    status = ", ".join(_STATUS_WORDS[c.status] for c in step.checks) or "not run"
    rows[-1] += f"\\qquad\\text{{({status})}}"
    env = "equation*" if len(rows) == 1 else "multline*"
    shown = f"\\begin{{{env}}}\n" + "\\\\\n".join(rows) + f"\n\\end{{{env}}}\n"
    details = [c for c in step.checks if c.detail and c.status != "proven"]
    return shown + (_check_list(details, "small") if details else "")


def _check_list(checks, size: str) -> str:
    """Checks as a ragged paragraph; long expressions in details may break."""
    return (f"\\par\\noindent{{\\{size}\\raggedright " + "; ".join(
        f"{_STATUS_TEX[c.status]}~{escape_detail(c.what)}" + (f" ({escape_detail(c.detail)})" if c.detail else "")
        for c in checks) + "\\par}\n")


def _were(n: int) -> str:
    return f"{n} {'was' if n == 1 else 'were'}"


def _verification(report: Report) -> str:
    """One closing paragraph: how many identities were proven, sampled, at
    which points, with which tool."""
    counts = {s: report.count(s) for s in STATUSES}
    claims = sum(1 for s in report.steps if s.kind == "check")
    sampled = sorted({c.detail for s in report.steps for c in s.checks if c.status == "sampled" and c.detail})
    parts = [f"{_were(counts['proven'])} proven exactly"]
    if counts["sampled"]:
        where = f" ({escape_tex('; '.join(sampled))})" if sampled else ""
        parts.append(f"{_were(counts['sampled'])} verified at random rational points{where}")
    bad = counts["failed"] + counts["error"]
    if bad:
        parts.append(f"{bad} failed or could not be evaluated")
    listed = ", ".join(parts[:-1]) + (" and " if len(parts) > 1 else "") + parts[-1]
    return (f"Every value above was computed and checked by {escape_tex(report.tool_name)} "
            f"{escape_tex(report.tool_version)} from \\texttt{{{escape_code(Path(report.document).name)}}}. "
            f"Of its {report.check_count} checks ({claims} stated identities, the rest automatic), "
            f"{listed}.")


def _environment() -> jinja2.Environment:
    """Jinja with delimiters that cannot clash with TeX braces; we escape ourselves."""
    return environment(
        block_start_string="((*", block_end_string="*))",
        variable_start_string="(((", variable_end_string=")))",
        comment_start_string="((=", comment_end_string="=))",
        autoescape=False, trim_blocks=True, lstrip_blocks=True,
        keep_trailing_newline=True, undefined=jinja2.StrictUndefined,
    )


def _audit_step(step: Step, plot_file: str, printer: LatexPrinter) -> dict:
    return {
        "source": code_lines(step.source, step.line),
        "shown": [(display_value(printer, v.name, v.tree), escape_tex(degrees_text(v))) for v in step.values],
        "remainder": display_value(printer, "", step.remainder.tree) if step.remainder is not None else "",
        "summary": escape_tex(step.summary),
        "table": _tabular(step, printer) if step.table is not None else "",
        "plot": plot_picture(step.plot, plot_file, printer) if plot_file else "",
        "checks": _check_list(step.checks, "footnotesize") if step.checks else "",
    }


def to_tex(report: Report, standalone: bool = False, style: str = "appendix") -> str:
    """The ``.tex`` fragment in ``style``, or with ``standalone`` a whole article around it."""
    printer = LatexPrinter(report.notation)
    plot_numbers = {index: n for n, index in enumerate(_plots(report), start=1)}
    items = []
    for item in report.items:
        if isinstance(item, Prose):
            items.append({"prose": prose_tex(item.markdown, item.refs, report.allow_html, report.notation)})
            continue
        number = plot_numbers.get(item.index)
        plot_file = plot_name(report, number) if number else ""
        if style == "audit":
            items.append({"step": _audit_step(item, plot_file, printer)})
        elif text := _appendix_step(report, item, plot_file, printer):
            items.append({"prose": text})
    counts = {s: report.count(s) for s in STATUSES}
    context = {
        "title": escape_tex(report.title or Path(report.document).stem),
        "label": re.sub(r"[^A-Za-z0-9.-]", "-", Path(report.document).stem),
        "authors": escape_tex(", ".join(report.authors)),
        "date": escape_tex(report.date),
        "abstract": prose_tex(report.abstract, report.values, report.allow_html, report.notation)
        if report.abstract else "",
        "document": escape_code(Path(report.document).name),
        "tool": escape_tex(f"{report.tool_name} {report.tool_version}"),
        "steps": len(report.steps),
        "checks": report.check_count,
        "counts": counts,
        "passed": report.passed,
        "conventions": [(escape_code(k), escape_tex(v)) for k, v in report.conventions.items()],
        "items": items,
        "verification": _verification(report),
    }
    env = _environment()
    body = env.get_template(f"{style}.tex.j2").render(**context)
    if not standalone:
        return body
    return env.get_template("standalone.tex.j2").render(body=body, title=context["title"])
