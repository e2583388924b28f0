"""The JSON record: every step, value and check, for diffs and other tools.

Keys come out in one fixed order and floats as Python's shortest repr, so two
builds of the same document give byte-identical files and ``diff`` (or any
line-based tool) sees only real changes.
"""
from __future__ import annotations

import json
import math

from compiler.render.printers import LatexPrinter, TextPrinter
from compiler.results import STATUSES, CheckResult, PlotData, Report, Step, TableData, ValueRecord


def _value(v: ValueRecord) -> dict:
    """``text`` is the normal form (what diffs compare), ``display`` the form
    a reader sees, in the same syntax; ``text`` always reads back to the
    value.  A value known only below some form degree (a truncation dropped
    the rest) says so in ``unknown_from``; its display ends in an order term."""
    out = {"text": v.text, "display": TextPrinter().doprint(v.tree), "latex": LatexPrinter().doprint(v.tree),
           "degrees": list(v.degrees)}
    if v.unknown_from is not None:
        out["unknown_from"] = v.unknown_from
    return out


def _check(c: CheckResult) -> dict:
    return {"what": c.what, "status": c.status, "detail": c.detail}


def _table(t: TableData) -> dict:
    """``text_rows`` in the normal form, ``rows`` in the display form."""
    return {"names": list(t.names), "rows": [[TextPrinter().doprint(c) for c in r] for r in t.cells],
            "text_rows": [list(r) for r in t.text_rows]}


def _number(x: float):
    """JSON has no NaN or infinity: a point where a curve is undefined is null."""
    return x if math.isfinite(x) else None


def _plot(p: PlotData) -> dict:
    return {
        "variable": p.variable,
        "low": p.low,
        "high": p.high,
        "fixed": dict(p.fixed),
        "curves": {name: [[_number(x), _number(y)] for x, y in pts] for name, pts in p.curves.items()},
    }


def step_record(s: Step) -> dict:
    """One step as the spec's JSON object; optional keys only when they apply."""
    out = {
        "index": s.index,
        "line": s.line,
        "column": s.column,
        "end_line": s.end_line,
        "source": s.source,
        "kind": s.kind,
    }
    if s.rebind:
        out["rebind"] = True
    out["outputs"] = list(s.outputs)
    out["checks"] = [_check(c) for c in s.checks]
    out["values"] = [{"name": v.name, **_value(v)} for v in s.values]
    out["summary"] = s.summary
    if s.remainder is not None:
        out["remainder"] = _value(s.remainder)
    if s.table is not None:
        out["table"] = _table(s.table)
    if s.plot is not None:
        out["plot"] = _plot(s.plot)
    return out


def to_record(report: Report) -> dict:
    """The whole build as plain JSON data (what ``to_json`` writes)."""
    return {
        "tool": {"name": report.tool_name, "version": report.tool_version},
        "document": report.document,
        "passed": report.passed,
        "conventions": dict(report.conventions),
        "steps": [step_record(s) for s in report.steps],
        "values": {name: _value(v) for name, v in report.values.items()},
        "cached_steps": report.cached_steps,
        # after the keys the format fixes: the headline values, and steps and checks counted apart
        "results": {name: _value(report.values[name]) for name in report.headline if name in report.values},
        "counts": {"steps": len(report.steps), "checks": report.check_count,
                   **{status: report.count(status) for status in STATUSES}},
    }


def to_json(report: Report) -> str:
    """The record as text: indent 2, UTF-8 characters kept, final newline."""
    return json.dumps(to_record(report), indent=2, ensure_ascii=False, allow_nan=False) + "\n"
