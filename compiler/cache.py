"""The build cache: each step's outcome kept as plain JSON beside the document.

A step's key is made of its statement, the keys of the values it reads, the
conventions, the truncation degree and the tool version (the engine computes
it).  An entry holds what the step showed and the exact data of the values
it bound, written by our own serializers: reading it back runs no code (no
pickle, no parsing of expressions) and does no algebra.  The cache is never
needed for correctness; an unreadable file or entry is ignored and rebuilt.
"""
from __future__ import annotations

import dataclasses
import hashlib
import json
import os
import tempfile
from pathlib import Path

import sympy

from .results import STATUSES, CheckResult, PlotData, TableData, ValueRecord, valid_tree

CACHE_DIR = ".anomark-cache"
FORMAT = 1


def _fingerprint() -> str:
    """The tool's own code, so a changed anomark never reuses old results
    even when its version number has not moved."""
    h = hashlib.sha256()
    for path in sorted(Path(__file__).parent.rglob("*.py")):
        h.update(path.read_bytes())
    return h.hexdigest()[:16]


CODE = _fingerprint()


def digest(*parts) -> str:
    """A stable key from JSON-ready parts."""
    text = json.dumps(parts, sort_keys=True, separators=(",", ":"), default=str)
    return hashlib.sha256(text.encode("utf-8")).hexdigest()[:32]


class StepCache:
    """Entries read from the last build; entries written by this one."""

    def __init__(self, document: str, enabled: bool):
        path = Path(document)
        self.file = path.parent / CACHE_DIR / f"{path.name}.json"
        self.enabled = enabled
        self.old: dict = self._load() if enabled else {}
        self.new: dict = {}

    def _load(self) -> dict:
        try:
            data = json.loads(self.file.read_text(encoding="utf-8"))
        except (OSError, ValueError):
            return {}
        if not isinstance(data, dict) or data.get("format") != FORMAT:
            return {}
        entries = data.get("entries")
        return entries if isinstance(entries, dict) else {}

    def get(self, key: str):
        entry = self.old.get(key)
        return entry if isinstance(entry, dict) else None

    def put(self, key: str, entry: dict) -> None:
        if self.enabled:
            self.new[key] = entry

    def save(self) -> None:
        """Write the entries of this build whole, or leave the old file."""
        if not self.enabled:
            return
        try:
            self.file.parent.mkdir(exist_ok=True)
            fd, tmp = tempfile.mkstemp(dir=self.file.parent, prefix=".tmp-")
            with os.fdopen(fd, "w", encoding="utf-8") as handle:
                json.dump({"format": FORMAT, "entries": self.new}, handle)
            os.replace(tmp, self.file)
        except OSError:
            pass  # a read-only folder just means no cache


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
        step.table = TableData(names=_strings(table["names"]), columns=_strings(table["columns"]),
                               rows=[_strings(r) for r in _list(table["rows"])],
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
    _require(isinstance(v, dict) and set(v) == {"name", "text", "latex", "degrees", "tree"}, "value")
    degrees = _list(v["degrees"])
    _require(all(type(d) is int for d in degrees), "degrees")
    _require(valid_tree(v["tree"]), "tree")
    return ValueRecord(_str(v["name"]), _str(v["text"]), _str(v["latex"]), degrees, v["tree"])


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


_BUILDERS = {"add": sympy.Add, "mul": sympy.Mul, "pow": sympy.Pow}


def expr_from_data(data, symbols: dict) -> sympy.Expr:
    if isinstance(data, str):
        num, _, den = data.partition("/")
        return sympy.Rational(int(num), int(den or 1))
    (kind, args), = data.items()
    if kind == "symbol":
        return symbols[args]
    return _BUILDERS[kind](*[expr_from_data(a, symbols) for a in args])
