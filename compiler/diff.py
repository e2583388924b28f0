"""What changed between two builds, read from their JSON records.

Steps are matched by what they say (source text, statement word, check
description), not by line number, so inserting a paragraph above a step
does not make every later check look new; the lines are reported so the
author can find them.  Identical statements are paired in document order.
"""
from __future__ import annotations

import json
import sys
from collections import defaultdict
from dataclasses import asdict, dataclass, field
from pathlib import Path
from typing import Optional

from compiler.errors import DocumentError, Location, shown
from compiler.results import STATUSES


@dataclass(frozen=True)
class Change:
    """A convention or a value: ``old``/``new`` text, ``None`` where absent."""

    name: str
    old: Optional[str]
    new: Optional[str]

    @property
    def kind(self) -> str:
        return "added" if self.old is None else "removed" if self.new is None else "changed"


@dataclass(frozen=True)
class CheckChange:
    """One check whose status moved; ``None`` status and line where absent."""

    source: str
    kind: str
    what: str
    old_status: Optional[str]
    new_status: Optional[str]
    old_line: Optional[int]
    new_line: Optional[int]


@dataclass
class Diff:
    passed: Optional[tuple[bool, bool]] = None  # (old, new) when it changed
    conventions: list[Change] = field(default_factory=list)
    values: list[Change] = field(default_factory=list)
    checks: list[CheckChange] = field(default_factory=list)

    @property
    def empty(self) -> bool:
        return self.passed is None and not (self.conventions or self.values or self.checks)

    def as_dict(self) -> dict:
        return {
            "same": self.empty,
            "passed": None if self.passed is None else {"old": self.passed[0], "new": self.passed[1]},
            "conventions": [dict(asdict(c), change=c.kind) for c in self.conventions],
            "values": [dict(asdict(c), change=c.kind) for c in self.values],
            "checks": [asdict(c) for c in self.checks],
        }


# ------------------------------------------------------------------ reading


def _problems(record) -> list[str]:
    """What keeps ``record`` from being a JSON record ``diff`` can compare."""
    if not isinstance(record, dict):
        return ["the top level is not an object"]
    wanted = {"passed": bool, "conventions": dict, "steps": list, "values": dict}
    out = [f"'{k}' is missing or not a {t.__name__}" for k, t in wanted.items()
           if not isinstance(record.get(k), t)]
    if out:
        return out
    for n, step in enumerate(record["steps"], start=1):
        if not (isinstance(step, dict) and isinstance(step.get("source"), str)
                and isinstance(step.get("kind"), str) and isinstance(step.get("line"), int)
                and isinstance(step.get("checks"), list)):
            out.append(f"step {n} lacks source, kind, line or checks")
            continue
        for c in step["checks"]:
            if not (isinstance(c, dict) and isinstance(c.get("what"), str) and c.get("status") in STATUSES):
                out.append(f"step {n} has a check without 'what' or a known 'status'")
    out += [f"value '{name}' has no text" for name, v in record["values"].items()
            if not (isinstance(v, dict) and isinstance(v.get("text"), str))]
    return out


def load_record(path) -> dict:
    """Read a JSON record, or raise a DocumentError saying why it is unusable."""
    where = Location(str(path), 1, 1)
    try:
        text = Path(path).read_text(encoding="utf-8")
    except OSError as e:
        raise DocumentError(where, f"cannot read the record: {e.strerror or e}") from None
    except UnicodeDecodeError:
        raise DocumentError(where, "the record is not UTF-8 text") from None
    try:
        record = json.loads(text)
    except json.JSONDecodeError as e:
        raise DocumentError(Location(str(path), e.lineno, e.colno), f"not valid JSON: {e.msg}") from None
    except RecursionError:
        raise DocumentError(where, "not an anomark JSON record: nested too deeply") from None
    except ValueError:  # an integer past the interpreter's digit limit
        raise DocumentError(where, "not an anomark JSON record: a number has more than "
                                   f"{sys.get_int_max_str_digits()} digits") from None
    problems = _problems(record)
    if problems:
        raise DocumentError(where, "not an anomark JSON record: " + "; ".join(problems))
    return record


# ---------------------------------------------------------------- comparing


def _changes(old: dict, new: dict, text) -> list[Change]:
    names = list(old) + [n for n in new if n not in old]
    pairs = ((n, text(old[n]) if n in old else None, text(new[n]) if n in new else None) for n in names)
    return [Change(n, a, b) for n, a, b in pairs if a != b]


def _checks_by_key(record: dict) -> dict[tuple, list[tuple[int, str]]]:
    """(source, kind, what) → [(line, status), ...] in document order."""
    out: dict[tuple, list] = defaultdict(list)
    for step in record["steps"]:
        for c in step["checks"]:
            out[(step["source"], step["kind"], c["what"])].append((step["line"], c["status"]))
    return out


def _check_changes(old: dict, new: dict) -> list[CheckChange]:
    before, after = _checks_by_key(old), _checks_by_key(new)
    out = []
    for key in list(before) + [k for k in after if k not in before]:
        a, b = before.get(key, []), after.get(key, [])
        for i in range(max(len(a), len(b))):
            old_line, old_status = a[i] if i < len(a) else (None, None)
            new_line, new_status = b[i] if i < len(b) else (None, None)
            if old_status != new_status:
                out.append(CheckChange(*key, old_status, new_status, old_line, new_line))
    return out


def diff_records(old: dict, new: dict) -> Diff:
    """The differences between two loaded records (see ``load_record``)."""
    return Diff(
        passed=None if old["passed"] == new["passed"] else (old["passed"], new["passed"]),
        conventions=_changes(old["conventions"], new["conventions"], str),
        values=_changes(old["values"], new["values"], lambda v: v["text"]),
        checks=_check_changes(old, new),
    )


# ----------------------------------------------------------------- printing


def _at(line: Optional[int]) -> str:
    return "" if line is None else f"line {line}"


def format_diff(diff: Diff) -> str:
    """A human account, one change per line (no final newline); ``no differences`` when empty.

    Names and texts come from the records, which anyone may have written, so
    their control characters are shown escaped, never sent to the terminal."""
    if diff.empty:
        return "no differences"
    out = []
    if diff.passed is not None:
        out.append(f"passed: {str(diff.passed[0]).lower()} -> {str(diff.passed[1]).lower()}")
    for group, items in (("convention", diff.conventions), ("value", diff.values)):
        for c in items:
            if c.kind == "changed":
                out.append(f"{group} {c.name}: {c.old} -> {c.new}")
            else:
                out.append(f"{group} {c.name} {c.kind}: {c.new if c.old is None else c.old}")
    for c in diff.checks:
        lines = " / ".join(x for x in (_at(c.old_line), _at(c.new_line)) if x)
        if c.old_status is None:
            change = f"added, {c.new_status}"
        elif c.new_status is None:
            change = f"removed (was {c.old_status})"
        else:
            change = f"{c.old_status} -> {c.new_status}"
        out.append(f"check {lines}: {c.source!r} [{c.what}]: {change}")
    return "\n".join(shown(line) for line in out)


def diff_to_json(diff: Diff) -> str:
    """The diff as a JSON object (stable keys, indent 2); unprintable characters
    (which can only sit inside strings) as ``\\u`` escapes, safe on a terminal."""
    text = json.dumps(diff.as_dict(), indent=2, ensure_ascii=False)
    return "".join(ch if ch.isprintable() or ch == "\n" else json.dumps(ch)[1:-1] for ch in text)
