"""Cache entries as plain data: what a step showed and the exact values it bound.

Written by our own serializers and read back node by node: reading runs no
code and no algebra beyond building the values.  Any part that is not what
this version writes raises ValueError (the step is then recomputed).
"""
from __future__ import annotations

import dataclasses

from ..algebra.graded import Element
from ..algebra.lazysympy import sympy
from ..expressions import Missing
from ..results import STATUSES, CheckResult, PlotData, TableData, ValueRecord, valid_tree

# ---------------------------------------------------------------- step parts

def step_entry(step, outputs: dict) -> dict:
    """What a step showed, as JSON data; ``outputs`` are already data."""
    return {
        "checks": [dataclasses.asdict(c) for c in step.checks],
        "values": [dataclasses.asdict(v) for v in step.values],
        "summary": step.summary,
        "remainder": dataclasses.asdict(step.remainder) if step.remainder else None,
        "table": dataclasses.asdict(step.table) if step.table else None,
        "plot": dataclasses.asdict(step.plot) if step.plot else None,
        "outputs": outputs,
    }


def restore_step(step, entry: dict) -> None:
    """Fill ``step`` from an entry; ValueError if any part is not what this
    version writes (a corrupt entry is then recomputed, never trusted)."""
    step.checks = [_check(c) for c in _list(entry["checks"])]
    step.values = [_record(v) for v in _list(entry["values"])]
    step.summary = _str(entry["summary"])
    step.remainder = _record(entry["remainder"]) if entry["remainder"] is not None else None
    table = entry["table"]
    if table is not None:
        step.table = TableData(names=_strings(table["names"]),
                               cells=[[_tree(c) for c in _list(r)] for r in _list(table["cells"])],
                               text_rows=[_strings(r) for r in _list(table["text_rows"])])
    plot = entry["plot"]
    if plot is not None:
        curves = {_str(k): [_point(p) for p in _list(v)] for k, v in _dict(plot["curves"]).items()}
        step.plot = PlotData(variable=_str(plot["variable"]), low=_str(plot["low"]),
                             high=_str(plot["high"]),
                             fixed={_str(k): _str(v) for k, v in _dict(plot["fixed"]).items()},
                             curves=curves)
    step.cached = True


def _require(ok: bool, what: str):
    if not ok:
        raise ValueError(f"cache entry: bad {what}")


def _str(x) -> str:
    _require(isinstance(x, str), "text")
    return x


def _list(x) -> list:
    _require(isinstance(x, list), "list")
    return x


def _dict(x) -> dict:
    _require(isinstance(x, dict), "mapping")
    return x


def _strings(x) -> list[str]:
    return [_str(item) for item in _list(x)]


def _check(c) -> CheckResult:
    _require(isinstance(c, dict) and set(c) == {"what", "status", "detail"}, "check")
    _require(c["status"] in STATUSES, "status")
    return CheckResult(_str(c["what"]), c["status"], _str(c["detail"]))


def _record(v) -> ValueRecord:
    _require(isinstance(v, dict)
             and set(v) == {"name", "text", "degrees", "tree", "unknown_from"}, "value")
    degrees = _list(v["degrees"])
    _require(all(type(d) is int for d in degrees), "degrees")
    return ValueRecord(_str(v["name"]), _str(v["text"]), degrees, _tree(v["tree"]),
                       precision(v["unknown_from"]))


def _tree(t) -> list:
    _require(valid_tree(t), "tree")
    return t


def precision(p):
    """A stored degree (a known precision): an int or None."""
    _require(p is None or type(p) is int, "degree")
    return p


def _point(p) -> tuple:
    _require(isinstance(p, list) and len(p) == 2
             and all(x is None or type(x) in (int, float) for x in p), "plot point")
    return tuple(p)


# ---------------------------------------------------------------- sympy values
# Class-free values outside the rational functions (square roots from an
# extremization) are stored as a tree of our own, built back node by node.

def expr_to_data(expr: sympy.Expr):
    if isinstance(expr, sympy.Rational):
        return str(expr)
    if isinstance(expr, sympy.Symbol):
        return {"symbol": expr.name}
    if isinstance(expr, (sympy.Add, sympy.Mul, sympy.Pow)):
        return {type(expr).__name__.lower(): [expr_to_data(a) for a in expr.args]}
    raise ValueError(f"cannot store {type(expr).__name__}")


_BUILDERS = {"add": "Add", "mul": "Mul", "pow": "Pow"}  # sympy class names


def expr_from_data(data, specs: dict) -> sympy.Expr:
    """The sympy value of ``expr_to_data`` output; ``specs`` gives the declared symbols by name."""
    if isinstance(data, str):
        num, _, den = data.partition("/")
        return sympy.Rational(int(num), int(den or 1))
    (kind, args), = data.items()
    if kind == "symbol":
        return specs[args].symbol
    return getattr(sympy, _BUILDERS[kind])(*[expr_from_data(a, specs) for a in args])


def value_to_data(value) -> dict:
    """A bound value as data; ValueError if it is of a kind the cache cannot keep."""
    if isinstance(value, Missing):
        return {"missing": True}
    if isinstance(value, Element):
        return {"element": value.to_data()}
    return {"expr": expr_to_data(value)}


def value_from_data(ring, name: str, line: int, data, specs: dict):
    (kind, payload), = _dict(data).items()
    if kind == "missing":
        return Missing(name, line)
    if kind == "element":
        return ring.from_data(payload)
    if kind == "expr":
        return expr_from_data(payload, specs)
    raise ValueError(f"unknown cached value kind {kind!r}")
